/**
 * The JSON shape of the method comparison (types only, no runtime code), so that the API contract
 * can hand it to the renderer. Every number is finite or null.
 */

export interface ScoreSummary {
  n: number;
  mean: number | null;
  sd: number | null;
  median: number | null;
  q1: number | null;
  q3: number | null;
  iqr: number | null;
  /** counts[s − 1] = how many ratings gave score s. */
  counts: number[];
  acceptable: { threshold: number; k: number; share: number | null; ci95: [number, number] | null };
}

export interface WilcoxonResult {
  /** Differences used (non-missing), zeros included. */
  n: number;
  zeros: number;
  /** Tie groups among the non-zero |d|. */
  ties: number;
  wPlus: number;
  wMinus: number;
  /** min(W+, W−). */
  statistic: number;
  z: number | null;
  p: number | null;
  method: 'exact' | 'normal approximation (Pratt zeros, tie-corrected)' | 'none';
}

export interface FriedmanResult {
  blocks: number;
  treatments: number;
  chi2: number | null;
  df: number;
  p: number | null;
  /** Kendall's W = χ² / (b (k − 1)). */
  w: number | null;
}

export interface OrCovariances { variance: number; cov1: number; cov2: number; cov3: number }

export interface ReadingTimeRow {
  method: string;
  session: number;
  n: number;
  missing: number;
  median: number | null;
  q1: number | null;
  q3: number | null;
  mean: number | null;
  sd: number | null;
}

export interface DescriptiveRow extends ScoreSummary { method: string; question: string; readers: number; cases: number }

export interface MrmcJson {
  estimate: number;
  se: number | null;
  df: number | null;
  ci95: [number, number] | null;
  p: number | null;
  readers: number;
  cases: number;
  msTR: number;
  covariances: OrCovariances;
}

export interface PairComparison {
  question: string;
  /** The difference is a − b. */
  a: string;
  b: string;
  vsStandard: boolean;
  /** Cases with a reader-averaged score under both methods. */
  cases: number;
  meanDifference: number | null;
  wilcoxon: WilcoxonResult;
  pHolm: number | null;
  pHolmStandard: number | null;
  mrmc: MrmcJson | null;
  bootstrap: { estimate: number; ci95: [number, number] | null; se: number | null; resamples: number } | null;
}

export interface NonInferiority {
  question: string;
  method: string;
  standard: string;
  margin: number;
  estimate: number;
  lower: number | null;
  p: number | null;
  noninferior: boolean | null;
}

export interface ComparisonReport {
  methods: string[];
  questions: string[];
  acceptable: number;
  compareTo: string | null;
  margin: number | null;
  seed: number;
  resamples: number;
  descriptives: DescriptiveRow[];
  pairs: PairComparison[];
  friedman: ({ question: string } & FriedmanResult)[];
  noninferiority: NonInferiority[];
  readingTime: ReadingTimeRow[];
  notes: string[];
}
