/**
 * Friedman's test across all methods, with Kendall's W as its effect size.
 *
 * Friedman, M. (1937). The use of ranks to avoid the assumption of normality implicit in the
 *   analysis of variance. JASA, 32(200), 675–701. https://doi.org/10.2307/2279372
 * Kendall, M. G., & Babington Smith, B. (1939), for W (see ../kendall-w.ts).
 *
 * Blocks are cases (reader-averaged score of each case under each method), treatments the k
 * methods. Within each of the b complete blocks the methods are ranked (mid-ranks for ties);
 * with R_j the rank sum of method j and T = Σ_blocks Σ_groups (t³ − t):
 *
 *   χ²_F = [12 / (b k (k+1)) Σ_j R_j² − 3 b (k+1)] / [1 − T / (b k (k² − 1))]  on k − 1 df
 *   W    = χ²_F / (b (k − 1))
 *
 * This is Kendall's W with the blocks as the "readers" that rank the methods, so the computation
 * is ../kendall-w.ts on the transposed table. Checked against scipy.stats.friedmanchisquare.
 */
import { kendallW } from '../kendall-w.ts';
import type { FriedmanResult } from './comparison-types.ts';
export type { FriedmanResult };

const finite = (v: number): number | null => (Number.isFinite(v) ? v : null);

/** `blocks[b][j]`: block b's value under treatment j; only complete blocks are passed. */
export function friedmanTest(blocks: ReadonlyArray<ReadonlyArray<number>>): FriedmanResult {
  const b = blocks.length;
  const k = b > 0 ? blocks[0].length : 0;
  if (b < 2 || k < 2) return { blocks: b, treatments: k, chi2: null, df: Math.max(0, k - 1), p: null, w: null };
  const treatmentsByBlocks = Array.from({ length: k }, (_, j) => blocks.map((row) => row[j]));
  const r = kendallW(treatmentsByBlocks);
  return { blocks: b, treatments: k, chi2: finite(r.chi2), df: r.df, p: finite(r.p), w: finite(r.value) };
}
