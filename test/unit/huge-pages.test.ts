/**
 * The relaunch of heavy `veil` commands with glibc's huge-page tunable (bin/huge-pages.mjs): the
 * second process sees the tunable and the same arguments, its exit code comes back, and killing
 * the first process outright (SIGKILL, which cannot be forwarded) stops the second too; `npm start`
 * serves from such a second process.
 */
import { spawn, spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { buildStudy } from '../../app/blinding/build.ts';
import { loadTemplate } from '../../app/study/parse-template.ts';
import { writeTinyStudy } from './helpers.ts';

const REPO = join(import.meta.dirname, '..', '..');
const MODULE = join(REPO, 'bin', 'huge-pages.mjs');

/** A script file that starts as a `veil` entry point does, then runs `body`. */
function script(body: string): string {
  const file = join(mkdtempSync(join(tmpdir(), 'veil-relaunch-')), 'entry.mjs');
  writeFileSync(file, `
import { runWithHugePages } from ${JSON.stringify(MODULE)};
await runWithHugePages();
${body}`);
  return file;
}

/** Polls `done` every 50 ms until it holds or `ms` have passed (the caller then asserts). */
async function waitUntil(done: () => boolean, ms: number): Promise<void> {
  const deadline = Date.now() + ms;
  while (!done() && Date.now() < deadline) await new Promise((r) => setTimeout(r, 50));
}

function alive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch {
    return false;
  }
}

describe.runIf(process.platform === 'linux')('relaunch with huge pages', () => {
  it('runs the command again with the tunable and the same arguments, and returns its exit code', () => {
    const body = `console.log(JSON.stringify({ tunables: process.env.GLIBC_TUNABLES, args: process.argv.slice(2) })); process.exit(7);`;
    const r = spawnSync(process.execPath, [script(body), 'x', '--flag'], {
      encoding: 'utf8',
      env: { ...process.env, VEIL_NO_RELAUNCH: '', GLIBC_TUNABLES: 'glibc.malloc.check=0' },
    });
    expect(r.status).toBe(7);
    const out = JSON.parse(r.stdout.trim());
    expect(out.tunables).toBe('glibc.malloc.check=0:glibc.malloc.hugetlb=1');
    expect(out.args).toEqual(['x', '--flag']);
  });

  it('does not relaunch when told not to', () => {
    const body = `console.log(process.env.GLIBC_TUNABLES ?? 'unset');`;
    const r = spawnSync(process.execPath, [script(body)], {
      encoding: 'utf8',
      env: { ...process.env, VEIL_NO_RELAUNCH: '1', GLIBC_TUNABLES: '' },
    });
    expect(r.status).toBe(0);
    expect(r.stdout.trim()).toBe('');
  });

  it('stops the relaunched process when the first one is killed with SIGKILL', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'veil-relaunch-'));
    const pidFile = join(dir, 'pid');
    const body = `(await import('node:fs')).writeFileSync(${JSON.stringify(pidFile)}, String(process.pid)); setInterval(() => {}, 1000);`;
    const first = spawn(process.execPath, [script(body)], {
      stdio: 'ignore',
      env: { ...process.env, VEIL_NO_RELAUNCH: '' },
    });
    await waitUntil(() => existsSync(pidFile), 10_000);
    const second = Number(readFileSync(pidFile, 'utf8'));
    expect(second).not.toBe(first.pid);
    expect(alive(second)).toBe(true);
    first.kill('SIGKILL');
    await waitUntil(() => !alive(second), 5_000);
    expect(alive(second)).toBe(false);
  });

  it('npm start serves from a process with the tunable, which stops when npm start is stopped', async () => {
    const { template, dir } = writeTinyStudy();
    await buildStudy(loadTemplate(template), join(dir, 'out'));
    const start = spawn(process.execPath, [join(REPO, 'bin', 'start.mjs')], {
      cwd: REPO,
      stdio: ['ignore', 'pipe', 'pipe'],
      env: { ...process.env, VEIL_NO_RELAUNCH: '', GLIBC_TUNABLES: '', VEIL_STUDY: join(dir, 'out'), VEIL_HOST: 'http', BROWSER: 'none', PORT: '0' },
    });
    let said = '';
    start.stderr.on('data', (d) => (said += d));
    start.stdout.on('data', (d) => (said += d));
    await waitUntil(() => said.includes('Veil reading room: http://') || start.exitCode !== null, 25_000);
    expect(said).toContain('Veil reading room: http://');
    const children = readdirSync('/proc').filter((p) => /^\d+$/.test(p)).filter((p) => {
      try {
        return readFileSync(`/proc/${p}/stat`, 'utf8').replace(/^.*\) /, '').split(' ')[1] === String(start.pid);
      } catch {
        return false;
      }
    });
    expect(children).toHaveLength(1);
    const environ = readFileSync(`/proc/${children[0]}/environ`, 'utf8').split('\0');
    expect(environ).toContain('GLIBC_TUNABLES=glibc.malloc.hugetlb=1');
    start.kill('SIGTERM');
    await waitUntil(() => !alive(Number(children[0])), 5_000);
    expect(alive(Number(children[0]))).toBe(false);
  });
});
