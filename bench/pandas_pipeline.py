"""The comparison pipeline for the benchmark: the same analysis slopewise runs,
done with pandas + statsmodels, so bench/run.sh can time both on the same file.

Usage: python bench/pandas_pipeline.py DATA.csv OUT.json [--alpha 0.05]

It reads columns group, x, y (the file bench_data writes), then:
  1. one ordinary least-squares line per group (own residual variance),
  2. the separate-slopes model (one intercept and one slope per group),
  3. the common-slope model (one intercept per group, one shared slope),
  4. one line for all rows,
  5. extra-sum-of-squares F tests: separate vs common slope (equal slopes) and
     common slope vs one line (group effect),
  6. pairwise slope differences from the separate-slopes model,
  7. adjusted means at the covariate mean and their pairwise differences from
     the common-slope model, with Holm-adjusted p values (Holm, 1979),
and writes the figures as JSON.

Design matrices are built by hand with numpy (indicator columns per group, and
indicator times x for the per-group slopes); statsmodels does the fitting and
the tests. The point is a fair, idiomatic pipeline, not a tuned one.
"""

import argparse
import itertools
import json
import sys
import time

import numpy as np
import pandas as pd
import statsmodels.api as sm
from scipy import stats
from statsmodels.stats.multitest import multipletests


def pairwise(fit, levels, index_of, alpha):
    """Every pair a < b of levels: a - b of the coefficients index_of(level),
    a t test on the fit's covariance, Holm-adjusted p values."""
    pairs = list(itertools.combinations(range(len(levels)), 2))
    contrasts = np.zeros((len(pairs), len(fit.params)))
    for row, (i, j) in enumerate(pairs):
        contrasts[row, index_of(i)] = 1.0
        contrasts[row, index_of(j)] = -1.0
    test = fit.t_test(contrasts)
    p = np.atleast_1d(test.pvalue)
    adjusted = multipletests(p, alpha=alpha, method="holm")[1]
    out = []
    for row, (i, j) in enumerate(pairs):
        out.append(
            {
                "a": levels[i],
                "b": levels[j],
                "difference": float(np.atleast_1d(test.effect)[row]),
                "se": float(np.atleast_1d(test.sd)[row]),
                "t": float(np.atleast_1d(test.tvalue)[row]),
                "df": float(fit.df_resid),
                "p_value": float(p[row]),
                "p_adjusted": float(adjusted[row]),
            }
        )
    return out


def analyse(raw, alpha):
    df = raw.dropna(subset=["group", "x", "y"])
    levels = sorted(df["group"].unique())
    codes = pd.Categorical(df["group"], categories=levels).codes
    x = df["x"].to_numpy(dtype=float)
    y = df["y"].to_numpy(dtype=float)
    n, k = len(y), len(levels)

    # Indicator (one-hot) columns, one per group.
    indicators = np.zeros((n, k))
    indicators[np.arange(n), codes] = 1.0

    groups = []
    for g, level in enumerate(levels):
        mask = codes == g
        xg = x[mask]
        fit = sm.OLS(y[mask], np.column_stack([np.ones(mask.sum()), xg])).fit()
        ci = fit.conf_int(alpha=alpha)
        groups.append(
            {
                "level": level,
                "n": int(mask.sum()),
                "slope": float(fit.params[1]),
                "slope_se": float(fit.bse[1]),
                "intercept": float(fit.params[0]),
                "intercept_se": float(fit.bse[0]),
                "r_squared": float(fit.rsquared),
                "residual_sd": float(np.sqrt(fit.scale)),
                "slope_ci": [float(ci[1, 0]), float(ci[1, 1])],
            }
        )

    # Columns: k intercepts, then k slopes.
    separate = sm.OLS(y, np.hstack([indicators, indicators * x[:, None]])).fit()
    # Columns: k intercepts, then the shared slope.
    common = sm.OLS(y, np.hstack([indicators, x[:, None]])).fit()
    one_line = sm.OLS(y, np.column_stack([np.ones(n), x])).fit()

    f_slopes, p_slopes, df1_slopes = separate.compare_f_test(common)
    f_groups, p_groups, df1_groups = common.compare_f_test(one_line)

    x_mean = float(x.mean())
    t_crit = stats.t.ppf(1 - alpha / 2, common.df_resid)
    at_mean = np.zeros((k, k + 1))
    at_mean[np.arange(k), np.arange(k)] = 1.0
    at_mean[:, k] = x_mean
    means = common.t_test(at_mean)
    adjusted_means = []
    for g, level in enumerate(levels):
        m = float(np.atleast_1d(means.effect)[g])
        se = float(np.atleast_1d(means.sd)[g])
        adjusted_means.append(
            {"level": level, "mean": m, "se": se, "ci": [m - t_crit * se, m + t_crit * se]}
        )
    slope_ci = common.conf_int(alpha=alpha)[k]

    return {
        "data": {"rows_read": int(len(raw)), "rows_used": n},
        "covariate_mean": x_mean,
        "groups": groups,
        "equal_slopes": {
            "f": float(f_slopes),
            "df1": float(df1_slopes),
            "df2": float(separate.df_resid),
            "p_value": float(p_slopes),
        },
        "pairwise_slopes": pairwise(separate, levels, lambda i: k + i, alpha),
        "common_slope": {
            "slope": float(common.params[k]),
            "se": float(common.bse[k]),
            "ci": [float(slope_ci[0]), float(slope_ci[1])],
        },
        "group_effect": {
            "f": float(f_groups),
            "df1": float(df1_groups),
            "df2": float(common.df_resid),
            "p_value": float(p_groups),
        },
        "adjusted_means": adjusted_means,
        "pairwise_adjusted": pairwise(common, levels, lambda i: i, alpha),
    }


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("data")
    parser.add_argument("out")
    parser.add_argument("--alpha", type=float, default=0.05)
    args = parser.parse_args()

    t0 = time.perf_counter()
    df = pd.read_csv(args.data, dtype={"group": str, "x": float, "y": float})
    t1 = time.perf_counter()
    results = analyse(df, args.alpha)
    t2 = time.perf_counter()
    with open(args.out, "w") as f:
        json.dump(results, f, indent=2)
    t3 = time.perf_counter()
    print(
        f"pandas_pipeline: read {t1 - t0:.3f} s, fit {t2 - t1:.3f} s, write {t3 - t2:.3f} s",
        file=sys.stderr,
    )


if __name__ == "__main__":
    main()
