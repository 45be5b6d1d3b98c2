"""Reference values for the decision-evidence statistics (src/stats/noncentral_f.rs,
src/stats/mvt.rs, src/stats/bands.rs, src/stats/power.rs).

Writes tests/reference/evidence.json next to this script; the Rust unit tests read it.

Pinned versions (checked below; the script refuses to run with others):
    numpy 2.4.6, scipy 1.17.1 (see requirements.txt beside this file).

Run from the repository root:

    python tests/reference/generate_evidence.py

Everything here is computed by scipy from the published definitions:
- the noncentral F distribution (scipy.stats.ncf);
- confidence limits for the noncentrality of an observed F by inverting the
  noncentral F in its noncentrality (Steiger 2004), solved with scipy's brentq;
- power of the F test at a noncentrality (ncf.sf at the central F's critical value);
- the Working–Hotelling critical value sqrt(2 F(1 - alpha; 2, df)) (Working &
  Hotelling 1929), from scipy.stats.f.ppf;
- two-sided rectangle probabilities of the multivariate t (scipy.stats.multivariate_t
  .cdf, Genz & Bretz quasi-Monte Carlo with its own error of about 1e-5), over a grid
  of correlation matrices;
- many-to-one p-values of scipy.stats.dunnett (Dunnett 1955) on invented samples.
The samples are invented here with a seeded generator and stand for no measurements.
"""

import json
import math
import pathlib
import sys

import numpy as np
import scipy
from scipy import optimize, stats

PINNED = {"numpy": "2.4.6", "scipy": "1.17.1"}
FOUND = {"numpy": np.__version__, "scipy": scipy.__version__}
for name, want in PINNED.items():
    if FOUND[name] != want:
        sys.exit(f"generate_evidence.py needs {name} {want}, found {FOUND[name]}")

OUT = pathlib.Path(__file__).with_name("evidence.json")
rng = np.random.default_rng(20261202)

# ------------------------------------------------------------- noncentral F
ncf_cases = []
for d1 in (1.0, 2.0, 3.0, 7.0):
    for d2 in (4.0, 20.0, 355.0):
        for lam in (0.0, 0.5, 4.0, 25.0, 120.0):
            for f in (0.3, 1.0, 2.5, 8.0):
                cdf = float(stats.ncf.cdf(f, d1, d2, lam)) if lam > 0 else float(stats.f.cdf(f, d1, d2))
                sf = float(stats.ncf.sf(f, d1, d2, lam)) if lam > 0 else float(stats.f.sf(f, d1, d2))
                ncf_cases.append({"d1": d1, "d2": d2, "lambda": lam, "f": f, "cdf": cdf, "sf": sf})


def ncf_cdf(f, d1, d2, lam):
    return stats.ncf.cdf(f, d1, d2, lam) if lam > 0 else stats.f.cdf(f, d1, d2)


# ------------------------------------------- noncentrality limits (Steiger 2004)
def lambda_limits(F, d1, d2, conf):
    a = (1 - conf) / 2
    def lower_eq(lam):
        return ncf_cdf(F, d1, d2, lam) - (1 - a)
    def upper_eq(lam):
        return ncf_cdf(F, d1, d2, lam) - a
    def solve(eq):
        if eq(0.0) <= 0:
            return 0.0
        hi = max(10.0, 2 * F * d1)
        while eq(hi) > 0:
            hi *= 2
        return optimize.brentq(eq, 0.0, hi, xtol=1e-13, rtol=1e-14, maxiter=500)
    return solve(lower_eq), solve(upper_eq)


limit_cases = []
for F, d1, d2 in [(4.2, 2, 60), (0.8, 3, 120), (12.5, 1, 30), (2.9, 5, 355), (25.0, 2, 8), (1.3, 1, 1000)]:
    for conf in (0.90, 0.95):
        lo, hi = lambda_limits(F, d1, d2, conf)
        limit_cases.append({"f": F, "d1": d1, "d2": d2, "confidence": conf, "lambda_low": lo, "lambda_high": hi})

# ------------------------------------------------------------------- power
power_cases = []
for d1, d2, lam, alpha in [(1, 30, 5.0, 0.05), (2, 60, 9.0, 0.05), (3, 120, 4.0, 0.10), (7, 355, 20.0, 0.05), (1, 8, 12.0, 0.01)]:
    crit = float(stats.f.isf(alpha, d1, d2))
    power_cases.append({"d1": d1, "d2": d2, "lambda": lam, "alpha": alpha, "critical": crit,
                        "power": float(stats.ncf.sf(crit, d1, d2, lam))})

# Sample size: the smallest rows per group n for a pair of slopes differing by delta,
# residual variance s2, per-row covariate variances v1, v2 (so Sxx = n v), k groups:
# lambda = delta^2 / (s2 (1/(n v1) + 1/(n v2))), df = (k - 1, k n - 2 k).
size_cases = []
for k, delta, s2, v1, v2, alpha, target in [
    (2, 0.5, 1.0, 2.0, 2.0, 0.05, 0.8),
    (3, 0.2, 0.8, 4.0, 3.0, 0.05, 0.9),
    (4, 1.0, 4.0, 1.5, 2.5, 0.10, 0.8),
    (2, 0.05, 0.3, 30.0, 25.0, 0.05, 0.9),
]:
    def power_at(n):
        lam = delta * delta / (s2 * (1 / (n * v1) + 1 / (n * v2)))
        d1, d2 = k - 1, k * n - 2 * k
        return float(stats.ncf.sf(stats.f.isf(alpha, d1, d2), d1, d2, lam))
    n = 3
    while power_at(n) < target:
        n += 1
    size_cases.append({"k": k, "delta": delta, "residual_variance": s2, "v1": v1, "v2": v2,
                       "alpha": alpha, "target": target, "n": n,
                       "power_at_n": power_at(n), "power_below": power_at(n - 1)})

# --------------------------------------------------------- Working–Hotelling
wh_cases = []
for df in (1, 3, 10, 28, 120, 5000):
    for alpha in (0.05, 0.01):
        wh_cases.append({"df": df, "alpha": alpha, "critical": math.sqrt(2 * float(stats.f.ppf(1 - alpha, 2, df)))})

# ------------------------------------------------------------ multivariate t
def random_corr(m):
    a = rng.normal(size=(m, m + 2))
    c = a @ a.T
    d = np.sqrt(np.diag(c))
    return c / np.outer(d, d)


mvt_cases = []
corrs = [
    np.array([[1.0]]),
    np.array([[1.0, 0.5], [0.5, 1.0]]),
    np.array([[1.0, -0.3], [-0.3, 1.0]]),
    np.array([[1, 0.5, 0.5], [0.5, 1, 0.5], [0.5, 0.5, 1.0]]),
    np.array([[1, 0.2, 0.7], [0.2, 1, 0.4], [0.7, 0.4, 1.0]]),
    random_corr(4),
    random_corr(5),
]
for r in corrs:
    r = np.round(r, 6)
    np.fill_diagonal(r, 1.0)
    m = r.shape[0]
    for df in (6, 30, 200):
        for c in (1.5, 2.2, 2.9):
            dist = stats.multivariate_t(loc=np.zeros(m), shape=r, df=df)
            p = float(dist.cdf(np.full(m, c), lower_limit=np.full(m, -c), maxpts=2_000_000 * m,
                               random_state=np.random.default_rng(7)))
            mvt_cases.append({"corr": r.tolist(), "df": df, "c": c, "probability": p})

# --------------------------------------------------------------- Dunnett 1955
dunnett_cases = []
for sizes in [(8, 8, 8), (10, 6, 7, 9), (12, 12, 12, 12, 12)]:
    samples = [np.round(rng.normal(10 + 0.4 * i, 1.0, size=n), 3) for i, n in enumerate(sizes)]
    res = stats.dunnett(*samples[1:], control=samples[0], alternative="two-sided",
                        random_state=np.random.default_rng(11))
    dunnett_cases.append({"samples": [s.tolist() for s in samples],
                          "statistic": [float(v) for v in res.statistic],
                          "p_values": [float(v) for v in res.pvalue]})

json.dump({
    "generator": "tests/reference/generate_evidence.py",
    "versions": FOUND,
    "ncf": ncf_cases,
    "noncentrality_limits": limit_cases,
    "power": power_cases,
    "sample_size": size_cases,
    "working_hotelling": wh_cases,
    "mvt": mvt_cases,
    "dunnett": dunnett_cases,
}, open(OUT, "w"), indent=1)
print(f"wrote {OUT}")
