/**
 * Gwet's AC1 (nominal) and AC2 (weighted) agreement coefficients, with their variance.
 *
 * Gwet, K. L. (2008). Computing inter-rater reliability and its variance in the presence of high
 *   agreement. British Journal of Mathematical and Statistical Psychology, 61(1), 29–48.
 *   https://doi.org/10.1348/000711006X126600
 * Gwet, K. L. (2014). Handbook of Inter-Rater Reliability (4th ed.), ch. 2–3 (weights, missing
 *   ratings, the variance for many raters).
 *
 * n cases with at least one rating, q categories x_1 < … < x_q, r_ik readers putting case i in
 * category k, r_i = Σ_k r_ik, weights w_kl (AC1: w = I; AC2 quadratic:
 * w_kl = 1 − (x_k − x_l)² / (x_q − x_1)²), T_w = Σ_kl w_kl:
 *
 *   p_a = weighted pairwise agreement over the n₂ cases with r_i ≥ 2 (./percent-agreement.ts)
 *   π_k = (1 / n) Σ_i r_ik / r_i
 *   p_e = T_w / (q (q − 1)) Σ_k π_k (1 − π_k)
 *   γ   = (p_a − p_e) / (1 − p_e)
 *
 * Variance (Gwet 2008, eq. for many raters; finite-population factor 1 − f with f = 0):
 *   γ_i  = (n / n₂) (p_a|i − p_e [r_i ≥ 2]) / (1 − p_e)
 *   p_e|i = T_w / (q (q − 1)) Σ_k r_ik (1 − π_k) / r_i
 *   γ*_i = γ_i − 2 (1 − γ) (p_e|i − p_e) / (1 − p_e)
 *   v    = (1 / (n (n − 1))) Σ_i (γ*_i − γ)²
 * 95% interval γ ± t_{0.975, n−1} √v, cut to [−1, 1], as Gwet's irrCAC reports it.
 *
 * q is the number of categories on the scale (not only those used): chance agreement depends on
 * it. Readers missing on a case simply do not count there. γ is undefined (NaN) for q < 2.
 */
import tQuantile from '@stdlib/stats-base-dists-t-quantile';
import type { CategoryCounts } from './rating-matrix.ts';
import { pairAgreement, withinWeights } from './percent-agreement.ts';
import { kappaWeights } from './cohen-kappa.ts';

export interface GwetAc {
  value: number;
  se: number;
  ci95: [number, number] | null;
  pObserved: number;
  pExpected: number;
  /** Cases with at least one rating (n). */
  cases: number;
}

export function gwetAc(cc: CategoryCounts, weights: ArrayLike<number>): GwetAc {
  const q = cc.categories.length;
  const n = cc.subjects;
  const pa = pairAgreement(cc, weights);
  const nan: GwetAc = { value: Number.NaN, se: Number.NaN, ci95: null, pObserved: pa.value, pExpected: Number.NaN, cases: n };
  if (q < 2 || n === 0 || pa.cases === 0) return nan;

  const pi = new Float64Array(q);
  for (let i = 0; i < n; i++) {
    const r = cc.rated[i];
    if (r === 0) continue;
    for (let k = 0; k < q; k++) pi[k] += cc.counts[i * q + k] / r / n;
  }
  let tw = 0;
  for (let k = 0; k < q * q; k++) tw += weights[k];
  const scale = tw / (q * (q - 1));
  let spread = 0;
  for (let k = 0; k < q; k++) spread += pi[k] * (1 - pi[k]);
  const pe = scale * spread;
  const value = (pa.value - pe) / (1 - pe);

  let sum = 0;
  for (let i = 0; i < n; i++) {
    const r = cc.rated[i];
    const gi = (n / pa.cases) * (pa.perCase[i] - (r >= 2 ? pe : 0)) / (1 - pe);
    let pei = 0;
    if (r > 0) {
      for (let k = 0; k < q; k++) pei += (cc.counts[i * q + k] * (1 - pi[k])) / r;
      pei *= scale;
    }
    const star = gi - (2 * (1 - value) * (pei - pe)) / (1 - pe);
    sum += (star - value) ** 2;
  }
  const se = n > 1 ? Math.sqrt(sum / (n * (n - 1))) : Number.NaN;
  const t = n > 1 ? tQuantile(0.975, n - 1) : Number.NaN;
  const ci95: [number, number] | null = Number.isFinite(se) && Number.isFinite(value)
    ? [Math.max(-1, value - t * se), Math.min(1, value + t * se)]
    : null;
  return { value, se, ci95, pObserved: pa.value, pExpected: pe, cases: n };
}

/** AC1: nominal categories. */
export function gwetAc1(cc: CategoryCounts): GwetAc {
  return gwetAc(cc, withinWeights(cc.categories, 0));
}

/** AC2 with quadratic weights on the category values. */
export function gwetAc2Quadratic(cc: CategoryCounts): GwetAc {
  return gwetAc(cc, kappaWeights(cc.categories, 'quadratic'));
}
