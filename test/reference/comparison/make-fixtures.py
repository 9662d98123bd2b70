#!/usr/bin/python3
"""Veil reference fixtures for app/stats/comparison/, made with scipy and statsmodels.

Run from the repository root with Debian's python3 (python3-scipy, python3-statsmodels):
    /usr/bin/python3 test/reference/comparison/make-fixtures.py
Writes test/reference/comparison/comparison-fixtures.json; the Vitest tests read it, so CI needs
neither Python nor these libraries.

- wilson: statsmodels.stats.proportion.proportion_confint(k, n, alpha=0.05, method='wilson')
- holm: statsmodels.stats.multitest.multipletests(p, method='holm')[1]
- wilcoxon: scipy.stats.wilcoxon(d, ...) two-sided; sets without zeros and ties with
  method='exact'; every set with method='approx', zero_method='pratt', correction=False
  (Pratt's zeros, Cureton's variance, tie correction; the normal approximation Veil uses)
- friedman: scipy.stats.friedmanchisquare(*columns) (blocks = rows, treatments = columns), with
  its tie correction; Kendall's W = chi2 / (b (k - 1))
The data are invented (numpy default_rng, seeds below): reader-averaged Likert scores and their
differences, the shape Veil compares.
"""
import json, platform, warnings
import numpy as np
import scipy, statsmodels
from scipy import stats
from statsmodels.stats.proportion import proportion_confint
from statsmodels.stats.multitest import multipletests

warnings.simplefilter('ignore')
out = {
    'generator': f'scipy {scipy.__version__}, statsmodels {statsmodels.__version__}, numpy {np.__version__}, Python {platform.python_version()}',
    'wilson': [], 'holm': [], 'wilcoxon': [], 'friedman': [],
}

for k, n in [(0, 10), (3, 10), (10, 10), (17, 40), (1, 1), (55, 120), (118, 120)]:
    lo, hi = proportion_confint(k, n, alpha=0.05, method='wilson')
    out['wilson'].append({'k': k, 'n': n, 'ci95': [lo, hi]})

for p in [[0.01, 0.04, 0.03, 0.2], [0.5, 0.001, 0.049, 0.0125, 0.9], [0.03], [0.02, 0.02, 0.04]]:
    out['holm'].append({'p': p, 'adjusted': list(multipletests(p, method='holm')[1])})

rng = np.random.default_rng(20240601)
sets = [
    ('untied, n=9', rng.permutation(np.arange(1, 10)) * rng.choice([-1, 1], 9) * 0.37),
    ('untied, n=20', rng.normal(0.3, 1.0, 20)),
    ('untied, n=5, all positive', np.array([0.5, 1.25, 2.0, 3.5, 0.75])),
    ('reader-averaged, ties and zeros', (rng.integers(1, 6, (12, 2)).mean(1) - rng.integers(1, 6, (12, 2)).mean(1))),
    ('ties, no zeros', np.array([1, -1, 2, 2, -0.5, 1.5, 1, 2, -2, 0.5, 1, 1.5])),
    ('many zeros', np.array([0, 0, 1, 0, -1, 2, 1, 0, 1.5, 1])),
    ('n=30 half-points', (rng.integers(1, 6, (30, 2)).mean(1) - rng.integers(1, 6, (30, 2)).mean(1)) + 0.0),
]
for name, d in sets:
    d = [float(v) for v in d]
    arr = np.array(d)
    entry = {'name': name, 'd': d}
    nz = arr[arr != 0]
    untied = len(np.unique(np.abs(nz))) == len(nz)
    if (arr != 0).all() and untied:
        r = stats.wilcoxon(arr, method='exact')
        entry['exact'] = {'statistic': float(r.statistic), 'p': float(r.pvalue)}
    r = stats.wilcoxon(arr, zero_method='pratt', correction=False, method='approx')
    entry['approx'] = {'statistic': float(r.statistic), 'p': float(r.pvalue)}
    out['wilcoxon'].append(entry)

for name, b, k, seed in [('6 cases x 3 methods', 6, 3, 1), ('15 cases x 4 methods', 15, 4, 2), ('30 cases x 3 methods', 30, 3, 3)]:
    g = np.random.default_rng(seed)
    m = g.integers(1, 6, (b, k, 2)).mean(2) + np.arange(k) * 0.3
    r = stats.friedmanchisquare(*[m[:, j] for j in range(k)])
    out['friedman'].append({'name': name, 'blocks': m.tolist(), 'chi2': float(r.statistic), 'p': float(r.pvalue),
                            'w': float(r.statistic) / (b * (k - 1))})

with open('test/reference/comparison/comparison-fixtures.json', 'w') as f:
    json.dump(out, f, indent=1)
    f.write('\n')
print('wrote comparison-fixtures.json')
