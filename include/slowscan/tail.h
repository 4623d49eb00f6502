/* slowscan — p-values below 1/(M+1) estimated from the upper tail of a test's surrogate
 * statistics (module prefix: tail_).
 *
 * With M surrogates the smallest Monte Carlo p is 1/(M+1). When the observed statistic lies
 * beyond every surrogate, the tail of the null beyond a high threshold t is approximated by a
 * generalised Pareto distribution (GPD) fitted to the exceedances over t, and
 *     p_tail = (N_exc / M) * (1 - F_gpd(observed - t; xi, sigma))
 * (Knijnenburg, Wessels, Reinders & Shmulevich 2009, Bioinformatics 25(12):i161, "Fewer
 * permutations, more accurate P-values"). That point estimate errs toward too small (it was
 * measured at 3 to 10 times the nominal rate of p < 1e-5 and 1e-6 on normal nulls), so the
 * p used is its one-sided upper confidence limit (opt->confidence, 95%), from the profile
 * likelihood of the tail probability (Coles 2001, ch. 4) with the binomial uncertainty of
 * N_exc / M (surrogates/tail_bound.c); the point estimate is kept in p_point. The threshold is chosen as they do: t halfway
 * between the N_exc-th and (N_exc+1)-th largest surrogate, N_exc from 250 down in steps of 10
 * until an Anderson-Darling test of the fitted GPD passes at level 0.05; here never below 100
 * exceedances, and never more than a tenth of the surrogates (the fit is of a tail).
 *
 * What it can and cannot do: it extrapolates beyond the surrogates drawn, under the
 * assumption that the null's tail is GPD-like above the threshold (true in the limit for
 * most continuous nulls, Pickands 1975, not a guarantee at a finite threshold). It is an
 * estimate, not a Monte Carlo p-value: it carries no exactness guarantee under the null.
 *
 * The GPD here: F(z) = 1 - (1 + xi z / sigma)^(-1/xi) for z >= 0 (1 - exp(-z/sigma) at
 * xi = 0); for xi < 0 the support ends at z = sigma / -xi. Nothing here prints or allocates
 * beyond its arguments. */
#ifndef SLOWSCAN_TAIL_H
#define SLOWSCAN_TAIL_H

#include "slowscan/export.h"

#include <stddef.h>

typedef enum {
    TAIL_OFF = 0, /* the ordinary Monte Carlo p only */
    TAIL_GPD      /* the GPD estimate where the ordinary p is at its floor */
} tail_method;

typedef struct {
    tail_method method;      /* TAIL_OFF */
    size_t max_exceedances;  /* 250: the first (highest) threshold tried */
    size_t min_exceedances;  /* 100: the last */
    size_t exceedance_step;  /* 10 */
    double max_fraction;     /* 0.1: exceedances at most this share of the surrogates */
    double gof_level;        /* 0.05: a fit passes when the Anderson-Darling p exceeds this */
    double confidence;       /* 0.95: p is the one-sided upper limit at this confidence */
    double max_decades;      /* 2: p never below 1/(M+1) x 10^-max_decades (how far beyond
                                the surrogates the size was measured to hold) */
} tail_options;

SLOWSCAN_API
tail_options slowscan_tail_options_default(void);

/* The fewest finite surrogates with which opt can fit min_exceedances (1000 by default). */
SLOWSCAN_API
size_t slowscan_tail_min_surrogates(const tail_options *opt);

/* Why the estimate was, or was not, used (zero, as in a zeroed result: not tried). */
typedef enum {
    TAIL_NOT_TESTED = 0, /* not tried: the method is off, or no statistic or surrogate p */
    TAIL_USED,           /* p is the GPD estimate */
    TAIL_NOT_NEEDED,     /* a surrogate reaches the observed statistic: the ordinary p */
    TAIL_FEW_SURROGATES, /* fewer finite surrogates than slowscan_tail_min_surrogates */
    TAIL_NO_FIT,         /* no maximum-likelihood fit with xi > -1 at any threshold tried */
    TAIL_POOR_FIT,       /* the Anderson-Darling test rejected the fit at every threshold */
    TAIL_BEYOND_END,     /* no tail in the confidence region reaches the observed (every end
                            point lies before it): a limit of 0 is not credible, the ordinary
                            p stands */
    TAIL_NOT_BELOW_FLOOR, /* the upper limit is not below the ordinary p, which stands */
    TAIL_NO_BOUND        /* the upper limit could not be computed: the ordinary p stands */
} tail_reason;

/* Plain data. Fit fields are NaN (and counts 0) when no fit was tried; for TAIL_POOR_FIT
 * they describe the last threshold fitted, for TAIL_BEYOND_END the accepted fit. */
typedef struct {
    double p;            /* the p to use: the estimate when used, else p_surrogates */
    double p_surrogates; /* the ordinary (1 + #{s >= obs}) / (M + 1) */
    int used;            /* 1: p is the estimate (reason TAIL_USED) */
    tail_reason reason;
    double xi, sigma;    /* the GPD's shape and scale (maximum likelihood) */
    double threshold;    /* t, on the oriented scale */
    size_t exceedances;  /* N_exc: surrogates above t */
    size_t surrogates;   /* M: the finite surrogates */
    double ad;           /* Anderson-Darling A^2 of the exceedances under the fit */
    double ad_critical;  /* its critical value at gof_level (Choulakian & Stephens 2001) */
    double ad_p;         /* its p, interpolated in their table, within [0.001, 0.5] */
    double p_point;      /* the point estimate (N_exc / M)(1 - F(observed - t)), NaN when no
                            fit passed; 0 beyond a bounded fit's end */
    double p_upper;      /* its upper confidence limit (the p used when used), NaN when not
                            computed, the ordinary p when the limit reaches it */
    double p_predictive; /* the tail probability averaged over the parameters' confidence
                            distribution (NaN, or the ordinary p, as p_upper) */
    double p_exponential; /* the upper limit with the shape fixed at 0: no lighter tail is
                            extrapolated (NaN, or the ordinary p, as p_upper) */
} tail_result;

/* "used", "not_needed", "not_tested", "few_surrogates", "no_fit", "poor_fit", "beyond_end",
 * "not_below_floor", "no_bound". */
SLOWSCAN_API
const char *slowscan_tail_reason_name(tail_reason reason);

/* Maximum-likelihood GPD fit (location 0) of n exceedances z[i] > 0, through the profile
 * likelihood in theta = xi / sigma (Grimshaw 1993, Technometrics 35:185): for each theta
 * the likelihood is maximised by xi = mean(log(1 + theta z)), leaving a one-dimensional
 * search (a grid, then GSL's Brent minimiser). Restricted to xi > -1, where the likelihood is
 * bounded (Smith 1985, Biometrika 72:67). SLOWSCAN_EINVAL: n < 2 or some z <= 0 or not
 * finite; SLOWSCAN_ECONST: all z equal; SLOWSCAN_ENUMERIC: the maximum lies on the border of
 * the search (xi -> -1 or xi very large). */
SLOWSCAN_API
int slowscan_tail_gpd_fit(const double *z, size_t n, double *xi, double *sigma);

/* 1 - F(z; xi, sigma): 1 for z <= 0, 0 at or beyond the end point when xi < 0. */
SLOWSCAN_API
double slowscan_tail_gpd_sf(double z, double xi, double sigma);

/* Anderson-Darling A^2 = -n - (1/n) sum_i (2i - 1) [ln u_(i) + ln(1 - u_(n+1-i))] of the
 * values z[n], given in increasing order, with u = F(z; xi, sigma) (Anderson & Darling 1954,
 * J. Am. Stat. Assoc. 49:765). u is kept inside [1e-300, 1 - 1e-16] so A^2 stays finite. */
SLOWSCAN_API
double slowscan_tail_anderson_darling(const double *z, size_t n, double xi, double sigma);

/* The critical value of A^2 at `level` (0.001 to 0.5) when both GPD parameters are
 * estimated: Choulakian & Stephens 2001 (Technometrics 43:478), Table 2, case 3, linear in
 * xi between its rows (xi from -0.5 to 0.9; outside, the nearest row) and log-linear in the
 * level between its columns (how its rows are read: see surrogates/tail.c). */
SLOWSCAN_API
double slowscan_tail_ad_critical(double xi, double level);
/* The p of an A^2 from the same table, log-linear between columns, clamped to [0.001, 0.5]. */
SLOWSCAN_API
double slowscan_tail_ad_p(double xi, double a2);

/* The tail estimate of one test. values[count] are the surrogate statistics oriented so that
 * larger is more extreme (non-finite ones are skipped); they are sorted in place. observed
 * is on the same scale; p_surrogates is the ordinary p. The estimate is tried only when
 * opt->method is TAIL_GPD and observed exceeds every finite surrogate; it is used only when
 * its upper limit lies below p_surrogates, so p never exceeds the ordinary p and never falls
 * below the limit (nor the point estimate). Deterministic: no random draws. Always fills *out;
 * SLOWSCAN_OK, or SLOWSCAN_EINVAL for options out of their domain. */
SLOWSCAN_API
int slowscan_tail_estimate(const tail_options *opt, double *values, size_t count,
                           double observed, double p_surrogates, tail_result *out);

#endif
