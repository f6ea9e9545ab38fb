#!/usr/bin/env bash
# Outside check of `method: biproportional` (FORMAT.md §7): thousands of
# random tables through the library's own function (tests/ref/biprop_driver),
# each checked by tests/biprop_lp.py against an independent Sainte-Laguë in
# Python fractions and, for the divisors, against GLPK's glpsol solving the
# log-space system of REFERENCES.md §12 as a linear program.
#
#   bash tests/suite_biprop_lp.sh build/unitgram
#
# make builds the driver beside the CLI; this script builds nothing. Without
# glpsol (glpk-utils, make deps) it fails; UG_ALLOW_SKIP=1 prints SKIP instead.
set -euo pipefail

cli=${1:?usage: suite_biprop_lp.sh PATH/TO/unitgram}
here=$(cd "$(dirname "$0")" && pwd)
driver=$(cd "$(dirname "$cli")" && pwd)/tests/ref/biprop_driver

if ! command -v glpsol >/dev/null 2>&1; then
    if [ "${UG_ALLOW_SKIP:-0}" != 1 ]; then
        echo "FAIL: biprop check: glpsol is not installed (make deps installs glpk-utils)" >&2
        exit 1
    fi
    echo "SKIP: biprop check: glpsol is not installed"
    exit 0
fi
[ -x "$driver" ] || { echo "FAIL: $driver is missing; run make first" >&2; exit 1; }

/usr/bin/python3 "$here/biprop_lp.py" "$driver" "${UG_BIPROP_TABLES:-2000}"
