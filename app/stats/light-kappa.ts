/**
 * Light's kappa: the mean of Cohen's kappa over all pairs of readers.
 *
 * Light, R. J. (1971). Measures of response agreement for qualitative data: Some generalizations
 * and alternatives. Psychological Bulletin, 76(5), 365–377. https://doi.org/10.1037/h0031643
 *
 *   κ_Light = (2 / (m (m − 1))) Σ_{a<b} κ_ab
 *
 * over the m readers' pairs, each κ_ab on the cases both readers scored (./cohen-kappa.ts).
 * The same mean of weighted kappas is reported for linear and quadratic weights, as R psych's
 * cohen.kappa does ("average weighted kappa"). Pairs whose kappa is undefined are left out and
 * counted.
 */

export interface LightKappa {
  /** Mean over the pairs with a defined kappa; NaN when there is none. */
  value: number;
  /** Pairs averaged. */
  pairs: number;
  /** Pairs left out because their kappa is undefined. */
  undefinedPairs: number;
}

export function lightKappa(pairKappas: readonly number[]): LightKappa {
  const defined = pairKappas.filter((k) => Number.isFinite(k));
  const value = defined.length === 0 ? Number.NaN : defined.reduce((a, b) => a + b, 0) / defined.length;
  return { value, pairs: defined.length, undefinedPairs: pairKappas.length - defined.length };
}
