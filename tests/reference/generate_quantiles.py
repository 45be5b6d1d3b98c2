"""Reference quantiles of Student's t, Snedecor's F and the standard normal for
src/stats/dist.rs, across degrees of freedom from 1 to 1e12 and upper-tail
probabilities down to 1e-300 (issue 19).

Writes tests/reference/quantiles.json next to this script. Pinned versions
(checked below; the script refuses to run with others): numpy 2.4.6,
scipy 1.17.1, as in requirements.txt. Run from the repository root:

    python tests/reference/generate_quantiles.py

Every value is scipy's own `isf` (upper-tail inverse). A point is kept only
when scipy's `sf` of that value gives back p to 1e-11 relative: scipy's
`f.isf` returns inf at p = 1e-100 and is off by up to 4e-5 at p = 1e-12 with
few df (for df1 = 2 the tail (1 + 2f/df2)^(-df2/2) has a closed form, so that
is checkable by hand). Left-out points are listed under "skipped" with the
reason, so the tests never compare against a value scipy itself cannot confirm.
"""

import json
import math
import pathlib
import sys

import numpy as np
import scipy
from scipy import special, stats

PINNED = {"numpy": "2.4.6", "scipy": "1.17.1"}
FOUND = {"numpy": np.__version__, "scipy": scipy.__version__}
for name, want in PINNED.items():
    if FOUND[name] != want:
        sys.exit(f"generate_quantiles.py needs {name} {want}, found {FOUND[name]}")

OUT = pathlib.Path(__file__).with_name("quantiles.json")

DFS = [1, 2, 10, 1e3, 1e6, 1e8, 1e10, 1e12]
PS = [0.5, 0.025, 1e-6, 1e-12, 1e-100]
# Numerator df of F: 1 (F = t²), 2 (as in the simultaneous Johnson–Neyman
# bands), and an odd and an even larger value.
D1S = [1, 2, 3, 8]
NORMAL_PS = [0.5, 0.025, 1e-6, 1e-12, 1e-100, 1e-200, 1e-300]

skipped = []


def keep(kind, args, value, sf):
    value = float(value)
    if not math.isfinite(value):
        skipped.append({"kind": kind, "args": args, "scipy": str(value), "why": "not finite"})
        return False
    p = args[0]
    back = float(sf(value))
    if abs(back / p - 1.0) > 1e-11:
        skipped.append(
            {"kind": kind, "args": args, "scipy": value, "why": f"sf(isf(p)) = {back!r}"}
        )
        return False
    return True


t_isf = []
for df in DFS:
    for p in PS:
        v = stats.t.isf(p, df)
        if keep("t_isf", [p, df], v, lambda x: stats.t.sf(x, df)):
            t_isf.append({"p": p, "df": df, "value": float(v)})

f_isf = []
for d1 in D1S:
    for d2 in DFS:
        for p in PS:
            sf = lambda x: stats.f.sf(x, d1, d2)  # noqa: E731
            v = stats.f.isf(p, d1, d2)
            if keep("f_isf", [p, d1, d2], v, sf):
                f_isf.append({"p": p, "df1": d1, "df2": d2, "value": float(v), "via": "f.isf"})
                continue
            # scipy's f.isf goes through 1 - p; the upper-tail inverse of the beta
            # does not: P(F > f) = P(B > y) with B ~ Beta(d1/2, d2/2) and
            # f = (d2/d1) y / (1 - y) (Abramowitz & Stegun 1964, 26.6.2).
            y = special.betainccinv(d1 / 2, d2 / 2, p)
            v = (d2 / d1) * y / (1.0 - y)
            if keep("f_isf_betainccinv", [p, d1, d2], v, sf):
                f_isf.append(
                    {"p": p, "df1": d1, "df2": d2, "value": float(v), "via": "betainccinv"}
                )

norm_isf = []
for p in NORMAL_PS:
    v = stats.norm.isf(p)
    if keep("norm_isf", [p], v, stats.norm.sf):
        norm_isf.append({"p": p, "value": float(v)})

doc = {
    "source": "scipy.stats t.isf, f.isf (or scipy.special.betainccinv where f.isf does not round-trip), norm.isf; scipy "
    + scipy.__version__
    + ", numpy "
    + np.__version__
    + "; tests/reference/generate_quantiles.py",
    "t_isf": t_isf,
    "f_isf": f_isf,
    "norm_isf": norm_isf,
    "skipped": skipped,
}
OUT.write_text(json.dumps(doc, indent=1) + "\n")
print(f"wrote {OUT}: {len(t_isf)} t, {len(f_isf)} F, {len(norm_isf)} normal; {len(skipped)} skipped")
