/* slowscan detrend — Gaussian kernel trends (DESIGN §3): the local-constant (Nadaraya-Watson)
 * fit `gaussian` and the local-linear fit `gaussian-linear` (Fan & Gijbels 1996, Local
 * Polynomial Modelling and Its Applications, ch. 3), with weights w(u) = exp(-u^2 / (2 s^2)).
 *
 * Both are built from kernel-weighted moment sums over the finite samples, with lags
 * u = (t_j - t_i)/s and x centred on its mean (which keeps digits under a large offset):
 *   S_k = sum_j m_j w_ij u^k,  T_k = sum_j (x_j - mean) w_ij u^k   (m_j = 1 where x_j is finite)
 *   local constant:  trend_i = mean + T0 / S0
 *   local linear:    trend_i = mean + (S2 T0 - S1 T1) / (S0 S2 - S1^2)
 * so the edges and the rims of gaps are renormalised rather than pulled toward zero, and the
 * local line follows a sloping trend to the very end of the record. The kernel is cut at
 * h = ceil(8 s/dt) samples, where the weights fall below exp(-32) ~ 1.3e-14.
 *
 * A short kernel (h <= DIRECT_MAX_HALF) is summed directly at every point: that is exact and
 * cheaper than transforms. A long one goes through detrend_kernel_sums (FFT, O(n log n)).
 * FFT round-off is an absolute error on each sum, harmless where the denominator is large but
 * not where it is tiny: deep inside a long gap, or where the samples lie on one side only so
 * that S0 S2 - S1^2 nearly cancels. Where the propagated round-off would exceed
 * FALLBACK_ACCURACY of the data's spread, the point is summed directly instead. The direct
 * fit is two-pass (weighted means first, then the line about them), so it keeps its digits
 * in exactly those one-sided configurations. The fallback costs O(h) per such point.
 *
 * What depends only on the kernel and the length -- the weights, the plans, the kernel's
 * transforms and, for a gap-free series, the sums S0 S1 S2 of its all-ones mask -- is made
 * once in a detrend_gauss_ws (by slowscan_detrend_workspace_alloc); each series then costs the
 * transform of its centred data and two or five inverse transforms (five when it has gaps,
 * whose mask must be transformed too).
 *
 * Local-linear, fewer than 2 samples of non-negligible weight (>= SOLID_WEIGHT of the largest
 * weight present): the line is undetermined and the local-constant value is used. A point
 * with no finite sample within h samples gets NaN under either fit. */
#include "detrend_internal.h"
#include "slowscan/status.h"

#include <math.h>
#include <stdlib.h>

#define DIRECT_MAX_HALF   64    /* kernel half-width (samples) up to which direct sums win */
#define FALLBACK_ACCURACY 1e-12 /* wanted accuracy of FFT outputs, relative to max|x - mean| */
#define SOLID_WEIGHT      1e-6  /* relative weight below which a sample barely counts */

typedef struct {
    const double *x; /* the series */
    size_t n;
    double mean;     /* of the finite samples; subtracted before summing to limit round-off */
    double spread;   /* max |x - mean| over the finite samples */
    const detrend_kernel *k;
} gauss_problem;

/* The exact (up to the 8 s cut) fit at sample i: degree 0 the weighted mean, degree 1 the
 * weighted line through the finite samples evaluated at t_i, computed about the weighted
 * means so that a one-sided neighbourhood does not cancel digits. */
static double direct_fit(const gauss_problem *p, size_t i, int degree)
{
    size_t lo = i > p->k->h ? i - p->k->h : 0;
    size_t hi = p->n - 1 - i > p->k->h ? i + p->k->h : p->n - 1;
    double s0 = 0.0, su = 0.0, sx = 0.0, wmax = 0.0;
    for (size_t j = lo; j <= hi; j++) {
        if (!isfinite(p->x[j]))
            continue;
        double wt = p->k->w[j > i ? j - i : i - j];
        s0 += wt;
        su += wt * ((double)j - (double)i) / p->k->s;
        sx += wt * (p->x[j] - p->mean);
        wmax = fmax(wmax, wt);
    }
    if (!(s0 > 0.0))
        return NAN;
    double xbar = sx / s0, ubar = su / s0, suu = 0.0, sux = 0.0;
    size_t solid = 0;
    for (size_t j = lo; j <= hi && degree > 0; j++) {
        if (!isfinite(p->x[j]))
            continue;
        double wt = p->k->w[j > i ? j - i : i - j], du = ((double)j - (double)i) / p->k->s - ubar;
        suu += wt * du * du;
        sux += wt * du * (p->x[j] - p->mean - xbar);
        solid += wt >= SOLID_WEIGHT * wmax;
    }
    if (degree == 0 || solid < 2 || !(suu > 0.0))
        return p->mean + xbar;
    return p->mean + xbar - sux / suu * ubar;
}

static int direct_all(const gauss_problem *p, int degree, double *trend)
{
    for (size_t i = 0; i < p->n; i++)
        trend[i] = direct_fit(p, i, degree);
    return SLOWSCAN_OK;
}

struct detrend_gauss_ws {
    int degree;        /* 0: local constant (gaussian), 1: local line (gaussian-linear) */
    size_t n;          /* the length it was made for; a series may be shorter */
    detrend_kernel k;
    detrend_kernel_fft *fft; /* NULL: the kernel is short enough to sum directly */
    double *buf;       /* (2 + 3 degree) n: inputs and outputs of one evaluation */
    double *mask;      /* (1 + 2 degree) n: S0 [S1 S2] of a gap-free series of n samples */
    double mask_noise[3];
};

/* The precomputed sum of a gap-free mask with the kernel times lag^power (S0, S1, S2). */
static detrend_kernel_sum mask_sum(const detrend_gauss_ws *g, size_t power)
{
    return (detrend_kernel_sum){.power = (int)power, .out = g->mask + power * g->n,
                                .noise = g->mask_noise[power]};
}

/* The moment sums by FFT: S0 S1 S2 of the mask, T0 T1 of the centred data (the first
 * 2 + 3*degree of them in the order S0, T0, S1, T1, S2); buf holds n doubles per sum. S0 and
 * T0 overwrite the mask and the centred data they are made from (detrend_kernel_sums reads
 * every input before it writes any output), which saves two arrays. A gap-free series of the
 * workspace's length has the mask sums made at allocation: the same transforms of the same
 * all-ones mask, so the same doubles as making them here. */
static int fft_moments(detrend_gauss_ws *g, const gauss_problem *p, detrend_kernel_sum *m)
{
    double *mask = g->buf, *centred = g->buf + p->n;
    size_t missing = 0;
    for (size_t j = 0; j < p->n; j++) {
        int ok = isfinite(p->x[j]);
        mask[j] = ok ? 1.0 : 0.0;
        centred[j] = ok ? p->x[j] - p->mean : 0.0;
        missing += !ok;
    }
    size_t count = g->degree == 0 ? 2 : 5;
    int known = missing == 0 && p->n == g->n;
    detrend_kernel_sum todo[5];
    size_t ntodo = 0;
    for (size_t r = 0; r < count; r++) {
        m[r] = (detrend_kernel_sum){.input = r % 2 == 0 ? mask : centred,
                                    .power = (int)(r / 2),
                                    .out = g->buf + r * p->n};
        if (known && r % 2 == 0)
            m[r] = mask_sum(g, r / 2);
        else
            todo[ntodo++] = m[r];
    }
    int status = detrend_kernel_sums(g->fft, p->n, todo, ntodo);
    for (size_t r = 0, q = 0; r < count; r++)
        if (!(known && r % 2 == 0))
            m[r] = todo[q++];
    return status;
}

/* Local constant from the FFT sums; points whose round-off exceeds the bound go direct. */
static void nw_from_sums(const gauss_problem *p, const detrend_kernel_sum *m, double *trend)
{
    for (size_t i = 0; i < p->n; i++) {
        double s0 = m[0].out[i], t0 = m[1].out[i], a = t0 / s0;
        double err = (m[1].noise + fabs(a) * m[0].noise) / s0;
        trend[i] = s0 > 0.0 && err <= FALLBACK_ACCURACY * p->spread ? p->mean + a
                                                                    : direct_fit(p, i, 0);
    }
}

/* Local line from the FFT sums. The error bound propagates each sum's round-off through
 * a = N / D, N = S2 T0 - S1 T1, D = S0 S2 - S1^2, to first order: (dN + |a| dD) / D. */
static void linear_from_sums(const gauss_problem *p, const detrend_kernel_sum *m,
                             double *trend)
{
    for (size_t i = 0; i < p->n; i++) {
        double s0 = m[0].out[i], t0 = m[1].out[i], s1 = m[2].out[i], t1 = m[3].out[i];
        double s2 = m[4].out[i];
        double den = s0 * s2 - s1 * s1, a = (s2 * t0 - s1 * t1) / den;
        double dden = fabs(s2) * m[0].noise + fabs(s0) * m[4].noise + 2.0 * fabs(s1) * m[2].noise;
        double dnum = fabs(s2) * m[1].noise + fabs(t0) * m[4].noise + fabs(s1) * m[3].noise +
                      fabs(t1) * m[2].noise;
        double err = (dnum + fabs(a) * dden) / den;
        trend[i] = den > 0.0 && err <= FALLBACK_ACCURACY * p->spread ? p->mean + a
                                                                     : direct_fit(p, i, 1);
    }
}

static int fft_all(detrend_gauss_ws *g, const gauss_problem *p, double *trend)
{
    detrend_kernel_sum m[5];
    int status = fft_moments(g, p, m);
    if (status == SLOWSCAN_OK) {
        if (g->degree == 0)
            nw_from_sums(p, m, trend);
        else
            linear_from_sums(p, m, trend);
    }
    return status;
}

void detrend_gauss_free(detrend_gauss_ws *g)
{
    if (!g)
        return;
    detrend_kernel_free(&g->k);
    detrend_kernel_fft_free(g->fft);
    free(g->buf);
    free(g->mask);
    free(g);
}

/* Plans, kernel transforms, buffers, and the sums of the all-ones mask of n samples. */
static int fft_prepare(detrend_gauss_ws *g)
{
    size_t count = 1 + 2 * (size_t)g->degree, n = g->n;
    int status;
    g->fft = detrend_kernel_fft_alloc(&g->k, n, 2 * g->degree, &status);
    if (!g->fft)
        return status;
    g->buf = malloc((2 + 3 * (size_t)g->degree) * n * sizeof *g->buf);
    g->mask = malloc(count * n * sizeof *g->mask);
    if (!g->buf || !g->mask)
        return SLOWSCAN_ENOMEM;
    detrend_kernel_sum s[3];
    for (size_t j = 0; j < n; j++)
        g->buf[j] = 1.0;
    for (size_t r = 0; r < count; r++)
        s[r] = (detrend_kernel_sum){.input = g->buf, .power = (int)r, .out = g->mask + r * n};
    status = detrend_kernel_sums(g->fft, n, s, count);
    for (size_t r = 0; r < count; r++)
        g->mask_noise[r] = s[r].noise;
    return status;
}

detrend_gauss_ws *detrend_gauss_alloc(int degree, double bandwidth, double dt, size_t n,
                                      int *status)
{
    detrend_gauss_ws *g = calloc(1, sizeof *g);
    *status = SLOWSCAN_ENOMEM;
    if (!g)
        return NULL;
    g->degree = degree;
    g->n = n;
    *status = detrend_kernel_make(bandwidth, dt, n, &g->k);
    if (*status == SLOWSCAN_OK && g->k.h > DIRECT_MAX_HALF)
        *status = fft_prepare(g);
    if (*status != SLOWSCAN_OK) {
        detrend_gauss_free(g);
        return NULL;
    }
    return g;
}

/* A series shorter than the workspace's uses its kernel (cut at the longer length, the same
 * weights) and its longer transform: equal to a fit made for that length up to round-off,
 * which the fallback bounds as ever. */
int detrend_gauss_trend(detrend_gauss_ws *g, const double *x, size_t n, double *trend)
{
    gauss_problem p = {.x = x, .n = n, .mean = detrend_finite_mean(x, n), .k = &g->k};
    for (size_t j = 0; j < n; j++)
        if (isfinite(x[j]))
            p.spread = fmax(p.spread, fabs(x[j] - p.mean));
    return g->fft ? fft_all(g, &p, trend) : direct_all(&p, g->degree, trend);
}
