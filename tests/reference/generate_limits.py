#!/usr/bin/env python3
"""Write reference values for slopewise's limits and crossing points.

The contract's "Limits and crossing points" keys (shared/contract.md): for each group
(or the one pooled line), the covariate value where a one-sided confidence bound of the
mean line reaches a lower or upper limit, from the model that the decision selected, and
the lot-pooling procedure that picks that model. This script writes, for the cases in
CASES below:

* data/limits_NAME.csv       invented stability-style data (NOT measurements): a seeded
                             numpy generator draws replicate results for a few made-up
                             lots at months 0, 3, 6, 9, 12, 18, 24;
* plans/limits_NAME.toml     a plan in the contract's format with a [limits] table;
* expected/limits_NAME.json  every number generate.py's expected_for gives for the plan
                             (fits, equal-slopes and group F tests, adjusted means), plus
                             `limits`, `pooling` and `earliest` computed here.

Everything is computed with statsmodels OLS on design matrices built by hand with numpy
(generate.py's helpers), at the versions pinned in requirements.txt. Run generate.py's
pinned environment:

    /tmp/refvenv/bin/python tests/reference/generate_limits.py

The output is deterministic: running it twice gives byte-identical files. The numbers are
computed from the CSV and TOML files as written, read back.

Methods (published; named where they are used below):
* the one-sided confidence bound of a regression mean at x, mean(x) -/+ t(conf, df) *
  se(mean(x)) (the usual confidence band of a fitted line; Draper & Smith 1998,
  chapter 3, chapter from memory), taken from statsmodels
  get_prediction(...).conf_int(alpha = 2 (1 - conf));
* the crossing of that bound with an acceptance limit as the supported period, and the
  lot-pooling tests at the 0.25 level, slopes first, then intercepts: ICH Q1E
  "Evaluation for Stability Data" (2003), its statistical appendix (from memory);
* the extra-sum-of-squares F tests between nested OLS models (statsmodels
  compare_f_test), as in generate.py.
"""

from __future__ import annotations

import math
import sys
import tomllib
from pathlib import Path

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))
sys.dont_write_bytecode = True  # importing generate.py must leave no __pycache__ here

import generate as gen  # noqa: E402  (helpers and plan semantics shared with generate.py)

import numpy as np  # noqa: E402
import scipy.optimize  # noqa: E402
import scipy.stats  # noqa: E402

# Defaults of the new plan keys, as given for [limits] and [tests] in the contract's
# "Limits and crossing points" capability.
DEFAULT_CONFIDENCE = 0.95       # one-sided
DEFAULT_POOLING_ALPHA = 0.25    # ICH Q1E (2003): poolability tests at the 0.25 level
PROCEDURE_LOT_POOLING = "lot-pooling"

# Pull points of an invented stability programme, in months (common practice, no source).
MONTHS = [0, 3, 6, 9, 12, 18, 24]
REPLICATES = 3

# ---------------------------------------------------------------------------
# The cases. All data are INVENTED: each lot is a straight line (intercept at month 0,
# slope per month) plus normal noise of the case's sd, drawn by
# numpy.random.default_rng(seed) in the order lot, month, replicate, rounded to the
# case's decimals. Seeds are fixed; check_property() asserts that each case has the
# property it exists for (when a seed did not give it, the next seed was tried).
# ---------------------------------------------------------------------------

CASES: dict[str, dict] = {
    # Three lots on one line: slopes and intercepts both poolable at 0.25, so one
    # pooled line is fitted; its lower bound reaches 95 beyond the 24 months observed.
    "limits_stability_pooled": {
        "seed": 13,
        "title": "Reference: invented stability data, three lots that pool",
        "response": "assay_pct", "decimals": 2, "sd": 0.5,
        "lots": [("L-101", 100.6, -0.16), ("L-102", 100.6, -0.16), ("L-103", 100.6, -0.16)],
        "limits": {"lower": 95.0, "confidence": 0.95},
        "tests": {"alpha": 0.05, "comparisons": "holm", "procedure": "lot-pooling",
                  "pooling_alpha": 0.25},
    },
    # One lot degrades about twice as fast: slopes differ (p < 0.25), separate lines,
    # each with its own residual variance; that lot crosses first, inside the data.
    "limits_stability_separate": {
        "seed": 21,
        "title": "Reference: invented stability data, one lot degrading faster",
        "response": "assay_pct", "decimals": 2, "sd": 0.5,
        "lots": [("L-201", 100.8, -0.15), ("L-202", 100.4, -0.36), ("L-203", 100.5, -0.14)],
        "limits": {"lower": 95.0},
        "tests": {"alpha": 0.05, "comparisons": "holm", "procedure": "lot-pooling"},
    },
    # Equal slopes, different starting levels: slopes poolable, intercepts not, so the
    # common-slope model; pooling_alpha left at its default.
    "limits_stability_common": {
        "seed": 31,
        "title": "Reference: invented stability data, parallel lots at different levels",
        "response": "assay_pct", "decimals": 2, "sd": 0.5,
        "lots": [("L-301", 101.4, -0.17), ("L-302", 100.2, -0.17), ("L-303", 99.3, -0.17),
                 ("L-304", 100.7, -0.17)],
        "limits": {"lower": 95.0, "confidence": 0.95},
        "tests": {"alpha": 0.05, "comparisons": "holm", "procedure": "lot-pooling"},
    },
    # One lot starts below the lower limit (its month-0 results are under 95): its
    # bound already lies below the limit at the first observation, so it gets no
    # crossing ("beyond-at-start") and comes first among the earliest. Ordinary procedure: the
    # equal-slopes gate at the default 0.05 passes, so the common-slope model.
    "limits_violated_first": {
        "seed": 41,
        "title": "Reference: invented stability data, one lot below the limit from the start",
        "response": "assay_pct", "decimals": 2, "sd": 0.45,
        "lots": [("L-401", 100.9, -0.15), ("L-402", 94.6, -0.15), ("L-403", 100.1, -0.15)],
        "limits": {"lower": 95.0},
        "tests": {"alpha": 0.05, "slopes_alpha": 0.05, "comparisons": "holm"},
    },
    # A rising response (a degradation product, % of label) against an upper limit.
    "limits_rising_upper": {
        "seed": 51,
        "title": "Reference: invented stability data, a rising impurity with an upper limit",
        "response": "impurity_pct", "decimals": 3, "sd": 0.025,
        "lots": [("L-501", 0.08, 0.014), ("L-502", 0.10, 0.021), ("L-503", 0.07, 0.016)],
        "limits": {"upper": 0.5, "confidence": 0.95},
        "tests": {"alpha": 0.05, "comparisons": "holm", "procedure": "lot-pooling",
                  "pooling_alpha": 0.25},
    },
    # One lot's assay drifts up, away from the lower limit; whether its lower bound still
    # reaches the limit depends on whether the rise is significant (see crossing()).
    "limits_wrong_sign": {
        "seed": 61,
        "title": "Reference: invented stability data, one lot moving away from the limit",
        "response": "assay_pct", "decimals": 2, "sd": 0.4,
        "lots": [("L-601", 100.5, -0.2), ("L-602", 99.6, 0.06), ("L-603", 100.9, -0.24)],
        "limits": {"lower": 95.0},
        "tests": {"alpha": 0.05, "comparisons": "holm", "procedure": "lot-pooling"},
    },
    # Slow loss: the pooled line's bound reaches the limit far beyond the data (about
    # three times the last pull), extrapolated; a non-default confidence of 0.99.
    "limits_far": {
        "seed": 72,
        "title": "Reference: invented stability data, a crossing far beyond the data",
        "response": "assay_pct", "decimals": 2, "sd": 0.35,
        "lots": [("L-701", 100.3, -0.06), ("L-702", 100.3, -0.06), ("L-703", 100.3, -0.06)],
        "limits": {"lower": 95.0, "confidence": 0.99},
        "tests": {"alpha": 0.05, "comparisons": "holm", "procedure": "lot-pooling",
                  "pooling_alpha": 0.25},
    },
    # Both limits, ordinary procedure (no `procedure` key): the slopes differ, so
    # separate lines. L-801 falls to the lower limit, L-802 rises to the upper one,
    # L-803 is nearly flat, and L-804 sits below the lower limit throughout with a
    # slight downward drift, so it is past the limit from its first observation
    # ("beyond-at-start").
    # L-804 was put on stability later: no 24-month pull, and one result lost (NA).
    "limits_two_sided": {
        "seed": 82,
        "title": "Reference: invented stability data, lower and upper limits",
        "response": "assay_pct", "decimals": 2, "sd": 0.45,
        "lots": [("L-801", 100.8, -0.22), ("L-802", 101.0, 0.16), ("L-803", 100.2, -0.02),
                 ("L-804", 94.7, -0.01, [0, 3, 6, 9, 12, 18])],
        "na": [("L-804", 9, 2)],
        "limits": {"lower": 95.0, "upper": 105.0, "confidence": 0.95},
        "tests": {"alpha": 0.05, "slopes_alpha": 0.05, "comparisons": "holm"},
    },
    # The prediction bound of a single future result, one lower limit, separate lines:
    # wider than the mean's bound, so each lot crosses earlier than its mean bound does.
    "limits_prediction": {
        "seed": 91,
        "title": "Reference: invented stability data, prediction bound for one result",
        "response": "assay_pct", "decimals": 2, "sd": 0.45,
        "lots": [("L-901", 100.7, -0.14), ("L-902", 100.3, -0.30), ("L-903", 100.5, -0.15)],
        "limits": {"lower": 95.0, "confidence": 0.95, "bound": "prediction"},
        "tests": {"alpha": 0.05, "comparisons": "holm", "procedure": "lot-pooling"},
    },
    # Both limits with the prediction bound on one pooled line: each side at 0.975.
    "limits_prediction_two_sided": {
        "seed": 94,
        "title": "Reference: invented stability data, two-sided prediction bounds",
        "response": "assay_pct", "decimals": 2, "sd": 0.5,
        "lots": [("L-931", 100.2, -0.19), ("L-932", 100.2, -0.19), ("L-933", 100.2, -0.19)],
        "limits": {"lower": 95.0, "upper": 105.0, "confidence": 0.95, "bound": "prediction"},
        "tests": {"alpha": 0.05, "comparisons": "holm", "procedure": "lot-pooling",
                  "pooling_alpha": 0.25},
    },
    # A rising impurity against an upper limit, prediction bounds: the upper side of
    # the prediction bound, crossings solved for each separate lot.
    "limits_prediction_upper": {
        "seed": 95,
        "title": "Reference: invented stability data, a rising impurity, prediction bound",
        "response": "impurity_pct", "decimals": 3, "sd": 0.025,
        "lots": [("L-951", 0.08, 0.014), ("L-952", 0.10, 0.021), ("L-953", 0.07, 0.016)],
        "limits": {"upper": 0.5, "confidence": 0.95, "bound": "prediction"},
        "tests": {"alpha": 0.05, "comparisons": "holm", "procedure": "lot-pooling",
                  "pooling_alpha": 0.25},
    },
}


def write_case_data(name: str, case: dict) -> None:
    """data/NAME.csv: columns lot, months, replicate, and the response (invented)."""
    rng = np.random.default_rng(case["seed"])
    na = set(case.get("na", []))
    rows = []
    for lot in case["lots"]:
        label, intercept, slope = lot[:3]
        months = lot[3] if len(lot) > 3 else MONTHS
        for m in months:
            for rep in range(1, REPLICATES + 1):
                v = intercept + slope * m + rng.normal(0.0, case["sd"])
                cell = "NA" if (label, m, rep) in na else f"{v:.{case['decimals']}f}"
                rows.append([label, str(m), str(rep), cell])
    gen.write_csv(gen.DATA_DIR / f"{name}.csv", ["lot", "months", "replicate",
                                                  case["response"]], rows)


def plan_for(name: str, case: dict) -> dict:
    return {
        "title": case["title"],
        "data": {"path": f"../data/{name}.csv", "missing": ["", "NA"]},
        "model": {"response": case["response"], "covariate": "months", "group": "lot"},
        "limits": case["limits"],
        "tests": case["tests"],
    }


def plan_toml(name: str, plan: dict) -> str:
    """The plan's text: generate.py's layout, with a [limits] table before [tests]."""
    out = [
        f"# Reference plan {name}: written by tests/reference/generate_limits.py; do not edit.",
        f"# The data (../data/{name}.csv) are invented, drawn by a seeded numpy generator.",
        f"# Expected results: ../expected/{name}.json (statsmodels OLS, pinned versions).",
        f"title = {gen.toml_value(plan['title'])}",
        "",
        "[data]",
    ]
    out += [f"{k} = {gen.toml_value(v)}" for k, v in plan["data"].items()]
    out += ["", "[model]"] + [f"{k} = {gen.toml_value(v)}" for k, v in plan["model"].items()]
    out += ["", "[limits]"] + [f"{k} = {gen.toml_value(v)}" for k, v in plan["limits"].items()]
    out += ["", "[tests]"] + [f"{k} = {gen.toml_value(v)}" for k, v in plan["tests"].items()]
    out += ["", "[report]", 'formats = ["json"]',
            f"out = {gen.toml_value('../../../target/reference-out/' + name)}", ""]
    return "\n".join(out)


# ---------------------------------------------------------------------------
# Bounds and crossings
# ---------------------------------------------------------------------------


class Line:
    """One mean line of the selected model: an OLS fit and the exog row at x.

    exog(x) = e0 + x * e1 (a row of the fit's design matrix for this line), so the mean
    is linear in x and its variance e(x)' Cov e(x) quadratic in x.
    """

    def __init__(self, level: str, res, e0: np.ndarray, e1: np.ndarray, X: np.ndarray,
                 y: np.ndarray, mask: np.ndarray, x: np.ndarray):
        self.level, self.res, self.e0, self.e1 = level, res, e0, e1
        self.X, self.y = X, y                       # the fit's own design and response
        self.observed_min = float(np.min(x[mask]))
        self.observed_max = float(np.max(x[mask]))
        self.slope = float(e1 @ np.asarray(res.params))
        self.obs = False                            # set from the plan's `bound`

    def exog(self, x: float) -> np.ndarray:
        return (self.e0 + x * self.e1)[None, :]

    def bound(self, x: float, side: str, confidence: float) -> float:
        """statsmodels' one-sided bound: the lower or upper end of the two-sided
        interval at 1 - 2 (1 - confidence); obs=False for the mean line's confidence
        bound, obs=True for the prediction bound of a single future result."""
        ci = self.res.get_prediction(exog=self.exog(x)).conf_int(
            obs=self.obs, alpha=2 * (1 - confidence))
        return float(ci[0, 0] if side == "lower" else ci[0, 1])

    def bound_by_hand(self, xs: np.ndarray, side: str, confidence: float) -> np.ndarray:
        """A second route: numpy least squares, (X'X)^-1 s^2 and scipy's t quantile."""
        beta, rss, _, _ = np.linalg.lstsq(self.X, self.y, rcond=None)
        df = self.X.shape[0] - self.X.shape[1]
        s2 = float(rss[0]) / df
        cov = np.linalg.inv(self.X.T @ self.X) * s2
        t = scipy.stats.t.ppf(confidence, df)
        E = self.e0[None, :] + np.asarray(xs)[:, None] * self.e1[None, :]
        mean = E @ beta
        se = np.sqrt(np.einsum("ij,jk,ik->i", E, cov, E) + (s2 if self.obs else 0.0))
        return mean - t * se if side == "lower" else mean + t * se


def crossing(line: Line, side: str, limit: float, confidence: float):
    """(crossing, reason) for one line, one limit.

    The crossing comes from the bound, not from the sign of the slope: it is the x after
    the first observation where the bound goes past the limit for good (for a lower
    limit the lower bound is concave in x, so the x where it is above the limit form
    one interval, and the crossing is that interval's right end; an upper limit is the
    mirror image). Outcomes:
    * (None, "beyond-at-start"): the bound is already past the limit at observed_min;
    * (None, "never-within"): the bound stays on the safe side from observed_min on,
      which happens exactly when the slope is significantly away from the limit at the
      bound's level (m1 - t se(m1) > 0 for a lower limit), checked on a wide grid;
    * (c, None) otherwise, c the largest root.

    Candidates: bound(x) = limit means, for a lower limit, mean(x) - L = t se(x) with
    mean(x) - L >= 0 (for an upper limit L - mean(x) = t se(x), L - mean(x) >= 0).
    Squaring gives (m0 - L + m1 x)^2 - t^2 (v0 + 2 v1 x + v2 x^2) = A x^2 + B x + C = 0;
    its real roots with the right sign of mean(x) - L are the roots of the bound, each
    polished with brentq on f(x) = bound(x) - L evaluated by statsmodels.
    """
    res = line.res
    beta, cov = np.asarray(res.params), np.asarray(res.cov_params())
    t = float(scipy.stats.t.ppf(confidence, res.df_resid))
    e0, e1 = line.e0, line.e1
    m0, m1 = float(e0 @ beta), float(e1 @ beta)
    v0, v1, v2 = float(e0 @ cov @ e0), float(e0 @ cov @ e1), float(e1 @ cov @ e1)
    if line.obs:
        v0 += float(res.scale)  # a single future result adds its own variance s^2
    sign = 1.0 if side == "lower" else -1.0     # distance to the safe side of the limit

    def f(xv: float) -> float:
        return line.bound(xv, side, confidence) - limit

    span = line.observed_max - line.observed_min
    if sign * f(line.observed_min) < 0:
        return None, "beyond-at-start"
    if sign * m1 - t * math.sqrt(v2) > 0:
        # Moves away significantly: from observed_min on the bound never meets the limit.
        grid = np.linspace(line.observed_min, line.observed_max + 100 * span, 20001)
        b = line.bound_by_hand(grid, side, confidence)
        assert np.all(sign * (b - limit) >= 0)
        return None, "never-within"
    d = m0 - limit
    qa = m1 * m1 - t * t * v2
    qb = 2 * (m1 * d - t * t * v1)
    qc = d * d - t * t * v0
    assert abs(qa) > 1e-9 * (m1 * m1 + t * t * v2), "degenerate (linear) case"
    disc = qb * qb - 4 * qa * qc
    assert abs(disc) > 1e-9 * qb * qb, "bound nearly tangent to the limit: a fragile case"
    candidates: list[float] = []
    if disc > 0:
        s = -0.5 * (qb + math.copysign(math.sqrt(disc), qb))  # numerically stable pair
        for r in sorted([s / qa, qc / s]):
            gap = m0 + m1 * r - limit
            if (gap > 0) if side == "lower" else (gap < 0):
                candidates.append(r)

    roots = []
    for r in candidates:
        others = [c for c in candidates if c != r]
        reach = (abs(others[0] - r) / 2) if others else max(1.0, abs(r))
        lo, hi = r - reach, r + reach
        assert f(lo) * f(hi) < 0, "no sign change around a crossing"
        root = float(scipy.optimize.brentq(f, lo, hi, xtol=1e-12, maxiter=500))
        assert abs(f(root)) < 1e-9, f(root)
        assert abs(root - r) <= 1e-7 * max(1.0, abs(r)), (root, r)
        roots.append(root)
    roots = [r for r in roots if r >= line.observed_min]
    assert roots, "a bound that is not significantly away from the limit must cross it"
    c = max(roots)
    # Beyond the crossing the bound stays on the wrong side; just before it, on the right
    # side (second route, numpy least squares).
    after = c + np.geomspace(1e-6, 100 * span, 2001)
    before = c - np.geomspace(1e-6, min(c - line.observed_min, span) / 2 or 1e-6, 201)
    ba, bb = line.bound_by_hand(after, side, confidence), line.bound_by_hand(before, side,
                                                                              confidence)
    assert np.all(sign * (ba - limit) < 0) and np.all(sign * (bb - limit) > 0)
    hand = float(line.bound_by_hand(np.array([c]), side, confidence)[0])
    assert abs(hand - limit) < 1e-8, (hand, limit)
    return c, None


# ---------------------------------------------------------------------------
# Model selection and the expected file
# ---------------------------------------------------------------------------


def limits_expected(plan: dict, plan_path: Path, source: str) -> dict:
    base = gen.expected_for(plan, plan_path, source)
    y, x, g, _ = gen.select_rows(plan, plan_path)
    n = len(y)
    labels = sorted(set(g), key=lambda s: s.encode("utf-8"))  # generate.py's level order
    levels = plan["model"].get("levels", labels)
    k = len(levels)
    D = np.array([[1.0 if gi == lev else 0.0 for lev in levels] for gi in g])
    ones = np.ones(n)

    X_sep = np.column_stack([D, D * x[:, None]])
    X_com = np.column_stack([D, x])
    X_one = np.column_stack([ones, x])
    sep, com, one = gen.fit(y, X_sep), gen.fit(y, X_com), gen.fit(y, X_one)
    # Slopes: separate slopes against common slope; intercepts: common slope against one
    # line through all rows (extra sum of squares, statsmodels compare_f_test). The same
    # F tests as expected_for's equal_slopes and group_effect, which the file carries.
    f_s, p_s, _ = sep.compare_f_test(com)
    f_i, p_i, _ = com.compare_f_test(one)
    assert gen.close(float(f_s), base["equal_slopes"]["f"], 1e-12)
    assert gen.close(float(p_s), base["equal_slopes"]["p_value"], 1e-12)
    assert gen.close(float(f_i), base["group_effect"]["f"], 1e-12)
    assert gen.close(float(p_i), base["group_effect"]["p_value"], 1e-12)

    tests, lim = plan.get("tests", {}), plan["limits"]
    procedure = tests.get("procedure")
    pooling = None
    if procedure is None:
        # Ordinary gate: homogeneous slopes (p >= slopes_alpha) -> common-slope model.
        gate = tests.get("slopes_alpha", gen.DEFAULT_SLOPES_ALPHA)
        model = "common-slope" if p_s >= gate else "separate"
    else:
        assert procedure == PROCEDURE_LOT_POOLING, procedure
        a = tests.get("pooling_alpha", DEFAULT_POOLING_ALPHA)
        # ICH Q1E (2003): slopes first; if they pool, intercepts; each at the 0.25 level.
        if p_s < a:
            model = "separate"
        elif p_i < a:
            model = "common-slope"
        else:
            model = "pooled"
        pooling = {"slopes_p": base["equal_slopes"]["p_value"],
                   "intercepts_p": base["group_effect"]["p_value"],
                   "alpha": a, "decision": model}

    lines: list[Line] = []
    if model == "separate":
        for j, lev in enumerate(levels):
            m = D[:, j] == 1.0
            Xg = np.column_stack([np.ones(m.sum()), x[m]])
            r = gen.fit(y[m], Xg)  # the group's own line and residual variance
            assert gen.close(float(r.params[1]), base["groups"][j]["slope"], 1e-12)
            lines.append(Line(lev, r, np.array([1.0, 0.0]), np.array([0.0, 1.0]), Xg, y[m],
                              m, x))
    elif model == "common-slope":
        for j, lev in enumerate(levels):
            e0 = np.zeros(k + 1)
            e0[j] = 1.0
            e1 = np.zeros(k + 1)
            e1[k] = 1.0
            lines.append(Line(lev, com, e0, e1, X_com, y, D[:, j] == 1.0, x))
    else:
        lines.append(Line("pooled", one, np.array([1.0, 0.0]), np.array([0.0, 1.0]), X_one,
                          y, np.ones(n, dtype=bool), x))

    sides = [s for s in ("lower", "upper") if s in lim]
    assert sides, "a [limits] table needs lower or upper"
    # Two-sided criteria: with both limits each side uses the one-sided level
    # (1 + confidence)/2 (ICH Q1E 2003, from memory).
    confidence = lim.get("confidence", DEFAULT_CONFIDENCE)
    two_sided = len(sides) == 2
    if two_sided:
        confidence = (1 + confidence) / 2
    bound = lim.get("bound", "mean")
    assert bound in ("mean", "prediction"), bound
    for line in lines:
        line.obs = bound == "prediction"
    entries = []
    for side in sides:
        for line in lines:
            c, reason = crossing(line, side, lim[side], confidence)
            entries.append({
                "level": line.level, "limit": lim[side], "side": side,
                "confidence": confidence, "bound": bound, "two_sided": two_sided,
                "crossing": c, "reason": reason,
                "observed_min": line.observed_min, "observed_max": line.observed_max,
                "extrapolated": c is not None and c > line.observed_max,
                "model": model,
            })

    out = dict(base)
    out["source"] = ("statsmodels OLS get_prediction bounds and scipy brentq crossings on "
                     "numpy design matrices, tests/reference/generate_limits.py (with "
                     f"generate.py's fits); {source}")
    if pooling is not None:
        out["pooling"] = pooling
    out["limits"] = entries
    if model != "pooled":
        earliest = {}
        for side in sides:
            # A line already past the limit at its first observation comes first (at
            # that observation); then the earliest solved crossing.
            past = [e for e in entries if e["side"] == side and e["reason"] == "beyond-at-start"]
            found = [e for e in entries if e["side"] == side and e["crossing"] is not None]
            if past:
                best = min(past, key=lambda e: e["observed_min"])
                earliest[side] = {"level": best["level"], "crossing": best["observed_min"],
                                  "already_beyond": True}
            elif found:
                best = min(found, key=lambda e: e["crossing"])
                earliest[side] = {"level": best["level"], "crossing": best["crossing"],
                                  "already_beyond": False}
            else:
                earliest[side] = None
        out["earliest"] = earliest
    # Private to check_property: the slopes and the lines (not written).
    out["_slopes"] = {ln.level: ln.slope for ln in lines}
    out["_lines"] = {ln.level: ln for ln in lines}
    return out


def mean_line(result: dict, level: str) -> Line:
    """The same line with the mean's confidence bound (obs=False)."""
    ln = result["_lines"][level]
    copy = Line.__new__(Line)
    copy.__dict__.update(ln.__dict__)
    copy.obs = False
    return copy


def entry(result: dict, level: str, side: str) -> dict:
    (e,) = [e for e in result["limits"] if e["level"] == level and e["side"] == side]
    return e


def check_property(name: str, result: dict, plan: dict, plan_path: Path) -> None:
    """Assert that each case shows what it was built for."""
    pooling, limits = result.get("pooling"), result["limits"]
    models = {e["model"] for e in limits}
    assert len(models) == 1
    (model,) = models
    if pooling is not None:
        assert pooling["decision"] == model
    if name == "limits_stability_pooled":
        assert model == "pooled" and pooling["slopes_p"] >= 0.25
        assert pooling["intercepts_p"] >= 0.25
        assert [e["level"] for e in limits] == ["pooled"] and "earliest" not in result
        assert limits[0]["crossing"] is not None and limits[0]["observed_max"] == 24.0
    elif name == "limits_stability_separate":
        assert model == "separate" and pooling["slopes_p"] < 0.25
        assert result["earliest"]["lower"]["level"] == "L-202"
        e = entry(result, "L-202", "lower")
        assert e["observed_min"] < e["crossing"] < e["observed_max"]  # inside the data
        assert all(e["crossing"] is not None for e in limits)
    elif name == "limits_stability_common":
        assert model == "common-slope"
        assert pooling["slopes_p"] >= 0.25 and pooling["intercepts_p"] < 0.25
        assert all(e["crossing"] is not None for e in limits)
    elif name == "limits_violated_first":
        assert pooling is None and model == "common-slope"
        e = entry(result, "L-402", "lower")
        assert e["crossing"] is None and e["reason"] == "beyond-at-start"
        assert result["earliest"]["lower"]["level"] == "L-402"
        assert result["earliest"]["lower"]["already_beyond"]
        # Its month-0 results average below the limit.
        y, x, g, _ = gen.select_rows(plan, plan_path)
        first = [yi for yi, xi, gi in zip(y, x, g) if gi == "L-402" and xi == 0.0]
        assert len(first) == REPLICATES and sum(first) / len(first) < 95.0, first
        others = [en for en in limits if en["level"] != "L-402"]
        assert all(en["crossing"] > en["observed_min"] for en in others)
    elif name == "limits_rising_upper":
        assert {e["side"] for e in limits} == {"upper"}
        assert all(s > 0 for s in result["_slopes"].values())
        assert all(e["crossing"] is not None and e["reason"] is None for e in limits)
    elif name == "limits_wrong_sign":
        assert model == "separate"
        e = entry(result, "L-602", "lower")
        # A rising lot still reaches a lower limit unless it rises significantly: the
        # outcome follows from the bound (see crossing()), whichever it is here.
        assert result["_slopes"]["L-602"] > 0
        assert e["reason"] in (None, "never-within") and (e["crossing"] is None) == (
            e["reason"] is not None)
        assert all(en["crossing"] is not None for en in limits if en["level"] != "L-602")
    elif name == "limits_far":
        assert model == "pooled"
        (e,) = limits
        assert e["extrapolated"] and e["confidence"] == 0.99 and e["bound"] == "mean"
        assert e["crossing"] > 2.5 * e["observed_max"], e["crossing"]
    elif name == "limits_two_sided":
        assert pooling is None and model == "separate" and "pooling" not in result
        assert [e["side"] for e in limits] == ["lower"] * 4 + ["upper"] * 4
        assert all(e["two_sided"] and e["confidence"] == 0.975 for e in limits)
        # L-804 starts below the lower limit: already past it at its first observation.
        assert entry(result, "L-804", "lower")["reason"] == "beyond-at-start"
        assert entry(result, "L-804", "lower")["observed_max"] == 18.0
        # Lines moving away significantly never meet the opposite limit.
        assert entry(result, "L-802", "lower")["reason"] == "never-within"
        assert entry(result, "L-801", "upper")["reason"] == "never-within"
        assert result["earliest"]["lower"]["level"] == "L-804"  # past the limit from the start
        assert result["earliest"]["upper"]["level"] == "L-802"
        assert result["data"]["rows_dropped"] == {"missing_response": 1}
    elif name == "limits_prediction":
        assert all(e["bound"] == "prediction" and not e["two_sided"] for e in limits)
        assert all(e["confidence"] == 0.95 and e["crossing"] is not None for e in limits)
        # The prediction bound is wider than the mean's, so it crosses earlier.
        for e in limits:
            mean = crossing(mean_line(result, e["level"]), "lower", 95.0, 0.95)[0]
            assert e["crossing"] < mean, (e["crossing"], mean)
    elif name == "limits_prediction_two_sided":
        assert model == "pooled"
        assert all(e["two_sided"] and e["confidence"] == 0.975 for e in limits)
        assert entry(result, "pooled", "lower")["crossing"] is not None
    elif name == "limits_prediction_upper":
        assert {e["side"] for e in limits} == {"upper"}
        assert all(e["bound"] == "prediction" for e in limits)
        assert all(e["crossing"] is not None for e in limits)
        for e in limits:
            mean = crossing(mean_line(result, e["level"]), "upper", 0.5, 0.95)[0]
            assert e["crossing"] < mean, (e["crossing"], mean)
    else:
        raise AssertionError(f"no property check for {name}")


def fmt(v) -> str:
    return "null" if v is None else f"{v:.4g}"


def main() -> None:
    source = gen.check_versions()
    for d in (gen.DATA_DIR, gen.PLAN_DIR, gen.EXPECTED_DIR):
        d.mkdir(parents=True, exist_ok=True)
    clash = set(CASES) & set(gen.PLANS)
    assert not clash, clash
    for name, case in CASES.items():
        write_case_data(name, case)
        path = gen.PLAN_DIR / f"{name}.toml"
        path.write_text(plan_toml(name, plan_for(name, case)))
        parsed = tomllib.loads(path.read_text())  # compute from the file as written
        result = limits_expected(parsed, path, source)
        check_property(name, result, parsed, path)
        slopes = result.pop("_slopes")
        result.pop("_lines")
        gen.write_json(gen.EXPECTED_DIR / f"{name}.json", result)
        pooling = result.get("pooling")
        head = (f"slopes p={pooling['slopes_p']:.4g} intercepts p={pooling['intercepts_p']:.4g}"
                if pooling else f"equal_slopes p={result['equal_slopes']['p_value']:.4g}")
        print(f"{name}: {head} -> {result['limits'][0]['model']}")
        for e in result["limits"]:
            print(f"  {e['side']} {e['limit']} {e['level']}: slope {slopes[e['level']]:.4g} "
                  f"crossing {fmt(e['crossing'])} ({e['reason'] or 'found'}) observed "
                  f"[{e['observed_min']:g}, {e['observed_max']:g}] "
                  f"extrapolated={e['extrapolated']}")


if __name__ == "__main__":
    main()
