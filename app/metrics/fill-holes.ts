/**
 * Holes of a binary mask filled slice by slice: a background pixel that cannot reach its slice's
 * border through background pixels (4-connected, the cross of connectivity 1) becomes foreground,
 * as `scipy.ndimage.binary_fill_holes` does with its default structure on each 2D slice.
 * Slice by slice because MR volumes are often a few thick slices: in 3D the inside of a head would
 * reach the volume's first and last slices and never count as a hole. This is what turns a bright
 * outline (a skull, a body wall) into the whole head or body, as a foreground mask should be.
 */
import type { SliceGeometry } from './ssim.ts';

/** Fills the holes of `mask` (0/1, slice-major) in place; returns how many pixels it set. */
export function fillHolesBySlice(mask: Uint8Array, { rows: R, columns: C }: SliceGeometry): number {
  const plane = R * C;
  const outside = new Uint8Array(plane);
  const stack = new Int32Array(plane);
  let filled = 0;
  for (let base = 0; base < mask.length; base += plane) {
    outside.fill(0);
    let top = 0;
    const reach = (p: number) => {
      if (mask[base + p] === 0 && outside[p] === 0) {
        outside[p] = 1;
        stack[top++] = p;
      }
    };
    for (let c = 0; c < C; c++) {
      reach(c);
      reach((R - 1) * C + c);
    }
    for (let r = 0; r < R; r++) {
      reach(r * C);
      reach(r * C + C - 1);
    }
    while (top > 0) {
      const p = stack[--top];
      const r = (p / C) | 0;
      const c = p - r * C;
      if (r > 0) reach(p - C);
      if (r < R - 1) reach(p + C);
      if (c > 0) reach(p - 1);
      if (c < C - 1) reach(p + 1);
    }
    for (let p = 0; p < plane; p++) {
      if (mask[base + p] === 0 && outside[p] === 0) {
        mask[base + p] = 1;
        filled++;
      }
    }
  }
  return filled;
}
