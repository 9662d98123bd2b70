/**
 * DICOM folders as series: what is skipped and said, what stops the read and names the file,
 * and how the provenance hash is made. Uses the pydicom fixtures of test/reference/dicom.
 */
import { createHash } from 'node:crypto';
import { copyFileSync, cpSync, mkdirSync, readFileSync, renameSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { listDicomSeries, readDicomFolder } from '../../app/images/dicom.ts';
import { loadVolume, readSourceBytes } from '../../app/images/load.ts';
import { SourceError } from '../../app/images/source-error.ts';
import { tempDir } from './helpers.ts';

const FILES = fileURLToPath(new URL('../reference/dicom/files/', import.meta.url));
const SERIES = join(FILES, 'series-u16-explicit');

function copySeries(): string {
  const dir = join(tempDir('veil-series-'), 'series');
  cpSync(SERIES, dir, { recursive: true });
  return dir;
}

describe('a folder as one DICOM series', () => {
  it('hashes the files in slice order and keeps slice names', async () => {
    const v = await readDicomFolder(SERIES);
    const hash = createHash('sha256');
    for (const name of v.sliceSources!) hash.update(readFileSync(join(SERIES, name)));
    expect(v.provenance).toEqual({ path: SERIES, format: 'dicom', sha256: hash.digest('hex') });
  });

  it('reads sub-folders, skips hidden files, and names files that hold no image in a note', async () => {
    const ref = await readDicomFolder(SERIES);
    const dir = copySeries();
    mkdirSync(join(dir, 'deeper'));
    renameSync(join(dir, 'IM-a'), join(dir, 'deeper', 'IM-a'));
    writeFileSync(join(dir, 'README.txt'), 'invented notes');
    writeFileSync(join(dir, '.hidden'), 'x');
    const v = await readDicomFolder(dir);
    expect(Array.from(v.pixels)).toEqual(Array.from(ref.pixels));
    expect(v.sliceSources).toEqual(ref.sliceSources!.map((n) => (n === 'IM-a' ? 'deeper/IM-a' : n)));
    expect(v.notes).toEqual(['skipped 1 file(s) that hold no DICOM image: README.txt (not DICOM Part 10)']);
  });

  it('names both files when a slice is there twice', async () => {
    const dir = copySeries();
    copyFileSync(join(dir, 'IM-e'), join(dir, 'IM-e-copy'));
    const err = (await readDicomFolder(dir).catch((e: unknown) => e)) as Error;
    expect(err).toBeInstanceOf(SourceError);
    expect(err.message).toMatch(/^\S+series: 1 pair\(s\) of images at the same position along the slice normal: IM-e and IM-e-copy \(/);
  });

  it('stops at a truncated file and names it', async () => {
    const dir = copySeries();
    const bytes = readFileSync(join(dir, 'IM-b'));
    writeFileSync(join(dir, 'IM-b'), bytes.subarray(0, bytes.length - 100));
    const err = (await loadVolume(dir).catch((e: unknown) => e)) as Error;
    expect(err).toBeInstanceOf(SourceError);
    expect(err.message).toBe(`${join(dir, 'IM-b')}: truncated or damaged DICOM: an element runs past the end of the file (${bytes.length - 100} bytes)`);
  });

  it('lists the series of a mixed folder, and refuses to guess which one is meant', async () => {
    const series = await listDicomSeries(join(FILES, 'two-series'));
    expect(series.map((s) => [s.description, s.images])).toEqual([
      ['invented two-series-a', 3],
      ['invented two-series-b', 2],
    ]);
  });

  it('says when a folder holds no DICOM image at all', async () => {
    const dir = tempDir('veil-empty-');
    writeFileSync(join(dir, 'notes.txt'), 'nothing here');
    await expect(readDicomFolder(dir)).rejects.toThrow(`${dir}: holds no DICOM image (1 file(s); skipped 1 file(s) that hold no DICOM image: notes.txt (not DICOM Part 10))`);
  });

  it('refuses images of different sizes in one series, naming one of each', async () => {
    const dir = copySeries();
    const bytes = new Uint8Array(readFileSync(join(dir, 'IM-d')));
    // Rows (0028,0010), explicit VR little endian: tag, 'US', length 2, value.
    const at = Buffer.from(bytes).indexOf(Buffer.from([0x28, 0x00, 0x10, 0x00, 0x55, 0x53, 0x02, 0x00]));
    new DataView(bytes.buffer).setUint16(at + 8, 6, true);
    writeFileSync(join(dir, 'IM-d'), bytes);
    await expect(readDicomFolder(dir)).rejects.toThrow(/images differ in size \(rows x columns\): 4 of 12 x 16 \(e\.g\. IM-a\), 1 of 6 x 16 \(e\.g\. IM-d\)/);
  });
});

describe('recognising a source by its bytes', () => {
  it('reads a DICOM file whatever its name, and says what it is not', async () => {
    const bytes = readFileSync(join(FILES, 'u16-dump2dcm.dcm'));
    const v = await readSourceBytes(bytes, 'scan-without-extension');
    expect(v.provenance.format).toBe('dicom');
    await expect(readSourceBytes(new TextEncoder().encode('hello'), 'x.dcm')).rejects.toThrow("x.dcm: not a DICOM Part 10 file: no 'DICM' marker at byte 128 (5 bytes)");
    await expect(readSourceBytes(new TextEncoder().encode('hello'), 'x.png')).rejects.toThrow(/^x\.png: format not recognised \(5 bytes\); Veil reads NumPy \.npy; NIfTI/);
  });

  it('fills the intensity range for every format', async () => {
    const npy = await loadVolume(fileURLToPath(new URL('../reference/npy/dtype-i2-le.npy', import.meta.url)));
    expect(npy.range).toEqual([-32768, 32767]);
    expect(npy.dataType).toBe('int16');
  });
});
