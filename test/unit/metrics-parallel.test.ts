/**
 * The metrics with their costly parts spread over real worker threads (app/metrics/metric-workers.ts)
 * give the one-thread results, and so the scikit-image and SciPy fixtures of
 * test/reference/metrics (make-fixtures.py); a pair too small to split, or no workers at all,
 * is computed in the calling thread.
 */
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { afterAll, describe, expect, it } from 'vitest';
import { readNpyFile } from '../../app/images/npy.ts';
import {
  compareToReference, compareToReferenceInParallel, compareVolumes, compareVolumesInParallel, prepareReference, prepareReferenceInParallel,
} from '../../app/metrics/compare-volumes.ts';
import { MetricWorkers } from '../../app/metrics/metric-workers.ts';

const DIR = fileURLToPath(new URL('../reference/metrics/', import.meta.url));
const fixture = JSON.parse(readFileSync(`${DIR}expected.json`, 'utf8')) as {
  cases: { name: string; reference: string; test: string; shape: number[]; native: Record<'psnr' | 'ssim' | 'nrmse' | 'hfen', number>; automask?: unknown }[];
};
const load = (f: string) => readNpyFile(DIR + f);
const close = (a: number, b: number) => Math.abs(a - b) / Math.max(1, Math.abs(b));

// Every pair is split (minVoxels 1), over two workers and the test's own thread.
const workers = new MetricWorkers(2, 1);
afterAll(() => workers.close());

describe('metrics over worker threads', () => {
  for (const c of fixture.cases) {
    it(`${c.name} (${c.shape.join('x')}): the one-thread values and scikit-image's, with and without the automatic mask`, async () => {
      const [ref, test] = [await load(c.reference), await load(c.test)];
      for (const mask of [null, 'auto' as const]) {
        const one = compareVolumes(ref, test, { mask });
        const many = await compareVolumesInParallel(ref, test, { mask }, workers);
        expect(many.psnr).toBe(one.psnr);
        expect(many.nrmse).toBe(one.nrmse);
        expect(many.ssim).toBe(one.ssim); // per-slice values merged in slice order: identical
        expect(close(many.hfen, one.hfen)).toBeLessThan(1e-12); // energies summed in parts
        expect(many.masked?.ssim ?? null).toBe(one.masked?.ssim ?? null);
        if (mask === null) for (const k of ['psnr', 'ssim', 'nrmse', 'hfen'] as const) expect(close(many[k], c.native[k]), k).toBeLessThan(1e-6);
      }
    });
  }

  it('prepares a reference and compares methods to it as the one-thread path does', async () => {
    const c = fixture.cases[0];
    const [ref, test] = [await load(c.reference), await load(c.test)];
    const prepared = await prepareReferenceInParallel(ref, { mask: 'auto' }, workers);
    const expected = prepareReference(ref, { mask: 'auto' });
    expect(close(prepared.logEnergy.all, expected.logEnergy.all)).toBeLessThan(1e-12);
    expect(close(prepared.logEnergy.masked, expected.logEnergy.masked)).toBeLessThan(1e-12);
    const many = await compareToReferenceInParallel(prepared, test, workers);
    expect(many.ssim).toBe(compareToReference(expected, test).ssim);
    // The workers did compute: every split run came back from them.
    expect(workers.runs.byWorkers).toBeGreaterThan(0);
    expect(workers.runs.takenBack).toBe(0);
  });

  it('works without workers and reports errors from the pixels, naming the file', async () => {
    const none = new MetricWorkers(0);
    const c = fixture.cases[0];
    const [ref, test] = [await load(c.reference), await load(c.test)];
    expect((await compareVolumesInParallel(ref, test, {}, none)).ssim).toBe(compareVolumes(ref, test).ssim);
    test.pixels[5] = NaN;
    await expect(compareVolumesInParallel(ref, test, {}, workers)).rejects.toThrow(/test\.npy: the pixel at slice 0, row 0, column 5 is NaN/);
    await none.close();
  });
});

describe('worker threads under process-wide Node flags', () => {
  it('veil metrics still runs when Node was started with a flag workers refuse (--trace-gc)', async () => {
    const { spawnSync } = await import('node:child_process');
    const { join } = await import('node:path');
    const c = fixture.cases[0];
    const r = spawnSync(process.execPath, ['--trace-gc', join(import.meta.dirname, '..', '..', 'bin', 'veil.mjs'), 'metrics',
      '--reference', DIR + c.reference, '--test', DIR + c.test, '--json'], { encoding: 'utf8', env: { ...process.env, VEIL_NO_RELAUNCH: '1' }, maxBuffer: 1 << 26 });
    expect(r.stderr).not.toContain('invalid execArgv');
    expect(r.status).toBe(0);
    // --trace-gc writes its own lines to stdout too: pick the metric out of them.
    const ssim = Number(/"ssim": ([0-9.e-]+)/.exec(r.stdout)?.[1]);
    expect(Math.abs(ssim - c.native.ssim)).toBeLessThan(1e-6);
  });
});
