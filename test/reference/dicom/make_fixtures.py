"""Writes the DICOM fixtures of Veil's DICOM reader tests, and expected.json.

Run from the repository root:  /usr/bin/python3 test/reference/dicom/make_fixtures.py
Needs pydicom and numpy (Debian python3-pydicom, python3-numpy) and DCMTK's command line tools
(Debian dcmtk: dcmconv, dcmcrle, dcmcjpeg, dcmcjpls, dump2dcm). The output is committed, so the
tests need none of these tools. expected.json records the tool versions.

Everything here is invented: small synthetic matrices, an invented phantom name, UIDs under the
2.25 root (UUID-derived, PS3.5 B.2) made from a hash of the fixture name. Nothing comes from a scan.

What a Veil Volume must hold is computed here from what pydicom reads back from each written file
(pixel_array decodes the transfer syntax, whichever tool wrote it), by the rules Veil states:
- frames are sorted by their position along the slice normal, normal = row x column direction
  cosines of ImageOrientationPatient, position = ImagePositionPatient . normal; without positions,
  by InstanceNumber;
- bits above BitsStored are not part of the value (PS3.5 8.1.1): masked, then sign-extended when
  PixelRepresentation is 1;
- MONOCHROME1 is inverted over the stored range: v' = (smallest + largest storable) - v;
- the modality rescale (PS3.3 C.11.1.1.2) v * RescaleSlope + RescaleIntercept in float64, then
  float32;
- spacing [column, row, slice]: PixelSpacing is [between rows, between columns]; the slice
  spacing is the median distance between consecutive positions;
- pixels slice-major, then row, then column; sha256 of the float32 little-endian bytes.
"""
import hashlib
import json
import os
import platform
import shutil
import subprocess
import sys
from pathlib import Path

import numpy as np
import pydicom
from pydicom.dataset import Dataset, FileMetaDataset
from pydicom.sequence import Sequence
from pydicom.uid import (
    DeflatedExplicitVRLittleEndian,
    ExplicitVRBigEndian,
    ExplicitVRLittleEndian,
    ImplicitVRLittleEndian,
    RLELossless,
)

HERE = Path(__file__).resolve().parent
OUT = HERE / 'files'
MR_IMAGE = '1.2.840.10008.5.1.4.1.1.4'
ENHANCED_MR = '1.2.840.10008.5.1.4.1.1.4.1'

ROWS, COLS = 12, 16  # not square, so that a row/column mix-up shows

# Direction cosines with exact decimal forms: a doubly oblique plane.
ROW_DIR = [0.8, 0.6, 0.0]
COL_DIR = [0.0, 0.0, -1.0]
NORMAL = np.cross(ROW_DIR, COL_DIR)  # (-0.6, 0.8, 0)
ORIGIN = np.array([-40.5, 12.25, 30.0])


def uid(name):
    return '2.25.' + str(int(hashlib.sha256(name.encode()).hexdigest()[:30], 16))


def ds_text(x):
    """A DS value of at most 16 characters, written exactly as given."""
    s = f'{x:.6f}'.rstrip('0').rstrip('.')
    return '0' if s in ('-0', '') else s


def pattern(slices, rows, cols, lo, hi, seed):
    """Invented image content: a ramp (so that axes are told apart) plus seeded noise."""
    rng = np.random.RandomState(seed)
    s, r, c = np.meshgrid(np.arange(slices), np.arange(rows), np.arange(cols), indexing='ij')
    base = lo + ((s * 97 + r * 13 + c * 5) % max(1, (hi - lo) // 2))
    noise = rng.randint(0, max(1, (hi - lo) // 2), size=base.shape)
    return np.clip(base + noise, lo, hi)


def base_dataset(name, sop_class, ts, series_uid, instance):
    meta = FileMetaDataset()
    meta.MediaStorageSOPClassUID = sop_class
    meta.MediaStorageSOPInstanceUID = uid(f'{name}/{instance}')
    meta.TransferSyntaxUID = ts
    meta.ImplementationClassUID = uid('veil-fixture-writer')
    ds = Dataset()
    ds.file_meta = meta
    ds.preamble = b'\0' * 128
    ds.SOPClassUID = sop_class
    ds.SOPInstanceUID = meta.MediaStorageSOPInstanceUID
    ds.StudyInstanceUID = uid('study')
    ds.SeriesInstanceUID = series_uid
    ds.Modality = 'MR'
    ds.PatientName = 'Phantom^Invented'
    ds.PatientID = 'INVENTED-01'
    ds.SeriesDescription = f'invented {name}'
    ds.InstanceNumber = instance
    ds.SamplesPerPixel = 1
    ds.Rows = ROWS
    ds.Columns = COLS
    return ds


def set_pixels(ds, arr, bits_stored=None, photometric='MONOCHROME2'):
    ds.PhotometricInterpretation = photometric
    if arr.dtype.kind == 'f':
        ds.BitsAllocated = arr.dtype.itemsize * 8
        if arr.dtype.itemsize == 4:
            ds.FloatPixelData = arr.astype('<f4').tobytes()
        else:
            ds.DoubleFloatPixelData = arr.astype('<f8').tobytes()
        return
    ds.BitsAllocated = arr.dtype.itemsize * 8
    ds.BitsStored = bits_stored or ds.BitsAllocated
    ds.HighBit = ds.BitsStored - 1
    ds.PixelRepresentation = 1 if arr.dtype.kind == 'i' else 0
    ds.PixelData = arr.astype(arr.dtype.newbyteorder('<')).tobytes()


def save(ds, path, ts):
    ds.file_meta.TransferSyntaxUID = ts
    ds.is_little_endian = ts != ExplicitVRBigEndian
    ds.is_implicit_VR = ts == ImplicitVRLittleEndian
    path.parent.mkdir(parents=True, exist_ok=True)
    ds.save_as(path, write_like_original=False)


def mr_slice(name, series_uid, instance, arr2d, position, *, slope=None, intercept=None, bits_stored=None,
             photometric='MONOCHROME2', geometry=True, spacing=(0.9, 1.1), thickness=3.0):
    ds = base_dataset(name, MR_IMAGE, ExplicitVRLittleEndian, series_uid, instance)
    if geometry:
        ds.ImageOrientationPatient = [ds_text(x) for x in ROW_DIR + COL_DIR]
        ds.ImagePositionPatient = [ds_text(x) for x in position]
    ds.PixelSpacing = [ds_text(spacing[0]), ds_text(spacing[1])]
    ds.SliceThickness = ds_text(thickness)
    if slope is not None:
        ds.RescaleSlope = ds_text(slope)
        ds.RescaleIntercept = ds_text(intercept)
        ds.RescaleType = 'US'
    set_pixels(ds, arr2d, bits_stored, photometric)
    return ds


def write_series(name, arr3d, steps, *, ts=ExplicitVRLittleEndian, instance_order=None, file_names=None, **kw):
    """One file per slice; slice k at ORIGIN + steps[k] * NORMAL. Returns the folder."""
    folder = OUT / name
    if folder.exists():
        shutil.rmtree(folder)
    series_uid = uid(name)
    n = arr3d.shape[0]
    instance_order = instance_order or list(range(1, n + 1))
    file_names = file_names or [f'IM{k:04d}' for k in range(n)]
    for k in range(n):
        pos = ORIGIN + steps[k] * NORMAL
        ds = mr_slice(name, series_uid, instance_order[k], arr3d[k], pos, **kw)
        save(ds, folder / file_names[k], ts)
    return folder


def enhanced_mr(name, arr3d, steps, slopes, intercepts, frame_order):
    """An Enhanced MR object; frame f holds slice frame_order[f] (frames stored out of order)."""
    ds = base_dataset(name, ENHANCED_MR, ExplicitVRLittleEndian, uid(name), 1)
    ds.NumberOfFrames = len(frame_order)
    shared = Dataset()
    pm = Dataset()
    pm.PixelSpacing = ['0.75', '0.5']
    pm.SliceThickness = '2.5'
    shared.PixelMeasuresSequence = Sequence([pm])
    po = Dataset()
    po.ImageOrientationPatient = [ds_text(x) for x in ROW_DIR + COL_DIR]
    shared.PlaneOrientationSequence = Sequence([po])
    ds.SharedFunctionalGroupsSequence = Sequence([shared])
    per_frame = []
    frames = []
    for f, k in enumerate(frame_order):
        item = Dataset()
        pp = Dataset()
        pp.ImagePositionPatient = [ds_text(x) for x in ORIGIN + steps[k] * NORMAL]
        item.PlanePositionSequence = Sequence([pp])
        pvt = Dataset()
        pvt.RescaleSlope = ds_text(slopes[k])
        pvt.RescaleIntercept = ds_text(intercepts[k])
        pvt.RescaleType = 'US'
        item.PixelValueTransformationSequence = Sequence([pvt])
        fc = Dataset()
        fc.InStackPositionNumber = k + 1
        item.FrameContentSequence = Sequence([fc])
        per_frame.append(item)
        frames.append(arr3d[k])
    ds.PerFrameFunctionalGroupsSequence = Sequence(per_frame)
    set_pixels(ds, np.stack(frames), bits_stored=16)
    path = OUT / f'{name}.dcm'
    save(ds, path, ExplicitVRLittleEndian)
    return path


# ---- what pydicom reads, by Veil's rules ---------------------------------------------------

def dicom_files(path):
    if path.is_file():
        return [path]
    return sorted(p for p in path.rglob('*') if p.is_file())


def frame_records(path):
    """(sort key, display name, float32 frame, geometry) for every frame of every file."""
    records = []
    for f in dicom_files(path):
        ds = pydicom.dcmread(f)
        arr = ds.pixel_array
        nframes = int(getattr(ds, 'NumberOfFrames', 1) or 1)
        frames = arr if nframes > 1 else arr[np.newaxis]
        shared = ds.SharedFunctionalGroupsSequence[0] if 'SharedFunctionalGroupsSequence' in ds else None
        for i in range(nframes):
            per = ds.PerFrameFunctionalGroupsSequence[i] if 'PerFrameFunctionalGroupsSequence' in ds else None

            def attr(seq, key):
                for group in (per, shared):
                    if group is not None and seq in group and key in group[seq][0]:
                        return group[seq][0][key].value
                return getattr(ds, key, None)

            iop = attr('PlaneOrientationSequence', 'ImageOrientationPatient')
            ipp = attr('PlanePositionSequence', 'ImagePositionPatient')
            ps = attr('PixelMeasuresSequence', 'PixelSpacing')
            slope = attr('PixelValueTransformationSequence', 'RescaleSlope')
            intercept = attr('PixelValueTransformationSequence', 'RescaleIntercept')
            thickness = attr('PixelMeasuresSequence', 'SliceThickness')
            raw = frames[i]
            if 'FloatPixelData' in ds or 'DoubleFloatPixelData' in ds:
                values = raw.astype(np.float64)
                dtype = f'float{ds.BitsAllocated}'
            else:
                bits, stored = ds.BitsAllocated, ds.BitsStored
                signed = ds.PixelRepresentation == 1
                u = raw.astype(np.int64) & ((1 << stored) - 1)  # PS3.5 8.1.1
                if signed:
                    u = np.where(u >= (1 << (stored - 1)), u - (1 << stored), u)
                if ds.PhotometricInterpretation == 'MONOCHROME1':
                    lo, hi = ((-(1 << (stored - 1)), (1 << (stored - 1)) - 1) if signed else (0, (1 << stored) - 1))
                    u = (lo + hi) - u
                values = u.astype(np.float64)
                dtype = f'{"int" if signed else "uint"}{bits}'
            if slope is not None:
                values = values * float(slope) + float(intercept)
            name = f.relative_to(path).as_posix() if path.is_dir() else f.name
            records.append({
                'name': name if nframes == 1 else f'{name}#{i + 1}',
                'pixels': values.astype(np.float32),
                'iop': [float(x) for x in iop] if iop is not None else None,
                'ipp': [float(x) for x in ipp] if ipp is not None else None,
                'ps': [float(x) for x in ps] if ps is not None else None,
                'thickness': float(thickness) if thickness is not None else None,
                'instance': int(ds.InstanceNumber) if 'InstanceNumber' in ds else None,
                'dtype': dtype,
                'ts': str(ds.file_meta.TransferSyntaxUID),
            })
    return records


def expected_volume(path):
    recs = frame_records(path)
    if all(r['ipp'] is not None and r['iop'] is not None for r in recs):
        iop = recs[0]['iop']
        normal = np.cross(iop[:3], iop[3:])
        for r in recs:
            r['key'] = float(np.dot(r['ipp'], normal))
        recs.sort(key=lambda r: r['key'])
        keys = [r['key'] for r in recs]
        slice_spacing = float(np.median(np.diff(keys))) if len(keys) > 1 else recs[0]['thickness']
        orientation = iop
        origin = recs[0]['ipp']
    else:
        recs.sort(key=lambda r: r['instance'])
        slice_spacing = recs[0]['thickness']
        orientation = None
        origin = None
    pixels = np.stack([r['pixels'] for r in recs]).astype('<f4')
    ps = recs[0]['ps']
    return {
        'shape': list(pixels.shape),
        'spacing': [ps[1], ps[0], slice_spacing],
        'orientation': orientation,
        'origin': origin,
        'sliceOrder': [r['name'] for r in recs],
        'dataType': recs[0]['dtype'],
        'transferSyntax': recs[0]['ts'],
        'sha256': hashlib.sha256(pixels.tobytes()).hexdigest(),
        'first': [float(x) for x in pixels.ravel()[:6]],
        'min': float(pixels.min()),
        'max': float(pixels.max()),
    }


def run(*args):
    subprocess.run(args, check=True)


def dcmtk_each(tool_args, src, dst):
    """Applies a DCMTK tool to every file of a fixture (file or folder)."""
    if dst.exists():
        shutil.rmtree(dst) if dst.is_dir() else dst.unlink()
    if src.is_file():
        run(*tool_args, str(src), str(dst))
        return
    for f in dicom_files(src):
        out = dst / f.relative_to(src)
        out.parent.mkdir(parents=True, exist_ok=True)
        run(*tool_args, str(f), str(out))


def tool_version(tool):
    out = subprocess.run([tool, '--version'], capture_output=True, text=True).stdout
    return out.strip().splitlines()[0]


def main():
    if OUT.exists():
        shutil.rmtree(OUT)
    OUT.mkdir()
    volumes = []   # fixtures that must read as one volume
    failures = []  # fixtures that must be refused, with words the message must hold

    def volume(name, path, writer, **extra):
        volumes.append({'name': name, 'path': path.relative_to(HERE).as_posix(), 'writer': writer,
                        **expected_volume(path), **extra})

    steps5 = [0.0, 3.3, 6.6, 9.9, 13.2]

    # A series of five single-frame files, explicit VR little endian, uint16 with 12 bits stored,
    # rescaled. File names and InstanceNumber both run against the position order, so only the
    # position can sort it. One pixel carries a bit above BitsStored that must be ignored.
    u16 = pattern(5, ROWS, COLS, 0, 4095, 1).astype(np.uint16)
    u16_dirty = u16.copy()
    u16_dirty[2, 3, 4] |= 0x8000
    folder = write_series('series-u16-explicit', u16_dirty, steps5, instance_order=[5, 3, 1, 4, 2],
                          file_names=['IM-c', 'IM-a', 'IM-e', 'IM-b', 'IM-d'], slope=0.75, intercept=-20.5,
                          bits_stored=12)
    volume('series-u16-explicit', folder, f'pydicom {pydicom.__version__}')

    # The same series re-encoded by DCMTK in each uncompressed syntax and RLE.
    for label, args in [('implicit', ['dcmconv', '+ti']), ('big-endian', ['dcmconv', '+tb']),
                        ('deflated', ['dcmconv', '+td']), ('rle', ['dcmcrle'])]:
        dst = OUT / f'dcmtk-{label}'
        dcmtk_each(args, folder, dst)
        volume(f'dcmtk-{label}', dst, f'{tool_version(args[0])} {" ".join(args[1:])}'.strip())

    # int16 signed, implicit VR, written by pydicom; no positions: InstanceNumber orders it.
    i16 = (pattern(4, ROWS, COLS, -1200, 1500, 2)).astype(np.int16)
    folder = write_series('series-i16-implicit-no-geometry', i16, [0, 1, 2, 3], ts=ImplicitVRLittleEndian,
                          instance_order=[3, 1, 4, 2], geometry=False, slope=2, intercept=100)
    volume('series-i16-implicit-no-geometry', folder, f'pydicom {pydicom.__version__}')

    # Single files by pydicom: 8-bit signed and unsigned, MONOCHROME1, float pixel data,
    # deflated and big endian, RLE by pydicom's own encoder.
    singles = [
        ('u8-monochrome1', pattern(1, ROWS, COLS, 0, 255, 3).astype(np.uint8)[0], ExplicitVRLittleEndian,
         dict(photometric='MONOCHROME1')),
        ('i8-signed', pattern(1, ROWS, COLS, -128, 127, 4).astype(np.int8)[0], ExplicitVRLittleEndian, {}),
        ('i16-monochrome1-stored12', pattern(1, ROWS, COLS, -2048, 2047, 5).astype(np.int16)[0],
         ExplicitVRLittleEndian, dict(photometric='MONOCHROME1', bits_stored=12, slope=1.5, intercept=3)),
        ('f32-float-pixel-data', (pattern(1, ROWS, COLS, 0, 1000, 6)[0] / 7.0 - 20).astype(np.float32),
         ExplicitVRLittleEndian, {}),
        ('f64-double-float-pixel-data', (pattern(1, ROWS, COLS, 0, 1000, 7)[0] / 3.0 + 1e-9).astype(np.float64),
         ExplicitVRLittleEndian, {}),
        ('u16-deflated', pattern(1, ROWS, COLS, 0, 65535, 8).astype(np.uint16)[0], DeflatedExplicitVRLittleEndian,
         dict(slope=0.001, intercept=0)),
        ('u16-big-endian', pattern(1, ROWS, COLS, 0, 65535, 9).astype(np.uint16)[0], ExplicitVRBigEndian, {}),
    ]
    for name, arr, ts, kw in singles:
        ds = mr_slice(name, uid(name), 1, arr, ORIGIN, **kw)
        if ts == ExplicitVRBigEndian:
            ds.PixelData = arr.astype('>u2').tobytes()
        path = OUT / f'{name}.dcm'
        save(ds, path, ts)
        volume(name, path, f'pydicom {pydicom.__version__}')

    ds = mr_slice('i16-rle-pydicom', uid('i16-rle-pydicom'), 1, i16[0], ORIGIN, slope=1, intercept=-1024)
    ds.compress(RLELossless)
    path = OUT / 'i16-rle-pydicom.dcm'
    save(ds, path, RLELossless)
    volume('i16-rle-pydicom', path, f'pydicom {pydicom.__version__} (RLE encoder)')

    # 8-bit RLE by DCMTK.
    dcmtk_each(['dcmcrle'], OUT / 'u8-monochrome1.dcm', OUT / 'u8-monochrome1-rle-dcmtk.dcm')
    volume('u8-monochrome1-rle-dcmtk', OUT / 'u8-monochrome1-rle-dcmtk.dcm', tool_version('dcmcrle'))

    # Enhanced MR multi-frame: frames stored out of order, a rescale per frame.
    emr = pattern(4, ROWS, COLS, 0, 3000, 10).astype(np.uint16)
    path = enhanced_mr('enhanced-mr', emr, [0.0, 2.5, 5.0, 7.5], [1, 0.5, 2, 0.25], [0, 10, -10, 5.5], [2, 0, 3, 1])
    volume('enhanced-mr', path, f'pydicom {pydicom.__version__}')
    for label, args in [('rle', ['dcmcrle']), ('deflated', ['dcmconv', '+td']), ('big-endian', ['dcmconv', '+tb']),
                        ('implicit', ['dcmconv', '+ti'])]:
        dst = OUT / f'enhanced-mr-{label}-dcmtk.dcm'
        dcmtk_each(args, path, dst)
        volume(f'enhanced-mr-{label}-dcmtk', dst, f'{tool_version(args[0])} {" ".join(args[1:])}'.strip())

    # A file written by DCMTK from scratch (dump2dcm), not by pydicom.
    raw = pattern(1, ROWS, COLS, 0, 4000, 11).astype('<u2')[0]
    (OUT / 'dump2dcm-pixels.raw').write_bytes(raw.tobytes())
    dump = OUT / 'dump2dcm-source.txt'
    dump.write_text('\n'.join([
        '(0008,0016) UI =MRImageStorage',
        f'(0008,0018) UI [{uid("dump2dcm")}]',
        '(0008,0060) CS [MR]',
        '(0010,0010) PN [Phantom^Invented]',
        '(0010,0020) LO [INVENTED-02]',
        f'(0020,000d) UI [{uid("study")}]',
        f'(0020,000e) UI [{uid("dump2dcm-series")}]',
        '(0020,0013) IS [1]',
        '(0020,0032) DS [10\\-20.5\\7.25]',
        '(0020,0037) DS [1\\0\\0\\0\\1\\0]',
        '(0028,0002) US 1',
        '(0028,0004) CS [MONOCHROME2]',
        f'(0028,0010) US {ROWS}',
        f'(0028,0011) US {COLS}',
        '(0028,0030) DS [0.625\\0.5]',
        '(0028,0100) US 16',
        '(0028,0101) US 16',
        '(0028,0102) US 15',
        '(0028,0103) US 0',
        '(0028,1052) DS [-5]',
        '(0028,1053) DS [0.5]',
        '(0018,0050) DS [4]',
        f'(7fe0,0010) OW ={OUT / "dump2dcm-pixels.raw"}',
    ]) + '\n')
    path = OUT / 'u16-dump2dcm.dcm'
    run('dump2dcm', '+te', '--write-file', str(dump), str(path))
    (OUT / 'dump2dcm-pixels.raw').unlink()
    dump.unlink()
    volume('u16-dump2dcm', path, tool_version('dump2dcm'))

    # Series problems: several series in one folder, a duplicate, a missing slice, uneven spacing.
    mixed = OUT / 'two-series'
    a = write_series('two-series-a', u16[:3], steps5[:3])
    b = write_series('two-series-b', u16[:2], steps5[:2])
    mixed.mkdir()
    for src, prefix in [(a, 'A'), (b, 'B')]:
        for f in sorted(src.iterdir()):
            shutil.move(str(f), mixed / f'{prefix}-{f.name}')
        src.rmdir()
    failures.append({'name': 'two-series', 'path': 'files/two-series', 'words': ['2 series', uid('two-series-a'),
                     uid('two-series-b'), '3 images', '2 images']})
    write_series('duplicate-position', u16[:4], [0.0, 3.3, 3.3, 6.6])
    failures.append({'name': 'duplicate-position', 'path': 'files/duplicate-position', 'words': ['same position', 'IM0001', 'IM0002']})
    write_series('missing-slice', u16[:4], [0.0, 3.3, 9.9, 13.2])
    failures.append({'name': 'missing-slice', 'path': 'files/missing-slice', 'words': ['missing', 'IM0001', 'IM0002', '6.6']})
    folder = write_series('uneven-spacing', u16[:4], [0.0, 3.3, 7.0, 10.3])
    volume('uneven-spacing', folder, f'pydicom {pydicom.__version__}', note='uneven')

    # Compressed syntaxes Veil does not decode: JPEG Lossless SV1 and JPEG-LS by DCMTK.
    src = OUT / 'series-u16-explicit' / 'IM-a'
    run('dcmcjpeg', str(src), str(OUT / 'jpeg-lossless.dcm'))
    failures.append({'name': 'jpeg-lossless', 'path': 'files/jpeg-lossless.dcm',
                     'words': ['1.2.840.10008.1.2.4.70', 'JPEG Lossless', 'dcmdjpeg', 'gdcmconv']})
    run('dcmcjpls', str(src), str(OUT / 'jpeg-ls.dcm'))
    failures.append({'name': 'jpeg-ls', 'path': 'files/jpeg-ls.dcm', 'words': ['1.2.840.10008.1.2.4.80', 'JPEG-LS', 'dcmdjpls']})

    # The uncompressed and RLE fixtures must agree with the data that was written.
    by_name = {v['name']: v for v in volumes}
    for label in ['implicit', 'big-endian', 'deflated', 'rle']:
        assert by_name[f'dcmtk-{label}']['sha256'] == by_name['series-u16-explicit']['sha256'], label
        assert by_name[f'enhanced-mr-{label}-dcmtk']['sha256'] == by_name['enhanced-mr']['sha256'], label
    assert by_name['u8-monochrome1-rle-dcmtk']['sha256'] == by_name['u8-monochrome1']['sha256']

    expected = {
        'generator': {
            'script': 'test/reference/dicom/make_fixtures.py',
            'python': platform.python_version(),
            'pydicom': pydicom.__version__,
            'numpy': np.__version__,
            'dcmtk': tool_version('dcmconv'),
        },
        'volumes': volumes,
        'failures': failures,
    }
    (HERE / 'expected.json').write_text(json.dumps(expected, indent=1) + '\n')
    total = sum(p.stat().st_size for p in OUT.rglob('*') if p.is_file())
    print(f'{len(volumes)} volumes, {len(failures)} refusals, {total} bytes of fixtures', file=sys.stderr)


if __name__ == '__main__':
    main()
