/**
 * The one API of Veil. Hosts (main/) adapt it to a transport and add nothing.
 * The reading-room operations touch only kits and the reader's own answer database, never the
 * workspace: a reader's session cannot reach the key.
 */
import { join, resolve } from 'node:path';
import { ApiError, OPERATIONS, type AppInfo, type KitView, type ReaderEntry, type SubmitRequest, type SubmitResult, type VeilApi } from './api-contract.ts';
import { findKits, isKitFolder, loadKitManifest, readViewPixels } from './blinding/kit-read.ts';
import { ANSWERS_FILE, KIT_MANIFEST, type KitManifest } from './blinding/kit-format.ts';
import { checkFileBytes, KitIntegrityError, verifyKitIntegrity, type KitIntegrity } from './blinding/kit-integrity.ts';
import { writeResultsBundle } from './blinding/bundle-export.ts';
import { existsSync, readFileSync } from 'node:fs';
import {
  completedSessions, currentComments, currentScores, lastDisplayCheck, openReaderAnswers, recordDisplayCheck,
  recordSubmission, submittedItems,
} from './store/reader-answers.ts';
import { checkSubmission, progressOf, sessionStates, type StoredState } from './store/reading-state.ts';
import { readWashoutOverrides } from './blinding/washout-override.ts';
import type { OpenedDatabase } from './store/open.ts';
import { RESEARCH_NOTICE, VEIL_VERSION } from './notice.ts';
import { coordinatorOps } from './coordinator-ops.ts';
import { analysisOps } from './analysis-ops.ts';

export { OPERATIONS };
export type { VeilApi };

interface OpenKit { dir: string; manifest: KitManifest; integrity: KitIntegrity; answers: OpenedDatabase }

export interface ApiHandle extends VeilApi {
  close(): void;
}

function storedState(k: OpenKit): StoredState {
  const db = k.answers.db;
  return {
    submitted: submittedItems(db), scores: currentScores(db), comments: currentComments(db), completed: completedSessions(db),
    overrides: readWashoutOverrides(k.dir, k.integrity),
  };
}

export interface ApiOptions {
  /** The clock that judges washout locks (tests set it; the host uses the system clock). */
  now?: () => Date;
}

/** `root` is a study folder (with kits/) or a single kit folder. */
export function createApi(root: string, opts: ApiOptions = {}): ApiHandle {
  const clock = opts.now ?? (() => new Date());
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
    ...coordinatorOps(dir, mode),
    ...analysisOps(dir, mode),
    async agreement(req = {}) {
      // Unblinded statistics: a study folder's workspace only, opened read-only; a kit holds no key.
      if (mode === 'kit') throw new ApiError('agreement needs the study folder: a reading kit holds no key and no collected answers', 403);
      const { openWorkspace, unblindedRatings, workspacePath } = await import('./store/workspace.ts');
      const { agreementReport } = await import('./stats/agreement.ts');
      if (!existsSync(workspacePath(dir))) throw new ApiError(`${dir} holds no workspace.sqlite: build the study first`, 404);
      const ws = openWorkspace(workspacePath(dir), { readonly: true });
      try {
        const questions = ws.db.prepare('SELECT id, points FROM question').all() as { id: string; points: number }[];
        const study = ws.db.prepare('SELECT seed FROM study WHERE id = 1').get() as { seed: number };
        const rows = unblindedRatings(ws.db);
        if (rows.length === 0) throw new ApiError('no answers in the workspace yet: collect results bundles first', 409);
        for (const [key, v] of [['bootstrap', req.bootstrap], ['seed', req.seed]] as const) {
          if (v !== undefined && !(Number.isSafeInteger(v) && v >= 0)) throw new ApiError(`${key} must be a whole number of at least 0, got ${JSON.stringify(v)}`);
        }
        const scales = Object.fromEntries(questions.map((q) => [q.id, { points: q.points }]));
        const report = agreementReport(rows, { question: req.question, method: req.method, scales, bootstrap: req.bootstrap, seed: req.seed ?? study.seed });
        return { ...report, seedFrom: req.seed === undefined ? 'study' : 'request' };
      } finally {
        ws.close();
      }
    },
    async info() {
      const first = loadKitManifest([...kitDirs.values()][0]);
      return { product: 'Veil', version: VEIL_VERSION, notice: RESEARCH_NOTICE, mode, title: first.title };
    },
    async listReaders(): Promise<ReaderEntry[]> {
      return [...kitDirs.keys()].sort().map((reader) => {
        const k = kitOf(reader);
        const p = progressOf(k.manifest, submittedItems(k.answers.db));
        return { reader, items: p.total, answered: p.answered };
      });
    },
    async openKit({ reader }): Promise<KitView> {
      const k = kitOf(reader);
      const st = storedState(k);
      const m = k.manifest;
      const now = clock();
      const flags = [...st.submitted].filter(([, r]) => r.flag).map(([id, r]) => [id, r.flag!]);
      return {
        kitId: m.kitId, reader: m.reader, title: m.title, sessions: m.sessions, washoutDays: m.washoutDays,
        revisits: m.revisits, presets: m.presets,
        questions: m.questions.map(({ id, text, type, points, low, high, labels, required, comment }) => ({ id, text, type, points, low, high, labels, required, comment })),
        items: m.items.map(({ id, session, views, calibration }) => ({
          id, session, views: views.map(({ columns, rows, slices, spacing, window }) => ({ columns, rows, slices, spacing, window })),
          ...(calibration ? { calibration } : {}),
        })),
        answers: Object.fromEntries(st.scores),
        comments: Object.fromEntries(st.comments),
        flags: Object.fromEntries(flags),
        submitted: [...st.submitted.keys()],
        sessionStates: sessionStates(m, st.submitted, st.completed, now, st.overrides),
        displayCheck: lastDisplayCheck(k.answers.db),
        now: now.toISOString(),
        progress: progressOf(m, st.submitted),
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
    async submitAnswer(req: SubmitRequest): Promise<SubmitResult> {
      const k = kitOf(req.reader);
      const now = clock();
      const c = checkSubmission(k.manifest, req, storedState(k), now);
      if (!c.unchanged) {
        recordSubmission(k.answers.db, {
          itemId: req.itemId, scores: c.scores, comments: c.comments, flag: c.flag, seconds: c.seconds, endsSession: c.endsSession, now,
        });
      }
      const after = storedState(k);
      return { progress: progressOf(k.manifest, after.submitted), sessionStates: sessionStates(k.manifest, after.submitted, after.completed, now, after.overrides) };
    },
    async confirmDisplayCheck({ reader, seen }) {
      if (typeof seen !== 'boolean') throw new ApiError('seen must be true or false');
      const k = kitOf(reader);
      return { at: recordDisplayCheck(k.answers.db, seen, clock()) };
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
