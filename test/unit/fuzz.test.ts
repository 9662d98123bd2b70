/**
 * Bad input never crashes, hangs or allocates without bound: valid DICOM, NIfTI and .npy files
 * (the reference fixtures) are mutated 2,000+ times per format, seeded from MT19937 streams
 * (app/blinding/streams.ts), by truncation, flipped bytes, lying lengths and absurd dimensions.
 * Every mutant is either read into a consistent Volume no larger than its input can describe, or
 * rejected with a one-line SourceError that starts with the file's name.
 */
import dicomParser from 'dicom-parser';
import type { DataSet } from 'dicom-parser';
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { gunzipSync, gzipSync } from 'node:zlib';
import { describe, expect, it } from 'vitest';
import type { MT19937 } from '../../app/blinding/mt19937.ts';
import { streamFor } from '../../app/blinding/streams.ts';
import { readDicomBytes } from '../../app/images/dicom.ts';
import { readNifti } from '../../app/images/nifti.ts';
import { readNpy } from '../../app/images/npy.ts';
import { SourceError } from '../../app/images/source-error.ts';
import type { Volume } from '../../app/images/volume.ts';

const SEED = 20240611;
const PER_FORMAT = 2000;
const ref = (p: string): Uint8Array => new Uint8Array(readFileSync(fileURLToPath(new URL(`../reference/${p}`, import.meta.url))));

interface Seed {
  name: string;
  bytes: Uint8Array;
  /** Byte offsets of length fields that may lie. */
  lengths: { at: number; size: 2 | 4 | 8 }[];
  /** Byte offsets of dimension fields that may become absurd. */
  dims: { at: number; size: 2 | 4 | 8 | 'text' }[];
  /** For .nii.gz: mutate the inflated image and gzip it again. */
  gzip?: boolean;
}

function pick<T>(rng: MT19937, items: T[]): T {
  return items[rng.nextBelow(items.length)];
}

/** A value that is plausible, zero, all ones or huge. */
function absurd(rng: MT19937, size: 2 | 4 | 8): bigint {
  const choices: bigint[] = [0n, 1n, 2n ** BigInt(8 * size) - 1n, 2n ** BigInt(8 * size - 1) - 1n, BigInt(rng.nextUint32()), BigInt(rng.nextBelow(70000))];
  return pick(rng, choices) & (2n ** BigInt(8 * size) - 1n);
}

function writeField(bytes: Uint8Array, at: number, size: 2 | 4 | 8, value: bigint, little = true): void {
  if (at < 0 || at + size > bytes.length) return;
  const v = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  if (size === 2) v.setUint16(at, Number(value & 0xffffn), little);
  else if (size === 4) v.setUint32(at, Number(value & 0xffffffffn), little);
  else v.setBigUint64(at, value, little);
}

function mutate(rng: MT19937, seed: Seed): Uint8Array {
  let bytes = seed.bytes.slice();
  const rounds = 1 + rng.nextBelow(3);
  for (let r = 0; r < rounds; r++) {
    const kind = rng.nextBelow(6);
    if (kind === 0) {
      bytes = bytes.slice(0, rng.nextBelow(bytes.length + 1)); // truncation
    } else if (kind === 1) {
      const flips = 1 + rng.nextBelow(8);
      for (let i = 0; i < flips && bytes.length; i++) bytes[rng.nextBelow(bytes.length)] ^= 1 + rng.nextBelow(255);
    } else if (kind === 2 && seed.lengths.length) {
      const f = pick(rng, seed.lengths); // a lying length
      writeField(bytes, f.at, f.size, absurd(rng, f.size), rng.nextBelow(4) !== 0);
    } else if (kind === 3 && seed.dims.length) {
      const f = pick(rng, seed.dims); // an absurd dimension
      if (f.size === 'text') {
        const digits = String(pick(rng, [0, 9, 99999, 4294967295, rng.nextUint32()]));
        for (let i = 0; i < digits.length && f.at + i < bytes.length; i++) bytes[f.at + i] = digits.charCodeAt(i);
      } else writeField(bytes, f.at, f.size, absurd(rng, f.size), rng.nextBelow(4) !== 0);
    } else if (kind === 4) {
      const at = rng.nextBelow(bytes.length + 1); // a chunk repeated or dropped
      const len = rng.nextBelow(64);
      bytes = rng.nextBelow(2)
        ? new Uint8Array([...bytes.subarray(0, at), ...bytes.subarray(Math.max(0, at - len), at), ...bytes.subarray(at)])
        : new Uint8Array([...bytes.subarray(0, at), ...bytes.subarray(at + len)]);
    } else {
      const at = rng.nextBelow(Math.max(1, bytes.length)); // a run of one byte value
      bytes.fill(pick(rng, [0x00, 0xff, 0x20]), at, at + 1 + rng.nextBelow(16));
    }
  }
  return bytes;
}

/** Length fields and dimensions of a DICOM file, found by parsing the valid original. */
function dicomSeed(name: string): Seed {
  const bytes = ref(`dicom/files/${name}`);
  const lengths: Seed['lengths'] = [];
  const dims: Seed['dims'] = [];
  const visit = (ds: DataSet): void => {
    for (const el of Object.values(ds.elements)) {
      lengths.push({ at: el.dataOffset - 4, size: 4 }, { at: el.dataOffset - 2, size: 2 });
      if (['x00280010', 'x00280011', 'x00280100', 'x00280101'].includes(el.tag)) dims.push({ at: el.dataOffset, size: 2 });
      if (el.tag === 'x00280008') dims.push({ at: el.dataOffset, size: 'text' });
      for (const item of el.items ?? []) if (item.dataSet) visit(item.dataSet);
    }
  };
  try {
    visit(dicomParser.parseDicom(bytes)); // deflated files: their offsets are in the inflated copy; flips still apply
  } catch {
    /* a file dicom-parser reads only through Veil's inflater */
  }
  return { name, bytes, lengths, dims };
}

function niftiSeed(name: string): Seed {
  let bytes = ref(`nifti/files/${name}`);
  const gzip = name.endsWith('.gz');
  if (gzip) bytes = new Uint8Array(gunzipSync(bytes));
  const v2 = new DataView(bytes.buffer, bytes.byteOffset).getInt32(0, true) === 540 || new DataView(bytes.buffer, bytes.byteOffset).getInt32(0, false) === 540;
  const dims: Seed['dims'] = v2
    ? [0, 1, 2, 3, 4].map((k) => ({ at: 16 + 8 * k, size: 8 as const }))
    : [0, 1, 2, 3, 4].map((k) => ({ at: 40 + 2 * k, size: 2 as const }));
  const lengths: Seed['lengths'] = v2
    ? [{ at: 168, size: 8 }, { at: 0, size: 4 }, { at: 12, size: 2 }]
    : [{ at: 108, size: 4 }, { at: 0, size: 4 }, { at: 70, size: 2 }];
  return { name, bytes, lengths, dims, gzip };
}

function npySeed(name: string): Seed {
  const bytes = ref(`npy/${name}`);
  const version = bytes[6];
  const text = new TextDecoder('latin1').decode(bytes.subarray(0, 256));
  const shapeAt = text.indexOf("'shape': (") + 10;
  return { name, bytes, lengths: [{ at: 8, size: version === 1 ? 2 : 4 }], dims: [{ at: shapeAt, size: 'text' }, { at: shapeAt + 3, size: 'text' }] };
}

type Outcome = 'read' | 'rejected';

function judge(result: Volume | unknown, input: Uint8Array, path: string): Outcome {
  if (result instanceof Error || !(result && typeof result === 'object' && 'pixels' in result)) {
    if (!(result instanceof SourceError)) throw new Error(`${path}: not a SourceError: ${String(result)} ${(result as Error)?.stack ?? ''}`);
    expect(result.message.startsWith(`${path}: `)).toBe(true);
    expect(result.message).not.toContain('\n');
    return 'rejected';
  }
  const v = result as Volume;
  expect(v.pixels.length).toBe(v.slices * v.rows * v.columns);
  // Deflate expands at most ~1032:1; a float32 volume is at most 4 bytes per input byte otherwise.
  expect(v.pixels.byteLength).toBeLessThanOrEqual(4 * 1032 * input.length);
  return 'read';
}

async function fuzz(format: string, seeds: Seed[], read: (bytes: Uint8Array, path: string, seed: Seed) => Promise<Volume> | Volume) {
  const rng = streamFor(SEED, 'fuzz', format);
  const tally = { read: 0, rejected: 0 };
  for (let i = 0; i < PER_FORMAT; i++) {
    const seed = seeds[i % seeds.length];
    const mutant = mutate(rng, seed);
    const path = `fuzz/${format}/${i}-${seed.name}`;
    let result: unknown;
    try {
      result = await read(mutant, path, seed);
    } catch (e) {
      result = e;
    }
    tally[judge(result, mutant, path)]++;
  }
  return tally;
}

describe('fuzzed sources are read or rejected with a message, never a crash', () => {
  it(`DICOM: ${PER_FORMAT} mutants of pydicom and DCMTK files in every transfer syntax`, async () => {
    const seeds = [
      'series-u16-explicit/IM-a', 'dcmtk-implicit/IM-a', 'dcmtk-big-endian/IM-a', 'dcmtk-deflated/IM-a', 'dcmtk-rle/IM-a',
      'enhanced-mr.dcm', 'enhanced-mr-rle-dcmtk.dcm', 'enhanced-mr-implicit-dcmtk.dcm', 'f64-double-float-pixel-data.dcm',
      'u8-monochrome1-rle-dcmtk.dcm', 'jpeg-lossless.dcm',
    ].map(dicomSeed);
    const tally = await fuzz('dicom', seeds, (b, p) => readDicomBytes(b, p));
    expect(tally.read + tally.rejected).toBe(PER_FORMAT);
    expect(tally.read).toBeGreaterThan(50); // mutations in unused bytes still read
    expect(tally.rejected).toBeGreaterThan(500);
  });

  it(`NIfTI: ${PER_FORMAT} mutants of nibabel files, plain and gzipped`, async () => {
    const seeds = ['int16.nii', 'float64-nifti2.nii', 'int16-big-endian.nii', 'complex64-nifti2.nii', 'float32-qform-left-handed.nii.gz', 'int16-nifti2.nii.gz'].map(niftiSeed);
    const tally = await fuzz('nifti', seeds, (b, p, s) => {
      if (!s.gzip) return readNifti(b, p);
      // Half the gzip mutants damage the compressed stream, half the image inside it.
      return b.length % 2 ? readNifti(gzipSync(b), p) : readNifti(gzipSync(s.bytes).slice(0, Math.max(10, b.length % 600)), p);
    });
    expect(tally.read + tally.rejected).toBe(PER_FORMAT);
    expect(tally.read).toBeGreaterThan(50);
    expect(tally.rejected).toBeGreaterThan(500);
  });

  it(`.npy: ${PER_FORMAT} mutants of NumPy files`, async () => {
    const seeds = ['dtype-f4-le.npy', 'order-f-3d.npy', 'version-2.npy', 'dtype-c16-be.npy', 'version-3-be.npy', 'dtype-u1.npy'].map(npySeed);
    const tally = await fuzz('npy', seeds, (b, p) => readNpy(b, p));
    expect(tally.read + tally.rejected).toBe(PER_FORMAT);
    expect(tally.read).toBeGreaterThan(50);
    expect(tally.rejected).toBeGreaterThan(500);
  });
});
