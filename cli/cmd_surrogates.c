/* slowscan surrogates: null-model replicates of every series' residual,
 * `series,replicate,time,value` — the very series screen tests against (same streams). */
#include "cli.h"
#include "slowscan/status.h"

#include <fftw3.h>
#include <gsl/gsl_rng.h>
#include <math.h>
#include <stdlib.h>

typedef struct {
    FILE *out;
    gsl_rng *rng;
    double *buffer;
} surrogates_run;

static int open_outputs(const cli_options *opts, cli_outputs *outs, void *context)
{
    surrogates_run *run = context;
    int rc = cli_outputs_open(outs, opts, opts->output, "-o", &run->out);
    if (rc == EXIT_OK)
        fputs("series,replicate,time,value\n", run->out);
    return rc;
}

static int write_replicates(const cli_options *opts, const prepared_series *ps,
                            surrogates_run *run, surrogate_source *src)
{
    const char *purpose = cli_null_name(opts);
    for (long j = 0; j < opts->surrogates; j++) {
        slowscan_null_trend_stream(run->rng, opts->seed, ps->name, purpose, (size_t)j);
        int st = slowscan_surrogate_draw(src, run->rng, run->buffer);
        if (st != SLOWSCAN_OK)
            return st;
        for (size_t i = 0; i < ps->n; i++) {
            cli_put_field(run->out, ps->name);
            fprintf(run->out, ",%ld,", j + 1);
            cli_put_number(run->out, ps->time[i]);
            fputc(',', run->out);
            cli_put_number(run->out, run->buffer[i]);
            fputc('\n', run->out);
        }
    }
    return SLOWSCAN_OK;
}

static int draw_series(const cli_options *opts, const prepared_series *ps, void *context)
{
    surrogates_run *run = context;
    if (ps->constant || ps->finite < 8) {
        cli_warning("%s: column '%s' %s; no surrogates written for it", ps->source, ps->name,
                    ps->constant ? "has no variation" : "has fewer than 8 finite samples");
        return EXIT_OK;
    }
    int st = SLOWSCAN_ENOMEM;
    surrogate_plan *plan = slowscan_surrogate_plan_alloc(ps->n, FFTW_ESTIMATE);
    surrogate_source *src = plan ? slowscan_surrogate_source_alloc(plan, (surrogate_kind)opts->null_model,
                                                          ps->null_source, &opts->null_options, &st) : NULL;
    fftw_free(run->buffer);
    run->buffer = fftw_alloc_real(ps->n);
    if (src && run->buffer)
        st = write_replicates(opts, ps, run, src);
    else if (st == SLOWSCAN_OK)
        st = SLOWSCAN_ENOMEM;
    slowscan_surrogate_source_free(src);
    slowscan_surrogate_plan_free(plan);
    if (st != SLOWSCAN_OK) {
        cli_error("%s: column '%s': surrogates failed: %s", ps->source, ps->name, slowscan_strerror(st));
        return st == SLOWSCAN_ENOMEM ? EXIT_INTERNAL : EXIT_BAD_INPUT;
    }
    return EXIT_OK;
}

int cmd_surrogates(const cli_options *opts)
{
    surrogates_run run = {NULL, gsl_rng_alloc(gsl_rng_mt19937), NULL};
    if (!run.rng)
        return EXIT_INTERNAL;
    series_command cmd = {open_outputs, draw_series, NULL, &run, NULL, NULL, NULL};
    int rc = cli_run_series_command(opts, &cmd);
    gsl_rng_free(run.rng);
    fftw_free(run.buffer);
    return rc;
}
