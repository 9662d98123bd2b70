#!/usr/bin/python3
"""Reference values for Veil's rank correlations and metric-score linkage (app/metrics/rank-correlation.ts,
app/metrics/linkage.ts), made with SciPy and NumPy.

Run from the repository root with Debian's python3 (python3-scipy, python3-numpy):
    /usr/bin/python3 test/reference/metrics/make-linkage-fixtures.py
Writes test/reference/metrics/linkage.json; test/unit/metrics-linkage.test.ts reads it, so CI needs
no Python.

- "correlations": invented (x, y) pairs with and without ties; scipy.stats.spearmanr and
  scipy.stats.kendalltau (tau-b, the default variant). NaN (a constant variable) is written as null.
- "linkage": an invented study (10 cases x 3 methods x 3 readers x 2 questions, one rating missing,
  one metric value missing) and an independent re-implementation of the linkage in Python: item
  scores are reader means; Spearman and Kendall from scipy.stats; within-case concordance by the
  definition in app/metrics/linkage.ts; percentile bootstrap over cases with numpy.percentile
  (linear, i.e. Hyndman & Fan type 7). The bootstrap draws come from CPython's random module, whose
  generator is MT19937 seeded by init_by_array, with the key Veil's app/blinding/streams.ts builds
  ([seed mod 2^32, seed div 2^32, first four big-endian words of SHA-256("metric-linkage:<question>")])
  and the draw rule of app/stats/bootstrap.ts (drawMultiplicities, re-implemented below), so both
  draw the same resamples. Regenerate this fixture if that rule changes.
"""
import hashlib
import json
import math
import os
import platform
import random
import warnings

import numpy as np
import scipy
from scipy import stats

OUT = os.path.join("test", "reference", "metrics", "linkage.json")
GENERATOR = "Python %s, SciPy %s, NumPy %s" % (platform.python_version(), scipy.__version__, np.__version__)
SEED = 4242
RESAMPLES = 300
SPECS = [("psnr", True), ("ssim", True), ("nrmse", False), ("hfen", False)]

warnings.simplefilter("ignore")  # scipy warns on constant input; we record NaN as null


def nan_to_none(v):
    v = float(v)
    return None if math.isnan(v) else v


# ---- correlations -------------------------------------------------------------------------------

def correlation_cases():
    rng = np.random.default_rng(7)
    pairs = [
        ("no ties", [1, 2, 3, 4, 5, 6], [2, 1, 4, 3, 6, 5]),
        ("ties in both", [1, 2, 2, 3, 3, 3, 4], [1, 1, 2, 2, 3, 3, 3]),
        ("reversed", [10.5, 9.1, 8.7, 7.2], [1, 2, 3, 4]),
        ("two points", [1, 2], [5, 3]),
        ("constant y", [1, 2, 3], [4, 4, 4]),
        ("likert and metric", [0.81, 0.83, 0.79, 0.90, 0.90, 0.85, 0.88, 0.70], [3, 3, 2, 5, 4, 4, 5, 1]),
        ("200 with many ties", list(rng.integers(0, 20, 200)), list(rng.integers(1, 6, 200))),
        ("150 continuous", list(rng.normal(size=150)), list(rng.normal(size=150))),
    ]
    out = []
    for name, x, y in pairs:
        x = [float(v) for v in x]
        y = [float(v) for v in y]
        out.append({
            "name": name, "x": x, "y": y,
            "spearman": nan_to_none(stats.spearmanr(x, y).correlation),
            "kendall_tau_b": nan_to_none(stats.kendalltau(x, y).correlation),
        })
    return out


# ---- Veil's random streams, re-implemented -------------------------------------------------------

def stream_for(seed, purpose, name):
    digest = hashlib.sha256(f"{purpose}:{name}".encode("utf8")).digest()
    key = [seed % 2**32, seed // 2**32] + [int.from_bytes(digest[4 * i:4 * i + 4], "big") for i in range(4)]
    r = random.Random()
    r.seed(sum(k << (32 * i) for i, k in enumerate(key)))  # CPython: init_by_array(key)
    return r


def draw_multiplicities(r, n):
    """app/stats/bootstrap.ts drawMultiplicities: n draws from 0..n-1, b = ceil(log2 n) + 1 bits
    each, floor(32 / b) chunks per 32-bit output taken from the high bits down, a chunk accepted
    below the largest multiple of n that fits in b bits."""
    weights = [0] * n
    bits = math.ceil(math.log2(n)) + 1
    assert bits <= 31
    per, span = 32 // bits, 2**bits
    limit, mask = span - span % n, span - 1
    drawn = 0
    while drawn < n:
        x = r.getrandbits(32)
        for c in range(1, per + 1):
            if drawn >= n:
                break
            chunk = (x >> (32 - c * bits)) & mask
            if chunk < limit:
                weights[chunk % n] += 1
                drawn += 1
    return weights


# ---- an invented study ---------------------------------------------------------------------------

def invented_study():
    rng = np.random.default_rng(99)
    cases = [f"case{c:02d}" for c in range(10)]
    methods = ["m-a", "m-b", "m-c"]
    quality = {"m-a": 0.0, "m-b": 1.0, "m-c": 1.6}
    readers = ["R1", "R2", "R3"]
    ratings, table = [], []
    for c in cases:
        case_effect = rng.normal(0, 0.7)
        for m in methods:
            q = quality[m] + rng.normal(0, 0.4)
            table.append({"case": c, "method": m, "values": {
                "psnr": round(24 + 3 * q + 4 * case_effect + rng.normal(0, 1.0), 4),
                "ssim": round(0.80 + 0.04 * q + rng.normal(0, 0.02), 4),
                "nrmse": round(0.30 - 0.05 * q + rng.normal(0, 0.02), 4),
                "hfen": None if (c, m) == ("case03", "m-b") else round(0.5 + rng.normal(0, 0.05), 4),
            }})
            for question, noise in (("sharpness", 0.5), ("noise", 1.0)):
                for k, reader in enumerate(readers):
                    if (c, m, reader, question) == ("case05", "m-c", "R2", "sharpness"):
                        continue  # one missing rating
                    score = int(np.clip(np.round(2.2 + q + 0.5 * case_effect + 0.2 * k + rng.normal(0, noise)), 1, 5))
                    ratings.append({"case": c, "reader": reader, "method": m, "question": question, "score": score})
    return ratings, table


# ---- the linkage, re-implemented -------------------------------------------------------------------

def linkage(ratings, table, question):
    rows = [r for r in ratings if r["question"] == question]
    readers = sorted({r["reader"] for r in rows})
    case_ids = sorted({r["case"] for r in rows})
    values = {(t["case"], t["method"]): t["values"] for t in table}
    cases = []  # per case: list of items (mean score, {reader: score}, {metric: value})
    for c in case_ids:
        items = []
        for m in sorted({r["method"] for r in rows if r["case"] == c}):
            rr = [r for r in rows if r["case"] == c and r["method"] == m]
            v = values.get((c, m), {})
            items.append((np.mean([r["score"] for r in rr]), {r["reader"]: r["score"] for r in rr},
                          {k: (float(v[k]) if v.get(k) is not None else None) for k, _ in SPECS}))
        cases.append(items)

    def score_of(item, which):
        return item[0] if which is None else item[1].get(which)

    def track(weights, metric, higher, which):
        xs, ys, shares, share_w = [], [], 0.0, 0
        sign = 1 if higher else -1
        for w, items in zip(weights, cases):
            if w == 0:
                continue
            usable = [(it[2][metric], score_of(it, which)) for it in items]
            for mv, sv in usable:
                if mv is not None and sv is not None:
                    xs += [mv] * w
                    ys += [sv] * w
            credit, pairs = 0.0, 0
            for i in range(len(usable)):
                for j in range(i + 1, len(usable)):
                    (mi, si), (mj, sj) = usable[i], usable[j]
                    if None in (mi, si, mj, sj) or si == sj:
                        continue
                    pairs += 1
                    dm = sign * (mi - mj)
                    credit += 0.5 if dm == 0 else (1.0 if (dm > 0) == (si > sj) else 0.0)
            if pairs:
                shares += w * credit / pairs
                share_w += w
        rho = stats.spearmanr(xs, ys).correlation if len(xs) >= 2 else math.nan
        tau = stats.kendalltau(xs, ys).correlation if len(xs) >= 2 else math.nan
        conc = shares / share_w if share_w else math.nan
        return [float(rho), float(tau), conc]

    sets = [None] + readers

    def evaluate(weights):
        vals, key = {}, []
        for metric, higher in SPECS:
            for which in sets:
                vals[(metric, which)] = track(weights, metric, higher, which)
            key.append(vals[(metric, None)][2])  # rank by within-case concordance
        defined = [k for k in key if not math.isnan(k)]
        ranks = [len(defined) + 1 if math.isnan(k) else 1 + sum(1 for u in defined if u > k) for k in key]
        return vals, ranks

    point, point_ranks = evaluate([1] * len(cases))
    r = stream_for(SEED, "metric-linkage", question)
    boot = []
    for _ in range(RESAMPLES):
        boot.append(evaluate(draw_multiplicities(r, len(cases))))

    def interval(samples):
        s = np.array([v for v in samples if not math.isnan(v)])
        if len(s) < 2:
            return None
        return [float(np.percentile(s, 2.5)), float(np.percentile(s, 97.5))]

    out = []
    for mi, (metric, higher) in enumerate(SPECS):
        entry = {"metric": metric, "rank": point_ranks[mi], "rank_interval": interval([b[1][mi] for b in boot]), "sets": {}}
        for which in sets:
            p = point[(metric, which)]
            entry["sets"][which or "mean"] = {
                name: {"value": nan_to_none(p[k]),
                       "ci95": interval([b[0][(metric, which)][k] for b in boot]) if not math.isnan(p[k]) else None}
                for k, name in enumerate(["spearman", "kendall", "concordance"])
            }
        out.append(entry)
    return out


def main():
    ratings, table = invented_study()
    fixture = {
        "generator": GENERATOR,
        "correlations": correlation_cases(),
        "linkage": {
            "seed": SEED, "resamples": RESAMPLES, "rank_by": "concordance",
            "ratings": ratings, "table": table,
            "questions": {q: linkage(ratings, table, q) for q in ("noise", "sharpness")},
        },
    }
    with open(OUT, "w") as f:
        json.dump(fixture, f, indent=None, separators=(",", ":"))
        f.write("\n")


if __name__ == "__main__":
    main()
