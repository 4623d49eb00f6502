/* screen --ensemble, --members and --member-anomalies through the binary: rows and roles,
 * the Benjamini-Hochberg families against statsmodels, anomalies against pandas, the refusals,
 * the split warning, and the pooled test's size on null ensembles. */
#include "ensemble_check.h"

#include <gsl/gsl_cdf.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

enum { CLI_MEMBERS = 6, CLI_N = 200 };

/* A CSV of one ensemble T.r0..T.r5 (split or not) and a plain column of AR(1) noise. */
static const char *ensemble_csv(const char *name, int split, unsigned long seed)
{
    double x[(CLI_MEMBERS + 1) * CLI_N];
    check_rng *rng = check_rng_alloc(seed);
    ensemble_draw(rng, CLI_MEMBERS + 1, CLI_N, split, x);
    check_rng_free(rng);
    const char *path = check_tmp_path(name);
    check_write_table_csv(path, "t,T.r0,T.r1,T.r2,T.r3,T.r4,T.r5,plain", CLI_MEMBERS + 1, CLI_N,
                          1.0, x);
    return path;
}

static int starts_with(const char *text, const char *prefix)
{
    return text && strncmp(text, prefix, strlen(prefix)) == 0;
}

static size_t count_lines(const char *text, const char *needle)
{
    size_t n = 0;
    for (const char *p = text; p && (p = strstr(p, needle)); p++)
        n++;
    return n;
}

/* screen ARGS IN: its exit code, stdout in *out and stderr in *err (either may be NULL). */
static int run(const char *args, const char *in, char **out, char **err)
{
    char cmd[2400];
    snprintf(cmd, sizeof cmd, "%s screen --surrogates 99 --threads 2 %s %s", check_binary(), args,
             in);
    return check_run(cmd, out, err);
}

/* Rows and roles; the three BH families equal statsmodels' fdr_bh on their own p-values. */
static void test_rows(void)
{
    const char *in = ensemble_csv("ens.csv", 1, 5), *js = check_tmp_path("ens.json");
    const char *sum = check_tmp_path("ens-summary.csv");
    char args[1200], *err = NULL;
    int rc;
    snprintf(args, sizeof args, "--ensemble --json %s -o %s", js, sum);
    rc = run(args, in, NULL, &err);
    char *out = check_read_file(sum);
    CHECK(rc == 0 && out, "screen --ensemble runs (%d): %s", rc, err ? err : "");
    CHECK(starts_with(out, "series,indicator,n,window,bandwidth,tau,statistic,p_value,q_value,"
                           "null,surrogates,flag,role,share_flagged\n"), "role columns");
    /* 6 members and a plain series, the mean, the pooled row: x 3 tests */
    CHECK(count_lines(out, ",member,") == 18 && count_lines(out, ",series,") == 3 &&
              count_lines(out, "\nT[mean],") == 3 && count_lines(out, "\nT[pooled],") == 3,
          "rows by role");
    /* the split test on half the members crossing a threshold: warned once */
    CHECK(err && count_lines(err, "ensemble 'T' splits") == 1, "split warning: %s",
          err ? err : "");
    double v[6] = {1, 1, 1, 0, 0, 0};
    char cmd[1400];
    snprintf(cmd, sizeof cmd, "ensemble_rows.py bh %s", sum);
    /* statsmodels multipletests(method='fdr_bh') within each family */
    CHECK(check_python(cmd, v, 6) == 6 && v[0] < 1e-9 && v[1] < 1e-9 && v[2] < 1e-9 &&
              v[3] == 21 && v[4] == 3 && v[5] == 3,
          "BH families = statsmodels': %g %g %g over %g %g %g rows", v[0], v[1], v[2], v[3],
          v[4], v[5]);
    char *json = check_read_file(js);
    CHECK(json && strstr(json, "\"split\": true") && strstr(json, "\"role\": \"pooled\""),
          "JSON: the split and the roles");
    /* Python's json module (RFC 8259): every row of the CSV, the same tau, p and q */
    snprintf(cmd, sizeof cmd, "json_matches_csv.py %s %s", js, sum);
    double agree[4] = {0};
    CHECK(check_python(cmd, agree, 4) == 4 && agree[0] == 27 && agree[1] == 1,
          "JSON = CSV: %g rows, agree %g", agree[0], agree[1]);
    free(json);
    /* members' rows equal a run without --ensemble (same family: members and plain series) */
    char *plain = NULL;
    rc = run("", in, &plain, NULL);
    char *row = out ? strstr(out, "\nT.r3,lag1,") : NULL, *want = plain ? strstr(plain, "\nT.r3,lag1,") : NULL;
    CHECK(row && want && strncmp(row, want, strcspn(want + 1, "\n") + 1) == 0 &&
              starts_with(plain, "series,indicator,n,window,bandwidth,tau,statistic,p_value,"
                                 "q_value,null,surrogates,flag\n"),
          "member rows as without --ensemble; no role columns without it");
    /* the same bytes on one thread, and with every record spilled to the store's file */
    snprintf(cmd, sizeof cmd, "SLOWSCAN_SPILL_AFTER=0 %s screen --surrogates 99 --threads 1 "
             "--ensemble --quiet %s", check_binary(), in);
    char *one = NULL;
    CHECK(check_run(cmd, &one, NULL) == 0 && one && out && strcmp(one, out) == 0,
          "--ensemble: the same summary on 1 thread with a spilled store");
    free(one), free(plain), free(out), free(err);
}

/* --members picks the listed suffixes; --member-anomalies screens members minus the mean,
 * against the same anomalies made by pandas and screened as plain columns. */
static void test_members_anomalies(void)
{
    const char *in = ensemble_csv("ens-m.csv", 0, 6);
    char *err = NULL;
    int rc;
    char *out = NULL;
    rc = run("--members r0,r1,r2,r4", in, &out, &err);
    CHECK(rc == 0 && out && count_lines(out, ",member,") == 12 &&
              count_lines(out, "\nT.r3,lag1,") == 1 && strstr(out, "\nT.r3,lag1,") &&
              strstr(strstr(out, "\nT.r3,lag1,"), ",series,"),
          "--members: four members, T.r3 and T.r5 plain (%d)", rc);
    free(out), free(err);
    const char *anom = check_tmp_path("ens-anom.csv");
    char cmd[1400];
    snprintf(cmd, sizeof cmd, "ensemble_rows.py anomalies %s %s", in, anom);
    double v = 0;
    CHECK(check_python(cmd, &v, 1) == 1 && v == CLI_MEMBERS, "pandas anomalies written");
    out = NULL;
    char *plain = NULL;
    rc = run("--member-anomalies", in, &out, NULL);
    rc |= run("", anom, &plain, NULL);
    size_t same = 0;
    for (size_t m = 0; m < CLI_MEMBERS && out && plain; m++) {
        char key[32];
        snprintf(key, sizeof key, "\nT.r%zu,variance,", m);
        const char *a = strstr(out, key), *b = strstr(plain, key);
        /* pandas' row mean (Debian python3-pandas) and ours agree to the last bit here */
        same += a && b && strncmp(a, b, strcspn(b + 1, "\n") + 1) == 0;
    }
    CHECK(same == CLI_MEMBERS, "--member-anomalies rows = pandas anomalies screened (%zu)", same);
    free(out), free(plain);
}

/* One message line naming the file and what is wrong, exit 1, no output file. */
static void refused(const char *args, const char *header, const char *values, const char *want)
{
    const char *in = check_tmp_path("ens-bad.csv"), *sum = check_tmp_path("ens-bad-out.csv");
    char text[4096];
    size_t len = (size_t)snprintf(text, sizeof text, "%s\n", header);
    for (int i = 0; i < 40; i++)
        len += (size_t)snprintf(text + len, sizeof text - len, "%d,%s\n", i,
                                i >= 35 && strstr(values, "TAIL") ? "1,2,3,NA" : "1,2,3,4");
    check_write_file(in, text);
    char cmd[1600], *err = NULL;
    snprintf(cmd, sizeof cmd, "%s screen --surrogates 19 %s -o %s %s", check_binary(), args, sum,
             in);
    int rc = check_run(cmd, NULL, &err);
    CHECK(rc == 1 && err && count_lines(err, "\n") == 1 && strstr(err, want) &&
              !check_file_exists(sum),
          "refused (%s): rc %d, %s", want, rc, err ? err : "");
    free(err);
}

static void test_refusals(void)
{
    refused("--ensemble", "t,T.a,T.b,T.c,x", "", "ens-bad.csv: option --ensemble: ensemble of "
            "column 'T.a' has 3 members, at least 4 needed");
    refused("--ensemble", "t,a,b,c,d", "", "option --ensemble: no column is named NAME.MEMBER");
    refused("--members a,b,c", "t,T.a,T.b,T.c,T.d", "", "option --members: 3 members listed");
    refused("--members a,b,c,e", "t,T.a,T.b,T.c,T.d", "", "has no member 'e'");
    refused("--ensemble", "t,T.a,T.b,T.c,T.d", "TAIL", "member 'T.d' ends after 35 samples");
    refused("--ensemble --resume", "t,T.a,T.b,T.c,T.d", "", "not available with --resume");
    refused("--ensemble --figures " "/tmp", "t,T.a,T.b,T.c,T.d", "", "not available with --figures");
}

/* The rows NAME[mean] of a line in the summary, in order (a malloc'd text). */
static char *mean_rows(const char *text)
{
    size_t len = text ? strlen(text) : 0, used = 0;
    char *out = calloc(len + 1, 1);
    for (const char *p = text; out && p && *p;) {
        size_t n = strcspn(p, "\n") + (p[strcspn(p, "\n")] != 0);
        const char *mark = strstr(p, "[mean]");
        if (mark && mark < p + n)
            memcpy(out + used, p, n), used += n;
        p += n;
    }
    return out;
}

/* A NetCDF ensemble (a member dimension "run" with standard_name realization, CF), written by
 * python3-netcdf4 with the same numbers as a CSV of NAME.MEMBER columns: the same ensembles,
 * and the means' rows byte for byte (a mean's random stream follows its name). A grid without
 * a member dimension is refused. */
static void test_netcdf(void)
{
    const char *nc = check_tmp_path("ens.nc"), *csv = check_tmp_path("ens-nc.csv");
    char cmd[1400];
    snprintf(cmd, sizeof cmd, "netcdf_ensemble.py %s %s", nc, csv);
    double runs = 0;
    CHECK(check_python(cmd, &runs, 1) == 1 && runs == 5, "python3-netcdf4 wrote the ensemble");
    char *grid = NULL, *table = NULL, *err = NULL;
    int rc = run("--ensemble", nc, &grid, &err);
    rc |= run("--ensemble", csv, &table, NULL);
    CHECK(rc == 0 && count_lines(grid, ",member,") == 30 && count_lines(grid, ",mean,") == 6 &&
              count_lines(grid, ",pooled,") == 6 && strstr(grid, "\n\"tas[run=3,lat=30]\","),
          "NetCDF ensemble: 2 cells x 5 members (%d): %s", rc, err ? err : "");
    char *a = mean_rows(grid), *b = mean_rows(table);
    CHECK(a && b && count_lines(a, "\n") == 6 && strcmp(a, b) == 0,
          "NetCDF means = the CSV's means:\n%s---\n%s", a ? a : "", b ? b : "");
    free(a), free(b), free(grid), free(table), free(err);
    const char *plain = check_tmp_path("ens-plain.nc");
    snprintf(cmd, sizeof cmd, "netcdf_grid.py %s NETCDF4 map_chunks > /dev/null && echo 1", plain);
    double made = 0;
    check_python(cmd, &made, 1);
    err = NULL;
    rc = run("--ensemble", plain, NULL, &err);
    CHECK(rc == 1 && err && count_lines(err, "\n") == 1 && strstr(err, "no member dimension"),
          "a grid without members refused (%d): %s", rc, err ? err : "");
    free(err);
}

/* slowscan-mpi refuses --ensemble with several processes (one message, exit 1, no output);
 * skipped, saying why, without the binary or mpirun. */
static void test_mpi_refusal(void)
{
    if (access("build/slowscan-mpi", X_OK) != 0 || check_run("command -v mpirun", NULL, NULL) != 0 ||
        strstr(check_binary(), "asan")) {
        fprintf(stderr, "   ensemble: mpi refusal skipped (no build/slowscan-mpi or mpirun, or "
                "the sanitized run)\n");
        return;
    }
    const char *in = ensemble_csv("ens-mpi.csv", 0, 9), *sum = check_tmp_path("ens-mpi-out.csv");
    char cmd[2400], *err = NULL;
    snprintf(cmd, sizeof cmd, "%smpirun --oversubscribe -np 2 build/slowscan-mpi screen --ensemble "
             "--surrogates 19 -o %s %s", geteuid() == 0 ? "OMPI_ALLOW_RUN_AS_ROOT=1 "
             "OMPI_ALLOW_RUN_AS_ROOT_CONFIRM=1 " : "", sum, in);
    int rc = check_run(cmd, NULL, &err);
    CHECK(rc != 0 && err && count_lines(err, "slowscan: option --ensemble: not available with "
                                        "slowscan-mpi") == 1 && !check_file_exists(sum),
          "slowscan-mpi -np 2 refuses --ensemble (%d): %s", rc, err ? err : "");
    free(err);
}

/* The pooled test's size on null ensembles (forced relaxation + AR(1) members, detrended
 * by the default gaussian-linear fit): with M = 99, P(p <= 0.05) = 0.05 exactly when the
 * pooled null is exchangeable with the pooled statistic. */
static void test_pooled_size(void)
{
    enum { ENSEMBLES = 120, MEMBERS = 5, N = 150 };
    double *x = malloc((size_t)ENSEMBLES * MEMBERS * N * sizeof *x);
    char *header = malloc((size_t)ENSEMBLES * MEMBERS * 16 + 8);
    check_rng *rng = check_rng_alloc(77);
    size_t len = (size_t)sprintf(header, "t");
    for (size_t e = 0; e < ENSEMBLES; e++) {
        ensemble_draw(rng, MEMBERS, N, 0, x + e * MEMBERS * N);
        for (size_t m = 0; m < MEMBERS; m++)
            len += (size_t)sprintf(header + len, ",E%zu.%zu", e, m);
    }
    check_rng_free(rng);
    const char *in = check_tmp_path("ens-null.csv"), *sum = check_tmp_path("ens-null-out.csv");
    check_write_table_csv(in, header, ENSEMBLES * MEMBERS, N, 1.0, x);
    free(x), free(header);
    char args[1400], *err = NULL;
    int rc;
    snprintf(args, sizeof args, "--ensemble --quiet -o %s", sum);
    rc = run(args, in, NULL, &err);
    CHECK(rc == 0, "null ensembles screened (%d): %s", rc, err ? err : "");
    free(err);
    double v[6] = {0};
    char cmd[1400];
    snprintf(cmd, sizeof cmd, "ensemble_rows.py size %s 0.05", sum);
    CHECK(check_python(cmd, v, 6) == 6, "pooled rows counted");
    /* Bonferroni over the three tests: fails by chance less than 0.1% of runs */
    unsigned bound = 0;
    while (gsl_cdf_binomial_Q(bound, 0.05, ENSEMBLES) > 0.001 / 3)
        bound++;
    const char *names[] = {"lag1", "recovery_trend", "variance"};
    for (int k = 0; k < 3; k++) {
        double lo, hi;
        check_wilson((size_t)v[2 * k], (size_t)v[2 * k + 1], &lo, &hi);
        fprintf(stderr, "   pooled %s size on null ensembles (%d x %d members): %g/%g = %.3f, "
                "Wilson 95%% [%.3f, %.3f]\n", names[k], ENSEMBLES, MEMBERS, v[2 * k],
                v[2 * k + 1], v[2 * k] / v[2 * k + 1], lo, hi);
        CHECK(v[2 * k + 1] == ENSEMBLES && v[2 * k] <= bound, "pooled %s size: %g > %u",
              names[k], v[2 * k], bound);
    }
}

/* The pooled test's detection on ensembles whose members approach a fold (saddle-node normal
 * form): measured in a hand run of 200 ensembles (help), 99-100% for each test, against
 * 45-82% of the single members. */
static void test_pooled_detection(void)
{
    enum { ENSEMBLES = 20, MEMBERS = 5, N = 300 };
    double *x = malloc((size_t)ENSEMBLES * MEMBERS * N * sizeof *x);
    char header[ENSEMBLES * MEMBERS * 16 + 8];
    check_rng *rng = check_rng_alloc(78);
    size_t len = (size_t)sprintf(header, "t");
    for (size_t e = 0; e < ENSEMBLES; e++) {
        ensemble_draw_fold(rng, MEMBERS, N, x + e * MEMBERS * N);
        for (size_t m = 0; m < MEMBERS; m++)
            len += (size_t)sprintf(header + len, ",F%zu.%zu", e, m);
    }
    check_rng_free(rng);
    const char *in = check_tmp_path("ens-fold.csv"), *sum = check_tmp_path("ens-fold-out.csv");
    check_write_table_csv(in, header, ENSEMBLES * MEMBERS, N, 1.0, x);
    free(x);
    char args[1400];
    snprintf(args, sizeof args, "--ensemble --quiet -o %s", sum);
    CHECK(run(args, in, NULL, NULL) == 0, "fold ensembles screened");
    double v[6] = {0};
    char cmd[1400];
    snprintf(cmd, sizeof cmd, "ensemble_rows.py size %s 0.05", sum);
    CHECK(check_python(cmd, v, 6) == 6 && v[0] >= 16 && v[2] >= 16 && v[4] >= 16,
          "pooled rows detect the approach in 16 or more of 20 ensembles: lag1 %g, "
          "recovery_trend %g, variance %g", v[0], v[2], v[4]);
}

void ensemble_cli_tests(void)
{
    test_rows();
    test_members_anomalies();
    test_refusals();
    test_netcdf();
    test_mpi_refusal();
    test_pooled_size();
    test_pooled_detection();
}
