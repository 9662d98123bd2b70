/**
 * One DICOM Part 10 file (PS3.10) into image frames, through dicom-parser.
 *
 * A frame carries what sorting and stacking need (series, position, orientation, spacing,
 * instance number) and a `decode` that writes its rows x columns pixels as float32:
 * stored value -> bits above BitsStored dropped and the rest sign-extended when
 * PixelRepresentation is 1 (PS3.5 8.1.1 and 8.2) -> MONOCHROME1 inverted over the stored range,
 * v' = (smallest + largest storable) - v, so that higher always means brighter (PS3.3 C.7.6.3.1.2)
 * -> modality rescale v * RescaleSlope + RescaleIntercept (PS3.3 C.11.1.1.2).
 * Enhanced (multi-frame) objects take each frame's position, orientation, spacing and rescale
 * from its Per-Frame, else the Shared Functional Groups (PS3.3 C.7.6.16).
 *
 * Every size is checked against the bytes present before anything is allocated.
 */
import dicomParser from 'dicom-parser';
import type { DataSet, Element } from 'dicom-parser';
import { inflateRawSync } from 'node:zlib';
import { decodeRleFrame, maxDecoded } from './dicom-rle.ts';
import { refusal, transferSyntax } from './dicom-syntax.ts';
import type { TransferSyntax } from './dicom-syntax.ts';
import { SourceError, describeThrown } from './source-error.ts';
import { rangeOf } from './volume.ts';

export type Vec3 = [number, number, number];
export type Orientation = [number, number, number, number, number, number];

export interface DicomFrame {
  /** Path of the file, for messages. */
  file: string;
  /** How the frame is named in reports: the file name, with `#n` (1-based) in multi-frame files. */
  name: string;
  frameIndex: number;
  seriesUid: string | null;
  seriesDescription: string;
  rows: number;
  columns: number;
  position: Vec3 | null;
  orientation: Orientation | null;
  /** PixelSpacing as stored: [between rows, between columns]. */
  pixelSpacing: [number, number] | null;
  sliceThickness: number | null;
  spacingBetweenSlices: number | null;
  instanceNumber: number | null;
  dataType: string;
  /** BurnedInAnnotation (0028,0301) is YES: the pixels may show identifying text. */
  burnedIn: boolean;
  syntax: TransferSyntax;
  /** Writes rows x columns float32 values into target from index `at`; returns their smallest and largest (null: none finite). */
  decode(target: Float32Array, at: number): [number, number] | null;
}

export type DicomFileContent =
  | { kind: 'image'; frames: DicomFrame[] }
  | { kind: 'no-image'; why: string };

const PREAMBLE = 128;

/** True when the bytes carry the Part 10 marker 'DICM' after the 128-byte preamble. */
export function isPart10(bytes: Uint8Array): boolean {
  return bytes.length >= PREAMBLE + 4 && bytes[128] === 0x44 && bytes[129] === 0x49 && bytes[130] === 0x43 && bytes[131] === 0x4d;
}

/** Deflate cannot expand data by more than about 1032:1 (zlib technical details, "Maximum compression factor"). */
const DEFLATE_MAX_RATIO = 1032;

/**
 * Where the file meta information ends, from its group length (0002,0000), which PS3.10 7.1
 * requires first; null when absent. Reading the meta information only up to there keeps the
 * parser out of what follows (deflated bytes would be misread as elements).
 */
function metaEnd(bytes: Uint8Array): number | null {
  const at = PREAMBLE + 4;
  if (bytes.length < at + 12) return null;
  const v = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  if (v.getUint16(at, true) !== 0x0002 || v.getUint16(at + 2, true) !== 0x0000 || bytes[at + 4] !== 0x55 || bytes[at + 5] !== 0x4c) return null;
  const end = at + 12 + v.getUint32(at + 8, true);
  return end <= bytes.length ? end : null;
}

const DataSetClass = (dicomParser as unknown as {
  DataSet: new (parser: DataSet['byteArrayParser'], bytes: Uint8Array, elements: DataSet['elements']) => DataSet;
}).DataSet;

/**
 * Deflated Explicit VR Little Endian (PS3.5 A.5): the data set after the file meta information is
 * raw deflate. Inflated here, with the output bounded by the input, and parsed from where the meta
 * information ends (dicom-parser's own inflater path restarts at byte 0 of the inflated copy).
 */
function parseDeflated(bytes: Uint8Array, meta: DataSet, path: string): DataSet {
  const position = (meta as DataSet & { position: number }).position;
  if (position !== metaEnd(bytes)) throw new SourceError(path, 'the file meta information of a deflated file must start with its group length (0002,0000)');
  const deflated = bytes.subarray(position);
  let inflated: Uint8Array;
  try {
    inflated = inflateRawSync(deflated, { maxOutputLength: deflated.length * DEFLATE_MAX_RATIO + 1024 });
  } catch (e) {
    throw new SourceError(path, `deflated data set cannot be inflated: ${describeThrown(e)}`);
  }
  const full = new Uint8Array(position + inflated.length);
  full.set(bytes.subarray(0, position), 0);
  full.set(inflated, position);
  const stream = new dicomParser.ByteStream(dicomParser.littleEndianByteArrayParser, full, position);
  const ds = new DataSetClass(dicomParser.littleEndianByteArrayParser, full, {});
  dicomParser.parseDicomDataSetExplicit(ds, stream, full.length);
  for (const [tag, el] of Object.entries(meta.elements)) ds.elements[tag] = el;
  return ds;
}

function sequenceItem(ds: DataSet | undefined, tag: string, index = 0): DataSet | undefined {
  return ds?.elements[tag]?.items?.[index]?.dataSet;
}

function numbers(ds: DataSet | undefined, tag: string, count: number): number[] | null {
  if (!ds?.elements[tag]) return null;
  const out: number[] = [];
  for (let i = 0; i < count; i++) {
    const v = ds.floatString(tag, i);
    if (v === undefined || !Number.isFinite(v)) return null;
    out.push(v);
  }
  return out;
}

function validOrientation(v: number[] | null): Orientation | null {
  if (!v) return null;
  const n1 = Math.hypot(v[0], v[1], v[2]);
  const n2 = Math.hypot(v[3], v[4], v[5]);
  // Direction cosines must be unit vectors; allow the rounding of decimal strings.
  if (Math.abs(n1 - 1) > 0.01 || Math.abs(n2 - 1) > 0.01) return null;
  return v as Orientation;
}

interface PixelFormat {
  rows: number;
  columns: number;
  frames: number;
  bitsAllocated: number;
  bitsStored: number;
  signed: boolean;
  float: boolean;
  monochrome1: boolean;
  little: boolean;
  /** 8-bit data in an OW element of a big-endian file: bytes swapped in pairs (PS3.5 A.1 c). */
  swapPairs: boolean;
  dataType: string;
}

/** Reads a Part 10 file's bytes into frames. `name` is how frames are named in reports. */
export function parseDicomFile(bytes: Uint8Array, path: string, name: string): DicomFileContent {
  if (!isPart10(bytes)) {
    throw new SourceError(path, `not a DICOM Part 10 file: no 'DICM' marker at byte 128 (${bytes.length} bytes); Veil reads DICOM files with the Part 10 header, NIfTI (.nii, .nii.gz) and NumPy (.npy)`);
  }
  let syntax: TransferSyntax;
  let ds: DataSet;
  try {
    const end = metaEnd(bytes);
    const meta = dicomParser.readPart10Header(end === null ? bytes : bytes.subarray(0, end));
    const uid = meta.string('x00020010');
    if (!uid) throw new SourceError(path, 'the file meta information has no TransferSyntaxUID (0002,0010)');
    syntax = transferSyntax(uid);
    if (syntax.kind === 'compressed') throw new SourceError(path, refusal(syntax));
    ds = syntax.kind === 'deflated' ? parseDeflated(bytes, meta, path) : dicomParser.parseDicom(bytes);
  } catch (e) {
    if (e instanceof SourceError) throw e;
    const inner = e && typeof e === 'object' && 'exception' in e ? (e as { exception: unknown }).exception : e;
    if (inner instanceof SourceError) throw inner;
    throw new SourceError(path, parserReason(e, bytes.length));
  }
  try {
    return framesOf(ds, syntax, bytes.length, path, name);
  } catch (e) {
    if (e instanceof SourceError) throw e;
    throw new SourceError(path, parserReason(e, bytes.length));
  }
}

/** dicom-parser's complaint as one line for the user. */
function parserReason(e: unknown, fileLength: number): string {
  const text = describeThrown(e).replace(/^dicomParser[.:]\w+:\s*/, '');
  if (/overrun|past (the )?end|beyond the end/i.test(text)) {
    return `truncated or damaged DICOM: an element runs past the end of the file (${fileLength} bytes)`;
  }
  return `malformed DICOM: ${text}`;
}

function framesOf(ds: DataSet, syntax: TransferSyntax, fileLength: number, path: string, name: string): DicomFileContent {
  const fail: (why: string) => never = (why) => {
    throw new SourceError(path, why);
  };
  const pixelTag = ['x7fe00010', 'x7fe00008', 'x7fe00009'].find((t) => ds.elements[t]);
  const sopClass = ds.string('x00080016') ?? ds.string('x00020002') ?? '';
  if (!pixelTag) {
    const what = sopClass === '1.2.840.10008.1.3.10' ? 'a DICOMDIR (media index)' : `an object without pixel data (SOP class ${sopClass || 'not stated'})`;
    return { kind: 'no-image', why: what };
  }
  const pixelEl = ds.elements[pixelTag];
  const format = pixelFormat(ds, pixelTag, pixelEl, syntax, fail);
  const { rows, columns, frames } = format;
  const pixels = rows * columns;
  const bytesPerSample = format.bitsAllocated / 8;

  // The frames' bytes, checked against what the file holds.
  let frameBytes: (i: number) => Uint8Array;
  if (syntax.kind === 'rle') {
    const fragments = pixelEl.fragments;
    if (!pixelEl.encapsulatedPixelData || !fragments?.length) fail('RLE Lossless file without encapsulated pixel data fragments');
    const compressed = fragments.reduce((sum, f) => sum + f.length, 0);
    if (pixels * bytesPerSample * frames > maxDecoded(compressed) * bytesPerSample) {
      fail(`RLE pixel data of ${compressed} bytes cannot hold Rows ${rows} x Columns ${columns} x ${frames} frame(s)`);
    }
    const frameFragments = rleFrameFragments(ds, pixelEl, frames, fail);
    frameBytes = (i) => decodeRleFrame(frameFragments(i), pixels, bytesPerSample, (why) => fail(`frame ${i + 1}: ${why}`));
  } else {
    if (pixelEl.encapsulatedPixelData) fail(`pixel data is encapsulated (compressed) but the transfer syntax is ${syntax.name}`);
    const data = ds.byteArray;
    const needed = pixels * bytesPerSample * frames;
    const available = Math.min(pixelEl.length, data.length - pixelEl.dataOffset);
    if (!(needed <= available)) {
      fail(
        `pixel data holds ${Math.max(0, available)} bytes but Rows ${rows} x Columns ${columns} x ${frames} frame(s) x ${bytesPerSample} byte(s) needs ${needed}` +
          (pixelEl.length > data.length - pixelEl.dataOffset ? ` (the file of ${fileLength} bytes is truncated)` : ''),
      );
    }
    const size = pixels * bytesPerSample;
    frameBytes = (i) => data.subarray(pixelEl.dataOffset + i * size, pixelEl.dataOffset + (i + 1) * size);
  }

  // Geometry and rescale per frame: Per-Frame group, Shared group, then the top level.
  const shared = sequenceItem(ds, 'x52009229');
  const perFrame = ds.elements.x52009230?.items;
  if (frames > 1 && perFrame && perFrame.length !== frames) {
    fail(`PerFrameFunctionalGroupsSequence has ${perFrame.length} items for NumberOfFrames ${frames}`);
  }
  const seriesUid = ds.string('x0020000e')?.trim() || null;
  const seriesDescription = ds.string('x0008103e')?.trim() ?? '';
  const burnedIn = (ds.string('x00280301') ?? '').trim().toUpperCase() === 'YES';
  const instanceNumber = ds.intString('x00200013');
  const out: DicomFrame[] = [];
  for (let f = 0; f < frames; f++) {
    const own = perFrame?.[f]?.dataSet;
    const find = (sequence: string, tag: string, count: number): number[] | null =>
      numbers(sequenceItem(own, sequence), tag, count) ?? numbers(sequenceItem(shared, sequence), tag, count) ?? numbers(ds, tag, count);
    const spacing = find('x00289110', 'x00280030', 2);
    const slope = find('x00289145', 'x00281053', 1)?.[0] ?? 1;
    const intercept = find('x00289145', 'x00281052', 1)?.[0] ?? 0;
    const thickness = find('x00289110', 'x00180050', 1)?.[0] ?? null;
    const between = find('x00289110', 'x00180088', 1)?.[0] ?? null;
    const bytesOf = frameBytes;
    out.push({
      file: path,
      name: frames > 1 ? `${name}#${f + 1}` : name,
      frameIndex: f,
      seriesUid,
      seriesDescription,
      rows,
      columns,
      // In a multi-frame object only a per-frame or shared position tells frames apart; a single
      // top-level ImagePositionPatient would make every frame a duplicate, so frames go by index.
      position: (frames > 1
        ? numbers(sequenceItem(own, 'x00209113'), 'x00200032', 3) ?? numbers(sequenceItem(shared, 'x00209113'), 'x00200032', 3)
        : find('x00209113', 'x00200032', 3)) as Vec3 | null,
      orientation: validOrientation(find('x00209116', 'x00200037', 6)),
      pixelSpacing: spacing && spacing[0] > 0 && spacing[1] > 0 ? [spacing[0], spacing[1]] : null,
      sliceThickness: thickness !== null && thickness > 0 ? thickness : null,
      spacingBetweenSlices: between !== null && between > 0 ? between : null,
      instanceNumber: instanceNumber !== undefined && Number.isFinite(instanceNumber) ? instanceNumber : null,
      dataType: format.dataType,
      burnedIn,
      syntax,
      decode: (target, at) => {
        try {
          return decodePixels(bytesOf(f), format, slope, intercept, target, at);
        } catch (e) {
          if (e instanceof SourceError) throw e;
          return fail(`frame ${f + 1}: ${parserReason(e, fileLength)}`);
        }
      },
    });
  }
  return { kind: 'image', frames: out };
}

const MAX_FRAMES = 1 << 20;

function pixelFormat(ds: DataSet, pixelTag: string, el: Element, syntax: TransferSyntax, fail: (why: string) => never): PixelFormat {
  const rows = ds.uint16('x00280010') ?? 0;
  const columns = ds.uint16('x00280011') ?? 0;
  if (rows < 1 || columns < 1) fail(`Rows (${rows}) and Columns (${columns}) must both be at least 1`);
  const framesText = ds.string('x00280008');
  const frames = framesText === undefined || framesText.trim() === '' ? 1 : Number(framesText.trim());
  if (!Number.isInteger(frames) || frames < 1 || frames > MAX_FRAMES) fail(`NumberOfFrames '${framesText}' must be a whole number from 1 to ${MAX_FRAMES}`);
  const samples = ds.uint16('x00280002') ?? 1;
  const photometric = (ds.string('x00280004') ?? 'MONOCHROME2').trim();
  if (samples !== 1 || !['MONOCHROME1', 'MONOCHROME2'].includes(photometric)) {
    fail(`colour or palette images are not read (PhotometricInterpretation ${photometric}, SamplesPerPixel ${samples}); Veil reads MONOCHROME1 and MONOCHROME2 images`);
  }
  const bitsAllocated = ds.uint16('x00280100') ?? 0;
  const little = syntax.kind !== 'explicit-be';
  if (pixelTag !== 'x7fe00010') {
    const expected = pixelTag === 'x7fe00008' ? 32 : 64;
    if (bitsAllocated !== expected) fail(`${pixelTag === 'x7fe00008' ? 'FloatPixelData' : 'DoubleFloatPixelData'} needs BitsAllocated ${expected}, found ${bitsAllocated}`);
    return {
      rows, columns, frames, bitsAllocated, bitsStored: bitsAllocated, signed: true, float: true,
      monochrome1: photometric === 'MONOCHROME1', little, swapPairs: false, dataType: `float${bitsAllocated}`,
    };
  }
  if (![8, 16, 32].includes(bitsAllocated)) fail(`BitsAllocated ${bitsAllocated} is not read; Veil reads 8, 16 and 32-bit integer and 32 and 64-bit float pixel data`);
  const bitsStored = ds.uint16('x00280101') ?? bitsAllocated;
  if (bitsStored < 1 || bitsStored > bitsAllocated) fail(`BitsStored ${bitsStored} must be from 1 to BitsAllocated (${bitsAllocated})`);
  const representation = ds.uint16('x00280103') ?? 0;
  if (representation !== 0 && representation !== 1) fail(`PixelRepresentation ${representation} must be 0 (unsigned) or 1 (signed)`);
  const signed = representation === 1;
  return {
    rows, columns, frames, bitsAllocated, bitsStored, signed, float: false,
    monochrome1: photometric === 'MONOCHROME1', little,
    swapPairs: !little && bitsAllocated === 8 && el.vr === 'OW',
    dataType: `${signed ? 'int' : 'uint'}${bitsAllocated}`,
  };
}

/** The bytes of each RLE frame: by the Basic Offset Table, else one fragment per frame (PS3.5 A.4.2). */
function rleFrameFragments(ds: DataSet, el: Element, frames: number, fail: (why: string) => never): (i: number) => Uint8Array {
  const fragments = el.fragments!;
  for (const f of fragments) {
    if (f.position + f.length > ds.byteArray.length) fail(`an RLE fragment runs past the end of the file (${ds.byteArray.length} bytes)`);
  }
  const table = el.basicOffsetTable ?? [];
  if (frames === 1) return () => dicomParser.readEncapsulatedPixelDataFromFragments(ds, el, 0, fragments.length) as Uint8Array;
  if (table.length === frames) return (i) => dicomParser.readEncapsulatedImageFrame(ds, el, i) as Uint8Array;
  if (fragments.length === frames) return (i) => dicomParser.readEncapsulatedPixelDataFromFragments(ds, el, i, 1) as Uint8Array;
  return fail(`RLE pixel data has ${fragments.length} fragments and ${table.length} offset table entries for ${frames} frames`);
}

/**
 * Decodes a frame into out[at ..] and returns the smallest and largest value written (null when
 * none is finite), found in the same pass: the rescale is monotonic, so the extremes of the
 * stored values map onto the extremes of the output (Math.fround keeps the order).
 */
function decodePixels(bytes: Uint8Array, f: PixelFormat, slope: number, intercept: number, out: Float32Array, at: number): [number, number] | null {
  const n = f.rows * f.columns;
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  if (f.float) {
    const sign = f.monochrome1 ? -1 : 1;
    for (let i = 0; i < n; i++) {
      const v = f.bitsAllocated === 32 ? view.getFloat32(i * 4, f.little) : view.getFloat64(i * 8, f.little);
      out[at + i] = sign * v * slope + intercept;
    }
    return rangeOf(out.subarray(at, at + n)); // floats may hold NaN or infinities
  }
  const { bitsStored, signed } = f;
  const lo = signed ? -(2 ** (bitsStored - 1)) : 0;
  const hi = signed ? 2 ** (bitsStored - 1) - 1 : 2 ** bitsStored - 1;
  const invertSum = f.monochrome1 ? lo + hi : null;
  let min = Infinity;
  let max = -Infinity;

  // The common case, fast: 16 bits all stored, little endian, aligned, MONOCHROME2.
  if (f.bitsAllocated === 16 && bitsStored === 16 && f.little && invertSum === null && bytes.byteOffset % 2 === 0) {
    const src = signed ? new Int16Array(bytes.buffer, bytes.byteOffset, n) : new Uint16Array(bytes.buffer, bytes.byteOffset, n);
    for (let i = 0; i < n; i++) {
      const x = src[i];
      if (x < min) min = x;
      if (x > max) max = x;
      out[at + i] = x * slope + intercept;
    }
  } else {
    // Everything else: raw unsigned word -> stored bits -> sign -> MONOCHROME1 -> rescale.
    const size = f.bitsAllocated / 8;
    const mask = bitsStored === 32 ? 0xffffffff : 2 ** bitsStored - 1;
    const shift = 32 - bitsStored;
    for (let i = 0; i < n; i++) {
      let raw: number;
      if (size === 1) raw = bytes[f.swapPairs ? i ^ 1 : i];
      else if (size === 2) raw = view.getUint16(i * 2, f.little);
      else raw = view.getUint32(i * 4, f.little);
      let v = bitsStored === 32 ? raw : raw & mask;
      if (signed) v = (v << shift) >> shift;
      else if (bitsStored === 32) v = raw >>> 0;
      if (invertSum !== null) v = invertSum - v;
      if (v < min) min = v;
      if (v > max) max = v;
      out[at + i] = v * slope + intercept;
    }
  }
  if (n === 0) return null;
  const [a, b] = [Math.fround(min * slope + intercept), Math.fround(max * slope + intercept)];
  return Number.isFinite(a) && Number.isFinite(b) ? (a <= b ? [a, b] : [b, a]) : rangeOf(out.subarray(at, at + n));
}
