/**
 * `npm start`: opens Veil on a study (by default the demo study, created on first start).
 * The desktop window when the Electron binary is installed (fetched here on first start where the
 * network allows); otherwise the localhost host, whose URL is printed and opened in a browser.
 * VEIL_HOST=http or VEIL_HOST=electron forces one; VEIL_STUDY names another study or kit folder.
 */
import { spawn, spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, readdirSync, readFileSync, statSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { join, resolve } from 'node:path';
import { writeDemo } from '../app/demo/demo.ts';
import { WORKSPACE_FILE } from '../app/store/workspace.ts';
import { buildParts } from './build-parts.ts';
import { DEFAULT_DATA, REPO_ROOT, RENDERER_DIST } from './paths.ts';
import { serveUntilStopped } from './serve.ts';
import { kitFolderFor } from '../app/blinding/kit-unzip.ts';

const log = (s: string) => process.stderr.write(`${s}\n`);

function newestMtime(dir: string): number {
  let newest = 0;
  for (const e of readdirSync(dir, { withFileTypes: true })) {
    const p = join(dir, e.name);
    newest = Math.max(newest, e.isDirectory() ? newestMtime(p) : statSync(p).mtimeMs);
  }
  return newest;
}

async function ensureRenderer(): Promise<void> {
  const index = join(RENDERER_DIST, 'index.html');
  const sources = Math.max(newestMtime(join(REPO_ROOT, 'renderer')), newestMtime(join(REPO_ROOT, 'app')));
  if (existsSync(index) && statSync(index).mtimeMs >= sources) return;
  log('Building the user interface…');
  // In its own process, so it runs on the second core while the demo study is simulated.
  await new Promise<void>((ok, fail) => {
    const child = spawn(process.execPath, [join(REPO_ROOT, 'bin', 'build.mjs'), 'renderer'], { stdio: 'inherit' });
    child.on('exit', (code) => (code === 0 ? ok() : fail(new Error(`building the user interface failed (exit ${code})`))));
  });
}

async function ensureStudy(): Promise<string> {
  if (process.env.VEIL_STUDY) return kitFolderFor(resolve(process.env.VEIL_STUDY), log);
  const demo = join(DEFAULT_DATA, 'demo');
  if (!existsSync(join(demo, WORKSPACE_FILE))) {
    log(`Creating the invented demo study in ${demo} (synthetic phantoms, simulated readers)…`);
    mkdirSync(demo, { recursive: true });
    await writeDemo(demo);
  }
  return demo;
}

/** Path of the Electron binary, installing it with Electron's own script when allowed and possible. */
function electronBinary(): string | null {
  if (process.env.VEIL_HOST === 'http') return null;
  const require = createRequire(join(REPO_ROOT, 'package.json'));
  let pkgDir: string;
  try { pkgDir = join(require.resolve('electron/package.json'), '..'); } catch { return null; }
  const pathTxt = join(pkgDir, 'path.txt');
  const marker = join(DEFAULT_DATA, 'electron-unavailable');
  if (!existsSync(pathTxt)) {
    const triedRecently = existsSync(marker) && Date.now() - statSync(marker).mtimeMs < 24 * 3600 * 1000;
    if (triedRecently && process.env.VEIL_HOST !== 'electron') return null;
    log('Fetching the Electron binary (first start)…');
    const r = spawnSync(process.execPath, [join(pkgDir, 'install.js')], { stdio: 'pipe', timeout: 120_000 });
    if (r.status !== 0 || !existsSync(pathTxt)) {
      mkdirSync(DEFAULT_DATA, { recursive: true });
      writeFileSync(marker, `${new Date().toISOString()}\n${String(r.stderr ?? '').slice(-2000)}`);
      log('The Electron binary could not be fetched here; using the localhost host instead (retried after a day).');
      return null;
    }
  }
  const bin = join(pkgDir, 'dist', readFileSync(pathTxt, 'utf8').trim());
  return existsSync(bin) ? bin : null;
}

function hasDisplay(): boolean {
  return process.platform !== 'linux' || !!(process.env.DISPLAY || process.env.WAYLAND_DISPLAY);
}

async function main(): Promise<void> {
  const t0 = performance.now();
  const [, study] = await Promise.all([ensureRenderer(), ensureStudy()]);
  const electron = electronBinary();
  if (electron && hasDisplay()) {
    await buildParts(['electron']);
    log(`Opening the Veil window on ${study} (${Math.round(performance.now() - t0)} ms)`);
    const child = spawn(electron, [join(REPO_ROOT, 'dist', 'electron', 'main.cjs')], {
      stdio: 'inherit',
      env: { ...process.env, VEIL_STUDY: study, VEIL_NODE: process.execPath, VEIL_REPO: REPO_ROOT },
    });
    child.on('exit', (code) => process.exit(code ?? 0));
    return;
  }
  if (electron) log('No display found for the desktop window; using the localhost host.');
  log(`Ready in ${Math.round(performance.now() - t0)} ms.`);
  await serveUntilStopped(study, { open: true });
}

main().catch((e) => {
  log(`veil: ${(e as Error).message}`);
  process.exit(1);
});
