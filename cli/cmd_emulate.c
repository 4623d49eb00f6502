/* slowscan emulate: the linear response of a step-forced run (its fitted modes, or with
 * --empirical its own values) to another forcing history, compared with the run actually
 * forced so. One CSV row per time of the forcing:
 * `time,forcing,emulated,actual,difference,band_lower,band_upper,outside`;
 * a verdict on stderr (departure time, size, sign), --json FILE the departure, --figures DIR
 * the two responses with the band and the departure. */
#include "modes_cli.h"
#include "modes_run.h"
#include "forced_inputs.h"
#include "slowscan/emulate.h"
#include "slowscan/status.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

typedef struct {
    FILE *out, *json;
    report_batch *figures;
    series_table tables[4]; /* step, forcing, compare, control */
    series_table baseline;  /* --baseline FILE */
    int has_baseline;
    size_t n;               /* forcing samples */
    double *time, *forcing, *response, *emulated, *actual; /* n each, in one block */
    double *difference, *lower, *upper; /* the band's columns (slowscan_emulate_band), n each */
    emulate_side *side;
    timescales_result fit;
    double sd, r1;
    emulate_departure dep;
    int compared;
} emulate_run;

enum { STEP, FORCING, COMPARE, CONTROL };

static int open_outputs(const cli_options *opts, cli_outputs *outs, void *context)
{
    emulate_run *run = context;
    int rc = cli_outputs_open(outs, opts, opts->output, "-o", &run->out);
    if (rc == EXIT_OK && opts->json_output)
        rc = cli_outputs_open(outs, opts, opts->json_output, "--json", &run->json);
    if (rc == EXIT_OK)
        rc = cli_figures_open(outs, opts, &run->figures);
    if (rc == EXIT_OK)
        rc = cli_forced_load_baseline(opts, outs, &run->baseline, &run->has_baseline);
    return rc;
}

/* The values of column k of t, refused at the first missing value. */
static int complete(const series_table *t, size_t k, const char *option)
{
    for (size_t i = 0; i < t->n; i++)
        if (isnan(t->values[k][i])) {
            cli_error("option %s: %s: row %zu, column '%s': missing value (emulate needs a "
                      "complete record)", option, cli_source_name(t->source),
                      t->rows ? t->rows[i] : i + 2, t->names[k]);
            return EXIT_BAD_INPUT;
        }
    return EXIT_OK;
}

/* The step run read, measured from its onset and fitted: its modes and residual noise. */
static int fit_step(const cli_options *opts, emulate_run *run, size_t k, modes_series *s,
                    double **owned)
{
    const series_table *t = &run->tables[STEP];
    int rc = cli_modes_series(opts, t, k, (size_t)-1, s, owned);
    if (rc != EXIT_OK)
        return rc;
    timescales_workspace *ws = slowscan_timescales_workspace_alloc(s->n);
    if (!ws) {
        cli_error("out of memory");
        return EXIT_INTERNAL;
    }
    timescales_config cfg = slowscan_timescales_config_default();
    cfg.max_modes = (size_t)opts->modes.max_modes;
    int st = slowscan_timescales_fit(ws, &cfg, s->t, s->y, s->n, &run->fit);
    slowscan_timescales_workspace_free(ws);
    if (st != SLOWSCAN_OK)
        return cli_modes_refuse(opts, s, st);
    if (slowscan_emulate_fit_noise(&run->fit, s->y, s->n, &run->sd, &run->r1) != SLOWSCAN_OK &&
        !opts->modes.control.text) {
        cli_error("%s: column '%s': the fitted modes leave no residual noise (sd %.3g) to set "
                  "the band; give a control run with --control FILE:COL", s->source, s->name, run->sd);
        return EXIT_BAD_INPUT;
    }
    return EXIT_OK;
}

/* The step response per unit forcing at lags 0, dt, 2 dt, ...: the modes', or the step run's
 * own values (--empirical; 0 at lag 0 when the run has no sample there). */
static int step_response(const cli_options *opts, emulate_run *run, const modes_series *s)
{
    double F = opts->modes.step_forcing;
    if (!opts->modes.empirical)
        return slowscan_emulate_modes_response(&run->fit, F, s->dt, 0.0, run->n, run->response)
                   == SLOWSCAN_OK ? EXIT_OK : EXIT_INTERNAL;
    size_t gap = 0;
    int st = slowscan_emulate_empirical_response(s->t, s->y, s->n, s->dt, F, run->n,
                                                 run->response, &gap);
    if (st == SLOWSCAN_EINVAL) {
        cli_error("option --empirical: the step run's samples are not whole steps after the "
                  "onset (%g); set --onset", s->onset);
        return EXIT_BAD_INPUT;
    }
    if (st != SLOWSCAN_OK) {
        cli_error("option --empirical: the step run has no sample %zu steps after its onset, "
                  "and the forcing record needs %zu (use the fitted modes: drop --empirical)",
                  gap, run->n);
        return EXIT_BAD_INPUT;
    }
    return EXIT_OK;
}

/* The compared run on the forcing's grid (NaN where it has no sample). */
static int align_compare(const cli_options *opts, emulate_run *run, size_t k)
{
    const series_table *c = &run->tables[COMPARE];
    double dt;
    size_t i;
    if (slowscan_emulate_align(run->time, run->n, c->time, c->values[k], c->n, run->actual, &dt,
                               &i) != SLOWSCAN_OK) {
        cli_error("option --compare %s: time %g (row %zu) is not on the forcing's grid "
                  "(from %g in steps of %g)", opts->modes.compare.text, c->time[i],
                  c->rows ? c->rows[i] : i + 2, run->time[0], dt);
        return EXIT_BAD_INPUT;
    }
    run->compared = 1;
    return EXIT_OK;
}

static void put_numbers(FILE *fp, const double *v, size_t count)
{
    for (size_t j = 0; j < count; j++) {
        fputc(',', fp);
        cli_put_number(fp, v[j]);
    }
}

static void write_rows(emulate_run *run)
{
    static const char *const sides[] = {"NA", "no", "above", "below"};
    FILE *fp = run->out;
    fputs("time,forcing,emulated,actual,difference,band_lower,band_upper,outside\n", fp);
    for (size_t i = 0; i < run->n; i++) {
        cli_put_time(fp, &run->tables[FORCING].axis, run->time[i]);
        const double v[] = {run->forcing[i], run->emulated[i], run->actual[i],
                            run->difference[i], run->lower[i], run->upper[i]};
        put_numbers(fp, v, sizeof v / sizeof v[0]);
        fprintf(fp, ",%s\n", sides[run->side[i]]);
    }
}

static void write_json(const cli_options *opts, emulate_run *run)
{
    FILE *fp = run->json;
    const emulate_departure *d = &run->dep;
    fprintf(fp, "{\n  \"program\": \"slowscan\",\n  \"command\": \"emulate\",\n"
            "  \"step_response\": \"%s\",\n  \"step_forcing\": ",
            opts->modes.empirical ? "step run values" : "fitted modes");
    cli_json_number(fp, opts->modes.step_forcing);
    fprintf(fp, ",\n  \"modes\": %zu,\n  \"noise_source\": \"%s\",\n  \"noise_sd\": ",
            run->fit.nmodes, opts->modes.control.text ? "control run (linear drift removed)"
                                                      : "step run residuals");
    cli_json_number(fp, run->sd);
    fputs(",\n  \"noise_lag1\": ", fp);
    cli_json_number(fp, run->r1);
    fprintf(fp, ",\n  \"band_level\": %.6g,\n  \"band_half_width\": ", opts->modes.band_level);
    cli_json_number(fp, d->half_width);
    fprintf(fp, ",\n  \"persist\": %zu,\n  \"compared\": %s,\n  \"departed\": %s", d->persist,
            run->compared ? "true" : "false", d->departed ? "true" : "false");
    if (d->departed) {
        const double v[] = {run->time[d->first], run->time[d->confirmed], run->time[d->last], d->size};
        const char *k[] = {"departure_time", "confirmed_time", "last_outside_time", "size"};
        for (int j = 0; j < 4; j++) {
            fprintf(fp, ",\n  \"%s\": ", k[j]);
            cli_json_number(fp, v[j]);
        }
        fprintf(fp, ",\n  \"sign\": %d", d->sign);
    }
    fprintf(fp, ",\n  \"samples_outside\": %zu\n}\n", d->outside);
}

static void verdict(const cli_options *opts, const emulate_run *run)
{
    const emulate_departure *d = &run->dep;
    if (!run->compared)
        cli_modes_say(opts, "emulated %zu samples from %zu mode%s (no --compare run: no departure "
                      "test); linear response is an assumption", run->n, run->fit.nmodes,
                      run->fit.nmodes == 1 ? "" : "s");
    else if (!d->departed)
        cli_modes_say(opts, "no departure: the run stays within the %g%% band (+-%.3g) or leaves "
                      "it for fewer than %zu consecutive samples (%zu outside in all); this does "
                      "not prove the response linear", 100 * opts->modes.band_level,
                      d->half_width, d->persist, d->outside);
    else
        cli_modes_say(opts, "departure at %g (confirmed at %g after %zu samples outside the %g%% "
                      "band): the run is %s the linear emulation by %.4g on average until %g",
                      run->time[d->first], run->time[d->confirmed], d->persist,
                      100 * opts->modes.band_level, d->sign > 0 ? "above" : "below", fabs(d->size),
                      run->time[d->last]);
}

/* Table j as the run uses it (its column k alone, then *k = 0): annual means with --annual,
 * and for the step and the compared runs anomalies against --baseline (not the forcing: it
 * is imposed, not a response; not the control run, whose drift is removed for the band). */
static int ready(const cli_options *opts, emulate_run *run, int j, size_t *k)
{
    int anomalies = run->has_baseline && (j == STEP || j == COMPARE);
    if (!anomalies && !opts->forced.annual)
        return EXIT_OK;
    series_table t;
    int rc = cli_modes_ready(opts, &run->tables[j], *k, (size_t)-1,
                             anomalies ? &run->baseline : NULL, &t);
    if (rc == EXIT_OK) {
        slowscan_series_table_free(&run->tables[j]);
        run->tables[j] = t;
        *k = 0;
    }
    return rc;
}

/* Reads the step run, the forcing, and the compared and control runs when given. */
static int read_inputs(const cli_options *opts, emulate_run *run, size_t *k)
{
    const cli_modes_options *m = &opts->modes;
    cli_series_ref from_input = {.text = opts->forced.response};
    const cli_series_ref *step = &m->step;
    if (!step->text) {
        snprintf(from_input.file, sizeof from_input.file, "%s", opts->files[0]);
        snprintf(from_input.column, sizeof from_input.column, "%s", opts->forced.response);
        step = &from_input;
    }
    const cli_series_ref *refs[] = {step, &m->forcing, &m->compare, &m->control};
    const char *names[] = {step == &m->step ? "--step" : "--response", "--forcing", "--compare",
                           "--control"};
    for (int j = STEP; j <= CONTROL; j++) {
        if (!refs[j]->text)
            continue;
        /* --from/--until choose the span compared; the forcing is emulated from its start
         * (a cut forcing would begin with a jump from 0), the step and control runs whole */
        int cut = j == COMPARE;
        int rc = cli_modes_read_ref(opts, refs[j], names[j], cut, &run->tables[j], &k[j]);
        if (rc == EXIT_OK && j != COMPARE)
            rc = complete(&run->tables[j], k[j], names[j]);
        if (rc == EXIT_OK)
            rc = ready(opts, run, j, &k[j]);
        if (rc != EXIT_OK)
            return rc;
    }
    const series_table *f = &run->tables[FORCING], *t = &run->tables[STEP];
    double fdt, sdt;
    if (slowscan_emulate_same_step(f->time, f->n, t->time, t->n, &fdt, &sdt) != SLOWSCAN_OK) {
        cli_error("option --forcing %s: time step %g differs from the step run's %g (resample "
                  "one of them)", m->forcing.text, fdt, sdt);
        return EXIT_BAD_INPUT;
    }
    return EXIT_OK;
}

/* The emulation of the forcing record and its comparison. */
static int emulate_forcing(const cli_options *opts, emulate_run *run, const size_t *k,
                           const modes_series *s)
{
    const series_table *f = &run->tables[FORCING];
    run->n = f->n;
    double *block = malloc(8 * run->n * sizeof *block);
    run->side = malloc(run->n * sizeof *run->side);
    if (!block || !run->side) {
        free(block);
        cli_error("out of memory");
        return EXIT_INTERNAL;
    }
    run->time = block;
    run->forcing = block + run->n;
    run->response = block + 2 * run->n;
    run->emulated = block + 3 * run->n;
    run->actual = block + 4 * run->n;
    run->difference = block + 5 * run->n;
    run->lower = block + 6 * run->n;
    run->upper = block + 7 * run->n;
    memcpy(run->time, f->time, run->n * sizeof *block);
    memcpy(run->forcing, f->values[k[FORCING]], run->n * sizeof *block);
    int rc = step_response(opts, run, s);
    emulate_config cfg = slowscan_emulate_config_default();
    cfg.band_level = opts->modes.band_level;
    cfg.persist = (size_t)opts->modes.persist;
    emulate_workspace *ws = rc == EXIT_OK ? slowscan_emulate_workspace_alloc(run->n, &cfg) : NULL;
    if (rc == EXIT_OK && (!ws || slowscan_emulate_convolve(ws, run->response, run->forcing, run->n,
                                                            run->emulated) != SLOWSCAN_OK)) {
        cli_error("out of memory");
        rc = EXIT_INTERNAL;
    }
    slowscan_emulate_workspace_free(ws);
    for (size_t i = 0; rc == EXIT_OK && i < run->n; i++)
        run->actual[i] = NAN;
    if (rc == EXIT_OK && opts->modes.compare.text)
        rc = align_compare(opts, run, k[COMPARE]);
    const series_table *c = &run->tables[CONTROL];
    if (rc == EXIT_OK && opts->modes.control.text &&
        slowscan_emulate_control_noise(c->values[k[CONTROL]], c->n, &run->sd, &run->r1) != SLOWSCAN_OK) {
        cli_error("option --control %s: no noise estimate (fewer than 4 samples, or constant "
                  "after its drift is removed)", opts->modes.control.text);
        rc = EXIT_BAD_INPUT;
    }
    if (rc == EXIT_OK && slowscan_emulate_departure(&cfg, run->actual, run->emulated, run->n,
                                                    run->sd, run->r1, &run->dep) != SLOWSCAN_OK) {
        cli_error("%s: column '%s': the noise band has no width (the step run's fit leaves no "
                  "residual; give --control FILE:COL)", s->source, s->name);
        rc = EXIT_BAD_INPUT;
    }
    if (rc == EXIT_OK)
        slowscan_emulate_band(run->actual, run->emulated, run->n, run->dep.half_width,
                              run->difference, run->lower, run->upper, run->side);
    return rc;
}

static int emulate(const cli_options *opts, const cli_inputs *in, void *context)
{
    (void)in;
    emulate_run *run = context;
    size_t k[4] = {0};
    modes_series s;
    double *owned = NULL;
    int rc = read_inputs(opts, run, k);
    if (rc == EXIT_OK)
        rc = fit_step(opts, run, k[STEP], &s, &owned);
    if (rc == EXIT_OK)
        rc = emulate_forcing(opts, run, k, &s);
    if (rc == EXIT_OK) {
        write_rows(run);
        if (run->json)
            write_json(opts, run);
        verdict(opts, run);
    }
    if (rc == EXIT_OK && run->figures)
        rc = cli_emulate_figure(run->figures, opts, &s, run->time, run->emulated, run->actual,
                                run->lower, run->upper, run->n, &run->dep);
    free(owned);
    return rc;
}

int cmd_emulate(const cli_options *opts)
{
    emulate_run run = {0};
    series_command cmd = {.open = open_outputs, .context = &run, .run = emulate};
    int rc = cli_run_series_command(opts, &cmd);
    for (int j = 0; j < 4; j++)
        slowscan_series_table_free(&run.tables[j]);
    if (run.has_baseline)
        slowscan_series_table_free(&run.baseline);
    free(run.time);
    free(run.side);
    return rc;
}
