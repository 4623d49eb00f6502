/* AR(1) with a drifting coefficient (indicators/ar1_drift.c). */
#include "check.h"
#include "slowscan/ar1_drift.h"
#include "slowscan/status.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>

/* x_{t+1} = (a0 + a1 s_t) x_t + c + sigma e_t with s_t = t/(n-1) - 1/2. */
static void simulate(double *x, size_t n, double a0, double a1, double c, double sigma,
                     unsigned long seed)
{
    check_rng *r = check_rng_alloc(seed);
    x[0] = 1.0;
    for (size_t t = 0; t + 1 < n; t++) {
        double s = (double)t / (double)(n - 1) - 0.5;
        x[t + 1] = (a0 + a1 * s) * x[t] + c + sigma * check_rng_gaussian(r);
    }
    check_rng_free(r);
}

void suite_ar1_drift(void)
{
    enum { N = 5000 };
    double *x = malloc(N * sizeof *x);
    ar1_drift_workspace *ws = slowscan_ar1_drift_alloc(N);
    ar1_drift_fit fit;
    /* Long noisy series with a known ramp of the coefficient: a0, a1 recovered within 4 of
     * their standard errors (the OLS estimator is consistent; common practice, no source). */
    simulate(x, N, 0.6, 0.3, 0.2, 1.0, 3);
    CHECK(slowscan_ar1_drift_estimate(ws, x, N, &fit) == SLOWSCAN_OK, "fit runs");
    CHECK(fabs(fit.a0 - 0.6) < 4 * fit.se_a0 && fabs(fit.a1 - 0.3) < 4 * fit.se_a1 &&
              fit.t_a1 > 3, "a0 %.4f (se %.4f), a1 %.4f (se %.4f)", fit.a0, fit.se_a0, fit.a1,
          fit.se_a1);
    /* Coefficients and standard errors against statsmodels.api.OLS on the same design matrix
     * (Debian python3-statsmodels, reference library). */
    double ref[9];
    CHECK(check_python_on("ols_statsmodels.py", x, N, NULL, ref, 9) == 9, "statsmodels ran");
    CHECK_CLOSE(fit.a0, ref[0], 1e-9, 1e-12, "a0 vs statsmodels");
    CHECK_CLOSE(fit.a1, ref[1], 1e-9, 1e-12, "a1 vs statsmodels");
    CHECK_CLOSE(fit.c, ref[2], 1e-9, 1e-12, "c vs statsmodels");
    CHECK_CLOSE(fit.se_a1_model, ref[4], 1e-8, 1e-12, "model se(a1) vs statsmodels");
    /* HC3 against statsmodels OLS(...).fit(cov_type="HC3") (MacKinnon & White 1985). */
    CHECK_CLOSE(fit.se_a0, ref[6], 1e-8, 1e-12, "HC3 se(a0) vs statsmodels");
    CHECK_CLOSE(fit.se_a1, ref[7], 1e-8, 1e-12, "HC3 se(a1) vs statsmodels");
    CHECK_CLOSE(fit.se_c, ref[8], 1e-8, 1e-12, "HC3 se(c) vs statsmodels");
    /* --noise-trend: weighted least squares against statsmodels.api.WLS with the same
     * variance model (Debian python3-statsmodels), on a series whose noise grows 1 -> 4. */
    check_rng *r = check_rng_alloc(5);
    x[0] = 0;
    for (size_t t = 0; t + 1 < N; t++)
        x[t + 1] = 0.5 * x[t] + (1.0 + 3.0 * (double)t / (N - 1)) * check_rng_gaussian(r);
    check_rng_free(r);
    slowscan_ar1_drift_set_noise_trend(ws, 1);
    CHECK(slowscan_ar1_drift_estimate(ws, x, N, &fit) == SLOWSCAN_OK, "noise-trend fit runs");
    CHECK(check_python_on("wls_statsmodels.py", x, N, NULL, ref, 9) == 9, "statsmodels WLS ran");
    CHECK_CLOSE(fit.a0, ref[0], 1e-9, 1e-12, "WLS a0 vs statsmodels");
    CHECK_CLOSE(fit.a1, ref[1], 1e-9, 1e-12, "WLS a1 vs statsmodels");
    CHECK_CLOSE(fit.se_a1_model, ref[4], 1e-8, 1e-12, "WLS model se(a1) vs statsmodels");
    CHECK_CLOSE(fit.se_a0, ref[6], 1e-8, 1e-12, "WLS HC3 se(a0) vs statsmodels");
    CHECK_CLOSE(fit.se_a1, ref[7], 1e-8, 1e-12, "WLS HC3 se(a1) vs statsmodels");
    CHECK(fabs(fit.a1) < 4 * fit.se_a1, "a constant memory under growing noise: a1 %.4f (se %.4f)",
          fit.a1, fit.se_a1);
    slowscan_ar1_drift_set_noise_trend(ws, 0);
    /* Noise-free data are reproduced exactly (analytic). */
    simulate(x, 200, 0.5, 0.4, 0.1, 0.0, 1);
    for (size_t t = 0; t < 200; t++)
        x[t] += 1e-9 * sin(1.3 * (double)t); /* keep the design of full rank */
    CHECK(slowscan_ar1_drift_estimate(ws, x, 200, &fit) == SLOWSCAN_OK && fabs(fit.a0 - 0.5) < 1e-5 &&
              fabs(fit.a1 - 0.4) < 1e-5, "noise-free ramp: a0 %.8f a1 %.8f", fit.a0, fit.a1);
    /* The recovery-rate path: lambda = ln(phi)/dt inside its band. */
    double lam[200], lo[200], hi[200];
    slowscan_ar1_drift_path(&fit, 200, 0.5, lam, lo, hi);
    CHECK_CLOSE(lam[0], log(0.5 - 0.2) / 0.5, 1e-4, 1e-6, "lambda at the start");
    CHECK(lo[100] <= lam[100] && lam[100] <= hi[100], "band brackets the path");
    /* Errors: a constant series, too few pairs. */
    for (size_t t = 0; t < 50; t++)
        x[t] = 2.0;
    CHECK(slowscan_ar1_drift_estimate(ws, x, 50, &fit) == SLOWSCAN_ECONST, "constant series");
    CHECK(slowscan_ar1_drift_estimate(ws, x, 5, &fit) == SLOWSCAN_ESHORT, "too few pairs");
    slowscan_ar1_drift_free(ws);
    free(x);
}
