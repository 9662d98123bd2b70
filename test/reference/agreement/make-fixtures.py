#!/usr/bin/python3
"""Veil reference fixtures for app/stats/ (agreement), made with statsmodels, scipy and NLTK.

Run from the repository root with Debian's python3 (python3-statsmodels, python3-scipy and
python3-nltk, all Debian packages; `apt-get install python3-nltk` if it is missing):
    /usr/bin/python3 test/reference/agreement/make-fixtures.py
    Rscript test/reference/agreement/make-fixtures.R      # afterwards: reads agreement-sets.json
Writes test/reference/agreement/fleiss-*.json, agreement-sets.json and published-examples.json.
The Vitest tests read those JSON files, so CI needs neither Python nor these libraries.

agreement-sets.json: invented rating sets (numpy default_rng, seeds below), cases x readers on a
1..points Likert scale, some with missing ratings and unbalanced designs (a reader who scored only
part of the cases). For each set:
- statsmodels.stats.inter_rater.cohens_kappa per reader pair on the cases both scored (pairwise
  deletion): unweighted, linear and quadratic weights on the scale values 1..points, kappa and
  std_kappa (the Fleiss-Cohen-Everitt 1969 asymptotic standard error) and the normal 95% limits;
- statsmodels fleiss_kappa on the complete cases, categories 1..points;
- scipy.stats.friedmanchisquare on the complete cases (readers are blocks, cases treatments),
  with its tie correction; Kendall's W = chi2 / (m (n - 1));
- NLTK AnnotationTask.alpha (Krippendorff's alpha; units with fewer than two values are skipped,
  as alpha defines) with binary_distance (nominal) and interval_distance (interval). NLTK has no
  ordinal metric: for "ordinal" we hand NLTK the ordinal difference function of Krippendorff
  (2011), delta(c,k) = (sum of n_g for g from c to k - (n_c + n_k)/2)^2 with n_g the pooled
  pairable values; that function is written here, the rest of the computation is NLTK's.

published-examples.json: data of published worked examples, typed in from the sources named with
each, the values those sources print, and what the libraries above give on the same data.

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

import nltk
import numpy as np
import scipy
import statsmodels
from nltk.metrics.agreement import AnnotationTask
from nltk.metrics.distance import binary_distance, interval_distance
from scipy.stats import friedmanchisquare
from statsmodels.stats.inter_rater import aggregate_raters, cohens_kappa, fleiss_kappa
from statsmodels.stats.tests import test_inter_rater as sm_tests

OUT = os.path.join("test", "reference", "agreement")
GENERATOR = "Python %s, statsmodels %s, numpy %s" % (
    platform.python_version(), statsmodels.__version__, np.__version__)
GENERATOR_ALL = "Python %s, statsmodels %s, scipy %s, nltk %s, numpy %s" % (
    platform.python_version(), statsmodels.__version__, scipy.__version__, nltk.__version__, np.__version__)


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


# ---- 4. invented rating sets: Cohen pairs, Fleiss, Kendall's W, Krippendorff's alpha --------------

def likert_set(seed, cases, readers, points, bias, noise, missing=(), spread=1.0, centre=None):
    """Latent case truth + reader bias + noise, rounded and clipped to 1..points; None = missing."""
    rng = np.random.default_rng(seed)
    centre = (points + 1) / 2 if centre is None else centre
    truth = rng.normal(centre, spread, size=cases)
    x = []
    for i in range(cases):
        row = []
        for j in range(readers):
            v = int(np.clip(np.rint(truth[i] + bias[j] + rng.normal(0, noise)), 1, points))
            row.append(v)
        x.append(row)
    for (i, j) in missing:
        x[i][j] = None
    return x


def random_missing(seed, cases, readers, share):
    rng = np.random.default_rng(seed)
    return [(i, j) for i in range(cases) for j in range(readers) if rng.random() < share]


def pair_kappas(x, points):
    m = len(x[0])
    cats = np.arange(1, points + 1)
    out = []
    for a in range(m):
        for b in range(a + 1, m):
            both = [(row[a], row[b]) for row in x if row[a] is not None and row[b] is not None]
            table = np.zeros((points, points))
            for (u, v) in both:
                table[u - 1, v - 1] += 1
            res = {}
            for name, kw in [("unweighted", {}), ("linear", {"weights": cats, "wt": "linear"}),
                             ("quadratic", {"weights": cats, "wt": "quadratic"})]:
                r = cohens_kappa(table, **kw)
                res[name] = {"value": float(r.kappa), "se": float(r.std_kappa),
                             "ci95": [float(r.kappa_low), float(r.kappa_upp)]}
            out.append({"readers": [a, b], "n": len(both), **res})
    return out


def ordinal_distance_for(values_by_unit, points):
    """Krippendorff's (2011) ordinal difference, from the pooled pairable values."""
    n = np.zeros(points + 1)
    for vals in values_by_unit:
        if len(vals) >= 2:
            for v in vals:
                n[v] += 1

    def delta(c, k):
        lo, hi = min(c, k), max(c, k)
        return (n[lo:hi + 1].sum() - (n[c] + n[k]) / 2) ** 2
    return delta


def nltk_alpha(x, points):
    data = [(str(j), str(i), v) for i, row in enumerate(x) for j, v in enumerate(row) if v is not None]
    units = [[v for v in row if v is not None] for row in x]
    return {
        "nominal": float(AnnotationTask(data=data, distance=binary_distance).alpha()),
        "interval": float(AnnotationTask(data=data, distance=interval_distance).alpha()),
        "ordinal": float(AnnotationTask(data=data, distance=ordinal_distance_for(units, points)).alpha()),
    }


def kendall_w_scipy(x):
    complete = np.array([row for row in x if all(v is not None for v in row)], dtype=float)
    n, m = complete.shape
    chi2, p = friedmanchisquare(*complete)  # one sample per case, each over the m readers
    return {"cases": int(n), "readers": int(m), "chi2": float(chi2), "p": float(p), "df": int(n - 1),
            "value": float(chi2 / (m * (n - 1)))}


def fleiss_complete(x, points):
    complete = [row for row in x if all(v is not None for v in row)]
    counts = np.zeros((len(complete), points))
    for i, row in enumerate(complete):
        for v in row:
            counts[i, v - 1] += 1
    return {"cases": len(complete), "value": float(fleiss_kappa(counts, method="fleiss"))}


SETS = [
    ("likert5-complete", "30 cases x 4 readers, 1..5, complete; default_rng(601)",
     5, likert_set(601, 30, 4, 5, bias=[-0.3, 0, 0.2, 0.5], noise=0.7)),
    ("likert5-missing-unbalanced", "40 cases x 5 readers, 1..5; about 10% missing at random and reader 5 "
     "scored only cases 1-20; default_rng(602), missing default_rng(603)",
     5, likert_set(602, 40, 5, 5, bias=[0, 0.4, -0.2, 0.1, 0.3], noise=0.8,
                   missing=random_missing(603, 40, 5, 0.10) + [(i, 4) for i in range(20, 40)])),
    ("likert4-dominant", "36 cases x 3 readers, 1..4, most ratings 4 (high agreement, skewed margins), "
     "3 missing; default_rng(604)",
     4, likert_set(604, 36, 3, 4, bias=[0, -0.1, 0.1], noise=0.45, spread=0.5, centre=3.9,
                   missing=[(2, 0), (11, 2), (30, 1)])),
    ("two-readers-missing", "50 cases x 2 readers, 1..5, 6 missing; default_rng(605)",
     5, likert_set(605, 50, 2, 5, bias=[0.2, -0.2], noise=0.9,
                   missing=[(0, 0), (7, 1), (13, 0), (21, 1), (34, 1), (48, 0)])),
    ("likert7-sparse", "25 cases x 6 readers, 1..7 with the ends rarely used, 5 missing; default_rng(606)",
     7, likert_set(606, 25, 6, 7, bias=[0, 0.3, -0.3, 0.6, -0.1, 0.2], noise=0.6, spread=0.9,
                   missing=[(1, 5), (4, 2), (9, 0), (17, 3), (22, 5)])),
]

sets = []
for name, source, points, x in SETS:
    sets.append({
        "name": name,
        "source": "invented: " + source,
        "points": points,
        "ratings": x,
        "cohen_pairs_statsmodels": pair_kappas(x, points),
        "fleiss_statsmodels": fleiss_complete(x, points),
        "kendall_w_scipy": kendall_w_scipy(x),
        "krippendorff_alpha_nltk": nltk_alpha(x, points),
    })
write("agreement-sets.json", {
    "generator": GENERATOR_ALL,
    "calls": {
        "cohen": "statsmodels cohens_kappa(table); cohens_kappa(table, weights=1..points, wt='linear'|'quadratic')",
        "fleiss": "statsmodels fleiss_kappa(counts of complete rows over 1..points, method='fleiss')",
        "kendall_w": "scipy.stats.friedmanchisquare(*complete_rows); W = chi2 / (m (n - 1))",
        "alpha": "nltk AnnotationTask(data=(coder, item, label), distance=binary_distance | interval_distance | ordinal).alpha()",
    },
    "sets": sets,
})


# ---- 5. published worked examples ----------------------------------------------------------------

def counts_of(x, categories):
    return [[sum(1 for v in row if v == c) for c in categories] for row in x]


# Krippendorff (2011), "Computing Krippendorff's Alpha-Reliability", reliability data with missing
# values: 4 observers x 12 units. Data as in that paper, copied here from the R package
# jucor/krippendorff (data-raw/mwebreliability5.R) and the Python package fast-krippendorff's tests.
K2011 = [[1, 1, None, 1], [2, 2, 3, 2], [3, 3, 3, 3], [3, 3, 3, 3], [2, 2, 2, 2], [1, 2, 3, 4],
         [4, 4, 4, 4], [1, 1, 2, 1], [2, 2, 2, 2], [None, 5, 5, 5], [None, None, 1, 1], [None, None, 3, None]]
# A second example: 3 coders x 15 units (units x coders here), used in fast-krippendorff's tests.
K3X15 = [list(r) for r in zip(
    [None, None, None, None, None, 3, 4, 1, 2, 1, 1, 3, 3, None, 3],
    [1, None, 2, 1, 3, 3, 4, 3, None, None, None, None, None, None, None],
    [None, None, 2, 1, 3, 4, 4, None, 2, 1, 1, 3, 3, None, 4])]
K3X15 = [r for r in K3X15]
# Gwet (2014) Handbook, 5 observers x 15 units on 0..3 (irrCAC's raw_5observers).
GWET_5OBS = [list(r) for r in zip(
    [1, 1, 2, None, 0, 0, 1, 1, 2, 2, None, 0, 1, 3, 1],
    [1, 1, 3, 0, 0, 0, 0, None, 2, 1, 1, 0, 2, 3, 1],
    [2, 0, 3, 0, 0, 0, 2, 2, 2, 1, 0, 0, 2, 2, 1],
    [None, 1, 3, None, None, None, None, 0, None, 1, 0, 0, 2, 2, None],
    [2, None, None, 0, 0, 0, 1, None, 2, None, None, None, None, 3, 1])]
# Cohen (1968): proportions of 200 cases, and Cohen's disagreement weights.
COHEN1968 = [[0.44, 0.07, 0.09], [0.05, 0.20, 0.05], [0.01, 0.03, 0.06]]
COHEN1968_V = [[0, 1, 3], [1, 0, 6], [3, 6, 0]]
# SAS PROC FREQ example table (3 x 3) with SAS's printed kappa, ASE and limits, as quoted in
# statsmodels/stats/tests/test_inter_rater.py (table10, res10_sas, res10w_sas).
SAS_TABLE = [[0, 4, 1], [0, 8, 0], [0, 1, 5]]


def sm_kappa(table, **kw):
    r = cohens_kappa(np.asarray(table, float), **kw)
    return {"value": float(r.kappa), "se": float(r.std_kappa), "ci95": [float(r.kappa_low), float(r.kappa_upp)]}


cohen_table = (np.asarray(COHEN1968) * 200).tolist()
write("published-examples.json", {
    "generator": GENERATOR_ALL,
    "krippendorff_2011": {
        "source": "Krippendorff, K. (2011). Computing Krippendorff's Alpha-Reliability, reliability data example "
                  "(4 observers x 12 units, values 1-5, missing values); data as copied in jucor/krippendorff "
                  "data-raw/mwebreliability5.R and pln-fing-udelar/fast-krippendorff tests/test_krippendorff.py",
        "ratings": K2011,
        "published": {"nominal": 0.743, "ordinal": 0.815, "interval": 0.849},
        "published_note": "ordinal 0.815 as asserted in fast-krippendorff's tests; nominal 0.743 and interval 0.849 "
                          "from memory of Krippendorff (2011), confirmed by NLTK below",
        "nltk": nltk_alpha(K2011, 5),
        "gwet_irrcac": {"ac1": 0.77544, "ac1_se": 0.14295, "ac1_ci95": [0.46081, 1], "pa": 0.81818, "pe": 0.19032,
                        "ac2_quadratic": 0.914, "ac2_quadratic_se": 0.104, "ac2_quadratic_ci95": [0.685, 1],
                        "ac2_quadratic_pa": 0.975, "ac2_quadratic_pe": 0.714},
        "gwet_irrcac_source": "irrCAC (Python port of Gwet's R package irrCAC), irrCAC/raw.py docstring (AC1, 5 decimals) and "
                              "test/unit/irrCAC/raw/test_gwet.py (quadratic AC2, 3 decimals) on raw_4raters = this table "
                              "(Gwet 2014 Handbook, p. 120)",
    },
    "krippendorff_3x15": {
        "source": "3 coders x 15 units with missing values (Krippendorff's example as used in "
                  "pln-fing-udelar/fast-krippendorff tests/test_krippendorff.py)",
        "ratings": K3X15,
        "published": {"nominal": 0.691358, "interval": 0.810845},
        "nltk": nltk_alpha(K3X15, 4),
    },
    "gwet_5_observers": {
        "source": "Gwet, K. L. (2014). Handbook of Inter-Rater Reliability, 4th ed., 5 observers x 15 units on 0..3 "
                  "(irrCAC raw_5observers); values from irrCAC test/unit/irrCAC/raw/test_gwet.py",
        "categories": [0, 1, 2, 3],
        "ratings": GWET_5OBS,
        "published": {"ac1": 0.497, "se": 0.122, "ci95": [0.235, 0.758], "pa": 0.616, "pe": 0.236},
    },
    "cohen_1968": {
        "source": "Cohen, J. (1968). Weighted kappa, Psychological Bulletin 70:213-220: proportions of 200 cases and "
                  "Cohen's disagreement weights; published kappa .492 and weighted kappa .348 as quoted in R psych's "
                  "cohen.kappa help page (example 'data matrix taken from Cohen')",
        "table": cohen_table,
        "disagreement_weights": COHEN1968_V,
        "published": {"kappa": 0.492, "weighted": 0.348},
        "statsmodels": {"unweighted": sm_kappa(cohen_table),
                        "weighted": sm_kappa(cohen_table, weights=np.asarray(COHEN1968_V, float))},
    },
    "sas_table": {
        "source": "SAS PROC FREQ AGREE printout for a 3 x 3 table, as quoted in statsmodels' test_inter_rater.py "
                  "(TestUnweightedCohens, TestWeightedCohens): simple kappa and Cicchetti-Allison (linear) weighted kappa",
        "table": SAS_TABLE,
        "published": {"unweighted": {"value": 0.4842, "se": 0.1380, "ci95": [0.2137, 0.7547]},
                      "linear": {"value": 0.4701, "se": 0.1457, "ci95": [0.1845, 0.7558]}},
        "statsmodels": {"unweighted": sm_kappa(SAS_TABLE), "linear": sm_kappa(SAS_TABLE, weights=[0, 1, 2])},
    },
})
