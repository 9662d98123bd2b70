/**
 * Simple statistics of one item's image, the kind a reader could pick up by eye, for the
 * blinding-strength check (./blinding-strength.ts). Intensities are first mapped as the reading
 * kit maps them for display, v → (v − low) / (high − low) with [low, high] the item's display
 * window (by default the template's default, the 0th and 99.5th percentiles of the image:
 * app/study/template.ts DEFAULT_DISPLAY, app/blinding/display-scale.ts percentileWindow), so that
 * an intensity scaling between methods that readers never see does not count:
 *
 *   noise      standard deviation (population) of the background voxels, those at or below
 *              Otsu's threshold of the image (./otsu.ts); background noise is the usual
 *              MR noise measure (common practice; e.g. NEMA MS 1 uses background regions)
 *   sharpness  gradient energy: the squared forward differences along the rows and along the
 *              columns of every slice, added up and divided by the number of voxels; the
 *              energy-of-gradient focus measure (Subbarao, Choi & Nikzad 1993, "Focusing
 *              techniques", Optical Engineering 32(11):2824–2836)
 *   q05 … q95  intensity quantiles (linear interpolation between order statistics, NumPy's
 *              default), from a regular subsample of at most 200,000 voxels as display-scale takes
 *   rows, columns, slices   the matrix size
 *
 * `scale` (the raw top of the window) is added only on request: readers see it only where the kit
 * shows raw intensities (display: {intensity: none}).
 */
import { quantileSorted, sortedSample, windowOfSorted } from '../blinding/display-scale.ts';
import type { Volume } from '../images/volume.ts';
import { DEFAULT_DISPLAY } from '../study/template.ts';
import { otsuThreshold } from './otsu.ts';

export interface ItemStatistics {
  noise: number;
  sharpness: number;
  q05: number;
  q25: number;
  q50: number;
  q75: number;
  q95: number;
  rows: number;
  columns: number;
  slices: number;
  /** Raw top of the display window; present only with `includeScale`. */
  scale?: number;
}

/** Names for reports. */
export const ITEM_STATISTIC_LABELS: Record<keyof ItemStatistics, string> = {
  noise: 'background noise level',
  sharpness: 'gradient-energy sharpness',
  q05: 'intensity 5th percentile',
  q25: 'intensity 25th percentile',
  q50: 'median intensity',
  q75: 'intensity 75th percentile',
  q95: 'intensity 95th percentile',
  rows: 'matrix rows',
  columns: 'matrix columns',
  slices: 'number of slices',
  scale: 'raw intensity scale (top of the display window)',
};

const MAX_SAMPLES = 200_000;

export interface ItemStatisticsOptions {
  /** The raw intensities the kit shows as black and white; default: percentiles of the image. */
  window?: [number, number];
  /** Percentiles of the default window (default DEFAULT_DISPLAY.percentiles, [0, 99.5]). */
  percentiles?: [number, number];
  /** Add `scale`, for kits that show raw intensities. */
  includeScale?: boolean;
}

export function itemStatistics(volume: Volume, options: ItemStatisticsOptions = {}): ItemStatistics {
  const px = volume.pixels;
  const { rows: R, columns: C, slices: S } = volume;

  // One regular subsample, sorted once, serves every quantile.
  const sorted = sortedSample(px, MAX_SAMPLES);
  const [low, high] = options.window ?? windowOfSorted(sorted, options.percentiles ?? DEFAULT_DISPLAY.percentiles);
  const scale = high > low ? high - low : 1;
  const q = (p: number): number => (quantileSorted(sorted, p) - low) / scale;

  const threshold = otsuThreshold(px, volume.range);
  let count = 0;
  let sum = 0;
  for (let i = 0; i < px.length; i++) {
    if (px[i] <= threshold) {
      count++;
      sum += px[i];
    }
  }
  const mean = count > 0 ? sum / count : 0;
  let squares = 0;
  for (let i = 0; i < px.length; i++) if (px[i] <= threshold) squares += (px[i] - mean) ** 2;
  const noise = count > 1 ? Math.sqrt(squares / count) / scale : 0;

  // Squared differences to the right and downward neighbours within each slice.
  let energy = 0;
  for (let s = 0; s < S; s++) {
    for (let r = 0; r < R; r++) {
      const o = (s * R + r) * C;
      for (let c = 0; c + 1 < C; c++) {
        const d = px[o + c + 1] - px[o + c];
        energy += d * d;
      }
      if (r + 1 === R) continue;
      for (let c = 0; c < C; c++) {
        const d = px[o + C + c] - px[o + c];
        energy += d * d;
      }
    }
  }
  const stats: ItemStatistics = {
    noise,
    sharpness: energy / px.length / (scale * scale),
    q05: q(5),
    q25: q(25),
    q50: q(50),
    q75: q(75),
    q95: q(95),
    rows: R,
    columns: C,
    slices: S,
  };
  if (options.includeScale) stats.scale = high;
  return stats;
}
