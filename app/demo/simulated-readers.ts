/**
 * Simulated readers for the demo (always labelled simulated): each score is a perceptual model
 * of the image plus a reader bias plus rating noise, rounded to the scale.
 * The model measures, against the case's reference, in foreground edges and in background:
 *   sharpness  s = mean|grad test| / mean|grad ref| over the reference's strongest edges, after a
 *                  light smoothing of both so noise does not pass for detail;
 *   artifacts  a = RMS(test - ref) in the background / RMS(ref) in the foreground;
 *   noise      n = RMS of test minus its smoothed self, relative to the foreground RMS.
 * The mapping from (s, a, n) to latent scores is our own invention for the demo (no source).
 */
import type { MT19937 } from '../blinding/mt19937.ts';
import { gaussian, gaussianBlur } from './degrade.ts';
import type { PhantomShape } from './phantom.ts';

export interface ImageAppearance { sharpness: number; artifacts: number; noise: number }

function gradientMagnitude(img: Float32Array, shape: PhantomShape): Float32Array {
  const { rows, columns, slices } = shape;
  const g = new Float32Array(img.length);
  for (let s = 0; s < slices; s++) for (let r = 1; r < rows - 1; r++) for (let c = 1; c < columns - 1; c++) {
    const i = (s * rows + r) * columns + c;
    const gx = (img[i + 1] - img[i - 1]) / 2;
    const gy = (img[i + columns] - img[i - columns]) / 2;
    g[i] = Math.hypot(gx, gy);
  }
  return g;
}

export function measureAppearance(test: Float32Array, reference: Float32Array, shape: PhantomShape): ImageAppearance {
  const refSmooth = gaussianBlur(reference, shape, 0.8);
  const testSmooth = gaussianBlur(test, shape, 0.8);
  const gRef = gradientMagnitude(refSmooth, shape);
  const gTest = gradientMagnitude(testSmooth, shape);
  const sorted = Float32Array.from(gRef).sort();
  const edgeThreshold = sorted[Math.floor(sorted.length * 0.97)];
  let edgeRef = 0, edgeTest = 0, fgSq = 0, fgN = 0, bgSq = 0, bgN = 0, hfSq = 0;
  const fine = gaussianBlur(test, shape, 1.0);
  for (let i = 0; i < test.length; i++) {
    if (gRef[i] >= edgeThreshold && gRef[i] > 0) { edgeRef += gRef[i]; edgeTest += gTest[i]; }
    if (reference[i] > 0.05) { fgSq += reference[i] ** 2; fgN++; }
    else { bgSq += (test[i] - reference[i]) ** 2; bgN++; }
    hfSq += (test[i] - fine[i]) ** 2;
  }
  const fgRms = Math.sqrt(fgSq / Math.max(1, fgN));
  return {
    sharpness: edgeRef > 0 ? edgeTest / edgeRef : 1,
    artifacts: Math.sqrt(bgSq / Math.max(1, bgN)) / fgRms,
    noise: Math.sqrt(hfSq / test.length) / fgRms,
  };
}

const clamp = (x: number, lo: number, hi: number) => Math.min(hi, Math.max(lo, x));

/** Latent (continuous) scores on a 1..5 scale for the demo's three questions. */
export function latentScores(a: ImageAppearance): Record<'sharpness' | 'artifacts' | 'confidence', number> {
  const sharpness = clamp(1 + 4 * (a.sharpness - 0.45) / 0.5, 1, 5);
  const artifacts = clamp(5 - 14 * a.artifacts - 10 * a.noise, 1, 5);
  const confidence = clamp(0.55 * sharpness + 0.45 * artifacts, 1, 5);
  return { sharpness, artifacts, confidence };
}

export interface SimulatedReader { code: string; bias: number; noise: number }

export function simulatedScore(latent: number, reader: SimulatedReader, rng: MT19937, points = 5): number {
  return clamp(Math.round(latent + reader.bias + reader.noise * gaussian(rng)), 1, points);
}
