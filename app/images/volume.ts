/**
 * The one image model of Veil. Every reader of a source format (DICOM, NIfTI, NumPy)
 * produces a Volume; every consumer (metrics, kit writer, viewer) reads one.
 *
 * Axis convention: pixels are stored slice-major, then row, then column:
 * index = (slice * rows + row) * columns + column. A 3D NumPy array of shape
 * (slices, rows, columns) in C order maps onto this directly; a DICOM series gives one slice per
 * image, sorted by position along the slice normal; a NIfTI image's voxel axes i, j, k are
 * columns, rows and slices. Geometry follows DICOM's patient coordinates (LPS, millimetres):
 * `orientation` holds the direction cosines of a row (columns increasing) and of a column (rows
 * increasing), and slices ascend along row x column.
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
  /** Which geometry the source states; spacing and orientation are defaults where it does not. Absent: none (a .npy file). */
  stated?: { spacing: boolean; orientation: boolean };
  /** Patient position (LPS, mm) of the centre of the first stored voxel, where the source states it. */
  origin?: [number, number, number];
  /** Nominal slice thickness (mm), where the source states it. */
  sliceThickness?: number;
  /** Stored data type of the source: uint8, int8, uint16, int16, uint32, int32, float32, float64, 'complex64 (magnitude)', ... */
  dataType?: string;
  /** Smallest and largest finite pixel value, after any rescaling; [0, 0] when there is none. */
  range?: [number, number];
  /** Where each slice came from (file name, `#n` for a frame of a multi-frame file), for sources made of several images. */
  sliceSources?: string[];
  /** The source says its pixels may carry identifying text (DICOM BurnedInAnnotation YES). */
  burnedIn?: boolean;
  /** Remarks about the source that do not stop reading it (uneven spacing, skipped files, ...). */
  notes?: string[];
}

/** The axis convention in one sentence, for `veil check` output and the README. */
export const AXIS_CONVENTION =
  'a Volume is (slices, rows, columns): a 3D .npy array is (slices, rows, columns) and a 2D array one slice; ' +
  'NIfTI voxel axes i, j, k are columns, rows, slices; a DICOM series is one slice per image, sorted along the slice normal; ' +
  'geometry is in DICOM patient coordinates (LPS, mm)';

export const IDENTITY_ORIENTATION: Volume['orientation'] = [1, 0, 0, 0, 1, 0];

/** Smallest and largest finite value; null when no value is finite. */
export function rangeOf(pixels: Float32Array): [number, number] | null {
  let lo = Infinity;
  let hi = -Infinity;
  for (let i = 0; i < pixels.length; i++) {
    const v = pixels[i];
    if (v < lo) lo = v;
    if (v > hi) hi = v;
  }
  // NaN fails both comparisons; +-Infinity would pass them, so filter them out afterwards.
  if (!Number.isFinite(lo) || !Number.isFinite(hi)) {
    lo = Infinity;
    hi = -Infinity;
    for (let i = 0; i < pixels.length; i++) {
      const v = pixels[i];
      if (!Number.isFinite(v)) continue;
      if (v < lo) lo = v;
      if (v > hi) hi = v;
    }
  }
  return lo <= hi ? [lo, hi] : null;
}

/** Smallest and largest finite value; [0, 0] when no value is finite. */
export function finiteRange(pixels: Float32Array): [number, number] {
  return rangeOf(pixels) ?? [0, 0];
}

export function voxelCount(v: Pick<Volume, 'columns' | 'rows' | 'slices'>): number {
  return v.columns * v.rows * v.slices;
}
