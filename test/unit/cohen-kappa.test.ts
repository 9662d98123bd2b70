import { describe, expect, it } from 'vitest';
import { cohenKappa, cohenKappaFromTable, crossTable, kappaWeights, KAPPA_WEIGHTINGS } from '../../app/stats/cohen-kappa.ts';
import { column, psychSets, publishedExamples, ratingSets, scale } from './agreement-fixtures.ts';

const clamp = (ci: [number, number]): [number, number] => [Math.max(-1, ci[0]), Math.min(1, ci[1])];
const flat = (t: number[][]): number[] => t.flat();

describe("Cohen's kappa: published worked examples", () => {
  const ex = publishedExamples();

  it('Cohen (1968): kappa .492 and weighted kappa .348 with his disagreement weights', () => {
    // Source: Cohen (1968) Psychological Bulletin 70:213-220, values as quoted in R psych's cohen.kappa
    // help page; statsmodels cohens_kappa on the same table (published-examples.json).
    const t = ex.cohen_1968;
    const v = flat(t.disagreement_weights);
    const agreementWeights = v.map((d) => 1 - d / Math.max(...v)); // kappa does not change under rescaling
    const plain = cohenKappaFromTable(flat(t.table), kappaWeights([1, 2, 3], 'unweighted'), 3);
    const weighted = cohenKappaFromTable(flat(t.table), agreementWeights, 3);
    expect(plain.value).toBeCloseTo(t.published.kappa, 3);
    expect(weighted.value).toBeCloseTo(t.published.weighted, 3);
    expect(Math.abs(plain.value - t.statsmodels.unweighted.value)).toBeLessThan(1e-9);
    expect(Math.abs(plain.se - t.statsmodels.unweighted.se)).toBeLessThan(1e-9);
    expect(Math.abs(weighted.value - t.statsmodels.weighted.value)).toBeLessThan(1e-9);
    expect(Math.abs(weighted.se - t.statsmodels.weighted.se)).toBeLessThan(1e-9);
    expect(plain.n).toBeCloseTo(200, 9);
  });

  it('SAS PROC FREQ example: kappa, ASE and 95% limits, simple and linear (Cicchetti-Allison) weights', () => {
    // Source: SAS printout quoted in statsmodels' test_inter_rater.py (4 decimals); statsmodels itself to 1e-9.
    const t = ex.sas_table;
    const cats = [1, 2, 3];
    for (const [w, name] of [['unweighted', 'unweighted'], ['linear', 'linear']] as const) {
      const k = cohenKappaFromTable(flat(t.table), kappaWeights(cats, w), 3);
      const sas = t.published[name];
      expect(k.value).toBeCloseTo(sas.value, 4);
      expect(k.se).toBeCloseTo(sas.se, 4);
      expect(k.ci95[0]).toBeCloseTo(sas.ci95[0], 4);
      expect(k.ci95[1]).toBeCloseTo(sas.ci95[1], 4);
      const sm = t.statsmodels[name];
      expect(Math.abs(k.value - sm.value)).toBeLessThan(1e-9);
      expect(Math.abs(k.se - sm.se)).toBeLessThan(1e-9);
      expect(Math.abs(k.ci95[0] - sm.ci95[0])).toBeLessThan(1e-6);
      expect(Math.abs(k.ci95[1] - sm.ci95[1])).toBeLessThan(1e-6);
    }
  });
});

describe("Cohen's kappa: invented rating sets against statsmodels and R psych", () => {
  const sm = ratingSets();
  const ps = psychSets();
  expect(sm.generator).toMatch(/statsmodels/);
  expect(ps.generator).toMatch(/psych 2\./);

  for (const [s, set] of sm.sets.entries()) {
    it(`${set.name}: every reader pair, three weightings, pairwise deletion`, () => {
      const cats = scale(set.points);
      for (const [p, ref] of set.cohen_pairs_statsmodels.entries()) {
        const [a, b] = ref.readers;
        for (const w of KAPPA_WEIGHTINGS) {
          const k = cohenKappa(column(set.ratings, a), column(set.ratings, b), cats, w);
          // Source: statsmodels cohens_kappa (agreement-sets.json): value and FCE (1969) SE to 1e-9, limits to 1e-6.
          expect(k.n).toBe(ref.n);
          expect(Math.abs(k.value - ref[w].value), `${w} value`).toBeLessThan(1e-9);
          expect(Math.abs(k.se - ref[w].se), `${w} se`).toBeLessThan(1e-9);
          const want = clamp(ref[w].ci95);
          expect(Math.abs(k.ci95[0] - want[0]), `${w} lower`).toBeLessThan(1e-6);
          expect(Math.abs(k.ci95[1] - want[1]), `${w} upper`).toBeLessThan(1e-6);
        }
        // Source: R psych::cohen.kappa (agreement-sets-psych.json): unweighted kappa, its variance and
        // limits; the quadratic weighted value (psych's default weights).
        const psych = ps.sets[s].cohen_pairs[p];
        expect(psych.readers).toEqual(ref.readers);
        const u = cohenKappa(column(set.ratings, a), column(set.ratings, b), cats, 'unweighted');
        expect(Math.abs(u.value - psych.unweighted.value)).toBeLessThan(1e-9);
        expect(Math.abs(u.se - psych.unweighted.se)).toBeLessThan(1e-9);
        expect(Math.abs(u.ci95[0] - psych.unweighted.ci95[0])).toBeLessThan(1e-6);
        expect(Math.abs(u.ci95[1] - psych.unweighted.ci95[1])).toBeLessThan(1e-6);
        const q = cohenKappa(column(set.ratings, a), column(set.ratings, b), cats, 'quadratic');
        expect(Math.abs(q.value - psych.quadratic.value)).toBeLessThan(1e-9);
      }
    });
  }
});

describe("Cohen's kappa: properties worked by hand", () => {
  it('perfect agreement gives 1 with a zero standard error; full disagreement on two categories gives -1', () => {
    const same = cohenKappa([1, 2, 3, 1], [1, 2, 3, 1], [1, 2, 3], 'unweighted');
    expect(same.value).toBe(1);
    expect(same.se).toBe(0);
    expect(same.ci95).toEqual([1, 1]);
    const opposite = cohenKappa([1, 2, 1, 2], [2, 1, 2, 1], [1, 2], 'unweighted');
    expect(opposite.value).toBe(-1);
  });

  it('is undefined when both readers use one and the same category only', () => {
    const k = cohenKappa([3, 3, 3], [3, 3, 3], [1, 2, 3, 4, 5], 'quadratic');
    expect(Number.isNaN(k.value)).toBe(true);
  });

  it('unused categories at the ends of the scale change neither kappa nor its standard error', () => {
    const a = [2, 3, 3, 4, 2, 4, 3];
    const b = [2, 3, 4, 4, 3, 4, 2];
    for (const w of KAPPA_WEIGHTINGS) {
      const used = cohenKappa(a, b, [2, 3, 4], w);
      const full = cohenKappa(a, b, [1, 2, 3, 4, 5], w);
      expect(full.value, w).toBeCloseTo(used.value, 12);
      expect(full.se, w).toBeCloseTo(used.se, 12);
    }
  });

  it('linear and quadratic weights follow the formula', () => {
    const lin = kappaWeights([1, 2, 3, 4, 5], 'linear');
    const quad = kappaWeights([1, 2, 3, 4, 5], 'quadratic');
    expect(lin[0 * 5 + 1]).toBeCloseTo(0.75, 15);
    expect(quad[0 * 5 + 2]).toBeCloseTo(1 - 4 / 16, 15);
    expect(lin[0 * 5 + 4]).toBe(0);
    expect(quad[2 * 5 + 2]).toBe(1);
  });

  it('skips cases one reader did not score, and says which score is off the scale', () => {
    const { n } = crossTable([1, Number.NaN, 2], [1, 2, Number.NaN], [1, 2]);
    expect(n).toBe(1);
    expect(() => crossTable([1, 7], [1, 2], [1, 2, 3])).toThrow(/case 2: score 7 is not one of the categories 1, 2, 3/);
    expect(() => cohenKappa([Number.NaN], [1], [1, 2], 'linear')).toThrow(/no case was scored by both readers/);
  });
});
