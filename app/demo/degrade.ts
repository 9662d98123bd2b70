/**
 * Image-space models of what the demo's three reconstructions do to an image. This first demo
 * approximates them in image space (issue "demo study" replaces this with a k-space simulator):
 * - zero-filled at R = 4: coherent aliasing (shifted ghosts along the phase-encode direction) and noise;
 * - iterative: slight blur, little noise;
 * - smoothed zero-filled: the zero-filled image under a strong Gaussian filter (high PSNR, soft edges).
 */
import type { MT19937 } from '../blinding/mt19937.ts';
import type { PhantomShape } from './phantom.ts';

/** Standard normal deviate by the Box-Muller transform (Box & Muller 1958). */
export function gaussian(rng: MT19937): number {
  let u = 0;
  while (u === 0) u = rng.nextDouble();
  return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * rng.nextDouble());
}

export function addNoise(img: Float32Array, sigma: number, rng: MT19937): Float32Array {
  const out = new Float32Array(img.length);
  for (let i = 0; i < img.length; i++) out[i] = Math.abs(img[i] + sigma * gaussian(rng));
  return out;
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

/** Ghosts at multiples of rows / R along the row (phase-encode) direction, wrapping round. */
export function aliasGhosts(img: Float32Array, shape: PhantomShape, acceleration: number, strength: number): Float32Array {
  const { rows, columns, slices } = shape;
  const out = Float32Array.from(img);
  const shift = Math.round(rows / acceleration);
  for (let s = 0; s < slices; s++) {
    const base = s * rows * columns;
    for (let g = 1; g < acceleration; g++) {
      const w = strength / g;
      for (let r = 0; r < rows; r++) {
        const src = (r + g * shift) % rows;
        for (let c = 0; c < columns; c++) out[base + r * columns + c] += w * img[base + src * columns + c];
      }
    }
  }
  return out;
}
