#!/usr/bin/env python3
"""Parquet copies of an invented demo file, for the Parquet data source.

From ../../demo-data/stability-lots-2026.csv (invented data, written by
examples/demo_data.rs), with pyarrow (version pinned below), uncompressed so the
bytes do not depend on a codec's version:

- data/stability.parquet: lot (string), months and replicate (int64), assay_pct
  (double), the first row's assay set to null (a missing cell);
- data/stability_text.parquet: the same with assay_pct stored as text, which the
  tool must refuse by the column's type.

    python3 tests/reference/generate_parquet.py
"""

from __future__ import annotations

import csv
import pathlib
import sys

import pyarrow as pa
import pyarrow.parquet as pq

PINNED = "26.0.1"
if pa.__version__ != PINNED:
    sys.exit(f"generate_parquet.py needs pyarrow {PINNED}, found {pa.__version__}")

HERE = pathlib.Path(__file__).resolve().parent
rows = list(csv.DictReader((HERE.parent.parent / "demo-data" / "stability-lots-2026.csv").open()))
assay = [float(r["assay_pct"]) for r in rows]
assay[0] = None
columns = {
    "lot": pa.array([r["lot"] for r in rows], pa.string()),
    "months": pa.array([int(r["months"]) for r in rows], pa.int64()),
    "replicate": pa.array([int(r["replicate"]) for r in rows], pa.int64()),
    "assay_pct": pa.array(assay, pa.float64()),
}
pq.write_table(pa.table(columns), HERE / "data" / "stability.parquet", compression="none")
columns["assay_pct"] = pa.array([r["assay_pct"] for r in rows], pa.string())
pq.write_table(pa.table(columns), HERE / "data" / "stability_text.parquet", compression="none")
print("wrote stability.parquet and stability_text.parquet")
