"""Writes expected.json for Veil's display-policy arithmetic (app/images/resample.ts,
app/blinding/display-scale.ts), computed by general-purpose reference libraries.

Run from the repository root:  /usr/bin/python3 test/reference/display/make_fixtures.py
Needs numpy and scikit-image (Debian python3-numpy, python3-skimage). The values are invented.

- resample: skimage.transform.resize(order=1, mode='edge', anti_aliasing=False, preserve_range=True)
  of a float32 (slices, rows, columns) volume to other rows and columns, slices unchanged;
- percentile: numpy.percentile (default 'linear' method) of a float32 sample;
- least squares: numpy.polyfit(x, y, 1) of float32 samples.
"""
import json
import platform
from pathlib import Path

import numpy as np
import skimage
from skimage.transform import resize

HERE = Path(__file__).resolve().parent


def main():
    rng = np.random.RandomState(7)
    volume = (rng.standard_normal((3, 7, 9)) * 40 + np.arange(9) * 5 + 100).astype(np.float32)
    resampled = []
    for rows, cols in [(12, 5), (4, 16), (7, 18), (14, 9)]:
        out = resize(volume, (3, rows, cols), order=1, mode='edge', anti_aliasing=False, preserve_range=True)
        resampled.append({'rows': rows, 'columns': cols, 'values': out.astype(np.float32).ravel().tolist()})

    sample = (rng.gamma(2.0, 50.0, size=1001)).astype(np.float32)
    sample[::97] = -3.5  # a few negative values
    ps = [0, 0.5, 1, 50, 99, 99.5, 100]
    percentiles = [float(np.percentile(sample, p)) for p in ps]

    x = (rng.standard_normal(500) * 10 + 50).astype(np.float32)
    y = (2.5 * x - 7 + rng.standard_normal(500)).astype(np.float32)
    slope, intercept = np.polyfit(x.astype(np.float64), y.astype(np.float64), 1)

    out = {
        'generator': {
            'script': 'test/reference/display/make_fixtures.py',
            'python': platform.python_version(),
            'numpy': np.__version__,
            'skimage': skimage.__version__,
        },
        'resample': {'shape': list(volume.shape), 'input': volume.ravel().tolist(), 'outputs': resampled},
        'percentile': {'sample': sample.tolist(), 'p': ps, 'values': percentiles},
        'leastSquares': {'x': x.tolist(), 'y': y.tolist(), 'slope': float(slope), 'intercept': float(intercept)},
    }
    (HERE / 'expected.json').write_text(json.dumps(out) + '\n')


if __name__ == '__main__':
    main()
