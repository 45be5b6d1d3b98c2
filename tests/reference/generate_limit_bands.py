#!/usr/bin/env python3
"""Reference crossings of the simultaneous (Working-Hotelling) band with a limit.

On the three invented stability reference sets (data/limits_stability_*.csv, written
by generate_limits.py with a seeded numpy generator), for the line lot pooling picks
in each (separate lines, parallel lines, one pooled line; checked against
generate_limits.py's expected files by the Rust test), with statsmodels OLS
(versions pinned in requirements.txt): the mean line and its standard error at x
from `get_prediction(...).se_mean`, the Working & Hotelling (1929) critical value
c = sqrt(2 * f.ppf(confidence, 2, df)) from scipy, and the crossing, where
mean(x) - c * se_mean(x) meets the lower limit 95, solved by brentq (the bound is
concave in x, so past its peak it has one root).

    python3 tests/reference/generate_limit_bands.py   # writes limit_bands.json
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
from scipy import optimize, stats

PINNED = {"numpy": "2.4.6", "scipy": "1.17.1", "statsmodels": "0.15.0"}
FOUND = {"numpy": np.__version__, "scipy": scipy.__version__, "statsmodels": statsmodels.__version__}
for name, want in PINNED.items():
    if FOUND[name] != want:
        sys.exit(f"generate_limit_bands.py needs {name} {want}, found {FOUND[name]}")

HERE = pathlib.Path(__file__).resolve().parent
LIMIT, CONFIDENCE = 95.0, 0.95
CASES = {"limits_stability_separate": "separate", "limits_stability_common": "common-slope",
         "limits_stability_pooled": "pooled"}

out = {}
for name, model in CASES.items():
    rows = list(csv.DictReader((HERE / "data" / f"{name}.csv").open()))
    levels = sorted({r["lot"] for r in rows})
    y = np.array([float(r["assay_pct"]) for r in rows])
    x = np.array([float(r["months"]) for r in rows])
    g = np.array([levels.index(r["lot"]) for r in rows])
    k = len(levels)
    lines = []
    for i, level in enumerate(levels if model != "pooled" else ["pooled"]):
        if model == "separate":
            keep = g == i
            fit = sm.OLS(y[keep], sm.add_constant(x[keep])).fit()
            design = lambda t: np.array([[1.0, t]])
            first = float(x[keep].min())
        elif model == "common-slope":
            dummies = np.column_stack([(g == j).astype(float) for j in range(k)])
            fit = sm.OLS(y, np.column_stack([dummies, x])).fit()
            design = lambda t, i=i: np.array([[1.0 if j == i else 0.0 for j in range(k)] + [t]])
            first = float(x[g == i].min())
        else:
            fit = sm.OLS(y, sm.add_constant(x)).fit()
            design = lambda t: np.array([[1.0, t]])
            first = float(x.min())
        df = float(fit.df_resid)
        c = float(np.sqrt(2.0 * stats.f.ppf(CONFIDENCE, 2, df)))

        def bound(t):
            p = fit.get_prediction(design(t))
            return float(p.predicted_mean[0] - c * p.se_mean[0]) - LIMIT

        crossing = optimize.brentq(bound, first, 1000.0, xtol=1e-13, rtol=1e-15, maxiter=500)
        lines.append({"level": level, "df": df, "critical_value": c, "crossing": crossing})
    out[name] = {"model": model, "lines": lines}

(HERE / "limit_bands.json").write_text(json.dumps(
    {"generator": "tests/reference/generate_limit_bands.py", "versions": FOUND,
     "limit": LIMIT, "confidence": CONFIDENCE, "cases": out}, indent=1) + "\n")
print("wrote limit_bands.json")
