/**
 * Image metrics against scikit-image and SciPy: test/reference/metrics/make-fixtures.py computed
 * PSNR (skimage.metrics.peak_signal_noise_ratio), SSIM (structural_similarity, gaussian_weights=True,
 * use_sample_covariance=False, per slice), NRMSE (normalized_root_mse), HFEN (scipy.ndimage.
 * gaussian_laplace after Ravishankar & Bresler 2011) and the automatic mask (skimage.filters.
 * threshold_otsu, scipy.ndimage.label) on invented float32, float64, int16, complex64 and
 * complex128 volumes. The tests read the committed .npy files through Veil's own reader.
 */
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { readNpyFile } from '../../app/images/npy.ts';
import { compareVolumes, prepareReference, compareToReference } from '../../app/metrics/compare-volumes.ts';
import { gaussianHalfKernel, kernelRadius, reflectIndex } from '../../app/metrics/gaussian-kernel.ts';
import { otsuThreshold } from '../../app/metrics/otsu.ts';
import { psnr } from '../../app/metrics/psnr.ts';
import { ssim } from '../../app/metrics/ssim.ts';
import { nrmse } from '../../app/metrics/nrmse.ts';
import { hfen } from '../../app/metrics/hfen.ts';
import { largestComponent } from '../../app/metrics/largest-component.ts';

const DIR = fileURLToPath(new URL('../reference/metrics/', import.meta.url));

interface Values { data_range: number; psnr: number; ssim: number; ssim_per_slice: number[]; nrmse: number; hfen: number }
interface Masked { file: string; psnr: number; ssim: number | null; ssim_slices: number; nrmse: number; hfen: number; voxels: number; threshold?: number; components?: number; filled?: number }
interface Case {
  name: string;
  dtype: string;
  shape: number[];
  reference: string;
  test: string;
  veil: Values;
  native: Values;
  automask?: Masked;
  filemask?: Masked;
}
const fixture = JSON.parse(readFileSync(`${DIR}expected.json`, 'utf8')) as { generator: string; cases: Case[] };
const load = (f: string) => readNpyFile(DIR + f);

/** |a − b| <= tol · max(1, |b|): absolute near 0 and 1, relative for PSNR in dB and large data ranges. */
function expectNear(actual: number | null, expected: number | null, tol: number, what: string): void {
  if (expected === null) {
    expect(actual, what).toBeNull();
    return;
  }
  expect(actual, what).not.toBeNull();
  const err = Math.abs(actual! - expected) / Math.max(1, Math.abs(expected));
  expect(err, `${what}: Veil ${actual}, reference ${expected}`).toBeLessThanOrEqual(tol);
}

describe('image metrics against scikit-image and SciPy', () => {
  it('fixtures come from scikit-image and cover every dtype the issue names', () => {
    expect(fixture.generator).toMatch(/scikit-image 0\.\d+/);
    expect(fixture.cases.map((c) => c.dtype).sort()).toEqual(['complex128', 'complex64', 'float32', 'float64', 'int16']);
  });

  for (const c of fixture.cases) {
    it(`${c.name} (${c.dtype}, shape ${c.shape.join('x')}): PSNR, SSIM, NRMSE, HFEN and data range`, async () => {
      const [ref, test] = [await load(c.reference), await load(c.test)];
      const r = compareVolumes(ref, test);
      // The reference arithmetic on Veil's own pixels (float32, magnitude of complex): rounding only.
      for (const k of ['data_range', 'psnr', 'ssim', 'nrmse', 'hfen'] as const) expectNear(r[k], c.veil[k], 1e-12, `${c.name} ${k}`);
      // skimage on the file's own dtype: within 1e-6 (float64 and complex128 pixels are stored as float32).
      for (const k of ['data_range', 'psnr', 'ssim', 'nrmse', 'hfen'] as const) expectNear(r[k], c.native[k], 1e-6, `${c.name} ${k} (native dtype)`);
      expect(r.slices).toBe(c.veil.ssim_per_slice.length);
      expect(r.masked).toBeNull();
    });
  }

  for (const c of fixture.cases.filter((x) => x.automask)) {
    it(`${c.name}: automatic mask (Otsu, largest component) and masked metrics`, async () => {
      const [ref, test, expectedMask] = [await load(c.reference), await load(c.test), await load(c.automask!.file)];
      const a = c.automask!;
      expectNear(otsuThreshold(ref.pixels), a.threshold!, 1e-12, 'Otsu threshold');
      const r = compareVolumes(ref, test, { mask: 'auto' });
      expect(r.mask).toMatchObject({ source: 'auto', voxels: a.voxels, components: a.components, filled: a.filled });
      expectNear(r.mask!.threshold!, a.threshold!, 1e-12, 'threshold in the report');
      const prepared = prepareReference(ref, { mask: 'auto' });
      expect(Array.from(prepared.mask!.mask)).toEqual(Array.from(expectedMask.pixels, (v) => (v ? 1 : 0)));
      for (const k of ['psnr', 'ssim', 'nrmse', 'hfen'] as const) expectNear(r.masked![k], a[k], 1e-12, `${c.name} masked ${k}`);
      expect(r.masked!.ssim_slices).toBe(a.ssim_slices);
      // Unmasked values are reported beside the masked ones.
      expectNear(r.ssim, c.veil.ssim, 1e-9, 'unmasked SSIM next to the masked');
      expect(r.conventions.join('\n')).toContain(`largest face-connected component of ${a.components}`);
    });
  }

  for (const c of fixture.cases.filter((x) => x.filemask)) {
    it(`${c.name}: mask from a file, including a slice without mask pixels`, async () => {
      const [ref, test, maskVolume] = [await load(c.reference), await load(c.test), await load(c.filemask!.file)];
      const f = c.filemask!;
      const r = compareVolumes(ref, test, { mask: maskVolume });
      expect(r.mask).toMatchObject({ source: 'file', path: maskVolume.provenance.path, voxels: f.voxels });
      for (const k of ['psnr', 'ssim', 'nrmse', 'hfen'] as const) expectNear(r.masked![k], f[k], 1e-12, `${c.name} file-masked ${k}`);
      expect(r.masked!.ssim_slices).toBe(f.ssim_slices);
      expect(r.masked!.ssim_slices).toBeLessThan(r.slices);
    });
  }

  it('each metric alone gives the same numbers as the combined comparison', async () => {
    const c = fixture.cases.find((x) => x.name === 'i16')!;
    const [ref, test] = [await load(c.reference), await load(c.test)];
    const L = c.veil.data_range;
    expectNear(psnr(ref.pixels, test.pixels, L), c.veil.psnr, 1e-12, 'psnr');
    expectNear(nrmse(ref.pixels, test.pixels), c.veil.nrmse, 1e-12, 'nrmse');
    const s = ssim(ref.pixels, test.pixels, ref, L);
    expectNear(s.value, c.veil.ssim, 1e-12, 'ssim');
    c.veil.ssim_per_slice.forEach((v, k) => expectNear(s.perSlice[k], v, 1e-12, `ssim slice ${k}`));
    expectNear(hfen(ref.pixels, test.pixels, ref).value, c.veil.hfen, 1e-12, 'hfen');
  });

  it('a prepared reference gives the same numbers as a one-off comparison (the build path)', async () => {
    const c = fixture.cases[0];
    const [ref, test] = [await load(c.reference), await load(c.test)];
    const prepared = prepareReference(ref, { mask: 'auto' });
    const once = compareVolumes(ref, test, { mask: 'auto' });
    expect(compareToReference(prepared, test)).toEqual(once);
    expect(compareToReference(prepared, ref)).toMatchObject({ psnr: Infinity, ssim: 1, nrmse: 0, hfen: 0 });
  });
});

describe('metric building blocks', () => {
  it("Gaussian kernels are SciPy's: radius 5 for SSIM, 7 for HFEN, weights sum to 1, LoG kernel sums to about 0", () => {
    expect(kernelRadius(1.5, 3.5)).toBe(5);
    expect(kernelRadius(1.5, 7 / 1.5)).toBe(7);
    const g = gaussianHalfKernel(1.5, 5).half;
    expect(g[0] + 2 * g.slice(1).reduce((a, b) => a + b, 0)).toBeCloseTo(1, 15);
    // Centre weights printed by SciPy 1.10: scipy.ndimage._filters._gaussian_kernel1d(1.5, 0, 5)[5] and (1.5, 2, 7)[7].
    expect(g[0]).toBeCloseTo(0.26601172486179436, 15);
    expect(gaussianHalfKernel(1.5, 7, 2).half[0]).toBeCloseTo(-0.1182051629558677, 15);
  });

  it("reflects indices as SciPy's 'reflect' mode (d c b a | a b c d | d c b a)", () => {
    expect([-3, -2, -1, 0, 1, 2, 3, 4, 5, 6].map((i) => reflectIndex(i, 4))).toEqual([2, 1, 0, 0, 1, 2, 3, 3, 2, 1]);
    // Far outside, as numpy.pad(np.arange(4), 12, mode='symmetric') (the same rule) gives: [0, 3, 1, 3].
    expect([-9, -5, 9, 12].map((i) => reflectIndex(i, 4))).toEqual([0, 3, 1, 3]);
    expect(reflectIndex(-7, 1)).toBe(0);
  });

  it('keeps the largest face-connected component; diagonal neighbours are separate', () => {
    // 1 slice of 3 x 4: two single voxels touching only diagonally, and an L of 4.
    const b = Uint8Array.from([1, 0, 0, 1, 0, 1, 0, 1, 0, 0, 1, 1]);
    const { mask, voxels, components } = largestComponent(b, { slices: 1, rows: 3, columns: 4 });
    expect(components).toBe(3);
    expect(voxels).toBe(4);
    expect(Array.from(mask)).toEqual([0, 0, 0, 1, 0, 0, 0, 1, 0, 0, 1, 1]);
    // Connected through the slice axis.
    const two = largestComponent(Uint8Array.from([1, 0, 0, 0, 1, 0, 0, 0]), { slices: 2, rows: 2, columns: 2 });
    expect(two.components).toBe(1);
  });

  it('Otsu returns the value of a constant image, as skimage does', () => {
    expect(otsuThreshold(new Float32Array(10).fill(3))).toBe(3);
  });
});
