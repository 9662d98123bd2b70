/**
 * Wilcoxon signed-rank test of paired differences d_1 … d_n (two-sided).
 *
 * Wilcoxon, F. (1945). Individual comparisons by ranking methods. Biometrics Bulletin, 1(6), 80–83.
 * Pratt, J. W. (1959). Remarks on zeros and ties in the Wilcoxon signed rank procedures. JASA,
 *   54(287), 655–667 (zeros ranked, then dropped).
 * Cureton, E. E. (1967). The normal approximation to the signed-rank sampling distribution when
 *   zero differences are present. JASA, 62(319), 1068–1069.
 *
 * Rank |d_i| (mid-ranks for ties), W+ = Σ_{d_i > 0} r_i, W− = Σ_{d_i < 0} r_i, T = min(W+, W−).
 *
 * exact  — when there is no zero and no tie and n ≤ 50: the null distribution of W+ (each rank's
 *          sign ±, equally likely) counted by dynamic programming over the 2ⁿ sign patterns;
 *          p = min(1, 2 P(W+ ≤ T)).
 * normal — otherwise. Pratt's treatment of zeros: the n_0 zero differences take part in the
 *          ranking and are then dropped; Cureton's mean and variance, with the tie correction over
 *          the tie groups (size t) of the non-zero ranks:
 *            μ = [n(n+1) − n_0(n_0+1)] / 4
 *            σ² = [n(n+1)(2n+1) − n_0(n_0+1)(2n_0+1)] / 24 − Σ (t³ − t) / 48
 *            z = (T − μ) / σ,  p = 2 Φ(−|z|)   (no continuity correction)
 *
 * `method` and `zeros`/`ties` say which was used. Checked against scipy.stats.wilcoxon
 * (method='exact', and method='approx' with zero_method='pratt', correction=False).
 */
import normalCdf from '@stdlib/stats-base-dists-normal-cdf';
import { midRanks } from '../kendall-w.ts';
import type { WilcoxonResult } from './comparison-types.ts';
export type { WilcoxonResult };

export const EXACT_MAX_N = 50;

/** P(W+ ≤ t) under the null for n untied ranks 1..n. */
export function exactSignedRankCdf(n: number, t: number): number {
  const max = (n * (n + 1)) / 2;
  let counts = new Float64Array(max + 1);
  counts[0] = 1;
  for (let r = 1; r <= n; r++) {
    const next = new Float64Array(max + 1);
    for (let s = 0; s <= max; s++) {
      if (counts[s] === 0) continue;
      next[s] += counts[s];
      if (s + r <= max) next[s + r] += counts[s];
    }
    counts = next;
  }
  let below = 0;
  for (let s = 0; s <= Math.min(max, Math.floor(t)); s++) below += counts[s];
  return below / 2 ** n;
}

export function wilcoxonSignedRank(differences: readonly number[]): WilcoxonResult {
  const d = differences.filter((v) => Number.isFinite(v));
  const n = d.length;
  const zeros = d.filter((v) => v === 0).length;
  const { ranks } = midRanks(d.map(Math.abs));
  let wPlus = 0;
  let wMinus = 0;
  d.forEach((v, i) => {
    if (v > 0) wPlus += ranks[i];
    else if (v < 0) wMinus += ranks[i];
  });
  const nonZeroRanks = Array.from(ranks).filter((_, i) => d[i] !== 0);
  const tieTerm = midRanks(nonZeroRanks).ties;
  const tieGroups = countTieGroups(nonZeroRanks);
  const statistic = Math.min(wPlus, wMinus);
  const base = { n, zeros, ties: tieGroups, wPlus, wMinus, statistic };
  if (n - zeros === 0) return { ...base, z: null, p: null, method: 'none' };
  if (zeros === 0 && tieGroups === 0 && n <= EXACT_MAX_N) {
    return { ...base, z: null, p: Math.min(1, 2 * exactSignedRankCdf(n, statistic)), method: 'exact' };
  }
  const mean = (n * (n + 1) - zeros * (zeros + 1)) / 4;
  const variance = (n * (n + 1) * (2 * n + 1) - zeros * (zeros + 1) * (2 * zeros + 1)) / 24 - tieTerm / 48;
  const z = variance > 0 ? (statistic - mean) / Math.sqrt(variance) : null;
  return { ...base, z, p: z === null ? null : 2 * normalCdf(-Math.abs(z), 0, 1), method: 'normal approximation (Pratt zeros, tie-corrected)' };
}

function countTieGroups(values: readonly number[]): number {
  const seen = new Map<number, number>();
  for (const v of values) seen.set(v, (seen.get(v) ?? 0) + 1);
  return [...seen.values()].filter((c) => c > 1).length;
}
