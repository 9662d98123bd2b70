import { expect, test } from '@playwright/test';
import Database from 'better-sqlite3';
import { join } from 'node:path';
import { makeDemo, serve, type ServedStudy } from './host.ts';

let dir: string;
let host: ServedStudy;

test.beforeAll(async () => {
  dir = makeDemo();
  host = await serve(dir);
});
test.afterAll(async () => { await host?.stop(); });

test('a reader scores three items by keyboard, reloads, and resumes at item 4 with every answer stored', async ({ page }) => {
  const errors: string[] = [];
  page.on('pageerror', (e) => errors.push(e.message));
  page.on('console', (m) => { if (m.type() === 'error') errors.push(m.text()); });

  await page.goto(host.url);
  await expect(page.getByRole('heading', { name: /Phantom brain/ })).toBeVisible();
  await expect(page.getByText('not a medical device', { exact: false })).toBeVisible();
  await page.screenshot({ path: 'test-results/screens/reader-picker.png' });
  await page.getByTestId('reader-R1').click();
  // Before the first session, the reader confirms the display check.
  await page.getByTestId('display-check-confirm').click();

  await expect(page.getByTestId('progress-text')).toHaveText('Item 1 of 18');
  await expect(page.getByTestId('slice-label')).toHaveText('Slice 3 / 4');
  // The wheel and the arrow keys scroll slices (the demo's volumes have 4).
  await page.getByTestId('viewer').hover();
  await page.mouse.wheel(0, 120);
  await expect(page.getByTestId('slice-label')).toHaveText('Slice 4 / 4');
  await page.keyboard.press('ArrowLeft');
  await page.keyboard.press('ArrowLeft');
  await expect(page.getByTestId('slice-label')).toHaveText('Slice 2 / 4');
  await page.screenshot({ path: 'test-results/screens/reading-room.png' });
  // Dragging with the right button changes window and level.
  const before = await page.getByText(/^W \d+ · L \d+$/).textContent();
  const box = (await page.getByTestId('viewer').boundingBox())!;
  await page.mouse.move(box.x + box.width / 2, box.y + box.height / 2);
  await page.mouse.down({ button: 'right' });
  await page.mouse.move(box.x + box.width / 2 - 120, box.y + box.height / 2 + 60, { steps: 6 });
  await page.mouse.up({ button: 'right' });
  await expect(page.getByText(/^W \d+ · L \d+$/)).not.toHaveText(before!);
  await page.screenshot({ path: 'test-results/screens/reading-room-window.png' });

  // Enter without every score is refused with a message beside the questions.
  await page.keyboard.press('4');
  await page.keyboard.press('Enter');
  await expect(page.getByTestId('message')).toContainText('before moving on');
  await expect(page.getByTestId('progress-text')).toHaveText('Item 1 of 18');
  await page.screenshot({ path: 'test-results/screens/reading-room-required.png' });

  const given: number[][] = [[4, 3, 5], [2, 2, 1], [5, 4, 4]];
  // Scoring moved the focus to question 2; Tab twice wraps round to question 1 (3 questions).
  await page.keyboard.press('Tab');
  await page.keyboard.press('Tab');
  await expect(page.getByTestId('question-sharpness')).toHaveClass(/focused/);
  for (let i = 0; i < 3; i++) {
    for (const s of given[i]) await page.keyboard.press(String(s));
    await page.keyboard.press('Enter');
    await expect(page.getByTestId('progress-text')).toHaveText(`Item ${i + 2} of 18`);
  }

  await page.reload();
  await expect(page.getByTestId('progress-text')).toHaveText('Item 4 of 18');
  await expect(page.getByText('3 scored')).toBeVisible();

  const db = new Database(join(dir, 'kits', 'R1', 'answers.sqlite'), { readonly: true });
  const rows = db.prepare('SELECT item_id, question_id, score FROM answer ORDER BY id').all() as { item_id: string; question_id: string; score: number }[];
  db.close();
  expect(rows).toHaveLength(9);
  const items = [...new Set(rows.map((r) => r.item_id))];
  expect(items).toHaveLength(3);
  expect(items.map((id) => rows.filter((r) => r.item_id === id).map((r) => r.score))).toEqual(given);
  expect(errors).toEqual([]);

  // Restarting the host (a new launch, a new token) resumes at the same place.
  await host.stop();
  host = await serve(dir);
  await page.goto(`${host.url}#/read/R1`);
  await expect(page.getByTestId('progress-text')).toHaveText('Item 4 of 18');
  await expect(page.getByText('3 scored')).toBeVisible();
});

test('API calls without the token are refused', async ({ request }) => {
  const noToken = await request.post(`${host.origin}/api/listReaders`, { data: {} });
  expect(noToken.status()).toBe(401);
  const wrongToken = await request.post(`${host.origin}/api/openKit`, { data: { reader: 'R1' }, headers: { Authorization: 'Bearer wrong' } });
  expect(wrongToken.status()).toBe(401);
  const ok = await request.post(`${host.origin}/api/listReaders`, { data: {}, headers: { Authorization: `Bearer ${host.token}` } });
  expect(ok.status()).toBe(200);
  expect((await ok.json()).map((r: { reader: string }) => r.reader)).toEqual(['R1', 'R2']);
});

test('a foreign Host header is refused even with the token', async ({ request }) => {
  const res = await request.post(`${host.origin}/api/listReaders`, {
    data: {}, headers: { Authorization: `Bearer ${host.token}`, Host: 'evil.example:80' },
  });
  expect(res.status()).toBe(403);
});
