/* End-to-end tests of the slowscan command through the binary: every command, the output
 * formats of DESIGN §4, and the bad-input contract (exit 1, one message naming the file, row,
 * column or option, no output file left behind). */
#include "check.h"
#include "slowscan/demo.h"

#include <gsl/gsl_statistics_double.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

static char *run_out, *run_err;

/* Runs "slowscan ARGS" and keeps stdout/stderr in run_out/run_err. */
static int slowscan(const char *args)
{
    free(run_out);
    free(run_err);
    char cmd[4096];
    snprintf(cmd, sizeof cmd, "%s %s", check_binary(), args);
    return check_run(cmd, &run_out, &run_err);
}

static size_t count_lines(const char *s)
{
    size_t n = 0;
    for (; s && *s; s++)
        n += *s == '\n';
    return n;
}

/* A bad input: exit 1, exactly one line on stderr containing `needle`, no output file. */
static void expect_rejected(const char *what, const char *csv, const char *args, const char *needle)
{
    const char *in = check_tmp_path("bad.csv"), *out = check_tmp_path("bad-out.csv");
    remove(out);
    check_write_file(in, csv);
    char line[2048];
    snprintf(line, sizeof line, "%s -o %s %s", args, out, in);
    int rc = slowscan(line);
    CHECK(rc == 1, "%s: exit %d, want 1 (stderr: %s)", what, rc, run_err ? run_err : "");
    CHECK(run_err && count_lines(run_err) == 1, "%s: want one message line, got: %s", what,
          run_err ? run_err : "(none)");
    CHECK(run_err && strstr(run_err, needle), "%s: message lacks '%s': %s", what, needle,
          run_err ? run_err : "");
    CHECK(!check_file_exists(out) && check_scratch_files("bad-out.csv") == 0,
          "%s: an output file was left behind", what);
}

/* A small regular series: time 0..n-1, a rising-variance column and a plain one. */
static char *make_csv(size_t n, unsigned long seed)
{
    check_rng *rng = check_rng_alloc(seed);
    size_t cap = 64 * n + 64, len = 0;
    char *s = malloc(cap);
    len += (size_t)snprintf(s + len, cap - len, "time,rising,steady\n");
    for (size_t i = 0; i < n; i++) {
        double grow = 0.2 + 2.0 * (double)i / (double)n;
        len += (size_t)snprintf(s + len, cap - len, "%zu,%.9f,%.9f\n", i,
                                5 + grow * check_rng_gaussian(rng), 3 + check_rng_gaussian(rng));
    }
    check_rng_free(rng);
    return s;
}

static void test_help_and_version(void)
{
    CHECK(slowscan("--version") == 0 && strstr(run_out, "slowscan "), "--version");
    CHECK(slowscan("help") == 0 && strstr(run_out, "screen"), "help lists commands");
    const char *cmds[] = {"screen", "indicators", "detrend", "demo", "robustness", "recovery",
                          "surrogates"};
    for (size_t i = 0; i < 7; i++) {
        char a[64];
        snprintf(a, sizeof a, "%s --help", cmds[i]);
        CHECK(slowscan(a) == 0 && strstr(run_out, "usage: slowscan"), "%s --help", cmds[i]);
    }
    /* DESIGN §7: the cautions are part of screen's help. */
    CHECK(slowscan("help screen") == 0 && strstr(run_out, "not forecasts") &&
              strstr(run_out, "null model"), "screen help carries the cautions");
    CHECK(slowscan("nonsense") == 1, "unknown command exits 1");
    /* Every option is documented in the man page and in some command's --help. */
    static const char *options[] = {"--time", "--vars", "--from", "--until", "--log", "--resample",
        "--detrend", "--bandwidth", "--deseason", "--deseason-window", "--harmonics", "--window", "--indicators", "--min-coverage",
        "--recovery", "--surrogates", "--null", "--iaaft-tol", "--iaaft-iterations",
        "--block-length", "--alternative", "--fdr", "--seed", "--threads", "--rolling", "--json",
        "--format", "--windows", "--bandwidths", "--fractions", "--control", "--progress", "--quiet", "-o",
        "--noise-trend", "--figures", "--figure-format", "--detrends", "--ensemble", "--members",
        "--member-anomalies"};
    char *man = check_read_file("doc/slowscan.1");
    char *helps = NULL;
    char loop[600];
    snprintf(loop, sizeof loop, "for c in screen robustness surrogates recovery; do %s help $c; done",
             check_binary());
    check_run(loop, &helps, NULL);
    for (size_t i = 0; i < sizeof options / sizeof options[0]; i++) {
        char roff[64];
        snprintf(roff, sizeof roff, "\\%s", options[i]); /* man page escapes the dash */
        int in_man = man && (strstr(man, roff) || strstr(man, options[i]));
        CHECK(in_man && helps && strstr(helps, options[i]), "option %s documented", options[i]);
    }
    free(man);
    free(helps);
}

static void test_demo_matches_committed_data(void)
{
    char args[600];
    const char *dir = check_tmp_path("demo");
    snprintf(args, sizeof args, "mkdir -p %s", dir);
    check_run(args, NULL, NULL);
    snprintf(args, sizeof args, "demo --out %s", dir);
    CHECK(slowscan(args) == 0, "demo runs: %s", run_err ? run_err : "");
    char path[700];
    snprintf(path, sizeof path, "%s/stations.csv", dir);
    char *made = check_read_file(path), *committed = check_read_file("data/stations.csv");
    CHECK(made && committed && strcmp(made, committed) == 0,
          "demo output is deterministic and equals the committed data/stations.csv");
    free(made);
    free(committed);
    /* the gridded demo, byte for byte (a classic-format NetCDF file holds no write time) */
    snprintf(args, sizeof args, "cmp -s '%s/shelf.nc' data/shelf.nc", dir);
    CHECK(check_run(args, NULL, NULL) == 0,
          "the gridded demo is deterministic and equals the committed data/shelf.nc");
    /* the forced runs, one file per experiment (slowscan_demo_experiment_get) */
    for (size_t k = 0; k < slowscan_demo_experiment_count(); k++) {
        const char *name = slowscan_demo_experiment_get(k)->name;
        snprintf(args, sizeof args, "cmp -s '%s/forced-%s.csv' data/forced-%s.csv", dir, name, name);
        CHECK(check_run(args, NULL, NULL) == 0,
              "the forced-run demo '%s' is deterministic and equals the committed file", name);
    }
}

static void test_detrend_output(void)
{
    char *csv = make_csv(200, 3);
    const char *in = check_tmp_path("series.csv");
    check_write_file(in, csv);
    free(csv);
    char args[600];
    snprintf(args, sizeof args, "detrend --bandwidth 20 %s", in);
    CHECK(slowscan(args) == 0, "detrend runs: %s", run_err ? run_err : "");
    CHECK(run_out && strncmp(run_out, "series,time,value,trend,residual\n", 33) == 0,
          "detrend header (DESIGN §4)");
    CHECK(count_lines(run_out) == 1 + 2 * 200, "detrend rows: %zu", count_lines(run_out));
    /* value = trend + residual on every row (up to the printed precision). */
    int bad = 0;
    for (char *line = strchr(run_out, '\n') + 1; *line; line = strchr(line, '\n') + 1) {
        double t, v, tr, r;
        char name[32];
        if (sscanf(line, "%31[^,],%lf,%lf,%lf,%lf", name, &t, &v, &tr, &r) != 5 ||
            fabs(v - tr - r) > 1e-9 * (1 + fabs(v)))
            bad++;
    }
    CHECK(bad == 0, "value = trend + residual on %d rows", bad);
}

/* Indicator values through the binary equal GSL's on the same windows (reference library:
 * GSL gsl_stats_variance, gsl_stats_lag1_autocorrelation). */
static void test_indicators_against_gsl(void)
{
    enum { N = 120, W = 31 };
    char *csv = make_csv(N, 5);
    const char *in = check_tmp_path("ind.csv");
    check_write_file(in, csv);
    double x[N];
    char *p = strchr(csv, '\n') + 1;
    for (size_t i = 0; i < N; i++, p = strchr(p, '\n') + 1)
        sscanf(p, "%*[^,],%lf", &x[i]);
    free(csv);
    char args[600];
    snprintf(args, sizeof args, "indicators --detrend none --window 30 --vars rising %s", in);
    CHECK(slowscan(args) == 0, "indicators runs: %s", run_err ? run_err : "");
    CHECK(strncmp(run_out, "series,time,indicator,value\n", 28) == 0, "indicators header");
    CHECK(count_lines(run_out) == 1 + 2 * (N - W + 1), "indicator rows %zu", count_lines(run_out));
    int compared = 0, bad = 0;
    for (char *line = strchr(run_out, '\n') + 1; *line; line = strchr(line, '\n') + 1) {
        double t, v;
        char ind[32];
        if (sscanf(line, "rising,%lf,%31[^,],%lf", &t, ind, &v) != 3)
            continue;
        size_t i = (size_t)t;
        double want = strcmp(ind, "variance") == 0
                          ? gsl_stats_variance(x + i + 1 - W, 1, W)
                          : gsl_stats_lag1_autocorrelation(x + i + 1 - W, 1, W);
        compared++;
        bad += !check_close(v, want, 1e-10, 0);
    }
    CHECK(compared == 2 * (N - W + 1) && bad == 0, "indicators vs GSL: %d compared, %d off",
          compared, bad);
}

/* The summary's tau equals scipy.stats.kendalltau (Debian python3-scipy) of the indicator
 * path written by --rolling. */
static void test_screen_summary(void)
{
    char *csv = make_csv(300, 9);
    const char *in = check_tmp_path("screen.csv");
    const char *roll = check_tmp_path("screen-rolling.csv");
    const char *sum = check_tmp_path("screen-summary.csv");
    check_write_file(in, csv);
    free(csv);
    char args[900];
    snprintf(args, sizeof args, "screen --surrogates 0 --rolling %s -o %s %s", roll, sum, in);
    CHECK(slowscan(args) == 0, "screen runs: %s", run_err ? run_err : "");
    char *s = check_read_file(sum);
    const char *header = "series,indicator,n,window,bandwidth,tau,statistic,p_value,q_value,null,"
                         "surrogates,flag\n";
    CHECK(s && strncmp(s, header, strlen(header)) == 0, "summary header (DESIGN §4)");
    CHECK(s && count_lines(s) == 7, "summary rows: 2 series x (2 indicators + recovery_trend)");
    double tau_rising_var = NAN;
    if (s)
        sscanf(strstr(s, "rising,variance,") ? strstr(s, "rising,variance,") : "",
               "rising,variance,%*d,%*g,%*g,%lf", &tau_rising_var);
    CHECK(s && strstr(s, "rising,variance,300,150,29.9,") , "n, window, bandwidth columns: %s", s ? s : "");
    CHECK(s && strstr(s, ",NA,NA,none,0,untested\n"), "untested rows carry NA p and q");
    char py[700];
    snprintf(py, sizeof py, "kendall_of_rolling.py %s rising variance", roll);
    double want[1];
    CHECK(check_python(py, want, 1) == 1 && check_close(tau_rising_var, want[0], 1e-9, 1e-11),
          "screen tau %.12g vs scipy.stats.kendalltau %.12g", tau_rising_var, want[0]);
    CHECK(tau_rising_var > 0.5, "rising variance gives a clearly positive tau (%g)", tau_rising_var);
    free(s);
    snprintf(args, sizeof args, "screen --surrogates 0 --format table %s", in);
    CHECK(slowscan(args) == 0 && strstr(run_out, "series") && strstr(run_out, "untested"),
          "table format");
}

/* On the demo data the stations driven closest to the fold show the slowing-down signature
 * (common practice, no source: critical slowing down raises lag-1 autocorrelation). Controls
 * are not checked: a rolling-window tau of a stationary series is often large by chance,
 * which is what the surrogate test is for. */
static void test_screen_demo_data(void)
{
    CHECK(slowscan("screen --surrogates 0 --deseason 364 --indicators lag1,variance data/stations.csv") == 0,
          "demo screen");
    const char *keys[] = {"\nreed_inlet,lag1,", "\nmill_pond,lag1,", "\nreed_inlet,variance,",
                          "\nmill_pond,variance,"};
    for (size_t k = 0; k < 4; k++) {
        double tau = NAN;
        char *at = strstr(run_out, keys[k]);
        if (at)
            sscanf(at + strlen(keys[k]), "%*d,%*g,%*g,%lf", &tau);
        CHECK(tau > 0.5, "demo: %s tau %.3f > 0.5", keys[k] + 1, tau);
    }
}

static void test_stdin_and_resample(void)
{
    char cmd[900];
    snprintf(cmd, sizeof cmd,
             "printf 't;a\\n0;1\\n1;3\\n2;2\\n3;5\\n4;4\\n5;6\\n6;5\\n7;8\\n8;7\\n9;9\\n' | %s "
             "detrend --detrend none -", check_binary());
    char *out = NULL;
    CHECK(check_run(cmd, &out, NULL) == 0 && out && strstr(out, "a,3,5,0,5\n"),
          "stdin with semicolons: %s", out ? out : "");
    free(out);
    const char *in = check_tmp_path("irregular.csv");
    check_write_file(in, "t,a\n0,0\n1,1\n3,3\n4,4\n5,5\n6,6\n7,7\n8,8\n10,10\n");
    char args[600];
    snprintf(args, sizeof args, "detrend --detrend none --resample 1 %s", in);
    /* Linear interpolation of a straight line reproduces it (analytic); gaps of two steps
     * are within the default --max-gap. */
    CHECK(slowscan(args) == 0 && count_lines(run_out) == 1 + 11 && strstr(run_out, "a,2,2,0,2\n"),
          "resample onto step 1: %s", run_err ? run_err : "");
    /* A step finer than the data's is refused: interpolation would invent memory. */
    snprintf(args, sizeof args, "detrend --detrend none --resample 0.5 %s", in);
    CHECK(slowscan(args) == 1 && run_err && strstr(run_err, "option --resample 0.5: the step is "
          "finer than the data's median step 1"), "finer resample refused: %s", run_err ? run_err : "");
    /* Across a gap longer than --max-gap nothing is interpolated: missing stays missing. */
    snprintf(args, sizeof args, "detrend --detrend none --resample 1 --max-gap 1 %s", in);
    CHECK(slowscan(args) == 0 && strstr(run_out, "a,2,NA,0,NA\n") && strstr(run_out, "a,9,NA,0,NA\n"),
          "--max-gap 1 leaves the gaps missing: %s", run_out ? run_out : "");
    /* Without --resample the two missing rows are gaps of the regular grid, read as missing. */
    snprintf(args, sizeof args, "detrend --detrend none %s", in);
    CHECK(slowscan(args) == 0 && strstr(run_out, "a,2,NA,0,NA\n") && run_err &&
              strstr(run_err, "2 rows missing from the regular grid (step 1) were read as missing"),
          "gaps filled with a warning: %s", run_err ? run_err : "");
}

static void test_constant_series(void)
{
    const char *in = check_tmp_path("const.csv");
    check_write_file(in, "t,flat,ok\n0,2,1\n1,2,3\n2,2,2\n3,2,5\n4,2,4\n5,2,6\n6,2,5\n7,2,8\n8,2,7\n"
                         "9,2,9\n10,2,8\n11,2,11\n");
    char args[600];
    snprintf(args, sizeof args, "screen --surrogates 0 --window 4 %s", in);
    CHECK(slowscan(args) == 0, "constant series: exit 0");
    CHECK(run_err && strstr(run_err, "warning") && strstr(run_err, "'flat'"), "constant: warning");
    CHECK(run_out && strstr(run_out, "flat,variance,12,4,1.1,NA,NA,NA,NA,none,0,insufficient"),
          "constant: NA and insufficient: %s", run_out ? run_out : "");
}

static void test_bad_input(void)
{
    const char *good = "t,a,b\n0,1,2\n1,3,1\n2,2,4\n3,5,3\n4,4,6\n5,6,5\n6,5,8\n7,8,7\n8,7,9\n9,9,8\n";
    expect_rejected("unsorted", "t,a\n0,1\n1,2\n3,3\n2,4\n4,5\n5,6\n6,7\n7,8\n8,9\n", "screen", "row 5");
    expect_rejected("duplicate time", "t,a\n0,1\n1,2\n1,3\n2,4\n3,5\n4,6\n5,7\n6,8\n7,9\n", "screen", "row 4");
    expect_rejected("ragged", "t,a\n0,1\n1,2,3\n2,4\n", "screen", "row 3");
    expect_rejected("non-numeric", "t,a\n0,1\n1,x1\n2,4\n", "screen", "'a'");
    expect_rejected("infinite", "t,a\n0,1\n1,inf\n2,4\n", "screen", "row 3");
    expect_rejected("empty file", "", "screen", "empty");
    expect_rejected("header only", "t,a\n", "screen", "no data");
    expect_rejected("too short", "t,a\n0,1\n1,2\n2,4\n3,3\n", "screen", "at least 8");
    expect_rejected("unknown --vars", good, "screen --vars a,zz", "zz");
    expect_rejected("window > span", good, "screen --window 20", "--window");
    expect_rejected("window <= 0", good, "screen --window 0", "--window");
    expect_rejected("window %% > 100", good, "screen --window 150%", "--window");
    expect_rejected("bandwidth <= 0", good, "screen --bandwidth -1", "--bandwidth");
    expect_rejected("bandwidth > span", good, "screen --bandwidth 30", "--bandwidth");
    expect_rejected("poly too high", good, "screen --detrend poly:12", "poly:12");
    expect_rejected("unknown detrend", good, "screen --detrend wavelet", "--detrend");
    expect_rejected("irregular", "t,a\n0,1\n1,2\n2,3\n3.5,4\n4,5\n5,6\n6,7\n7,8\n8,9\n", "screen", "--resample");
    expect_rejected("log of non-positive", "t,a\n0,1\n1,2\n2,0\n3,4\n4,5\n5,6\n6,7\n7,8\n8,9\n",
                    "screen --log", "row 4");
    expect_rejected("unknown option", good, "screen --windw 5", "--windw");
    expect_rejected("unknown indicator", good, "screen --indicators variance,slope", "slope");
    expect_rejected("control null without a control", good, "screen --null control", "--control");
    expect_rejected("unknown null", good, "screen --null wobble", "wobble");
    expect_rejected("negative surrogates", good, "screen --surrogates -3", "--surrogates");
    expect_rejected("fdr out of range", good, "screen --fdr 1.5", "--fdr");
    expect_rejected("unknown alternative", good, "screen --alternative up", "--alternative");
    expect_rejected("unknown time column", good, "screen --time when", "when");
    /* a non-whole period is fitted with 3 harmonics by default: 2 x 3 >= 2.5 steps */
    expect_rejected("default harmonics above Nyquist", good, "screen --deseason 2.5", "--harmonics");
    expect_rejected("harmonics at Nyquist", good, "detrend --deseason 4 --harmonics 2", "--harmonics");
    expect_rejected("harmonics 0", good, "detrend --deseason 4 --harmonics 0", "--harmonics");
    expect_rejected("period of one step", good, "detrend --deseason 1", "--deseason");
    expect_rejected("deseason window < 2 periods", good, "indicators --deseason 2 --deseason-window 3",
                    "--deseason-window");
    expect_rejected("deseason window > record", good, "screen --deseason 2 --deseason-window 10",
                    "--deseason-window");
    expect_rejected("deseason window > 100%", good, "robustness --deseason 2 --deseason-window 101%",
                    "--deseason-window");
    expect_rejected("deseason window alone", good, "surrogates --deseason-window 5", "--deseason-window");
    expect_rejected("harmonics alone", good, "recovery --harmonics 1", "--harmonics");
    expect_rejected("min-coverage", good, "screen --min-coverage 1.5", "--min-coverage");

    /* Output path equal to the input: refused, input untouched. */
    const char *in = check_tmp_path("keep.csv");
    check_write_file(in, good);
    char args[700];
    snprintf(args, sizeof args, "screen -o %s %s", in, in);
    CHECK(slowscan(args) == 1 && strstr(run_err, "input"), "output = input refused");
    char *kept = check_read_file(in);
    CHECK(kept && strcmp(kept, good) == 0, "input unchanged");
    free(kept);
    snprintf(args, sizeof args, "screen -o /nonexistent-dir/out.csv %s", in);
    CHECK(slowscan(args) == 1 && count_lines(run_err) == 1 && strstr(run_err, "/nonexistent-dir"),
          "unwritable output: %s", run_err ? run_err : "");
    CHECK(slowscan("screen /nonexistent-input.csv") == 1 && strstr(run_err, "/nonexistent-input.csv"),
          "missing input named");
    /* A run that fails on its second input — here a band beyond that file's Nyquist frequency,
     * found only once its time step is known — leaves nothing on standard output either (it is
     * spooled until the run succeeds), not the header and the first file's rows. */
    const char *fine = check_tmp_path("step-one.csv"), *coarse = check_tmp_path("step-seven.csv");
    check_write_file(fine, "t,a\n0,1\n1,3\n2,2\n3,5\n4,4\n5,6\n6,5\n7,8\n8,7\n9,9\n10,4\n11,2\n");
    check_write_file(coarse, "t,b\n0,1\n7,3\n14,2\n21,5\n28,4\n35,6\n42,5\n49,8\n56,7\n63,9\n70,3\n77,1\n");
    snprintf(args, sizeof args, "indicators --indicators spectral_exponent --band 0.1:0.5 %s %s",
             fine, coarse);
    CHECK(slowscan(args) == 1 && run_out && run_out[0] == '\0', "nothing on stdout from a failed run: '%s'",
          run_out ? run_out : "(null)");
}

/* Regression tests for defects found in review (one per defect). */
static void test_review_regressions(void)
{
    const char *in = check_tmp_path("rev.csv");
    char *csv = make_csv(120, 4);
    /* an all-missing column and a random walk next to the usual two */
    size_t len = strlen(csv);
    char *text = malloc(len * 2 + 4096), *o = text;
    check_rng *r = check_rng_alloc(9);
    double walk = 0;
    for (char *line = csv; *line;) {
        char *eol = strchr(line, '\n');
        o += sprintf(o, "%.*s", (int)(eol - line), line);
        if (line == csv)
            o += sprintf(o, ",empty,walk\n");
        else
            o += sprintf(o, ",NA,%.6f\n", walk += check_rng_gaussian(r));
        line = eol + 1;
    }
    check_rng_free(r);
    check_write_file(in, text);
    free(text);
    free(csv);
    char args[1200];
    /* 1. a column with no data is insufficient, not a failed run */
    snprintf(args, sizeof args, "screen --surrogates 20 --vars rising,empty %s", in);
    CHECK(slowscan(args) == 0 && strstr(run_out, "empty,variance,0,") &&
              strstr(run_out, ",insufficient\n"), "all-NA column with surrogates: %s", run_err);
    /* 2. absurd surrogate counts name the option */
    snprintf(args, sizeof args, "screen --surrogates 99999999999999999999 %s", in);
    CHECK(slowscan(args) == 1 && strstr(run_err, "--surrogates"), "huge --surrogates refused");
    /* 3. outputs that clash */
    const char *o1 = check_tmp_path("rev-o1.csv");
    snprintf(args, sizeof args, "screen --surrogates 0 -o %s --rolling %s %s", o1, o1, in);
    CHECK(slowscan(args) == 1 && strstr(run_err, "--rolling") && !check_file_exists(o1),
          "-o and --rolling on one file refused");
    snprintf(args, sizeof args, "screen --surrogates 0 --json - %s", in);
    CHECK(slowscan(args) == 1 && strstr(run_err, "standard output"), "two outputs on stdout refused");
    snprintf(args, sizeof args, "screen --null control --control %s -o %s %s", o1, o1, in);
    char *copy = check_read_file(in);
    check_write_file(o1, copy); /* a valid control run, in another file */
    free(copy);
    CHECK(slowscan(args) == 1 && strstr(run_err, "input"), "output = control refused");
    /* 4. a FIFO target stays a FIFO */
    const char *fifo = check_tmp_path("rev-fifo"), *got = check_tmp_path("rev-fifo.out");
    snprintf(args, sizeof args, "mkfifo %s && (cat %s > %s &) && %s screen --surrogates 0 -o %s %s "
             "&& sleep 0.2 && test -p %s", fifo, fifo, got, check_binary(), fifo, in, fifo);
    CHECK(check_run(args, NULL, NULL) == 0, "a FIFO output is written through, not replaced");
    /* 5. null models that cannot work say why */
    snprintf(args, sizeof args, "screen --null block --block-length 100 %s", in);
    CHECK(slowscan(args) == 1 && strstr(run_err, "--block-length"), "block longer than n/2");
    snprintf(args, sizeof args, "screen --null ar1 --detrend none --vars walk %s", in);
    int rc = slowscan(args);
    CHECK(rc == 0 || (rc == 1 && strstr(run_err, "--null ar1")), "ar1 on a random walk: %s", run_err);
    /* 6. grid entries too long are refused, not cut */
    snprintf(args, sizeof args, "robustness --windows 50.00000000000000000000000000000%% %s", in);
    CHECK(slowscan(args) == 1 && strstr(run_err, "--windows"), "long grid entry refused");
    /* 7. fractions are NA where nothing could be computed */
    const char *fr = check_tmp_path("rev-fr.csv");
    snprintf(args, sizeof args, "robustness --vars empty,rising --windows 40%%,60%% --bandwidths 10%% "
             "--surrogates 20 --fractions %s %s", fr, in);
    int ran = slowscan(args);
    char *f = check_read_file(fr);
    CHECK(ran == 0 && f && strstr(f, "empty,variance,gaussian-linear,2,NA,NA"), "fractions NA for an empty column: %s",
          f ? f : "");
    free(f);
}

/* Rows of one indicator in a rolling CSV held in `text`. */
static size_t rows_of(const char *text, const char *indicator)
{
    char key[64];
    snprintf(key, sizeof key, ",%s,", indicator);
    size_t n = 0;
    for (const char *p = text ? strstr(text, key) : NULL; p; p = strstr(p + 1, key))
        n++;
    return n;
}

/* --step, --band and the per-window indicators through the binary: only evaluated windows
 * are written, each equal to its step-1 row (common practice, no source: a step only skips
 * windows); the default step keeps dfa to at most 500 windows; --rolling of screen matches
 * 'indicators'; the surrogate p-values do not depend on --threads. */
static void test_spectral_commands(void)
{
    const char *in = check_tmp_path("spec.csv"), *roll = check_tmp_path("spec-rolling.csv");
    char *csv = make_csv(1200, 21), args[900];
    check_write_file(in, csv);
    free(csv);
    snprintf(args, sizeof args, "indicators --vars rising --indicators variance,dfa %s", in);
    CHECK(slowscan(args) == 0, "indicators dfa: %s", run_err ? run_err : "");
    /* n = 1200, W = 601: 600 windows; the default step 2 leaves 300 for dfa. */
    CHECK(rows_of(run_out, "variance") == 600 && rows_of(run_out, "dfa") == 300,
          "default steps: %zu variance rows, %zu dfa rows", rows_of(run_out, "variance"),
          rows_of(run_out, "dfa"));
    char *one = NULL;
    snprintf(args, sizeof args, "indicators --vars rising --indicators lag1,redness --step 1 %s", in);
    if (slowscan(args) == 0)
        one = strdup(run_out);
    snprintf(args, sizeof args, "indicators --vars rising --indicators lag1,redness --step 7 %s", in);
    CHECK(slowscan(args) == 0 && one, "--step 7 runs");
    size_t rows = 0, missing = 0;
    for (char *line = strchr(run_out, '\n') + 1; one && *line; line = strchr(line, '\n') + 1) {
        char row[128];
        size_t len = (size_t)(strchr(line, '\n') - line);
        snprintf(row, sizeof row, "\n%.*s\n", (int)len, line);
        rows++;
        missing += strstr(one, row) == NULL;
    }
    CHECK(rows == 2 * ((1200 - 601) / 7 + 1) && missing == 0,
          "--step 7: %zu rows, %zu not found at step 1", rows, missing);
    free(one);
    snprintf(args, sizeof args, "screen --vars rising --indicators dfa,spectral_exponent --band 0.01:0.2 "
             "--surrogates 0 --rolling %s %s", roll, in);
    CHECK(slowscan(args) == 0, "screen with --band: %s", run_err ? run_err : "");
    char *rolled = check_read_file(roll);
    snprintf(args, sizeof args, "indicators --vars rising --indicators dfa,spectral_exponent --band "
             "0.01:0.2 %s", in);
    CHECK(slowscan(args) == 0 && rolled && strcmp(rolled, run_out) == 0,
          "screen --rolling equals indicators");
    free(rolled);
    char *threads1 = NULL;
    snprintf(args, sizeof args, "screen --vars rising --indicators redness,dfa --window 20%% "
             "--surrogates 70 --threads 1 %s", in);
    if (slowscan(args) == 0)
        threads1 = strdup(run_out);
    snprintf(args, sizeof args, "screen --vars rising --indicators redness,dfa --window 20%% "
             "--surrogates 70 --threads 3 %s", in);
    CHECK(slowscan(args) == 0 && threads1 && strcmp(threads1, run_out) == 0,
          "screen with redness, dfa: same output for 1 and 3 threads");
    free(threads1);
}

/* Bad --step and --band values and windows too short for dfa: exit 1, one message naming the
 * option, no output. */
static void test_spectral_refusals(void)
{
    char *small = make_csv(200, 22); /* dt = 1: Nyquist 0.5; 50% window: W = 101 */
    expect_rejected("step 0", small, "indicators --step 0", "--step");
    expect_rejected("step -1", small, "screen --step -1", "--step");
    expect_rejected("step 2.5", small, "indicators --step 2.5", "--step");
    expect_rejected("band above Nyquist", small,
                    "indicators --indicators spectral_exponent --band 0.1:0.7", "--band");
    expect_rejected("band at 0", small, "screen --indicators spectral_exponent --band 0:0.2", "--band");
    expect_rejected("band backwards", small, "indicators --indicators spectral_exponent --band 0.3:0.2",
                    "--band");
    expect_rejected("band of one frequency", small,
                    "robustness --windows 50% --indicators spectral_exponent --band 0.2:0.21", "--band");
    expect_rejected("window too short for dfa", small, "indicators --indicators dfa --window 20",
                    "--window");
    expect_rejected("window too short for dfa (screen)", small, "screen --indicators lag1,dfa --window 10%",
                    "dfa");
    free(small);
}

void suite_cli(void)
{
    test_spectral_commands();
    test_spectral_refusals();
    test_review_regressions();
    test_help_and_version();
    test_demo_matches_committed_data();
    test_detrend_output();
    test_indicators_against_gsl();
    test_screen_summary();
    test_screen_demo_data();
    test_stdin_and_resample();
    test_constant_series();
    test_bad_input();
    free(run_out);
    free(run_err);
    run_out = run_err = NULL;
}
