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

/* The plans, the kernel's transforms (powers 0..max_power) and the buffers of the sums for
 * series of up to n samples with zero padding to N >= n + h. This is where the module plans
 * FFTs, so it is called only from slowscan_detrend_workspace_alloc. NULL with *status
 * SLOWSCAN_ENOMEM (also for N beyond FFTW's int sizes) or SLOWSCAN_ENUMERIC. */
typedef struct detrend_kernel_fft detrend_kernel_fft;
detrend_kernel_fft *detrend_kernel_fft_alloc(const detrend_kernel *k, size_t n, int max_power,
                                             int *status);
void detrend_kernel_fft_free(detrend_kernel_fft *f);

/* Computes `count` sums of a series of n <= the workspace's samples by FFT convolution
 * (O(N log N) each), each distinct input (at most 2) transformed once; allocates nothing and
 * executes the workspace's plans on its own buffers (new-array calls), so workspaces can run
 * in parallel threads. Every input is read before any output is written, so an `out` may be
 * an input's own array. For kernels too long to sum directly; callers check each output
 * against `noise` and recompute exactly where the round-off matters. */
int detrend_kernel_sums(detrend_kernel_fft *f, size_t n, detrend_kernel_sum *sums,
                        size_t count);

/* The Gaussian fits' workspace (gaussian.c): the kernel, and for a long one its transforms
 * and the sums of the mask of a gap-free series of n samples, made once. degree 0: gaussian,
 * 1: gaussian-linear. */
typedef struct detrend_gauss_ws detrend_gauss_ws;
detrend_gauss_ws *detrend_gauss_alloc(int degree, double bandwidth, double dt, size_t n,
                                      int *status);
void detrend_gauss_free(detrend_gauss_ws *g);
int detrend_gauss_trend(detrend_gauss_ws *g, const double *x, size_t n, double *trend);

/* loess's scratch and GSL workspace (local.c), sized for the span at n samples. */
typedef struct detrend_loess_ws detrend_loess_ws;
detrend_loess_ws *detrend_loess_alloc(double bandwidth, double dt, size_t n, int *status);
void detrend_loess_free(detrend_loess_ws *w);
int detrend_loess_trend(detrend_loess_ws *w, double bandwidth, double dt, const double *x,
                        size_t n, double *trend);

int detrend_moving_trend(double bandwidth, double dt, const double *x, size_t n,
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

/* The smallest length >= at_least whose prime factors are 2, 3, 5, 7 (FFTW is fastest on
 * them); also used by response/emulate.c. */
size_t detrend_fft_size(size_t at_least);

#endif
