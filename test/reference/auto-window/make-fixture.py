#!/usr/bin/python3
"""Reference percentiles for the reading room's automatic window (renderer/src/viewer/percentile-window.ts).

Nearest-rank percentiles, NumPy's method='inverted_cdf' (Hyndman & Fan 1996, definition 1), of
small uint16 samples shaped like display images: a background of zeros, a skewed body, a few
bright outliers. Run with Debian's python3 (NumPy installed): /usr/bin/python3 make-fixture.py
"""
import json
import numpy as np

rng = np.random.default_rng(20240611)
cases = {
    "uniform": rng.integers(0, 4001, size=997),
    "background-and-body": np.concatenate([np.zeros(600, dtype=np.int64), rng.gamma(4.0, 300.0, size=390).astype(np.int64), [65535] * 10]),
    "tiny": np.array([7, 3, 3, 9, 1000]),
}
out = {"tool": f"NumPy {np.__version__}, numpy.percentile(method='inverted_cdf')", "cases": []}
for name, values in cases.items():
    values = np.clip(values, 0, 65535).astype(np.uint16)
    rng.shuffle(values)
    out["cases"].append({
        "name": name,
        "values": values.tolist(),
        "p1": int(np.percentile(values, 1, method="inverted_cdf")),
        "p99": int(np.percentile(values, 99, method="inverted_cdf")),
        "p50": int(np.percentile(values, 50, method="inverted_cdf")),
    })
with open("percentiles.json", "w") as f:
    json.dump(out, f, indent=None, separators=(",", ":"))
    f.write("\n")
