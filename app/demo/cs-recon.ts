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

function shift(img: ComplexImage, rows: number, columns: number, dy: number, dx: number): ComplexImage {
  const out = new Float64Array(img.length);
  for (let r = 0; r < rows; r++) {
    const rr = (r + dy + rows) % rows;
    for (let c = 0; c < columns; c++) {
      const cc = (c + dx + columns) % columns;
      out[(rr * columns + cc) * 2] = img[(r * columns + c) * 2];
      out[(rr * columns + cc) * 2 + 1] = img[(r * columns + c) * 2 + 1];
    }
  }
  return out;
}

function waveletShrink(img: ComplexImage, rows: number, columns: number, levels: number, threshold: number): ComplexImage {
  const n = rows * columns;
  const re = new Float64Array(n);
  const im = new Float64Array(n);
  for (let i = 0; i < n; i++) { re[i] = img[2 * i]; im[i] = img[2 * i + 1]; }
  haar2d(re, rows, columns, levels);
  haar2d(im, rows, columns, levels);
  const coarse = rows >> levels;
  const coarseCols = columns >> levels;
  for (let i = 0; i < n; i++) {
    const r = Math.floor(i / columns);
    const c = i % columns;
    if (r < coarse && c < coarseCols) continue; // the approximation band is not penalised
    const m = Math.hypot(re[i], im[i]);
    const keep = m > threshold ? (m - threshold) / m : 0;
    re[i] *= keep;
    im[i] *= keep;
  }
  haar2d(re, rows, columns, levels, true);
  haar2d(im, rows, columns, levels, true);
  const out = new Float64Array(2 * n);
  for (let i = 0; i < n; i++) { out[2 * i] = re[i]; out[2 * i + 1] = im[i]; }
  return out;
}

export function fistaWaveletRecon(y: ComplexImage, mask: LineMask, fft: Fft2, opts: FistaOptions, rng: MT19937): ComplexImage {
  const { rows, columns } = fft;
  let x = fft.inverse(y);
  let z = x;
  let t = 1;
  for (let k = 0; k < opts.iterations; k++) {
    const residual = applyMask(fft.forward(z), columns, mask);
    for (let i = 0; i < residual.length; i++) residual[i] -= y[i];
    const grad = fft.inverse(residual);
    const g = new Float64Array(z.length);
    for (let i = 0; i < z.length; i++) g[i] = z[i] - grad[i];
    const dy = rng.nextBelow(1 << opts.levels);
    const dx = rng.nextBelow(1 << opts.levels);
    const xNext = shift(waveletShrink(shift(g, rows, columns, dy, dx), rows, columns, opts.levels, opts.lambda), rows, columns, -dy, -dx);
    const tNext = (1 + Math.sqrt(1 + 4 * t * t)) / 2;
    const zNext = new Float64Array(z.length);
    for (let i = 0; i < z.length; i++) zNext[i] = xNext[i] + ((t - 1) / tNext) * (xNext[i] - x[i]);
    x = xNext;
    z = zNext;
    t = tNext;
  }
  // Data consistency: keep the acquired lines exactly.
  const k = fft.forward(x);
  for (let r = 0; r < rows; r++) {
    if (!mask.lines[r]) continue;
    for (let i = r * columns * 2; i < (r + 1) * columns * 2; i++) k[i] = y[i];
  }
  return fft.inverse(k);
}
