import { describe, expect, it } from 'vitest';
import { gwetAc, gwetAc1, gwetAc2Quadratic } from '../../app/stats/gwet-ac.ts';
import { withinWeights } from '../../app/stats/percent-agreement.ts';
import { countsOf, publishedExamples, scale } from './agreement-fixtures.ts';

describe("Gwet's AC1 and AC2: published examples", () => {
  const ex = publishedExamples();

  it('4 raters x 12 subjects with missing ratings (Gwet 2014, p. 120): AC1 0.77544, SE 0.14295, CI (0.46081, 1)', () => {
    // Source: irrCAC (port of Gwet's R package irrCAC), raw.py docstring output to 5 decimals.
    const g = ex.krippendorff_2011.gwet_irrcac;
    const r = gwetAc1(countsOf(ex.krippendorff_2011.ratings, scale(5)));
    expect(r.value).toBeCloseTo(g.ac1, 5);
    expect(r.se).toBeCloseTo(g.ac1_se, 5);
    expect(r.ci95?.[0]).toBeCloseTo(g.ac1_ci95[0], 5);
    expect(r.ci95?.[1]).toBe(1); // cut at 1, as irrCAC reports it
    expect(r.pObserved).toBeCloseTo(g.pa, 5);
    expect(r.pExpected).toBeCloseTo(g.pe, 5);
    expect(r.cases).toBe(12);
  });

  it('the same data with quadratic weights: AC2 0.914, SE 0.104, CI (0.685, 1)', () => {
    // Source: irrCAC test/unit/irrCAC/raw/test_gwet.py, test_gwet_raw4raters_quadratic_weights (3 decimals).
    const g = ex.krippendorff_2011.gwet_irrcac;
    const r = gwetAc2Quadratic(countsOf(ex.krippendorff_2011.ratings, scale(5)));
    expect(r.value).toBeCloseTo(g.ac2_quadratic, 3);
    expect(r.se).toBeCloseTo(g.ac2_quadratic_se, 3);
    expect(r.ci95?.[0]).toBeCloseTo(g.ac2_quadratic_ci95[0], 3);
    expect(r.pObserved).toBeCloseTo(g.ac2_quadratic_pa, 3);
    expect(r.pExpected).toBeCloseTo(g.ac2_quadratic_pe, 3);
  });

  it('5 observers x 15 units on 0..3 (Gwet 2014): AC1 0.497, SE 0.122, CI (0.235, 0.758)', () => {
    // Source: irrCAC test_gwet.py, test_gwet_raw5observers (3 decimals).
    const g = ex.gwet_5_observers;
    const r = gwetAc1(countsOf(g.ratings, g.categories));
    expect(r.value).toBeCloseTo(g.published.ac1, 3);
    expect(r.se).toBeCloseTo(g.published.se, 3);
    expect(r.ci95?.[0]).toBeCloseTo(g.published.ci95[0], 3);
    expect(r.ci95?.[1]).toBeCloseTo(g.published.ci95[1], 3);
    expect(r.pObserved).toBeCloseTo(g.published.pa, 3);
    expect(r.pExpected).toBeCloseTo(g.published.pe, 3);
  });
});

describe("Gwet's AC1 worked by hand", () => {
  it('stays high when one category dominates, where kappa collapses (the paradox AC1 answers)', () => {
    // 20 cases, two readers, both say 5 on 18 and disagree on 2: p_a = 0.9.
    const ratings = [...Array.from({ length: 18 }, () => [5, 5]), [5, 4], [4, 5]];
    const r = gwetAc1(countsOf(ratings, scale(5)));
    expect(r.pObserved).toBeCloseTo(0.9, 15);
    // pi = (0, 0, 0, 0.05, 0.95); p_e = (0.05*0.95 + 0.95*0.05) / 4 = 0.02375
    expect(r.pExpected).toBeCloseTo(0.02375, 15);
    expect(r.value).toBeCloseTo((0.9 - 0.02375) / (1 - 0.02375), 12);
    expect(r.value).toBeGreaterThan(0.89);
  });

  it('depends on the number of scale categories q, not only those used', () => {
    const ratings = [[1, 1], [2, 2], [1, 2]];
    expect(gwetAc1(countsOf(ratings, [1, 2])).value).not.toBeCloseTo(gwetAc1(countsOf(ratings, scale(5))).value, 3);
  });

  it('is undefined with a single category, and AC2 with identity weights is AC1', () => {
    expect(Number.isNaN(gwetAc1(countsOf([[1, 1], [1, 1]], [1])).value)).toBe(true);
    const cc = countsOf([[1, 2, 2], [3, 3, null], [2, 2, 1]], scale(3));
    expect(gwetAc(cc, withinWeights(cc.categories, 0)).value).toBe(gwetAc1(cc).value);
  });
});
