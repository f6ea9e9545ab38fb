#!/usr/bin/env bash
# Change between periods against exact rational arithmetic (Python's
# fractions module) over 150 random histories: tests/change_ref.py says what
# is checked.
#   bash tests/suite_change_ref.sh build/unitgram
set -euo pipefail
cli=${1:?usage: suite_change_ref.sh PATH/TO/unitgram}
command -v python3 > /dev/null || { echo "FAIL: suite_change_ref: python3 is missing"; exit 1; }
python3 "$(dirname "$0")/change_ref.py" "$cli" 150
