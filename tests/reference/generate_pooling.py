#!/usr/bin/env python3
"""Reference values for equivalence-based lot pooling.

On the three invented stability reference sets (data/limits_stability_*.csv, written
by generate_limits.py with a seeded numpy generator), with statsmodels OLS (versions
pinned in requirements.txt):

- step 1: every pair of lots' slopes on the separate-lines model
  y ~ lot dummies + lot dummies * months; contrast b_a - b_b by `t_test`,
- step 2: every pair of parallel lines on y ~ lot dummies + months; contrast
  a_a - a_b (the distance between the lines) by `t_test`,

each with the two one-sided tests against +-margin (Schuirmann 1987):
p_lower = P(T > (d + m)/se), p_upper = P(T < (d - m)/se) from scipy.stats.t, and the
(1 - 2 alpha) interval d -+ t.ppf(1 - alpha) se. A step pools when every pair's
interval lies inside the margins. The margins per case are chosen here so that the
three sets end on each decision; they are invented, not recommendations.

    python3 tests/reference/generate_pooling.py   # writes pooling.json
"""

from __future__ import annotations

import csv
import json
import pathlib
import sys

import numpy as np
import scipy
import statsmodels
import statsmodels.api as sm
from scipy import stats

PINNED = {"numpy": "2.4.6", "scipy": "1.17.1", "statsmodels": "0.15.0"}
FOUND = {"numpy": np.__version__, "scipy": scipy.__version__, "statsmodels": statsmodels.__version__}
for name, want in PINNED.items():
    if FOUND[name] != want:
        sys.exit(f"generate_pooling.py needs {name} {want}, found {FOUND[name]}")

HERE = pathlib.Path(__file__).resolve().parent
ALPHA = 0.05
CASES = {
    # name: (slope margin, intercept margin)
    "limits_stability_pooled": (0.15, 1.5),
    "limits_stability_common": (0.15, 1.0),
    "limits_stability_separate": (0.05, 1.0),
}


def tost(d, se, df, m):
    half = stats.t.ppf(1 - ALPHA, df) * se
    lo, hi = d - half, d + half
    reading = ("shown-equivalent" if lo > -m and hi < m
               else "shown-different" if lo > m or hi < -m else "not-settled")
    return {"difference": d, "se": se, "df": df, "ci": [lo, hi],
            "p_lower": float(stats.t.sf((d + m) / se, df)),
            "p_upper": float(stats.t.sf(-(d - m) / se, df)), "reading": reading}


out = {}
for name, (ms, mi) in CASES.items():
    rows = list(csv.DictReader((HERE / "data" / f"{name}.csv").open()))
    levels = sorted({r["lot"] for r in rows})
    y = np.array([float(r["assay_pct"]) for r in rows])
    x = np.array([float(r["months"]) for r in rows])
    g = np.array([levels.index(r["lot"]) for r in rows])
    k, n = len(levels), len(y)
    dummies = np.column_stack([(g == i).astype(float) for i in range(k)])
    sep = sm.OLS(y, np.column_stack([dummies, dummies * x[:, None]])).fit()
    par = sm.OLS(y, np.column_stack([dummies, x])).fit()
    pairs = [(i, j) for i in range(k) for j in range(i + 1, k)]
    slope_pairs, line_pairs = [], []
    for i, j in pairs:
        c = np.zeros(2 * k)
        c[k + i], c[k + j] = 1.0, -1.0
        tt = sep.t_test(c)
        slope_pairs.append(tost(float(tt.effect[0]), float(tt.sd[0, 0]), float(n - 2 * k), ms)
                           | {"a": levels[i], "b": levels[j]})
        c = np.zeros(k + 1)
        c[i], c[j] = 1.0, -1.0
        tt = par.t_test(c)
        line_pairs.append(tost(float(tt.effect[0]), float(tt.sd[0, 0]), float(n - k - 1), mi)
                          | {"a": levels[i], "b": levels[j]})
    if not all(p["reading"] == "shown-equivalent" for p in slope_pairs):
        decision, line_pairs = "separate", []
    elif all(p["reading"] == "shown-equivalent" for p in line_pairs):
        decision = "pooled"
    else:
        decision = "common-slope"
    out[name] = {"slope_margin": ms, "intercept_margin": mi, "decision": decision,
                 "slope_pairs": slope_pairs, "intercept_pairs": line_pairs}
    print(name, decision)

(HERE / "pooling.json").write_text(json.dumps({"generator": "tests/reference/generate_pooling.py",
                                               "versions": FOUND, "alpha": ALPHA, "cases": out},
                                              indent=1) + "\n")
