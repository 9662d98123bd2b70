/**
 * Method comparison statistics against outside references: scipy.stats.wilcoxon and
 * friedmanchisquare, statsmodels proportion_confint(method='wilson') and multipletests('holm')
 * (test/reference/comparison/make-fixtures.py), and the Obuchowski–Rockette–Hillis analysis
 * against the same formulas computed in base R (test/reference/comparison/or-hillis-r.json, make-or-hillis.R).
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { wilsonInterval } from '../../app/stats/comparison/wilson.ts';
import { holmAdjust } from '../../app/stats/comparison/holm.ts';
import { wilcoxonSignedRank } from '../../app/stats/comparison/wilcoxon.ts';
import { friedmanTest } from '../../app/stats/comparison/friedman.ts';
import { orDifference, orMrmc } from '../../app/stats/comparison/or-mrmc.ts';
import { describeScores } from '../../app/stats/comparison/descriptive.ts';
import { compareMethods } from '../../app/stats/comparison/comparison.ts';
import { readingTimes } from '../../app/stats/comparison/reading-time.ts';
import type { TidyRow } from '../../app/report/tidy-csv.ts';

const REF = join(import.meta.dirname, '..', 'reference', 'comparison');
const fx = JSON.parse(readFileSync(join(REF, 'comparison-fixtures.json'), 'utf8'));
const orR = JSON.parse(readFileSync(join(REF, 'or-hillis-r.json'), 'utf8'));

describe('Wilson interval (statsmodels proportion_confint, method wilson)', () => {
  for (const c of fx.wilson) {
    it(`${c.k}/${c.n}`, () => {
      const ci = wilsonInterval(c.k, c.n)!;
      expect(ci[0]).toBeCloseTo(c.ci95[0], 10);
      expect(ci[1]).toBeCloseTo(c.ci95[1], 10);
    });
  }
  it('has no interval without trials', () => expect(wilsonInterval(0, 0)).toBeNull());
});

describe('Holm adjustment (statsmodels multipletests, holm)', () => {
  for (const c of fx.holm) {
    it(JSON.stringify(c.p), () => {
      holmAdjust(c.p).forEach((v, i) => expect(v).toBeCloseTo(c.adjusted[i], 12));
    });
  }
  it('leaves null p-values out of the family', () => {
    expect(holmAdjust([0.01, null, 0.04])).toEqual([0.02, null, 0.04]);
  });
});

describe('Wilcoxon signed-rank (scipy.stats.wilcoxon)', () => {
  for (const c of fx.wilcoxon) {
    it(c.name, () => {
      const r = wilcoxonSignedRank(c.d);
      if (c.exact) {
        expect(r.method).toBe('exact');
        expect(r.statistic).toBeCloseTo(c.exact.statistic, 10);
        expect(r.p).toBeCloseTo(c.exact.p, 12);
      } else {
        expect(r.method).toMatch(/normal approximation/);
        expect(r.statistic).toBeCloseTo(c.approx.statistic, 10);
        expect(r.p).toBeCloseTo(c.approx.p, 12);
      }
    });
  }
  it('says it used the normal approximation when there are zeros', () => {
    const r = wilcoxonSignedRank([0, 1, 2, -3, 4.5]);
    expect(r.zeros).toBe(1);
    expect(r.method).toMatch(/Pratt/);
  });
});

describe("Friedman test with Kendall's W (scipy.stats.friedmanchisquare)", () => {
  for (const c of fx.friedman) {
    it(c.name, () => {
      const r = friedmanTest(c.blocks);
      expect(r.chi2).toBeCloseTo(c.chi2, 10);
      expect(r.p).toBeCloseTo(c.p, 12);
      expect(r.w).toBeCloseTo(c.w, 12);
    });
  }
});

describe('Obuchowski–Rockette with Hillis ddf', () => {
  it('matches base R computing the published formulas on an invented data set', () => {
    // Source: test/reference/comparison/make-or-hillis.R (Obuchowski & Rockette 1995; Hillis et al.
    // 2005 jackknife covariances; Hillis 2007 ddf), run with R 4.2.2 into or-hillis-r.json.
    const r = orMrmc(orR.scores);
    const e = orR.expected;
    for (const k of ['variance', 'cov1', 'cov2', 'cov3'] as const) expect(r.covariances[k]).toBeCloseTo(e[k], 12);
    expect(r.covariances.cov2).toBeGreaterThan(r.covariances.cov3); // the max(Cov2 - Cov3, 0) term is in play
    expect(r.msT).toBeCloseTo(e.msT, 12);
    expect(r.msTR).toBeCloseTo(e.msTR, 12);
    expect(r.F!).toBeCloseTo(e.F, 9);
    expect(r.ddfH!).toBeCloseTo(e.ddf, 9);
    expect(r.p!).toBeCloseTo(e.p, 9);
    const d = orDifference(r);
    expect(d.estimate).toBeCloseTo(e.estimate, 12);
    expect(d.se!).toBeCloseTo(e.se, 12);
    expect(d.ci95![0]).toBeCloseTo(e.ci95[0], 9);
    expect(d.ci95![1]).toBeCloseTo(e.ci95[1], 9);
  });

  it('jackknife covariance of a mean score is the sample covariance over c', () => {
    // Two methods, two readers, four cases: Var is the mean over (method, reader) of s²/c.
    const s = [[[1, 2, 3, 4], [2, 2, 3, 5]], [[2, 3, 3, 5], [1, 3, 4, 4]]];
    const r = orMrmc(s);
    const varOf = (x: number[]): number => { const m = x.reduce((a, b) => a + b) / x.length; return x.reduce((a, b) => a + (b - m) ** 2, 0) / (x.length - 1) / x.length; };
    expect(r.covariances.variance).toBeCloseTo((varOf(s[0][0]) + varOf(s[0][1]) + varOf(s[1][0]) + varOf(s[1][1])) / 4, 12);
  });

  it('non-inferiority: the one-sided p is below 0.025 exactly when the lower bound clears −margin', () => {
    const r = orMrmc([orR.scores[1], orR.scores[0]]);
    const plain = orDifference(r);
    const margin = -plain.ci95![0] + 0.001;
    expect(orDifference(r, margin).p!).toBeLessThan(0.025);
    expect(orDifference(r, -plain.ci95![0] - 0.001).p!).toBeGreaterThan(0.025);
  });
});

describe('descriptives and reading time', () => {
  it('summarizes a method: quartiles of type 7 and a Wilson interval of the acceptable share', () => {
    const s = describeScores([1, 2, 3, 3, 4, 5, 5, 2], 5, 3);
    expect(s.n).toBe(8);
    expect(s.mean).toBeCloseTo(3.125, 12);
    expect(s.median).toBe(3);
    expect(s.q1).toBe(2); // numpy.percentile([1,2,2,3,3,4,5,5], 25) = 2.0
    expect(s.q3).toBeCloseTo(4.25, 12); // numpy.percentile(..., 75) = 4.25
    expect(s.counts).toEqual([1, 2, 2, 1, 2]);
    expect(s.acceptable.k).toBe(5);
    expect(s.acceptable.ci95).toEqual(wilsonInterval(5, 8));
  });
  it('counts an item once across questions and leaves untimed items out', () => {
    const t = readingTimes([
      { method: 'a', session: 1, reader: 'R1', case: 'c1', seconds: 10 },
      { method: 'a', session: 1, reader: 'R1', case: 'c2', seconds: 20 },
      { method: 'a', session: 2, reader: 'R1', case: 'c3', seconds: null },
    ]);
    expect(t).toEqual([
      expect.objectContaining({ method: 'a', session: 1, n: 2, median: 15, missing: 0 }),
      expect.objectContaining({ method: 'a', session: 2, n: 0, median: null, missing: 1 }),
    ]);
  });
});

describe('compareMethods', () => {
  // Invented ratings: 3 readers x 8 cases x 3 methods, method "new" half a point better.
  const rows: TidyRow[] = [];
  const base = [2, 3, 4, 3, 2, 4, 5, 3];
  ['R1', 'R2', 'R3'].forEach((reader, j) => {
    base.forEach((b, k) => {
      const c = `c${k + 1}`;
      rows.push({ case: c, reader, method: 'std', question: 'q', score: b, session: '1', seconds: String(10 + k) });
      rows.push({ case: c, reader, method: 'new', question: 'q', score: Math.min(5, b + ((k + j) % 2)), session: '2', seconds: '' });
      rows.push({ case: c, reader, method: 'old', question: 'q', score: Math.max(1, b - 1 - ((k * j) % 2)), session: '1', seconds: null });
    });
  });
  const r = compareMethods(rows, { methods: ['std', 'new', 'old'], points: { q: 5 }, compareTo: 'std', noninferiorityMargin: 0.5, seed: 7, resamples: 500 });

  it('orients pairs against the standard and corrects them with Holm', () => {
    const vs = r.pairs.filter((p) => p.vsStandard);
    expect(vs.map((p) => [p.a, p.b])).toEqual([['new', 'std'], ['old', 'std']]);
    const meanOf = (m: string): number => rows.filter((x) => x.method === m).reduce((s, x) => s + x.score, 0) / 24;
    expect(vs[0].meanDifference).toBeCloseTo(meanOf('new') - meanOf('std'), 12);
    expect(vs[1].meanDifference).toBeCloseTo(meanOf('old') - meanOf('std'), 12);
    const adj = holmAdjust(r.pairs.map((p) => p.wilcoxon.p));
    r.pairs.forEach((p, i) => expect(p.pHolm).toBe(adj[i]));
  });
  it('gives an MRMC interval and a two-way bootstrap interval that both cover the estimate', () => {
    const p = r.pairs[0];
    expect(p.mrmc!.readers).toBe(3);
    expect(p.mrmc!.cases).toBe(8);
    expect(p.mrmc!.ci95![0]).toBeLessThan(p.mrmc!.estimate);
    expect(p.bootstrap!.ci95![0]).toBeLessThan(p.bootstrap!.estimate);
    expect(p.bootstrap!.ci95![1]).toBeGreaterThan(p.bootstrap!.estimate);
  });
  it('decides non-inferiority from the lower bound against −margin', () => {
    const ni = r.noninferiority.find((x) => x.method === 'new')!;
    expect(ni.noninferior).toBe(ni.lower! > -0.5);
    expect(r.noninferiority.find((x) => x.method === 'old')!.noninferior).toBe(false);
  });
  it('reads reading times once per item and notes a missing standard', () => {
    expect(r.readingTime.find((t) => t.method === 'std')!.n).toBe(24);
    expect(r.readingTime.find((t) => t.method === 'new')!.missing).toBe(24);
    const other = compareMethods(rows, { compareTo: 'absent' });
    expect(other.notes.join(' ')).toMatch(/compare_to names "absent"/);
  });
});
