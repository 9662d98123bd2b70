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
    return this.run(img, false);
  }

  inverse(k: ComplexImage): ComplexImage {
    return this.run(k, true);
  }

  /** 1D transforms along the rows of a (n x m) complex image, straight on typed-array views. */
  private rowsPass(fft: FFT, src: Float64Array, dst: Float64Array, n: number, m: number, inverse: boolean): void {
    for (let r = 0; r < n; r++) {
      const a = src.subarray(r * 2 * m, (r + 1) * 2 * m);
      const b = dst.subarray(r * 2 * m, (r + 1) * 2 * m);
      if (inverse) fft.inverseTransform(b as unknown as number[], a as unknown as number[]);
      else fft.transform(b as unknown as number[], a as unknown as number[]);
    }
  }

  private static transpose(src: Float64Array, dst: Float64Array, n: number, m: number, scale: number): void {
    for (let r = 0; r < n; r++) {
      for (let c = 0; c < m; c++) {
        const s = (r * m + c) * 2;
        const d = (c * n + r) * 2;
        dst[d] = src[s] * scale;
        dst[d + 1] = src[s + 1] * scale;
      }
    }
  }

  private run(src: ComplexImage, inverse: boolean): ComplexImage {
    const { rows, columns } = this;
    const a = new Float64Array(rows * columns * 2);
    const b = new Float64Array(rows * columns * 2);
    const scale = inverse ? Math.sqrt(rows * columns) : 1 / Math.sqrt(rows * columns);
    this.rowsPass(this.rowFft, src, a, rows, columns, inverse);
    Fft2.transpose(a, b, rows, columns, 1);
    this.rowsPass(this.colFft, b, a, columns, rows, inverse);
    Fft2.transpose(a, b, columns, rows, scale);
    return b;
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
