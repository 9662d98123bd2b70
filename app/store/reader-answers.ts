/**
 * The reader's own answer database, kept beside the kit. Every submission is one transaction
 * with `synchronous = FULL`: when the call returns, the answer is on disk, and only then does the
 * reading room move on. A changed answer is a new revision; nothing is overwritten; saving an
 * item again writes a submission row and revisions only for the scores and comments that changed.
 *
 * Tables (./migrations.ts, reader): `submission` (one row per saved item, with active seconds
 * and flag), `answer` (scores, revisions), `comment` (free text, revisions), `session_end`
 * (completed sessions) and `display_check`.
 */
import type Database from 'better-sqlite3';
import { audit, openDatabase, type OpenedDatabase } from './open.ts';

export type FlagReason = 'does-not-load' | 'unrelated-artifact' | 'other';

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
  /** Free-text comments by question; '' clears an earlier comment. */
  comments?: Record<string, string>;
  flag?: { reason: FlagReason; note: string } | null;
  /** The session this submission completes, recorded in the same transaction. */
  endsSession?: number | null;
  now?: Date;
}

/** Writes one submission (item, scores, comments, flag, session end) in one transaction. */
export function recordSubmission(db: Database.Database, s: Submission): void {
  const lastScore = db.prepare('SELECT score, revision FROM answer WHERE item_id = ? AND question_id = ? ORDER BY revision DESC LIMIT 1');
  const ins = db.prepare('INSERT INTO answer (item_id, question_id, score, revision, seconds, answered_at) VALUES (?, ?, ?, ?, ?, ?)');
  const lastComment = db.prepare('SELECT text, revision FROM comment WHERE item_id = ? AND question_id = ? ORDER BY revision DESC LIMIT 1');
  const insComment = db.prepare('INSERT INTO comment (submission_id, item_id, question_id, text, revision) VALUES (?, ?, ?, ?, ?)');
  const now = (s.now ?? new Date()).toISOString();
  db.transaction(() => {
    const sub = db.prepare('INSERT INTO submission (item_id, seconds, flag, flag_note, submitted_at) VALUES (?, ?, ?, ?, ?)')
      .run(s.itemId, s.seconds, s.flag?.reason ?? null, s.flag?.note || null, now);
    // Only what changed gets a new revision, so the history shows real changes.
    for (const [questionId, score] of Object.entries(s.scores)) {
      const last = lastScore.get(s.itemId, questionId) as { score: number; revision: number } | undefined;
      if (last?.score === score) continue;
      ins.run(s.itemId, questionId, score, (last?.revision ?? 0) + 1, s.seconds, now);
    }
    for (const [questionId, text] of Object.entries(s.comments ?? {})) {
      const last = lastComment.get(s.itemId, questionId) as { text: string; revision: number } | undefined;
      if ((last?.text ?? '') === text) continue;
      insComment.run(sub.lastInsertRowid, s.itemId, questionId, text, (last?.revision ?? 0) + 1);
    }
    if (s.endsSession != null) {
      db.prepare('INSERT INTO session_end (session, completed_at) VALUES (?, ?)').run(s.endsSession, now);
      audit(db, 'session.completed', { session: s.endsSession });
    }
  })();
}

/** The latest revision of each item and question in an append-only table of revisions. */
function latestRevisions<T>(db: Database.Database, table: 'answer' | 'comment', column: 'score' | 'text'): Map<string, Record<string, T>> {
  const rows = db.prepare(`SELECT t.item_id, t.question_id, t.${column} AS value FROM ${table} t
    JOIN (SELECT item_id, question_id, MAX(revision) AS revision FROM ${table} GROUP BY item_id, question_id) l
      ON l.item_id = t.item_id AND l.question_id = t.question_id AND l.revision = t.revision`).all() as
    { item_id: string; question_id: string; value: T }[];
  const out = new Map<string, Record<string, T>>();
  for (const r of rows) out.set(r.item_id, { ...(out.get(r.item_id) ?? {}), [r.question_id]: r.value });
  return out;
}

/** Latest score per item and question. */
export function currentScores(db: Database.Database): Map<string, Record<string, number>> {
  return latestRevisions<number>(db, 'answer', 'score');
}

/** Latest comment per item and question; a comment cleared ('') is left out. */
export function currentComments(db: Database.Database): Map<string, Record<string, string>> {
  const out = new Map<string, Record<string, string>>();
  for (const [item, byQuestion] of latestRevisions<string>(db, 'comment', 'text')) {
    const kept = Object.fromEntries(Object.entries(byQuestion).filter(([, text]) => text !== ''));
    if (Object.keys(kept).length) out.set(item, kept);
  }
  return out;
}

export interface ItemRecord {
  /** How many times the item was saved. */
  submissions: number;
  flag: { reason: FlagReason; note: string } | null;
}

/** Saved items, with the flag of their latest submission. */
export function submittedItems(db: Database.Database): Map<string, ItemRecord> {
  const rows = db.prepare('SELECT item_id, flag, flag_note FROM submission ORDER BY id').all() as
    { item_id: string; flag: FlagReason | null; flag_note: string | null }[];
  const out = new Map<string, ItemRecord>();
  for (const r of rows) {
    out.set(r.item_id, {
      submissions: (out.get(r.item_id)?.submissions ?? 0) + 1,
      flag: r.flag ? { reason: r.flag, note: r.flag_note ?? '' } : null,
    });
  }
  return out;
}

/** Completed sessions and when. */
export function completedSessions(db: Database.Database): Map<number, string> {
  const rows = db.prepare('SELECT session, completed_at FROM session_end').all() as { session: number; completed_at: string }[];
  return new Map(rows.map((r) => [r.session, r.completed_at]));
}

export function recordDisplayCheck(db: Database.Database, seen: boolean, now = new Date()): string {
  const at = now.toISOString();
  db.transaction(() => {
    db.prepare('INSERT INTO display_check (seen, checked_at) VALUES (?, ?)').run(seen ? 1 : 0, at);
    audit(db, 'display-check', { seen });
  })();
  return at;
}

export function lastDisplayCheck(db: Database.Database): { seen: boolean; at: string } | null {
  const r = db.prepare('SELECT seen, checked_at FROM display_check ORDER BY id DESC LIMIT 1').get() as { seen: number; checked_at: string } | undefined;
  return r ? { seen: r.seen === 1, at: r.checked_at } : null;
}
