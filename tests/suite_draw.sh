#!/usr/bin/env bash
# The draw and describe commands end to end: every example layout draws to
# well-formed SVG (xmllint) that librsvg renders (rsvg-convert), twice the
# same bytes; describe prints the SVG's <desc>; exit codes and atomic writes;
# escaping and suppression survive the whole pipeline.
set -u
BIN=${1:-build/unitgram}
T=$(mktemp -d)
trap 'rm -rf "$T"' EXIT
fails=0
fail() { echo "FAIL: $*"; fails=$((fails + 1)); }

desc_of() { xmllint --xpath 'string(//*[local-name()="desc"])' "$1"; }

shopt -s nullglob
layouts=(layouts/*.yaml)
[ ${#layouts[@]} -gt 0 ] || fail "no example layouts in layouts/"
for f in "${layouts[@]}" tests/data/draw/suppressed.yaml tests/data/draw/hostile.yaml; do
  n=$(basename "$f" .yaml)
  "$BIN" draw "$f" -o "$T/$n.svg" || { fail "$f: draw exited $?"; continue; }
  xmllint --noout "$T/$n.svg" || fail "$f: not well-formed"
  rsvg-convert "$T/$n.svg" -o "$T/$n.png" || fail "$f: librsvg cannot render it"
  "$BIN" draw "$f" -o "$T/$n.again.svg" && cmp -s "$T/$n.svg" "$T/$n.again.svg" \
    || fail "$f: two runs differ"
  [ "$("$BIN" describe "$f")" = "$(desc_of "$T/$n.svg")" ] \
    || fail "$f: describe differs from the SVG's <desc>"
  grep -qiE '<script|<foreignObject| on[a-z]+=|xlink:href="http' "$T/$n.svg" \
    && fail "$f: active content in the SVG"
done

# -o - writes the same bytes to standard output
"$BIN" draw tests/data/draw/hostile.yaml -o - > "$T/stdout.svg" \
  && cmp -s "$T/stdout.svg" "$T/hostile.svg" || fail "-o - differs from the file"

# escaping: the title comes back as the text it was
[ "$(xmllint --xpath 'string(/*[local-name()="svg"]/*[local-name()="title"])' "$T/hostile.svg")" \
  = 'A <b>bold</b> & "quoted" title ]]> </text><script>alert(1)</script>' ] \
  || fail "hostile title did not round-trip"

# suppression: 7 children at Mill Street appear nowhere, not even as a total
grep -q 'fewer than 10' "$T/suppressed.svg" || fail "no placeholder label"
grep -qE '(^|[^0-9.,])7([^0-9.,]|$)|347|627|2,147|2147' "$T/suppressed.svg" \
  && fail "the hidden count leaks into the SVG"
"$BIN" describe tests/data/draw/suppressed.yaml | grep -q 'Children fewer than 10' \
  || fail "describe does not say 'fewer than 10'"

# exit codes: usage 2 (no file written), bad input 1, output not written 4
"$BIN" draw tests/data/draw/suppressed.yaml -o "$T/chart.jpeg" 2>/dev/null
[ $? -eq 2 ] && [ ! -e "$T/chart.jpeg" ] || fail "an unknown format should exit 2 and write nothing"
"$BIN" draw "$T/missing.yaml" -o "$T/m.svg" 2>/dev/null
[ $? -eq 1 ] && [ ! -e "$T/m.svg" ] || fail "missing layout should exit 1"
"$BIN" draw tests/data/draw/suppressed.yaml -o "$T/no/such/dir/x.svg" 2>/dev/null
[ $? -eq 4 ] || fail "unwritable output should exit 4"
echo previous > "$T/keep.svg"
"$BIN" draw "$T/missing.yaml" -o "$T/keep.svg" 2>/dev/null
[ "$(cat "$T/keep.svg")" = previous ] || fail "a failed draw touched the old picture"
"$BIN" draw --help | grep -q 'usage: unitgram draw' || fail "draw --help"
"$BIN" describe --help | grep -q 'usage: unitgram describe' || fail "describe --help"

[ $fails -eq 0 ] && echo "suite_draw: all checks passed" || exit 1
