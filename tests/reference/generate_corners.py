#!/usr/bin/env python3
"""Write reference values for slopewise at the corners of its procedure (issue 20).

Each case below is a small crafted data set where a decision or a number used to go
wrong: exact fits, a rising lot against a lower limit, three-row groups, the
sensitivity rerun, two levels that choose two models, and large offsets. This script
writes corners.json beside it: for every case the CSV text (the same doubles the Rust
test reads, printed with Python's shortest round-trip repr), the plan's extra TOML, and
the expected values with the source of each. tests/reference_corners.rs reads it.

Sources, by case:
* exact_lines, identical_exact: worked by hand (the lines are exact; crossings of 95 by
  100 - b x are 5 / b), and the extra-sum-of-squares F of statsmodels compare_f_test
  on the separate-lines design where it is defined;
* rising_lot: statsmodels OLS of each lot on its own rows, the one-sided 95 % lower
  bound taken from get_prediction(...).conf_int(alpha=0.10), solved for the limit with
  scipy.optimize.brentq (xtol 1e-13);
* three_rows: scipy.stats.shapiro on the residuals (showing W does not depend on the
  data with one residual df) and on the pooled residuals;
* sensitivity: statsmodels OLSInfluence on the parallel-lines design (hat values,
  Cook's distance, externally studentized residuals), the cut-offs 2p/n, 4/n and 3,
  and the reduced data's parallel-lines fit predicted at the full data's covariate mean;
* levels_disagree: statsmodels compare_f_test for the equal-slopes p-value;
* offsets_*: exact rational arithmetic (Python fractions) on the very doubles of the
  CSV, rounded once to the nearest double at the end.

Run with the pinned environment of requirements.txt (generate.py checks the pins):

    python3 tests/reference/generate_corners.py

The data are INVENTED (seeded numpy generators, or written out by hand); the output is
deterministic: running the script twice gives byte-identical files.
"""

from __future__ import annotations

import json
import math
import sys
from fractions import Fraction
from pathlib import Path

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))
sys.dont_write_bytecode = True  # importing generate.py must leave no __pycache__ here

import generate as gen  # noqa: E402  (version pins)

import numpy as np  # noqa: E402
import scipy.optimize  # noqa: E402
import scipy.stats  # noqa: E402
import statsmodels.api as sm  # noqa: E402
from statsmodels.stats.outliers_influence import OLSInfluence  # noqa: E402

OUT = HERE / "corners.json"
MONTHS = [0, 3, 6, 9, 12, 18, 24]


def csv_text(rows) -> str:
    """CSV with columns g, x, y; floats as repr, so Rust parses the same doubles."""
    lines = ["g,x,y"]
    for g, x, y in rows:
        lines.append(f"{g},{float(x)!r},{float(y)!r}")
    return "\n".join(lines) + "\n"


def design(rows, levels, kind):
    """Design matrix: "separate" (dummies, dummies * x), "common" (dummies, x)."""
    g = [r[0] for r in rows]
    x = np.array([r[1] for r in rows], dtype=float)
    D = np.array([[1.0 if gi == lev else 0.0 for lev in levels] for gi in g])
    if kind == "separate":
        return np.column_stack([D, D * x[:, None]])
    return np.column_stack([D, x])


def response(rows):
    return np.array([r[2] for r in rows], dtype=float)


# ---------------------------------------------------------------------------
# 1. Exact lines: an infinite F is p = 0; 0/0 stops the pooling steps.
# ---------------------------------------------------------------------------


def exact_lines() -> dict:
    # Three invented lots on exact lines from 100 with slopes -1, -0.5, -0.25: every
    # value is a double exactly, and every group's residuals are exactly zero.
    slopes = {"A": 1.0, "B": 0.5, "C": 0.25}
    rows = [(lot, m, 100.0 - b * m) for lot, b in slopes.items() for m in (0, 3, 6, 9, 12)]
    return {
        "source": "worked by hand: 100 - b x = 95 at x = 5 / b for b = 1, 0.5, 0.25",
        "csv": csv_text(rows),
        "plan": '[limits]\nlower = 95.0\n[tests]\nprocedure = "lot-pooling"\n',
        "expected": {
            "equal_slopes_status": "exact-fit",
            "slopes_p": 0.0,
            "pooling_decision": "separate",
            "crossings": {"A": 5.0, "B": 10.0, "C": 20.0},
        },
    }


def identical_exact() -> dict:
    # Invented: three exact lines with the same slope -0.5 and intercepts 100, 101, 102.
    # The separate lines leave no residual and the slopes do not differ: F = 0/0.
    rows = [(lot, m, a - 0.5 * m) for lot, a in (("A", 100.0), ("B", 101.0), ("C", 102.0))
            for m in (0, 3, 6, 9, 12)]
    y, Xs, Xc = response(rows), design(rows, "ABC", "separate"), design(rows, "ABC", "common")
    rss_s = float(sm.OLS(y, Xs).fit().ssr)
    rss_c = float(sm.OLS(y, Xc).fit().ssr)
    # Both sums of squares vanish (to rounding): there is no F to compute.
    assert rss_s < 1e-20 and rss_c < 1e-20, (rss_s, rss_c)
    return {
        "source": "worked by hand: identical slopes on exact lines, F = 0/0; "
                  "statsmodels OLS residual sums of squares below 1e-20",
        "csv": csv_text(rows),
        "plan": '[limits]\nlower = 95.0\n[tests]\nprocedure = "lot-pooling"\n',
        "expected": {
            "equal_slopes_status": "not-computable",
            "pooling_decision": "not-decided",
            "stopped_at": "slopes",
        },
    }


# ---------------------------------------------------------------------------
# 2. A rising lot that is not significantly rising reaches a lower limit.
# ---------------------------------------------------------------------------


def lower_bound(res, x: float) -> float:
    """statsmodels' one-sided 95 % lower bound of the mean at x (two-sided 90 %)."""
    return float(res.get_prediction(np.array([[1.0, x]])).conf_int(alpha=0.10)[0, 0])


def rising_lot() -> dict:
    limit = 95.0
    lots = [("falling", 100.6, -0.21), ("rising", 99.9, 0.009), ("climbing", 99.7, 0.16)]
    for seed in range(100, 200):
        rng = np.random.default_rng(seed)
        rows = []
        for lot, a, b in lots:
            for m in MONTHS:
                for _ in range(2):
                    rows.append((lot, float(m), round(a + b * m + rng.normal(0, 0.4), 2)))
        fits = {}
        for lot, _, _ in lots:
            sub = [r for r in rows if r[0] == lot]
            X = sm.add_constant(np.array([r[1] for r in sub]))
            fits[lot] = sm.OLS(response(sub), X).fit()
        rise = fits["rising"]
        lo, hi = rise.conf_int(alpha=0.05)[1]
        climb = fits["climbing"]
        t95 = scipy.stats.t.ppf(0.95, climb.df_resid)
        # The property: the rising lot's slope is positive but not significant, the
        # climbing lot's is significantly positive at the bound's own (one-sided) level.
        t_rise = scipy.stats.t.ppf(0.95, rise.df_resid)
        if not (rise.params[1] > 0 and lo < 0 < hi
                and rise.params[1] - t_rise * rise.bse[1] < -0.005):
            continue
        if not (climb.params[1] - t95 * climb.bse[1] > 0):
            continue
        ys, Xs, Xc = response(rows), design(rows, [l[0] for l in lots], "separate"), \
            design(rows, [l[0] for l in lots], "common")
        f = sm.OLS(ys, Xs).fit().compare_f_test(sm.OLS(ys, Xc).fit())
        assert f[1] < 0.05  # the gate chooses separate lines
        break
    else:
        raise AssertionError("no seed gave the property")
    expected = {}
    for lot in ("falling", "rising"):
        res = fits[lot]
        g = lambda x: lower_bound(res, x) - limit  # noqa: E731
        # The bound is above the limit at month 0 and below it far out: one root.
        hi = 24.0
        while g(hi) >= 0:
            hi *= 2.0
            assert hi < 1e7
        assert g(0.0) > 0
        root = float(scipy.optimize.brentq(g, 0.0, hi, xtol=1e-13, maxiter=500))
        expected[lot] = root
    # The climbing lot's bound stays above the limit on a wide grid from month 0 on.
    grid = np.linspace(0.0, 5000.0, 5001)
    b = climb.get_prediction(sm.add_constant(grid)).conf_int(alpha=0.10)[:, 0]
    assert np.all(b > limit)
    return {
        "source": "statsmodels OLS per lot, get_prediction(...).conf_int(alpha=0.10) "
                  "lower side solved for 95 by scipy brentq (xtol 1e-13); seed "
                  f"{seed}; rising lot slope {rise.params[1]:.4g}, 95 % CI "
                  f"[{lo:.3g}, {hi:.3g}]",
        "csv": csv_text(rows),
        "plan": "[limits]\nlower = 95.0\nconfidence = 0.95\n",
        "expected": {
            "crossings": expected,
            "never": ["climbing"],
            "rising_slope": float(rise.params[1]),
            "rising_slope_ci": [float(lo), float(hi)],
        },
    }


# ---------------------------------------------------------------------------
# 3. Three rows per group: no per-group normality verdict.
# ---------------------------------------------------------------------------


def line_residuals(x, y):
    X = sm.add_constant(np.asarray(x, dtype=float))
    return np.asarray(sm.OLS(np.asarray(y, dtype=float), X).fit().resid)


def three_rows() -> dict:
    rng = np.random.default_rng(7)
    rows = []
    for lot in ("A", "B", "C"):
        for m in (0.0, 3.0, 6.0):
            rows.append((lot, m, round(100.0 - 0.3 * m + rng.normal(0, 0.5), 2)))
    # With three equally spaced x, a line's residuals are c (1, -2, 1): W = 0.75 for
    # every response, so a per-group check could only ever "fail".
    ws = []
    for lot in ("A", "B", "C"):
        sub = [r for r in rows if r[0] == lot]
        e = line_residuals([r[1] for r in sub], [r[2] for r in sub])
        ws.append(float(scipy.stats.shapiro(e).statistic))
    other = line_residuals([0.0, 3.0, 6.0], [5.0, -1.0, 2.5])
    ws.append(float(scipy.stats.shapiro(other).statistic))
    assert all(abs(w - 0.75) < 1e-6 for w in ws), ws
    pooled = np.concatenate([
        line_residuals([r[1] for r in rows if r[0] == lot], [r[2] for r in rows if r[0] == lot])
        for lot in ("A", "B", "C")])
    sw = scipy.stats.shapiro(pooled)
    return {
        "source": "scipy.stats.shapiro: W = 0.75 for every three-row group at x = 0, 3, 6 "
                  f"(checked on {len(ws)} responses); pooled residuals of the separate lines",
        "csv": csv_text(rows),
        "plan": "",
        "expected": {
            "per_group_w_any_data": 0.75,
            "pooled_statistic": float(sw.statistic),
            "pooled_p_value": float(sw.pvalue),
        },
    }


# ---------------------------------------------------------------------------
# 4. Sensitivity: the same adjust_at, leverage-only rows kept.
# ---------------------------------------------------------------------------


def sensitivity() -> dict:
    rows = []
    for i in range(15):
        e = [0.3, -0.2, 0.1, -0.4, 0.2, 0.0][i % 6]  # a fixed invented noise pattern
        rows.append(("a", float(i), 1.0 + 2.0 * i + e))
        rows.append(("b", float(i), 4.0 + 2.0 * i - e))
    rows.append(("a", 11.0, 40.0))              # a wild row: far off its line
    rows.append(("b", 30.0, 4.0 + 2.0 * 30.0 + 0.1))  # a design point far out, on its line
    levels = ["a", "b"]
    y = response(rows)
    Xs, Xc = design(rows, levels, "separate"), design(rows, levels, "common")
    sep, com = sm.OLS(y, Xs).fit(), sm.OLS(y, Xc).fit()
    _, p_slopes, _ = sep.compare_f_test(com)
    assert p_slopes >= 0.05, p_slopes  # slopes homogeneous: influence on parallel lines
    inf = OLSInfluence(com)
    n, p = Xc.shape
    hat, cooks = inf.hat_matrix_diag, inf.cooks_distance[0]
    stud = inf.resid_studentized_external
    by_fit = [i for i in range(n) if cooks[i] > 4.0 / n or abs(stud[i]) > 3.0]
    leverage_only = [i for i in range(n) if hat[i] > 2.0 * p / n and i not in by_fit]
    assert by_fit == [30], by_fit                 # the wild row (0-based), data row 31
    assert leverage_only == [31], leverage_only   # the far design point, data row 32
    x_all = np.array([r[1] for r in rows])
    adjust_at = float(np.mean(x_all))
    keep = [i for i in range(n) if i not in by_fit]
    red = [rows[i] for i in keep]
    Xr = design(red, levels, "common")
    fit = sm.OLS(response(red), Xr).fit()
    means = []
    for j, lev in enumerate(levels):
        e = np.zeros(len(levels) + 1)
        e[j], e[-1] = 1.0, adjust_at
        pr = fit.get_prediction(e[None, :])
        means.append({"level": lev, "mean": float(pr.predicted_mean[0]),
                      "se": float(pr.se_mean[0])})
    # The reduced data's own covariate mean differs: holding adjust_at matters.
    assert abs(float(np.mean([r[1] for r in red])) - adjust_at) > 1e-3
    return {
        "source": "statsmodels OLSInfluence on the parallel-lines design (cut-offs 2p/n, "
                  "4/n, |t| > 3); reduced parallel-lines OLS predicted at the full data's "
                  "covariate mean with get_prediction",
        "csv": csv_text(rows),
        "plan": "[checks]\nsensitivity = true\n",
        "expected": {
            "adjust_at": adjust_at,
            "rows_removed": len(by_fit),
            "removed_rows": [i + 1 for i in by_fit],
            "rows_kept_leverage_only": len(leverage_only),
            "common_slope": float(fit.params[-1]),
            "common_slope_se": float(fit.bse[-1]),
            "adjusted_means": means,
        },
    }


# ---------------------------------------------------------------------------
# 5. Two levels, two models.
# ---------------------------------------------------------------------------


def levels_disagree() -> dict:
    lots = [("L1", 100.4, -0.16), ("L2", 100.1, -0.22), ("L3", 100.6, -0.19)]
    for seed in range(300, 600):
        rng = np.random.default_rng(seed)
        rows = [(lot, float(m), round(a + b * m + rng.normal(0, 0.5), 2))
                for lot, a, b in lots for m in MONTHS for _ in range(2)]
        y = response(rows)
        levels = [lot[0] for lot in lots]
        sep = sm.OLS(y, design(rows, levels, "separate")).fit()
        com = sm.OLS(y, design(rows, levels, "common")).fit()
        f, p, _ = sep.compare_f_test(com)
        # The property: at or above slopes_alpha 0.05, below pooling_alpha 0.25, and
        # not near either edge.
        if 0.07 < p < 0.2:
            break
    else:
        raise AssertionError("no seed gave the property")
    return {
        "source": f"statsmodels compare_f_test, separate against parallel lines; seed {seed}",
        "csv": csv_text(rows),
        "plan": '[limits]\nlower = 95.0\n[tests]\nprocedure = "lot-pooling"\n',
        "expected": {
            "equal_slopes_f": float(f),
            "equal_slopes_p": float(p),
            "models": {"comparisons": "common-slope", "influence": "common-slope",
                       "limits": "separate", "agree": False},
        },
    }


# ---------------------------------------------------------------------------
# 6. Offsets: slopes exact to the last bits.
# ---------------------------------------------------------------------------


def exact_line(xs, ys):
    """Slope and slope SE from exact rational arithmetic on the given doubles."""
    X = [Fraction(v) for v in xs]
    Y = [Fraction(v) for v in ys]
    n = len(X)
    mx, my = sum(X) / n, sum(Y) / n
    sxx = sum((a - mx) ** 2 for a in X)
    sxy = sum((a - mx) * (b - my) for a, b in zip(X, Y))
    syy = sum((b - my) ** 2 for b in Y)
    slope = sxy / sxx
    rss = syy - slope * sxy
    var = rss / (n - 2) / sxx
    return float(slope), math.sqrt(float(var))


def offsets(x0: float, y0: float, seed: int) -> dict:
    rng = np.random.default_rng(seed)
    rows = []
    for lot, b in (("A", 3.0), ("B", 2.5)):
        for _ in range(20):
            u = float(rng.uniform(0.0, 5.0))
            x = x0 + u
            y = y0 + b * u + float(rng.normal(0.0, 0.5))
            rows.append((lot, x, y))
    exact = {}
    for lot in ("A", "B"):
        xs = [r[1] for r in rows if r[0] == lot]
        ys = [r[2] for r in rows if r[0] == lot]
        slope, se = exact_line(xs, ys)
        exact[lot] = {"slope": slope, "slope_se": se}
    return {
        "source": "exact rational arithmetic (Python fractions) on the CSV's doubles, "
                  "rounded to double once",
        "csv": csv_text(rows),
        "plan": "",
        "expected": {"groups": exact},
    }


def main() -> None:
    source = gen.check_versions()
    cases = {
        "exact_lines": exact_lines(),
        "identical_exact": identical_exact(),
        "rising_lot": rising_lot(),
        "three_rows": three_rows(),
        "sensitivity": sensitivity(),
        "levels_disagree": levels_disagree(),
        "offsets_1e6": offsets(1e6, 1e9, 11),
        "offsets_1e8": offsets(1e8, 1e10, 12),
    }
    out = {"source": f"tests/reference/generate_corners.py; {source}", "cases": cases}
    OUT.write_text(json.dumps(out, indent=2, allow_nan=False) + "\n")
    for name, case in cases.items():
        print(name, json.dumps(case["expected"])[:160])


if __name__ == "__main__":
    main()
