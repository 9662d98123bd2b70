/**
 * Invented numerical phantoms for the demo study: a head-like arrangement of ellipses after the
 * analytic phantom of Shepp & Logan (1974, IEEE Trans Nucl Sci 21:21-43), with our own
 * per-case variation of shape and contrast and a few small low-contrast lesions, so that cases
 * differ. Pure synthetic data: no patient is behind any of it.
 */
import type { MT19937 } from '../blinding/mt19937.ts';

interface Ellipse { value: number; a: number; b: number; x0: number; y0: number; phiDeg: number }

/** Shepp & Logan (1974) ellipses with the widely used higher-contrast intensities (from memory). */
const BASE: Ellipse[] = [
  { value: 1.0, a: 0.69, b: 0.92, x0: 0, y0: 0, phiDeg: 0 },
  { value: -0.8, a: 0.6624, b: 0.874, x0: 0, y0: -0.0184, phiDeg: 0 },
  { value: -0.2, a: 0.11, b: 0.31, x0: 0.22, y0: 0, phiDeg: -18 },
  { value: -0.2, a: 0.16, b: 0.41, x0: -0.22, y0: 0, phiDeg: 18 },
  { value: 0.1, a: 0.21, b: 0.25, x0: 0, y0: 0.35, phiDeg: 0 },
  { value: 0.1, a: 0.046, b: 0.046, x0: 0, y0: 0.1, phiDeg: 0 },
  { value: 0.1, a: 0.046, b: 0.046, x0: 0, y0: -0.1, phiDeg: 0 },
  { value: 0.1, a: 0.046, b: 0.023, x0: -0.08, y0: -0.605, phiDeg: 0 },
  { value: 0.1, a: 0.023, b: 0.023, x0: 0, y0: -0.606, phiDeg: 0 },
  { value: 0.1, a: 0.023, b: 0.046, x0: 0.06, y0: -0.605, phiDeg: 0 },
];

export interface PhantomShape { rows: number; columns: number; slices: number }

function jitter(rng: MT19937, amount: number): number {
  return (rng.nextDouble() * 2 - 1) * amount;
}

/** One case: `slices` slices through a phantom whose ellipses shrink towards the ends. */
export function makePhantom(rng: MT19937, shape: PhantomShape): Float32Array {
  const { rows, columns, slices } = shape;
  const scale = 0.9 + jitter(rng, 0.08);
  const squash = 1 + jitter(rng, 0.08);
  const ellipses = BASE.map((e, i) => ({
    ...e,
    value: i < 2 ? e.value : e.value * (1 + jitter(rng, 0.4)),
    x0: e.x0 + (i < 2 ? 0 : jitter(rng, 0.03)),
    y0: e.y0 + (i < 2 ? 0 : jitter(rng, 0.03)),
  }));
  const lesions: Ellipse[] = [];
  const lesionCount = 2 + rng.nextBelow(3);
  for (let k = 0; k < lesionCount; k++) {
    const r = 0.025 + rng.nextDouble() * 0.03;
    const angle = rng.nextDouble() * 2 * Math.PI;
    const dist = rng.nextDouble() * 0.45;
    lesions.push({ value: 0.04 + rng.nextDouble() * 0.05, a: r, b: r, x0: dist * Math.cos(angle) * 0.8, y0: dist * Math.sin(angle), phiDeg: 0 });
  }
  const out = new Float32Array(rows * columns * slices);
  for (let s = 0; s < slices; s++) {
    const z = slices === 1 ? 0 : (s / (slices - 1)) * 2 - 1;
    const shrink = Math.sqrt(Math.max(0.05, 1 - 0.5 * z * z));
    const visible = lesions.filter((_, k) => Math.abs(z - (k / lesionCount) * 1.2 + 0.6) < 0.5);
    for (const e of [...ellipses, ...visible]) {
      const phi = (e.phiDeg * Math.PI) / 180;
      const cos = Math.cos(phi);
      const sin = Math.sin(phi);
      const a = e.a * scale * shrink;
      const b = e.b * scale * shrink * squash;
      for (let r = 0; r < rows; r++) {
        const y = 1 - (2 * (r + 0.5)) / rows - e.y0 * scale;
        for (let c = 0; c < columns; c++) {
          const x = (2 * (c + 0.5)) / columns - 1 - e.x0 * scale;
          const u = x * cos + y * sin;
          const v = -x * sin + y * cos;
          if ((u * u) / (a * a) + (v * v) / (b * b) <= 1) out[(s * rows + r) * columns + c] += e.value;
        }
      }
    }
  }
  for (let i = 0; i < out.length; i++) if (out[i] < 0) out[i] = 0;
  return out;
}
