# unitgram — unit charts and pictograms from counts.
# `make demo` and `make check` are the whole set-up on Debian 12: `demo`
# installs the missing build packages first (make deps), `check` those and
# every tool the test suites use (make test-deps).

# ---- settings ---------------------------------------------------------------
CC      ?= cc
CFLAGS  ?= -O2 -g
PREFIX  ?= /usr/local
DESTDIR ?=
BUILD   ?= build
VERSION  = $(shell sed -n 's/^#define UG_VERSION "\(.*\)"/\1/p' include/unitgram.h)

PKGS      = yaml-0.1 librsvg-2.0 cairo cairo-pdf cairo-png pangocairo fontconfig libxml-2.0 lcms2 libpng \
            icu-uc icu-i18n
WARNINGS  = -Wall -Wextra -Wshadow -Wstrict-prototypes -Wmissing-prototypes \
            -Wpointer-arith -Wformat=2 -Werror
STD       = -std=c11 -D_POSIX_C_SOURCE=200809L
# Evaluated late (=) so that a make that has just installed packages sees them.
PKG_CFLAGS = $(shell pkg-config --cflags $(PKGS) 2>/dev/null)
# Libraries without a pkg-config file; unitgram.pc lists them in Libs.private.
OTHER_LIBS = -lcsv -lglpk -lm
PKG_LIBS   = $(shell pkg-config --libs $(PKGS) 2>/dev/null) $(OTHER_LIBS)
CHECK_LIBS = $(shell pkg-config --libs check 2>/dev/null)
DATADIR    = $(PREFIX)/share/unitgram
ALL_CFLAGS = $(STD) $(WARNINGS) $(CFLAGS) -Iinclude -Isrc $(PKG_CFLAGS) -MMD -MP \
             -DUG_DATADIR='"$(DATADIR)/glyphs"'
# Library objects only: what include/unitgram.h does not mark UG_API stays
# inside the library (GCC manual, "Options for Code Generation Conventions").
LIB_CFLAGS = -fvisibility=hidden
LD      ?= ld
OBJCOPY ?= objcopy

# The sanitized pass of `make check` (ASan + UBSan, leaks included).
# float-cast-overflow is named apart: GCC's -fsanitize=undefined leaves it out,
# and an out-of-range double cast to an integer is undefined behaviour.
SAN_CFLAGS = -O1 -g -fsanitize=address,undefined,float-cast-overflow -fno-omit-frame-pointer \
             -fno-sanitize-recover=all
SAN_ENV    = G_SLICE=always-malloc ASAN_OPTIONS=detect_leaks=1:abort_on_error=0 \
             LSAN_OPTIONS=suppressions=$(CURDIR)/tests/lsan.supp:print_suppressions=0 \
             UBSAN_OPTIONS=print_stacktrace=1:halt_on_error=1 UG_SANITIZED=1

# The ThreadSanitizer pass (check_threads only: the one test that races
# threads). The system's libraries are not instrumented, so TSan cannot see
# their own atomics and futex locks; ignore_noninstrumented_modules makes it
# ignore the memory accesses of the interceptors they call (memcpy, strlen,
# malloc...) and still report every access of our code (the flag's
# description, TSAN_OPTIONS=help=1). tests/tsan.supp says what that leaves
# out, and why.
TSAN_CFLAGS = -O1 -g -fsanitize=thread -fno-omit-frame-pointer
TSAN_ENV    = G_SLICE=always-malloc \
              TSAN_OPTIONS=ignore_noninstrumented_modules=1:suppressions=$(CURDIR)/tests/tsan.supp

# Fonts for the shipped languages. DejaVu Sans draws the Latin ones and
# Arabic with its joining forms: fontconfig counts it as covering ar
# (fc-list :lang=ar, against fontconfig's ar.orth), so fonts-noto-core (42,555 KiB
# installed, Noto Sans Arabic among hundreds of faces, each one more for
# fontconfig to sort on every draw) is not needed. Chinese needs
# fonts-noto-cjk (Noto Sans CJK SC; 91,003 KiB installed). Sizes: apt-cache
# show, Installed-Size, on Debian 12.
DEBIAN_PACKAGES = build-essential pkg-config libyaml-dev librsvg2-dev libcairo2-dev \
  libpango1.0-dev liblcms2-dev libxml2-dev libcsv-dev check librsvg2-bin \
  libxml2-utils poppler-utils fonts-dejavu-core fonts-noto-cjk valgrind libglpk-dev glpk-utils libpng-dev libicu-dev
TEST_PACKAGES = python3-numpy python3-colorspacious python3-colormath chromium strace \
  python3-babel unicode-cldr-core
# make bench's yardstick script (tests/bench/waffle_plot.py)
BENCH_PACKAGES = python3-matplotlib python3-yaml

# ---- sources ----------------------------------------------------------------
LIB_SRC  = $(wildcard src/*.c)
CLI_SRC  = $(wildcard src/cli/*.c)
TEST_SRC = $(wildcard tests/check_*.c)

LIB_OBJ  = $(LIB_SRC:%.c=$(BUILD)/%.o)
# The same sources again as position-independent code, for the shared library
# only: Debian Policy §10.2 wants -fPIC in a shared library and not in the
# static one, "each source unit ... compiled twice".
PIC_OBJ  = $(LIB_SRC:%.c=$(BUILD)/pic/%.o)
CLI_OBJ  = $(CLI_SRC:%.c=$(BUILD)/%.o)
TESTS    = $(TEST_SRC:tests/%.c=$(BUILD)/tests/%)
# The installed archive: one object whose only global symbols are the UG_API
# functions. The internal archive holds the objects as compiled (hidden
# symbols still global, so linkable from outside the library's objects) for
# the Check tests, drivers and fuzzers that call internal functions.
LIB      = $(BUILD)/libunitgram.a
LIB_INTERNAL = $(BUILD)/libunitgram-internal.a
# The SONAME carries the major number only: programs linked against it keep
# loading every 0.x.y until an incompatible release changes it (ELF gABI,
# "Dynamic Section", DT_SONAME; Debian Policy §8.1).
SO_MAJOR = $(firstword $(subst ., ,$(VERSION)))
SONAME   = libunitgram.so.$(SO_MAJOR)
SHLIB    = $(BUILD)/libunitgram.so.$(VERSION)
REF_DRIVERS = $(BUILD)/tests/ref/alloc_driver $(BUILD)/tests/ref/cvd_driver \
              $(BUILD)/tests/ref/biprop_driver $(BUILD)/tests/ref/lang_driver
BENCH_DRIVERS = $(BUILD)/tests/bench/suppress
BIN      = $(BUILD)/unitgram

LAYOUTS  = $(wildcard layouts/*.yaml)

.PHONY: FORCE all deps test-deps check run-tests check-sanitized check-threads-tsan \
        demo render-demo clean \
        install uninstall bench bench-deps fuzz fuzz-build

all: $(BIN) $(LIB) $(SHLIB)

# ---- set-up -----------------------------------------------------------------
# Installs only what dpkg does not list as installed (one dpkg-query, a few
# milliseconds, when nothing is missing); sudo only when not already root.
# $(2) set: Node.js with npm too, but only when npm is missing (machines often
# carry their own Node.js, which Debian's npm would conflict with).
APT_INSTALL = missing=$$(dpkg-query -W -f='$${Package} $${db:Status-Abbrev}\n' \
	    $(1) 2>/dev/null | awk -v want="$(strip $(1))" '$$2 == "ii" { ok[$$1] = 1 } \
	    END { n = split(want, w, " "); for (i = 1; i <= n; i++) \
	          if (!ok[w[i]]) printf "%s ", w[i] }'); \
	  $(if $(2),command -v npm >/dev/null || missing="$$missing nodejs npm";) \
	  if [ -n "$$missing" ]; then \
	    echo "unitgram: installing with apt-get: $$missing"; \
	    SUDO=; [ "$$(id -u)" = 0 ] || SUDO=sudo; \
	    $$SUDO apt-get update -qq && \
	    DEBIAN_FRONTEND=noninteractive $$SUDO apt-get install -y --no-install-recommends \
	      $$missing; fi

deps:
	@$(call APT_INSTALL,$(DEBIAN_PACKAGES))

# What the suites use besides the build: the outside references (numpy,
# colorspacious, colormath; npm packages, fetched by the suite), a browser.
test-deps: deps
	@$(call APT_INSTALL,$(TEST_PACKAGES),npm)

# ---- build ------------------------------------------------------------------
# Objects depend on the flags they were compiled with: a changed CC or CFLAGS
# (a sanitizer flag, say) rebuilds them instead of linking stale ones. The
# stamp is rewritten only when the flags differ, so its date says when.
FLAGS_STAMP = $(BUILD)/.flags
$(FLAGS_STAMP): FORCE
	$(shell mkdir -p $(BUILD))$(file >$@.new,$(CC) $(ALL_CFLAGS) $(LIB_CFLAGS))
	@cmp -s $@.new $@ && rm -f $@.new || mv -f $@.new $@

FORCE:

$(BUILD)/%.o: %.c $(FLAGS_STAMP)
	@mkdir -p $(dir $@)
	@echo "  CC  $<"
	@$(CC) $(ALL_CFLAGS) -c $< -o $@

# The command line sees include/ and its own folder only: an #include of a
# library header from src/ does not compile, so the CLI cannot reach past
# unitgram.h.
CLI_CFLAGS = $(filter-out -Isrc,$(ALL_CFLAGS))
$(CLI_OBJ): $(BUILD)/%.o: %.c $(FLAGS_STAMP)
	@mkdir -p $(dir $@)
	@echo "  CC  $<"
	@$(CC) $(CLI_CFLAGS) -c $< -o $@

$(LIB_OBJ): $(BUILD)/%.o: %.c $(FLAGS_STAMP)
	@mkdir -p $(dir $@)
	@echo "  CC  $<"
	@$(CC) $(ALL_CFLAGS) $(LIB_CFLAGS) -c $< -o $@

$(PIC_OBJ): $(BUILD)/pic/%.o: %.c $(FLAGS_STAMP)
	@mkdir -p $(dir $@)
	@echo "  CC  $< (PIC)"
	@$(CC) $(ALL_CFLAGS) $(LIB_CFLAGS) -fPIC -c $< -o $@

$(LIB_INTERNAL): $(LIB_OBJ)
	@rm -f $@
	@echo "  AR  $@"
	@ar rcs $@ $^

# A static archive has no export list: a hidden symbol is still global to the
# static linker, so every module's internal functions would reach (and clash
# with) the programs linking it. Linked into one relocatable object, the
# library resolves its internal calls itself; objcopy then makes the hidden
# symbols local (binutils manual, objcopy --localize-hidden), leaving the
# UG_API functions as the archive's only globals.
$(BUILD)/libunitgram.o: $(LIB_OBJ)
	@echo "  LD  $@"
	@$(LD) -r -o $@.tmp $^
	@$(OBJCOPY) --localize-hidden $@.tmp $@
	@rm -f $@.tmp

$(LIB): $(BUILD)/libunitgram.o
	@rm -f $@
	@echo "  AR  $@"
	@ar rcs $@ $^

# -z defs: every symbol the library uses resolved against the libraries it
# names, so it loads (and dlopen()s) on its own (Debian Policy §10.2);
# --as-needed keeps a DT_NEEDED only for those it really calls (ld manual).
$(SHLIB): $(PIC_OBJ)
	@echo "  LD  $@"
	@$(CC) $(CFLAGS) -shared -Wl,-soname,$(SONAME) -Wl,-z,defs -Wl,--as-needed \
	  -o $@ $^ $(PKG_LIBS)

# The command line uses the public functions only: linking the public archive
# keeps it that way.
$(BIN): $(CLI_OBJ) $(LIB)
	@echo "  LD  $@"
	@$(CC) $(CFLAGS) -o $@ $(CLI_OBJ) $(LIB) $(PKG_LIBS)

$(BUILD)/tests/%: tests/%.c $(LIB_INTERNAL) $(FLAGS_STAMP)
	@mkdir -p $(dir $@)
	@echo "  LD  $@"
	@$(CC) $(ALL_CFLAGS) -o $@ $< $(LIB_INTERNAL) $(CHECK_LIBS) $(PKG_LIBS)

# Drivers that let tests/ref compare the library with outside references.
$(BUILD)/tests/ref/%: tests/ref/%.c $(LIB_INTERNAL)
	@mkdir -p $(dir $@)
	@echo "  LD  $@"
	@$(CC) $(ALL_CFLAGS) -o $@ $< $(LIB_INTERNAL) $(PKG_LIBS)

# ---- tests ------------------------------------------------------------------
check: test-deps
	@$(MAKE) --no-print-directory run-tests
	@$(MAKE) --no-print-directory check-sanitized
	@$(MAKE) --no-print-directory check-threads-tsan

# The whole suite again, built with AddressSanitizer and UBSan.
check-sanitized:
	@echo "== sanitized pass (ASan + UBSan) in build/asan"
	@$(SAN_ENV) $(MAKE) --no-print-directory BUILD=build/asan \
	  CFLAGS="$(SAN_CFLAGS)" run-tests

# check_threads built with ThreadSanitizer in build/tsan. TSan keeps its
# shadow memory at fixed addresses; where the kernel randomizes mmap more
# than gcc 12's TSan allows it dies at start ("unexpected memory mapping"), so
# a first run that draws nothing (CK_RUN_CASE names no case) decides whether
# to run under `setarch -R` (ASLR off for that process only).
TSAN_TEST = build/tsan/tests/check_threads
check-threads-tsan:
	@echo "== ThreadSanitizer pass (check_threads) in build/tsan"
	@$(MAKE) --no-print-directory BUILD=build/tsan CFLAGS="$(TSAN_CFLAGS)" $(TSAN_TEST)
	@cd tests && run=; \
	if ! $(TSAN_ENV) CK_RUN_CASE=none $(CURDIR)/$(TSAN_TEST) >/dev/null 2>&1; then \
	  run="setarch $$(uname -m) -R"; \
	  echo "unitgram: TSan cannot start here; running under $$run"; fi; \
	$(TSAN_ENV) $$run $(CURDIR)/$(TSAN_TEST)

run-tests: $(BIN) $(TESTS) $(REF_DRIVERS)
	@set -e; n=0; for t in $(TESTS); do \
	  echo "== $$t"; (cd tests && $(CURDIR)/$$t); n=$$((n + 1)); done; \
	for s in tests/suite_*.sh; do [ -f "$$s" ] || continue; \
	  echo "== $$s"; bash "$$s" $(BIN); n=$$((n + 1)); done; \
	echo "unitgram: all test suites passed"; echo "suites: $$n passed, 0 failed"

# ---- fuzzing (libFuzzer, clang) --------------------------------------------
FUZZ_SECONDS ?= 60
FUZZ_SRC    = $(wildcard tests/fuzz/fuzz_*.c)
FUZZ_BUILD  = build/fuzz
FUZZ_CFLAGS = -O1 -g -fsanitize=fuzzer-no-link,address,undefined,float-cast-overflow \
              -fno-omit-frame-pointer \
              -fno-sanitize-recover=undefined,float-cast-overflow
FUZZERS     = $(FUZZ_SRC:tests/fuzz/%.c=$(FUZZ_BUILD)/%)

fuzz-build:
	@$(MAKE) --no-print-directory CC=clang BUILD=$(FUZZ_BUILD) \
	  CFLAGS="$(FUZZ_CFLAGS)" $(FUZZ_BUILD)/libunitgram-internal.a $(FUZZERS)

$(FUZZ_BUILD)/fuzz_%: tests/fuzz/fuzz_%.c $(FUZZ_BUILD)/libunitgram-internal.a
	@echo "  LD  $@"
	@clang $(STD) $(WARNINGS) -O1 -g -fsanitize=fuzzer,address,undefined,float-cast-overflow \
	  -fno-sanitize-recover=undefined,float-cast-overflow \
	  -Iinclude -Isrc $(PKG_CFLAGS) -o $@ $< $(FUZZ_BUILD)/libunitgram-internal.a $(PKG_LIBS)

# Each fuzzer runs FUZZ_SECONDS on its corpus (seeded from the tests); a crash
# leaves its input in build/fuzz/ and fails the target.
fuzz: fuzz-build
	@set -e; for f in $(FUZZERS); do n=$$(basename $$f); \
	  mkdir -p $(FUZZ_BUILD)/corpus/$$n; \
	  echo "== $$n for $(FUZZ_SECONDS) s"; \
	  rc=0; G_SLICE=always-malloc ASAN_OPTIONS=detect_leaks=1 \
	  LSAN_OPTIONS=suppressions=$(CURDIR)/tests/lsan.supp \
	  $$f -max_total_time=$(FUZZ_SECONDS) -timeout=10 -rss_limit_mb=2048 \
	    $$([ -f tests/fuzz/$$n.dict ] && echo -dict=tests/fuzz/$$n.dict) \
	    -artifact_prefix=$(FUZZ_BUILD)/$$n- -print_final_stats=1 \
	    $(FUZZ_BUILD)/corpus/$$n $$(cat tests/fuzz/$$n.seeds 2>/dev/null) \
	    > $(FUZZ_BUILD)/$$n.log 2>&1 || rc=$$?; \
	  grep -E "^stat::number_of_executed_units|^SUMMARY" $(FUZZ_BUILD)/$$n.log || true; \
	  if [ $$rc != 0 ]; then tail -n 40 $(FUZZ_BUILD)/$$n.log; exit 1; fi; \
	  done

# ---- benchmarks (never part of check: timings belong here, not in tests) ----
bench-deps: deps
	@$(call APT_INSTALL,$(BENCH_PACKAGES))

bench: bench-deps all $(BENCH_DRIVERS)
	@bash tests/bench/run.sh $(BUILD)

# Bench drivers that call the library's stages directly.
$(BUILD)/tests/bench/%: tests/bench/%.c $(LIB_INTERNAL)
	@mkdir -p $(dir $@)
	@echo "  LD  $@"
	@$(CC) $(ALL_CFLAGS) -o $@ $< $(LIB_INTERNAL) $(PKG_LIBS)

# ---- demo -------------------------------------------------------------------
demo: deps
	@$(MAKE) --no-print-directory render-demo

# out/*.svg for every example layout, and the README's gallery: the same
# charts as PNG (rsvg-convert, librsvg's renderer) in layouts/gallery/.
render-demo: $(BIN)
	@mkdir -p out layouts/gallery
	@set -e; for f in $(LAYOUTS); do \
	  n=$$(basename $$f .yaml); \
	  $(BIN) draw $$f -o out/$$n.svg && echo "out/$$n.svg"; \
	  rsvg-convert out/$$n.svg -o layouts/gallery/$$n.png \
	    && echo "layouts/gallery/$$n.png"; done
	@set -e; for s in $(GLYPH_SUBJECTS); do \
	  $(BIN) glyphs --subject $$s --sheet layouts/gallery/glyphs-$$s.png \
	    && echo "layouts/gallery/glyphs-$$s.png"; done

# The glyph library's subject sets, each drawn as a contact sheet for the
# README's glyph gallery.
GLYPH_SUBJECTS = people health-care housing food education work-money transport \
  environment-energy community communication safety-justice

# ---- install ----------------------------------------------------------------
# Build and install with the same PREFIX: the glyph folder is compiled in.
# The shared library is installed 644, not executable (Debian Policy §10.2),
# with the SONAME link ldconfig would make (Debian Policy §8.1) and the
# unversioned link the linker finds for -lunitgram (§8.4). unitgram.pc gives
# -lunitgram alone; the libraries only a static link needs are private
# (pkg-config(1), Requires.private and Libs.private).
INSTALL_FILES = bin/unitgram lib/libunitgram.a lib/$(notdir $(SHLIB)) lib/$(SONAME) \
  lib/libunitgram.so include/unitgram.h \
  lib/pkgconfig/unitgram.pc share/man/man1/unitgram.1 \
  share/bash-completion/completions/unitgram

install: all
	install -d $(DESTDIR)$(PREFIX)/bin $(DESTDIR)$(PREFIX)/lib/pkgconfig \
	  $(DESTDIR)$(PREFIX)/include $(DESTDIR)$(PREFIX)/share/man/man1 \
	  $(DESTDIR)$(DATADIR)/glyphs $(DESTDIR)$(PREFIX)/share/bash-completion/completions
	install -m 755 $(BIN) $(DESTDIR)$(PREFIX)/bin/unitgram
	install -m 644 $(LIB) $(DESTDIR)$(PREFIX)/lib/libunitgram.a
	install -m 644 $(SHLIB) $(DESTDIR)$(PREFIX)/lib/$(notdir $(SHLIB))
	ln -sf $(notdir $(SHLIB)) $(DESTDIR)$(PREFIX)/lib/$(SONAME)
	ln -sf $(notdir $(SHLIB)) $(DESTDIR)$(PREFIX)/lib/libunitgram.so
	install -m 644 include/unitgram.h $(DESTDIR)$(PREFIX)/include/unitgram.h
	install -m 644 src/unitgram.1 $(DESTDIR)$(PREFIX)/share/man/man1/unitgram.1
	install -m 644 src/unitgram.bash $(DESTDIR)$(PREFIX)/share/bash-completion/completions/unitgram
	install -m 644 glyphs/*.svg glyphs/index.yaml $(DESTDIR)$(DATADIR)/glyphs/
	sed -e 's|@PREFIX@|$(PREFIX)|g' -e 's|@VERSION@|$(VERSION)|g' \
	  -e 's|@REQUIRES@|$(PKGS)|g' -e 's|@LIBS_PRIVATE@|$(OTHER_LIBS)|g' src/unitgram.pc.in \
	  > $(DESTDIR)$(PREFIX)/lib/pkgconfig/unitgram.pc

# Removes exactly what install wrote; shared folders (bin, lib, man1...) stay.
uninstall:
	rm -f $(addprefix $(DESTDIR)$(PREFIX)/,$(INSTALL_FILES))
	rm -rf $(DESTDIR)$(DATADIR)

clean:
	rm -rf $(BUILD) out

-include $(LIB_OBJ:.o=.d) $(PIC_OBJ:.o=.d) $(CLI_OBJ:.o=.d) $(TESTS:=.d)
