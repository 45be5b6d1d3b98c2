#!/usr/bin/env python3
"""Adversarial data and their exact per-group moments, for tests/exact_moments.rs.

Invented data (numpy's seeded generator, version pinned below), ten groups chosen to
defeat plain floating-point sums: a covariate at 1e15 (where doubles are 0.125 apart)
with a spread of a few dozen, a response at 1e12 with a spread near 1, values near
1e-8, a covariate at 1e8 with a spread of 1e-3, mixed signs and magnitudes from 1e-3
to 1e6 in one group, and ordinary groups. Every value is written in repr form, so it
reads back as the same double.

The moments (n, means, centred sums of squares and cross-product, covariate range)
are computed exactly with Python's fractions from those doubles and rounded once to
the nearest double: the correctly rounded values that exactly rounded summation
(math.fsum, Shewchuk's algorithm) aims at. The tool must match each to 1 ulp.

    python3 tests/reference/generate_exact_moments.py
"""

from __future__ import annotations

import json
import pathlib
import sys
from fractions import Fraction

import numpy as np

PINNED = "2.4.6"
if np.__version__ != PINNED:
    sys.exit(f"generate_exact_moments.py needs numpy {PINNED}, found {np.__version__}")

HERE = pathlib.Path(__file__).resolve().parent
rng = np.random.default_rng(20261203)


def group(name, n, x, y):
    return [(name, float(a), float(b)) for a, b in zip(x(n), y(n))]


rows = []
rows += group("offset-1e15", 150, lambda n: 1e15 + 0.125 * rng.integers(0, 400, n),
              lambda n: 2e15 + 0.25 * rng.integers(0, 4000, n))
rows += group("response-1e12", 120, lambda n: rng.uniform(0, 10, n),
              lambda n: 1e12 + rng.normal(0, 1, n))
rows += group("tiny", 100, lambda n: rng.uniform(1e-9, 2e-8, n),
              lambda n: rng.normal(3e-8, 1e-9, n))
rows += group("offset-1e8", 110, lambda n: 1e8 + rng.uniform(0, 1e-3, n),
              lambda n: rng.normal(5, 2, n))
mixed_x = lambda n: rng.choice([-1, 1], n) * 10.0 ** rng.uniform(-3, 6, n)
rows += group("mixed", 130, mixed_x, lambda n: rng.choice([-1, 1], n) * 10.0 ** rng.uniform(-3, 6, n))
for k in range(5):
    rows += group(f"plain-{k}", 50 + 5 * k, lambda n: rng.uniform(0, 50, n),
                  lambda n, k=k: rng.normal(10 + k, 3, n))
order = rng.permutation(len(rows))
rows = [rows[i] for i in order]

with (HERE / "data" / "adversarial_moments.csv").open("w") as f:
    f.write("g,x,y\n")
    for g, x, y in rows:
        f.write(f"{g},{x!r},{y!r}\n")

exact = {}
for name in sorted({r[0] for r in rows}):
    pts = [(Fraction(x), Fraction(y)) for g, x, y in rows if g == name]
    n = len(pts)
    mx = sum(p[0] for p in pts) / n
    my = sum(p[1] for p in pts) / n
    exact[name] = {
        "n": n,
        "mean_x": float(mx),
        "mean_y": float(my),
        "sxx": float(sum((p[0] - mx) ** 2 for p in pts)),
        "syy": float(sum((p[1] - my) ** 2 for p in pts)),
        "sxy": float(sum((p[0] - mx) * (p[1] - my) for p in pts)),
        "min_x": float(min(p[0] for p in pts)),
        "max_x": float(max(p[0] for p in pts)),
    }
(HERE / "exact_moments.json").write_text(
    json.dumps({"source": "generate_exact_moments.py, Python fractions, numpy " + PINNED, "groups": exact}, indent=1) + "\n"
)
print(f"wrote {len(rows)} rows in {len(exact)} groups")
