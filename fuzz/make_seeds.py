"""Writes the hand-made seed corpus for the CSV and analysis fuzz targets.

Each seed is one selector byte (which plan variant the target uses, see
fuzz_targets/common.rs) followed by CSV bytes with columns g, x, y. The shapes are
the real-world ones tests/README.md lists: byte-order mark, CRLF, other
delimiters, quoted fields, decimal commas, blank lines, ragged rows, missing
tokens, degenerate groups. The numbers are invented. Run from the repository root:

    python3 fuzz/make_seeds.py
"""

import pathlib
import random

random.seed(20261202)
ROOT = pathlib.Path(__file__).parent / "seeds"


def lines(rows, sep=",", end="\n", header="g,x,y"):
    return (header.replace(",", sep) + end + "".join(sep.join(r) + end for r in rows)).encode()


def groups(n=12, k=3, slope=lambda g: 1.0 + g):
    rows = []
    for i in range(n):
        g = i % k
        x = round(random.uniform(0, 10), 3)
        y = round(2.0 + slope(g) * x + random.gauss(0, 0.5), 3)
        rows.append(("abc"[g] if k <= 3 else f"g{g}", str(x), str(y)))
    return rows


base = groups()
seeds = {
    "plain": (0, lines(base)),
    "levels_log": (0b11, lines([(g, x, str(abs(float(y)) + 0.1)) for g, x, y in base])),
    "keep_filter": (0b100, lines(base)),
    "semicolon": (0b1000, lines(base, sep=";")),
    "tab": (0b10000, lines(base, sep="\t")),
    "pipe": (0b11000, lines(base, sep="|")),
    "adjust_at_sqrt": (0x60, lines(base)),
    "bonferroni_wide_gate": (0x80, lines(groups(30, 3, lambda g: g * 2.0))),
    "crlf": (0, lines(base, end="\r\n")),
    "bom": (0, b"\xef\xbb\xbf" + lines(base)),
    "quoted": (0, b'g,x,y\n"a",1,2\n"b, c",2,3\n"a\nb",3,4\n' + lines(base)[6:]),
    "decimal_comma": (0b1000, lines([(g, x.replace(".", ","), y.replace(".", ",")) for g, x, y in base], sep=";")),
    "blank_lines": (0, lines(base).replace(b"\n", b"\n\n", 3)),
    "ragged": (0, lines(base) + b"a,1\n"),
    "missing": (0, lines(base[:6] + [("a", "NA", "1"), ("", "1", "2"), ("b", "3", "")] + base[6:])),
    "not_utf8": (0, lines(base) + b"\xff\xfe,1,2\n"),
    "no_spread": (0, lines([("a", "1", str(i)) for i in range(5)] + base)),
    "perfect_fit": (0, lines([("abc"[i % 3], str(i), str(2 * i + 1)) for i in range(12)])),
    "one_group": (0, lines([("a", str(i), str(i * 0.5)) for i in range(6)])),
    "many_groups": (0, lines(groups(200, 50))),
    "huge": (0, lines([(g, x + "e250", y + "e250") for g, x, y in base])),
    "tiny": (0, lines([(g, x + "e-250", y + "e-250") for g, x, y in base])),
    "header_only": (0, b"g,x,y\n"),
    "empty": (0, b""),
}
for target in ("csv_load", "analysis"):
    folder = ROOT / target
    folder.mkdir(parents=True, exist_ok=True)
    for name, (selector, body) in seeds.items():
        (folder / name).write_bytes(bytes([selector]) + body)
print(f"wrote {len(seeds)} seeds for each of csv_load and analysis under {ROOT}")
