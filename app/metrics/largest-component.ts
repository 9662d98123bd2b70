/**
 * The largest connected component of a binary volume, face connectivity (6 neighbours in 3D,
 * 4 within a slice): the default structuring element of `scipy.ndimage.label` (a cross of
 * connectivity 1). Components are met in raster order (slice, row, column), so among components
 * of equal size the first one wins, as `np.argmax` over the sizes of scipy's raster-ordered
 * labels does.
 *
 * Memory: breadth-first filling keeps only the current front in its queue (for a compact body
 * a surface, far smaller than the volume), and no label image is kept: a first pass measures
 * every component, a second fills the winner into the output. Besides input and output, one
 * byte per voxel.
 */
import type { SliceGeometry } from './ssim.ts';

type Geometry = SliceGeometry & { slices: number };

/** A FIFO of voxel indices that grows as needed. */
class IndexQueue {
  private items = new Int32Array(1024);
  private head = 0;
  private tail = 0;

  get size(): number {
    return this.tail - this.head;
  }

  push(i: number): void {
    if (this.tail === this.items.length) {
      // Full at the end: move the live part to the front, into a larger array when over half full.
      const live = this.items.subarray(this.head, this.tail);
      const target = this.size * 2 > this.items.length ? new Int32Array(this.items.length * 2) : this.items;
      target.set(live, 0);
      this.items = target;
      this.tail -= this.head;
      this.head = 0;
    }
    this.items[this.tail++] = i;
  }

  shift(): number {
    return this.items[this.head++];
  }
}

/** Fills the component holding `start` (foreground, not yet marked): marks it in `marked`, returns its size. */
function fill(binary: Uint8Array, marked: Uint8Array, start: number, g: Geometry): number {
  const { rows: R, columns: C, slices: S } = g;
  const plane = R * C;
  const queue = new IndexQueue();
  marked[start] = 1;
  queue.push(start);
  let size = 0;
  while (queue.size > 0) {
    const i = queue.shift();
    size++;
    const c = i % C;
    const r = ((i - c) / C) % R;
    const s = (i - (i % plane)) / plane;
    // Each face neighbour that exists and is unmarked foreground joins the component.
    let j = i - 1;
    if (c > 0 && binary[j] !== 0 && marked[j] === 0) { marked[j] = 1; queue.push(j); }
    j = i + 1;
    if (c < C - 1 && binary[j] !== 0 && marked[j] === 0) { marked[j] = 1; queue.push(j); }
    j = i - C;
    if (r > 0 && binary[j] !== 0 && marked[j] === 0) { marked[j] = 1; queue.push(j); }
    j = i + C;
    if (r < R - 1 && binary[j] !== 0 && marked[j] === 0) { marked[j] = 1; queue.push(j); }
    j = i - plane;
    if (s > 0 && binary[j] !== 0 && marked[j] === 0) { marked[j] = 1; queue.push(j); }
    j = i + plane;
    if (s < S - 1 && binary[j] !== 0 && marked[j] === 0) { marked[j] = 1; queue.push(j); }
  }
  return size;
}

export function largestComponent(binary: Uint8Array, geometry: Geometry): { mask: Uint8Array; voxels: number; components: number } {
  const seen = new Uint8Array(binary.length);
  let components = 0;
  let bestStart = -1;
  let bestSize = 0;
  for (let start = 0; start < binary.length; start++) {
    if (binary[start] === 0 || seen[start] !== 0) continue;
    components++;
    const size = fill(binary, seen, start, geometry);
    if (size > bestSize) {
      bestSize = size;
      bestStart = start;
    }
  }
  const mask = new Uint8Array(binary.length);
  if (bestStart >= 0) fill(binary, mask, bestStart, geometry);
  return { mask, voxels: bestSize, components };
}
