/**
 * Metric–score linkage: how well each objective image metric tracks what the readers scored.
 *
 * Per question, with the reader-mean score of each item (case × method) and the item's metric value:
 * - Spearman's ρ and Kendall's τ_b between metric and reader-mean score over all items
 *   (./rank-correlation.ts), signed as computed (NRMSE and HFEN fall as quality rises, so a metric
 *   that tracks the readers has a negative ρ there);
 * - within-case concordance: for each case, over the pairs of its methods that the readers' means
 *   order (equal means are left out), the share the metric orders the same way, counting the
 *   metric's better direction (higher PSNR and SSIM, lower NRMSE and HFEN) and a metric tie as one
 *   half; then the mean of those shares over the cases that have such a pair. Comparing methods
 *   within a case removes what the cases differ in (anatomy, signal level), which moves metrics and
 *   scores together across cases without saying anything about the methods. 0.5 is chance, 1 full
 *   agreement. This is the pairwise concordance of Kendall's τ taken within cases (common practice
 *   in image-quality studies; Veil's definition);
 * - the same three statistics with each reader's own scores in place of the mean;
 * - a ranking of the metrics by the chosen statistic (default: within-case concordance; the
 *   correlations count in the metric's better direction), with 95% intervals of each statistic and
 *   of each metric's rank.
 * Intervals: percentile bootstrap over cases (app/stats/bootstrap.ts: cases drawn with replacement,
 * all items of a drawn case go along), seeded per question from the study seed through
 * app/blinding/streams.ts (purpose "metric-linkage"), so the numbers repeat exactly.
 *
 * Items without a finite metric value (not computed; the +∞ PSNR of an image identical to its
 * reference) are left out of that metric's statistics.
 *
 * Pure functions: tidy ratings and a metric table in, a JSON-safe report out.
 */
import { streamFor } from '../blinding/streams.ts';
import type { TidyRow } from '../report/tidy-csv.ts';
import { caseBootstrap, percentileInterval } from '../stats/bootstrap.ts';
import type { VolumeMetrics } from './compare-volumes.ts';
import { RankPairs } from './rank-correlation.ts';

export interface MetricSpec {
  /** Key in the metric table. */
  id: string;
  /** True when a larger value means a better image (PSNR, SSIM); false for errors (NRMSE, HFEN). */
  higherIsBetter: boolean;
}

/** The four image metrics, plain and over the foreground mask. */
export const IMAGE_METRIC_SPECS: readonly MetricSpec[] = [
  { id: 'psnr', higherIsBetter: true },
  { id: 'ssim', higherIsBetter: true },
  { id: 'nrmse', higherIsBetter: false },
  { id: 'hfen', higherIsBetter: false },
  { id: 'masked_psnr', higherIsBetter: true },
  { id: 'masked_ssim', higherIsBetter: true },
  { id: 'masked_nrmse', higherIsBetter: false },
  { id: 'masked_hfen', higherIsBetter: false },
];

/** One row per (case, method): the metric values of that item (null or missing where not computed). */
export interface MetricRow {
  case: string;
  method: string;
  values: Record<string, number | null | undefined>;
}

/** The metric-table row of one item from its comparison with the reference (keys of IMAGE_METRIC_SPECS). */
export function metricRow(caseId: string, method: string, m: VolumeMetrics): MetricRow {
  const values: MetricRow['values'] = { psnr: m.psnr, ssim: m.ssim, nrmse: m.nrmse, hfen: m.hfen };
  if (m.masked) Object.assign(values, { masked_psnr: m.masked.psnr, masked_ssim: m.masked.ssim, masked_nrmse: m.masked.nrmse, masked_hfen: m.masked.hfen });
  return { case: caseId, method, values };
}

export type LinkageStatistic = 'concordance' | 'kendall' | 'spearman';

export interface LinkageOptions {
  /** The study seed; the bootstrap of each question draws from its own stream. */
  seed: number;
  /** Bootstrap resamples over cases (default 2000; 0 for no intervals). */
  resamples?: number;
  /** Metrics to link; default: those of IMAGE_METRIC_SPECS present in the table. */
  metrics?: readonly MetricSpec[];
  /** Statistic that ranks the metrics (default 'concordance'). */
  rankBy?: LinkageStatistic;
  /** Only these questions (default: every question in the ratings). */
  questions?: readonly string[];
}

export interface Estimate {
  /** Null where undefined (a constant variable, no usable pair). */
  value: number | null;
  /** 95% percentile bootstrap interval over cases; null without resamples or when undefined. */
  ci95: [number, number] | null;
}

export interface TrackingStatistics {
  /** Items with both a score and a metric value. */
  items: number;
  spearman: Estimate;
  kendall: Estimate;
  /** Within-case concordance; `cases` counts the cases with at least one ordered pair. */
  concordance: Estimate & { cases: number; pairs: number };
}

export interface MetricLinkage extends TrackingStatistics {
  metric: string;
  higherIsBetter: boolean;
  /** 1 = tracks the readers best, by `rankBy`. */
  rank: number;
  /** 95% interval of the rank over the bootstrap resamples. */
  rankInterval: [number, number] | null;
  perReader: ({ reader: string } & TrackingStatistics)[];
}

export interface LinkagePoint {
  case: string;
  method: string;
  /** Mean score of the readers who scored this item. */
  score: number;
  readers: number;
  metrics: Record<string, number | null>;
}

export interface QuestionLinkage {
  question: string;
  cases: number;
  items: number;
  readers: string[];
  /** Ordered by rank. */
  metrics: MetricLinkage[];
  /** Reader-mean score and metric values per item: the data of a scatter figure per metric. */
  points: LinkagePoint[];
}

export interface LinkageReport {
  seed: number;
  resamples: number;
  rankBy: LinkageStatistic;
  conventions: string[];
  questions: QuestionLinkage[];
}

export const LINKAGE_STREAM = 'metric-linkage';
const DEFAULT_RESAMPLES = 2000;

const compare = (a: string, b: string): number => (a < b ? -1 : a > b ? 1 : 0);
const finiteOrNull = (v: number): number | null => (Number.isFinite(v) ? v : null);

/** Items of one case: per item the score (mean or one reader's) and the metric values. */
interface CaseItems {
  id: string;
  /** scores[item], metrics[m][item]; NaN where missing. */
  scores: Float64Array;
  readerScores: Float64Array[];
  metrics: Float64Array[];
}

/**
 * Concordance of metric `m` with `scores` inside one case: [concordant credit, ordered pairs].
 * `sign` is +1 when higher metric values are better, −1 otherwise.
 */
function caseConcordance(metric: Float64Array, scores: Float64Array, sign: number): [number, number] {
  let credit = 0;
  let pairs = 0;
  for (let i = 0; i < scores.length; i++) {
    for (let j = i + 1; j < scores.length; j++) {
      const ds = scores[i] - scores[j];
      const dm = sign * (metric[i] - metric[j]);
      if (ds === 0 || Number.isNaN(ds) || Number.isNaN(dm)) continue;
      pairs++;
      if (dm === 0) credit += 0.5;
      else if (dm > 0 === ds > 0) credit += 1;
    }
  }
  return [credit, pairs];
}

/** One metric against one score set, prepared once for the point estimate and every resample. */
interface Track {
  /** (metric, score) of the items that have both. */
  pairs: RankPairs;
  /** Case index of each of those items. */
  caseOf: Int32Array;
  /** Scratch: the multiplicity of each item in a resample. */
  weights: Float64Array;
  /** Per case: concordant credit and ordered pairs (they do not change between resamples). */
  credit: Float64Array;
  ordered: Float64Array;
}

function prepareTrack(cases: CaseItems[], scoresOf: (c: CaseItems) => Float64Array, m: number, sign: number): Track {
  const xs: number[] = [];
  const ys: number[] = [];
  const caseOf: number[] = [];
  const credit = new Float64Array(cases.length);
  const ordered = new Float64Array(cases.length);
  cases.forEach((c, ci) => {
    const scores = scoresOf(c);
    const metric = c.metrics[m];
    for (let i = 0; i < scores.length; i++) {
      if (Number.isNaN(scores[i]) || Number.isNaN(metric[i])) continue;
      xs.push(metric[i]);
      ys.push(scores[i]);
      caseOf.push(ci);
    }
    [credit[ci], ordered[ci]] = caseConcordance(metric, scores, sign);
  });
  return { pairs: new RankPairs(xs, ys), caseOf: Int32Array.from(caseOf), weights: new Float64Array(xs.length), credit, ordered };
}

/** ρ, τ_b and concordance of a prepared track, case c counted `caseWeights[c]` times. */
function evaluateTrack(t: Track, caseWeights: ArrayLike<number>): { items: number; rho: number; tau: number; conc: number; concCases: number; pairs: number } {
  let items = 0;
  for (let i = 0; i < t.weights.length; i++) {
    t.weights[i] = caseWeights[t.caseOf[i]];
    items += t.weights[i];
  }
  let shareSum = 0;
  let shareCases = 0;
  let pairs = 0;
  for (let c = 0; c < t.credit.length; c++) {
    const w = caseWeights[c];
    if (w === 0 || t.ordered[c] === 0) continue;
    shareSum += (w * t.credit[c]) / t.ordered[c];
    shareCases += w;
    pairs += w * t.ordered[c];
  }
  return {
    items,
    rho: t.pairs.spearman(t.weights),
    tau: t.pairs.kendallTauB(t.weights),
    conc: shareCases > 0 ? shareSum / shareCases : Number.NaN,
    concCases: shareCases,
    pairs,
  };
}

/** Ranks (1 = best) of `values`, largest first; ties share the better rank; NaN ranks last. */
function descendingRanks(values: number[]): number[] {
  const defined = values.filter((v) => !Number.isNaN(v));
  return values.map((v) => (Number.isNaN(v) ? defined.length + 1 : 1 + defined.filter((u) => u > v).length));
}

export function metricScoreLinkage(ratings: readonly TidyRow[], table: readonly MetricRow[], options: LinkageOptions): LinkageReport {
  const resamples = options.resamples ?? DEFAULT_RESAMPLES;
  const rankBy = options.rankBy ?? 'concordance';
  const present = new Set(table.flatMap((r) => Object.keys(r.values)));
  const specs = options.metrics ?? IMAGE_METRIC_SPECS.filter((s) => present.has(s.id));
  const metricIndex = new Map<string, Record<string, number | null | undefined>>();
  for (const row of table) metricIndex.set(JSON.stringify([row.case, row.method]), row.values);

  const questions = options.questions ?? [...new Set(ratings.map((r) => r.question))].sort(compare);
  const out: QuestionLinkage[] = [];
  for (const question of questions) {
    const rows = ratings.filter((r) => r.question === question);
    const readers = [...new Set(rows.map((r) => r.reader))].sort(compare);
    const caseIds = [...new Set(rows.map((r) => r.case))].sort(compare);
    const points: LinkagePoint[] = [];
    const cases: CaseItems[] = caseIds.map((id) => {
      const caseRows = rows.filter((r) => r.case === id);
      const methods = [...new Set(caseRows.map((r) => r.method))].sort(compare);
      const scores = new Float64Array(methods.length);
      const readerScores = readers.map(() => new Float64Array(methods.length).fill(Number.NaN));
      const metrics = specs.map(() => new Float64Array(methods.length).fill(Number.NaN));
      methods.forEach((method, i) => {
        const itemRows = caseRows.filter((r) => r.method === method);
        scores[i] = itemRows.reduce((s, r) => s + r.score, 0) / itemRows.length;
        for (const r of itemRows) readerScores[readers.indexOf(r.reader)][i] = r.score;
        const values = metricIndex.get(JSON.stringify([id, method])) ?? {};
        specs.forEach((s, m) => {
          const v = values[s.id];
          if (typeof v === 'number' && Number.isFinite(v)) metrics[m][i] = v;
        });
        points.push({
          case: id,
          method,
          score: scores[i],
          readers: itemRows.length,
          metrics: Object.fromEntries(specs.map((s, m) => [s.id, finiteOrNull(metrics[m][i])])),
        });
      });
      return { id, scores, readerScores, metrics };
    });

    const scoreSets: ((c: CaseItems) => Float64Array)[] = [(c) => c.scores, ...readers.map((_, k) => (c: CaseItems) => c.readerScores[k])];
    const primary = (t: { rho: number; tau: number; conc: number }, sign: number): number =>
      rankBy === 'concordance' ? t.conc : sign * (rankBy === 'kendall' ? t.tau : t.rho);

    // The statistics of one (re)sample: per metric and score set ρ, τ, concordance; then per metric its rank.
    const tracks = specs.map((s, m) => scoreSets.map((scoresOf) => prepareTrack(cases, scoresOf, m, s.higherIsBetter ? 1 : -1)));
    const perSet = 3;
    const width = specs.length * scoreSets.length * perSet + specs.length;
    const evaluate = (weights: ArrayLike<number>, into: Float64Array): void => {
      const key: number[] = [];
      specs.forEach((s, m) => {
        const sign = s.higherIsBetter ? 1 : -1;
        scoreSets.forEach((_, k) => {
          const t = evaluateTrack(tracks[m][k], weights);
          const at = (m * scoreSets.length + k) * perSet;
          into[at] = t.rho;
          into[at + 1] = t.tau;
          into[at + 2] = t.conc;
          if (k === 0) key.push(primary(t, sign));
        });
      });
      descendingRanks(key).forEach((r, m) => (into[specs.length * scoreSets.length * perSet + m] = r));
    };

    const point = new Float64Array(width);
    const ones = new Uint32Array(cases.length).fill(1);
    evaluate(ones, point);
    const samples =
      resamples > 0 && cases.length > 0
        ? caseBootstrap(cases.length, resamples, width, streamFor(options.seed, LINKAGE_STREAM, question), evaluate)
        : null;
    const estimate = (at: number): Estimate => ({
      value: finiteOrNull(point[at]),
      ci95: samples && Number.isFinite(point[at]) ? percentileInterval(samples[at]).ci95 : null,
    });

    const metrics: MetricLinkage[] = specs.map((s, m) => {
      const stats = scoreSets.map((_, k): TrackingStatistics => {
        const t = evaluateTrack(tracks[m][k], ones);
        const at = (m * scoreSets.length + k) * perSet;
        return {
          items: t.items,
          spearman: estimate(at),
          kendall: estimate(at + 1),
          concordance: { ...estimate(at + 2), cases: t.concCases, pairs: t.pairs },
        };
      });
      const rankAt = specs.length * scoreSets.length * perSet + m;
      return {
        metric: s.id,
        higherIsBetter: s.higherIsBetter,
        rank: point[rankAt],
        rankInterval: samples ? percentileInterval(samples[rankAt]).ci95 : null,
        ...stats[0],
        perReader: readers.map((reader, k) => ({ reader, ...stats[k + 1] })),
      };
    });
    metrics.sort((a, b) => a.rank - b.rank || compare(a.metric, b.metric));
    out.push({ question, cases: cases.length, items: points.length, readers, metrics, points });
  }
  return { seed: options.seed, resamples, rankBy, conventions: linkageConventions(resamples, rankBy), questions: out };
}

export function linkageConventions(resamples: number, rankBy: LinkageStatistic): string[] {
  const by = { concordance: 'within-case concordance', kendall: "Kendall's tau-b", spearman: "Spearman's rho" }[rankBy];
  return [
    "Item score: the mean of the readers' scores of that case and method; each reader's own scores give the per-reader statistics.",
    "Spearman's rho (average ranks for ties) and Kendall's tau-b between metric and score over all items, signed as computed: " +
      'for NRMSE and HFEN, lower is better, so tracking shows as a negative correlation.',
    "Within-case concordance: per case, the share of method pairs with different reader scores that the metric orders the same way " +
      "(in the metric's better direction; a metric tie counts one half), averaged over cases; 0.5 is chance.",
    `Ranking by ${by}${rankBy === 'concordance' ? '' : " in the metric's better direction"}; 1 tracks the readers best.`,
    resamples > 0
      ? `95% intervals: percentile bootstrap over cases, ${resamples} resamples, seeded from the study seed (MT19937 stream "${LINKAGE_STREAM}:<question>").`
      : 'No intervals (no bootstrap resamples).',
  ];
}
