/* build/slowscan-mpi under mpirun (make MPI=1): screen's series dealt to the processes,
 * gathered on process 0, which alone writes.
 *
 * Checks of the project against itself (the serial binary is the reference, as in suites
 * golden and store): with 2 and 3 processes the summary, the JSON, the maps and the figures
 * are byte-identical to build/slowscan's, on the golden batch (tests/golden/batch.csv) and
 * on the shelf grid (data/shelf.nc), and so are the messages; a series refused by process 1
 * gives the serial run's one message and exit code and leaves no output; so does a process 1
 * that cannot start while process 0 screens (process 0's one line); --rolling is refused
 * naming the option; a command other than screen runs on process 0 alone, once.
 *
 * Skipped, saying why, when build/slowscan-mpi or mpirun is missing, and in the sanitized run
 * (slowscan-mpi is built plain only). */
#include "check.h"

#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#define MPI_BIN "build/slowscan-mpi"
#define BATCH_ARGS "screen --surrogates 99 --indicators variance,lag1,recovery_trend"
#define SHELF_ARGS "screen --deseason 12 --surrogates 99"
#define AUTO_ARGS "screen --surrogates auto --budget 20000 --indicators variance,lag1,recovery_trend"
#define AUTO_SHELF_ARGS "screen --deseason 12 --surrogates auto --budget 30000"

/* the binaries as absolute paths (the runs change folder), the source tree */
static char serial_bin[1100], mpi_bin[1100], root[512];

/* mpirun refuses root unless told; the machine's two cores take more processes only when
 * oversubscribed. */
static const char *mpirun_prefix(void)
{
    return geteuid() == 0 ? "OMPI_ALLOW_RUN_AS_ROOT=1 OMPI_ALLOW_RUN_AS_ROOT_CONFIRM=1 "
                            "mpirun --oversubscribe"
                          : "mpirun --oversubscribe";
}

/* The lines slowscan said (mpirun may add its own banners). */
static char *slowscan_lines(const char *text)
{
    size_t len = text ? strlen(text) : 0, used = 0;
    char *out = calloc(len + 1, 1);
    for (const char *p = text; out && p && *p;) {
        const char *end = strchr(p, '\n');
        size_t n = end ? (size_t)(end - p) + 1 : strlen(p);
        if (strncmp(p, "slowscan: ", 10) == 0) {
            memcpy(out + used, p, n);
            used += n;
        }
        p += n;
    }
    return out;
}

/* Runs `args` with -o and the given side outputs in a fresh folder DIR (the same file names
 * for every run, since the maps record the command line): the serial binary when procs is
 * 0, else mpirun -np procs. Returns the exit code; *err gets slowscan's messages. */
static int run_in(const char *dir, int procs, const char *env, const char *args,
                  const char *outputs, const char *input, char **err)
{
    char cmd[8192], launcher[1400], *raw = NULL;
    if (procs > 0)
        snprintf(launcher, sizeof launcher, "%s -np %d %s", mpirun_prefix(), procs, mpi_bin);
    else
        snprintf(launcher, sizeof launcher, "%s", serial_bin);
    char path[1100];
    snprintf(path, sizeof path, "%s%s%s", input[0] == '/' ? "" : root,
             input[0] == '/' ? "" : "/", input);
    snprintf(cmd, sizeof cmd, "rm -rf '%s' && mkdir -p '%s' && cd '%s' && %s %s %s %s -o s.csv '%s'",
             dir, dir, dir, env, launcher, args, outputs, path);
    int rc = check_run(cmd, NULL, &raw);
    *err = slowscan_lines(raw);
    free(raw);
    return rc;
}

/* Two folders hold the same files, byte for byte (binary files included). */
static int same_folders(const char *a_dir, const char *b_dir)
{
    char cmd[1100];
    snprintf(cmd, sizeof cmd, "diff -r -q '%s' '%s'", a_dir, b_dir);
    return check_run(cmd, NULL, NULL) == 0;
}

static int left(const char *dir, const char *name)
{
    char path[1100];
    snprintf(path, sizeof path, "%s/%s", dir, name);
    return check_file_exists(path);
}

/* One input screened serially and with 2 and 3 processes; every named output compared. */
static void compare_runs(const char *label, const char *env, const char *args,
                         const char *outputs, const char *input, const char *const *files)
{
    char serial_dir[512];
    snprintf(serial_dir, sizeof serial_dir, "%s", check_tmp_path("serial"));
    char *want = NULL;
    int want_rc = run_in(serial_dir, 0, env, args, outputs, input, &want);
    size_t missing = 0;
    for (size_t f = 0; files[f]; f++)
        missing += !left(serial_dir, files[f]);
    CHECK(want_rc == 0 && missing == 0, "%s: the serial run succeeds (exit %d) and writes its "
          "outputs", label, want_rc);
    for (int procs = 2; procs <= 3; procs++) {
        char dir[512], *got = NULL;
        snprintf(dir, sizeof dir, "%s", check_tmp_path("shared"));
        int rc = run_in(dir, procs, env, args, outputs, input, &got);
        CHECK(rc == 0, "%s, %d processes: exit 0 (got %d)", label, procs, rc);
        CHECK(same_folders(serial_dir, dir),
              "%s, %d processes: every output byte-identical to the serial run's", label, procs);
        CHECK(want && got && strcmp(want, got) == 0,
              "%s, %d processes: the same messages as the serial run\n  serial: %s\n  mpi: %s",
              label, procs, want ? want : "", got ? got : "");
        free(got);
    }
    free(want);
}

/* A series of process 1 refused: the serial run's message and exit code, no output left
 * (`surrogates`: a fixed number, or auto, whose round 1 meets the refusal). */
static void refusal_of_process_one(const char *surrogates)
{
    /* column b (series 1, process 1's) has finite values only at its end: --deseason 10
     * finds a phase of the cycle with no sample */
    const char *csv = check_tmp_path("refused.csv");
    char text[8192];
    size_t used = (size_t)snprintf(text, sizeof text, "time,a,b,c,d\n");
    check_rng *rng = check_rng_alloc(14);
    for (int i = 0; rng && i < 100; i++) {
        double a = check_rng_gaussian(rng), b = check_rng_gaussian(rng);
        double c = check_rng_gaussian(rng), d = check_rng_gaussian(rng);
        char bs[32] = "";
        if (i >= 96)
            snprintf(bs, sizeof bs, "%.4f", b);
        used += (size_t)snprintf(text + used, sizeof text - used, "%d,%.4f,%s,%.4f,%.4f\n", i,
                                 a, bs, c, d);
    }
    check_rng_free(rng);
    CHECK(check_write_file(csv, text) == 0, "refusal: input written");
    char serial_dir[512], dir[512], *want = NULL, *got = NULL;
    snprintf(serial_dir, sizeof serial_dir, "%s", check_tmp_path("refused-serial"));
    snprintf(dir, sizeof dir, "%s", check_tmp_path("refused-shared"));
    char args[512 + 64];
    snprintf(args, sizeof args, "screen %s --deseason 10 --json s.json", surrogates);
    int want_rc = run_in(serial_dir, 0, "", args, "", csv, &want);
    int rc = run_in(dir, 2, "", args, "", csv, &got);
    CHECK(want_rc == 1 && rc == 1, "refusal by process 1 (%s): exit 1 like the serial run (got "
          "%d, serial %d)", surrogates, rc, want_rc);
    CHECK(want && got && strcmp(want, got) == 0 && strstr(got, "column 'b'") &&
              strchr(got, '\n') == strrchr(got, '\n'),
          "refusal by process 1: the serial run's one message naming column 'b'\n  serial: %s"
          "  mpi: %s", want ? want : "", got ? got : "");
    CHECK(!left(dir, "s.csv") && !left(dir, "s.json"),
          "refusal by process 1: no output file left");
    free(want), free(got);
}

/* Process 1 cannot start (its input is missing, as on a node that does not see the file: a
 * launch of two programs gives it another file) while process 0, which does not wait for the
 * others to start, is screening: process 0 stops, says so in one line, exits 1, and leaves
 * no output. */
static void start_failure_of_process_one(void)
{
    char dir[512], cmd[8192], *raw = NULL;
    snprintf(dir, sizeof dir, "%s", check_tmp_path("unstarted"));
    snprintf(cmd, sizeof cmd, "rm -rf '%s' && mkdir -p '%s' && cd '%s' && %s -np 1 %s %s -o s.csv "
             "'%s/tests/golden/batch.csv' : -np 1 %s %s -o s.csv missing.csv", dir, dir, dir,
             mpirun_prefix(), mpi_bin, BATCH_ARGS, root, mpi_bin, BATCH_ARGS);
    int rc = check_run(cmd, NULL, &raw);
    char *got = slowscan_lines(raw);
    CHECK(rc == 1 && got && strcmp(got, "slowscan: another process of the run could not start "
                                        "(exit code 1)\n") == 0,
          "process 1 cannot start: exit 1 (got %d) and process 0's one message: %s", rc,
          got ? got : "");
    CHECK(!left(dir, "s.csv"), "process 1 cannot start: no output file left");
    free(raw), free(got);
}

/* --rolling under several processes: refused, naming the option, nothing written. */
static void rolling_refused(void)
{
    char dir[512], *got = NULL;
    snprintf(dir, sizeof dir, "%s", check_tmp_path("rolling"));
    int rc = run_in(dir, 2, "", BATCH_ARGS, "--rolling r.csv", "tests/golden/batch.csv", &got);
    CHECK(rc == 1 && got && strstr(got, "option --rolling") && strchr(got, '\n') == strrchr(got, '\n'),
          "--rolling with 2 processes: exit 1 (got %d) and one message naming --rolling: %s", rc,
          got ? got : "");
    CHECK(!left(dir, "s.csv") && !left(dir, "r.csv"),
          "--rolling with 2 processes: no output file left");
    free(got);
}

/* Another command: process 0 alone runs it, so its output is the serial one, once. */
static void other_command(void)
{
    char serial_dir[512], dir[512], *want = NULL, *got = NULL;
    snprintf(serial_dir, sizeof serial_dir, "%s", check_tmp_path("detrend-serial"));
    snprintf(dir, sizeof dir, "%s", check_tmp_path("detrend-shared"));
    const char *args = "detrend --deseason 364 --vars reed_inlet,deep_basin";
    int want_rc = run_in(serial_dir, 0, "", args, "", "data/stations.csv", &want);
    int rc = run_in(dir, 2, "", args, "", "data/stations.csv", &got);
    CHECK(want_rc == 0 && rc == 0 && same_folders(serial_dir, dir) && want && got &&
              strcmp(want, got) == 0,
          "detrend with 2 processes: run by process 0 alone, output and messages as serial");
    free(want), free(got);
}

void suite_mpi(void)
{
    const char *label = getenv("SLOWSCAN_LABEL");
    if (label && strcmp(label, "sanitized") == 0) {
        fprintf(stderr, "mpi: skipped in the sanitized build (slowscan-mpi is built plain only)\n");
        return;
    }
    if (access(MPI_BIN, X_OK) != 0 || check_run("command -v mpirun", NULL, NULL) != 0) {
        fprintf(stderr, "mpi: skipped: %s\n", access(MPI_BIN, X_OK) != 0
                    ? MPI_BIN " is missing (make MPI=1 builds it; needs libopenmpi-dev)"
                    : "mpirun is missing (Debian package openmpi-bin)");
        return;
    }
    if (!getcwd(root, sizeof root)) {
        CHECK(0, "mpi: the working folder");
        return;
    }
    const char *bin = check_binary();
    snprintf(serial_bin, sizeof serial_bin, "%s%s%s", bin[0] == '/' ? "" : root,
             bin[0] == '/' ? "" : "/", bin);
    snprintf(mpi_bin, sizeof mpi_bin, "%s/%s", root, MPI_BIN);
    static const char *const batch_files[] = {"s.csv", "s.json", NULL}, *table[] = {"s.csv", NULL};
    compare_runs("golden batch", "", BATCH_ARGS, "--json s.json", "tests/golden/batch.csv",
                 batch_files);
    /* every record through the spill files: the processes' own and process 0's store; and
     * sent to process 0 two records to a bundle (~3.3 kB each), not all in one */
    compare_runs("golden batch, spilled, small bundles",
                 "SLOWSCAN_SPILL_AFTER=0 SLOWSCAN_SHARE_BUNDLE=7000",
                 BATCH_ARGS "  --format table", "", "tests/golden/batch.csv", table);
    static const char *const auto_shelf_files[] = {"s.csv", "s.json", "s.nc", NULL};
    static const char *const shelf_files[] = {"s.csv", "s.json", "s.nc", "f/screen-overview.png",
                                              NULL};
    compare_runs("shelf grid", "", SHELF_ARGS, "--json s.json --maps s.nc --figures f",
                 "data/shelf.nc", shelf_files);
    /* --surrogates auto: each process draws its own series' rounds, the counts are summed
     * after each; decisions, p and flags as the serial run's */
    compare_runs("golden batch, --surrogates auto", "", AUTO_ARGS, "--json s.json",
                 "tests/golden/batch.csv", batch_files);
    compare_runs("shelf grid, --surrogates auto", "", AUTO_SHELF_ARGS, "--json s.json --maps s.nc",
                 "data/shelf.nc", auto_shelf_files);
    refusal_of_process_one("--surrogates 19");
    refusal_of_process_one("--surrogates auto");
    start_failure_of_process_one();
    rolling_refused();
    other_command();
}
