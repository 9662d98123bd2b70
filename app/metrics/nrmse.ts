/**
 * NRMSE, the normalized root-mean-square error, Euclidean normalization:
 *
 *   NRMSE = ‖x − y‖₂ / ‖x‖₂ = sqrt(Σ_i (x_i − y_i)²) / sqrt(Σ_i x_i²)
 *
 * over the voxels of the volume (or of the mask), x the reference. This is scikit-image's
 * `normalized_root_mse(image_true, image_test, normalization='euclidean')`
 * (skimage/metrics/simple_metrics.py: sqrt(mean((x − y)²)) / sqrt(mean(x²)), the means cancel),
 * and the relative ℓ2 error common in MR reconstruction papers (e.g. Ravishankar & Bresler 2011,
 * where it is called the relative ℓ2 norm error). A reference of all zeros gives +∞ or NaN.
 */
import { squaredError } from './psnr.ts';

/** Σ x_i² over all voxels and over the mask voxels. */
export function referenceEnergy(reference: Float32Array, mask: Uint8Array | null): { all: number; masked: number } {
  let all = 0;
  let masked = 0;
  for (let i = 0; i < reference.length; i++) {
    const e = reference[i] * reference[i];
    all += e;
    if (mask !== null && mask[i] !== 0) masked += e;
  }
  return { all, masked };
}

export function nrmseFromSums(squaredErrorSum: number, referenceEnergySum: number): number {
  return Math.sqrt(squaredErrorSum) / Math.sqrt(referenceEnergySum);
}

export function nrmse(reference: Float32Array, test: Float32Array): number {
  return nrmseFromSums(squaredError(reference, test, null).sum, referenceEnergy(reference, null).all);
}
