/**
 * The coordinator's screens in Chromium: readers and progress, collecting a results bundle by
 * file picker, and building a new study (kits also zipped for transfer) with a progress bar.
 */
import { expect, test, type APIRequestContext } from '@playwright/test';
import { readFileSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { makeDemo, serve, type ServedStudy, callApi } from './host.ts';

let dir: string;
let host: ServedStudy;

test.beforeAll(async () => {
  dir = makeDemo();
  host = await serve(dir);
});
test.afterAll(async () => { await host?.stop(); });

const call = (request: APIRequestContext, op: string, data: unknown) => callApi(request, host, op, data);

test('the coordinator sees progress, collects a bundle and builds a study', async ({ page, request }) => {
  // A reader scores two items and exports a results bundle.
  const kit = await call(request, 'openKit', { reader: 'R2' }) as { items: { id: string }[]; questions: { id: string }[] };
  for (const it of kit.items.slice(0, 2)) {
    await call(request, 'submitAnswer', { reader: 'R2', itemId: it.id, scores: Object.fromEntries(kit.questions.map((q) => [q.id, 3])), seconds: 12 });
  }
  const { file } = await call(request, 'exportResults', { reader: 'R2' }) as { file: string };

  await page.goto(`${host.url}#/coordinator`);
  await expect(page.getByRole('heading', { name: /Phantom brain/ })).toBeVisible();
  const table = page.getByTestId('reader-progress');
  await expect(table.getByRole('row', { name: /R1/ })).toContainText('simulated');
  await page.screenshot({ path: 'test-results/screens/coordinator-readers.png' });

  await page.getByTestId('tab-collect').click();
  await page.getByTestId('collect-input').setInputFiles({ name: 'R2.veil-results.json', mimeType: 'application/json', buffer: readFileSync(file) });
  await expect(page.getByTestId('collect-results')).toContainText('imported');
  await page.getByTestId('collect-input').setInputFiles({ name: 'R2.veil-results.json', mimeType: 'application/json', buffer: readFileSync(file) });
  await expect(page.getByTestId('collect-results')).toContainText('unchanged');
  await page.getByTestId('collect-input').setInputFiles({ name: 'edited.veil-results.json', mimeType: 'application/json', buffer: Buffer.from(readFileSync(file, 'utf8').replace('"score":3', '"score":4')) });
  await expect(page.getByTestId('collect-results')).toContainText('refused');
  await page.screenshot({ path: 'test-results/screens/coordinator-collect.png' });

  await page.getByTestId('tab-readers').click();
  // R2's bundle is counted, and its answers (all 3) are now the latest for two items.
  await expect(table.getByRole('row', { name: /R2/ }).locator('td').nth(5)).toHaveText('1');

  await page.getByTestId('tab-build').click();
  await page.getByTestId('build-template').fill(join(dir, 'demo.study.yaml'));
  await page.getByTestId('build-out').fill(join(dir, 'second-build'));
  await expect(page.getByTestId('build-start')).toBeDisabled(); // check first
  await page.getByTestId('check-start').click();
  await expect(page.getByTestId('check-result')).toHaveAttribute('data-ok', 'true', { timeout: 60_000 });
  await expect(page.getByTestId('check-result')).toContainText('case-06');
  await page.screenshot({ path: 'test-results/screens/coordinator-check.png' });
  await page.getByTestId('build-zip').check();
  await page.getByTestId('build-start').click();
  await expect(page.getByTestId('build-job')).toHaveAttribute('data-state', 'done', { timeout: 30_000 });
  await expect(page.getByTestId('build-job')).toContainText(join(dir, 'second-build', 'kits', 'R1'));
  // Each kit also as one archive for transfer, named on the screen and on disk.
  await expect(page.getByTestId('kit-zip').first()).toHaveText(join(dir, 'second-build', 'kits', 'R1.zip'));
  expect(statSync(join(dir, 'second-build', 'kits', 'R1.zip')).size).toBeGreaterThan(1000);
  await page.screenshot({ path: 'test-results/screens/coordinator-build.png' });

  await page.getByTestId('build-out').fill(join(dir, 'second-build'));
  await page.getByTestId('build-start').click();
  await expect(page.getByTestId('build-job')).toHaveAttribute('data-state', 'failed');
  await expect(page.getByTestId('build-job')).toContainText('already holds a built study');
});
