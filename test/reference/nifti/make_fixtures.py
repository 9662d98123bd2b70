"""Writes the NIfTI fixtures of Veil's NIfTI reader tests, and expected.json.

Run from the repository root:  /usr/bin/python3 test/reference/nifti/make_fixtures.py
Needs nibabel and numpy (Debian python3-nibabel, python3-numpy). The output is committed, so the
tests need no Python. expected.json records the versions. The arrays are invented.

What a Veil Volume must hold is computed here from what nibabel reads back from each file:
- values: nibabel's scaled data (get_fdata in float64; complex data: the magnitude of the scaled
  values), then float32;
- geometry: nibabel's `affine` (sform when sform_code > 0, else qform when qform_code > 0: the
  NIfTI-1 header's methods 3 and 2), in RAS+ millimetres (metres and
  microns converted after xyzt_units), turned into DICOM's patient convention (LPS: x and y
  negated). Columns run along voxel axis i, rows along j, slices along k. When the k axis points
  against row x column (a left-handed voxel grid), Veil stores the slices in reverse, so that
  slices always ascend along the slice normal as in a sorted DICOM series; with neither code set
  (method 1) only the pixdim spacing is stated;
- orientation: unit vectors of i and j; spacing: the lengths of the i, j and k columns of the
  affine; origin: the position of the first stored voxel;
- pixels slice-major, then row, then column; sha256 of the float32 little-endian bytes.
"""
import gzip
import hashlib
import json
import platform
import shutil
import sys
from pathlib import Path

import nibabel as nib
import numpy as np

HERE = Path(__file__).resolve().parent
OUT = HERE / 'files'
SHAPE = (7, 6, 5)  # i, j, k: all different, so that an axis mix-up shows


def data_of(dtype, seed):
    rng = np.random.RandomState(seed)
    i, j, k = np.meshgrid(*[np.arange(n) for n in SHAPE], indexing='ij')
    ramp = i * 3 + j * 17 + k * 101
    if np.dtype(dtype).kind == 'c':
        return (ramp + 1j * rng.randint(-50, 50, size=SHAPE)).astype(dtype)
    if np.dtype(dtype).kind == 'f':
        return (ramp / 7.0 - 13 + rng.standard_normal(SHAPE)).astype(dtype)
    info = np.iinfo(dtype)
    lo, hi = max(info.min, -3000), min(info.max, 30000)
    return np.clip(ramp * 37 + rng.randint(lo, hi, size=SHAPE) // 4, lo, hi).astype(dtype)


def rotation(ax, ay, az):
    cx, sx, cy, sy, cz, sz = np.cos(ax), np.sin(ax), np.cos(ay), np.sin(ay), np.cos(az), np.sin(az)
    rx = np.array([[1, 0, 0], [0, cx, -sx], [0, sx, cx]])
    ry = np.array([[cy, 0, sy], [0, 1, 0], [-sy, 0, cy]])
    rz = np.array([[cz, -sz, 0], [sz, cz, 0], [0, 0, 1]])
    return rz @ ry @ rx


def affine_of(zooms, rot, offset, flip_k=False):
    a = np.eye(4)
    a[:3, :3] = rot @ np.diag(zooms)
    if flip_k:
        a[:3, 2] *= -1
    a[:3, 3] = offset
    return a


OBLIQUE = affine_of([0.8, 1.25, 3.0], rotation(0.3, -0.2, 0.5), [-20.0, 35.5, 12.0])
LEFT_HANDED = affine_of([1.0, 0.5, 2.0], rotation(0.0, 0.1, -0.4), [5.0, -7.0, 40.0], flip_k=True)
LAS = np.array([[-0.9, 0, 0, 30], [0, 0.9, 0, -25], [0, 0, 2.5, -10], [0, 0, 0, 1.0]])  # det < 0


def expected(path):
    img = nib.load(str(path))
    hdr = img.header
    raw = np.asanyarray(img.dataobj)
    if np.iscomplexobj(raw):
        values = np.abs(raw.astype(np.complex128))
    else:
        values = img.get_fdata(dtype=np.float64)
    while values.ndim < 3:
        values = values[..., np.newaxis]
    values = values.reshape(values.shape[:3])
    unit = {'meter': 1000.0, 'mm': 1.0, 'micron': 0.001, 'unknown': 1.0}[hdr.get_xyzt_units()[0]]
    lps = np.diag([-1.0, -1.0, 1.0]) @ img.affine[:3, :4] * unit
    di, dj, dk, t = lps[:, 0], lps[:, 1], lps[:, 2], lps[:, 3]
    sform, qform = int(hdr['sform_code']), int(hdr['qform_code'])
    if sform == 0 and qform == 0:
        # The header's method 1: pixdim spacing, no orientation (nibabel's fallback affine would
        # put in an Analyze-style x flip and centre; the NIfTI-1 header says neither).
        pixels = np.ascontiguousarray(values.transpose(2, 1, 0)).astype('<f4')
        return {
            'shape': list(pixels.shape),
            'spacing': [float(abs(z)) * unit for z in hdr['pixdim'][1:4]],
            'orientation': None,
            'origin': None,
            'reversedSlices': False,
            'scl': [float(img.dataobj.slope), float(img.dataobj.inter)],
            'affineFrom': 'pixdim',
            'dataType': str(hdr.get_data_dtype().newbyteorder('=').name),
            'sha256': hashlib.sha256(pixels.tobytes()).hexdigest(),
            'first': [float(x) for x in pixels.ravel()[:6]],
        }
    flip = float(np.dot(dk, np.cross(di, dj))) < 0
    if flip:
        values = values[:, :, ::-1]
        t = t + dk * (values.shape[2] - 1)
    pixels = np.ascontiguousarray(values.transpose(2, 1, 0)).astype('<f4')
    return {
        'shape': list(pixels.shape),
        'spacing': [float(np.linalg.norm(v)) for v in (di, dj, dk)],
        'orientation': [float(x) for x in np.concatenate([di / np.linalg.norm(di), dj / np.linalg.norm(dj)])],
        'origin': [float(x) for x in t],
        'reversedSlices': flip,
        'scl': [float(img.dataobj.slope), float(img.dataobj.inter)],
        'affineFrom': 'sform' if sform > 0 else 'qform' if qform > 0 else 'pixdim',
        'dataType': str(hdr.get_data_dtype().newbyteorder('=').name) + (' (magnitude)' if np.iscomplexobj(raw) else ''),
        'sha256': hashlib.sha256(pixels.tobytes()).hexdigest(),
        'first': [float(x) for x in pixels.ravel()[:6]],
    }


def main():
    if OUT.exists():
        shutil.rmtree(OUT)
    OUT.mkdir()
    cases = []

    def save(name, img, note):
        path = OUT / name
        nib.save(img, str(path))
        cases.append({'name': name, 'path': f'files/{name}', 'note': note, **expected(path)})

    # Every listed datatype, NIfTI-1, sform and qform both set (sform wins).
    for i, dtype in enumerate(['int16', 'uint16', 'int32', 'float32', 'float64', 'complex64', 'uint8']):
        img = nib.Nifti1Image(data_of(dtype, i), OBLIQUE)
        img.header.set_qform(OBLIQUE, code=1)
        img.header.set_sform(OBLIQUE, code=2)
        save(f'{dtype}.nii', img, f'NIfTI-1 {dtype}, sform and qform')

    # scl_slope / scl_inter: float data stored as int16, nibabel choosing the scaling.
    img = nib.Nifti1Image(data_of('float64', 10) * 37.3, OBLIQUE)
    img.set_data_dtype(np.int16)
    save('int16-scaled.nii.gz', img, 'NIfTI-1 int16 gzipped, scl_slope and scl_inter set by nibabel')

    # qform only, with a left-handed grid (qfac -1): the slices must come out reversed.
    img = nib.Nifti1Image(data_of('float32', 11), LEFT_HANDED)
    img.header.set_qform(LEFT_HANDED, code=1)
    img.header.set_sform(None, code=0)
    save('float32-qform-left-handed.nii.gz', img, 'qform only, qfac -1')

    # sform only, LAS (det < 0) as many converters write.
    img = nib.Nifti1Image(data_of('uint16', 12), LAS)
    img.header.set_sform(LAS, code=1)
    img.header.set_qform(None, code=0)
    save('uint16-sform-las.nii', img, 'sform only, left-handed')

    # Neither: the pixdim diagonal.
    img = nib.Nifti1Image(data_of('int16', 13), None)
    img.header.set_zooms((0.7, 0.9, 2.2))
    save('int16-no-orientation.nii', img, 'qform_code and sform_code 0')

    # Units in metres.
    aff = affine_of([0.0008, 0.0009, 0.002], np.eye(3), [0.01, -0.02, 0.03])
    img = nib.Nifti1Image(data_of('float32', 14), aff)
    img.header.set_xyzt_units('meter')
    save('float32-metres.nii', img, 'xyzt_units: metres')

    # Big endian header and data.
    img = nib.Nifti1Image(data_of('float64', 15) * 11.1, OBLIQUE, nib.Nifti1Header(endianness='>'))
    img.set_data_dtype(np.dtype('>i2'))
    save('int16-big-endian.nii', img, 'big endian, scaled')

    # NIfTI-2: plain, gzipped, big endian, complex.
    img = nib.Nifti2Image(data_of('float64', 16), OBLIQUE)
    save('float64-nifti2.nii', img, 'NIfTI-2 float64')
    img = nib.Nifti2Image(data_of('float64', 17) * 5 + 300, LAS)
    img.set_data_dtype(np.int16)
    save('int16-nifti2.nii.gz', img, 'NIfTI-2 int16 gzipped, scaled')
    img = nib.Nifti2Image(data_of('uint16', 18), LEFT_HANDED, nib.Nifti2Header(endianness='>'))
    img.set_data_dtype(np.dtype('>u2'))
    img.header.set_qform(LEFT_HANDED, code=1)
    img.header.set_sform(None, code=0)
    save('uint16-nifti2-big-endian.nii', img, 'NIfTI-2 big endian, qform only, qfac -1')
    img = nib.Nifti2Image(data_of('complex64', 19), OBLIQUE)
    save('complex64-nifti2.nii', img, 'NIfTI-2 complex64')

    # A 2D image: one slice.
    img = nib.Nifti1Image(data_of('float32', 20)[:, :, 0], OBLIQUE)
    save('float32-2d.nii', img, 'two dimensions: one slice')

    # Refused: 4D, a .hdr/.img pair, RGB.
    refusals = []
    img = nib.Nifti1Image(np.stack([data_of('int16', 21)] * 3, axis=-1), OBLIQUE)
    nib.save(img, str(OUT / 'int16-4d.nii'))
    refusals.append({'path': 'files/int16-4d.nii', 'words': ['4 dimensions', '7 x 6 x 5 x 3', 'one 3D volume']})
    img = nib.Nifti1Pair(data_of('int16', 22), OBLIQUE)
    nib.save(img, str(OUT / 'pair.hdr'))
    refusals.append({'path': 'files/pair.hdr', 'words': ['.hdr/.img pair', '.nii']})
    rgb = np.zeros(SHAPE, dtype=[('R', 'u1'), ('G', 'u1'), ('B', 'u1')])
    img = nib.Nifti1Image(rgb, OBLIQUE)
    nib.save(img, str(OUT / 'rgb24.nii'))
    refusals.append({'path': 'files/rgb24.nii', 'words': ['datatype 128', 'RGB', 'int16']})

    out = {
        'generator': {
            'script': 'test/reference/nifti/make_fixtures.py',
            'python': platform.python_version(),
            'nibabel': nib.__version__,
            'numpy': np.__version__,
        },
        'volumes': cases,
        'refusals': refusals,
    }
    (HERE / 'expected.json').write_text(json.dumps(out, indent=1) + '\n')
    total = sum(p.stat().st_size for p in OUT.rglob('*') if p.is_file())
    print(f'{len(cases)} volumes, {len(refusals)} refusals, {total} bytes', file=sys.stderr)


if __name__ == '__main__':
    main()
