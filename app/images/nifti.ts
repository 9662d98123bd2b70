/**
 * NIfTI-1 and NIfTI-2 single-file images (`.nii`, `.nii.gz`) into Veil Volumes.
 *
 * Header layouts after the NIfTI-1 header (nifti1.h, NIfTI DFWG 2004) and NIfTI-2 (nifti2.h,
 * 2011): NIfTI-1 is 348 bytes with magic "n+1\0" at byte 344, NIfTI-2 540 bytes with magic
 * "n+2\0\r\n\x1a\n" at byte 4; either byte order, told by sizeof_hdr.
 * - Values: y = scl_slope * x + scl_inter when scl_slope is finite and non-zero (nifti1.h);
 *   complex data become the magnitude of the scaled value.
 * - Geometry, nifti1.h "method 3, 2, 1": the sform (srow_x/y/z) when sform_code > 0, else the
 *   qform (quaternion b, c, d; a = sqrt(1 - b^2 - c^2 - d^2); qfac = pixdim[0] flips k) when
 *   qform_code > 0, else pixdim only (spacing without orientation). Units from xyzt_units
 *   (metres and microns become mm). The affine maps voxel (i, j, k) to RAS+; Veil's convention
 *   is DICOM's LPS, so x and y are negated. Columns run along i, rows along j, slices along k;
 *   when k points against row x column (a left-handed grid) the slices are stored in reverse so
 *   that they ascend along the slice normal, as a sorted DICOM series does.
 *
 * The header is read and its sizes checked against the file (for .nii.gz: against the most a
 * gzip stream of that length can hold) before the data are allocated.
 */
import { createHash } from 'node:crypto';
import { createGunzip } from 'node:zlib';
import { SourceError, describeThrown } from './source-error.ts';
import { IDENTITY_ORIENTATION } from './volume.ts';
import type { Volume } from './volume.ts';

type Reader = (v: DataView, offset: number, little: boolean) => number;

interface DataType {
  name: string;
  size: number;
  complex: boolean;
  read: Reader;
}

const DATATYPES: Record<number, DataType> = {
  2: { name: 'uint8', size: 1, complex: false, read: (v, o) => v.getUint8(o) },
  4: { name: 'int16', size: 2, complex: false, read: (v, o, le) => v.getInt16(o, le) },
  8: { name: 'int32', size: 4, complex: false, read: (v, o, le) => v.getInt32(o, le) },
  16: { name: 'float32', size: 4, complex: false, read: (v, o, le) => v.getFloat32(o, le) },
  32: { name: 'complex64', size: 8, complex: true, read: (v, o, le) => v.getFloat32(o, le) },
  64: { name: 'float64', size: 8, complex: false, read: (v, o, le) => v.getFloat64(o, le) },
  256: { name: 'int8', size: 1, complex: false, read: (v, o) => v.getInt8(o) },
  512: { name: 'uint16', size: 2, complex: false, read: (v, o, le) => v.getUint16(o, le) },
  768: { name: 'uint32', size: 4, complex: false, read: (v, o, le) => v.getUint32(o, le) },
  1792: { name: 'complex128', size: 16, complex: true, read: (v, o, le) => v.getFloat64(o, le) },
};
const OTHER_TYPES: Record<number, string> = {
  1: 'binary', 128: 'RGB24', 1024: 'int64', 1280: 'uint64', 1536: 'float128', 2048: 'complex256', 2304: 'RGBA32',
};
const SUPPORTED = Object.values(DATATYPES).map((t) => t.name).join(', ');

interface Header {
  version: 1 | 2;
  little: boolean;
  dims: number[];
  datatype: DataType;
  voxOffset: number;
  slope: number;
  inter: number;
  pixdim: number[];
  qformCode: number;
  sformCode: number;
  quatern: [number, number, number];
  qoffset: [number, number, number];
  srow: number[][];
  unit: number;
}

const MAGIC1 = [0x6e, 0x2b, 0x31, 0x00]; // n+1\0
const PAIR1 = [0x6e, 0x69, 0x31, 0x00]; // ni1\0
const MAGIC2 = [0x6e, 0x2b, 0x32, 0x00, 0x0d, 0x0a, 0x1a, 0x0a];
const PAIR2 = [0x6e, 0x69, 0x32, 0x00, 0x0d, 0x0a, 0x1a, 0x0a];
const matches = (bytes: Uint8Array, at: number, magic: number[]): boolean => magic.every((b, i) => bytes[at + i] === b);

/** NIfTI-1 (348) or NIfTI-2 (540) and the byte order, from sizeof_hdr; null when neither. */
export function niftiKind(bytes: Uint8Array): { version: 1 | 2; little: boolean } | null {
  if (bytes.length < 4) return null;
  const v = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  for (const little of [true, false]) {
    const size = v.getInt32(0, little);
    if (size === 348) return { version: 1, little };
    if (size === 540) return { version: 2, little };
  }
  return null;
}

const PAIR_HINT = 'it is the header of a .hdr/.img pair; Veil reads single-file NIfTI (.nii, .nii.gz): convert it, e.g. nib.save(nib.load(path), "out.nii") in nibabel';

function readHeader(bytes: Uint8Array, path: string): Header {
  const kind = niftiKind(bytes);
  if (!kind) {
    throw new SourceError(path, `not a NIfTI file: sizeof_hdr must be 348 (NIfTI-1) or 540 (NIfTI-2)${bytes.length < 4 ? `, and the file has only ${bytes.length} bytes` : ''}`);
  }
  const { version, little } = kind;
  const headerSize = version === 1 ? 348 : 540;
  if (bytes.length < headerSize) throw new SourceError(path, `truncated: the NIfTI-${version} header needs ${headerSize} bytes, the file has ${bytes.length}`);
  const v = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const i16 = (o: number) => v.getInt16(o, little);
  const i32 = (o: number) => v.getInt32(o, little);
  const f32 = (o: number) => v.getFloat32(o, little);
  const f64 = (o: number) => v.getFloat64(o, little);
  const i64 = (o: number) => Number(v.getBigInt64(o, little));

  if (version === 1) {
    if (matches(bytes, 344, PAIR1)) throw new SourceError(path, PAIR_HINT);
    if (!matches(bytes, 344, MAGIC1)) throw new SourceError(path, `not a single-file NIfTI-1 image: the magic at byte 344 must be "n+1"`);
  } else {
    if (matches(bytes, 4, PAIR2)) throw new SourceError(path, PAIR_HINT);
    if (!matches(bytes, 4, MAGIC2)) throw new SourceError(path, `not a single-file NIfTI-2 image: the magic at byte 4 must be "n+2" followed by \\0\\r\\n\\x1a\\n`);
  }
  const dim = version === 1 ? Array.from({ length: 8 }, (_, k) => i16(40 + 2 * k)) : Array.from({ length: 8 }, (_, k) => i64(16 + 8 * k));
  const code = version === 1 ? i16(70) : i16(12);
  const pixdim = version === 1 ? Array.from({ length: 8 }, (_, k) => f32(76 + 4 * k)) : Array.from({ length: 8 }, (_, k) => f64(104 + 8 * k));
  const voxOffset = version === 1 ? f32(108) : i64(168);
  const slope = version === 1 ? f32(112) : f64(176);
  const inter = version === 1 ? f32(116) : f64(184);
  const units = version === 1 ? bytes[123] : i32(500);
  const [qformCode, sformCode] = version === 1 ? [i16(252), i16(254)] : [i32(344), i32(348)];
  const q = version === 1 ? [256, 260, 264, 268, 272, 276].map(f32) : [352, 360, 368, 376, 384, 392].map(f64);
  const srow = version === 1
    ? [0, 1, 2].map((r) => [0, 1, 2, 3].map((c) => f32(280 + 16 * r + 4 * c)))
    : [0, 1, 2].map((r) => [0, 1, 2, 3].map((c) => f64(400 + 32 * r + 8 * c)));

  const ndim = dim[0];
  if (!(ndim >= 1 && ndim <= 7)) throw new SourceError(path, `dim[0] is ${ndim}; it must be the number of dimensions, 1 to 7`);
  const dims = dim.slice(1, ndim + 1);
  if (!dims.every((d) => Number.isSafeInteger(d) && d >= 1)) {
    throw new SourceError(path, `dimensions ${dims.join(' x ')} must all be whole numbers of at least 1`);
  }
  if (dims.slice(3).some((d) => d > 1)) {
    throw new SourceError(path, `has ${ndim} dimensions (${dims.join(' x ')}); Veil reads one 3D volume per source: split it first, e.g. fslsplit or nibabel's four_to_three`);
  }
  const datatype = DATATYPES[code];
  if (!datatype) {
    const known = OTHER_TYPES[code];
    throw new SourceError(path, `datatype ${code}${known ? ` (${known})` : ''} is not read; Veil reads ${SUPPORTED}`);
  }
  const unitCode = units & 0x07;
  const unit = unitCode === 1 ? 1000 : unitCode === 3 ? 0.001 : 1;
  return {
    version, little, dims: [dims[0], dims[1] ?? 1, dims[2] ?? 1], datatype, voxOffset, slope, inter, pixdim,
    qformCode, sformCode, quatern: [q[0], q[1], q[2]], qoffset: [q[3], q[4], q[5]], srow, unit,
  };
}

/** Bytes the image occupies, header and data, after checking the offset. */
function imageEnd(h: Header, path: string): number {
  const minOffset = h.version === 1 ? 352 : 544;
  if (!Number.isInteger(h.voxOffset) || h.voxOffset < minOffset) {
    throw new SourceError(path, `vox_offset ${h.voxOffset} must be a whole number of at least ${minOffset} (the data follow the header)`);
  }
  return h.voxOffset + h.dims[0] * h.dims[1] * h.dims[2] * h.datatype.size;
}

/** Deflate cannot expand data by more than about 1032:1 (zlib technical details, "Maximum compression factor"). */
const DEFLATE_MAX_RATIO = 1032;

/**
 * Gunzips just enough of a .nii.gz: the header first, then exactly the bytes the header says the
 * image occupies, checked against the most the compressed length can hold before allocating.
 */
function gunzipImage(gz: Uint8Array, path: string): Promise<Uint8Array> {
  return new Promise((resolveImage, reject) => {
    const stream = createGunzip();
    const head: Buffer[] = [];
    let headLength = 0;
    let out: Uint8Array | null = null;
    let filled = 0;
    let done = false;
    const finish = (error: Error | null, value?: Uint8Array): void => {
      if (done) return;
      done = true;
      stream.destroy();
      if (error) reject(error);
      else resolveImage(value!);
    };
    stream.on('data', (chunk: Buffer) => {
      if (done) return;
      if (!out) {
        head.push(chunk);
        headLength += chunk.length;
        const joined = Buffer.concat(head);
        const kind = niftiKind(joined);
        const need = kind?.version === 2 ? 540 : 348;
        if (headLength < need) return;
        try {
          const end = imageEnd(readHeader(joined, path), path);
          const most = gz.length * DEFLATE_MAX_RATIO;
          if (end > most) {
            throw new SourceError(path, `the header describes ${end} bytes of image but ${gz.length} gzip-compressed bytes can hold at most ${most}`);
          }
          out = new Uint8Array(end);
        } catch (e) {
          finish(e as Error);
          return;
        }
        chunk = joined;
      }
      const n = Math.min(chunk.length, out.length - filled);
      out.set(chunk.subarray(0, n), filled);
      filled += n;
      if (filled === out.length) finish(null, out);
    });
    stream.on('end', () => {
      if (!out) {
        const bytes = new Uint8Array(Buffer.concat(head));
        try {
          readHeader(bytes, path); // throws the precise reason (not NIfTI, truncated header, ...)
          finish(new SourceError(path, 'truncated: the gzip stream ends inside the NIfTI header'));
        } catch (e) {
          finish(e as Error);
        }
        return;
      }
      finish(new SourceError(path, `truncated: the image needs ${out.length} bytes, the gzip stream holds ${filled}`));
    });
    stream.on('error', (e) => finish(new SourceError(path, `cannot decompress the gzip stream: ${describeThrown(e)}`)));
    stream.end(gz);
  });
}

export function isGzip(bytes: Uint8Array): boolean {
  return bytes.length >= 2 && bytes[0] === 0x1f && bytes[1] === 0x8b;
}

/** Reads a .nii or .nii.gz file's bytes (gzip is recognised by its magic, whatever the name). */
export async function readNifti(bytes: Uint8Array, path: string): Promise<Volume> {
  const sha256 = createHash('sha256').update(bytes).digest('hex');
  const image = isGzip(bytes) ? await gunzipImage(bytes, path) : bytes;
  const h = readHeader(image, path);
  const end = imageEnd(h, path);
  if (end > image.length) {
    throw new SourceError(path, `truncated data: ${h.dims.join(' x ')} ${h.datatype.name} voxels from byte ${h.voxOffset} need ${end} bytes, the file has ${image.length}`);
  }
  return toVolume(h, image, { path, format: 'nifti', sha256 }, path);
}

type Mat = number[][]; // 3 rows x 4 columns, RAS+ mm

function qformAffine(h: Header): Mat {
  let [b, c, d] = h.quatern;
  let a = 1 - (b * b + c * c + d * d);
  // nifti1_io.c: a tiny or negative remainder means a = 0 and (b, c, d) is renormalised.
  if (a < 1e-7) {
    const n = 1 / Math.sqrt(b * b + c * c + d * d);
    [b, c, d] = [b * n, c * n, d * n];
    a = 0;
  } else a = Math.sqrt(a);
  const R = [
    [a * a + b * b - c * c - d * d, 2 * (b * c - a * d), 2 * (b * d + a * c)],
    [2 * (b * c + a * d), a * a + c * c - b * b - d * d, 2 * (c * d - a * b)],
    [2 * (b * d - a * c), 2 * (c * d + a * b), a * a + d * d - c * c - b * b],
  ];
  const qfac = h.pixdim[0] < 0 ? -1 : 1;
  const zoom = [h.pixdim[1], h.pixdim[2], h.pixdim[3] * qfac];
  return [0, 1, 2].map((r) => [R[r][0] * zoom[0], R[r][1] * zoom[1], R[r][2] * zoom[2], h.qoffset[r]]);
}

const HOST_LITTLE = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1;
const NATIVE: Record<string, new (buffer: ArrayBuffer, offset: number, length: number) => ArrayLike<number>> = {
  uint8: Uint8Array, int8: Int8Array, int16: Int16Array, uint16: Uint16Array, int32: Int32Array, uint32: Uint32Array,
  float32: Float32Array, float64: Float64Array,
};

/** The data as a typed array in the host's byte order (a view, or an aligned copy), else null. */
function nativeArray(h: Header, image: Uint8Array, count: number): ArrayLike<number> | null {
  const Ctor = NATIVE[h.datatype.name];
  if (!Ctor || (h.datatype.size > 1 && h.little !== HOST_LITTLE)) return null;
  const offset = image.byteOffset + h.voxOffset;
  if (offset % h.datatype.size === 0) return new Ctor(image.buffer as ArrayBuffer, offset, count);
  return new Ctor(image.slice(h.voxOffset, h.voxOffset + count * h.datatype.size).buffer, 0, count);
}

function toVolume(h: Header, image: Uint8Array, provenance: Volume['provenance'], path: string): Volume {
  const [columns, rows, slices] = h.dims;
  const notes: string[] = [];
  let affine: Mat | null = null;
  if (h.sformCode > 0) affine = h.srow;
  else if (h.qformCode > 0) affine = qformAffine(h);

  let spacing: [number, number, number];
  let orientation: Volume['orientation'] = [...IDENTITY_ORIENTATION];
  let origin: [number, number, number] | undefined;
  let reverse = false;
  let orientationStated = false;
  const col = (m: Mat, c: number): number[] => [-m[0][c] * h.unit, -m[1][c] * h.unit, m[2][c] * h.unit]; // RAS -> LPS
  const norm = (x: number[]): number => Math.hypot(x[0], x[1], x[2]);
  const usable = affine && affine.every((r) => r.every(Number.isFinite)) && [0, 1, 2].every((c) => norm(col(affine!, c)) > 0);
  if (affine && usable) {
    const [di, dj, dk, t] = [0, 1, 2, 3].map((c) => col(affine!, c));
    spacing = [norm(di), norm(dj), norm(dk)];
    orientation = [...di.map((x) => x / spacing[0]), ...dj.map((x) => x / spacing[1])] as Volume['orientation'];
    const n = [di[1] * dj[2] - di[2] * dj[1], di[2] * dj[0] - di[0] * dj[2], di[0] * dj[1] - di[1] * dj[0]];
    reverse = dk[0] * n[0] + dk[1] * n[1] + dk[2] * n[2] < 0;
    origin = reverse ? [t[0] + dk[0] * (slices - 1), t[1] + dk[1] * (slices - 1), t[2] + dk[2] * (slices - 1)] : [t[0], t[1], t[2]];
    orientationStated = true;
    if (reverse) notes.push('slices stored in reverse of the file order, so that they ascend along the slice normal (left-handed voxel grid)');
  } else {
    if (affine) notes.push(`the ${h.sformCode > 0 ? 'sform' : 'qform'} is degenerate; orientation not used`);
    spacing = [1, 2, 3].map((k) => (Number.isFinite(h.pixdim[k]) && h.pixdim[k] !== 0 ? Math.abs(h.pixdim[k]) * h.unit : 1)) as [number, number, number];
  }

  const scaled = Number.isFinite(h.slope) && h.slope !== 0;
  if (scaled && !Number.isFinite(h.inter)) throw new SourceError(path, `scl_inter is ${h.inter} while scl_slope is ${h.slope}; both must be finite numbers`);
  const slope = scaled ? h.slope : 1;
  const inter = scaled ? h.inter : 0;

  const { read, size, complex } = h.datatype;
  const view = new DataView(image.buffer, image.byteOffset + h.voxOffset, image.byteLength - h.voxOffset);
  const perSlice = columns * rows;
  const pixels = new Float32Array(perSlice * slices);
  const little = h.little;
  const native = nativeArray(h, image, perSlice * slices);
  for (let k = 0; k < slices; k++) {
    const target = (reverse ? slices - 1 - k : k) * perSlice;
    const source = k * perSlice * size;
    if (native) {
      const from = k * perSlice;
      for (let i = 0; i < perSlice; i++) pixels[target + i] = native[from + i] * slope + inter;
    } else if (complex) {
      const half = size / 2;
      for (let i = 0; i < perSlice; i++) {
        const o = source + i * size;
        const re = read(view, o, little) * slope + inter;
        const im = read(view, o + half, little) * slope;
        pixels[target + i] = Math.sqrt(re * re + im * im);
      }
    } else {
      for (let i = 0; i < perSlice; i++) pixels[target + i] = read(view, source + i * size, little) * slope + inter;
    }
  }
  return {
    columns,
    rows,
    slices,
    spacing,
    orientation,
    pixels,
    provenance,
    stated: { spacing: true, orientation: orientationStated },
    ...(origin ? { origin } : {}),
    dataType: complex ? `${h.datatype.name} (magnitude)` : h.datatype.name,
    notes,
  };
}
