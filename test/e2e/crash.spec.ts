/**
 * Crash safety: a scripted reading through the localhost host, the host killed with SIGKILL at
 * random moments 20 times. After every kill, every acknowledged answer is in the reader database
 * and `PRAGMA integrity_check` is ok; at the end the reading room reopens at the first item
 * without an answer.
 *
 * The next hosts are started while the current one reads; each touches the answer database only
 * at its first call, after the kill. Every submission carries a unique, increasing `seconds`
 * value, so each acknowledged one can be found again, and so can the score in force right after
 * it: the latest revision written at or before it. (Veil writes a revision only for a score that
 * changed, and a submission cut off by a kill changes nothing, so an acknowledged score may
 * already be in force from an earlier submission.)
 * The kit allows revisits and one item is never answered, so the session stays open and the
 * scores keep changing.
 */
import { expect, test } from '@playwright/test';
import Database from 'better-sqlite3';
import { existsSync } from 'node:fs';
import { join } from 'node:path';
import { serve, type ServedStudy } from './host.ts';
import { makeStudy } from './study.ts';

const KILLS = 20;

/** A small seeded generator (Park-Miller), so a failing run can be repeated. */
function random(seed: number): () => number {
  let s = seed % 2147483647 || 1;
  return () => (s = (s * 48271) % 2147483647) / 2147483647;
}

interface Ack { itemId: string; seconds: number; scores: Record<string, number> }

async function call(host: ServedStudy, op: string, body: unknown): Promise<unknown> {
  const res = await fetch(`${host.origin}/api/${op}`, {
    method: 'POST',
    headers: { 'Content-Type': 'application/json', Authorization: `Bearer ${host.token}` },
    body: JSON.stringify(body),
  });
  if (!res.ok) throw new Error(`${op}: ${res.status} ${await res.text()}`);
  return res.json();
}

/**
 * The answer database with its tables, or null when the kill came before they were committed, so
 * that nothing can have been acknowledged yet: no file (the kit was never opened); a rollback
 * journal beside it (killed before the switch to WAL; the next host rolls it back, which this
 * read-only check cannot); or a file whose migrations had not committed (each is one transaction;
 * the next host finishes them).
 */
function committedDatabase(file: string): Database.Database | null {
  if (!existsSync(file) || existsSync(`${file}-journal`)) return null;
  const db = new Database(file, { readonly: true });
  expect(db.pragma('integrity_check', { simple: true })).toBe('ok');
  const tables = db.prepare("SELECT COUNT(*) AS n FROM sqlite_master WHERE type = 'table' AND name IN ('answer', 'submission')").get() as { n: number };
  if (tables.n === 2) return db;
  db.close();
  return null;
}

function checkDatabase(file: string, acked: Ack[]): { submissions: number } {
  const db = committedDatabase(file);
  if (!db) {
    expect(acked).toEqual([]);
    return { submissions: 0 };
  }
  try {
    const inForce = db.prepare('SELECT score FROM answer WHERE item_id = ? AND question_id = ? AND seconds <= ? ORDER BY seconds DESC LIMIT 1');
    const submission = db.prepare('SELECT COUNT(*) AS n FROM submission WHERE item_id = ? AND seconds = ?');
    for (const a of acked) {
      expect((submission.get(a.itemId, a.seconds) as { n: number }).n, `submission ${a.seconds} of ${a.itemId}`).toBe(1);
      for (const [q, score] of Object.entries(a.scores)) {
        expect(inForce.get(a.itemId, q, a.seconds), `${q} in force after submission ${a.seconds}`).toEqual({ score });
      }
    }
    return { submissions: (db.prepare('SELECT COUNT(*) AS n FROM submission').get() as { n: number }).n };
  } finally {
    db.close();
  }
}

test('no acknowledged answer is lost when the host is killed at random moments', async ({ page }) => {
  test.setTimeout(150_000);
  const dir = makeStudy({
    questions: `questions:
  - {id: sharpness, text: How sharp?, scale: {points: 5, low: Blurred, high: Crisp}}
  - {id: noise, text: How clean?, scale: {points: 4, low: Noisy, high: Clean}}`,
    design: '  sessions: 1\n  revisits: true',
    cases: 4,
    size: 32,
    slices: 2,
  });
  const dbFile = join(dir, 'kits', 'R1', 'answers.sqlite');
  const seed = Date.now() % 100_000;
  const rnd = random(seed);
  test.info().annotations.push({ type: 'seed', description: String(seed) });
  const acked: Ack[] = [];
  let n = 0;
  let items: string[] = [];
  let inFlightAtKill = 0;
  let minimumAcks = 0;

  // The next hosts start while the current one reads: a host opens the answer database (and
  // takes over the lock left by a killed one) only at its first call.
  const pool = [serve(dir), serve(dir)];
  for (let k = 0; k < KILLS; k++) {
    const host = await pool.shift()!;
    pool.push(serve(dir));
    let killed = false;
    // The moment: after a random number of saved answers (0 to 5, so also while the kit opens),
    // then a random 0-40 ms into the next save.
    const target = Math.floor(rnd() * 6);
    let ackedHere = 0;
    let reached!: () => void;
    const targetReached = new Promise<void>((r) => { reached = r; });
    if (target === 0) reached();
    const reading = (async () => {
      // The reading, as the reading room does it: open the kit, then save items 1..7 again and
      // again with changing scores; item 8 stays unanswered.
      try {
        const kit = (await call(host, 'openKit', { reader: 'R1' })) as { items: { id: string }[] };
        items = kit.items.map((i) => i.id);
      } catch (e) {
        if (!killed) throw new Error(`openKit failed before the kill: ${(e as Error).message}`);
        return;
      }
      while (!killed) {
        n++;
        const itemId = items[n % (items.length - 1)];
        const scores = { sharpness: 1 + (n % 5), noise: 1 + (n % 4) };
        const seconds = n / 10;
        try {
          await call(host, 'submitAnswer', { reader: 'R1', itemId, scores, seconds });
          acked.push({ itemId, seconds, scores });
          if (++ackedHere === target) reached();
        } catch (e) {
          if (!killed) throw new Error(`submission ${n} failed before the kill: ${(e as Error).message}`);
          inFlightAtKill++;
        }
      }
    })();
    await Promise.race([targetReached, reading]);
    await new Promise((r) => setTimeout(r, rnd() * 40));
    minimumAcks += target;
    killed = true;
    host.process.kill('SIGKILL');
    await reading;
    await new Promise<void>((r) => (host.process.exitCode !== null || host.process.signalCode !== null ? r() : host.process.once('exit', () => r())));
    const { submissions } = checkDatabase(dbFile, acked);
    // Besides the acknowledged ones, at most the one in flight at each kill was committed.
    expect(submissions).toBeGreaterThanOrEqual(acked.length);
    expect(submissions).toBeLessThanOrEqual(acked.length + k + 1);
  }
  // The kills did land during the reading: answers were acknowledged, and some were cut off in flight.
  expect(acked.length).toBeGreaterThanOrEqual(minimumAcks);
  expect(inFlightAtKill).toBeGreaterThan(0);

  // The reading room reopens at the first item without an answer, every saved one counted.
  const [host, spare] = await Promise.all(pool);
  await spare.stop();
  try {
    await page.goto(`${host.url}#/read/R1`);
    await expect(page.getByTestId('display-check-confirm')).toBeFocused();
    await page.keyboard.press('Enter');
    await expect(page.getByTestId('progress-text')).toHaveText(`Item ${items.length} of ${items.length}`);
    await expect(page.getByText(`${items.length - 1} scored`)).toBeVisible();
  } finally {
    await host.stop();
  }
});
