import type { Volume } from '../../../app/images/volume.ts';

/** A small oblique volume with distinct values, for the writer checks. */
export function sampleVolume(): Volume {
  const c = Math.cos(0.3);
  const s = Math.sin(0.3);
  return {
    columns: 5, rows: 4, slices: 3, spacing: [0.75, 0.8, 2.5],
    orientation: [c, s, 0, -s, c, 0],
    pixels: new Float32Array(60).map((_, i) => ((i * 37) % 61) * 1.5 - 20),
    provenance: { path: 'sample', format: 'npy', sha256: '' },
  };
}
