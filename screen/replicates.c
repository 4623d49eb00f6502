/* Single surrogate replicates of a prepared series, on the streams of its screening null. */
#include "slowscan/null_trend.h"
#include "slowscan/screen.h"
#include "slowscan/status.h"

#include <fftw3.h>
#include <gsl/gsl_rng.h>
#include <stdlib.h>
#include <string.h>

/* Fewer finite samples than this make no surrogate worth testing against. */
enum { MIN_NULL_SAMPLES = 8 };

struct screen_replicates {
    surrogate_plan *plan;
    surrogate_source *source;
    gsl_rng *rng;
    double *buffer; /* n, aligned as the plan's arrays are */
    size_t n, next; /* next: the replicate the stream stands at */
    unsigned long seed;
    const char *series, *purpose; /* borrowed from the prepared series and the configuration */
};

void slowscan_screen_replicates_free(screen_replicates *r)
{
    if (!r)
        return;
    slowscan_surrogate_source_free(r->source);
    slowscan_surrogate_plan_free(r->plan);
    if (r->rng)
        gsl_rng_free(r->rng);
    fftw_free(r->buffer);
    free(r);
}

/* The minimum-samples rule, on the series itself (a control run's residual is checked when
 * it is attached). */
static int too_little(const screen_prepared *ps, screen_detail *d)
{
    int flat = ps->constant != SCREEN_VARIES;
    if (!flat && ps->finite >= MIN_NULL_SAMPLES)
        return SLOWSCAN_OK;
    int st = flat ? SLOWSCAN_ECONST : SLOWSCAN_ESHORT;
    *d = (screen_detail){.rule = SCREEN_RULE_NULL_TOO_LITTLE, .option = SCREEN_OPTION_NULL,
                         .status = st, .count = ps->finite, .need = MIN_NULL_SAMPLES};
    return st;
}

int slowscan_screen_replicates_alloc(const screen_config *cfg, const screen_prepared *ps,
                                     screen_replicates **out, screen_detail *d)
{
    memset(d, 0, sizeof *d);
    *out = NULL;
    int st = too_little(ps, d);
    if (st != SLOWSCAN_OK)
        return st;
    screen_replicates *r = calloc(1, sizeof *r);
    st = SLOWSCAN_ENOMEM;
    if (r && (r->plan = slowscan_surrogate_plan_alloc(ps->n, FFTW_ESTIMATE)))
        r->source = slowscan_surrogate_source_alloc(r->plan, cfg->null_kind, ps->null_source,
                                                    &cfg->null_options, &st);
    if (r) {
        r->rng = gsl_rng_alloc(gsl_rng_mt19937);
        r->buffer = fftw_alloc_real(ps->n);
    }
    if (r && r->source && (!r->rng || !r->buffer))
        st = SLOWSCAN_ENOMEM;
    if (st != SLOWSCAN_OK) {
        slowscan_screen_replicates_free(r);
        *d = (screen_detail){.rule = st == SLOWSCAN_ENOMEM ? SCREEN_RULE_NO_MEMORY
                                                           : SCREEN_RULE_NULL_FAILED,
                             .option = SCREEN_OPTION_NULL, .status = st};
        return st;
    }
    r->n = ps->n;
    r->next = 0;
    r->seed = cfg->seed;
    r->series = ps->name;
    r->purpose = cfg->null_name ? cfg->null_name : slowscan_surrogate_name(cfg->null_kind);
    *out = r;
    return SLOWSCAN_OK;
}

int slowscan_screen_replicate(screen_replicates *r, size_t j, double *out)
{
    /* The stream restarts at each block: replay from there unless it already stands in j's
     * block at or before j. */
    if (r->next > j || r->next / NULL_TREND_BLOCK != j / NULL_TREND_BLOCK)
        r->next = j - j % NULL_TREND_BLOCK;
    for (; r->next <= j; r->next++) {
        slowscan_null_trend_stream(r->rng, r->seed, r->series, r->purpose, r->next);
        int st = slowscan_surrogate_draw(r->source, r->rng, r->buffer);
        if (st != SLOWSCAN_OK) {
            r->next = (size_t)-1; /* the stream's place is unknown: replay next time */
            return st;
        }
    }
    memcpy(out, r->buffer, r->n * sizeof *out);
    return SLOWSCAN_OK;
}
