#!/usr/bin/env python3
"""Per-group moments files of two invented demo data sets, for `data.moments`.

The moments are computed exactly with Python's fractions from the decimal texts of
the CSV (each value read as the double the tool reads, then summed without
rounding) and rounded once to the nearest double, so they are the correctly
rounded moments of the rows (what math.fsum-style exact summation would give):

- data/nursery_moments.csv: ../../demo-data/nursery-2026.csv (invented, written by
  examples/demo_data.rs), rows with status = "measured" and no missing cell ("" or
  "NA", the plan's missing tokens), per bed;
- data/stability_moments.csv and data/stability_moments.parquet (pyarrow, pinned
  below, uncompressed): ../../demo-data/stability-lots-2026.csv (invented), per lot.

Columns: group, n, mean_x, mean_y, sxx, syy, sxy, min_x, max_x; numbers in
Python's repr (shortest round-trip) form.

    python3 tests/reference/generate_moments.py
"""

from __future__ import annotations

import csv
import pathlib
import sys
from fractions import Fraction

import pyarrow as pa
import pyarrow.parquet as pq

PINNED = "26.0.1"
if pa.__version__ != PINNED:
    sys.exit(f"generate_moments.py needs pyarrow {PINNED}, found {pa.__version__}")

HERE = pathlib.Path(__file__).resolve().parent
DEMO = HERE.parent.parent / "demo-data"
COLUMNS = ["group", "n", "mean_x", "mean_y", "sxx", "syy", "sxy", "min_x", "max_x"]


def moments(rows, group, x, y, keep=lambda r: True):
    by = {}
    for r in rows:
        if not keep(r) or any(r[c].strip() in ("", "NA") for c in (group, x, y)):
            continue
        by.setdefault(r[group], []).append((Fraction(float(r[x])), Fraction(float(r[y]))))
    out = []
    for label in sorted(by):
        pts = by[label]
        n = len(pts)
        mx = sum(p[0] for p in pts) / n
        my = sum(p[1] for p in pts) / n
        out.append(
            {
                "group": label,
                "n": n,
                "mean_x": float(mx),
                "mean_y": float(my),
                "sxx": float(sum((p[0] - mx) ** 2 for p in pts)),
                "syy": float(sum((p[1] - my) ** 2 for p in pts)),
                "sxy": float(sum((p[0] - mx) * (p[1] - my) for p in pts)),
                "min_x": float(min(p[0] for p in pts)),
                "max_x": float(max(p[0] for p in pts)),
            }
        )
    return out


def write_csv(path, table):
    with path.open("w", newline="") as f:
        w = csv.writer(f, lineterminator="\n")
        w.writerow(COLUMNS)
        for row in table:
            w.writerow([row["group"], row["n"]] + [repr(row[c]) for c in COLUMNS[2:]])


nursery = list(csv.DictReader((DEMO / "nursery-2026.csv").open()))
write_csv(
    HERE / "data" / "nursery_moments.csv",
    moments(nursery, "bed", "height_cm", "dry_mass_g", lambda r: r["status"] == "measured"),
)
stability = list(csv.DictReader((DEMO / "stability-lots-2026.csv").open()))
table = moments(stability, "lot", "months", "assay_pct")
write_csv(HERE / "data" / "stability_moments.csv", table)
columns = {
    "group": pa.array([r["group"] for r in table], pa.string()),
    "n": pa.array([r["n"] for r in table], pa.int64()),
}
for c in COLUMNS[2:]:
    columns[c] = pa.array([r[c] for r in table], pa.float64())
pq.write_table(pa.table(columns), HERE / "data" / "stability_moments.parquet", compression="none")
print("wrote nursery_moments.csv, stability_moments.csv, stability_moments.parquet")
