# unitgram — unit charts and pictograms from counts.
# `make demo` and `make check` are the whole set-up on Debian 12: both install
# missing packages first (make deps).

# ---- settings ---------------------------------------------------------------
CC      ?= cc
CFLAGS  ?= -O2 -g
PREFIX  ?= /usr/local
DESTDIR ?=
BUILD   ?= build

PKGS      = yaml-0.1 librsvg-2.0 cairo cairo-pdf cairo-png pangocairo libxml-2.0 lcms2
WARNINGS  = -Wall -Wextra -Wshadow -Wstrict-prototypes -Wmissing-prototypes \
            -Wpointer-arith -Wformat=2 -Werror
STD       = -std=c11 -D_POSIX_C_SOURCE=200809L
# Evaluated late (=) so that a make that has just installed packages sees them.
PKG_CFLAGS = $(shell pkg-config --cflags $(PKGS) 2>/dev/null)
PKG_LIBS   = $(shell pkg-config --libs $(PKGS) 2>/dev/null) -lcsv -lm
CHECK_LIBS = $(shell pkg-config --libs check 2>/dev/null)
ALL_CFLAGS = $(STD) $(WARNINGS) $(CFLAGS) -Iinclude -Isrc $(PKG_CFLAGS) -MMD -MP

DEBIAN_PACKAGES = build-essential pkg-config libyaml-dev librsvg2-dev libcairo2-dev \
  libpango1.0-dev liblcms2-dev libxml2-dev libcsv-dev check librsvg2-bin \
  libxml2-utils poppler-utils fonts-dejavu-core

# ---- sources ----------------------------------------------------------------
LIB_SRC  = $(filter-out src/main.c src/cli_%.c,$(wildcard src/*.c))
CLI_SRC  = src/main.c $(wildcard src/cli_*.c)
TEST_SRC = $(wildcard tests/check_*.c)

LIB_OBJ  = $(LIB_SRC:%.c=$(BUILD)/%.o)
CLI_OBJ  = $(CLI_SRC:%.c=$(BUILD)/%.o)
TESTS    = $(TEST_SRC:tests/%.c=$(BUILD)/tests/%)
LIB      = $(BUILD)/libunitgram.a
BIN      = $(BUILD)/unitgram
# Drivers that print our numbers for outside reference libraries (tests/ref).
REF_BIN  = $(BUILD)/tests/ref/cvd_driver

LAYOUTS  = $(wildcard layouts/*.yaml)

.PHONY: all deps check run-tests demo render-demo clean

all: $(BIN) $(LIB)

# ---- set-up -----------------------------------------------------------------
# Installs only when something is missing; sudo only when not already root.
deps:
	@if pkg-config --exists $(PKGS) check && [ -f /usr/include/csv.h ] \
	    && command -v rsvg-convert >/dev/null && command -v xmllint >/dev/null \
	    && fc-list | grep -q DejaVuSans; then :; else \
	  echo "unitgram: installing build packages with apt-get"; \
	  SUDO=; [ "$$(id -u)" = 0 ] || SUDO=sudo; \
	  $$SUDO apt-get update -qq && \
	  DEBIAN_FRONTEND=noninteractive $$SUDO apt-get install -y --no-install-recommends \
	    $(DEBIAN_PACKAGES); fi

# ---- build ------------------------------------------------------------------
$(BUILD)/%.o: %.c
	@mkdir -p $(dir $@)
	@echo "  CC  $<"
	@$(CC) $(ALL_CFLAGS) -c $< -o $@

$(LIB): $(LIB_OBJ)
	@rm -f $@
	ar rcs $@ $^

$(BIN): $(CLI_OBJ) $(LIB)
	$(CC) $(CFLAGS) -o $@ $(CLI_OBJ) $(LIB) $(PKG_LIBS)

$(BUILD)/tests/%: tests/%.c $(LIB)
	@mkdir -p $(dir $@)
	@echo "  LD  $@"
	@$(CC) $(ALL_CFLAGS) -o $@ $< $(LIB) $(CHECK_LIBS) $(PKG_LIBS)

$(REF_BIN): $(BUILD)/tests/ref/%: tests/ref/%.c $(LIB)
	@mkdir -p $(dir $@)
	@echo "  LD  $@"
	@$(CC) $(ALL_CFLAGS) -o $@ $< $(LIB) $(PKG_LIBS)

# ---- tests ------------------------------------------------------------------
check: deps
	@$(MAKE) --no-print-directory run-tests

run-tests: $(BIN) $(TESTS) $(REF_BIN)
	@set -e; for t in $(TESTS); do \
	  echo "== $$t"; (cd tests && ../$$t); done
	@set -e; for s in tests/suite_*.sh; do [ -f "$$s" ] || continue; \
	  echo "== $$s"; bash "$$s" $(BIN); done
	@echo "unitgram: all test suites passed"

# ---- demo -------------------------------------------------------------------
demo: deps
	@$(MAKE) --no-print-directory render-demo

render-demo: $(BIN)
	@mkdir -p out
	@set -e; for f in $(LAYOUTS); do \
	  n=$$(basename $$f .yaml); \
	  $(BIN) draw $$f -o out/$$n.svg && echo "out/$$n.svg"; done

clean:
	rm -rf $(BUILD) out

-include $(LIB_OBJ:.o=.d) $(CLI_OBJ:.o=.d)
