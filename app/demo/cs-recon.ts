/**
 * Compressed-sensing reconstruction for the demo (Lustig, Donoho & Pauly 2007): minimise
 *   (1/2) || M F x - y ||^2 + lambda || W x ||_1
 * over complex images x, with M the line mask, F the unitary 2D DFT (./fft2.ts), y the acquired
 * k-space and W the orthonormal Haar transform (./haar.ts) applied to real and imaginary parts.
 * Solved by FISTA (Beck & Teboulle 2009, SIAM J Imaging Sci 2:183-202) with step 1 (the Lipschitz
 * constant of the data term is ||M F||^2 = 1): gradient step on the data term, soft thresholding
 * of the complex wavelet coefficients by magnitude, Nesterov momentum. Each iteration shifts the
 * image by a random offset before the wavelet step and back after (cycle spinning, Coifman &
 * Donoho 1995) so the Haar blocks do not print on the image. A last data-consistency step puts
 * the acquired lines back.
 */
import type { MT19937 } from '../blinding/mt19937.ts';
import { Fft2, type ComplexImage } from './fft2.ts';
import { haar2d } from './haar.ts';
import { applyMask, type LineMask } from './undersampling.ts';

export interface FistaOptions { lambda: number; iterations: number; levels: number }

/** out = img circularly shifted by (dy, dx). */
function shiftInto(img: ComplexImage, out: ComplexImage, rows: number, columns: number, dy: number, dx: number): void {
  for (let r = 0; r < rows; r++) {
    const rr = (r + dy + rows) % rows;
    for (let c = 0; c < columns; c++) {
      const cc = (c + dx + columns) % columns;
      out[(rr * columns + cc) * 2] = img[(r * columns + c) * 2];
      out[(rr * columns + cc) * 2 + 1] = img[(r * columns + c) * 2 + 1];
    }
  }
}

/** Soft thresholding of the complex Haar coefficients of `img` by magnitude, in place (re, im scratch given). */
function waveletShrink(img: ComplexImage, re: Float64Array, im: Float64Array, rows: number, columns: number, levels: number, threshold: number): void {
  const n = rows * columns;
  for (let i = 0; i < n; i++) { re[i] = img[2 * i]; im[i] = img[2 * i + 1]; }
  haar2d(re, rows, columns, levels);
  haar2d(im, rows, columns, levels);
  const coarseRows = rows >> levels;
  const coarseCols = columns >> levels;
  for (let r = 0; r < rows; r++) {
    for (let c = 0; c < columns; c++) {
      if (r < coarseRows && c < coarseCols) continue; // the approximation band is not penalised
      const i = r * columns + c;
      const m = Math.hypot(re[i], im[i]);
      const keep = m > threshold ? (m - threshold) / m : 0;
      re[i] *= keep;
      im[i] *= keep;
    }
  }
  haar2d(re, rows, columns, levels, true);
  haar2d(im, rows, columns, levels, true);
  for (let i = 0; i < n; i++) { img[2 * i] = re[i]; img[2 * i + 1] = im[i]; }
}

export function fistaWaveletRecon(y: ComplexImage, mask: LineMask, fft: Fft2, opts: FistaOptions, rng: MT19937): ComplexImage {
  const { rows, columns } = fft;
  const len = rows * columns * 2;
  // Every buffer is allocated once; the loop itself allocates nothing.
  let x: ComplexImage = fft.inverse(y);
  let xNext: ComplexImage = new Float64Array(len);
  const z = Float64Array.from(x);
  const k = new Float64Array(len);
  const g = new Float64Array(len);
  const shifted = new Float64Array(len);
  const re = new Float64Array(rows * columns);
  const im = new Float64Array(rows * columns);
  let t = 1;
  for (let it = 0; it < opts.iterations; it++) {
    // Gradient step on the data term: g = z - F^H M (M F z - y).
    fft.forwardInto(z, k);
    applyMask(k, columns, mask);
    for (let i = 0; i < len; i++) k[i] -= y[i];
    fft.inverseInto(k, g);
    for (let i = 0; i < len; i++) g[i] = z[i] - g[i];
    // Proximal step in a randomly shifted wavelet frame.
    const dy = rng.nextBelow(1 << opts.levels);
    const dx = rng.nextBelow(1 << opts.levels);
    shiftInto(g, shifted, rows, columns, dy, dx);
    waveletShrink(shifted, re, im, rows, columns, opts.levels, opts.lambda);
    shiftInto(shifted, xNext, rows, columns, -dy, -dx);
    // Nesterov momentum.
    const tNext = (1 + Math.sqrt(1 + 4 * t * t)) / 2;
    const w = (t - 1) / tNext;
    for (let i = 0; i < len; i++) z[i] = xNext[i] + w * (xNext[i] - x[i]);
    [x, xNext] = [xNext, x];
    t = tNext;
  }
  // Data consistency: keep the acquired lines exactly.
  fft.forwardInto(x, k);
  for (let r = 0; r < rows; r++) {
    if (!mask.lines[r]) continue;
    for (let i = r * columns * 2; i < (r + 1) * columns * 2; i++) k[i] = y[i];
  }
  return fft.inverse(k);
}
