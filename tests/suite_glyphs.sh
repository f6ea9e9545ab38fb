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
grep -Eq '^  test-dot +circle, point$' "$T/out" && ok "keywords from index.yaml" || bad "keywords"
grep -Eq '^  test-plain *$' "$T/out" && ok "names without an index" || bad "names without index"
# Glyphs without a subject come under Other, after the sets; the primitives
# (src/glyph.c) under Shapes, last.
[ "$(grep -v '^ ' "$T/out" | grep -v '^$' | tail -2 | tr '\n' ,)" = "Other,Shapes," ] \
    && ok "headings Other, Shapes" || bad "headings: $(grep -v '^ ' "$T/out" | tr '\n' ,)"
grep -Eq '^  square +built-in$' "$T/out" && ok "primitives listed" || bad "primitives listed"
sed -n '/^Other$/,/^$/p' "$T/out" | grep '^  ' | sort -c && ok "set sorted by name" || bad "set sorted"

# Index checks: an unknown subject, a subject without a description and an
# overlong description name the file, line and column (1-based).
for c in bad-subject:3:12:"unknown subject 'peoples'" \
         no-description:2:3:"has a subject but no 'description'" \
         long-description:4:16:"is 90 bytes long (at most 80)"; do
    dir=${c%%:*}; rest=${c#*:}; want="$D/$dir/index.yaml:${rest%:*}"; msg=${rest##*:}
    msg=${msg//\"/}
    expect_rc "index $dir is an input error" 1 "$BIN" glyphs --glyph-dir "$D/$dir"
    grep -qF "$want" "$T/err" && grep -qF "$msg" "$T/err" && ok "index $dir message" \
        || bad "index $dir message: $(cat "$T/err") (wanted $want ... $msg)"
done

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
    grep -Eq '^  person +' "$T/out" && ok "library found" || bad "library not found"
    grep -qx 'People' "$T/out" && grep -qx 'Shapes' "$T/out" && ok "subject headings" \
        || bad "subject headings"
    n_svg=$(ls glyphs/*.svg | wc -l); n_list=$(grep -c '^  ' "$T/out")
    [ "$n_svg" -le "$n_list" ] && ok "all $n_svg library glyphs listed" || bad "listed $n_list of $n_svg"
    expect_rc "project sheet" 0 "$BIN" glyphs "${LIBDIR[@]}" --sheet "$T/lib.svg"
    for f in glyphs/*.svg; do
        n=$(basename "$f" .svg)
        grep -q "aria-hidden=\"true\">$n</text>" "$T/lib.svg" || bad "sheet lacks $n"
    done
    ok "project sheet has every glyph"
    # each cell is an image named by the index's description, read back with
    # libxml2's XPath (xmllint): as many named cells as described entries
    named=$(xmllint --xpath 'count(//*[local-name()="g"][@role="img"]/*[local-name()="title"][contains(., ": ")])' "$T/lib.svg")
    described=$(grep -c '^  description: ' glyphs/index.yaml)
    [ "$named" = "$described" ] && ok "sheet cells named by their descriptions ($named)" \
        || bad "sheet: $named named cells, $described descriptions"
    grep -q 'aria-hidden="true">syringe</text>' "$T/lib.svg" \
      && grep -q "<title>syringe: $(sed -n '/^- name: syringe$/,/^- name/s/^  description: //p' glyphs/index.yaml)</title>" "$T/lib.svg" \
      && ok "syringe's cell says its description" || bad "syringe's cell title"

    # Search: any case, name/keywords/description/subject, every word must match.
    expect_rc "search by keyword, any case" 0 "$BIN" glyphs "${LIBDIR[@]}" --search VACCINE
    grep -Eq '^  syringe ' "$T/out" && grep -qx 'Health and care' "$T/out" \
        && ok "search finds syringe under its heading" || bad "search vaccine: $(cat "$T/out")"
    expect_rc "search by subject" 0 "$BIN" glyphs "${LIBDIR[@]}" --search transport
    grep -Eq '^  wheelchair ' "$T/out" && ok "search matches the subject" || bad "search subject"
    expect_rc "one word" 0 "$BIN" glyphs "${LIBDIR[@]}" --search person
    one=$(grep -c '^  ' "$T/out")
    expect_rc "two words, both must match" 0 "$BIN" glyphs "${LIBDIR[@]}" --search person --search stick
    two=$(grep -c '^  ' "$T/out")
    # every glyph listed says both words in its index entry (name, subject,
    # keywords or description), and the second word narrows the list
    miss=
    for n in $(sed -n 's/^  \([a-z0-9-]*\) .*/\1/p' "$T/out"); do
        entry=$(sed -n "/^- name: $n\$/,/^- name:/p" glyphs/index.yaml | tr 'A-Z' 'a-z')
        { grep -q person <<<"$entry" || [[ $n == *person* ]]; } && grep -q stick <<<"$entry" || miss="$miss $n"
    done
    [ "$two" -ge 1 ] && [ "$two" -lt "$one" ] && [ -z "$miss" ] && grep -q '^  older-person ' "$T/out" \
        && ok "two words narrow the list ($one to $two)" || bad "two words ($one to $two; not matching:$miss): $(cat "$T/out")"
    expect_rc "no match is exit 1" 1 "$BIN" glyphs "${LIBDIR[@]}" --search qqqxyz
    grep -q "no glyph matches 'qqqxyz'" "$T/err" && ok "no-match message" || bad "no-match message"
    expect_rc "one subject" 0 "$BIN" glyphs "${LIBDIR[@]}" --subject food
    [ "$(grep -v '^ ' "$T/out")" = "Food" ] && ok "--subject lists one set" || bad "--subject"
    expect_rc "unknown subject is a usage error" 2 "$BIN" glyphs "${LIBDIR[@]}" --subject foods
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
