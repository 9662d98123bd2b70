/**
 * The automatic window: from the 1st to the 99th percentile of a volume's intensities
 * (percentile windowing is common practice for MR display). Percentiles are nearest-rank
 * (the smallest value v with at least p % of the samples <= v), computed exactly from a
 * 65 536-bin histogram of the uint16 display values. Checked against NumPy's
 * `percentile(..., method='inverted_cdf')` in test/reference/auto-window/.
 */
export const AUTO_LOW = 1;
export const AUTO_HIGH = 99;

export function histogram16(pixels: Uint16Array, into = new Uint32Array(65536)): Uint32Array {
  for (let i = 0; i < pixels.length; i++) into[pixels[i]]++;
  return into;
}

/** Nearest-rank percentile (0 < p <= 100) of the values counted in `hist`. */
export function histogramPercentile(hist: Uint32Array, p: number): number {
  let n = 0;
  for (let v = 0; v < hist.length; v++) n += hist[v];
  if (n === 0) return 0;
  const rank = Math.max(1, Math.ceil((p / 100) * n));
  let seen = 0;
  for (let v = 0; v < hist.length; v++) {
    seen += hist[v];
    if (seen >= rank) return v;
  }
  return hist.length - 1;
}

export function percentileWindow(volumes: Uint16Array[]): { center: number; width: number } {
  const hist = new Uint32Array(65536);
  for (const v of volumes) histogram16(v, hist);
  const lo = histogramPercentile(hist, AUTO_LOW);
  const hi = histogramPercentile(hist, AUTO_HIGH);
  const width = Math.max(1, hi - lo);
  return { center: lo + width / 2, width };
}
