/**
 * Sampled Gaussian kernels and their second derivative, exactly as SciPy's ndimage builds them
 * (scipy/ndimage/_filters.py, `_gaussian_kernel1d`, SciPy 1.10), so that SSIM and HFEN match the
 * reference implementations to rounding:
 *
 *   radius r = floor(truncate · σ + 0.5)
 *   φ(x)     = exp(−x² / (2σ²)) / Σ_{t=−r..r} exp(−t² / (2σ²)),   x = −r..r
 *   order 0: φ(x)                       (weights sum to 1)
 *   order 2: φ(x) · (x²/σ⁴ − 1/σ²)      (second derivative of the normalized Gaussian)
 *
 * Both are symmetric, so only the half x = 0..r is returned: `half[k]` is the weight of x = ±k.
 * SciPy's 'reflect' border (half-sample symmetric: d c b a | a b c d | d c b a) is `reflectIndex`.
 */

export interface HalfKernel {
  radius: number;
  /** half[k] = weight at offset ±k, k = 0..radius. */
  half: Float64Array;
}

export function kernelRadius(sigma: number, truncate: number): number {
  return Math.floor(truncate * sigma + 0.5);
}

export function gaussianHalfKernel(sigma: number, radius: number, order: 0 | 2 = 0): HalfKernel {
  const s2 = sigma * sigma;
  let sum = 0;
  for (let x = -radius; x <= radius; x++) sum += Math.exp((-0.5 / s2) * x * x);
  const half = new Float64Array(radius + 1);
  for (let x = 0; x <= radius; x++) {
    const phi = Math.exp((-0.5 / s2) * x * x) / sum;
    half[x] = order === 0 ? phi : phi * ((x * x) / (s2 * s2) - 1 / s2);
  }
  return { radius, half };
}

/** SciPy's 'reflect' mode: the index of the sample that stands at position i of an axis of length n. */
export function reflectIndex(i: number, n: number): number {
  if (n === 1) return 0;
  const period = 2 * n;
  let j = i % period;
  if (j < 0) j += period;
  return j < n ? j : period - 1 - j;
}
