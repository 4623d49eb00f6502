/* slowscan detrend — Gaussian Nadaraya-Watson trend (DESIGN §3).
 *
 *   trend_i = sum_j w(t_j - t_i) x_j / sum_j w(t_j - t_i),   w(u) = exp(-u^2 / (2 s^2)),
 *
 * summed over finite samples only, so the edges and the rims of gaps are renormalised rather
 * than pulled toward zero. The kernel is cut at h = ceil(8 s/dt) samples, where the weights
 * fall below exp(-32) ~ 1.3e-14 (the truncation DESIGN §3 allows).
 *
 * On a regular grid numerator and denominator are convolutions of (x - mean, NaN -> 0) and of
 * the finite-sample mask with the kernel. A short kernel (h <= DIRECT_MAX_HALF) is summed
 * directly: that is exact and cheaper than transforms. A long one goes through FFTW with zero
 * padding to N >= n + h, which removes wrap-around for every lag |i - j| <= n - 1.
 *
 * FFT round-off is an absolute error of roughly eps * (kernel sum) on every output,
 * harmless where the denominator is large but not where it is tiny (deep inside a long gap,
 * where only far-off samples contribute). Where the FFT denominator falls below a threshold
 * derived from that error, the point is summed directly instead, so every output keeps about
 * 1e-12 relative accuracy; a point with no finite sample within h samples gets NaN. The
 * direct fallback costs O(h) per such point: the total is O(n log n) plus O(h) for each
 * sample lying deep inside a gap wider than a few s. */
#include "detrend_internal.h"
#include "slowscan/status.h"

#include <fftw3.h>
#include <float.h>
#include <limits.h>
#include <math.h>
#include <stdlib.h>

#define DIRECT_MAX_HALF   64    /* kernel half-width (samples) up to which direct sums win */
#define TRUNCATE_SIGMAS   8.0   /* DESIGN §3: truncation allowed beyond 8 s only */
#define FALLBACK_ACCURACY 1e-12 /* wanted relative accuracy of FFT outputs */

typedef struct {
    const double *x; /* the series */
    size_t n;
    double mean;     /* of the finite samples; subtracted before summing to limit round-off */
    const double *w; /* w[l] = kernel weight at lag l, l = 0..h */
    size_t h;        /* kernel half-width in samples */
} nw_problem;

typedef struct {
    size_t size, ncomplex;
    double *kernel, *num, *den;     /* real arrays of `size` */
    fftw_complex *fk, *fnum, *fden; /* their transforms, `ncomplex` each */
    fftw_plan forward, backward;
} nw_fft;

/* The exact (up to the 8 s cut) Nadaraya-Watson sum at one point. */
static double direct_at(const nw_problem *p, size_t i)
{
    size_t lo = i > p->h ? i - p->h : 0;
    size_t hi = p->n - 1 - i > p->h ? i + p->h : p->n - 1;
    double num = 0.0, den = 0.0;
    for (size_t j = lo; j <= hi; j++) {
        if (!isfinite(p->x[j]))
            continue;
        double wt = p->w[j > i ? j - i : i - j];
        num += wt * (p->x[j] - p->mean);
        den += wt;
    }
    return den > 0.0 ? p->mean + num / den : NAN;
}

static int smooth_2357(size_t m)
{
    static const size_t primes[] = {2, 3, 5, 7};
    for (size_t k = 0; k < 4; k++)
        while (m % primes[k] == 0)
            m /= primes[k];
    return m == 1;
}

/* FFTW is fastest on sizes whose factors are small primes. */
static size_t fft_size(size_t at_least)
{
    size_t m = at_least;
    while (!smooth_2357(m))
        m++;
    return m;
}

static void fft_free(nw_fft *f)
{
    if (f->forward)
        fftw_destroy_plan(f->forward);
    if (f->backward)
        fftw_destroy_plan(f->backward);
    fftw_free(f->kernel);
    fftw_free(f->num);
    fftw_free(f->den);
    fftw_free(f->fk);
    fftw_free(f->fnum);
    fftw_free(f->fden);
}

/* One pair of plans serves all three transforms each way through the new-array execute
 * calls (fftw_malloc gives every buffer the same alignment, which those calls require). */
static int fft_alloc(nw_fft *f, size_t size)
{
    *f = (nw_fft){.size = size, .ncomplex = size / 2 + 1};
    if (size > INT_MAX)
        return SLOWSCAN_ENOMEM; /* beyond FFTW's int-sized basic interface */
    f->kernel = fftw_malloc(size * sizeof(double));
    f->num = fftw_malloc(size * sizeof(double));
    f->den = fftw_malloc(size * sizeof(double));
    f->fk = fftw_malloc(f->ncomplex * sizeof(fftw_complex));
    f->fnum = fftw_malloc(f->ncomplex * sizeof(fftw_complex));
    f->fden = fftw_malloc(f->ncomplex * sizeof(fftw_complex));
    if (!f->kernel || !f->num || !f->den || !f->fk || !f->fnum || !f->fden)
        return SLOWSCAN_ENOMEM;
    f->forward = fftw_plan_dft_r2c_1d((int)size, f->kernel, f->fk, FFTW_ESTIMATE);
    f->backward = fftw_plan_dft_c2r_1d((int)size, f->fnum, f->num, FFTW_ESTIMATE);
    return f->forward && f->backward ? SLOWSCAN_OK : SLOWSCAN_ENUMERIC;
}

/* Fills the padded inputs: the kernel wrapped around index 0 (lag -l sits at size - l), the
 * centred data and the mask; returns the kernel's sum for the round-off estimate. */
static double fft_fill(const nw_problem *p, nw_fft *f)
{
    double ksum = 0.0;
    for (size_t j = 0; j < f->size; j++)
        f->kernel[j] = f->num[j] = f->den[j] = 0.0;
    for (size_t l = 0; l <= p->h; l++) {
        f->kernel[l] = p->w[l];
        if (l > 0)
            f->kernel[f->size - l] = p->w[l];
        ksum += (l > 0 ? 2.0 : 1.0) * p->w[l];
    }
    for (size_t j = 0; j < p->n; j++) {
        if (isfinite(p->x[j])) {
            f->num[j] = p->x[j] - p->mean;
            f->den[j] = 1.0;
        }
    }
    return ksum;
}

/* Circular convolution of num and den with the kernel, in place, scaled by 1/size. */
static void fft_convolve(nw_fft *f)
{
    fftw_execute_dft_r2c(f->forward, f->kernel, f->fk);
    fftw_execute_dft_r2c(f->forward, f->num, f->fnum);
    fftw_execute_dft_r2c(f->forward, f->den, f->fden);
    double scale = 1.0 / (double)f->size;
    for (size_t k = 0; k < f->ncomplex; k++) {
        double kr = f->fk[k][0] * scale, ki = f->fk[k][1] * scale;
        double ar = f->fnum[k][0], ai = f->fnum[k][1];
        double br = f->fden[k][0], bi = f->fden[k][1];
        f->fnum[k][0] = ar * kr - ai * ki;
        f->fnum[k][1] = ar * ki + ai * kr;
        f->fden[k][0] = br * kr - bi * ki;
        f->fden[k][1] = br * ki + bi * kr;
    }
    fftw_execute_dft_c2r(f->backward, f->fnum, f->num);
    fftw_execute_dft_c2r(f->backward, f->fden, f->den);
}

static int gaussian_fft(const nw_problem *p, double *trend)
{
    nw_fft f;
    int status = fft_alloc(&f, fft_size(p->n + p->h));
    if (status == SLOWSCAN_OK) {
        double ksum = fft_fill(p, &f);
        fft_convolve(&f);
        /* Transforms round to about eps * sqrt(log2 size) relative to the rms of what they
         * carry, and the denominator is at most ksum, so its absolute round-off is about
         * eps * sqrt(log2 size) * ksum (measured: well below that). The trend's relative
         * error is that over the denominator, so denominators under den_floor (about 1% of
         * a fully covered one) are recomputed exactly; the 10x is the safety margin. */
        double noise = 10.0 * DBL_EPSILON * sqrt(log2((double)f.size)) * ksum;
        double den_floor = noise / FALLBACK_ACCURACY;
        for (size_t i = 0; i < p->n; i++)
            trend[i] = f.den[i] >= den_floor ? p->mean + f.num[i] / f.den[i]
                                             : direct_at(p, i);
    }
    fft_free(&f);
    return status;
}

int detrend_gaussian_trend(double bandwidth, double dt, const double *x, size_t n,
                           double *trend)
{
    double s = bandwidth / dt; /* bandwidth in samples */
    /* lags beyond n - 1 never occur, so a wider kernel is cut there at no cost */
    size_t h = detrend_clamp_count(ceil(TRUNCATE_SIGMAS * s), n - 1);
    double *w = malloc((h + 1) * sizeof *w);
    if (!w)
        return SLOWSCAN_ENOMEM;
    for (size_t l = 0; l <= h; l++) {
        double u = (double)l / s;
        w[l] = exp(-0.5 * u * u);
    }
    nw_problem p = {.x = x, .n = n, .mean = detrend_finite_mean(x, n), .w = w, .h = h};
    int status = SLOWSCAN_OK;
    if (h <= DIRECT_MAX_HALF)
        for (size_t i = 0; i < n; i++)
            trend[i] = direct_at(&p, i);
    else
        status = gaussian_fft(&p, trend);
    free(w);
    return status;
}
