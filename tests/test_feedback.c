/* The sliding feedback regression (response/feedback_*.c) and `slowscan feedback`: each
 * window against statsmodels OLS and scipy.odr, the pre-processing against cftime and analytic
 * results, the equilibrium's refusal, and the command's refusals. */
#include "check.h"
#include "slowscan/feedback.h"
#include "slowscan/status.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

enum { N = 120, W = 40, STEP = 10 };

/* A forced-run-like pair: T relaxes with two timescales plus noise, N = 7 - 1.2 T + noise.
 * v[0..n) is T, v[n..2n) is N (the reference scripts' layout). */
static void simulate_pair(double *v, size_t n, unsigned long seed)
{
    check_rng *r = check_rng_alloc(seed);
    for (size_t i = 0; i < n; i++) {
        double t = (double)i + 1;
        v[i] = 3.5 * (1 - exp(-t / 4)) + 2.7 * (1 - exp(-t / 200)) + 0.3 * check_rng_gaussian(r);
        v[n + i] = 7 - 1.2 * v[i] + 0.5 * check_rng_gaussian(r);
    }
    check_rng_free(r);
}

static void run_windows(const double *v, feedback_config *c, feedback_window *w, size_t *count)
{
    double time[N];
    for (size_t i = 0; i < N; i++)
        time[i] = 1850 + (double)i;
    c->window = W - 1;
    c->stride = STEP;
    CHECK(slowscan_feedback_window_count(time, N, c, count) == SLOWSCAN_OK &&
          *count == (N - W) / STEP + 1, "window count %zu", *count);
    CHECK(slowscan_feedback_run(time, v + N, v, N, c, w, *count, NULL) == SLOWSCAN_OK,
          "feedback run");
}

/* The windows' numbers (per of them each, in the script's order) against a reference
 * script's output; prints the largest relative difference. */
static void compare_windows(const char *what, const double *mine, const double *ref, int got,
                            size_t count, int per, double tol)
{
    CHECK(got == (int)(per * count), "%s: reference ran (%d numbers)", what, got);
    double worst = 0;
    for (size_t k = 0; got == (int)(per * count) && k < per * count; k++) {
        worst = fmax(worst, fabs(mine[k] - ref[k]) / fabs(ref[k]));
        CHECK_CLOSE(mine[k], ref[k], tol, 0, what);
    }
    printf("  %s: %zu windows, largest relative difference %.2g\n", what, count, worst);
}

static void test_ols_reference(void)
{
    double v[2 * N], ref[5 * N], mine[5 * N];
    simulate_pair(v, N, 11);
    feedback_config c = slowscan_feedback_config_default();
    feedback_window w[N];
    size_t count = 0;
    run_windows(v, &c, w, &count);
    for (size_t j = 0; j < count; j++) {
        const double m[] = {w[j].forcing, w[j].lambda, w[j].se_forcing, w[j].se_lambda, w[j].r2};
        memcpy(mine + 5 * j, m, sizeof m);
    }
    /* Each window's coefficients, standard errors and R^2 against statsmodels.api.OLS on the
     * same samples (Debian python3-statsmodels, reference library), to 1e-8 relative. */
    char extra[64];
    snprintf(extra, sizeof extra, "%d %d", W, STEP);
    int got = check_python_on("feedback_statsmodels.py", v, 2 * N, extra, ref, 5 * N);
    compare_windows("OLS vs statsmodels", mine, ref, got, count, 5, 1e-8);
}

static void test_tls_reference(void)
{
    double v[2 * N], ref[4 * N], mine[4 * N];
    simulate_pair(v, N, 12);
    feedback_config c = slowscan_feedback_config_default();
    c.fit = FEEDBACK_TLS;
    c.noise_ratio = 0.5 * 0.5 / (0.3 * 0.3);
    feedback_window w[N];
    size_t count = 0;
    run_windows(v, &c, w, &count);
    for (size_t j = 0; j < count; j++) {
        const double m[] = {w[j].forcing, w[j].lambda, w[j].se_forcing, w[j].se_lambda};
        memcpy(mine + 4 * j, m, sizeof m);
    }
    /* Deming regression against scipy.odr's straight line with sx = 1, sy = sqrt(ratio)
     * (Debian python3-scipy, ODRPACK; reference library): beta and sd_beta to 1e-6. */
    char extra[96];
    snprintf(extra, sizeof extra, "%d %d %.17g", W, STEP, c.noise_ratio);
    int got = check_python_on("feedback_odr.py", v, 2 * N, extra, ref, 4 * N);
    compare_windows("TLS vs scipy.odr", mine, ref, got, count, 4, 1e-6);
}

/* T_eq = -F/lambda, its delta-method error, and the refusal when lambda >= 0. */
static void test_equilibrium(void)
{
    double time[50], T[50], Nf[50];
    check_rng *r = check_rng_alloc(3);
    for (size_t i = 0; i < 50; i++) {
        time[i] = (double)i;
        T[i] = 0.1 * (double)i;
        Nf[i] = 4 - 0.8 * T[i] + 0.05 * check_rng_gaussian(r);
    }
    feedback_config c = slowscan_feedback_config_default();
    c.scale = 0.5;
    feedback_window w;
    CHECK(slowscan_feedback_fit(time, Nf, T, 0, 50, &c, &w) == SLOWSCAN_OK &&
          w.teq_reason == FEEDBACK_TEQ_OK, "restoring window has an equilibrium");
    /* -F/lambda times the scale (definition, Gregory et al. 2004, GRL 31:L03205) */
    CHECK_CLOSE(w.t_eq, -w.forcing / w.lambda * 0.5, 1e-14, 0, "T_eq = -F/lambda * scale");
    /* the delta method (common practice) against statsmodels' cov_params() with a numerical
     * gradient (tests/reference/feedback_teq.py; Debian python3-statsmodels); slowscan's
     * error carries the autocorrelation factor, divided out here */
    double pair[100], ref[2];
    for (size_t i = 0; i < 50; i++)
        pair[i] = T[i], pair[50 + i] = Nf[i];
    CHECK(check_python_on("feedback_teq.py", pair, 100, NULL, ref, 2) == 2, "statsmodels ran");
    double factor = w.se_lambda_adj / w.se_lambda;
    CHECK_CLOSE(w.t_eq / 0.5, ref[0], 1e-10, 0, "T_eq vs statsmodels");
    CHECK_CLOSE(w.se_t_eq / 0.5 / factor, ref[1], 1e-6, 0, "delta-method se of T_eq vs statsmodels");
    for (size_t i = 0; i < 50; i++)
        Nf[i] = 1 + 0.3 * T[i] + 0.05 * check_rng_gaussian(r);
    check_rng_free(r);
    CHECK(slowscan_feedback_fit(time, Nf, T, 0, 50, &c, &w) == SLOWSCAN_OK &&
          w.teq_reason == FEEDBACK_TEQ_NOT_RESTORING && isnan(w.t_eq) && isnan(w.se_t_eq),
          "lambda >= 0: no equilibrium, reason not restoring");
    for (size_t i = 0; i < 50; i++)
        T[i] = 1;
    CHECK(slowscan_feedback_fit(time, Nf, T, 0, 50, &c, &w) == SLOWSCAN_OK &&
          w.status == SLOWSCAN_ECONST && w.teq_reason == FEEDBACK_TEQ_NO_FIT,
          "constant response: no fit");
    c.fit = FEEDBACK_TLS; /* no ratio */
    CHECK(slowscan_feedback_fit(time, Nf, T, 0, 50, &c, &w) == SLOWSCAN_EINVAL,
          "TLS without a noise ratio is refused");
}

/* Annual means against python3-cftime's month lengths on three calendars. */
static void test_annual_means(void)
{
    static const struct { calendar_kind kind; const char *name; long year0; } cals[] = {
        {CALENDAR_STANDARD, "standard", 1999}, {CALENDAR_NOLEAP, "noleap", 2000},
        {CALENDAR_360_DAY, "360_day", 2000}};
    enum { YEARS = 3 };
    double month[12 * YEARS + 5], v[12 * YEARS + 5], years[YEARS + 2], means[YEARS + 2], ref[YEARS];
    for (size_t c = 0; c < 3; c++) {
        check_rng *r = check_rng_alloc(20 + c);
        /* two months of the previous year first: a partial year is left out */
        for (size_t i = 0; i < 12 * YEARS + 5; i++) {
            month[i] = (double)(12 * cals[c].year0 - 2 + (long)i);
            v[i] = 280 + check_rng_gaussian(r);
        }
        check_rng_free(r);
        size_t ny = 0;
        CHECK(slowscan_feedback_annual_means(cals[c].kind, month, v, 12 * YEARS + 5, years, means,
                                             &ny) == SLOWSCAN_OK && ny == YEARS,
              "%s: %zu whole years", cals[c].name, ny);
        char extra[64];
        snprintf(extra, sizeof extra, "%s %ld", cals[c].name, cals[c].year0);
        /* python3-cftime (reference library): days between consecutive month starts */
        int got = check_python_on("feedback_cftime.py", v + 2, 12 * YEARS, extra, ref, YEARS);
        CHECK(got == YEARS, "cftime ran");
        for (size_t k = 0; got == YEARS && k < YEARS; k++) {
            CHECK_CLOSE(means[k], ref[k], 1e-13, 0, "annual mean vs cftime month lengths");
            CHECK(years[k] == (double)(cals[c].year0 + (long)k), "year stamp");
        }
    }
}

/* Anomalies against a baseline: a baseline that is exactly a line is removed exactly by
 * the drift mode, and its mean over the same period by the mean mode (analytic). */
static void test_baseline(void)
{
    double bt[300], bv[300], t[100], x[100], y[100];
    for (size_t i = 0; i < 300; i++) {
        bt[i] = (double)i;
        bv[i] = 2 + 0.01 * (double)i;
    }
    for (size_t i = 0; i < 100; i++) {
        t[i] = (double)i;
        x[i] = y[i] = 5;
    }
    CHECK(slowscan_feedback_anomalies(t, x, 100, bt, bv, 300, 150, FEEDBACK_BASELINE_DRIFT) ==
          SLOWSCAN_OK, "drift anomalies");
    double worst = 0;
    for (size_t i = 0; i < 100; i++)
        worst = fmax(worst, fabs(x[i] - (5 - (2 + 0.01 * ((double)i + 150)))));
    CHECK(worst < 1e-12, "a linear baseline is removed exactly (%.3g)", worst);
    CHECK(slowscan_feedback_anomalies(t, y, 100, bt, bv, 300, 150, FEEDBACK_BASELINE_MEAN) ==
          SLOWSCAN_OK, "mean anomalies");
    /* mean of 2 + 0.01 s over s = 150..249 is 2 + 0.01 * 199.5 */
    CHECK_CLOSE(y[0], 5 - (2 + 0.01 * 199.5), 1e-12, 1e-12, "mean over the same period");
    CHECK(slowscan_feedback_anomalies(t, y, 100, bt, bv, 300, 500, FEEDBACK_BASELINE_MEAN) ==
          SLOWSCAN_ESHORT, "a baseline that does not cover the period is refused");
}

/* cos(latitude) weights and the weighted mean (definition; the numpy check is in the CLI). */
static void test_weights(void)
{
    const double lat[] = {-60, 0, 60}, x[] = {1, 2, NAN};
    double w[3];
    CHECK(slowscan_feedback_latitude_weights(lat, 3, w) == SLOWSCAN_OK, "weights");
    CHECK_CLOSE(slowscan_feedback_weighted_mean(x, w, 3), (0.5 * 1 + 1 * 2) / 1.5, 1e-15, 0,
                "cos-latitude weighted mean skips missing cells");
    const double bad[] = {95};
    CHECK(slowscan_feedback_latitude_weights(bad, 1, w) == SLOWSCAN_EINVAL, "latitude > 90 refused");
}

/* slowscan_feedback_windows on t = 0, 1, ..., n-1 (n <= 301) for request q; the status, *c
 * and *d for the checks. */
static int windows_on(size_t n, const time_axis *axis, const feedback_request *q,
                      feedback_config *c, feedback_windows_detail *d)
{
    double t[301];
    for (size_t i = 0; i < n && i < 301; i++)
        t[i] = (double)i;
    *c = slowscan_feedback_config_default();
    return slowscan_feedback_windows(t, n, axis, q, c, d);
}

static screen_length length_of(double amount, int percent, length_unit unit)
{
    screen_length l = {amount, percent, unit};
    return l;
}

/* The defaults, worked out by hand (the rule is ours: common practice, no source): window
 * 50% of the record after skip, at most 100 time units; stride a tenth of the window, at
 * least one step; percentages of the record after skip (skip's of the whole record). */
static void test_window_defaults(void)
{
    const time_axis num = {TIME_AXIS_NUMBER, CALENDAR_STANDARD, DATE_DAY, 0, 0};
    feedback_config c;
    feedback_windows_detail d;
    feedback_request q = slowscan_feedback_request_default();
    CHECK(windows_on(301, &num, &q, &c, &d) == SLOWSCAN_OK && c.skip == 0 && c.window == 100 &&
          c.stride == 10 && d.step == 1 && d.rest == 300,
          "300 units: window capped at 100, stride 10 (%g, %g)", c.window, c.stride);
    CHECK(windows_on(101, &num, &q, &c, &d) == SLOWSCAN_OK && c.window == 50 && c.stride == 5,
          "100 units: window 50%% = 50, stride 5 (%g, %g)", c.window, c.stride);
    q.skip = length_of(20, 1, LENGTH_AXIS); /* 20% of 100 */
    CHECK(windows_on(101, &num, &q, &c, &d) == SLOWSCAN_OK && c.skip == 20 && d.rest == 80 &&
          c.window == 40 && c.stride == 4, "skip 20%%: 20, window 40, stride 4 (%g, %g, %g)",
          c.skip, c.window, c.stride);
    q.window = length_of(25, 1, LENGTH_AXIS);
    q.stride = length_of(10, 1, LENGTH_AXIS);
    CHECK(windows_on(101, &num, &q, &c, &d) == SLOWSCAN_OK && c.window == 20 && c.stride == 8,
          "window 25%% and stride 10%% of the 80 after skip: 20, 8 (%g, %g)", c.window, c.stride);
    q = slowscan_feedback_request_default();
    q.window = length_of(4, 0, LENGTH_AXIS);
    CHECK(windows_on(101, &num, &q, &c, &d) == SLOWSCAN_OK && c.window == 4 && c.stride == 1,
          "window 4: stride one step, not 0.4 (%g)", c.stride);
    const time_axis months = {TIME_AXIS_MONTHS, CALENDAR_STANDARD, DATE_MONTH, 0, 0};
    q = slowscan_feedback_request_default();
    q.skip = length_of(2, 0, LENGTH_YEARS);
    CHECK(windows_on(121, &months, &q, &c, &d) == SLOWSCAN_OK && c.skip == 24 &&
          c.window == 48 && fabs(c.stride - 4.8) < 1e-12,
          "months: skip 2y = 24, window 48, stride 4.8 (%g, %g, %g)", c.skip, c.window, c.stride);
    q = slowscan_feedback_request_default();
    q.span = 1;
    q.span_from = 10;
    q.span_until = 100.0000005; /* within a millionth of a step of the last sample */
    CHECK(windows_on(101, &num, &q, &c, &d) == SLOWSCAN_OK && c.span_from == 10 &&
          c.span_until == 100.0000005, "span 10..100 taken");
}

/* Each refusal, in the order the checks run. */
static void test_window_refusals(void)
{
    const time_axis num = {TIME_AXIS_NUMBER, CALENDAR_STANDARD, DATE_DAY, 0, 0};
    const struct {
        const char *what;
        size_t n;
        double skip, window, stride;
        length_unit unit; /* of the window */
        int span;
        double from, until;
        int status;
        feedback_refusal why;
    } cases[] = {
        {"3 samples", 3, NAN, NAN, NAN, LENGTH_AXIS, 0, 0, 0, SLOWSCAN_ESHORT,
         FEEDBACK_REFUSAL_SAMPLES},
        {"3 samples before a bad span", 3, NAN, NAN, NAN, LENGTH_AXIS, 1, NAN, NAN,
         SLOWSCAN_ESHORT, FEEDBACK_REFUSAL_SAMPLES},
        {"span decreasing", 101, NAN, NAN, NAN, LENGTH_AXIS, 1, 50, 10, SLOWSCAN_EINVAL,
         FEEDBACK_REFUSAL_SPAN},
        {"span past the end", 101, NAN, NAN, NAN, LENGTH_AXIS, 1, 10, 100.00001, SLOWSCAN_EINVAL,
         FEEDBACK_REFUSAL_SPAN},
        {"span before the start", 101, NAN, NAN, NAN, LENGTH_AXIS, 1, -0.00001, 50,
         SLOWSCAN_EINVAL, FEEDBACK_REFUSAL_SPAN},
        {"span not read", 101, NAN, NAN, NAN, LENGTH_AXIS, 1, NAN, NAN, SLOWSCAN_EINVAL,
         FEEDBACK_REFUSAL_SPAN},
        {"skip leaves 2 steps", 101, 98, NAN, NAN, LENGTH_AXIS, 0, 0, 0, SLOWSCAN_EINVAL,
         FEEDBACK_REFUSAL_SKIP},
        {"skip leaves 3 steps: the default window 1.5 is short", 101, 97, NAN, NAN, LENGTH_AXIS,
         0, 0, 0, SLOWSCAN_EINVAL, FEEDBACK_REFUSAL_WINDOW_SHORT},
        {"window in years on a number axis", 101, NAN, 10, NAN, LENGTH_YEARS, 0, 0, 0,
         SLOWSCAN_EINVAL, FEEDBACK_REFUSAL_UNIT},
        {"window 101 of 100", 101, NAN, 101, NAN, LENGTH_AXIS, 0, 0, 0, SLOWSCAN_EINVAL,
         FEEDBACK_REFUSAL_WINDOW_LONG},
        {"window 2: 3 samples", 101, NAN, 2, NAN, LENGTH_AXIS, 0, 0, 0, SLOWSCAN_EINVAL,
         FEEDBACK_REFUSAL_WINDOW_SHORT},
        {"stride half a step", 101, NAN, NAN, 0.5, LENGTH_AXIS, 0, 0, 0, SLOWSCAN_EINVAL,
         FEEDBACK_REFUSAL_STRIDE_SHORT},
    };
    for (size_t k = 0; k < sizeof cases / sizeof cases[0]; k++) {
        feedback_request q = slowscan_feedback_request_default();
        q.skip = length_of(cases[k].skip, 0, LENGTH_AXIS);
        q.window = length_of(cases[k].window, 0, cases[k].unit);
        q.stride = length_of(cases[k].stride, 0, LENGTH_AXIS);
        q.span = cases[k].span;
        q.span_from = cases[k].from;
        q.span_until = cases[k].until;
        feedback_config c;
        feedback_windows_detail d;
        int st = windows_on(cases[k].n, &num, &q, &c, &d);
        CHECK(st == cases[k].status && d.refusal == cases[k].why, "%s: status %d, refusal %d",
              cases[k].what, st, (int)d.refusal);
    }
    feedback_request q = slowscan_feedback_request_default();
    q.skip = length_of(1, 0, LENGTH_DAYS);
    feedback_config c;
    feedback_windows_detail d;
    CHECK(windows_on(101, &num, &q, &c, &d) == SLOWSCAN_EINVAL &&
          d.refusal == FEEDBACK_REFUSAL_UNIT && d.length == FEEDBACK_LENGTH_SKIP,
          "skip in days on a number axis: the skip named");
    q = slowscan_feedback_request_default();
    q.window = length_of(101, 0, LENGTH_AXIS);
    CHECK(windows_on(101, &num, &q, &c, &d) == SLOWSCAN_EINVAL && c.window == 101 &&
          d.rest == 100 && d.step == 1, "window too long: the message's numbers (%g, %g)",
          c.window, d.rest);
}

void suite_feedback_cli(void);
void suite_feedback_grid(void);
void suite_feedback_branch(void);

void suite_feedback(void)
{
    test_ols_reference();
    test_tls_reference();
    test_equilibrium();
    test_annual_means();
    test_baseline();
    test_weights();
    test_window_defaults();
    test_window_refusals();
    suite_feedback_cli();
    suite_feedback_grid();
    suite_feedback_branch();
}
