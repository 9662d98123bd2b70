/**
 * Descriptive statistics of the scores of one method and question.
 *
 *   mean x̄ = Σ x / n,  SD = sqrt( Σ (x − x̄)² / (n − 1) )  (sample SD)
 *   median, quartiles: type 7 quantiles (Hyndman & Fan 1996, "Sample quantiles in statistical
 *     packages", The American Statistician 50(4):361–365; R's and NumPy's default), IQR = Q3 − Q1
 *   distribution: count of each score 1..points
 *   acceptable: share of scores ≥ the threshold (template `analysis.acceptable`, default 3) with
 *     its Wilson 95% interval (./wilson.ts)
 *
 * Every rating counts once (readers × cases pooled); the intervals that account for readers and
 * cases as random are in ./or-mrmc.ts.
 */
import { quantileSorted } from '../bootstrap.ts';
import { wilsonInterval } from './wilson.ts';
import type { ScoreSummary } from './comparison-types.ts';
export type { ScoreSummary };

export function describeScores(scores: readonly number[], points: number, threshold: number): ScoreSummary {
  const n = scores.length;
  const counts = Array.from({ length: points }, () => 0);
  for (const s of scores) if (s >= 1 && s <= points) counts[s - 1]++;
  const k = scores.filter((s) => s >= threshold).length;
  const acceptable = { threshold, k, share: n > 0 ? k / n : null, ci95: wilsonInterval(k, n) };
  if (n === 0) return { n, mean: null, sd: null, median: null, q1: null, q3: null, iqr: null, counts, acceptable };
  const mean = scores.reduce((a, b) => a + b, 0) / n;
  const sd = n > 1 ? Math.sqrt(scores.reduce((a, b) => a + (b - mean) ** 2, 0) / (n - 1)) : null;
  const sorted = Float64Array.from(scores).sort();
  const q1 = quantileSorted(sorted, 0.25);
  const q3 = quantileSorted(sorted, 0.75);
  return { n, mean, sd, median: quantileSorted(sorted, 0.5), q1, q3, iqr: q3 - q1, counts, acceptable };
}
