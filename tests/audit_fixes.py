#!/usr/bin/env python3
"""Every fix the audit suggests, applied as it says, clears its finding and
raises no other (issue: "every fix the audit suggests can be written as it
says"). For each layout given, each finding whose fix is a `key: value` is
written into a copy of the file the way a user would: a colour at the place
the finding names, any other key in the chart the finding is in (the top
level, or a page panel's chart), replacing the key if it is there. The copy is audited again; the finding's rule must report fewer
findings than before and no rule may report more.

Fixes that are advice, not a key ("a glyph for 'On foot' that covers ...",
"combine the smallest categories ..."), are listed and skipped. A placeholder
in angle brackets (title: <what the chart shows ...>) is filled with demo text.

Usage: audit_fixes.py UNITGRAM LAYOUT...   (prints one line per fix; exit 1
on the first failure)
"""
import collections
import json
import os
import re
import subprocess
import sys

ADVICE = ("a glyph ", "combine ")


def audit(binary, path):
    out = subprocess.run([binary, "audit", "--format", "json", path],
                         capture_output=True, text=True)
    if out.returncode not in (0, 3):
        raise SystemExit(f"FAIL: audit {path} exited {out.returncode}: {out.stderr}")
    return json.loads(out.stdout)["findings"]


KEY = re.compile(r"([a-z][a-z-]*): (\{[^}]*\}|\"[^\"]*\"|<[^>]*>|[^\s()]+)")


def split_fix(fix):
    """'icon-value: 2 keeps ...' -> [('icon-value', '2')]; several keys are
    joined by ' with '; None for advice."""
    if fix.startswith(ADVICE):
        return None
    keys, pos = [], 0
    while True:
        m = KEY.match(fix, pos)
        if not m:
            return keys or None
        value = m.group(2)
        if value.startswith("<"):
            value = "Filled in by the fix test (demo data)"
        keys.append((m.group(1), value))
        pos = m.end()
        if not fix.startswith(" with ", pos):
            return keys
        pos += len(" with ")


def set_at(lines, line, col, key, value):
    """Replace the scalar that starts at line:col (1-based) with value."""
    text = lines[line - 1]
    head, tail = text[:col - 1], text[col - 1:]
    m = re.match(r"\"[^\"]*\"|'[^']*'|[^,}\]\s#]+", tail)
    if not m or not re.search(re.escape(key) + r"\s*:\s*$", head):
        raise SystemExit(f"FAIL: no '{key}' value at {line}:{col}: {text!r}")
    lines[line - 1] = head + value + tail[m.end():]


def indent(text):
    return len(text) - len(text.lstrip(" "))


def enclosing_chart(lines, line):
    """The indentation of the keys of the page panel's chart that holds
    line (1-based), and the range of its lines; None outside a panel."""
    for i in range(line - 1, -1, -1):
        m = re.match(r"(\s*)(- )?chart:\s*$", lines[i])
        if m and indent(lines[i]) < indent(lines[line - 1]):
            first = i + 1
            keys = indent(lines[first])
            last = first
            while last < len(lines) and (not lines[last].strip()
                                         or indent(lines[last]) >= keys):
                last += 1
            return keys, first, last
    return None


def set_key(lines, key, value, keys=0, first=0, last=None):
    """Write key: value in the mapping whose keys start at column `keys`
    within lines[first:last], replacing the key's whole entry."""
    last = len(lines) if last is None else last
    pad = " " * keys
    for i in range(first, last):
        if re.match(re.escape(pad + key) + r"\s*:", lines[i]):
            end = i + 1
            while end < last and (not lines[end].strip() or indent(lines[end]) > keys):
                end += 1
            lines[i:end] = [f"{pad}{key}: {value}\n"]
            return
    lines.insert(last, f"{pad}{key}: {value}\n")


def applied(path, finding, keys):
    with open(path, encoding="utf-8") as f:
        lines = f.readlines()
    if lines and not lines[-1].endswith("\n"):
        lines[-1] += "\n"
    for key, value in keys:
        if key in ("color", "ink"):
            set_at(lines, finding["line"], finding["column"], key, value)
            continue
        # a panel's finding is fixed in its chart; the page's at the top
        panel = enclosing_chart(lines, finding["line"])
        if panel and key != "shared-scale":
            set_key(lines, key, value, *panel)
        else:
            set_key(lines, key, value)
    return "".join(lines)


def counts(findings):
    return collections.Counter(f["rule"] for f in findings)


def check(binary, path):
    before = audit(binary, path)
    n = 0
    for finding in before:
        if finding["file"] != path or not finding.get("fix"):
            continue
        parts = split_fix(finding["fix"])
        where = f"{path}:{finding['line']}:{finding['column']} [{finding['rule']}]"
        if parts is None:
            print(f"advice, not a key: {where}: {finding['fix']}")
            continue
        # data files and glyphs resolve beside the layout: the copy goes there
        copy = os.path.join(os.path.dirname(os.path.abspath(path)),
                            f".fix-{os.getpid()}-{n}.yaml")
        text = applied(path, finding, parts)
        with open(copy, "w", encoding="utf-8") as f:
            f.write(text)
        try:
            after = audit(binary, copy)
        finally:
            os.remove(copy)
        was, now = counts(before), counts(after)
        rule = finding["rule"]
        if now[rule] >= was[rule]:
            raise SystemExit(f"FAIL: {where}: '{finding['fix']}' leaves {rule} "
                             f"({now[rule]} findings, {was[rule]} before)")
        raised = [r for r in now if now[r] > was[r]]
        if raised:
            msgs = [f"{f['rule']}: {f['message']}" for f in after if f["rule"] in raised]
            raise SystemExit(f"FAIL: {where}: '{finding['fix']}' raises "
                             + "; ".join(msgs))
        print(f"ok: {where}: " + " with ".join(f"{k}: {v}" for k, v in parts))
        n += 1
    return n


def main():
    binary, paths = sys.argv[1], sys.argv[2:]
    total = sum(check(binary, p) for p in paths)
    print(f"{total} fixes applied, each cleared its finding and raised no other")


if __name__ == "__main__":
    main()
