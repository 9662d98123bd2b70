/**
 * The DICOM reader against files written by pydicom and DCMTK, with the values pydicom reads back
 * (test/reference/dicom/make_fixtures.py): pixel checksums, spacing, orientation and slice order.
 */
import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { loadVolume } from '../../app/images/load.ts';
import { SourceError } from '../../app/images/source-error.ts';

const DIR = fileURLToPath(new URL('../reference/dicom/', import.meta.url));

interface ExpectedVolume {
  name: string;
  path: string;
  writer: string;
  shape: [number, number, number];
  spacing: [number, number, number];
  orientation: number[] | null;
  origin: number[] | null;
  sliceOrder: string[];
  dataType: string;
  transferSyntax: string;
  sha256: string;
  first: number[];
  min: number;
  max: number;
  note?: string;
}
const expected = JSON.parse(readFileSync(join(DIR, 'expected.json'), 'utf8')) as {
  generator: Record<string, string>;
  volumes: ExpectedVolume[];
  failures: { name: string; path: string; words: string[] }[];
};

const sha = (pixels: Float32Array): string =>
  createHash('sha256').update(new Uint8Array(pixels.buffer, pixels.byteOffset, pixels.byteLength)).digest('hex');

describe('DICOM fixtures cover every transfer syntax and layout of the issue', () => {
  it('has each syntax, single- and multi-frame, folders and files, both writers', () => {
    const syntaxes = new Set(expected.volumes.map((v) => v.transferSyntax));
    for (const uid of ['1.2.840.10008.1.2', '1.2.840.10008.1.2.1', '1.2.840.10008.1.2.1.99', '1.2.840.10008.1.2.2', '1.2.840.10008.1.2.5']) {
      expect(syntaxes).toContain(uid);
    }
    const types = new Set(expected.volumes.map((v) => v.dataType));
    for (const t of ['uint8', 'int8', 'uint16', 'int16', 'float32', 'float64']) expect(types).toContain(t);
    expect(expected.volumes.some((v) => v.sliceOrder[0].includes('#'))).toBe(true); // multi-frame
    expect(expected.volumes.some((v) => v.writer.startsWith('pydicom'))).toBe(true);
    expect(expected.volumes.some((v) => v.writer.includes('dcm'))).toBe(true);
  });
});

describe('loadVolume on DICOM written by pydicom and DCMTK', () => {
  for (const e of expected.volumes) {
    it(`${e.name} (${e.writer}, ${e.transferSyntax}): pixels, geometry and slice order as pydicom reads them`, async () => {
      const v = await loadVolume(join(DIR, e.path));
      expect([v.slices, v.rows, v.columns]).toEqual(e.shape);
      expect(v.sliceSources).toEqual(e.sliceOrder);
      expect(Array.from(v.pixels.slice(0, 6))).toEqual(e.first);
      expect(sha(v.pixels)).toBe(e.sha256);
      expect(v.range).toEqual([e.min, e.max]);
      // Decimal strings parsed to float64 on both sides; the slice step is a median of differences.
      v.spacing.forEach((s, i) => expect(s).toBeCloseTo(e.spacing[i], 9));
      if (e.orientation) {
        expect(v.orientation).toEqual(e.orientation);
        expect(v.stated).toEqual({ spacing: true, orientation: true });
        v.origin!.forEach((x, i) => expect(x).toBeCloseTo(e.origin![i], 9));
      } else {
        expect(v.stated?.orientation).toBe(false);
        expect(v.notes!.join(' ')).toContain('InstanceNumber');
      }
      expect(v.dataType).toBe(e.dataType);
      expect(v.provenance.format).toBe('dicom');
      expect(v.provenance.sha256).toMatch(/^[0-9a-f]{64}$/);
      if (e.note) expect(v.notes!.join(' ')).toContain(e.note);
    });
  }
});

describe('DICOM input that Veil refuses, with a reason naming the file', () => {
  for (const f of expected.failures) {
    it(`${f.name}`, async () => {
      const path = join(DIR, f.path);
      const err = await loadVolume(path).catch((e: unknown) => e);
      expect(err).toBeInstanceOf(SourceError);
      const message = (err as Error).message;
      expect(message.startsWith(path)).toBe(true);
      expect(message).not.toContain('\n');
      for (const w of f.words) expect(message).toContain(w);
    });
  }
});
