/**
 * MT19937, the 32-bit Mersenne Twister of Matsumoto & Nishimura (1998), "Mersenne Twister: a
 * 623-dimensionally equidistributed uniform pseudo-random number generator", ACM TOMACS 8(1):3-30.
 * Named so that a third party can reproduce a reading schedule from the study seed alone:
 * seeding by `init_by_array` of the authors' reference code (mt19937ar.c, 2002) and the tempering
 * of the paper. Checked against the reference sequence in test/unit/mt19937.test.ts.
 */
const N = 624;
const M = 397;
const MATRIX_A = 0x9908b0df;
const UPPER_MASK = 0x80000000;
const LOWER_MASK = 0x7fffffff;

export class MT19937 {
  private readonly mt = new Uint32Array(N);
  private mti = N + 1;

  /** `init_genrand(s)` of the reference code. */
  static fromSeed(seed: number): MT19937 {
    const g = new MT19937();
    g.initGenrand(seed >>> 0);
    return g;
  }

  /** `init_by_array(key)` of the reference code. */
  static fromArray(key: ArrayLike<number>): MT19937 {
    const g = new MT19937();
    g.initGenrand(19650218);
    const mt = g.mt;
    let i = 1;
    let j = 0;
    for (let k = Math.max(N, key.length); k > 0; k--) {
      const prev = mt[i - 1] ^ (mt[i - 1] >>> 30);
      mt[i] = (mt[i] ^ Math.imul(prev, 1664525)) + (key[j] >>> 0) + j;
      i++;
      j++;
      if (i >= N) { mt[0] = mt[N - 1]; i = 1; }
      if (j >= key.length) j = 0;
    }
    for (let k = N - 1; k > 0; k--) {
      const prev = mt[i - 1] ^ (mt[i - 1] >>> 30);
      mt[i] = (mt[i] ^ Math.imul(prev, 1566083941)) - i;
      i++;
      if (i >= N) { mt[0] = mt[N - 1]; i = 1; }
    }
    mt[0] = 0x80000000;
    return g;
  }

  private initGenrand(s: number): void {
    const mt = this.mt;
    mt[0] = s;
    for (let i = 1; i < N; i++) {
      const prev = mt[i - 1] ^ (mt[i - 1] >>> 30);
      mt[i] = Math.imul(prev, 1812433253) + i;
    }
    this.mti = N;
  }

  /** `genrand_int32`: a uniform integer in [0, 2^32). */
  nextUint32(): number {
    const mt = this.mt;
    if (this.mti >= N) {
      let kk = 0;
      for (; kk < N - M; kk++) {
        const y = (mt[kk] & UPPER_MASK) | (mt[kk + 1] & LOWER_MASK);
        mt[kk] = mt[kk + M] ^ (y >>> 1) ^ (y & 1 ? MATRIX_A : 0);
      }
      for (; kk < N - 1; kk++) {
        const y = (mt[kk] & UPPER_MASK) | (mt[kk + 1] & LOWER_MASK);
        mt[kk] = mt[kk + (M - N)] ^ (y >>> 1) ^ (y & 1 ? MATRIX_A : 0);
      }
      const y = (mt[N - 1] & UPPER_MASK) | (mt[0] & LOWER_MASK);
      mt[N - 1] = mt[M - 1] ^ (y >>> 1) ^ (y & 1 ? MATRIX_A : 0);
      this.mti = 0;
    }
    let y = mt[this.mti++];
    y ^= y >>> 11;
    y ^= (y << 7) & 0x9d2c5680;
    y ^= (y << 15) & 0xefc60000;
    y ^= y >>> 18;
    return y >>> 0;
  }

  /** A uniform integer in [0, n), by rejection so that every value is equally likely. */
  nextBelow(n: number): number {
    if (!Number.isInteger(n) || n <= 0 || n > 2 ** 32) throw new RangeError(`nextBelow: n must be an integer in 1..2^32, got ${n}`);
    const limit = 2 ** 32 - (2 ** 32 % n);
    for (;;) {
      const x = this.nextUint32();
      if (x < limit) return x % n;
    }
  }

  /** `genrand_res53`: a uniform double in [0, 1) with 53-bit resolution. */
  nextDouble(): number {
    const a = this.nextUint32() >>> 5;
    const b = this.nextUint32() >>> 6;
    return (a * 67108864 + b) / 9007199254740992;
  }
}

/** Fisher-Yates (Durstenfeld) shuffle in place, drawing from `rng`. */
export function shuffleInPlace<T>(items: T[], rng: MT19937): T[] {
  for (let i = items.length - 1; i > 0; i--) {
    const j = rng.nextBelow(i + 1);
    const t = items[i];
    items[i] = items[j];
    items[j] = t;
  }
  return items;
}
