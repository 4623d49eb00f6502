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
#define MAX_INPUTS 2        /* distinct inputs: the mask and the centred data */

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
size_t detrend_fft_size(size_t at_least)
{
    size_t m = at_least;
    while (!smooth_2357(m))
        m++;
    return m;
}

/* Everything the sums need that depends only on the kernel and the length: one pair of plans
 * (serving every transform through the new-array execute calls; fftw_malloc gives every buffer
 * the same alignment, which those calls require), the kernel's transforms for each power, and
 * the buffers of one evaluation. */
struct detrend_kernel_fft {
    size_t size, ncomplex, n;
    int max_power;
    double *real;                  /* `size` reals: padded input, kernel, or an output */
    fftw_complex *fker[3];         /* kernel times lag^power, transformed and scaled by 1/size */
    double ksum[3];                /* sum_l |kernel(l) lag^power| */
    fftw_complex *fwork;           /* a product of transforms */
    fftw_complex *fin[MAX_INPUTS]; /* the transform of each distinct input */
    fftw_plan forward, backward;
};

void detrend_kernel_fft_free(detrend_kernel_fft *f)
{
    if (!f)
        return;
    if (f->forward)
        fftw_destroy_plan(f->forward);
    if (f->backward)
        fftw_destroy_plan(f->backward);
    fftw_free(f->real);
    fftw_free(f->fwork);
    for (size_t p = 0; p < 3; p++)
        fftw_free(f->fker[p]);
    for (size_t r = 0; r < MAX_INPUTS; r++)
        fftw_free(f->fin[r]);
    free(f);
}

/* Transforms the kernel times lag^power into f->fker[power], scaled by 1/size for the inverse,
 * and records sum_l |kernel(l)|. The circular convolution sums input[j] K[(i - j) mod size], so
 * K[d] holds the weight of lag j - i = -d: lag -l at index l, lag +l at size - l. */
static void transform_kernel(const detrend_kernel *k, int power, detrend_kernel_fft *f)
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
    fftw_execute_dft_r2c(f->forward, f->real, f->fker[power]);
    f->ksum[power] = sum;
}

static int fft_buffers(detrend_kernel_fft *f)
{
    f->real = fftw_malloc(f->size * sizeof(double));
    f->fwork = fftw_malloc(f->ncomplex * sizeof(fftw_complex));
    int ok = f->real && f->fwork;
    for (int p = 0; p <= f->max_power; p++)
        ok = ok && (f->fker[p] = fftw_malloc(f->ncomplex * sizeof(fftw_complex)));
    for (size_t r = 0; r < MAX_INPUTS; r++)
        ok = ok && (f->fin[r] = fftw_malloc(f->ncomplex * sizeof(fftw_complex)));
    return ok ? SLOWSCAN_OK : SLOWSCAN_ENOMEM;
}

/* The only place this module plans (see detrend.h on threads). */
detrend_kernel_fft *detrend_kernel_fft_alloc(const detrend_kernel *k, size_t n, int max_power,
                                             int *status)
{
    detrend_kernel_fft *f = calloc(1, sizeof *f);
    *status = SLOWSCAN_ENOMEM;
    if (!f)
        return NULL;
    f->size = detrend_fft_size(n + k->h);
    f->ncomplex = f->size / 2 + 1;
    f->n = n;
    f->max_power = max_power < 0 ? 0 : max_power > 2 ? 2 : max_power;
    /* beyond FFTW's int-sized basic interface: ENOMEM, as for any other size we cannot serve */
    if (f->size <= INT_MAX && (*status = fft_buffers(f)) == SLOWSCAN_OK) {
        f->forward = fftw_plan_dft_r2c_1d((int)f->size, f->real, f->fker[0], FFTW_ESTIMATE);
        f->backward = fftw_plan_dft_c2r_1d((int)f->size, f->fwork, f->real, FFTW_ESTIMATE);
        *status = f->forward && f->backward ? SLOWSCAN_OK : SLOWSCAN_ENUMERIC;
    }
    for (int p = 0; p <= f->max_power && *status == SLOWSCAN_OK; p++)
        transform_kernel(k, p, f);
    if (*status != SLOWSCAN_OK) {
        detrend_kernel_fft_free(f);
        return NULL;
    }
    return f;
}

/* Sets slots[r], the buffer holding the transform of sum r's input: that of an earlier sum
 * with the same input, or the next free one (*used counts those taken), transformed now. */
static int transform_input(const detrend_kernel_sum *sums, size_t r, size_t n,
                           detrend_kernel_fft *f, size_t *slots, size_t *used)
{
    for (size_t q = 0; q < r; q++)
        if (sums[q].input == sums[r].input) {
            slots[r] = slots[q];
            return SLOWSCAN_OK;
        }
    if (*used == MAX_INPUTS)
        return SLOWSCAN_EINVAL;
    slots[r] = (*used)++;
    memset(f->real, 0, f->size * sizeof(double));
    memcpy(f->real, sums[r].input, n * sizeof(double));
    fftw_execute_dft_r2c(f->forward, f->real, f->fin[slots[r]]);
    return SLOWSCAN_OK;
}

/* sum->out = the inverse transform of fin * fker, its first n values. */
static void convolve_out(detrend_kernel_sum *sum, const fftw_complex *fin,
                         const fftw_complex *fker, size_t n, detrend_kernel_fft *f)
{
    for (size_t k = 0; k < f->ncomplex; k++) {
        double ar = fin[k][0], ai = fin[k][1], kr = fker[k][0], ki = fker[k][1];
        f->fwork[k][0] = ar * kr - ai * ki;
        f->fwork[k][1] = ar * ki + ai * kr;
    }
    fftw_execute_dft_c2r(f->backward, f->fwork, f->real);
    memcpy(sum->out, f->real, n * sizeof(double));
}

static double peak_of(const double *x, size_t n)
{
    double peak = 0.0;
    for (size_t j = 0; j < n; j++)
        peak = fmax(peak, fabs(x[j]));
    return peak;
}

int detrend_kernel_sums(detrend_kernel_fft *f, size_t n, detrend_kernel_sum *sums,
                        size_t count)
{
    if (count > MAX_SUMS || n > f->n)
        return SLOWSCAN_EINVAL;
    for (size_t r = 0; r < count; r++)
        if (sums[r].power < 0 || sums[r].power > f->max_power)
            return SLOWSCAN_EINVAL;
    size_t slot[MAX_SUMS], used = 0;
    double peak[MAX_SUMS];
    int status = SLOWSCAN_OK;
    for (size_t r = 0; r < count && status == SLOWSCAN_OK; r++) {
        peak[r] = peak_of(sums[r].input, n);
        status = transform_input(sums, r, n, f, slot, &used);
    }
    double round_off = 10.0 * DBL_EPSILON * sqrt(log2((double)f->size));
    for (size_t r = 0; r < count && status == SLOWSCAN_OK; r++) {
        convolve_out(&sums[r], f->fin[slot[r]], f->fker[sums[r].power], n, f);
        sums[r].noise = round_off * f->ksum[sums[r].power] * peak[r];
    }
    return status;
}
