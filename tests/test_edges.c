/* Numerical edge cases (issue 18): constant windows, all-missing windows, series at the
 * rounding level, magnitudes near 1e300 and 1e-300, series of 8 samples, windows of 10^6
 * samples, a lag-1 coefficient of exactly +1 and -1. Through the library (screening,
 * indicators, Kendall, recovery, the feedback fit) and the command, each gives numbers, a
 * documented NA with its reason, or a clear refusal — never Inf, and never NaN where the
 * result says there is a number.
 *
 * The expectations are properties rather than published values: "scale invariance" (tau,
 * p and the drift t of a x equal those of x for a > 0: ranks, correlations and t-values do
 * not change with the unit; common practice, no source), and "constant data have no
 * spread" (variance 0 or NA, never a number made of round-off). Where a value is checked
 * the reference is GSL (gsl_stats_variance, gsl_stats_lag1_autocorrelation). */
#include "check.h"
#include "edges_check.h"
#include "slowscan/feedback.h"
#include "slowscan/kendall.h"
#include "slowscan/recovery.h"
#include "slowscan/screen.h"
#include "slowscan/status.h"

#include <gsl/gsl_statistics_double.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

enum { N = 240 };

/* An AR(1) with coefficient 0.7 (GSL mt19937 draws), the base every scaled copy starts from. */
void edges_ar1(double *x, size_t n, unsigned long seed)
{
    check_rng *rng = check_rng_alloc(seed);
    x[0] = check_rng_gaussian(rng);
    for (size_t i = 1; i < n; i++)
        x[i] = 0.7 * x[i - 1] + check_rng_gaussian(rng);
    check_rng_free(rng);
}

static screen_config small_config(void)
{
    screen_config c = slowscan_screen_config_default();
    c.surrogates = 19;
    return c;
}

int edges_screen(screen_workspace *given, const screen_config *cfg, const char *name,
                 const double *x, size_t n, screen_result *r, screen_detail *d)
{
    double *t = malloc(n * sizeof *t);
    for (size_t i = 0; i < n; i++)
        t[i] = (double)i;
    screen_input in = {.name = name, .source = "edges", .time_name = "t", .time = t, .values = x,
                       .n = n};
    screen_workspace *ws = given ? given : slowscan_screen_workspace_alloc(1);
    int st = slowscan_screen_series(ws, cfg, &in, r, d);
    if (!given)
        slowscan_screen_workspace_free(ws);
    free(t);
    return st;
}

void edges_result_clean(const screen_result *r, const char *what)
{
    for (size_t j = 0; j < r->ntests; j++) {
        const screen_test *t = &r->tests[j];
        const char *name = slowscan_screen_test_name(t->kind);
        int tested = t->reason == SCREEN_REASON_NONE;
        CHECK(!isinf(t->tau) && !isinf(t->statistic) && !isinf(t->statistic_model) &&
                  !isinf(t->p_value), "%s %s: no Inf (tau %g, statistic %g, p %g)", what, name,
              t->tau, t->statistic, t->p_value);
        if (tested && t->surrogates == 0)
            CHECK(isfinite(t->statistic) && isnan(t->p_value),
                  "%s %s: untested, so a statistic (%g) and p NA (%g)", what, name,
                  t->statistic, t->p_value);
        else if (tested)
            CHECK(isfinite(t->statistic) && t->p_value > 0 && t->p_value <= 1,
                  "%s %s: tested, so a statistic (%g) and p in (0,1] (%g)", what, name,
                  t->statistic, t->p_value);
        else
            CHECK(isnan(t->statistic) && isnan(t->p_value),
                  "%s %s: reason %d, so statistic and p NA (%g, %g)", what, name, (int)t->reason,
                  t->statistic, t->p_value);
        for (size_t q = 0; q < SCREEN_QUANTILES; q++)
            CHECK(!isinf(t->quantile[q]), "%s %s: null quantile %zu not Inf", what, name, q);
    }
}

/* Constant series and series flat at the rounding level: NA with reason no variation. */
static void flat_series(void)
{
    screen_config cfg = small_config();
    double x[N], noise[N];
    edges_ar1(noise, N, 11);
    struct {
        const char *name;
        double level, wiggle;
        screen_variation want;
    } cases[] = {
        {"constant", 3.5, 0, SCREEN_CONSTANT},
        {"constant 1e300", 1e300, 0, SCREEN_CONSTANT},
        {"zero", 0, 0, SCREEN_CONSTANT},
        /* 1 + 1e-15 noise: the noise is a few units in the last place, round-off */
        {"1 + 1e-15 noise", 1, 1e-15, SCREEN_FLAT_RESIDUAL},
        {"1e300 (1 + 1e-15 noise)", 1e300, 1e-15 * 1e300, SCREEN_FLAT_RESIDUAL},
    };
    for (size_t k = 0; k < sizeof cases / sizeof cases[0]; k++) {
        for (size_t i = 0; i < N; i++)
            x[i] = cases[k].level + cases[k].wiggle * noise[i];
        screen_result r;
        screen_detail d;
        int st = edges_screen(NULL, &cfg, "flat", x, N, &r, &d);
        CHECK(st == SLOWSCAN_OK, "%s: screened (status %d)", cases[k].name, st);
        CHECK(r.variation == cases[k].want, "%s: variation %d, want %d", cases[k].name,
              (int)r.variation, (int)cases[k].want);
        for (size_t j = 0; j < r.ntests; j++)
            CHECK(r.tests[j].reason == SCREEN_REASON_NO_VARIATION, "%s test %zu: reason %d",
                  cases[k].name, j, (int)r.tests[j].reason);
        edges_result_clean(&r, cases[k].name);
    }
}

/* Scale invariance: x, 1e290 x, 1e-290 x, 2^1000 x and a series reaching 1.5e308 give the
 * same tau, drift t and p (common practice, no source: a change of unit changes no rank and
 * no t-value). Powers of two are exact, so those agree to the bit. */
static void scale_invariance(void)
{
    screen_config cfg = small_config();
    cfg.indicators[2] = INDICATOR_SKEWNESS; /* third and fourth powers in the window sums */
    cfg.indicators[3] = INDICATOR_KURTOSIS;
    cfg.indicators[4] = INDICATOR_AR1;
    cfg.nindicators = 5;
    double x[N], y[N], top = 0;
    edges_ar1(x, N, 12);
    for (size_t i = 0; i < N; i++)
        top = fmax(top, fabs(x[i]));
    screen_result base, r;
    screen_detail d;
    CHECK(edges_screen(NULL, &cfg, "s", x, N, &base, &d) == SLOWSCAN_OK, "base screened");
    edges_result_clean(&base, "base");
    const struct {
        const char *name;
        double factor;
        int exact;
    } scales[] = {{"1e290", 1e290, 0}, {"1e-290", 1e-290, 0}, {"1e300", 1e300, 0},
                  {"1e-300", 1e-300, 0}, {"2^1000", 0x1p1000, 1}, {"2^-1000", 0x1p-1000, 1},
                  {"top 1.5e308", 1.5e308, 0}};
    for (size_t k = 0; k < sizeof scales / sizeof scales[0]; k++) {
        double f = scales[k].factor / (strncmp(scales[k].name, "top", 3) == 0 ? top : 1.0);
        for (size_t i = 0; i < N; i++)
            y[i] = f * x[i];
        CHECK(edges_screen(NULL, &cfg, "s", y, N, &r, &d) == SLOWSCAN_OK, "%s: screened", scales[k].name);
        edges_result_clean(&r, scales[k].name);
        for (size_t j = 0; j < base.ntests; j++) {
            const screen_test *a = &base.tests[j], *b = &r.tests[j];
            const char *name = slowscan_screen_test_name(a->kind);
            CHECK(b->reason == SCREEN_REASON_NONE, "x %s, %s: tested (reason %d)",
                  scales[k].name, name, (int)b->reason);
            double tol = scales[k].exact ? 0 : 1e-9;
            CHECK(check_close(b->statistic, a->statistic, tol, tol),
                  "x %s, %s: statistic %.17g, unscaled %.17g", scales[k].name, name,
                  b->statistic, a->statistic);
            CHECK(b->p_value == a->p_value, "x %s, %s: p %g, unscaled %g", scales[k].name,
                  name, b->p_value, a->p_value);
        }
    }
}

/* A window with every sample missing (a gap longer than the window) gives NA there; the
 * tests use the other windows. Eight samples: too few values for any test. */
static void gaps_and_short(void)
{
    screen_config cfg = small_config();
    cfg.window = (screen_length){.amount = 30, .percent = 0};
    double x[N];
    edges_ar1(x, N, 13);
    for (size_t i = 100; i < 150; i++)
        x[i] = NAN;
    screen_result r;
    screen_detail d;
    screen_workspace *ws = slowscan_screen_workspace_alloc(1);
    CHECK(edges_screen(ws, &cfg, "gap", x, N, &r, &d) == SLOWSCAN_OK, "gap: screened");
    edges_result_clean(&r, "gap");
    const double *var = slowscan_screen_workspace_path(ws, 0);
    /* the window ending at 140 holds samples 110..140: all missing */
    CHECK(var && isnan(var[140]) && isfinite(var[60]) && isfinite(var[200]),
          "gap: NA in the empty windows, values elsewhere");
    slowscan_screen_workspace_free(ws);

    /* A wholly missing series: refused or NA, never a number. */
    for (size_t i = 0; i < N; i++)
        x[i] = NAN;
    int st = edges_screen(NULL, &cfg, "none", x, N, &r, &d);
    if (st == SLOWSCAN_OK)
        edges_result_clean(&r, "all missing");
    CHECK(st != SLOWSCAN_OK || r.n == 0, "all missing: refused (%d) or n = 0", st);

    /* 8 samples: a window of 5, 4 indicator values (< 8) and 7 pairs (< 8) */
    double e[8] = {0.3, -1.2, 0.8, 1.9, -0.4, 0.6, -2.2, 1.1};
    cfg.window = (screen_length){.amount = 50, .percent = 1};
    st = edges_screen(NULL, &cfg, "eight", e, 8, &r, &d);
    CHECK(st == SLOWSCAN_OK, "eight samples: screened (status %d, rule %d)", st, (int)d.rule);
    edges_result_clean(&r, "eight samples");
    for (size_t j = 0; st == SLOWSCAN_OK && j < r.ntests; j++)
        CHECK(r.tests[j].reason == (j < 2 ? SCREEN_REASON_FEW_VALUES : SCREEN_REASON_FEW_PAIRS),
              "eight samples, test %zu: reason %d", j, (int)r.tests[j].reason);
}

void suite_edges(void)
{
    flat_series();
    scale_invariance();
    gaps_and_short();
    edges_unit_root();
    edges_long_window();
    edges_other_calls();
    edges_cli();
}
