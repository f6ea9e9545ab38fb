#!/usr/bin/env bash
# Checks the unitgram glyph set (glyphs/*.svg and glyphs/index.yaml).
#
# For every glyph:
#   - well-formed XML (xmllint --noout)
#   - only svg/path/circle/ellipse/rect/polygon/g elements
#   - no fill/stroke/style/transform/on* attributes (fill-rule/clip-rule are allowed),
#     no id attributes, viewBox "0 0 100 100"
#   - numbers have at most 2 decimals and lie within 0..100
#   - rendered at 64x64 (rsvg-convert), the inked fraction (sum of alpha / pixels)
#     lies within the weight band [BAND_LO, BAND_HI]
#   - the ink bounding box reaches within ~4 units of one pair of opposite edges
# For the index:
#   - one entry per svg and vice versa, sorted by name, licence line present,
#     weight equal to the measured fraction (2 decimals, +-0.01 tolerance)
#   - a subject (one of the sets src/glyph_library.c reads) and a one-line
#     description of at most 80 bytes without a trailing full stop
#   - each subject set's inked fractions lie within the band, and its spread
#     (largest minus smallest) is printed and must not exceed the band's width
# At chart size: tests/glyph_small.py (legible and distinct at 10 px).
#
# Usage: tests/suite_glyph_art.sh   (UG_GLYPH_ART_DIR overrides <repo>/glyphs)
# Prints a table "name fraction status" and exits non-zero on any failure.
set -u

BAND_LO=0.25
BAND_HI=0.50

here="$(cd "$(dirname "$0")" && pwd)"
# make check passes the CLI as $1; the art is checked where it lives.
dir="${UG_GLYPH_ART_DIR:-$here/../glyphs}"
PY=/usr/bin/python3

for tool in xmllint rsvg-convert "$PY"; do
    if ! command -v "$tool" >/dev/null 2>&1; then
        echo "glyphs_check: required tool '$tool' not found" >&2
        exit 2
    fi
done
if [ ! -d "$dir" ]; then
    echo "glyphs_check: no glyph directory at $dir" >&2
    exit 2
fi

tmp="$(mktemp -d)"
trap 'rm -rf "$tmp"' EXIT

fail=0
shopt -s nullglob
files=("$dir"/*.svg)
if [ "${#files[@]}" -eq 0 ]; then
    echo "glyphs_check: no svg files in $dir" >&2
    exit 1
fi

for f in "${files[@]}"; do
    name="$(basename "$f" .svg)"
    if ! xmllint --noout "$f" 2>"$tmp/$name.xmlerr"; then
        echo "FAIL $name: xmllint: $(head -n 3 "$tmp/$name.xmlerr")"
        fail=1
        continue
    fi
    if ! rsvg-convert -w 64 -h 64 -f png -o "$tmp/$name.png" "$f" 2>"$tmp/$name.rsvgerr"; then
        echo "FAIL $name: rsvg-convert: $(head -n 3 "$tmp/$name.rsvgerr")"
        rm -f "$tmp/$name.png"
        fail=1
    fi
done

UG_TESTS_DIR="$here" "$PY" - "$dir" "$tmp" "$BAND_LO" "$BAND_HI" <<'PYEOF'
import os, re, sys
import xml.etree.ElementTree as ET

gdir, tmp, lo, hi = sys.argv[1], sys.argv[2], float(sys.argv[3]), float(sys.argv[4])
SVGNS = '{http://www.w3.org/2000/svg}'
ALLOWED_EL = {'svg', 'path', 'circle', 'ellipse', 'rect', 'polygon', 'g'}
ALLOWED_FILL_ATTR = {'fill-rule', 'clip-rule'}
NUM = re.compile(r'[-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?')
LICENCE = 'unitgram project (original work)'
# The sets unitgram reads; a copy, so a subject the C table lacks fails here
# and in the reader alike.
SUBJECTS = ['people', 'health-care', 'housing', 'food', 'education', 'work-money',
            'transport', 'environment-energy', 'community', 'communication',
            'safety-justice']

# The PNG reader is tests/colour_areas.py's (standard library only).
sys.path.insert(0, os.environ['UG_TESTS_DIR'])
from colour_areas import read_png  # noqa: E402


def png_alpha(path):
    data = open(path, 'rb').read()
    if data[:8] != b'\x89PNG\r\n\x1a\n':
        raise ValueError('not a PNG')
    w, h, bpp, px = read_png(data)
    if bpp != 4:
        raise ValueError('expected an RGBA PNG from rsvg-convert')
    return w, h, [[px[(y * w + x) * 4 + 3] for x in range(w)] for y in range(h)]

def structural_problems(path):
    probs = []
    try:
        root = ET.parse(path).getroot()
    except ET.ParseError as e:
        return ['XML parse error: %s' % e]
    if root.tag != SVGNS + 'svg':
        probs.append('root element is not an SVG <svg>')
    if root.get('viewBox', '').split() != ['0', '0', '100', '100']:
        probs.append('viewBox must be "0 0 100 100"')
    for el in root.iter():
        tag = el.tag
        local = tag[len(SVGNS):] if tag.startswith(SVGNS) else tag
        if not tag.startswith(SVGNS) or local not in ALLOWED_EL:
            probs.append('element <%s> not allowed' % local)
        for attr, val in el.attrib.items():
            a = attr.split('}')[-1].lower()
            if a in ALLOWED_FILL_ATTR:
                pass
            elif a in ('fill', 'stroke', 'style', 'transform', 'id', 'class') or \
                    a.startswith('fill-') or a.startswith('stroke-') or a.startswith('on'):
                probs.append('attribute %s on <%s> not allowed' % (a, local))
            if a in ('d', 'cx', 'cy', 'r', 'rx', 'ry', 'x', 'y', 'width', 'height', 'points'):
                for n in NUM.findall(val):
                    if 'e' in n.lower():
                        probs.append('exponent notation %s' % n)
                        continue
                    if '.' in n and len(n.split('.')[1]) > 2:
                        probs.append('more than 2 decimals: %s' % n)
                    v = float(n)
                    if v < 0 or v > 100:
                        probs.append('coordinate out of 0..100: %s' % n)
        if (el.text or '').strip():
            probs.append('text content in <%s>' % local)
    seen, out = set(), []
    for p in probs:
        if p not in seen:
            seen.add(p)
            out.append(p)
    return out

def read_index(path):
    entries, cur, order, probs = {}, None, [], []
    for ln, line in enumerate(open(path, encoding='utf-8'), 1):
        if not line.strip() or line.lstrip().startswith('#'):
            continue
        m = re.match(r'^- name:\s*(\S+)\s*$', line)
        if m:
            cur = m.group(1)
            order.append(cur)
            if cur in entries:
                probs.append('index: duplicate entry %s' % cur)
            entries[cur] = {}
            continue
        m = re.match(r'^  (\w+):\s*(.*?)\s*$', line)
        if m and cur is not None:
            entries[cur][m.group(1)] = m.group(2)
            continue
        probs.append('index line %d not understood: %s' % (ln, line.rstrip()))
    if order != sorted(order):
        probs.append('index: entries are not sorted by name')
    return entries, probs

fail = False
names = sorted(f[:-4] for f in os.listdir(gdir) if f.endswith('.svg'))
measured = {}
print('%-16s %-8s %s' % ('name', 'fraction', 'status'))
print('%-16s %-8s %s' % ('-' * 16, '-' * 8, '-' * 6))
for name in names:
    probs = []
    if not re.match(r'^[a-z0-9]+(-[a-z0-9]+)*$', name):
        probs.append('file name must be lower-case, hyphenated')
    probs += structural_problems(os.path.join(gdir, name + '.svg'))
    png = os.path.join(tmp, name + '.png')
    frac = None
    if not os.path.exists(png):
        probs.append('not rendered')
    else:
        w, h, alpha = png_alpha(png)
        frac = sum(sum(r) for r in alpha) / (255.0 * w * h)
        measured[name] = frac
        if not (lo <= frac <= hi):
            probs.append('inked fraction %.3f outside band %.2f-%.2f' % (frac, lo, hi))
        ink_rows = [y for y in range(h) if max(alpha[y]) > 0]
        ink_cols = [x for x in range(w) if any(alpha[y][x] > 0 for y in range(h))]
        if not ink_rows:
            probs.append('renders empty')
        else:
            edge = 3  # pixels at 64 px, i.e. ~4.7 units of the 100-unit box
            fills_x = ink_cols[0] <= edge and ink_cols[-1] >= w - 1 - edge
            fills_y = ink_rows[0] <= edge and ink_rows[-1] >= h - 1 - edge
            if not (fills_x or fills_y):
                probs.append('drawing does not reach a pair of opposite edges')
    status = 'ok' if not probs else 'FAIL'
    print('%-16s %-8s %s' % (name, '%.3f' % frac if frac is not None else '-', status))
    for p in probs:
        print('    - %s' % p)
    if probs:
        fail = True

if measured:
    vals = sorted(measured.values())
    print('glyphs: %d   band: %.2f-%.2f   min: %.3f   max: %.3f' % (len(names), lo, hi, vals[0], vals[-1]))

index = os.path.join(gdir, 'index.yaml')
if not os.path.exists(index):
    print('FAIL index.yaml missing')
    fail = True
else:
    entries, probs = read_index(index)
    for n in names:
        if n not in entries:
            probs.append('index: no entry for %s.svg' % n)
    for n, e in entries.items():
        if n not in names:
            probs.append('index: entry %s has no svg file' % n)
            continue
        if e.get('licence') != LICENCE:
            probs.append('index: %s licence must be "%s"' % (n, LICENCE))
        kw = e.get('keywords', '')
        if not re.match(r'^\[[^\[\]]+\]$', kw):
            probs.append('index: %s keywords must be a non-empty [list]' % n)
        if e.get('subject') not in SUBJECTS:
            probs.append('index: %s subject %r is not one of the sets' % (n, e.get('subject')))
        desc = e.get('description', '')
        if not desc or len(desc.encode('utf-8')) > 80 or desc.endswith('.'):
            probs.append('index: %s description must be one line of 1-80 bytes, '
                         'no trailing full stop' % n)
        try:
            wt = float(e.get('weight', 'x'))
            if n in measured and abs(wt - measured[n]) > 0.0101:
                probs.append('index: %s weight %.2f but measured %.3f' % (n, wt, measured[n]))
        except ValueError:
            probs.append('index: %s weight missing or not a number' % n)
    for s in SUBJECTS:
        inked = sorted(measured[n] for n, e in entries.items()
                       if e.get('subject') == s and n in measured)
        if not inked:
            continue
        spread = inked[-1] - inked[0]
        print('set %-20s %3d glyphs  inked %.3f-%.3f  spread %.3f' % (s, len(inked), inked[0], inked[-1], spread))
        if inked[0] < lo or inked[-1] > hi or spread > hi - lo:
            probs.append('set %s: inked area %.3f-%.3f leaves the band %.2f-%.2f' % (s, inked[0], inked[-1], lo, hi))
    for p in probs:
        print('FAIL ' + p)
    if probs:
        fail = True
    else:
        print('index.yaml: %d entries ok' % len(entries))

sys.exit(1 if fail else 0)
PYEOF
pyrc=$?

"$PY" "$here/glyph_small.py" "$dir" --self-test || pyrc=1

if [ "$fail" -ne 0 ] || [ "$pyrc" -ne 0 ]; then
    echo "glyphs_check: FAILED"
    exit 1
fi
echo "glyphs_check: all glyphs ok"
exit 0
