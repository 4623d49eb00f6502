/* `slowscan feedback` through the binary: a run's rows and verdict, --baseline, --annual,
 * --fit-span, and every refusal (exit 1, one message naming the option/file/column, no
 * output file left). */
#include "check.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

static char *out_text, *err_text;

static int feedback(const char *args)
{
    free(out_text);
    free(err_text);
    out_text = err_text = NULL;
    char cmd[10000];
    snprintf(cmd, sizeof cmd, "%s feedback %s", check_binary(), args);
    return check_run(cmd, &out_text, &err_text);
}

static size_t lines(const char *s)
{
    size_t n = 0;
    for (; s && *s; s++)
        n += *s == '\n';
    return n;
}

/* An annual run of n years from 1850: columns rtnt (flux), tas (response), other. */
static void write_run(const char *path, size_t n, double lambda, unsigned long seed)
{
    check_rng *r = check_rng_alloc(seed);
    FILE *fp = fopen(path, "w");
    fputs("year,rtnt,tas,other\n", fp);
    for (size_t i = 0; i < n; i++) {
        double t = (double)i + 1;
        double T = 3.5 * (1 - exp(-t / 4)) + 2.7 * (1 - exp(-t / 250)) + 0.15 * check_rng_gaussian(r);
        fprintf(fp, "%zu,%.9f,%.9f,%.3f\n", 1850 + i, 7.4 + lambda * T + 0.5 * check_rng_gaussian(r),
                T, check_rng_gaussian(r));
    }
    fclose(fp);
    check_rng_free(r);
}

/* A scratch path kept in buf (check_tmp_path's own buffer is reused by the next call). */
static const char *scratch(const char *name, char *buf, size_t size)
{
    snprintf(buf, size, "%s", check_tmp_path(name));
    return buf;
}

/* A scratch CSV opened for writing with its header line; its path in buf. */
static FILE *scratch_csv(const char *name, const char *header, char *buf, size_t size)
{
    FILE *fp = fopen(scratch(name, buf, size), "w");
    if (fp)
        fputs(header, fp);
    return fp;
}

static void expect_refused(const char *what, const char *args, const char *needle)
{
    const char *out = check_tmp_path("fb-out.csv");
    remove(out);
    char line[8192];
    snprintf(line, sizeof line, "%s -o %s", args, out);
    int rc = feedback(line);
    CHECK(rc == 1, "%s: exit %d, want 1 (stderr: %s)", what, rc, err_text ? err_text : "");
    CHECK(lines(err_text) == 1, "%s: want one message line: %s", what, err_text ? err_text : "");
    CHECK(err_text && strstr(err_text, needle), "%s: message lacks '%s': %s", what, needle,
          err_text ? err_text : "");
    CHECK(!check_file_exists(out) && check_scratch_files("fb-out.csv") == 0,
          "%s: an output file was left behind", what);
}

static void test_run(const char *run)
{
    char args[4096];
    snprintf(args, sizeof args, "--flux rtnt --response tas %s", run);
    CHECK(feedback(args) == 0, "feedback runs: %s", err_text ? err_text : "");
    /* 150 years, window 74.5 (50%% < 100), stride 7.45 -> 7 samples: (150 - 76) / 7 + 1 */
    CHECK(out_text && strncmp(out_text, "start,end,pairs,lambda,", 23) == 0, "header");
    CHECK(lines(out_text) == 1 + 11, "11 windows: %zu lines", lines(out_text));
    CHECK(lines(err_text) == 1 && strstr(err_text, "steady"), "one verdict line: %s",
          err_text ? err_text : "");
    snprintf(args, sizeof args, "--flux rtnt --response tas --fit-span 1870:1999 --scale 0.5 %s", run);
    CHECK(feedback(args) == 0 && lines(out_text) == 2 && strstr(out_text, "\n1870,1999,130,"),
          "--fit-span: one fit of 130 pairs: %s", out_text ? out_text : "");
    snprintf(args, sizeof args, "--flux rtnt --response tas --window 40 --stride 40 --skip 20 %s", run);
    CHECK(feedback(args) == 0 && lines(out_text) == 1 + 3 && strstr(out_text, "\n1870,1910,41,"),
          "--skip 20 --window 40 --stride 40: 3 windows from 1870: %s", out_text ? out_text : "");
    CHECK(err_text && strstr(err_text, "weighted_trend over 3"), "trend test over 3 blocks: %s",
          err_text ? err_text : "");
    char dir[1024], png[1100];
    scratch("fb-figures", dir, sizeof dir);
    snprintf(args, sizeof args, "--flux rtnt --response tas --figures %s %s", dir, run);
    snprintf(png, sizeof png, "%s/feedback-fb-run.png", dir);
    CHECK(feedback(args) == 0 && check_file_exists(png), "--figures writes %s", png);
}

/* --baseline: anomalies (a constant offset in the baseline shifts F only) and the TLS noise
 * ratio estimated from it. */
static void test_baseline_cli(const char *run)
{
    char base[1024];
    FILE *fp = scratch_csv("fb-base.csv", "year,rtnt,tas\n", base, sizeof base);
    check_rng *r = check_rng_alloc(9);
    for (int i = 0; i < 300; i++)
        fprintf(fp, "%d,%.9f,%.9f\n", 1700 + i, 0.8 + 0.5 * check_rng_gaussian(r),
                287 + 0.15 * check_rng_gaussian(r));
    check_rng_free(r);
    fclose(fp);
    char args[4096];
    char json_path[1024];
    scratch("fb.json", json_path, sizeof json_path);
    snprintf(args, sizeof args, "--flux rtnt --response tas --fit tls --baseline %s "
             "--baseline-offset -100 --baseline-mode drift --json %s %s", base, json_path, run);
    CHECK(feedback(args) == 0, "TLS with the ratio from the baseline: %s", err_text ? err_text : "");
    char *json = check_read_file(json_path);
    CHECK(json && strstr(json, "\"noise_ratio_from_baseline\": true"), "ratio from the baseline");
    free(json);
    /* the JSON parses (Python's json module, RFC 8259) */
    snprintf(args, sizeof args, "/usr/bin/python3 -c 'import json,sys; json.load(open(sys.argv[1]))' %s",
             json_path);
    CHECK(check_run(args, NULL, NULL) == 0, "--json writes valid JSON");
    /* two runs: a leading file column, each run's rows and verdict */
    snprintf(args, sizeof args, "--flux rtnt --response tas --fit-span 1900:1950 %s %s", run, base);
    CHECK(feedback(args) == 0 && out_text && strncmp(out_text, "file,start,", 11) == 0 &&
          lines(out_text) == 3 && lines(err_text) == 2, "two inputs: file column, two rows: %s",
          out_text ? out_text : "");
}

/* --annual: a monthly record becomes annual means (standard calendar). */
static void test_annual_cli(void)
{
    char path[1024];
    FILE *fp = scratch_csv("fb-monthly.csv", "time,rtnt,tas\n", path, sizeof path);
    check_rng *r = check_rng_alloc(4);
    for (int y = 1850; y < 1890; y++)
        for (int m = 1; m <= 12; m++) {
            double T = 0.1 * (y - 1850) + 0.3 * check_rng_gaussian(r);
            fprintf(fp, "%d-%02d,%.6f,%.6f\n", y, m, 4 - T + 0.3 * check_rng_gaussian(r), T);
        }
    check_rng_free(r);
    fclose(fp);
    char args[4096];
    snprintf(args, sizeof args, "--flux rtnt --response tas --annual --window 20 --stride 19 %s", path);
    CHECK(feedback(args) == 0 && strstr(out_text, "\n1850,1870,21,") &&
          strstr(out_text, "\n1869,1889,21,"), "--annual: windows of 21 years: %s %s",
          out_text ? out_text : "", err_text ? err_text : "");
    char yearly[1024];
    scratch("fb-run.csv", yearly, sizeof yearly);
    snprintf(args, sizeof args, "--flux rtnt --response tas --annual %s", yearly);
    expect_refused("--annual on a yearly record", args, "not a monthly record");
}

void suite_feedback_cli(void)
{
    char run[1024]; /* check_tmp_path's buffer is reused by the next call */
    scratch("fb-run.csv", run, sizeof run);
    write_run(run, 150, -1.2, 5);
    test_run(run);
    test_baseline_cli(run);
    test_annual_cli();
    char a[4096];
#define REFUSED(what, opts, needle)                                                          \
    do {                                                                                     \
        snprintf(a, sizeof a, "%s %s", opts, run);                                           \
        expect_refused(what, a, needle);                                                     \
    } while (0)
    REFUSED("tls without a ratio", "--flux rtnt --response tas --fit tls", "--noise-ratio");
    REFUSED("unknown column", "--flux nope --response tas", "no column 'nope'");
    REFUSED("unknown response", "--flux rtnt --response nope", "no column 'nope'");
    REFUSED("missing --flux", "--response tas", "--flux");
    REFUSED("same column", "--flux tas --response tas", "same column");
    REFUSED("window longer than the record", "--flux rtnt --response tas --window 200", "--window 200");
    REFUSED("window after skip", "--flux rtnt --response tas --window 100 --skip 60", "after --skip");
    REFUSED("stride below the step", "--flux rtnt --response tas --stride 0.5", "--stride 0.5");
    REFUSED("ratio with ols", "--flux rtnt --response tas --noise-ratio 2", "--noise-ratio");
    REFUSED("bad fit", "--flux rtnt --response tas --fit lad", "--fit");
    REFUSED("zero scale", "--flux rtnt --response tas --scale 0", "--scale");
    REFUSED("mode without baseline", "--flux rtnt --response tas --baseline-mode drift", "--baseline");
    REFUSED("offset without baseline", "--flux rtnt --response tas --baseline-offset 3", "--baseline");
    REFUSED("span outside", "--flux rtnt --response tas --fit-span 1800:1900", "--fit-span");
    REFUSED("span not A:B", "--flux rtnt --response tas --fit-span 1900", "--fit-span");
    REFUSED("span with window", "--flux rtnt --response tas --fit-span 1870:1900 --window 20", "--fit-span");
    REFUSED("missing baseline", "--flux rtnt --response tas --baseline /nonexistent.csv", "--baseline");
    char base[1024];
    scratch("fb-base.csv", base, sizeof base);
    snprintf(a, sizeof a, "--flux rtnt --response tas --baseline-offset 1000 --baseline %s %s",
             base, run);
    expect_refused("baseline not covering the period", a, "does not cover");
    REFUSED("screen option", "--flux rtnt --response tas --detrend linear", "--detrend");
#undef REFUSED
    free(out_text);
    free(err_text);
    out_text = err_text = NULL;
}

/* --area-mean against numpy's weighted means of the same grid (python3-numpy/netCDF4,
 * reference library): one fit over the whole run, whose F and lambda equal numpy.polyfit's
 * on numpy's means. */
static void area_case(const char *mode, const char *warning)
{
    char nc[1024], args[4096];
    scratch("fb-grid.nc", nc, sizeof nc);
    double ref[2];
    snprintf(args, sizeof args, "feedback_grid.py %s %s", nc, mode);
    CHECK(check_python(args, ref, 2) == 2, "%s: the grid was written", mode);
    snprintf(args, sizeof args, "--flux rtnt --response tas --area-mean --fit-span 1850:1889 %s", nc);
    CHECK(feedback(args) == 0, "%s: --area-mean runs: %s", mode, err_text ? err_text : "");
    double F = NAN, lambda = NAN;
    const char *row = out_text ? strchr(out_text, '\n') : NULL;
    if (row)
        sscanf(row + 1, "%*[^,],%*[^,],%*[^,],%lf,%*[^,],%*[^,],%*[^,],%*[^,],%*[^,],%lf", &lambda, &F);
    CHECK_CLOSE(F, ref[0], 1e-9, 0, "area-mean F vs numpy");
    CHECK_CLOSE(lambda, ref[1], 1e-9, 0, "area-mean lambda vs numpy");
    CHECK(warning ? err_text && strstr(err_text, warning) != NULL
                  : err_text && !strstr(err_text, "warning"),
          "%s: warnings as expected: %s", mode, err_text ? err_text : "");
}

void suite_feedback_grid(void);
void suite_feedback_grid(void)
{
    area_case("coslat", NULL);
    area_case("measures", NULL);
    area_case("gaussian", "only approximate");
    char nc[1024], args[4096];
    scratch("fb-grid.nc", nc, sizeof nc);
    snprintf(args, sizeof args, "--flux rtnt --response tas %s", nc);
    expect_refused("a grid without --area-mean", args, "--area-mean");
}

/* CF branch times align a NetCDF run with its NetCDF control: the run (years 1-60 of its
 * own axis) branched from the control at 1950, so the same rows as --baseline-offset 1949
 * (CF conventions' branch_time_in_parent / parent_time_units, CMIP practice; common
 * practice, no source), and different rows from no offset. */
void suite_feedback_branch(void);
void suite_feedback_branch(void)
{
    char runp[1024], ctl[1024], args[4096], *aligned = NULL;
    scratch("fb-branched.nc", runp, sizeof runp);
    scratch("fb-control.nc", ctl, sizeof ctl);
    double dummy;
    snprintf(args, sizeof args, "feedback_branch.py %s %s", runp, ctl);
    CHECK(check_python(args, &dummy, 1) == 1, "branched run written");
    snprintf(args, sizeof args, "--flux rtnt --response tas --area-mean --baseline %s "
             "--baseline-mode drift --window 20 %s", ctl, runp);
    CHECK(feedback(args) == 0, "branch-time alignment runs: %s", err_text ? err_text : "");
    aligned = out_text ? strdup(out_text) : NULL;
    snprintf(args, sizeof args, "--flux rtnt --response tas --area-mean --baseline %s "
             "--baseline-mode drift --window 20 --baseline-offset 1949 %s", ctl, runp);
    CHECK(feedback(args) == 0 && aligned && out_text && strcmp(aligned, out_text) == 0,
          "the branch times give the rows of --baseline-offset 1949");
    snprintf(args, sizeof args, "--flux rtnt --response tas --area-mean --baseline %s "
             "--baseline-mode drift --window 20 --baseline-offset 1900 %s", ctl, runp);
    CHECK(feedback(args) == 0 && aligned && out_text && strcmp(aligned, out_text) != 0,
          "another offset gives other rows");
    free(aligned);
}
