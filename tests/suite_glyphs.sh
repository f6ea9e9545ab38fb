#!/usr/bin/env bash
# Scripted checks of `unitgram glyphs`: listing, contact sheet, --check on the
# hostile corpus (warnings, clean errors, exit codes). Run from the repo root:
#   bash tests/suite_glyphs.sh build/unitgram
set -u
BIN=$(realpath "${1:-build/unitgram}")
D=$(realpath tests/data/glyphs)
T=$(mktemp -d)
trap 'rm -rf "$T"' EXIT
fail=0
ok() { echo "ok   $1"; }
bad() { echo "FAIL $1"; fail=1; }
expect_rc() { # name wanted-rc command...
    local name=$1 want=$2; shift 2
    "$@" >"$T/out" 2>"$T/err"; local rc=$?
    [ "$rc" = "$want" ] && ok "$name" || { bad "$name (exit $rc, wanted $want)"; cat "$T/err"; }
}

expect_rc "help" 0 "$BIN" glyphs --help
grep -q -- "--sheet FILE" "$T/out" || bad "help mentions --sheet"
expect_rc "unknown option is a usage error" 2 "$BIN" glyphs --frobnicate
expect_rc "missing value is a usage error" 2 "$BIN" glyphs --sheet

expect_rc "listing with --glyph-dir" 0 "$BIN" glyphs --glyph-dir "$D/lib-a" --glyph-dir "$D/noindex"
grep -Eq '^test-dot +circle, point$' "$T/out" && ok "keywords from index.yaml" || bad "keywords"
grep -Eq '^test-plain *$' "$T/out" && ok "names without an index" || bad "names without index"
sort -c "$T/out" && ok "listing sorted" || bad "listing sorted"

expect_rc "contact sheet" 0 "$BIN" glyphs --glyph-dir "$D/lib-a" --sheet "$T/sheet.svg"
xmllint --noout --nonet "$T/sheet.svg" && ok "sheet well-formed" || bad "sheet well-formed"
grep -q '>test-bar</text>' "$T/sheet.svg" && ok "sheet labels" || bad "sheet labels"
"$BIN" glyphs --glyph-dir "$D/lib-a" --sheet "$T/sheet2.svg" 2>/dev/null
cmp -s "$T/sheet.svg" "$T/sheet2.svg" && ok "sheet deterministic" || bad "sheet deterministic"
if command -v rsvg-convert >/dev/null; then
    rsvg-convert "$T/sheet.svg" -o "$T/sheet.png" && ok "sheet renders (rsvg-convert)" \
        || bad "sheet renders"
fi
# The extension picks the format: a .png sheet is a PNG (its 8-byte signature,
# PNG specification §5.2), a .pdf sheet a PDF.
expect_rc "PNG sheet" 0 "$BIN" glyphs --glyph-dir "$D/lib-a" --sheet "$T/sheet-r.png"
[ "$(head -c 8 "$T/sheet-r.png" | od -An -tx1 | tr -d ' \n')" = 89504e470d0a1a0a ] \
    && ok "PNG sheet is a PNG" || bad "PNG sheet is a PNG"
expect_rc "PDF sheet" 0 "$BIN" glyphs --glyph-dir "$D/lib-a" --sheet "$T/sheet-r.pdf"
[ "$(head -c 5 "$T/sheet-r.pdf")" = "%PDF-" ] && ok "PDF sheet is a PDF" || bad "PDF sheet is a PDF"
expect_rc "unwritable sheet" 4 "$BIN" glyphs --glyph-dir "$D/lib-a" --sheet /nonexistent/dir/s.svg

# The project library, once its art is merged.
if [ -f glyphs/index.yaml ]; then
    # A binary in build/ finds ../glyphs by itself; one built elsewhere
    # (sanitizer builds) is told where it is.
    LIBDIR=()
    [ "$(dirname "$BIN")" = "$PWD/build" ] || LIBDIR=(--glyph-dir "$PWD/glyphs")
    expect_rc "project listing" 0 "$BIN" glyphs "${LIBDIR[@]}"
    grep -Eq '^person +' "$T/out" && ok "library found" || bad "library not found"
    n_svg=$(ls glyphs/*.svg | wc -l); n_list=$(wc -l <"$T/out")
    [ "$n_svg" -le "$n_list" ] && ok "all $n_svg library glyphs listed" || bad "listed $n_list of $n_svg"
    expect_rc "project sheet" 0 "$BIN" glyphs "${LIBDIR[@]}" --sheet "$T/lib.svg"
    for f in glyphs/*.svg; do
        n=$(basename "$f" .svg)
        grep -q ">$n</text>" "$T/lib.svg" || bad "sheet lacks $n"
    done
    ok "project sheet has every glyph"
else
    echo "skip project library: glyphs/index.yaml is not merged yet"
fi

# --check on the hostile corpus, from inside its folder (the layout folder).
cd "$D/hostile"
for f in *.svg; do
    "$BIN" glyphs --check "./$f" >"$T/out" 2>"$T/err"; rc=$?
    case $rc in
    0) grep -q "inked area" "$T/out" || bad "$f: no inked area" ;;
    1) grep -q "error: glyph file" "$T/err" || bad "$f: unclear error: $(cat "$T/err")" ;;
    *) bad "$f: exit $rc" ;;
    esac
done
ok "hostile corpus: every file a clean glyph or a clear error"
expect_rc "script removed, with a warning" 0 "$BIN" glyphs --check ./script.svg
grep -q "warning: removed element 'script'" "$T/err" && ok "warning printed" || bad "warning"
expect_rc "../ escape refused" 1 "$BIN" glyphs --check ../shapes/square-24.svg
grep -q "outside the layout's folder" "$T/err" && ok "escape message" || bad "escape message"
ln -s "$D/shapes/square-24.svg" "$T/link.svg"
cd "$T"
expect_rc "symlink escape refused" 1 "$BIN" glyphs --check link.svg
grep -q "outside the layout's folder" "$T/err" && ok "symlink message" || bad "symlink message"

[ $fail = 0 ] && echo "suite_glyphs: all passed" || echo "suite_glyphs: FAILED"
exit $fail
