/**
 * Read any supported source into a Volume, choosing the reader by the file name.
 */
import { readNpyFile } from './npy.ts';
import type { Volume } from './volume.ts';

export const SUPPORTED_SOURCES = ['.npy'];

export async function loadVolume(path: string): Promise<Volume> {
  if (path.toLowerCase().endsWith('.npy')) return readNpyFile(path);
  throw new Error(`${path}: this version of Veil reads NumPy .npy sources only (DICOM and NIfTI import is planned); convert the file to .npy or wait for that release`);
}
