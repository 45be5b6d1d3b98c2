#!/usr/bin/env python3
"""Reference values for many-to-one comparisons (Dunnett 1955) on open datasets.

For the reference plans iris_petal and penguins_mass (data shipped by registry
packages: scikit-learn's iris, palmerpenguins), this fits with statsmodels OLS
(versions pinned in requirements.txt)

- the parallel-lines model y ~ group dummies + x: every group's adjusted-mean
  difference against the first level (the difference of intercepts),
- the separate-lines model y ~ group dummies + group dummies * x: every group's
  slope difference against the first level,

both with the classical covariance and with HC3 (MacKinnon & White 1985), and takes
for each family the contrasts' t statistics and correlation from the fitted
covariance (`t_test`, `cov_params`). The simultaneous p-value of a contrast is
1 - P(|T_i| <= |t| for every i) from scipy.stats.multivariate_t.cdf, and the
critical value the c with P(|T_i| <= c) = 1 - alpha (brentq on the same cdf with a
fixed random_state, so the function searched is deterministic).

    python3 tests/reference/generate_many_to_one.py   # writes many_to_one.json
"""

from __future__ import annotations

import csv
import json
import pathlib
import sys
import tomllib

import numpy as np
import scipy
import statsmodels
import statsmodels.api as sm
from scipy import optimize, stats

PINNED = {"numpy": "2.4.6", "scipy": "1.17.1", "statsmodels": "0.15.0"}
FOUND = {"numpy": np.__version__, "scipy": scipy.__version__, "statsmodels": statsmodels.__version__}
for name, want in PINNED.items():
    if FOUND[name] != want:
        sys.exit(f"generate_many_to_one.py needs {name} {want}, found {FOUND[name]}")

HERE = pathlib.Path(__file__).resolve().parent
OUT = HERE / "many_to_one.json"
ALPHA = 0.05


def rectangle(corr, df, c):
    m = corr.shape[0]
    dist = stats.multivariate_t(loc=np.zeros(m), shape=corr, df=df)
    return float(dist.cdf(np.full(m, c), lower_limit=np.full(m, -c), maxpts=1_000_000 * m,
                          random_state=np.random.default_rng(7)))


def family(fit, contrasts, df):
    est = contrasts @ fit.params
    cov = contrasts @ fit.cov_params() @ contrasts.T
    se = np.sqrt(np.diag(cov))
    t = est / se
    corr = cov / np.outer(se, se)
    np.fill_diagonal(corr, 1.0)
    p = [1.0 - rectangle(corr, df, abs(v)) for v in t]
    lo = stats.t.isf(ALPHA / 2, df)
    hi = stats.t.isf(ALPHA / (2 * len(t)), df)
    crit = optimize.brentq(lambda c: rectangle(corr, df, c) - (1 - ALPHA), lo, hi, xtol=1e-6)
    return {"difference": est.tolist(), "se": se.tolist(), "t": t.tolist(),
            "p_adjusted": p, "critical_value": crit, "df": df}


def load(name):
    plan = tomllib.loads((HERE / "plans" / f"{name}.toml").read_text())
    path = (HERE / "plans" / plan["data"]["path"]).resolve()
    m = plan["model"]
    rows = list(csv.DictReader(path.open()))
    keep = [r for r in rows if r[m["response"]] not in ("", "NA") and r[m["covariate"]] not in ("", "NA")]
    levels = m.get("levels") or sorted({r[m["group"]] for r in keep})
    keep = [r for r in keep if r[m["group"]] in levels]
    y = np.array([float(r[m["response"]]) for r in keep])
    x = np.array([float(r[m["covariate"]]) for r in keep])
    g = np.array([levels.index(r[m["group"]]) for r in keep])
    return levels, y, x, g


cases = {}
for name in ["iris_petal", "penguins_mass"]:
    levels, y, x, g = load(name)
    k = len(levels)
    n = len(y)
    dummies = np.column_stack([(g == i).astype(float) for i in range(k)])
    parallel = np.column_stack([dummies, x])
    separate = np.column_stack([dummies, dummies * x[:, None]])
    # Rows: group i (i >= 1) minus group 0.
    par_l = np.zeros((k - 1, k + 1))
    sep_l = np.zeros((k - 1, 2 * k))
    for i in range(1, k):
        par_l[i - 1, i], par_l[i - 1, 0] = 1.0, -1.0
        sep_l[i - 1, k + i], sep_l[i - 1, k] = 1.0, -1.0
    out = {"levels": levels}
    for cov in ("classical", "hc3"):
        kw = {} if cov == "classical" else {"cov_type": "HC3"}
        pf = sm.OLS(y, parallel).fit(**kw)
        sf = sm.OLS(y, separate).fit(**kw)
        out[cov] = {"adjusted": family(pf, par_l, float(n - k - 1)),
                    "slopes": family(sf, sep_l, float(n - 2 * k))}
    cases[name] = out

OUT.write_text(json.dumps({"generator": "tests/reference/generate_many_to_one.py",
                           "versions": FOUND, "alpha": ALPHA, "cases": cases}, indent=1) + "\n")
print("wrote", OUT)
