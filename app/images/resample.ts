/**
 * In-plane resampling onto another matrix size, by field of view, with linear interpolation.
 *
 * Output pixel i of n_out covers the same part of the field of view as input position
 *   x = (i + 0.5) * n_in / n_out - 0.5
 * (pixel edges of both grids aligned: reconstructions of one acquisition share the field of view,
 * whatever their matrix), interpolated linearly between the two nearest input pixels and clamped
 * at the edges. This is skimage.transform.resize(order=1, mode='edge', anti_aliasing=False), i.e.
 * scipy.ndimage.zoom(order=1, grid_mode=True, mode='nearest'); test/unit/resample.test.ts compares
 * with it (test/reference/display/). Slices are not resampled: a different slice count is a
 * missing or extra slice, reported, never interpolated away.
 */
import { finiteRange, type Volume } from './volume.ts';

interface Taps {
  lo: Int32Array;
  hi: Int32Array;
  w: Float64Array;
}

/** For each output index: the two input indices and the weight of the upper one. */
function taps(nIn: number, nOut: number): Taps {
  const lo = new Int32Array(nOut);
  const hi = new Int32Array(nOut);
  const w = new Float64Array(nOut);
  const scale = nIn / nOut;
  for (let i = 0; i < nOut; i++) {
    const x = Math.min(nIn - 1, Math.max(0, (i + 0.5) * scale - 0.5));
    const f = Math.floor(x);
    lo[i] = f;
    hi[i] = Math.min(nIn - 1, f + 1);
    w[i] = x - f;
  }
  return { lo, hi, w };
}

/** The volume on a rows x columns grid of the same field of view; itself when already there. */
export function resampleInPlane(v: Volume, rows: number, columns: number): Volume {
  if (v.rows === rows && v.columns === columns) return v;
  const tc = taps(v.columns, columns);
  const tr = taps(v.rows, rows);
  const out = new Float32Array(v.slices * rows * columns);
  const line = new Float64Array(columns * v.rows); // the slice resampled along columns
  for (let s = 0; s < v.slices; s++) {
    const src = s * v.rows * v.columns;
    for (let r = 0; r < v.rows; r++) {
      const row = src + r * v.columns;
      for (let c = 0; c < columns; c++) {
        const a = v.pixels[row + tc.lo[c]];
        const b = v.pixels[row + tc.hi[c]];
        line[r * columns + c] = a + (b - a) * tc.w[c];
      }
    }
    const dst = s * rows * columns;
    for (let r = 0; r < rows; r++) {
      const up = tr.lo[r] * columns;
      const down = tr.hi[r] * columns;
      const w = tr.w[r];
      for (let c = 0; c < columns; c++) {
        const a = line[up + c];
        out[dst + r * columns + c] = a + (line[down + c] - a) * w;
      }
    }
  }
  const spacing: Volume['spacing'] = [(v.spacing[0] * v.columns) / columns, (v.spacing[1] * v.rows) / rows, v.spacing[2]];
  const resampled: Volume = { ...v, rows, columns, spacing, pixels: out, range: finiteRange(out) };
  if (v.origin) {
    // The first pixel's centre moves with the pixel size: half a new pixel in from the shared edge.
    const [dc, dr] = [(spacing[0] - v.spacing[0]) / 2, (spacing[1] - v.spacing[1]) / 2];
    const o = v.orientation;
    resampled.origin = [0, 1, 2].map((k) => v.origin![k] + o[k] * dc + o[3 + k] * dr) as [number, number, number];
  }
  resampled.notes = [...(v.notes ?? []), `resampled in-plane from ${v.rows} x ${v.columns} to ${rows} x ${columns} (linear)`];
  return resampled;
}
