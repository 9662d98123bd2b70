/**
 * Image metrics speed: PSNR, SSIM, NRMSE and HFEN of a 64 x 320 x 320 float32 volume pair, against
 * scikit-image computing SSIM alone (structural_similarity per slice, gaussian_weights=True,
 * use_sample_covariance=False, data_range given) on the same arrays, in the same run.
 * Goal: Veil at least twice as fast.
 *
 * Python runs as it usually does (without the glibc huge-page tunable that `veil metrics` sets for
 * itself, bin/huge-pages.mjs); for transparency it is also timed with that tunable.
 * Two comparisons, each the best of five alternating runs:
 * - whole process: `veil metrics --json` (Node start, tsx, both .npy files read, all four metrics)
 *   against `/usr/bin/python3` importing scikit-image, loading both arrays and computing SSIM;
 * - in process: Veil reading both files and computing the four metrics (worker threads started
 *   before the reads, as `veil metrics` does), against the same Python process's time for np.load
 *   and SSIM (interpreter start and imports left out on both sides).
 * The arrays (an invented phantom with noise; the test blurred and noisier) are written by NumPy
 * into a temporary folder at bench time. Veil's SSIM is checked against scikit-image's on them.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { loadVolume } from '../../app/images/load.ts';
import { compareToReferenceInParallel, prepareReferenceInParallel } from '../../app/metrics/compare-volumes.ts';
import { MetricWorkers, defaultWorkerCount } from '../../app/metrics/metric-workers.ts';
import { fmt } from './stats.ts';
// @ts-expect-error a plain ES module of the launchers, without types
import { withHugePages, withoutHugePages } from '../../bin/huge-pages.mjs';

const REPO = join(import.meta.dirname, '..', '..');
const PYTHON = '/usr/bin/python3';
const RUNS = 5;

const MAKE_ARRAYS = `
import sys, numpy as np
from scipy import ndimage
rng = np.random.default_rng(1)
s, r, c = 64, 320, 320
y, x = np.mgrid[0:r, 0:c]
body = ((((y - 160) / 130.0) ** 2 + ((x - 160) / 115.0) ** 2) <= 1) * 100.0
inner = ((((y - 140) / 40.0) ** 2 + ((x - 180) / 30.0) ** 2) <= 1) * 40.0
ref = np.stack([body + inner * (1 + 0.01 * k) for k in range(s)])
ref = np.abs(ref + 3 * (rng.standard_normal(ref.shape) + 1j * rng.standard_normal(ref.shape))).astype(np.float32)
test = (ndimage.gaussian_filter(ref, (0, 1, 1)) + rng.normal(0, 4, ref.shape)).astype(np.float32)
np.save(sys.argv[1], ref)
np.save(sys.argv[2], test)
`;

const SSIM_ALONE = `
import sys, time, json
t0 = time.perf_counter()
import numpy as np
from skimage.metrics import structural_similarity
t1 = time.perf_counter()
ref = np.load(sys.argv[1]); test = np.load(sys.argv[2])
L = float(ref.max() - ref.min())
ssim = float(np.mean([structural_similarity(ref[k], test[k], gaussian_weights=True, use_sample_covariance=False,
                                            data_range=L) for k in range(ref.shape[0])]))
t2 = time.perf_counter()
print(json.dumps({"ssim": ssim, "imports_ms": (t1 - t0) * 1000, "work_ms": (t2 - t1) * 1000}))
`;

function timed(cmd: string, args: string[], env: NodeJS.ProcessEnv = process.env): { ms: number; stdout: string } {
  const t0 = performance.now();
  const r = spawnSync(cmd, args, { encoding: 'utf8', maxBuffer: 1 << 24, env });
  const ms = performance.now() - t0;
  if (r.status !== 0) throw new Error(`${cmd} ${args.join(' ')} failed: ${r.stderr || r.error}`);
  return { ms, stdout: r.stdout };
}

export async function bench(): Promise<string[]> {
  const dir = mkdtempSync(join(tmpdir(), 'veil-bench-metrics-'));
  try {
    const ref = join(dir, 'reference.npy');
    const test = join(dir, 'test.npy');
    const script = join(dir, 'ssim_alone.py');
    writeFileSync(script, SSIM_ALONE);
    const made = spawnSync(PYTHON, ['-c', MAKE_ARRAYS, ref, test], { encoding: 'utf8', env: withoutHugePages() });
    if (made.status !== 0) return [`skipped: ${PYTHON} with NumPy and SciPy is needed to make the arrays (${made.stderr || made.error})`];

    const veilWhole: number[] = [];
    const veilInner: number[] = [];
    const parts: [number, number, number][] = [];
    const pyWhole: number[] = [];
    const pyInner: number[] = [];
    // Python as it usually runs, and with the glibc huge-page tunable that `veil metrics` gives itself.
    const pyHugeWhole: number[] = [];
    const pyHugeInner: number[] = [];
    let veilSsim = NaN;
    let pySsim = NaN;
    for (let run = 0; run < RUNS; run++) {
      const v = timed(process.execPath, [join(REPO, 'bin', 'veil.mjs'), 'metrics', '--reference', ref, '--test', test, '--json']);
      veilWhole.push(v.ms);
      veilSsim = (JSON.parse(v.stdout) as { ssim: number }).ssim;

      const t0 = performance.now();
      const workers = new MetricWorkers();
      const [a, b] = [await loadVolume(ref), await loadVolume(test)];
      const t1 = performance.now();
      const prepared = await prepareReferenceInParallel(a, {}, workers);
      const t2 = performance.now();
      const r = await compareToReferenceInParallel(prepared, b, workers);
      const t3 = performance.now();
      await workers.close();
      veilInner.push(t3 - t0);
      parts.push([t1 - t0, t2 - t1, t3 - t2]);
      if (Math.abs(r.ssim - veilSsim) > 1e-12) throw new Error('in-process and command-line SSIM differ');

      const p = timed(PYTHON, [script, ref, test], withoutHugePages());
      pyWhole.push(p.ms);
      const ph = timed(PYTHON, [script, ref, test], withHugePages(withoutHugePages()));
      pyHugeWhole.push(ph.ms);
      pyHugeInner.push((JSON.parse(ph.stdout) as { work_ms: number }).work_ms);
      const pj = JSON.parse(p.stdout) as { ssim: number; work_ms: number };
      pyInner.push(pj.work_ms);
      pySsim = pj.ssim;
    }
    const best = (xs: number[]): number => Math.min(...xs);
    const ratio = (a: number[], b: number[]): string => `${(best(b) / best(a)).toFixed(2)}x`;
    const [read, prepare, compare] = parts[veilInner.indexOf(best(veilInner))];
    return [
      `metrics, 64 x 320 x 320 float32 pair (goal: Veil at least 2x as fast as scikit-image SSIM alone); Veil on ${defaultWorkerCount() + 1} threads`,
      `  whole process: veil metrics (PSNR, SSIM, NRMSE, HFEN) ${fmt(best(veilWhole))}  vs  python3 + scikit-image SSIM alone ${fmt(best(pyWhole))}  -> Veil ${ratio(veilWhole, pyWhole)} as fast`,
      `  in process:    read + four metrics ${fmt(best(veilInner))}  vs  np.load + SSIM alone ${fmt(best(pyInner))}  -> Veil ${ratio(veilInner, pyInner)} as fast`,
      `  python3 given the same glibc huge-page tunable as Veil: whole ${fmt(best(pyHugeWhole))} (Veil ${ratio(veilWhole, pyHugeWhole)} as fast), ` +
        `in process ${fmt(best(pyHugeInner))} (Veil ${ratio(veilInner, pyHugeInner)}); page faults weigh heavily on this machine`,
      `  Veil in process, fastest run: read both files ${fmt(read)}; reference (data range, energy, LoG) ${fmt(prepare)}; ` +
        `test (PSNR, SSIM, NRMSE, LoG of the difference) ${fmt(compare)}`,
      `  SSIM agrees with scikit-image to ${Math.abs(veilSsim - pySsim).toExponential(1)} (Veil ${veilSsim.toFixed(8)}, scikit-image ${pySsim.toFixed(8)})`,
    ];
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}
