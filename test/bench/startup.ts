/**
 * Veil benchmarks for the walking skeleton. Each figure is printed with a reference measured in
 * the same run on the same machine, as a ratio:
 * - first start: `npm start` (demo creation, UI build, localhost host) until the printed URL
 *   serves the app, against starting a bare Node process;
 * - warm start: the same with the demo and UI already there (the 20 s target of the skeleton);
 * - answer commit: submitAnswer through the localhost host (HTTP, validation, transaction with
 *   synchronous=FULL), p50 and p95, against a bare better-sqlite3 INSERT in its own transaction
 *   with the same pragmas (the floor set by the disk's fsync).
 */
import Database from 'better-sqlite3';
import { spawn, spawnSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { writeNpy } from '../../app/images/npy.ts';
import { buildStudy } from '../../app/blinding/build.ts';
import { loadTemplate } from '../../app/study/parse-template.ts';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fmt, percentileMs } from './stats.ts';

const REPO = join(import.meta.dirname, '..', '..');

function timeBareNode(): number {
  const t0 = performance.now();
  spawnSync(process.execPath, ['-e', '0']);
  return performance.now() - t0;
}

async function timeStart(dataDir: string): Promise<{ ms: number; url: string; stop: () => void }> {
  const t0 = performance.now();
  const child = spawn(process.execPath, [join(REPO, 'bin', 'start.mjs')], {
    env: { ...process.env, VEIL_DATA: dataDir, BROWSER: 'none', VEIL_HOST: 'http', PORT: '0' },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  let out = '';
  const url = await new Promise<string>((ok, fail) => {
    child.stdout!.on('data', (d) => {
      out += d;
      const m = /(http:\/\/127\.0\.0\.1:\d+\/\?token=[\w-]+)/.exec(out);
      if (m) ok(m[1]);
    });
    child.on('exit', (c) => fail(new Error(`npm start exited ${c}`)));
  });
  const res = await fetch(url);
  if (!res.ok) throw new Error(`app not served: ${res.status}`);
  await res.text();
  return { ms: performance.now() - t0, url, stop: () => child.kill('SIGTERM') };
}

/** A one-session study of `n` small items, built and served, so every submission is a first answer. */
async function servedCommitStudy(n: number): Promise<{ url: string; stop: () => void }> {
  const dir = mkdtempSync(join(tmpdir(), 'veil-bench-commit-'));
  const px = new Float32Array(2 * 16 * 16).map((_, i) => i % 17);
  for (let c = 0; c < n; c++) {
    mkdirSync(join(dir, 'data', `c${c}`), { recursive: true });
    writeFileSync(join(dir, 'data', `c${c}`, 'a.npy'), writeNpy(px, [2, 16, 16]));
    writeFileSync(join(dir, 'data', `c${c}`, 'b.npy'), writeNpy(px, [2, 16, 16]));
  }
  writeFileSync(join(dir, 'b.study.yaml'), `title: Commit bench
seed: 3
sources: data
methods:
  - {id: m-a, label: A, path: "{case}/a.npy"}
  - {id: m-b, label: B, path: "{case}/b.npy"}
cases: auto
questions:
  - {id: sharpness, text: Sharp?, scale: {points: 5, low: a, high: b}}
  - {id: artifacts, text: Clean?, scale: {points: 5, low: a, high: b}}
  - {id: confidence, text: Sure?, scale: {points: 5, low: a, high: b}}
readers: [R2]
`);
  await buildStudy(loadTemplate(join(dir, 'b.study.yaml')), join(dir, 'study'));
  const child = spawn(process.execPath, [join(REPO, 'bin', 'veil.mjs'), 'serve', join(dir, 'study'), '--no-open', '--port', '0'], { stdio: ['ignore', 'pipe', 'pipe'] });
  let out = '';
  const url = await new Promise<string>((ok, fail) => {
    child.stdout!.on('data', (d) => { out += d; const m = /(http:\/\/127\.0\.0\.1:\d+\/\?token=[\w-]+)/.exec(out); if (m) ok(m[1]); });
    child.on('exit', (c) => fail(new Error(`veil serve exited ${c}`)));
  });
  return { url, stop: () => { child.kill('SIGTERM'); rmSync(dir, { recursive: true, force: true }); } };
}

async function commitLatency(url: string, n: number): Promise<number[]> {
  const u = new URL(url);
  const headers = { 'Content-Type': 'application/json', Authorization: `Bearer ${u.searchParams.get('token')}` };
  const call = async (op: string, body: unknown) => {
    const r = await fetch(`${u.origin}/api/${op}`, { method: 'POST', headers, body: JSON.stringify(body) });
    if (!r.ok) throw new Error(`${op}: ${r.status} ${await r.text()}`);
    return r.json();
  };
  const kit = await call('openKit', { reader: 'R2' }) as { items: { id: string }[] };
  const samples: number[] = [];
  for (let i = 0; i < n; i++) {
    const itemId = kit.items[i % kit.items.length].id;
    const t0 = performance.now();
    await call('submitAnswer', { reader: 'R2', itemId, scores: { sharpness: 1 + (i % 5), artifacts: 3, confidence: 4 }, seconds: 1 });
    samples.push(performance.now() - t0);
  }
  return samples;
}

function bareInsertLatency(n: number): number[] {
  const dir = mkdtempSync(join(tmpdir(), 'veil-bench-'));
  const db = new Database(join(dir, 'floor.sqlite'));
  db.pragma('journal_mode = WAL');
  db.pragma('synchronous = FULL');
  db.exec('CREATE TABLE a (id INTEGER PRIMARY KEY, item TEXT, q TEXT, score INTEGER)');
  const ins = db.prepare('INSERT INTO a (item, q, score) VALUES (?, ?, ?)');
  const tx = db.transaction((i: number) => { for (const q of ['s', 'a', 'c']) ins.run(`x${i}`, q, i % 5); });
  const samples: number[] = [];
  for (let i = 0; i < n; i++) {
    const t0 = performance.now();
    tx(i);
    samples.push(performance.now() - t0);
  }
  db.close();
  rmSync(dir, { recursive: true, force: true });
  return samples;
}

export async function bench(): Promise<string[]> {
  const data = mkdtempSync(join(tmpdir(), 'veil-bench-start-'));
  const bare = Math.min(...[1, 2, 3].map(timeBareNode));
  rmSync(join(REPO, 'dist', 'renderer'), { recursive: true, force: true });
  const cold = await timeStart(data);
  cold.stop();
  await new Promise((r) => setTimeout(r, 500));
  const warm = await timeStart(data);
  warm.stop();
  const N = 200;
  const commitStudy = await servedCommitStudy(N / 2);
  const veil = await commitLatency(commitStudy.url, N);
  commitStudy.stop();
  const floor = bareInsertLatency(N);
  rmSync(data, { recursive: true, force: true });

  const rows: [string, string, string, string][] = [
    ['first npm start (demo + UI build) to served URL', fmt(cold.ms), `bare node start ${fmt(bare)}`, `${(cold.ms / bare).toFixed(1)}x`],
    ['warm npm start to served URL (target <= 20 s)', fmt(warm.ms), `bare node start ${fmt(bare)}`, `${(warm.ms / bare).toFixed(1)}x`],
    ['answer commit over HTTP, p50', fmt(percentileMs(veil, 50)), `bare SQLite commit ${fmt(percentileMs(floor, 50))}`, `${(percentileMs(veil, 50) / percentileMs(floor, 50)).toFixed(1)}x`],
    ['answer commit over HTTP, p95', fmt(percentileMs(veil, 95)), `bare SQLite commit ${fmt(percentileMs(floor, 95))}`, `${(percentileMs(veil, 95) / percentileMs(floor, 95)).toFixed(1)}x`],
  ];
  const w = [0, 1, 2].map((i) => Math.max(...rows.map((r) => r[i].length)));
  return rows.map((r) => `${r[0].padEnd(w[0])}  ${r[1].padStart(w[1])}  vs ${r[2].padEnd(w[2])}  ${r[3]}`);
}
