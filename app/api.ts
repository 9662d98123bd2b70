/**
 * The one API of Veil. Hosts (main/) adapt it to a transport and add nothing.
 * The reading-room operations touch only kits and the reader's own answer database, never the
 * workspace: a reader's session cannot reach the key.
 */
import { join, resolve } from 'node:path';
import { ApiError, OPERATIONS, type AppInfo, type KitView, type Progress, type ReaderEntry, type SubmitRequest, type VeilApi } from './api-contract.ts';
import { findKits, isKitFolder, loadKitManifest, readViewPixels } from './blinding/kit-read.ts';
import { KIT_MANIFEST, type KitManifest } from './blinding/kit-format.ts';
import { checkFileBytes, KitIntegrityError, verifyKitIntegrity, type KitIntegrity } from './blinding/kit-integrity.ts';
import { writeResultsBundle } from './blinding/bundle-export.ts';
import { readFileSync } from 'node:fs';
import { ANSWERS_FILE, currentScores, openReaderAnswers, recordSubmission } from './store/reader-answers.ts';
import type { OpenedDatabase } from './store/open.ts';
import { RESEARCH_NOTICE, VEIL_VERSION } from './notice.ts';

export { OPERATIONS };
export type { VeilApi };

interface OpenKit { dir: string; manifest: KitManifest; integrity: KitIntegrity; answers: OpenedDatabase }

export interface ApiHandle extends VeilApi {
  close(): void;
}

function progressOf(manifest: KitManifest, scores: Map<string, Record<string, number>>): Progress {
  let answered = 0;
  let next: number | null = null;
  manifest.items.forEach((it, i) => {
    const s = scores.get(it.id);
    const complete = !!s && manifest.questions.every((q) => s[q.id] != null);
    if (complete) answered++;
    else if (next === null) next = i;
  });
  return { answered, total: manifest.items.length, next };
}

/** `root` is a study folder (with kits/) or a single kit folder. */
export function createApi(root: string): ApiHandle {
  const dir = resolve(root);
  const mode: AppInfo['mode'] = isKitFolder(dir) ? 'kit' : 'study';
  const kitDirs = mode === 'kit' ? new Map([[loadKitManifest(dir).reader, dir]]) : findKits(dir);
  if (kitDirs.size === 0) throw new Error(`${dir} holds no reading kit: expected ${join(dir, 'kit.json')} or kits/<reader>/kit.json (run \`veil build\` or \`veil demo\` first)`);
  const open = new Map<string, OpenKit>();

  function kitOf(reader: string): OpenKit {
    if (typeof reader !== 'string') throw new ApiError('reader must be a reader code');
    const cached = open.get(reader);
    if (cached) return cached;
    const kitDir = kitDirs.get(reader);
    if (!kitDir) throw new ApiError(`no kit for reader '${reader}' here; readers: ${[...kitDirs.keys()].join(', ')}`, 404);
    let integrity: KitIntegrity;
    try {
      integrity = verifyKitIntegrity(kitDir);
      checkFileBytes(integrity, kitDir, KIT_MANIFEST, readFileSync(join(kitDir, KIT_MANIFEST)));
    } catch (e) {
      if (e instanceof KitIntegrityError) throw new ApiError(`This kit cannot be opened: ${e.message}`, 409);
      throw e;
    }
    const manifest = loadKitManifest(kitDir);
    const answers = openReaderAnswers(join(kitDir, ANSWERS_FILE), manifest.kitId, manifest.reader);
    const k = { dir: kitDir, manifest, integrity, answers };
    open.set(reader, k);
    return k;
  }

  const api: ApiHandle = {
    async info() {
      const first = loadKitManifest([...kitDirs.values()][0]);
      return { product: 'Veil', version: VEIL_VERSION, notice: RESEARCH_NOTICE, mode, title: first.title };
    },
    async listReaders(): Promise<ReaderEntry[]> {
      return [...kitDirs.keys()].sort().map((reader) => {
        const k = kitOf(reader);
        const p = progressOf(k.manifest, currentScores(k.answers.db));
        return { reader, items: p.total, answered: p.answered };
      });
    },
    async openKit({ reader }): Promise<KitView> {
      const k = kitOf(reader);
      const scores = currentScores(k.answers.db);
      const m = k.manifest;
      return {
        kitId: m.kitId, reader: m.reader, title: m.title, sessions: m.sessions,
        questions: m.questions,
        items: m.items.map(({ id, session, views }) => ({
          id, session, views: views.map(({ columns, rows, slices, spacing, window }) => ({ columns, rows, slices, spacing, window })),
        })),
        answers: Object.fromEntries(scores),
        progress: progressOf(m, scores),
      };
    },
    async itemPixels({ reader, itemId, view = 0 }) {
      const k = kitOf(reader);
      const item = k.manifest.items.find((i) => i.id === itemId);
      if (!item) throw new ApiError(`kit of reader '${reader}' has no item '${itemId}'`, 404);
      const v = item.views[view];
      if (!v) throw new ApiError(`item '${itemId}' has no view ${view} (it has ${item.views.length})`, 404);
      let px: Uint16Array;
      try {
        px = readViewPixels(k.dir, v, k.integrity);
      } catch (e) {
        if (e instanceof KitIntegrityError) throw new ApiError(e.message, 409);
        throw e;
      }
      return px.buffer.slice(px.byteOffset, px.byteOffset + px.byteLength) as ArrayBuffer;
    },
    async submitAnswer(req: SubmitRequest) {
      const k = kitOf(req.reader);
      const m = k.manifest;
      if (!m.items.some((i) => i.id === req.itemId)) throw new ApiError(`kit of reader '${req.reader}' has no item '${req.itemId}'`, 404);
      const scores = req.scores ?? {};
      for (const key of Object.keys(scores)) {
        if (!m.questions.some((q) => q.id === key)) throw new ApiError(`unknown question '${key}'; questions: ${m.questions.map((q) => q.id).join(', ')}`);
      }
      for (const q of m.questions) {
        const s = scores[q.id];
        if (s == null) throw new ApiError(`question '${q.id}' has no score; every question must be answered`);
        if (!Number.isInteger(s) || s < 1 || s > q.points) throw new ApiError(`question '${q.id}': score must be a whole number from 1 to ${q.points}, got ${JSON.stringify(s)}`);
      }
      const seconds = req.seconds == null ? null : Number(req.seconds);
      if (seconds != null && !(seconds >= 0)) throw new ApiError(`seconds must be a non-negative number, got ${JSON.stringify(req.seconds)}`);
      recordSubmission(k.answers.db, { itemId: req.itemId, scores, seconds });
      return { progress: progressOf(m, currentScores(k.answers.db)) };
    },
    async exportResults({ reader }) {
      const k = kitOf(reader);
      return { file: writeResultsBundle(k.dir, k.answers.db, k.manifest, k.integrity) };
    },
    close() {
      for (const k of open.values()) k.answers.close();
      open.clear();
    },
  };
  return api;
}
