/**
 * The reading room by keyboard alone: display check, scoring with yes-no, optional and comment
 * questions, the key map, pause, flag, going back to change an answer (a new revision), two
 * sessions, export; and the washout lock with its date.
 */
import { expect, test, type Page } from '@playwright/test';
import Database from 'better-sqlite3';
import { existsSync } from 'node:fs';
import { join } from 'node:path';
import { serve, type ServedStudy } from './host.ts';
import { addPresets, makeStudy } from './study.ts';

test.use({ locale: 'en-US', timezoneId: 'UTC' });

const SCREENS = 'test-results/screens';

const QUESTIONS = `questions:
  - id: sharpness
    text: How sharp is the rim of the disc?
    scale: {points: 5, low: Severely blurred, high: Crisp}
    labels: {1: Non-diagnostic, 3: Adequate, 5: Excellent}
    comment: true
  - id: ripple
    text: Is there a ripple artifact inside the disc?
    type: yes-no
  - id: overall
    text: Overall impression
    scale: {points: 4, low: Poor, high: Very good}
    required: false`;

function collectErrors(page: Page): string[] {
  const errors: string[] = [];
  page.on('pageerror', (e) => errors.push(e.message));
  page.on('console', (m) => { if (m.type() === 'error') errors.push(m.text()); });
  return errors;
}

test.describe('a two-session kit', () => {
  let dir: string;
  let host: ServedStudy;
  test.beforeAll(async () => {
    dir = makeStudy({ questions: QUESTIONS, design: '  sessions: 2\n  washout_days: 0\n  revisits: true' });
    addPresets(dir, 'R1', [{ name: 'Soft', center: 1500, width: 3000 }, { name: 'Narrow', center: 2400, width: 800 }]);
    host = await serve(dir);
  });
  test.afterAll(async () => { await host?.stop(); });

  test('is read by keyboard alone, with a revisit that keeps the revision history, and exported at the end', async ({ page }) => {
    const errors = collectErrors(page);
    const kb = page.keyboard;
    await page.goto(host.url);
    await expect(page.getByTestId('reader-R1')).toBeFocused();
    await kb.press('Enter');

    // Display check before the first session.
    await expect(page.getByTestId('display-check')).toBeVisible();
    await page.screenshot({ path: `${SCREENS}/display-check.png` });
    await kb.press('Enter');

    await expect(page.getByTestId('progress-text')).toHaveText('Item 1 of 4');
    await expect(page.getByTestId('session-text')).toHaveText(' · session 1 of 2');
    await expect(page.getByTestId('slice-label')).toHaveText('Slice 3 / 4');

    // The key map, from the same table as the keys.
    await kb.press('?');
    await expect(page.getByTestId('keymap')).toBeVisible();
    await expect(page.getByTestId('keymap')).toContainText('Previous / next slice (also the wheel, or drag with the left button)');
    await page.screenshot({ path: `${SCREENS}/key-map.png` });
    await kb.press('Escape');
    await expect(page.getByTestId('keymap')).toHaveCount(0);

    // Image keys: slices, zoom, window.
    await kb.press('PageDown');
    await expect(page.getByTestId('slice-label')).toHaveText('Slice 4 / 4');
    await kb.press('Home');
    await expect(page.getByTestId('slice-label')).toHaveText('Slice 1 / 4');
    await kb.press('+');
    await expect(page.getByTestId('zoom-0')).not.toHaveText('Fit');
    await kb.press('x');
    await expect(page.getByTestId('zoom-0')).toHaveText('100 %');
    await kb.press('z');
    await expect(page.getByTestId('zoom-0')).toHaveText('Fit');
    const defaultWindow = await page.getByTestId('window').textContent();
    await kb.press('a');
    await expect(page.getByTestId('window-name-0')).toHaveText('Automatic');
    await expect(page.getByTestId('window')).not.toHaveText(defaultWindow!);
    // Presets of the kit, in turn, then back to the default.
    await kb.press('w');
    await expect(page.getByTestId('window-name-0')).toHaveText('Soft');
    await expect(page.getByTestId('window')).toHaveText('W 3000 · L 1500');
    await kb.press('w');
    await expect(page.getByTestId('window-name-0')).toHaveText('Narrow');
    await kb.press('w');
    await expect(page.getByTestId('window-name-0')).toHaveText('Default');
    await kb.press('i');
    await kb.press('r');
    await expect(page.getByTestId('window')).toHaveText(defaultWindow!);
    await expect(page.getByTestId('window-name-0')).toHaveText('Default');

    // Item 1: 4 on sharpness, yes (Y) on the ripple, the optional question left empty, a comment.
    await kb.press('4');
    await kb.press('y');
    await kb.press('ArrowUp');
    await kb.press('ArrowUp');
    await expect(page.getByTestId('question-sharpness')).toHaveClass(/focused/);
    await kb.press('c');
    await expect(page.getByTestId('comment-sharpness')).toBeFocused();
    await kb.type('soft rim, 3 o\'clock');
    await kb.press('Escape');
    await page.screenshot({ path: `${SCREENS}/reading.png` });
    await kb.press('Enter');
    await expect(page.getByTestId('progress-text')).toHaveText('Item 2 of 4');

    // Item 2: Enter at once is refused beside the first required question.
    await kb.press('Enter');
    await expect(page.getByTestId('question-sharpness').getByTestId('message')).toHaveText(
      'Answer this question before moving on (1 more question still needs an answer).');
    await expect(page.getByTestId('progress-text')).toHaveText('Item 2 of 4');
    await page.screenshot({ path: `${SCREENS}/required-question.png` });

    // Pause hides the image and stops the clock.
    await kb.press('p');
    await expect(page.getByTestId('paused')).toBeVisible();
    await page.screenshot({ path: `${SCREENS}/paused.png` });
    await kb.press('p');
    await expect(page.getByTestId('paused')).toHaveCount(0);

    // Back to item 1 (revisits allowed): its saved answers are shown; change sharpness to 2.
    await kb.press('Backspace');
    await expect(page.getByTestId('progress-text')).toHaveText('Item 1 of 4');
    await expect(page.getByTestId('revisit')).toBeVisible();
    await expect(page.getByTestId('point-sharpness-4')).toHaveAttribute('aria-checked', 'true');
    await expect(page.getByTestId('comment-sharpness')).toHaveValue('soft rim, 3 o\'clock');
    await kb.press('2');
    await kb.press('Enter');
    await expect(page.getByTestId('progress-text')).toHaveText('Item 2 of 4');

    // Item 2: flag it (an unrelated artifact, with a note), then score it.
    await kb.press('!');
    await expect(page.getByTestId('flag-dialog')).toBeVisible();
    await kb.press('2');
    await page.screenshot({ path: `${SCREENS}/flag.png` });
    await kb.press('Enter');
    await expect(page.getByTestId('flagged')).toHaveText('Flagged: unrelated artifact');
    await kb.press('3');
    await kb.press('n');
    await kb.press('4');
    await kb.press('Enter');

    // Session 1 is complete; with no washout, session 2 starts at Enter.
    await expect(page.getByTestId('session-end')).toContainText('Session 1 of 2 is complete.');
    await expect(page.getByTestId('continue')).toBeFocused();
    await kb.press('Enter');
    await expect(page.getByTestId('progress-text')).toHaveText('Item 3 of 4');
    await expect(page.getByTestId('session-text')).toHaveText(' · session 2 of 2');
    // Going back never reaches into a complete session.
    await kb.press('Backspace');
    await expect(page.getByTestId('progress-text')).toHaveText('Item 3 of 4');
    // Keys pressed while an answer is being saved are dropped, never given to the next item: wait for it.
    for (const [i, keys] of [['5', 'y'], ['1', 'n', '1']].entries()) {
      await expect(page.getByTestId('progress-text')).toHaveText(`Item ${i + 3} of 4`);
      for (const k of keys) await kb.press(k);
      await kb.press('Enter');
    }
    await expect(page.getByTestId('done')).toContainText('Every item is scored.');
    await expect(page.getByTestId('export')).toBeFocused();
    await kb.press('Enter');
    await expect(page.getByTestId('exported')).toContainText('.veil-results.json');
    await page.screenshot({ path: `${SCREENS}/done.png` });
    const file = (await page.getByTestId('exported').locator('code').textContent())!;
    expect(existsSync(file)).toBe(true);
    expect(errors).toEqual([]);

    // What the reader database holds.
    const db = new Database(join(dir, 'kits', 'R1', 'answers.sqlite'), { readonly: true });
    try {
      const items = (db.prepare('SELECT item_id FROM submission ORDER BY id').all() as { item_id: string }[]).map((r) => r.item_id);
      expect(items).toHaveLength(5);
      const first = items[0];
      expect(items[1]).toBe(first); // the revisit
      const history = db.prepare("SELECT score, revision FROM answer WHERE item_id = ? AND question_id = 'sharpness' ORDER BY revision").all(first);
      expect(history).toEqual([{ score: 4, revision: 1 }, { score: 2, revision: 2 }]);
      expect(db.prepare("SELECT score FROM answer WHERE item_id = ? AND question_id = 'ripple'").all(first)).toEqual([{ score: 2 }]);
      expect(db.prepare("SELECT COUNT(*) AS n FROM answer WHERE item_id = ? AND question_id = 'overall'").get(first)).toEqual({ n: 0 });
      expect(db.prepare('SELECT question_id, text FROM comment').all()).toEqual([{ question_id: 'sharpness', text: 'soft rim, 3 o\'clock' }]);
      expect(db.prepare('SELECT flag FROM submission WHERE flag IS NOT NULL').all()).toEqual([{ flag: 'unrelated-artifact' }]);
      expect((db.prepare('SELECT session FROM session_end ORDER BY session').all() as { session: number }[]).map((r) => r.session)).toEqual([1, 2]);
      expect(db.prepare('SELECT seen FROM display_check').all()).toEqual([{ seen: 1 }]);
      const seconds = (db.prepare('SELECT seconds FROM submission').all() as { seconds: number }[]).map((r) => r.seconds);
      // Active seconds: the first item took a while (key map, zoom, comment); quick ones may round to 0.
      expect(seconds.every((s) => s >= 0 && s < 120)).toBe(true);
      expect(seconds[0]).toBeGreaterThan(0.5);
      expect(db.pragma('integrity_check', { simple: true })).toBe('ok');
    } finally {
      db.close();
    }
  });
});

test.describe('a kit with a washout between sessions', () => {
  let dir: string;
  let host: ServedStudy;
  test.beforeAll(async () => {
    dir = makeStudy({
      questions: 'questions:\n  - {id: sharpness, text: How sharp is the rim?, scale: {points: 11, low: Blurred, high: Crisp}}',
      design: '  sessions: 2\n  washout_days: 14',
    });
    host = await serve(dir);
  });
  test.afterAll(async () => { await host?.stop(); });

  test('shows the end of session 1, then locks session 2 until its date, also after a reload', async ({ page }) => {
    const errors = collectErrors(page);
    await page.goto(`${host.url}#/read/R1`);
    await expect(page.getByTestId('display-check-confirm')).toBeFocused();
    await page.keyboard.press('Enter');
    await expect(page.getByTestId('progress-text')).toHaveText('Item 1 of 4');
    // On an 11-point scale, 1 then 1 is 11, and 0 is 10.
    for (const [i, keys] of [['1', '1'], ['0']].entries()) {
      await expect(page.getByTestId('progress-text')).toHaveText(`Item ${i + 1} of 4`);
      for (const k of keys) await page.keyboard.press(k);
      await page.keyboard.press('Enter');
    }
    await expect(page.getByTestId('session-end')).toContainText('Session 1 of 2 is complete.');

    const db = new Database(join(dir, 'kits', 'R1', 'answers.sqlite'), { readonly: true });
    const { completed_at: completedAt } = db.prepare('SELECT completed_at FROM session_end WHERE session = 1').get() as { completed_at: string };
    expect(db.prepare('SELECT score FROM answer ORDER BY id').all()).toEqual([{ score: 11 }, { score: 10 }]);
    db.close();
    const opens = new Date(Date.parse(completedAt) + 14 * 86_400_000);
    const shown = opens.toLocaleString('en-US', { dateStyle: 'full', timeStyle: 'short', timeZone: 'UTC' });
    await expect(page.getByTestId('opens-at')).toHaveText(shown);
    await expect(page.getByTestId('opens-at')).toHaveAttribute('data-iso', opens.toISOString());
    await page.screenshot({ path: `${SCREENS}/session-end.png` });

    await page.keyboard.press('Enter');
    await expect(page.getByTestId('locked')).toContainText('Session 2 is not open yet.');
    await expect(page.getByTestId('opens-at')).toHaveText(shown);
    await page.screenshot({ path: `${SCREENS}/washout-lock.png` });

    await page.reload();
    await expect(page.getByTestId('locked')).toContainText(`It opens on ${shown}`);
    await expect(page.getByTestId('locked')).toContainText('Your answers so far (2 of 4) are saved.');
    expect(errors).toEqual([]);
  });
});
