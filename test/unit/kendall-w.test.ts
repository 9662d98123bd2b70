import { describe, expect, it } from 'vitest';
import { chiSquareUpperTail, kendallW, midRanks } from '../../app/stats/kendall-w.ts';
import { completeRows, psychSets, ratingSets } from './agreement-fixtures.ts';

describe("Kendall's W against scipy and R", () => {
  const psych = psychSets().sets;
  ratingSets().sets.forEach((set, s) => {
    it(`${set.name}: W, chi-square with tie correction, df and p on the complete cases`, () => {
      const w = kendallW(completeRows(set.ratings));
      // Source: scipy.stats.friedmanchisquare (agreement-sets.json), W = chi2 / (m (n - 1)).
      const ref = set.kendall_w_scipy;
      expect(w.cases).toBe(ref.cases);
      expect(w.readers).toBe(ref.readers);
      expect(w.df).toBe(ref.df);
      expect(Math.abs(w.value - ref.value)).toBeLessThan(1e-9);
      expect(Math.abs(w.chi2 - ref.chi2)).toBeLessThan(1e-9 * Math.max(1, ref.chi2));
      expect(Math.abs(w.p - ref.p)).toBeLessThan(1e-9);
      // Source: R stats::friedman.test (agreement-sets-psych.json).
      expect(Math.abs(w.chi2 - psych[s].kendall_w.chi2)).toBeLessThan(1e-9 * Math.max(1, ref.chi2));
      expect(Math.abs(w.p - psych[s].kendall_w.p)).toBeLessThan(1e-9);
    });
  });
});

describe("Kendall's W worked by hand", () => {
  it('three readers in full agreement over four cases: W = 1; reversed pair of two: W = 0', () => {
    expect(kendallW([[1, 1, 1], [2, 2, 2], [3, 3, 3], [4, 4, 4]]).value).toBeCloseTo(1, 15);
    expect(kendallW([[1, 2], [2, 1]]).value).toBeCloseTo(0, 15);
  });

  it('mid-ranks and the tie term: scores 5,3,3,1 rank 4, 2.5, 2.5, 1 with T = 2^3 - 2 = 6', () => {
    const r = midRanks([5, 3, 3, 1]);
    expect(Array.from(r.ranks)).toEqual([4, 2.5, 2.5, 1]);
    expect(r.ties).toBe(6 + 0); // one pair tied; singletons add 1 - 1 = 0
  });

  it('is undefined when every reader gives every case the same score', () => {
    expect(Number.isNaN(kendallW([[3, 3], [3, 3], [3, 3]]).value)).toBe(true);
  });

  it('keeps small p values (chi-square upper tail from the incomplete gamma function)', () => {
    // Source: R 4.2 pchisq(200, 10, lower.tail = FALSE) = 1.613931e-37 (printed to 7 digits), where 1 - cdf gives 0.
    const p = chiSquareUpperTail(200, 10);
    expect(p / 1.613931e-37).toBeCloseTo(1, 6);
    expect(chiSquareUpperTail(0, 3)).toBe(1);
  });

  it('needs two cases and two readers', () => {
    expect(() => kendallW([[1, 2]])).toThrow(/two complete cases/);
    expect(() => kendallW([[1], [2]])).toThrow(/two readers/);
  });
});
