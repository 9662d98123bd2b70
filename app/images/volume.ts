/**
 * The one image model of Veil. Every reader of a source format (DICOM, NIfTI, NumPy)
 * produces a Volume; every consumer (metrics, kit writer, viewer) reads one.
 *
 * Axis convention: pixels are stored slice-major, then row, then column:
 * index = (slice * rows + row) * columns + column. A 3D NumPy array of shape
 * (slices, rows, columns) in C order maps onto this directly.
 */
export type SourceFormat = 'npy' | 'dicom' | 'nifti';

export interface Provenance {
  /** Absolute path of the file or folder the volume was read from. */
  path: string;
  format: SourceFormat;
  /** SHA-256 (hex) of the source bytes. */
  sha256: string;
}

export interface Volume {
  columns: number;
  rows: number;
  slices: number;
  /** Millimetres between pixel centres: [column, row, slice]. 1 where the source does not say. */
  spacing: [number, number, number];
  /** Direction cosines of the row and column axes (DICOM ImageOrientationPatient order). */
  orientation: [number, number, number, number, number, number];
  pixels: Float32Array;
  provenance: Provenance;
}

export const IDENTITY_ORIENTATION: Volume['orientation'] = [1, 0, 0, 0, 1, 0];

export function voxelCount(v: Pick<Volume, 'columns' | 'rows' | 'slices'>): number {
  return v.columns * v.rows * v.slices;
}
