#!/usr/bin/env bash
# The command line as a user meets it: every command and its --help, every
# exit code, '-' for standard input and output, diagnostics in the
# file:line:col form without colour when not on a terminal or under NO_COLOR,
# glyph sanitizer warnings at the layout's glyph key, batches (--each-row)
# with unsafe row names, init files that draw unedited, and --watch reacting
# to an edit (including an editor's save-by-rename) within a bounded time.
set -u
BIN=$(realpath "${1:-build/unitgram}")
ROOT=$PWD
T=$(mktemp -d)
trap 'rm -rf "$T"' EXIT
fails=0
fail() { echo "FAIL: $*"; fails=$((fails + 1)); }
# expect CODE CMD...: run CMD (stdout to $T/out, stderr to $T/err), check its exit code
expect() {
  local want=$1; shift
  "$@" > "$T/out" 2> "$T/err" < /dev/null; local got=$?
  [ "$got" = "$want" ] || fail "exit $got, expected $want: $*  ($(head -c 300 "$T/err"))"
}
no_escapes() { grep -q $'\033' "$1" && fail "$2: escape codes in output"; }

# ---- one option table per command: every command reads options the same way
expect 0 "$BIN" glyphs --glyph-dir=tests/data/glyphs/lib-a --search=test-bar
grep -q "test-bar" "$T/out" || fail "glyphs --opt=VALUE: $(head -c 200 "$T/out")"
expect 0 "$BIN" tally layouts/pantry.yaml --format=json --max-icons=1000
grep -q '"icons"' "$T/out" || fail "tally --format=json: $(head -c 200 "$T/out")"
many=(); for k in $(seq 1 33); do many+=(--glyph-dir "$T"); done
expect 2 "$BIN" glyphs "${many[@]}"
grep -q "at most 32 --glyph-dir" "$T/err" || fail "33 --glyph-dir: $(cat "$T/err")"
for c in draw tally audit describe glyphs init; do
  expect 2 "$BIN" $c --no-such-option
  grep -q "unitgram $c: unknown option '--no-such-option'" "$T/err" \
    || fail "$c: unknown option message: $(cat "$T/err")"
  expect 0 "$BIN" $c --help
  grep -q -- "--max-icons\|--glyph-dir\|--page" "$T/out" || fail "$c --help lists no options"
done
expect 2 "$BIN" tally a.yaml b.yaml
grep -q "one layout at a time (found 'b.yaml' too)" "$T/err" || fail "tally two layouts: $(cat "$T/err")"

# ---- every command has help, the same style, and the exit-code paragraph
for c in draw tally audit describe glyphs init; do
  expect 0 "$BIN" "$c" --help
  grep -q "^usage: unitgram $c" "$T/out" || fail "$c --help: no usage line"
  grep -q "^options:" "$T/out" || fail "$c --help: no options section"
  grep -q "4 output could not be written" "$T/out" || fail "$c --help: exit codes missing"
  grep -q -- "-h, --help" "$T/out" || fail "$c --help: -h, --help missing"
  expect 0 "$BIN" help "$c"
  expect 2 "$BIN" "$c" --no-such-option
  grep -q "see 'unitgram $c --help'" "$T/err" || fail "$c: usage error without pointer"
done
expect 0 "$BIN" --version
grep -qE '^unitgram [0-9]+\.[0-9]+\.[0-9]+$' "$T/out" || fail "--version: $(cat "$T/out")"
expect 0 "$BIN" --help
expect 0 "$BIN" help
expect 2 "$BIN"
expect 2 "$BIN" frobnicate
expect 2 "$BIN" help frobnicate

# ---- exit codes
expect 0 "$BIN" draw layouts/pantry.yaml -o "$T/p.svg"
expect 1 "$BIN" draw "$T/missing.yaml" -o "$T/x.svg"
expect 1 "$BIN" draw tests/data/bad/$(ls tests/data/bad | grep -m1 'yaml$') -o "$T/x.svg"
expect 2 "$BIN" draw layouts/pantry.yaml
expect 2 "$BIN" draw -o "$T/x.svg"
expect 2 "$BIN" draw layouts/pantry.yaml -o "$T/x.unknown"
expect 2 "$BIN" draw layouts/pantry.yaml -o "$T/x.svg" --format bmp
expect 2 "$BIN" draw layouts/pantry.yaml -o "$T/x.svg" --watch-limit 2
expect 2 "$BIN" draw layouts/pantry.yaml -o "$T/x.svg" --watch-timeout 5
grep -q -- "--watch-timeout only works with --watch" "$T/err" || fail "lone --watch-timeout: $(cat "$T/err")"

# ---- number options: the range is checked before any conversion (the
# sanitized pass has -fsanitize=float-cast-overflow), the error names the
# option and its range, and nothing is written
# range: option lo hi values...; each value must be refused with exit 2
refuse_range() {
  local opt=$1 lo=$2 hi=$3 v; shift 3
  for v in "$@"; do
    expect 2 "$BIN" draw layouts/pantry.yaml -o "$T/range.png" --watch "$opt" "$v"
    grep -qF -- "$opt expects" "$T/err" && grep -qF "from $lo to $hi (found '$v')" "$T/err" \
      || fail "$opt $v: $(head -c 200 "$T/err")"
  done
}
refuse_range --watch-limit 1 1000000000 1e30 1e300 2.5 0 -1 1000000001 nan inf ' 3' 0x10 ''
refuse_range --watch-timeout 0.001 31536000 1e300 1e30 0 -1 31536001 nan inf NaN 0x1p4 1e
refuse_range --dpi 10 2400 1e-300 0 9.99 2401 1e30 nan inf -96 0x60 96px
refuse_range --scale 0.1 25 1e-300 0 0.09 25.5 1e300 nan -inf .
[ -e "$T/range.png" ] && fail "an out-of-range option wrote its output"
expect 2 "$BIN" draw layouts/pantry.yaml -o "$T/range.png" --watch-limit=1e30
grep -qF "from 1 to 1000000000" "$T/err" || fail "--watch-limit=1e30: $(cat "$T/err")"
# the ends of each range are accepted
for a in "--dpi 10" "--dpi 2400 --format pdf" "--scale 0.1" "--scale 1e-1" "--scale .5"; do
  # shellcheck disable=SC2086
  expect 0 "$BIN" draw layouts/pantry.yaml -o "$T/range.png" $a
done
expect 0 "$BIN" draw layouts/pantry.yaml -o "$T/range.png" --scale 25 --dpi 10
expect 0 "$BIN" draw layouts/pantry.yaml -o "$T/range.svg" --watch --watch-limit 1000000000 \
  --watch-timeout 0.001
"$BIN" draw layouts/pantry.yaml -o "$T/range.svg" --watch --watch-timeout 31536000 \
  --watch-limit 1 < /dev/null 2> "$T/long.err" &
long_watch=$!
sleep 1
kill -0 $long_watch 2> /dev/null || fail "--watch-timeout 31536000 stopped: $(cat "$T/long.err")"
kill $long_watch 2> /dev/null; wait $long_watch 2> /dev/null
expect 4 "$BIN" draw layouts/pantry.yaml -o "$T/no/such/folder/x.svg"
expect 4 "$BIN" draw layouts/pantry.yaml -o /proc/unitgram-test.svg
[ -e "$T/x.svg" ] && fail "a failed draw wrote its output"
expect 0 "$BIN" tally layouts/pantry.yaml
expect 1 "$BIN" tally "$T/missing.yaml"
expect 2 "$BIN" tally layouts/pantry.yaml --format xml
expect 0 "$BIN" describe layouts/pantry.yaml
expect 1 "$BIN" describe "$T/missing.yaml"
expect 2 "$BIN" describe
expect 0 "$BIN" glyphs
expect 1 "$BIN" glyphs --check "$T/nothing.svg"
expect 4 "$BIN" glyphs --sheet "$T/no/such/sheet.svg"
# a full output device: every command that prints to standard output fails
# with exit 4 (not 0, not 1) and says so once on stderr
if [ -w /dev/full ]; then
  while IFS= read -r args; do
    # shellcheck disable=SC2086  # the words of one command line
    "$BIN" $args > /dev/full 2> "$T/err"; rc=$?
    [ $rc = 4 ] || fail "$args > /dev/full exited $rc"
    [ "$(grep -c 'write' "$T/err")" = 1 ] || fail "$args > /dev/full: $(head -c 300 "$T/err")"
  done <<'CMDS'
draw layouts/pantry.yaml -o -
draw layouts/pantry.yaml -o - --format png
describe layouts/pantry.yaml
tally layouts/pantry.yaml
tally layouts/pantry.yaml --format csv
audit layouts/pantry.yaml
glyphs
init
--version
--help
help
help tally
draw --help
CMDS
fi

# ---- '-' is standard input and standard output
"$BIN" draw - -o - < layouts/pantry.yaml > "$T/stdin.svg" || fail "draw - -o - failed"
cmp -s "$T/stdin.svg" "$T/p.svg" || fail "layout from stdin draws differently"
"$BIN" draw - --format svg -o "$T/stdin2.svg" < layouts/pantry.yaml || fail "--format svg"
cmp -s "$T/stdin2.svg" "$T/p.svg" || fail "--format svg from stdin differs"
[ "$("$BIN" describe - < layouts/pantry.yaml)" = "$("$BIN" describe layouts/pantry.yaml)" ] \
  || fail "describe - differs"
[ "$("$BIN" tally - < layouts/pantry.yaml)" = "$("$BIN" tally layouts/pantry.yaml)" ] \
  || fail "tally - differs"
# relative paths in a layout on stdin start at the current folder
(cd layouts && "$BIN" draw - -o "$T/wards-stdin.svg" < wards.yaml) \
  || fail "stdin layout with data.file relative to the current folder"
printf 'title: [unclosed\n' | "$BIN" draw - -o "$T/bad.svg" 2> "$T/err"
grep -qE '^<stdin>:[0-9]+:[0-9]+: error: ' "$T/err" || fail "stdin error not named <stdin>: $(cat "$T/err")"

# ---- diagnostics: file:line:col: severity: message; colour only on a terminal
printf 'title: x\nform: squares\ncategories:\n  - {label: A, count: 1}\n' > "$T/bad.yaml"
"$BIN" draw "$T/bad.yaml" -o "$T/bad.svg" 2> "$T/err"
grep -qE "^$T/bad.yaml:2:7: error: " "$T/err" || fail "diagnostic form: $(cat "$T/err")"
no_escapes "$T/err" "stderr to a file"
if command -v script > /dev/null; then
  script -qc "$BIN draw $T/bad.yaml -o $T/bad.svg" /dev/null > "$T/tty" 2>&1
  grep -q $'\033\[' "$T/tty" || fail "no colour on a terminal"
  NO_COLOR=1 script -qc "$BIN draw $T/bad.yaml -o $T/bad.svg" /dev/null > "$T/tty" 2>&1
  no_escapes "$T/tty" "NO_COLOR=1 on a terminal"
  grep -q "bad.yaml:2:7: error:" "$T/tty" || fail "NO_COLOR changed the message"
fi

# ---- text from a layout reaches the terminal escaped: the bidirectional
# formatting characters of Unicode UAX #9 (the "Trojan Source" set of
# CVE-2021-42574), C0/C1 controls and DEL are shown as <U+XXXX>
# raw_controls FILE: any of those code points in FILE, as UTF-8
raw_controls() {
  python3 - "$1" <<'PY'
import re, sys
text = open(sys.argv[1], "rb").read().decode("utf-8", "replace")
bad = re.findall("[\x00-\x08\x0b-\x1f\x7f-\x9f\u061c\u200e\u200f\u2028\u2029"
                 "\u202a-\u202e\u2066-\u2069]", text)
print(" ".join("U+%04X" % ord(c) for c in sorted(set(bad))))
PY
}
printf '%s\n' 'title: "Bidi \u202e test"' 'source: test' 'unit-label: "house\u202eholds"' \
  'form: rows' 'icon-value: 1' 'data: {file: bidi.csv, group-column: g}' 'categories:' \
  '  - {label: "\u202egnp.exe\u202c A", column: a}' \
  '  - {label: "B\u2066x\u2069\u200e\u200f\u061c\u2028", column: b}' > "$T/bidi.yaml"
printf 'g,a,b\nN\xe2\x80\xaeorth,1,2\n' > "$T/bidi.csv"
expect 0 "$BIN" tally "$T/bidi.yaml"
[ -z "$(raw_controls "$T/out")" ] || fail "tally text: raw $(raw_controls "$T/out")"
grep -qF '<U+202E>gnp.exe<U+202C> A' "$T/out" || fail "tally text: label not escaped: $(cat "$T/out")"
grep -qF 'N<U+202E>orth' "$T/out" || fail "tally text: group not escaped"
grep -qF 'house<U+202E>holds' "$T/out" || fail "tally text: unit label not escaped"
expect 0 "$BIN" tally "$T/bidi.yaml" --format json
[ -z "$(raw_controls "$T/out")" ] || fail "tally json: raw $(raw_controls "$T/out")"
python3 -c 'import json, sys; r = json.load(open(sys.argv[1]))
assert r[0]["category"] == "\u202egnp.exe\u202c A", r[0]["category"]' "$T/out" \
  || fail "tally json: the escaped label does not read back as written"
# CSV to a file keeps the label byte for byte; on a terminal it is escaped
expect 0 "$BIN" tally "$T/bidi.yaml" --format csv
grep -qF "$(printf '\xe2\x80\xaegnp.exe')" "$T/out" || fail "tally csv to a file changed the label"
if command -v script > /dev/null; then
  script -qc "$BIN tally $T/bidi.yaml --format csv" /dev/null > "$T/tty" 2>&1
  tr -d '\r' < "$T/tty" > "$T/tty.txt"
  [ -z "$(raw_controls "$T/tty.txt")" ] || fail "tally csv on a terminal: raw $(raw_controls "$T/tty.txt")"
  grep -qF '<U+202E>gnp.exe' "$T/tty.txt" || fail "tally csv on a terminal: $(head -c 300 "$T/tty.txt")"
fi
# a diagnostic quoting a label (a duplicate id)
sed 's/column: a}/column: b}/; s/label: "\\u202egnp.exe\\u202c A"/label: "B\\u2066x\\u2069\\u200e\\u200f\\u061c\\u2028"/' \
  "$T/bidi.yaml" > "$T/bidi_dup.yaml"
expect 1 "$BIN" draw "$T/bidi_dup.yaml" -o "$T/bidi.svg"
[ -z "$(raw_controls "$T/err")" ] || fail "diagnostic: raw $(raw_controls "$T/err")"
# (ids are slugs, so the id quoted holds none of the label's controls)
grep -qF "duplicate category id 'b-x'" "$T/err" \
  || fail "diagnostic not escaped: $(cat "$T/err")"
expect 0 "$BIN" audit "$T/bidi.yaml"
[ -z "$(raw_controls "$T/out")" ] || fail "audit report: raw $(raw_controls "$T/out")"
grep -qF "'<U+202E>gnp.exe<U+202C> A' in N<U+202E>orth is 1 house<U+202E>holds" "$T/out" \
  || fail "audit report not escaped: $(head -c 300 "$T/out")"
expect 0 "$BIN" audit "$T/bidi.yaml" --format json
[ -z "$(raw_controls "$T/out")" ] || fail "audit json: raw $(raw_controls "$T/out")"
expect 0 "$BIN" draw "$T/bidi.yaml" -o "$T/bidi.svg"
[ -z "$(raw_controls "$T/err")" ] || fail "draw's audit findings: raw $(raw_controls "$T/err")"
grep -qF "<U+202E>gnp.exe" "$T/err" || fail "draw's findings not escaped: $(head -c 300 "$T/err")"
expect 0 "$BIN" describe "$T/bidi.yaml"

# a control character can still come in a file name or an argument
expect 1 "$BIN" draw "$T/x"$'\033]0;pwned\007'".yaml" -o "$T/x.svg"
[ -z "$(raw_controls "$T/err")" ] || fail "file name in a diagnostic: raw $(raw_controls "$T/err")"
grep -qF 'x<U+001B>]0;pwned<U+0007>.yaml' "$T/err" || fail "file name not escaped: $(cat "$T/err")"
expect 2 "$BIN" draw layouts/pantry.yaml --bogus$'\033[2J\u202e'
[ -z "$(raw_controls "$T/err")" ] || fail "usage error: raw $(raw_controls "$T/err")"
grep -qF -- '--bogus<U+001B>[2J<U+202E>' "$T/err" || fail "usage error not escaped: $(cat "$T/err")"

# ---- glyph sanitizer removals: a warning at the category's glyph key
mkdir -p "$T/g"
cat > "$T/g/boat.svg" <<'SVG'
<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 10 10"><script>alert(1)</script><path fill="red" onclick="x()" d="M1 1H9V9H1Z"/></svg>
SVG
printf 'title: Boats\nicon-value: 1\ncategories:\n  - label: Boats\n    glyph: ./boat.svg\n    count: 3\n' > "$T/g/boats.yaml"
expect 0 "$BIN" draw "$T/g/boats.yaml" -o "$T/g/boats.svg"
grep -qE "boats.yaml:5:12: warning: glyph './boat.svg': sanitizing removed .*script" "$T/err" \
  || fail "sanitizer warning not at the glyph key: $(cat "$T/err")"
grep -q "<script" "$T/g/boats.svg" && fail "script survived"

# ---- --glyph-dir feeds the glyph search path
mkdir -p "$T/mine"
sed 's/<script>alert(1)<\/script>//; s/ onclick="x()"//; s/ fill="red"//' "$T/g/boat.svg" > "$T/mine/sailboat.svg"
printf 'title: Boats\nicon-value: 1\ncategories:\n  - {label: Boats, glyph: sailboat, count: 3}\n' > "$T/sail.yaml"
expect 1 "$BIN" draw "$T/sail.yaml" -o "$T/sail.svg"
expect 0 "$BIN" draw "$T/sail.yaml" -o "$T/sail.svg" --glyph-dir "$T/mine"
expect 0 "$BIN" draw "$T/sail.yaml" -o "$T/sail.svg" --glyph-dir="$T/mine"
# a page whose panel names the same glyph finds it through --glyph-dir too
printf 'page: {size: A4}\ntitle: Boats page (test data)\npanels:\n  - chart: sail.yaml\n' > "$T/sail-page.yaml"
expect 1 "$BIN" draw "$T/sail-page.yaml" -o "$T/sail-page.svg"
for ext in svg png pdf html; do
  expect 0 "$BIN" draw "$T/sail-page.yaml" -o "$T/sail-page.$ext" --glyph-dir "$T/mine"
done
# draw also prints the audit's findings (missing source, small count...);
# a clean glyph file adds no sanitizer warning of its own.
grep -q "sanitiz" "$T/err" && fail "a clean glyph gave warnings: $(cat "$T/err")"
# --strict: the audit's findings stop the drawing, nothing is written (exit 3)
rm -f "$T/strict.svg"
expect 3 "$BIN" draw "$T/sail.yaml" -o "$T/strict.svg" --glyph-dir "$T/mine" --strict
[ -e "$T/strict.svg" ] && fail "draw --strict wrote a chart despite findings"

# ---- batches: one chart per row, names made safe, one icon value
cat > "$T/tmpl.yaml" <<'YAML'
title: "Card holders in {group}"
subtitle: Branch report (demo data)
icon-value: auto
unit-label: card holders
categories:
  - {label: Adults, glyph: person, column: adults, count: 1}
  - {label: Children, glyph: child, column: children, count: 1}
YAML
printf 'ward,adults,children\n../etc,120,40\na/b,30,5\n,10,10\nÜnïcode,50,50\n-lead,1,2\n.hidden,3,4\n' > "$T/rows.csv"
(cd "$T" && expect 0 "$BIN" draw tmpl.yaml --each-row rows.csv -o 'batch/{group}.svg')
[ "$(cd "$T/batch" && ls | tr '\n' ' ')" = "a-b.svg etc.svg hidden.svg lead.svg row-3.svg unicode.svg " ] \
  || fail "batch names: $(ls -A "$T/batch" | tr '\n' ' ')"
[ -e "$T/etc" ] || [ -e "$T/etc.svg" ] && fail "batch escaped the output folder"
grep -q "drew 6 charts to batch/ in" "$T/err" || fail "no summary line: $(cat "$T/err")"
no_escapes "$T/err" "batch progress off a terminal"
[ "$(xmllint --xpath 'string(/*[local-name()="svg"]/*[local-name()="title"])' "$T/batch/etc.svg")" \
  = "Card holders in ../etc" ] || fail "{group} in the title"
# auto resolved once over every row: the largest row (160) sets one value for all
[ "$(grep -ho 'Each icon = [^<]*' "$T"/batch/*.svg | sort -u | wc -l)" = 1 ] \
  || fail "charts of a batch state different icon values"
xmllint --noout "$T"/batch/*.svg || fail "batch output not well-formed"
# a batch writes every format, each row's file the same as that row's SVG
# drawn through the one-chart path (PNG checked by its signature, PNG spec §5.2;
# PDF by its header, ISO 32000-1 §7.5.2)
for ext in png pdf html csv; do
  (cd "$T" && expect 0 "$BIN" draw tmpl.yaml --each-row rows.csv -o "fmt-$ext/{group}.$ext" --quiet)
  [ "$(ls "$T/fmt-$ext" | wc -l)" = 6 ] || fail "batch to .$ext: $(ls "$T/fmt-$ext" | tr '\n' ' ')"
done
[ "$(head -c 8 "$T/fmt-png/etc.png" | od -An -tx1 | tr -d ' ')" = 89504e470d0a1a0a ] || fail "batch PNG"
[ "$(head -c 5 "$T/fmt-pdf/etc.pdf")" = "%PDF-" ] || fail "batch PDF"
xmllint --noout "$T"/fmt-html/*.html || fail "batch web pages not well-formed"
head -1 "$T/fmt-csv/etc.csv" | grep -q '^group,category,count,icons,status,level' \
  || fail "batch CSV table: $(head -1 "$T/fmt-csv/etc.csv")"
# a template needs no dummy counts and no data file: the CSV brings both
printf 'title: "Card holders in {group}"\nsource: s (test data)\nunit-label: card holders\nicon-value: 10\ndata: {group-column: ward}\ncategories:\n  - {label: Adults, glyph: person, column: adults}\n  - {label: Children, glyph: child, column: children}\n' > "$T/bare.yaml"
(cd "$T" && expect 0 "$BIN" draw bare.yaml --each-row rows.csv -o 'bare/{group}.svg' --quiet)
[ "$(ls "$T/bare" | wc -l)" = 6 ] || fail "bare template: $(ls "$T/bare" | tr '\n' ' ')"
grep -q 'Adults: 120 card holders' "$T/bare/etc.svg" || fail "bare template counts"
# drawn alone it says what is missing and why
expect 1 "$BIN" draw "$T/bare.yaml" -o "$T/bare-alone.svg"
grep -q "each-row" "$T/err" || fail "template drawn alone: $(cat "$T/err")"
# a row drawn alone gives the same picture as in the batch
printf 'title: "Card holders in a/b"\nsubtitle: Branch report (demo data)\nicon-value: %s\nunit-label: card holders\ncategories:\n  - {label: Adults, glyph: person, count: 30}\n  - {label: Children, glyph: child, count: 5}\n' \
  "$(grep -ho 'Each icon = [0-9.]*' "$T/batch/a-b.svg" | grep -o '[0-9.]*$')" > "$T/alone.yaml"
"$BIN" draw "$T/alone.yaml" -o "$T/alone.svg" 2> /dev/null
# (same words and icons; the canvas is the batch's, laid out for its largest row)
desc() { sed -n 's/.*<desc[^>]*>\(.*\)<\/desc>.*/\1/p' "$1"; }
[ -n "$(desc "$T/alone.svg")" ] && [ "$(desc "$T/alone.svg")" = "$(desc "$T/batch/a-b.svg")" ] \
  || fail "a batch row says something else than the same chart drawn alone"
[ "$(grep -o '<use ' "$T/alone.svg" | wc -l)" = "$(grep -o '<use ' "$T/batch/a-b.svg" | wc -l)" ] \
  || fail "a batch row draws other icons than the same chart drawn alone"
# one layout for the whole batch: every PNG has the same width and height
# (IHDR, PNG spec §11.2.2: bytes 16..23 of the file)
[ "$(for f in "$T"/fmt-png/*.png; do od -An -tx1 -j16 -N8 "$f"; done | sort -u | wc -l)" = 1 ] \
  || fail "the PNGs of one batch differ in size"
# no {group} in a .pdf name: one PDF, a page per row in row order, each page
# the size of that row's own PDF and bookmarked with the row's name (read back
# with poppler-utils: pdfinfo(1), pdftotext(1); outline entries are /Title
# strings, ISO 32000-1 §12.3.3)
(cd "$T" && expect 0 "$BIN" draw tmpl.yaml --each-row rows.csv -o all.pdf)
grep -q "drew 6 pages to all.pdf in" "$T/err" || fail "one-PDF summary: $(cat "$T/err")"
[ "$(pdfinfo "$T/all.pdf" | awk '/^Pages:/ {print $2}')" = 6 ] \
  || fail "one PDF: $(pdfinfo "$T/all.pdf" | grep Pages)"
page_text() { pdftotext -f "$2" -l "$2" "$1" - 2> /dev/null | head -1; }
[ "$(page_text "$T/all.pdf" 1)" = "Card holders in ../etc" ] \
  && [ "$(page_text "$T/all.pdf" 4)" = "Card holders in Ünïcode" ] \
  && [ "$(page_text "$T/all.pdf" 6)" = "Card holders in .hidden" ] \
  || fail "one PDF: pages out of row order ($(page_text "$T/all.pdf" 1); $(page_text "$T/all.pdf" 4))"
[ "$(pdfinfo -f 1 -l 6 "$T/all.pdf" | grep -c "size: *$(pdfinfo "$T/fmt-pdf/etc.pdf" \
     | sed -n 's/^Page size: *//p')")" = 6 ] || fail "one PDF: a page of another size"
[ "$(grep -a -o '/Title ([^)]*)' "$T/all.pdf" | sed -n 2p)" = "/Title (a/b)" ] \
  || fail "one PDF: bookmarks $(grep -a -o '/Title ([^)]*)' "$T/all.pdf" | tr '\n' ' ')"
expect 2 "$BIN" draw "$T/tmpl.yaml" --each-row "$T/rows.csv" -o "$T/all.html"
grep -q "one PDF" "$T/err" || fail "no {group} and not a PDF: $(cat "$T/err")"
expect 4 "$BIN" draw "$T/tmpl.yaml" --each-row "$T/rows.csv" -o "$T/no-such/all.pdf"
# a template that never names its row is said to (the PDF's bookmarks still do)
printf 'ward,adults,children\nOne,1,2\nTwo,3,4\n' > "$T/two.csv"
sed 's/^title: .*/title: Card holders (demo data)/' "$T/tmpl.yaml" > "$T/unnamed.yaml"
expect 0 "$BIN" draw "$T/unnamed.yaml" --each-row "$T/two.csv" -o "$T/unnamed.pdf"
grep -q "unnamed.yaml:1:8: warning: .*{group}.*2 charts will not say which row" "$T/err" \
  || fail "unnamed rows: $(cat "$T/err")"
(cd "$T" && expect 0 "$BIN" draw tmpl.yaml --each-row two.csv -o named.pdf)
grep -q "will not say" "$T/err" && fail "named rows warned: $(cat "$T/err")"
# threads: the same files and the same messages, in row order, whatever
# --jobs is; two rows whose output place is taken by a folder fail, the
# others are drawn
for j in 1 4; do
  mkdir -p "$T/jobs$j/etc.png" "$T/jobs$j/lead.png"
  (cd "$T" && "$BIN" draw tmpl.yaml --each-row rows.csv -o "jobs$j/{group}.png" --jobs $j \
     2> "jobs$j.err"; echo $? > "jobs$j.rc")
  sed -i "s/ in [0-9.]* s\$//; s/jobs$j/jobsN/g" "$T/jobs$j.err"
done
[ "$(cat "$T/jobs1.rc")" = 4 ] && [ "$(cat "$T/jobs4.rc")" = 4 ] \
  || fail "--jobs: exit $(cat "$T/jobs1.rc") and $(cat "$T/jobs4.rc"), expected 4"
diff -r "$T/jobs1" "$T/jobs4" > /dev/null || fail "--jobs 1 and --jobs 4 drew other files"
cmp -s "$T/jobs1.err" "$T/jobs4.err" || fail "--jobs 1 and 4 said other things: $(diff "$T/jobs1.err" "$T/jobs4.err")"
[ "$(grep -o 'jobsN/[a-z]*\.png' "$T/jobs4.err" | tr '\n' ' ')" = "jobsN/etc.png jobsN/lead.png " ] \
  || fail "--jobs 4: messages not in row order: $(cat "$T/jobs4.err")"
grep -q "drew 4 charts to jobsN/" "$T/jobs4.err" || fail "--jobs 4 summary: $(cat "$T/jobs4.err")"
expect 2 "$BIN" draw "$T/tmpl.yaml" -o "$T/j.svg" --jobs 2
expect 2 "$BIN" draw "$T/tmpl.yaml" --each-row "$T/rows.csv" -o "$T/j/{group}.svg" --jobs 0
# collisions and duplicates: an error naming the row, and nothing written
printf 'ward,adults,children\na/b,30,5\na-b,1,1\n' > "$T/clash.csv"
(cd "$T" && expect 1 "$BIN" draw tmpl.yaml --each-row clash.csv -o 'clash/{group}.svg')
grep -q "clash.csv:3:1: error: .*'a-b'" "$T/err" || fail "collision message: $(cat "$T/err")"
[ -e "$T/clash" ] && fail "a colliding batch wrote files"
printf 'ward,adults,children\nx,30,5\nx,1,1\n' > "$T/dup.csv"
(cd "$T" && expect 1 "$BIN" draw tmpl.yaml --each-row dup.csv -o 'dup/{group}.svg')
[ -e "$T/dup" ] && fail "a duplicate batch wrote files"
expect 2 "$BIN" draw "$T/tmpl.yaml" --each-row "$T/rows.csv" -o "$T/fixed.svg"
expect 1 "$BIN" draw "$T/tmpl.yaml" --each-row "$T/none.csv" -o "$T/n/{group}.svg"
# the first column names rows when the template names no group column
printf 'name,children,adults\nOne,1,2\nTwo,3,4\n' > "$T/first.csv"
expect 0 "$BIN" draw "$T/tmpl.yaml" --each-row "$T/first.csv" -o "$T/first/{group}.svg" --quiet
[ "$(ls "$T/first" | tr '\n' ' ')" = "one.svg two.svg " ] || fail "first-column names"
# --quiet drops the progress bar and summary, never the audit's findings
grep -q "^drew " "$T/err" && fail "--quiet still printed the summary: $(cat "$T/err")"
grep -q "warning: .*\[small-count\]" "$T/err" || fail "batch rows were not audited"
# --strict: every row is audited first; any finding stops the batch, nothing written
(cd "$T" && expect 3 "$BIN" draw tmpl.yaml --each-row rows.csv -o 'strict/{group}.svg' --strict)
[ -e "$T/strict" ] && fail "a strict batch with findings wrote files"

# a placeholder's number is written as every other number is (1,000, not 1000)
printf 'title: Big (test data)\nsource: s (test data)\nunit-label: people\nicon-value: 1000\nsuppress: {below: 1000}\ncategories:\n  - {label: A, glyph: square, count: 5000}\n  - {label: B, glyph: square, count: 400}\n  - {label: C, glyph: square, count: 7000}\n' > "$T/big.yaml"
expect 0 "$BIN" draw "$T/big.yaml" -o "$T/big.svg"
grep -q "fewer than 1000" "$T/big.svg" && fail "placeholder says 1000 where the text says 1,000"
grep -q "B: fewer than 1,000\." "$T/big.svg" || fail "placeholder wording: $(grep -o 'fewer than [0-9,]*' "$T/big.svg" | head -2)"

# ---- init writes files that draw without edits
expect 0 "$BIN" init -o "$T/start.yaml"
expect 0 "$BIN" draw "$T/start.yaml" -o "$T/start.svg"
xmllint --noout "$T/start.svg" || fail "init chart: not well-formed"
expect 4 "$BIN" init -o "$T/start.yaml"
# the first comment names the file written and the output beside it, as the
# shell reads them back (bash's own quoting: the line is run by bash -n)
grep -qx "#   unitgram draw $T/start.yaml -o $T/start.svg" "$T/start.yaml" \
  || fail "init: the comment names $(sed -n 2p "$T/start.yaml")"
expect 0 "$BIN" init -o "$T/it's a chart.yaml"
line=$(sed -n '2s/^#   //p' "$T/it's a chart.yaml")
eval "set -- $line"
[ "$3" = "$T/it's a chart.yaml" ] && [ "$5" = "$T/it's a chart.svg" ] \
  || fail "init: quoting in the comment: $line"
expect 0 "$BIN" init -o "$T/line
break.yaml"
sed -n 2p "$T/line
break.yaml" | grep -qx '#   unitgram draw chart.yaml -o chart.svg' || fail "init: a name with a line break went into the comment"
expect 0 "$BIN" draw "$T/line
break.yaml" -o "$T/lb.svg"
expect 0 "$BIN" init --page -o "$T/page.yaml"
grep -q '^page:' "$T/page.yaml" || fail "init --page: no page key"
grep -qx "#   unitgram draw $T/page.yaml -o $T/page.pdf" "$T/page.yaml" || fail "init --page: comment $(sed -n 3p "$T/page.yaml")"
# page files draw only once the page stage is in; until then say so
if "$BIN" draw "$T/page.yaml" -o "$T/page.svg" 2> "$T/err"; then
  xmllint --noout "$T/page.svg" || fail "init page: not well-formed"
else
  grep -q "page file" "$T/err" || fail "init --page: $(cat "$T/err")"
  echo "note: drawing a page file is not available in this build; init --page checked for its page key only"
fi
expect 0 "$BIN" init
grep -q '^title:' "$T/out" || fail "init to stdout"

# ---- init never replaces what is at -o FILE unless --replace says so; the
# refusal comes from creating the file (O_EXCL, link), so nothing blocks on
# a FIFO and a dangling symlink counts as there
mkdir "$T/i"
printf 'my own work\n' > "$T/i/mine.yaml"
cp "$T/i/mine.yaml" "$T/i/mine.orig"
expect 4 "$BIN" init -o "$T/i/mine.yaml"
cmp -s "$T/i/mine.yaml" "$T/i/mine.orig" || fail "init changed an existing file"
grep -q "mine.yaml: error: a file is there already.*--replace" "$T/err" \
  || fail "init over a file: $(cat "$T/err")"
expect 4 "$BIN" init --page -o "$T/i/mine.yaml"
cmp -s "$T/i/mine.yaml" "$T/i/mine.orig" || fail "init --page changed an existing file"
expect 0 "$BIN" init -o "$T/i/mine.yaml" --replace
grep -q '^title:' "$T/i/mine.yaml" || fail "init --replace did not replace the file"
"$BIN" init > "$T/i/starter.ref"
# (the same starter; only the comment naming the file differs)
cmp -s <(sed 2d "$T/i/mine.yaml") <(sed 2d "$T/i/starter.ref") || fail "init --replace wrote something else"
mkfifo "$T/i/fifo"
SECONDS=0
timeout 5 "$BIN" init -o "$T/i/fifo" > /dev/null 2> "$T/err"; rc=$?
[ $rc = 4 ] || fail "init onto a FIFO exited $rc (124: it blocked)"
grep -q "a FIFO is there" "$T/err" || fail "init onto a FIFO: $(cat "$T/err")"
timeout 5 "$BIN" init --replace -o "$T/i/fifo" > /dev/null 2> "$T/err"; rc=$?
[ $rc = 4 ] || fail "init --replace onto a FIFO exited $rc (124: it blocked)"
[ -p "$T/i/fifo" ] || fail "init replaced the FIFO"
ln -s "$T/i/nowhere.yaml" "$T/i/dangling.yaml"
expect 4 "$BIN" init -o "$T/i/dangling.yaml"
grep -q "dangling symbolic link" "$T/err" || fail "init onto a dangling symlink: $(cat "$T/err")"
[ -e "$T/i/nowhere.yaml" ] && fail "init wrote through a dangling symlink"
ln -s mine.orig "$T/i/link.yaml"
expect 4 "$BIN" init -o "$T/i/link.yaml"
expect 4 "$BIN" init --replace -o "$T/i/link.yaml"
cmp -s "$T/i/mine.orig" <(printf 'my own work\n') || fail "init wrote through a symlink"
[ -L "$T/i/link.yaml" ] || fail "init replaced a symlink"
expect 4 "$BIN" init -o "$T/i"
expect 2 "$BIN" init --replace
expect 0 "$BIN" init -o "$T/i/new.yaml"
cmp -s <(sed 2d "$T/i/new.yaml") <(sed 2d "$T/i/starter.ref") || fail "init -o a new file"
# nothing but what the tests made: no temporary file left behind
[ "$(ls -A "$T/i" | tr '\n' ' ')" = "dangling.yaml fifo link.yaml mine.orig mine.yaml new.yaml starter.ref " ] \
  || fail "init left files behind: $(ls -A "$T/i")"

# ---- page or chart is what the YAML's top-level keys say, not a look at
# the first lines: page: in a comment or a quoted title is text, and a page
# after a byte-order mark, in flow style or with a quoted key is a page
kind_width() { grep -o '<svg [^>]*>' "$1" | head -1 | grep -o ' width="[^"]*"'; }
for f in chart_comment chart_title page_bom page_flow page_quoted; do
  k=tests/data/kind/$f.yaml
  expect 0 "$BIN" draw "$k" -o "$T/kind-$f.svg"
  case $f in chart_*) want=' width="800"' ;; *) want=' width="210mm"' ;; esac
  [ "$(kind_width "$T/kind-$f.svg")" = "$want" ] \
    || fail "$f drawn as the wrong kind: $(kind_width "$T/kind-$f.svg")"
  expect 0 "$BIN" describe "$k"
  grep -q "Library visits\|Visits per page" "$T/out" || fail "describe $f: $(cat "$T/out")"
  expect 0 "$BIN" audit "$k"
done
expect 0 "$BIN" draw tests/data/kind/page_flow.yaml -o "$T/kind.svg" --watch \
  --watch-timeout 0.2
grep -q 'height="297mm"' "$T/kind.svg" || fail "--watch on a flow page drew no page"
expect 2 "$BIN" draw tests/data/kind/page_flow.yaml -o "$T/kind-{group}.svg" \
  --each-row layouts/wards.csv
grep -q "a page file is drawn once" "$T/err" || fail "--each-row on a page: $(cat "$T/err")"
expect 0 "$BIN" draw tests/data/kind/chart_title.yaml -o "$T/kind.svg" --watch \
  --watch-timeout 0.2

# ---- --watch redraws on change, survives a broken edit, handles rename-saves
mkdir -p "$T/w"
cp layouts/pantry.yaml "$T/w/chart.yaml"
"$BIN" draw "$T/w/chart.yaml" -o "$T/w/chart.svg" --watch --watch-limit 3 \
  --watch-timeout 20 2> "$T/w/log" &
pid=$!
wait_for() { # wait_for SECONDS CONDITION...
  local end=$((SECONDS + $1)); shift
  until "$@"; do [ $SECONDS -ge $end ] && return 1; sleep 0.1; done
}
wait_for 10 grep -q "watching" "$T/w/log" || fail "watch did not start"
sed -i 's/^title: .*/title: Edited title/' "$T/w/chart.yaml"
wait_for 5 grep -q "Edited title" "$T/w/chart.svg" || fail "watch: no redraw after an edit"
echo "title: [broken" > "$T/w/chart.yaml"
wait_for 5 grep -q "not redrawn" "$T/w/log" || fail "watch: broken edit not reported"
grep -q "Edited title" "$T/w/chart.svg" || fail "watch: the last good picture was lost"
grep -qE "chart.yaml:[0-9]+:[0-9]+: error:" "$T/w/log" || fail "watch: error not shown"
sed 's/^title: .*/title: Renamed save/' layouts/pantry.yaml > "$T/w/.chart.yaml.swp"
mv "$T/w/.chart.yaml.swp" "$T/w/chart.yaml"
wait_for 5 grep -q "Renamed save" "$T/w/chart.svg" || fail "watch: save-by-rename missed"
wait_for 5 bash -c "! kill -0 $pid 2>/dev/null" || { fail "watch-limit did not stop it"; kill $pid; }
wait $pid; rc=$?
[ $rc = 0 ] || fail "watch exited $rc"
# the timeout alone stops it too
SECONDS=0
expect 0 "$BIN" draw "$T/w/chart.yaml" -o "$T/w/chart.svg" --watch --watch-timeout 1
[ $SECONDS -le 4 ] || fail "watch-timeout 1 took ${SECONDS}s"

# a page file is watched with the CSV its charts read
mkdir -p "$T/pw"
cp layouts/handout.yaml layouts/wards.csv "$T/pw/"
"$BIN" draw "$T/pw/handout.yaml" -o "$T/pw/handout.svg" --watch --watch-limit 2 \
  --watch-timeout 20 2> "$T/pw/log" &
pid=$!
wait_for 10 grep -q "watching" "$T/pw/log" || fail "page watch did not start"
cp "$T/pw/handout.svg" "$T/pw/first.svg"
sed -i '2s/,124,/,131,/' "$T/pw/wards.csv"
wait_for 5 bash -c "! cmp -s '$T/pw/handout.svg' '$T/pw/first.svg'" \
  || fail "page watch: no redraw after the CSV changed"
sed -i 's/^title: .*/title: Edited handout/' "$T/pw/handout.yaml"
wait_for 5 grep -q "Edited handout" "$T/pw/handout.svg" || fail "page watch: no redraw after an edit"
wait_for 5 bash -c "! kill -0 $pid 2>/dev/null" || { fail "page watch-limit did not stop it"; kill $pid; }
wait $pid || fail "page watch exited $?"

# a glyph file broken from the start and then fixed is drawn: the watcher
# watches the glyph files the chart names even when none could be loaded
mkdir -p "$T/wg/icons"
printf 'not an svg' > "$T/wg/icons/mark.svg"
printf 'title: Glyph fixed later (test data)\nsource: test\nunit-label: households\nicon-value: 1\ncategories: [{label: A, count: 12, glyph: icons/mark.svg}]\n' \
  > "$T/wg/chart.yaml"
"$BIN" draw "$T/wg/chart.yaml" -o "$T/wg/chart.svg" --watch --watch-limit 1 \
  --watch-timeout 20 2> "$T/wg/log" &
pid=$!
wait_for 10 grep -q "watching" "$T/wg/log" || fail "watch (glyph) did not start"
[ -e "$T/wg/chart.svg" ] && fail "watch: drew with a broken glyph"
printf '<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 100 100"><path d="M20 20h60v60h-60z"/></svg>' \
  > "$T/wg/icons/mark.svg.new"
mv "$T/wg/icons/mark.svg.new" "$T/wg/icons/mark.svg"
wait_for 5 test -s "$T/wg/chart.svg" || fail "watch: fixing a broken glyph did not redraw"
wait_for 5 bash -c "! kill -0 $pid 2>/dev/null" || { fail "watch (glyph) did not stop"; kill $pid; }
wait $pid

if [ $fails = 0 ]; then echo "suite_cli: all checks passed"; else echo "suite_cli: $fails failure(s)"; exit 1; fi
