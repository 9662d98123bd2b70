/**
 * Multi-reader multi-case (MRMC) inference for mean scores: the Obuchowski–Rockette model with
 * Hillis's denominator degrees of freedom and jackknife-over-cases covariances. Readers and cases
 * are both random, so the conclusion is meant to hold for other readers and other cases.
 *
 * Obuchowski, N. A., & Rockette, H. E. (1995). Hypothesis testing of diagnostic accuracy for
 *   multiple readers and multiple tests: an ANOVA approach with dependent observations.
 *   Communications in Statistics – Simulation and Computation, 24(2), 285–308.
 * Hillis, S. L., Obuchowski, N. A., Schartz, K. M., & Berbaum, K. S. (2005). A comparison of the
 *   Dorfman–Berbaum–Metz and Obuchowski–Rockette methods for receiver operating characteristic
 *   (ROC) data. Statistics in Medicine, 24(10), 1579–1607 (jackknife covariance estimates).
 * Hillis, S. L. (2007). A comparison of denominator degrees of freedom methods for multiple
 *   observer ROC analysis. Statistics in Medicine, 26(3), 596–619.
 *
 * The figure of merit θ_ij of method i (i = 1..t) and reader j (j = 1..J) is the reader's mean
 * score over the c cases. Jackknife over cases: θ_ij(k) leaves case k out, and
 *
 *   Ĉov(θ_ij, θ_i'j') = (c − 1)/c Σ_k (θ_ij(k) − θ_ij(·)) (θ_i'j'(k) − θ_i'j'(·))
 *
 * averaged into Var (same method, same reader), Cov1 (other method, same reader), Cov2 (same
 * method, other reader) and Cov3 (other method, other reader). With θ_i· and θ_·· the means,
 *
 *   MS(T)   = J Σ_i (θ_i· − θ_··)² / (t − 1)
 *   MS(T×R) = Σ_ij (θ_ij − θ_i· − θ_·j + θ_··)² / ((t − 1)(J − 1))
 *   D       = MS(T×R) + J · max(Cov2 − Cov3, 0)
 *   F       = MS(T) / D  on (t − 1, ddf_H),   ddf_H = D² / [MS(T×R)² / ((t − 1)(J − 1))]   (Hillis 2007)
 *   θ_i· − θ_i'· ± t_{0.975; ddf_H} · sqrt(2 D / J)      (95% interval of a difference)
 *
 * A pair of methods is analysed on its own (t = 2), so each pair's interval uses only its data.
 * Non-inferiority of method A against the standard B with margin δ: A is non-inferior when the
 * lower 95% bound of θ_A· − θ_B· lies above −δ (a one-sided test at 2.5%); its p-value is the
 * upper tail of t = (θ_A· − θ_B· + δ) / sqrt(2 D / J) on ddf_H.
 * Needs complete data: every reader scored every case under every method (incomplete cases are
 * dropped by the caller), at least two readers and at least two cases.
 */
import tCdf from '@stdlib/stats-base-dists-t-cdf';
import tQuantile from '@stdlib/stats-base-dists-t-quantile';
import fCdf from '@stdlib/stats-base-dists-f-cdf';
import type { OrCovariances } from './comparison-types.ts';
export type { OrCovariances };

export interface OrResult {
  methods: number;
  readers: number;
  cases: number;
  /** θ_ij: thetas[i][j]. */
  thetas: number[][];
  msT: number;
  msTR: number;
  covariances: OrCovariances;
  /** The denominator MS(T×R) + J max(Cov2 − Cov3, 0). */
  denominator: number;
  F: number | null;
  df1: number;
  ddfH: number | null;
  p: number | null;
}

export interface OrDifference {
  /** θ_A· − θ_B·. */
  estimate: number;
  se: number | null;
  df: number | null;
  ci95: [number, number] | null;
  t: number | null;
  p: number | null;
}

const mean = (xs: ArrayLike<number>): number => {
  let s = 0;
  for (let i = 0; i < xs.length; i++) s += xs[i];
  return s / xs.length;
};

/** Jackknife (leave one case out) figures of merit: out[k] = mean without case k. */
function jackknifeMeans(scores: ArrayLike<number>): Float64Array {
  const c = scores.length;
  let total = 0;
  for (let k = 0; k < c; k++) total += scores[k];
  const out = new Float64Array(c);
  for (let k = 0; k < c; k++) out[k] = (total - scores[k]) / (c - 1);
  return out;
}

function jackknifeCov(a: Float64Array, b: Float64Array): number {
  const c = a.length;
  const ma = mean(a);
  const mb = mean(b);
  let s = 0;
  for (let k = 0; k < c; k++) s += (a[k] - ma) * (b[k] - mb);
  return ((c - 1) / c) * s;
}

/** The OR analysis of `scores[i][j][k]`: method i, reader j, case k (complete). */
export function orMrmc(scores: ReadonlyArray<ReadonlyArray<ArrayLike<number>>>): OrResult {
  const t = scores.length;
  const J = t > 0 ? scores[0].length : 0;
  const c = J > 0 ? scores[0][0].length : 0;
  if (t < 2 || J < 2 || c < 2) throw new RangeError(`Obuchowski–Rockette needs ≥ 2 methods, ≥ 2 readers and ≥ 2 cases; got ${t}, ${J}, ${c}`);
  const thetas = scores.map((m) => m.map((r) => mean(r)));
  const jack = scores.map((m) => m.map((r) => jackknifeMeans(r)));
  const acc = { variance: [0, 0], cov1: [0, 0], cov2: [0, 0], cov3: [0, 0] };
  for (let i = 0; i < t; i++) {
    for (let j = 0; j < J; j++) {
      for (let i2 = 0; i2 < t; i2++) {
        for (let j2 = 0; j2 < J; j2++) {
          const key = i === i2 ? (j === j2 ? 'variance' : 'cov2') : j === j2 ? 'cov1' : 'cov3';
          acc[key][0] += jackknifeCov(jack[i][j], jack[i2][j2]);
          acc[key][1] += 1;
        }
      }
    }
  }
  const covariances: OrCovariances = {
    variance: acc.variance[0] / acc.variance[1],
    cov1: acc.cov1[0] / acc.cov1[1],
    cov2: acc.cov2[0] / acc.cov2[1],
    cov3: acc.cov3[0] / acc.cov3[1],
  };
  return orFromThetas(thetas, covariances, c);
}

/** The OR analysis from figures of merit θ_ij (thetas[i][j]) and covariance estimates (also the published-example check). */
export function orFromThetas(thetas: number[][], covariances: OrCovariances, cases: number): OrResult {
  const t = thetas.length;
  const J = thetas[0].length;
  const methodMeans = thetas.map((row) => mean(row));
  const readerMeans = Array.from({ length: J }, (_, j) => mean(thetas.map((row) => row[j])));
  const grand = mean(methodMeans);
  const msT = (J * methodMeans.reduce((s, m) => s + (m - grand) ** 2, 0)) / (t - 1);
  let ssTR = 0;
  for (let i = 0; i < t; i++) for (let j = 0; j < J; j++) ssTR += (thetas[i][j] - methodMeans[i] - readerMeans[j] + grand) ** 2;
  const msTR = ssTR / ((t - 1) * (J - 1));
  return { methods: t, readers: J, cases, thetas, msT, msTR, covariances, ...hillisTest(msT, msTR, covariances, t, J) };
}

/** F test and Hillis ddf from the OR mean squares and covariances. */
export function hillisTest(msT: number, msTR: number, cov: OrCovariances, t: number, J: number): { denominator: number; F: number | null; df1: number; ddfH: number | null; p: number | null } {
  const denominator = msTR + J * Math.max(cov.cov2 - cov.cov3, 0);
  const df1 = t - 1;
  const ddfH = msTR > 1e-14 ? denominator ** 2 / (msTR ** 2 / ((t - 1) * (J - 1))) : denominator > 0 ? Number.POSITIVE_INFINITY : null;
  const F = denominator > 0 ? msT / denominator : null;
  const p = F === null || ddfH === null ? null : 1 - fCdf(F, df1, Math.min(ddfH, 1e9));
  return { denominator, F, df1, ddfH, p };
}

/** The difference θ_a· − θ_b· with its 95% interval, from a two-method OR result (a = method 0). */
export function orDifference(r: OrResult, margin = 0): OrDifference {
  if (r.methods !== 2) throw new RangeError('orDifference takes a two-method analysis');
  const estimate = mean(r.thetas[0]) - mean(r.thetas[1]);
  // A denominator at rounding level means no reader or case variability was seen (e.g. every reader's
  // difference identical and no case covariance): no interval rather than one of zero width.
  if (!(r.denominator > 1e-12 * Math.max(1, Math.abs(estimate) ** 2)) || r.ddfH === null) return { estimate, se: null, df: null, ci95: null, t: null, p: null };
  const se = Math.sqrt((2 * r.denominator) / r.readers);
  const df = Math.min(r.ddfH, 1e9);
  const q = tQuantile(0.975, df);
  const tStat = (estimate + margin) / se;
  // Two-sided p for margin 0; for a margin, the one-sided p of H0: difference ≤ −margin.
  const p = margin === 0 ? 2 * (1 - tCdf(Math.abs(tStat), df)) : 1 - tCdf(tStat, df);
  return { estimate, se, df: r.ddfH, ci95: [estimate - q * se, estimate + q * se], t: tStat, p };
}
