/**
 * Orthonormal 2D Haar wavelet transform (Mallat's pyramid, `levels` levels) of one real channel
 * of a power-of-two image, in place. Orthonormal, so soft thresholding its coefficients is the
 * exact proximal operator of the l1 norm in the wavelet domain (Daubechies, Defrise & De Mol 2004).
 */
const S = Math.SQRT1_2;

function step(a: Float64Array, stride: number, offset: number, n: number, tmp: Float64Array, inverse: boolean): void {
  const h = n / 2;
  if (!inverse) {
    for (let i = 0; i < h; i++) {
      const x = a[offset + 2 * i * stride];
      const y = a[offset + (2 * i + 1) * stride];
      tmp[i] = (x + y) * S;
      tmp[h + i] = (x - y) * S;
    }
  } else {
    for (let i = 0; i < h; i++) {
      const s = a[offset + i * stride];
      const d = a[offset + (h + i) * stride];
      tmp[2 * i] = (s + d) * S;
      tmp[2 * i + 1] = (s - d) * S;
    }
  }
  for (let i = 0; i < n; i++) a[offset + i * stride] = tmp[i];
}

export function haar2d(img: Float64Array, rows: number, columns: number, levels: number, inverse = false): void {
  const tmp = new Float64Array(Math.max(rows, columns));
  const order = Array.from({ length: levels }, (_, l) => l);
  if (inverse) order.reverse();
  for (const l of order) {
    const r = rows >> l;
    const c = columns >> l;
    if (!inverse) {
      for (let y = 0; y < r; y++) step(img, 1, y * columns, c, tmp, false);
      for (let x = 0; x < c; x++) step(img, columns, x, r, tmp, false);
    } else {
      for (let x = 0; x < c; x++) step(img, columns, x, r, tmp, true);
      for (let y = 0; y < r; y++) step(img, 1, y * columns, c, tmp, true);
    }
  }
}
