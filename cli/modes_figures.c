/* Figures of timescales and emulate (report/fig_timescales.c, report/fig_emulate.c). */
#include "modes_run.h"

int cli_timescales_figure(report_batch *figures, const modes_series *s, const timescales_result *r)
{
    (void)figures, (void)s, (void)r;
    return EXIT_OK;
}

int cli_emulate_figure(report_batch *figures, const cli_options *opts, const modes_series *s,
                       const double *time, const double *emulated, const double *actual,
                       size_t n, const emulate_departure *dep)
{
    (void)figures, (void)opts, (void)s, (void)time, (void)emulated, (void)actual, (void)n, (void)dep;
    return EXIT_OK;
}
