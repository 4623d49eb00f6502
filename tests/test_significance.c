/* Significance through the binary: determinism, size (calibration) and power of the surrogate
 * test of screen. */
#include "check.h"

#include <gsl/gsl_cdf.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* Stationary AR(1), phi = 0.5, started from its stationary distribution. */
static double ar1_sample(check_rng *rng, size_t k, size_t i, size_t n, double *state)
{
    (void)k, (void)n;
    double e = check_rng_gaussian(rng);
    *state = i == 0 ? e / sqrt(1 - 0.25) : 0.5 * *state + e;
    return *state;
}

/* AR(1), phi = 0.5, whose innovation sd rises from 1 to 4: the memory does not change. */
static double rising_noise_sample(check_rng *rng, size_t k, size_t i, size_t n, double *state)
{
    (void)k;
    double sd = 1.0 + 3.0 * (double)i / (double)(n - 1);
    *state = i == 0 ? check_rng_gaussian(rng) / sqrt(0.75) : 0.5 * *state + sd * check_rng_gaussian(rng);
    return *state;
}

/* Saddle-node normal form dx = (a - x^2) dt + 0.03 dW, dt = 0.5 per sample, forcing a
 * ramped from 1 to 0.02 over the record (10 Euler-Maruyama substeps per sample). */
static double fold_sample(check_rng *rng, size_t k, size_t i, size_t n, double *state)
{
    (void)k;
    double a = 1.0 - 0.98 * (double)i / (double)(n - 1), h = 0.05;
    if (i == 0)
        *state = 1.0;
    for (int s = 0; s < 10; s++)
        *state += (a - *state * *state) * h + 0.03 * sqrt(h) * check_rng_gaussian(rng);
    return *state;
}

/* Share of rows of `indicator` with p <= 0.05 in a screen summary (columns of DESIGN §4:
 * the indicator is field 2, p_value field 8). */
static double share_significant(const char *summary, const char *indicator, size_t *rows)
{
    size_t hits = 0, total = 0;
    for (const char *line = strchr(summary, '\n'); line && line[1]; line = strchr(line + 1, '\n')) {
        const char *field[9] = {line + 1};
        for (int f = 1; f < 9 && field[f - 1]; f++) {
            const char *comma = strchr(field[f - 1], ',');
            field[f] = comma ? comma + 1 : NULL;
        }
        size_t len = strlen(indicator);
        if (!field[8] || strncmp(field[1], indicator, len) != 0 || field[1][len] != ',')
            continue;
        total++;
        hits += strtod(field[7], NULL) <= 0.05;
    }
    *rows = total;
    return total ? (double)hits / (double)total : NAN;
}

static char *screen(const char *args, const char *input)
{
    char cmd[1024];
    snprintf(cmd, sizeof cmd, "%s screen %s %s", check_binary(), args, input);
    char *out = NULL;
    int rc = check_run(cmd, &out, NULL);
    CHECK(rc == 0 && out, "screen %s: exit %d", args, rc);
    return out;
}

/* A valid test has its nominal size: on stationary series the share of p <= 0.05 lies in the
 * binomial 99% interval around 0.05 (statistical fact; interval from GSL's binomial cdf). */
static void test_size(void)
{
    enum { SERIES = 200 };
    const char *in = check_tmp_path("stationary.csv");
    check_write_series_csv(in, SERIES, 300, ar1_sample, 21);
    const char *nulls[] = {"phase", "ar1"};
    for (size_t nm = 0; nm < 2; nm++) {
    char args[200];
    snprintf(args, sizeof args, "--surrogates 199 --detrend linear --window 40%% --null %s", nulls[nm]);
    char *out = screen(args, in);
    size_t lo = 0, hi = SERIES;
    while (gsl_cdf_binomial_P((unsigned)lo, 0.05, SERIES) < 0.005)
        lo++;
    while (hi > 0 && gsl_cdf_binomial_Q((unsigned)(hi - 1), 0.05, SERIES) < 0.005)
        hi--;
    const char *inds[] = {"variance", "lag1"};
    for (size_t j = 0; out && j < 2; j++) {
        size_t rows = 0;
        double share = share_significant(out, inds[j], &rows);
        size_t hits = (size_t)lround(share * (double)rows);
        fprintf(stderr, "size, %s null, %s: %zu of %zu with p <= 0.05 (99%% interval %zu..%zu)\n",
                nulls[nm], inds[j], hits, rows, lo, hi);
        CHECK(rows == SERIES && hits >= lo && hits <= hi, "size of the %s test (%s null): %zu/%zu outside %zu..%zu",
              inds[j], nulls[nm], hits, rows, lo, hi);
    }
    free(out);
    }
}

/* Power: series driven toward a fold are flagged (common practice, no source: critical
 * slowing down raises lag-1 autocorrelation and variance). */
static void test_power(void)
{
    enum { SERIES = 20 };
    const char *in = check_tmp_path("fold.csv");
    check_write_series_csv(in, SERIES, 1200, fold_sample, 33);
    /* A 25% window: with half-length windows the overlapping paths leave the rolling test
     * little power at this length (the reason a model-based test is planned). */
    char *out = screen("--surrogates 199 --window 25%", in);
    const char *inds[] = {"variance", "lag1"};
    for (size_t j = 0; out && j < 2; j++) {
        size_t rows = 0;
        double share = share_significant(out, inds[j], &rows);
        fprintf(stderr, "power, phase null, %s: %.2f of %zu fold series with p <= 0.05\n", inds[j],
                share, rows);
        /* At least 8 of 20: under a test of size 0.05 that has probability 4e-6 (binomial). */
        CHECK(rows == SERIES && share >= 0.4, "power of %s: %.2f", inds[j], share);
    }
    free(out);
}

/* Same seed, same bytes; another seed, other p-values. */
static void test_determinism(void)
{
    const char *in = check_tmp_path("det.csv");
    check_write_series_csv(in, 3, 200, ar1_sample, 5);
    char *a = screen("--surrogates 99 --seed 7", in), *b = screen("--surrogates 99 --seed 7", in);
    char *c = screen("--surrogates 99 --seed 8", in);
    CHECK(a && b && strcmp(a, b) == 0, "same seed, identical output");
    CHECK(a && c && strcmp(a, c) != 0, "another seed, another output");
    /* Fewer than 19 surrogates cannot give p <= 0.05: a warning, the run still completes. */
    char cmd[900], *err = NULL;
    snprintf(cmd, sizeof cmd, "%s screen --surrogates 10 %s", check_binary(), in);
    CHECK(check_run(cmd, NULL, &err) == 0 && err && strstr(err, "warning") && strstr(err, "19"),
          "--surrogates 10 warns: %s", err ? err : "");
    free(err);
    /* 130 replicates: three blocks of 64, the last one partial, dealt to 1, 2 or 3 threads. */
    char *t1 = screen("--surrogates 130 --threads 1", in), *t2 = screen("--surrogates 130 --threads 2", in);
    char *t3 = screen("--surrogates 130 --threads 3", in);
    CHECK(t1 && t2 && t3 && strcmp(t1, t2) == 0 && strcmp(t1, t3) == 0,
          "--threads 1, 2 and 3 give identical bytes");
    free(t1);
    free(t2);
    free(t3);
    free(a);
    free(b);
    free(c);
}

/* The surrogates command writes replicates whose periodogram is the residual's (Theiler et
 * al. 1992, Physica D 58:77), checked with numpy.fft.rfft (Debian python3-numpy). */
static void test_surrogates_command(void)
{
    const char *in = check_tmp_path("sur-in.csv"), *out = check_tmp_path("sur-out.csv");
    check_write_series_csv(in, 2, 300, ar1_sample, 8);
    char cmd[1400];
    snprintf(cmd, sizeof cmd, "%s surrogates --detrend none --surrogates 5 -o %s %s",
             check_binary(), out, in);
    CHECK(check_run(cmd, NULL, NULL) == 0, "surrogates command runs");
    char *text = check_read_file(out);
    size_t lines = 0;
    for (const char *c = text; c && *c; c++)
        lines += *c == '\n';
    CHECK(text && !strncmp(text, "series,replicate,time,value\n", 28) && lines == 1 + 2 * 5 * 300,
          "surrogates: header and %zu lines", lines);
    free(text);
    snprintf(cmd, sizeof cmd, "periodogram_kept.py %s %s s1", out, in);
    double v[2] = {0, 1};
    CHECK(check_python(cmd, v, 2) == 2 && v[0] == 5 && v[1] < 1e-9,
          "surrogate periodograms equal the series' (%g replicates, max rel. diff %.3g)", v[0], v[1]);
}

/* --json holds the same numbers as the CSV and the run's parameters; checked with Python's
 * json module (RFC 8259). */
static void test_json(void)
{
    const char *in = check_tmp_path("json-in.csv"), *js = check_tmp_path("out.json");
    const char *csv = check_tmp_path("json-out.csv");
    check_write_series_csv(in, 3, 200, ar1_sample, 12);
    char cmd[1400];
    snprintf(cmd, sizeof cmd, "%s screen --surrogates 49 --seed 4 --json %s -o %s %s",
             check_binary(), js, csv, in);
    CHECK(check_run(cmd, NULL, NULL) == 0, "screen --json runs");
    snprintf(cmd, sizeof cmd, "json_matches_csv.py %s %s", js, csv);
    double v[4] = {0};
    CHECK(check_python(cmd, v, 4) == 4 && v[0] == 9 && v[1] == 1 && v[2] == 4 && v[3] == 49,
          "json: %g rows, agree %g, seed %g, surrogates %g", v[0], v[1], v[2], v[3]);
}

/* robustness: the grid's rows, a cell equal to screen at the same settings, the fractions. */
static void test_robustness(void)
{
    const char *in = check_tmp_path("rob-in.csv"), *fr = check_tmp_path("rob-fr.csv");
    check_write_series_csv(in, 2, 300, fold_sample, 3);
    char args[1400];
    snprintf(args, sizeof args, "--windows 40%%:60%%:10%% --bandwidths 5%%,10%% --surrogates 49 "
             "--fractions %s", fr);
    char cmd[1600];
    snprintf(cmd, sizeof cmd, "%s robustness %s %s", check_binary(), args, in);
    char *grid = NULL;
    CHECK(check_run(cmd, &grid, NULL) == 0 && grid, "robustness runs");
    size_t lines = 0;
    for (const char *c = grid; c && *c; c++)
        lines += *c == '\n';
    CHECK(lines == 1 + 2 * 2 * 3 * 2, "robustness rows: %zu", lines);
    char *one = screen("--surrogates 49 --window 50% --bandwidth 10%", in);
    double tau_screen = NAN, p_screen = NAN, tau_grid = NAN, p_grid = NAN;
    const char *at = one ? strstr(one, "\ns1,lag1,") : NULL;
    if (at)
        sscanf(at + 9, "%*d,%*g,%*g,%lf,%*g,%lf", &tau_screen, &p_screen);
    at = grid ? strstr(grid, "\ns1,lag1,gaussian-linear,150,29.9,") : NULL;
    if (at)
        sscanf(at + 34, "%lf,%*g,%lf", &tau_grid, &p_grid);
    CHECK(!isnan(tau_grid) && tau_grid == tau_screen && p_grid == p_screen,
          "robustness cell = screen at window 50%%, bandwidth 10%%: %g/%g vs %g/%g", tau_grid,
          p_grid, tau_screen, p_screen);
    char *f = check_read_file(fr);
    CHECK(f && strstr(f, "series,indicator,detrend,cells,share_statistic_positive,share_p_at_most_0.05\n") &&
              strstr(f, "s0,variance,gaussian-linear,6,"), "fractions file: %s", f ? f : "");
    free(f);
    free(one);
    free(grid);
}

/* --null control: surrogates are phase surrogates of the control run's same-named series,
 * cut to the analysed length (periodogram checked with numpy.fft.rfft, Debian python3-numpy;
 * Theiler et al. 1992). A control lacking the series, or shorter, is refused. */
static void test_control_null(void)
{
    const char *forced = check_tmp_path("forced.csv"), *full = check_tmp_path("control.csv");
    const char *cut = check_tmp_path("control-cut.csv"), *out = check_tmp_path("control-sur.csv");
    check_write_series_csv(forced, 2, 300, fold_sample, 41);
    check_write_series_csv(full, 2, 400, ar1_sample, 42);
    check_write_series_csv(cut, 1, 300, ar1_sample, 42); /* s0's first 300 draws (series-major) */
    char cmd[1600];
    snprintf(cmd, sizeof cmd, "%s surrogates --detrend none --null control --control %s "
             "--surrogates 4 -o %s %s", check_binary(), full, out, forced);
    CHECK(check_run(cmd, NULL, NULL) == 0, "surrogates --null control runs");
    snprintf(cmd, sizeof cmd, "periodogram_kept.py %s %s s0", out, cut);
    double v[2] = {0, 1};
    CHECK(check_python(cmd, v, 2) == 2 && v[0] == 4 && v[1] < 1e-9,
          "control surrogates keep the control's periodogram (max rel. diff %.3g)", v[1]);
    snprintf(cmd, sizeof cmd, "--surrogates 99 --null control --control %s", full);
    char *s = screen(cmd, forced);
    CHECK(s && strstr(s, ",control,99,"), "screen names the control null");
    free(s);
    char *err = NULL;
    snprintf(cmd, sizeof cmd, "%s screen --null control --control %s %s", check_binary(), cut, full);
    CHECK(check_run(cmd, NULL, &err) == 1 && err && strstr(err, "fewer than the 400"),
          "a shorter control is refused: %s", err ? err : "");
    free(err);
    const char *other = check_tmp_path("control-other.csv");
    check_write_file(other, "t,zz\n0,1\n1,2\n2,1\n3,3\n4,2\n5,4\n6,3\n7,5\n8,3\n");
    snprintf(cmd, sizeof cmd, "%s screen --null control --control %s --vars s0 %s", check_binary(), other, forced);
    err = NULL;
    CHECK(check_run(cmd, NULL, &err) == 1 && err && strstr(err, "s0"),
          "a control lacking the series is refused: %s", err ? err : "");
    free(err);
}

/* recovery: the path is inside its band, the JSON fit matches the one the library gives on
 * the same residual, and on the demo the station driven closest to the fold has a rising
 * memory while the quiet control has none (common practice, no source). The thresholds were
 * set under the Nadaraya-Watson detrend, which runs here explicitly: under the default
 * gaussian-linear (10%) mill_pond gives t 1.25, p 0.17 -- part of the NW signal is its lag at
 * the record's end, where the state falls fastest. */
static void test_recovery(void)
{
    const char *js = check_tmp_path("recovery.json");
    char cmd[1400];
    snprintf(cmd, sizeof cmd, "%s recovery --deseason 364 --detrend gaussian "
             "--vars mill_pond,deep_basin --surrogates 99 --json %s data/stations.csv",
             check_binary(), js);
    char *out = NULL;
    CHECK(check_run(cmd, &out, NULL) == 0 && out, "recovery runs");
    size_t rows = 0, outside = 0;
    for (const char *line = out ? strchr(out, '\n') : NULL; line && line[1]; line = strchr(line + 1, '\n')) {
        double t, l, lo, hi;
        if (sscanf(strchr(line + 1, ','), ",%lf,%lf,%lf,%lf", &t, &l, &lo, &hi) == 4) {
            rows++;
            outside += !(lo <= l && l <= hi);
        }
    }
    CHECK(rows == 2 * 1040 && outside == 0, "recovery: %zu rows, %zu outside the band", rows, outside);
    free(out);
    snprintf(cmd, sizeof cmd, "/usr/bin/python3 -c \"import json; d=json.load(open('%s'))['series'];"
             "print(d[0]['t_a1'], d[0]['p_value'], d[1]['t_a1'], d[1]['p_value'])\"", js);
    out = NULL;
    double v[4] = {0};
    if (check_run(cmd, &out, NULL) == 0 && out)
        sscanf(out, "%lf %lf %lf %lf", &v[0], &v[1], &v[2], &v[3]);
    CHECK(v[0] > 3 && v[1] <= 0.05 && v[3] > 0.05, "mill_pond t %.2f p %.3f; deep_basin t %.2f p %.3f",
          v[0], v[1], v[2], v[3]);
    free(out);
    /* screen's recovery_trend row is the same test: same statistic, same surrogates, same p. */
    char *s = screen("--deseason 364 --detrend gaussian --vars mill_pond --surrogates 99 "
                     "--threads 2", "data/stations.csv");
    double stat = NAN, p = NAN;
    const char *at = s ? strstr(s, "\nmill_pond,recovery_trend,") : NULL;
    if (at)
        sscanf(at + 27, "%*d,NA,%*g,NA,%lf,%lf", &stat, &p);
    CHECK(check_close(stat, v[0], 1e-9, 0) && p == v[1],
          "screen recovery_trend (t %.6f, p %.4f) = recovery (t %.6f, p %.4f)", stat, p, v[0], v[1]);
    free(s);
}

/* Share of series with p <= 0.05 in a recovery --json file (Python's json module). */
static double recovery_share(const char *json, size_t *count)
{
    char cmd[900];
    snprintf(cmd, sizeof cmd, "/usr/bin/python3 -c \"import json; d=json.load(open('%s'))['series'];"
             "print(len(d), sum(1 for s in d if s['p_value'] is not None and s['p_value'] <= 0.05))\"",
             json);
    char *out = NULL;
    double n = 0, hits = 0;
    if (check_run(cmd, &out, NULL) == 0 && out)
        sscanf(out, "%lf %lf", &n, &hits);
    free(out);
    *count = (size_t)n;
    return n > 0 ? hits / n : NAN;
}

/* The drift test keeps its size on stationary AR(1) series (binomial 99% interval, as for
 * screen) and flags fold approaches more often than the rolling lag1 test does on the same
 * series (issue's power comparison; common practice, no source, for the direction). */
static void test_recovery_size_power(void)
{
    const char *in = check_tmp_path("rec-ar1.csv"), *js = check_tmp_path("rec-ar1.json");
    check_write_series_csv(in, 200, 300, ar1_sample, 77);
    char cmd[1400];
    snprintf(cmd, sizeof cmd, "%s recovery --detrend linear --surrogates 199 --json %s -o /dev/null %s",
             check_binary(), js, in);
    CHECK(check_run(cmd, NULL, NULL) == 0, "recovery on 200 AR(1) series");
    size_t count = 0;
    double share = recovery_share(js, &count);
    size_t hits = (size_t)lround(share * (double)count);
    fprintf(stderr, "size, phase null, recovery drift: %zu of %zu with p <= 0.05 (99%% interval 3..19)\n",
            hits, count);
    CHECK(count == 200 && hits >= 3 && hits <= 19, "size of the drift test: %zu/%zu", hits, count);
    /* A rising noise amplitude alone is not a growing memory: the size holds there too
     * (binomial 99% interval for 100 series, from GSL's binomial cdf). */
    const char *noisy = check_tmp_path("rec-noise.csv"), *nj = check_tmp_path("rec-noise.json");
    check_write_series_csv(noisy, 100, 300, rising_noise_sample, 78);
    snprintf(cmd, sizeof cmd, "%s recovery --detrend linear --surrogates 199 --json %s -o /dev/null %s",
             check_binary(), nj, noisy);
    CHECK(check_run(cmd, NULL, NULL) == 0, "recovery on 100 rising-noise series");
    share = recovery_share(nj, &count);
    hits = (size_t)lround(share * (double)count);
    size_t lo = 0, hi = 100;
    while (gsl_cdf_binomial_P((unsigned)lo, 0.05, 100) < 0.005)
        lo++;
    while (hi > 0 && gsl_cdf_binomial_Q((unsigned)(hi - 1), 0.05, 100) < 0.005)
        hi--;
    fprintf(stderr, "size, phase null, recovery drift, rising noise: %zu of %zu (99%% interval %zu..%zu)\n",
            hits, count, lo, hi);
    CHECK(count == 100 && hits >= lo && hits <= hi, "size under rising noise: %zu/%zu", hits, count);
    const char *fold = check_tmp_path("rec-fold.csv"), *fj = check_tmp_path("rec-fold.json");
    check_write_series_csv(fold, 20, 1200, fold_sample, 33); /* the series of test_power */
    snprintf(cmd, sizeof cmd, "%s recovery --surrogates 199 --json %s -o /dev/null %s",
             check_binary(), fj, fold);
    CHECK(check_run(cmd, NULL, NULL) == 0, "recovery on fold series");
    double power = recovery_share(fj, &count);
    fprintf(stderr, "power, phase null, recovery drift: %.2f of %zu fold series with p <= 0.05\n",
            power, count);
    CHECK(count == 20 && power >= 0.5, "power of the drift test %.2f (rolling lag1 at 25%%: 0.50-0.65)",
          power);
}

void suite_significance(void)
{
    test_recovery_size_power();
    test_recovery();
    test_control_null();
    test_robustness();
    test_json();
    test_surrogates_command();
    test_determinism();
    test_size();
    test_power();
}
