/**
 * The data range L of PSNR and SSIM: max(reference) − min(reference) over the whole reference
 * volume, unless the caller gives one. This is the convention of scikit-image's
 * `peak_signal_noise_ratio` and `structural_similarity` for floating-point images (they estimate L
 * from the data) taken over the reference only, so that every test image of a case is measured
 * against the same L. Metrics need finite pixels; the first NaN or infinity is reported.
 */
import type { Volume } from '../images/volume.ts';
import { MetricsError } from './metrics-error.ts';

export interface IntensityRange {
  min: number;
  max: number;
}

/** Minimum and maximum of a volume's pixels; throws, naming the file and voxel, on a non-finite pixel. */
export function intensityRange(volume: Volume): IntensityRange {
  const px = volume.pixels;
  let min = Infinity;
  let max = -Infinity;
  for (let i = 0; i < px.length; i++) {
    const v = px[i];
    if (v < min) min = v;
    if (v > max) max = v;
    if (v - v !== 0) {
      // NaN or ±infinity
      const plane = volume.rows * volume.columns;
      const where = `slice ${Math.floor(i / plane)}, row ${Math.floor((i % plane) / volume.columns)}, column ${i % volume.columns}`;
      throw new MetricsError(`${volume.provenance.path}: the pixel at ${where} is ${v}; metrics need finite values`);
    }
  }
  return { min, max };
}

export function referenceDataRange(reference: Volume): number {
  const { min, max } = intensityRange(reference);
  return max - min;
}
