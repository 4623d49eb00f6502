/* slowscan detrend: trend and residual of every series, `series,time,value,trend,residual`. */
#include "cli.h"

typedef struct {
    FILE *out;
} detrend_run;

static int open_outputs(const cli_options *opts, cli_outputs *outs, void *context)
{
    detrend_run *run = context;
    int rc = cli_outputs_open(outs, opts, opts->output, "-o", &run->out);
    if (rc == 0)
        cli_put_header(run->out, opts, "series,time,value,trend,residual\n");
    return rc;
}

static int write_series(const cli_options *opts, const prepared_series *ps, void *context)
{
    (void)opts;
    detrend_run *run = context;
    cli_screen_detrended(ps);
    for (size_t i = 0; i < ps->n; i++) {
        cli_put_series(run->out, opts, ps->source, ps->name);
        fputc(',', run->out);
        cli_put_time(run->out, &ps->axis, ps->time[i]);
        const double cells[] = {ps->value[i], ps->trend[i], ps->residual[i]};
        for (size_t c = 0; c < sizeof cells / sizeof cells[0]; c++) {
            fputc(',', run->out);
            cli_put_number(run->out, slowscan_screen_unscale(ps, cells[c], 1));
        }
        fputc('\n', run->out);
    }
    return EXIT_OK;
}

int cmd_detrend(const cli_options *opts)
{
    detrend_run run = {0};
    series_command cmd = {open_outputs, write_series, NULL, &run, NULL, NULL, NULL};
    return cli_run_series_command(opts, &cmd);
}
