/**
 * Side-by-side reading: two panes that scroll, zoom, pan, window and invert together, and a
 * comparative question on a symmetric scale, built by `veil build` from a template.
 */
import { expect, test } from '@playwright/test';
import Database from 'better-sqlite3';
import { join } from 'node:path';
import { serve, type ServedStudy } from './host.ts';
import { makeStudy } from './study.ts';

const SCREENS = 'test-results/screens';

let dir: string;
let host: ServedStudy;
test.beforeAll(async () => {
  dir = makeStudy({
    questions: `questions:
  - id: preference
    text: Which image shows the rim of the disc more sharply?
    type: comparative
    scale: {points: 7, low: Left much better, high: Right much better}
  - id: confidence
    text: How sure are you?
    scale: {points: 5, low: Guessing, high: Certain}`,
    design: '  presentation: side-by-side\n  sessions: 1',
    size: 96,
    slices: 6,
  });
  host = await serve(dir);
});
test.afterAll(async () => { await host?.stop(); });

test('two linked panes and a comparative question', async ({ page }) => {
  const errors: string[] = [];
  page.on('pageerror', (e) => errors.push(e.message));
  page.on('console', (m) => { if (m.type() === 'error') errors.push(m.text()); });
  // Hold the first image back a moment to see the loading state.
  let release!: () => void;
  const held = new Promise<void>((r) => { release = r; });
  await page.route('**/api/itemPixels', async (route) => { await held; await route.continue(); });
  await page.goto(`${host.url}#/read/R1`);
  await expect(page.getByTestId('display-check-confirm')).toBeFocused();
  await page.keyboard.press('Enter');
  await expect(page.getByTestId('image-loading')).toBeVisible();
  await expect(page.getByTestId('progress-text')).toHaveText('Item 1 of 2');
  await page.screenshot({ path: `${SCREENS}/loading.png` });
  release();

  const both = async (id: string, text: string | RegExp) => {
    await expect(page.getByTestId(`${id}-0`)).toHaveText(text);
    await expect(page.getByTestId(`${id}-1`)).toHaveText(text);
  };
  await expect(page.getByTestId('side-0')).toHaveText('Left');
  await expect(page.getByTestId('side-1')).toHaveText('Right');
  await both('slice-label', 'Slice 4 / 6');

  // Linked scroll: keys and the wheel over either pane move both.
  await page.keyboard.press('ArrowRight');
  await both('slice-label', 'Slice 5 / 6');
  await page.getByTestId('viewer-pane-1').hover();
  await page.mouse.wheel(0, 120);
  await both('slice-label', 'Slice 6 / 6');
  // Left-button drag scrolls too (upwards: earlier slices).
  const pane0 = (await page.getByTestId('viewer-pane-0').boundingBox())!;
  await page.mouse.move(pane0.x + pane0.width / 2, pane0.y + pane0.height / 2);
  await page.mouse.down();
  await page.mouse.move(pane0.x + pane0.width / 2, pane0.y + pane0.height / 2 - 40, { steps: 5 });
  await page.mouse.up();
  await both('slice-label', 'Slice 1 / 6');

  // Linked window: a right-button drag on the left pane sets both.
  const before = await page.getByTestId('window-0').textContent();
  await page.mouse.move(pane0.x + pane0.width / 2, pane0.y + pane0.height / 2);
  await page.mouse.down({ button: 'right' });
  await page.mouse.move(pane0.x + pane0.width / 2 - 80, pane0.y + pane0.height / 2 + 40, { steps: 4 });
  await page.mouse.up({ button: 'right' });
  await expect(page.getByTestId('window-0')).not.toHaveText(before!);
  await both('window', (await page.getByTestId('window-0').textContent())!);
  await both('window-name', 'Manual');

  // Linked zoom (Ctrl + wheel) and pan: both panes change, the same way.
  await page.getByTestId('viewer-pane-0').hover();
  await page.keyboard.down('Control');
  await page.mouse.wheel(0, -120);
  await page.keyboard.up('Control');
  await both('zoom', /^\d+ %$/);
  await both('zoom', (await page.getByTestId('zoom-0').textContent())!);
  const shots = async () => Promise.all([0, 1].map((i) => page.getByTestId(`viewer-pane-${i}`).screenshot()));
  const unpanned = await shots();
  await page.keyboard.press('Shift+ArrowRight');
  await page.keyboard.press('Shift+ArrowDown');
  const panned = await shots();
  expect(panned[0].equals(unpanned[0])).toBe(false);
  expect(panned[1].equals(unpanned[1])).toBe(false);
  await page.keyboard.press('i');
  await expect(page.getByTestId('viewer')).toContainText('inverted');
  await page.keyboard.press('r');
  await both('zoom', 'Fit');
  await both('window-name', 'Default');

  // The comparative question: 7 points from "left much better" to "right much better".
  const q = page.getByTestId('question-preference');
  await expect(q).toContainText('◀ Left much better');
  await expect(q).toContainText('Right much better ▶');
  await expect(page.getByTestId('point-preference-4')).toContainText('No difference');
  await page.keyboard.press('6');
  await page.keyboard.press('4');
  await page.keyboard.press('ArrowRight');
  await page.screenshot({ path: `${SCREENS}/side-by-side.png` });
  await page.keyboard.press('Enter');
  await expect(page.getByTestId('progress-text')).toHaveText('Item 2 of 2');
  await page.keyboard.press('2');
  await page.keyboard.press('3');
  await page.keyboard.press('Enter');
  await expect(page.getByTestId('done')).toBeVisible();
  expect(errors).toEqual([]);

  const db = new Database(join(dir, 'kits', 'R1', 'answers.sqlite'), { readonly: true });
  const rows = db.prepare("SELECT score FROM answer WHERE question_id = 'preference' ORDER BY id").all();
  db.close();
  expect(rows).toEqual([{ score: 6 }, { score: 2 }]);
});
