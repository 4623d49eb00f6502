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

int detrend_gaussian_trend(double bandwidth, double dt, const double *x, size_t n,
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
