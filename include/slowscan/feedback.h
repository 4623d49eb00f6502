/* slowscan — the sliding feedback regression of a forced run (module prefix: feedback_).
 *
 * For a net flux N and a response T sampled on one regular time grid (e.g. top-of-atmosphere
 * imbalance and surface temperature change of an abrupt-forcing run), N = F + lambda T is
 * fitted in windows moved along the record (Gregory et al. 2004, GRL 31:L03205): ordinary
 * least squares, or total least squares (Deming regression, errors in both variables) with a
 * given ratio of the noise variances. Per window: lambda and F with their standard errors,
 * the same errors widened for the residuals' autocorrelation, R^2, and the implied
 * equilibrium response T_eq = -F/lambda. Flags per window and one drift test per run say
 * whether extrapolating a single window's fit is justified. Nothing here prints.
 *
 * Missing values: a sample enters a window's fit only when both N and T are finite there;
 * n counts the pairs used. The pre-processing helpers (anomalies against a baseline run,
 * annual means of monthly data, area-weighted means) are declared at the end. */
#ifndef SLOWSCAN_FEEDBACK_H
#define SLOWSCAN_FEEDBACK_H

#include "slowscan/export.h"
#include "slowscan/calendar.h"
#include "slowscan/screen.h"

#include <stddef.h>

typedef enum {
    FEEDBACK_OLS = 0, /* ordinary least squares of N on T */
    FEEDBACK_TLS      /* Deming regression: noise_ratio = var(noise of N) / var(noise of T) */
} feedback_fit_kind;

typedef struct {
    feedback_fit_kind fit;
    double noise_ratio; /* TLS only: > 0, in (units of N / units of T)^2; NaN: not given */
    double window;      /* window length in time units (W = round(window/dt) + 1 samples) */
    double stride;      /* distance between window starts, in time units (>= one step) */
    double skip;        /* time dropped at the start of the record (0: none) */
    double span_from, span_until; /* one fit over [from, until] instead of windows; NaN: off */
    double scale;       /* T_eq and its error are multiplied by this (1) */
    double level;       /* two-sided level of the intervals and tests (0.95) */
} feedback_config;

SLOWSCAN_API
feedback_config slowscan_feedback_config_default(void);

/* Why a window has no equilibrium estimate. */
typedef enum {
    FEEDBACK_TEQ_OK = 0,
    FEEDBACK_TEQ_NOT_RESTORING, /* lambda >= 0: no restoring feedback, no equilibrium */
    FEEDBACK_TEQ_NO_FIT         /* the window has no fit (too few pairs, T constant) */
} feedback_teq_reason;

/* Flags of a window (bits). */
enum {
    FEEDBACK_FLAG_WEAK = 1,    /* the interval of lambda (adjusted error) contains 0 */
    FEEDBACK_FLAG_REVERSED = 2 /* lambda has the other sign than in the first window */
};

typedef struct {
    double start, end;    /* times of the window's first and last sample */
    size_t n;             /* pairs with both values finite */
    int status;           /* SLOWSCAN_OK, or why there is no fit (ESHORT, ECONST) */
    double lambda, se_lambda, se_lambda_adj;
    double forcing, se_forcing, se_forcing_adj; /* F, the intercept */
    double cov;           /* covariance of F and lambda (unadjusted) */
    double r2;            /* squared correlation of N and T in the window */
    double r_response, r_residual; /* lag-1 autocorrelations (n_eff uses the residuals') */
    double n_eff;         /* effective sample size, at most n */
    double lo, hi;        /* interval of lambda at `level`, with the adjusted error */
    double t_eq, se_t_eq; /* -F/lambda (times scale) and its delta-method error (adjusted) */
    feedback_teq_reason teq_reason;
    unsigned flags;       /* FEEDBACK_FLAG_* */
} feedback_window;

/* The per-run drift test. */
typedef enum {
    FEEDBACK_DRIFT_UNTESTED = 0, /* fewer than two non-overlapping windows with a fit */
    FEEDBACK_DRIFT_STEADY,       /* no evidence that lambda changes */
    FEEDBACK_DRIFT_DRIFTING      /* lambda changes in time: extrapolation not justified */
} feedback_drift_verdict;

typedef enum {
    FEEDBACK_DRIFT_NONE = 0,
    FEEDBACK_DRIFT_ENDS,  /* two windows: first against last, z of the difference */
    FEEDBACK_DRIFT_TREND  /* three or more: weighted regression of lambda on window time */
} feedback_drift_method;

typedef struct {
    feedback_drift_verdict verdict;
    feedback_drift_method method;
    size_t windows;   /* non-overlapping windows used */
    double slope;     /* change of lambda per time unit (ENDS: difference / time between) */
    double se_slope;
    double z, p_value;  /* slope / se and its two-sided p (Student t reference) */
} feedback_drift;

/* Number of windows a record of n samples from time[0] with step dt gives under cfg (1 with
 * a span). SLOWSCAN_EINVAL for a window longer than the record after --skip (or a span
 * outside it), a bad stride, ratio or scale. */
SLOWSCAN_API
int slowscan_feedback_window_count(const double *time, size_t n, const feedback_config *cfg,
                                   size_t *count);

/* Fits one window: samples first .. first+len-1. */
SLOWSCAN_API
int slowscan_feedback_fit(const double *time, const double *flux, const double *response,
                          size_t first, size_t len, const feedback_config *cfg,
                          feedback_window *out);

/* Every window (out holds slowscan_feedback_window_count entries), their flags, and the drift
 * test on windows of the same length laid end to end from the first (drift may be NULL). */
SLOWSCAN_API
int slowscan_feedback_run(const double *time, const double *flux, const double *response,
                          size_t n, const feedback_config *cfg, feedback_window *out,
                          size_t count, feedback_drift *drift);

/* --- the windows of a run from what the user asked --- */

/* The lengths given for a run's windows, or a fit span, before defaults and checks
 * (slowscan_feedback_windows). Each length as parsed: percent of a span, the axis' own time
 * units, or a calendar unit (screen_length); amount NaN: not given. */
typedef struct {
    screen_length skip;   /* left out at the start of the record; not given: none */
    screen_length window; /* percent of the record after skip; not given: 50% of it, at most
                             100 time units */
    screen_length stride; /* percent of the record after skip; not given: a tenth of the
                             window, at least one mean step */
    int span;             /* 1: one fit over [span_from, span_until] instead of windows */
    double span_from, span_until; /* times of the run's axis; NaN: not a time of the run */
} feedback_request;

SLOWSCAN_API
feedback_request slowscan_feedback_request_default(void);

/* Which length a refusal is about. */
typedef enum {
    FEEDBACK_LENGTH_SKIP = 0,
    FEEDBACK_LENGTH_WINDOW,
    FEEDBACK_LENGTH_STRIDE
} feedback_length;

/* Why slowscan_feedback_windows refused a request (the caller words it). */
typedef enum {
    FEEDBACK_REFUSAL_NONE = 0,
    FEEDBACK_REFUSAL_SAMPLES,      /* the record has fewer than 4 samples */
    FEEDBACK_REFUSAL_SPAN,         /* the span is not increasing inside the record (within a
                                      millionth of a step), or not read */
    FEEDBACK_REFUSAL_UNIT,         /* `length` cannot be measured on the run's axis */
    FEEDBACK_REFUSAL_SKIP,         /* skip leaves fewer than 4 samples */
    FEEDBACK_REFUSAL_WINDOW_LONG,  /* the window is longer than the record after skip */
    FEEDBACK_REFUSAL_WINDOW_SHORT, /* the window holds fewer than 4 samples */
    FEEDBACK_REFUSAL_STRIDE_SHORT  /* the stride is shorter than the mean step */
} feedback_refusal;

typedef struct {
    feedback_refusal refusal;
    feedback_length length; /* FEEDBACK_REFUSAL_UNIT: the length that has no meaning */
    double step;            /* the record's mean step */
    double rest;            /* the record's span after skip (NaN before skip is known) */
} feedback_windows_detail;

/* The configuration's skip, window and stride (or its span) for a run of n samples at
 * time[0..n) on `axis`, from `request`: lengths on the axis (slowscan_screen_length_on_axis),
 * percentages of the record after skip (skip's of the whole record), the defaults above, then
 * the checks, in this order: at least 4 samples; with a span, the span; otherwise skip, the
 * window (not longer than the record after skip, at least 4 samples), the stride (at least
 * one step). SLOWSCAN_OK, or SLOWSCAN_ESHORT (fewer than 4 samples) / SLOWSCAN_EINVAL with
 * *detail saying which rule refused; cfg's other fields are left as they are. */
SLOWSCAN_API
int slowscan_feedback_windows(const double *time, size_t n, const time_axis *axis,
                              const feedback_request *request, feedback_config *cfg,
                              feedback_windows_detail *detail);

/* --- pre-processing --- */

typedef enum {
    FEEDBACK_BASELINE_MEAN = 0, /* subtract the baseline's mean over the same period */
    FEEDBACK_BASELINE_DRIFT     /* subtract the baseline's least-squares line over it */
} feedback_baseline_mode;

/* values[i] (at time[i]) minus the baseline run (btime, bvalues: nb samples, NaN missing)
 * over the same period: baseline times time[0] + offset .. time[n-1] + offset. With DRIFT the
 * line fitted there is evaluated at time[i] + offset. SLOWSCAN_ESHORT when fewer than two
 * finite baseline samples fall in that period (none for MEAN). */
SLOWSCAN_API
int slowscan_feedback_anomalies(const double *time, double *values, size_t n,
                                const double *btime, const double *bvalues, size_t nb,
                                double offset, feedback_baseline_mode mode);

/* Whether the baseline (btime, bvalues: nb samples, NaN missing) covers the run's period,
 * time[0] + offset .. time[n-1] + offset: its first and last finite samples lie within half
 * the baseline's mean step of those ends (the two runs' samples may sit at different points
 * of a step). *first and *last: the baseline's first and last finite times (NaN when none),
 * for the caller's message. SLOWSCAN_OK when it covers, SLOWSCAN_ESHORT when it does not. */
SLOWSCAN_API
int slowscan_feedback_baseline_covers(const double *time, size_t n, const double *btime,
                                      const double *bvalues, size_t nb, double offset,
                                      double *first, double *last);

/* var(noise of N) / var(noise of T) estimated from a baseline run over the same period
 * (sample variances about each variable's least-squares line). */
SLOWSCAN_API
int slowscan_feedback_noise_ratio(const double *btime, const double *bflux,
                                  const double *bresponse, size_t nb, double from,
                                  double until, double *ratio);

/* Annual means of monthly values: month[i] is a month index (slowscan_calendar_month_index),
 * each month weighted by its length in days in `calendar`. Only whole years with all twelve
 * months finite give a mean; a year with a missing month gives NaN; partial years at the ends
 * are left out. years[] (astronomical years) and means[] need room for n/12 + 2 entries. */
SLOWSCAN_API
int slowscan_feedback_annual_means(calendar_kind calendar, const double *month,
                                   const double *values, size_t n, double *years,
                                   double *means, size_t *nyears);

/* Weighted mean over cells of one time step: sum w_c x_c / sum w_c over finite x_c (NaN when
 * none); with cos(latitude) weights from slowscan_feedback_latitude_weights. */
SLOWSCAN_API
double slowscan_feedback_weighted_mean(const double *values, const double *weights,
                                       size_t cells);

/* cos(latitude) of each cell's latitude in degrees (the exact area weight on a regular
 * latitude-longitude grid); SLOWSCAN_EINVAL for a latitude outside [-90, 90]. */
SLOWSCAN_API
int slowscan_feedback_latitude_weights(const double *latitude, size_t cells, double *weights);

#endif
