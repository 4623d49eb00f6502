/* The null distribution of indicator trends: surrogate -> rolling indicators -> Kendall tau. */
#include "kendall_internal.h"
#include "mt_stream.h"
#include "slowscan/null_trend.h"
#include "slowscan/ar1_drift.h"
#include "slowscan/kendall.h"
#include "slowscan/significance.h"
#include "slowscan/status.h"

#include <fftw3.h>
#include <gsl/gsl_rng.h>
#include <math.h>
#include <stdlib.h>

struct null_trend_workspace {
    size_t n, nkinds;
    double *surrogate; /* n, FFTW-aligned so the c2r writes straight into it */
    double *level;     /* n */
    double *store;     /* nkinds * n */
    double **paths;    /* nkinds pointers into store */
    kendall_workspace *kendall;
    ar1_drift_workspace *drift;
    rolling_scratch *scratch; /* per-window indicators, windows up to n */
    gsl_rng *rng;
};

void slowscan_null_trend_free(null_trend_workspace *ws)
{
    if (!ws)
        return;
    fftw_free(ws->surrogate);
    free(ws->level);
    free(ws->store);
    free(ws->paths);
    slowscan_kendall_free(ws->kendall);
    slowscan_ar1_drift_free(ws->drift);
    slowscan_rolling_scratch_free(ws->scratch);
    if (ws->rng)
        gsl_rng_free(ws->rng);
    free(ws);
}

null_trend_workspace *slowscan_null_trend_alloc(size_t n, size_t nkinds)
{
    if (n < 2)
        return NULL;
    if (nkinds == 0) /* the drift test alone: keep one path so the buffers are never empty */
        nkinds = 1;
    null_trend_workspace *ws = calloc(1, sizeof *ws);
    if (!ws)
        return NULL;
    ws->n = n;
    ws->nkinds = nkinds;
    ws->surrogate = fftw_alloc_real(n);
    ws->level = malloc(n * sizeof *ws->level);
    ws->store = malloc(nkinds * n * sizeof *ws->store);
    ws->paths = malloc(nkinds * sizeof *ws->paths);
    ws->kendall = slowscan_kendall_alloc(n);
    ws->drift = slowscan_ar1_drift_alloc(n);
    ws->scratch = slowscan_rolling_scratch_alloc(n);
    ws->rng = gsl_rng_alloc(surrogate_mt19937); /* gsl_rng_mt19937's stream, faster */
    if (!ws->surrogate || !ws->level || !ws->store || !ws->paths || !ws->kendall || !ws->drift ||
        !ws->scratch || !ws->rng) {
        slowscan_null_trend_free(ws);
        return NULL;
    }
    for (size_t k = 0; k < nkinds; k++)
        ws->paths[k] = ws->store + k * n;
    return ws;
}

/* One replicate: draw, indicators, one tau per indicator. */
static int one_replicate(null_trend_workspace *ws, surrogate_source *source,
                         const null_trend_job *job, int time_like, double *tau)
{
    int st = slowscan_surrogate_draw(source, ws->rng, ws->surrogate);
    if (st != SLOWSCAN_OK)
        return st;
    const double *level = NULL;
    if (job->trend) {
        for (size_t i = 0; i < ws->n; i++)
            ws->level[i] = job->trend[i] + ws->surrogate[i];
        level = ws->level;
    }
    if (job->nkinds > 0 &&
        (st = slowscan_rolling_compute_with(job->rolling, ws->scratch, ws->surrogate, level, ws->n,
                                   job->kinds, job->nkinds, ws->paths)) != SLOWSCAN_OK)
        return st;
    if (job->drift) { /* the model-based statistic, on the same surrogate */
        ar1_drift_fit fit;
        slowscan_ar1_drift_set_noise_trend(ws->drift, job->drift == 2);
        tau[job->nkinds] = slowscan_ar1_drift_estimate(ws->drift, ws->surrogate, ws->n, &fit) == SLOWSCAN_OK
                               ? fit.t_a1 : NAN;
    }
    /* Against a time axis tested once per draw, and without the path's head: the rolling
     * values before the first full window are NaN, which tau-b leaves out anyway. */
    size_t head = time_like && job->rolling->window <= ws->n ? job->rolling->window - 1 : 0;
    for (size_t k = 0; k < job->nkinds; k++) {
        size_t used = 0;
        int st_k = time_like ? kendall_tau_b_time_like(ws->kendall, ws->paths[k] + head,
                                                       ws->n - head, &tau[k], &used)
                             : slowscan_kendall_tau_b(ws->kendall, job->time, ws->paths[k], ws->n,
                                                      &tau[k], &used);
        if (st_k != SLOWSCAN_OK)
            tau[k] = NAN;
    }
    return SLOWSCAN_OK;
}

void slowscan_null_trend_stream(gsl_rng *rng, unsigned long seed, const char *series, const char *purpose,
                       size_t j)
{
    if (j % NULL_TREND_BLOCK == 0)
        gsl_rng_set(rng, slowscan_stream_seed(seed, series, purpose, j / NULL_TREND_BLOCK));
}

int slowscan_null_trend_draw(null_trend_workspace *ws, surrogate_source *source, const null_trend_job *job,
                    size_t first, size_t count, double *null, size_t stride)
{
    if (first % NULL_TREND_BLOCK != 0 || job->nkinds > ws->nkinds || job->nkinds > INDICATOR_COUNT)
        return SLOWSCAN_EINVAL;
    double tau[INDICATOR_COUNT + 1];
    int time_like = job->nkinds > 0 && kendall_time_like(job->time, ws->n);
    for (size_t j = first; j < first + count; j++) {
        slowscan_null_trend_stream(ws->rng, job->seed, job->series, job->purpose, j);
        int st = one_replicate(ws, source, job, time_like, tau);
        if (st != SLOWSCAN_OK)
            return st;
        for (size_t k = 0; k < job->nkinds + (job->drift != 0); k++)
            null[k * stride + j] = tau[k];
    }
    return SLOWSCAN_OK;
}
