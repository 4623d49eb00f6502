/* Helpers shared by the detrend test files (test_detrend.c, test_gaussian.c); declared in
 * detrend_check.h. */
#include "detrend_check.h"

#include "slowscan/status.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>

double dc_max_abs(const double *x, size_t n)
{
    double m = 0.0;
    for (size_t i = 0; i < n; i++)
        if (isfinite(x[i]) && fabs(x[i]) > m)
            m = fabs(x[i]);
    return m;
}

double dc_worse(double acc, double err)
{
    return isnan(err) ? INFINITY : err > acc ? err : acc;
}

size_t dc_count_nan(const double *x, size_t n)
{
    size_t c = 0;
    for (size_t i = 0; i < n; i++)
        c += isnan(x[i]) ? 1 : 0;
    return c;
}

/* Writes "t x" lines for the python references; returns 0 on success. */
static int dc_write_series(const char *path, double dt, const double *x, size_t n)
{
    FILE *f = fopen(path, "w");
    if (!f)
        return -1;
    for (size_t i = 0; i < n; i++)
        fprintf(f, "%.17g %.17g\n", (double)i * dt, x[i]);
    return fclose(f) == 0 ? 0 : -1;
}

int dc_python_reference(const char *script, const char *arg, double dt, const double *x,
                        size_t n, double *want, size_t count)
{
    const char *path = check_tmp_path("detrend_series.txt");
    if (dc_write_series(path, dt, x, n) != 0)
        return 0;
    char cmd[1024];
    snprintf(cmd, sizeof cmd, "%s %s %s", script, path, arg);
    return check_python(cmd, want, count) == (int)count;
}

int dc_run(detrend_method method, double bandwidth, int degree, double dt, const double *x,
           size_t n, double *trend, double *residual)
{
    detrend_spec spec = {.method = method, .bandwidth = bandwidth, .degree = degree};
    return slowscan_detrend_apply(&spec, dt, x, n, trend, residual);
}

double dc_python_error(const char *script, const detrend_spec *spec, double dt,
                       const double *x, size_t n)
{
    double *got = malloc(n * sizeof *got), *want = malloc(n * sizeof *want);
    char arg[64];
    if (spec->method == DETREND_POLY)
        snprintf(arg, sizeof arg, "%d", spec->degree);
    else
        snprintf(arg, sizeof arg, "%.17g", spec->bandwidth);
    int ok = slowscan_detrend_apply(spec, dt, x, n, got, NULL) == SLOWSCAN_OK &&
             dc_python_reference(script, arg, dt, x, n, want, n);
    double err = ok ? check_max_diff(got, want, n) / dc_max_abs(x, n) : INFINITY;
    free(got);
    free(want);
    return err;
}

void dc_make_series(check_rng *rng, double offset, double *x, size_t n)
{
    double walk = 0.0;
    for (size_t i = 0; i < n; i++) {
        walk += 0.05 * check_rng_gaussian(rng);
        x[i] = offset + walk + sin(0.004 * (double)i) + 0.3 * check_rng_gaussian(rng);
    }
}

void dc_punch_gaps(double *x, size_t n, size_t every, size_t len)
{
    for (size_t start = every / 2; start < n; start += every)
        for (size_t i = start; i < start + len && i < n; i++)
            x[i] = NAN;
    for (size_t i = 7; i < n; i += 97)
        x[i] = NAN;
}

