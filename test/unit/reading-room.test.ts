/**
 * The reading room's rules, through the real API on real kits and SQLite files: question types,
 * required questions, comments, flags, sessions with washout, revisits with revision history,
 * the display check, and the reader database migration.
 */
import Database from 'better-sqlite3';
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { createApi } from '../../app/api.ts';
import { buildStudy } from '../../app/blinding/build.ts';
import { loadKitManifest } from '../../app/blinding/kit-read.ts';
import type { KitManifest } from '../../app/blinding/kit-format.ts';
import { parseTemplate, loadTemplate } from '../../app/study/parse-template.ts';
import { migrate, readerMigrations } from '../../app/store/migrations.ts';
import { openReaderAnswers, submittedItems } from '../../app/store/reader-answers.ts';
import { tempDir, writeTinyStudy } from './helpers.ts';

const QUESTIONS = `questions:
  - id: sharpness
    text: How sharp?
    scale: {points: 5, low: Blurred, high: Crisp}
    comment: true
  - id: streaks
    text: Are there streaks?
    type: yes-no
  - id: remarks
    text: Overall impression?
    scale: {points: 3, low: Poor, high: Good}
    required: false
`;

/** The tiny study of helpers.ts with our own questions and design keys. */
async function built(design: string, sessions = 2): Promise<string> {
  const { dir, template } = writeTinyStudy({ sessions, extraYaml: design });
  const text = readFileSync(template, 'utf8').replace(/questions:\n(?:  .*\n|    .*\n)+/, QUESTIONS);
  writeFileSync(template, text);
  const out = join(dir, 'study');
  await buildStudy(loadTemplate(template), out);
  return out;
}

const DAY = 86_400_000;

describe('template fields of the reading room', () => {
  const base = (questions: string, design = '') => `title: T
seed: 1
sources: data
methods:
  - {id: m-a, label: A, path: "{case}/a.npy"}
  - {id: m-b, label: B, path: "{case}/b.npy"}
cases: auto
${questions}
readers: [R1]
design:
  sessions: 1
${design}`;

  it('reads yes-no, comparative, required, comment and revisits, and fills the yes-no scale', () => {
    const t = parseTemplate(base(`questions:
  - id: seen
    text: Is the lesion seen?
    type: yes-no
    required: false
  - id: preference
    text: Which edges are sharper?
    type: comparative
    comment: true
    scale: {points: 7, low: Left much better, high: Right much better}
    labels: {4: No difference}`, '  presentation: side-by-side\n  revisits: true'), '/s/t.study.yaml');
    expect(t.questions[0]).toEqual({ id: 'seen', text: 'Is the lesion seen?', type: 'yes-no', required: false, scale: { points: 2, low: 'No', high: 'Yes' }, labels: {} });
    expect(t.questions[1]).toMatchObject({ type: 'comparative', comment: true, scale: { points: 7 }, labels: { 4: 'No difference' } });
    expect(t.design.revisits).toBe(true);
  });

  it('names the line and key of a misused type', () => {
    const issues = (text: string) => { try { parseTemplate(text, '/s/t.study.yaml'); return []; } catch (e) { return (e as Error).message.split('\n'); } };
    expect(issues(base(`questions:
  - id: pref
    text: Which?
    type: comparative
    scale: {points: 6, low: L, high: R}`))).toEqual([
      "/s/t.study.yaml:11:11: questions[0].type: a comparative question needs 'design: {presentation: side-by-side}' (it compares two images)",
      "/s/t.study.yaml:12:21: questions[0].scale.points: a comparative question needs an odd number of points (symmetric about 'no difference' in the middle), got 6",
    ]);
    expect(issues(base(`questions:
  - id: seen
    text: Seen?
    type: yes-no
    scale: {points: 2, low: N, high: Y}`))).toEqual([
      "/s/t.study.yaml:12:5: questions[0].scale: a yes-no question has no scale (it is scored 1 = no, 2 = yes); remove 'scale'",
    ]);
    expect(issues(base(`questions:
  - id: sharp
    text: Sharp?`))).toEqual([
      "/s/t.study.yaml:9:5: questions[0].scale: missing required key 'scale'; expected a Likert scale with the keys points, low and high",
    ]);
    expect(issues(base(`questions:
  - id: sharp
    text: Sharp?
    required: maybe
    scale: {points: 5, low: L, high: H}`))[0]).toMatch(/questions\[0\]\.required: must be true or false/);
  });
});

describe('kit manifest', () => {
  it('carries question types, required, comment and revisits from the template, and presets', async () => {
    const out = await built('  revisits: true');
    const m = JSON.parse(readFileSync(join(out, 'kits', 'R1', 'kit.json'), 'utf8')) as KitManifest;
    expect(m.revisits).toBe(true);
    expect(m.presets).toEqual([]);
    expect(m.questions.map((q) => [q.id, q.type, q.required, q.comment, q.points])).toEqual([
      ['sharpness', 'likert', true, true, 5], ['streaks', 'yes-no', true, false, 2], ['remarks', 'likert', false, false, 3],
    ]);
  });

  it('reads a kit written before these fields with their defaults', () => {
    const dir = tempDir();
    writeFileSync(join(dir, 'kit.json'), JSON.stringify({
      format: 'veil-kit', version: 1, kitId: 'k1', reader: 'R1', title: 'T', createdAt: '2026-01-01T00:00:00Z', sessions: 1, washoutDays: 0,
      presentation: 'single', questions: [{ id: 'q', text: 'Q?', points: 5, low: 'a', high: 'b', labels: {} }], items: [],
    }));
    const m = loadKitManifest(dir);
    expect(m.revisits).toBe(false);
    expect(m.presets).toEqual([]);
    expect(m.questions[0]).toMatchObject({ type: 'likert', required: true, comment: false });
  });
});

describe('reader database, version 2', () => {
  it('turns answers saved by version 1 into submissions, so progress survives the upgrade', () => {
    const dir = tempDir();
    const file = join(dir, 'answers.sqlite');
    const v1 = new Database(file);
    migrate(v1, readerMigrations.slice(0, 1), file);
    v1.prepare("INSERT INTO kit_info (key, value) VALUES ('kit_id', 'k1'), ('reader', 'R1')").run();
    const ins = v1.prepare('INSERT INTO answer (item_id, question_id, score, revision, seconds, answered_at) VALUES (?, ?, ?, ?, ?, ?)');
    ins.run('a', 'q1', 3, 1, 4, '2026-01-01T10:00:00Z');
    ins.run('a', 'q2', 2, 1, 4, '2026-01-01T10:00:00Z');
    ins.run('b', 'q1', 5, 1, 6, '2026-01-01T10:01:00Z');
    ins.run('b', 'q2', 1, 1, 6, '2026-01-01T10:01:00Z');
    v1.close();
    const opened = openReaderAnswers(file, 'k1', 'R1');
    expect(opened.db.pragma('user_version', { simple: true })).toBe(2);
    expect([...submittedItems(opened.db).keys()]).toEqual(['a', 'b']);
    expect(opened.db.prepare('SELECT item_id, seconds FROM submission ORDER BY id').all()).toEqual([{ item_id: 'a', seconds: 4 }, { item_id: 'b', seconds: 6 }]);
    expect(() => opened.db.prepare('DELETE FROM submission').run()).toThrow(/append-only/);
    opened.close();
  });
});

describe('API of the reading room', () => {
  it('takes yes-no and optional questions, comments and flags, and refuses what the kit does not allow', async () => {
    const api = createApi(await built('  washout_days: 0', 1));
    try {
      const kit = await api.openKit({ reader: 'R1' });
      expect(kit.questions.map((q) => q.type)).toEqual(['likert', 'yes-no', 'likert']);
      const [a, b, c, d] = kit.items.map((i) => i.id);
      const submit = (itemId: string, extra: object) => api.submitAnswer({ reader: 'R1', itemId, seconds: 2, scores: {}, ...extra });
      await expect(submit(a, { scores: { sharpness: 3 } })).rejects.toThrow("question 'streaks' has no score; it is required");
      await expect(submit(a, { scores: { sharpness: 3, streaks: 3 } })).rejects.toThrow("question 'streaks': score must be 1 (no) or 2 (yes), got 3");
      await expect(submit(a, { scores: { sharpness: 3, streaks: 1 }, comments: { streaks: 'x' } })).rejects.toThrow("question 'streaks' takes no comment");
      await expect(submit(a, { scores: { sharpness: 3, streaks: 1 }, flag: { reason: 'other', note: ' ' } })).rejects.toThrow(/needs a note/);
      await expect(submit(a, { scores: {}, flag: { reason: 'dull', note: '' } })).rejects.toThrow(/flag reason must be one of: does-not-load, unrelated-artifact, other/);
      // The optional question may stay empty; a comment goes with the score.
      const r = await submit(a, { scores: { sharpness: 3, streaks: 2 }, comments: { sharpness: 'edge of the rim soft' } });
      expect(r.progress).toMatchObject({ answered: 1, next: 1 });
      // An item that does not load may be saved without scores when flagged so.
      await submit(b, { scores: {}, flag: { reason: 'does-not-load', note: '' } });
      await submit(c, { scores: { sharpness: 1, streaks: 1, remarks: 2 }, flag: { reason: 'unrelated-artifact', note: 'motion' } });
      // Saving the same answer again (a retry after a lost reply) is accepted and writes nothing.
      await submit(a, { scores: { sharpness: 3, streaks: 2 }, comments: { sharpness: 'edge of the rim soft' } });
      // Without revisits, a saved answer cannot be changed.
      await expect(submit(a, { scores: { sharpness: 4, streaks: 2 } })).rejects.toThrow(`item '${a}' is already saved, and this kit does not allow changing answers`);
      const again = await api.openKit({ reader: 'R1' });
      expect(again.answers[a]).toEqual({ sharpness: 3, streaks: 2 });
      expect(again.comments[a]).toEqual({ sharpness: 'edge of the rim soft' });
      expect(again.flags).toEqual({ [b]: { reason: 'does-not-load', note: '' }, [c]: { reason: 'unrelated-artifact', note: 'motion' } });
      expect(again.submitted.sort()).toEqual([a, b, c].sort());
      expect(again.progress.next).toBe(kit.items.findIndex((i) => i.id === d));
    } finally {
      api.close();
    }
  });

  it('locks the next session until the washout has passed, and makes a complete session final', async () => {
    let now = new Date('2026-03-02T09:30:00Z');
    const out = await built('  washout_days: 14');
    const api = createApi(out, { now: () => now });
    try {
      const kit = await api.openKit({ reader: 'R2' });
      const s1 = kit.items.filter((i) => i.session === 1);
      const s2 = kit.items.filter((i) => i.session === 2);
      expect(kit.sessionStates.map((s) => [s.items, s.open])).toEqual([[s1.length, true], [s2.length, false]]);
      const scores = { sharpness: 2, streaks: 1 };
      await expect(api.submitAnswer({ reader: 'R2', itemId: s2[0].id, scores, seconds: 1 })).rejects.toThrow('session 2 opens after session 1 is complete');
      let last;
      for (const it of s1) last = await api.submitAnswer({ reader: 'R2', itemId: it.id, scores, seconds: 1 });
      const opens = new Date(now.getTime() + 14 * DAY).toISOString();
      expect(last!.sessionStates).toEqual([
        { session: 1, items: s1.length, answered: s1.length, completedAt: now.toISOString(), opensAt: null, open: false },
        { session: 2, items: s2.length, answered: 0, completedAt: null, opensAt: opens, open: false },
      ]);
      now = new Date(now.getTime() + 14 * DAY - 60_000);
      await expect(api.submitAnswer({ reader: 'R2', itemId: s2[0].id, scores, seconds: 1 })).rejects.toThrow(`session 2 opens on ${opens} (washout of 14 days after session 1)`);
      now = new Date(now.getTime() + 60_000);
      await api.submitAnswer({ reader: 'R2', itemId: s2[0].id, scores, seconds: 1 });
      await expect(api.submitAnswer({ reader: 'R2', itemId: s1[0].id, scores: { sharpness: 5, streaks: 1 }, seconds: 1 })).rejects.toThrow('session 1 is complete; its answers are final');
    } finally {
      api.close();
    }
    // The lock is in the reader's database: a new launch sees it too.
    const db = new Database(join(out, 'kits', 'R2', 'answers.sqlite'), { readonly: true });
    expect((db.prepare('SELECT session FROM session_end').all() as { session: number }[]).map((r) => r.session)).toEqual([1]);
    db.close();
  });

  it('with revisits, a changed answer is a new revision and the history stays', async () => {
    const out = await built('  revisits: true', 1);
    const api = createApi(out);
    try {
      const kit = await api.openKit({ reader: 'R1' });
      expect(kit.revisits).toBe(true);
      const [a, b] = kit.items.map((i) => i.id);
      await api.submitAnswer({ reader: 'R1', itemId: a, scores: { sharpness: 2, streaks: 1 }, comments: { sharpness: 'first' }, seconds: 3 });
      await api.submitAnswer({ reader: 'R1', itemId: b, scores: { sharpness: 4, streaks: 2 }, seconds: 3 });
      await api.submitAnswer({ reader: 'R1', itemId: a, scores: { sharpness: 5, streaks: 1 }, comments: { sharpness: '' }, seconds: 1.5 });
      const again = await api.openKit({ reader: 'R1' });
      expect(again.answers[a]).toEqual({ sharpness: 5, streaks: 1 });
      expect(again.comments[a]).toBeUndefined();
    } finally {
      api.close();
    }
    const db = new Database(join(out, 'kits', 'R1', 'answers.sqlite'), { readonly: true });
    const kitId = (db.prepare("SELECT value FROM kit_info WHERE key = 'kit_id'").get() as { value: string }).value;
    expect(kitId).toMatch(/^kit-/);
    const rows = db.prepare("SELECT question_id, score, revision FROM answer WHERE question_id = 'sharpness' ORDER BY id").all();
    expect(rows).toEqual([
      { question_id: 'sharpness', score: 2, revision: 1 }, { question_id: 'sharpness', score: 4, revision: 1 }, { question_id: 'sharpness', score: 5, revision: 2 },
    ]);
    expect(db.prepare('SELECT text, revision FROM comment ORDER BY id').all()).toEqual([{ text: 'first', revision: 1 }, { text: '', revision: 2 }]);
    expect((db.prepare('SELECT COUNT(*) AS n FROM submission').get() as { n: number }).n).toBe(3);
    db.close();
  });

  it('records the display check', async () => {
    const out = await built('', 1);
    const api = createApi(out, { now: () => new Date('2026-05-01T08:00:00Z') });
    try {
      expect((await api.openKit({ reader: 'R1' })).displayCheck).toBeNull();
      await expect(api.confirmDisplayCheck({ reader: 'R1', seen: 'yes' as unknown as boolean })).rejects.toThrow('seen must be true or false');
      await api.confirmDisplayCheck({ reader: 'R1', seen: true });
      expect((await api.openKit({ reader: 'R1' })).displayCheck).toEqual({ seen: true, at: '2026-05-01T08:00:00.000Z' });
    } finally {
      api.close();
    }
  });
});
