#!/usr/bin/env bash
# PNG and PDF output checked from outside: poppler-utils reads the PDF our
# code wrote (pdfinfo, pdffonts) and renders it (pdftoppm); its picture must
# cover the same colour areas as our PNG.
#   page sizes: 1 in = 96 CSS px (W3C CSS Values and Units, absolute lengths)
#               1 in = 72 pt (ISO 32000-1 §8.3.2.1)
# usage: bash tests/suite_raster.sh build/unitgram   (from the repository root)
set -euo pipefail
BIN=${1:-build/unitgram}
TESTS=$(cd "$(dirname "$0")" && pwd)
HELPER=$(dirname "$BIN")/tests/check_raster
PY=/usr/bin/python3
# colour_areas.py measures with numpy: a clear failure, not a crash halfway
$PY -c "import numpy" 2>/dev/null || {
    echo "suite_raster: FAIL: $PY cannot import numpy (make test-deps installs python3-numpy)"
    exit 1; }
AREAS="$PY $TESTS/colour_areas.py"
TMP=$(mktemp -d)
trap 'rm -rf "$TMP"' EXIT
fails=0

ok()   { echo "ok   $1"; }
fail() { echo "FAIL $1"; fails=$((fails + 1)); }
expect() { # name, expected, got
    if [ "$2" = "$3" ]; then ok "$1"; else fail "$1: expected '$2', got '$3'"; fi
}
need() { command -v "$1" >/dev/null || { echo "suite_raster: $1 is missing"; exit 1; }; }
need pdfinfo; need pdffonts; need pdftoppm
[ -x "$HELPER" ] || { echo "suite_raster: $HELPER not built (make $HELPER)"; exit 1; }

# Both areas within 1 % of each other (antialiasing at pixel edges).
close() { # name, a, b
    if $PY -c "import sys; a, b = $2, $3; sys.exit(0 if a > 0 and abs(a - b) <= 0.01 * a else 1)"
    then ok "$1 ($2 vs $3)"; else fail "$1: $2 vs $3 differ by more than 1 %"; fi
}

# ---- the test picture from check_raster: 288 x 192 px = 3 x 2 in ------------
"$HELPER" --write "$TMP"
mkdir "$TMP/again"; "$HELPER" --write "$TMP/again"
for f in squares.png squares-300.png squares.pdf; do
    if cmp -s "$TMP/$f" "$TMP/again/$f"; then ok "$f byte-identical in two runs"
    else fail "$f differs between two runs"; fi
done

info=$(pdfinfo "$TMP/squares.pdf")
expect "PDF has one page" "1" "$(awk '/^Pages:/ {print $2}' <<<"$info")"
expect "PDF page 3 x 2 in = 216 x 144 pt" "216 x 144 pts" \
    "$(sed -n 's/^Page size: *//p' <<<"$info")"
fonts=$(pdffonts "$TMP/squares.pdf" | tail -n +3)
if [ -n "$fonts" ] && ! awk '{ if ($(NF-4) != "yes") exit 1 }' <<<"$fonts"; then
    fail "a font is not embedded: $fonts"
elif [ -z "$fonts" ]; then fail "the PDF lists no fonts (text lost?)"
else ok "every font embedded ($(awk '{print $1}' <<<"$fonts" | tr '\n' ' '))"; fi
grep -q DejaVuSans <<<"$fonts" && ok "DejaVu Sans embedded" || fail "DejaVu Sans missing"

pdftoppm -r 96 "$TMP/squares.pdf" >"$TMP/poppler.ppm"
mapfile -t ours < <($AREAS "$TMP/squares.png" ff0000 0000ff 00ff00)
mapfile -t theirs < <($AREAS "$TMP/poppler.ppm" ff0000 0000ff 00ff00)
expect "pdftoppm -r 96 page size in pixels" "288 192" "${theirs[0]}"
expect "our PNG size in pixels" "288 192" "${ours[0]}"
names=(red blue green)
for k in 1 2 3; do close "${names[k-1]} area: our PNG vs poppler's render" \
    "${ours[k]}" "${theirs[k]}"; done
# The same areas at 300 dpi: every area grows by (300/96)^2 = 9.765625.
mapfile -t hi < <($AREAS "$TMP/squares-300.png" ff0000 0000ff 00ff00)
expect "300 dpi PNG size (3 x 2 in)" "900 600" "${hi[0]}"
for k in 1 2 3; do
    expect "${names[k-1]} area at 300 dpi" \
        "$($PY -c "print(round(${ours[k]} * (300 / 96) ** 2))")" "${hi[k]}"
done

[ "$fails" = 0 ] || { echo "suite_raster: $fails failure(s)"; exit 1; }
echo "suite_raster: all passed"
