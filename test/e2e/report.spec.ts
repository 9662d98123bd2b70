/**
 * `veil report` on the demo study, opened in Chromium: every figure and table of the HTML report
 * is there and drawn; then the analysis screen shows the same tables and figures, filters them and
 * exports the report. Screenshots: test-results/screens/report-html.png, analysis.png.
 */
import { expect, test, type APIRequestContext } from '@playwright/test';
import { spawnSync } from 'node:child_process';
import { existsSync } from 'node:fs';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { REPO, makeDemo, serve, type ServedStudy, callApi } from './host.ts';

const VEIL = join(REPO, 'bin', 'veil.mjs');
const TABLES = ['design', 'descriptives', 'distribution', 'comparisons', 'friedman', 'agreement', 'reading-time'];
const FIGURES = ['likert', 'forest', 'kappa-heatmap', 'reading-time'];

let dir: string;
let host: ServedStudy;

test.beforeAll(async () => {
  test.setTimeout(180_000); // the demo build takes a while on a busy two-core machine
  dir = makeDemo();
  host = await serve(dir);
});
test.afterAll(async () => { await host?.stop(); });

const call = (request: APIRequestContext, op: string, data: unknown) => callApi(request, host, op, data);

test('veil report writes an HTML report with every figure and table, and the analysis screen shows them', async ({ page, request }) => {
  test.setTimeout(120_000);
  // A reader scores a few items with reading times, and the coordinator collects the bundle.
  const kit = await call(request, 'openKit', { reader: 'R1' }) as { items: { id: string }[]; questions: { id: string }[] };
  for (const [i, it] of kit.items.slice(0, 4).entries()) {
    await call(request, 'submitAnswer', { reader: 'R1', itemId: it.id, scores: Object.fromEntries(kit.questions.map((q) => [q.id, 3])), seconds: 20 + 5 * i });
  }
  const { file } = await call(request, 'exportResults', { reader: 'R1' }) as { file: string };
  const collected = spawnSync(process.execPath, [VEIL, 'collect', dir, file], { encoding: 'utf8' });
  expect(collected.status, collected.stderr).toBe(0);

  const out = join(dir, 'report');
  const r = spawnSync(process.execPath, [VEIL, 'report', dir, '--out', out, '--bootstrap', '500'], { encoding: 'utf8' });
  expect(r.status, r.stderr).toBe(0);
  expect(r.stdout).toMatch(/Wrote 108 ratings/);
  for (const f of ['ratings.csv', 'tables.md', 'tables.tex', 'report.html', 'methods.txt']) expect(existsSync(join(out, f)), f).toBe(true);

  await page.goto(pathToFileURL(join(out, 'report.html')).href);
  await expect(page.getByRole('heading', { level: 1 })).toContainText('Phantom brain');
  for (const id of TABLES) {
    const t = page.locator(`[data-table="${id}"] table`);
    await expect(t, id).toBeVisible();
    expect(await t.locator('tbody tr').count(), id).toBeGreaterThan(0);
  }
  for (const id of FIGURES) {
    const svg = page.locator(`[data-figure="${id}"] svg`);
    await expect(svg, id).toBeVisible();
    expect((await svg.boundingBox())!.height, id).toBeGreaterThan(50);
    expect(await svg.locator('path, rect, line').count(), id).toBeGreaterThan(5);
  }
  // Reading time now has the collected reader's seconds: box plots, not the "none recorded" note.
  await expect(page.locator('[data-figure="reading-time"] svg')).not.toContainText('No reading times');
  await expect(page.getByTestId('methods-text')).toContainText('Obuchowski–Rockette');
  await page.screenshot({ path: 'test-results/screens/report-html.png', fullPage: true });

  // The analysis screen of the served study.
  await page.goto(`${host.url}#/coordinator`);
  await page.getByTestId('to-analysis').click();
  await expect(page.getByTestId('analysis')).toBeVisible({ timeout: 60_000 });
  for (const id of TABLES) await expect(page.locator(`[data-table="${id}"]`), id).toBeVisible();
  for (const id of FIGURES) await expect(page.locator(`[data-figure="${id}"] svg`), id).toBeVisible();
  await page.screenshot({ path: 'test-results/screens/analysis.png', fullPage: true });

  await page.getByTestId('filter-question').selectOption('sharpness');
  await expect(page.locator('[data-table="descriptives"] tbody tr')).toHaveCount(3, { timeout: 60_000 });
  await expect(page.locator('[data-table="descriptives"] tbody')).not.toContainText('artifacts');
  await page.getByTestId('export-out').fill(join(dir, 'report-sharpness'));
  await page.getByTestId('export').click();
  await expect(page.getByTestId('exported')).toContainText(join(dir, 'report-sharpness'), { timeout: 60_000 });
  expect(existsSync(join(dir, 'report-sharpness', 'report.html'))).toBe(true);
  await page.screenshot({ path: 'test-results/screens/analysis-filtered.png', fullPage: true });
});
