# slowscan — build, test, demo, bench, install.
#   make            build/slowscan and build/libslowscan.a
#   make check      the test suite, plain and under AddressSanitizer + UBSan
#   make demo       screen the bundled demo data, draw its figures (demo-output/), print the table
#   make bench      speed ratios, measured in one run
#   make validate   the calibration battery at scale, four nulls (~20-30 min): build/validate.md
#   make install    PREFIX=/usr/local DESTDIR=
# `check` and `demo` first install missing Debian packages (scripts/install-deps.sh).

PREFIX  ?= /usr/local
DESTDIR ?=
VERSION := 0.1.0

CC      ?= cc
PKGS    := gsl fftw3 netcdf plplot
CFLAGS  ?= -O2 -g
WARN    := -std=c11 -Wall -Wextra -Werror -D_POSIX_C_SOURCE=200809L
INCS     = -Iinclude $(shell pkg-config --cflags $(PKGS) 2>/dev/null)
LIBS     = $(shell pkg-config --libs $(PKGS) 2>/dev/null || echo -lgsl -lgslcblas -lfftw3 -lnetcdf -lplplot) \
           -lfftw3_threads -lcsv -lpthread -lm
SAN     := -fsanitize=address,undefined -fno-omit-frame-pointer -fno-sanitize-recover=undefined

CORE_DIRS := detrend indicators surrogates screen response io report data
LIB_SRC   := $(foreach d,$(CORE_DIRS),$(wildcard $(d)/*.c))
CLI_SRC   := $(wildcard cli/*.c)
TEST_SRC  := $(wildcard tests/*.c)
BENCH_SRC := $(wildcard bench/*.c)
# Sources shared by benchmark programs (each bench/*.c is its own program).
BENCH_LIB := $(wildcard bench/common/*.c)

B := build
LIB_OBJ   := $(LIB_SRC:%.c=$(B)/obj/%.o)
CLI_OBJ   := $(CLI_SRC:%.c=$(B)/obj/%.o)
TEST_OBJ  := $(TEST_SRC:%.c=$(B)/obj/%.o)
SLIB_OBJ  := $(LIB_SRC:%.c=$(B)/asan/%.o)
SCLI_OBJ  := $(CLI_SRC:%.c=$(B)/asan/%.o)
STEST_OBJ := $(TEST_SRC:%.c=$(B)/asan/%.o)
BENCH_BIN := $(BENCH_SRC:bench/%.c=$(B)/bench/%)

.PHONY: all deps check demo bench validate install clean
all: $(B)/slowscan $(B)/libslowscan.a

deps:
	@sh scripts/install-deps.sh

$(B)/obj/%.o: %.c
	@mkdir -p $(dir $@)
	@echo "CC $<"; $(CC) $(CFLAGS) $(WARN) -DSLOWSCAN_VERSION='"$(VERSION)"' $(INCS) -MMD -MP -c $< -o $@

$(B)/asan/%.o: %.c
	@mkdir -p $(dir $@)
	@echo "CC(san) $<"; $(CC) -O1 -g $(SAN) $(WARN) -DSLOWSCAN_VERSION='"$(VERSION)"' $(INCS) -MMD -MP -c $< -o $@

$(B)/libslowscan.a: $(LIB_OBJ)
	@rm -f $@
	ar rcs $@ $^

$(B)/slowscan: $(CLI_OBJ) $(B)/libslowscan.a
	$(CC) $(CFLAGS) -o $@ $(CLI_OBJ) $(B)/libslowscan.a $(LIBS)

$(B)/run_tests: $(TEST_OBJ) $(B)/libslowscan.a
	$(CC) $(CFLAGS) -o $@ $(TEST_OBJ) $(B)/libslowscan.a $(LIBS)

$(B)/asan/slowscan: $(SCLI_OBJ) $(SLIB_OBJ)
	$(CC) $(SAN) -o $@ $^ $(LIBS)

$(B)/asan/run_tests: $(STEST_OBJ) $(SLIB_OBJ)
	$(CC) $(SAN) -o $@ $^ $(LIBS)

$(B)/bench/%: bench/%.c $(BENCH_LIB) $(wildcard bench/common/*.h) $(B)/libslowscan.a
	@mkdir -p $(dir $@)
	$(CC) -O2 -g $(WARN) $(INCS) -Ibench/common -o $@ $< $(BENCH_LIB) $(B)/libslowscan.a $(LIBS)

# Each run ends in a line "LABEL: N passed, N failed"; the last one is the sanitized run.
# The sanitized run goes ahead when the plain one fails (the calibration battery fails there
# until the fixes it measures land); check fails if either did.
check: deps
	@$(MAKE) --no-print-directory all $(B)/run_tests $(B)/asan/slowscan $(B)/asan/run_tests
	plain=0; SLOWSCAN_BIN=$(B)/slowscan SLOWSCAN_LABEL=plain $(B)/run_tests || plain=1; \
	ASAN_OPTIONS=detect_leaks=1:abort_on_error=0 UBSAN_OPTIONS=print_stacktrace=1 \
	  LSAN_OPTIONS=suppressions=$(CURDIR)/tests/lsan.supp:print_suppressions=0 \
	  SLOWSCAN_BIN=$(B)/asan/slowscan SLOWSCAN_LABEL=sanitized $(B)/asan/run_tests && exit $$plain

# The calibration battery of `make check` with more series and every memory-keeping null.
VALIDATE_OBJ := $(B)/obj/tests/validate/validate.o $(B)/obj/tests/check.o \
                $(B)/obj/tests/calibration_cases.o $(B)/obj/tests/test_calibration.o
$(B)/validate: $(VALIDATE_OBJ)
	$(CC) $(CFLAGS) -o $@ $^ $(LIBS)

validate: deps
	@$(MAKE) --no-print-directory all $(B)/validate
	SLOWSCAN_BIN=$(B)/slowscan $(B)/validate $(B)/validate.md

DEMO_OUT ?= demo-output
DEMO_ARGS := --deseason 364 --indicators variance,lag1,recovery_trend
demo: deps
	@$(MAKE) --no-print-directory all
	@mkdir -p $(DEMO_OUT)
	$(B)/slowscan screen $(DEMO_ARGS) --rolling $(DEMO_OUT)/rolling.csv \
	  --figures $(DEMO_OUT) -o $(DEMO_OUT)/summary.csv data/stations.csv
	$(B)/slowscan robustness --deseason 364 --vars reed_inlet --surrogates 99 \
	  --windows 30%:70%:10% --bandwidths 5%:20%:5% --figures $(DEMO_OUT) \
	  -o $(DEMO_OUT)/robustness.csv data/stations.csv
	$(B)/slowscan recovery --deseason 364 --surrogates 99 --vars reed_inlet \
	  --project $(DEMO_OUT)/crossing.csv --figures $(DEMO_OUT) -o $(DEMO_OUT)/recovery.csv \
	  data/stations.csv
	@cp $(DEMO_OUT)/screen-reed_inlet.png doc/demo-figure.png
	@$(B)/slowscan screen $(DEMO_ARGS) --format table data/stations.csv

bench: all $(BENCH_BIN)
	@for b in $(BENCH_BIN); do echo "== $$b"; $$b || exit 1; done

install: all
	install -d $(DESTDIR)$(PREFIX)/bin $(DESTDIR)$(PREFIX)/lib $(DESTDIR)$(PREFIX)/include/slowscan
	install -m 755 $(B)/slowscan $(DESTDIR)$(PREFIX)/bin/slowscan
	install -m 644 $(B)/libslowscan.a $(DESTDIR)$(PREFIX)/lib/libslowscan.a
	install -m 644 include/slowscan/*.h $(DESTDIR)$(PREFIX)/include/slowscan/
	install -d $(DESTDIR)$(PREFIX)/share/man/man1
	install -m 644 doc/slowscan.1 $(DESTDIR)$(PREFIX)/share/man/man1/slowscan.1

clean:
	rm -rf $(B)

-include $(shell find $(B) -name '*.d' 2>/dev/null)
