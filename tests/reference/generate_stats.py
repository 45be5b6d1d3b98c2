"""Reference values for slopewise's statistics modules (src/stats/).

Writes tests/reference/stats.json next to this script. The Rust unit tests in
src/stats/shapiro_wilk.rs, studentized_range.rs and brown_forsythe.rs read it
and compare their own results with the values computed here.

Pinned versions (checked below; the script refuses to run with others):
    numpy 2.4.6, scipy 1.17.1, scikit-learn 1.9.1 (only for its bundled iris
    table, Fisher 1936 / Anderson 1935).

Run from the repository root, in an environment with exactly those versions
(pip install numpy==2.4.6 scipy==1.17.1 scikit-learn==1.9.1):

    python tests/reference/generate_stats.py

The output is deterministic (fixed seed), so rerunning it must leave
stats.json unchanged.

All samples except iris are invented here with a seeded generator; they stand
for no real measurements. Samples are rounded to a few decimals before use so
that the JSON holds exactly the numbers scipy saw.
"""

import json
import math
import pathlib
import sys

import numpy as np
import scipy
import sklearn
from scipy import stats
from sklearn.datasets import load_iris

PINNED = {"numpy": "2.4.6", "scipy": "1.17.1", "scikit-learn": "1.9.1"}
FOUND = {"numpy": np.__version__, "scipy": scipy.__version__, "scikit-learn": sklearn.__version__}
for name, want in PINNED.items():
    if FOUND[name] != want:
        sys.exit(f"generate_stats.py needs {name} {want}, found {FOUND[name]}")

rng = np.random.default_rng(20260517)
OUT = pathlib.Path(__file__).with_name("stats.json")


def rounded(values, decimals):
    return [round(float(v), decimals) for v in values]


# ---------------------------------------------------------------- Shapiro–Wilk
shapiro_cases = []


def add_shapiro(name, sample):
    sample = [float(v) for v in sample]
    res = stats.shapiro(np.asarray(sample, dtype=np.float64))
    shapiro_cases.append(
        {
            "name": name,
            "n": len(sample),
            "x": sample,
            "statistic": float(res.statistic),
            "p_value": float(res.pvalue),
        }
    )


# Invented: residual-like normal samples of every size the algorithm
# distinguishes (n = 3 exact; 4..11; 12 and over), on an arbitrary scale.
for n in [3, 4, 5, 7, 11, 12, 20, 50, 200, 1000, 5000]:
    add_shapiro(f"normal_n{n}", rounded(rng.normal(10.0, 2.0, n), 4))
# Invented: a right-skewed sample (log-normal), where normality is rejected.
add_shapiro("lognormal_n60", rounded(rng.lognormal(0.0, 0.8, 60), 4))
# Invented: a heavily skewed small sample.
add_shapiro("exponential_n9", rounded(rng.exponential(1.0, 9), 3))
# Invented: a sample with many ties (values recorded to the nearest 0.5).
add_shapiro("ties_n40", [round(2.0 * v) / 2.0 for v in rng.normal(5.0, 1.5, 40)])
# Invented: uniform sample (light tails).
add_shapiro("uniform_n30", rounded(rng.uniform(0.0, 1.0, 30), 4))

# Open data: iris petal and sepal measurements per species, as bundled with
# scikit-learn (values recorded to 0.1 cm, so with many ties).
iris = load_iris()
species = list(iris.target_names)
iris_groups = {}
for col, feature in [(2, "petal_length"), (1, "sepal_width")]:
    for code, sp in enumerate(species):
        values = [round(float(v), 1) for v in iris.data[iris.target == code, col]]
        iris_groups[(feature, sp)] = values
        add_shapiro(f"iris_{feature}_{sp}", values)

# Blom (1958) plotting positions mapped through the normal quantile function:
# the normal scores of a Q–Q plot and of the Shapiro–Wilk coefficients.
blom = []
for n in [3, 10, 5000]:
    i = np.arange(1, n + 1)
    scores = stats.norm.ppf((i - 0.375) / (n + 0.25))
    blom.append({"n": n, "first": [float(v) for v in scores[:5]], "last": float(scores[-1])})

# --------------------------------------------------------------- Brown–Forsythe
levene_cases = []


def add_levene(name, groups):
    groups = [[float(v) for v in g] for g in groups]
    res = stats.levene(*[np.asarray(g) for g in groups], center="median")
    k = len(groups)
    n = sum(len(g) for g in groups)
    levene_cases.append(
        {
            "name": name,
            "groups": groups,
            "statistic": float(res.statistic),
            "df1": k - 1,
            "df2": n - k,
            "p_value": float(res.pvalue),
        }
    )


# Invented: three nursery beds with similar spread.
add_levene(
    "similar_spread_3",
    [rounded(rng.normal(m, 1.0, n), 3) for m, n in [(4.0, 12), (5.0, 15), (4.5, 10)]],
)
# Invented: four groups with clearly unequal spread.
add_levene(
    "unequal_spread_4",
    [rounded(rng.normal(0.0, s, n), 3) for s, n in [(0.5, 20), (1.0, 18), (2.0, 25), (4.0, 16)]],
)
# Invented: two small groups, one skewed.
add_levene(
    "two_groups_skewed",
    [rounded(rng.exponential(1.0, 7), 3), rounded(rng.normal(1.0, 0.3, 9), 3)],
)
# Invented: six groups of size 3 (odd sizes: median is a data point).
add_levene("six_groups_of_3", [rounded(rng.normal(0.0, 1.0 + 0.3 * i, 3), 3) for i in range(6)])
# Invented: groups of even size with ties.
add_levene(
    "even_sizes_ties",
    [[round(2.0 * v) / 2.0 for v in rng.normal(3.0, s, n)] for s, n in [(1.0, 8), (1.5, 10), (0.7, 6)]],
)
# Invented: large groups (spreads differ a little).
add_levene("large_groups", [rounded(rng.normal(0.0, s, 400), 4) for s in (1.0, 1.05, 1.1)])
# Open data: iris by species.
for feature in ["petal_length", "sepal_width"]:
    add_levene(f"iris_{feature}", [iris_groups[(feature, sp)] for sp in species])

# ------------------------------------------------------- Studentized range
INF = float("inf")


def df_json(df):
    return "inf" if math.isinf(df) else df


range_points = []
for q, k, df in [
    (0.5, 2, 5),
    (1.0, 3, 1),
    (2.0, 2, 2),
    (3.0, 3, 3),
    (3.5, 4, 5),
    (4.0, 5, 10),
    (3.877, 3, 10),
    (1.5, 5, 10),
    (7.0, 5, 10),
    (2.5, 2, 20),
    (4.5, 10, 20),
    (5.0, 20, 20),
    (0.8, 10, 30),
    (3.0, 3, 60),
    (4.0, 6, 60),
    (5.5, 20, 60),
    (6.0, 50, 100),
    (3.2, 4, 120),
    (4.8, 15, 120),
    (6.0, 20, 120),
    (3.3, 3, 1000),
    (4.5, 8, 1000),
    (2.0, 20, 1000),
    (2.772, 2, INF),
    (3.5, 4, INF),
    (5.0, 12, INF),
    (6.0, 20, INF),
    (5.5, 100, INF),
    (9.0, 3, 5),
    (12.0, 2, 3),
    (20.0, 4, 2),
    (40.0, 3, 1),
    (8.0, 6, 30),
]:
    range_points.append(
        {
            "q": q,
            "k": k,
            "df": df_json(df),
            "cdf": float(stats.studentized_range.cdf(q, k, df)),
            "sf": float(stats.studentized_range.sf(q, k, df)),
        }
    )

range_quantiles = []
for p, k, df in [
    (0.95, 2, 5),
    (0.95, 3, 10),
    (0.95, 4, 20),
    (0.95, 10, 60),
    (0.95, 20, 120),
    (0.99, 3, 10),
    (0.99, 5, 30),
    (0.99, 20, 1000),
    (0.90, 2, INF),
    (0.95, 5, INF),
    (0.999, 4, 20),
    (0.5, 3, 10),
    (0.1, 5, 20),
    (0.05, 2, 10),
    (0.95, 50, 100),
    (0.95, 100, INF),
    (0.95, 3, 1),
    (0.99, 2, 2),
    (0.95, 8, 3),
    (0.999, 10, 1000),
    (0.95, 6, 2),
    (0.9, 15, 40),
]:
    range_quantiles.append(
        {"p": p, "k": k, "df": df_json(df), "q": float(stats.studentized_range.ppf(p, k, df))}
    )

doc = {
    "generator": "tests/reference/generate_stats.py",
    "versions": FOUND,
    "shapiro": shapiro_cases,
    "blom_scores": blom,
    "levene_median": levene_cases,
    "studentized_range": {"points": range_points, "quantiles": range_quantiles},
}
OUT.write_text(json.dumps(doc, indent=1) + "\n")
print(f"wrote {OUT}: {len(shapiro_cases)} Shapiro–Wilk, {len(levene_cases)} Brown–Forsythe, "
      f"{len(range_points)} + {len(range_quantiles)} studentized-range values")
