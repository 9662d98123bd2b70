/**
 * PSNR, the peak signal-to-noise ratio, in decibels:
 *
 *   MSE  = (1/N) Σ_i (x_i − y_i)²              over the N voxels of the volume (or of the mask)
 *   PSNR = 10 · log10(L² / MSE)                 L = data range (see ./data-range.ts)
 *
 * as in scikit-image's `peak_signal_noise_ratio(image_true, image_test, data_range=L)`
 * (skimage/metrics/simple_metrics.py) and e.g. Wang & Bovik (2009), "Mean squared error: love it
 * or leave it?", IEEE Signal Processing Magazine 26(1):98–117, eq. (2). Identical volumes give
 * MSE 0 and PSNR +∞ (reported as null in JSON, "inf" in text).
 */

/** Sum of squared differences over all voxels and over the mask voxels, with the mask's voxel count. */
export interface SquaredError {
  sum: number;
  count: number;
  maskedSum: number;
  maskedCount: number;
}

export function squaredError(reference: Float32Array, test: Float32Array, mask: Uint8Array | null): SquaredError {
  let sum = 0;
  let maskedSum = 0;
  let maskedCount = 0;
  for (let i = 0; i < reference.length; i++) {
    const d = reference[i] - test[i];
    sum += d * d;
    if (mask !== null && mask[i] !== 0) {
      maskedSum += d * d;
      maskedCount++;
    }
  }
  return { sum, count: reference.length, maskedSum, maskedCount };
}

export function psnrFromMse(mse: number, dataRange: number): number {
  return 10 * Math.log10((dataRange * dataRange) / mse);
}

export function psnr(reference: Float32Array, test: Float32Array, dataRange: number): number {
  const e = squaredError(reference, test, null);
  return psnrFromMse(e.sum / e.count, dataRange);
}
