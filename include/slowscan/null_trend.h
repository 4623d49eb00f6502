/* slowscan — the null distribution of an indicator's trend (module prefix: null_trend_).
 *
 * Each surrogate of a residual goes through the same detrend-free pipeline as the residual:
 * rolling indicators, then Kendall tau against time. The workspace holds every buffer that
 * pipeline needs for one series length, so drawing allocates nothing.
 *
 * Random streams: replicate j draws from the stream seeded by
 * slowscan_stream_seed(seed, series, purpose, j / NULL_TREND_BLOCK), restarted at each block, so any
 * split of the replicates into whole blocks (across threads or ranks) gives the same numbers. */
#ifndef SLOWSCAN_NULL_TREND_H
#define SLOWSCAN_NULL_TREND_H

#include "slowscan/export.h"

#include "slowscan/indicators.h"
#include "slowscan/surrogates.h"

#include <gsl/gsl_rng.h>

#include <stddef.h>

enum { NULL_TREND_BLOCK = 64 };

typedef struct null_trend_workspace null_trend_workspace;

/* For series of n samples and up to nkinds indicators. NULL on failure. */
SLOWSCAN_API
null_trend_workspace *slowscan_null_trend_alloc(size_t n, size_t nkinds);
SLOWSCAN_API
void slowscan_null_trend_free(null_trend_workspace *ws);

typedef struct {
    const rolling_spec *rolling; /* with per-window indicators, its plan is shared read-only by
                                    every thread; each workspace has its own scratch */
    const indicator_kind *kinds;
    size_t nkinds;
    const double *time;  /* n */
    const double *trend; /* n: added back to each surrogate to form the level for cv; may be
                            NULL when cv is not requested */
    unsigned long seed;
    const char *series;  /* name, part of the stream seed */
    const char *purpose; /* the null's name, part of the stream seed */
    int drift;           /* also the t-value of the drifting-AR(1) coefficient (ar1_drift.h),
                            written after the indicators, at row nkinds of null; 2: with the
                            innovation variance drifting too (slowscan_ar1_drift_set_noise_trend) */
} null_trend_job;

/* Positions rng for replicate j of (seed, series, purpose): at the start of each block it is
 * reseeded, within a block it runs on. Calling it for j = first, first+1, ... (first a
 * multiple of NULL_TREND_BLOCK) before each draw reproduces the replicates of
 * slowscan_null_trend_draw — the `surrogates` command writes exactly the series screen tests with. */
SLOWSCAN_API
void slowscan_null_trend_stream(gsl_rng *rng, unsigned long seed, const char *series, const char *purpose,
                       size_t j);

/* Draws replicates [first, first + count) from `source` and writes, for indicator k and
 * replicate j, tau into null[k * stride + j] (NaN when a replicate's tau is undefined).
 * `first` must be a multiple of NULL_TREND_BLOCK. */
SLOWSCAN_API
int slowscan_null_trend_draw(null_trend_workspace *ws, surrogate_source *source, const null_trend_job *job,
                    size_t first, size_t count, double *null, size_t stride);

#endif
