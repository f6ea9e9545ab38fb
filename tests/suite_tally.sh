#!/bin/bash
# `unitgram tally`: the examples in layouts/ against hand-checked reports
# (tests/data/expected/CHECKED.md), the same counts given inline and from CSV
# files giving identical reports, and the command-line contract (exit codes).
# usage: bash tests/suite_tally.sh build/unitgram
set -u
bin=$(cd "$(dirname "$1")" && pwd)/$(basename "$1")
root=$(cd "$(dirname "$0")/.." && pwd)
fail=0
check() { # description, command status
    if [ "$2" != 0 ]; then echo "FAIL $1"; fail=$((fail + 1)); fi
}

# The hand checks are of the arithmetic on every count as counted: the
# analyst's internal view, whose first line says it is not for publication.
for want in "$root"/tests/data/expected/*.csv; do
    n=$(basename "$want" .csv)
    "$bin" tally "$root/layouts/$n.yaml" --format csv --internal | tail -n +2 | diff - "$want"
    check "layouts/$n.yaml report differs from expected/$n.csv" "${PIPESTATUS[2]}"
done
# The default view is the published one: Hill ward's hidden count is its
# placeholder, and the cells hidden beside it say so.
pub=$("$bin" tally "$root/layouts/wards.yaml" --format csv)
grep -qx 'Hill ward,Children,fewer than 10,,,,,small' <<<"$pub"
check "tally shows a hidden count in the published view" $?
grep -q ',complement$' <<<"$pub"
check "tally shows no complementary cell in the published view" $?
! grep -q 'NOT FOR PUBLICATION' <<<"$pub"
check "the published view is marked internal" $?
for n in pantry wards schools; do
    [ -f "$root/tests/data/expected/$n.csv" ]
    check "no expected report for layouts/$n.yaml" $?
done

good=$root/tests/data/good
for fmt in text csv json; do
    inline=$("$bin" tally "$good/inline.yaml" --format "$fmt")
    for other in fromcsv fromlong; do
        [ "$inline" = "$("$bin" tally --format="$fmt" "$good/$other.yaml")" ]
        check "$fmt report of $other.yaml differs from inline.yaml" $?
    done
done

"$bin" tally --help | grep -q '^usage: unitgram tally'
check "tally --help" $?
"$bin" tally 2>/dev/null; [ $? = 2 ]; check "tally without a layout exits 2" $?
"$bin" tally "$good/inline.yaml" --format xml 2>/dev/null; [ $? = 2 ]
check "unknown format exits 2" $?
"$bin" tally "$good/inline.yaml" --frobnicate 2>/dev/null; [ $? = 2 ]
check "unknown option exits 2" $?
"$bin" tally "$good/inline.yaml" "$good/full.yaml" 2>/dev/null; [ $? = 2 ]
check "two layouts exit 2" $?
err=$("$bin" tally "$good/nowhere.yaml" 2>&1 >/dev/null); [ $? = 1 ]
check "a missing layout exits 1" $?
case $err in *"nowhere.yaml: error: cannot read"*) ;; *) check "missing file message: $err" 1 ;; esac

echo "suite_tally: $fail failures"
[ "$fail" = 0 ]
