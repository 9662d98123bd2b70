/**
 * Unitary 2D discrete Fourier transform of complex images (interleaved re, im; row-major), by
 * rows then columns with fft.js (radix-4, power-of-two sizes). Unitary: forward scaled by
 * 1/sqrt(N), inverse by sqrt(N) after fft.js's own 1/n, so Parseval holds and noise added in
 * k-space has the same standard deviation in the image. Frequency 0 is at index 0 of each axis.
 */
import FFT from 'fft.js';

export type ComplexImage = Float64Array;

export class Fft2 {
  private readonly rowFft: FFT;
  private readonly colFft: FFT;

  constructor(public readonly rows: number, public readonly columns: number) {
    for (const n of [rows, columns]) if (n < 2 || (n & (n - 1)) !== 0) throw new Error(`Fft2: sizes must be powers of two, got ${rows}x${columns}`);
    this.rowFft = new FFT(columns);
    this.colFft = new FFT(rows);
  }

  forward(img: ComplexImage): ComplexImage {
    return this.run(img, false, new Float64Array(img.length));
  }

  inverse(k: ComplexImage): ComplexImage {
    return this.run(k, true, new Float64Array(k.length));
  }

  /** The same transforms into a caller's buffer (no allocation; `out` may not be `src`). */
  forwardInto(img: ComplexImage, out: ComplexImage): ComplexImage {
    return this.run(img, false, out);
  }

  inverseInto(k: ComplexImage, out: ComplexImage): ComplexImage {
    return this.run(k, true, out);
  }

  private scratch: Float64Array | null = null;

  /** 1D transforms along the rows of a (n x m) complex image, straight on typed-array views. */
  private rowsPass(fft: FFT, src: Float64Array, dst: Float64Array, n: number, m: number, inverse: boolean): void {
    for (let r = 0; r < n; r++) {
      const a = src.subarray(r * 2 * m, (r + 1) * 2 * m);
      const b = dst.subarray(r * 2 * m, (r + 1) * 2 * m);
      if (inverse) fft.inverseTransform(b as unknown as number[], a as unknown as number[]);
      else fft.transform(b as unknown as number[], a as unknown as number[]);
    }
  }

  /** dst = scale * transpose(src) for an (n x m) complex image, in 16 x 16 tiles to stay in cache. */
  private static transpose(src: Float64Array, dst: Float64Array, n: number, m: number, scale: number): void {
    const T = 16;
    for (let r0 = 0; r0 < n; r0 += T) {
      for (let c0 = 0; c0 < m; c0 += T) {
        const rEnd = Math.min(n, r0 + T);
        const cEnd = Math.min(m, c0 + T);
        for (let r = r0; r < rEnd; r++) {
          for (let c = c0; c < cEnd; c++) {
            const s = (r * m + c) * 2;
            const d = (c * n + r) * 2;
            dst[d] = src[s] * scale;
            dst[d + 1] = src[s + 1] * scale;
          }
        }
      }
    }
  }

  private run(src: ComplexImage, inverse: boolean, out: ComplexImage): ComplexImage {
    const { rows, columns } = this;
    const a = (this.scratch ??= new Float64Array(rows * columns * 2));
    const scale = inverse ? Math.sqrt(rows * columns) : 1 / Math.sqrt(rows * columns);
    this.rowsPass(this.rowFft, src, a, rows, columns, inverse);
    Fft2.transpose(a, out, rows, columns, 1);
    this.rowsPass(this.colFft, out, a, columns, rows, inverse);
    Fft2.transpose(a, out, columns, rows, scale);
    return out;
  }
}

export function toComplex(real: Float32Array | Float64Array): ComplexImage {
  const out = new Float64Array(real.length * 2);
  for (let i = 0; i < real.length; i++) out[2 * i] = real[i];
  return out;
}

export function magnitude(c: ComplexImage): Float32Array {
  const out = new Float32Array(c.length / 2);
  for (let i = 0; i < out.length; i++) out[i] = Math.hypot(c[2 * i], c[2 * i + 1]);
  return out;
}
