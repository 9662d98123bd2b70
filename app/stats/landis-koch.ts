/**
 * Words for kappa-type coefficients after the benchmarks of Landis & Koch (1977).
 *
 * Landis, J. R., & Koch, G. G. (1977). The measurement of observer agreement for categorical
 * data. Biometrics, 33(1), 159–174. https://doi.org/10.2307/2529310
 *
 *   < 0.00 poor · 0.00–0.20 slight · 0.21–0.40 fair · 0.41–0.60 moderate ·
 *   0.61–0.80 substantial · 0.81–1.00 almost perfect
 *
 * (Bands as commonly quoted; from memory, the paper was not consulted here. The printed bands
 * leave gaps such as 0.20–0.21; we cut at 0.20, 0.40, 0.60 and 0.80, each cut belonging to the
 * lower band, which is common practice.) The authors offered these as a
 * convention, "clearly arbitrary"; they are not a test and not a property of the data, so every
 * place that shows a word also says it is a convention.
 */

export const INTERPRETATION_CONVENTION =
  'Landis & Koch (1977) benchmarks for kappa-type coefficients: <0 poor, 0-0.20 slight, 0.21-0.40 fair, ' +
  '0.41-0.60 moderate, 0.61-0.80 substantial, 0.81-1 almost perfect. A convention, not a test.';

export type LandisKochWord = 'poor' | 'slight' | 'fair' | 'moderate' | 'substantial' | 'almost perfect';

export function landisKoch(value: number | null): LandisKochWord | null {
  if (value === null || !Number.isFinite(value)) return null;
  // A value within floating-point noise of 0 (e.g. -1e-17 where p_o = p_e) is 0, not "poor".
  if (value < -1e-12) return 'poor';
  if (value <= 0.2) return 'slight';
  if (value <= 0.4) return 'fair';
  if (value <= 0.6) return 'moderate';
  if (value <= 0.8) return 'substantial';
  return 'almost perfect';
}
