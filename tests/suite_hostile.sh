#!/usr/bin/env bash
# Hostile inputs (tests/data/hostile/, plus big files, symlinks and a FIFO made
# here at test time): `unitgram draw` either fails cleanly or draws safely.
#  - error: exit 1, one stderr line "FILE:LINE:COL: error: MESSAGE" (or
#    "FILE: error: MESSAGE" when the whole file is at fault) naming the layout
#    or the CSV/glyph file it uses, and no output file;
#  - draw: exit 0 and an SVG that libxml2 parses without the network, that
#    librsvg renders, and that holds no active content (no script, style,
#    foreignObject, image, a or iframe element; no on* attribute; no href or
#    url() leaving the document; no javascript:; no DTD, entity or
#    processing instruction); the same layout drawn to PNG and PDF exits 0,
#    or 1 with a message (a page too large to rasterize).
# Which of the two each file must give is listed in tests/data/hostile/EXPECT.
#
# Caps per input (stated in README "Guarantees and limits"): 10 s wall clock
# and 1 GiB of address space (ulimit -v). Under the sanitized pass ASan
# reserves terabytes of address space, so there the cap is 30 s and a 1 GiB
# resident-memory limit enforced by ASan itself (hard_rss_limit_mb).
# usage: bash tests/suite_hostile.sh build/unitgram
set -u
BIN=$(cd "$(dirname "$1")" && pwd)/$(basename "$1")
SRC=$(cd "$(dirname "$0")/data/hostile" && pwd)
T=$(mktemp -d)
trap 'rm -rf "$T"' EXIT
fails=0 n=0 drawn=0 refused=0
fail() { echo "FAIL: $*"; fails=$((fails + 1)); }

if [ "${UG_SANITIZED:-0}" = 1 ]; then
  SECS=30
  export ASAN_OPTIONS="${ASAN_OPTIONS:-}:hard_rss_limit_mb=1024"
  capped() { timeout -k 2 "$SECS" "$@"; }
else
  SECS=10
  capped() { (ulimit -v 1048576; exec timeout -k 2 "$SECS" "$@"); }
fi

cp -r "$SRC" "$T/hostile"
cd "$T" || exit 1
H=hostile
HEAD='title: Hostile input (test data)
source: test
unit-label: households
form: rows
icon-value: 1'

# ---- inputs too big to commit, made here --------------------------------------
gen() { # gen NAME OUTCOME: the layout on stdin
  cat > "$H/$1.yaml"; echo "$1 $2" >> "$H/EXPECT"
}
{ echo "$HEAD"; echo "categories:"
  seq 1 100000 | sed 's/.*/  - {label: C&, count: 1}/'; } | gen gen_cats_100000 error
{ echo "$HEAD"; echo "categories:"
  seq 1 5000 | sed 's/.*/  - {label: C&, count: 1}/'; } | gen gen_cats_5000 error
{ echo "$HEAD"; seq 1 5000 | sed 's/.*/key&: 1/'
  echo "categories: [{label: A, count: 1}]"; } | gen gen_keys_5000 error
{ echo "$HEAD"; printf 'categories: ['; seq 1 200000 | sed 's/.*/{label: C&, count: 1}/' \
  | paste -sd, | tr -d '\n'; echo ']'; } | gen gen_flow_200000 error
{ echo "$HEAD" | sed 1d; printf 'title: "'; head -c 1048576 /dev/zero | tr '\0' x
  printf '"\ncategories: [{label: A, count: 1}]\n'; } | gen gen_title_1mib error
{ echo "$HEAD"; echo "categories: [{label: A, count: 1}]"
  head -c 5000000 /dev/zero | tr '\0' '#'; echo; } | gen gen_file_5mb error
{ echo "$HEAD"; echo "categories: [{label: A, count: 1}]"; printf '#'
  head -c 3000000 /dev/zero | tr '\0' a; echo; } | gen gen_comment_3mb draw
{ echo "$HEAD"; printf 'categories:\n'; for i in $(seq 1 31); do printf '%*s- \n' $((2 * i)) ''; done
  printf '%*s- {label: A, count: 1}\n' 64 ''; } | gen gen_nest_just_over error
{ printf 'g,a,b\n'; head -c 100000 /dev/zero | tr '\0' x; printf ',1,2\n'; } > "$H/gen_long_field.csv"
printf '%s\ndata: {file: gen_long_field.csv, group-column: g}\ncategories:\n  - {label: A, column: a}\n  - {label: B, column: b}\n' \
  "$HEAD" | gen gen_csv_long_field error
{ printf 'g,a,b\n'; seq 1 100000 | sed 's/.*/G&,1,2/'; } > "$H/gen_csv_rows.csv"
printf '%s\ndata: {file: gen_csv_rows.csv, group-column: g}\ncategories:\n  - {label: A, column: a}\n  - {label: B, column: b}\n' \
  "$HEAD" | gen gen_csv_100000_rows error

# Many distinct glyph files: each is drawn once per document, so their
# markup together is bounded (4 MiB a chart, 4 MiB a page's panels).
mkdir -p "$H/many"
for i in $(seq 1 60); do # a zigzag of 2,000 long-decimal points, ~110 KB
  awk -v seed="$i" 'BEGIN { srand(seed); printf "<svg xmlns=\"http://www.w3.org/2000/svg\" viewBox=\"0 0 100 100\"><path d=\"M10 95"
       for (k = 0; k < 2000; k++) printf " L%.25f %.25f", 10 + 80 * k / 2000, k % 2 ? 10 + rand() * 20 : 60 + rand() * 30
       print " L90 95 Z\"/></svg>" }' > "$H/many/g$i.svg"
done
{ echo "$HEAD"; echo "categories:"
  seq 1 60 | sed 's|.*|  - {label: C&, count: 1, glyph: many/g&.svg}|'; } | gen gen_glyph_bytes_chart error
{ echo "$HEAD"; echo "categories:"
  seq 1 3 | sed 's|.*|  - {label: C&, count: 1, glyph: many/g&.svg}|'; } > "$H/gen_three_glyphs.yaml"
{ echo "page: {size: \"400mm x 2000mm\", columns: 2}"; echo "title: Glyph bytes (test data)"
  echo "panels:"; for i in $(seq 1 14); do echo "  - chart: gen_three_glyphs.yaml"; done; } \
  | gen gen_glyph_bytes_page error

# ---- paths: symlinks, .. and special files ---------------------------------------
mkdir -p outside
printf 'g,a,b\nNorth,3,4\n' > outside/counts.csv
cp "$H/glyphs/onload.svg" outside/icon.svg
link_chart() { # link_chart NAME OUTCOME DATA-OR-GLYPH-LINE
  printf '%s\n%s\n' "$HEAD" "$3" | gen "$1" "$2"
}
ln -s ../outside/counts.csv "$H/link_csv_outside.csv"
link_chart gen_link_csv_outside draw 'data: {file: link_csv_outside.csv, group-column: g}
categories: [{label: A, column: a}, {label: B, column: b}]'
link_chart gen_dotdot_csv draw 'data: {file: ../outside/counts.csv, group-column: g}
categories: [{label: A, column: a}, {label: B, column: b}]'
ln -s /dev/zero "$H/link_dev_zero.csv"
link_chart gen_link_csv_dev_zero error 'data: {file: link_dev_zero.csv, group-column: g}
categories: [{label: A, column: a}]'
ln -s loop_b.csv "$H/loop_a.csv"; ln -s loop_a.csv "$H/loop_b.csv"
link_chart gen_link_csv_loop error 'data: {file: loop_a.csv, group-column: g}
categories: [{label: A, column: a}]'
ln -s nowhere.csv "$H/dangling.csv"
link_chart gen_link_csv_dangling error 'data: {file: dangling.csv, group-column: g}
categories: [{label: A, column: a}]'
mkfifo "$H/fifo.csv"
link_chart gen_fifo_csv error 'data: {file: fifo.csv, group-column: g}
categories: [{label: A, column: a}]'
ln -s ../../outside/icon.svg "$H/glyphs/link-outside.svg"
link_chart gen_link_glyph_outside error 'categories: [{label: A, count: 2, glyph: glyphs/link-outside.svg}]'
ln -s onload.svg "$H/glyphs/link-inside.svg"
link_chart gen_link_glyph_inside draw 'categories: [{label: A, count: 2, glyph: glyphs/link-inside.svg}]'
mkfifo "$H/glyphs/fifo.svg"
link_chart gen_fifo_glyph error 'categories: [{label: A, count: 2, glyph: glyphs/fifo.svg}]'
ln -s /dev/zero "$H/gen_link_layout_dev_zero.yaml"; echo "gen_link_layout_dev_zero error" >> "$H/EXPECT"
ln -s gen_link_layout_loop.yaml "$H/gen_link_layout_loop.yaml"; echo "gen_link_layout_loop error" >> "$H/EXPECT"
mkfifo "$H/gen_fifo_layout.yaml"; echo "gen_fifo_layout error" >> "$H/EXPECT"
mkdir "$H/gen_directory.yaml"; echo "gen_directory error" >> "$H/EXPECT"

# ---- the checks -----------------------------------------------------------------
# One XPath sum over everything that could make the SVG act or fetch.
ACTIVE='count(//*[local-name()="script" or local-name()="foreignObject" or local-name()="style"
  or local-name()="image" or local-name()="a" or local-name()="iframe"])
 + count(//@*[starts-with(translate(local-name(), "ON", "on"), "on")])
 + count(//@*[local-name()="href" and not(starts-with(normalize-space(.), "#"))])
 + count(//@*[contains(., "url(") and not(starts-with(substring-after(., "url("), "#"))])
 + count(//@*[contains(translate(., "JAVSCRIPT ", "javscript"), "javascript:")])
 + count(//processing-instruction())'

check_drawn() { # check_drawn NAME SVG
  xmllint --nonet --noout "$2" 2>/dev/null || { fail "$1: the SVG does not parse"; return; }
  grep -q '<!DOCTYPE\|<!ENTITY' "$2" && fail "$1: the SVG has a DTD or entity"
  local bad
  bad=$(xmllint --nonet --xpath "$ACTIVE" "$2" 2>/dev/null)
  [ "$bad" = 0 ] || fail "$1: active content in the SVG ($bad finds)"
  bad=$(forbidden_chars "$2")
  [ -z "$bad" ] || fail "$1: the SVG holds $bad"
  # XML 1.0 §3.3.1, validity constraint "ID": no two elements share an id,
  # or a fragment reference (href="#...", aria-labelledby) picks one of them.
  local dup
  dup=$(grep -o ' id="[^"]*"' "$2" | sort | uniq -d | head -3 | tr '\n' ' ')
  [ -z "$dup" ] || fail "$1: ids used twice: $dup"
  # cairo rasterizes at most 32767 px a side: a tall chart is rendered shrunk.
  local h zoom=1
  h=$(xmllint --nonet --xpath 'string(/*/@height)' "$2" 2>/dev/null)
  [ "${h%.*}" -gt 30000 ] 2>/dev/null && zoom=0.1
  rsvg-convert -z "$zoom" "$2" -o "$T/render.png" 2>/dev/null \
    || fail "$1: librsvg cannot render it"
}

# forbidden_chars FILE: the code points in FILE that XML 1.0 forbids or
# discourages (§2.2, production [2] Char and its note: C0 controls but tab,
# LF and CR; DEL and C1) or that are Unicode noncharacters (Unicode §23.7;
# each is a parse error in the HTML Living Standard §13.2.3.5).
forbidden_chars() {
  python3 - "$1" <<'PY'
import sys
text = open(sys.argv[1], "rb").read().decode("utf-8")
bad = {c for c in text if (ord(c) < 0x20 and c not in "\t\n\r") or 0x7F <= ord(c) <= 0x9F
       or 0xFDD0 <= ord(c) <= 0xFDEF or (ord(c) & 0xFFFE) == 0xFFFE}
print(" ".join("U+%04X" % ord(c) for c in sorted(bad)))
PY
}

# The web page holds the same texts outside the SVG (title, description, the
# data table): it must parse as XML too and hold no forbidden character.
check_page() { # check_page NAME
  capped "$BIN" draw "$H/$1.yaml" -o out.html 2> /dev/null || return 0
  xmllint --nonet --noout out.html 2> /dev/null || { fail "$1: the web page does not parse"; return; }
  local bad
  bad=$(forbidden_chars out.html)
  [ -z "$bad" ] || fail "$1: the web page holds $bad"
}

check_refused() { # check_refused NAME STDERR
  local lines
  lines=$(wc -l < "$2")
  [ "$lines" = 1 ] || { fail "$1: $lines stderr lines, expected one"; head -3 "$2"; return; }
  grep -qE '^[^ ]+(:[0-9]+:[0-9]+)?: error: .+' "$2" \
    || fail "$1: not a FILE:LINE:COL error: $(cat "$2")"
  # The message names the layout, or a file it refers to (CSV, glyph, link).
  grep -qE "^($H/|/)" "$2" || fail "$1: the error names no input file: $(cat "$2")"
}

[ -f "$H/EXPECT" ] || { echo "FAIL: no $SRC/EXPECT"; exit 1; }
while read -r name want; do
  case "$name" in ''|'#'*) continue ;; esac
  n=$((n + 1))
  f=$H/$name.yaml
  [ -e "$f" ] || [ -L "$f" ] || { fail "$name: listed in EXPECT but missing"; continue; }
  rm -f out.svg
  capped "$BIN" draw "$f" -o out.svg 2> err.txt
  rc=$?
  case "$rc" in
    0) drawn=$((drawn + 1))
       [ "$want" = draw ] || fail "$name: drew, but EXPECT says $want"
       check_drawn "$name" out.svg
       # The rasterizer takes the same scene: PNG and PDF end as cleanly.
       for ext in png pdf; do
         capped "$BIN" draw "$f" -o "out.$ext" 2> err2.txt
         rc=$?
         [ "$rc" = 0 ] || [ "$rc" = 1 ] \
           || fail "$name: draw to .$ext exit $rc: $(head -c 300 err2.txt)"
         [ "$rc" = 1 ] && [ ! -s err2.txt ] && fail "$name: .$ext refused without a message"
       done
       check_page "$name" ;;
    1) refused=$((refused + 1))
       [ "$want" = error ] || fail "$name: refused, but EXPECT says $want: $(head -c 300 err.txt)"
       [ -e out.svg ] && fail "$name: refused but wrote out.svg"
       check_refused "$name" err.txt ;;
    124|137) fail "$name: over the $SECS s cap" ;;
    *) fail "$name: exit $rc: $(head -c 600 err.txt)" ;;
  esac
done < "$H/EXPECT"

# ---- glyph folders (--glyph-dir): the index is read like a layout -------------------
# A FIFO, deep nesting and an alias bomb as index.yaml: a clean error naming
# the index, within the caps, never a wait.
glyph_dir_case() { # glyph_dir_case NAME: the folder $T/gd/NAME holds the index
  local d=$T/gd/$1
  n=$((n + 1))
  cp "$SRC/../../../glyphs/person.svg" "$d/" 2>/dev/null
  capped "$BIN" glyphs --glyph-dir "$d" > /dev/null 2> err.txt
  local rc=$?
  case "$rc" in
    1) refused=$((refused + 1))
       grep -q "^$d/index.yaml" err.txt || fail "glyph index $1: $(head -c 300 err.txt)" ;;
    124|137) fail "glyph index $1: over the $SECS s cap" ;;
    *) fail "glyph index $1: exit $rc: $(head -c 300 err.txt)" ;;
  esac
}
mkdir -p "$T/gd/fifo" "$T/gd/nested" "$T/gd/aliases" "$T/gd/big"
mkfifo "$T/gd/fifo/index.yaml"
glyph_dir_case fifo
{ head -c 500000 /dev/zero | tr '\0' '['; } > "$T/gd/nested/index.yaml"
glyph_dir_case nested
{ echo '- &a {name: person, keywords: [x, x, x, x, x, x, x, x, x, x]}'
  for i in $(seq 1 9); do echo "- &b$i [*a, *a, *a, *a, *a, *a, *a, *a, *a]"; done
  seq 1 261000 | sed 's/.*/- *a/'; } > "$T/gd/aliases/index.yaml"
glyph_dir_case aliases
head -c 2000000 /dev/zero | tr '\0' '#' > "$T/gd/big/index.yaml"
glyph_dir_case big

# ---- foreign files named by a layout ----------------------------------------------
# A page panel or a chart's data file naming a file that is no layout or CSV
# (a shadow-style password line, a credentials file): refused by its name,
# and nothing of its content reaches the message.
mkdir -p foreign
printf 'root:$6$s3cr3tSalt$HashOfThePassword:19000:0:99999:7:::\n' > foreign/shadow
printf 'password: hunter2-s3cr3t\napi_key: s3cr3t-key\n' > foreign/creds.yaml
printf 'user,password\nalice,hunter2-s3cr3t\n' > foreign/creds.csv
foreign_case() { # foreign_case NAME LAYOUT-TEXT
  printf '%s\n' "$2" > "foreign/$1.yaml"
  n=$((n + 1))
  capped "$BIN" draw "foreign/$1.yaml" -o foreign/out.svg 2> err.txt
  local rc=$?
  [ "$rc" = 1 ] || fail "foreign $1: exit $rc: $(head -c 300 err.txt)"
  grep -q 's3cr3t\|hunter2\|HashOf' err.txt && fail "foreign $1: the message quotes the file: $(cat err.txt)"
  [ -s err.txt ] || fail "foreign $1: refused without a message"
  refused=$((refused + 1))
}
for f in shadow creds.yaml; do
  foreign_case "panel_$f" "page: {size: a4}
title: Foreign panel (test data)
panels:
  - chart: $f"
done
for f in shadow creds.yaml creds.csv; do
  foreign_case "data_$f" "$HEAD
data: {file: $f, group-column: user}
categories: [{label: A, column: password}]"
done

# Every committed layout is listed, so a new one cannot go unchecked.
for f in "$SRC"/*.yaml; do
  grep -q "^$(basename "$f" .yaml) " "$SRC/EXPECT" || fail "$(basename "$f") is not in EXPECT"
done
files=$(find "$SRC" -type f | wc -l)
[ "$files" -ge 80 ] || fail "only $files files under tests/data/hostile (80 expected)"

echo "suite_hostile: $n inputs ($drawn drawn safely, $refused refused cleanly), $fails failures"
[ "$fails" = 0 ]
