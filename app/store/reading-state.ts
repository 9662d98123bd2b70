/**
 * The rules of the reading room, from the kit manifest and what the reader database holds:
 * progress, the state of each session (complete, locked by washout, open), and whether a
 * submission may be saved. Pure functions; app/api.ts applies them.
 *
 * Sessions are read in order. Session s opens when session s-1 is complete and its washout has
 * passed: `washoutDays` × 24 h after the moment its last item was saved. The answers of a
 * complete session are final, so revisits never reach across a washout.
 */
import { ApiError, type FlagReason, type ItemFlag, type Progress, type SessionState, type SubmitRequest } from '../api-contract.ts';
import type { KitManifest, KitQuestion } from '../blinding/kit-format.ts';
import type { ItemRecord } from './reader-answers.ts';

const DAY_MS = 24 * 60 * 60 * 1000;
export const FLAG_REASONS: readonly FlagReason[] = ['does-not-load', 'unrelated-artifact', 'other'];
export const MAX_COMMENT = 2000;

export function progressOf(manifest: KitManifest, submitted: Map<string, ItemRecord>): Progress {
  let answered = 0;
  let next: number | null = null;
  manifest.items.forEach((it, i) => {
    if (submitted.has(it.id)) answered++;
    else if (next === null) next = i;
  });
  return { answered, total: manifest.items.length, next };
}

export function sessionStates(
  manifest: KitManifest, submitted: Map<string, ItemRecord>, completed: Map<number, string>, now: Date, overrides: Set<number> = new Set(),
): SessionState[] {
  const out: SessionState[] = [];
  for (let s = 1; s <= manifest.sessions; s++) {
    const items = manifest.items.filter((i) => i.session === s);
    const before = out[s - 2];
    const opensAt = before?.completedAt ? new Date(Date.parse(before.completedAt) + manifest.washoutDays * DAY_MS).toISOString() : null;
    const completedAt = completed.get(s) ?? null;
    const washedOut = !!opensAt && (now.getTime() >= Date.parse(opensAt) || overrides.has(s));
    const open = !completedAt && (s === 1 || washedOut);
    out.push({ session: s, items: items.length, answered: items.filter((i) => submitted.has(i.id)).length, completedAt, opensAt, open });
  }
  return out;
}

function scoreRange(q: KitQuestion): string {
  return q.type === 'yes-no' ? '1 (no) or 2 (yes)' : `a whole number from 1 to ${q.points}`;
}

function sameRecord<T>(a: Record<string, T>, b: Record<string, T>): boolean {
  const keys = new Set([...Object.keys(a), ...Object.keys(b)]);
  return [...keys].every((k) => a[k] === b[k]);
}

export interface CheckedSubmission {
  scores: Record<string, number>;
  comments: Record<string, string>;
  flag: ItemFlag | null;
  seconds: number | null;
  /** The same as what is stored already: nothing to write (a retry after a lost reply). */
  unchanged: boolean;
  /** The session this submission completes, if it does. */
  endsSession: number | null;
}

export interface StoredState {
  submitted: Map<string, ItemRecord>;
  scores: Map<string, Record<string, number>>;
  comments: Map<string, Record<string, string>>;
  completed: Map<number, string>;
  /** Sessions whose washout the coordinator lifted (signed override files in the kit). */
  overrides?: Set<number>;
}

/** Validates a submission against the kit and the stored answers; throws ApiError naming the field. */
export function checkSubmission(m: KitManifest, req: SubmitRequest, stored: StoredState, now: Date): CheckedSubmission {
  const item = m.items.find((i) => i.id === req.itemId);
  if (!item) throw new ApiError(`kit of reader '${req.reader}' has no item '${req.itemId}'`, 404);

  const flag = req.flag ?? null;
  if (flag) {
    if (!FLAG_REASONS.includes(flag.reason)) throw new ApiError(`flag reason must be one of: ${FLAG_REASONS.join(', ')}; got ${JSON.stringify(flag.reason)}`);
    if (typeof flag.note !== 'string' || flag.note.length > MAX_COMMENT) throw new ApiError(`flag note must be text of at most ${MAX_COMMENT} characters`);
    if (flag.reason === 'other' && !flag.note.trim()) throw new ApiError("a flag with reason 'other' needs a note saying why");
  }
  const scores = req.scores ?? {};
  const comments = req.comments ?? {};
  const questionIds = m.questions.map((q) => q.id).join(', ');
  for (const key of Object.keys(scores)) {
    if (!m.questions.some((q) => q.id === key)) throw new ApiError(`unknown question '${key}'; questions: ${questionIds}`);
  }
  for (const [key, text] of Object.entries(comments)) {
    const q = m.questions.find((x) => x.id === key);
    if (!q) throw new ApiError(`comment on unknown question '${key}'; questions: ${questionIds}`);
    if (!q.comment) throw new ApiError(`question '${key}' takes no comment`);
    if (typeof text !== 'string' || text.length > MAX_COMMENT) throw new ApiError(`comment on '${key}' must be text of at most ${MAX_COMMENT} characters`);
  }
  const unloadable = flag?.reason === 'does-not-load';
  for (const q of m.questions) {
    const s = scores[q.id];
    if (s == null) {
      if (q.required && !unloadable) throw new ApiError(`question '${q.id}' has no score; it is required`);
      continue;
    }
    if (!Number.isInteger(s) || s < 1 || s > q.points) throw new ApiError(`question '${q.id}': score must be ${scoreRange(q)}, got ${JSON.stringify(s)}`);
  }
  const seconds = req.seconds == null ? null : Number(req.seconds);
  if (seconds != null && !(seconds >= 0)) throw new ApiError(`seconds must be a non-negative number, got ${JSON.stringify(req.seconds)}`);

  const before = stored.submitted.get(item.id);
  const storedScores = stored.scores.get(item.id) ?? {};
  const storedComments = stored.comments.get(item.id) ?? {};
  // A score, once given, can be changed but not taken back (answers are append-only).
  const kept = { ...storedScores, ...scores };
  const nonEmpty = Object.fromEntries(Object.entries({ ...storedComments, ...comments }).filter(([, t]) => t !== ''));
  const unchanged = !!before && sameRecord(kept, storedScores) && sameRecord(nonEmpty, storedComments) &&
    (before.flag?.reason ?? null) === (flag?.reason ?? null) && (before.flag?.note ?? '') === (flag?.note ?? '');
  const result: CheckedSubmission = { scores, comments, flag, seconds, unchanged, endsSession: null };
  if (unchanged) return result;

  const state = sessionStates(m, stored.submitted, stored.completed, now, stored.overrides)[item.session - 1];
  if (!state) throw new ApiError(`item '${item.id}' is in session ${item.session}, but the kit has ${m.sessions}`, 409);
  if (state.completedAt) throw new ApiError(`session ${item.session} is complete; its answers are final`, 409);
  if (!state.open) {
    throw new ApiError(state.opensAt
      ? `session ${item.session} opens on ${state.opensAt} (washout of ${m.washoutDays} days after session ${item.session - 1})`
      : `session ${item.session} opens after session ${item.session - 1} is complete`, 409);
  }
  if (before && !m.revisits) throw new ApiError(`item '${item.id}' is already saved, and this kit does not allow changing answers`, 409);
  const sessionItems = m.items.filter((i) => i.session === item.session);
  if (sessionItems.every((i) => i.id === item.id || stored.submitted.has(i.id))) result.endsSession = item.session;
  return result;
}
