#!/usr/bin/env bash
# Output safety: a failed run never loses the previous output. For every kind
# of failure (bad layout, bad CSV, a chart over the icon cap, an input over the
# size cap, a write that fails part-way, an unwritable folder, a folder in the
# way) the old file keeps its exact bytes and no temporary file is left beside
# it. A successful run replaces the file by rename (a hard link to the old
# file keeps the old bytes), leaves a device node a device, and replaces a
# symlink at the output path rather than writing through it. Batches
# (--each-row) never write outside their output folder, not even through a
# symlinked folder; a signal (Ctrl-C, TERM, HUP, or a crash: SEGV, BUS, ABRT,
# FPE, ILL, TRAP, SYS) leaves no temporary file; a FIFO nothing reads
# is refused at once; a 250-character output name works.
# usage: bash tests/suite_output_safety.sh build/unitgram
set -u
BIN=$(cd "$(dirname "$1")" && pwd)/$(basename "$1")
ROOT=$(cd "$(dirname "$0")/.." && pwd)
T=$(mktemp -d)
trap 'chmod -R u+w "$T" 2>/dev/null; rm -rf "$T"' EXIT
chmod 755 "$T"
fails=0 checks=0
fail() { echo "FAIL: $*"; fails=$((fails + 1)); }
command -v strace > /dev/null || {
  echo "suite_output_safety: FAIL: strace is missing (make test-deps installs it)"; exit 1; }

GOOD=$ROOT/layouts/pantry.yaml
H=$ROOT/tests/data/hostile
mkdir -p "$T/out"
OLD='<svg xmlns="http://www.w3.org/2000/svg"><!-- the previous picture --></svg>'

# Only out.svg may be in the folder: no temporary file left behind.
only_old() { # only_old WHAT
  checks=$((checks + 1))
  [ "$(cat "$T/out/out.svg")" = "$OLD" ] || fail "$1: the old output changed"
  [ "$(ls -A "$T/out")" = out.svg ] || fail "$1: left behind: $(ls -A "$T/out" | tr '\n' ' ')"
}

# expect_fail WHAT EXIT-CODE ARGS...: the run fails with that code, old file intact.
expect_fail() {
  local what=$1 want=$2
  shift 2
  printf '%s' "$OLD" > "$T/out/out.svg"
  "$BIN" "$@" 2> "$T/err.txt" > /dev/null
  local rc=$?
  [ "$rc" = "$want" ] || fail "$what: exit $rc, expected $want ($(head -c 200 "$T/err.txt"))"
  [ -s "$T/err.txt" ] || fail "$what: failed without a message"
  only_old "$what"
}

O=$T/out/out.svg
expect_fail "bad layout" 1 draw "$ROOT/tests/data/bad/count_negative.yaml" -o "$O"
expect_fail "bad CSV" 1 draw "$H/csv_ragged.yaml" -o "$O"
expect_fail "CSV with a NUL byte" 1 draw "$H/csv_nul.yaml" -o "$O"
expect_fail "missing layout" 1 draw "$T/none.yaml" -o "$O"
expect_fail "binary layout" 1 draw "$H/bin_random.yaml" -o "$O"
expect_fail "over the icon cap" 1 draw "$H/num_icons_over_cap.yaml" -o "$O"
expect_fail "over --max-icons" 1 draw "$GOOD" --max-icons 10 -o "$O"
expect_fail "over --max-input-bytes" 1 draw "$GOOD" --max-input-bytes 64 -o "$O"
expect_fail "bad --max-icons" 2 draw "$GOOD" --max-icons 0 -o "$O"
expect_fail "--max-icons above its ceiling" 2 draw "$GOOD" --max-icons 10000001 -o "$O"
expect_fail "page over --max-panels" 1 draw "$ROOT/layouts/handout.yaml" --max-panels 2 -o "$O"
# Fonts that cannot be had: with no fontconfig configuration (fonts-conf(5):
# FONTCONFIG_FILE names the file read) pango finds no font and would measure
# every string as empty; a family that is not installed would be measured and
# drawn as another. Either would be a different chart with exit 0.
printf '<?xml version="1.0"?>\n<fontconfig></fontconfig>\n' > "$T/no-fonts.conf"
for f in svg png; do
  printf '%s' "$OLD" > "$T/out/out.svg"
  FONTCONFIG_FILE=$T/no-fonts.conf "$BIN" draw "$GOOD" -o "$T/out/x.$f" 2> "$T/err.txt"
  rc=$?
  checks=$((checks + 1))
  [ "$rc" = 1 ] && grep -q "no font can be loaded" "$T/err.txt" \
    || fail "no fonts ($f): exit $rc, $(head -c 200 "$T/err.txt")"
  [ ! -e "$T/out/x.$f" ] || { fail "no fonts ($f): an output was written"; rm -f "$T/out/x.$f"; }
  only_old "no fonts ($f)"
done
sed 's/^title:/style: {font: Unitgram Absent Family}\ntitle:/' "$GOOD" > "$T/absent-font.yaml"
grep -q '^style:' "$GOOD" && fail "pantry.yaml has a style: the absent-font case needs another edit"
expect_fail "font not installed" 1 draw "$T/absent-font.yaml" -o "$O"
grep -q "absent-font.yaml:[0-9]*:[0-9]*: .*'Unitgram Absent Family' is not installed" "$T/err.txt" \
  || fail "font not installed: message $(head -c 300 "$T/err.txt")"
expect_fail "--max-panels above its ceiling" 2 draw "$ROOT/layouts/handout.yaml" \
  --max-panels 1001 -o "$O"
expect_fail "hostile glyph file" 1 draw "$H/glyph_xxe_passwd.yaml" -o "$O"

# A write that fails part-way: a 1 KiB file-size limit (SIGXFSZ ignored, so
# write(2) returns EFBIG) against a chart of several KiB.
printf '%s' "$OLD" > "$O"
(trap '' XFSZ; ulimit -f 1; exec "$BIN" draw "$GOOD" -o "$O") 2> "$T/err.txt"
rc=$?
[ "$rc" = 4 ] || fail "short write: exit $rc, expected 4"
only_old "short write"

# The same limit without SIGXFSZ ignored by the caller: unitgram ignores it
# itself, so the write fails with EFBIG (exit 4) instead of the signal
# killing the process with its temporary file half written.
printf '%s' "$OLD" > "$O"
(ulimit -f 1; exec "$BIN" draw "$GOOD" -o "$O") 2> "$T/err.txt"
rc=$?
[ "$rc" = 4 ] || fail "short write without SIGXFSZ ignored: exit $rc, expected 4"
grep -q "too large" "$T/err.txt" || fail "short write without SIGXFSZ ignored: $(cat "$T/err.txt")"
only_old "short write without SIGXFSZ ignored"

# A crash while the temporary file is open (out of memory inside fontconfig
# or GLib ends so): strace delivers the signal at the output's fsync(2),
# after its bytes are written and before the rename. The handler removes
# the temporary and the run still dies of that signal (128 + its number).
# In the sanitized pass AddressSanitizer would catch SEGV, BUS and FPE
# itself and exit 1 (its flags handle_segv, handle_sigbus, handle_sigfpe,
# on by default): they are turned off here so the default action is seen.
for sig in SEGV BUS ABRT FPE ILL TRAP SYS; do
  printf '%s' "$OLD" > "$O"
  (ASAN_OPTIONS="${ASAN_OPTIONS:-}:handle_segv=0:handle_sigbus=0:handle_sigfpe=0" \
     strace -qq -o /dev/null -e trace=fsync -e inject=fsync:signal=$sig \
     "$BIN" draw "$GOOD" -o "$O" 2> /dev/null; echo $? > "$T/rc") 2> /dev/null
  rc=$(cat "$T/rc")
  [ "$rc" = $((128 + $(kill -l "$sig"))) ] || fail "SIG$sig at the write: exit $rc"
  only_old "SIG$sig at the write"
done

# An unwritable folder. root ignores permissions, so there the run drops to
# nobody (setpriv); without either, say so.
printf '%s' "$OLD" > "$O"
chmod 555 "$T/out"
if [ "$(id -u)" != 0 ]; then
  "$BIN" draw "$GOOD" -o "$O" 2> "$T/err.txt"; rc=$?
elif command -v setpriv >/dev/null; then
  chmod 644 "$O"
  setpriv --reuid=65534 --regid=65534 --clear-groups "$BIN" draw "$GOOD" -o "$O" \
    2> "$T/err.txt"; rc=$?
else
  echo "skip: unwritable folder (root without setpriv)"; rc=4
fi
chmod 755 "$T/out"
[ "$rc" = 4 ] || fail "unwritable folder: exit $rc, expected 4"
only_old "unwritable folder"

# A folder where the output should go: refused, the folder untouched.
mkdir "$T/out/dir.svg"
"$BIN" draw "$GOOD" -o "$T/out/dir.svg" 2>/dev/null; rc=$?
checks=$((checks + 1))
[ "$rc" = 4 ] && [ -d "$T/out/dir.svg" ] && [ -z "$(ls -A "$T/out/dir.svg")" ] \
  || fail "folder as output: exit $rc"
rmdir "$T/out/dir.svg"
only_old "folder as output"

# Success replaces by rename: a hard link to the old file keeps the old bytes,
# the new file is complete, readable by others (umask 022) and nothing is left.
printf '%s' "$OLD" > "$O"
ln "$O" "$T/hardlink.svg"
(umask 022; "$BIN" draw "$GOOD" -o "$O") || fail "good draw failed"
checks=$((checks + 1))
[ "$(cat "$T/hardlink.svg")" = "$OLD" ] || fail "the old file was rewritten in place"
xmllint --noout "$O" || fail "the new output does not parse"
[ "$(stat -c %a "$O")" = 644 ] || fail "new output mode $(stat -c %a "$O"), expected 644"
[ "$(ls -A "$T/out")" = out.svg ] || fail "success left behind: $(ls -A "$T/out")"

# A symlink at the output path is replaced; the file it pointed to is untouched.
printf '%s' "$OLD" > "$T/target.svg"
ln -sf ../target.svg "$O"
"$BIN" draw "$GOOD" -o "$O" || fail "draw over a symlink failed"
checks=$((checks + 1))
[ "$(cat "$T/target.svg")" = "$OLD" ] || fail "wrote through the symlink"
[ -f "$O" ] && [ ! -L "$O" ] || fail "the symlink was not replaced"

# A device node stays a device (root only: mknod).
if [ "$(id -u)" = 0 ]; then
  mknod "$T/null.svg" c 1 3
  "$BIN" draw "$GOOD" -o "$T/null.svg" || fail "draw to a null device failed"
  checks=$((checks + 1))
  [ -c "$T/null.svg" ] || fail "the device node was replaced by a file"
fi

# Batches (--each-row): whatever a row's name says, every file lands inside
# the output folder; a symlink planted there is replaced, not followed; and a
# batch that fails keeps the folder's earlier files byte for byte.
B=$T/batch
mkdir -p "$B/work"
cat > "$B/work/tmpl.yaml" <<'YAML'
title: "Card holders in {group}"
source: Branch report (demo data)
unit-label: card holders
icon-value: 1
categories:
  - {label: Adults, glyph: square, column: adults, count: 1}
  - {label: Children, glyph: circle, column: children, count: 1}
YAML
{ printf 'name,adults,children\n'
  for n in .. ../../escape /etc/passwd-x ./. a/../../b '..\\..\\win' '%2e%2e%2fenc' \
           '．．／wide' '~root' '$HOME' '`id`' '-rf' '<script>' 'nul.svg' \
           "$(head -c 300 /dev/zero | tr '\0' 'n')"; do
    printf '"%s",3,2\n' "$n"
  done; } > "$B/work/rows.csv"
mkdir -p "$B/work/out"
ln -s ../../victim.svg "$B/work/out/north.svg"
printf '%s' "$OLD" > "$B/victim.svg"
printf 'name,adults,children\nNorth,1,1\n' > "$B/work/north.csv"
before=$(cd "$B" && find . -path ./work/out -prune -o -print | sort)
(cd "$B/work" && "$BIN" draw tmpl.yaml --each-row rows.csv -o 'out/{group}.svg' --quiet \
   && "$BIN" draw tmpl.yaml --each-row north.csv -o 'out/{group}.svg' --quiet) \
  2> "$T/err.txt" || fail "batch: exit $? ($(head -c 300 "$T/err.txt"))"
after=$(cd "$B" && find . -path ./work/out -prune -o -print | sort)
checks=$((checks + 1))
[ "$before" = "$after" ] || fail "batch wrote outside its folder: $(diff <(echo "$before") \
  <(echo "$after") | grep '^>' | tr '\n' ' ')"
[ "$(cat "$B/victim.svg")" = "$OLD" ] || fail "batch wrote through a planted symlink"
[ -f "$B/work/out/north.svg" ] && [ ! -L "$B/work/out/north.svg" ] \
  || fail "batch did not replace the planted symlink"
[ "$(find "$B/work/out" -mindepth 1 -type d | wc -l)" = 0 ] \
  || fail "batch made folders inside its output folder"
ls -A "$B/work/out" | grep -q 'tmp' && fail "batch left temporary files"
# A failing batch (one row over the icon cap) leaves the earlier files alone.
sum_before=$(cd "$B/work/out" && cat -- * | cksum)
printf 'name,adults,children\nNorth,200000,1\n' > "$B/work/north.csv"
(cd "$B/work" && "$BIN" draw tmpl.yaml --each-row north.csv -o 'out/{group}.svg' --quiet) \
  2> "$T/err.txt"
rc=$?
checks=$((checks + 1))
[ "$rc" = 1 ] || fail "over-the-cap batch: exit $rc, expected 1"
[ "$(cd "$B/work/out" && cat -- * | cksum)" = "$sum_before" ] \
  || fail "a failed batch changed earlier files"
ls -A "$B/work/out" | grep -q 'tmp' && fail "a failed batch left temporary files"
# The limits bound every chart of a batch, as they bound a single chart: a
# row over --max-icons stops the batch before anything is written, and the
# error says which row; a CSV over --max-input-bytes is refused at its name.
printf 'name,adults,children\nNorth,20,10\nSouth,200,100\n' > "$B/work/two.csv"
{ printf 'name,adults,children\n'; seq 1 200 | sed 's/.*/Row&,1,1/'; } > "$B/work/long.csv"
for run in "two.csv --max-icons 50" "long.csv --max-input-bytes 1000"; do
  set -- $run
  (cd "$B/work" && "$BIN" draw tmpl.yaml --each-row "$1" -o 'out/{group}.svg' --quiet \
     "$2" "$3") 2> "$T/err.txt"
  rc=$?
  checks=$((checks + 1))
  [ "$rc" = 1 ] || fail "batch $run: exit $rc, expected 1 ($(head -c 300 "$T/err.txt"))"
  [ "$(cd "$B/work/out" && cat -- * | cksum)" = "$sum_before" ] \
    || fail "batch $run changed earlier files"
  case $2 in
    --max-icons)
      grep -q "more than 50 icons" "$T/err.txt" || fail "batch $run: $(cat "$T/err.txt")"
      grep -q "note: in the chart of row 2, 'South'" "$T/err.txt" \
        || fail "batch $run names no row: $(cat "$T/err.txt")" ;;
    *)
      grep -q "^long.csv: error: .*larger than the limit of 1000 bytes" "$T/err.txt" \
        || fail "batch $run: $(cat "$T/err.txt")" ;;
  esac
done
(cd "$B/work" && "$BIN" draw tmpl.yaml --each-row two.csv -o 'out/{group}.svg' --quiet \
   --max-icons 300) 2> "$T/err.txt" || fail "batch within --max-icons 300: $(cat "$T/err.txt")"
checks=$((checks + 1))
[ "$(grep -c '<use href' "$B/work/out/south.svg")" -gt 50 ] \
  || fail "batch within the limit did not draw its rows"

# A folder named by {group} that is a symlink to a folder outside: that row is
# refused with a message, nothing lands outside, the other rows are drawn.
mkdir -p "$B/elsewhere" "$B/work/deep"
ln -s ../../elsewhere "$B/work/deep/north"
printf 'name,adults,children\nNorth,1,1\nSouth,2,1\n' > "$B/work/two.csv"
(cd "$B/work" && "$BIN" draw tmpl.yaml --each-row two.csv -o 'deep/{group}/chart.svg' \
   --quiet) 2> "$T/err.txt"
rc=$?
checks=$((checks + 1))
[ "$rc" = 4 ] || fail "batch through a symlinked folder: exit $rc, expected 4"
grep -q "symbolic link" "$T/err.txt" || fail "batch through a symlinked folder: no message"
[ -z "$(ls -A "$B/elsewhere")" ] || fail "batch wrote through a symlinked folder"
[ -f "$B/work/deep/south/chart.svg" ] || fail "batch did not draw the other row"

# Stopped by a signal while a temporary file exists: the handler removes it.
# strace holds every write(2) and fsync(2) for 1.5 s, so the signal lands
# while the temporary is there and before the rename, every time (a random
# delay almost never hits the write's window). The first write of each run
# is its output's.
# For a single draw, a batch and --watch, and INT, TERM and HUP.
stopped_run() { # stopped_run SIG FOLDER ARGS...: stop the run once a temporary exists
  local sig=$1 dir=$2
  shift 2
  # env: a background job of a script starts with SIGINT ignored, and under
  # nohup SIGHUP is ignored too; an ignored signal stays ignored (POSIX exec),
  # so all three are reset to their default before the run.
  env --default-signal=INT,HUP,TERM strace -f -qq -o /dev/null -e trace=write,fsync \
    -e inject=write,fsync:delay_enter=1500000 "$BIN" "$@" 2> /dev/null &
  local tracer=$! pid="" waited=0
  while [ "$waited" -lt 400 ] && ! ls -A "$dir" 2> /dev/null | grep -q tmp; do
    sleep 0.05; waited=$((waited + 1))
  done
  pid=$(pgrep -P "$tracer")
  [ -n "$pid" ] && kill -s "$sig" "$pid"
  wait "$tracer" 2> /dev/null
}
rows=$(printf 'name,adults,children\nEast,40,30\nWest,50,20\n')
for sig in INT TERM HUP; do
  mkdir -p "$B/work/sig"
  printf '%s' "$OLD" > "$B/work/sig/one.svg"
  printf '%s\n' "$rows" > "$B/work/sig.csv"
  stopped_run "$sig" "$B/work/sig" draw "$GOOD" -o "$B/work/sig/one.svg"
  stopped_run "$sig" "$B/work/sig" draw "$B/work/tmpl.yaml" --each-row "$B/work/sig.csv" \
    -o "$B/work/sig/{group}.svg" --quiet
  stopped_run "$sig" "$B/work/sig" draw "$GOOD" -o "$B/work/sig/watched.svg" --watch \
    --watch-timeout 20
  checks=$((checks + 1))
  left=$(ls -A "$B/work/sig" | grep -c tmp)
  [ "$left" = 0 ] || fail "SIG$sig left $left temporary files: $(ls -A "$B/work/sig" | tr '\n' ' ')"
  [ "$(cat "$B/work/sig/one.svg")" = "$OLD" ] || fail "SIG$sig: the old output changed"
  rm -rf "$B/work/sig"
done

# A FIFO at the output path (or a symlink to one) that nothing reads: a clean
# error at once, never a wait, and the FIFO stays a FIFO.
mkfifo "$T/out/pipe.svg"
ln -s pipe.svg "$T/out/link.svg"
for f in pipe.svg link.svg; do
  timeout 10 "$BIN" draw "$GOOD" -o "$T/out/$f" 2> "$T/err.txt"
  rc=$?
  checks=$((checks + 1))
  [ "$rc" = 4 ] || fail "FIFO output $f: exit $rc, expected 4 (124 is a hang)"
  grep -q "nothing is reading" "$T/err.txt" || fail "FIFO output $f: $(cat "$T/err.txt")"
done
[ -p "$T/out/pipe.svg" ] || fail "the FIFO was replaced"
rm -f "$T/out/pipe.svg" "$T/out/link.svg"

# A 250-character output name (the longest most file systems allow is 255):
# the temporary file's name must not grow with it.
long="$T/out/$(head -c 246 /dev/zero | tr '\0' l).svg"
"$BIN" draw "$GOOD" -o "$long" 2> "$T/err.txt" || fail "250-character name: $(cat "$T/err.txt")"
checks=$((checks + 1))
[ -s "$long" ] || fail "250-character name: nothing written"
rm -f "$long"

echo "suite_output_safety: $checks checks, $fails failures"
[ "$fails" = 0 ]
