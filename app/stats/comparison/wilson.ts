/**
 * Wilson score interval for a binomial proportion.
 *
 * Wilson, E. B. (1927). Probable inference, the law of succession, and statistical inference.
 *   Journal of the American Statistical Association, 22(158), 209–212. https://doi.org/10.2307/2276774
 * Brown, L. D., Cai, T. T., & DasGupta, A. (2001). Interval estimation for a binomial proportion.
 *   Statistical Science, 16(2), 101–133 (recommends it over the Wald interval for small n).
 *
 * With k successes in n trials, p̂ = k/n and z = z_{1−α/2}:
 *
 *   centre = (p̂ + z²/(2n)) / (1 + z²/n)
 *   half   = z / (1 + z²/n) · sqrt( p̂(1 − p̂)/n + z²/(4n²) )
 *   CI     = [centre − half, centre + half]
 *
 * Checked against statsmodels proportion_confint(method='wilson') (test/reference/comparison/).
 */
import normalQuantile from '@stdlib/stats-base-dists-normal-quantile';

export function wilsonInterval(k: number, n: number, level = 0.95): [number, number] | null {
  if (!(n > 0) || k < 0 || k > n) return null;
  const z = normalQuantile(1 - (1 - level) / 2, 0, 1);
  const p = k / n;
  const z2 = z * z;
  const denom = 1 + z2 / n;
  const centre = (p + z2 / (2 * n)) / denom;
  const half = (z / denom) * Math.sqrt((p * (1 - p)) / n + z2 / (4 * n * n));
  return [Math.max(0, centre - half), Math.min(1, centre + half)];
}
