/**
 * The coordinator's workspace database: the study as built, the key (item -> case and method),
 * collected answers and the audit log. Never copied into a kit.
 */
import type Database from 'better-sqlite3';
import { join } from 'node:path';
import type { StudyTemplate } from '../study/template.ts';
import type { Volume } from '../images/volume.ts';
import type { ScheduledItem } from '../blinding/design.ts';
import { audit, openDatabase, type OpenedDatabase } from './open.ts';

export const WORKSPACE_FILE = 'workspace.sqlite';

export function workspacePath(studyDir: string): string {
  return join(studyDir, WORKSPACE_FILE);
}

export function openWorkspace(file: string, opts: { readonly?: boolean; create?: boolean } = {}): OpenedDatabase {
  return openDatabase(file, 'workspace', opts);
}

export function writeStudy(db: Database.Database, t: StudyTemplate, templateText: string, generator: string, caseIds: string[]): void {
  db.prepare('INSERT INTO study (id, title, seed, generator, template_path, template_text, created_at) VALUES (1, ?, ?, ?, ?, ?, ?)')
    .run(t.title, t.seed, generator, t.file, templateText, new Date().toISOString());
  const m = db.prepare('INSERT INTO method (id, label, path_pattern, position) VALUES (?, ?, ?, ?)');
  t.methods.forEach((x, i) => m.run(x.id, x.label, x.path, i));
  const c = db.prepare('INSERT INTO study_case (id, position) VALUES (?, ?)');
  caseIds.forEach((id, i) => c.run(id, i));
  const q = db.prepare('INSERT INTO question (id, text, points, position) VALUES (?, ?, ?, ?)');
  t.questions.forEach((x, i) => q.run(x.id, x.text, x.scale.points, i));
  const r = db.prepare('INSERT INTO reader (code, position) VALUES (?, ?)');
  t.readers.forEach((code, i) => r.run(code, i));
  audit(db, 'study.created', { title: t.title, seed: t.seed, template: t.file });
}

/** What the workspace records of a source volume. */
export type SeriesRecord = Pick<Volume, 'provenance' | 'columns' | 'rows' | 'slices' | 'spacing'>;

export function writeSeries(db: Database.Database, caseId: string, methodId: string | null, v: SeriesRecord): number {
  const res = db.prepare(`INSERT INTO series (case_id, method_id, role, path, format, sha256, columns, rows, slices, spacing)
    VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`).run(caseId, methodId, methodId ? 'method' : 'reference', v.provenance.path,
    v.provenance.format, v.provenance.sha256, v.columns, v.rows, v.slices, JSON.stringify(v.spacing));
  return Number(res.lastInsertRowid);
}

/** Metric values of one item (∞ and NaN stored as null). */
export function writeMetric(db: Database.Database, caseId: string, methodId: string, values: Record<string, number | null | undefined>, detail: Record<string, unknown>): void {
  const finite = Object.fromEntries(Object.entries(values).map(([k, v]) => [k, v != null && Number.isFinite(v) ? v : null]));
  db.prepare('INSERT INTO metric (case_id, method_id, "values", detail) VALUES (?, ?, ?, ?)').run(caseId, methodId, JSON.stringify(finite), JSON.stringify(detail));
}

export function readMetrics(db: Database.Database): { case: string; method: string; values: Record<string, number | null> }[] {
  return (db.prepare(`SELECT m.case_id AS c, m.method_id AS me, m."values" AS v FROM metric m
      JOIN study_case sc ON sc.id = m.case_id JOIN method mt ON mt.id = m.method_id ORDER BY sc.position, mt.position`).all() as { c: string; me: string; v: string }[])
    .map((r) => ({ case: r.c, method: r.me, values: JSON.parse(r.v) as Record<string, number | null> }));
}

export function writeKit(db: Database.Database, reader: string, kitId: string, path: string, bundleKey: string, publicKey: string): void {
  db.prepare('INSERT INTO kit (reader_code, kit_id, path, created_at, bundle_key, public_key) VALUES (?, ?, ?, ?, ?, ?)')
    .run(reader, kitId, path, new Date().toISOString(), bundleKey, publicKey);
}

export function writeKitItems(db: Database.Database, items: ScheduledItem[], seriesOf: (caseId: string, methodId: string) => number): void {
  const s = db.prepare(`INSERT INTO kit_item (item_id, reader_code, position, session, case_id, method_id, series_id, right_method_id, right_series_id)
    VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?)`);
  for (const it of items) {
    s.run(it.itemId, it.reader, it.position, it.session, it.caseId, it.methodId, seriesOf(it.caseId, it.methodId),
      it.rightMethodId ?? null, it.rightMethodId ? seriesOf(it.caseId, it.rightMethodId) : null);
  }
}

export interface WorkspaceAnswer {
  itemId: string;
  questionId: string;
  score: number;
  seconds: number | null;
  source: 'collected' | 'simulated';
}

/** Adds answers as new revisions (append-only), in one transaction. */
export function addWorkspaceAnswers(db: Database.Database, answers: WorkspaceAnswer[]): void {
  const rev = db.prepare('SELECT COALESCE(MAX(revision), 0) AS r FROM answer WHERE item_id = ? AND question_id = ?');
  const ins = db.prepare('INSERT INTO answer (item_id, question_id, score, revision, seconds, answered_at, source) VALUES (?, ?, ?, ?, ?, ?, ?)');
  const now = new Date().toISOString();
  db.transaction(() => {
    for (const a of answers) {
      const r = (rev.get(a.itemId, a.questionId) as { r: number }).r + 1;
      ins.run(a.itemId, a.questionId, a.score, r, a.seconds, now, a.source);
    }
  })();
}

export interface UnblindedRating {
  case: string;
  reader: string;
  method: string;
  question: string;
  score: number;
  session: number;
  seconds: number | null;
  source: string;
  /** The reader's flag on the item (its latest submission), if any. */
  flag: string | null;
  /** The reader's latest comment on this question of the item, if any. */
  comment: string | null;
}

/** The latest revision of every answer, unblinded through the key, in a stable order. */
export function unblindedRatings(db: Database.Database): UnblindedRating[] {
  return db.prepare(`
    SELECT k.case_id AS "case", k.reader_code AS reader, k.method_id AS method, a.question_id AS question,
           a.score AS score, k.session AS session, a.seconds AS seconds, a.source AS source,
           (SELECT s.flag FROM item_submission s WHERE s.item_id = a.item_id ORDER BY s.reader_submission DESC LIMIT 1) AS flag,
           (SELECT NULLIF(ic.text, '') FROM item_comment ic WHERE ic.item_id = a.item_id AND ic.question_id = a.question_id
             ORDER BY ic.reader_revision DESC LIMIT 1) AS comment
    FROM answer a
    JOIN (SELECT item_id, question_id, MAX(revision) AS revision FROM answer GROUP BY item_id, question_id) latest
      ON latest.item_id = a.item_id AND latest.question_id = a.question_id AND latest.revision = a.revision
    JOIN kit_item k ON k.item_id = a.item_id
    JOIN study_case c ON c.id = k.case_id
    JOIN reader r ON r.code = k.reader_code
    JOIN method m ON m.id = k.method_id
    JOIN question q ON q.id = a.question_id
    ORDER BY c.position, r.position, m.position, q.position`).all() as UnblindedRating[];
}
