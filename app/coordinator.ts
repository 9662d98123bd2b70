/**
 * What the coordinator sees of a built study: its kits and each reader's progress, read from the
 * workspace (read-only). Progress comes from collected results bundles: answered items, sessions
 * completed, median active seconds per item and the last activity.
 */
import { existsSync } from 'node:fs';
import type { ReaderProgress, StudyOverview } from './api-contract.ts';
import type { ResultsBundle } from './blinding/bundle.ts';
import { openWorkspace, workspacePath } from './store/workspace.ts';

function median(values: number[]): number | null {
  if (values.length === 0) return null;
  const s = [...values].sort((a, b) => a - b);
  const m = Math.floor(s.length / 2);
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
}

export function hasWorkspace(dir: string): boolean {
  return existsSync(workspacePath(dir));
}

export function studyOverview(dir: string): StudyOverview {
  const ws = openWorkspace(workspacePath(dir), { readonly: true });
  try {
    const db = ws.db;
    const study = db.prepare('SELECT title, seed, generator, design, created_at FROM study WHERE id = 1').get() as
      { title: string; seed: number; generator: string; design: string | null; created_at: string };
    const kits = db.prepare(`SELECT k.reader_code AS reader, k.kit_id AS kitId, k.path AS path, k.created_at AS createdAt,
        (SELECT COUNT(*) FROM kit_item i WHERE i.reader_code = k.reader_code) AS items,
        (SELECT MAX(session) FROM kit_item i WHERE i.reader_code = k.reader_code) AS sessions
      FROM kit k JOIN reader r ON r.code = k.reader_code ORDER BY r.position`).all() as
      { reader: string; kitId: string; path: string; createdAt: string; items: number; sessions: number }[];
    const readers: ReaderProgress[] = kits.map((k) => {
      const latest = db.prepare(`SELECT a.item_id, a.seconds, a.answered_at, a.source FROM answer a
          JOIN kit_item i ON i.item_id = a.item_id
          WHERE i.reader_code = ? AND a.revision = (SELECT MAX(revision) FROM answer b WHERE b.item_id = a.item_id AND b.question_id = a.question_id)`)
        .all(k.reader) as { item_id: string; seconds: number | null; answered_at: string; source: string }[];
      const perItem = new Map<string, { n: number; seconds: number | null }>();
      for (const a of latest) {
        const e = perItem.get(a.item_id) ?? { n: 0, seconds: null };
        e.n++;
        e.seconds = a.seconds ?? e.seconds;
        perItem.set(a.item_id, e);
      }
      // An item counts once it has any answer: optional questions may stay empty (as in the reading room, "saved").
      const answered = perItem.size;
      const bundles = db.prepare('SELECT content, collected_at FROM bundle WHERE reader_code = ? ORDER BY id').all(k.reader) as { content: string; collected_at: string }[];
      const last = bundles.at(-1);
      const sessionEnds = last ? ((JSON.parse(last.content) as ResultsBundle).tables.session_end ?? []) : [];
      const times = latest.map((a) => a.answered_at).sort();
      return {
        reader: k.reader, kitId: k.kitId, kitPath: k.path, items: k.items, sessions: k.sessions, answered,
        sessionsDone: new Set(sessionEnds.map((r) => r.session)).size,
        medianSeconds: median([...perItem.values()].map((e) => e.seconds).filter((s): s is number => s != null)),
        lastActivity: times.at(-1) ?? null,
        bundles: bundles.length,
        simulated: latest.some((a) => a.source === 'simulated'),
      };
    });
    return { title: study.title, seed: study.seed, generator: study.generator, createdAt: study.created_at,
      design: study.design ? JSON.parse(study.design) : null, readers };
  } finally {
    ws.close();
  }
}
