#!/usr/bin/env bash
# make install / make uninstall end to end, in temporary folders:
#  1. a staged install (DESTDIR + PREFIX) puts every file where packagers
#     expect it; tests/example, a program that only includes <unitgram.h>,
#     builds against it through pkg-config and draws a chart; the man page
#     passes groff and man checks; uninstall leaves no file behind.
#  2. a plain install into a temporary PREFIX gives a binary that finds its
#     glyphs in PREFIX/share/unitgram/glyphs when run far from the sources.
set -u
ROOT=$PWD
BIN=$(realpath "${1:-build/unitgram}")
T=$(mktemp -d)
trap 'rm -rf "$T"' EXIT
fails=0
fail() { echo "FAIL: $*"; fails=$((fails + 1)); }
# This runs from inside make: do not let the caller's settings (a sanitized
# BUILD or CFLAGS) leak into the builds below.
unset MAKEFLAGS MFLAGS MAKELEVEL CFLAGS BUILD DESTDIR PREFIX
export PKG_CONFIG_PATH=

P=/opt/ugtest$$   # an unusual PREFIX; never created outside $T/stage
D=$T/stage
make -s -j4 BUILD="$T/build1" PREFIX="$P" DESTDIR="$D" install > "$T/log" 2>&1 \
  || { fail "make install (staged) failed"; tail -20 "$T/log"; }
for f in bin/unitgram lib/libunitgram.a include/unitgram.h lib/pkgconfig/unitgram.pc \
         share/man/man1/unitgram.1 share/bash-completion/completions/unitgram \
         share/unitgram/glyphs/person.svg share/unitgram/glyphs/index.yaml; do
  [ -f "$D$P/$f" ] || fail "not installed: $f"
done
[ -x "$D$P/bin/unitgram" ] || fail "binary not executable"
grep -q "^prefix=$P\$" "$D$P/lib/pkgconfig/unitgram.pc" || fail "unitgram.pc prefix"
grep -q "^Version: $(sed -n 's/^#define UG_VERSION "\(.*\)"/\1/p' include/unitgram.h)\$" \
  "$D$P/lib/pkgconfig/unitgram.pc" || fail "unitgram.pc version"

# the example links the installed library through pkg-config alone
export PKG_CONFIG_PATH=$D$P/lib/pkgconfig PKG_CONFIG_SYSROOT_DIR=$D
flags=$(pkg-config --cflags --libs unitgram) || fail "pkg-config does not know unitgram"
cc -std=c11 -Wall -Wextra -Werror -o "$T/example" tests/example/draw.c $flags \
  || fail "example does not build against the installed library"
if [ -x "$T/example" ]; then
  # staged: the compiled-in data folder and the shared library's folder are
  # not where they will be yet, so name them
  UNITGRAM_GLYPH_PATH=$D$P/share/unitgram/glyphs LD_LIBRARY_PATH=$D$P/lib "$T/example" layouts/pantry.yaml \
    "$T/example.svg" > /dev/null || fail "example failed"
  xmllint --noout "$T/example.svg" || fail "example SVG not well-formed"
  "$BIN" draw layouts/pantry.yaml -o "$T/cli.svg" 2> /dev/null
  cmp -s "$T/example.svg" "$T/cli.svg" || fail "example and CLI draw different SVG"
fi
unset PKG_CONFIG_SYSROOT_DIR

# the man page: no groff or man warnings, every command and draw option named
man1=$D$P/share/man/man1/unitgram.1
w=$(groff -z -wall -man "$man1" 2>&1); [ -z "$w" ] || fail "groff warnings: $w"
if command -v man > /dev/null; then
  w=$(MANWIDTH=80 man --warnings -l "$man1" 2>&1 > /dev/null); [ -z "$w" ] || fail "man warnings: $w"
fi
for c in draw tally audit describe glyphs init help; do
  grep -q "^\.B unitgram $c" "$man1" || fail "man page lacks 'unitgram $c'"
done
# every option of every command's --help (made from its option table) is
# named in the man page and offered by the bash completion
for c in draw tally audit describe glyphs init; do
  for o in $("$BIN" $c --help | grep -oE -- '--[a-z-]+' | sort -u); do
    grep -q -- "$(echo "$o" | sed 's/-/\\\\-/g')" "$man1" || fail "man page lacks $c $o"
    grep -q -- "$o" src/unitgram.bash || fail "bash completion lacks $c $o"
  done
done
bash -n "$D$P/share/bash-completion/completions/unitgram" || fail "completion: syntax"

make -s BUILD="$T/build1" PREFIX="$P" DESTDIR="$D" uninstall > "$T/log" 2>&1 \
  || fail "make uninstall failed"
left=$(find "$D" -type f)
[ -z "$left" ] || fail "left after uninstall: $left"

# a real install into a temporary PREFIX: the binary finds the installed glyphs
P2=$T/prefix
make -s -j4 BUILD="$T/build2" PREFIX="$P2" install > "$T/log" 2>&1 \
  || { fail "make install (prefix) failed"; tail -20 "$T/log"; }
mkdir -p "$T/elsewhere" && cp layouts/pantry.yaml "$T/elsewhere/"
(cd "$T/elsewhere" && "$P2/bin/unitgram" draw pantry.yaml -o pantry.svg) \
  || fail "installed binary cannot draw far from the sources"
"$P2/bin/unitgram" glyphs | grep -qE '^ *person ' || fail "installed glyph library not listed"
make -s BUILD="$T/build2" PREFIX="$P2" uninstall > "$T/log" 2>&1
left=$(find "$P2" -type f)
[ -z "$left" ] || fail "left after uninstall: $left"

if [ $fails = 0 ]; then echo "suite_install: all checks passed"; else echo "suite_install: $fails failure(s)"; exit 1; fi
