/**
 * Opening a Veil database: WAL journal, foreign keys on, `synchronous = FULL` so that a committed
 * answer survives a power loss, one writer at a time (see ./lock.ts), migrations applied.
 */
import Database from 'better-sqlite3';
import { existsSync } from 'node:fs';
import { acquireWriteLock, type WriteLock } from './lock.ts';
import { migrate, readerMigrations, workspaceMigrations } from './migrations.ts';

export type DatabaseKind = 'workspace' | 'reader';

export interface OpenedDatabase {
  db: Database.Database;
  file: string;
  close(): void;
}

export function openDatabase(file: string, kind: DatabaseKind, opts: { readonly?: boolean; create?: boolean } = {}): OpenedDatabase {
  const readonly = opts.readonly ?? false;
  if (!existsSync(file) && (readonly || opts.create === false)) {
    throw new Error(`${file} does not exist. ${kind === 'workspace' ? 'Run `veil build` first.' : ''}`.trim());
  }
  let lock: WriteLock | null = null;
  if (!readonly) lock = acquireWriteLock(file);
  let db: Database.Database;
  try {
    db = new Database(file, { readonly, fileMustExist: readonly });
    if (!readonly) {
      db.pragma('journal_mode = WAL');
      db.pragma('synchronous = FULL');
    }
    db.pragma('foreign_keys = ON');
    db.pragma('busy_timeout = 5000');
    if (!readonly) migrate(db, kind === 'workspace' ? workspaceMigrations : readerMigrations, file);
  } catch (e) {
    lock?.release();
    throw e;
  }
  return {
    db,
    file,
    close() {
      if (db.open) db.close();
      lock?.release();
    },
  };
}

export function audit(db: Database.Database, action: string, detail: Record<string, unknown>): void {
  db.prepare('INSERT INTO audit (at, action, detail) VALUES (?, ?, ?)').run(new Date().toISOString(), action, JSON.stringify(detail));
}
