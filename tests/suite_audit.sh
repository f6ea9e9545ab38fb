#!/usr/bin/env bash
# `unitgram audit` on tests/data/audit: every RULE.yaml must report RULE at
# the place its "# expect: LINE:COL" comment names, and RULE-ok.yaml (the
# near-identical file) must not report RULE. Then exit codes and formats.
# Usage: bash tests/suite_audit.sh build/unitgram
set -u
cd "$(dirname "$0")/.."
bin=${1:-build/unitgram}
dir=tests/data/audit
passed=0 failed=0

ok() { passed=$((passed + 1)); }
bad() { failed=$((failed + 1)); echo "FAIL: $*"; }

for f in "$dir"/*.yaml; do
    case "$f" in *-ok.yaml) continue ;; esac
    rule=$(basename "$f" .yaml)
    where=$(sed -n 's/^# expect: //p' "$f")
    out=$("$bin" audit "$f" 2>&1)
    if grep -Eq "^$f:$where: (error|warning|note): .*\[$rule\]\$" <<<"$out"; then ok
    else bad "$f: expected [$rule] at $where, got:"; echo "$out"; fi
    out=$("$bin" audit "$dir/$rule-ok.yaml" 2>&1)
    if grep -q "\[$rule\]" <<<"$out"; then bad "$dir/$rule-ok.yaml reports $rule:"; echo "$out"
    else ok; fi
done

# Each trigger file's fix line is computed, never empty.
out=$("$bin" audit "$dir/vanished-category.yaml")
grep -q '^    fix: icon-value: 2 keeps every category visible' <<<"$out" && ok ||
    bad "vanished-category fix: $out"
out=$("$bin" audit "$dir/low-contrast-icon.yaml")
grep -Eq '^    fix: color: "#[0-9a-f]{6}"' <<<"$out" && ok || bad "contrast fix: $out"

# Exit codes: findings alone exit 0; --strict makes a warning exit 3; a clean
# chart passes --strict; usage mistakes exit 2; a missing file exits 1.
expect_rc() {
    local want=$1; shift
    "$@" >/dev/null 2>&1; local rc=$?
    [ "$rc" = "$want" ] && ok || bad "exit $rc, wanted $want: $*"
}
expect_rc 0 "$bin" audit "$dir/small-count.yaml"
expect_rc 3 "$bin" audit --strict "$dir/small-count.yaml"
expect_rc 0 "$bin" audit --strict "$dir/missing-title-ok.yaml"
expect_rc 2 "$bin" audit
expect_rc 2 "$bin" audit --format csv "$dir/small-count.yaml"
expect_rc 2 "$bin" audit --bogus "$dir/small-count.yaml"
expect_rc 1 "$bin" audit "$dir/no-such-file.yaml"
expect_rc 0 "$bin" audit --help

# JSON is valid and carries the same finding.
json=$("$bin" audit --format json "$dir/small-count.yaml")
if command -v /usr/bin/python3 >/dev/null; then
    /usr/bin/python3 -c '
import json, sys
d = json.loads(sys.stdin.read())
f = [x for x in d["findings"] if x["rule"] == "small-count"]
assert f and f[0]["severity"] == "warning" and f[0]["line"] == 14, d
assert d["warnings"] >= 1
' <<<"$json" && ok || bad "JSON output: $json"
fi

# Every fix the audit suggests, written as it says, clears its finding and
# raises no other (tests/audit_fixes.py), on the rule files, the preset cases
# and the shipped examples.
out=$(/usr/bin/python3 tests/audit_fixes.py "$bin" "$dir"/*.yaml tests/data/fixes/*.yaml \
      layouts/*.yaml 2>&1) && ok || { bad "an audit fix does not hold:"; echo "$out"; }
grep -q "^ok: .*cdc-wonder-zero.yaml:18:14 \[small-count\]: suppress: {below: 10, zeros: hide}" \
    <<<"$out" && ok || bad "cdc-wonder: the zero is not flagged with zeros: hide: $out"
# cms and nhs-hes count from 1: a zero the layout shows is no small count.
for p in cms nhs-hes; do
    if "$bin" audit "tests/data/fixes/$p-zero.yaml" 2>&1 | grep -q '\[small-count\]'; then
        bad "$p flags a zero"; else ok; fi
done

echo "$passed passed, $failed failed"
[ "$failed" = 0 ]
