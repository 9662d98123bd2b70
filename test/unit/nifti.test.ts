/**
 * The NIfTI reader against files written by nibabel, with the values and affine nibabel reads
 * back (test/reference/nifti/make_fixtures.py): pixel checksums, spacing, orientation, origin.
 */
import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { gzipSync } from 'node:zlib';
import { describe, expect, it } from 'vitest';
import { loadVolume } from '../../app/images/load.ts';
import { readNifti } from '../../app/images/nifti.ts';
import { SourceError } from '../../app/images/source-error.ts';

const DIR = fileURLToPath(new URL('../reference/nifti/', import.meta.url));

interface ExpectedVolume {
  name: string;
  path: string;
  note: string;
  shape: [number, number, number];
  spacing: number[];
  orientation: number[] | null;
  origin: number[] | null;
  reversedSlices: boolean;
  affineFrom: 'sform' | 'qform' | 'pixdim';
  dataType: string;
  sha256: string;
  first: number[];
}
const expected = JSON.parse(readFileSync(join(DIR, 'expected.json'), 'utf8')) as {
  generator: Record<string, string>;
  volumes: ExpectedVolume[];
  refusals: { path: string; words: string[] }[];
};

const sha = (pixels: Float32Array): string =>
  createHash('sha256').update(new Uint8Array(pixels.buffer, pixels.byteOffset, pixels.byteLength)).digest('hex');

describe('NIfTI fixtures cover the issue', () => {
  it('has every listed datatype, NIfTI-1 and -2, gzip, both byte orders, sform, qform and neither', () => {
    const types = new Set(expected.volumes.map((v) => v.dataType));
    for (const t of ['int16', 'uint16', 'int32', 'float32', 'float64', 'complex64 (magnitude)']) expect(types).toContain(t);
    const notes = expected.volumes.map((v) => v.note).join('\n');
    for (const w of ['NIfTI-2', 'big endian', 'gzipped', 'qfac -1', 'scl_slope']) expect(notes).toContain(w);
    expect(new Set(expected.volumes.map((v) => v.affineFrom))).toEqual(new Set(['sform', 'qform', 'pixdim']));
    expect(expected.volumes.some((v) => v.reversedSlices)).toBe(true);
  });
});

describe('loadVolume on NIfTI written by nibabel', () => {
  for (const e of expected.volumes) {
    it(`${e.name} (${e.note}): values and geometry as nibabel reads them`, async () => {
      const v = await loadVolume(join(DIR, e.path));
      expect([v.slices, v.rows, v.columns]).toEqual(e.shape);
      expect(Array.from(v.pixels.slice(0, 6))).toEqual(e.first);
      expect(sha(v.pixels)).toBe(e.sha256);
      expect(v.dataType).toBe(e.dataType);
      expect(v.provenance.format).toBe('nifti');
      // nibabel computes the quaternion's first component in float32; the sform is exact.
      const digits = e.affineFrom === 'qform' ? 6 : 9;
      v.spacing.forEach((s, i) => expect(s).toBeCloseTo(e.spacing[i], digits));
      if (e.orientation) {
        expect(v.stated).toEqual({ spacing: true, orientation: true });
        v.orientation.forEach((x, i) => expect(x).toBeCloseTo(e.orientation![i], digits));
        v.origin!.forEach((x, i) => expect(x).toBeCloseTo(e.origin![i], digits));
      } else {
        expect(v.stated).toEqual({ spacing: true, orientation: false });
        expect(v.origin).toBeUndefined();
      }
      expect((v.notes ?? []).some((n) => n.includes('reverse'))).toBe(e.reversedSlices);
    });
  }
});

describe('NIfTI input that Veil refuses, with a reason naming the file', () => {
  for (const r of expected.refusals) {
    it(r.path, async () => {
      const path = join(DIR, r.path);
      const err = await loadVolume(path).catch((e: unknown) => e);
      expect(err).toBeInstanceOf(SourceError);
      expect((err as Error).message.startsWith(path)).toBe(true);
      for (const w of r.words) expect((err as Error).message).toContain(w);
    });
  }

  it('refuses a gzip stream whose header claims more than the stream can hold, before allocating it', async () => {
    const plain = new Uint8Array(readFileSync(join(DIR, 'files/int16.nii')));
    const huge = plain.slice();
    new DataView(huge.buffer).setInt16(42, 30000, true); // dim[1]
    new DataView(huge.buffer).setInt16(44, 30000, true); // dim[2]
    new DataView(huge.buffer).setInt16(46, 30000, true); // dim[3]: 2.7e13 int16 voxels
    const err = await readNifti(gzipSync(huge), 'huge.nii.gz').catch((e: unknown) => e);
    expect(err).toBeInstanceOf(SourceError);
    expect((err as Error).message).toMatch(/^huge\.nii\.gz: the header describes \d+ bytes of image but \d+ gzip-compressed bytes can hold at most/);
  });

  it('names truncation inside the data of a gzipped file', async () => {
    const plain = new Uint8Array(readFileSync(join(DIR, 'files/int16.nii')));
    const err = await readNifti(gzipSync(plain.subarray(0, plain.length - 10)), 'short.nii.gz').catch((e: unknown) => e);
    expect((err as Error).message).toBe(`short.nii.gz: truncated: the image needs ${plain.length} bytes, the gzip stream holds ${plain.length - 10}`);
  });
});
