/**
 * Reading-room speed, measured in Chromium (Debian's /usr/bin/chromium through Playwright) on a
 * kit of 512 x 512 x 8 16-bit images served by `veil serve`:
 * - slice change: from the key press (a capture listener on the document) to cornerstone's
 *   image-rendered event, which fires inside the animation frame that shows the slice; and the
 *   draw itself (cornerstone's renderTimeInMs). Target: within one display frame, p95 <= 16 ms.
 *   Reference, in the same page: the bare minimum of any 2D-canvas viewer, a 65 536-entry LUT
 *   applied to a 512 x 512 uint16 slice and putImageData, no scaling.
 * - next item: from Enter (save and next) to the next item's image rendered. Target p95 <= 100 ms.
 *   Reference: the submitAnswer round trip alone from the same page (HTTP, validation, a commit
 *   with synchronous=FULL), the floor of any save-then-advance design.
 * - first item: from the click on the reader code to the first image rendered, new page each time.
 *   Target <= 2 s. Reference: fetching that item's pixels alone from the same page.
 * Every sample is taken on a live page; the reader's pauses between items (600 ms) leave the
 * background prefetch time to work, as a real reader's seconds per item do.
 */
import { chromium, type Page } from '@playwright/test';
import { existsSync, mkdirSync, rmSync, writeFileSync } from 'node:fs';
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { CHROMIUM_ARGS } from '../../playwright.config.ts';
import { createApi } from '../../app/api.ts';
import { buildStudy } from '../../app/blinding/build.ts';
import { streamFor } from '../../app/blinding/streams.ts';
import { makePhantom } from '../../app/demo/phantom.ts';
import { writeNpy } from '../../app/images/npy.ts';
import { loadTemplate } from '../../app/study/parse-template.ts';
import { buildParts } from '../../main/build-parts.ts';
import { RENDERER_DIST } from '../../main/paths.ts';
import { serve, type ServedStudy } from '../e2e/host.ts';
import { fmt, percentileMs } from './stats.ts';

const SHAPE = { rows: 512, columns: 512, slices: 8 };
const CASES = 11; // x 2 methods = 22 items, 21 "next item" samples
const SLICE_SAMPLES = 80;
const FIRST_ITEM_RUNS = 5;

// The functions below run in the page (Playwright serializes them). The Node typings know no DOM,
// so the page globals they use are declared here, for this file only.
interface Recorded { keys: { t: number; key: string }[]; clicks: number[]; rendered: { t: number; id: string; ms: number }[] }
interface PageEvent { key: string; detail: { image: { imageId: string }; renderTimeInMs: number } }
interface Canvas2D { putImageData(image: { data: Uint8ClampedArray }, x: number, y: number): void; createImageData(w: number, h: number): { data: Uint8ClampedArray } }
declare const window: { __bench: Recorded };
declare const document: {
  addEventListener(type: string, listener: (e: PageEvent) => void, capture: boolean): void;
  createElement(tag: 'canvas'): { width: number; height: number; getContext(kind: '2d'): Canvas2D | null };
};
declare const sessionStorage: { getItem(key: string): string | null };
declare function requestAnimationFrame(callback: (t: number) => void): number;

async function makeKit(): Promise<{ dir: string; study: string }> {
  const dir = mkdtempSync(join(tmpdir(), 'veil-bench-reading-'));
  for (let c = 0; c < CASES; c++) {
    const caseDir = join(dir, 'sources', `case-${c}`);
    mkdirSync(caseDir, { recursive: true });
    const truth = makePhantom(streamFor(7, 'bench-reading', String(c)), SHAPE);
    const shape = [SHAPE.slices, SHAPE.rows, SHAPE.columns];
    writeFileSync(join(caseDir, 'a.npy'), writeNpy(truth, shape));
    writeFileSync(join(caseDir, 'b.npy'), writeNpy(truth.map((v, i) => v * (1 + 0.05 * Math.sin(i))), shape));
  }
  const template = join(dir, 'bench.study.yaml');
  writeFileSync(template, `# Invented benchmark study: synthetic phantoms.
title: Reading-room benchmark (synthetic)
seed: 11
sources: sources
methods:
  - {id: m-a, label: A, path: "{case}/a.npy"}
  - {id: m-b, label: B, path: "{case}/b.npy"}
cases: auto
questions:
  - {id: quality, text: Overall quality?, scale: {points: 5, low: Poor, high: Excellent}}
readers: [R1]
design:
  revisits: true
`);
  const study = join(dir, 'study');
  await buildStudy(loadTemplate(template), study);
  rmSync(join(dir, 'sources'), { recursive: true, force: true });
  const api = createApi(study);
  try {
    await api.confirmDisplayCheck({ reader: 'R1', seen: true });
  } finally {
    api.close();
  }
  return { dir, study };
}

function record(): void {
  window.__bench = { keys: [], clicks: [], rendered: [] };
  document.addEventListener('keydown', (e) => window.__bench.keys.push({ t: performance.now(), key: e.key }), true);
  document.addEventListener('click', () => window.__bench.clicks.push(performance.now()), true);
  document.addEventListener('cornerstoneimagerendered', (e) => {
    window.__bench.rendered.push({ t: performance.now(), id: e.detail.image.imageId, ms: e.detail.renderTimeInMs });
  }, true);
}

const renderedCount = (page: Page) => page.evaluate(() => window.__bench.rendered.length);

/** Waits for a render after the first `after` ones, of an image whose id ends with `suffix` / does not hold `notIn`. */
async function waitRendered(page: Page, after: number, want: { suffix?: string; notIn?: string } = {}): Promise<void> {
  await page.waitForFunction(({ after, suffix, notIn }) => window.__bench.rendered.slice(after).some((r) =>
    (!suffix || r.id.endsWith(suffix)) && (!notIn || !r.id.includes(notIn))), { after, ...want }, { timeout: 10_000 });
}

async function firstItem(page: Page, host: ServedStudy): Promise<{ ms: number; pixelsMs: number }> {
  await page.goto(host.url);
  await page.getByTestId('reader-R1').waitFor();
  await page.getByTestId('reader-R1').click();
  await waitRendered(page, 0);
  const ms = await page.evaluate(() => window.__bench.rendered[0].t - window.__bench.clicks[0]);
  const pixelsMs = await page.evaluate(async () => {
    const token = sessionStorage.getItem('veil.token');
    const headers = { 'Content-Type': 'application/json', Authorization: `Bearer ${token}` };
    const kit = await (await fetch('/api/openKit', { method: 'POST', headers, body: JSON.stringify({ reader: 'R1' }) })).json() as
      { items: { id: string }[]; progress: { next: number | null } };
    const t0 = performance.now();
    const res = await fetch('/api/itemPixels', { method: 'POST', headers, body: JSON.stringify({ reader: 'R1', itemId: kit.items[kit.progress.next ?? 0].id }) });
    await res.arrayBuffer();
    return performance.now() - t0;
  });
  return { ms, pixelsMs };
}

async function sliceChanges(page: Page): Promise<{ latency: number[]; draw: number[] }> {
  const latency: number[] = [];
  const draw: number[] = [];
  let dir = 1;
  let slice = Math.floor(SHAPE.slices / 2);
  for (let i = 0; i < SLICE_SAMPLES; i++) {
    if (slice + dir < 0 || slice + dir >= SHAPE.slices) dir = -dir;
    slice += dir;
    const before = await renderedCount(page);
    await page.keyboard.press(dir > 0 ? 'ArrowRight' : 'ArrowLeft');
    await waitRendered(page, before, { suffix: `:${slice}` });
    const s = await page.evaluate((from) => {
      const b = window.__bench;
      const r = b.rendered.slice(from).find(() => true)!;
      return { latency: r.t - b.keys[b.keys.length - 1].t, ms: r.ms };
    }, before);
    latency.push(s.latency);
    draw.push(s.ms);
  }
  return { latency, draw };
}

/** The floor: LUT + putImageData of one 512 x 512 uint16 slice, in the same page. */
async function bareCanvas(page: Page): Promise<number[]> {
  return page.evaluate(({ rows, columns, n }) => {
    const canvas = document.createElement('canvas');
    canvas.width = columns;
    canvas.height = rows;
    const ctx = canvas.getContext('2d')!;
    const image = ctx.createImageData(columns, rows);
    const slices = Array.from({ length: 4 }, (_, s) => Uint16Array.from({ length: rows * columns }, (_, i) => (i * 7 + s * 131) % 4000));
    const lut = new Uint8Array(65536);
    const out: number[] = [];
    for (let f = 0; f < n; f++) {
      const t0 = performance.now();
      const center = 2000 + f;
      const width = 4000;
      for (let v = 0; v < 65536; v++) lut[v] = Math.max(0, Math.min(255, Math.round(((v - center) / width + 0.5) * 255)));
      const px = slices[f % 4];
      const d = image.data;
      for (let i = 0, j = 0; i < px.length; i++, j += 4) { const g = lut[px[i]]; d[j] = g; d[j + 1] = g; d[j + 2] = g; d[j + 3] = 255; }
      ctx.putImageData(image, 0, 0);
      out.push(performance.now() - t0);
    }
    return out;
  }, { rows: SHAPE.rows, columns: SHAPE.columns, n: SLICE_SAMPLES });
}

async function nextItems(page: Page): Promise<number[]> {
  const samples: number[] = [];
  for (;;) {
    await page.waitForTimeout(600);
    const text = await page.getByTestId('progress-text').textContent();
    const [, at, total] = /Item (\d+) of (\d+)/.exec(text ?? '') ?? [];
    if (!at || at === total) break;
    const current = await page.evaluate(() => window.__bench.rendered.at(-1)!.id.split(':')[1].split('~')[0]);
    const before = await renderedCount(page);
    await page.keyboard.press('3');
    await page.keyboard.press('Enter');
    await waitRendered(page, before, { notIn: `${current}~` });
    samples.push(await page.evaluate(({ from, item }) => {
      const b = window.__bench;
      const enter = b.keys.filter((k) => k.key === 'Enter').at(-1)!.t;
      return b.rendered.slice(from).find((r) => !r.id.includes(`${item}~`))!.t - enter;
    }, { from: before, item: current }));
  }
  return samples;
}

/** The floor of save-then-advance: submitAnswer round trips from the page (changed scores: real commits). */
async function bareSubmits(page: Page, n: number): Promise<number[]> {
  return page.evaluate(async (count) => {
    const token = sessionStorage.getItem('veil.token');
    const headers = { 'Content-Type': 'application/json', Authorization: `Bearer ${token}` };
    const kit = await (await fetch('/api/openKit', { method: 'POST', headers, body: JSON.stringify({ reader: 'R1' }) })).json() as { items: { id: string }[] };
    const out: number[] = [];
    for (let i = 0; i < count; i++) {
      const t0 = performance.now();
      const res = await fetch('/api/submitAnswer', {
        method: 'POST', headers,
        // Items 1..n-1 were saved with 3: 5 then 1 are changes every time.
        body: JSON.stringify({ reader: 'R1', itemId: kit.items[i % (kit.items.length - 1)].id, scores: { quality: Math.floor(i / (kit.items.length - 1)) % 2 ? 1 : 5 }, seconds: 1 }),
      });
      if (!res.ok) throw new Error(await res.text());
      await res.json();
      out.push(performance.now() - t0);
    }
    return out;
  }, n);
}

function row(what: string, samples: number[], ref: number[], refName: string): string {
  const p50 = percentileMs(samples, 50);
  const p95 = percentileMs(samples, 95);
  const r50 = percentileMs(ref, 50);
  return `${what.padEnd(46)} p50 ${fmt(p50).padStart(9)}  p95 ${fmt(p95).padStart(9)}  (n=${samples.length})  vs ${refName} p50 ${fmt(r50)}: ${(p50 / r50).toFixed(1)}x`;
}

export async function bench(): Promise<string[]> {
  if (!existsSync(join(RENDERER_DIST, 'index.html'))) await buildParts(['renderer']);
  const { dir, study } = await makeKit();
  const host = await serve(study);
  const browser = await chromium.launch({ executablePath: process.env.VEIL_CHROMIUM ?? '/usr/bin/chromium', args: CHROMIUM_ARGS });
  try {
    const first: { ms: number; pixelsMs: number }[] = [];
    let page: Page | null = null;
    for (let i = 0; i < FIRST_ITEM_RUNS; i++) {
      await page?.close();
      page = await browser.newPage({ viewport: { width: 1400, height: 860 } });
      await page.addInitScript(record);
      first.push(await firstItem(page, host));
    }
    const slices = await sliceChanges(page!);
    const floor = await bareCanvas(page!);
    const next = await nextItems(page!);
    const submits = await bareSubmits(page!, 40);
    // (No named functions inside evaluated code: tsx would wrap them in a helper the page lacks.)
    const frame = await page!.evaluate(async () => {
      const ts: number[] = [];
      for (let i = 0; i < 61; i++) ts.push(await new Promise<number>((r) => requestAnimationFrame(r)));
      return (ts[60] - ts[0]) / 60;
    });
    return [
      `kit: 1 reader, ${CASES * 2} items of ${SHAPE.columns} x ${SHAPE.rows} x ${SHAPE.slices} uint16; Chromium ${browser.version()}, no GPU; display frame here ${fmt(frame)}`,
      row('slice change, key to rendered frame', slices.latency, floor, 'bare LUT+putImageData'),
      row('slice change, draw only (target p95 <= 16 ms)', slices.draw, floor, 'bare LUT+putImageData'),
      row('next item on screen after Enter (target <= 100)', next, submits, 'bare submitAnswer round trip'),
      row('first item on screen after choosing the reader', first.map((f) => f.ms), first.map((f) => f.pixelsMs), 'its pixels fetched alone'),
    ];
  } finally {
    await browser.close();
    await host.stop();
    rmSync(dir, { recursive: true, force: true });
  }
}
