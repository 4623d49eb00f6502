/* slowscan — trend and seasonal-cycle removal (module prefix: detrend_).
 *
 * All functions work on a regular time grid t_i = t_0 + i*dt; only the step dt matters.
 * Missing samples are NaN. Every method accepts NaN input by design:
 *   gaussian-linear, gaussian, moving, loess:
 *                            a NaN sample gets weight 0; the trend is still defined there
 *                            (from its neighbours) and the residual is NaN.
 *   linear, poly:K:          NaN samples are left out of the least-squares fit; the trend is
 *                            evaluated at every time; residual NaN where the sample is NaN.
 *   difference:              residual_i = x_i - x_{i-1}, trend_i = x_{i-1}; residual_0 is NaN,
 *                            and so is every residual touching a NaN sample.
 *   none:                    trend 0, residual = x.
 * No function does I/O or allocates global state. */
#ifndef SLOWSCAN_DETREND_H
#define SLOWSCAN_DETREND_H

#include "slowscan/export.h"

#include <stddef.h>

typedef enum {
    DETREND_GAUSSIAN,   /* Nadaraya-Watson (local constant), Gaussian kernel, s = bandwidth */
    DETREND_GAUSSIAN_LINEAR, /* local-linear, Gaussian kernel, s = bandwidth (the CLI default) */
    DETREND_MOVING,     /* centred moving mean over a span of `bandwidth` time units */
    DETREND_LOESS,      /* local linear regression, tricube weights, span = bandwidth */
    DETREND_LINEAR,     /* least-squares straight line */
    DETREND_POLY,       /* least-squares polynomial of degree `degree` */
    DETREND_DIFFERENCE, /* first differences */
    DETREND_NONE
} detrend_method;

typedef struct {
    detrend_method method;
    double bandwidth; /* time units; used by gaussian-linear, gaussian, moving, loess */
    int degree;       /* used by poly */
} detrend_spec;

/* "gaussian-linear", "gaussian", "moving", "loess", "linear", "poly:K", "difference", "none".
 * Sets spec->method and spec->degree; leaves spec->bandwidth alone. */
SLOWSCAN_API
int slowscan_detrend_parse_method(const char *text, detrend_spec *spec);
SLOWSCAN_API
const char *slowscan_detrend_method_name(detrend_method method);
/* Whether the method reads spec->bandwidth. */
SLOWSCAN_API
int slowscan_detrend_uses_bandwidth(detrend_method method);

/* Writes trend[n] and residual[n] (either may be NULL). Returns SLOWSCAN_EINVAL for a
 * bandwidth <= 0 where one is used, dt <= 0, or a polynomial degree not below the number of
 * finite samples (or above 12, where the fit is numerically meaningless); SLOWSCAN_ESHORT when
 * fewer than 2 finite samples remain. Gaussian detrending (both fits) is O(n log n) (FFT
 * convolution with the kernel truncated at 8 s) whatever the bandwidth.
 *
 * gaussian-linear: at each t_i the weighted least-squares line through the finite samples,
 * weights exp(-0.5 ((t_j - t_i)/s)^2) (cut beyond 8 s), evaluated at t_i (Fan & Gijbels 1996,
 * Local Polynomial Modelling and Its Applications, ch. 3). It reproduces straight lines
 * exactly, so it does not lag at the record's ends or at the rims of gaps where the trend has
 * a slope; its interior bias on a smooth trend is s^2 f''/2. Where fewer than 2 samples carry
 * non-negligible weight (weight >= 1e-6 of the largest weight present) the line is
 * undetermined and the local-constant (gaussian) value is used; NaN where no finite sample
 * lies within 8 s. gaussian: the Nadaraya-Watson weighted mean with the same weights. */
SLOWSCAN_API
int slowscan_detrend_apply(const detrend_spec *spec, double dt, const double *x, size_t n,
                  double *trend, double *residual);

/* Detrend workspace: plan once, detrend many series of one length (DESIGN §2).
 *
 * slowscan_detrend_workspace_alloc makes everything a method needs for series of up to n samples of
 * step dt: for gaussian and gaussian-linear the kernel weights, the FFT plans and the
 * kernel's transforms, the kernel sums of a gap-free series' sample mask (S0, S1, S2 of the
 * local-linear fit; a series with NaN has them recomputed), and all scratch;
 * for loess its scratch and GSL workspace. It copies *spec. NULL for a bad spec or dt (the
 * cases for which slowscan_detrend_apply returns SLOWSCAN_EINVAL without looking at data), n = 0, or
 * no memory.
 *
 * slowscan_detrend_apply_with detrends x[n] with it, neither allocating (apart from linear and poly,
 * which allocate their least-squares system per call) nor planning, and gives exactly the
 * doubles slowscan_detrend_apply gives for the same spec, dt and n equal to the workspace's (which is
 * what slowscan_detrend_apply does: alloc, apply, free), with the same status codes; n above the
 * workspace's, or a NULL ws: SLOWSCAN_EINVAL. A shorter series is allowed; the Gaussian fits
 * then use the longer transform and agree with slowscan_detrend_apply to round-off (~1e-12 of the
 * data's spread, the bound the fits keep anyway), not to the bit.
 *
 * Threads: a workspace is used by one thread at a time; different workspaces may detrend in
 * parallel (FFTW's new-array execute calls on each workspace's own buffers). FFT plans are
 * made only in slowscan_detrend_workspace_alloc (and so in slowscan_detrend_apply), and FFTW's planner is not
 * thread-safe: allocate workspaces (and call slowscan_detrend_apply) from one thread at a time, or call
 * fftw_make_planner_thread_safe() once first (the slowscan command does). The library takes
 * no lock of its own: it would guard only its own planning, not the caller's or another
 * library's use of the same planner, and would be a global, which the core does not keep. */
typedef struct detrend_workspace detrend_workspace;

SLOWSCAN_API
detrend_workspace *slowscan_detrend_workspace_alloc(const detrend_spec *spec, double dt, size_t n);
SLOWSCAN_API
void slowscan_detrend_workspace_free(detrend_workspace *ws);
SLOWSCAN_API
int slowscan_detrend_apply_with(detrend_workspace *ws, const double *x, size_t n, double *trend,
                       double *residual);

/* Seasonal-cycle removal (deseasoning), done before detrending.
 *
 * Let P = period/dt be the period in time steps. The cycle is estimated from
 * d = x - (centred moving average of x over m = round(P) steps; the 2 x m average when m is
 * even; NaN where its span holds a missing sample or runs off the record), so a trend is not
 * taken for cycle. Then, for each sample i:
 *   mean cycle (harmonics 0, P a whole number within 1e-6 relative): the mean of d over the
 *     samples of i's phase (i mod P) in i's window, minus the mean of those phase means
 *     (the additive classical decomposition when the window is the whole record);
 *   harmonics K >= 1: sum_k a_k cos(2 pi k t/P) + b_k sin(2 pi k t/P), fitted by least squares
 *     with an intercept to d in i's window; each pair is divided by 1 - H(k/P), H the moving
 *     average's response, which undoes exactly the part of the cycle the average kept when P
 *     is not a whole number of steps. Harmonics 0 with a non-whole P means
 *     DETREND_DESEASON_HARMONICS harmonics.
 * The window of i is `window` time units long, W = round(window/dt) + 1 samples, centred on i
 * (i - floor((W-1)/2) .. ), and shifted inward at the record's ends so it never shrinks;
 * window 0 means the whole record (one fixed cycle). Both estimates have mean zero over a
 * period, so the series keeps its level. NaN samples are left out of every estimate and stay
 * NaN. Cost O(n) per series for the mean cycle (running sums per phase), O(n K^3) for
 * harmonics (running normal equations, one small solve per window position). */
enum { DETREND_DESEASON_HARMONICS = 3 }; /* harmonics used for a non-whole period by default */

typedef struct {
    double period; /* time units, > 0 */
    int harmonics; /* 0: the mean cycle when P is a whole number of steps; K >= 1: K pairs */
    double window; /* time units; 0: the whole record */
} deseason_spec;

/* period 0 (to be set), harmonics 0, window 0. */
SLOWSCAN_API
deseason_spec slowscan_detrend_deseason_default(void);

/* Which field of a spec is out of its domain. */
typedef enum {
    DESEASON_FINE = 0,
    DESEASON_BAD_PERIOD,    /* dt or period not positive and finite, P < 2 or P > n/2 */
    DESEASON_BAD_HARMONICS, /* K < 0, or 2K >= P (at or above the Nyquist frequency) */
    DESEASON_BAD_WINDOW     /* window < 0, shorter than two periods, or longer than (n-1) dt */
} deseason_problem;

/* Checks a spec for a series of n samples of step dt without touching data: returns
 * SLOWSCAN_OK or SLOWSCAN_EINVAL with *problem saying which field is wrong, and the number of
 * harmonics that will be fitted in *harmonics (0: the mean cycle). Either pointer may be
 * NULL. */
SLOWSCAN_API
int slowscan_detrend_deseason_check(const deseason_spec *spec, double dt, size_t n,
                           deseason_problem *problem, int *harmonics);

/* Removes the cycle described above from x[n] in place. SLOWSCAN_EINVAL for a bad spec (see
 * slowscan_detrend_deseason_check) or NULL x with n > 0; SLOWSCAN_ESHORT when a phase of some window
 * has no usable sample (mean cycle) or some window has too few to separate the harmonics.
 * On any failure x is left unchanged. */
SLOWSCAN_API
int slowscan_detrend_deseason_apply(const deseason_spec *spec, double dt, double *x, size_t n);


/* The trend-leakage diagnostic (detrend/leakage.c): is the residual's mean over the first and
 * over the last `edge` samples away from zero, as when the trend was not followed near the
 * record's ends? Each edge mean is tested with the standard error from the effective sample
 * size m (1 - r1)/(1 + r1), r1 the residual's lag-1 autocorrelation; each edge at level/2. */
typedef struct {
    double mean;      /* residual mean over the edge span (NaN without finite samples) */
    double z, p;      /* mean / standard error and its two-sided normal p (NaN: too few) */
    size_t samples;   /* finite samples in the span */
    double effective; /* effective sample size */
} detrend_edge;

typedef struct {
    detrend_edge first, last;
    double r1;    /* lag-1 autocorrelation of the whole residual */
    double level; /* the series-level test size */
    int leaking;  /* 1 when either edge's p < level/2 */
} detrend_leakage;

/* SLOWSCAN_EINVAL for edge < 2 or > n or level outside (0, 1); SLOWSCAN_ESHORT with fewer than
 * 3 finite values; SLOWSCAN_ECONST for a constant residual. NaN samples are skipped. */
SLOWSCAN_API
int slowscan_detrend_leakage_test(const double *residual, size_t n, size_t edge, double level,
                         detrend_leakage *out);

#endif
