#!/bin/bash
# Every bad layout or CSV in tests/data/bad/ must fail `unitgram tally` with
# exit status 1 and exactly the stderr line in its sibling NAME.err
# ("bad/NAME.yaml:LINE:COL: error: message"). Run from tests/data so that the
# paths in messages read bad/...
# usage: bash tests/suite_bad.sh build/unitgram
set -u
bin=$(cd "$(dirname "$1")" && pwd)/$(basename "$1")
cd "$(dirname "$0")/data" || exit 1
fail=0 n=0
for yaml in bad/*.yaml; do
    want=${yaml%.yaml}.err
    n=$((n + 1))
    if [ ! -f "$want" ]; then
        echo "FAIL $yaml: no $want"; fail=$((fail + 1)); continue
    fi
    got=$("$bin" tally "$yaml" 2>&1 >/dev/null)
    rc=$?
    if [ "$rc" != 1 ]; then
        echo "FAIL $yaml: exit status $rc, expected 1"; fail=$((fail + 1))
    elif [ "$got" != "$(cat "$want")" ]; then
        echo "FAIL $yaml"; diff <(echo "$got") "$want"; fail=$((fail + 1))
    fi
done
if [ "$n" -lt 40 ]; then
    echo "FAIL only $n bad inputs (at least 40 expected)"; fail=$((fail + 1))
fi
echo "suite_bad: $n bad inputs, $fail failures"
[ "$fail" = 0 ]
