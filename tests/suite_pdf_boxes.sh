#!/usr/bin/env bash
# Text on the printed page, read back by poppler's pdftotext -bbox-layout
# (tests/pdf_boxes.py): on every example layout's PDF, on each page file
# again at A4 and US Letter, and on a generated corpus of charts, no word
# leaves the page, no two words overlap and no word is broken across lines.
# A control PDF with each fault, drawn by librsvg from a hand-written SVG,
# shows the checker finds them. Overlap of text with icons and with the
# canvas is checked on the scene's own boxes by check_pack.
# usage: bash tests/suite_pdf_boxes.sh build/unitgram   (from the repository root)
set -euo pipefail
BIN=${1:-build/unitgram}
TESTS=$(cd "$(dirname "$0")" && pwd)
ROOT=$(dirname "$TESTS")
PY=/usr/bin/python3
for t in pdftotext rsvg-convert; do
    command -v $t >/dev/null || { echo "suite_pdf_boxes: FAIL: $t is missing (make deps)"; exit 1; }
done
TMP=$(mktemp -d)
trap 'rm -rf "$TMP"' EXIT
fails=0
ok()   { echo "ok   $1"; }
fail() { echo "FAIL $1"; fails=$((fails + 1)); }

# ---- the checker can fail ------------------------------------------------------
cat >"$TMP/control.svg" <<'SVG'
<svg xmlns="http://www.w3.org/2000/svg" width="400" height="200" viewBox="0 0 400 200">
  <text x="20" y="40" font-family="DejaVu Sans" font-size="16">Overlapping</text>
  <text x="30" y="44" font-family="DejaVu Sans" font-size="16">words</text>
  <text x="20" y="100" font-family="DejaVu Sans" font-size="16">Counted hou</text>
  <text x="20" y="120" font-family="DejaVu Sans" font-size="16">seholds here</text>
  <text x="380" y="180" font-family="DejaVu Sans" font-size="16">Outside</text>
</svg>
SVG
rsvg-convert -f pdf "$TMP/control.svg" -o "$TMP/control.pdf"
echo "households" >"$TMP/control.words"
got=$($PY "$TESTS/pdf_boxes.py" "$TMP/control.pdf" "$TMP/control.words" || true)
for want in "overlap" "broken as 'hou' / 'seholds'" "leaves the page"; do
    grep -qF "$want" <<<"$got" && ok "control: finds $want" ||
        fail "control: did not find $want in: $got"
done

# ---- the examples, and each page file at A4 and Letter ---------------------------
cp -r "$ROOT/layouts" "$TMP/layouts"
check_pdf() { # name, layout
    local n=$1 f=$2
    "$BIN" draw "$f" -o "$TMP/$n.pdf" 2>/dev/null || { fail "$n: draw"; return; }
    "$BIN" describe "$f" >"$TMP/$n.words" 2>/dev/null || true
    cat "$TMP"/layouts/*.yaml >>"$TMP/$n.words"
    local out
    if out=$($PY "$TESTS/pdf_boxes.py" "$TMP/$n.pdf" "$TMP/$n.words"); then
        ok "$n: every word on the page, none overlapping, none broken"
    else fail "$n: $out"; fi
}
for f in "$TMP"/layouts/*.yaml; do
    n=$(basename "$f" .yaml)
    check_pdf "$n" "$f"
    if grep -q '^page:' "$f"; then
        for size in A4 letter; do
            sed "/^page:/s/size: [^,}]*/size: $size/" "$f" >"$TMP/layouts/$n-$size.tmp.yaml"
            check_pdf "$n at $size" "$TMP/layouts/$n-$size.tmp.yaml"
            rm -f "$TMP/layouts/$n-$size.tmp.yaml"
        done
    fi
done

# ---- a generated corpus (fixed seed) ---------------------------------------------
$PY - "$TMP/corpus" <<'GEN'
import os, random, sys
out = sys.argv[1]
os.makedirs(out)
rng = random.Random(20261204)
words = ("north south river hill garden market station library school clinic "
         "households families pupils visitors residents volunteers neighbourhood "
         "community allotment evening weekend breakfast transport").split()
def phrase(n):
    return " ".join(rng.choice(words) for _ in range(n)).capitalize()
for i in range(24):
    waffle = rng.random() < 0.5
    cats = rng.randint(2, 7)
    lines = [f"title: {phrase(rng.randint(2, 12))} (demo data)",
             f"subtitle: {phrase(rng.randint(0, 9)) or 'Counts'}",
             f"source: {phrase(rng.randint(2, 8))} (demo data)",
             f"unit-label: {rng.choice(words)}",
             f"form: {'waffle' if waffle else 'rows'}"]
    if not waffle:
        lines.append(f"icon-value: {rng.choice([1, 5, 10, 25])}")
    lines.append(f"icon: {{size: {rng.randint(8, 30)}, gap: {rng.randint(0, 6)}}}")
    if rng.random() < 0.4:
        lines.append(f"style: {{width: {rng.randint(320, 900)}}}")
    groups = rng.randint(0, 3)
    if groups:
        lines.append("groups: [" + ", ".join(f"{phrase(rng.randint(1, 3))} {g}" for g in range(groups)) + "]")
    lines.append("categories:")
    for c in range(cats):
        counts = [rng.randint(0, 400) for _ in range(max(groups, 1))]
        counts[0] += 1
        key = f"counts: {counts}" if groups else f"count: {counts[0]}"
        lines.append(f"  - {{label: {phrase(rng.randint(1, 5))} {c}, glyph: square, {key}}}")
    open(os.path.join(out, f"random-{i:02d}.yaml"), "w").write("\n".join(lines) + "\n")
GEN
for f in "$TMP"/corpus/*.yaml; do
    n=$(basename "$f" .yaml)
    "$BIN" draw "$f" -o "$TMP/$n.pdf" 2>/dev/null || { fail "$n: draw"; continue; }
    cp "$f" "$TMP/$n.words"
    "$BIN" describe "$f" >>"$TMP/$n.words" 2>/dev/null || true
    out=$($PY "$TESTS/pdf_boxes.py" "$TMP/$n.pdf" "$TMP/$n.words") &&
        ok "$n: every word on the page, none overlapping, none broken" || fail "$n: $out"
done

[ $fails -eq 0 ] && echo "suite_pdf_boxes: all passed" || { echo "suite_pdf_boxes: $fails failure(s)"; exit 1; }
