/* False-flag rates of `weak`, `reversed` and `drifting` on runs whose feedback is constant:
 * N = F + lambda T + red noise, T a two-timescale relaxation plus its own red noise (an
 * abrupt-forcing experiment of 150 years, annual; a model of our own, parameters of the
 * order of a CMIP abrupt-4xCO2 run, from memory). Rates with 95% Wilson intervals. The
 * suite uses S runs per case (FEEDBACK_RATE_RUNS, default 1000: about a second); the numbers in
 * `slowscan help feedback` come from one run with FEEDBACK_RATE_RUNS=5000. */
#include "check.h"
#include "slowscan/feedback.h"
#include "slowscan/status.h"

#include <gsl/gsl_cdf.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>

enum { YEARS = 150 };

typedef struct {
    const char *name;
    double noise_sd, noise_phi; /* AR(1) noise of N (W m-2) */
    int skewed;                 /* noise from a centred chi-square(2) instead of a normal */
    feedback_fit_kind fit;      /* TLS runs draw T as a smooth response seen through noise
                                   that N does not respond to (the errors-in-variables model
                                   TLS assumes); OLS runs as a response whose own variability
                                   N does respond to */
    int known_high;             /* the drift test's size is known to exceed 5% here
                                   (documented in help): printed, not counted */
} rate_case;

static double innovation(check_rng *r, int skewed)
{
    if (!skewed)
        return check_rng_gaussian(r);
    double a = check_rng_gaussian(r), b = check_rng_gaussian(r);
    return (a * a + b * b - 2) / 2; /* mean 0, variance 1, skewness 2 */
}

static void simulate(const rate_case *c, check_rng *r, double *T, double *Nf)
{
    double en = 0, et = 0;
    for (size_t i = 0; i < YEARS; i++) {
        double t = (double)i + 1;
        en = c->noise_phi * en + sqrt(1 - c->noise_phi * c->noise_phi) * innovation(r, c->skewed);
        et = 0.5 * et + sqrt(0.75) * check_rng_gaussian(r);
        double smooth = 3.5 * (1 - exp(-t / 4)) + 2.67 * (1 - exp(-t / 250));
        if (c->fit == FEEDBACK_TLS) {
            Nf[i] = 7.4 - 1.2 * smooth + c->noise_sd * en;
            T[i] = smooth + 0.15 * check_rng_gaussian(r);
        } else {
            T[i] = smooth + 0.15 * et;
            Nf[i] = 7.4 - 1.2 * T[i] + c->noise_sd * en;
        }
    }
}

/* Wilson score interval (95%) of k successes in n. */
static void wilson(size_t k, size_t n, double *lo, double *hi)
{
    double z = 1.959963984540054, p = (double)k / (double)n, d = 1 + z * z / (double)n;
    double mid = (p + z * z / (2.0 * (double)n)) / d;
    double half = z * sqrt(p * (1 - p) / (double)n + z * z / (4.0 * (double)n * (double)n)) / d;
    *lo = mid - half;
    *hi = mid + half;
}

static void report(const char *what, size_t k, size_t n)
{
    double lo, hi;
    wilson(k, n, &lo, &hi);
    printf("    %-34s %5zu / %-6zu = %.4f  [%.4f, %.4f]\n", what, k, n, (double)k / (double)n, lo, hi);
}

static void run_case(const rate_case *c, size_t runs, unsigned long seed)
{
    double time[YEARS], T[YEARS], Nf[YEARS];
    for (size_t i = 0; i < YEARS; i++)
        time[i] = 1850 + (double)i;
    feedback_config cfg = slowscan_feedback_config_default();
    cfg.fit = c->fit;
    cfg.noise_ratio = c->noise_sd * c->noise_sd / (0.15 * 0.15);
    cfg.window = 74.5; /* the command's default on 150 years: 50% */
    cfg.stride = 7.45;
    size_t count = 0, weak_w = 0, windows = 0, weak_r = 0, rev_r = 0, drift_r = 0;
    slowscan_feedback_window_count(time, YEARS, &cfg, &count);
    feedback_window *w = malloc(count * sizeof *w);
    check_rng *r = check_rng_alloc(seed);
    for (size_t s = 0; s < runs; s++) {
        simulate(c, r, T, Nf);
        feedback_drift d;
        slowscan_feedback_run(time, Nf, T, YEARS, &cfg, w, count, &d);
        unsigned any = 0;
        for (size_t j = 0; j < count; j++) {
            any |= w[j].flags;
            weak_w += (w[j].flags & FEEDBACK_FLAG_WEAK) != 0;
        }
        windows += count;
        weak_r += (any & FEEDBACK_FLAG_WEAK) != 0;
        rev_r += (any & FEEDBACK_FLAG_REVERSED) != 0;
        drift_r += d.verdict == FEEDBACK_DRIFT_DRIFTING;
    }
    check_rng_free(r);
    free(w);
    printf("  %s (%zu runs, %zu windows each)\n", c->name, runs, count);
    report("weak windows", weak_w, windows);
    report("runs with a weak window", weak_r, runs);
    report("runs with a reversed window", rev_r, runs);
    report("runs flagged drifting", drift_r, runs);
    /* The drift test is a test at 5%: its count among independent runs is at most
     * Binomial(S, 0.05); fail only beyond the count exceeded with probability 0.001. */
    double bound = 0;
    while (gsl_cdf_binomial_Q((unsigned)bound, 0.05, (unsigned)runs) > 0.001)
        bound++;
    if (c->known_high)
        printf("    (known: with TLS on a response whose variation in a window is comparable to its noise, the drift test and the flags are not calibrated; see help)\n");
    CHECK(c->known_high || drift_r <= bound, "%s: drifting on %zu of %zu constant-feedback runs (bound %g)",
          c->name, drift_r, runs, bound);
    CHECK(c->known_high || rev_r <= bound, "%s: reversed on %zu of %zu runs", c->name, rev_r, runs);
}

/* The other side: a feedback that weakens from -1.6 to -0.6 W m-2 K-1 over the run (a pattern
 * effect of our own invention) is flagged drifting in most runs. */
static void drifting_power(size_t runs)
{
    double time[YEARS], T[YEARS], Nf[YEARS];
    feedback_config cfg = slowscan_feedback_config_default();
    cfg.window = 74.5;
    cfg.stride = 7.45;
    size_t count = 0, flagged = 0;
    for (size_t i = 0; i < YEARS; i++)
        time[i] = 1850 + (double)i;
    slowscan_feedback_window_count(time, YEARS, &cfg, &count);
    feedback_window *w = malloc(count * sizeof *w);
    check_rng *r = check_rng_alloc(77);
    for (size_t s = 0; s < runs; s++) {
        for (size_t i = 0; i < YEARS; i++) {
            double t = (double)i + 1, lambda = -1.6 + (double)i / (YEARS - 1);
            T[i] = 3.5 * (1 - exp(-t / 4)) + 2.67 * (1 - exp(-t / 250)) + 0.15 * check_rng_gaussian(r);
            Nf[i] = 7.4 + lambda * T[i] + 0.5 * check_rng_gaussian(r);
        }
        feedback_drift d;
        slowscan_feedback_run(time, Nf, T, YEARS, &cfg, w, count, &d);
        flagged += d.verdict == FEEDBACK_DRIFT_DRIFTING;
    }
    check_rng_free(r);
    free(w);
    printf("  a feedback weakening from -1.6 to -0.6 (%zu runs)\n", runs);
    report("runs flagged drifting (power)", flagged, runs);
    CHECK(flagged > runs / 2, "a weakening feedback is flagged drifting in %zu of %zu runs",
          flagged, runs);
}

void suite_feedback_rates(void)
{
    static const rate_case cases[] = {
        {"red noise (phi 0.3, sd 0.5), ols", 0.5, 0.3, 0, FEEDBACK_OLS, 0},
        {"strongly red noise (phi 0.7, sd 0.5), ols", 0.5, 0.7, 0, FEEDBACK_OLS, 0},
        {"skewed red noise (phi 0.3, sd 0.5), ols", 0.5, 0.3, 1, FEEDBACK_OLS, 0},
        {"red noise (phi 0.3, sd 0.5), errors in T, tls", 0.5, 0.3, 0, FEEDBACK_TLS, 1},
    };
    const char *env = getenv("FEEDBACK_RATE_RUNS");
    size_t runs = env && atol(env) > 0 ? (size_t)atol(env) : 1000;
    for (size_t k = 0; k < sizeof cases / sizeof cases[0]; k++)
        run_case(&cases[k], runs, 1000 + k);
    drifting_power(runs / 5 > 50 ? runs / 5 : 50);
}
