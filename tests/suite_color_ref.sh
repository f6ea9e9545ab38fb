#!/usr/bin/env bash
# Colour stage against outside references (tests/ref/cvd_check.py): CVD
# simulation and CIELAB vs Debian's python3-colorspacious, CIEDE2000 vs
# python3-colormath. Without them it fails (make test-deps installs them);
# UG_ALLOW_SKIP=1 lets a developer skip instead.
# Usage: bash tests/suite_color_ref.sh build/unitgram
set -u
cd "$(dirname "$0")/.."
build=$(dirname "${1:-build/unitgram}")
driver="$build/tests/ref/cvd_driver"
py=/usr/bin/python3

if [ ! -x "$driver" ]; then
    echo "suite_color_ref: $driver is missing (make run-tests builds it)" >&2
    exit 1
fi
if ! [ -x "$py" ] || ! "$py" -c 'import colorspacious, colormath, numpy' 2>/dev/null; then
    if [ "${UG_ALLOW_SKIP:-0}" != 1 ]; then
        echo "suite_color_ref: FAIL: $py cannot import colorspacious, colormath and numpy" \
             "(make test-deps installs python3-colorspacious python3-colormath" \
             "python3-numpy)" >&2
        exit 1
    fi
    echo "SKIP suite_color_ref: $py lacks python3-colorspacious"
    exit 0
fi
"$py" tests/ref/cvd_check.py "$driver"
