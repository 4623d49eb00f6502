/* slowscan indicators: rolling indicators of every series, `series,time,indicator,value`. */
#include "cli.h"

#include <stdlib.h>

typedef struct {
    FILE *out;
} indicators_run;

static int open_outputs(const cli_options *opts, cli_outputs *outs, void *context)
{
    indicators_run *run = context;
    int rc = cli_outputs_open(outs, opts, opts->output, "-o", &run->out);
    if (rc == EXIT_OK)
        cli_put_header(run->out, opts, cli_rolling_header);
    return rc;
}

static int write_series(const cli_options *opts, const prepared_series *ps, void *context)
{
    indicators_run *run = context;
    double *values[INDICATOR_COUNT];
    int rc = cli_indicator_values(opts, ps, values);
    if (rc == EXIT_OK)
        cli_write_rolling(run->out, opts, ps, values);
    cli_indicator_values_free(opts, values);
    return rc;
}

int cmd_indicators(const cli_options *opts)
{
    indicators_run run = {0};
    series_command cmd = {open_outputs, write_series, NULL, &run, NULL, NULL, NULL};
    return cli_run_series_command(opts, &cmd);
}
