/**
 * Display-ready pixels for a kit. Values are mapped linearly from [0, p99.5] of the volume to
 * [0, 4000] and stored as uint16, so every kit image has the same range whatever the source
 * scaling was (different methods often differ by an arbitrary global factor, which would hint at
 * the method). Percentile windowing is common practice for MR display.
 */
export const DISPLAY_MAX = 4000;

export function percentile(values: Float32Array, p: number, maxSamples = 200_000): number {
  const step = Math.max(1, Math.floor(values.length / maxSamples));
  const buffer = new Float32Array(Math.ceil(values.length / step));
  let n = 0;
  for (let i = 0; i < values.length; i += step) if (Number.isFinite(values[i])) buffer[n++] = values[i];
  if (n === 0) return 0;
  // A typed array sorts numerically in native code, far faster than an array with a comparator.
  const sample = buffer.subarray(0, n).sort();
  const pos = (p / 100) * (sample.length - 1);
  const lo = Math.floor(pos);
  const hi = Math.min(sample.length - 1, lo + 1);
  return sample[lo] + (sample[hi] - sample[lo]) * (pos - lo);
}

export function toDisplayUint16(pixels: Float32Array): { data: Uint16Array; window: { center: number; width: number } } {
  const top = percentile(pixels, 99.5);
  const scale = top > 0 ? DISPLAY_MAX / top : 1;
  const data = new Uint16Array(pixels.length);
  for (let i = 0; i < pixels.length; i++) {
    const v = pixels[i] * scale;
    data[i] = !(v > 0) ? 0 : v > 65535 ? 65535 : Math.round(v);
  }
  return { data, window: { center: DISPLAY_MAX / 2, width: DISPLAY_MAX } };
}
