/**
 * Cartesian undersampling of phase-encode lines (rows of k-space) for the demo, after the
 * variable-density schemes of Lustig, Donoho & Pauly (2007, Magn Reson Med 58:1182-1195):
 * a fully sampled centre of `centreLines` lines, and the rest drawn without replacement with a
 * probability density falling with the distance from the centre, p(k) ~ (1 - |k| / kmax)^power,
 * until rows / acceleration lines are sampled (rounded). Seeded through the caller's stream.
 * Frequency 0 is at index 0; the distance of line r from the centre is min(r, rows - r).
 */
import type { MT19937 } from '../blinding/mt19937.ts';

export interface LineMask {
  rows: number;
  /** 1 where the phase-encode line is acquired. */
  lines: Uint8Array;
  acceleration: number;
  centreLines: number;
}

export function variableDensityMask(rows: number, acceleration: number, centreLines: number, rng: MT19937, power = 2): LineMask {
  const target = Math.round(rows / acceleration);
  if (centreLines > target) throw new Error(`a fully sampled centre of ${centreLines} lines exceeds the ${target} lines of R = ${acceleration}`);
  const lines = new Uint8Array(rows);
  const dist = (r: number) => Math.min(r, rows - r);
  // The centre: lines 0 .. ceil(c/2)-1 and rows-floor(c/2) .. rows-1 (frequency 0 is line 0).
  for (let r = 0; r < Math.ceil(centreLines / 2); r++) lines[r] = 1;
  for (let r = rows - Math.floor(centreLines / 2); r < rows; r++) lines[r] = 1;
  let count = lines.reduce((a, b) => a + b, 0);
  const kmax = rows / 2;
  while (count < target) {
    // Weighted draw among the lines not yet acquired.
    let total = 0;
    for (let r = 0; r < rows; r++) if (!lines[r]) total += (1 - dist(r) / (kmax + 1)) ** power;
    let u = rng.nextDouble() * total;
    for (let r = 0; r < rows; r++) {
      if (lines[r]) continue;
      u -= (1 - dist(r) / (kmax + 1)) ** power;
      if (u <= 0) { lines[r] = 1; count++; break; }
    }
  }
  return { rows, lines, acceleration, centreLines };
}

/** Zeroes the rows of k-space that the mask does not acquire (in place). */
export function applyMask(k: Float64Array, columns: number, mask: LineMask): Float64Array {
  for (let r = 0; r < mask.rows; r++) if (!mask.lines[r]) k.fill(0, r * columns * 2, (r + 1) * columns * 2);
  return k;
}
