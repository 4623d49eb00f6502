/* Tests of deseasoning (slowscan_detrend_deseason_apply): the fixed mean cycle against statsmodels, the
 * running climatology and the harmonic fit against an independent numpy implementation of
 * their definitions (tests/reference/deseason_ref.py, numpy.linalg.lstsq and statsmodels
 * OLS), analytic cases, NaN handling, spec errors, and the statsmodels co2 data set through
 * the binary. */
#include "check.h"
#include "slowscan/detrend.h"
#include "slowscan/status.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#define TWO_PI 6.283185307179586476925287 /* M_PI is not in strict C11 */

void suite_deseason(void);

static int deseason(double period, int harmonics, double window, double dt, double *x,
                    size_t n)
{
    deseason_spec spec = slowscan_detrend_deseason_default();
    spec.period = period;
    spec.harmonics = harmonics;
    spec.window = window;
    return slowscan_detrend_deseason_apply(&spec, dt, x, n);
}

/* Largest |x_i - want_i| where want_i = level + slope i; NaN in x must sit where nan_at says. */
static double off_line(const double *x, size_t n, double level, double slope)
{
    double err = 0.0;
    for (size_t i = 0; i < n; i++)
        if (isfinite(x[i]))
            err = fmax(err, fabs(x[i] - level - slope * (double)i));
    return err;
}

static void check_fixed_pure_cycle(size_t n, int with_nan)
{
    double x[130];
    for (size_t i = 0; i < n; i++) /* period 6 time units, dt 0.5: P = 12 */
        x[i] = 5.0 + 2.0 * sin(TWO_PI * (double)i / 12.0) + cos(2.0 * TWO_PI * (double)i / 12.0);
    if (with_nan)
        x[3] = x[40] = x[77] = NAN;
    int rc = deseason(6.0, 0, 0.0, 0.5, x, n);
    /* analytic: a pure P-periodic cycle has its phase means as values, and their mean is the
     * level 5 */
    double err = off_line(x, n, 5.0, 0.0);
    CHECK(rc == SLOWSCAN_OK && err <= 1e-12 && isnan(x[40]) == with_nan,
          "deseason pure cycle n=%zu nan=%d: max err %.3g", n, with_nan, err);
}

static void test_fixed_cycle(check_rng *rng)
{
    check_fixed_pure_cycle(120, 0);
    check_fixed_pure_cycle(126, 1); /* 10.5 cycles: unequal phase counts */
    double x[100], before[100], seasonal[100];
    for (size_t i = 0; i < 100; i++)
        x[i] = 1e6 + check_rng_gaussian(rng) + ((i % 4) == 1 ? 3.0 : 0.0);
    memcpy(before, x, sizeof x);
    /* statsmodels.tsa.seasonal.seasonal_decompose (additive, Debian python3-statsmodels): the
     * fixed cycle must equal its seasonal component, i.e. x_before - x_after == seasonal. */
    int rc = deseason(4.0 * (1.0 + 1e-7), 0, 0.0, 1.0, x, 100); /* within the 1e-6 tolerance */
    int got = check_python_on("seasonal_statsmodels.py", before, 100, "4", seasonal, 100);
    for (size_t i = 0; i < 100; i++)
        before[i] -= seasonal[i];
    double err = check_max_diff(x, before, 100);
    CHECK(rc == SLOWSCAN_OK && got == 100 && err <= 1e-8,
          "deseason vs statsmodels seasonal_decompose: max diff %.3g", err);
    /* Analytic: a cycle riding on a steep linear trend is removed exactly (the one-period
     * average of line + cycle is the line); phase means of the raw series would not be. */
    for (size_t i = 0; i < 100; i++)
        x[i] = 0.5 * (double)i + ((i % 4) == 1 ? 3.0 : 0.0);
    rc = deseason(4.0, 0, 0.0, 1.0, x, 100);
    err = off_line(x, 100, 0.75, 0.5);
    CHECK(rc == SLOWSCAN_OK && err <= 1e-12, "deseason on a trend: max err %.3g", err);
    for (size_t i = 0; i < 100; i++)
        x[i] = (i % 4 == 2) ? NAN : check_rng_gaussian(rng);
    memcpy(before, x, sizeof x);
    CHECK(deseason(4.0, 0, 0.0, 1.0, x, 100) == SLOWSCAN_ESHORT &&
              check_max_diff(x, before, 100) == 0,
          "deseason: an empty phase is ESHORT and leaves x unchanged");
}

/* A test series: a trend, a cycle of `steps` samples whose amplitude grows, noise, and with
 * `gaps` a missing sample every 97. */
static void make_series(check_rng *rng, double steps, int gaps, double *x, size_t n)
{
    for (size_t i = 0; i < n; i++) {
        double a = 1.0 + 2.0 * (double)i / (double)n, w = TWO_PI * (double)i / steps;
        x[i] = 100.0 + 0.02 * (double)i + a * sin(w) + 0.4 * cos(2.0 * w + 1.0) +
               0.3 * check_rng_gaussian(rng);
    }
    for (size_t i = 17; gaps && i < n; i += 97)
        x[i] = NAN;
}

/* Our deseasoning against deseason_ref.py (the same definition, written with numpy). */
static void check_reference(check_rng *rng, double dt, double period, int harmonics,
                            double window, int gaps, const char *method)
{
    enum { N = 400 };
    double x[N], want[N];
    double steps = period / dt;
    make_series(rng, steps, gaps, x, N);
    size_t w = window > 0 ? (size_t)round(window / dt) + 1 : N;
    int k = harmonics ? harmonics : fabs(steps - round(steps)) > 1e-6 * steps ? 3 : 0;
    char extra[128];
    snprintf(extra, sizeof extra, "%.17g %d %zu %s", steps, k, w, method);
    int got = check_python_on("deseason_ref.py", x, N, extra, want, N);
    int rc = deseason(period, harmonics, window, dt, x, N);
    double err = check_max_diff(x, want, N);
    CHECK(rc == SLOWSCAN_OK && got == N && err <= 1e-9,
          "deseason P=%g K=%d window %g vs %s: status %d, max diff %.3g", steps, k, window,
          method, rc, err);
}

static void test_against_numpy(check_rng *rng)
{
    /* running climatology vs the numpy implementation of the same definition */
    check_reference(rng, 1.0, 12.0, 0, 60.0, 1, "numpy");
    check_reference(rng, 1.0, 12.0, 0, 24.0, 0, "numpy"); /* the shortest: two periods */
    check_reference(rng, 0.5, 5.0, 0, 80.0, 1, "numpy");  /* P = 10: the 2 x 10 average */
    /* harmonic fit vs numpy.linalg.lstsq and statsmodels OLS on the same design */
    check_reference(rng, 7.0, 365.25, 0, 0.0, 1, "lstsq"); /* weekly, 52.18 steps: 3 harmonics */
    check_reference(rng, 7.0, 365.25, 0, 0.0, 1, "ols");
    check_reference(rng, 1.0, 12.0, 2, 0.0, 1, "lstsq");   /* whole period, harmonics asked */
    check_reference(rng, 1.0, 12.0, 4, 100.0, 1, "lstsq"); /* running window */
    check_reference(rng, 7.0, 365.25, 2, 1100.0, 1, "ols"); /* non-whole, running window */
}

/* Residual cycle power: the mean over whole cycles of half the squared amplitude of r's
 * period-12 component (projection of each 12-sample block on cos, sin — exact for a block of
 * one period). */
static double cycle_power(const double *r, size_t n)
{
    double power = 0.0;
    size_t blocks = n / 12;
    for (size_t b = 0; b < blocks; b++) {
        double c = 0.0, s = 0.0;
        for (size_t j = 0; j < 12; j++) {
            c += r[12 * b + j] * cos(TWO_PI * (double)j / 12.0) / 6.0;
            s += r[12 * b + j] * sin(TWO_PI * (double)j / 12.0) / 6.0;
        }
        power += 0.5 * (c * c + s * s);
    }
    return power / (double)blocks;
}

/* A cycle whose amplitude grows linearly from 1 to 4 over 100 periods. Analytic: the fixed
 * mean cycle has amplitude 2.5, leaving a cycle of amplitude a(t) - 2.5, of power
 * var(U[1,4]) / 2 = 0.375; a centred window averages a linear amplitude to its value at the
 * centre, so the running climatology leaves almost nothing (a little at the shifted ends). */
static void test_growing_amplitude(void)
{
    enum { N = 1200 };
    double x[N], fixed[N], running[N], harmonic[N];
    for (size_t i = 0; i < N; i++)
        x[i] = 7.0 + (1.0 + 3.0 * (double)i / N) * sin(TWO_PI * (double)i / 12.0 + 0.4);
    memcpy(fixed, x, sizeof x);
    memcpy(running, x, sizeof x);
    memcpy(harmonic, x, sizeof x);
    int rc = deseason(12.0, 0, 0.0, 1.0, fixed, N);
    rc |= deseason(12.0, 0, 120.0, 1.0, running, N);
    rc |= deseason(12.0, 1, 120.0, 1.0, harmonic, N);
    double before = cycle_power(x, N), pf = cycle_power(fixed, N);
    double pr = cycle_power(running, N), ph = cycle_power(harmonic, N);
    fprintf(stderr, "   growing cycle power %.4g; left by fixed %.4g, running %.3g, running "
            "harmonic %.3g\n", before, pf, pr, ph);
    CHECK(rc == SLOWSCAN_OK && check_close(pf, 0.375, 0.05, 0.0),
          "fixed cycle leaves power %.4g, analytic 0.375", pf);
    CHECK(pr < 1e-2 * pf && ph < 1e-2 * pf,
          "running window removes a growing cycle far better: %.3g, %.3g vs fixed %.3g", pr, ph,
          pf);
}

/* A pure sinusoid of 52.1775 steps (no whole number) with a second harmonic, on a line:
 * removed to round-off by the harmonics, whole record or running window, gaps or not
 * (analytic: the average's leak is undone exactly, see detrend/deseason.c). */
static void test_noninteger_sinusoid(void)
{
    enum { N = 800 };
    const double steps = 52.1775;
    double x[N];
    const double windows[] = {0.0, 2.0 * steps, 300.0};
    for (int gaps = 0; gaps < 2; gaps++)
        for (size_t v = 0; v < 3; v++) {
            for (size_t i = 0; i < N; i++) {
                double w = TWO_PI * (double)i / steps;
                x[i] = 10.0 + 0.01 * (double)i + 3.0 * sin(w + 0.3) + 0.5 * cos(2.0 * w);
            }
            if (gaps)
                x[5] = x[300] = x[301] = x[790] = NAN;
            int rc = deseason(steps, 0, windows[v], 1.0, x, N);
            double err = off_line(x, N, 10.0, 0.01);
            CHECK(rc == SLOWSCAN_OK && err <= 1e-10 && isnan(x[300]) == gaps,
                  "sinusoid of %g steps, window %g, gaps %d: max err %.3g", steps, windows[v],
                  gaps, err);
        }
}

static void test_short_windows(void)
{
    enum { N = 120 };
    double x[N], before[N];
    for (size_t i = 0; i < N; i++) /* phase 5 missing in the first 60 samples */
        x[i] = (i < 60 && i % 12 == 5) ? NAN : sin(TWO_PI * (double)i / 12.0);
    memcpy(before, x, sizeof x);
    CHECK(deseason(12.0, 0, 0.0, 1.0, x, N) == SLOWSCAN_OK, "gappy phase, whole record: fine");
    memcpy(x, before, sizeof x);
    CHECK(deseason(12.0, 0, 36.0, 1.0, x, N) == SLOWSCAN_ESHORT &&
              check_max_diff(x, before, N) == 0,
          "a window without a phase is ESHORT, x unchanged");
    for (size_t i = 0; i < 50; i++) /* the first 50 samples missing: no fit at the start */
        x[i] = NAN;
    memcpy(before, x, sizeof x);
    CHECK(deseason(12.0, 3, 30.0, 1.0, x, N) == SLOWSCAN_ESHORT &&
              check_max_diff(x, before, N) == 0,
          "a harmonic window without samples is ESHORT, x unchanged");
    for (size_t i = 0; i < N; i++)
        x[i] = NAN;
    CHECK(deseason(12.0, 0, 0.0, 1.0, x, N) == SLOWSCAN_ESHORT, "all missing: ESHORT");
}

static void expect_problem(deseason_spec spec, double dt, size_t n, deseason_problem want,
                           int want_k, const char *what)
{
    deseason_problem got = DESEASON_FINE;
    int k = -1;
    int rc = slowscan_detrend_deseason_check(&spec, dt, n, &got, &k);
    CHECK(got == want && rc == (want == DESEASON_FINE ? SLOWSCAN_OK : SLOWSCAN_EINVAL) &&
              (want != DESEASON_FINE || k == want_k),
          "%s: problem %d (want %d), harmonics %d (want %d)", what, (int)got, (int)want, k,
          want_k);
}

static void test_spec_errors(void)
{
    deseason_spec s = slowscan_detrend_deseason_default();
    CHECK(s.period == 0.0 && s.harmonics == 0 && s.window == 0.0, "default spec");
    expect_problem(s, 1.0, 100, DESEASON_BAD_PERIOD, 0, "period 0");
    s.period = 12.0;
    expect_problem(s, 1.0, 100, DESEASON_FINE, 0, "whole period: mean cycle");
    expect_problem(s, 0.0, 100, DESEASON_BAD_PERIOD, 0, "dt 0");
    expect_problem(s, 7.0, 100, DESEASON_BAD_PERIOD, 0, "P < 2 steps");
    expect_problem(s, 1.0, 23, DESEASON_BAD_PERIOD, 0, "P > n/2");
    expect_problem(s, 1.0, 24, DESEASON_FINE, 0, "P = n/2");
    s.period = 52.1775;
    expect_problem(s, 1.0, 400, DESEASON_FINE, 3, "non-whole period: 3 harmonics");
    s.period = 5.5;
    expect_problem(s, 1.0, 100, DESEASON_BAD_HARMONICS, 0, "default 3 above Nyquist of 5.5");
    s.harmonics = 2;
    expect_problem(s, 1.0, 100, DESEASON_FINE, 2, "2 harmonics of 5.5 steps");
    s.period = 12.0;
    s.harmonics = 6;
    expect_problem(s, 1.0, 100, DESEASON_BAD_HARMONICS, 0, "K = P/2 is the Nyquist frequency");
    s.harmonics = 5;
    expect_problem(s, 1.0, 100, DESEASON_FINE, 5, "K = 5 of 12");
    s.harmonics = -1;
    expect_problem(s, 1.0, 100, DESEASON_BAD_HARMONICS, 0, "K < 0");
    s.harmonics = 0;
    s.window = 23.0;
    expect_problem(s, 1.0, 100, DESEASON_BAD_WINDOW, 0, "window < 2 periods");
    s.window = 24.0;
    expect_problem(s, 1.0, 100, DESEASON_FINE, 0, "window = 2 periods");
    s.window = 99.0;
    expect_problem(s, 1.0, 100, DESEASON_FINE, 0, "window = record");
    s.window = 99.5;
    expect_problem(s, 1.0, 100, DESEASON_BAD_WINDOW, 0, "window > record");
    s.window = -1.0;
    expect_problem(s, 1.0, 100, DESEASON_BAD_WINDOW, 0, "window < 0");
    CHECK(slowscan_detrend_deseason_check(NULL, 1.0, 100, NULL, NULL) == SLOWSCAN_EINVAL &&
              slowscan_detrend_deseason_apply(NULL, 1.0, NULL, 0) == SLOWSCAN_EINVAL,
          "NULL spec");
}

/* Periodogram power of the residual column of `slowscan detrend` output at frequency f
 * (cycles per time unit): |sum (r - mean) exp(-2 pi i f t)|^2 / N over the finite rows. */
static double residual_power(const char *csv, double f)
{
    enum { MAX_ROWS = 4000 };
    static double t[MAX_ROWS], r[MAX_ROWS];
    size_t n = 0;
    double mean = 0.0;
    const char *line = csv ? strchr(csv, '\n') : NULL;
    while (line && *++line && n < MAX_ROWS) { /* series,time,value,trend,residual */
        const char *c1 = strchr(line, ','), *c4 = c1;
        for (int k = 0; k < 3 && c4; k++)
            c4 = strchr(c4 + 1, ',');
        if (!c4)
            return NAN;
        t[n] = strtod(c1 + 1, NULL);
        r[n] = strncmp(c4 + 1, "NA", 2) == 0 ? NAN : strtod(c4 + 1, NULL);
        if (isfinite(r[n]))
            mean += r[n++];
        line = strchr(line, '\n');
    }
    mean /= (double)n;
    double re = 0.0, im = 0.0;
    for (size_t i = 0; i < n; i++) {
        re += (r[i] - mean) * cos(TWO_PI * f * t[i]);
        im -= (r[i] - mean) * sin(TWO_PI * f * t[i]);
    }
    return n ? (re * re + im * im) / (double)n : NAN;
}

static double co2_power(const char *csv_path, const char *options)
{
    char cmd[1024];
    char *out = NULL;
    snprintf(cmd, sizeof cmd, "%s detrend %s %s", check_binary(), options, csv_path);
    int rc = check_run(cmd, &out, NULL);
    double p = rc == 0 ? residual_power(out, 1.0 / 365.25) : NAN;
    free(out);
    return p;
}

/* Real data — source: statsmodels' co2 data set (Mauna Loa weekly CO2 1958-2001, 59 missing
 * weeks; statsmodels.api.datasets.co2 in Debian python3-statsmodels), time in days. A year
 * is 365.25/7 = 52.18 weekly steps, so only the harmonic fit can remove it. */
static void test_co2(void)
{
    const char *csv = check_tmp_path("co2.csv");
    char args[600];
    double rows[2] = {0, 0};
    snprintf(args, sizeof args, "co2_csv.py %s", csv);
    int got = check_python(args, rows, 2);
    CHECK(got == 2 && rows[0] == 2284 && rows[1] == 59, "co2 data set: %g rows, %g missing",
          rows[0], rows[1]);
    double raw = co2_power(csv, "");
    double fixed = co2_power(csv, "--deseason 365.25");
    double running = co2_power(csv, "--deseason 365.25 --deseason-window 3652.5");
    double k2 = co2_power(csv, "--deseason 365.25 --harmonics 2");
    fprintf(stderr, "   co2 annual power: %.4g, deseasoned %.3g (x%.3g less), running 10 y %.3g "
            "(x%.3g), 2 harmonics %.3g (x%.3g)\n", raw, fixed, raw / fixed, running,
            raw / running, k2, raw / k2);
    CHECK(raw > 0 && fixed < raw / 500 && running < raw / 500 && k2 < raw / 500,
          "co2: annual power %.4g falls to %.3g / %.3g / %.3g", raw, fixed, running, k2);
    /* screen --json records the deseasoning: the options, and per row the cycle removed */
    const char *json = check_tmp_path("co2.json");
    snprintf(args, sizeof args, "%s screen --surrogates 0 --deseason 365.25 --deseason-window 20%% "
             "--json %s -o /dev/null %s", check_binary(), json, csv);
    int rc = check_run(args, NULL, NULL);
    char *text = check_read_file(json);
    CHECK(rc == 0 && text && strstr(text, "\"deseason\": 365.25") &&
              strstr(text, "\"deseason_window\": \"20%\"") && strstr(text, "\"harmonics\": null") &&
              strstr(text, "\"deseason_harmonics\": 3"),
          "screen --json records the deseasoning (exit %d)", rc);
    free(text);
}

void suite_deseason(void)
{
    check_rng *rng = check_rng_alloc(20240614UL);
    test_fixed_cycle(rng);
    test_against_numpy(rng);
    test_growing_amplitude();
    test_noninteger_sinusoid();
    test_short_windows();
    test_spec_errors();
    test_co2();
    check_rng_free(rng);
}
