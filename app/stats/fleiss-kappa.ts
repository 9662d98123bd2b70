/**
 * Fleiss' kappa: agreement of many raters on a nominal scale.
 *
 * Fleiss, J. L. (1971). Measuring nominal scale agreement among many raters.
 * Psychological Bulletin, 76(5), 378–382. https://doi.org/10.1037/h0031619
 *
 * N subjects are each rated by the same number n of raters into one of k categories.
 * With n_ij the number of raters who put subject i into category j:
 *
 *   p_j  = (1 / (N n)) Σ_i n_ij                     share of all ratings in category j
 *   P_i  = (Σ_j n_ij² − n) / (n (n − 1))            agreeing rater pairs on subject i
 *   P̄    = (1 / N) Σ_i P_i                          observed agreement   (pObserved)
 *   P̄_e  = Σ_j p_j²                                 agreement by chance  (pExpected)
 *   κ    = (P̄ − P̄_e) / (1 − P̄_e)
 *
 * The raters need not be the same people for every subject; only their number is fixed.
 * Categories are nominal: a 4 against a 5 is as much a disagreement as a 1 against a 5.
 * A category nobody used has p_j = 0 and changes nothing, so listing the full scale only
 * serves to reject scores outside it.
 *
 * κ is undefined (NaN here) when every rating falls into one category (P̄_e = 1).
 *
 * Confidence interval: percentile bootstrap over subjects (./bootstrap.ts). `fleissKappaWeighted`
 * evaluates κ with subject i counted w_i times — P̄ = Σ w_i P_i / Σ w_i and
 * p_j = Σ w_i n_ij / (n Σ w_i) — so a resample needs no copy of the data.
 */
import type { CategoryCounts } from './rating-matrix.ts';

export interface FleissKappa {
  /** Fleiss' κ; NaN when all ratings fall into a single category. */
  kappa: number;
  /** Subjects used (complete cases). */
  subjects: number;
  /** Raters per subject (n). */
  raters: number;
  /** Mean observed agreement P̄. */
  pObserved: number;
  /** Chance agreement P̄_e. */
  pExpected: number;
}

/**
 * Fleiss' κ from a count matrix: `counts[i][j]` is the number of raters who put subject i into
 * category j. Every row must sum to the same number of raters n ≥ 2.
 */
export function fleissKappaFromCounts(counts: ReadonlyArray<ReadonlyArray<number>>): FleissKappa {
  const N = counts.length;
  if (N === 0) throw new RangeError('Fleiss kappa needs at least one subject');
  const k = counts[0].length;
  if (k === 0) throw new RangeError('Fleiss kappa needs at least one category');
  let n = -1;
  const totals = new Array<number>(k).fill(0);
  let sumP = 0;
  counts.forEach((row, i) => {
    if (row.length !== k) {
      throw new RangeError(`subject ${i + 1} has ${row.length} category counts, expected ${k}`);
    }
    let ni = 0;
    let squares = 0;
    row.forEach((c, j) => {
      if (!Number.isInteger(c) || c < 0) {
        throw new RangeError(`subject ${i + 1}, category ${j + 1}: count ${c} is not a whole number ≥ 0`);
      }
      ni += c;
      squares += c * c;
      totals[j] += c;
    });
    if (n === -1) n = ni;
    if (ni !== n) {
      throw new RangeError(`subject ${i + 1} has ${ni} ratings, subject 1 has ${n}: every subject needs the same number of raters`);
    }
    if (n < 2) throw new RangeError(`Fleiss kappa needs at least two raters per subject, got ${n}`);
    sumP += (squares - n) / (n * (n - 1));
  });
  const pObserved = sumP / N;
  const pExpected = totals.reduce((acc, t) => acc + (t / (N * n)) ** 2, 0);
  const kappa = pExpected === 1 ? Number.NaN : (pObserved - pExpected) / (1 - pExpected);
  return { kappa, subjects: N, raters: n, pObserved, pExpected };
}

/**
 * Fleiss' κ from a rating matrix: `ratings[i][j]` is rater j's category for subject i.
 * Subjects with a missing rating (null or NaN) are dropped; `subjects` tells how many were used.
 * `categories` defaults to the categories observed among the complete subjects; when given, a
 * rating outside it is an error.
 */
export function fleissKappa(
  ratings: ReadonlyArray<ReadonlyArray<number | null>>,
  categories?: readonly number[],
): FleissKappa {
  if (ratings.length === 0) throw new RangeError('Fleiss kappa needs at least one subject');
  const raters = ratings[0].length;
  ratings.forEach((row, i) => {
    if (row.length !== raters) {
      throw new RangeError(`subject ${i + 1} has ${row.length} rating slots, subject 1 has ${raters}: give one column per rater`);
    }
  });
  const isComplete = (row: ReadonlyArray<number | null>): row is number[] =>
    row.every((v) => v !== null && !Number.isNaN(v));
  const complete: { row: readonly number[]; subject: number }[] = [];
  ratings.forEach((row, i) => {
    if (isComplete(row)) complete.push({ row, subject: i + 1 });
  });
  if (complete.length === 0) throw new RangeError('Fleiss kappa: no subject was rated by every rater');

  const cats = categories
    ? [...categories]
    : [...new Set(complete.flatMap((c) => c.row))].sort((a, b) => a - b);
  const index = new Map(cats.map((c, j) => [c, j]));
  if (index.size !== cats.length) throw new RangeError('Fleiss kappa: categories must not repeat');
  const counts = complete.map(({ row, subject }) => {
    const out = new Array<number>(cats.length).fill(0);
    for (const v of row) {
      const j = index.get(v);
      if (j === undefined) {
        throw new RangeError(`Fleiss kappa: subject ${subject} has rating ${v}, which is not one of the categories ${cats.join(', ')}`);
      }
      out[j] += 1;
    }
    return out;
  });
  return fleissKappaFromCounts(counts);
}

/**
 * Fleiss' κ over the subjects rated by exactly `raters` readers (complete cases), subject i counted
 * `weights[i]` times; the returned function is for repeated use (the bootstrap), with each
 * subject's P_i computed once. NaN when no such subject is drawn or P̄_e = 1.
 */
export function weightedFleissKappa(cc: CategoryCounts, raters: number): (weights: ArrayLike<number>) => number {
  const q = cc.categories.length;
  const completeList: number[] = [];
  for (let i = 0; i < cc.subjects; i++) if (cc.rated[i] === raters) completeList.push(i);
  const subject = Int32Array.from(completeList);
  const agreement = Float64Array.from(completeList, (i) => {
    let squares = 0;
    for (let j = 0; j < q; j++) squares += cc.counts[i * q + j] ** 2;
    return (squares - raters) / (raters * (raters - 1));
  });
  const totals = new Float64Array(q);
  return (weights) => {
    totals.fill(0);
    let sumW = 0;
    let sumP = 0;
    for (let k = 0; k < subject.length; k++) {
      const i = subject[k];
      const w = weights[i];
      if (w === 0) continue;
      for (let j = 0; j < q; j++) totals[j] += w * cc.counts[i * q + j];
      sumP += w * agreement[k];
      sumW += w;
    }
    if (sumW === 0) return Number.NaN;
    let pExpected = 0;
    for (let j = 0; j < q; j++) pExpected += (totals[j] / (sumW * raters)) ** 2;
    return pExpected === 1 ? Number.NaN : (sumP / sumW - pExpected) / (1 - pExpected);
  };
}

/** Fleiss' κ over the complete subjects, subject i counted `weights[i]` times. */
export function fleissKappaWeighted(cc: CategoryCounts, raters: number, weights: ArrayLike<number>): number {
  return weightedFleissKappa(cc, raters)(weights);
}
