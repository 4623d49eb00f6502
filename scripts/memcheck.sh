#!/bin/sh
# make memcheck: the end-to-end suites with every run of the command under valgrind's
# memcheck. The test runner starts the command through $SLOWSCAN_BIN, so it is pointed at a
# wrapper that runs build/slowscan under valgrind, one log per process. The run passes when
# the suites pass and no log holds an error: an invalid read or write, a use of an
# uninitialised value, or a definite or indirect leak (possible leaks and memory still
# reachable at exit are reported by valgrind but are not errors here).
#
#   scripts/memcheck.sh [BUILD_DIR]     (MEMCHECK_SUITES="cli maps" to choose suites, "all" for
#                                        every suite named here)
#
# Suites covered by default: the suites whose cases run the command, within about 30 minutes
# on two shared cores. Left out or cut, with the reason:
#   ensemble, forced,    in "all" only: the paths they add (screen --ensemble, the forced-run
#   messages, projection ensembles, refusal wording, recovery --project) are cut for time;
#   interrupt, progress  time-driven (signals after a delay, a progress line every N s):
#                        valgrind's slowdown changes what they measure, not what we check;
#   mpi                  runs slowscan-mpi under mpirun, not $SLOWSCAN_BIN;
#   library              builds and runs programs against an install, not the command;
#   calibration          400 series x 55 cases: hours under valgrind (its code paths are
#                        screen's, which cli, golden and sequential run);
#   golden               at --threads 1 and 2 (GOLDEN_MAX_THREADS=2): a third adds no path;
#   tail, significance,  screens with 199-1000 surrogates (report: 99999) that would take
#   deseason, co2,       most of an hour more; the paths they add (the aaft and iaaft nulls,
#   report,              --tail gpd, the per-window indicators, harmonics) are run once each
#   figure_layout        by the extra screens at the end; figures are drawn in cli and store.
set -u
B=${1:-build}
ROOT=$(cd "$(dirname "$0")/.." && pwd)
# The default list keeps to about 30 minutes; MEMCHECK_SUITES=all adds ensemble, forced,
# messages and projection. Measured on two cores with a make check running beside it: all 20
# suites in 34.5 min (ensemble 6, forced 3.2, messages 0.7, projection 0.3 of them), so the
# default list in about 24; alone on the machine, make memcheck took 12.2 min (299 runs).
DEFAULT="cli dated_cli merge resume maps store netcdf robustness leakage golden feedback
timescales emulate sequential edges limits"
SUITES=${MEMCHECK_SUITES:-$DEFAULT}
[ "$SUITES" = all ] && SUITES="$DEFAULT ensemble forced messages projection"
command -v valgrind >/dev/null 2>&1 || { echo "memcheck: valgrind is not installed" >&2; exit 1; }
[ -x "$B/slowscan" ] && [ -x "$B/run_tests" ] || { echo "memcheck: build $B/slowscan and $B/run_tests first" >&2; exit 1; }

LOGS=$(mktemp -d "${TMPDIR:-/tmp}/slowscan-memcheck.XXXXXX")
WRAP="$LOGS/slowscan"
# Copies of the binaries: a rebuild during the long run must not change what is checked.
cp "$B/slowscan" "$LOGS/slowscan.bin" && cp "$B/run_tests" "$LOGS/run_tests" || exit 1
# --track-origins says where an uninitialised value came from, at twice the time: asked
# for with MEMCHECK_ORIGINS=1 when an error needs explaining.
ORIGINS=
[ "${MEMCHECK_ORIGINS:-0}" = 1 ] && ORIGINS=--track-origins=yes
# 97: valgrind found an error (the suites see it as a wrong exit status as well as the log).
# valgrind keeps files of its own in $TMPDIR and says so on stderr when it cannot: a run given
# a TMPDIR that does not exist (suite store's refusal of one) runs without it, and is counted.
cat > "$WRAP" <<EOF
#!/bin/sh
if [ -n "\${TMPDIR:-}" ] && [ ! -d "\$TMPDIR" ]; then
    echo "\$*" >> "$LOGS/unchecked"
    exec "$LOGS/slowscan.bin" "\$@"
fi
exec valgrind --leak-check=full --errors-for-leak-kinds=definite,indirect \\
  --show-leak-kinds=definite,indirect $ORIGINS --error-exitcode=97 \\
  --suppressions="$ROOT/tests/valgrind.supp" --log-file="$LOGS/vg.%p.log" \\
  "$LOGS/slowscan.bin" "\$@"
EOF
chmod +x "$WRAP"

# golden at --threads 1 and 2 only (a third thread takes no other path)
export GOLDEN_MAX_THREADS=2
start=$(date +%s)
status=0
for s in $SUITES; do
    t0=$(date +%s)
    SLOWSCAN_BIN="$WRAP" SLOWSCAN_LABEL="memcheck $s" "$LOGS/run_tests" "$s" || status=1
    echo "memcheck: suite $s took $(( $(date +%s) - t0 )) s"
done

# Paths the suites above do not take through the command: the amplitude-keeping nulls, the
# tail fit, the per-window and higher-moment indicators, a seasonal cycle of harmonics.
t0=$(date +%s)
G=tests/golden/batch.csv
for args in "--null aaft --surrogates 19 --vars s0,s1" \
            "--null iaaft --surrogates 19 --vars s0,s1" \
            "--tail gpd --surrogates 1000 --threads 2 --vars s0" \
            "--indicators redness,spectral_exponent,dfa,cv,skewness,kurtosis,sd,ar1,recovery --surrogates 19 --vars s0,s1" \
            "--deseason 12.5 --harmonics 2 --surrogates 19 --vars s0"; do
    # shellcheck disable=SC2086
    "$WRAP" screen --no-progress $args -o /dev/null "$G" 2>/dev/null ||
        { echo "memcheck: screen $args failed"; status=1; }
done
echo "memcheck: extra screens took $(( $(date +%s) - t0 )) s"

# A log with errors in it: valgrind writes each error as it happens, and the summary's
# count (which includes the definite and indirect leaks) at exit.
runs=$(ls "$LOGS"/vg.*.log 2>/dev/null | wc -l)
bad=$(grep -L "ERROR SUMMARY: 0 errors" "$LOGS"/vg.*.log 2>/dev/null |
      xargs -r grep -l "ERROR SUMMARY\|Invalid \|uninitialised\|definitely lost\|indirectly lost" 2>/dev/null)
# Processes a test kills on purpose (resume's kill -9) end without a summary: counted, and
# failed only if they logged an error before they died (the grep above).
killed=$(grep -L "ERROR SUMMARY" "$LOGS"/vg.*.log 2>/dev/null | wc -l)
unchecked=$(cat "$LOGS/unchecked" 2>/dev/null | wc -l)
echo "memcheck: $runs runs of the command under valgrind, $killed ended by a signal before exit," \
     "$unchecked run without it (TMPDIR missing), $(( $(date +%s) - start )) s"
if [ -n "$bad" ]; then
    for f in $bad; do echo "== $f"; cat "$f"; done
    echo "memcheck: valgrind found errors in $(echo "$bad" | wc -l) runs (logs kept in $LOGS)"
    exit 1
fi
[ $status -eq 0 ] || { echo "memcheck: a suite failed under valgrind (logs kept in $LOGS)"; exit 1; }
rm -rf "$LOGS"
echo "memcheck: no errors"
