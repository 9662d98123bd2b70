/**
 * Cohen's kappa for two readers, unweighted and weighted, with its large-sample standard error.
 *
 * Cohen, J. (1960). A coefficient of agreement for nominal scales. Educational and Psychological
 *   Measurement, 20(1), 37–46. https://doi.org/10.1177/001316446002000104
 * Cohen, J. (1968). Weighted kappa: Nominal scale agreement with provision for scaled
 *   disagreement or partial credit. Psychological Bulletin, 70(4), 213–220.
 *   https://doi.org/10.1037/h0026256
 * Fleiss, J. L., Cohen, J., & Everitt, B. S. (1969). Large sample standard errors of kappa and
 *   weighted kappa. Psychological Bulletin, 72(5), 323–327. https://doi.org/10.1037/h0028106
 *
 * With p_ij the share of cases reader A put in category i and reader B in category j, margins
 * p_i· and p_·j, and agreement weights w_ij (w_ii = 1, 0 ≤ w_ij ≤ 1):
 *
 *   p_o = Σ_ij w_ij p_ij,   p_e = Σ_ij w_ij p_i· p_·j,   κ_w = (p_o − p_e) / (1 − p_e)
 *
 * Unweighted kappa is the case w = I. Linear and quadratic weights on category values x_i
 * (Cicchetti & Allison 1971; Fleiss & Cohen 1973):
 *
 *   linear    w_ij = 1 − |x_i − x_j| / (x_max − x_min)
 *   quadratic w_ij = 1 − (x_i − x_j)² / (x_max − x_min)²
 *
 * Standard error (Fleiss, Cohen & Everitt 1969, the non-null variance), with
 * w̄_i· = Σ_j p_·j w_ij and w̄_·j = Σ_i p_i· w_ij:
 *
 *   Var(κ_w) = { Σ_ij p_ij [w_ij (1 − p_e) − (w̄_i· + w̄_·j)(1 − p_o)]² − (p_o p_e − 2 p_e + p_o)² }
 *              / (n (1 − p_e)⁴)
 *
 * 95% interval κ_w ± z_0.975 SE (z from @stdlib's normal quantile), cut to [−1, 1] as R psych
 * does where the large-sample interval runs past the range. κ is undefined (NaN) when p_e = 1.
 * Weighted kappa does not change when unused categories are added, so the categories may be the
 * whole scale or just those observed.
 */
import normalQuantile from '@stdlib/stats-base-dists-normal-quantile';

export type KappaWeighting = 'unweighted' | 'linear' | 'quadratic';
export const KAPPA_WEIGHTINGS: readonly KappaWeighting[] = ['unweighted', 'linear', 'quadratic'];

export interface CohenKappa {
  value: number;
  se: number;
  ci95: [number, number];
  /** Cases both readers scored. */
  n: number;
  pObserved: number;
  pExpected: number;
}

const Z975 = normalQuantile(0.975, 0, 1);

/** q × q agreement weights for ascending category values. */
export function kappaWeights(categories: readonly number[], weighting: KappaWeighting): Float64Array {
  const q = categories.length;
  const w = new Float64Array(q * q);
  const range = categories[q - 1] - categories[0];
  for (let i = 0; i < q; i++) {
    for (let j = 0; j < q; j++) {
      const d = Math.abs(categories[i] - categories[j]);
      w[i * q + j] =
        weighting === 'unweighted' ? (i === j ? 1 : 0)
        : range === 0 ? 1
        : weighting === 'linear' ? 1 - d / range
        : 1 - (d * d) / (range * range);
    }
  }
  return w;
}

/**
 * Kappa from a q × q table of counts (row-major; rows reader A, columns reader B) and q × q
 * agreement weights.
 */
export function cohenKappaFromTable(table: ArrayLike<number>, weights: ArrayLike<number>, q: number): CohenKappa {
  if (table.length !== q * q || weights.length !== q * q) throw new RangeError(`table and weights must be ${q} x ${q}`);
  let n = 0;
  for (let k = 0; k < q * q; k++) n += table[k];
  const row = new Float64Array(q);
  const col = new Float64Array(q);
  for (let i = 0; i < q; i++) {
    for (let j = 0; j < q; j++) {
      row[i] += table[i * q + j] / n;
      col[j] += table[i * q + j] / n;
    }
  }
  let po = 0;
  let pe = 0;
  const wRow = new Float64Array(q); // w̄_i· = Σ_j p_·j w_ij
  const wCol = new Float64Array(q); // w̄_·j = Σ_i p_i· w_ij
  for (let i = 0; i < q; i++) {
    for (let j = 0; j < q; j++) {
      const w = weights[i * q + j];
      po += (w * table[i * q + j]) / n;
      pe += w * row[i] * col[j];
      wRow[i] += col[j] * w;
      wCol[j] += row[i] * w;
    }
  }
  const value = pe === 1 ? Number.NaN : (po - pe) / (1 - pe);
  let sum = 0;
  for (let i = 0; i < q; i++) {
    for (let j = 0; j < q; j++) {
      const p = table[i * q + j] / n;
      if (p === 0) continue;
      const t = weights[i * q + j] * (1 - pe) - (wRow[i] + wCol[j]) * (1 - po);
      sum += p * t * t;
    }
  }
  const c = po * pe - 2 * pe + po;
  const variance = (sum - c * c) / (n * (1 - pe) ** 4);
  // Rounding can leave a tiny negative variance under perfect agreement.
  const se = pe === 1 ? Number.NaN : Math.sqrt(Math.max(0, variance));
  const ci95: [number, number] = [Math.max(-1, value - Z975 * se), Math.min(1, value + Z975 * se)];
  return { value, se, ci95, n, pObserved: po, pExpected: pe };
}

/** The q × q table of two readers' category indices (−1 = not scored), over the cases both scored. */
export function crossTableOfIndices(a: ArrayLike<number>, b: ArrayLike<number>, q: number): { table: Float64Array; n: number } {
  const table = new Float64Array(q * q);
  let n = 0;
  for (let s = 0; s < a.length; s++) {
    const i = a[s];
    const j = b[s];
    if (i < 0 || j < 0) continue;
    table[i * q + j] += 1;
    n++;
  }
  return { table, n };
}

/** Category index of each score (−1 for NaN); a score not among the categories is an error. */
export function categoryIndices(scores: ArrayLike<number>, categories: readonly number[]): Int32Array {
  const index = new Map(categories.map((c, j) => [c, j]));
  const out = new Int32Array(scores.length);
  for (let s = 0; s < scores.length; s++) {
    const v = scores[s];
    if (Number.isNaN(v)) {
      out[s] = -1;
      continue;
    }
    const j = index.get(v);
    if (j === undefined) throw new RangeError(`case ${s + 1}: score ${v} is not one of the categories ${categories.join(', ')}`);
    out[s] = j;
  }
  return out;
}

/** The q × q table of two readers' scores over the cases both scored (pairwise deletion). */
export function crossTable(a: ArrayLike<number>, b: ArrayLike<number>, categories: readonly number[]): { table: Float64Array; n: number } {
  return crossTableOfIndices(categoryIndices(a, categories), categoryIndices(b, categories), categories.length);
}

/** Kappa of two readers' score vectors (NaN = not scored), over the cases both scored. */
export function cohenKappa(
  a: ArrayLike<number>,
  b: ArrayLike<number>,
  categories: readonly number[],
  weighting: KappaWeighting,
): CohenKappa {
  if (a.length !== b.length) throw new RangeError('both readers need one entry per case');
  const { table, n } = crossTable(a, b, categories);
  if (n === 0) throw new RangeError('Cohen kappa: no case was scored by both readers');
  return cohenKappaFromTable(table, kappaWeights(categories, weighting), categories.length);
}
