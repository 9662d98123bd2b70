/**
 * Small image tools of the demo simulator: Gaussian deviates and a separable Gaussian filter.
 */
import type { MT19937 } from '../blinding/mt19937.ts';
import type { PhantomShape } from './phantom.ts';

/** Standard normal deviate by the Box-Muller transform (Box & Muller 1958). */
export function gaussian(rng: MT19937): number {
  let u = 0;
  while (u === 0) u = rng.nextDouble();
  return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * rng.nextDouble());
}

/** Separable Gaussian filter of each slice (rows and columns), edges clamped. */
export function gaussianBlur(img: Float32Array, shape: PhantomShape, sigma: number): Float32Array {
  const radius = Math.max(1, Math.ceil(3 * sigma));
  const kernel: number[] = [];
  let sum = 0;
  for (let k = -radius; k <= radius; k++) { const w = Math.exp(-(k * k) / (2 * sigma * sigma)); kernel.push(w); sum += w; }
  for (let k = 0; k < kernel.length; k++) kernel[k] /= sum;
  const { rows, columns, slices } = shape;
  const tmp = new Float32Array(img.length);
  const out = new Float32Array(img.length);
  for (let s = 0; s < slices; s++) {
    const base = s * rows * columns;
    for (let r = 0; r < rows; r++) for (let c = 0; c < columns; c++) {
      let acc = 0;
      for (let k = -radius; k <= radius; k++) acc += kernel[k + radius] * img[base + r * columns + Math.min(columns - 1, Math.max(0, c + k))];
      tmp[base + r * columns + c] = acc;
    }
    for (let r = 0; r < rows; r++) for (let c = 0; c < columns; c++) {
      let acc = 0;
      for (let k = -radius; k <= radius; k++) acc += kernel[k + radius] * tmp[base + Math.min(rows - 1, Math.max(0, r + k)) * columns + c];
      out[base + r * columns + c] = acc;
    }
  }
  return out;
}
