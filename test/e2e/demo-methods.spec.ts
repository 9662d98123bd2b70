/**
 * The demo's three reconstructions of one case, as the kits show them, side by side: they must
 * differ visibly (the README shows this picture, docs/screens/demo-methods.png).
 */
import { expect, test } from '@playwright/test';
import Database from 'better-sqlite3';
import { join } from 'node:path';
import { makeDemo, serve, type ServedStudy } from './host.ts';

let dir: string;
let host: ServedStudy;
test.beforeAll(async () => { dir = makeDemo(); host = await serve(dir); });
test.afterAll(async () => { await host?.stop(); });

test('the three demo methods look different', async ({ page, request }) => {
  const db = new Database(join(dir, 'workspace.sqlite'), { readonly: true });
  const items = db.prepare("SELECT item_id, method_id FROM kit_item WHERE reader_code = 'R1' AND case_id = 'case-02' ORDER BY method_id").all() as { item_id: string; method_id: string }[];
  const labels = new Map((db.prepare('SELECT id, label FROM method').all() as { id: string; label: string }[]).map((m) => [m.id, m.label]));
  db.close();
  const headers = { Authorization: `Bearer ${host.token}` };
  const kit = await (await request.post(`${host.origin}/api/openKit`, { data: { reader: 'R1' }, headers })).json() as { items: { id: string; views: { rows: number; columns: number; slices: number }[] }[] };
  const images: { label: string; rows: number; columns: number; pixels: number[] }[] = [];
  for (const it of items) {
    const view = kit.items.find((k) => k.id === it.item_id)!.views[0];
    const res = await request.post(`${host.origin}/api/itemPixels`, { data: { reader: 'R1', itemId: it.item_id }, headers });
    const all = new Uint16Array((await res.body()).buffer.slice(0));
    const n = view.rows * view.columns;
    const mid = Math.floor(view.slices / 2);
    images.push({ label: labels.get(it.method_id)!, rows: view.rows, columns: view.columns, pixels: Array.from(all.subarray(mid * n, (mid + 1) * n)) });
  }
  // Different: every pair differs by more than 1% of the display range on average (the picture shows how).
  for (let a = 0; a < images.length; a++) for (let b = a + 1; b < images.length; b++) {
    const d = images[a].pixels.reduce((s, v, i) => s + Math.abs(v - images[b].pixels[i]), 0) / images[a].pixels.length;
    expect(d, `${images[a].label} vs ${images[b].label}`).toBeGreaterThan(0.01 * 4000);
  }
  await page.setViewportSize({ width: 1200, height: 470 });
  const draw = `
    for (const img of ${JSON.stringify(images)}) {
      const fig = document.createElement('figure');
      fig.style.margin = '0';
      const c = document.createElement('canvas');
      c.width = img.columns; c.height = img.rows;
      c.style.width = '384px'; c.style.height = '384px';
      const ctx = c.getContext('2d');
      const data = ctx.createImageData(img.columns, img.rows);
      img.pixels.forEach((v, i) => { const g = Math.max(0, Math.min(255, Math.round((v / 4000) * 255))); data.data.set([g, g, g, 255], i * 4); });
      ctx.putImageData(data, 0, 0);
      const cap = document.createElement('figcaption');
      cap.textContent = img.label;
      cap.style.padding = '6px 0';
      fig.append(c, cap);
      document.body.append(fig);
    }`;
  await page.setContent('<body style="margin:0;background:#0d0f12;color:#b9c0c9;font:14px system-ui;display:flex;gap:12px;padding:12px"></body>');
  await page.addScriptTag({ content: draw });
  await page.screenshot({ path: 'test-results/screens/demo-methods.png' });
});
