/* Power table: per null model and per test, the share of series with p <= 0.05 — on series
 * driven toward a fold (saddle-node normal form dx = (a - x^2) dt + 0.03 dW, dt = 0.5,
 * n = 1200, a ramped from 1 to 0.02) and on stationary AR(1) series (the size). Tests: Kendall
 * tau of rolling variance and lag1 (window 50%), and the t-value of the drift of an AR(1)
 * coefficient (ar1_drift). All share the same surrogates (199 per series). */
#include "slowscan/ar1_drift.h"
#include "slowscan/detrend.h"
#include "slowscan/indicators.h"
#include "slowscan/kendall.h"
#include "slowscan/null_trend.h"
#include "slowscan/significance.h"
#include "slowscan/status.h"
#include "slowscan/surrogates.h"

#include <fftw3.h>
#include <gsl/gsl_randist.h>
#include <gsl/gsl_rng.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>

enum { N = 1200, M = 199, FOLDS = 30, STATIONARY = 200, TESTS = 3 };

static void fold_series(gsl_rng *r, double *x)
{
    double v = 1.0, h = 0.05;
    for (size_t i = 0; i < N; i++) {
        double a = 1.0 - 0.98 * (double)i / (N - 1);
        for (int s = 0; s < 10; s++)
            v += (a - v * v) * h + 0.03 * sqrt(h) * gsl_ran_gaussian_ziggurat(r, 1.0);
        x[i] = v;
    }
}

static void ar1_series(gsl_rng *r, double *x)
{
    double v = gsl_ran_gaussian_ziggurat(r, 1.0) / sqrt(1 - 0.25);
    for (size_t i = 0; i < N; i++)
        x[i] = v = 0.5 * v + gsl_ran_gaussian_ziggurat(r, 1.0);
}

/* p-values of the three tests on one series under one null. */
static void test_series(const double *x, surrogate_kind kind, const char *name, double p[TESTS])
{
    static double time_axis[N], resid[N], null[(TESTS) * M], *paths[2];
    static indicator_kind kinds[2] = {INDICATOR_VARIANCE, INDICATOR_LAG1};
    for (size_t i = 0; i < N; i++)
        time_axis[i] = (double)i;
    if (!paths[0])
        paths[0] = malloc(N * sizeof(double)), paths[1] = malloc(N * sizeof(double));
    detrend_spec spec = {DETREND_GAUSSIAN, 0.10 * (N - 1) * 0.5, 0}; /* 10% of the span */
    detrend_apply(&spec, 0.5, x, N, NULL, resid);
    rolling_spec rs = {(size_t)floor(0.5 * (N - 1) + 0.5) + 1, 0.8, 0.5, RECOVERY_LOG_AR1, 0, 0, 0, NULL};
    rolling_compute(&rs, resid, NULL, N, kinds, 2, paths);
    kendall_workspace *kw = kendall_alloc(N);
    ar1_drift_workspace *aw = ar1_drift_alloc(N);
    double obs[TESTS];
    ar1_drift_fit fit;
    for (int k = 0; k < 2; k++)
        kendall_tau_b(kw, time_axis, paths[k], N, &obs[k], NULL);
    obs[2] = ar1_drift_estimate(aw, resid, N, &fit) == SLOWSCAN_OK ? fit.t_a1 : NAN;
    surrogate_plan *plan = surrogate_plan_alloc(N, FFTW_ESTIMATE);
    int st;
    surrogate_source *src = surrogate_source_alloc(plan, kind, resid, NULL, &st);
    null_trend_workspace *ws = null_trend_alloc(N, 2);
    /* drift = 1: the drift statistic of the same surrogates lands in null row 2 */
    null_trend_job job = {&rs, kinds, 2, time_axis, NULL, 1, name, surrogate_name(kind), 1};
    if (src)
        null_trend_draw(ws, src, &job, 0, M, null, M);
    for (int k = 0; k < TESTS; k++)
        p[k] = src ? significance_p_value(obs[k], null + k * M, M, ALTERNATIVE_INCREASING, NULL) : NAN;
    null_trend_free(ws);
    surrogate_source_free(src);
    surrogate_plan_free(plan);
    ar1_drift_free(aw);
    kendall_free(kw);
}

int main(void)
{
    static const char *tests[TESTS] = {"variance (rolling)", "lag1 (rolling)", "AR(1) drift t"};
    surrogate_kind nulls[2] = {SURROGATE_PHASE, SURROGATE_AR1};
    gsl_rng *r = gsl_rng_alloc(gsl_rng_mt19937);
    static double x[N];
    printf("power table: share with p <= 0.05 (%d surrogates per series)\n", M);
    printf("%-7s %-20s %12s %12s\n", "null", "test", "fold (30)", "AR(1) (200)");
    for (int nm = 0; nm < 2; nm++) {
        size_t hits[2][TESTS] = {{0}};
        for (int group = 0; group < 2; group++) {
            gsl_rng_set(r, 1000 + (unsigned long)group);
            for (int k = 0; k < (group ? STATIONARY : FOLDS); k++) {
                char name[32];
                snprintf(name, sizeof name, "s%d_%d", group, k);
                (group ? ar1_series : fold_series)(r, x);
                double p[TESTS];
                test_series(x, nulls[nm], name, p);
                for (int t = 0; t < TESTS; t++)
                    hits[group][t] += p[t] <= 0.05;
            }
        }
        for (int t = 0; t < TESTS; t++)
            printf("%-7s %-20s %12.2f %12.2f\n", surrogate_name(nulls[nm]), tests[t],
                   (double)hits[0][t] / FOLDS, (double)hits[1][t] / STATIONARY);
    }
    gsl_rng_free(r);
    return 0;
}
