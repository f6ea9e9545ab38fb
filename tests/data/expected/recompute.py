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
exp = {}
exp['pantry'] = rows([''], ["Families with children","Adults living alone","Older people","Couples without children","Shared houses"], [[412],[287],[164],[98],[39]], 'cells', 100)
w = list(csv.reader(open('layouts/wards.csv')))
exp['wards'] = rows([r[0] for r in w[1:]], ["Adults","Children","Older people"], [[int(r[k]) for r in w[1:]] for k in (1,2,3)], 'value', 10)
exp['schools'] = rows(["Oakfield Primary","Millbrook Primary","Station Road Primary","Hillside Academy"], ["Walk","Bus","Car","Bike or scooter"], [[212,148,96,301],[87,119,160,244],[101,63,142,190],[34,20,11,58]], 'cells', 100)
bad = 0
for k, v in exp.items():
    got = open(f'tests/data/expected/{k}.csv').read()
    print(k, 'same' if got == v else 'DIFFERENT')
    if got != v:
        bad = 1; print(v); print(got)
sys.exit(bad)
