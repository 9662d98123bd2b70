/**
 * Read any supported source into a Volume: a folder is one DICOM series; a file is recognised by
 * its first bytes (the NumPy magic, the NIfTI sizeof_hdr, gzip, the DICOM Part 10 marker), its
 * name deciding only where the bytes do not (a .nii.gz is gzip; anything else gzip is refused).
 * Every failure is a SourceError whose message starts with the path.
 */
import { readFile, stat } from 'node:fs/promises';
import { resolve } from 'node:path';
import { isPart10 } from './dicom-file.ts';
import { readDicomBytes, readDicomFolder } from './dicom.ts';
import { isGzip, niftiKind, readNifti } from './nifti.ts';
import { readNpy } from './npy.ts';
import { SourceError } from './source-error.ts';
import { finiteRange } from './volume.ts';
import type { Volume } from './volume.ts';

export const SUPPORTED_SOURCES = ['.npy', '.nii', '.nii.gz', 'DICOM file (Part 10)', 'folder of DICOM files (one series)'];

export const SUPPORTED_TEXT =
  'NumPy .npy; NIfTI-1/2 .nii or .nii.gz; a DICOM Part 10 file; or a folder holding one DICOM series';

const NPY_MAGIC = [0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59];

/** Reads one source's bytes, whatever its format; `path` names it in messages and provenance. */
export async function readSourceBytes(bytes: Uint8Array, path: string): Promise<Volume> {
  const lower = path.toLowerCase();
  if (NPY_MAGIC.every((b, i) => bytes[i] === b)) return readNpy(bytes, path);
  if (isPart10(bytes)) return readDicomBytes(bytes, path);
  if (niftiKind(bytes) || isGzip(bytes) || lower.endsWith('.nii') || lower.endsWith('.nii.gz')) {
    if (isGzip(bytes) && !lower.endsWith('.gz') && !lower.endsWith('.nii')) {
      throw new SourceError(path, `is gzip-compressed but not named .nii.gz; Veil reads ${SUPPORTED_TEXT}`);
    }
    return readNifti(bytes, path);
  }
  if (lower.endsWith('.npy')) return readNpy(bytes, path); // its reader says what is wrong
  if (lower.endsWith('.dcm') || lower.endsWith('.ima')) {
    throw new SourceError(path, `not a DICOM Part 10 file: no 'DICM' marker at byte 128 (${bytes.length} bytes)`);
  }
  throw new SourceError(path, `format not recognised (${bytes.length} bytes); Veil reads ${SUPPORTED_TEXT}`);
}

/** Reads the source at a path (a file or a DICOM series folder); fills `range`. */
export async function loadVolume(path: string): Promise<Volume> {
  const absolute = resolve(path);
  let volume: Volume;
  let isFolder: boolean;
  try {
    isFolder = (await stat(absolute)).isDirectory();
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    throw new SourceError(absolute, code === 'ENOENT' ? 'file or folder not found' : `cannot read: ${code ?? (e as Error).message}`);
  }
  if (isFolder) volume = await readDicomFolder(absolute);
  else {
    let bytes: Uint8Array;
    try {
      bytes = await readFile(absolute);
    } catch (e) {
      throw new SourceError(absolute, `cannot read the file: ${(e as NodeJS.ErrnoException).code ?? (e as Error).message}`);
    }
    volume = await readSourceBytes(bytes, absolute);
  }
  volume.range ??= finiteRange(volume.pixels);
  return volume;
}
