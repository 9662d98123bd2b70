/**
 * NumPy `.npy` files (format versions 1.0, 2.0 and 3.0) to and from Veil Volumes.
 *
 * Layout, after the NumPy format description (numpy.lib.format):
 *   magic "\x93NUMPY", major and minor version bytes, header length (uint16 little endian in
 *   1.0, uint32 in 2.0 and 3.0), the header: a Python dict literal
 *   {'descr': '<f4', 'fortran_order': False, 'shape': (2, 3, 4), } encoded latin-1 (1.0, 2.0)
 *   or UTF-8 (3.0), padded with spaces and ended by '\n' so that the data starts at a multiple
 *   of 64 bytes; then the raw array data.
 *
 * Reading: 2D arrays are one slice (rows, columns); 3D arrays are (slices, rows, columns),
 * matching the Volume axis convention. Pixels become float32; complex values become their
 * magnitude. The header and the data length are checked before anything is allocated.
 */
import { createHash } from 'node:crypto';
import { readFile } from 'node:fs/promises';
import { resolve } from 'node:path';
import { SourceError } from './source-error.ts';
import { IDENTITY_ORIENTATION } from './volume.ts';
import type { Volume } from './volume.ts';

export class NpyError extends SourceError {
  constructor(path: string, detail: string) {
    super(path, detail);
    this.name = 'NpyError';
  }
}

/** Veil's data type names (shared with the DICOM and NIfTI readers) for NumPy's codes. */
const TYPE_NAMES: Record<string, string> = {
  f4: 'float32', f8: 'float64', i2: 'int16', u2: 'uint16', i4: 'int32', u1: 'uint8', i1: 'int8',
  c8: 'complex64 (magnitude)', c16: 'complex128 (magnitude)',
};

const MAGIC = [0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59]; // \x93NUMPY
const ALIGN = 64;
export const SUPPORTED_DTYPES = ['f4', 'f8', 'i2', 'u2', 'i4', 'u1', 'i1', 'c8', 'c16'] as const;
const SUPPORTED_TEXT = `${SUPPORTED_DTYPES.join(', ')} (with byte order '<' or '>'; '|' for one-byte types)`;

interface DType {
  /** Kind and size, e.g. 'f4', 'i2', 'c8'. */
  code: string;
  /** Bytes per element (both parts for complex). */
  size: number;
  little: boolean;
  /** Reads the element at byte `offset` of the data; complex -> magnitude. */
  read: (view: DataView, offset: number, little: boolean) => number;
}

const READERS: Record<(typeof SUPPORTED_DTYPES)[number], DType['read']> = {
  f4: (v, o, le) => v.getFloat32(o, le),
  f8: (v, o, le) => v.getFloat64(o, le),
  i2: (v, o, le) => v.getInt16(o, le),
  u2: (v, o, le) => v.getUint16(o, le),
  i4: (v, o, le) => v.getInt32(o, le),
  u1: (v, o) => v.getUint8(o),
  i1: (v, o) => v.getInt8(o),
  c8: (v, o, le) => Math.sqrt(v.getFloat32(o, le) ** 2 + v.getFloat32(o + 4, le) ** 2),
  c16: (v, o, le) => Math.sqrt(v.getFloat64(o, le) ** 2 + v.getFloat64(o + 8, le) ** 2),
};

const HOST_LITTLE = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1;
const NATIVE: Partial<Record<string, new (buffer: ArrayBuffer, offset: number, length: number) => ArrayLike<number>>> = {
  f4: Float32Array, f8: Float64Array, i2: Int16Array, u2: Uint16Array, i4: Int32Array, u1: Uint8Array, i1: Int8Array,
};

/** A typed-array view (or aligned copy) of real data stored in the host's byte order, else null. */
function nativeArray(dtype: DType, bytes: Uint8Array, dataStart: number, count: number): ArrayLike<number> | null {
  const Ctor = NATIVE[dtype.code];
  if (!Ctor || (dtype.size > 1 && dtype.little !== HOST_LITTLE)) return null;
  const offset = bytes.byteOffset + dataStart;
  if (offset % dtype.size === 0) return new Ctor(bytes.buffer as ArrayBuffer, offset, count);
  const copy = bytes.slice(dataStart, dataStart + count * dtype.size);
  return new Ctor(copy.buffer, 0, count);
}

function parseDescr(descr: string, path: string): DType {
  const m = /^([<>|])([fiuc])([0-9]+)$/.exec(descr);
  const code = m ? `${m[2]}${m[3]}` : '';
  const known = (SUPPORTED_DTYPES as readonly string[]).includes(code);
  const size = known ? Number(m![3]) : 0;
  // '|' (byte order not applicable) is only valid for one-byte types.
  if (!m || !known || (m[1] === '|' && size !== 1)) {
    throw new NpyError(path, `unsupported dtype '${descr}'; supported: ${SUPPORTED_TEXT}`);
  }
  return { code, size, little: m[1] !== '>', read: READERS[code as keyof typeof READERS] };
}

// ---- the header: a small parser for the Python literal subset NumPy writes ------------------

type PyValue = string | number | boolean | null | PyValue[] | Map<string, PyValue>;

class HeaderParser {
  private pos = 0;
  /** Nesting depth: a header is a dict holding a tuple; a deep nest is damage, not data. */
  private depth = 0;

  constructor(
    private readonly text: string,
    private readonly path: string,
  ) {}

  parse(): PyValue {
    const value = this.value();
    this.space();
    if (this.pos < this.text.length) this.fail('unexpected text after the header dict');
    return value;
  }

  private fail(what: string): never {
    throw new NpyError(this.path, `malformed header (${what} at character ${this.pos}): ${JSON.stringify(this.text.trimEnd())}`);
  }

  private space(): void {
    while (this.pos < this.text.length && ' \t\r\n'.includes(this.text[this.pos])) this.pos++;
  }

  private value(): PyValue {
    this.space();
    if (this.depth > 8) this.fail('nesting too deep');
    const c = this.text[this.pos];
    if (c === '{') return this.dict();
    if (c === '(') return this.sequence(')');
    if (c === '[') return this.sequence(']');
    if (c === "'" || c === '"') return this.string();
    const word = /^(?:True|False|None|-?[0-9]+L?)/.exec(this.text.slice(this.pos))?.[0];
    if (!word) this.fail('expected a value');
    this.pos += word.length;
    if (word === 'True') return true;
    if (word === 'False') return false;
    if (word === 'None') return null;
    return Number(word.replace('L', '')); // 'L': long integers in headers written by Python 2
  }

  private string(): string {
    const quote = this.text[this.pos++];
    let out = '';
    while (this.pos < this.text.length && this.text[this.pos] !== quote) {
      if (this.text[this.pos] === '\\') this.pos++;
      out += this.text[this.pos++] ?? '';
    }
    if (this.pos >= this.text.length) this.fail('unterminated string');
    this.pos++;
    return out;
  }

  private sequence(close: string): PyValue[] {
    this.pos++;
    this.depth++;
    const items: PyValue[] = [];
    for (;;) {
      this.space();
      if (this.text[this.pos] === close) break;
      items.push(this.value());
      this.space();
      if (this.text[this.pos] === ',') this.pos++;
      else if (this.text[this.pos] !== close) this.fail(`expected ',' or '${close}'`);
    }
    this.pos++;
    this.depth--;
    return items;
  }

  private dict(): Map<string, PyValue> {
    this.pos++;
    this.depth++;
    const map = new Map<string, PyValue>();
    for (;;) {
      this.space();
      if (this.text[this.pos] === '}') break;
      const key = this.value();
      if (typeof key !== 'string') this.fail('expected a string key');
      this.space();
      if (this.text[this.pos++] !== ':') this.fail("expected ':'");
      map.set(key, this.value());
      this.space();
      if (this.text[this.pos] === ',') this.pos++;
      else if (this.text[this.pos] !== '}') this.fail("expected ',' or '}'");
    }
    this.pos++;
    this.depth--;
    return map;
  }
}

interface Header {
  dtype: DType;
  fortran: boolean;
  shape: number[];
  dataStart: number;
}

function readHeader(bytes: Uint8Array, path: string): Header {
  if (bytes.length < MAGIC.length + 4 || MAGIC.some((b, i) => bytes[i] !== b)) {
    const start = Array.from(bytes.subarray(0, 6), (b) => b.toString(16).padStart(2, '0')).join(' ');
    throw new NpyError(path, `not a NumPy .npy file: it must start with the bytes 93 4e 55 4d 50 59 ("\\x93NUMPY"), found ${start || 'an empty file'}`);
  }
  const [major, minor] = [bytes[6], bytes[7]];
  if (![1, 2, 3].includes(major) || minor !== 0) {
    throw new NpyError(path, `unsupported .npy format version ${major}.${minor}; supported: 1.0, 2.0, 3.0`);
  }
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const lengthBytes = major === 1 ? 2 : 4;
  if (bytes.length < 8 + lengthBytes) throw new NpyError(path, 'truncated: the file ends inside the header length');
  const headerLength = major === 1 ? view.getUint16(8, true) : view.getUint32(8, true);
  const headerStart = 8 + lengthBytes;
  const dataStart = headerStart + headerLength;
  if (bytes.length < dataStart) {
    throw new NpyError(path, `truncated: the header is ${headerLength} bytes long but the file ends after ${bytes.length - headerStart}`);
  }
  const raw = bytes.subarray(headerStart, dataStart);
  const text = major === 3 ? new TextDecoder('utf-8').decode(raw) : Array.from(raw, (b) => String.fromCharCode(b)).join('');

  const dict = new HeaderParser(text, path).parse();
  if (!(dict instanceof Map)) throw new NpyError(path, `malformed header: expected a dict, got ${JSON.stringify(text.trim())}`);
  const keys = [...dict.keys()].sort().join(', ');
  if (keys !== 'descr, fortran_order, shape') {
    throw new NpyError(path, `malformed header: keys must be descr, fortran_order, shape; got ${keys || 'none'}`);
  }
  const descr = dict.get('descr');
  if (typeof descr !== 'string') {
    throw new NpyError(path, `unsupported dtype: structured arrays are not images; supported: ${SUPPORTED_TEXT}`);
  }
  const dtype = parseDescr(descr, path);
  const fortran = dict.get('fortran_order');
  if (typeof fortran !== 'boolean') throw new NpyError(path, "malformed header: 'fortran_order' must be True or False");
  const shape = dict.get('shape');
  if (!Array.isArray(shape) || !shape.every((d) => typeof d === 'number' && Number.isSafeInteger(d) && d >= 0)) {
    throw new NpyError(path, "malformed header: 'shape' must be a tuple of non-negative integers");
  }
  const dims = shape as number[];
  if (dims.length !== 2 && dims.length !== 3) {
    throw new NpyError(
      path,
      `shape ${formatShape(dims)} has ${dims.length} dimension${dims.length === 1 ? '' : 's'}; ` +
        'expected 2 (rows, columns) or 3 (slices, rows, columns)',
    );
  }
  if (dims.some((d) => d === 0)) throw new NpyError(path, `shape ${formatShape(dims)} is empty; every dimension must be at least 1`);
  return { dtype, fortran, shape: dims, dataStart };
}

/** Python's tuple notation, as NumPy writes it: (), (4,), (2, 3). */
function formatShape(shape: number[]): string {
  return shape.length === 1 ? `(${shape[0]},)` : `(${shape.join(', ')})`;
}

// ---- reading --------------------------------------------------------------------------------

/**
 * Reads a .npy file's bytes. `path` names the file in errors and in the provenance. Aligned
 * float32 data is kept in place when `bytes` is the whole of its buffer, so the caller must not
 * change those bytes afterwards.
 */
export function readNpy(bytes: Uint8Array, path: string): Volume {
  const { dtype, fortran, shape, dataStart } = readHeader(bytes, path);
  const [slices, rows, columns] = shape.length === 2 ? [1, shape[0], shape[1]] : shape;
  const count = slices * rows * columns;
  const needed = count * dtype.size;
  const found = bytes.length - dataStart;
  if (found !== needed) {
    const what = found < needed ? 'truncated data' : 'unexpected bytes after the data';
    throw new NpyError(path, `${what}: shape ${formatShape(shape)} needs ${needed} bytes after the header, the file has ${found}`);
  }

  const view = new DataView(bytes.buffer, bytes.byteOffset + dataStart, needed);
  const { read, size, little } = dtype;
  const native = !fortran && nativeArray(dtype, bytes, dataStart, count);
  // float32 in this machine's byte order, in bytes that are the whole of their buffer (as a file
  // read gives them): the volume keeps those bytes instead of a copy.
  const owned = bytes.byteLength === bytes.buffer.byteLength && native instanceof Float32Array && native.buffer === bytes.buffer;
  const pixels = owned ? native : new Float32Array(count);
  if (owned) return volumeOf(pixels);
  if (native) {
    // The data is already in this machine's byte order; a typed-array copy converts natively.
    pixels.set(native);
  } else if (!fortran) {
    for (let i = 0; i < count; i++) pixels[i] = read(view, i * size, little);
  } else {
    // Fortran order: the first axis varies fastest, source index = s + slices * (r + rows * c).
    let k = 0;
    for (let c = 0; c < columns; c++) {
      for (let r = 0; r < rows; r++) {
        for (let s = 0; s < slices; s++) pixels[(s * rows + r) * columns + c] = read(view, k++ * size, little);
      }
    }
  }
  return volumeOf(pixels);

  function volumeOf(pixels: Float32Array): Volume {
    return {
      columns,
      rows,
      slices,
      spacing: [1, 1, 1],
      orientation: [...IDENTITY_ORIENTATION],
      pixels,
      provenance: { path, format: 'npy', sha256: createHash('sha256').update(bytes).digest('hex') },
      dataType: TYPE_NAMES[dtype.code],
    };
  }
}

/** Reads a .npy file from disk; the provenance holds its absolute path. */
export async function readNpyFile(path: string): Promise<Volume> {
  const absolute = resolve(path);
  let bytes: Uint8Array;
  try {
    bytes = await readFile(absolute);
  } catch (err) {
    const code = (err as NodeJS.ErrnoException).code;
    throw new NpyError(absolute, code === 'ENOENT' ? 'file not found' : `cannot read the file: ${(err as Error).message}`);
  }
  return readNpy(bytes, absolute);
}

// ---- writing --------------------------------------------------------------------------------

export type NpyWritable = Float32Array | Int16Array | Uint16Array | Uint8Array;

function descrOf(data: NpyWritable): { descr: string; write: (v: DataView, o: number, x: number) => void } {
  if (data instanceof Float32Array) return { descr: '<f4', write: (v, o, x) => v.setFloat32(o, x, true) };
  if (data instanceof Int16Array) return { descr: '<i2', write: (v, o, x) => v.setInt16(o, x, true) };
  if (data instanceof Uint16Array) return { descr: '<u2', write: (v, o, x) => v.setUint16(o, x, true) };
  return { descr: '|u1', write: (v, o, x) => v.setUint8(o, x) };
}

/**
 * Writes a .npy file (version 1.0, little endian, C order) byte for byte as NumPy's `np.save`
 * does: the header dict, spaces NumPy leaves so that the first axis can grow in place (21 digits
 * in all), then spaces and '\n' up to a multiple of 64 bytes.
 */
export function writeNpy(data: NpyWritable, shape: number[]): Uint8Array {
  if (!shape.every((d) => Number.isSafeInteger(d) && d >= 0)) {
    throw new Error(`writeNpy: shape [${shape.join(', ')}] must hold non-negative integers`);
  }
  const count = shape.reduce((a, b) => a * b, 1);
  if (count !== data.length) {
    throw new Error(`writeNpy: shape ${formatShape(shape)} holds ${count} values but the data has ${data.length}`);
  }
  const { descr, write } = descrOf(data);
  let header = `{'descr': '${descr}', 'fortran_order': False, 'shape': ${formatShape(shape)}, }`;
  if (shape.length > 0) header += ' '.repeat(Math.max(0, 21 - String(shape[0]).length));
  const preamble = MAGIC.length + 2 + 2;
  header += ' '.repeat(ALIGN - ((preamble + header.length + 1) % ALIGN)) + '\n';
  if (header.length > 0xffff) throw new Error(`writeNpy: header of ${header.length} bytes does not fit format version 1.0`);

  const size = data.BYTES_PER_ELEMENT;
  const out = new Uint8Array(preamble + header.length + count * size);
  out.set(MAGIC, 0);
  out[6] = 1;
  out[7] = 0;
  const view = new DataView(out.buffer);
  view.setUint16(8, header.length, true);
  for (let i = 0; i < header.length; i++) out[preamble + i] = header.charCodeAt(i);
  if (HOST_LITTLE) {
    out.set(new Uint8Array(data.buffer, data.byteOffset, data.byteLength), preamble + header.length);
  } else {
    const dataView = new DataView(out.buffer, preamble + header.length);
    for (let i = 0; i < count; i++) write(dataView, i * size, data[i]);
  }
  return out;
}
