/* Benchmark of many series through the binary (the batch driver behind `slowscan screen`):
 *
 * 1. Thread scaling: 2000 series x 500 samples of AR(1) noise, `screen --surrogates 19` at
 *    --threads 1 and --threads 2 (alternating, best of 2 each); prints the speed-up (target
 *    >= 1.7x on two cores) and fails when the two outputs are not byte-identical (the same
 *    seed gives the same numbers whatever the thread count).
 * 3. Processes (below peak memory in the file): mpirun -np 1 vs 2 of build/slowscan-mpi.
 * 2. Peak memory: the children's peak resident set (wait4's rusage, ru_maxrss) of
 *    `screen --surrogates 0 --threads 1` on 10^3 and on 10^4 series of 1000 samples, side by
 *    side (target: within 20% of each other, under 150 MB). The batch driver holds only a
 *    few series per thread, the screen store spills the results past 4096 series, and a CSV
 *    over 64 MiB is read once into an unnamed temporary copy and walked a table of series
 *    at a time, so nothing grows with the number of series.
 *
 * Inputs and outputs live in a scratch folder under $TMPDIR (or /tmp), removed at exit. The
 * binary is $SLOWSCAN_BIN, else build/slowscan. Timings are one run's on a shared machine:
 * ratios only, and the load average is printed beside them. */
#define _DEFAULT_SOURCE /* wait4, getloadavg */

#include <gsl/gsl_randist.h>
#include <gsl/gsl_rng.h>

#include <dirent.h>
#include <errno.h>
#include <fcntl.h>
#include <math.h>
#include <signal.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/resource.h>
#include <sys/time.h>
#include <sys/types.h>
#include <sys/wait.h>
#include <time.h>
#include <unistd.h>

enum { MAX_FILES = 16 };
static char scratch[4096];
static char *made[MAX_FILES];
static size_t nmade;
static volatile pid_t running_child;      /* the screen being run, for the signal handler */
static volatile sig_atomic_t interrupted; /* the signal that asked us to stop, or 0 */

/* Removes everything in the scratch folder, then the folder: the files this run made and
 * whatever a screen stopped by a signal left behind (its atomic writer's temporary file). */
static void remove_scratch(void)
{
    DIR *d = *scratch ? opendir(scratch) : NULL;
    for (struct dirent *e; d && (e = readdir(d));) {
        char path[4400];
        if (strcmp(e->d_name, ".") != 0 && strcmp(e->d_name, "..") != 0) {
            snprintf(path, sizeof path, "%s/%s", scratch, e->d_name);
            unlink(path);
        }
    }
    if (d)
        closedir(d);
    if (*scratch)
        rmdir(scratch);
    *scratch = '\0';
    for (size_t i = 0; i < nmade; i++)
        free(made[i]);
    nmade = 0;
}

/* Interrupted (Ctrl-C, a kill): stop the screen being run, and let the main line exit
 * through remove_scratch once it has reaped it (wait4 returns EINTR; the CSV writer checks
 * between rows), so no scratch table of ~100 MB is left in /tmp. */
static void on_signal(int sig)
{
    interrupted = sig;
    if (running_child > 0)
        kill(running_child, SIGTERM);
}

static void stop_if_interrupted(void)
{
    if (interrupted) {
        fprintf(stderr, "bench_batch: interrupted, scratch folder removed\n");
        exit(128 + interrupted);
    }
}

/* A path in the scratch folder, remembered for removal. */
static const char *scratch_file(const char *name)
{
    char path[4200];
    snprintf(path, sizeof path, "%s/%s", scratch, name);
    for (size_t i = 0; i < nmade; i++)
        if (strcmp(made[i], path) == 0)
            return made[i];
    if (nmade == MAX_FILES)
        return NULL;
    made[nmade] = strdup(path);
    return made[nmade] ? made[nmade++] : NULL;
}

static double now(void)
{
    struct timespec t;
    clock_gettime(CLOCK_MONOTONIC, &t);
    return (double)t.tv_sec + 1e-9 * (double)t.tv_nsec;
}

/* Writes `series` columns of n samples of AR(1) noise (coefficient 0.5, unit innovations,
 * started at 0) with a time column 0..n-1. One generator with a fixed seed draws row by row,
 * so the file is the same on every run and only one row of state is held. */
static int write_ar1_csv(const char *path, size_t series, size_t n, unsigned long seed)
{
    FILE *f = fopen(path, "w");
    double *x = calloc(series, sizeof *x);
    gsl_rng *r = gsl_rng_alloc(gsl_rng_mt19937);
    int ok = f && x && r;
    if (ok) {
        gsl_rng_set(r, seed);
        fputs("time", f);
        for (size_t j = 0; j < series; j++)
            fprintf(f, ",s%zu", j);
        fputc('\n', f);
        for (size_t i = 0; i < n; i++) {
            fprintf(f, "%zu", i);
            for (size_t j = 0; j < series; j++) {
                x[j] = 0.5 * x[j] + gsl_ran_gaussian_ziggurat(r, 1.0);
                fprintf(f, ",%.6g", x[j]);
            }
            fputc('\n', f);
            if (interrupted)
                break;
        }
    }
    gsl_rng_free(r);
    free(x);
    if (f && fclose(f) != 0)
        ok = 0;
    stop_if_interrupted();
    return ok ? 0 : -1;
}

typedef struct {
    double seconds, cpu; /* wall; user + system of the child */
    long maxrss_kb;
} child_cost;

/* Runs `bin screen ARGS... -o out input` with stderr into the scratch folder (the screen's
 * leakage notes would drown the report); wall time and the child's own peak RSS from wait4.
 * On failure prints the child's messages and returns -1. */
static int run_argv(const char *const *argv, const char *input, child_cost *cost);

/* `bin screen --no-progress ARGS... -o out input`, as run_argv. */
static int run_screen(const char *bin, const char *const *args, const char *input,
                      const char *out, child_cost *cost)
{
    const char *argv[24] = {bin, "screen", "--no-progress"};
    size_t argc = 3;
    for (; *args && argc < 18; args++)
        argv[argc++] = *args;
    argv[argc++] = "-o";
    argv[argc++] = out;
    argv[argc++] = input;
    argv[argc] = NULL;
    return run_argv(argv, input, cost);
}

static int run_argv(const char *const *argv, const char *input, child_cost *cost)
{
    const char *bin = argv[0];
    const char *err = scratch_file("stderr.txt");
    if (!err)
        return -1;
    double t0 = now();
    pid_t pid = fork();
    if (pid == 0) {
        int fd = open(err, O_WRONLY | O_CREAT | O_TRUNC, 0600);
        if (fd >= 0)
            dup2(fd, STDERR_FILENO);
        execvp(bin, (char *const *)argv);
        _exit(127);
    }
    running_child = pid;
    int status = 0;
    struct rusage ru;
    pid_t waited = -1;
    if (interrupted && pid > 0) /* the signal came before the handler could see the child */
        kill(pid, SIGTERM);
    while (pid > 0 && (waited = wait4(pid, &status, 0, &ru)) < 0 && errno == EINTR) {
    }
    running_child = 0;
    stop_if_interrupted();
    if (waited != pid || !WIFEXITED(status)
        || WEXITSTATUS(status) != 0) {
        fprintf(stderr, "bench_batch: %s failed on %s (set SLOWSCAN_BIN); it said:\n", bin,
                input);
        FILE *f = fopen(err, "r");
        char line[512];
        for (int k = 0; f && k < 5 && fgets(line, sizeof line, f); k++)
            fputs(line, stderr);
        if (f)
            fclose(f);
        return -1;
    }
    cost->seconds = now() - t0;
    cost->cpu = (double)ru.ru_utime.tv_sec + 1e-6 * (double)ru.ru_utime.tv_usec
                + (double)ru.ru_stime.tv_sec + 1e-6 * (double)ru.ru_stime.tv_usec;
    cost->maxrss_kb = ru.ru_maxrss; /* kilobytes on Linux */
    return 0;
}

/* 1 when the two files hold the same bytes. */
static int same_bytes(const char *a, const char *b)
{
    FILE *fa = fopen(a, "rb"), *fb = fopen(b, "rb");
    int same = fa && fb;
    while (same) {
        int ca = getc(fa), cb = getc(fb);
        if (ca != cb)
            same = 0;
        if (ca == EOF || cb == EOF)
            break;
    }
    if (fa)
        fclose(fa);
    if (fb)
        fclose(fb);
    return same;
}

static void print_load(void)
{
    double load[3];
    if (getloadavg(load, 3) == 3)
        printf(" (load average %.2f %.2f %.2f on %ld cores, shared)", load[0], load[1], load[2],
               sysconf(_SC_NPROCESSORS_ONLN));
}

/* CPU time over wall time says how many cores a run actually got: on a shared host a
 * two-thread (or two-process) run may be given one, and then its speed-up says nothing of
 * `measured`. `flag` names the setting ("--threads", "-np"), best[0] and best[1] its runs at
 * 1 and 2. */
static void print_cores(const char *flag, const child_cost best[2], const char *run,
                        const char *measured)
{
    double cores = best[1].cpu / best[1].seconds;
    printf("\ncores used: %s 1 %.2f, %s 2 %.2f (CPU %.2f s vs %.2f s)", flag,
           best[0].cpu / best[0].seconds, flag, cores, best[0].cpu, best[1].cpu);
    if (cores < 1.5)
        printf("; the machine did not give the %s two cores, so its speed-up is not a measure "
               "of the %s", run, measured);
}

/* Part 1: --threads 1 against --threads 2, alternating, best of 2 each; outputs compared. */
static int thread_scaling(const char *bin)
{
    enum { SERIES = 2000, SAMPLES = 500, ROUNDS = 2 };
    const char *input = scratch_file("scaling.csv");
    const char *out[2] = {scratch_file("threads1.csv"), scratch_file("threads2.csv")};
    const char *first = scratch_file("threads1_first.csv");
    if (!input || !out[0] || !out[1] || !first || write_ar1_csv(input, SERIES, SAMPLES, 11) != 0) {
        fprintf(stderr, "bench_batch: cannot write the scaling input in %s\n", scratch);
        return -1;
    }
    static const char *const threads[2] = {"1", "2"};
    child_cost best[2] = {{INFINITY, 0, 0}, {INFINITY, 0, 0}};
    for (int round = 0; round < ROUNDS; round++)
        for (int t = 0; t < 2; t++) {
            const char *args[] = {"--surrogates", "19", "--threads", threads[t], NULL};
            child_cost c;
            if (run_screen(bin, args, input, out[t], &c) != 0)
                return -1;
            if (c.seconds < best[t].seconds)
                best[t] = c;
            if (round == 0 && t == 0 && rename(out[0], first) != 0)
                return -1;
        }
    int identical = same_bytes(out[0], out[1]) && same_bytes(first, out[0]);
    printf("screen --surrogates 19 on %d series x %d samples (AR(1) noise): --threads 1 %.2f s, "
           "--threads 2 %.2f s, speed-up %.2fx (target >= 1.7x on two cores)", SERIES, SAMPLES,
           best[0].seconds, best[1].seconds, best[0].seconds / best[1].seconds);
    print_load();
    print_cores("--threads", best, "two-thread run", "driver");
    printf("\noutputs at --threads 1 and 2: %s\n",
           identical ? "byte-identical" : "FAIL: they differ");
    return identical ? 0 : -1;
}

/* Part 3: processes. `mpirun -np 1` vs `-np 2` of build/slowscan-mpi (made by make MPI=1) on
 * the same series, one thread each: the speed-up (target >= 1.7x on two cores) and the
 * outputs byte-identical to the serial binary's. Skipped, saying why, without mpirun or the
 * binary. */
static int process_scaling(const char *bin)
{
    const char *mpi = "build/slowscan-mpi";
    if (access(mpi, X_OK) != 0 || system("command -v mpirun >/dev/null 2>&1") != 0) {
        printf("processes: skipped (%s)\n", access(mpi, X_OK) != 0
                   ? "no build/slowscan-mpi: make MPI=1 builds it" : "no mpirun");
        return 0;
    }
    if (geteuid() == 0) { /* OpenMPI refuses root unless told */
        setenv("OMPI_ALLOW_RUN_AS_ROOT", "1", 1);
        setenv("OMPI_ALLOW_RUN_AS_ROOT_CONFIRM", "1", 1);
    }
    const char *input = scratch_file("scaling.csv"); /* written by thread_scaling */
    const char *serial = scratch_file("serial.csv");
    const char *out[2] = {scratch_file("ranks1.csv"), scratch_file("ranks2.csv")};
    const char *args[] = {"--surrogates", "19", "--threads", "1", NULL};
    child_cost c, best[2] = {{INFINITY, 0, 0}, {INFINITY, 0, 0}};
    if (!input || !serial || !out[0] || !out[1] || run_screen(bin, args, input, serial, &c) != 0)
        return -1;
    static const char *const ranks[2] = {"1", "2"};
    for (int round = 0; round < 2; round++)
        for (int r = 0; r < 2; r++) {
            const char *argv[] = {"mpirun", "--oversubscribe", "-np", ranks[r], mpi, "screen",
                                  "--no-progress", "--surrogates", "19", "--threads", "1",
                                  "-o", out[r], input, NULL};
            if (run_argv(argv, input, &c) != 0)
                return -1;
            if (c.seconds < best[r].seconds)
                best[r] = c;
        }
    int identical = same_bytes(serial, out[0]) && same_bytes(serial, out[1]);
    printf("processes: mpirun -np 1 %.2f s, -np 2 %.2f s, speed-up %.2fx (target >= 1.7x on two "
           "cores); outputs %s", best[0].seconds, best[1].seconds,
           best[0].seconds / best[1].seconds,
           identical ? "byte-identical to the serial binary's" : "FAIL: they differ");
    print_load();
    /* mpirun waits for the processes it starts, so its rusage holds theirs. */
    print_cores("-np", best, "two-process run", "code");
    putchar('\n');
    return identical ? 0 : -1;
}

/* Part 2: peak RSS of a no-surrogate screen on 10^3 and on 10^4 series. */
static int peak_memory(const char *bin)
{
    enum { SAMPLES = 1000 };
    static const size_t counts[2] = {1000, 10000};
    child_cost c[2];
    long bytes[2];
    for (int k = 0; k < 2; k++) {
        const char *input = scratch_file(k ? "memory4.csv" : "memory3.csv");
        const char *out = scratch_file("memory_out.csv");
        const char *args[] = {"--surrogates", "0", "--threads", "1", NULL};
        if (!input || !out || write_ar1_csv(input, counts[k], SAMPLES, 13 + (unsigned)k) != 0) {
            fprintf(stderr, "bench_batch: cannot write the memory input in %s\n", scratch);
            return -1;
        }
        FILE *f = fopen(input, "rb");
        bytes[k] = f && fseek(f, 0, SEEK_END) == 0 ? ftell(f) : -1;
        if (f)
            fclose(f);
        if (run_screen(bin, args, input, out, &c[k]) != 0)
            return -1;
        unlink(input); /* the 10^4 table is ~100 MB: not kept longer than needed */
    }
    printf("peak RSS of screen --surrogates 0 --threads 1, series of %d samples: %zu series "
           "%.1f MB (input %.1f MB, %.1f s) | %zu series %.1f MB (input %.1f MB, %.1f s); "
           "ratio %.1fx for 10x the series\n", SAMPLES, counts[0], c[0].maxrss_kb / 1024.0,
           bytes[0] / 1048576.0, c[0].seconds, counts[1], c[1].maxrss_kb / 1024.0,
           bytes[1] / 1048576.0, c[1].seconds, (double)c[1].maxrss_kb / (double)c[0].maxrss_kb);
    /* Held whole, a table's values are 8 bytes each; past 64 MiB of CSV it is read a table
     * of series at a time instead (cli/inputs.c). */
    for (int k = 0; k < 2; k++) {
        double table = (double)counts[k] * SAMPLES * sizeof(double) / 1048576.0;
        int streamed = bytes[k] > (64L << 20);
        printf("%s%zu series: %s", k ? " | " : "the table's values: at ", counts[k],
               streamed ? "read a table of series at a time" : "held whole, ");
        if (!streamed)
            printf("%.1f MB", table);
    }
    double ratio = (double)c[1].maxrss_kb / (double)c[0].maxrss_kb;
    printf("\npeak RSS target (within 20%% of each other, under 150 MB): %s",
           ratio <= 1.2 && c[1].maxrss_kb < 150 * 1024 ? "met" : "NOT met");
    putchar('\n');
    return 0;
}

int main(void)
{
    const char *bin = getenv("SLOWSCAN_BIN");
    bin = bin && *bin ? bin : "build/slowscan";
    const char *tmp = getenv("TMPDIR");
    snprintf(scratch, sizeof scratch, "%s/bench_batch.XXXXXX", tmp && *tmp ? tmp : "/tmp");
    if (!mkdtemp(scratch)) {
        perror("bench_batch: scratch folder");
        return 1;
    }
    atexit(remove_scratch);
    struct sigaction sa = {0}; /* no SA_RESTART: wait4 must return to notice the signal */
    sa.sa_handler = on_signal;
    sigemptyset(&sa.sa_mask);
    sigaction(SIGINT, &sa, NULL);
    sigaction(SIGTERM, &sa, NULL);
    sigaction(SIGHUP, &sa, NULL);
    int rc = thread_scaling(bin) == 0 ? 0 : 1;
    if (process_scaling(bin) != 0)
        rc = 1;
    if (peak_memory(bin) != 0)
        rc = 1;
    return rc;
}
