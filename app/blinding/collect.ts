/**
 * `veil collect DIR BUNDLE...`: verify results bundles and unblind their answers into the
 * workspace. All accepted bundles go in one transaction, so an interrupted collect leaves the
 * workspace as it was. Collecting the same bundle twice changes nothing; a later export of the
 * same kit that extends the earlier one adds only what is new; two bundles of one reader that
 * disagree are a conflict, refused with the reason.
 */
import { readFileSync } from 'node:fs';
import { resolve } from 'node:path';
import type Database from 'better-sqlite3';
import { audit } from '../store/open.ts';
import { openWorkspace, workspacePath } from '../store/workspace.ts';
import { BundleError, extendsBundle, parseBundle, verifyBundle, type ResultsBundle, type Row } from './bundle.ts';
import { sha256Hex } from './kit-integrity.ts';

export type CollectStatus = 'imported' | 'updated' | 'unchanged' | 'refused' | 'conflict';

export interface CollectResult {
  file: string;
  status: CollectStatus;
  reader?: string;
  /** Answer rows (revisions) added to the workspace. */
  added: number;
  reason?: string;
}

interface KitRow { reader_code: string; kit_id: string; bundle_key: string | null }

function importAnswers(db: Database.Database, b: ResultsBundle, knownItems: Set<string>): number {
  const calibration = new Set((db.prepare('SELECT item_id FROM calibration_item WHERE reader_code = ?').all(b.reader) as { item_id: string }[]).map((r) => r.item_id));
  const exists = db.prepare("SELECT 1 FROM answer WHERE item_id = ? AND question_id = ? AND reader_revision = ? AND source = 'collected'");
  const next = db.prepare('SELECT COALESCE(MAX(revision), 0) + 1 AS r FROM answer WHERE item_id = ? AND question_id = ?');
  const ins = db.prepare(`INSERT INTO answer (item_id, question_id, score, revision, seconds, answered_at, source, reader_revision)
    VALUES (?, ?, ?, ?, ?, ?, 'collected', ?)`);
  let added = 0;
  for (const r of (b.tables.answer ?? []) as Row[]) {
    const item = String(r.item_id);
    if (calibration.has(item)) continue; // calibration answers stay with the bundle; they are not analysed
    if (!knownItems.has(item)) throw new BundleError(`answer for item '${item}', which is not in ${b.reader}'s kit`);
    if (exists.get(item, r.question_id, r.revision)) continue;
    const revision = (next.get(item, r.question_id) as { r: number }).r;
    ins.run(item, r.question_id, r.score, revision, r.seconds ?? null, r.answered_at, r.revision);
    added++;
  }
  // Comments and flags travel with the scores; like them, each row is taken once.
  const comment = db.prepare('INSERT OR IGNORE INTO item_comment (item_id, question_id, text, reader_revision) VALUES (?, ?, ?, ?)');
  for (const r of (b.tables.comment ?? []) as Row[]) {
    if (knownItems.has(String(r.item_id))) comment.run(r.item_id, r.question_id, r.text, r.revision);
  }
  const submission = db.prepare('INSERT OR IGNORE INTO item_submission (item_id, reader_submission, flag, flag_note, submitted_at) VALUES (?, ?, ?, ?, ?)');
  for (const r of (b.tables.submission ?? []) as Row[]) {
    if (knownItems.has(String(r.item_id))) submission.run(r.item_id, r.id, r.flag ?? null, r.flag_note ?? null, r.submitted_at);
  }
  return added;
}

/** A bundle to collect: its file name (for messages) and its text, or a path to read it from. */
export type BundleInput = string | { name: string; text: string };

export function collectBundles(studyDir: string, inputs: BundleInput[]): CollectResult[] {
  const ws = openWorkspace(workspacePath(studyDir), { create: false });
  try {
    const db = ws.db;
    const kits = new Map((db.prepare('SELECT reader_code, kit_id, bundle_key FROM kit').all() as KitRow[]).map((k) => [k.kit_id, k]));
    const results: CollectResult[] = [];
    db.transaction(() => {
      for (const input of inputs) {
        const file = typeof input === 'string' ? resolve(input) : input.name;
        let text: string;
        try {
          text = typeof input === 'string' ? readFileSync(file, 'utf8') : input.text;
        } catch (e) {
          results.push({ file, status: 'refused', added: 0, reason: `cannot read (${(e as NodeJS.ErrnoException).code ?? (e as Error).message})` });
          continue;
        }
        try {
          const b = parseBundle(text, file);
          const kit = kits.get(b.kitId);
          if (!kit) throw new BundleError(`${file}: kit ${b.kitId} does not belong to this study (a bundle of another study?)`);
          if (kit.reader_code !== b.reader) throw new BundleError(`${file}: says reader ${b.reader}, but kit ${b.kitId} is ${kit.reader_code}'s`);
          if (!kit.bundle_key) throw new BundleError(`${file}: kit ${b.kitId} was built without a bundle key; rebuild the study`);
          verifyBundle(b, kit.bundle_key, file);
          const sha = sha256Hex(Buffer.from(text));
          if (db.prepare('SELECT 1 FROM bundle WHERE sha256 = ?').get(sha)) {
            results.push({ file, status: 'unchanged', reader: b.reader, added: 0, reason: 'already collected' });
            continue;
          }
          const earlier = (db.prepare('SELECT content FROM bundle WHERE kit_id = ? ORDER BY id').all(b.kitId) as { content: string }[])
            .map((r) => JSON.parse(r.content) as ResultsBundle);
          const conflicting = earlier.find((e) => !extendsBundle(b, e) && !extendsBundle(e, b));
          if (conflicting) {
            results.push({ file, status: 'conflict', reader: b.reader, added: 0,
              reason: `${b.reader} already sent a different bundle (exported ${conflicting.exportedAt}) whose answers this one does not continue; nothing was imported from it` });
            continue;
          }
          const knownItems = new Set((db.prepare('SELECT item_id FROM kit_item WHERE reader_code = ?').all(b.reader) as { item_id: string }[]).map((r) => r.item_id));
          const added = importAnswers(db, b, knownItems);
          db.prepare('INSERT INTO bundle (reader_code, kit_id, sha256, chains, exported_at, collected_at, file, content) VALUES (?, ?, ?, ?, ?, ?, ?, ?)')
            .run(b.reader, b.kitId, sha, JSON.stringify(b.chains), b.exportedAt, new Date().toISOString(), file, text);
          audit(db, 'bundle.collected', { file, reader: b.reader, kitId: b.kitId, added });
          results.push({ file, status: earlier.length ? 'updated' : 'imported', reader: b.reader, added });
        } catch (e) {
          if (!(e instanceof BundleError)) throw e;
          results.push({ file, status: 'refused', added: 0, reason: e.message });
        }
      }
    })();
    return results;
  } finally {
    ws.close();
  }
}
