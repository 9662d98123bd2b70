import { describe, expect, it } from 'vitest';
import { fleissKappa } from '../../app/stats/fleiss-kappa.ts';
import { percentAgreement } from '../../app/stats/percent-agreement.ts';
import { agreementFixture, countsOf, publishedExamples, scale } from './agreement-fixtures.ts';

describe('percent agreement', () => {
  it("with missing ratings equals Gwet's p_a: 0.81818 on the 4 x 12 reliability data", () => {
    // Source: irrCAC raw.py docstring, pa = 0.81818 for AC1 on raw_4raters (Gwet 2014, p. 120).
    const ex = publishedExamples().krippendorff_2011;
    const p = percentAgreement(countsOf(ex.ratings, scale(5)));
    expect(p.exact).toBeCloseTo(ex.gwet_irrcac.pa, 5);
    expect(p.cases).toBe(11);
  });

  it("on complete data equals Fleiss' observed agreement P-bar (Fleiss 1971 diagnoses)", () => {
    // Source: Fleiss (1971) table as in fleiss-diagnoses.json; P-bar from our Fleiss module, which is
    // checked against statsmodels there.
    const ref = agreementFixture<{ ratings: number[][] }>('fleiss-diagnoses');
    const p = percentAgreement(countsOf(ref.ratings, scale(5)));
    expect(p.exact).toBeCloseTo(fleissKappa(ref.ratings, scale(5)).pObserved, 14);
  });

  it('two readers: the share of cases with the same score, and within one point (worked by hand)', () => {
    const ratings = [[1, 1], [2, 3], [4, 2], [5, 5], [3, null]];
    const p = percentAgreement(countsOf(ratings, scale(5)));
    expect(p.exact).toBe(0.5); // 2 of 4 cases scored by both
    expect(p.withinOne).toBe(0.75); // |2-3| = 1 counts, |4-2| = 2 does not
    expect(p.cases).toBe(4);
  });

  it('three readers: a case with scores 2, 2, 3 has one agreeing pair of three', () => {
    const p = percentAgreement(countsOf([[2, 2, 3]], scale(3)));
    expect(p.exact).toBeCloseTo(1 / 3, 15);
    expect(p.withinOne).toBe(1);
  });
});
