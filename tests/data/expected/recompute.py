# Independent recomputation of the expected reports with exact fractions
# (python3 tests/data/expected/recompute.py from the repository root).
# Shares no code with src/alloc.c; written from FORMAT.md §3 alone.
from fractions import Fraction as F
from decimal import Decimal, ROUND_HALF_UP
import csv, sys
def lr(counts, quota_of, n):
    q = [quota_of(c) for c in counts]
    whole = [x.numerator // x.denominator for x in q]
    left = n - sum(whole)
    order = sorted(range(len(counts)), key=lambda i: (-(q[i]-whole[i]), -counts[i], i))
    for i in order[:left]: whole[i] += 1
    return q, whole
def fmt(x):
    d = (Decimal(x.numerator)/Decimal(x.denominator)).quantize(Decimal('0.000001'), ROUND_HALF_UP)
    s = format(d, 'f').rstrip('0').rstrip('.')
    return '0' if s in ('-0', '') else s
def rows(groups, cats, counts, mode, val):
    out = ["group,category,count,quota,icons,shown,difference,status"]
    for g, gname in enumerate(groups):
        col = [F(counts[c][g]) for c in range(len(cats))]
        T = sum(col)
        if mode == 'cells':
            n = val; qf = lambda c: c * n / T; unit = T / n
        else:
            n = int((T / val + F(1, 2)) // 1); qf = lambda c: c / val; unit = F(val)
        q, w = lr(col, qf, n)
        for c in range(len(cats)):
            shown = w[c] * unit
            out.append(f"{gname},{cats[c]},{fmt(col[c])},{fmt(q[c])},{w[c]},{fmt(shown)},{fmt(shown-col[c])},exact")
    return "\n".join(out) + "\n"
def sainte_lague(totals, n):
    """The n largest total / (2k + 1); ties to the larger total, then the first."""
    qs = sorted((-F(t, 2 * k + 1), -t, i) for i, t in enumerate(totals) for k in range(n))
    out = [0] * len(totals)
    for _, _, i in qs[:n]: out[i] += 1
    return out
def has_divisors(w, a):
    """round(w_ij / (d_i e_j)) = a_ij for some d, e: in log space a system of
    difference constraints, feasible iff no cycle's ratios multiply below 1
    (Floyd-Warshall on products, exact fractions); rows are nodes 0..g-1,
    columns g..g+c-1."""
    g, c = len(w), len(w[0]); n = g + c; inf = None
    dist = [[F(1) if i == j else inf for j in range(n)] for i in range(n)]
    for i in range(g):
        for j in range(c):
            dist[i][g + j] = F(2 * a[i][j] + 1, 2 * w[i][j])        # d e >= w / (a + 1/2)
            if a[i][j] > 0:
                dist[g + j][i] = F(2 * w[i][j], 2 * a[i][j] - 1)    # d e <= w / (a - 1/2)
    for k in range(n):
        for i in range(n):
            for j in range(n):
                if dist[i][k] is not inf and dist[k][j] is not inf:
                    via = dist[i][k] * dist[k][j]
                    if dist[i][j] is inf or via < dist[i][j]: dist[i][j] = via
    return all(dist[i][i] >= 1 for i in range(n))
def biprop_3x3(groups, cats, counts, val):
    """Every 3 x 3 table with both Sainte-Lague margins, kept if divisors exist
    (FORMAT.md §7); exactly one must remain."""
    w = [[counts[c][g] for c in range(3)] for g in range(3)]
    T = sum(map(sum, w)); n = int((F(T, 1) / val + F(1, 2)) // 1)
    r = sainte_lague([sum(x) for x in w], n); k = sainte_lague([sum(x) for x in zip(*w)], n)
    found = []
    for a00 in range(min(r[0], k[0]) + 1):
        for a01 in range(min(r[0] - a00, k[1]) + 1):
            for a10 in range(min(r[1], k[0] - a00) + 1):
                for a11 in range(min(r[1] - a10, k[1] - a01) + 1):
                    a = [[a00, a01, r[0] - a00 - a01], [a10, a11, r[1] - a10 - a11]]
                    a.append([k[j] - a[0][j] - a[1][j] for j in range(3)])
                    if min(map(min, a)) >= 0 and sum(a[2]) == r[2] and has_divisors(w, a):
                        found.append(a)
    assert len(found) == 1, found
    out = ["group,category,count,quota,icons,shown,difference,status"]
    for g in range(3):
        for c in range(3):
            x = F(w[g][c]); shown = found[0][g][c] * val
            out.append(f"{groups[g]},{cats[c]},{fmt(x)},{fmt(x / val)},{found[0][g][c]},{fmt(F(shown))},{fmt(shown - x)},exact")
    return "\n".join(out) + "\n"
exp = {}
exp['pantry'] = rows([''], ["Families with children","Adults living alone","Older people","Couples without children","Shared houses"], [[412],[287],[164],[98],[39]], 'cells', 100)
w = list(csv.reader(open('layouts/wards.csv')))
exp['wards'] = biprop_3x3([r[0] for r in w[1:]], ["Adults","Children","Older people"], [[int(r[k]) for r in w[1:]] for k in (1,2,3)], 10)
exp['schools'] = rows(["Oakfield Primary","Millbrook Primary","Station Road Primary","Hillside Academy"], ["Walk","Bus","Car","Bike or scooter"], [[212,148,96,301],[87,119,160,244],[101,63,142,190],[34,20,11,58]], 'cells', 100)
bad = 0
for k, v in exp.items():
    got = open(f'tests/data/expected/{k}.csv').read()
    print(k, 'same' if got == v else 'DIFFERENT')
    if got != v:
        bad = 1; print(v); print(got)
sys.exit(bad)
