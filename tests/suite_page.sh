#!/usr/bin/env bash
# One-page handouts end to end, checked from outside with poppler-utils:
#   - sheet sizes: ISO 216 (A5 148 x 210, A4 210 x 297, A3 297 x 420 mm) and
#     US Letter 612 x 792 pt, Legal 612 x 1008 pt (REFERENCES.md §8), with
#     1 pt = 1/72 in (ISO 32000-1 §8.3.2.1) and 1 in = 25.4 mm, via pdfinfo;
#   - one page, every font embedded (pdffonts);
#   - pdftoppm's picture of the page covers, for every square-glyph category,
#     (icons in the allocation + 1 key swatch) x icon size², within 1 %;
#   - shared scale: two charts show one icon size in the SVG and the render;
#   - content that does not fit fails, says by how much, writes nothing.
# usage: bash tests/suite_page.sh build/unitgram   (from the repository root)
set -euo pipefail
BIN=${1:-build/unitgram}
TESTS=$(cd "$(dirname "$0")" && pwd)
ROOT=$(dirname "$TESTS")
PY=/usr/bin/python3
# colour_areas.py measures with numpy: a clear failure, not a crash halfway
$PY -c "import numpy" 2>/dev/null || {
    echo "suite_page: FAIL: $PY cannot import numpy (make test-deps installs python3-numpy)"
    exit 1; }
TMP=$(mktemp -d)
trap 'rm -rf "$TMP"' EXIT
fails=0
ok()   { echo "ok   $1"; }
fail() { echo "FAIL $1"; fails=$((fails + 1)); }
for t in pdfinfo pdffonts pdftoppm; do
    command -v $t >/dev/null || { echo "suite_page: $t is missing"; exit 1; }
done

# ---- sheet sizes -------------------------------------------------------------
check_size() { # size-as-written, orientation, expected "W H" in pt
    local f="$TMP/sheet.yaml"
    printf 'page: {size: %s, orientation: %s}\ntitle: Sheet (demo data)\npanels:\n  - text: Hello (demo data)\n' \
        "$1" "$2" >"$f"
    "$BIN" draw "$f" -o "$TMP/sheet.pdf" || { fail "draw a $1 sheet"; return; }
    local info; info=$(pdfinfo "$TMP/sheet.pdf")
    local pages; pages=$(awk '/^Pages:/ {print $2}' <<<"$info")
    local got; got=$(sed -n 's/^Page size: *\([0-9.]*\) x \([0-9.]*\) pts.*/\1 \2/p' <<<"$info")
    if [ "$pages" = 1 ] && $PY -c "import sys; g = '$got'.split(); w = '$3'.split()
sys.exit(0 if all(abs(float(a) - float(b)) <= 0.01 for a, b in zip(g, w)) else 1)"; then
        ok "$1 $2: one page of $got pt"
    else
        fail "$1 $2: expected one page of $3 pt, got $pages page(s) of $got pt"
    fi
}
mm() { $PY -c "print($1 * 72 / 25.4, $2 * 72 / 25.4)"; }
check_size A5 portrait "$(mm 148 210)"      # ISO 216
check_size A4 portrait "$(mm 210 297)"      # ISO 216
check_size A3 portrait "$(mm 297 420)"      # ISO 216
check_size A4 landscape "$(mm 297 210)"
check_size letter portrait "612 792"        # US Letter, 8.5 x 11 in
check_size legal portrait "612 1008"        # US Legal, 8.5 x 14 in
check_size '"200mm x 250mm"' portrait "$(mm 200 250)"

# ---- colour areas of a page against its allocation -----------------------------
chart_colours() {
    grep -o 'fill="#[0-9a-fA-F]\{6\}"' "$1" | cut -c8-13 | tr 'A-F' 'a-f' | sort -u |
        awk '{ r = substr($0,1,2); g = substr($0,3,2); b = substr($0,5,2);
               if (!(r == g && g == b)) print }'
}

check_page() { # name, page.yaml
    local n=$1 f=$2
    for ext in pdf svg html; do
        "$BIN" draw "$f" -o "$TMP/$n.$ext" || { fail "$n: draw $ext"; return; }
    done
    local info; info=$(pdfinfo "$TMP/$n.pdf")
    [ "$(awk '/^Pages:/ {print $2}' <<<"$info")" = 1 ] && ok "$n: one page" ||
        fail "$n: not one page"
    local fonts; fonts=$(pdffonts "$TMP/$n.pdf" | tail -n +3)
    if [ -z "$fonts" ]; then fail "$n: no fonts in the PDF"
    elif awk '{ if ($(NF-4) != "yes") exit 1 }' <<<"$fonts"; then
        ok "$n: every font embedded"
    else fail "$n: a font is not embedded: $fonts"; fi
    pdftoppm -r 96 "$TMP/$n.pdf" >"$TMP/$n.ppm"
    local colours; colours=$(chart_colours "$TMP/$n.svg" | tr '\n' ' ')
    mapfile -t got < <($PY "$TESTS/colour_areas.py" "$TMP/$n.ppm" --coverage $colours)
    local k=1 checked=0
    declare -A area
    for c in $colours; do area[$c]=${got[k]}; k=$((k + 1)); done
    while read -r c want; do
        checked=$((checked + 1))
        if $PY -c "import sys; sys.exit(0 if abs(${area[$c]} - $want) <= 0.01 * $want else 1)"
        then ok "$n: #$c covers ${area[$c]} px, the allocation says $want"
        else fail "$n: #$c covers ${area[$c]} px, the allocation says $want (over 1 %)"; fi
    done < <($PY "$TESTS/page_areas.py" "$TMP/$n.svg" "$TMP/$n.html")
    [ $checked -gt 0 ] || fail "$n: no square-glyph category to check"
}
check_page handout "$ROOT/layouts/handout.yaml"
check_page shared "$TESTS/data/page/shared.yaml"

# ---- shared scale: one icon size, in the SVG and in the render -----------------
sizes=$(grep -o '<use id="p[0-9]*-u-0"[^>]*width="[0-9.]*"' "$TMP/shared.svg" |
        sed 's/.*width="\([0-9.]*\)"/\1/' | sort -u)
[ "$(wc -l <<<"$sizes")" = 1 ] && [ "$sizes" = 20 ] &&
    ok "shared scale: both charts draw 20 px icons in the SVG" ||
    fail "shared scale: icon sizes in the SVG: $(echo $sizes)"
# each chart's rendered area per icon (icons + swatch) is one icon size squared
per_icon=$($PY - "$TMP/shared.ppm" "$TESTS" <<'PY'
import subprocess, sys
icons = {"0072b2": 13, "e69f00": 6, "56b4e9": 9, "d55e00": 5}  # tables, +1 swatch below
out = subprocess.run(["/usr/bin/python3", sys.argv[2] + "/colour_areas.py", sys.argv[1],
                      "--coverage", *icons], capture_output=True, text=True).stdout.split()
areas = dict(zip(icons, map(float, out[2:])))
print(" ".join("%.1f" % (areas[c] / (n + 1)) for c, n in icons.items()))
PY
)
if $PY -c "import sys; v = [float(x) for x in '$per_icon'.split()]
sys.exit(0 if all(abs(x - 400) <= 4 for x in v) else 1)"; then
    ok "shared scale: every category renders 400 px² (20 x 20) per icon ($per_icon)"
else fail "shared scale: area per icon differs between charts: $per_icon"; fi
grep -q '<td>124</td><td>13</td>' "$TMP/shared.html" &&
    grep -q '<td>51</td><td>5</td>' "$TMP/shared.html" &&
    ok "shared scale: the tables list the icon counts used above" ||
    fail "shared scale: the tables do not list 13 and 5 icons"

# ---- content that does not fit ------------------------------------------------------
echo previous >"$TMP/over.pdf"
if "$BIN" draw "$TESTS/data/page/overflow.yaml" -o "$TMP/over.pdf" 2>"$TMP/over.err"; then
    fail "an overfull page was drawn"
else
    rc=$?
    [ $rc = 1 ] && grep -q 'overflow.yaml:7:5: error: the content does not fit' "$TMP/over.err" &&
        grep -q 'mm more' "$TMP/over.err" && ok "overfull page: exit 1, names panel and amount" ||
        fail "overfull page: exit $rc, $(cat "$TMP/over.err")"
    [ "$(cat "$TMP/over.pdf")" = previous ] && ok "overfull page: old output untouched" ||
        fail "overfull page: the old output changed"
    # one figure: how far the lowest panel reaches is what the page lacks
    [ "$(grep -o '[0-9.]* mm' "$TMP/over.err" | sort -u | wc -l)" = 1 ] &&
        ok "overfull page: one figure" || fail "overfull page: figures disagree: $(cat "$TMP/over.err")"
fi

[ "$fails" = 0 ] || { echo "suite_page: $fails failure(s)"; exit 1; }
echo "suite_page: all passed"
