import { describe, expect, it } from 'vitest';
import { cohenKappa } from '../../app/stats/cohen-kappa.ts';
import { lightKappa } from '../../app/stats/light-kappa.ts';
import { column, psychSets, ratingSets, scale } from './agreement-fixtures.ts';

describe("Light's kappa", () => {
  const sets = ratingSets().sets;
  const psych = psychSets().sets;

  it('equals R psych av.kappa and av.wt (mean Cohen kappa over reader pairs) on every invented set', () => {
    // Source: R psych::cohen.kappa, av.kappa and av.wt (agreement-sets-psych.json).
    sets.forEach((set, s) => {
      const m = set.ratings[0].length;
      const pairs: [number, number][] = [];
      for (let a = 0; a < m; a++) for (let b = a + 1; b < m; b++) pairs.push([a, b]);
      const mean = (w: 'unweighted' | 'quadratic') =>
        lightKappa(pairs.map(([a, b]) => cohenKappa(column(set.ratings, a), column(set.ratings, b), scale(set.points), w).value));
      expect(Math.abs(mean('unweighted').value - psych[s].light_kappa.unweighted), set.name).toBeLessThan(1e-9);
      expect(Math.abs(mean('quadratic').value - psych[s].light_kappa.quadratic), set.name).toBeLessThan(1e-9);
      expect(mean('unweighted').pairs).toBe(pairs.length);
    });
  });

  it('leaves undefined pairs out and counts them', () => {
    expect(lightKappa([0.2, Number.NaN, 0.4])).toEqual({ value: 0.30000000000000004, pairs: 2, undefinedPairs: 1 });
    expect(Number.isNaN(lightKappa([Number.NaN]).value)).toBe(true);
  });
});
