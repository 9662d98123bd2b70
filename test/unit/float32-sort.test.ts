/**
 * The radix sort behind display windows and item statistics (app/blinding/float32-sort.ts) orders
 * float32 values exactly as Float32Array.prototype.sort does (ECMAScript's numeric order, -0 before
 * +0), on arrays short and long, with negatives, zeros of both signs, subnormals, extremes and ties.
 */
import { describe, expect, it } from 'vitest';
import { sortFloat32 } from '../../app/blinding/float32-sort.ts';
import { MT19937 } from '../../app/blinding/mt19937.ts';

function sample(n: number, seed: number): Float32Array {
  const rng = MT19937.fromSeed(seed);
  const a = new Float32Array(n);
  for (let i = 0; i < n; i++) {
    const u = rng.nextDouble();
    a[i] = (u - 0.5) * 10 ** (rng.nextDouble() * 20 - 10); // many magnitudes, both signs
    if (u < 0.05) a[i] = Math.round(u * 100) - 2; // ties
  }
  const specials = [-0, 0, 3.4e38, -3.4e38, 1e-45, -1e-45, 1.17549435e-38, -1.17549435e-38];
  specials.forEach((v, i) => (a[(i * 7919) % n] = v));
  return a;
}

describe('float32 radix sort', () => {
  for (const n of [10, 511, 512, 4096, 200_000]) {
    it(`sorts ${n} values as the built-in typed-array sort does`, () => {
      const a = sample(n, n);
      const expected = a.slice().sort();
      const got = sortFloat32(a);
      expect(got).toBe(a); // in place
      for (let i = 0; i < n; i++) if (!Object.is(got[i], expected[i])) expect.fail(`index ${i}: ${got[i]} vs ${expected[i]}`);
    });
  }

  it('sorts a view in place without touching the rest of its buffer', () => {
    const whole = sample(3000, 7);
    const before = whole.slice();
    const view = whole.subarray(1000, 2500);
    const expected = view.slice().sort();
    sortFloat32(view);
    expect(Array.from(view)).toEqual(Array.from(expected));
    expect(Array.from(whole.subarray(0, 1000))).toEqual(Array.from(before.subarray(0, 1000)));
    expect(Array.from(whole.subarray(2500))).toEqual(Array.from(before.subarray(2500)));
  });
});
