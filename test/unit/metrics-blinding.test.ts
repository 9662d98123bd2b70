/**
 * Blinding-strength check against NumPy, scikit-image and scikit-learn: test/reference/metrics/
 * make-blinding-fixtures.py computed the item statistics of invented volumes with NumPy and
 * skimage.filters.threshold_otsu, and the leave-one-case-out accuracy of scikit-learn's
 * StandardScaler + NearestCentroid with LeaveOneGroupOut, with permutation p-values on the same
 * MT19937 draws as Veil's.
 */
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { readNpyFile } from '../../app/images/npy.ts';
import { blindingAdvice, blindingStrength, formatBlindingStrength, leaveOneCaseOutAccuracy } from '../../app/metrics/blinding-strength.ts';
import type { ItemFeatures } from '../../app/metrics/blinding-strength.ts';
import { itemStatistics } from '../../app/metrics/item-statistics.ts';
import type { ItemStatistics } from '../../app/metrics/item-statistics.ts';

const DIR = fileURLToPath(new URL('../reference/metrics/', import.meta.url));
interface Fixture {
  generator: string;
  seed: number;
  permutations: number;
  statistics: (keyof ItemStatistics)[];
  item_statistics: { file: string; expected: Required<ItemStatistics> }[];
  classification: { name: string; items: ItemFeatures[]; accuracy: number; p_value: number; single: Record<string, { accuracy: number; p_value: number }> }[];
}
const fx = JSON.parse(readFileSync(`${DIR}blinding.json`, 'utf8')) as Fixture;

describe('item statistics against NumPy and scikit-image', () => {
  it('fixtures come from scikit-learn and scikit-image', () => expect(fx.generator).toMatch(/scikit-learn 1\.\d+/));
  for (const v of fx.item_statistics) {
    it(v.file, async () => {
      const got = itemStatistics(await readNpyFile(DIR + v.file), { includeScale: true });
      for (const [k, want] of Object.entries(v.expected)) {
        expect(got[k as keyof ItemStatistics], k).toBeCloseTo(want, 12);
      }
    });
  }
  it('leaves the raw intensity scale out unless asked: the kit shows scaled intensities', async () => {
    const got = itemStatistics(await readNpyFile(DIR + fx.item_statistics[0].file));
    expect(got.scale).toBeUndefined();
  });
});

describe('leave-one-case-out nearest centroid against scikit-learn', () => {
  for (const c of fx.classification) {
    it(`${c.name}: accuracy with all statistics and with each alone, permutation p-values`, () => {
      const r = blindingStrength(c.items, { seed: fx.seed, permutations: fx.permutations });
      expect(r.statistics).toEqual(fx.statistics);
      expect(r.accuracy).toBeCloseTo(c.accuracy, 12);
      expect(r.pValue).toBeCloseTo(c.p_value, 12);
      for (const s of r.perStatistic) {
        expect(s.accuracy, s.statistic).toBeCloseTo(c.single[s.statistic].accuracy, 12);
        expect(s.pValue, s.statistic).toBeCloseTo(c.single[s.statistic].p_value, 12);
      }
      expect(r.chance).toBeCloseTo(1 / 3, 15);
    });
  }

  it('warns when the noise level gives the methods away, naming it and the per-method levels', () => {
    const c = fx.classification.find((x) => x.name.startsWith('noise'))!;
    const r = blindingStrength(c.items, { seed: fx.seed, permutations: fx.permutations });
    expect(r.givesAway).toBe('noise');
    expect(r.warning).toContain('background noise level');
    expect(r.warning).toMatch(/m-a 0\.0\d+, m-b 0\.0\d+, m-c 0\.0\d+/);
    expect(r.warning).toContain('no display setting hides it');
    const text = formatBlindingStrength(r);
    expect(text).toMatch(/^WARNING: Readers could tell the methods apart/m);
    expect(text).toMatch(/background noise level\s+96%\s+p = 0\.0025 \(the smallest possible with 399 permutations\)/);
  });

  it('points a matrix-size difference to grid matching in the display section', () => {
    const c = fx.classification.find((x) => x.name.startsWith('matrix'))!;
    const r = blindingStrength(c.items, { seed: fx.seed, permutations: fx.permutations });
    expect(['rows']).toContain(r.givesAway);
    expect(r.warning).toContain('display: {matching: reference-grid}');
    expect(r.warning).toContain('m-a 320, m-b 320, m-c 256');
  });

  it("suggests the template's display keys that would hide a statistic", () => {
    expect(blindingAdvice('q50')).toContain('display: {intensity: percentile}');
    expect(blindingAdvice('columns')).toContain('display: {matching: reference-grid}');
    expect(blindingAdvice('sharpness')).toContain('no display setting hides it');
  });

  it('stays quiet when the methods look alike', () => {
    const c = fx.classification.find((x) => x.name.startsWith('nothing'))!;
    const r = blindingStrength(c.items, { seed: fx.seed, permutations: fx.permutations });
    expect(r.pValue).toBeGreaterThan(0.05);
    expect(r.warning).toBeNull();
    expect(r.givesAway).toBeNull();
  });

  it('splits the credit of an item tied between centroids', () => {
    // One statistic, equal for every item: every centroid ties, so each item counts 1/2.
    const x = [[1], [1], [1], [1]];
    expect(leaveOneCaseOutAccuracy(x, [0, 1, 0, 1], [0, 0, 1, 1], 2, 2)).toBe(0.5);
  });

  it('leaves out a statistic that is constant over the training cases, even if the held-out case differs', () => {
    // Feature 0 tells the methods apart; feature 1 is 0.3 everywhere except in case 2.
    const x = [[0.1, 0.3], [0.9, 0.3], [0.12, 0.3], [0.88, 0.3], [0.11, 7.7], [0.91, 7.7]];
    expect(leaveOneCaseOutAccuracy(x, [0, 1, 0, 1, 0, 1], [0, 0, 1, 1, 2, 2], 3, 2)).toBe(1);
  });

  it('repeats exactly with the same seed', () => {
    const c = fx.classification[0];
    expect(blindingStrength(c.items, { seed: 7, permutations: 20 })).toEqual(blindingStrength(c.items, { seed: 7, permutations: 20 }));
  });
});
