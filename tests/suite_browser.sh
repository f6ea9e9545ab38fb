#!/usr/bin/env bash
# Browser check: headless Chromium draws each SVG and web page we write; its
# picture must cover the same area of every chart colour as librsvg's (our
# PNG), within 2 %. The two renderers differ in antialiasing and text
# rasterization, so areas are measured by coverage (an edge pixel counts for
# the fraction of colour in it, tests/colour_areas.py --coverage); a larger
# difference means a picture a browser user sees differently from the print.
# A missing chromium or numpy is a failure (make test-deps installs both);
# UG_ALLOW_SKIP=1 lets a developer skip instead.
# usage: bash tests/suite_browser.sh build/unitgram   (from the repository root)
set -euo pipefail
BIN=${1:-build/unitgram}
TESTS=$(cd "$(dirname "$0")" && pwd)
ROOT=$(dirname "$TESTS")
HELPER=$(dirname "$BIN")/tests/check_raster
PY=/usr/bin/python3
AREAS="$PY $TESTS/colour_areas.py"
MIN_AREA=450   # colours covering fewer pixels (text, hairlines) are not compared
# Both renderers draw at 3 device pixels per CSS px (chromium's device scale,
# librsvg at 288 dpi): at 1x the antialiasing of 6 px icons alone differs by
# several percent between them, at 3x by well under one.
SCALE=3

if [ "${UG_SANITIZED:-0}" = 1 ]; then
    # the sanitized pass checks our memory; this suite checks the browser
    echo "SKIP suite_browser: not repeated in the sanitized pass"
    exit 0
fi
missing=
command -v chromium >/dev/null || missing="chromium"
$PY -c "import numpy" 2>/dev/null || missing="${missing:+$missing and }python3-numpy"
if [ -n "$missing" ]; then
    if [ "${UG_ALLOW_SKIP:-0}" != 1 ]; then
        echo "suite_browser: FAIL: $missing not installed (make test-deps installs it)"
        exit 1
    fi
    echo "SKIP suite_browser: $missing not installed"
    exit 0
fi
[ -x "$HELPER" ] || { echo "suite_browser: $HELPER not built"; exit 1; }
TMP=$(mktemp -d)
trap 'rm -rf "$TMP"' EXIT
fails=0
ok()   { echo "ok   $1"; }
within() { $PY -c "import sys; a, b = $1, $2; sys.exit(0 if abs(a - b) <= 0.02 * a else 1)"; }
small() { $PY -c "import sys; sys.exit(0 if $1 < $MIN_AREA else 1)"; }
fail() { echo "FAIL $1"; fails=$((fails + 1)); }

shot() { # file, png, width, height
    chromium --headless --no-sandbox --disable-gpu --disable-background-networking \
        --disable-component-update --disable-sync --no-first-run \
        --hide-scrollbars --force-device-scale-factor=$SCALE --force-color-profile=srgb \
        --user-data-dir="$TMP/profile" --screenshot="$2" --window-size="$3,$4" \
        "file://$1" >/dev/null 2>&1
    [ -s "$2" ] || { fail "chromium wrote no screenshot of $1"; return 1; }
}

# The chart colours: every fill in the SVG except white, black and greys and
# the chart's own background (its first rect's fill): background, ink and text,
# whose areas differ by text rasterization only (light text on a dark theme
# takes its pixels out of the background).
colours() {
    local bg
    bg=$(grep -o '<rect width="[^"]*" height="[^"]*" fill="#[0-9a-fA-F]\{6\}"' "$1" | head -n 1 |
         grep -o '#[0-9a-fA-F]\{6\}' | cut -c2- | tr 'A-F' 'a-f')
    grep -o 'fill="#[0-9a-fA-F]\{6\}"' "$1" | cut -c8-13 | tr 'A-F' 'a-f' | sort -u |
        awk -v bg="$bg" '{ r = substr($0,1,2); g = substr($0,3,2); b = substr($0,5,2);
               if (!(r == g && g == b) && $0 != bg) print }'
}

# Compare colour areas of librsvg's render (ours) and chromium's (theirs).
# Coverage areas of colours in a png, computed once per file.
areas() { # png, colours...
    local png=$1; shift
    [ -s "$png.areas" ] || $AREAS "$png" --coverage "$@" >"$png.areas"
    cat "$png.areas"
}

compare() { # name, ours.png, theirs.png, colours...
    local name=$1 ours=$2 theirs=$3; shift 3
    [ $# -gt 0 ] || { fail "$name: no chart colours found"; return; }
    mapfile -t a < <(areas "$ours" "$@")
    mapfile -t b < <(areas "$theirs" "$@")
    local k=1 compared=0 bad=0
    for c in "$@"; do
        if ! small "${a[k]}"; then
            compared=$((compared + 1))
            if ! within "${a[k]}" "${b[k]}"; then
                fail "$name: #$c covers ${a[k]} px in librsvg, ${b[k]} px in chromium (over 2 %)"
                bad=$((bad + 1))
            fi
        fi
        k=$((k + 1))
    done
    if [ $compared = 0 ]; then fail "$name: no colour large enough to compare"
    elif [ $bad = 0 ]; then ok "$name: $compared colour areas within 2 % of librsvg"; fi
}

css_size() { # png at 3x -> its size in CSS px
    local s
    read -r -a s < <($AREAS "$1")
    echo $(( (s[0] + SCALE - 1) / SCALE )) $(( (s[1] + SCALE - 1) / SCALE ))
}

check_svg() { # name, svg, librsvg png (at 3x)
    local size
    read -r -a size < <(css_size "$3")
    shot "$2" "$TMP/$1.chromium.png" "${size[0]}" "${size[1]}" || return 0
    compare "$1.svg" "$3" "$TMP/$1.chromium.png" $(colours "$2")
}

check_html() { # name, html, svg inside it, librsvg png of that svg (at 3x)
    local size
    read -r -a size < <(css_size "$4")
    # wide and tall enough for the page's heading, the picture and its margins
    shot "$2" "$TMP/$1.page.png" $((size[0] + 200)) $((size[1] + 400)) || return 0
    compare "$1.html" "$4" "$TMP/$1.page.png" $(colours "$3")
}

# ---- the test picture of check_raster ----------------------------------------
"$HELPER" --write "$TMP"
check_svg squares "$TMP/squares.svg" "$TMP/squares-288.png"
check_html squares "$TMP/squares.html" "$TMP/squares.svg" "$TMP/squares-288.png"

# ---- every example layout ----------------------------------------------------
for f in "$ROOT"/layouts/*.yaml; do
    [ -f "$f" ] || continue
    n=$(basename "$f" .yaml)
    for ext in svg png html; do
        "$BIN" draw "$f" --dpi $((96 * SCALE)) -o "$TMP/$n.$ext" ||
            { fail "draw $n.$ext"; continue 2; }
    done
    check_svg "$n" "$TMP/$n.svg" "$TMP/$n.png"
    check_html "$n" "$TMP/$n.html" "$TMP/$n.svg" "$TMP/$n.png"
done

[ "$fails" = 0 ] || { echo "suite_browser: $fails failure(s)"; exit 1; }
echo "suite_browser: all passed"
