/**
 * Percentile bootstrap over cases (subjects), seeded.
 *
 * Efron, B., & Tibshirani, R. J. (1993). An Introduction to the Bootstrap. Chapman & Hall,
 * ch. 13 (the percentile interval).
 *
 * Each resample draws n subjects with replacement from the n subjects of a group. A statistic is
 * then computed with subject i counted w_i times, where w_i is how often i was drawn
 * (Σ w_i = n); the statistics modules take such multiplicities directly, so no resampled copy of
 * the data is ever built. The 95% interval is [q_0.025, q_0.975] of the resampled values, with
 * the quantile of Hyndman & Fan's type 7 (linear interpolation, R's default). Resamples where a
 * statistic is undefined (NaN; e.g. every resampled rating in one category) are left out of its
 * interval, and the count of those used is reported.
 *
 * Draws come from an MT19937 stream (app/blinding/streams.ts), so the same seed and data give
 * the same interval on every machine (drawMultiplicities says how a draw is made).
 */
import type { MT19937 } from '../blinding/mt19937.ts';

/** Resamples and seed of the agreement intervals unless the user says otherwise. */
export const DEFAULT_BOOTSTRAP_RESAMPLES = 2000;
export const DEFAULT_BOOTSTRAP_SEED = 1;

export interface BootstrapInterval {
  ci95: [number, number] | null;
  /** Resamples in which the statistic was defined. */
  used: number;
}

/**
 * Runs `resamples` case resamples of `subjects` subjects. For each, `evaluate` receives the
 * multiplicities and writes its `statistics` values into `out`. Returns, per statistic, the
 * resampled values. With `classOf` (subject → class, e.g. subjects with equal category counts,
 * ./rating-matrix.ts distinctPatterns) the multiplicities are summed per class, so `evaluate`
 * works on `classes` entries instead of `subjects`.
 */
export function caseBootstrap(
  subjects: number,
  resamples: number,
  statistics: number,
  rng: MT19937,
  evaluate: (weights: Uint32Array, out: Float64Array) => void,
  classOf?: Int32Array,
  classes = subjects,
): Float64Array[] {
  const samples = Array.from({ length: statistics }, () => new Float64Array(resamples));
  const weights = new Uint32Array(classOf ? classes : subjects);
  const identity = classOf ?? Int32Array.from({ length: subjects }, (_, i) => i);
  const out = new Float64Array(statistics);
  for (let b = 0; b < resamples; b++) {
    weights.fill(0);
    drawMultiplicities(rng, subjects, identity, weights);
    out.fill(Number.NaN);
    evaluate(weights, out);
    for (let k = 0; k < statistics; k++) samples[k][b] = out[k];
  }
  return samples;
}

/**
 * Draws n indices uniformly from 0..n-1 and adds one to `weights[classOf[index]]` for each.
 *
 * A draw uses b = ⌈log2 n⌉ + 1 bits of a 32-bit output of the generator, so one output gives
 * ⌊32 / b⌋ draws (3 for n = 500, 2 for n = 2000); a chunk is accepted only below the largest
 * multiple of n that fits in b bits (rejection, so every index is exactly equally likely; fewer
 * than a quarter of the chunks are rejected). Chunks are taken from the high bits down.
 */
export function drawMultiplicities(rng: MT19937, n: number, classOf: ArrayLike<number>, weights: Uint32Array): void {
  const bits = Math.ceil(Math.log2(n)) + 1;
  if (bits > 31) {
    for (let i = 0; i < n; i++) weights[classOf[rng.nextBelow(n)]] += 1;
    return;
  }
  const per = Math.floor(32 / bits);
  const span = 2 ** bits;
  const limit = span - (span % n);
  const mask = span - 1;
  let drawn = 0;
  while (drawn < n) {
    const x = rng.nextUint32();
    for (let c = 1; c <= per && drawn < n; c++) {
      const chunk = (x >>> (32 - c * bits)) & mask;
      if (chunk < limit) {
        weights[classOf[chunk % n]] += 1;
        drawn++;
      }
    }
  }
}

/** Type 7 quantile of ascending `sorted` values, 0 ≤ p ≤ 1. */
export function quantileSorted(sorted: Float64Array, p: number): number {
  const pos = p * (sorted.length - 1);
  const lo = Math.floor(pos);
  const hi = Math.min(sorted.length - 1, lo + 1);
  return sorted[lo] + (sorted[hi] - sorted[lo]) * (pos - lo);
}

/** Percentile 95% interval of resampled values, NaN left out; null when fewer than 2 remain. */
export function percentileInterval(samples: Float64Array): BootstrapInterval {
  const defined = samples.filter((v) => !Number.isNaN(v)).sort();
  if (defined.length < 2) return { ci95: null, used: defined.length };
  return { ci95: [quantileSorted(defined, 0.025), quantileSorted(defined, 0.975)], used: defined.length };
}
