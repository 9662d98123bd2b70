/**
 * Percent agreement among many readers: exact, and within one scale point.
 *
 * For each case the share of reader pairs that agree, averaged over the cases scored by at least
 * two readers — Fleiss' (1971) P̄ and Gwet's (2008) p_a, which allow readers to be missing:
 *
 *   p_a|i = Σ_k r_ik (r*_ik − 1) / (r_i (r_i − 1)),   r*_ik = Σ_l w_kl r_il
 *   p_a   = (1 / n₂) Σ_{i : r_i ≥ 2} p_a|i
 *
 * r_ik readers put case i in category k, r_i = Σ_k r_ik, n₂ cases with r_i ≥ 2. Exact agreement
 * takes w = I; within one point takes w_kl = 1 where |x_k − x_l| ≤ 1, else 0.
 *
 * Fleiss, J. L. (1971). Psychological Bulletin, 76(5), 378–382.
 * Gwet, K. L. (2008). Computing inter-rater reliability and its variance in the presence of high
 *   agreement. British Journal of Mathematical and Statistical Psychology, 61(1), 29–48.
 *   https://doi.org/10.1348/000711006X126600
 */
import type { CategoryCounts } from './rating-matrix.ts';

export interface PairAgreement {
  /** p_a; NaN when no case has two ratings. */
  value: number;
  /** p_a|i per case (0 where r_i < 2). */
  perCase: Float64Array;
  /** Cases with at least two ratings (n₂). */
  cases: number;
}

/** Weighted pairwise agreement with q × q weights (row-major) over `cc.categories`. */
export function pairAgreement(cc: CategoryCounts, weights: ArrayLike<number>): PairAgreement {
  const q = cc.categories.length;
  const perCase = new Float64Array(cc.subjects);
  let sum = 0;
  let cases = 0;
  for (let i = 0; i < cc.subjects; i++) {
    const r = cc.rated[i];
    if (r < 2) continue;
    let s = 0;
    for (let k = 0; k < q; k++) {
      const rik = cc.counts[i * q + k];
      if (rik === 0) continue;
      let star = 0;
      for (let l = 0; l < q; l++) star += weights[k * q + l] * cc.counts[i * q + l];
      s += rik * (star - 1);
    }
    perCase[i] = s / (r * (r - 1));
    sum += perCase[i];
    cases++;
  }
  return { value: cases === 0 ? Number.NaN : sum / cases, perCase, cases };
}

/** q × q weights: 1 where categories differ by at most `distance`, else 0. */
export function withinWeights(categories: readonly number[], distance: number): Float64Array {
  const q = categories.length;
  const w = new Float64Array(q * q);
  for (let k = 0; k < q; k++) {
    for (let l = 0; l < q; l++) w[k * q + l] = Math.abs(categories[k] - categories[l]) <= distance ? 1 : 0;
  }
  return w;
}

export interface PercentAgreement {
  exact: number;
  withinOne: number;
  /** Cases with at least two ratings. */
  cases: number;
}

export function percentAgreement(cc: CategoryCounts): PercentAgreement {
  const exact = pairAgreement(cc, withinWeights(cc.categories, 0));
  const withinOne = pairAgreement(cc, withinWeights(cc.categories, 1));
  return { exact: exact.value, withinOne: withinOne.value, cases: exact.cases };
}
