/**
 * Display-ready pixels for a kit, after the template's display policy (design.md, "Display
 * policy"; app/study/template.ts DisplaySpec). Every image is stored as uint16 with the bounds
 * of its display window, low and high, mapped linearly onto 0 and DISPLAY_MAX (values above keep headroom up to
 * 65535 so that a reader can widen the window; values below become 0):
 *   display = (slope * v + intercept - low) / (high - low) * DISPLAY_MAX
 * - intensity 'percentile': slope 1, intercept 0, [low, high] = the image's own percentiles, so a
 *   global factor or offset between methods, which would hint at the method, disappears;
 * - intensity 'none': slope 1, intercept 0, [low, high] = the reference's percentiles (the first
 *   method's without a reference), the same for every method of the case;
 * - intensity 'match-reference': slope and intercept of the least-squares line from the method to
 *   the reference, voxel by voxel on the reference grid, then the reference's window bounds.
 * Percentile windowing is common practice for MR display; percentiles interpolate linearly between
 * order statistics (NumPy's default 'linear' method), from a regular subsample of at most 200,000
 * values for large images. The least-squares line is the ordinary one (numpy.polyfit, degree 1).
 */
import { sortFloat32 } from './float32-sort.ts';

export const DISPLAY_MAX = 4000;

/**
 * Sorted default-size samples by pixel array: the display window, the item statistics and the
 * check all ask for the same one, and a sort is the costliest step of each. Volumes' pixels are
 * not changed after reading, so the cached sample stays right.
 */
const sampleCache = new WeakMap<Float32Array, Float32Array>();

/** The finite values of a regular subsample of at most `maxSamples`, sorted ascending. */
export function sortedSample(values: Float32Array, maxSamples = 200_000): Float32Array {
  if (maxSamples !== 200_000) return sortSample(values, maxSamples);
  let cached = sampleCache.get(values);
  if (!cached) {
    cached = sortSample(values, maxSamples);
    sampleCache.set(values, cached);
  }
  return cached;
}

function sortSample(values: Float32Array, maxSamples: number): Float32Array {
  const step = Math.max(1, Math.floor(values.length / maxSamples));
  const buffer = new Float32Array(Math.ceil(values.length / step));
  let n = 0;
  for (let i = 0; i < values.length; i += step) if (Number.isFinite(values[i])) buffer[n++] = values[i];
  return sortFloat32(buffer.subarray(0, n));
}

/** The p-th percentile (linear interpolation between closest ranks) of values already sorted. */
export function quantileSorted(sample: Float32Array, p: number): number {
  if (sample.length === 0) return 0;
  const pos = (p / 100) * (sample.length - 1);
  const lo = Math.floor(pos);
  const hi = Math.min(sample.length - 1, lo + 1);
  return sample[lo] + (sample[hi] - sample[lo]) * (pos - lo);
}

export function percentile(values: Float32Array, p: number, maxSamples = 200_000): number {
  return quantileSorted(sortedSample(values, maxSamples), p);
}

/** What a display image is made with: normalization (slope, intercept), then the window bounds low and high. */
export interface DisplayMap {
  slope: number;
  intercept: number;
  low: number;
  high: number;
}

/** The [low, high] percentiles of an image; high is kept above low so that the window has a width. */
export function percentileWindow(pixels: Float32Array, [pLow, pHigh]: readonly [number, number]): [number, number] {
  return windowOfSorted(sortedSample(pixels), [pLow, pHigh]);
}

/** percentileWindow of values already sorted. */
export function windowOfSorted(sample: Float32Array, [pLow, pHigh]: readonly [number, number]): [number, number] {
  const low = quantileSorted(sample, pLow);
  const high = quantileSorted(sample, pHigh);
  return [low, high > low ? high : low + 1];
}

/** Ordinary least squares y = slope * x + intercept over the finite pairs (Float64 sums). */
export function leastSquaresLine(x: Float32Array, y: Float32Array): { slope: number; intercept: number } {
  if (x.length !== y.length) throw new Error(`leastSquaresLine: ${x.length} and ${y.length} values`);
  let n = 0;
  let sx = 0;
  let sy = 0;
  for (let i = 0; i < x.length; i++) {
    if (!Number.isFinite(x[i]) || !Number.isFinite(y[i])) continue;
    n++;
    sx += x[i];
    sy += y[i];
  }
  if (n === 0) return { slope: 1, intercept: 0 };
  const mx = sx / n;
  const my = sy / n;
  let sxx = 0;
  let sxy = 0;
  for (let i = 0; i < x.length; i++) {
    if (!Number.isFinite(x[i]) || !Number.isFinite(y[i])) continue;
    const dx = x[i] - mx;
    sxx += dx * dx;
    sxy += dx * (y[i] - my);
  }
  const slope = sxx > 0 ? sxy / sxx : 0;
  return { slope, intercept: my - slope * mx };
}

export type IntensityPolicy = 'none' | 'percentile' | 'match-reference';

/** What every method of a case is measured against: the reference, else the first method. */
export interface DisplayAnchor {
  bounds: [number, number];
  /** The reference's pixels on the common grid (match-reference only). */
  pixels: Float32Array | null;
}

/** The display map of one method image under a policy. */
export function displayMapFor(
  intensity: IntensityPolicy, percentiles: readonly [number, number], pixels: Float32Array, anchor: DisplayAnchor,
): DisplayMap {
  if (intensity === 'percentile') {
    const [low, high] = percentileWindow(pixels, percentiles);
    return { slope: 1, intercept: 0, low, high };
  }
  if (intensity === 'match-reference') {
    if (!anchor.pixels || anchor.pixels.length !== pixels.length) {
      throw new Error('match-reference needs the reference on the same grid as the method');
    }
    const { slope, intercept } = leastSquaresLine(pixels, anchor.pixels);
    return { slope, intercept, low: anchor.bounds[0], high: anchor.bounds[1] };
  }
  return { slope: 1, intercept: 0, low: anchor.bounds[0], high: anchor.bounds[1] };
}

/**
 * uint16 display pixels and the initial window, in display units, of one image. Without a map:
 * [0, p99.5] of the image itself, Veil's scaling before display policies (kept for callers that
 * have no template).
 */
export function toDisplayUint16(pixels: Float32Array, map?: DisplayMap): { data: Uint16Array; window: { center: number; width: number } } {
  const m = map ?? { slope: 1, intercept: 0, low: 0, high: percentile(pixels, 99.5) };
  const width = m.high - m.low;
  const scale = width > 0 ? DISPLAY_MAX / width : 1;
  const a = m.slope * scale;
  const b = (m.intercept - m.low) * scale;
  const data = new Uint16Array(pixels.length);
  for (let i = 0; i < pixels.length; i++) {
    const v = pixels[i] * a + b;
    data[i] = !(v > 0) ? 0 : v > 65535 ? 65535 : Math.round(v);
  }
  return { data, window: { center: DISPLAY_MAX / 2, width: DISPLAY_MAX } };
}
