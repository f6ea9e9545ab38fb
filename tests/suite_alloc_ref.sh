#!/usr/bin/env bash
# Outside cross-check of the allocator: our largest-remainder and
# Sainte-Laguë results against the npm packages hare-niemeyer@3.0.0 and
# sainte-lague@3.0.0 on thousands of random cases where those packages can be
# trusted (see tests/ref/alloc_crosscheck.mjs). First, `counts-are: percent`
# through the CLI against an exact largest remainder in Python's
# fractions.Fraction, and against the same shares times k given as counts
# (tests/ref/percent_crosscheck.py).
#
#   bash tests/suite_alloc_ref.sh build/unitgram
#
# make builds the driver (build/tests/ref/alloc_driver, beside the CLI); this
# script builds nothing. Without Node.js it fails (make test-deps installs
# it); a developer may set UG_ALLOW_SKIP=1 to have it print SKIP instead.
set -euo pipefail

cli=${1:?usage: suite_alloc_ref.sh PATH/TO/unitgram}
here=$(cd "$(dirname "$0")" && pwd)
driver=$(cd "$(dirname "$cli")" && pwd)/tests/ref/alloc_driver
ref="$here/ref"

skip() {
    if [ "${UG_ALLOW_SKIP:-0}" != 1 ]; then
        echo "FAIL: alloc reference check: $1 (make test-deps installs it)" >&2
        exit 1
    fi
    echo "SKIP: alloc reference check: $1"
    exit 0
}

work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
python3 "$here/ref/percent_crosscheck.py" "$(cd "$(dirname "$cli")" && pwd)/$(basename "$cli")" "$work"

command -v node >/dev/null 2>&1 || skip "node is not installed"
command -v npm >/dev/null 2>&1 || skip "npm is not installed"
[ -x "$driver" ] || { echo "FAIL: $driver is missing; run make first" >&2; exit 1; }

if [ ! -f "$ref/node_modules/hare-niemeyer/package.json" ] ||
   [ ! -f "$ref/node_modules/sainte-lague/package.json" ]; then
    echo "installing the reference packages in tests/ref"
    (cd "$ref" && npm install --no-audit --no-fund >/dev/null) ||
        skip "npm install of the reference packages failed"
fi

cd "$ref"
node alloc_crosscheck.mjs "$driver"
