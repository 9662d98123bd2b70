import { describe, expect, it } from 'vitest';
import { ALPHA_LEVELS, krippendorffAlpha, krippendorffAlphaWeighted } from '../../app/stats/krippendorff-alpha.ts';
import { countsOf, publishedExamples, ratingSets, scale, type Ratings } from './agreement-fixtures.ts';

describe("Krippendorff's alpha: published worked examples", () => {
  const ex = publishedExamples();

  it('Krippendorff (2011) reliability data, 4 observers x 12 units with missing values', () => {
    // Source: Krippendorff (2011) "Computing Krippendorff's Alpha-Reliability": nominal .743, ordinal .815,
    // interval .849 (ordinal as asserted in fast-krippendorff's tests; nominal and interval from memory),
    // and NLTK's AnnotationTask.alpha on the same data to 1e-9 (published-examples.json).
    const k = ex.krippendorff_2011;
    const a = krippendorffAlpha(countsOf(k.ratings, scale(5)));
    for (const level of ALPHA_LEVELS) {
      expect(a[level]).toBeCloseTo(k.published[level], 3);
      expect(Math.abs(a[level] - k.nltk[level]), level).toBeLessThan(1e-9);
    }
    expect(a.units).toBe(11); // unit 12 has a single value: not pairable
    expect(a.values).toBe(40);
  });

  it("a second example, 3 coders x 15 units: nominal 0.691358, interval 0.810845", () => {
    // Source: values asserted (6 decimals) in fast-krippendorff's tests/test_krippendorff.py; NLTK to 1e-9.
    const k = ex.krippendorff_3x15;
    const a = krippendorffAlpha(countsOf(k.ratings, [1, 2, 3, 4]));
    expect(a.nominal).toBeCloseTo(k.published.nominal, 6);
    expect(a.interval).toBeCloseTo(k.published.interval, 6);
    for (const level of ALPHA_LEVELS) expect(Math.abs(a[level] - k.nltk[level]), level).toBeLessThan(1e-9);
  });
});

describe("Krippendorff's alpha: invented sets against NLTK", () => {
  for (const set of ratingSets().sets) {
    it(`${set.name}: nominal, ordinal, interval`, () => {
      // Source: NLTK AnnotationTask.alpha (agreement-sets.json; ordinal with Krippendorff's difference function).
      const a = krippendorffAlpha(countsOf(set.ratings, scale(set.points)));
      for (const level of ALPHA_LEVELS) {
        expect(Math.abs(a[level] - set.krippendorff_alpha_nltk[level]), level).toBeLessThan(1e-9);
      }
    });
  }
});

describe("Krippendorff's alpha: weights and edge cases", () => {
  const data: Ratings = [[1, 2, 2], [3, 3, null], [2, 2, 2], [4, 3, 5], [1, null, null], [5, 4, 5]];

  it('a unit counted twice equals the unit written twice (how the bootstrap uses it)', () => {
    const weighted = krippendorffAlphaWeighted(countsOf(data, scale(5)), [2, 1, 0, 1, 3, 1]);
    const copied = krippendorffAlpha(countsOf([data[0], data[0], data[1], data[3], data[4], data[4], data[4], data[5]], scale(5)));
    for (const level of ALPHA_LEVELS) expect(weighted[level]).toBeCloseTo(copied[level], 12);
  });

  it('does not depend on unused categories', () => {
    const a = krippendorffAlpha(countsOf(data, scale(5)));
    const b = krippendorffAlpha(countsOf(data, scale(9)));
    for (const level of ALPHA_LEVELS) expect(b[level]).toBeCloseTo(a[level], 12);
  });

  it('is 1 under perfect agreement and undefined with a single value or nothing pairable', () => {
    expect(krippendorffAlpha(countsOf([[1, 1], [2, 2], [3, 3]], scale(3))).interval).toBe(1);
    expect(Number.isNaN(krippendorffAlpha(countsOf([[2, 2], [2, 2]], scale(3))).nominal)).toBe(true);
    const none = krippendorffAlpha(countsOf([[1, null], [null, 2]], scale(3)));
    expect(none.units).toBe(0);
    expect(Number.isNaN(none.ordinal)).toBe(true);
  });
});
