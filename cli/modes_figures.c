/* Figures of timescales and emulate (report/fig_timescales.c, report/fig_emulate.c). */
#include "modes_run.h"

int cli_timescales_figure(report_batch *figures, const modes_series *s, const timescales_result *r)
{
    (void)figures, (void)s, (void)r;
    return EXIT_OK;
}
