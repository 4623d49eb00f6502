/* slowscan surrogates: null-model replicates of every series' residual,
 * `series,replicate,time,value` — the very series screen tests against (the library's
 * slowscan_screen_replicate, on the same streams). */
#include "cli.h"
#include "slowscan/status.h"

#include <stdlib.h>

typedef struct {
    FILE *out;
    double *buffer;
    size_t buffer_cap;
} surrogates_run;

static int open_outputs(const cli_options *opts, cli_outputs *outs, void *context)
{
    surrogates_run *run = context;
    int rc = cli_outputs_open(outs, opts, opts->output, "-o", &run->out);
    if (rc == EXIT_OK)
        cli_put_header(run->out, opts, "series,replicate,time,value\n");
    return rc;
}

static int write_replicates(const cli_options *opts, const prepared_series *ps,
                            surrogates_run *run, screen_replicates *reps)
{
    for (long j = 0; j < opts->surrogates; j++) {
        int st = slowscan_screen_replicate(reps, (size_t)j, run->buffer);
        if (st != SLOWSCAN_OK)
            return st;
        for (size_t i = 0; i < ps->n; i++) {
            cli_put_series(run->out, opts, ps->source, ps->name);
            fprintf(run->out, ",%ld,", j + 1);
            cli_put_time(run->out, &ps->axis, ps->time[i]);
            fputc(',', run->out);
            cli_put_number(run->out, slowscan_screen_unscale(ps, run->buffer[i], 1));
            fputc('\n', run->out);
        }
    }
    return SLOWSCAN_OK;
}

static int draw_series(const cli_options *opts, const prepared_series *ps, void *context)
{
    surrogates_run *run = context;
    screen_config cfg;
    cli_screen_config(opts, &cfg);
    screen_replicates *reps = NULL;
    screen_detail d;
    int st = slowscan_screen_replicates_alloc(&cfg, ps, &reps, &d);
    if (d.rule == SCREEN_RULE_NULL_TOO_LITTLE) {
        cli_screen_notice(opts, ps, &d);
        return EXIT_OK;
    }
    if (st == SLOWSCAN_OK && run->buffer_cap < ps->n) {
        free(run->buffer);
        run->buffer = malloc(ps->n * sizeof *run->buffer);
        run->buffer_cap = run->buffer ? ps->n : 0;
        st = run->buffer ? SLOWSCAN_OK : SLOWSCAN_ENOMEM;
    }
    if (st == SLOWSCAN_OK)
        st = write_replicates(opts, ps, run, reps);
    slowscan_screen_replicates_free(reps);
    if (st != SLOWSCAN_OK) {
        cli_error("%s: column '%s': surrogates failed: %s", ps->source, ps->name, slowscan_strerror(st));
        return st == SLOWSCAN_ENOMEM ? EXIT_INTERNAL : EXIT_BAD_INPUT;
    }
    return EXIT_OK;
}

int cmd_surrogates(const cli_options *opts)
{
    surrogates_run run = {NULL, NULL, 0};
    series_command cmd = {open_outputs, draw_series, NULL, &run, NULL, NULL, NULL};
    int rc = cli_run_series_command(opts, &cmd);
    free(run.buffer);
    return rc;
}
