"""Writes the .npy fixtures of Veil's NumPy reader and writer tests, and expected.json.

Run from anywhere:  python3 test/reference/npy/make_fixtures.py
The files are committed, so the tests need no Python. expected.json records the numpy and
Python versions that wrote them. Values are invented; nothing here comes from a scan.

- read[]:  files for readNpy, one per dtype and byte order, Fortran order, format versions.
           `values` is the array as NumPy sees it, flattened in C order and cast to float32
           (complex: magnitude, computed in float64 then cast), i.e. what a Volume must hold.
- write[]: files saved by np.save; writeNpy given `values` and `shape` must produce the same bytes.
- unsupported: a text array, which readNpy must refuse.
"""
import io
import json
import platform
import sys
from pathlib import Path

import numpy as np

HERE = Path(__file__).resolve().parent

# Twelve values per dtype, shape (2, 2, 3); each set reaches the edges of its type.
DTYPE_VALUES = {
    'f4': [0.0, 1.5, -2.25, 0.1, 3.4e38, -1e-38, 1e-45, 65504.0, -0.0, 123456.789, -7.0, 1 / 3],
    'f8': [0.0, 0.1, -1e-300, 1e30, 2.5, -3.75, 1 / 3, 1e-40, 16777217.0, -123.456, 7.0, 8.0],
    'i2': [-32768, 32767, 0, -1, 1, 1000, -1000, 12345, -12345, 2, 3, 4],
    'u2': [0, 65535, 1, 256, 4095, 1000, 2, 3, 4, 5, 6, 40000],
    'i4': [-2147483648, 2147483647, 0, -1, 16777217, 123456789, -5, 6, 7, 8, 9, 10],
    'u1': [0, 255, 1, 128, 127, 2, 3, 4, 5, 6, 7, 8],
    'i1': [-128, 127, 0, -1, 1, 2, 3, 4, 5, 6, 7, 8],
    'c8': [3 + 4j, 0j, -1j, 1.5 - 2j, 1e-3 + 1e-3j, 5 + 12j, -8 + 15j, 0.1 + 0.2j, 1e10 + 0j, 7j, -2 - 2j, 1 + 1j],
    'c16': [3 + 4j, 0j, -1j, 1.5 - 2j, 1e-3 + 1e-3j, 5 + 12j, 1e20 + 1e20j, 0.1 + 0.2j, -1e-5j, 7j, -2 - 2j, 1 + 1j],
}


def as_volume_values(a):
    """What a Volume holds: C-order float32 values, complex as magnitude."""
    if np.iscomplexobj(a):
        a = np.abs(a.astype(np.complex128))
    return np.ascontiguousarray(a).astype(np.float32).ravel(order='C').tolist()


def header_of(path):
    with open(path, 'rb') as f:
        version = np.lib.format.read_magic(f)
        # Versions 2.0 and 3.0 share the header layout (3.0 allows UTF-8 text, unused here).
        read_header = np.lib.format.read_array_header_1_0 if version == (1, 0) else np.lib.format.read_array_header_2_0
        shape, fortran, dtype = read_header(f)
    return version, shape, fortran, dtype


def save(name, array, version=None):
    path = HERE / name
    with open(path, 'wb') as f:
        if version is None:
            np.save(f, array)
        else:
            np.lib.format.write_array(f, array, version=version)
    version, shape, fortran, dtype = header_of(path)
    back = np.load(path)
    assert np.array_equal(back, array) and back.dtype == array.dtype
    return {
        'file': name,
        'descr': dtype.str,
        'fortran_order': fortran,
        'version': f'{version[0]}.{version[1]}',
        'shape': list(shape),
        'values': as_volume_values(array),
    }


def main():
    for old in HERE.glob('*.npy'):
        old.unlink()
    read = []
    for code, values in DTYPE_VALUES.items():
        orders = ['|'] if code in ('u1', 'i1') else ['<', '>']
        for order in orders:
            a = np.array(values, dtype=np.dtype(order + code)).reshape(2, 2, 3)
            suffix = {'|': '', '<': '-le', '>': '-be'}[order]
            read.append(save(f'dtype-{code}{suffix}.npy', a))

    grid = np.arange(24, dtype=np.float32).reshape(2, 3, 4) * 1.5 - 7
    read.append(save('order-f-3d.npy', np.asfortranarray(grid)))
    plane = ((np.arange(15).reshape(3, 5) - 4) / 8).astype('>f8')
    read.append(save('order-f-2d-be.npy', np.asfortranarray(plane)))
    read.append(save('order-c-2d.npy', (np.arange(15, dtype='<i2').reshape(3, 5) - 7) * 1000))
    read.append(save('version-2.npy', np.arange(6, dtype='<f4').reshape(2, 3) / 4, version=(2, 0)))
    read.append(save('version-3-be.npy', (np.arange(12).reshape(2, 2, 3) * 5000).astype('>u2'), version=(3, 0)))
    for entry in read:
        assert entry['fortran_order'] == entry['file'].startswith('order-f'), entry['file']
        assert entry['descr'][0] == ('>' if entry['file'].endswith('-be.npy') else '<' if entry['descr'][1:] not in ('u1', 'i1') else '|'), entry

    write = []
    for name, kind, array in [
        ('written-f4.npy', 'Float32Array', np.arange(24, dtype='<f4').reshape(2, 3, 4) * 0.25 - 3),
        ('written-i2.npy', 'Int16Array', np.array([-32768, -1, 0, 1, 32767, 5, 6, 7, 8, 9, 10, 11, 12, 13, 14], dtype='<i2').reshape(3, 5)),
        ('written-u2.npy', 'Uint16Array', (np.arange(20, dtype='<u2') * 3000).reshape(10, 1, 2)),
        ('written-u1.npy', 'Uint8Array', np.array([0, 1, 128, 255], dtype='|u1')),
    ]:
        np.save(HERE / name, array)
        write.append({'file': name, 'type': kind, 'shape': list(array.shape), 'values': array.ravel().tolist()})

    np.save(HERE / 'unsupported-text.npy', np.array([['ab', 'c'], ['d', 'e']]))
    unsupported = {'file': 'unsupported-text.npy', 'descr': header_of(HERE / 'unsupported-text.npy')[3].str}

    expected = {
        'generator': {
            'script': 'test/reference/npy/make_fixtures.py',
            'numpy': np.__version__,
            'python': platform.python_version(),
            'byteorder_of_machine': sys.byteorder,
        },
        'read': read,
        'write': write,
        'unsupported': unsupported,
    }
    # One fixture a line keeps the file short and its diffs readable.
    lines = ['{', f' "generator": {json.dumps(expected["generator"])},']
    for key in ('read', 'write'):
        lines.append(f' "{key}": [')
        lines.append(',\n'.join(f'  {json.dumps(e)}' for e in expected[key]))
        lines.append(' ],')
    lines.append(f' "unsupported": {json.dumps(unsupported)}')
    lines.append('}')
    text = '\n'.join(lines) + '\n'
    assert json.loads(text) == expected
    (HERE / 'expected.json').write_text(text)


if __name__ == '__main__':
    main()
