/**
 * Otsu's threshold: Otsu, N. (1979), "A threshold selection method from gray-level histograms",
 * IEEE Transactions on Systems, Man, and Cybernetics 9(1):62–66, https://doi.org/10.1109/TSMC.1979.4310076
 *
 * On a histogram of 256 equal bins over [min, max] with counts n_j and bin centres c_j, the
 * threshold after bin t splits the voxels into two classes with weights and means
 *
 *   ω1(t) = Σ_{j≤t} n_j,  ω2(t) = Σ_{j>t} n_j,  μ1(t) = Σ_{j≤t} n_j c_j / ω1(t),  μ2(t) = Σ_{j>t} n_j c_j / ω2(t)
 *
 * and Otsu chooses the t that maximizes the between-class variance ω1 ω2 (μ1 − μ2)²; the threshold is
 * c_t, and voxels above it are foreground. This follows scikit-image's `threshold_otsu(image,
 * nbins=256)` (skimage/filters/thresholding.py, 0.19) for floating-point images: the histogram is
 * NumPy's `np.histogram(values, bins=256)` (bin edges min + i·(max − min)/256, the last edge max
 * and closed; NumPy's rule for values that land on an edge), the first maximum wins, and an image
 * with one value returns that value.
 */

import { finiteRange } from '../images/volume.ts';

const BINS = 256;

/**
 * Otsu's threshold of the finite values (metrics reject volumes with others before they get here).
 * `range`: their smallest and largest finite value when already known (a Volume's `range`).
 */
export function otsuThreshold(values: Float32Array, range?: [number, number]): number {
  const [min, max] = range ?? finiteRange(values);
  if (!(max > min)) return values[0];

  const step = (max - min) / BINS;
  const edges = new Float64Array(BINS + 1);
  for (let i = 0; i < BINS; i++) edges[i] = i * step + min;
  edges[BINS] = max;
  const norm = BINS / (max - min);
  const counts = new Float64Array(BINS);
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    let k = Math.floor((v - min) * norm);
    if (k === BINS) k--;
    if (v < edges[k]) k--;
    else if (k !== BINS - 1 && v >= edges[k + 1]) k++;
    counts[k]++;
  }
  const centres = new Float64Array(BINS);
  for (let i = 0; i < BINS; i++) centres[i] = (edges[i] + edges[i + 1]) / 2;

  // Cumulative sums from the left (class 1) and from the right (class 2), as skimage takes them.
  const w1 = new Float64Array(BINS);
  const m1 = new Float64Array(BINS);
  let cw = 0;
  let cm = 0;
  for (let i = 0; i < BINS; i++) {
    cw += counts[i];
    cm += counts[i] * centres[i];
    w1[i] = cw;
    m1[i] = cm / cw;
  }
  const w2 = new Float64Array(BINS);
  const m2 = new Float64Array(BINS);
  cw = 0;
  cm = 0;
  for (let i = BINS - 1; i >= 0; i--) {
    cw += counts[i];
    cm += counts[i] * centres[i];
    w2[i] = cw;
    m2[i] = cm / cw;
  }
  let best = -Infinity;
  let at = 0;
  for (let t = 0; t < BINS - 1; t++) {
    const between = w1[t] * w2[t + 1] * (m1[t] - m2[t + 1]) ** 2;
    // No class is ever empty (the first bin holds the minimum, the last the maximum): no 0/0 here.
    if (between > best) {
      best = between;
      at = t;
    }
  }
  return centres[at];
}
