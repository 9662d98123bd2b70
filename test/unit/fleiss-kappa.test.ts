import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { fleissKappa, fleissKappaFromCounts, fleissKappaWeighted } from '../../app/stats/fleiss-kappa.ts';
import { categoryCounts, ratingMatrix } from '../../app/stats/rating-matrix.ts';

function fixture<T>(name: string): T {
  return JSON.parse(readFileSync(new URL(`../reference/agreement/${name}.json`, import.meta.url), 'utf8')) as T;
}

interface RatingsFixture {
  generator: string;
  categories: number[];
  ratings: (number | null)[][];
  counts: number[][];
  subjects: number;
  raters: number;
  kappa: number;
  kappa_irr_kappam_fleiss?: number;
  kappa_published?: number;
}

describe('fleissKappa: Fleiss (1971) 30 patients x 6 psychiatrists x 5 diagnoses', () => {
  const ref = fixture<RatingsFixture>('fleiss-diagnoses');

  it('uses the diagnoses table as R irr documents it', () => {
    // Source: irr's help page for `diagnoses` (https://rdrr.io/cran/irr/man/diagnoses.html), example
    // output of table(diagnoses[,1]): rater 1 gave diagnoses 1..5 to 13, 10, 2, 1, 4 patients.
    const tally = [1, 2, 3, 4, 5].map((c) => ref.ratings.filter((row) => row[0] === c).length);
    expect(tally).toEqual([13, 10, 2, 1, 4]);
    expect(ref.ratings).toHaveLength(30);
  });

  it('reproduces the published kappa and the reference libraries', () => {
    const r = fleissKappa(ref.ratings, ref.categories);
    expect(r.subjects).toBe(30);
    expect(r.raters).toBe(6);
    // Source: Fleiss (1971) reports kappa = .430 (value as quoted in the Veil brief, from memory).
    expect(r.kappa).toBeCloseTo(ref.kappa_published as number, 3);
    // Source: R irr::kappam.fleiss(diagnoses) = 0.4302445, as recorded in statsmodels' test suite.
    expect(Math.abs(r.kappa - (ref.kappa_irr_kappam_fleiss as number))).toBeLessThan(5e-8);
    // Source: statsmodels fleiss_kappa, test/reference/agreement/fleiss-diagnoses.json.
    expect(ref.generator).toMatch(/statsmodels/);
    expect(Math.abs(r.kappa - ref.kappa)).toBeLessThan(1e-12);
  });

  it('gives the same kappa from the count matrix', () => {
    // Source: counts made by statsmodels aggregate_raters (fleiss-diagnoses.json).
    const r = fleissKappaFromCounts(ref.counts);
    expect(Math.abs(r.kappa - ref.kappa)).toBeLessThan(1e-12);
    expect(r.raters).toBe(6);
  });
});

describe('fleissKappaFromCounts: Wikipedia worked example, 10 subjects x 14 raters', () => {
  const ref = fixture<{ counts: number[][]; kappa: number; kappa_published: number; perSubjectAgreement_published: number[] }>(
    'fleiss-counts-wikipedia',
  );

  it('matches statsmodels and the published 0.210', () => {
    const r = fleissKappaFromCounts(ref.counts);
    // Source: statsmodels fleiss_kappa on the same table (fleiss-counts-wikipedia.json).
    expect(Math.abs(r.kappa - ref.kappa)).toBeLessThan(1e-12);
    // Source: Wikipedia "Fleiss' kappa" worked example, kappa = 0.210 (as quoted in statsmodels' tests).
    expect(r.kappa).toBeCloseTo(ref.kappa_published, 3);
    expect(r.subjects).toBe(10);
    expect(r.raters).toBe(14);
    // Source: the article's per-subject P_i (3 decimals, statsmodels' table0); their mean is P-bar.
    const pi = ref.perSubjectAgreement_published;
    expect(r.pObserved).toBeCloseTo(pi.reduce((a, b) => a + b, 0) / pi.length, 3);
  });
});

describe('fleissKappa: random ratings with missing values', () => {
  const ref = fixture<RatingsFixture>('fleiss-random');

  it('drops incomplete subjects and matches statsmodels on the rest', () => {
    // Source: statsmodels fleiss_kappa on the complete rows (fleiss-random.json).
    const r = fleissKappa(ref.ratings, ref.categories);
    expect(r.subjects).toBe(ref.subjects);
    expect(r.subjects).toBe(47);
    expect(r.raters).toBe(ref.raters);
    expect(Math.abs(r.kappa - ref.kappa)).toBeLessThan(1e-12);
  });

  it('does not depend on listing unused categories', () => {
    const inferred = fleissKappa(ref.ratings);
    const wide = fleissKappa(ref.ratings, [0, 1, 2, 3, 4, 5, 6, 7]);
    expect(inferred.kappa).toBeCloseTo(ref.kappa, 12);
    expect(wide.kappa).toBeCloseTo(ref.kappa, 12);
  });
});

describe('fleissKappa: small cases worked by hand from the formula', () => {
  it('is 1 under perfect agreement and NaN when one category takes every rating', () => {
    const perfect = fleissKappa([
      [1, 1, 1],
      [2, 2, 2],
      [3, 3, 3],
    ]);
    expect(perfect.kappa).toBe(1);
    expect(perfect.pObserved).toBe(1);
    expect(perfect.pExpected).toBeCloseTo(1 / 3, 15);
    const flat = fleissKappa([
      [4, 4],
      [4, 4],
    ]);
    expect(Number.isNaN(flat.kappa)).toBe(true);
  });

  it('two raters, two subjects that split: P = 0, Pe = 1/2, kappa = -1', () => {
    // P_i = (1 + 1 - 2) / (2 * 1) = 0 for both; p = (1/2, 1/2) so Pe = 1/2; kappa = (0 - 1/2)/(1/2).
    const r = fleissKappa([
      [1, 2],
      [2, 1],
    ]);
    expect(r.pObserved).toBe(0);
    expect(r.pExpected).toBe(0.5);
    expect(r.kappa).toBe(-1);
  });

  it('rejects bad input with a message', () => {
    expect(() => fleissKappa([[1], [2]])).toThrow(/two raters/);
    expect(() => fleissKappa([[1, null]])).toThrow(/no subject was rated by every rater/);
    expect(() => fleissKappa([[1, 2], [1]])).toThrow(/subject 2/);
    expect(() => fleissKappa([[null, 1], [1, 6]], [1, 2, 3, 4, 5])).toThrow(/subject 2 has rating 6/);
    expect(() => fleissKappaFromCounts([[2, 1], [1, 1]])).toThrow(/same number of raters/);
  });
});

describe('fleissKappaWeighted: the form the bootstrap uses', () => {
  it('with every subject once equals the count-matrix kappa; a subject counted twice equals it written twice', () => {
    // Source: statsmodels fleiss_kappa on the complete rows (fleiss-random.json).
    const ref = fixture<RatingsFixture>('fleiss-random');
    const cc = categoryCounts(ratingMatrix(ref.ratings), ref.categories);
    const ones = new Array<number>(cc.subjects).fill(1);
    expect(Math.abs(fleissKappaWeighted(cc, ref.raters, ones) - ref.kappa)).toBeLessThan(1e-12);
    const weights = ones.map((_, i) => (i % 3 === 0 ? 2 : i % 3 === 1 ? 0 : 1));
    const copied = ref.ratings.flatMap((row, i) => Array.from({ length: weights[i] }, () => row));
    expect(fleissKappaWeighted(cc, ref.raters, weights)).toBeCloseTo(fleissKappa(copied, ref.categories).kappa, 12);
    expect(Number.isNaN(fleissKappaWeighted(cc, ref.raters, ones.map(() => 0)))).toBe(true);
  });
});
