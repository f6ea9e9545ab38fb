#!/usr/bin/env python3
"""Outside check of `counts-are: percent` through the CLI.

    python3 percent_crosscheck.py PATH/TO/unitgram WORKDIR

Random waffles of shares (each group a column of shares adding to 100, or
to 100 within the rounding of shares written to whole numbers, tenths or
hundredths) are drawn with `unitgram draw -o table.csv`; the cells of each
share are compared with the largest-remainder (Hare) apportionment computed
here with Python's fractions.Fraction (standard library, exact rationals):
quota = share * cells / (the group's sum of shares), which is
share * cells / 100 when they add to 100. Cases with two equal remainders
at the cut are left out: there unitgram's stated tie rule decides, which
tests/check_alloc.c tests.

Second, the cross-check between the two input paths: the same shares times
a positive factor k, given as `counts-are: counts` with the same cells,
must give the same cells (a waffle's quotas are count * cells / total, and
k cancels). Prints disagreements and "N passed, N failed"; exits 1 on any.
Random cases come from a fixed seed, so every run checks the same ones.
"""
import csv
import random
import subprocess
import sys
from fractions import Fraction
from pathlib import Path

rng = random.Random(20261204)


def hare(shares, cells):
    """Largest remainder, exact; None when a tie at the cut leaves it open."""
    total = sum(shares)
    quotas = [s * cells / total for s in shares]
    whole = [q.numerator // q.denominator for q in quotas]
    rest = cells - sum(whole)
    rems = sorted(((q - w, i) for i, (q, w) in enumerate(zip(quotas, whole))),
                  reverse=True)
    if 0 < rest < len(rems) and rems[rest - 1][0] == rems[rest][0]:
        return None
    for _, i in rems[:rest]:
        whole[i] += 1
    return whole


def text(f):
    """A Fraction with a finite decimal expansion (at most 6 places)."""
    s = f"{float(f):.6f}".rstrip("0").rstrip(".")
    assert Fraction(s) == f, (s, f)
    return s


def column(n, places):
    """n shares at `places` decimals: exact splits of 100, or each share of
    an exact split rounded (so the sum may miss 100 by the rounding)."""
    unit = Fraction(1, 10 ** places)
    cuts = sorted(rng.randint(0, 100 * 10 ** places) for _ in range(n - 1))
    parts = [b - a for a, b in zip([0] + cuts, cuts + [100 * 10 ** places])]
    exact = [p * unit for p in parts]
    if rng.random() < 0.5:
        return exact
    # shares measured finer, then rounded half up to `places` as published
    fine = [Fraction(rng.randint(0, 10 ** 6), 10 ** 6) for _ in range(n)]
    raw = [f * 100 / sum(fine) if sum(fine) else Fraction(100, n) for f in fine]
    return [((r / unit) + Fraction(1, 2)).__floor__() * unit for r in raw]


def layout(title, shares_by_group, cells, mode, factor=Fraction(1)):
    groups = [f"g{g}" for g in range(len(shares_by_group))]
    lines = [f"title: {title}", "form: waffle", f"counts-are: {mode}",
             f"cells: {cells}", "source: generated (demo data)",
             "unit-label: answers", f"groups: [{', '.join(groups)}]",
             "categories:"]
    for i in range(len(shares_by_group[0])):
        vals = ", ".join(text(col[i] * factor) for col in shares_by_group)
        # own colours: more categories than the palette's seven are refused
        lines += [f"  - label: c{i}", f'    color: "#{(i * 0x1f3d5b) % 0xffffff:06x}"',
                  f"    counts: [{vals}]"]
    return "\n".join(lines) + "\n"


def draw(cli, work, name, yaml_text):
    src, out = work / f"{name}.yaml", work / f"{name}.csv"
    src.write_text(yaml_text)
    run = subprocess.run([cli, "draw", str(src), "-o", str(out)],
                         capture_output=True, text=True)
    if run.returncode:
        return None, run.stderr.strip()
    cells = {}
    with open(out, newline="") as f:
        for row in csv.DictReader(f):
            if row["level"] == "cell":
                cells[(row["group"], row["category"])] = int(row["icons"])
    return cells, ""


def main():
    cli, work = sys.argv[1], Path(sys.argv[2])
    work.mkdir(parents=True, exist_ok=True)
    passed = failed = 0
    for case in range(60):
        n, places = rng.randint(2, 9), rng.choice([0, 1, 2])
        cells = rng.choice([100, 100, 50, 200, 10, 37, 400, rng.randint(1, 300)])
        cols = [column(n, places) for _ in range(rng.randint(1, 25))]
        got, why = draw(cli, work, f"p{case}", layout(f"p{case}", cols, cells, "percent"))
        if got is None:
            failed += 1
            print(f"FAIL case {case}: unitgram refused: {why}")
            continue
        k = Fraction(rng.randint(1, 10 ** 4), rng.choice([1, 4, 10, 1000]))
        twin, why = draw(cli, work, f"k{case}",
                         layout(f"k{case}", cols, cells, "counts", k))
        for g, col in enumerate(cols):
            want = hare(col, cells)
            mine = [got[(f"g{g}", f"c{i}")] for i in range(n)]
            scaled = [twin[(f"g{g}", f"c{i}")] for i in range(n)] if twin else None
            ok_ref = want is None or mine == want
            ok_k = scaled == mine
            if ok_ref and ok_k:
                passed += 1
                continue
            failed += 1
            print(f"DISAGREE case {case} group {g} cells={cells} k={k} "
                  f"shares={' '.join(map(text, col))}")
            print(f"  percent: {mine}\n  fractions: {want}\n  counts*k: {scaled} {why}")
    print(f"percent: {passed} passed, {failed} failed")
    return 1 if failed or passed < 500 else 0


if __name__ == "__main__":
    sys.exit(main())
