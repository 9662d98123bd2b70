/**
 * Method comparison per question, from tidy ratings: descriptive statistics, paired tests on the
 * reader-averaged per-case scores, Friedman's test, MRMC intervals (Obuchowski–Rockette–Hillis and
 * a two-way bootstrap), non-inferiority against the standard, and reading times. Each method is
 * its own module in this folder with its formula and reference; this file only arranges the data.
 *
 * Pairs: every pair of methods, oriented "other − standard" when one of them is the standard
 * (`compareTo`), else in the order of `methods`. Holm's correction is applied per question over
 * all pairs, and separately over the pairs against the standard.
 * Output is JSON-safe: numbers are finite or null, and `notes` say why something is missing.
 */
import { streamFor } from '../../blinding/streams.ts';
import type { TidyRow } from '../../report/tidy-csv.ts';
import { describeScores } from './descriptive.ts';
import { friedmanTest } from './friedman.ts';
import { holmAdjust } from './holm.ts';
import { orDifference, orMrmc } from './or-mrmc.ts';
import { readingTimes, type TimedItem } from './reading-time.ts';
import { twoWayBootstrap } from './two-way-bootstrap.ts';
import { wilcoxonSignedRank } from './wilcoxon.ts';
import type { ComparisonReport, DescriptiveRow, MrmcJson, NonInferiority, PairComparison } from './comparison-types.ts';
export type { ComparisonReport, DescriptiveRow, MrmcJson, NonInferiority, PairComparison };

export const DEFAULT_ACCEPTABLE = 3;
export const DEFAULT_COMPARISON_RESAMPLES = 2000;
export const BOOTSTRAP_STREAM = 'comparison-bootstrap';

export interface ComparisonOptions {
  /** Methods in display order (default: as first seen). */
  methods?: readonly string[];
  /** Points of each question's scale (default: the largest score seen). */
  points?: Record<string, number>;
  acceptable?: number;
  compareTo?: string | null;
  noninferiorityMargin?: number | null;
  seed?: number;
  resamples?: number;
}

const uniq = (xs: readonly string[]): string[] => [...new Set(xs)];
const fin = (v: number | null | undefined): number | null => (v !== null && v !== undefined && Number.isFinite(v) ? v : null);

export function compareMethods(rows: readonly TidyRow[], opts: ComparisonOptions = {}): ComparisonReport {
  const notes: string[] = [];
  const methods = uniq([...(opts.methods ?? []), ...rows.map((r) => r.method)]).filter((m) => rows.some((r) => r.method === m));
  const questions = uniq(rows.map((r) => r.question));
  const acceptable = opts.acceptable ?? DEFAULT_ACCEPTABLE;
  const seed = opts.seed ?? 1;
  const resamples = opts.resamples ?? DEFAULT_COMPARISON_RESAMPLES;
  let compareTo = opts.compareTo ?? null;
  if (compareTo !== null && !methods.includes(compareTo)) {
    notes.push(`analysis.compare_to names "${compareTo}", which has no ratings; methods: ${methods.join(', ')}`);
    compareTo = null;
  }
  const margin = opts.noninferiorityMargin ?? null;
  if (margin !== null && compareTo === null) notes.push('analysis.noninferiority_margin is set but there is no standard (analysis.compare_to): no non-inferiority test');

  const descriptives: DescriptiveRow[] = [];
  const pairs: PairComparison[] = [];
  const friedman: ComparisonReport['friedman'] = [];
  const noninferiority: NonInferiority[] = [];

  for (const q of questions) {
    const qRows = rows.filter((r) => r.question === q);
    const points = opts.points?.[q] ?? Math.max(...qRows.map((r) => r.score));
    const readers = uniq(qRows.map((r) => r.reader)).sort();
    const cases = uniq(qRows.map((r) => r.case));
    // score[method][reader][case]
    const grid = new Map<string, number>();
    for (const r of qRows) grid.set(JSON.stringify([r.method, r.reader, r.case]), r.score);
    const at = (m: string, j: string, k: string): number | undefined => grid.get(JSON.stringify([m, j, k]));
    const caseMean = (m: string, k: string): number | null => {
      const s = readers.map((j) => at(m, j, k)).filter((v): v is number => v !== undefined);
      return s.length ? s.reduce((a, b) => a + b, 0) / s.length : null;
    };

    for (const m of methods) {
      const mRows = qRows.filter((r) => r.method === m);
      if (mRows.length === 0) continue;
      descriptives.push({
        method: m, question: q, readers: uniq(mRows.map((r) => r.reader)).length, cases: uniq(mRows.map((r) => r.case)).length,
        ...describeScores(mRows.map((r) => r.score), points, acceptable),
      });
    }

    // Friedman over cases complete in every method (reader-averaged).
    const qMethods = methods.filter((m) => qRows.some((r) => r.method === m));
    const blocks = cases.map((k) => qMethods.map((m) => caseMean(m, k))).filter((row): row is number[] => row.every((v) => v !== null));
    if (qMethods.length >= 2) friedman.push({ question: q, ...friedmanTest(blocks) });

    const qPairs: PairComparison[] = [];
    for (let x = 0; x < qMethods.length; x++) {
      for (let y = x + 1; y < qMethods.length; y++) {
        let [a, b] = [qMethods[x], qMethods[y]];
        if (a === compareTo) [a, b] = [b, a];
        const vsStandard = b === compareTo;
        const diffs: number[] = [];
        for (const k of cases) {
          const ma = caseMean(a, k);
          const mb = caseMean(b, k);
          if (ma !== null && mb !== null) diffs.push(ma - mb);
        }
        const complete = cases.filter((k) => readers.every((j) => at(a, j, k) !== undefined && at(b, j, k) !== undefined));
        let mrmc: MrmcJson | null = null;
        let bootstrap: PairComparison['bootstrap'] = null;
        if (readers.length >= 2 && complete.length >= 2) {
          const scores = [a, b].map((m) => readers.map((j) => Float64Array.from(complete, (k) => at(m, j, k) as number)));
          const or = orMrmc(scores);
          const d = orDifference(or);
          mrmc = { estimate: d.estimate, se: fin(d.se), df: fin(d.df), ci95: d.ci95, p: fin(d.p), readers: or.readers, cases: or.cases, msTR: or.msTR, covariances: or.covariances };
          if (!d.ci95) notes.push(`${q}: ${a} vs ${b}: no MRMC interval: the readers' mean differences are identical and the case covariances give no reader variability (more readers needed)`);
          const dm = readers.map((_, j) => Float64Array.from(complete, (_, k) => scores[0][j][k] - scores[1][j][k]));
          bootstrap = twoWayBootstrap(dm, resamples, streamFor(seed, BOOTSTRAP_STREAM, JSON.stringify([q, a, b])));
          if (vsStandard && margin !== null) {
            const ni = orDifference(or, margin);
            const lower = d.ci95 ? d.ci95[0] : null;
            noninferiority.push({ question: q, method: a, standard: b, margin, estimate: d.estimate, lower, p: fin(ni.p), noninferior: lower === null ? null : lower > -margin });
          }
        } else if (readers.length < 2) {
          notes.push(`${q}: ${a} vs ${b}: MRMC intervals need at least two readers`);
        } else {
          notes.push(`${q}: ${a} vs ${b}: MRMC intervals need at least two cases scored by every reader under both methods`);
        }
        if (complete.length < cases.length && readers.length >= 2) {
          notes.push(`${q}: ${a} vs ${b}: ${cases.length - complete.length} of ${cases.length} cases lack a reader's score under one of the methods and are left out of the MRMC analysis`);
        }
        qPairs.push({
          question: q, a, b, vsStandard, cases: diffs.length,
          meanDifference: diffs.length ? diffs.reduce((s, v) => s + v, 0) / diffs.length : null,
          wilcoxon: wilcoxonSignedRank(diffs), pHolm: null, pHolmStandard: null, mrmc, bootstrap,
        });
      }
    }
    const all = holmAdjust(qPairs.map((p) => p.wilcoxon.p));
    qPairs.forEach((p, i) => { p.pHolm = all[i]; });
    const std = qPairs.filter((p) => p.vsStandard);
    holmAdjust(std.map((p) => p.wilcoxon.p)).forEach((v, i) => { std[i].pHolmStandard = v; });
    pairs.push(...qPairs);
  }

  // Reading time: once per item (reader, case, method), whatever the number of questions.
  const items = new Map<string, TimedItem>();
  for (const r of rows) {
    const key = JSON.stringify([r.reader, r.case, r.method]);
    if (items.has(key)) continue;
    const seconds = r.seconds === null || r.seconds === undefined || r.seconds === '' ? null : Number(r.seconds);
    items.set(key, { method: r.method, session: Number(r.session ?? 1) || 1, reader: r.reader, case: r.case, seconds: fin(seconds) });
  }
  const readingTime = readingTimes([...items.values()]);
  if (readingTime.every((t) => t.n === 0)) notes.push('no reading times recorded (simulated readers record none)');

  return { methods, questions, acceptable, compareTo, margin, seed, resamples, descriptives, pairs, friedman, noninferiority, readingTime, notes };
}
