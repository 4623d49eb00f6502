/* slowscan detrend — private interface between the files of detrend/ (not installed).
 *
 * Each method computes only the trend; detrend.c validates arguments, counts finite samples
 * and forms the residual, so those rules live in one place. Every function here may assume
 * n >= 2 finite samples, dt > 0 and a positive finite bandwidth, and returns a slowscan
 * status code. Non-finite samples (NaN, and +-Inf which we treat the same way) are missing. */
#ifndef SLOWSCAN_DETREND_INTERNAL_H
#define SLOWSCAN_DETREND_INTERNAL_H

#include <stddef.h>

/* Mean of the finite samples (there must be at least one). */
double detrend_finite_mean(const double *x, size_t n);

/* Converts a non-negative sample count held in a double to size_t, clamped to `cap`, so that
 * enormous bandwidths cannot overflow the conversion. */
size_t detrend_clamp_count(double count, size_t cap);

/* The Gaussian kernel of DESIGN §3 on the grid, cut at h = ceil(8 s) samples (at most n - 1,
 * as longer lags never occur): w[l] = exp(-0.5 (l/s)^2), l = 0..h, s in samples. */
typedef struct {
    double s;
    size_t h;
    double *w;
} detrend_kernel;

int detrend_kernel_make(double bandwidth, double dt, size_t n, detrend_kernel *k);
void detrend_kernel_free(detrend_kernel *k);

/* One kernel-weighted moment sum over the grid, a correlation of `input` with the kernel
 * times the power-th power of the lag in units of s:
 *   out[i] = sum_j input[j] w(j - i) ((j - i)/s)^power,   power 0..2,
 * with `input` 0 at missing samples. */
typedef struct {
    const double *input; /* n values */
    int power;
    double *out;  /* n values */
    double noise; /* set by detrend_kernel_sums: bound on the absolute round-off of each out[i] */
} detrend_kernel_sum;

/* Computes `count` sums by FFT convolution with zero padding (O(n log n) each): one pair of
 * plans, each distinct input and each kernel power transformed once. Every input is read
 * before any output is written, so an `out` may be an input's own array. For kernels too long to
 * sum directly; callers check each output against `noise` and recompute exactly where the
 * round-off matters. */
int detrend_kernel_sums(const detrend_kernel *k, size_t n, detrend_kernel_sum *sums,
                        size_t count);

int detrend_gaussian_trend(double bandwidth, double dt, const double *x, size_t n,
                           double *trend);
int detrend_gaussian_linear_trend(double bandwidth, double dt, const double *x, size_t n,
                                  double *trend);
int detrend_moving_trend(double bandwidth, double dt, const double *x, size_t n,
                         double *trend);
int detrend_loess_trend(double bandwidth, double dt, const double *x, size_t n,
                        double *trend);
int detrend_poly_trend(int degree, const double *x, size_t n, double *trend);

/* A cycle estimated from the usable samples d_j of one window (deseason.c sweeps the window
 * along the record). `add` puts sample j in (sign +1) or takes it out (-1); `reset` empties
 * the model; `solve` is called once the window is complete (`rebuilt`: its sums were just
 * made afresh) and returns SLOWSCAN_ESHORT when the window cannot estimate the cycle;
 * `cycle` is then the cycle's value at sample i. */
typedef struct deseason_model deseason_model;
struct deseason_model {
    void (*reset)(deseason_model *model);
    void (*add)(deseason_model *model, size_t j, double d, double sign);
    int (*solve)(deseason_model *model, int rebuilt);
    double (*cycle)(const deseason_model *model, size_t i);
};

/* The harmonic model of detrend.h (harmonics.c): K pairs of period `steps` (in samples),
 * each divided by gain[k-1] = 1 - H(k/steps) of the moving average d was made with. */
deseason_model *detrend_harmonic_model_alloc(int harmonics, double steps, const double *gain);
void detrend_harmonic_model_free(deseason_model *model);

#endif
