#!/usr/bin/env bash
# Colour stage against outside references (tests/ref/cvd_check.py): CVD
# simulation and CIELAB vs Debian's python3-colorspacious, CIEDE2000 vs
# python3-colormath when installed. Without colorspacious it prints SKIP and
# passes, unless UG_REQUIRE_PY=1 (set by .ci/run, which installs it).
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
if ! [ -x "$py" ] || ! "$py" -c 'import colorspacious, numpy' 2>/dev/null; then
    if [ "${UG_REQUIRE_PY:-0}" = 1 ]; then
        echo "suite_color_ref: FAIL: $py cannot import colorspacious (UG_REQUIRE_PY=1)" >&2
        exit 1
    fi
    echo "SKIP suite_color_ref: $py lacks python3-colorspacious"
    exit 0
fi
"$py" tests/ref/cvd_check.py "$driver"
