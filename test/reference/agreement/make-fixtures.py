#!/usr/bin/python3
"""Veil reference fixtures for app/stats/fleiss-kappa.ts, made with statsmodels' fleiss_kappa.

Run from the repository root with Debian's python3 (which has python3-statsmodels):
    /usr/bin/python3 test/reference/agreement/make-fixtures.py
Writes test/reference/agreement/fleiss-*.json. The Vitest tests read those JSON files, so CI needs
neither Python nor statsmodels.

Fixtures
- fleiss-diagnoses.json: Fleiss (1971) 30 patients x 6 psychiatrists x 5 diagnoses. R's irr package
  ships it as `diagnoses`, but irr is not installable here (no r-cran-irr in Debian). statsmodels'
  own test suite carries a copy of irr's `diagnoses` (statsmodels/stats/tests/test_inter_rater.py,
  array `diagnoses`, with the comment "Fleiss has only the transformed table": the paper prints
  counts per category, the rater-by-rater layout is irr's). We import that array from the installed
  statsmodels rather than typing it in, and record irr's kappam.fleiss value that the same test file
  quotes (0.4302445).
- fleiss-counts-wikipedia.json: the 10 subjects x 14 raters x 5 categories count table of the
  Wikipedia article "Fleiss' kappa", as carried in the same statsmodels test file (`table0`, with
  the article's per-subject agreement P_i in its last column, and kappa 0.210 in test_fleiss_kappa).
- fleiss-random.json: a random 50 subjects x 4 raters table on a 1..5 scale with a few missing
  ratings; statsmodels computes kappa on the complete rows.
"""
import json
import os
import platform
import re

import numpy as np
import statsmodels
from statsmodels.stats.inter_rater import aggregate_raters, fleiss_kappa
from statsmodels.stats.tests import test_inter_rater as sm_tests

OUT = os.path.join("test", "reference", "agreement")
GENERATOR = "Python %s, statsmodels %s, numpy %s" % (
    platform.python_version(), statsmodels.__version__, np.__version__)


def write(name, fixture):
    path = os.path.join(OUT, name)
    text = json.dumps(fixture, indent=2)
    # one matrix row per line: fold the innermost lists of numbers/nulls
    text = re.sub(r"\[\s+([-0-9.e, \nnul]+?)\s+\]",
                  lambda m: "[" + re.sub(r"\s+", " ", m.group(1)) + "]", text)
    json.loads(text)  # still valid JSON
    with open(path, "w") as f:
        f.write(text + "\n")
    print("wrote", path)


def kappa_of_ratings(ratings, categories):
    """statsmodels on the complete rows of a subjects x raters matrix (None = missing)."""
    complete = np.array([row for row in ratings if all(v is not None for v in row)], dtype=float)
    counts, cats = aggregate_raters(complete, n_cat=None)
    # aggregate_raters only makes columns for observed categories; add the unused ones as zeros.
    full = np.zeros((counts.shape[0], len(categories)))
    for ci, c in enumerate(cats):
        full[:, categories.index(int(c))] = counts[:, ci]
    return float(fleiss_kappa(full, method="fleiss")), full, int(complete.shape[0])


# 1. Fleiss (1971) diagnoses
diag = sm_tests.diagnoses.astype(int).tolist()
k_diag, counts_diag, n_diag = kappa_of_ratings(diag, [1, 2, 3, 4, 5])
write("fleiss-diagnoses.json", {
    "generator": GENERATOR,
    "call": "statsmodels.stats.inter_rater.fleiss_kappa(aggregate_raters(diagnoses)[0], method='fleiss')",
    "source": "Fleiss (1971) Psychological Bulletin 76:378-382, 30 patients x 6 psychiatrists x 5 diagnoses; "
              "rater layout of R irr's `diagnoses` as copied into statsmodels/stats/tests/test_inter_rater.py",
    "categories": [1, 2, 3, 4, 5],
    "ratings": diag,
    "counts": counts_diag.astype(int).tolist(),
    "subjects": n_diag,
    "raters": 6,
    "kappa": k_diag,
    "kappa_irr_kappam_fleiss": 0.4302445,
    "kappa_irr_note": "R irr::kappam.fleiss(diagnoses) output as recorded in statsmodels' test_fleiss_kappa_irr",
    "kappa_published": 0.430,
    "kappa_published_note": "Fleiss (1971) value .430 as quoted in the Veil brief (from memory); the paper itself was not consulted here",
})

# 2. Wikipedia count table
table0 = sm_tests.table0
counts_wp = table0[:, 1:-1]
write("fleiss-counts-wikipedia.json", {
    "generator": GENERATOR,
    "call": "statsmodels.stats.inter_rater.fleiss_kappa(table1, method='fleiss')",
    "source": "Wikipedia 'Fleiss' kappa' worked example (10 subjects x 14 raters x 5 categories), "
              "as carried in statsmodels/stats/tests/test_inter_rater.py (table0, table1)",
    "counts": counts_wp.astype(int).tolist(),
    "perSubjectAgreement_published": table0[:, -1].tolist(),
    "kappa_published": 0.210,
    "kappa": float(fleiss_kappa(counts_wp, method="fleiss")),
})

# 3. Random ratings with missing values
rng = np.random.default_rng(20240611)
n_sub, n_rat = 50, 4
truth = rng.integers(1, 6, size=n_sub)
ratings = []
for i in range(n_sub):
    row = []
    for j in range(n_rat):
        # each rater agrees with the case's "true" category 60% of the time, else a neighbour or random
        u = rng.random()
        if u < 0.6:
            v = int(truth[i])
        elif u < 0.85:
            v = int(min(5, max(1, truth[i] + rng.choice([-1, 1]))))
        else:
            v = int(rng.integers(1, 6))
        row.append(v)
    ratings.append(row)
for (i, j) in [(3, 1), (17, 0), (17, 2), (41, 3)]:
    ratings[i][j] = None
k_rand, counts_rand, n_rand = kappa_of_ratings(ratings, [1, 2, 3, 4, 5])
write("fleiss-random.json", {
    "generator": GENERATOR,
    "call": "statsmodels.stats.inter_rater.fleiss_kappa(counts of complete rows, method='fleiss')",
    "source": "random: numpy default_rng(20240611), 50 subjects x 4 raters, categories 1..5, 3 incomplete rows",
    "categories": [1, 2, 3, 4, 5],
    "ratings": ratings,
    "counts": counts_rand.astype(int).tolist(),
    "subjects": n_rand,
    "raters": n_rat,
    "kappa": k_rand,
})
