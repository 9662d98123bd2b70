"""Reference 2D DFT for Veil's demo simulator: numpy.fft.fft2 with norm='ortho' (unitary) of a
small seeded complex 8 x 4 image. Run: /usr/bin/python3 make-fixture.py > fft2-ortho.json"""
import json
import sys

import numpy as np

rng = np.random.default_rng(7)
x = rng.standard_normal((8, 4)) + 1j * rng.standard_normal((8, 4))
k = np.fft.fft2(x, norm="ortho")
inter = lambda a: [float(v) for z in a.ravel() for v in (z.real, z.imag)]
print(json.dumps({"generator": f"numpy {np.__version__}, Python {sys.version.split()[0]}", "rows": 8, "columns": 4,
                  "input": inter(x), "fft2_ortho": inter(k)}))
