/**
 * Intraclass correlations: the six forms of Shrout & Fleiss, with F-based 95% confidence intervals.
 *
 * Shrout, P. E., & Fleiss, J. L. (1979). Intraclass correlations: Uses in assessing rater
 * reliability. Psychological Bulletin, 86(2), 420–428. https://doi.org/10.1037/0033-2909.86.2.420
 * McGraw, K. O., & Wong, S. P. (1996). Forming inferences about some intraclass correlation
 * coefficients. Psychological Methods, 1(1), 30–46. https://doi.org/10.1037/1082-989X.1.1.30
 *
 * Data: n cases (targets) × k readers (judges), x_ij, complete. Two-way ANOVA with row means x̄_i·,
 * column means x̄_·j and grand mean x̄:
 *
 *   BMS = k Σ_i (x̄_i· − x̄)² / (n − 1)                     between cases,   df n − 1
 *   WMS = Σ_ij (x_ij − x̄_i·)² / (n (k − 1))                within cases,    df n (k − 1)
 *   JMS = n Σ_j (x̄_·j − x̄)² / (k − 1)                     between readers, df k − 1
 *   EMS = Σ_ij (x_ij − x̄_i· − x̄_·j + x̄)² / ((n − 1)(k − 1))  residual
 *
 *   ICC(1,1) = (BMS − WMS) / (BMS + (k − 1) WMS)              one-way random, single reader
 *   ICC(2,1) = (BMS − EMS) / (BMS + (k − 1) EMS + k (JMS − EMS) / n)   two-way random, absolute
 *   ICC(3,1) = (BMS − EMS) / (BMS + (k − 1) EMS)              two-way mixed, consistency
 *   ICC(1,k) = (BMS − WMS) / BMS                              the same, mean of the k readers
 *   ICC(2,k) = (BMS − EMS) / (BMS + (JMS − EMS) / n)
 *   ICC(3,k) = (BMS − EMS) / BMS
 *
 * Tests and intervals (Shrout & Fleiss 1979, Table 3 and text; α = 0.05, F_q(a, b) the q quantile):
 *   ICC(1,·): F0 = BMS/WMS on (n − 1, n(k − 1));  ICC(2,·), ICC(3,·): F0 = BMS/EMS on (n − 1, (n − 1)(k − 1)).
 *   ICC(1,1), ICC(3,1): FL = F0 / F_{1−α/2}(df1, df2), FU = F0 · F_{1−α/2}(df2, df1),
 *                       bounds (FL − 1)/(FL + k − 1) and (FU − 1)/(FU + k − 1).
 *   ICC(1,k), ICC(3,k): bounds 1 − 1/FL and 1 − 1/FU.
 *   ICC(2,1): with ρ = ICC(2,1), Fj = JMS/EMS and Satterthwaite's degrees of freedom
 *     ν = (k−1)(n−1) [k ρ Fj + n(1 + (k−1)ρ) − k ρ]² / ((n−1) k² ρ² Fj² + [n(1 + (k−1)ρ) − k ρ]²),
 *     F* = F_{1−α/2}(n − 1, ν):  lower = n (BMS − F* EMS) / (F* [k JMS + (k n − k − n) EMS] + n BMS)
 *     F* = F_{1−α/2}(ν, n − 1):  upper = n (F* BMS − EMS) / (k JMS + (k n − k − n) EMS + n F* BMS)
 *   ICC(2,k): the ICC(2,1) bounds stepped up by Spearman–Brown, L k / (1 + (k − 1) L), which equals
 *     McGraw & Wong's (1996) interval for ICC(A,k).
 * p is the upper tail of F0 under the F distribution.
 *
 * Rows with a missing value (null or NaN) are dropped (complete cases). Where a ratio is 0/0 (for
 * instance every score equal) the value is NaN; callers that need JSON turn it into null.
 */
import fQuantile from '@stdlib/stats-base-dists-f-quantile';
// The regularized incomplete beta function gives the F distribution's upper tail.
// Note: comes with @stdlib/stats-base-dists-f-quantile; declare it in package.json to rely on it.
import betainc from '@stdlib/math-base-special-betainc';

export const ICC_FORMS = ['ICC(1,1)', 'ICC(2,1)', 'ICC(3,1)', 'ICC(1,k)', 'ICC(2,k)', 'ICC(3,k)'] as const;
export type IccForm = (typeof ICC_FORMS)[number];

export interface IccEstimate {
  value: number;
  /** 95% confidence interval [lower, upper]. */
  ci95: [number, number];
  /** F statistic of the test that the ICC is zero, its degrees of freedom and upper-tail p. */
  F: number;
  df1: number;
  df2: number;
  p: number;
}

export interface AnovaLine {
  df: number;
  ss: number;
  ms: number;
}

export interface IccAnova {
  /** Between cases (targets): BMS. */
  betweenCases: AnovaLine;
  /** Within cases: WMS (readers and residual pooled, the one-way model). */
  withinCases: AnovaLine;
  /** Between readers (judges): JMS. */
  betweenReaders: AnovaLine;
  /** Residual: EMS. */
  residual: AnovaLine;
  total: { df: number; ss: number };
}

export interface IccResult {
  /** Complete cases used (n). */
  cases: number;
  /** Readers (k). */
  readers: number;
  /** Rows dropped because a value was missing. */
  dropped: number;
  anova: IccAnova;
  forms: Record<IccForm, IccEstimate>;
}

const ALPHA = 0.05;

/** Upper tail P(F > f) of the F(d1, d2) distribution. */
export function fUpperTail(f: number, d1: number, d2: number): number {
  if (Number.isNaN(f)) return Number.NaN;
  if (f <= 0) return 1;
  // P(F > f) = I_x(d2/2, d1/2) with x = d2 / (d2 + d1 f); exact at f = ∞ (x = 0).
  return betainc(d2 / (d2 + d1 * f), d2 / 2, d1 / 2);
}

/** Drop rows holding null or NaN; check the shape. */
export function completeRows(matrix: ReadonlyArray<ReadonlyArray<number | null>>): number[][] {
  if (matrix.length === 0) throw new RangeError('ICC needs at least one case');
  const k = matrix[0].length;
  const rows: number[][] = [];
  matrix.forEach((row, i) => {
    if (row.length !== k) {
      throw new RangeError(`case ${i + 1} has ${row.length} values, case 1 has ${k}: give one column per reader`);
    }
    if (row.some((v) => v === null || Number.isNaN(v))) return;
    row.forEach((v, j) => {
      if (!Number.isFinite(v)) throw new RangeError(`case ${i + 1}, reader ${j + 1}: ${v} is not a finite number`);
    });
    rows.push(row as number[]);
  });
  return rows;
}

function line(ss: number, df: number): AnovaLine {
  return { df, ss, ms: ss / df };
}

/** The two-way ANOVA of a complete n × k matrix. */
export function iccAnova(x: ReadonlyArray<ReadonlyArray<number>>): IccAnova {
  const n = x.length;
  const k = x[0].length;
  const rowMean = x.map((row) => row.reduce((a, b) => a + b, 0) / k);
  const colMean = Array.from({ length: k }, (_, j) => x.reduce((a, row) => a + row[j], 0) / n);
  const grand = rowMean.reduce((a, b) => a + b, 0) / n;
  let ssTotal = 0;
  let ssWithin = 0;
  let ssResidual = 0;
  x.forEach((row, i) => {
    row.forEach((v, j) => {
      ssTotal += (v - grand) ** 2;
      ssWithin += (v - rowMean[i]) ** 2;
      ssResidual += (v - rowMean[i] - colMean[j] + grand) ** 2;
    });
  });
  const ssCases = k * rowMean.reduce((a, m) => a + (m - grand) ** 2, 0);
  const ssReaders = n * colMean.reduce((a, m) => a + (m - grand) ** 2, 0);
  return {
    betweenCases: line(ssCases, n - 1),
    withinCases: line(ssWithin, n * (k - 1)),
    betweenReaders: line(ssReaders, k - 1),
    residual: line(ssResidual, (n - 1) * (k - 1)),
    total: { df: n * k - 1, ss: ssTotal },
  };
}

/** Spearman–Brown step-up from one reader to the mean of k readers. */
function stepUp(r: number, k: number): number {
  return (r * k) / (1 + (k - 1) * r);
}

/**
 * All six Shrout & Fleiss ICCs of a cases × readers matrix, with 95% intervals and F tests.
 * Needs at least two complete cases and two readers.
 */
export function icc(matrix: ReadonlyArray<ReadonlyArray<number | null>>): IccResult {
  const x = completeRows(matrix);
  const k = matrix[0].length;
  const n = x.length;
  if (k < 2) throw new RangeError(`ICC needs at least two readers, got ${k}`);
  if (n < 2) throw new RangeError(`ICC needs at least two complete cases, got ${n}`);

  const anova = iccAnova(x);
  const BMS = anova.betweenCases.ms;
  const WMS = anova.withinCases.ms;
  const JMS = anova.betweenReaders.ms;
  const EMS = anova.residual.ms;
  const q = 1 - ALPHA / 2;

  // One-way model: ICC(1,1) and ICC(1,k).
  const F1 = BMS / WMS;
  const df1a = n - 1;
  const df1b = n * (k - 1);
  const p1 = fUpperTail(F1, df1a, df1b);
  const F1L = F1 / fQuantile(q, df1a, df1b);
  const F1U = F1 * fQuantile(q, df1b, df1a);

  // Two-way models: ICC(2,·) and ICC(3,·) share the test of BMS against EMS.
  const F3 = BMS / EMS;
  const df3a = n - 1;
  const df3b = (n - 1) * (k - 1);
  const p3 = fUpperTail(F3, df3a, df3b);
  const F3L = F3 / fQuantile(q, df3a, df3b);
  const F3U = F3 * fQuantile(q, df3b, df3a);

  const icc11 = (BMS - WMS) / (BMS + (k - 1) * WMS);
  const icc21 = (BMS - EMS) / (BMS + (k - 1) * EMS + (k * (JMS - EMS)) / n);
  const icc31 = (BMS - EMS) / (BMS + (k - 1) * EMS);
  const icc1k = (BMS - WMS) / BMS;
  const icc2k = (BMS - EMS) / (BMS + (JMS - EMS) / n);
  const icc3k = (BMS - EMS) / BMS;

  // ICC(2,1) interval with Satterthwaite's degrees of freedom.
  const rho = icc21;
  const Fj = JMS / EMS;
  const a = n * (1 + (k - 1) * rho) - k * rho;
  const nu = ((k - 1) * (n - 1) * (k * rho * Fj + a) ** 2) / ((n - 1) * k * k * rho * rho * Fj * Fj + a * a);
  const Fstar1 = fQuantile(q, n - 1, nu);
  const Fstar2 = fQuantile(q, nu, n - 1);
  const c = k * JMS + (k * n - k - n) * EMS;
  const lo21 = (n * (BMS - Fstar1 * EMS)) / (Fstar1 * c + n * BMS);
  const hi21 = (n * (Fstar2 * BMS - EMS)) / (c + n * Fstar2 * BMS);

  const oneWay = { F: F1, df1: df1a, df2: df1b, p: p1 };
  const twoWay = { F: F3, df1: df3a, df2: df3b, p: p3 };
  const forms: Record<IccForm, IccEstimate> = {
    'ICC(1,1)': { value: icc11, ci95: [(F1L - 1) / (F1L + k - 1), (F1U - 1) / (F1U + k - 1)], ...oneWay },
    'ICC(2,1)': { value: icc21, ci95: [lo21, hi21], ...twoWay },
    'ICC(3,1)': { value: icc31, ci95: [(F3L - 1) / (F3L + k - 1), (F3U - 1) / (F3U + k - 1)], ...twoWay },
    'ICC(1,k)': { value: icc1k, ci95: [1 - 1 / F1L, 1 - 1 / F1U], ...oneWay },
    'ICC(2,k)': { value: icc2k, ci95: [stepUp(lo21, k), stepUp(hi21, k)], ...twoWay },
    'ICC(3,k)': { value: icc3k, ci95: [1 - 1 / F3L, 1 - 1 / F3U], ...twoWay },
  };
  return { cases: n, readers: k, dropped: matrix.length - n, anova, forms };
}
