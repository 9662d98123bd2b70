/**
 * One writer per database file. A lock file beside the database holds the writer's process id;
 * a second process that wants to write gets a clear message naming that process. A lock left by a
 * process that no longer runs (killed, power loss) is taken over, so a crash never locks a study.
 */
import { closeSync, openSync, readFileSync, rmSync, writeSync } from 'node:fs';
import { hostname } from 'node:os';

export class DatabaseLockedError extends Error {
  constructor(public readonly file: string, public readonly holderPid: number, since: string) {
    super(`${file} is already open for writing by another Veil process (pid ${holderPid}, since ${since}). ` +
      'Close that window or command first; reading is still possible.');
    this.name = 'DatabaseLockedError';
  }
}

interface LockInfo { pid: number; host: string; since: string }

function processIsAlive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (e) {
    return (e as NodeJS.ErrnoException).code === 'EPERM';
  }
}

export interface WriteLock { release(): void }

export function acquireWriteLock(dbFile: string): WriteLock {
  const lockFile = `${dbFile}.lock`;
  const mine: LockInfo = { pid: process.pid, host: hostname(), since: new Date().toISOString() };
  for (let attempt = 0; attempt < 2; attempt++) {
    try {
      const fd = openSync(lockFile, 'wx');
      writeSync(fd, JSON.stringify(mine));
      closeSync(fd);
      let released = false;
      return {
        release() {
          if (released) return;
          released = true;
          try {
            const now = JSON.parse(readFileSync(lockFile, 'utf8')) as LockInfo;
            if (now.pid === mine.pid) rmSync(lockFile, { force: true });
          } catch { /* already gone */ }
        },
      };
    } catch (e) {
      if ((e as NodeJS.ErrnoException).code !== 'EEXIST') throw e;
      let holder: LockInfo | null = null;
      try { holder = JSON.parse(readFileSync(lockFile, 'utf8')) as LockInfo; } catch { holder = null; }
      const stale = !holder || (holder.host === mine.host && (holder.pid === process.pid ? false : !processIsAlive(holder.pid)));
      if (holder && holder.pid === process.pid && holder.host === mine.host) {
        throw new DatabaseLockedError(dbFile, holder.pid, holder.since);
      }
      if (!stale) throw new DatabaseLockedError(dbFile, holder!.pid, holder!.since);
      rmSync(lockFile, { force: true });
    }
  }
  throw new Error(`Could not take the write lock ${lockFile}`);
}
