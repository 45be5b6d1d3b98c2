#!/usr/bin/env python3
"""Spreadsheet copies of an invented demo file, for the spreadsheet data source.

Writes data/stability_sheets.xlsx (openpyxl) and data/stability_sheets.ods (odfpy),
versions pinned below, from ../../demo-data/stability-lots-2026.csv (invented data,
written by examples/demo_data.rs). Sheet `assays` holds the CSV's cells with a title
in row 1 and the header in row 3, numbers as numbers; the other sheets are the bad
inputs the tests try: `blank` (no cells), `text` (a text cell, D7, in the numeric
assay column), `formula` (.xlsx only: a formula, D5, whose value was never saved,
as openpyxl writes formulas) and `merged` (A5:A6 merged).

    python3 tests/reference/generate_sheets.py
"""

from __future__ import annotations

import csv
import pathlib
import sys

import odf
import openpyxl
from odf.opendocument import OpenDocumentSpreadsheet
from odf.table import CoveredTableCell, Table, TableCell, TableRow
from odf.text import P

PINNED = {"openpyxl": "3.1.5"}
if openpyxl.__version__ != PINNED["openpyxl"]:
    sys.exit(f"generate_sheets.py needs openpyxl {PINNED['openpyxl']}, found {openpyxl.__version__}")
# odfpy 1.4.1 (its module carries no version string; pip show odfpy tells).

HERE = pathlib.Path(__file__).resolve().parent
SOURCE = HERE.parent.parent / "demo-data" / "stability-lots-2026.csv"
rows = list(csv.reader(SOURCE.open()))
header, body = rows[0], rows[1:]


def typed(text: str):
    try:
        return int(text)
    except ValueError:
        pass
    try:
        return float(text)
    except ValueError:
        return text


def sheet_rows(kind: str):
    """(row, col, value) triples, 1-based, of one sheet."""
    out = [(1, 1, "Invented tablet assays (demo data, not measurements)")]
    out += [(3, j + 1, h) for j, h in enumerate(header)]
    for i, row in enumerate(body):
        for j, cell in enumerate(row):
            out.append((4 + i, j + 1, typed(cell)))
    if kind == "text":
        out = [(r, c, "n.d." if (r, c) == (7, 4) else v) for r, c, v in out]
    return out


# ---------------------------------------------------------------- .xlsx
book = openpyxl.Workbook()
book.remove(book.active)
for kind in ["assays", "blank", "text", "formula", "merged"]:
    ws = book.create_sheet(kind)
    if kind == "blank":
        continue
    for r, c, v in sheet_rows(kind):
        ws.cell(row=r, column=c, value=v)
    if kind == "formula":
        ws.cell(row=5, column=4, value="=D4-0.1")
    if kind == "merged":
        ws.merge_cells("A5:A6")
book.save(HERE / "data" / "stability_sheets.xlsx")

# ---------------------------------------------------------------- .ods
doc = OpenDocumentSpreadsheet()
for kind in ["assays", "blank", "text", "merged"]:
    table = Table(name=kind)
    cells = {(r, c): v for r, c, v in sheet_rows(kind)} if kind != "blank" else {}
    last_row = max((r for r, _ in cells), default=0)
    last_col = max((c for _, c in cells), default=0)
    for r in range(1, last_row + 1):
        tr = TableRow()
        for c in range(1, last_col + 1):
            v = cells.get((r, c))
            if kind == "merged" and (r, c) == (6, 1):
                tr.addElement(CoveredTableCell())
                continue
            attrs = {}
            if kind == "merged" and (r, c) == (5, 1):
                attrs["numberrowsspanned"] = 2
            if v is None:
                cell = TableCell(**attrs)
            elif isinstance(v, (int, float)):
                cell = TableCell(valuetype="float", value=v, **attrs)
                cell.addElement(P(text=str(v)))
            else:
                cell = TableCell(valuetype="string", **attrs)
                cell.addElement(P(text=v))
            tr.addElement(cell)
        table.addElement(tr)
    doc.spreadsheet.addElement(table)
doc.save(str(HERE / "data" / "stability_sheets.ods"))
print("wrote stability_sheets.xlsx and stability_sheets.ods")
