#!/usr/bin/env bash
# What the installed libraries expose (issue #16), in a staged install
# (DESTDIR + an unusual PREFIX):
#  1. libunitgram.a and libunitgram.so.0.x.y define no global symbol outside
#     the ug prefix, and the shared library's SONAME is libunitgram.so.0;
#  2. the symlinks, modes and pkg-config file are what a packager expects;
#  3. tests/example/draw.c, built through `pkg-config --cflags --libs
#     unitgram` (shared) and `pkg-config --static --libs unitgram` (static),
#     draws the same SVG both ways, and the same as the command line;
#  4. uninstall leaves no file or link behind.
# usage: bash tests/suite_symbols.sh build/unitgram
set -u
BIN=$(realpath "${1:-build/unitgram}")
T=$(mktemp -d)
trap 'rm -rf "$T"' EXIT
fails=0
fail() { echo "FAIL: $*"; fails=$((fails + 1)); }
# Run from inside make: the caller's settings (a sanitized BUILD or CFLAGS)
# must not leak into the build below.
unset MAKEFLAGS MFLAGS MAKELEVEL CFLAGS BUILD DESTDIR PREFIX
export PKG_CONFIG_PATH=
CC=${CC:-cc}
for tool in nm readelf pkg-config "$CC" xmllint; do
  command -v "$tool" > /dev/null || { fail "$tool not installed"; exit 1; }
done

VERSION=$(sed -n 's/^#define UG_VERSION "\(.*\)"/\1/p' include/unitgram.h)
MAJOR=${VERSION%%.*}
P=/opt/ugsym$$   # never created outside $T/stage
D=$T/stage
L=$D$P/lib
make -s -j2 BUILD="$T/build" PREFIX="$P" DESTDIR="$D" install > "$T/log" 2>&1 \
  || { fail "make install (staged) failed"; tail -20 "$T/log"; exit 1; }

# ---- 1. exported symbols ---------------------------------------------------
# Defined global symbols (nm's third column) not starting with ug. The ELF
# gABI ("Symbol Table") makes STB_LOCAL symbols invisible outside their
# object, so only these can clash with a program's or another library's.
offenders() { nm "$@" 2>/dev/null | awk 'NF == 3 && $3 !~ /^ug/ { print $3 }' | sort -u; }
for lib in libunitgram.a "libunitgram.so.$VERSION"; do
  [ -f "$L/$lib" ] || { fail "not installed: lib/$lib"; continue; }
  n=$(nm -g --defined-only "$L/$lib" 2>/dev/null | awk 'NF == 3' | wc -l)
  [ "$n" -gt 0 ] || fail "$lib: nm lists no global symbol"
  bad=$(offenders -g --defined-only "$L/$lib")
  if [ -z "$bad" ]; then echo "$lib: $n global symbols, all ug-prefixed"
  else fail "$lib: $n global symbols, $(wc -w <<<"$bad") without the ug prefix:" $bad; fi
done
# What the dynamic linker sees: the .dynsym table, kept even when stripped.
bad=$(offenders -D --defined-only "$L/libunitgram.so.$VERSION")
[ -z "$bad" ] || fail "libunitgram.so dynamic symbols without the ug prefix:" $bad
# Every function the header declares is there (UG_API on each declaration).
api=$(grep -oE '^UG_API [^(]*\bug_[a-z0-9_]+\(' include/unitgram.h \
      | grep -oE 'ug_[a-z0-9_]+\($' | tr -d '(' | sort -u)
for lib in libunitgram.a "libunitgram.so.$VERSION"; do
  missing=$(comm -23 <(echo "$api") <(nm -g --defined-only "$L/$lib" 2>/dev/null \
                                      | awk 'NF == 3 { print $3 }' | sort -u))
  [ -z "$missing" ] || fail "$lib lacks declared functions:" $missing
done
soname=$(readelf -d "$L/libunitgram.so.$VERSION" | sed -n 's/.*(SONAME).*\[\(.*\)\]/\1/p')
[ "$soname" = "libunitgram.so.$MAJOR" ] || fail "SONAME is '$soname', not libunitgram.so.$MAJOR"

# ---- 2. files, links, pkg-config -------------------------------------------
[ "$(readlink "$L/libunitgram.so.$MAJOR")" = "libunitgram.so.$VERSION" ] \
  || fail "lib/libunitgram.so.$MAJOR does not link to libunitgram.so.$VERSION"
[ -e "$L/libunitgram.so" ] && [ -L "$L/libunitgram.so" ] \
  || fail "lib/libunitgram.so is not a link to the shared library"
# Debian Policy §10.2: shared libraries are not installed executable.
[ "$(stat -c %a "$L/libunitgram.so.$VERSION")" = 644 ] || fail "libunitgram.so.$VERSION mode is not 644"
[ ! -e "$L/libunitgram-internal.a" ] || fail "the internal archive was installed"
pc=$L/pkgconfig/unitgram.pc
[ -f "$pc" ] || fail "unitgram.pc not installed"
# Relocatable: the prefix is written once and every path derives from it.
[ "$(grep -c -- "$P" "$pc")" = 1 ] && grep -q "^prefix=$P\$" "$pc" \
  || fail "unitgram.pc names $P other than in prefix="
# pkg-config(1): Requires.private and Libs.private reach a --static link only.
grep -q '^Libs: -L${libdir} -lunitgram$' "$pc" || fail "unitgram.pc Libs is not -lunitgram alone"
grep -q '^Requires.private: .*cairo' "$pc" || fail "unitgram.pc lacks Requires.private"
grep -q '^Libs.private: .*-lglpk' "$pc" || fail "unitgram.pc lacks Libs.private"
# --define-variable=prefix is global to pkg-config: it would move the system
# libraries' paths (/usr/include/glib-2.0, ...) into the stage as well. So the
# stage gets a copy of the file with prefix= relocated, nothing else changed.
mkdir -p "$T/pc"
sed "s|^prefix=.*|prefix=$D$P|" "$pc" > "$T/pc/unitgram.pc"
export PKG_CONFIG_PATH=$T/pc
[ "$(pkg-config --variable=libdir unitgram)" = "$L" ] || fail "relocated libdir is not $L"

# ---- 3. the example, shared and static -------------------------------------
shared=$(pkg-config --cflags --libs unitgram) || fail "pkg-config --libs unitgram"
static=$(pkg-config --cflags --static --libs unitgram) || fail "pkg-config --static --libs unitgram"
case " $static " in *" -lglpk "*) ;; *) fail "--static does not add Libs.private: $static" ;; esac
case " $shared " in *" -lglpk "*) fail "Libs.private reaches a shared link: $shared" ;; esac
# With both libunitgram.so and .a in libdir the linker takes the .so for
# -lunitgram; -l:libunitgram.a names the archive (GNU ld manual, -l namespec).
static=$(sed 's/\(^\| \)-lunitgram\( \|$\)/\1-l:libunitgram.a\2/' <<<"$static")
# shellcheck disable=SC2086
"$CC" -std=c11 -Wall -Wextra -Werror -o "$T/ex-shared" tests/example/draw.c $shared \
  || fail "example does not build against the shared library"
# shellcheck disable=SC2086
"$CC" -std=c11 -Wall -Wextra -Werror -o "$T/ex-static" tests/example/draw.c $static \
  || fail "example does not build against the static archive"
needed() { readelf -d "$1" | sed -n 's/.*(NEEDED).*\[\(.*\)\]/\1/p'; }
needed "$T/ex-shared" | grep -qx "libunitgram.so.$MAJOR" || fail "shared example does not load libunitgram.so.$MAJOR"
! needed "$T/ex-static" | grep -q libunitgram || fail "static example still loads libunitgram.so"
# Staged: the compiled-in glyph folder is not there yet, so name it.
export UNITGRAM_GLYPH_PATH=$D$P/share/unitgram/glyphs
for l in layouts/pantry.yaml layouts/wards.yaml; do
  n=$(basename "$l" .yaml)
  LD_LIBRARY_PATH=$L "$T/ex-shared" "$l" "$T/$n-shared.svg" > /dev/null || fail "shared example failed on $l"
  "$T/ex-static" "$l" "$T/$n-static.svg" > /dev/null || fail "static example failed on $l"
  xmllint --noout "$T/$n-shared.svg" || fail "$n: shared example's SVG not well-formed"
  cmp -s "$T/$n-shared.svg" "$T/$n-static.svg" || fail "$n: shared and static examples draw different SVG"
  "$BIN" draw "$l" -o "$T/$n-cli.svg" 2> /dev/null
  cmp -s "$T/$n-static.svg" "$T/$n-cli.svg" || fail "$n: example and CLI draw different SVG"
done
unset UNITGRAM_GLYPH_PATH

# ---- 4. uninstall ----------------------------------------------------------
make -s BUILD="$T/build" PREFIX="$P" DESTDIR="$D" uninstall > "$T/log" 2>&1 \
  || fail "make uninstall failed"
left=$(find "$D" ! -type d)
[ -z "$left" ] || fail "left after uninstall: $left"

if [ $fails = 0 ]; then echo "suite_symbols: all checks passed"; else echo "suite_symbols: $fails failure(s)"; exit 1; fi
