/**
 * A NIfTI-1 writer for Veil's own synthetic data (the demo): single file (`.nii`, magic "n+1"),
 * float32, little endian, header of 348 bytes then 4 bytes of extension flag, data from byte 352
 * (nifti1.h, NIfTI DFWG 2004). Geometry goes into the sform (sform_code 1): voxel (i, j, k) =
 * (column, row, slice) maps to RAS+ millimetres, the Volume's LPS direction cosines with x and y
 * negated — the inverse of the reader in ./nifti.ts.
 */
import type { Volume } from './volume.ts';

export function writeNifti1(v: Volume, description = ''): Uint8Array {
  const n = v.columns * v.rows * v.slices;
  const out = new Uint8Array(352 + n * 4);
  const h = new DataView(out.buffer);
  h.setInt32(0, 348, true); // sizeof_hdr
  out[38] = 'r'.charCodeAt(0); // regular (historical)
  const dim = [3, v.columns, v.rows, v.slices, 1, 1, 1, 1];
  dim.forEach((d, i) => h.setInt16(40 + 2 * i, d, true));
  h.setInt16(70, 16, true); // datatype float32
  h.setInt16(72, 32, true); // bitpix
  const pixdim = [1, v.spacing[0], v.spacing[1], v.spacing[2], 1, 1, 1, 1];
  pixdim.forEach((d, i) => h.setFloat32(76 + 4 * i, d, true));
  h.setFloat32(108, 352, true); // vox_offset
  h.setFloat32(112, 1, true); // scl_slope
  h.setFloat32(116, 0, true); // scl_inter
  out[123] = 2; // xyzt_units: millimetres
  new TextEncoder().encodeInto(description.slice(0, 79), out.subarray(148, 228));
  h.setInt16(252, 0, true); // qform_code
  h.setInt16(254, 1, true); // sform_code: scanner coordinates
  const [rx, ry, rz, cx, cy, cz] = v.orientation;
  const normal = [ry * cz - rz * cy, rz * cx - rx * cz, rx * cy - ry * cx];
  const [sx, sy, sz] = v.spacing;
  const srow = [
    [-rx * sx, -cx * sy, -normal[0] * sz, 0],
    [-ry * sx, -cy * sy, -normal[1] * sz, 0],
    [rz * sx, cz * sy, normal[2] * sz, 0],
  ];
  srow.forEach((row, r) => row.forEach((x, c) => h.setFloat32(280 + 16 * r + 4 * c, x + 0, true)));
  new TextEncoder().encodeInto('n+1\0', out.subarray(344, 348));
  const data = new DataView(out.buffer, 352);
  for (let i = 0; i < n; i++) data.setFloat32(4 * i, v.pixels[i], true);
  return out;
}
