#!/usr/bin/env bash
# The _in functions (each public call with its context as first argument)
# are generated from include/unitgram.h by src/context_calls.py: fail when
# the header changed and they were not made again.
#   bash tests/suite_context_calls.sh build/unitgram
set -euo pipefail
cd "$(dirname "$0")/.."
python3 src/context_calls.py --check
