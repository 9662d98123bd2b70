import { describe, expect, it } from 'vitest';
import { streamFor } from '../../app/blinding/streams.ts';
import { caseBootstrap, drawMultiplicities, percentileInterval, quantileSorted } from '../../app/stats/bootstrap.ts';

describe('case bootstrap', () => {
  it('draws multiplicities summing to n, the same for the same seed, different for another', () => {
    const draws = (seed: number): number[][] => {
      const out: number[][] = [];
      caseBootstrap(7, 5, 1, streamFor(seed, 'test'), (w, o) => {
        out.push(Array.from(w));
        o[0] = 0;
      });
      return out;
    };
    const a = draws(11);
    for (const w of a) expect(w.reduce((s, x) => s + x, 0)).toBe(7);
    expect(draws(11)).toEqual(a);
    expect(draws(12)).not.toEqual(a);
  });

  it('the percentile interval of the mean covers the true mean of a known sample', () => {
    const x = Array.from({ length: 200 }, (_, i) => (i % 10) + 1); // mean 5.5
    const [means] = caseBootstrap(x.length, 1000, 1, streamFor(3, 'test'), (w, o) => {
      let s = 0;
      w.forEach((k, i) => { s += k * x[i]; });
      o[0] = s / x.length;
    });
    const { ci95, used } = percentileInterval(means);
    expect(used).toBe(1000);
    expect(ci95![0]).toBeLessThan(5.5);
    expect(ci95![1]).toBeGreaterThan(5.5);
    // Standard error of the mean is sd / sqrt(n) = 2.87 / 14.1 = 0.20: the interval is about +-0.4.
    expect(ci95![1] - ci95![0]).toBeGreaterThan(0.6);
    expect(ci95![1] - ci95![0]).toBeLessThan(1.0);
  });

  it("quantiles are R's type 7 and undefined resamples are left out", () => {
    // Source: R 4.2 quantile(c(1, 2, 3, 4, 10), c(0.025, 0.975)) prints 1.1 and 9.4 (type 7, the default).
    const s = Float64Array.from([1, 2, 3, 4, 10]);
    expect(quantileSorted(s, 0.025)).toBeCloseTo(1.1, 12);
    expect(quantileSorted(s, 0.975)).toBeCloseTo(9.4, 12);
    const r = percentileInterval(Float64Array.from([Number.NaN, 4, 1, 3, Number.NaN, 10, 2]));
    expect(r.used).toBe(5);
    expect(r.ci95![0]).toBeCloseTo(1.1, 12);
    expect(percentileInterval(Float64Array.from([Number.NaN, 1])).ci95).toBeNull();
  });
});

describe('drawMultiplicities', () => {
  it('draws every index about equally often, for small and large n', () => {
    for (const n of [3, 500, 2000, 70_000]) {
      const rng = streamFor(9, 'uniformity');
      const counts = new Uint32Array(n);
      const identity = Int32Array.from({ length: n }, (_, i) => i);
      const rounds = Math.ceil(600_000 / n);
      for (let r = 0; r < rounds; r++) drawMultiplicities(rng, n, identity, counts);
      const expected = rounds;
      // Pearson's chi-square over n cells has mean n - 1 and sd sqrt(2 (n - 1)); allow 5 sd.
      let chi2 = 0;
      for (const c of counts) chi2 += (c - expected) ** 2 / expected;
      expect(chi2, `n = ${n}`).toBeLessThan(n - 1 + 5 * Math.sqrt(2 * (n - 1)));
      expect(counts.reduce((a, b) => a + b, 0)).toBe(n * rounds);
    }
  });
});
