/**
 * The reader's own answer database, kept beside the kit. Every submission is one transaction
 * with `synchronous = FULL`: when the call returns, the answer is on disk, and only then does the
 * reading room move on. A changed answer is a new revision; nothing is overwritten.
 */
import type Database from 'better-sqlite3';
import { audit, openDatabase, type OpenedDatabase } from './open.ts';

export const ANSWERS_FILE = 'answers.sqlite';

export function openReaderAnswers(file: string, kitId: string, reader: string): OpenedDatabase {
  const opened = openDatabase(file, 'reader');
  const db = opened.db;
  const stored = db.prepare("SELECT value FROM kit_info WHERE key = 'kit_id'").get() as { value: string } | undefined;
  if (!stored) {
    db.transaction(() => {
      db.prepare("INSERT INTO kit_info (key, value) VALUES ('kit_id', ?), ('reader', ?)").run(kitId, reader);
      audit(db, 'answers.created', { kitId, reader });
    })();
  } else if (stored.value !== kitId) {
    opened.close();
    throw new Error(`${file} holds answers for another kit (${stored.value}, not ${kitId}); it was not changed. Move it aside to start this kit afresh.`);
  }
  return opened;
}

export interface Submission {
  itemId: string;
  scores: Record<string, number>;
  seconds: number | null;
}

export function recordSubmission(db: Database.Database, s: Submission): void {
  const rev = db.prepare('SELECT COALESCE(MAX(revision), 0) AS r FROM answer WHERE item_id = ? AND question_id = ?');
  const ins = db.prepare('INSERT INTO answer (item_id, question_id, score, revision, seconds, answered_at) VALUES (?, ?, ?, ?, ?, ?)');
  const now = new Date().toISOString();
  db.transaction(() => {
    for (const [questionId, score] of Object.entries(s.scores)) {
      const r = (rev.get(s.itemId, questionId) as { r: number }).r + 1;
      ins.run(s.itemId, questionId, score, r, s.seconds, now);
    }
  })();
}

/** Latest score per item and question. */
export function currentScores(db: Database.Database): Map<string, Record<string, number>> {
  const rows = db.prepare(`SELECT a.item_id, a.question_id, a.score FROM answer a
    JOIN (SELECT item_id, question_id, MAX(revision) AS revision FROM answer GROUP BY item_id, question_id) l
      ON l.item_id = a.item_id AND l.question_id = a.question_id AND l.revision = a.revision`).all() as
    { item_id: string; question_id: string; score: number }[];
  const out = new Map<string, Record<string, number>>();
  for (const r of rows) {
    const m = out.get(r.item_id) ?? {};
    m[r.question_id] = r.score;
    out.set(r.item_id, m);
  }
  return out;
}
