/* The size of `--tail gpd` on i.i.d. nulls, exactly per set of surrogates (make validate-tail):
 * for a set of M surrogates the statistic is a new draw of the same distribution, so the
 * probability that the reported p falls below alpha is P(x_alpha < X < x_end), x_alpha the
 * smallest statistic beyond every surrogate whose p is below alpha, x_end where the upper
 * limit becomes 0 (beyond it p stays 1/(M+1)). Averaged over R sets that is the size, with
 * no need to wait for 1-in-10^6 events. Also the power cost: the median of p / exact at an
 * exact tail of 1e-5. Usage: tail_size normal|t5 M R [SEED] */
#include "slowscan/status.h"
#include "slowscan/tail.h"

#include <gsl/gsl_cdf.h>
#include <gsl/gsl_randist.h>
#include <gsl/gsl_rng.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

static int t5;
static double draw(gsl_rng *r) { return t5 ? gsl_ran_tdist(r, 5.0) : gsl_ran_gaussian(r, 1.0); }
static double exact_q(double x) { return t5 ? gsl_cdf_tdist_Q(x, 5.0) : gsl_cdf_ugaussian_Q(x); }

static tail_options opt;
static double *work, *set;
static size_t M;
static long calls;
static int point_mode; /* TAIL_POINT=1: the point estimate, as the procedure was before */

/* The p reported for a statistic x given the set (copied: the estimate sorts in place). */
static double reported(double x, tail_result *t)
{
    memcpy(work, set, M * sizeof *work);
    slowscan_tail_estimate(&opt, work, M, x, 1.0 / ((double)M + 1), t);
    calls++;
    if (point_mode && (t->reason == TAIL_USED || t->reason == TAIL_NOT_BELOW_FLOOR ||
                       t->reason == TAIL_NO_BOUND || t->reason == TAIL_BEYOND_END)) {
        int ok = t->p_point > 0 && t->p_point < t->p_surrogates;
        t->reason = t->p_point > 0 ? TAIL_USED : TAIL_BEYOND_END;
        t->used = ok;
        t->p = ok ? t->p_point : t->p_surrogates;
    }
    return t->p;
}

/* The smallest x in (lo, hi] where pred holds, pred monotone (false at lo, true at hi). */
static double bisect(double lo, double hi, int (*pred)(double, double), double a)
{
    for (int it = 0; it < 40 && hi - lo > 1e-4 * fabs(hi); it++) {
        double mid = 0.5 * (lo + hi);
        if (pred(mid, a))
            hi = mid;
        else
            lo = mid;
    }
    return hi;
}

static int rejects(double x, double alpha)
{
    tail_result t;
    double p = reported(x, &t);
    /* beyond the end (or no limit) p stays at the floor: count as "at or beyond x_alpha"
     * for the bisection, x_end is taken off separately */
    return p < alpha || t.reason == TAIL_BEYOND_END || t.reason == TAIL_NO_BOUND;
}

static int beyond(double x, double unused)
{
    (void)unused;
    tail_result t;
    reported(x, &t);
    return t.reason == TAIL_BEYOND_END || t.reason == TAIL_NO_BOUND;
}

int main(int argc, char **argv)
{
    if (argc < 4)
        return fprintf(stderr, "usage: tail_size normal|t5 M R [SEED]\n"), 1;
    t5 = strcmp(argv[1], "t5") == 0;
    M = (size_t)atol(argv[2]);
    int R = atoi(argv[3]);
    unsigned long seed = argc > 4 ? strtoul(argv[4], NULL, 10) : 5000;
    const double alphas[3] = {1e-4, 1e-5, 1e-6};
    double size[3] = {0}, sq[3] = {0};
    opt = slowscan_tail_options_default();
    opt.method = TAIL_GPD;
    point_mode = getenv("TAIL_POINT") != NULL;
    if (getenv("TAIL_CONFIDENCE"))
        opt.confidence = atof(getenv("TAIL_CONFIDENCE"));
    work = malloc(M * sizeof *work);
    set = malloc(M * sizeof *set);
    gsl_rng *r = gsl_rng_alloc(gsl_rng_mt19937);
    int fitted = 0, ends = 0;
    double *ratio = malloc((size_t)R * sizeof *ratio), *ratio_pt = malloc((size_t)R * sizeof *ratio);
    int used = 0;
    double x5 = t5 ? gsl_cdf_tdist_Qinv(1e-5, 5.0) : gsl_cdf_ugaussian_Qinv(1e-5);
    clock_t c0 = clock();
    for (int rep = 0; rep < R; rep++) {
        gsl_rng_set(r, seed + (unsigned long)rep);
        double largest = -INFINITY;
        for (size_t j = 0; j < M; j++)
            largest = fmax(largest, set[j] = draw(r));
        tail_result t;
        if (largest < x5 && reported(x5, &t) < 1.0 / ((double)M + 1) && t.used) {
            ratio[used] = t.p / 1e-5;
            ratio_pt[used++] = t.p_point / 1e-5;
        }
        reported(largest + 1e-9, &t);
        if (t.reason == TAIL_NO_FIT || t.reason == TAIL_POOR_FIT || t.reason == TAIL_FEW_SURROGATES)
            continue;
        fitted++;
        double hi = largest + 1;
        while (!beyond(hi, 0) && hi < largest + 1000)
            hi = largest + 2 * (hi - largest);
        double end = beyond(hi, 0) ? bisect(largest, hi, beyond, 0) : INFINITY;
        ends += isfinite(end);
        for (int a = 0; a < 3; a++) {
            double top = isfinite(end) ? end : hi;
            double xa = rejects(largest, alphas[a]) ? largest : bisect(largest, top, rejects, alphas[a]);
            double s = xa < end ? exact_q(xa) - (isfinite(end) ? exact_q(end) : 0) : 0;
            size[a] += s / alphas[a];
            sq[a] += (s / alphas[a]) * (s / alphas[a]);
        }
    }
    double cpu = (double)(clock() - c0) / CLOCKS_PER_SEC;
    printf("%s M %zu R %d: fits %d, bounded ends %d, %.2f ms per estimate (%ld calls)\n",
           argv[1], M, R, fitted, ends, 1e3 * cpu / (double)calls, calls);
    for (int a = 0; a < 3; a++) {
        double mean = size[a] / R, sd = sqrt(fmax(0, sq[a] / R - mean * mean));
        printf("  alpha %g: size/alpha %.3f (95%% CI %.3f to %.3f, +-1.96 se over sets)\n",
               alphas[a], mean, mean - 1.96 * sd / sqrt(R), mean + 1.96 * sd / sqrt(R));
    }
    /* median by partial sort */
    for (int pass = 0; pass < 2; pass++) {
        double *v = pass ? ratio_pt : ratio;
        for (int i = 1; i < used; i++)
            for (int j = i; j > 0 && v[j - 1] > v[j]; j--) {
                double tmp = v[j]; v[j] = v[j - 1]; v[j - 1] = tmp;
            }
    }
    if (used)
        printf("  exact tail 1e-5: used in %d of %d sets; median p/exact %.2f (quartiles %.2f "
               "%.2f); point estimate median %.2f\n", used, R, ratio[used / 2], ratio[used / 4],
               ratio[3 * used / 4], ratio_pt[used / 2]);
    free(ratio), free(ratio_pt), free(work), free(set);
    gsl_rng_free(r);
    return 0;
}
