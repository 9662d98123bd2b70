/**
 * Metric–score linkage and its rank correlations against SciPy: test/reference/metrics/
 * make-linkage-fixtures.py computed scipy.stats.spearmanr and kendalltau (tau-b) on invented data,
 * and re-implemented the whole linkage (reader means, within-case concordance, percentile bootstrap
 * over cases with numpy.percentile, on CPython's MT19937 seeded as app/blinding/streams.ts does).
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { metricRow, metricScoreLinkage } from '../../app/metrics/linkage.ts';
import { formatLinkage } from '../../app/metrics/linkage-table.ts';
import type { VolumeMetrics } from '../../app/metrics/compare-volumes.ts';
import type { MetricRow, TrackingStatistics } from '../../app/metrics/linkage.ts';
import { averageRanks, kendallTauB, spearmanRho } from '../../app/metrics/rank-correlation.ts';
import type { TidyRow } from '../../app/report/tidy-csv.ts';

interface Stat { value: number | null; ci95: [number, number] | null }
interface Fixture {
  generator: string;
  correlations: { name: string; x: number[]; y: number[]; spearman: number | null; kendall_tau_b: number | null }[];
  linkage: {
    seed: number;
    resamples: number;
    ratings: TidyRow[];
    table: MetricRow[];
    questions: Record<string, { metric: string; rank: number; rank_interval: [number, number] | null; sets: Record<string, Record<'spearman' | 'kendall' | 'concordance', Stat>> }[]>;
  };
}
const fx = JSON.parse(readFileSync(new URL('../reference/metrics/linkage.json', import.meta.url), 'utf8')) as Fixture;

const orNaN = (v: number | null): number => (v === null ? Number.NaN : v);

describe("Spearman's rho and Kendall's tau-b against scipy.stats", () => {
  it('fixtures come from SciPy', () => expect(fx.generator).toMatch(/SciPy 1\./));
  for (const c of fx.correlations) {
    it(c.name, () => {
      const rho = spearmanRho(c.x, c.y);
      const tau = kendallTauB(c.x, c.y);
      if (c.spearman === null) expect(rho).toBeNaN();
      else expect(rho).toBeCloseTo(c.spearman, 12);
      if (c.kendall_tau_b === null) expect(tau).toBeNaN();
      else expect(tau).toBeCloseTo(c.kendall_tau_b, 12);
    });
  }
  it('average ranks share ties (scipy.stats.rankdata, method average)', () => {
    expect(Array.from(averageRanks([10, 20, 10, 30, 20, 20]))).toEqual([1.5, 4, 1.5, 6, 4, 4]);
  });
  it('Kendall in O(n log n) equals the pair-by-pair count on 400 tied values', () => {
    const x = Array.from({ length: 400 }, (_, i) => (i * 7919) % 13);
    const y = Array.from({ length: 400 }, (_, i) => (i * 104729) % 11);
    let s = 0;
    let tx = 0;
    let ty = 0;
    for (let i = 0; i < 400; i++) {
      for (let j = i + 1; j < 400; j++) {
        const a = Math.sign(x[i] - x[j]);
        const b = Math.sign(y[i] - y[j]);
        s += a * b;
        if (a !== 0) tx++;
        if (b !== 0) ty++;
      }
    }
    expect(kendallTauB(x, y)).toBeCloseTo(s / Math.sqrt(tx * ty), 12);
  });
});

describe('metric-score linkage against a SciPy re-implementation', () => {
  const { seed, resamples, ratings, table, questions } = fx.linkage;
  const report = metricScoreLinkage(ratings, table, { seed, resamples });

  const expectStat = (got: { value: number | null; ci95: [number, number] | null }, want: Stat, what: string): void => {
    if (want.value === null) expect(got.value, what).toBeNull();
    else expect(got.value!, what).toBeCloseTo(want.value, 10);
    if (want.ci95 === null) expect(got.ci95, what).toBeNull();
    else {
      expect(got.ci95, what).not.toBeNull();
      expect(got.ci95![0], `${what} lower`).toBeCloseTo(want.ci95[0], 10);
      expect(got.ci95![1], `${what} upper`).toBeCloseTo(want.ci95[1], 10);
    }
  };
  const expectSet = (got: TrackingStatistics, want: Record<'spearman' | 'kendall' | 'concordance', Stat>, what: string): void => {
    expectStat(got.spearman, want.spearman, `${what} spearman`);
    expectStat(got.kendall, want.kendall, `${what} kendall`);
    expectStat(got.concordance, want.concordance, `${what} concordance`);
  };

  for (const q of Object.keys(questions)) {
    it(`${q}: correlations, concordance, ${resamples}-resample intervals and ranks, pooled and per reader`, () => {
      const got = report.questions.find((x) => x.question === q)!;
      expect(got.readers).toEqual(['R1', 'R2', 'R3']);
      expect(got.cases).toBe(10);
      for (const want of questions[q]) {
        const m = got.metrics.find((x) => x.metric === want.metric)!;
        expect(m.rank, `${q} ${want.metric} rank`).toBe(want.rank);
        expect(m.rankInterval, `${q} ${want.metric} rank interval`).toEqual(want.rank_interval);
        expectSet(m, want.sets.mean, `${q} ${want.metric}`);
        for (const r of m.perReader) expectSet(r, want.sets[r.reader], `${q} ${want.metric} ${r.reader}`);
      }
      // Listed best first.
      expect(got.metrics.map((m) => m.rank)).toEqual([...got.metrics.map((m) => m.rank)].sort((a, b) => a - b));
    });
  }

  it('an error metric that tracks the readers has a negative rho but a concordance above one half', () => {
    const nrmse = report.questions.find((x) => x.question === 'sharpness')!.metrics.find((m) => m.metric === 'nrmse')!;
    expect(nrmse.spearman.value!).toBeLessThan(0);
    expect(nrmse.concordance.value!).toBeGreaterThan(0.5);
    expect(nrmse.higherIsBetter).toBe(false);
  });

  it('leaves out items without a metric value and uses the readers who scored an item', () => {
    const q = report.questions.find((x) => x.question === 'sharpness')!;
    expect(q.metrics.find((m) => m.metric === 'hfen')!.items).toBe(29);
    expect(q.metrics.find((m) => m.metric === 'psnr')!.items).toBe(30);
    const point = q.points.find((p) => p.case === 'case05' && p.method === 'm-c')!;
    expect(point.readers).toBe(2);
    expect(q.points.find((p) => p.case === 'case03' && p.method === 'm-b')!.metrics.hfen).toBeNull();
  });

  it('repeats exactly with the same seed; another seed moves only the intervals', () => {
    const again = metricScoreLinkage(ratings, table, { seed, resamples: 50 });
    expect(metricScoreLinkage(ratings, table, { seed, resamples: 50 })).toEqual(again);
    const other = metricScoreLinkage(ratings, table, { seed: seed + 1, resamples: 50 });
    const [a, b] = [again, other].map((r) => r.questions[0].metrics.find((m) => m.metric === 'psnr')!);
    expect(a.spearman.value).toBe(b.spearman.value);
    expect(a.spearman.ci95).not.toEqual(b.spearman.ci95);
  });

  it('ranks by Kendall when asked, counting each metric in its better direction', () => {
    const byTau = metricScoreLinkage(ratings, table, { seed, resamples: 0, rankBy: 'kendall' });
    const q = byTau.questions.find((x) => x.question === 'sharpness')!;
    const oriented = q.metrics.map((m) => (m.higherIsBetter ? 1 : -1) * orNaN(m.kendall.value));
    expect(oriented).toEqual([...oriented].sort((a, b) => b - a));
    expect(q.metrics[0].spearman.ci95).toBeNull();
    expect(byTau.conventions.join(' ')).toContain("Ranking by Kendall's tau-b");
  });

  it('prints a table per question, best-tracking metric first, with intervals and conventions', () => {
    const text = formatLinkage(report);
    expect(text).toContain('Question "sharpness": 30 items in 10 cases, readers R1, R2, R3');
    const rows = text.split('Question "sharpness"')[1].split('\n').filter((l) => /^\d\s/.test(l));
    expect(rows[0]).toMatch(/^1\s+nrmse\s+1-1\s+0\.93 \[0\.85, 1\.00\]\s+-0\.66 \[-0\.88, -0\.47\]/);
    expect(text).toMatch(/4\s+hfen\s+3\.5-4 /);
    expect(text).toContain('percentile bootstrap over cases, 300 resamples');
  });
});

describe('metric table rows from image comparisons', () => {
  it('flattens plain and masked metrics under the names the linkage knows, and links them', () => {
    const m = { psnr: 30, ssim: 0.9, nrmse: 0.1, hfen: 0.2, masked: { psnr: 28, ssim: 0.88, nrmse: 0.12, hfen: 0.25 } } as VolumeMetrics;
    expect(metricRow('c1', 'm-a', m)).toEqual({
      case: 'c1',
      method: 'm-a',
      values: { psnr: 30, ssim: 0.9, nrmse: 0.1, hfen: 0.2, masked_psnr: 28, masked_ssim: 0.88, masked_nrmse: 0.12, masked_hfen: 0.25 },
    });
    const ratings: TidyRow[] = ['m-a', 'm-b'].flatMap((method, k) =>
      ['c1', 'c2', 'c3'].map((c) => ({ case: c, reader: 'R1', method, question: 'q', score: 2 + k })),
    );
    const table = ratings.map((r, i) => metricRow(r.case, r.method, { ...m, psnr: r.method === 'm-a' ? 20 + i : Infinity } as VolumeMetrics));
    const linked = metricScoreLinkage(ratings, table, { seed: 1, resamples: 20 });
    const psnr = linked.questions[0].metrics.find((x) => x.metric === 'psnr')!;
    expect(psnr.items).toBe(3); // an infinite PSNR (image identical to its reference) is left out
    expect(linked.questions[0].metrics.map((x) => x.metric).sort()).toEqual(
      ['hfen', 'masked_hfen', 'masked_nrmse', 'masked_psnr', 'masked_ssim', 'nrmse', 'psnr', 'ssim'],
    );
  });
});

