#!/usr/bin/env python3
"""Reference values for the heteroscedasticity-consistent covariance (issue 14 item 2).

For each data set and each of HC0, HC1, HC2, HC3 (White 1980; MacKinnon & White 1985),
statsmodels OLS with that covariance (use_t=True, so tests use t and F on the model's
residual df) gives:
* the classical (nonrobust) fit's slope differences with their 1 - alpha intervals
  (t_test on the contrast), for pairwise_slopes[].ci;
* separate lines (each group its own intercept and slope): the Wald F test that all
  slopes are equal (wald_test(R, use_f=True, scalar=True)) and every pair's slope
  difference (t_test: effect, sd, t, p, 1 - alpha interval);
* parallel lines (each group its own intercept, one slope): each group's adjusted mean
  at the covariate's mean (t_test on [indicator, x0]) and every pair's difference.
The designs are built with numpy from indicator columns, no formula strings.

Writes robust.json beside this script; tests/reference_robust.rs reads it.

Data:
* penguins: body_mass_g on flipper_length_mm by species, from the palmerpenguins
  package's copy in data/penguins.csv (rows with NA dropped);
* fanning: INVENTED here (seeded numpy generator): three groups whose residual spread
  grows with the covariate, the case the robust covariance is for; the classical
  equal-slopes F (also written, from compare_f_test's nonrobust fit) rejects at 0.05
  while HC3 does not.

Run with the pinned environment of requirements.txt (generate.py checks the pins):

    python3 tests/reference/generate_robust.py
"""

from __future__ import annotations

import csv
import json
import sys
from pathlib import Path

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))
sys.dont_write_bytecode = True

import generate as gen  # noqa: E402,F401  (version pins)

import numpy as np  # noqa: E402
import statsmodels.api as sm  # noqa: E402
from scipy import stats  # noqa: E402
from statsmodels.stats.outliers_influence import OLSInfluence  # noqa: E402

OUT = HERE / "robust.json"
ALPHA = 0.05


def penguins():
    rows, numbers = [], []
    with open(HERE / "data" / "penguins.csv", newline="") as f:
        for i, r in enumerate(csv.DictReader(f), start=1):
            if r["flipper_length_mm"] in ("", "NA") or r["body_mass_g"] in ("", "NA"):
                continue
            rows.append((r["species"], float(r["flipper_length_mm"]), float(r["body_mass_g"])))
            numbers.append(i)
    return rows, numbers


def fanning():
    # Seed chosen (by trying seeds in order from 20261202) so that the classical
    # equal-slopes test rejects at 0.05 and the HC3 test does not: the case in which
    # the report must show both.
    rng = np.random.default_rng(20261208)
    rows = []
    for g, (a, b, n) in {"east": (2.0, 1.0, 40), "mid": (1.0, 1.25, 35), "west": (3.0, 0.8, 45)}.items():
        x = np.round(rng.uniform(0.5, 10.0, size=n), 3)
        y = np.round(a + b * x + rng.normal(0.0, 1.0, size=n) * (0.2 + 0.35 * x), 4)
        rows.extend((g, float(xi), float(yi)) for xi, yi in zip(x, y))
    return rows, list(range(1, len(rows) + 1))


def case(name, rows, numbers, response, covariate, group):
    levels = sorted({g for g, _, _ in rows})
    k = len(levels)
    g = np.array([levels.index(r[0]) for r in rows])
    x = np.array([r[1] for r in rows])
    y = np.array([r[2] for r in rows])
    n = len(rows)
    ind = np.zeros((n, k))
    ind[np.arange(n), g] = 1.0
    separate = np.hstack([ind, ind * x[:, None]])  # intercepts, then slopes
    common = np.hstack([ind, x[:, None]])  # intercepts, then the common slope
    x0 = float(x.mean())
    out = {"name": name, "response": response, "covariate": covariate, "group": group,
           "levels": levels, "adjust_at": x0, "covariances": {}}
    classical = sm.OLS(y, separate).fit()
    Rc = np.zeros((k - 1, 2 * k))
    for i in range(k - 1):
        Rc[i, k + i] = 1.0
        Rc[i, 2 * k - 1] = -1.0
    out["classical_equal_slopes_p"] = float(classical.wald_test(Rc, use_f=True, scalar=True).pvalue)
    for cov in ("HC0", "HC1", "HC2", "HC3"):
        fs = sm.OLS(y, separate).fit(cov_type=cov, use_t=True)
        R = np.zeros((k - 1, 2 * k))
        for i in range(k - 1):
            R[i, k + i] = 1.0
            R[i, 2 * k - 1] = -1.0
        w = fs.wald_test(R, use_f=True, scalar=True)
        pairs = []
        for a in range(k):
            for b in range(a + 1, k):
                c = np.zeros(2 * k)
                c[k + a], c[k + b] = 1.0, -1.0
                t = fs.t_test(c)
                lo, hi = t.conf_int(alpha=ALPHA)[0]
                pairs.append({"a": levels[a], "b": levels[b], "difference": float(t.effect[0]),
                              "se": float(t.sd[0, 0]), "t": float(t.tvalue[0, 0]),
                              "p_value": float(t.pvalue), "ci": [float(lo), float(hi)]})
        fc = sm.OLS(y, common).fit(cov_type=cov, use_t=True)
        means = []
        for a in range(k):
            c = np.zeros(k + 1)
            c[a], c[k] = 1.0, x0
            t = fc.t_test(c)
            lo, hi = t.conf_int(alpha=ALPHA)[0]
            means.append({"level": levels[a], "mean": float(t.effect[0]), "se": float(t.sd[0, 0]),
                          "ci": [float(lo), float(hi)]})
        mean_pairs = []
        for a in range(k):
            for b in range(a + 1, k):
                c = np.zeros(k + 1)
                c[a], c[b] = 1.0, -1.0
                t = fc.t_test(c)
                lo, hi = t.conf_int(alpha=ALPHA)[0]
                mean_pairs.append({"a": levels[a], "b": levels[b], "difference": float(t.effect[0]),
                                   "se": float(t.sd[0, 0]), "t": float(t.tvalue[0, 0]),
                                   "p_value": float(t.pvalue), "ci": [float(lo), float(hi)]})
        out["covariances"][cov.lower()] = {
            "equal_slopes": {"f": float(w.fvalue), "df1": float(w.df_num), "df2": float(w.df_denom),
                             "p_value": float(w.pvalue)},
            "pairwise_slopes": pairs,
            "adjusted_means": means,
            "pairwise_adjusted": mean_pairs,
        }
    # Rows that drive the fit, on the separate-lines model (the one the classical gate
    # selects for both cases): Cook's distance above scipy f.ppf(0.5, p, n - p), or
    # |externally studentized residual| above t.isf(alpha / (2 n), n - p - 1), both
    # measures from statsmodels OLSInfluence.
    infl = OLSInfluence(sm.OLS(y, separate).fit())
    p_sep = 2 * k
    cooks_cut = float(stats.f.ppf(0.5, p_sep, n - p_sep))
    t_cut = float(stats.t.isf(ALPHA / (2 * n), n - p_sep - 1))
    cooks = infl.cooks_distance[0]
    tstud = infl.resid_studentized_external
    matters = [int(numbers[i]) for i in range(n) if cooks[i] > cooks_cut or abs(tstud[i]) > t_cut]
    out["influence"] = {"model": "separate-slopes", "cooks_distance_matters": cooks_cut,
                        "studentized_bonferroni": t_cut, "matters": matters,
                        "cooks_distance": {str(numbers[i]): float(cooks[i]) for i in range(n)
                                           if numbers[i] in matters},
                        "studentized_residual": {str(numbers[i]): float(tstud[i]) for i in range(n)
                                                 if numbers[i] in matters}}
    # Two one-sided tests of each slope difference against a margin (Schuirmann 1987;
    # for slopes, Dixon & Pechmann 2005): the difference and its SE from statsmodels'
    # t_test, the (1 - 2 alpha) interval from its conf_int, the one-sided p-values
    # from scipy's t distribution on the model's residual df.
    margin = MARGINS[name]
    out["slope_margin"] = margin
    out["equivalence"] = {}
    for cov in ("nonrobust", "HC3"):
        fit = sm.OLS(y, separate).fit(cov_type=cov, use_t=True)
        pairs = []
        for a in range(k):
            for b in range(a + 1, k):
                c = np.zeros(2 * k)
                c[k + a], c[k + b] = 1.0, -1.0
                t = fit.t_test(c)
                d, se = float(t.effect[0]), float(t.sd[0, 0])
                lo, hi = t.conf_int(alpha=2 * ALPHA)[0]
                df = float(fit.df_resid)
                p_lower = float(stats.t.sf((d + margin) / se, df))
                p_upper = float(stats.t.cdf((d - margin) / se, df))
                lo95, hi95 = t.conf_int(alpha=ALPHA)[0]
                pairs.append({"a": levels[a], "b": levels[b], "difference": d, "se": se,
                              "ci_two_sided": [float(lo95), float(hi95)],
                              "df": df, "ci": [float(lo), float(hi)], "p_lower": p_lower,
                              "p_upper": p_upper, "p_tost": max(p_lower, p_upper)})
        out["equivalence"]["classical" if cov == "nonrobust" else cov.lower()] = pairs
    return out, rows


# Slope margins for the equivalence reference, in response units per covariate unit.
MARGINS = {"penguins": 8.0, "fanning": 0.6}


def back_transformed():
    """Penguins on the log-log scale (natural logs), classical parallel-lines fit:
    the adjusted means at the mean of log(flipper) and their pairwise differences from
    statsmodels t_test, exponentiated here (geometric means, ratios)."""
    rows, _ = penguins()
    levels = sorted({g for g, _, _ in rows})
    k = len(levels)
    g = np.array([levels.index(r[0]) for r in rows])
    x = np.log(np.array([r[1] for r in rows]))
    y = np.log(np.array([r[2] for r in rows]))
    n = len(rows)
    ind = np.zeros((n, k))
    ind[np.arange(n), g] = 1.0
    fit = sm.OLS(y, np.hstack([ind, x[:, None]])).fit()
    x0 = float(x.mean())
    means, ratios = [], []
    for a in range(k):
        c = np.zeros(k + 1)
        c[a], c[k] = 1.0, x0
        t = fit.t_test(c)
        lo, hi = t.conf_int(alpha=ALPHA)[0]
        means.append({"level": levels[a], "mean": float(t.effect[0]),
                      "geometric_mean": float(np.exp(t.effect[0])),
                      "ci": [float(np.exp(lo)), float(np.exp(hi))]})
    for a in range(k):
        for b in range(a + 1, k):
            c = np.zeros(k + 1)
            c[a], c[b] = 1.0, -1.0
            t = fit.t_test(c)
            lo, hi = t.conf_int(alpha=ALPHA)[0]
            ratios.append({"a": levels[a], "b": levels[b], "ratio": float(np.exp(t.effect[0])),
                           "ci": [float(np.exp(lo)), float(np.exp(hi))]})
    return {"adjust_at": x0, "common_slope": float(fit.params[k]), "adjusted_means": means,
            "ratios": ratios}


def main():
    cases = []
    for name, (rows, numbers), (resp, cov, grp) in [
        ("penguins", penguins(), ("body_mass_g", "flipper_length_mm", "species")),
        ("fanning", fanning(), ("y", "x", "g")),
    ]:
        c, rows = case(name, rows, numbers, resp, cov, grp)
        if name == "fanning":
            c["csv"] = "g,x,y\n" + "".join(f"{g},{x!r},{y!r}\n" for g, x, y in rows)
        cases.append(c)
    OUT.write_text(json.dumps({"generator": "tests/reference/generate_robust.py",
                               "alpha": ALPHA, "cases": cases,
                               "back_transformed": back_transformed()}, indent=1) + "\n")
    print(f"wrote {OUT}")


if __name__ == "__main__":
    main()
