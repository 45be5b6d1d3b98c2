#!/usr/bin/env python3
"""Write the external reference values that the slopewise test suite compares against.

Everything this script writes comes from outside the project:

* data/*.csv        open data sets shipped inside registry packages (palmerpenguins,
                    scikit-learn, statsmodels), copied or re-written as plain CSV;
* plans/*.toml      plans in the contract's format (shared/contract.md) over that data;
* expected/*.json   for each plan, the numbers computed with statsmodels OLS on design
                    matrices built by hand with numpy (no formula strings anywhere);
* distributions.json  t and F quantiles and upper tails from scipy.stats.

Run it with the pinned environment (requirements.txt beside this file):

    /tmp/refvenv/bin/python tests/reference/generate.py

The output is deterministic: running it twice gives byte-identical files.
The computation reads back the CSV and TOML files it has just written, so the
reference numbers come from exactly the bytes the Rust tool will read.
"""

from __future__ import annotations

import csv
import importlib.resources
import json
import math
import sys
import tomllib
from importlib import metadata
from pathlib import Path

import numpy as np
import scipy.stats
import sklearn.datasets
import statsmodels.api as sm
import statsmodels.datasets.grunfeld
from statsmodels.stats.multitest import multipletests

HERE = Path(__file__).resolve().parent
DATA_DIR = HERE / "data"
PLAN_DIR = HERE / "plans"
EXPECTED_DIR = HERE / "expected"

# Defaults of the plan format, as written in shared/contract.md ("Plan file (TOML)").
DEFAULT_MISSING = ["", "NA"]
DEFAULT_ALPHA = 0.05
DEFAULT_SLOPES_ALPHA = 0.05
DEFAULT_COMPARISONS = "holm"
DEFAULT_ADJUST_AT = "mean"

# Distribution names (as pip knows them) of the pinned packages, in requirements order.
PINNED = ["numpy", "scipy", "statsmodels", "pandas", "palmerpenguins", "scikit-learn"]


# ---------------------------------------------------------------------------
# Versions
# ---------------------------------------------------------------------------


def check_versions() -> str:
    """Compare installed versions with requirements.txt; return the "source" string.

    The pins are read from requirements.txt so that file stays the single place they
    are written; a mismatch stops the script, since the values would then not be
    reproducible from the committed pins.
    """
    pins: dict[str, str] = {}
    for line in (HERE / "requirements.txt").read_text().splitlines():
        line = line.split("#", 1)[0].strip()
        if line:
            name, _, version = line.partition("==")
            pins[name.strip().lower()] = version.strip()
    if sorted(pins) != sorted(PINNED):
        sys.exit(f"requirements.txt pins {sorted(pins)}, expected {sorted(PINNED)}")
    found = {name: metadata.version(name) for name in PINNED}
    bad = [f"{n} {found[n]} (pinned {pins[n]})" for n in PINNED if found[n] != pins[n]]
    if bad:
        sys.exit("installed versions differ from requirements.txt: " + ", ".join(bad))
    return ", ".join(f"{n} {found[n]}" for n in PINNED)


# ---------------------------------------------------------------------------
# Data sets (copied from the packages that ship them)
# ---------------------------------------------------------------------------


def write_csv(path: Path, header: list[str], rows: list[list[str]]) -> None:
    """Plain CSV: comma separated, "\\n" line ends, quotes only where a cell needs them."""
    with path.open("w", newline="") as fh:
        writer = csv.writer(fh, lineterminator="\n")
        writer.writerow(header)
        writer.writerows(rows)


def copy_penguins() -> None:
    """penguins.csv exactly as palmerpenguins 0.1.6 ships it (palmerpenguins/data/penguins.csv).

    Source: Gorman, Williams & Fraser (2014), PLoS ONE 9(3): e90081, via the
    palmerpenguins package. The shipped file is already a plain CSV with "NA" for
    missing cells, so its bytes are copied unchanged; the checks below make sure.
    """
    raw = (importlib.resources.files("palmerpenguins") / "data" / "penguins.csv").read_bytes()
    text = raw.decode("ascii")
    lines = text.split("\n")
    assert lines[-1] == "" and "\r" not in text and '"' not in text, "not a plain CSV"
    header = lines[0].split(",")
    assert header == [
        "species", "island", "bill_length_mm", "bill_depth_mm",
        "flipper_length_mm", "body_mass_g", "sex", "year",
    ], header
    body = lines[1:-1]
    assert len(body) == 344 and all(len(r.split(",")) == 8 for r in body)
    assert any("NA" in r.split(",") for r in body), "expected NA tokens"
    (DATA_DIR / "penguins.csv").write_bytes(raw)


def write_iris() -> None:
    """iris.csv from scikit-learn 1.9.1's sklearn/datasets/data/iris.csv.

    Source: Fisher (1936), Annals of Eugenics 7(2): 179-188, as shipped by
    scikit-learn. The shipped file's first line is "150,4,setosa,versicolor,virginica"
    (row count, feature count, class names) and its last column is a class index;
    here the measurement text is kept byte for byte and the index becomes the name.
    """
    path = importlib.resources.files("sklearn.datasets") / "data" / "iris.csv"
    with path.open("r", newline="") as fh:
        reader = csv.reader(fh)
        first = next(reader)
        n_rows, n_features, names = int(first[0]), int(first[1]), first[2:]
        assert (n_rows, n_features, names) == (150, 4, ["setosa", "versicolor", "virginica"])
        rows = [r[:4] + [names[int(r[4])]] for r in reader]
    assert len(rows) == n_rows
    # Cross-check against the package's own loader.
    bunch = sklearn.datasets.load_iris()
    assert np.array_equal(np.array([[float(v) for v in r[:4]] for r in rows]), bunch.data)
    assert [r[4] for r in rows] == [names[t] for t in bunch.target]
    header = ["sepal_length", "sepal_width", "petal_length", "petal_width", "species"]
    write_csv(DATA_DIR / "iris.csv", header, rows)


def write_grunfeld() -> None:
    """grunfeld.csv from statsmodels 0.15.0's statsmodels.datasets.grunfeld.load_pandas().

    Source: Grunfeld (1958), investment data for 11 US firms 1935-1954, as shipped by
    statsmodels. Floats are written with repr() (the shortest text that reads back to
    the same double); year is integral and written without ".0".
    """
    frame = statsmodels.datasets.grunfeld.load_pandas().data
    header = ["invest", "value", "capital", "firm", "year"]
    assert list(frame.columns) == header, list(frame.columns)
    rows = []
    for rec in frame.itertuples(index=False):
        invest, value, capital, firm, year = rec
        assert float(year).is_integer()
        cells = [repr(float(invest)), repr(float(value)), repr(float(capital)), str(firm),
                 str(int(year))]
        assert not any("e" in c or "nan" in c for c in cells[:3]), cells
        rows.append(cells)
    assert len(rows) == 220
    write_csv(DATA_DIR / "grunfeld.csv", header, rows)


# Invented data for the Johnson-Neyman reference cases (generate_checks.py). These are
# NOT measurements: a seeded numpy generator draws them for two made-up groups "north"
# and "south", 30 rows each, covariate x uniform on [0, 10], response y a straight
# line per group plus normal noise (sd 1). Both cells are rounded to 3 decimals and
# written as text, so the CSV is exactly what every computation reads back.
# generate_checks.py asserts the property each case exists for.
JN_CASES = {
    # Lines nearly parallel and close: no x in the observed range where they differ.
    "jn_empty": {"seed": 1, "north": (10.0, 0.5), "south": (10.05, 0.5)},
    # Lines that cross near the low end of the range with clearly different slopes:
    # significant above one bound inside the range; the other bound lies below it.
    "jn_one_sided": {"seed": 7, "north": (10.0, 0.5), "south": (9.5, 1.0)},
}


def write_jn_data() -> None:
    """data/jn_*.csv: invented two-group data (see JN_CASES); columns g, x, y."""
    for name, case in JN_CASES.items():
        rng = np.random.default_rng(case["seed"])
        n = 30
        x = np.round(rng.uniform(0.0, 10.0, 2 * n), 3)
        g = ["north"] * n + ["south"] * n
        mean = np.array([case[gi][0] + case[gi][1] * xi for gi, xi in zip(g, x)])
        y = np.round(mean + rng.normal(0.0, 1.0, 2 * n), 3)
        rows = [[gi, f"{xi:.3f}", f"{yi:.3f}"] for gi, xi, yi in zip(g, x, y)]
        write_csv(DATA_DIR / f"{name}.csv", ["g", "x", "y"], rows)


# ---------------------------------------------------------------------------
# Plans
# ---------------------------------------------------------------------------

# Each plan as a nested dict in the contract's layout. Keys left out use the contract's
# defaults (iris_sepal_log leaves out missing, alpha and slopes_alpha on purpose).
PLANS: dict[str, dict] = {
    # Body mass against flipper length across the three species; the two rows with
    # no measurements at all are dropped as missing_response.
    "penguins_mass": {
        "title": "Reference: penguin body mass by flipper length across species",
        "data": {"path": "../data/penguins.csv", "missing": ["NA"]},
        "model": {"response": "body_mass_g", "covariate": "flipper_length_mm",
                  "group": "species"},
        "tests": {"alpha": 0.05, "slopes_alpha": 0.05, "comparisons": "holm"},
    },
    # Females only (sex NA or male fails the filter); islands in a given,
    # non-alphabetical order, so the reference level is Torgersen.
    "penguins_bill_filtered": {
        "title": "Reference: bill depth by bill length across islands, females only",
        "data": {"path": "../data/penguins.csv", "missing": ["NA"],
                 "keep": [{"column": "sex", "equals": "female"}]},
        "model": {"response": "bill_depth_mm", "covariate": "bill_length_mm",
                  "group": "island", "levels": ["Torgersen", "Dream", "Biscoe"]},
        "tests": {"alpha": 0.1, "slopes_alpha": 0.05, "comparisons": "bonferroni"},
    },
    # Two groups only, so equal_slopes.f equals pairwise_slopes[0].t squared.
    "penguins_two_species": {
        "title": "Reference: body mass by bill length, Adelie against Gentoo",
        "data": {"path": "../data/penguins.csv", "missing": ["", "NA"],
                 "keep": [{"column": "species", "one_of": ["Gentoo", "Adelie"]}]},
        "model": {"response": "body_mass_g", "covariate": "bill_length_mm",
                  "group": "species"},
        "tests": {"alpha": 0.05, "slopes_alpha": 0.05, "comparisons": "holm"},
    },
    # Adjusted means at a fixed covariate value instead of the mean.
    "iris_petal": {
        "title": "Reference: petal width by petal length across iris species",
        "data": {"path": "../data/iris.csv"},
        "model": {"response": "petal_width", "covariate": "petal_length",
                  "group": "species", "adjust_at": 4.0},
        "tests": {"alpha": 0.05, "slopes_alpha": 0.05, "comparisons": "holm"},
    },
    # Transforms on both sides; alpha and slopes_alpha left at their defaults.
    "iris_sepal_log": {
        "title": "Reference: log sepal length by square-root sepal width across species",
        "data": {"path": "../data/iris.csv"},
        "model": {"response": "sepal_length", "covariate": "sepal_width",
                  "group": "species", "transform": {"response": "log", "covariate": "sqrt"}},
        "tests": {"comparisons": "holm"},
    },
    # Four of the eleven firms, log10 investment against natural-log firm value, with a
    # stricter equal-slopes gate. These four were chosen so that the equal-slopes p-value
    # lies between 0.01 and 0.05: homogeneous at this plan's slopes_alpha = 0.01, not at
    # the default 0.05, so a tool that ignores slopes_alpha decides differently. Default
    # level order is byte order: "US Steel" sorts before "Union Oil" ('S' < 'n').
    "grunfeld_log": {
        "title": "Reference: log investment by log firm value for four firms",
        "data": {"path": "../data/grunfeld.csv", "missing": ["NA"],
                 "keep": [{"column": "firm", "one_of": ["Union Oil", "US Steel", "IBM",
                                                         "General Motors"]}]},
        "model": {"response": "invest", "covariate": "value", "group": "firm",
                  "transform": {"response": "log10", "covariate": "log"}},
        "tests": {"alpha": 0.05, "slopes_alpha": 0.01, "comparisons": "holm"},
    },
    # Invented two-group data (write_jn_data): Johnson-Neyman regions with no
    # significant x in the observed range, and with a one-sided region.
    "jn_empty": {
        "title": "Reference: invented data, two nearly parallel close lines",
        "data": {"path": "../data/jn_empty.csv", "missing": ["NA"]},
        "model": {"response": "y", "covariate": "x", "group": "g"},
        "tests": {"alpha": 0.05, "slopes_alpha": 0.05, "comparisons": "holm"},
    },
    "jn_one_sided": {
        "title": "Reference: invented data, two lines crossing near the low end",
        "data": {"path": "../data/jn_one_sided.csv", "missing": ["NA"]},
        "model": {"response": "y", "covariate": "x", "group": "g"},
        "tests": {"alpha": 0.05, "slopes_alpha": 0.05, "comparisons": "holm"},
    },
}


def toml_value(v) -> str:
    """TOML text for the few value kinds plans use (string, number, list of strings)."""
    if isinstance(v, str):
        return json.dumps(v)  # a JSON string of ASCII text is a valid TOML basic string
    if isinstance(v, bool):
        return "true" if v else "false"
    if isinstance(v, (int, float)):
        return repr(v)
    if isinstance(v, list):
        return "[" + ", ".join(toml_value(x) for x in v) + "]"
    raise TypeError(v)


def plan_toml(name: str, plan: dict) -> str:
    """The plan file's text, tables in the contract's order."""
    out = [
        f"# Reference plan {name}: written by tests/reference/generate.py; do not edit.",
        f"# Expected results: ../expected/{name}.json (statsmodels OLS, pinned versions).",
        f"title = {toml_value(plan['title'])}",
        "",
        "[data]",
    ]
    data = plan["data"]
    out += [f"{k} = {toml_value(v)}" for k, v in data.items() if k != "keep"]
    for rule in data.get("keep", []):
        out += ["", "[[data.keep]]"] + [f"{k} = {toml_value(v)}" for k, v in rule.items()]
    model = plan["model"]
    out += ["", "[model]"]
    out += [f"{k} = {toml_value(v)}" for k, v in model.items() if k != "transform"]
    if "transform" in model:
        out += ["", "[model.transform]"]
        out += [f"{k} = {toml_value(v)}" for k, v in model["transform"].items()]
    out += ["", "[tests]"] + [f"{k} = {toml_value(v)}" for k, v in plan["tests"].items()]
    out += ["", "[report]", 'formats = ["json"]',
            f"out = {toml_value('../../../target/reference-out/' + name)}", ""]
    return "\n".join(out)


# ---------------------------------------------------------------------------
# Reference computation (statsmodels OLS on hand-built design matrices)
# ---------------------------------------------------------------------------

TRANSFORMS = {
    "none": lambda v: v,
    "log": math.log,      # natural logarithm
    "log10": math.log10,
    "sqrt": math.sqrt,
}


def transform(kind: str, value: float) -> float:
    """Apply a plan transform; the reference plans never hit an invalid domain."""
    if kind in ("log", "log10"):
        assert value > 0, (kind, value)
    if kind == "sqrt":
        assert value >= 0, (kind, value)
    return TRANSFORMS[kind](value)


def select_rows(plan: dict, plan_path: Path):
    """Rows the plan keeps, with the drop counts by reason.

    Reasons are checked in this order and a row counts once, under the first that
    applies: filtered_out (fails a keep rule), missing_response, missing_covariate,
    missing_group. Only reasons with a non-zero count are returned.
    """
    data, model = plan["data"], plan["model"]
    missing = set(data.get("missing", DEFAULT_MISSING))
    tf = model.get("transform", {})
    y_name, x_name, g_name = model["response"], model["covariate"], model["group"]
    dropped: dict[str, int] = {}
    ys, xs, gs = [], [], []
    with (plan_path.parent / data["path"]).open(newline="") as fh:
        for row in csv.DictReader(fh):
            reason = None
            for rule in data.get("keep", []):
                cell = row[rule["column"]]
                ok = cell == rule["equals"] if "equals" in rule else cell in rule["one_of"]
                if not ok:
                    reason = "filtered_out"
                    break
            if reason is None:
                if row[y_name] in missing:
                    reason = "missing_response"
                elif row[x_name] in missing:
                    reason = "missing_covariate"
                elif row[g_name] in missing:
                    reason = "missing_group"
            if reason is not None:
                dropped[reason] = dropped.get(reason, 0) + 1
                continue
            ys.append(transform(tf.get("response", "none"), float(row[y_name])))
            xs.append(transform(tf.get("covariate", "none"), float(row[x_name])))
            gs.append(row[g_name])
    for rule in data.get("keep", []):  # a misspelt one_of value would pass silently
        for value in rule.get("one_of", []):
            assert value in gs or rule["column"] != g_name, f"no kept row has {value!r}"
    return np.array(ys), np.array(xs), gs, dropped


def fit(y: np.ndarray, X: np.ndarray):
    """statsmodels OLS; the design must have full column rank.

    The coefficients and residual sum of squares are checked against numpy's own
    least-squares solver, a second route to the same numbers.
    """
    assert np.linalg.matrix_rank(X) == X.shape[1]
    res = sm.OLS(y, X).fit()
    beta, rss, _, _ = np.linalg.lstsq(X, y, rcond=None)
    scale = np.max(np.abs(beta))
    assert np.all(np.abs(res.params - beta) <= 1e-9 * scale), (res.params, beta)
    assert close(float(res.ssr), float(rss[0]), 1e-9), (res.ssr, rss)
    return res


def f64(v) -> float:
    """A statsmodels scalar (often a 0-d or 1x1 array) as a plain float."""
    return float(np.asarray(v).reshape(-1)[0])


def pair(ci_row) -> list[float]:
    return [float(ci_row[0]), float(ci_row[1])]


def close(a: float, b: float, rtol: float = 1e-10) -> bool:
    return abs(a - b) <= rtol * max(abs(a), abs(b), 1e-300)


def expected_for(plan: dict, plan_path: Path, source: str) -> dict:
    model, tests = plan["model"], plan.get("tests", {})
    alpha = tests.get("alpha", DEFAULT_ALPHA)
    method = tests.get("comparisons", DEFAULT_COMPARISONS)
    assert method in ("holm", "bonferroni")  # the plans here use only these

    y, x, g, dropped = select_rows(plan, plan_path)
    n = len(y)
    labels = sorted(set(g), key=lambda s: s.encode("utf-8"))  # text order, byte-wise
    levels = model.get("levels", labels)
    assert set(g) <= set(levels), "a kept row has a group outside levels"
    k = len(levels)
    # D[i, j] = 1 when row i is in level j (group dummies, no reference column dropped).
    D = np.array([[1.0 if gi == lev else 0.0 for lev in levels] for gi in g])
    assert D.sum(axis=0).min() >= 3, "each group needs at least 3 rows"
    ones = np.ones(n)

    x_mean = float(np.mean(x))
    adjust = model.get("adjust_at", DEFAULT_ADJUST_AT)
    adjust_at = x_mean if adjust == "mean" else float(adjust)

    # --- each group's own simple regression: columns [1, x] --------------------------
    groups, group_fits = [], []
    for j, lev in enumerate(levels):
        m = D[:, j] == 1.0
        r = fit(y[m], np.column_stack([np.ones(m.sum()), x[m]]))
        ci = r.conf_int(alpha)  # t at 1 - alpha/2 on n_g - 2 df
        group_fits.append(r)
        groups.append({
            "level": lev,
            "n": int(m.sum()),
            "slope": float(r.params[1]),
            "slope_se": float(r.bse[1]),
            "slope_ci": pair(ci[1]),
            "intercept": float(r.params[0]),
            "intercept_se": float(r.bse[0]),
            "intercept_ci": pair(ci[0]),
            "r_squared": float(r.rsquared),
            "residual_sd": math.sqrt(r.scale),
            "covariate_mean": float(np.mean(x[m])),
            "response_mean": float(np.mean(y[m])),
        })

    # --- the three nested models -----------------------------------------------------
    # separate slopes: k intercepts then k slopes (dummies, dummies * x)
    sep = fit(y, np.column_stack([D, D * x[:, None]]))
    # common slope: k intercepts then one slope
    com = fit(y, np.column_stack([D, x]))
    # one line for all rows: [1, x]
    one = fit(y, np.column_stack([ones, x]))
    assert sep.df_resid == n - 2 * k and com.df_resid == n - k - 1 and one.df_resid == n - 2

    # Extra-sum-of-squares F tests (statsmodels compare_f_test), checked against the
    # contract's formula.
    f_s, p_s, df1_s = sep.compare_f_test(com)
    assert df1_s == k - 1
    assert close(f_s, ((com.ssr - sep.ssr) / (k - 1)) / (sep.ssr / (n - 2 * k)))
    equal_slopes = {"f": float(f_s), "df1": k - 1, "df2": n - 2 * k, "p_value": float(p_s),
                    "rss_separate": float(sep.ssr), "rss_common": float(com.ssr)}

    f_g, p_g, df1_g = com.compare_f_test(one)
    assert df1_g == k - 1
    assert close(f_g, ((one.ssr - com.ssr) / (k - 1)) / (com.ssr / (n - k - 1)))
    group_effect = {"f": float(f_g), "df1": k - 1, "df2": n - k - 1, "p_value": float(p_g),
                    "rss_one_line": float(one.ssr)}

    pairs = [(a, b) for a in range(k) for b in range(a + 1, k)]

    # --- pairwise slope differences ---------------------------------------------------
    pairwise_slopes, welch = [], []
    for a, b in pairs:
        c = np.zeros(2 * k)
        c[k + a], c[k + b] = 1.0, -1.0
        tt = sep.t_test(c)  # pooled residual variance of the separate-slopes model
        assert tt.df_denom == n - 2 * k
        ga, gb = group_fits[a], group_fits[b]
        va, vb = float(ga.bse[1]) ** 2, float(gb.bse[1]) ** 2
        na, nb = groups[a]["n"], groups[b]["n"]
        w_se = math.sqrt(va + vb)
        w_t = (float(ga.params[1]) - float(gb.params[1])) / w_se
        # Welch (1947) / Satterthwaite (1946) approximate degrees of freedom.
        w_df = (va + vb) ** 2 / (va**2 / (na - 2) + vb**2 / (nb - 2))
        pairwise_slopes.append({
            "a": levels[a], "b": levels[b],
            "difference": f64(tt.effect), "se": f64(tt.sd), "t": f64(tt.tvalue),
            "df": n - 2 * k, "p_value": f64(tt.pvalue),
        })
        welch.append({"se": w_se, "t": w_t, "df": w_df,
                      "p_value": float(2.0 * scipy.stats.t.sf(abs(w_t), w_df))})
    adj = multipletests([p["p_value"] for p in pairwise_slopes], method=method)[1]
    for p, pa, w in zip(pairwise_slopes, adj, welch):
        p["p_adjusted"] = float(pa)
        p["welch"] = w

    # --- common slope ------------------------------------------------------------------
    ci = com.conf_int(alpha)
    common_slope = {"slope": float(com.params[k]), "se": float(com.bse[k]), "ci": pair(ci[k]),
                    "df": n - k - 1, "residual_sd": math.sqrt(com.scale)}

    # --- adjusted means: common-slope prediction at x = adjust_at -----------------------
    adjusted_means = []
    for j, lev in enumerate(levels):
        row = np.zeros((1, k + 1))
        row[0, j], row[0, k] = 1.0, adjust_at
        sf = com.get_prediction(exog=row).summary_frame(alpha=alpha)
        mean = float(sf["mean"].iloc[0])
        assert close(mean, float(com.params[j] + com.params[k] * adjust_at), 1e-9)
        adjusted_means.append({"level": lev, "mean": mean, "se": float(sf["mean_se"].iloc[0]),
                               "ci": [float(sf["mean_ci_lower"].iloc[0]),
                                      float(sf["mean_ci_upper"].iloc[0])]})

    pairwise_adjusted = []
    for a, b in pairs:
        c = np.zeros(k + 1)
        c[a], c[b] = 1.0, -1.0
        tt = com.t_test(c)
        assert tt.df_denom == n - k - 1
        pairwise_adjusted.append({"a": levels[a], "b": levels[b], "difference": f64(tt.effect),
                                  "se": f64(tt.sd), "t": f64(tt.tvalue), "df": n - k - 1,
                                  "p_value": f64(tt.pvalue)})
    adj = multipletests([p["p_value"] for p in pairwise_adjusted], method=method)[1]
    for p, pa in zip(pairwise_adjusted, adj):
        p["p_adjusted"] = float(pa)

    # For two groups the pooled pairwise t squared is the equal-slopes F (contract).
    if k == 2:
        assert close(pairwise_slopes[0]["t"] ** 2, equal_slopes["f"], 1e-9)

    return {
        "source": f"statsmodels OLS on numpy design matrices, tests/reference/generate.py; "
                  f"{source}",
        "data": {"rows_used": n, "rows_dropped": dict(sorted(dropped.items()))},
        "covariate_mean": x_mean,
        "adjust_at": adjust_at,
        "groups": groups,
        "equal_slopes": equal_slopes,
        "pairwise_slopes": pairwise_slopes,
        "common_slope": common_slope,
        "group_effect": group_effect,
        "one_line": {"n": n, "slope": float(one.params[1]), "intercept": float(one.params[0]),
                     "slope_se": float(one.bse[1]), "intercept_se": float(one.bse[0]),
                     "residual_sd": math.sqrt(one.scale), "r_squared": float(one.rsquared)},
        "adjusted_means": adjusted_means,
        "pairwise_adjusted": pairwise_adjusted,
    }


# ---------------------------------------------------------------------------
# t and F distributions (scipy.stats)
# ---------------------------------------------------------------------------

# (p, df): small, moderate, large and non-integer df; central, 0.975/0.995 and far tails.
# p = 0.5 itself is left out: its value is exactly 0, where a relative check says nothing.
T_PPF = [(0.975, 1), (0.995, 1), (0.6, 1), (0.975, 2), (0.995, 2), (0.55, 3), (0.975, 3),
         (0.025, 5), (0.501, 10), (0.975, 10), (0.995, 30), (0.9, 120), (0.975, 1e4),
         (0.995, 1e6), (1e-10, 4), (0.999999, 2.5), (0.975, 338)]
# (x, df): upper tails from about 0.9 down to below 1e-12.
T_SF = [(1.0, 1), (12.706, 1), (3.0, 2), (0.1, 3), (2.5, 10), (10.0, 10), (-1.5, 7),
        (0.01, 100), (1000.0, 3), (7.5, 200), (20.0, 50), (40.0, 30), (3.0, 1e4),
        (2.0, 1e6), (8.0, 1e6), (2.2, 338)]
# (p, df1, df2)
F_PPF = [(0.95, 1, 1), (0.95, 2, 3), (0.99, 3, 2), (0.5, 2, 10), (0.95, 2, 338),
         (0.99, 2, 144), (0.95, 4, 1e4), (0.95, 5, 1e6), (0.05, 3, 20), (0.999, 1, 5),
         (0.95, 10, 10), (0.9999, 2, 100), (0.975, 6, 40), (0.995, 3, 72)]
# (x, df1, df2): upper tails down to far below 1e-12.
F_SF = [(1.0, 1, 1), (3.0, 2, 3), (0.5, 3, 2), (10.0, 2, 338), (50.0, 2, 338),
        (150.0, 2, 144), (2.0, 4, 1e4), (1.5, 5, 1e6), (0.2, 3, 20), (30.0, 1, 5),
        (25.0, 2, 100), (100.0, 3, 1000), (4.0, 1, 1e6), (1000.0, 2, 2), (0.9, 2, 10)]


def num(v):
    """Keep integral df as JSON integers, everything else as floats."""
    return int(v) if isinstance(v, int) or float(v).is_integer() else float(v)


def distributions(source: str) -> dict:
    t, f = scipy.stats.t, scipy.stats.f
    out = {
        "source": f"scipy.stats.t.ppf / t.sf / f.ppf / f.sf, tests/reference/generate.py; "
                  f"{source}",
        "t_ppf": [{"p": p, "df": num(d), "value": float(t.ppf(p, d))} for p, d in T_PPF],
        "t_sf": [{"x": x, "df": num(d), "value": float(t.sf(x, d))} for x, d in T_SF],
        "f_ppf": [{"p": p, "df1": num(a), "df2": num(b), "value": float(f.ppf(p, a, b))}
                  for p, a, b in F_PPF],
        "f_sf": [{"x": x, "df1": num(a), "df2": num(b), "value": float(f.sf(x, a, b))}
                 for x, a, b in F_SF],
    }
    for key in ("t_sf", "f_sf"):
        assert min(e["value"] for e in out[key]) < 1e-12, key
        assert all(e["value"] > 0 for e in out[key]), key
    return out


# ---------------------------------------------------------------------------


def write_json(path: Path, obj) -> None:
    path.write_text(json.dumps(obj, indent=2, allow_nan=False) + "\n")


def main() -> None:
    source = check_versions()
    for d in (DATA_DIR, PLAN_DIR, EXPECTED_DIR):
        d.mkdir(parents=True, exist_ok=True)

    copy_penguins()
    write_iris()
    write_grunfeld()
    write_jn_data()

    for name, plan in PLANS.items():
        path = PLAN_DIR / f"{name}.toml"
        path.write_text(plan_toml(name, plan))
        parsed = tomllib.loads(path.read_text())  # compute from the file as written
        result = expected_for(parsed, path, source)
        write_json(EXPECTED_DIR / f"{name}.json", result)
        es = result["equal_slopes"]
        gate = parsed["tests"].get("slopes_alpha", DEFAULT_SLOPES_ALPHA)
        verdict = "homogeneous" if es["p_value"] >= gate else "NOT homogeneous"
        print(f"{name}: rows_used={result['data']['rows_used']} "
              f"dropped={result['data']['rows_dropped']} equal_slopes "
              f"F={es['f']:.4g} p={es['p_value']:.4g} -> {verdict} at {gate}")

    write_json(HERE / "distributions.json", distributions(source))


if __name__ == "__main__":
    main()
