/**
 * Electron main process. Follows Electron's security checklist: context isolation, sandbox, no
 * Node integration, a strict Content-Security-Policy, navigation and new windows blocked,
 * permission requests denied, only our own files loaded. The API runs in a Node child process
 * (main/api-child.ts); this file only relays calls.
 */
import { app, BrowserWindow, ipcMain, session, shell } from 'electron';
import { fork, type ChildProcess } from 'node:child_process';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { OPERATIONS } from '../../app/api-contract.ts';
import type { ChildRequest, ChildResponse } from '../api-child.ts';

const CSP = "default-src 'self'; script-src 'self'; style-src 'self' 'unsafe-inline'; img-src 'self' data: blob:; connect-src 'self'; base-uri 'none'; form-action 'none'";
const repoRoot = process.env.VEIL_REPO ?? join(__dirname, '..', '..');
const studyDir = process.env.VEIL_STUDY;
const nodePath = process.env.VEIL_NODE ?? 'node';

if (!studyDir) {
  console.error('VEIL_STUDY must name a study or kit folder');
  app.exit(2);
}

let child: ChildProcess | null = null;
let nextId = 1;
const pending = new Map<number, { ok: (v: unknown) => void; fail: (e: Error) => void }>();

function startApiChild(): Promise<void> {
  return new Promise((ready, failed) => {
    child = fork(join(repoRoot, 'main', 'api-child.ts'), [studyDir!], {
      execPath: nodePath,
      execArgv: ['--import', 'tsx'],
      cwd: repoRoot,
      serialization: 'advanced',
      stdio: ['ignore', 'inherit', 'inherit', 'ipc'],
    });
    child.on('message', (m: ChildResponse) => {
      if (m.id === 0) return ready();
      const p = pending.get(m.id);
      if (!p) return;
      pending.delete(m.id);
      if (m.ok) p.ok(m.value);
      else p.fail(new Error(m.error));
    });
    child.on('exit', (code) => {
      for (const p of pending.values()) p.fail(new Error(`Veil's core stopped (exit ${code})`));
      pending.clear();
      failed(new Error(`Veil's core process exited with code ${code}`));
    });
  });
}

function callChild(op: ChildRequest['op'], arg: unknown): Promise<unknown> {
  return new Promise((ok, fail) => {
    const id = nextId++;
    pending.set(id, { ok, fail });
    child!.send({ id, op, arg } satisfies ChildRequest);
  });
}

const rendererIndex = join(repoRoot, 'dist', 'renderer', 'index.html');
const rendererUrl = pathToFileURL(rendererIndex).href;

app.enableSandbox();

app.on('web-contents-created', (_e, contents) => {
  contents.on('will-navigate', (event, url) => { if (url.split('#')[0] !== rendererUrl) event.preventDefault(); });
  contents.on('will-attach-webview', (event) => event.preventDefault());
  contents.setWindowOpenHandler(({ url }) => {
    if (url.startsWith('https://')) void shell.openExternal(url);
    return { action: 'deny' };
  });
});

app.whenReady().then(async () => {
  session.defaultSession.setPermissionRequestHandler((_wc, _perm, cb) => cb(false));
  session.defaultSession.webRequest.onHeadersReceived((details, cb) => {
    cb({ responseHeaders: { ...details.responseHeaders, 'Content-Security-Policy': [CSP] } });
  });
  await startApiChild();
  for (const op of OPERATIONS) {
    ipcMain.handle(`veil:${op}`, (event, arg) => {
      if (!event.senderFrame || !event.senderFrame.url.startsWith(rendererUrl)) throw new Error('refused: call from an unknown page');
      return callChild(op, arg);
    });
  }
  const win = new BrowserWindow({
    width: 1400,
    height: 900,
    backgroundColor: '#0d0f12',
    show: false,
    title: 'Veil',
    webPreferences: {
      preload: join(__dirname, 'preload.cjs'),
      contextIsolation: true,
      sandbox: true,
      nodeIntegration: false,
      webSecurity: true,
      spellcheck: false,
    },
  });
  win.once('ready-to-show', () => win.show());
  await win.loadFile(rendererIndex);
});

app.on('window-all-closed', () => {
  child?.disconnect();
  app.quit();
});
