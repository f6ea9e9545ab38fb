#!/usr/bin/env bash
# Out of memory: draw layouts/pantry.yaml to .svg, .png, .pdf and .html under
# a sweep of address-space limits (prlimit --as, util-linux; man prlimit(1)),
# from the lowest limit at which the program loads at all up to where it
# always succeeds, with a previous output in place. Every run must end in one
# of these ways, and the suite prints how many did:
#   - exit 0, and the output is byte for byte the one drawn without a limit
#     (never a different picture);
#   - exit 1 with a message on stderr;
#   - death by a signal (inside fontconfig, pango or GLib, which unitgram
#     cannot catch: GLib's documentation says g_malloc aborts);
#   - exit 127 with the dynamic loader's "error while loading shared
#     libraries" (ld.so(8)): under the limit, the program never started.
# In every way but the first the previous output keeps its bytes, and no
# temporary file (.unitgram-tmp-*) is ever left beside it. How many runs end
# in which way varies from run to run (address-space layout randomisation),
# so only the ways are asserted, not the counts.
# usage: bash tests/suite_oom.sh build/unitgram
set -u
# AddressSanitizer reserves terabytes of address space for its shadow memory,
# so under an address-space limit it stops before main: this suite is for the
# plain build (the sanitized pass runs the allocation-failure tests instead).
if [ "${UG_SANITIZED:-0}" = 1 ]; then
  echo "suite_oom: not run in the sanitized pass (address-space limits stop ASan itself)"
  exit 0
fi
BIN=$(cd "$(dirname "$1")" && pwd)/$(basename "$1")
ROOT=$(cd "$(dirname "$0")/.." && pwd)
T=$(mktemp -d)
trap 'rm -rf "$T"' EXIT
fails=0 checks=0
fail() { echo "FAIL: $*"; fails=$((fails + 1)); }
command -v prlimit > /dev/null || {
  [ "${UG_ALLOW_SKIP:-}" = 1 ] && { echo "SKIP: suite_oom: prlimit is missing"; exit 0; }
  echo "suite_oom: FAIL: prlimit is missing (util-linux)"; exit 1; }
# A crashed run must not drop a core file into the folder being checked.
ulimit -c 0

GOOD=$ROOT/layouts/pantry.yaml
OLD='the previous output (test data)'
MB=$((1024 * 1024))
declare -A seen=()

# The lowest limit, in steps of 10 MB, at which the program loads at all.
floor=20
while [ "$floor" -lt 400 ] && ! prlimit --as=$((floor * MB)) "$BIN" --version \
    > /dev/null 2>&1; do
  floor=$((floor + 10))
done
top=$((floor + 240)) # every format drew from about floor + 140 MB on (2026-12-03)

# run FORMAT LIMIT-MB: one draw under the limit, checked.
run() {
  local f=$1 n=$2 dir=$T/$1 rc
  printf '%s' "$OLD" > "$dir/out.$f"
  # In a subshell that outlives the draw, so the shell's own "Segmentation
  # fault" line goes to /dev/null and not to the terminal.
  (prlimit --as=$((n * MB)) "$BIN" draw "$GOOD" -o "$dir/out.$f" \
     > /dev/null 2> "$T/err.txt"; echo $? > "$T/rc") 2> /dev/null
  rc=$(cat "$T/rc")
  checks=$((checks + 1))
  local way
  if [ "$rc" = 0 ]; then
    way="exit 0"
    cmp -s "$dir/out.$f" "$T/ref.$f" || fail "$f at $n MB: exit 0 but a different output"
  else
    if [ "$rc" = 1 ]; then
      way="exit 1"
      [ -s "$T/err.txt" ] || fail "$f at $n MB: exit 1 without a message"
    elif [ "$rc" -gt 128 ] && [ "$rc" -lt 160 ]; then
      way="SIG$(kill -l $((rc - 128)))"
    elif [ "$rc" = 127 ] && grep -q "error while loading shared libraries" "$T/err.txt"; then
      way="not loaded"
    else
      way="exit $rc"
      fail "$f at $n MB: exit $rc ($(head -c 200 "$T/err.txt"))"
    fi
    [ "$(cat "$dir/out.$f")" = "$OLD" ] || fail "$f at $n MB ($way): the old output changed"
  fi
  [ "$(ls -A "$dir")" = "out.$f" ] \
    || fail "$f at $n MB ($way): left behind: $(ls -A "$dir" | tr '\n' ' ')"
  seen["$f $way"]=$((${seen["$f $way"]:-0} + 1))
}

for f in svg png pdf html; do
  mkdir "$T/$f"
  "$BIN" draw "$GOOD" -o "$T/ref.$f" 2> "$T/err.txt" || fail "$f without a limit: $(cat "$T/err.txt")"
  for n in $(seq "$floor" 20 "$top"); do
    run "$f" "$n"
  done
done

echo "suite_oom: limits $floor..$top MB in steps of 20; how the runs ended:"
for k in "${!seen[@]}"; do
  printf '  %-18s %3d\n' "$k" "${seen[$k]}"
done | sort
echo "suite_oom: $checks checks, $fails failures"
[ "$fails" = 0 ]
