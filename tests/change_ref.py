#!/usr/bin/env python3
"""Change between periods (`change: previous`, FORMAT.md §5) against exact
arithmetic done here with Python's fractions module (a rational type we did
not write: docs.python.org/3/library/fractions.html), over random two-period
histories: each category's "from -> to (+d, +p%)" in the description, the
percentage rounded half away from zero and left out when the earlier value
is 0, and "(change not shown)" whenever either count is hidden (below 10),
since a hidden count's change must not be read back from a published one.
A third, older period in the file checks that `rows: last 2` leaves it out.

usage: change_ref.py PATH/TO/unitgram [CASES]
"""
import html
import os
import random
import re
import subprocess
import sys
import tempfile
from fractions import Fraction

LABELS = ["Adults", "Children", "Older people", "Meals"]
UNIT = "households"


def number(x):
    """Our number text: thousands grouped with ',', decimals as written."""
    sign = "-" if x < 0 else ""
    x = abs(x)
    whole = int(x)
    frac = x - whole
    text = f"{whole:,}"
    if frac:
        digits = ""
        while frac and len(digits) < 6:
            frac *= 10
            digits += str(int(frac))
            frac -= int(frac)
        text += "." + digits
    return sign + text


def hidden(v):
    return 0 < v < 10


def rounded_percent(mag, base):
    x = mag * 100 / base
    q = x.numerator // x.denominator
    return q + 1 if x - q >= Fraction(1, 2) else q


def note(a, b):
    if hidden(a) or hidden(b):
        return " (change not shown)"
    d = b - a
    sign = "-" if d < 0 else "+" if d > 0 else "\u00b1"
    text = f" ({sign}{number(abs(d))}"
    if a > 0:
        text += f", {sign}{number(rounded_percent(abs(d), a))}%"  # CLDR en "#,##0%"
    return text + ")"


def expected(first, second, names):
    parts = []
    for label, a, b in zip(LABELS, first, second):
        fa = "fewer than 10" if hidden(a) else number(a)
        tb = "fewer than 10" if hidden(b) else f"{number(b)} {UNIT}"
        parts.append(f"{label} {fa} \u2192 {tb}{note(a, b)}")
    return f"From {names[0]} to {names[1]}: " + "; ".join(parts) + "."


def count(rng):
    kind = rng.random()
    if kind < 0.1:
        return Fraction(0)
    if kind < 0.25:
        return Fraction(rng.randint(1, 9))
    if kind < 0.4:
        return Fraction(rng.randint(100, 99999), 10)  # one decimal
    if kind < 0.5:
        return Fraction(rng.randint(1000, 250000))
    return Fraction(rng.randint(10, 999))


def dec_text(x):
    return number(x).replace(",", "")


def one_case(cli, folder, rng, k):
    rows = [[count(rng) for _ in LABELS] for _ in range(3)]
    if k % 7 == 0:  # an exact half percent, to check the rounding direction
        rows[1][0], rows[2][0] = Fraction(200), Fraction(201)
    names = [f"Q{q} 2026" for q in (1, 2, 3)]
    csv = os.path.join(folder, "history.csv")
    with open(csv, "w") as f:
        f.write("quarter," + ",".join(f"c{i}" for i in range(len(LABELS))) + "\n")
        for name, row in zip(names, rows):
            f.write(name + "," + ",".join(dec_text(v) for v in row) + "\n")
    layout = os.path.join(folder, "change.yaml")
    with open(layout, "w") as f:
        f.write("title: Change check (test data)\nsource: generated (test data)\n"
                f"unit-label: {UNIT}\nicon-value: auto\nchange: previous\n"
                "suppress: {below: 10, complement: none}\n"
                "data: {file: history.csv, group-column: quarter, rows: last 2}\n"
                "categories:\n")
        for i, label in enumerate(LABELS):
            f.write(f"  - {{label: {label}, glyph: square, column: c{i}}}\n")
    out = os.path.join(folder, "change.svg")
    run = subprocess.run([cli, "draw", layout, "-o", out], capture_output=True, text=True)
    if run.returncode not in (0,):
        return f"case {k}: exit {run.returncode}: {run.stderr[-300:]}"
    svg = open(out, encoding="utf-8").read()
    desc = html.unescape(re.search(r"<desc[^>]*>(.*?)</desc>", svg, re.S).group(1))
    want = expected(rows[1], rows[2], names[1:])
    if want not in desc:
        return f"case {k}: expected\n  {want}\nin\n  {desc}"
    if "Q1 2026" in desc:
        return f"case {k}: the period left out by rows: last 2 is described"
    return None


def main():
    cli = os.path.abspath(sys.argv[1])
    cases = int(sys.argv[2]) if len(sys.argv) > 2 else 150
    rng = random.Random(20261203)
    failures = 0
    with tempfile.TemporaryDirectory() as folder:
        for k in range(cases):
            why = one_case(cli, folder, rng, k)
            if why:
                failures += 1
                print("FAIL:", why)
    print(f"change_ref: {cases} random histories, {failures} failures")
    return 1 if failures else 0


if __name__ == "__main__":
    sys.exit(main())
