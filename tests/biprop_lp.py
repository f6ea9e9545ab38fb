#!/usr/bin/python3
"""Outside check of `method: biproportional` (FORMAT.md §7).

Random tables (fixed seed) go through build/tests/ref/biprop_driver, which
calls the function the charts use. Each answer is checked against the
defining conditions, written here without the library's algorithm:

  * N = round-half-up(total / V), in Python fractions;
  * the group and the category icons equal their Sainte-Laguë shares of N,
    from an independent Sainte-Laguë (all quotients count / (2k + 1) sorted,
    ties to the larger count, then the one listed first: FORMAT.md §3);
  * the cells add up to both, and an empty cell gets no icon;
  * divisors exist: icons_ij = round(w_ij / (d_i e_j)) for some d, e. In log
    space (x_i = log d_i, y_j = log e_j) that is a linear system
        log(w / (a + 1/2)) <= x_i + y_j <= log(w / (a - 1/2)),
    the difference-constraint form REFERENCES.md §12 names. GLPK's glpsol
    (an LP solver we did not write) maximises a common slack t in it;
    divisors exist iff t* >= 0. Logs are floats, so t* >= -EPS counts as 0,
    EPS = 1e-9 (a tie has t* = 0; random counts below 10^4 miss a tie by far
    more than that: common practice, no source).
  * the check can fail: moving one icon around a 2 x 2 cycle keeps both
    totals but, unless the driver reported a tie, must make t* negative.
  * every refusal of an infeasible table is confirmed by glpsol as a mixed
    integer program (cells as integers chosen with the divisors) finding no
    apportionment at all.

usage: biprop_lp.py DRIVER [TABLES]
"""
import math
import os
import random
import subprocess
import sys
import tempfile
from fractions import Fraction

EPS = 1e-9
SEED = 20  # fixed: the same tables on every run


def half_up(x):
    return math.floor(x + Fraction(1, 2))


def sainte_lague(counts, seats):
    """Independent Sainte-Laguë: the `seats` largest count/(2k+1)."""
    qs = []
    for i, c in enumerate(counts):
        if c > 0:
            for k in range(seats):
                qs.append((-Fraction(c, 2 * k + 1), -c, i))
    qs.sort()
    out = [0] * len(counts)
    for _, _, i in qs[:seats]:
        out[i] += 1
    return out


def random_table(rng):
    g, c = rng.randint(1, 6), rng.randint(1, 6)
    if rng.random() < 0.1:  # equal counts invite ties
        v = rng.choice([1, 3, 5, 15])
        w = [[Fraction(v)] * c for _ in range(g)]
    elif rng.random() < 0.25:  # sparse and small: zero margins, infeasible tables
        w = [[Fraction(rng.randint(1, 30)) if rng.random() > 0.5 else Fraction(0)
              for _ in range(c)] for _ in range(g)]
    else:
        w = [[Fraction(rng.randint(1, 400) * rng.choice([1, 1, 1, 10]),
                       rng.choice([1, 1, 2, 10])) if rng.random() > 0.12 else Fraction(0)
              for _ in range(c)] for _ in range(g)]
    values = [Fraction(v) for v in ["1", "2", "2.5", "5", "10", "20", "50", "100",
                                     "250", "1000"]]
    k = rng.randrange(len(values))
    # a chart of at most a few hundred icons (and a slow reference stays quick)
    while k + 1 < len(values) and sum(map(sum, w)) / values[k] > 600:
        k += 1
    return w, values[k]


def empty_line(w):
    return any(sum(r) == 0 for r in w) or any(sum(col) == 0 for col in zip(*w))


def dec(x):
    """A fraction with a finite decimal expansion, as the driver reads it."""
    s = f"{float(x):.6f}".rstrip("0").rstrip(".")
    assert Fraction(s) == x, x
    return s


def line(w, value):
    cells = " ".join(dec(x) for row in w for x in row)
    return f"{len(w)} {len(w[0])} {dec(value)} {cells}"


def parse(answer, g, c):
    parts = [p.split() for p in answer[3:].split("|")]
    n = int(parts[0][0])
    gi, ci = [int(x) for x in parts[1]], [int(x) for x in parts[2]]
    flat = [int(x) for x in parts[3]]
    cells = [flat[i * c:(i + 1) * c] for i in range(g)]
    return n, gi, ci, cells, int(parts[4][0])


def lp_text(w, a):
    """Maximise t subject to the rounding bounds widened by t."""
    rows = []
    for i, (wr, ar) in enumerate(zip(w, a)):
        for j, (x, k) in enumerate(zip(wr, ar)):
            if x == 0:
                continue
            lo = math.log(x) - math.log(k + 0.5)
            rows.append(f" x{i} + y{j} - t >= {lo!r}")
            if k > 0:
                hi = math.log(x) - math.log(k - 0.5)
                rows.append(f" x{i} + y{j} + t <= {hi!r}")
    rows.append(" x0 = 0")
    free = [f" x{i} free" for i in range(len(w))] + [f" y{j} free" for j in range(len(w[0]))]
    return ("Maximize\n obj: t\nSubject To\n"
            + "\n".join(f" c{n}:{r}" for n, r in enumerate(rows))
            + "\nBounds\n" + "\n".join(free) + "\n -inf <= t <= 1\nEnd\n")


def glpsol(text, tmp, mip=False):
    path = os.path.join(tmp, "t.lp")
    out = os.path.join(tmp, "t.out")
    with open(path, "w") as f:
        f.write(text)
    limit = ["--tmlim", "60"] if mip else []
    r = subprocess.run(["glpsol", "--lp", path, "-o", out] + limit, capture_output=True,
                       text=True, check=False)
    if mip and "TIME LIMIT EXCEEDED" in r.stdout:
        raise RuntimeError("glpsol ran out of time on a MIP:\n" + text)
    with open(out) as f:
        report = f.read()
    return r.stdout, report


def slack(w, a, tmp):
    _, report = glpsol(lp_text(w, a), tmp)
    for ln in report.splitlines():
        if ln.startswith("Objective:"):
            return float(ln.split("=")[1].split()[0])
    raise RuntimeError("glpsol gave no objective:\n" + report)


def mip_text(w, gi, ci):
    """Is there any apportionment? Cells chosen by binaries z, divisors free
    within +-60 (log): the rounding bound for the chosen value must hold."""
    g, c, big = len(w), len(w[0]), 500
    rows, bins, ints, bounds = [], [], [], []
    for i in range(g):
        for j in range(c):
            if w[i][j] == 0:
                bounds.append(f" a{i}_{j} = 0")
                continue
            ints.append(f"a{i}_{j}")
            ks = range(min(gi[i], ci[j]) + 1)
            zs = [f"z{i}_{j}_{k}" for k in ks]
            bins += zs
            rows.append(" + ".join(zs) + " = 1")
            rows.append(f"a{i}_{j} - " + " - ".join(f"{k} {z}" for k, z in zip(ks, zs)) + " = 0")
            for k, z in zip(ks, zs):
                lo = math.log(w[i][j]) - math.log(k + 0.5) - EPS
                rows.append(f"x{i} + y{j} - {big} {z} >= {lo - big!r}")
                if k > 0:
                    hi = math.log(w[i][j]) - math.log(k - 0.5) + EPS
                    rows.append(f"x{i} + y{j} + {big} {z} <= {hi + big!r}")
    for i in range(g):
        rows.append(" + ".join(f"a{i}_{j}" for j in range(c)) + f" = {gi[i]}")
    for j in range(c):
        rows.append(" + ".join(f"a{i}_{j}" for i in range(g)) + f" = {ci[j]}")
    bounds += [f" -60 <= x{i} <= 60" for i in range(g)]
    bounds += [f" -60 <= y{j} <= 60" for j in range(c)]
    return ("Minimize\n obj: x0\nSubject To\n"
            + "\n".join(f" m{n}: {r}" for n, r in enumerate(rows))
            + "\nBounds\n" + "\n".join(bounds) + "\nGeneral\n " + " ".join(ints)
            + "\nBinary\n " + " ".join(bins) + "\nEnd\n")


def small(w, value):
    """Tables the MIP solves in well under a second (sparse small ones)."""
    return len(w) * len(w[0]) <= 9 and sum(map(sum, w)) / value <= 30


def no_apportionment(w, value, tmp):
    """glpsol's verdict that no apportionment has both Sainte-Laguë margins."""
    n = half_up(sum(map(sum, w)) / value)
    gi = sainte_lague([sum(r) for r in w], n)
    ci = sainte_lague([sum(col) for col in zip(*w)], n)
    stdout, _ = glpsol(mip_text(w, gi, ci), tmp, mip=True)
    return "PROBLEM HAS NO INTEGER FEASIBLE SOLUTION" in stdout or \
        "PROBLEM HAS NO PRIMAL FEASIBLE SOLUTION" in stdout


def check_answer(w, value, got, tmp, stats):
    g, c = len(w), len(w[0])
    n, gi, ci, a, ties = parse(got, g, c)
    want_n = half_up(sum(map(sum, w)) / value)
    assert n == want_n, (n, want_n)
    assert gi == sainte_lague([sum(r) for r in w], n), ("group margins", gi)
    assert ci == sainte_lague([sum(col) for col in zip(*w)], n), ("category margins", ci)
    assert [sum(r) for r in a] == gi and [sum(col) for col in zip(*a)] == ci
    assert all(k >= 0 and (x > 0 or k == 0) for wr, ar in zip(w, a) for x, k in zip(wr, ar))
    t = slack(w, a, tmp)
    stats["lp"] += 1
    assert t >= -EPS, ("no divisors for", w, a, t)
    if g > 1 and c > 1 and a[0][1] > 0 and a[1][0] > 0 and w[0][0] > 0 and w[1][1] > 0:
        b = [row[:] for row in a]
        b[0][0] += 1; b[0][1] -= 1; b[1][0] -= 1; b[1][1] += 1
        tb = slack(w, b, tmp)
        stats["lp"] += 1
        if tb < -EPS:
            stats["perturbed_caught"] += 1
        else:
            assert ties > 0, ("another valid apportionment but no tie reported", w, a, b)
            stats["perturbed_ties"] += 1
    stats["ties"] += ties > 0


def must_fail(tmp):
    """The check itself can fail: a unique apportionment, perturbed."""
    w = [[Fraction(100), Fraction(1)], [Fraction(1), Fraction(100)]]
    assert slack(w, [[100, 1], [1, 100]], tmp) >= -EPS
    t = slack(w, [[99, 2], [2, 99]], tmp)
    assert t < -EPS, ("perturbed table passed", t)


def main():
    driver = sys.argv[1]
    count = int(sys.argv[2]) if len(sys.argv) > 2 else 2000
    rng = random.Random(SEED)
    tables, lines = [], []
    while len(tables) < count:
        w, value = random_table(rng)
        if not empty_line(w):
            tables.append((w, value))
            lines.append(line(w, value))
    empties = [([[Fraction(5), Fraction(0)], [Fraction(0), Fraction(0)]], Fraction(1))]
    lines += [line(w, v) for w, v in empties]
    out = subprocess.run([driver], input="\n".join(lines) + "\n", capture_output=True,
                         text=True, check=True).stdout.splitlines()
    assert len(out) == len(lines)
    stats = dict(lp=0, mip=0, yes_mip=0, ok=0, refused=0, perturbed_caught=0, perturbed_ties=0, ties=0)
    with tempfile.TemporaryDirectory() as tmp:
        must_fail(tmp)
        for (w, value), got in zip(tables, out):
            if got.startswith("ok "):
                check_answer(w, value, got, tmp, stats)
                stats["ok"] += 1
                if small(w, value) and stats["yes_mip"] < 20:
                    # the MIP can say yes, so its no means no
                    stats["yes_mip"] += 1
                    stats["mip"] += 1
                    assert not no_apportionment(w, value, tmp), ("MIP missed", w)
            else:
                assert got.startswith("error: no apportionment"), (w, got)
                stats["mip"] += 1
                assert no_apportionment(w, value, tmp), ("refused but glpsol found one", w)
                stats["refused"] += 1
    for got in out[len(tables):]:
        assert got.startswith("error:") and "is 0 or not shown" in got, got
    print(f"biprop: {count} random tables (seed {SEED}): {stats['ok']} apportioned, "
          f"{stats['refused']} refused as infeasible (each confirmed by a glpsol MIP; "
          f"{stats['mip']} MIPs in all, {stats['yes_mip']} of them finding the "
          f"apportioned tables feasible); {stats['lp']} glpsol LPs; {stats['ties']} with ties; perturbed "
          f"results caught {stats['perturbed_caught']}, equally valid (ties) "
          f"{stats['perturbed_ties']}")


if __name__ == "__main__":
    main()
