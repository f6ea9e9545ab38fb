#!/usr/bin/env bash
# Numbers and CLDR plural categories of every shipped language against
# python3-babel (CLDR read without ICU): tests/lang_ref.py says what is
# checked and which known gaps between babel 2.10 and ICU 72 it reports.
# Compact amounts ("412.5 million") against CLDR's XML (unicode-cldr-core):
# tests/amount_ref.py.
#   bash tests/suite_lang_ref.sh build/unitgram
set -euo pipefail
cli=${1:?usage: suite_lang_ref.sh PATH/TO/unitgram}
driver=$(dirname "$cli")/tests/ref/lang_driver
py=/usr/bin/python3   # Debian's python: the one that sees python3-babel
if ! "$py" -c "import babel" 2>/dev/null; then
    if [ "${UG_ALLOW_SKIP:-}" = 1 ]; then echo "SKIP suite_lang_ref: python3-babel is missing"; exit 0; fi
    echo "FAIL: suite_lang_ref: python3-babel is missing (make test-deps)"; exit 1
fi
[ -x "$driver" ] || { echo "FAIL: suite_lang_ref: no $driver (make $driver)"; exit 1; }
"$py" "$(dirname "$0")/lang_ref.py" "$driver" "${UG_LANG_NUMBERS:-3000}"
cldr=/usr/share/unicode/cldr/common/main/en.xml
if [ ! -r "$cldr" ]; then
    if [ "${UG_ALLOW_SKIP:-}" = 1 ]; then echo "SKIP amount_ref: unicode-cldr-core is missing"; exit 0; fi
    echo "FAIL: suite_lang_ref: no $cldr: unicode-cldr-core is missing (make test-deps)"; exit 1
fi
"$py" "$(dirname "$0")/amount_ref.py" "$driver" "${UG_AMOUNTS:-500}"
