/* slowscan detrend — the Gaussian kernel on the grid and its weighted moment sums by FFT,
 * shared by the local-constant and local-linear Gaussian trends (gaussian.c).
 *
 * Every sum the two fits need is a correlation of a series (the finite-sample mask or the
 * centred data, 0 at missing samples) with the kernel times a power of the lag. With zero
 * padding to N >= n + h there is no wrap-around for any lag |i - j| <= n - 1, so a circular
 * convolution of length N gives the linear one exactly up to round-off.
 *
 * Transforms round to about eps * sqrt(log2 N) relative to the rms of what they carry, so
 * each output's absolute error is about eps * sqrt(log2 N) * sum_l |kernel(l)| * max|input|;
 * `noise` is 10 times that (measured errors stay well below it). */
#include "detrend_internal.h"
#include "slowscan/status.h"

#include <fftw3.h>
#include <float.h>
#include <limits.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

#define TRUNCATE_SIGMAS 8.0 /* DESIGN §3: truncation allowed beyond 8 s only */
#define MAX_SUMS 8          /* more than the local-linear fit needs (5) */

int detrend_kernel_make(double bandwidth, double dt, size_t n, detrend_kernel *k)
{
    k->s = bandwidth / dt;
    k->h = detrend_clamp_count(ceil(TRUNCATE_SIGMAS * k->s), n - 1);
    k->w = malloc((k->h + 1) * sizeof *k->w);
    if (!k->w)
        return SLOWSCAN_ENOMEM;
    for (size_t l = 0; l <= k->h; l++) {
        double u = (double)l / k->s;
        k->w[l] = exp(-0.5 * u * u);
    }
    return SLOWSCAN_OK;
}

void detrend_kernel_free(detrend_kernel *k)
{
    free(k->w);
    k->w = NULL;
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

typedef struct {
    size_t size, ncomplex;
    double *real;                /* `size` reals: padded input, kernel, or an output */
    fftw_complex *fker, *fwork;  /* `ncomplex` each: a kernel's transform, a product */
    fftw_complex *fin[MAX_SUMS]; /* the transform of each distinct input */
    fftw_plan forward, backward;
} sums_fft;

static void fft_free(sums_fft *f)
{
    if (f->forward)
        fftw_destroy_plan(f->forward);
    if (f->backward)
        fftw_destroy_plan(f->backward);
    fftw_free(f->real);
    fftw_free(f->fker);
    fftw_free(f->fwork);
    for (size_t r = 0; r < MAX_SUMS; r++)
        fftw_free(f->fin[r]);
}

/* One pair of plans serves every transform through the new-array execute calls (fftw_malloc
 * gives every buffer the same alignment, which those calls require). */
static int fft_alloc(sums_fft *f, size_t size)
{
    *f = (sums_fft){.size = size, .ncomplex = size / 2 + 1};
    if (size > INT_MAX)
        return SLOWSCAN_ENOMEM; /* beyond FFTW's int-sized basic interface */
    f->real = fftw_malloc(size * sizeof(double));
    f->fker = fftw_malloc(f->ncomplex * sizeof(fftw_complex));
    f->fwork = fftw_malloc(f->ncomplex * sizeof(fftw_complex));
    if (!f->real || !f->fker || !f->fwork)
        return SLOWSCAN_ENOMEM;
    f->forward = fftw_plan_dft_r2c_1d((int)size, f->real, f->fker, FFTW_ESTIMATE);
    f->backward = fftw_plan_dft_c2r_1d((int)size, f->fwork, f->real, FFTW_ESTIMATE);
    return f->forward && f->backward ? SLOWSCAN_OK : SLOWSCAN_ENUMERIC;
}

/* Transforms the kernel times lag^power into f->fker, scaled by 1/size for the inverse, and
 * returns sum_l |kernel(l)|. The circular convolution sums input[j] K[(i - j) mod size], so
 * K[d] holds the weight of lag j - i = -d: lag -l at index l, lag +l at size - l. */
static double transform_kernel(const detrend_kernel *k, int power, sums_fft *f)
{
    double sum = 0.0, scale = 1.0 / (double)f->size;
    memset(f->real, 0, f->size * sizeof(double));
    for (size_t l = 0; l <= k->h; l++) {
        double u = (double)l / k->s, v = k->w[l] * (power == 0 ? 1.0 : power == 1 ? u : u * u);
        f->real[l] = (power == 1 ? -v : v) * scale;
        if (l > 0)
            f->real[f->size - l] = v * scale;
        sum += (l > 0 ? 2.0 : 1.0) * fabs(v);
    }
    fftw_execute_dft_r2c(f->forward, f->real, f->fker);
    return sum;
}

/* Transforms input r unless an earlier sum had the same input; returns max|input|. */
static int transform_input(const detrend_kernel_sum *sums, size_t r, size_t n, sums_fft *f,
                           double *peak)
{
    *peak = 0.0;
    for (size_t j = 0; j < n; j++)
        *peak = fmax(*peak, fabs(sums[r].input[j]));
    for (size_t q = 0; q < r; q++)
        if (sums[q].input == sums[r].input)
            return SLOWSCAN_OK; /* f->fin[r] stays NULL: use fin[q] */
    f->fin[r] = fftw_malloc(f->ncomplex * sizeof(fftw_complex));
    if (!f->fin[r])
        return SLOWSCAN_ENOMEM;
    memset(f->real, 0, f->size * sizeof(double));
    memcpy(f->real, sums[r].input, n * sizeof(double));
    fftw_execute_dft_r2c(f->forward, f->real, f->fin[r]);
    return SLOWSCAN_OK;
}

static const fftw_complex *input_transform(const detrend_kernel_sum *sums, size_t r,
                                           const sums_fft *f)
{
    for (size_t q = 0; q < r; q++)
        if (sums[q].input == sums[r].input)
            return f->fin[q];
    return f->fin[r];
}

/* sums[r].out = the inverse transform of fin(r) * fker, its first n values. */
static void convolve_out(detrend_kernel_sum *sum, const fftw_complex *fin, size_t n,
                         sums_fft *f)
{
    for (size_t k = 0; k < f->ncomplex; k++) {
        double ar = fin[k][0], ai = fin[k][1], kr = f->fker[k][0], ki = f->fker[k][1];
        f->fwork[k][0] = ar * kr - ai * ki;
        f->fwork[k][1] = ar * ki + ai * kr;
    }
    fftw_execute_dft_c2r(f->backward, f->fwork, f->real);
    memcpy(sum->out, f->real, n * sizeof(double));
}

int detrend_kernel_sums(const detrend_kernel *k, size_t n, detrend_kernel_sum *sums,
                        size_t count)
{
    if (count > MAX_SUMS)
        return SLOWSCAN_EINVAL;
    for (size_t r = 0; r < count; r++)
        if (sums[r].power < 0 || sums[r].power > 2)
            return SLOWSCAN_EINVAL;
    sums_fft f;
    int status = fft_alloc(&f, fft_size(n + k->h));
    double peak[MAX_SUMS];
    for (size_t r = 0; r < count && status == SLOWSCAN_OK; r++)
        status = transform_input(sums, r, n, &f, &peak[r]);
    double round_off = 10.0 * DBL_EPSILON * sqrt(log2((double)f.size));
    for (int power = 0; power <= 2 && status == SLOWSCAN_OK; power++) {
        int used = 0;
        for (size_t r = 0; r < count; r++)
            used |= sums[r].power == power;
        if (!used)
            continue;
        double ksum = transform_kernel(k, power, &f);
        for (size_t r = 0; r < count; r++) {
            if (sums[r].power != power)
                continue;
            convolve_out(&sums[r], input_transform(sums, r, &f), n, &f);
            sums[r].noise = round_off * ksum * peak[r];
        }
    }
    fft_free(&f);
    return status;
}
