/**
 * Krippendorff's alpha for nominal, ordinal and interval data, missing ratings as alpha defines.
 *
 * Krippendorff, K. (2004). Content Analysis: An Introduction to Its Methodology (2nd ed.), ch. 11.
 * Krippendorff, K. (2011). Computing Krippendorff's Alpha-Reliability. Annenberg School for
 *   Communication, University of Pennsylvania. https://repository.upenn.edu/asc_papers/43
 *
 * Units u (cases) get m_u values from the readers who scored them; readers who did not are simply
 * absent. Only pairable units (m_u ≥ 2) enter. With n_uc the number of values c in unit u:
 *
 *   coincidences  o_ck = Σ_u n_uc (n_uk − [c = k]) / (m_u − 1),   n_c = Σ_k o_ck,   n = Σ_c n_c
 *   α = 1 − D_o / D_e = 1 − (n − 1) Σ_ck o_ck δ²_ck / Σ_ck n_c n_k δ²_ck
 *
 * with the difference functions
 *   nominal   δ²_ck = [c ≠ k]
 *   interval  δ²_ck = (c − k)²
 *   ordinal   δ²_ck = (Σ_{g=c..k} n_g − (n_c + n_k)/2)²  =  (R_k − R_c)²,  R_c = Σ_{g<c} n_g + n_c/2
 *
 * (the rewrite of the ordinal difference as a difference of mid-ranks R is ours; it is the same
 * number). For any δ² = (v_c − v_k)² the unit sum Σ_ck n_uc n_uk δ²_ck equals
 * 2 m_u Σ_c n_uc v_c² − 2 (Σ_c n_uc v_c)², so every metric costs O(categories) per unit.
 *
 * Confidence interval: percentile bootstrap over units (./bootstrap.ts), units counted w_u times.
 * Note this resamples cases, not Krippendorff's (Hayes & Krippendorff 2007) resampling of
 * pairable values; it answers "how would alpha vary over other cases like these".
 *
 * α is undefined (NaN) when D_e = 0 (every pairable value the same) or no unit is pairable.
 */
import type { CategoryCounts } from './rating-matrix.ts';

export const ALPHA_LEVELS = ['nominal', 'ordinal', 'interval'] as const;
export type AlphaLevel = (typeof ALPHA_LEVELS)[number];

export interface KrippendorffAlpha {
  nominal: number;
  ordinal: number;
  interval: number;
  /** Pairable units (cases with at least two ratings). */
  units: number;
  /** Pairable values n. */
  values: number;
}

/** Σ_c n_c v_c and Σ_c n_c v_c² over a count vector: the pieces of every interval-type sum. */
function pairSum(counts: ArrayLike<number>, offset: number, v: ArrayLike<number>, q: number, m: number): number {
  let s1 = 0;
  let s2 = 0;
  for (let c = 0; c < q; c++) {
    const n = counts[offset + c];
    if (n === 0) continue;
    s1 += n * v[c];
    s2 += n * v[c] * v[c];
  }
  return 2 * m * s2 - 2 * s1 * s1;
}

/**
 * Alpha with unit u counted weights[u] times. The per-unit nominal and interval sums do not depend
 * on the weights and are computed once. The ordinal sum follows the resampled margins; it is split
 * as Σ_u w_u (2 m_u Σ_c n_uc R_c² − 2 (Σ_c n_uc R_c)²) / (m_u − 1)
 *   = 2 Σ_c R_c² B_c − 2 Σ_u w_u (Σ_c n_uc R_c)² / (m_u − 1),  B_c = Σ_u w_u m_u n_uc / (m_u − 1),
 * so that a unit costs two short passes. Mid-ranks are centred on n/2 (differences are unchanged)
 * to keep the subtraction accurate. `cc.categories` are the values, ascending.
 */
export function weightedAlpha(cc: CategoryCounts): (weights?: ArrayLike<number>) => KrippendorffAlpha {
  const q = cc.categories.length;
  const pairableList: number[] = [];
  for (let u = 0; u < cc.subjects; u++) if (cc.rated[u] >= 2) pairableList.push(u);
  const P = pairableList.length;
  const unit = Int32Array.from(pairableList);
  const counts = new Float64Array(P * q);
  const nominalTerm = new Float64Array(P);
  const intervalTerm = new Float64Array(P);
  const inverse = new Float64Array(P); // 1 / (m_u − 1)
  const ratio = new Float64Array(P); // m_u / (m_u − 1)
  for (let k = 0; k < P; k++) {
    const u = unit[k];
    const m = cc.rated[u];
    let squares = 0;
    for (let c = 0; c < q; c++) {
      const n = cc.counts[u * q + c];
      counts[k * q + c] = n;
      squares += n * n;
    }
    nominalTerm[k] = (m * m - squares) / (m - 1);
    intervalTerm[k] = pairSum(cc.counts, u * q, cc.categories, q, m) / (m - 1);
    inverse[k] = 1 / (m - 1);
    ratio[k] = m / (m - 1);
  }
  const marg = new Float64Array(q);
  const bsum = new Float64Array(q);
  const ranks = new Float64Array(q);
  // Complete designs give every unit the same m: then B_c is m/(m−1) times the margin.
  const sameRatio = P > 0 && ratio.every((r) => r === ratio[0]) ? ratio[0] : null;
  const ones = new Float64Array(cc.subjects).fill(1);
  return (weights = ones) => {
    marg.fill(0);
    bsum.fill(0);
    let units = 0;
    let observedNominal = 0;
    let observedInterval = 0;
    for (let k = 0; k < P; k++) {
      const w = weights[unit[k]];
      if (w === 0) continue;
      units += w;
      const base = k * q;
      for (let c = 0; c < q; c++) marg[c] += w * counts[base + c];
      if (sameRatio === null) {
        const f = w * ratio[k];
        for (let c = 0; c < q; c++) bsum[c] += f * counts[base + c];
      }
      observedNominal += w * nominalTerm[k];
      observedInterval += w * intervalTerm[k];
    }
    if (sameRatio !== null) for (let c = 0; c < q; c++) bsum[c] = sameRatio * marg[c];
    if (units === 0) return { nominal: Number.NaN, ordinal: Number.NaN, interval: Number.NaN, units: 0, values: 0 };
    let n = 0;
    let squares = 0;
    for (let c = 0; c < q; c++) {
      n += marg[c];
      squares += marg[c] * marg[c];
    }
    // Mid-ranks of the categories in the pooled pairable values, centred.
    let below = 0;
    let rankSquares = 0;
    for (let c = 0; c < q; c++) {
      ranks[c] = below + marg[c] / 2 - n / 2;
      below += marg[c];
      rankSquares += ranks[c] * ranks[c] * bsum[c];
    }
    let cross = 0;
    for (let k = 0; k < P; k++) {
      const w = weights[unit[k]];
      if (w === 0) continue;
      const base = k * q;
      let s1 = 0;
      for (let c = 0; c < q; c++) s1 += counts[base + c] * ranks[c];
      cross += w * inverse[k] * s1 * s1;
    }
    const observedOrdinal = 2 * rankSquares - 2 * cross;
    const expectedNominal = n * n - squares;
    const expectedInterval = pairSum(marg, 0, cc.categories, q, n);
    const expectedOrdinal = pairSum(marg, 0, ranks, q, n);
    const alpha = (observed: number, expected: number): number => (expected === 0 ? Number.NaN : 1 - ((n - 1) * observed) / expected);
    return {
      nominal: alpha(observedNominal, expectedNominal),
      ordinal: alpha(observedOrdinal, expectedOrdinal),
      interval: alpha(observedInterval, expectedInterval),
      units,
      values: n,
    };
  };
}

/** Alpha with unit u counted weights[u] times (all once without weights). */
export function krippendorffAlphaWeighted(cc: CategoryCounts, weights?: ArrayLike<number>): KrippendorffAlpha {
  return weightedAlpha(cc)(weights);
}

/** Alpha of per-unit category counts, every unit once. */
export function krippendorffAlpha(cc: CategoryCounts): KrippendorffAlpha {
  return krippendorffAlphaWeighted(cc);
}
