/**
 * HFEN, the high-frequency error norm of Ravishankar & Bresler (2011), "MR image reconstruction
 * from highly undersampled k-space data by dictionary learning", IEEE Transactions on Medical
 * Imaging 30(5):1028–1041, https://doi.org/10.1109/TMI.2010.2090538 (Section IV-A):
 *
 *   HFEN = ‖LoG(x) − LoG(y)‖₂ / ‖LoG(x)‖₂
 *
 * with x the reference, y the test image and LoG a rotationally symmetric Laplacian-of-Gaussian
 * filter of 15×15 pixels and standard deviation 1.5 pixels, applied to each 2D slice.
 *
 * The LoG is SciPy's `scipy.ndimage.gaussian_laplace(image, sigma=1.5, mode='reflect',
 * truncate=7/1.5)`: ∂²/∂row² + ∂²/∂column² of the sampled Gaussian, each term separable (second
 * derivative kernel along one axis, Gaussian along the other; ./gaussian-kernel.ts), radius 7 so
 * the support is the paper's 15×15; borders by half-sample reflection. The norms run over every
 * pixel of every slice (with a mask, over the mask pixels; the filter still sees whole slices).
 *
 * The filter is linear, so LoG(x) − LoG(y) = LoG(x − y): each slice is filtered twice (x and
 * x − y), and ‖LoG(x)‖² can be computed once per reference and reused for every test image.
 */
import { gaussianHalfKernel, reflectIndex } from './gaussian-kernel.ts';
import { sliceKernels } from './slice-kernels.ts';
import type { SliceGeometry } from './ssim.ts';

export const HFEN_SIGMA = 1.5;
export const HFEN_SIZE = 15;
const RADIUS = (HFEN_SIZE - 1) / 2; // 7
/** SciPy's truncate that gives radius 7 at σ = 1.5. */
export const HFEN_TRUNCATE = RADIUS / HFEN_SIGMA;

/** Sums of squares of LoG images over slices [from, to): plain and under a mask. */
export interface LogEnergy {
  all: number;
  masked: number;
}

/**
 * The kernels' halves (Gaussian G0..G7, second derivative D0..D7), copied into each pass's own
 * constants at its start: a bundler may turn module-level constants into variables, which the
 * compiler would then reload at every pixel (the LoG ran at half speed that way).
 */
const K = (() => {
  const [G0, G1, G2, G3, G4, G5, G6, G7] = gaussianHalfKernel(HFEN_SIGMA, RADIUS, 0).half;
  const [D0, D1, D2, D3, D4, D5, D6, D7] = gaussianHalfKernel(HFEN_SIGMA, RADIUS, 2).half;
  return { G0, G1, G2, G3, G4, G5, G6, G7, D0, D1, D2, D3, D4, D5, D6, D7 };
})();

/**
 * One padded row (C + 14 values) to its second derivative (`along`) and Gaussian (`across`) along
 * the row, written at [at, at + C).
 */
function filterRow(p: Float64Array, C: number, along: Float64Array, across: Float64Array, at: number): void {
  const { G0, G1, G2, G3, G4, G5, G6, G7, D0, D1, D2, D3, D4, D5, D6, D7 } = K;
  for (let c = 0; c < C; c++) {
    const m = c + RADIUS;
    const x0 = p[m];
    const x1 = p[m - 1] + p[m + 1];
    const x2 = p[m - 2] + p[m + 2];
    const x3 = p[m - 3] + p[m + 3];
    const x4 = p[m - 4] + p[m + 4];
    const x5 = p[m - 5] + p[m + 5];
    const x6 = p[m - 6] + p[m + 6];
    const x7 = p[m - 7] + p[m + 7];
    along[at + c] = D0 * x0 + D1 * x1 + D2 * x2 + D3 * x3 + D4 * x4 + D5 * x5 + D6 * x6 + D7 * x7;
    across[at + c] = G0 * x0 + G1 * x1 + G2 * x2 + G3 * x3 + G4 * x4 + G5 * x5 + G6 * x6 + G7 * x7;
  }
}

/**
 * The LoG of one output row from the row-filtered slices: Gaussian down the columns of `along`
 * plus second derivative down the columns of `across`. `rows[first .. first + 14]` hold the start
 * offsets of the 15 input rows (top to bottom, borders already reflected).
 */
function filterColumns(along: Float64Array, across: Float64Array, rows: Int32Array, first: number, C: number, out: Float64Array): void {
  const { G0, G1, G2, G3, G4, G5, G6, G7, D0, D1, D2, D3, D4, D5, D6, D7 } = K;
  // Read one by one: destructuring a typed array goes through an iterator, allocating per row.
  const u7 = rows[first], u6 = rows[first + 1], u5 = rows[first + 2], u4 = rows[first + 3];
  const u3 = rows[first + 4], u2 = rows[first + 5], u1 = rows[first + 6], o = rows[first + 7];
  const v1 = rows[first + 8], v2 = rows[first + 9], v3 = rows[first + 10], v4 = rows[first + 11];
  const v5 = rows[first + 12], v6 = rows[first + 13], v7 = rows[first + 14];
  for (let c = 0; c < C; c++) {
    out[c] =
      G0 * along[o + c] +
      G1 * (along[u1 + c] + along[v1 + c]) +
      G2 * (along[u2 + c] + along[v2 + c]) +
      G3 * (along[u3 + c] + along[v3 + c]) +
      G4 * (along[u4 + c] + along[v4 + c]) +
      G5 * (along[u5 + c] + along[v5 + c]) +
      G6 * (along[u6 + c] + along[v6 + c]) +
      G7 * (along[u7 + c] + along[v7 + c]) +
      D0 * across[o + c] +
      D1 * (across[u1 + c] + across[v1 + c]) +
      D2 * (across[u2 + c] + across[v2 + c]) +
      D3 * (across[u3 + c] + across[v3 + c]) +
      D4 * (across[u4 + c] + across[v4 + c]) +
      D5 * (across[u5 + c] + across[v5 + c]) +
      D6 * (across[u6 + c] + across[v6 + c]) +
      D7 * (across[u7 + c] + across[v7 + c]);
  }
}

/**
 * Filters each slice [from, to) of a − b (b null: a alone; slice-major layout) with the LoG and
 * adds up the squares of the result: on the WebAssembly kernels where they load
 * (./slice-kernels.ts), else with the passes above.
 */
function logEnergy(
  a: Float32Array,
  b: Float32Array | null,
  geometry: SliceGeometry,
  mask: Uint8Array | null,
  from: number,
  to: number,
): LogEnergy {
  const { rows: R, columns: C } = geometry;
  const kernels = sliceKernels();
  if (kernels) {
    const plane = R * C;
    const G = [K.G0, K.G1, K.G2, K.G3, K.G4, K.G5, K.G6, K.G7];
    const D = [K.D0, K.D1, K.D2, K.D3, K.D4, K.D5, K.D6, K.D7];
    let all = 0;
    let masked = 0;
    for (let s = from; s < to; s++) {
      const e = kernels.logSlice(a.subarray(s * plane, (s + 1) * plane), b?.subarray(s * plane, (s + 1) * plane) ?? null,
        mask?.subarray(s * plane, (s + 1) * plane) ?? null, R, C, G, D);
      all += e.all;
      masked += e.masked;
    }
    return { all, masked };
  }
  const colMap = Int32Array.from({ length: C + 2 * RADIUS }, (_, i) => reflectIndex(i - RADIUS, C));
  const rowStart = Int32Array.from({ length: R + 2 * RADIUS }, (_, i) => reflectIndex(i - RADIUS, R) * C);
  const padded = new Float64Array(C + 2 * RADIUS);
  const along = new Float64Array(R * C);
  const across = new Float64Array(R * C);
  const out = new Float64Array(C);
  let all = 0;
  let masked = 0;
  for (let s = from; s < to; s++) {
    const base = s * R * C;
    for (let r = 0; r < R; r++) {
      const o = base + r * C;
      if (b === null) for (let i = 0; i < padded.length; i++) padded[i] = a[o + colMap[i]];
      else for (let i = 0; i < padded.length; i++) padded[i] = a[o + colMap[i]] - b[o + colMap[i]];
      filterRow(padded, C, along, across, r * C);
    }
    for (let r = 0; r < R; r++) {
      filterColumns(along, across, rowStart, r, C, out);
      const m = base + r * C;
      for (let c = 0; c < C; c++) {
        const e = out[c] * out[c];
        all += e;
        if (mask !== null && mask[m + c] !== 0) masked += e;
      }
    }
  }
  return { all, masked };
}

export interface HfenParts {
  /** ‖LoG(reference)‖², plain and masked. */
  reference: LogEnergy;
  /** ‖LoG(reference − test)‖², plain and masked. */
  difference: LogEnergy;
}

/** ‖LoG(reference)‖² over slices [from, to): the part of HFEN that depends on the reference alone. */
export function referenceLogEnergy(reference: Float32Array, geometry: SliceGeometry, mask: Uint8Array | null, from: number, to: number): LogEnergy {
  return logEnergy(reference, null, geometry, mask, from, to);
}

/** ‖LoG(reference − test)‖² over slices [from, to). */
export function differenceLogEnergy(
  reference: Float32Array,
  test: Float32Array,
  geometry: SliceGeometry,
  mask: Uint8Array | null,
  from: number,
  to: number,
): LogEnergy {
  return logEnergy(reference, test, geometry, mask, from, to);
}

export interface HfenResult {
  value: number;
  /** HFEN over the mask pixels; null without a mask. */
  masked: number | null;
}

export function hfenFromParts(parts: HfenParts, masked: boolean): HfenResult {
  return {
    value: Math.sqrt(parts.difference.all) / Math.sqrt(parts.reference.all),
    masked: masked ? Math.sqrt(parts.difference.masked) / Math.sqrt(parts.reference.masked) : null,
  };
}

export function hfen(
  reference: Float32Array,
  test: Float32Array,
  geometry: SliceGeometry & { slices: number },
  mask: Uint8Array | null = null,
): HfenResult {
  const parts: HfenParts = {
    reference: referenceLogEnergy(reference, geometry, mask, 0, geometry.slices),
    difference: differenceLogEnergy(reference, test, geometry, mask, 0, geometry.slices),
  };
  return hfenFromParts(parts, mask !== null);
}
