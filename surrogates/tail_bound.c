/* The p of --tail gpd that enters BH: a one-sided profile-likelihood upper confidence limit
 * of the tail probability, not the point estimate (tail.h, tail_internal.h).
 *
 * Why a bound: the point estimate (N/M)(1 - F(obs - t)) extrapolates one to three decades
 * beyond the surrogates from 100-250 exceedances; its error is mostly the shape's (a shape
 * low by its standard error ~0.07 makes a 1e-6 tail several times too small), and it was
 * measured anti-conservative (3x at 1e-5, 10x at 1e-6 with M = 10^4). BH needs p that are
 * not too small, so the p used is the largest tail probability the data do not reject.
 *
 * Why the profile likelihood and not a parametric bootstrap: it is deterministic (no RNG
 * stream, so thread- and order-independent by construction), costs 10-20 ms per estimate
 * (measured; the point estimate alone 1-3 ms: a few roots in log q over one-dimensional
 * profiles in the shape) where a bootstrap of the procedure needs hundreds of refits, each
 * with its own threshold search, and it is the interval the textbook recommends for tail quantities because it
 * follows their skewness (Coles 2001, An Introduction to Statistical Modeling of Extreme
 * Values, sections 2.6.6 and 4.3.4: the profile likelihood of a return level, from memory).
 *
 * The region: Coles' model of exceedances has three parameters, zeta = P(X > t) (binomial, N
 * of M) and the GPD's (xi, sigma), with independent likelihoods. The one-sided limit at
 * confidence 1 - a keeps the parameters whose log-likelihood lies within
 * c = chi2_1(1 - 2a)/2 of the maximum (1.353 at 95%). p = zeta q, q = 1 - F(obs - t); the
 * limit reported is zeta_up q_up, each maximised within deficit c of its own likelihood: the
 * box contains the joint region, so the product is at least the joint limit (conservative by
 * about 1.6/sqrt(N), 10-16% in p). q_up is the largest q whose profile likelihood,
 * max over xi of l(xi, sigma(xi, q)), with sigma(xi, q) = xi z0 / (q^-xi - 1) making the
 * tail beyond z0 = obs - t exactly q, lies within c of the maximum. The shape is searched
 * over (-1, 50]: a maximum at 50 means the limit is unknown (SLOWSCAN_ENUMERIC) and the
 * caller keeps the ordinary p.
 *
 * Two more terms, because the limit alone was still measured anti-conservative (1.5x at
 * 1e-5 and 6.5x at 1e-6 on normal nulls with M = 1000):
 * - the predictive tail probability, q averaged over its confidence distribution (below).
 *   Far beyond the data the error of log q grows like the square of the extrapolation; a
 *   fixed-level limit then covers the truth in 95% of sets but the other 5% reject so often
 *   that the average rejection rate exceeds alpha; the mean is what a size is made of.
 * - an exponential floor: the same limit with the shape fixed at 0. Sets whose largest
 *   surrogates happen to lie close together fit a bounded tail (xi -0.3 to -0.5 from 100
 *   exceedances of a normal, whose tail does not end) and
 *   the likelihood, being that of a model that is only approximately right, is too confident
 *   about it. From 100 to 250 exceedances a truly bounded tail cannot be told from the slow
 *   approach of an unbounded one (Gumbel domain: normal, gamma, most test statistics), so no
 *   tail lighter than exponential is extrapolated: for a bounded null (Kendall tau's) that
 *   errs toward too large a p, as BH requires.
 * The caller (tail.c) takes the largest of the three and of the point estimate, and stops
 * it two decades below 1/(M+1) (tail_options.max_decades). */
#include "tail_internal.h"
#include "slowscan/status.h"
#include "slowscan/tail.h"

#include <gsl/gsl_cdf.h>
#include <gsl/gsl_errno.h>
#include <gsl/gsl_min.h>
#include <gsl/gsl_roots.h>
#include <math.h>

int tail_root(gsl_function *fn, double lo, double hi, double tol, double *root_lo,
              double *root_hi)
{
    gsl_root_fsolver *s = gsl_root_fsolver_alloc(gsl_root_fsolver_brent);
    if (!s)
        return SLOWSCAN_ENOMEM;
    int st = gsl_root_fsolver_set(s, fn, lo, hi), done = 0;
    for (int it = 0; st == GSL_SUCCESS && !done && it < 200; it++) {
        st = gsl_root_fsolver_iterate(s);
        *root_lo = gsl_root_fsolver_x_lower(s);
        *root_hi = gsl_root_fsolver_x_upper(s);
        done = st == GSL_SUCCESS &&
               gsl_root_test_interval(*root_lo, *root_hi, tol, 0) == GSL_SUCCESS;
    }
    gsl_root_fsolver_free(s);
    return st == GSL_SUCCESS && done ? SLOWSCAN_OK : SLOWSCAN_ENUMERIC;
}

double tail_bound_deficit(double confidence)
{
    return 0.5 * gsl_cdf_chisq_Pinv(2.0 * confidence - 1.0, 1.0);
}

/* GPD log-likelihood of the exceedances; -inf outside the support or the parameters. */
static double loglik(const tail_fit *f, double xi, double sigma)
{
    if (!(sigma > 0) || !isfinite(sigma))
        return GSL_NEGINF;
    double s = 0;
    int expo = fabs(xi) < 1e-10;
    for (size_t i = 0; i < f->k; i++) {
        double z = (f->x[i] - f->threshold) / sigma;
        if (expo) {
            s += z;
            continue;
        }
        double a = xi * z;
        if (!(a > -1))
            return GSL_NEGINF;
        s += log1p(a);
    }
    double n = (double)f->k;
    return -n * log(sigma) - (expo ? s : (1.0 + 1.0 / xi) * s);
}

/* The profile at (z0, L = -log q): the scale that puts exactly q beyond z0 at shape xi. */
typedef struct {
    const tail_fit *f;
    double z0, L;
    int edge; /* the last profile's maximum lay on the upper border of the shapes */
} profile_point;

static double minus_loglik_at(double xi, void *params)
{
    const profile_point *p = params;
    double e = xi * p->L;
    double sigma = fabs(e) < 1e-12 ? p->z0 / p->L : p->z0 * xi / expm1(e);
    double l = loglik(p->f, xi, sigma);
    return isfinite(l) ? -l : GSL_POSINF;
}

/* The shapes searched: 30 steps over (-1, 1.5], then 10 geometric steps to 50 (a profile
 * at a large q can climb toward heavy tails; beyond 50 no surrogate null goes). */
enum { SHAPE_GRID = 40, SHAPE_UNIFORM = 30 };
static double shape_at(size_t g)
{
    if (g <= SHAPE_UNIFORM)
        return -0.999 + 2.499 * (double)g / SHAPE_UNIFORM;
    return 1.5 * pow(50.0 / 1.5, (double)(g - SHAPE_UNIFORM) / (SHAPE_GRID - SHAPE_UNIFORM));
}

/* max over xi of the log-likelihood with q fixed: a grid, then Brent around its best. */
static double profile_q(profile_point *p)
{
    gsl_function fn = {minus_loglik_at, p};
    double best_f = GSL_POSINF;
    size_t best = 0;
    for (size_t g = 0; g <= SHAPE_GRID; g++) {
        double v = minus_loglik_at(shape_at(g), p);
        if (v < best_f)
            best_f = v, best = g;
    }
    p->edge = best == SHAPE_GRID;
    if (!isfinite(best_f) || best == 0 || best == SHAPE_GRID)
        return -best_f; /* at a border: its value (a lower bound of the maximum) */
    gsl_min_fminimizer *s = gsl_min_fminimizer_alloc(gsl_min_fminimizer_brent);
    if (!s)
        return -best_f;
    double x = shape_at(best), a = shape_at(best - 1), b = shape_at(best + 1);
    int st = gsl_min_fminimizer_set_with_values(s, &fn, x, best_f, a, minus_loglik_at(a, p), b,
                                                minus_loglik_at(b, p));
    for (int it = 0; st == GSL_SUCCESS && it < 100; it++) {
        st = gsl_min_fminimizer_iterate(s);
        if (gsl_min_test_interval(gsl_min_fminimizer_x_lower(s), gsl_min_fminimizer_x_upper(s),
                                  1e-6, 0) == GSL_SUCCESS)
            break;
    }
    double v = gsl_min_fminimizer_f_minimum(s);
    gsl_min_fminimizer_free(s);
    return -(v < best_f ? v : best_f);
}

/* Deficit below the region's edge at log q: negative inside the region, positive outside. */
typedef struct {
    profile_point pt;
    double edge_line; /* l_max - c */
    int unsure;       /* an outside verdict rested on a border maximum */
} q_search;

static double outside_q(double logq, void *params)
{
    q_search *s = params;
    s->pt.L = -logq;
    double d = s->edge_line - profile_q(&s->pt);
    if (d > 0 && s->pt.edge)
        s->unsure = 1;
    return isfinite(d) ? d : 1e300;
}

/* The binomial part: zeta above k/m whose log-likelihood lies c below the maximum. */
typedef struct {
    double k, m, c;
} binomial_part;

static double outside_zeta(double zeta, void *params)
{
    const binomial_part *b = params;
    double zh = b->k / b->m;
    return -(b->k * log(zeta / zh) + (b->m - b->k) * log1p(-zeta) -
             (b->m - b->k) * log1p(-zh)) - b->c;
}

static int zeta_upper(const tail_fit *f, double *zeta_up)
{
    binomial_part b = {(double)f->k, (double)f->m, f->c};
    gsl_function fn = {outside_zeta, &b};
    double lo, hi, zh = b.k / b.m;
    int st = tail_root(&fn, zh, zh + (1 - zh) * 0.999999, 1e-9 * zh, &lo, &hi);
    *zeta_up = hi;
    return st;
}

/* log q where the profile lies d below the maximum, searched in (lo, top] (lo inside the
 * region): *at_top when q at top is still inside (the value is then at least e^top). */
static int q_at_deficit(q_search *s, double lmax, double d, double lo, double top, double *logq,
                        int *at_top)
{
    gsl_function fn = {outside_q, s};
    s->edge_line = lmax - d;
    s->unsure = 0;
    *at_top = 0;
    *logq = top;
    /* bracket by steps of e up from lo: the profile near the limit is well inside the
     * shapes searched, unlike at q near 1 */
    double hi = lo;
    do {
        lo = hi;
        hi = fmin(lo + 1.0, top);
        if (outside_q(hi, s) > 0)
            break;
        if (hi == top) {
            *at_top = 1;
            return SLOWSCAN_OK;
        }
    } while (1);
    double rlo;
    int st = s->unsure ? SLOWSCAN_ENUMERIC : tail_root(&fn, lo, hi, 1e-3, &rlo, logq);
    return st != SLOWSCAN_OK || s->unsure ? SLOWSCAN_ENUMERIC : SLOWSCAN_OK;
}

/* int exp(lq + b (r - r0)) phi(r) dr over [r0, r1]: the log-linear piece of q(r). */
static double segment(double lq, double lq1, double r0, double r1)
{
    double b = (lq1 - lq) / (r1 - r0);
    if (!(b < 30)) /* a steep piece (from q = 0): its upper step, q(r1) over the piece */
        return exp(lq1) * (gsl_cdf_ugaussian_Q(r0) - gsl_cdf_ugaussian_Q(r1));
    return exp(lq - b * r0 + 0.5 * b * b) *
           (gsl_cdf_ugaussian_Q(r0 - b) - gsl_cdf_ugaussian_Q(r1 - b));
}

/* The predictive tail probability: q averaged over its confidence distribution
 * C(q) = Phi(r(q)), r the signed root of the profile deficit, sqrt(2 (l_max - l_prof(q)))
 * above the estimate. Below the estimate (r < 0) q <= q_hat, counted as q_hat / 2; above,
 * q(r) at nodes r0 + j/2, log-linear between them; where q is not resolved (it reaches 1, or
 * the profile cannot be trusted) the rest counts as q = 1. Stops once the mean reaches
 * q_stop (the caller's floor) or the mass left is under a thousandth of the sum (counted as
 * q = 1). r0 > 0 when q_hat = 0 (a bounded fit ending before z0: the region reaches z0 only
 * at deficit r0^2 / 2). */
static double predictive(q_search *s, double lmax, double lq, double r0, double q_stop)
{
    const double h = 0.5, top = log1p(-1e-9), nothing = log(1e-300);
    double sum = r0 > 0 ? 0.0 : 0.5 * exp(lq), r = r0;
    for (int j = 0; j < 40 && sum < q_stop; j++) {
        double rest = gsl_cdf_ugaussian_Q(r), lq1;
        int at_top;
        if (rest <= 1e-3 * sum ||
            q_at_deficit(s, lmax, 0.5 * (r + h) * (r + h), lq > nothing ? lq : nothing, top,
                         &lq1, &at_top) != SLOWSCAN_OK || at_top)
            return sum + rest;
        sum += segment(lq, lq1, r, r + h);
        r += h;
        lq = lq1;
    }
    return sum < q_stop ? sum + gsl_cdf_ugaussian_Q(r) : sum;
}

/* The exponential model's part: sigma above the mean excess whose log-likelihood
 * -k log sigma - S / sigma lies c below its maximum. */
typedef struct {
    double k, s, c;
} exponential_part;

static double outside_sigma(double log_sigma, void *params)
{
    const exponential_part *e = params;
    double sh = e->s / e->k, sg = exp(log_sigma);
    return -(-e->k * log(sg / sh) - e->s / sg + e->k) - e->c;
}

/* zeta_up exp(-z0 / sigma_up): the upper limit of p with the shape fixed at 0. */
static int exponential_limit(const tail_fit *f, double zeta, double z0, double *p)
{
    exponential_part e = {(double)f->k, 0.0, f->c};
    for (size_t i = 0; i < f->k; i++)
        e.s += f->x[i] - f->threshold;
    gsl_function fn = {outside_sigma, &e};
    double lo, hi, sh = log(e.s / e.k);
    int st = tail_root(&fn, sh, sh + 10.0, 1e-9, &lo, &hi);
    *p = zeta * exp(-z0 / exp(hi));
    return st;
}

int tail_bound_p(const tail_fit *f, double observed, double cap, double *upper,
                 double *predicted, double *exponential)
{
    *upper = *predicted = *exponential = cap;
    double zeta;
    if (zeta_upper(f, &zeta) != SLOWSCAN_OK)
        return SLOWSCAN_ENUMERIC;
    double z0 = observed - f->threshold, q_cap = cap / zeta, lmax = loglik(f, f->xi, f->sigma);
    double q_hat = slowscan_tail_gpd_sf(z0, f->xi, f->sigma);
    double lo = log(q_hat > 1e-300 ? q_hat : 1e-300);
    if (!(q_cap < 1) || !isfinite(lmax) || !(lo < log(q_cap)))
        return SLOWSCAN_OK; /* the point estimate itself is at or above the floor */
    if (exponential_limit(f, zeta, z0, exponential) != SLOWSCAN_OK)
        return SLOWSCAN_ENUMERIC;
    if (!(*exponential < cap)) {
        *exponential = cap;
        return SLOWSCAN_OK; /* the exponential floor reaches the ordinary p already */
    }
    q_search s = {{f, z0, 0.0, 0}, lmax, 0};
    double d0 = outside_q(lo, &s); /* the deficit at the point estimate */
    if (s.unsure || (q_hat > 1e-300 && d0 > 1e-6))
        return SLOWSCAN_ENUMERIC; /* there the profile is the maximum: anything else failed */
    double r0 = q_hat > 1e-300 ? 0.0 : sqrt(2.0 * fmax(d0, 0.0)), lq;
    int at_top = 0;
    if (d0 >= f->c)
        *upper = 0.0; /* no tail in the region reaches z0 */
    else if (q_at_deficit(&s, lmax, f->c, lo, log(q_cap), &lq, &at_top) != SLOWSCAN_OK)
        return SLOWSCAN_ENUMERIC;
    else if (!at_top)
        *upper = zeta * exp(lq); /* the bracket's outer end: never below the limit */
    if (at_top)
        return SLOWSCAN_OK; /* the limit reaches the floor: the predictive p does not matter */
    double qp = predictive(&s, lmax, lo, r0, q_cap);
    *predicted = qp < q_cap ? zeta * qp : cap;
    return SLOWSCAN_OK;
}
