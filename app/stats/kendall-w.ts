/**
 * Kendall's coefficient of concordance W, with the correction for ties, and its chi-square test.
 *
 * Kendall, M. G., & Babington Smith, B. (1939). The problem of m rankings. Annals of Mathematical
 *   Statistics, 10(3), 275–287. https://doi.org/10.1214/aoms/1177732186
 * Kendall, M. G. (1948). Rank Correlation Methods, ch. 6 (ties).
 *
 * m readers each rank the same n cases (complete cases only); tied scores get their mean rank.
 * With R_i the sum of case i's ranks over readers and t the sizes of each reader's groups of ties:
 *
 *   S = Σ_i (R_i − m (n + 1) / 2)²,   T = Σ_readers Σ_groups (t³ − t)
 *   W = 12 S / (m² (n³ − n) − m T)
 *   χ² = m (n − 1) W  on n − 1 degrees of freedom (the Friedman statistic with its tie correction)
 *
 * p is the upper tail of χ², from @stdlib's regularized upper incomplete gamma function so that
 * small p keep their digits. W is undefined (NaN) when every reader gave every case the same score.
 */
import gammainc from '@stdlib/math-base-special-gammainc';

export interface KendallW {
  value: number;
  chi2: number;
  df: number;
  p: number;
  /** Cases (complete) and readers used. */
  cases: number;
  readers: number;
  /** T, the tie correction term. */
  ties: number;
}

/** Mean ranks 1..n of `values`; `ties` is Σ (t³ − t) over the groups of tied values. */
export function midRanks(values: ArrayLike<number>): { ranks: Float64Array; ties: number } {
  // Scores take few distinct values: count them, then each value's mean rank is
  // (values below) + (t + 1) / 2.
  const counts = new Map<number, number>();
  for (let i = 0; i < values.length; i++) counts.set(values[i], (counts.get(values[i]) ?? 0) + 1);
  const rankOf = new Map<number, number>();
  let below = 0;
  let ties = 0;
  for (const v of [...counts.keys()].sort((a, b) => a - b)) {
    const t = counts.get(v) as number;
    rankOf.set(v, below + (t + 1) / 2);
    ties += t * t * t - t;
    below += t;
  }
  const ranks = new Float64Array(values.length);
  for (let i = 0; i < values.length; i++) ranks[i] = rankOf.get(values[i]) as number;
  return { ranks, ties };
}

/** Upper tail of the chi-square distribution with `df` degrees of freedom. */
export function chiSquareUpperTail(x: number, df: number): number {
  if (Number.isNaN(x)) return Number.NaN;
  if (x <= 0) return 1;
  return gammainc(x / 2, df / 2, true, true);
}

/** W of complete rows (cases × readers). Needs n ≥ 2 cases and m ≥ 2 readers. */
export function kendallW(rows: ReadonlyArray<ReadonlyArray<number>>): KendallW {
  const n = rows.length;
  const m = n > 0 ? rows[0].length : 0;
  if (n < 2) throw new RangeError(`Kendall's W needs at least two complete cases, got ${n}`);
  if (m < 2) throw new RangeError(`Kendall's W needs at least two readers, got ${m}`);
  const rankSums = new Float64Array(n);
  let ties = 0;
  const column = new Float64Array(n);
  for (let j = 0; j < m; j++) {
    for (let i = 0; i < n; i++) column[i] = rows[i][j];
    const r = midRanks(column);
    ties += r.ties;
    for (let i = 0; i < n; i++) rankSums[i] += r.ranks[i];
  }
  const mean = (m * (n + 1)) / 2;
  let S = 0;
  for (let i = 0; i < n; i++) S += (rankSums[i] - mean) ** 2;
  const denominator = m * m * (n * n * n - n) - m * ties;
  const value = denominator === 0 ? Number.NaN : (12 * S) / denominator;
  const chi2 = m * (n - 1) * value;
  return { value, chi2, df: n - 1, p: chiSquareUpperTail(chi2, n - 1), cases: n, readers: m, ties };
}
