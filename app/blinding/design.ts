/**
 * The reading design: which items each reader reads, in which session and in which order.
 * Everything follows from the study seed through named MT19937 streams (./streams.ts), so a third
 * party can rebuild a schedule from the seed, the reader codes, the case ids and the method ids.
 *
 * Units: with single presentation a unit is one method of a case (U = M units per case); with
 * side-by-side presentation a unit is one unordered pair of methods of a case (U = M(M-1)/2).
 *
 * 1. Cases are shuffled per reader (stream "design-cases:<reader>"); call i the case's place.
 * 2. Unit j of case i for reader r goes to session ((j + i + r) mod S) + 1: a Latin-square
 *    rotation, so each method's session is counterbalanced across cases and readers. When S >= U
 *    the units of one case land in different sessions, so a case appears at most once a session.
 * 3. Within a session the items of each case are dealt into rounds (the k-th item of every case in
 *    round k, each case's items rotated by the case's place so no method always comes first), each
 *    round shuffled (stream "design-order:<reader>"); a round boundary that would
 *    put two items of one case next to each other is repaired by a swap. Items of a case are thus
 *    about one round (the number of cases) apart and never adjacent when the session holds more
 *    than one case.
 * 4. Side-by-side: for every method pair, which method is on the left is balanced per reader:
 *    over the cases (shuffled, stream "design-sides:<reader>:<pair>") half have the first method
 *    left and half the second, the odd one out decided by the stream.
 * 5. Opaque item ids come from their own stream ("item-ids"), in reading order, so they say
 *    nothing about case or method.
 */
import { shuffleInPlace } from './mt19937.ts';
import { drawOpaqueIds, streamFor } from './streams.ts';

export type Presentation = 'single' | 'side-by-side';

export interface ScheduledItem {
  itemId: string;
  reader: string;
  caseId: string;
  /** The method shown (single) or shown on the left (side-by-side). */
  methodId: string;
  /** The method shown on the right (side-by-side only). */
  rightMethodId?: string;
  /** 1-based. */
  session: number;
  /** 0-based position in the reader's whole reading order (sessions in order). */
  position: number;
}

interface Unit { caseId: string; methods: string[] }

function unitsPerCase(methods: string[], presentation: Presentation): string[][] {
  if (presentation === 'single') return methods.map((m) => [m]);
  const pairs: string[][] = [];
  for (let a = 0; a < methods.length; a++) for (let b = a + 1; b < methods.length; b++) pairs.push([methods[a], methods[b]]);
  return pairs;
}

/** Orders one session's units: rounds of distinct cases, shuffled, never two of a case adjacent. */
function orderSession(units: Unit[], rng: ReturnType<typeof streamFor>): Unit[] {
  const byCase = new Map<string, Unit[]>();
  for (const u of units) byCase.set(u.caseId, [...(byCase.get(u.caseId) ?? []), u]);
  const rounds: Unit[][] = [];
  // Rotate each case's units by the case's place, so no method is always dealt into the first round.
  [...byCase.values()].forEach((list, c) => {
    const shift = c % list.length;
    [...list.slice(shift), ...list.slice(0, shift)].forEach((u, k) => { (rounds[k] ??= []).push(u); });
  });
  const out: Unit[] = [];
  for (const round of rounds) {
    shuffleInPlace(round, rng);
    const last = out.at(-1);
    if (last && round.length > 1 && round[0].caseId === last.caseId) {
      const swap = 1 + rng.nextBelow(round.length - 1);
      [round[0], round[swap]] = [round[swap], round[0]];
    }
    out.push(...round);
  }
  return out;
}

export function readingSchedule(
  seed: number, readers: string[], cases: string[], methods: string[], sessions: number, presentation: Presentation = 'single',
): ScheduledItem[] {
  const unitTemplates = unitsPerCase(methods, presentation);
  const perReader = cases.length * unitTemplates.length;
  const ids = drawOpaqueIds(seed, 'item-ids', perReader * readers.length);
  const out: ScheduledItem[] = [];
  readers.forEach((reader, r) => {
    const caseOrder = shuffleInPlace([...cases], streamFor(seed, 'design-cases', reader));
    const bySession: Unit[][] = Array.from({ length: sessions }, () => []);
    caseOrder.forEach((caseId, i) => {
      unitTemplates.forEach((unitMethods, j) => {
        bySession[(j + i + r) % sessions].push({ caseId, methods: [...unitMethods] });
      });
    });
    if (presentation === 'side-by-side') {
      for (const [a, b] of unitTemplates) {
        const sides = streamFor(seed, 'design-sides', `${reader}:${a}:${b}`);
        const pairCases = shuffleInPlace([...cases], sides);
        const firstLeft = new Set(pairCases.slice(0, Math.floor(pairCases.length / 2) + (pairCases.length % 2 ? sides.nextBelow(2) : 0)));
        for (const s of bySession) for (const u of s) {
          if (u.methods[0] === a && u.methods[1] === b && !firstLeft.has(u.caseId)) u.methods.reverse();
        }
      }
    }
    const orderRng = streamFor(seed, 'design-order', reader);
    let position = 0;
    bySession.forEach((units, s) => {
      for (const u of orderSession(units, orderRng)) {
        out.push({
          itemId: ids[r * perReader + position], reader, caseId: u.caseId, methodId: u.methods[0],
          ...(u.methods[1] ? { rightMethodId: u.methods[1] } : {}),
          session: s + 1, position: position++,
        });
      }
    });
  });
  return out;
}

export interface DesignSummary {
  seed: number;
  generator: string;
  presentation: Presentation;
  /** Items per reader and session: perSession[reader][session - 1]. */
  perSession: Record<string, number[]>;
  /** How often each method is shown in each session, over all readers: methodsBySession[method][session - 1]. */
  methodsBySession: Record<string, number[]>;
  /** Mean relative position (0 = first, 1 = last in its session) of each method, over all readers. */
  meanPosition: Record<string, number>;
  /** Side-by-side only: how often each method is on the left, over all readers. */
  leftCount?: Record<string, number>;
  /** Smallest distance between two items of one case within a session (Infinity when none share one). */
  minSameCaseGap: number;
}

export function summarizeDesign(items: ScheduledItem[], seed: number, generator: string, sessions: number, presentation: Presentation): DesignSummary {
  const perSession: Record<string, number[]> = {};
  const methodsBySession: Record<string, number[]> = {};
  const posSum: Record<string, { sum: number; n: number }> = {};
  const leftCount: Record<string, number> = {};
  let minGap = Infinity;
  const sessionSize = new Map<string, number>();
  for (const it of items) sessionSize.set(`${it.reader}/${it.session}`, (sessionSize.get(`${it.reader}/${it.session}`) ?? 0) + 1);
  const firstPos = new Map<string, number>();
  for (const it of items) {
    const k = `${it.reader}/${it.session}`;
    firstPos.set(k, Math.min(firstPos.get(k) ?? Infinity, it.position));
  }
  const lastOfCase = new Map<string, number>();
  for (const it of [...items].sort((a, b) => a.position - b.position)) {
    (perSession[it.reader] ??= Array(sessions).fill(0))[it.session - 1]++;
    const key = `${it.reader}/${it.session}`;
    const size = sessionSize.get(key)!;
    const rel = size > 1 ? (it.position - firstPos.get(key)!) / (size - 1) : 0;
    for (const m of [it.methodId, ...(it.rightMethodId ? [it.rightMethodId] : [])]) {
      (methodsBySession[m] ??= Array(sessions).fill(0))[it.session - 1]++;
      const p = (posSum[m] ??= { sum: 0, n: 0 });
      p.sum += rel;
      p.n++;
    }
    if (it.rightMethodId) leftCount[it.methodId] = (leftCount[it.methodId] ?? 0) + 1;
    const caseKey = `${it.reader}/${it.session}/${it.caseId}`;
    const prev = lastOfCase.get(caseKey);
    if (prev !== undefined) minGap = Math.min(minGap, it.position - prev);
    lastOfCase.set(caseKey, it.position);
  }
  return {
    seed, generator, presentation, perSession, methodsBySession,
    meanPosition: Object.fromEntries(Object.entries(posSum).map(([m, p]) => [m, Math.round((p.sum / p.n) * 1000) / 1000])),
    ...(presentation === 'side-by-side' ? { leftCount } : {}),
    minSameCaseGap: minGap,
  };
}
