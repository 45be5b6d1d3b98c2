#!/usr/bin/env python3
"""Runs the Spark SQL that `slopewise sql --dialect spark` printed, on a CSV file, in
a local Spark session (pyspark, pinned below), and writes the result as a moments
file (CSV with a header; numbers in Python's repr form, null as an empty cell).

    spark_moments.py QUERY.sql DATA.csv TABLE OUT.csv NUMERIC_COLUMN...

The CSV is read with every column as text; the named numeric columns become doubles,
with "" and "NA" (the plan's missing tokens) as null, and a group or filter cell of
"" or "NA" as null too, as a database table would hold them. Used by
tests/moments_source.rs; the data are the invented demo data.
"""

from __future__ import annotations

import csv
import sys

import pyspark
from pyspark.sql import SparkSession
from pyspark.sql import functions as F

PINNED = "3.5.3"
if pyspark.__version__ != PINNED:
    sys.exit(f"spark_moments.py needs pyspark {PINNED}, found {pyspark.__version__}")

query_file, data_file, table, out_file, *numeric = sys.argv[1:]
with open(data_file, newline="") as f:
    rows = list(csv.reader(f))
header, body = rows[0], rows[1:]

spark = (
    SparkSession.builder.master("local[2]")
    .appName("slopewise-moments")
    .config("spark.ui.enabled", "false")
    .config("spark.sql.shuffle.partitions", "4")
    .getOrCreate()
)
spark.sparkContext.setLogLevel("ERROR")
df = spark.createDataFrame(body, schema=[f"c{i}" for i in range(len(header))])
cols = []
for i, name in enumerate(header):
    c = F.col(f"c{i}")
    missing = F.trim(c).isin("", "NA")
    value = F.when(missing, None).otherwise(c)
    if name in numeric:
        value = value.cast("double")
    cols.append(value.alias(name))
df.select(*cols).createOrReplaceTempView(table)

query = open(query_file).read().strip().rstrip(";")
result = spark.sql(query).collect()
with open(out_file, "w", newline="") as f:
    w = csv.writer(f, lineterminator="\n")
    w.writerow(["group", "n", "mean_x", "mean_y", "sxx", "syy", "sxy", "min_x", "max_x"])
    for r in result:
        w.writerow(
            ["" if r["group"] is None else r["group"], r["n"]]
            + [repr(float(r[c])) for c in ["mean_x", "mean_y", "sxx", "syy", "sxy", "min_x", "max_x"]]
        )
spark.stop()
