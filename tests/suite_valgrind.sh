#!/usr/bin/env bash
# The command-line client under valgrind (memcheck): every example layout
# through draw, describe, tally and audit; PNG, PDF and web-page output; a
# batch of one chart per CSV row; the glyph sheet; the hostile glyphs that sanitizing
# rewrites, and a few bad inputs that fail part-way (CSV, icon cap, glyph).
# Any invalid read or write, use of uninitialised memory or definitely lost
# block fails the suite (exit 99 from valgrind). tests/valgrind.supp hides
# only fontconfig's process-lifetime caches (ENVIRONMENT.md).
#
# Skipped in the sanitized pass of `make check` (UG_SANITIZED=1): that binary
# carries ASan, which valgrind cannot run, and the same paths are checked
# there by LeakSanitizer. Bounded: about a minute on two cores.
# usage: bash tests/suite_valgrind.sh build/unitgram
set -u
if [ "${UG_SANITIZED:-0}" = 1 ]; then
  echo "suite_valgrind: skipped in the sanitized pass (ASan binary)"; exit 0
fi
if ! command -v valgrind >/dev/null; then
  echo "FAIL: valgrind is not installed (apt-get install valgrind)"; exit 1
fi
BIN=$(cd "$(dirname "$1")" && pwd)/$(basename "$1")
ROOT=$(cd "$(dirname "$0")/.." && pwd)
T=$(mktemp -d)
trap 'rm -rf "$T"' EXIT
fails=0 runs=0
export G_SLICE=always-malloc

# vg WANT-EXIT ARGS...: run the CLI under memcheck (two at a time, one per
# core); each run leaves its command, exit code and valgrind log in $T/N.*.
vg() {
  runs=$((runs + 1))
  local n=$runs want=$1
  shift
  printf '%s\n' "$want $*" > "$T/$n.cmd"
  ( timeout 180 valgrind -q --error-exitcode=99 --leak-check=full \
      --errors-for-leak-kinds=definite --show-leak-kinds=definite \
      --suppressions="$ROOT/tests/valgrind.supp" --log-file="$T/$n.vg" \
      "$BIN" "$@" > /dev/null 2> "$T/$n.err"
    echo $? > "$T/$n.rc" ) &
  while [ "$(jobs -rp | wc -l)" -ge "${UG_VALGRIND_JOBS:-2}" ]; do wait -n; done
}

report() {
  wait
  for ((n = 1; n <= runs; n++)); do
    read -r want cmd < "$T/$n.cmd"
    rc=$(cat "$T/$n.rc")
    if [ "$rc" = 99 ] || [ -s "$T/$n.vg" ]; then
      echo "FAIL: valgrind finding in: unitgram $cmd"; head -n 60 "$T/$n.vg"
      fails=$((fails + 1))
    elif [ "$rc" != "$want" ]; then
      echo "FAIL: unitgram $cmd: exit $rc, expected $want"; head -c 300 "$T/$n.err"
      fails=$((fails + 1))
    fi
  done
}

cd "$ROOT" || exit 1
for f in layouts/*.yaml tests/data/draw/hostile.yaml tests/data/draw/suppressed.yaml; do
  vg 0 draw "$f" -o "$T/$(basename "$f" .yaml).svg"
  vg 0 describe "$f"
  # tally reports one chart; a page file gets the loader's clear refusal
  if grep -q '^page:' "$f"; then vg 1 tally "$f" --format json
  else vg 0 tally "$f" --format json; fi
done
vg 0 tally layouts/wards.yaml --format csv
H=tests/data/hostile
for f in glyph_script glyph_onload glyph_use_external markup_script_title csv_markup_group \
         text_combining; do
  vg 0 draw "$H/$f.yaml" -o "$T/$f.svg"
done
for f in csv_ragged csv_nul csv_unclosed_quote num_icons_over_cap groups_sum_over_cap \
         glyph_xxe_passwd glyph_deep_nesting deep_flow_seq alias_billion_laughs \
         bin_random utf8_surrogate truncated_flow; do
  vg 1 draw "$H/$f.yaml" -o "$T/out.svg"
done
# the other outputs, the audit, batches and the glyph library
for ext in png pdf html; do
  vg 0 draw layouts/pantry.yaml -o "$T/pantry.$ext"
  vg 0 draw layouts/handout.yaml -o "$T/handout.$ext"
done
for f in layouts/*.yaml; do
  vg 0 audit "$f" --format json
done
vg 0 draw layouts/wards.yaml --each-row layouts/wards.csv -o "$T/rows/{group}.svg"
vg 0 glyphs --sheet "$T/sheet.svg"
vg 0 glyphs --check house --check ./tests/data/hostile/glyphs/script.svg
vg 1 draw tests/data/bad/csv_long_unknown.yaml -o "$T/out.svg"
vg 4 draw layouts/pantry.yaml -o "$T/no/such/folder/out.svg"
vg 2 draw layouts/pantry.yaml --max-icons nonsense -o "$T/out.svg"

report
echo "suite_valgrind: $runs runs under memcheck, $fails with findings"
[ "$fails" = 0 ]
