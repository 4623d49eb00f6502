/* Figures of timescales and emulate (report/fig_timescales.c, report/fig_emulate.c), drawn
 * from the main thread once a series is done. */
#include "modes_run.h"

#include <stdlib.h>

/* The x values of a figure: decimal years on a dated axis, else the times (cli_figure_times
 * takes a prepared series: only its axis, times and length are read). */
static const double *figure_x(const modes_series *s, const double *time, size_t n,
                              double **owned, char *label, size_t size)
{
    prepared_series ps = {.n = n, .time = time, .axis = *s->axis, .time_name = s->time_name};
    return cli_figure_times(&ps, owned, label, size);
}

int cli_timescales_figure(report_batch *figures, const modes_series *s, const timescales_result *r)
{
    size_t n = s->n;
    double *block = malloc((2 + r->nmodes) * n * sizeof *block), *owned = NULL;
    char label[300], flags[64];
    const double *x = block ? figure_x(s, s->time, n, &owned, label, sizeof label) : NULL;
    if (!x) {
        free(block);
        cli_error("out of memory");
        return EXIT_INTERNAL;
    }
    double *fit = block, *resid = block + n;
    const double *modes[TIMESCALES_MAX_MODES];
    double taus[TIMESCALES_MAX_MODES];
    slowscan_timescales_evaluate(r, s->t, n, fit, NULL);
    for (size_t i = 0; i < n; i++)
        resid[i] = s->y[i] - fit[i];
    for (size_t k = 0; k < r->nmodes; k++) {
        timescales_result one = *r;
        one.nmodes = 1;
        one.modes[0] = r->modes[k];
        slowscan_timescales_evaluate(&one, s->t, n, block + (2 + k) * n, NULL);
        modes[k] = block + (2 + k) * n;
        taus[k] = r->modes[k].tau;
    }
    cli_modes_flag_names(r->flags, flags, sizeof flags);
    report_timescales_data data = {.name = s->name, .time_name = label, .n = n, .time = x,
                                   .data = s->y, .fit = fit, .residual = resid,
                                   .nmodes = r->nmodes, .modes = modes, .taus = taus,
                                   .equilibrium = r->equilibrium, .flags = flags};
    int rc = cli_figure_draw(figures, &slowscan_report_timescales_figure, &data, "timescales", s->name);
    free(owned);
    free(block);
    return rc;
}

int cli_emulate_figure(report_batch *figures, const cli_options *opts, const modes_series *s,
                       const double *time, const double *emulated, const double *actual,
                       const double *lower, const double *upper, size_t n,
                       const emulate_departure *dep)
{
    double *owned = NULL;
    char label[300];
    const double *x = figure_x(s, time, n, &owned, label, sizeof label);
    if (!x) {
        cli_error("out of memory");
        return EXIT_INTERNAL;
    }
    report_emulate_data data = {.name = s->name, .time_name = label, .n = n, .time = x,
                                .emulated = emulated, .lower = lower, .upper = upper,
                                .actual = opts->modes.compare.text ? actual : NULL,
                                .departed = dep->departed,
                                .departure_time = dep->departed ? x[dep->first] : 0,
                                .confirmed_time = dep->departed ? x[dep->confirmed] : 0,
                                .size = dep->size, .band_level = opts->modes.band_level};
    int rc = cli_figure_draw(figures, &slowscan_report_emulate_figure, &data, "emulate", s->name);
    free(owned);
    return rc;
}
