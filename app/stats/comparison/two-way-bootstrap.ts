/**
 * Two-way bootstrap of a mean-score difference: readers and cases resampled independently.
 *
 * Beiden, S. V., Wagner, R. F., & Campbell, G. (2000). Components-of-variance models and
 *   multiple-bootstrap experiments: an alternative method for random-effects, receiver operating
 *   characteristic analysis. Academic Radiology, 7(5), 341–349.
 * Efron, B., & Tibshirani, R. J. (1993). An Introduction to the Bootstrap, ch. 13 (percentile interval).
 *
 * With D_jk = score of reader j on case k under method A minus under method B, each resample
 * draws J readers and c cases with replacement (multiplicities u_j, v_k) and computes
 *
 *   D* = Σ_j Σ_k u_j v_k D_jk / (J c)
 *
 * The 95% interval is [q_0.025, q_0.975] of the D* (type 7 quantiles, ../bootstrap.ts). Resampling
 * both readers and cases counts the reader × case interaction twice, so this interval tends to be
 * a little wider than the OR interval (Beiden et al. 2000 discuss the bias); it is reported as a
 * second estimate beside ./or-mrmc.ts. Draws come from an MT19937 stream (app/blinding/streams.ts).
 */
import type { MT19937 } from '../../blinding/mt19937.ts';
import { quantileSorted } from '../bootstrap.ts';

export interface TwoWayBootstrap {
  estimate: number;
  ci95: [number, number] | null;
  se: number | null;
  resamples: number;
}

/** `d[j][k]`: reader j, case k difference (complete). */
export function twoWayBootstrap(d: ReadonlyArray<ArrayLike<number>>, resamples: number, rng: MT19937): TwoWayBootstrap {
  const J = d.length;
  const c = J > 0 ? d[0].length : 0;
  let total = 0;
  for (const row of d) for (let k = 0; k < c; k++) total += row[k];
  const estimate = total / (J * c);
  if (resamples <= 0 || J < 2 || c < 2) return { estimate, ci95: null, se: null, resamples: 0 };
  const u = new Uint32Array(J);
  const v = new Uint32Array(c);
  const samples = new Float64Array(resamples);
  for (let b = 0; b < resamples; b++) {
    u.fill(0);
    v.fill(0);
    for (let j = 0; j < J; j++) u[rng.nextBelow(J)]++;
    for (let k = 0; k < c; k++) v[rng.nextBelow(c)]++;
    let s = 0;
    for (let j = 0; j < J; j++) {
      if (u[j] === 0) continue;
      let r = 0;
      const row = d[j];
      for (let k = 0; k < c; k++) r += v[k] * row[k];
      s += u[j] * r;
    }
    samples[b] = s / (J * c);
  }
  const m = samples.reduce((a, x) => a + x, 0) / resamples;
  const se = Math.sqrt(samples.reduce((a, x) => a + (x - m) ** 2, 0) / (resamples - 1));
  samples.sort();
  return { estimate, ci95: [quantileSorted(samples, 0.025), quantileSorted(samples, 0.975)], se, resamples };
}
