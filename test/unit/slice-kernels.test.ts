/**
 * The WebAssembly SIMD kernels (app/metrics/slice-kernels.ts) give what the JavaScript passes of
 * app/metrics/hfen.ts and ssim.ts give, on even and odd slice sizes, with and without a mask, the
 * LoG of a difference and of one image, down to the smallest slice SSIM accepts; and the module
 * committed is the one app/metrics/wasm/make-filters.mjs makes (with wabt).
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterEach, describe, expect, it } from 'vitest';
import { MT19937 } from '../../app/blinding/mt19937.ts';
import { differenceLogEnergy, referenceLogEnergy } from '../../app/metrics/hfen.ts';
import { sliceKernels, useSliceKernels } from '../../app/metrics/slice-kernels.ts';
import { ssimSlices } from '../../app/metrics/ssim.ts';
// @ts-expect-error the generator is a plain ES module without types
import { makeFilters, moduleSource } from '../../app/metrics/wasm/make-filters.mjs';

function volume(n: number, seed: number): Float32Array {
  const rng = MT19937.fromSeed(seed);
  return Float32Array.from({ length: n }, () => 100 * rng.nextDouble() + (rng.nextDouble() < 0.1 ? 400 : 0));
}

const rel = (a: number, b: number) => Math.abs(a - b) / Math.max(1e-300, Math.abs(b));

afterEach(() => useSliceKernels(true));

describe('WebAssembly slice kernels', () => {
  it('load here (Node has WebAssembly SIMD)', () => {
    expect(sliceKernels()).not.toBeNull();
  });

  for (const [S, R, C] of [[2, 11, 11], [3, 24, 28], [2, 31, 17], [1, 40, 33], [2, 12, 64]]) {
    it(`match the JavaScript passes on ${S} x ${R} x ${C}`, () => {
      const n = S * R * C;
      const a = volume(n, R * 100 + C);
      const b = Float32Array.from(a, (v, i) => v + ((i * 7) % 13) - 6);
      const mask = Uint8Array.from({ length: n }, (_, i) => ((i * 31) % 7 < 4 ? 1 : 0));
      const g = { rows: R, columns: C };
      const run = () => ({
        ref: referenceLogEnergy(a, g, mask, 0, S),
        diff: differenceLogEnergy(a, b, g, null, 0, S),
        ssim: ssimSlices(a, b, g, 500, mask, 0, S),
        ssimPlain: ssimSlices(a, b, g, 500, null, 0, S),
      });
      useSliceKernels(true);
      const w = run();
      useSliceKernels(false);
      const j = run();
      for (const k of ['all', 'masked'] as const) {
        expect(rel(w.ref[k], j.ref[k]), `reference LoG ${k}`).toBeLessThan(1e-12);
        expect(rel(w.diff[k] + 1e-300, j.diff[k] + 1e-300), `difference LoG ${k}`).toBeLessThan(1e-12);
      }
      for (let s = 0; s < S; s++) {
        expect(Math.abs(w.ssim.mean[s] - j.ssim.mean[s]), `SSIM slice ${s}`).toBeLessThan(1e-12);
        expect(Math.abs(w.ssim.maskedSum[s] - j.ssim.maskedSum[s]), `masked SSIM slice ${s}`).toBeLessThan(1e-9);
        expect(w.ssim.maskedCount[s]).toBe(j.ssim.maskedCount[s]);
        expect(w.ssimPlain.maskedCount[s]).toBe(0);
      }
    });
  }

  it('are the module make-filters.mjs makes', async () => {
    const { wasm } = await makeFilters();
    const committed = readFileSync(join(import.meta.dirname, '..', '..', 'app', 'metrics', 'wasm', 'filters-wasm.ts'), 'utf8');
    expect(committed).toBe(moduleSource(wasm));
  });
});
