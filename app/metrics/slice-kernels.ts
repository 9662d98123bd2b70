/**
 * The LoG and SSIM passes of one 2D slice in WebAssembly with 128-bit SIMD (./wasm/filters.wat,
 * made by ./wasm/make-filters.mjs): the same arithmetic, pixel by pixel, as the JavaScript passes
 * of ./hfen.ts and ./ssim.ts, two columns at a time; only the sums over pixels are added in two
 * lanes, so totals may differ from the JavaScript ones in the last bits. Where WebAssembly SIMD
 * is missing, `sliceKernels()` is null and the JavaScript passes run.
 *
 * The module's memory holds one slice at a time: its pixels (float32), mask, border maps and the
 * float64 work rows of both passes; it grows to the largest slice met.
 */
import { reflectIndex } from './gaussian-kernel.ts';
import { FILTERS_WASM_BASE64 } from './wasm/filters-wasm.ts';

/** The WebAssembly API as used here (app/ compiles without the DOM library that declares it). */
interface WasmApi {
  Module: new (bytes: Uint8Array) => object;
  Instance: new (module: object, imports: object) => { exports: unknown };
}

interface FilterExports {
  memory: { buffer: ArrayBuffer; grow(pages: number): number };
  log_slice(a: number, b: number, hasB: number, mask: number, hasMask: number, R: number, C: number, Cp: number,
    colMap: number, rowStart: number, pad: number, along: number, across: number, w: number, result: number): void;
  ssim_slice(a: number, b: number, mask: number, hasMask: number, R: number, C: number, Cvp: number,
    xr: number, yr: number, qr: number, pr: number, hx: number, hy: number, hq: number, hp: number,
    w: number, c1: number, c2: number, result: number): void;
}

const WEIGHTS = 0; // 16 float64: LoG G0..G7, D0..D7 (or SSIM W0..W5)
const RESULT = 256;
const FIRST = 512;

/** Byte offsets of one slice's buffers (16-byte aligned). */
function layout(R: number, C: number) {
  let next = FIRST;
  const take = (bytes: number) => {
    const at = next;
    next += Math.ceil((bytes + 16) / 16) * 16;
    return at;
  };
  const Cp = C + (C & 1);
  const Cv = C - 10;
  const Cvp = Cv + (Cv & 1);
  const plane = R * C;
  return {
    Cp, Cvp,
    a: take(plane * 4), b: take(plane * 4), mask: take(plane), colMap: take((C + 14) * 4), rowStart: take((R + 14) * 4),
    pad: take((C + 15) * 8), along: take(R * Cp * 8), across: take(R * Cp * 8),
    xr: take((C + 2) * 8), yr: take((C + 2) * 8), qr: take((C + 2) * 8), pr: take((C + 2) * 8),
    hx: take(R * Cvp * 8), hy: take(R * Cvp * 8), hq: take(R * Cvp * 8), hp: take(R * Cvp * 8),
    end: next,
  };
}

export class SliceKernels {
  private geometry = '';
  private at = layout(1, 1);

  constructor(private readonly ex: FilterExports) {}

  private prepare(R: number, C: number): void {
    const key = `${R}x${C}`;
    if (key === this.geometry) return;
    this.at = layout(R, C);
    const have = this.ex.memory.buffer.byteLength;
    if (this.at.end > have) this.ex.memory.grow(Math.ceil((this.at.end - have) / 65536));
    const buf = this.ex.memory.buffer;
    const colMap = new Int32Array(buf, this.at.colMap, C + 14);
    for (let i = 0; i < C + 14; i++) colMap[i] = reflectIndex(i - 7, C);
    const rowStart = new Int32Array(buf, this.at.rowStart, R + 14);
    for (let i = 0; i < R + 14; i++) rowStart[i] = reflectIndex(i - 7, R) * this.at.Cp;
    this.geometry = key;
  }

  private load(a: Float32Array, b: Float32Array | null, mask: Uint8Array | null): void {
    const buf = this.ex.memory.buffer;
    new Float32Array(buf, this.at.a, a.length).set(a);
    if (b) new Float32Array(buf, this.at.b, b.length).set(b);
    if (mask) new Uint8Array(buf, this.at.mask, mask.length).set(mask);
  }

  /** Σ LoG(a − b)² over one slice (b null: a alone), plain and under the mask. */
  logSlice(a: Float32Array, b: Float32Array | null, mask: Uint8Array | null, R: number, C: number, G: ArrayLike<number>, D: ArrayLike<number>): { all: number; masked: number } {
    this.prepare(R, C);
    this.load(a, b, mask);
    const w = new Float64Array(this.ex.memory.buffer, WEIGHTS, 16);
    for (let i = 0; i < 8; i++) {
      w[i] = G[i];
      w[8 + i] = D[i];
    }
    const t = this.at;
    this.ex.log_slice(t.a, t.b, b ? 1 : 0, t.mask, mask ? 1 : 0, R, C, t.Cp, t.colMap, t.rowStart, t.pad, t.along, t.across, WEIGHTS, RESULT);
    const r = new Float64Array(this.ex.memory.buffer, RESULT, 2);
    return { all: r[0], masked: r[1] };
  }

  /** The sum of SSIM over one slice's interior, and over its mask pixels with their count. */
  ssimSlice(a: Float32Array, b: Float32Array, mask: Uint8Array | null, R: number, C: number, W: ArrayLike<number>, c1: number, c2: number): { sum: number; maskedSum: number; maskedCount: number } {
    this.prepare(R, C);
    this.load(a, b, mask);
    const w = new Float64Array(this.ex.memory.buffer, WEIGHTS, 6);
    for (let i = 0; i < 6; i++) w[i] = W[i];
    const t = this.at;
    this.ex.ssim_slice(t.a, t.b, t.mask, mask ? 1 : 0, R, C, t.Cvp, t.xr, t.yr, t.qr, t.pr, t.hx, t.hy, t.hq, t.hp, WEIGHTS, c1, c2, RESULT);
    const r = new Float64Array(this.ex.memory.buffer, RESULT, 3);
    return { sum: r[0], maskedSum: r[1], maskedCount: r[2] };
  }
}

let instance: SliceKernels | null | undefined;
let enabled = true;

/** The kernels, or null where WebAssembly SIMD is missing (or they are switched off). */
export function sliceKernels(): SliceKernels | null {
  if (!enabled) return null;
  if (instance === undefined) {
    try {
      const wasm = (globalThis as unknown as { WebAssembly?: WasmApi }).WebAssembly;
      if (!wasm) throw new Error('no WebAssembly');
      const module = new wasm.Module(Buffer.from(FILTERS_WASM_BASE64, 'base64'));
      instance = new SliceKernels(new wasm.Instance(module, {}).exports as FilterExports);
    } catch {
      instance = null;
    }
  }
  return instance;
}

/** Switches the WebAssembly kernels off or on (tests compare both paths; VEIL_NO_WASM=1 starts with them off). */
export function useSliceKernels(on: boolean): void {
  enabled = on;
}
if (typeof process !== 'undefined' && process.env.VEIL_NO_WASM) enabled = false;
