/**
 * Typed access to the reference fixtures under test/reference/agreement/ (made by make-fixtures.py
 * with statsmodels, scipy and NLTK, and make-fixtures.R with R psych; see the scripts' headers).
 */
import { readFileSync } from 'node:fs';
import type { TidyRow } from '../../app/report/tidy-csv.ts';
import type { IccForm } from '../../app/stats/icc.ts';
import { categoryCounts, ratingMatrix, type CategoryCounts } from '../../app/stats/rating-matrix.ts';

export function agreementFixture<T>(name: string): T {
  return JSON.parse(readFileSync(new URL(`../reference/agreement/${name}.json`, import.meta.url), 'utf8')) as T;
}

export type Ratings = (number | null)[][];
export interface KappaRef { value: number; se: number; ci95: [number, number] }

export interface RatingSet {
  name: string;
  source: string;
  points: number;
  ratings: Ratings;
  cohen_pairs_statsmodels: { readers: [number, number]; n: number; unweighted: KappaRef; linear: KappaRef; quadratic: KappaRef }[];
  fleiss_statsmodels: { cases: number; value: number };
  kendall_w_scipy: { cases: number; readers: number; chi2: number; p: number; df: number; value: number };
  krippendorff_alpha_nltk: { nominal: number; ordinal: number; interval: number };
}

export interface PsychSet {
  name: string;
  cohen_pairs: { readers: [number, number]; n: number; unweighted: KappaRef; quadratic: { value: number } }[];
  light_kappa: { unweighted: number; quadratic: number };
  icc: { cases: number; forms: Record<IccForm, { value: number; ci95: [number, number] }> };
  kendall_w: { chi2: number; p: number; df: number; value: number };
}

export function ratingSets(): { generator: string; sets: RatingSet[] } {
  return agreementFixture('agreement-sets');
}

export function psychSets(): { generator: string; sets: PsychSet[] } {
  return agreementFixture('agreement-sets-psych');
}

export function publishedExamples(): {
  generator: string;
  krippendorff_2011: {
    ratings: Ratings;
    published: { nominal: number; ordinal: number; interval: number };
    nltk: { nominal: number; ordinal: number; interval: number };
    gwet_irrcac: {
      ac1: number; ac1_se: number; ac1_ci95: [number, number]; pa: number; pe: number;
      ac2_quadratic: number; ac2_quadratic_se: number; ac2_quadratic_ci95: [number, number]; ac2_quadratic_pa: number; ac2_quadratic_pe: number;
    };
  };
  krippendorff_3x15: { ratings: Ratings; published: { nominal: number; interval: number }; nltk: { nominal: number; ordinal: number; interval: number } };
  gwet_5_observers: { categories: number[]; ratings: Ratings; published: { ac1: number; se: number; ci95: [number, number]; pa: number; pe: number } };
  cohen_1968: {
    table: number[][];
    disagreement_weights: number[][];
    published: { kappa: number; weighted: number };
    statsmodels: { unweighted: KappaRef; weighted: KappaRef };
  };
  sas_table: {
    table: number[][];
    published: { unweighted: KappaRef; linear: KappaRef };
    statsmodels: { unweighted: KappaRef; linear: KappaRef };
  };
} {
  return agreementFixture('published-examples');
}

/** Category counts of a cases × readers table over 1..points (or the given categories). */
export function countsOf(ratings: Ratings, categories: number[]): CategoryCounts {
  return categoryCounts(ratingMatrix(ratings), categories);
}

export function scale(points: number): number[] {
  return Array.from({ length: points }, (_, i) => i + 1);
}

/** One reader's column, NaN where missing. */
export function column(ratings: Ratings, reader: number): Float64Array {
  return Float64Array.from(ratings, (row) => row[reader] ?? Number.NaN);
}

/** A cases × readers table as tidy rows (null = no row); readers R1.., cases c01... */
export function tidyRows(ratings: Ratings, method: string, question: string): TidyRow[] {
  const rows: TidyRow[] = [];
  ratings.forEach((row, i) =>
    row.forEach((score, j) => {
      if (score !== null) rows.push({ case: `c${String(i + 1).padStart(2, '0')}`, reader: `R${j + 1}`, method, question, score });
    }),
  );
  return rows;
}

export function completeRows(ratings: Ratings): number[][] {
  return ratings.filter((r) => r.every((v) => v !== null)) as number[][];
}
