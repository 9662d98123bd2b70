/**
 * Electron smoke test: the desktop window opens on the demo study with the security settings of
 * the checklist. Runs where the Electron binary is installed; skipped, saying why, where not.
 */
import { _electron as electron, expect, test } from '@playwright/test';
import { spawnSync } from 'node:child_process';
import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { makeDemo, REPO } from './host.ts';
import { OPERATIONS } from '../../app/api-contract.ts';

function electronBinary(): string | null {
  const pathTxt = join(REPO, 'node_modules', 'electron', 'path.txt');
  if (!existsSync(pathTxt)) return null;
  const bin = join(REPO, 'node_modules', 'electron', 'dist', readFileSync(pathTxt, 'utf8').trim());
  return existsSync(bin) ? bin : null;
}

const bin = electronBinary();
const display = process.platform !== 'linux' || !!(process.env.DISPLAY || process.env.WAYLAND_DISPLAY);

test('the Electron window opens the demo study with isolation, sandbox and the narrow bridge', async () => {
  const why = !bin
    ? 'Electron binary not installed: its download is not reachable from this machine (npm start falls back to the localhost host, which the other end-to-end tests cover in Chromium)'
    : !display ? 'no display for an Electron window (set DISPLAY, e.g. under Xvfb)' : null;
  if (why) console.log(`Electron smoke test skipped: ${why}`);
  test.skip(why !== null, why ?? '');
  const built = spawnSync(process.execPath, [join(REPO, 'bin', 'build.mjs'), 'electron', 'renderer'], { encoding: 'utf8' });
  expect(built.status, built.stderr).toBe(0);
  const dir = makeDemo();
  const app = await electron.launch({
    executablePath: bin!,
    args: [...(process.getuid?.() === 0 ? ['--no-sandbox'] : []), join(REPO, 'dist', 'electron', 'main.cjs')],
    env: { ...process.env, VEIL_STUDY: dir, VEIL_NODE: process.execPath, VEIL_REPO: REPO },
  });
  try {
    const win = await app.firstWindow();
    await expect(win.getByRole('heading', { name: /Phantom brain/ })).toBeVisible({ timeout: 30_000 });
    const surface = await win.evaluate(() => {
      const w = globalThis as unknown as { require?: unknown; process?: unknown; veil: object };
      return { require: typeof w.require, process: typeof w.process, bridge: Object.keys(w.veil).sort() };
    });
    expect(surface).toEqual({ require: 'undefined', process: 'undefined', bridge: [...OPERATIONS].sort() });
    const prefs = await app.evaluate(({ BrowserWindow }) => {
      const w = BrowserWindow.getAllWindows()[0];
      const contents = w.webContents as unknown as { getLastWebPreferences?: () => Record<string, unknown> };
      const p = contents.getLastWebPreferences?.();
      return p ? { contextIsolation: p.contextIsolation, sandbox: p.sandbox, nodeIntegration: p.nodeIntegration } : null;
    });
    if (prefs) expect(prefs).toEqual({ contextIsolation: true, sandbox: true, nodeIntegration: false });
    await win.getByTestId('reader-R1').click();
    await expect(win.getByTestId('progress-text')).toHaveText('Item 1 of 18');
  } finally {
    await app.close();
  }
});
