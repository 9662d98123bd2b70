/**
 * Ascending sort of float32 values by LSD radix sort on their bits, O(n): three passes of 11 bits
 * over keys that order like the numbers (a common technique: flip every bit of a negative value,
 * only the sign bit of a positive one). Gives exactly what Float32Array.prototype.sort gives for
 * values without NaN (-0 before +0, as that sort's spec order has it), several times faster on the
 * 200,000-value samples that display windows and item statistics sort for every volume.
 */
const BITS = 11;
const BUCKETS = 1 << BITS;
const MASK = BUCKETS - 1;

/** Sorts `values` (no NaN) in place and returns it. */
export function sortFloat32(values: Float32Array): Float32Array {
  const n = values.length;
  if (n < 512) return values.sort(); // the counting passes cost more than they save
  let keys = new Uint32Array(values.buffer, values.byteOffset, n).slice();
  for (let i = 0; i < n; i++) {
    const b = keys[i];
    keys[i] = b & 0x80000000 ? ~b >>> 0 : (b | 0x80000000) >>> 0;
  }
  let other = new Uint32Array(n);
  const counts = new Uint32Array(BUCKETS);
  for (let shift = 0; shift < 32; shift += BITS) {
    counts.fill(0);
    for (let i = 0; i < n; i++) counts[(keys[i] >>> shift) & MASK]++;
    let sum = 0;
    for (let b = 0; b < BUCKETS; b++) {
      const c = counts[b];
      counts[b] = sum;
      sum += c;
    }
    for (let i = 0; i < n; i++) {
      const k = keys[i];
      other[counts[(k >>> shift) & MASK]++] = k;
    }
    [keys, other] = [other, keys];
  }
  const out = new Uint32Array(values.buffer, values.byteOffset, n);
  for (let i = 0; i < n; i++) {
    const k = keys[i];
    out[i] = k & 0x80000000 ? (k & 0x7fffffff) >>> 0 : ~k >>> 0;
  }
  return values;
}
