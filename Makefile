# slowscan — build, test, demo, bench, install.
#   make            build/slowscan, the core library (build/libslowscan.a, .so) and the
#                   figure/demo library (build/libslowscan-report.a, .so)
#   make MPI=1      also build/slowscan-mpi, screen shared by the processes of mpirun
#                   (OpenMPI's mpicc; nothing else needs MPI)
#   make check      the test suite, plain and under AddressSanitizer + UBSan
#   make memcheck   the suites that run the command, with it under valgrind (~30 min)
#   make demo       screen the bundled demo data, draw its figures (demo-output/), print the table
#   make bench      speed ratios, measured in one run
#   make validate   the calibration battery at scale, four nulls (~20-30 min): build/validate.md
#   make fuzz       FUZZ_SECONDS=60: each libFuzzer harness of tests/fuzz/ in turn (clang)
#   make install    PREFIX=/usr/local DESTDIR=   (binary, libraries, headers, man page, slowscan.pc)
# `check` and `demo` first install missing Debian packages (scripts/install-deps.sh).

PREFIX  ?= /usr/local
DESTDIR ?=
# The version is written once, in include/slowscan/version.h; the soname carries its major.
VERSION := $(shell sed -n 's/^\#define SLOWSCAN_VERSION_STRING "\(.*\)"/\1/p' include/slowscan/version.h)
SOMAJOR := $(firstword $(subst ., ,$(VERSION)))

CC      ?= cc
CORE_PKGS := gsl fftw3 netcdf
PKGS      := $(CORE_PKGS) plplot
CFLAGS  ?= -O2 -g
WARN    := -std=c11 -Wall -Wextra -Werror -D_POSIX_C_SOURCE=200809L
INCS     = -Iinclude $(shell pkg-config --cflags $(PKGS) 2>/dev/null)
# What the core library needs (nothing of PLplot), what the report library adds, and what
# programs linking both need (the CLI also uses FFTW's thread-safe planner).
CORE_LIBS   = $(shell pkg-config --libs $(CORE_PKGS) 2>/dev/null || echo -lgsl -lgslcblas -lfftw3 -lnetcdf) \
              -lfftw3_threads -lcsv -ludunits2 -lpthread -lm
REPORT_LIBS = $(shell pkg-config --libs plplot 2>/dev/null || echo -lplplot)
LIBS        = $(REPORT_LIBS) $(CORE_LIBS)
SAN     := -fsanitize=address,undefined -fno-omit-frame-pointer -fno-sanitize-recover=undefined

CORE_DIRS := detrend indicators surrogates screen response calendar io library
REPORT_DIRS := report data
CORE_SRC  := $(foreach d,$(CORE_DIRS),$(wildcard $(d)/*.c))
REPORT_SRC := $(foreach d,$(REPORT_DIRS),$(wildcard $(d)/*.c))
LIB_SRC   := $(CORE_SRC) $(REPORT_SRC)
# cli/mpi_*.c are slowscan-mpi's alone (compiled with mpicc); cli/entry.c is the plain main.
MPI_CLI_SRC := $(wildcard cli/mpi_*.c)
CLI_SRC   := $(filter-out $(MPI_CLI_SRC),$(wildcard cli/*.c))
TEST_SRC  := $(wildcard tests/*.c)
BENCH_SRC := $(wildcard bench/*.c)
# Sources shared by benchmark programs (each bench/*.c is its own program).
BENCH_LIB := $(wildcard bench/common/*.c)

B := build
CORE_OBJ  := $(CORE_SRC:%.c=$(B)/obj/%.o)
REPORT_OBJ := $(REPORT_SRC:%.c=$(B)/obj/%.o)
# The shared libraries' objects: position-independent, and every symbol hidden unless its
# declaration says SLOWSCAN_API (include/slowscan/export.h).
CORE_PIC  := $(CORE_SRC:%.c=$(B)/pic/%.o)
REPORT_PIC := $(REPORT_SRC:%.c=$(B)/pic/%.o)
CLI_OBJ   := $(CLI_SRC:%.c=$(B)/obj/%.o)
TEST_OBJ  := $(TEST_SRC:%.c=$(B)/obj/%.o)
SLIB_OBJ  := $(LIB_SRC:%.c=$(B)/asan/%.o)
SCLI_OBJ  := $(CLI_SRC:%.c=$(B)/asan/%.o)
STEST_OBJ := $(TEST_SRC:%.c=$(B)/asan/%.o)
BENCH_BIN := $(BENCH_SRC:bench/%.c=$(B)/bench/%)

.PHONY: all deps check python-check memcheck demo bench validate install install-python clean lib-sources fuzz fuzz-deps
# Programs link the static archives: the binary then runs from the build tree and from any
# prefix without a library path, and the tests may reach module internals.
STATIC_LIBS := $(B)/libslowscan-report.a $(B)/libslowscan.a
SHARED_LIBS := $(B)/libslowscan.so $(B)/libslowscan-report.so
all: $(B)/slowscan $(STATIC_LIBS) $(SHARED_LIBS)

# MPI: with MPI=1 `make` builds slowscan-mpi too; `make check` builds it whenever mpicc exists
# (looked up when its recipe runs, after deps may have installed it).
MPICC ?= mpicc
MPI_OBJ := $(MPI_CLI_SRC:%.c=$(B)/mpi/%.o) $(filter-out $(B)/obj/cli/entry.o,$(CLI_OBJ))
HAVE_MPICC = $(shell command -v $(MPICC) >/dev/null 2>&1 && echo yes)
ifeq ($(MPI),1)
all: $(B)/slowscan-mpi
endif
CHECK_MPI = $(if $(HAVE_MPICC),$(B)/slowscan-mpi)

$(B)/mpi/%.o: %.c
	@mkdir -p $(dir $@)
	@echo "MPICC $<"; $(MPICC) $(CFLAGS) $(WARN) $(INCS) -MMD -MP -c $< -o $@

$(B)/slowscan-mpi: $(MPI_OBJ) $(STATIC_LIBS)
	$(MPICC) $(CFLAGS) -o $@ $(MPI_OBJ) $(STATIC_LIBS) $(LIBS)

deps:
	@sh scripts/install-deps.sh

$(B)/obj/%.o: %.c
	@mkdir -p $(dir $@)
	@echo "CC $<"; $(CC) $(CFLAGS) $(WARN) $(INCS) -MMD -MP -c $< -o $@

$(B)/pic/%.o: %.c
	@mkdir -p $(dir $@)
	@echo "CC(pic) $<"; $(CC) $(CFLAGS) $(WARN) -fPIC -fvisibility=hidden $(INCS) -MMD -MP -c $< -o $@

$(B)/asan/%.o: %.c
	@mkdir -p $(dir $@)
	@echo "CC(san) $<"; $(CC) -O1 -g $(SAN) $(WARN) $(INCS) -MMD -MP -c $< -o $@

$(B)/libslowscan.a: $(CORE_OBJ)
$(B)/libslowscan-report.a: $(REPORT_OBJ)
$(STATIC_LIBS):
	@rm -f $@
	ar rcs $@ $^

# libNAME.so.VERSION with soname libNAME.so.MAJOR, and the two links beside it. Undefined
# symbols are refused, so each library's link line is complete (the core's has no PLplot).
SO_LINK = $(CC) -shared -Wl,-soname,$(patsubst %.$(VERSION),%,$(notdir $@)).$(SOMAJOR) \
          -Wl,--no-undefined -Wl,--as-needed -o $@
$(B)/libslowscan.so.$(VERSION): $(CORE_PIC)
	$(SO_LINK) $^ $(CORE_LIBS)
$(B)/libslowscan-report.so.$(VERSION): $(REPORT_PIC) $(B)/libslowscan.so
	$(SO_LINK) $(REPORT_PIC) -L$(B) -lslowscan $(REPORT_LIBS) $(CORE_LIBS)
$(B)/%.so: $(B)/%.so.$(VERSION)
	ln -sf $(notdir $<) $@.$(SOMAJOR)
	ln -sf $(notdir $@).$(SOMAJOR) $@

$(B)/slowscan: $(CLI_OBJ) $(STATIC_LIBS)
	$(CC) $(CFLAGS) -o $@ $(CLI_OBJ) $(STATIC_LIBS) $(LIBS)

$(B)/run_tests: $(TEST_OBJ) $(STATIC_LIBS)
	$(CC) $(CFLAGS) -o $@ $(TEST_OBJ) $(STATIC_LIBS) $(LIBS)

$(B)/asan/slowscan: $(SCLI_OBJ) $(SLIB_OBJ)
	$(CC) $(SAN) -o $@ $^ $(LIBS)

$(B)/asan/run_tests: $(STEST_OBJ) $(SLIB_OBJ)
	$(CC) $(SAN) -o $@ $^ $(LIBS)

$(B)/bench/%: bench/%.c $(BENCH_LIB) $(wildcard bench/common/*.h) $(STATIC_LIBS)
	@mkdir -p $(dir $@)
	$(CC) -O2 -g $(WARN) $(INCS) -Ibench/common -o $@ $< $(BENCH_LIB) $(STATIC_LIBS) $(LIBS)

# Each run ends in a line "LABEL: N passed, N failed"; the last one is the sanitized run.
# The sanitized run goes ahead when the plain one fails (the calibration battery fails there
# until the fixes it measures land); check fails if either did.
check: deps
	@$(MAKE) --no-print-directory all $(B)/run_tests $(B)/asan/slowscan $(B)/asan/run_tests $(CHECK_MPI) \
	  $(B)/fuzz_replay $(B)/asan/fuzz_replay
	plain=0; SLOWSCAN_BIN=$(B)/slowscan SLOWSCAN_LABEL=plain $(B)/run_tests || plain=1; \
	ASAN_OPTIONS=detect_leaks=1:abort_on_error=0 UBSAN_OPTIONS=print_stacktrace=1 \
	  LSAN_OPTIONS=suppressions=$(CURDIR)/tests/lsan.supp:print_suppressions=0 \
	  SLOWSCAN_BIN=$(B)/asan/slowscan SLOWSCAN_LABEL=sanitized $(B)/asan/run_tests || plain=1; \
	$(MAKE) --no-print-directory python-check || plain=1; exit $$plain

# The Python package's tests (python/tests) against the library just built, not installed:
# SLOWSCAN_LIBRARY points the package at it, SLOWSCAN_BIN the tests at the command.
python-check: all
	SLOWSCAN_LIBRARY=$(CURDIR)/$(B)/libslowscan.so.$(SOMAJOR) SLOWSCAN_BIN=$(CURDIR)/$(B)/slowscan \
	  PYTHONPATH=$(CURDIR)/python PYTHONDONTWRITEBYTECODE=1 \
	  sh -c "/usr/bin/python3 -m pytest -q -p no:cacheprovider python/tests/test_layout.py && /usr/bin/python3 -m pytest -q -p no:cacheprovider python/tests"

# The end-to-end suites with every run of the command under valgrind's memcheck: no leak
# (definite or indirect), no invalid access, no uninitialised value (scripts/memcheck.sh says
# which suites and why; MEMCHECK_SUITES="..." picks others).
memcheck:
	@sh scripts/install-deps.sh valgrind
	@$(MAKE) --no-print-directory $(B)/slowscan $(B)/run_tests
	sh scripts/memcheck.sh $(B)

# Fuzzing (tests/fuzz/, DEVELOPERS.md). The harnesses built without libFuzzer (-DFUZZ_REPLAY)
# with a main that replays the committed corpus and regression inputs: suite `fuzz` of make
# check runs build/fuzz_replay and build/asan/fuzz_replay.
FUZZ_NAMES := csv dates netcdf options lengths
FUZZ_HARNESS_SRC := $(FUZZ_NAMES:%=tests/fuzz/fuzz_%.c) tests/fuzz/fuzz_common.c
REPLAY_SRC := tests/fuzz/replay.c $(FUZZ_HARNESS_SRC)
$(B)/obj/tests/fuzz/%.o $(B)/asan/tests/fuzz/%.o: WARN += -DFUZZ_REPLAY
$(B)/fuzz_replay: $(REPLAY_SRC:%.c=$(B)/obj/%.o) $(filter-out $(B)/obj/cli/entry.o,$(CLI_OBJ)) $(STATIC_LIBS)
	$(CC) $(CFLAGS) -o $@ $^ $(LIBS)
$(B)/asan/fuzz_replay: $(REPLAY_SRC:%.c=$(B)/asan/%.o) $(filter-out $(B)/asan/cli/entry.o,$(SCLI_OBJ)) $(SLIB_OBJ)
	$(CC) $(SAN) -o $@ $^ $(LIBS)

# `make fuzz`: every source built again by clang with libFuzzer's coverage and ASan + UBSan
# (build/fuzz/), one program per harness, each run for FUZZ_SECONDS on its seed corpus
# (tests/fuzz/corpus/NAME) and regressions, one after another. New inputs go to
# FUZZ_SCRATCH/NAME (outside the repository's tracked files), crashes to FUZZ_SCRATCH/NAME-*.
# Only a minimised corpus is committed (DEVELOPERS.md says how).
FUZZ_CC ?= clang
FUZZ_SECONDS ?= 60
FUZZ_SCRATCH ?= $(B)/fuzz-scratch
FUZZ_FLAGS := -g -O1 -fno-omit-frame-pointer -fsanitize=address,undefined -fno-sanitize-recover=undefined
FUZZ_RUN_FLAGS := -rss_limit_mb=2048 -timeout=10 -print_final_stats=1
# netcdf-c allocates names, attributes and tables as large as the header says (up to 2^64
# bytes in CDF-5) before it finds the file shorter, and does not check every allocation
# (DEVELOPERS.md, Fuzzing); under ASan even a lazily mapped allocation makes its shadow
# resident. For that harness an allocation over 2 GiB returns NULL instead of ending the run,
# and the run goes on past a crash or memory overflow (-fork=1 -ignore_*): each input kept in
# FUZZ_SCRATCH/netcdf-* is then replayed to tell netcdf-c's failures from the reader's.
FUZZ_ENV_netcdf := ASAN_OPTIONS=allocator_may_return_null=1:max_allocation_size_mb=2048
FUZZ_FLAGS_netcdf := -fork=1 -ignore_crashes=1 -ignore_ooms=1 -ignore_timeouts=1
FUZZ_OBJ := $(patsubst %.c,$(B)/fuzz/obj/%.o,$(LIB_SRC) $(filter-out cli/entry.c,$(CLI_SRC)))
FUZZ_BIN := $(FUZZ_NAMES:%=$(B)/fuzz/fuzz_%)
# keep the harness objects (make would delete them as intermediates of the pattern rule)
.SECONDARY: $(FUZZ_NAMES:%=$(B)/fuzz/obj/tests/fuzz/fuzz_%.o) $(B)/fuzz/obj/tests/fuzz/fuzz_common.o
$(B)/fuzz/obj/%.o: %.c
	@mkdir -p $(dir $@)
	@echo "CC(fuzz) $<"; $(FUZZ_CC) $(FUZZ_FLAGS) -fsanitize=fuzzer-no-link $(WARN) $(INCS) -MMD -MP -c $< -o $@
$(B)/fuzz/libfuzzed.a: $(FUZZ_OBJ)
	@rm -f $@
	ar rcs $@ $^
# -u slowscan_version: the archive member whose constructor turns GSL's aborting handler off.
$(B)/fuzz/fuzz_%: $(B)/fuzz/obj/tests/fuzz/fuzz_%.o $(B)/fuzz/obj/tests/fuzz/fuzz_common.o $(B)/fuzz/libfuzzed.a
	$(FUZZ_CC) $(FUZZ_FLAGS) -fsanitize=fuzzer -Wl,-u,slowscan_version -o $@ $^ $(LIBS)

fuzz-deps: deps
	@sh scripts/install-deps.sh clang
	@sh scripts/install-deps.sh libclang-rt-$$($(FUZZ_CC) -dumpversion | cut -d. -f1)-dev

# One harness's run (a shell command): its scratch corpus first (libFuzzer writes new inputs
# to the first folder), then the committed seeds and regressions.
FUZZ_RUN = mkdir -p $(FUZZ_SCRATCH)/$(1) tests/fuzz/regressions/$(1) && \
  echo "== fuzz $(1) for $(FUZZ_SECONDS) s" && \
  $(FUZZ_ENV_$(1)) $(B)/fuzz/fuzz_$(1) $(FUZZ_RUN_FLAGS) $(FUZZ_FLAGS_$(1)) -max_total_time=$(FUZZ_SECONDS) \
    -artifact_prefix=$(FUZZ_SCRATCH)/$(1)- $(FUZZ_SCRATCH)/$(1) \
    tests/fuzz/corpus/$(1) tests/fuzz/regressions/$(1)
fuzz: fuzz-deps
	@$(MAKE) --no-print-directory $(FUZZ_BIN)
	@$(foreach h,$(FUZZ_NAMES),$(call FUZZ_RUN,$(h)) && ) true

# The calibration battery of `make check` with more series and every memory-keeping null.
VALIDATE_OBJ := $(B)/obj/tests/validate/validate.o $(B)/obj/tests/check.o \
                $(B)/obj/tests/calibration_cases.o $(B)/obj/tests/test_calibration.o
$(B)/validate: $(VALIDATE_OBJ) $(STATIC_LIBS)
	$(CC) $(CFLAGS) -o $@ $^ $(LIBS)

# The size of --tail gpd on i.i.d. nulls, exactly per set of surrogates (tests/tail_size.c).
$(B)/tail_size: $(B)/obj/tests/validate/tail_size_main.o $(B)/obj/tests/tail_size.o $(STATIC_LIBS)
	$(CC) $(CFLAGS) -o $@ $^ $(LIBS)

validate: deps
	@$(MAKE) --no-print-directory all $(B)/validate $(B)/tail_size
	SLOWSCAN_BIN=$(B)/slowscan $(B)/validate $(B)/validate.md
	$(B)/tail_size | tee $(B)/validate_tail.md

DEMO_OUT ?= demo-output
DEMO_ARGS := --deseason 364 --indicators variance,lag1,recovery_trend
# The forced runs against their control (data/README.md).
FORCED_ARGS := --response tas --baseline data/forced-control.csv --baseline-mode drift
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
	$(B)/slowscan screen --deseason 12 --surrogates 999 --threads 2 \
	  --maps $(DEMO_OUT)/shelf-maps.nc -o $(DEMO_OUT)/shelf-summary.csv data/shelf.nc
	$(B)/slowscan feedback $(FORCED_ARGS) --flux net_flux --skip 20 --figures $(DEMO_OUT) \
	  -o $(DEMO_OUT)/feedback-step4x.csv data/forced-step4x.csv
	$(B)/slowscan timescales $(FORCED_ARGS) --figures $(DEMO_OUT) \
	  -o $(DEMO_OUT)/timescales-step2x.csv data/forced-step2x.csv
	$(B)/slowscan emulate $(FORCED_ARGS) --step-forcing 3.7 --forcing data/forced-ramp.csv:forcing \
	  --compare data/forced-ramp.csv:tas --control data/forced-control.csv:tas \
	  --figures $(DEMO_OUT) -o $(DEMO_OUT)/emulate-ramp.csv data/forced-step2x.csv
	$(B)/slowscan screen --ensemble --surrogates 99 -o $(DEMO_OUT)/overshoot-summary.csv \
	  data/forced-overshoot-high.csv
	@cp $(DEMO_OUT)/screen-reed_inlet.png doc/demo-figure.png
	@$(B)/slowscan screen $(DEMO_ARGS) --format table data/stations.csv

bench: all $(BENCH_BIN)
	@for b in $(BENCH_BIN); do echo "== $$b"; $$b || exit 1; done

# slowscan.pc names PREFIX (not DESTDIR), so it is written at install time; static users
# (pkg-config --static) get the private dependencies too.
PC_SUBST = -e 's|@PREFIX@|$(PREFIX)|' -e 's|@VERSION@|$(VERSION)|' -e 's|@REQUIRES@|$(CORE_PKGS)|'
LIBDIR = $(DESTDIR)$(PREFIX)/lib
# The Python package goes where Debian's /usr/bin/python3 looks for this prefix's packages:
# /usr/lib/python3/dist-packages for /usr, else PREFIX/lib/python3.X/dist-packages (on its
# sys.path for /usr/local); it records where the library is installed (_installed.py).
PYTHON ?= /usr/bin/python3
PYDIR ?= $(if $(filter /usr,$(PREFIX)),/usr/lib/python3/dist-packages,$(shell $(PYTHON) -c \
  'import sys; print("$(PREFIX)/lib/python%d.%d/dist-packages" % sys.version_info[:2])' \
  2>/dev/null || echo $(PREFIX)/lib/python3/dist-packages))
install: all install-python
install-python:
	install -d $(DESTDIR)$(PYDIR)/slowscan/_cdef
	install -m 644 python/slowscan/*.py $(DESTDIR)$(PYDIR)/slowscan/
	install -m 644 python/slowscan/_cdef/*.h python/slowscan/_cdef/README \
	  $(DESTDIR)$(PYDIR)/slowscan/_cdef/
	printf '"""Written by make install."""\nLIBRARY = "%s"\n' \
	  '$(PREFIX)/lib/libslowscan.so.$(SOMAJOR)' > $(DESTDIR)$(PYDIR)/slowscan/_installed.py
	install -d $(DESTDIR)$(PREFIX)/bin $(LIBDIR)/pkgconfig $(DESTDIR)$(PREFIX)/include/slowscan
	install -m 755 $(B)/slowscan $(DESTDIR)$(PREFIX)/bin/slowscan
	install -m 644 $(STATIC_LIBS) $(LIBDIR)/
	for lib in libslowscan libslowscan-report; do \
	  install -m 755 $(B)/$$lib.so.$(VERSION) $(LIBDIR)/ && \
	  ln -sf $$lib.so.$(VERSION) $(LIBDIR)/$$lib.so.$(SOMAJOR) && \
	  ln -sf $$lib.so.$(SOMAJOR) $(LIBDIR)/$$lib.so || exit 1; \
	done
	sed $(PC_SUBST) slowscan.pc.in > $(LIBDIR)/pkgconfig/slowscan.pc
	install -m 644 include/slowscan.h $(DESTDIR)$(PREFIX)/include/slowscan.h
	install -m 644 include/slowscan/*.h $(DESTDIR)$(PREFIX)/include/slowscan/
	install -d $(DESTDIR)$(PREFIX)/share/man/man1
	install -m 644 doc/slowscan.1 $(DESTDIR)$(PREFIX)/share/man/man1/slowscan.1

clean:
	rm -rf $(B)

# The library's sources, one per line (suite library checks that none of them reaches a
# header under cli/).
lib-sources:
	@printf '%s\n' $(LIB_SRC) $(wildcard include/*.h include/slowscan/*.h)

-include $(shell find $(B) -name '*.d' 2>/dev/null)
