#!/usr/bin/python3
"""Reference values for Veil's blinding-strength check (app/metrics/item-statistics.ts,
app/metrics/blinding-strength.ts), made with NumPy, scikit-image and scikit-learn.

Run from the repository root with Debian's python3 (python3-numpy, python3-skimage, python3-sklearn):
    /usr/bin/python3 test/reference/metrics/make-blinding-fixtures.py
Writes test/reference/metrics/blinding.json and the small invented volumes stats-*.npy;
test/unit/metrics-blinding.test.ts reads them, so CI needs no Python.

- "item_statistics": per invented volume, the statistics as Veil defines them, with NumPy:
  intensities mapped by (v - low) / (high - low), [low, high] = np.percentile(v, [0, 99.5]) (the
  default display window); noise = np.std of the voxels <= skimage.filters.threshold_otsu(v);
  sharpness = (sum of np.diff(v, axis=2)**2 + sum of np.diff(v, axis=1)**2) / v.size; quantiles
  np.percentile(v, [5, 25, 50, 75, 95]) (linear interpolation); all on the mapped scale.
- "classification": invented per-item statistics for 8 cases x 3 methods; the leave-one-case-out
  accuracy of scikit-learn's Pipeline(StandardScaler(), NearestCentroid()) with LeaveOneGroupOut
  (groups = cases), with all statistics and with each alone; and permutation p-values with the
  method labels shuffled within each case by Fisher-Yates on CPython's MT19937 seeded as
  app/blinding/streams.ts does (stream "blinding-strength") and Veil's rejection rule for integers
  below n. The permuted accuracies use the same rule written in NumPy, which the script checks
  against scikit-learn on the observed and the first permuted labels of every dataset.
"""
import hashlib
import json
import os
import platform
import random

import numpy as np
import skimage
import sklearn
from skimage.filters import threshold_otsu
from sklearn.model_selection import LeaveOneGroupOut, cross_val_predict
from sklearn.neighbors import NearestCentroid
from sklearn.pipeline import make_pipeline
from sklearn.preprocessing import StandardScaler

OUT = os.path.join("test", "reference", "metrics")
GENERATOR = "Python %s, NumPy %s, scikit-image %s, scikit-learn %s" % (
    platform.python_version(), np.__version__, skimage.__version__, sklearn.__version__)
STATISTICS = ["noise", "sharpness", "q05", "q25", "q50", "q75", "q95", "rows", "columns", "slices"]
PERMUTATIONS = 399
SEED = 31337

rng = np.random.default_rng(5)


def item_statistics(v):
    v = v.astype(np.float64)
    low, top = np.percentile(v, 0), np.percentile(v, 99.5)
    scale = top - low if top > low else 1.0
    t = threshold_otsu(v)
    background = v[v <= t]
    energy = np.sum(np.diff(v, axis=2) ** 2) + np.sum(np.diff(v, axis=1) ** 2)
    q = (np.percentile(v, [5, 25, 50, 75, 95]) - low) / scale
    return {
        "noise": float(np.std(background) / scale) if background.size > 1 else 0.0,
        "sharpness": float(energy / v.size / scale ** 2),
        "q05": float(q[0]), "q25": float(q[1]), "q50": float(q[2]), "q75": float(q[3]), "q95": float(q[4]),
        "rows": v.shape[1], "columns": v.shape[2], "slices": v.shape[0], "scale": float(top),
    }


def volumes():
    y, x = np.mgrid[0:18, 0:20]
    disc = (((y - 9) / 7.0) ** 2 + ((x - 10) / 8.0) ** 2 <= 1).astype(float)
    out = []
    for name, vol in (
        ("stats-clean", np.stack([disc * 100 + 1.0 * rng.standard_normal(disc.shape) for _ in range(2)])),
        ("stats-noisy", np.stack([disc * 100 + 8.0 * np.abs(rng.standard_normal(disc.shape)) for _ in range(2)])),
        ("stats-ramp", np.stack([disc * np.linspace(20, 400, 20)[None, :] + 3 for _ in range(3)])),
    ):
        vol = vol.astype(np.float32)
        np.save(os.path.join(OUT, f"{name}.npy"), vol)
        out.append({"file": f"{name}.npy", "expected": item_statistics(vol)})
    return out


def stream_for(seed, purpose, name=""):
    digest = hashlib.sha256(f"{purpose}:{name}".encode("utf8")).digest()
    key = [seed % 2**32, seed // 2**32] + [int.from_bytes(digest[4 * i:4 * i + 4], "big") for i in range(4)]
    r = random.Random()
    r.seed(sum(k << (32 * i) for i, k in enumerate(key)))
    return r


def next_below(r, n):
    limit = 2**32 - (2**32 % n)
    while True:
        x = r.getrandbits(32)
        if x < limit:
            return x % n


def loco_accuracy_sklearn(X, labels, groups):
    model = make_pipeline(StandardScaler(), NearestCentroid())
    predicted = cross_val_predict(model, X, labels, groups=groups, cv=LeaveOneGroupOut())
    return float(np.mean(predicted == labels))


def loco_accuracy(X, labels, groups):
    """The same rule in plain NumPy (scikit-learn is slow to refit 10,000 times); checked against
    scikit-learn on the observed and on the first permuted labels of every dataset."""
    correct = 0
    for g in np.unique(groups):
        train, test = groups != g, groups == g
        mean = X[train].mean(axis=0)
        sd = X[train].std(axis=0)
        sd[sd == 0] = 1  # as StandardScaler
        Z = (X - mean) / sd
        classes = np.unique(labels[train])
        centroids = np.array([Z[train][labels[train] == c].mean(axis=0) for c in classes])
        d = ((Z[test][:, None, :] - centroids[None, :, :]) ** 2).sum(axis=2)
        correct += np.sum(classes[np.argmin(d, axis=1)] == labels[test])
    return float(correct / len(labels))


def checked(X, labels, groups):
    a, b = loco_accuracy(X, labels, groups), loco_accuracy_sklearn(X, labels, groups)
    assert abs(a - b) < 1e-12, (a, b)
    return a


def classification(name, items):
    """items: list of dicts case, method, stats (sorted by case, then method, as Veil sorts them)."""
    items = sorted(items, key=lambda i: (i["case"], i["method"]))
    cases = sorted({i["case"] for i in items})
    methods = sorted({i["method"] for i in items})
    groups = np.array([cases.index(i["case"]) for i in items])
    labels = np.array([methods.index(i["method"]) for i in items])
    X = np.array([[i["stats"][s] for s in STATISTICS] for i in items], dtype=float)
    observed = checked(X, labels, groups)
    single = [checked(X[:, [k]], labels, groups) for k in range(len(STATISTICS))]
    r = stream_for(SEED, "blinding-strength")
    at_least, at_least_single = 0, [0] * len(STATISTICS)
    for p_index in range(PERMUTATIONS):
        accuracy = checked if p_index == 0 else loco_accuracy
        permuted = labels.copy()
        for g in range(len(cases)):
            idx = np.nonzero(groups == g)[0]
            block = list(labels[idx])
            for i in range(len(block) - 1, 0, -1):  # Fisher-Yates, as shuffleInPlace
                j = next_below(r, i + 1)
                block[i], block[j] = block[j], block[i]
            permuted[idx] = block
        if accuracy(X, permuted, groups) >= observed - 1e-12:
            at_least += 1
        for k in range(len(STATISTICS)):
            if accuracy(X[:, [k]], permuted, groups) >= single[k] - 1e-12:
                at_least_single[k] += 1
    p = lambda c: (1 + c) / (1 + PERMUTATIONS)
    return {
        "name": name, "items": items, "accuracy": observed, "p_value": p(at_least),
        "single": {s: {"accuracy": single[k], "p_value": p(at_least_single[k])} for k, s in enumerate(STATISTICS)},
    }


def invented_items(noise_by_method, rows_by_method):
    items = []
    for c in range(8):
        for m, base in noise_by_method.items():
            items.append({"case": f"case{c}", "method": m, "stats": {
                "noise": float(base + rng.normal(0, 0.004)),
                "sharpness": float(0.02 + rng.normal(0, 0.005)),
                "q05": float(0.01 + rng.normal(0, 0.002)), "q25": float(0.1 + rng.normal(0, 0.02)),
                "q50": float(0.4 + rng.normal(0, 0.05)), "q75": float(0.7 + rng.normal(0, 0.05)),
                "q95": float(0.9 + rng.normal(0, 0.02)),
                "rows": rows_by_method[m], "columns": 320, "slices": 24,
            }})
    return items


def main():
    fixture = {
        "generator": GENERATOR,
        "seed": SEED,
        "permutations": PERMUTATIONS,
        "statistics": STATISTICS,
        "item_statistics": volumes(),
        "classification": [
            classification("noise gives the methods away",
                           invented_items({"m-a": 0.05, "m-b": 0.02, "m-c": 0.035}, {"m-a": 320, "m-b": 320, "m-c": 320})),
            classification("matrix size gives one method away",
                           invented_items({"m-a": 0.03, "m-b": 0.03, "m-c": 0.03}, {"m-a": 320, "m-b": 320, "m-c": 256})),
            classification("nothing to see",
                           invented_items({"m-a": 0.03, "m-b": 0.03, "m-c": 0.03}, {"m-a": 320, "m-b": 320, "m-c": 320})),
        ],
    }
    with open(os.path.join(OUT, "blinding.json"), "w") as f:
        json.dump(fixture, f, separators=(",", ":"))
        f.write("\n")


if __name__ == "__main__":
    main()
