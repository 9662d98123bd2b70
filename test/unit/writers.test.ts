/**
 * Veil's DICOM and NIfTI writers (used by the demo), checked against what pydicom and nibabel read
 * from files they wrote (test/reference/writers/expected.json, made by make-expected.py), and
 * read back by Veil's own readers.
 */
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { writeDicomSeries } from '../../app/images/dicom-write.ts';
import { writeNifti1 } from '../../app/images/nifti-write.ts';
import { loadVolume } from '../../app/images/load.ts';
import { sampleVolume } from '../reference/writers/sample-volume.ts';

const expected = JSON.parse(readFileSync(new URL('../reference/writers/expected.json', import.meta.url), 'utf8')) as {
  dicom: { position: number[]; orientation: number[]; pixel_spacing: number[]; rows: number; columns: number; values: number[]; transfer_syntax: string }[];
  nifti: { shape: number[]; affine: number[][]; axcodes: string[]; values_slice_row_column: number[] };
};

describe('DICOM writer', () => {
  it('writes what pydicom reads as the volume: geometry, explicit VR little endian, values within the 16-bit step', () => {
    // Source: pydicom's reading of the committed sample (test/reference/writers/expected.json).
    const v = sampleVolume();
    expect(expected.dicom).toHaveLength(3);
    expected.dicom.forEach((s, z) => {
      expect(s.transfer_syntax).toBe('1.2.840.10008.1.2.1');
      expect([s.rows, s.columns]).toEqual([4, 5]);
      expect(s.pixel_spacing).toEqual([0.8, 0.75]);
      s.orientation.forEach((o, i) => expect(o).toBeCloseTo(v.orientation[i], 9));
      expect(s.position[2]).toBeCloseTo(2.5 * z, 9);
      const step = (Math.max(...v.pixels.subarray(z * 20, z * 20 + 20)) - Math.min(...v.pixels.subarray(z * 20, z * 20 + 20))) / 65535;
      s.values.forEach((x, i) => expect(Math.abs(x - v.pixels[z * 20 + i])).toBeLessThanOrEqual(step));
    });
  });

  it('reads back through Veil as the same volume', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'veil-dicom-'));
    writeDicomSeries(sampleVolume()).forEach((b, i) => writeFileSync(join(dir, `s${i}.dcm`), b));
    const back = await loadVolume(dir);
    const v = sampleVolume();
    expect([back.slices, back.rows, back.columns]).toEqual([3, 4, 5]);
    back.spacing.forEach((s, i) => expect(s).toBeCloseTo(v.spacing[i], 5));
    back.pixels.forEach((x, i) => expect(Math.abs(x - v.pixels[i])).toBeLessThan(1e-3));
  });
});

describe('NIfTI writer', () => {
  it('writes what nibabel reads: shape, the LPS volume as a RAS+ affine, values exactly', () => {
    // Source: nibabel's reading of the committed sample (test/reference/writers/expected.json).
    const v = sampleVolume();
    expect(expected.nifti.shape).toEqual([5, 4, 3]);
    const [rx, ry, , cx, cy] = v.orientation;
    const a = expected.nifti.affine;
    expect(a[0][0]).toBeCloseTo(-rx * 0.75, 6);
    expect(a[1][0]).toBeCloseTo(-ry * 0.75, 6);
    expect(a[0][1]).toBeCloseTo(-cx * 0.8, 6);
    expect(a[1][1]).toBeCloseTo(-cy * 0.8, 6);
    expect(a[2][2]).toBeCloseTo(2.5, 6);
    expected.nifti.values_slice_row_column.forEach((x, i) => expect(x).toBe(v.pixels[i]));
  });

  it('reads back through Veil as the same volume and orientation', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'veil-nifti-'));
    writeFileSync(join(dir, 'a.nii'), writeNifti1(sampleVolume()));
    const back = await loadVolume(join(dir, 'a.nii'));
    const v = sampleVolume();
    expect(Array.from(back.pixels)).toEqual(Array.from(v.pixels));
    back.orientation.forEach((o, i) => expect(o).toBeCloseTo(v.orientation[i], 6));
  });
});
