/**
 * Calibration of the Obuchowski–Rockette–Hillis interval by simulation: 2,000 studies under the
 * null (no method effect) from a components-of-variance model with reader, case, method × reader,
 * method × case, reader × case and error terms — the structure of Roe & Metz (1997, "Dorfman–
 * Berbaum–Metz method for statistical analysis of multireader, multimodality receiver operating
 * characteristic data: validation with computer simulation", Academic Radiology 4(4):298–303),
 * here for continuous scores. Scores are then rounded to a 1..5 Likert scale, as readers give them.
 * The 95% interval of the difference must cover 0 in 93–97% of the studies.
 * Seeded (MT19937 stream "mrmc-coverage"), so the figure repeats exactly.
 */
import { describe, expect, it } from 'vitest';
import { streamFor } from '../../app/blinding/streams.ts';
import type { MT19937 } from '../../app/blinding/mt19937.ts';
import { orDifference, orMrmc } from '../../app/stats/comparison/or-mrmc.ts';

function normal(rng: MT19937): number {
  const u = 1 - rng.nextDouble();
  return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * rng.nextDouble());
}

interface CoverageResult { studies: number; covered: number; coverage: number; meanHalfWidth: number }

/** Simulated studies of `readers` × `cases` × 2 methods; returns how often the 95% interval covers 0. */
function mrmcCoverage(studies: number, readers: number, cases: number, seed: number): CoverageResult {
  const rng = streamFor(seed, 'mrmc-coverage');
  const sd = { R: Math.sqrt(0.15), C: Math.sqrt(0.6), TR: Math.sqrt(0.05), TC: Math.sqrt(0.15), RC: Math.sqrt(0.15), E: Math.sqrt(0.3) };
  let covered = 0;
  let width = 0;
  for (let s = 0; s < studies; s++) {
    const R = Array.from({ length: readers }, () => sd.R * normal(rng));
    const C = Array.from({ length: cases }, () => sd.C * normal(rng));
    const RC = Array.from({ length: readers }, () => Array.from({ length: cases }, () => sd.RC * normal(rng)));
    const scores = [0, 1].map(() => {
      const TR = R.map(() => sd.TR * normal(rng));
      const TC = C.map(() => sd.TC * normal(rng));
      return R.map((r, j) => Float64Array.from(C, (c, k) => {
        const x = 3 + r + c + TR[j] + TC[k] + RC[j][k] + sd.E * normal(rng);
        return Math.min(5, Math.max(1, Math.round(x)));
      }));
    });
    const d = orDifference(orMrmc(scores));
    if (d.ci95 && d.ci95[0] <= 0 && d.ci95[1] >= 0) covered++;
    if (d.ci95) width += (d.ci95[1] - d.ci95[0]) / 2;
  }
  return { studies, covered, coverage: covered / studies, meanHalfWidth: width / studies };
}

describe('MRMC interval calibration', () => {
  it('2,000 simulated null studies (5 readers, 40 cases): 95% intervals cover 0 in 93–97%', () => {
    const t0 = performance.now();
    const r = mrmcCoverage(2000, 5, 40, 20240601);
    const seconds = (performance.now() - t0) / 1000;
    console.log(`MRMC coverage ${(100 * r.coverage).toFixed(1)}% (${r.covered}/${r.studies}), mean half-width ${r.meanHalfWidth.toFixed(3)}, ${seconds.toFixed(1)} s`);
    expect(r.coverage).toBeGreaterThanOrEqual(0.93);
    expect(r.coverage).toBeLessThanOrEqual(0.97);
  });
});
