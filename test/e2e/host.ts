/** Starts `veil serve` on a fresh demo study as a real child process, as a user would. */
import { expect, type APIRequestContext } from '@playwright/test';
import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import { cpSync, mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

export const REPO = join(import.meta.dirname, '..', '..');
const VEIL = join(REPO, 'bin', 'veil.mjs');

/** A fresh copy of the demo study that global-setup.ts built once for the run (or a new demo). */
export function makeDemo(): string {
  const dir = mkdtempSync(join(tmpdir(), 'veil-e2e-'));
  const built = process.env.VEIL_E2E_DEMO;
  if (built) {
    cpSync(built, dir, { recursive: true });
    return dir;
  }
  const r = spawnSync(process.execPath, [VEIL, 'demo', '--out', dir], { encoding: 'utf8' });
  if (r.status !== 0) throw new Error(`veil demo failed: ${r.stderr}`);
  return dir;
}

export interface ServedStudy { url: string; origin: string; token: string; process: ChildProcess; stop(): Promise<void> }

export async function serve(dir: string): Promise<ServedStudy> {
  const child = spawn(process.execPath, [VEIL, 'serve', dir, '--no-open', '--port', '0'], {
    env: { ...process.env, BROWSER: 'none' },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  let out = '';
  let err = '';
  child.stderr!.on('data', (d) => { err += d; });
  const url = await new Promise<string>((ok, fail) => {
    const timer = setTimeout(() => fail(new Error(`veil serve printed no URL in 20 s: ${out}${err}`)), 20_000);
    child.stdout!.on('data', (d) => {
      out += d;
      const m = /(http:\/\/127\.0\.0\.1:\d+\/\?token=[\w-]+)/.exec(out);
      if (m) { clearTimeout(timer); ok(m[1]); }
    });
    child.on('exit', (code) => { clearTimeout(timer); fail(new Error(`veil serve exited (${code}): ${err}`)); });
  });
  const u = new URL(url);
  return {
    url,
    origin: u.origin,
    token: u.searchParams.get('token')!,
    process: child,
    stop: () => new Promise((done) => {
      if (child.exitCode !== null) return done();
      child.once('exit', () => done());
      child.kill('SIGTERM');
    }),
  };
}

/** Calls an API operation of a served study as the renderer would, expecting success. */
export async function callApi(request: APIRequestContext, host: ServedStudy, op: string, data: unknown): Promise<unknown> {
  const res = await request.post(`${host.origin}/api/${op}`, { data, headers: { Authorization: `Bearer ${host.token}` } });
  expect(res.status(), await res.text()).toBe(200);
  return res.json();
}
