/* The exact size of `--tail gpd` given a set of surrogates (tail_size.h). The statistic is a
 * new draw of the null the surrogates came from, so the chance that the reported p falls
 * below alpha is P(x_alpha <= X < x_end): x_alpha the smallest statistic beyond every
 * surrogate whose p is below alpha (p falls as the statistic grows), x_end where the upper
 * limit becomes 0 and p returns to 1/(M+1). Averaged over sets of surrogates that is the
 * size, with no need to wait for 1-in-10^6 events; the interval is mean +- 1.96 standard
 * errors over the sets (normal approximation, common practice), its lower end clipped at 0.
 * The search stops 50 above
 * the largest surrogate; where p is not below alpha there, the mass beyond is counted as
 * rejected (an overestimate of the size: 0.02 alpha at alpha 1e-6 for Student t nulls,
 * nothing for normal ones). */
#include "tail_size.h"
#include "slowscan/tail.h"

#include <gsl/gsl_cdf.h>
#include <gsl/gsl_randist.h>
#include <gsl/gsl_rng.h>
#include <gsl/gsl_sort.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

typedef struct {
    tail_null null;
    const double *set;
    double *work;
    size_t m;
    tail_options opt;
    int point;
    long calls;
} size_env;

static double exact_q(const size_env *e, double x)
{
    return e->null == TAIL_NULL_T5 ? gsl_cdf_tdist_Q(x, 5.0) : gsl_cdf_ugaussian_Q(x);
}

/* The p reported for statistic x (the set copied: the estimate sorts in place). With point,
 * as the procedure was before the upper limit: the point estimate wherever a fit passed and
 * it is positive and below the floor. */
static double reported(size_env *e, double x, tail_result *t)
{
    memcpy(e->work, e->set, e->m * sizeof *e->work);
    slowscan_tail_estimate(&e->opt, e->work, e->m, x, 1.0 / ((double)e->m + 1), t);
    e->calls++;
    if (e->point && isfinite(t->p_point)) {
        int ok = t->p_point > 0 && t->p_point < t->p_surrogates;
        t->reason = t->p_point > 0 ? TAIL_USED : TAIL_BEYOND_END;
        t->used = ok;
        t->p = ok ? t->p_point : t->p_surrogates;
    }
    return t->p;
}

static int ended(const tail_result *t)
{
    return t->reason == TAIL_BEYOND_END || t->reason == TAIL_NO_BOUND;
}

/* "x is at or beyond x_alpha" (a = alpha) or, with a = 0, "beyond x_end": both monotone. */
static int at_or_beyond(size_env *e, double x, double a)
{
    tail_result t;
    double p = reported(e, x, &t);
    return a > 0 ? p < a || ended(&t) : ended(&t);
}

/* The smallest x in (lo, hi] where at_or_beyond(x, a) holds (it holds at hi). */
static double bisect(size_env *e, double lo, double hi, double a)
{
    for (int it = 0; it < 40 && hi - lo > 1e-4 * fabs(hi); it++) {
        double mid = 0.5 * (lo + hi);
        *(at_or_beyond(e, mid, a) ? &hi : &lo) = mid;
    }
    return hi;
}

/* One set: size / alpha at each alpha added to sum[] and sq[]; 0 when no fit passed. */
static int one_set(size_env *e, double largest, const double alpha[3], int with_end,
                   double sum[3], double sq[3])
{
    tail_result t;
    reported(e, largest + 1e-9, &t);
    if (t.reason == TAIL_NO_FIT || t.reason == TAIL_POOR_FIT || t.reason == TAIL_FEW_SURROGATES)
        return 0;
    double hi = largest + 50, end = INFINITY; /* the nulls' mass beyond +50 is negligible */
    if (with_end && at_or_beyond(e, hi, 0))
        end = bisect(e, largest, hi, 0);
    for (int a = 0; a < 3; a++) {
        double top = isfinite(end) ? end : hi;
        double xa = at_or_beyond(e, largest, alpha[a]) ? largest
                    : at_or_beyond(e, top, alpha[a]) ? bisect(e, largest, top, alpha[a]) : top;
        double s = xa < end ? exact_q(e, xa) - (isfinite(end) ? exact_q(e, end) : 0) : 0;
        sum[a] += s / alpha[a];
        sq[a] += s / alpha[a] * (s / alpha[a]);
    }
    return 1;
}

static int by_double(const void *a, const void *b)
{
    double x = *(const double *)a, y = *(const double *)b;
    return (x > y) - (x < y);
}

/* The reported p (and the point estimate) over the exact tail P(X > x) = 1e-5. */
static void at_exact(size_env *e, double largest, double *ratio, double *point, int *used)
{
    double x5 = e->null == TAIL_NULL_T5 ? gsl_cdf_tdist_Qinv(1e-5, 5.0)
                                        : gsl_cdf_ugaussian_Qinv(1e-5);
    tail_result t;
    if (largest < x5 && reported(e, x5, &t) < 1.0 / ((double)e->m + 1) && t.used) {
        ratio[*used] = t.p / 1e-5;
        point[(*used)++] = t.p_point / 1e-5;
    }
}

void tail_size_run(tail_null null, size_t m, int sets, unsigned long seed,
                   const double alpha[3], int point, int with_end, tail_size_result *out)
{
    size_env e = {null, NULL, malloc(m * sizeof(double)), m, slowscan_tail_options_default(),
                  point, 0};
    e.opt.method = TAIL_GPD;
    double *set = malloc(m * sizeof *set), sum[3] = {0}, sq[3] = {0};
    double *ratio = malloc((size_t)sets * sizeof *ratio), *pt = malloc((size_t)sets * sizeof *pt);
    gsl_rng *r = gsl_rng_alloc(gsl_rng_mt19937);
    *out = (tail_size_result){.sets = sets};
    e.set = set;
    clock_t c0 = clock();
    for (int k = 0; k < sets; k++) {
        gsl_rng_set(r, seed + (unsigned long)k);
        double largest = -INFINITY;
        for (size_t j = 0; j < m; j++)
            largest = fmax(largest, set[j] = null == TAIL_NULL_T5 ? gsl_ran_tdist(r, 5.0)
                                                                  : gsl_ran_gaussian(r, 1.0));
        at_exact(&e, largest, ratio, pt, &out->used_exact);
        out->fitted += one_set(&e, largest, alpha, with_end, sum, sq);
    }
    out->ms_per_estimate = 1e3 * (double)(clock() - c0) / CLOCKS_PER_SEC / (double)e.calls;
    for (int a = 0; a < 3; a++) {
        double mean = sum[a] / sets, var = fmax(0, sq[a] / sets - mean * mean);
        double half = 1.96 * sqrt(var / (sets > 1 ? sets - 1 : 1));
        /* a size is not negative: the normal interval of a mean over few sets of a skewed
         * quantity can reach below 0 (one set carrying most of the mass), so it is clipped */
        out->size[a] = mean, out->lo[a] = fmax(0.0, mean - half), out->hi[a] = mean + half;
    }
    int u = out->used_exact;
    qsort(ratio, (size_t)u, sizeof *ratio, by_double);
    qsort(pt, (size_t)u, sizeof *pt, by_double);
    out->median_ratio = u ? ratio[u / 2] : NAN;
    out->q1_ratio = u ? ratio[u / 4] : NAN;
    out->q3_ratio = u ? ratio[3 * u / 4] : NAN;
    out->median_point = u ? pt[u / 2] : NAN;
    free(ratio), free(pt), free(set), free(e.work);
    gsl_rng_free(r);
}
