/**
 * SSIM, the structural similarity index of Wang, Bovik, Sheikh & Simoncelli (2004),
 * "Image quality assessment: from error visibility to structural similarity",
 * IEEE Transactions on Image Processing 13(4):600–612, https://doi.org/10.1109/TIP.2003.819861
 *
 * For reference x and test y, with local statistics under a Gaussian window w (σ = 1.5, 11×11,
 * weights summing to 1; the paper's Section III-C):
 *
 *   μx = w∗x,  μy = w∗y,  σx² = w∗x² − μx²,  σy² = w∗y² − μy²,  σxy = w∗(xy) − μx μy
 *   SSIM(p) = (2 μx μy + C1)(2 σxy + C2) / ((μx² + μy² + C1)(σx² + σy² + C2))
 *   C1 = (K1 L)², C2 = (K2 L)², K1 = 0.01, K2 = 0.03, L = data range
 *
 * The (co)variances are population ones (weights sum to 1, no N/(N−1)), as in the paper.
 * Conventions of the common reference implementation, scikit-image's
 * `structural_similarity(gaussian_weights=True, use_sample_covariance=False, data_range=L)`
 * (skimage/metrics/_structural_similarity.py, 0.19): the window is SciPy's sampled Gaussian with
 * truncate 3.5, i.e. radius floor(3.5·1.5 + 0.5) = 5 (11 taps); the SSIM map is averaged over the
 * pixels at least 5 from every edge (the window never leaves the image there, so no border rule
 * enters the mean); a slice must be at least 11×11.
 *
 * Veil computes SSIM per 2D slice (rows × columns) and averages the slice means; L is one number
 * for the whole volume. With a mask, a slice's masked mean is taken over the mask pixels of that
 * interior, and the masked SSIM averages it over the slices that have any.
 *
 * Speed: one pass per row builds the horizontal sums of the four moments x, y, x² + y² and xy
 * (σx² + σy² needs only w∗(x² + y²)), a second pass the vertical sums and the SSIM value, so each
 * pixel is filtered 2 × 4 times with the symmetric 11 taps folded to 6 multiplications.
 */
import { sliceKernels } from './slice-kernels.ts';
import { gaussianHalfKernel, kernelRadius } from './gaussian-kernel.ts';

export const SSIM_K1 = 0.01;
export const SSIM_K2 = 0.03;
export const SSIM_SIGMA = 1.5;
export const SSIM_TRUNCATE = 3.5;
const RADIUS = kernelRadius(SSIM_SIGMA, SSIM_TRUNCATE); // 5
export const SSIM_WINDOW = 2 * RADIUS + 1; // 11
/**
 * The window's half (W0 the centre), copied into each pass's own constants: a bundler may turn
 * module-level constants into variables, which the compiler would then reload at every pixel.
 */
const K = (() => {
  const [W0, W1, W2, W3, W4, W5] = gaussianHalfKernel(SSIM_SIGMA, RADIUS).half;
  return { W0, W1, W2, W3, W4, W5 };
})();

/** Horizontal window sums of one row (`src`, length C) for the valid columns, into dst[at...]. */
function horizontal(src: Float64Array, C: number, dst: Float64Array, at: number): void {
  const { W0, W1, W2, W3, W4, W5 } = K;
  for (let c = RADIUS; c < C - RADIUS; c++) {
    dst[at++] =
      W0 * src[c] +
      W1 * (src[c - 1] + src[c + 1]) +
      W2 * (src[c - 2] + src[c + 2]) +
      W3 * (src[c - 3] + src[c + 3]) +
      W4 * (src[c - 4] + src[c + 4]) +
      W5 * (src[c - 5] + src[c + 5]);
  }
}

/** Vertical window sum at h[o], rows `stride` apart. */
function vertical(h: Float64Array, o: number, stride: number): number {
  const { W0, W1, W2, W3, W4, W5 } = K;
  return (
    W0 * h[o] +
    W1 * (h[o - stride] + h[o + stride]) +
    W2 * (h[o - 2 * stride] + h[o + 2 * stride]) +
    W3 * (h[o - 3 * stride] + h[o + 3 * stride]) +
    W4 * (h[o - 4 * stride] + h[o + 4 * stride]) +
    W5 * (h[o - 5 * stride] + h[o + 5 * stride])
  );
}

export interface SliceGeometry {
  rows: number;
  columns: number;
}

/** Per-slice sums of the SSIM map over the interior, plain and under a mask. */
export interface SsimSliceSums {
  /** Mean SSIM of each slice's interior. */
  mean: Float64Array;
  /** Sum of SSIM over mask pixels of the interior, and their count, per slice. */
  maskedSum: Float64Array;
  maskedCount: Float64Array;
}

/**
 * SSIM of slices [from, to) of two volumes stored slice-major (slice, row, column).
 * `mask` (optional, same layout) selects the pixels of the masked mean. Runs on the WebAssembly
 * kernels where they load (./slice-kernels.ts), else on the passes below.
 */
export function ssimSlices(
  reference: Float32Array,
  test: Float32Array,
  geometry: SliceGeometry,
  dataRange: number,
  mask: Uint8Array | null,
  from: number,
  to: number,
): SsimSliceSums {
  const { rows: R, columns: C } = geometry;
  if (R < SSIM_WINDOW || C < SSIM_WINDOW) {
    throw new RangeError(`SSIM needs slices of at least ${SSIM_WINDOW}x${SSIM_WINDOW} pixels (the Gaussian window), got ${R}x${C}`);
  }
  const c1 = (SSIM_K1 * dataRange) ** 2;
  const c2 = (SSIM_K2 * dataRange) ** 2;
  const interiorPixels = (R - 2 * RADIUS) * (C - 2 * RADIUS);

  const kernels = sliceKernels();
  if (kernels) {
    const n = to - from;
    const out: SsimSliceSums = { mean: new Float64Array(n), maskedSum: new Float64Array(n), maskedCount: new Float64Array(n) };
    const plane = R * C;
    const w = [K.W0, K.W1, K.W2, K.W3, K.W4, K.W5];
    for (let s = from; s < to; s++) {
      const r = kernels.ssimSlice(reference.subarray(s * plane, (s + 1) * plane), test.subarray(s * plane, (s + 1) * plane),
        mask?.subarray(s * plane, (s + 1) * plane) ?? null, R, C, w, c1, c2);
      out.mean[s - from] = r.sum / interiorPixels;
      out.maskedSum[s - from] = r.maskedSum;
      out.maskedCount[s - from] = r.maskedCount;
    }
    return out;
  }

  // Horizontal sums exist for the valid columns only: the interior never needs the others.
  const Cv = C - 2 * RADIUS;
  const hx = new Float64Array(R * Cv);
  const hy = new Float64Array(R * Cv);
  const hq = new Float64Array(R * Cv);
  const hp = new Float64Array(R * Cv);
  const xr = new Float64Array(C);
  const yr = new Float64Array(C);
  const qr = new Float64Array(C);
  const pr = new Float64Array(C);

  const n = to - from;
  const out: SsimSliceSums = { mean: new Float64Array(n), maskedSum: new Float64Array(n), maskedCount: new Float64Array(n) };
  const interior = (R - 2 * RADIUS) * Cv;
  for (let s = from; s < to; s++) {
    const base = s * R * C;
    for (let r = 0; r < R; r++) {
      const o = base + r * C;
      for (let c = 0; c < C; c++) {
        const a = reference[o + c];
        const b = test[o + c];
        xr[c] = a;
        yr[c] = b;
        qr[c] = a * a + b * b;
        pr[c] = a * b;
      }
      const at = r * Cv;
      horizontal(xr, C, hx, at);
      horizontal(yr, C, hy, at);
      horizontal(qr, C, hq, at);
      horizontal(pr, C, hp, at);
    }
    let sum = 0;
    let mSum = 0;
    let mCount = 0;
    for (let r = RADIUS; r < R - RADIUS; r++) {
      const row = r * Cv;
      const maskRow = base + r * C + RADIUS;
      for (let j = 0; j < Cv; j++) {
        const o = row + j;
        const mx = vertical(hx, o, Cv);
        const my = vertical(hy, o, Cv);
        const mxy = mx * my;
        const m2 = mx * mx + my * my;
        const v = ((2 * mxy + c1) * (2 * (vertical(hp, o, Cv) - mxy) + c2)) / ((m2 + c1) * (vertical(hq, o, Cv) - m2 + c2));
        sum += v;
        if (mask !== null && mask[maskRow + j] !== 0) {
          mSum += v;
          mCount++;
        }
      }
    }
    out.mean[s - from] = sum / interior;
    out.maskedSum[s - from] = mSum;
    out.maskedCount[s - from] = mCount;
  }
  return out;
}

export interface SsimResult {
  /** Mean over slices of each slice's mean SSIM. */
  value: number;
  perSlice: Float64Array;
  /** Mean over slices (with any mask pixel in the interior) of the masked slice means; null without a mask or when no slice has one. */
  masked: number | null;
  maskedSlices: number;
}

export function ssim(
  reference: Float32Array,
  test: Float32Array,
  geometry: SliceGeometry & { slices: number },
  dataRange: number,
  mask: Uint8Array | null = null,
): SsimResult {
  return combineSsim(ssimSlices(reference, test, geometry, dataRange, mask, 0, geometry.slices), mask !== null);
}

/** Slice sums (possibly computed in parts) to the volume's SSIM. */
export function combineSsim(sums: SsimSliceSums, masked: boolean): SsimResult {
  const perSlice = sums.mean;
  let total = 0;
  for (const v of perSlice) total += v;
  let mTotal = 0;
  let mSlices = 0;
  for (let s = 0; s < perSlice.length; s++) {
    if (sums.maskedCount[s] > 0) {
      mTotal += sums.maskedSum[s] / sums.maskedCount[s];
      mSlices++;
    }
  }
  return {
    value: total / perSlice.length,
    perSlice,
    masked: masked && mSlices > 0 ? mTotal / mSlices : null,
    maskedSlices: mSlices,
  };
}
