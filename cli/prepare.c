/* From input files to prepared series: read, cut to --from/--until, check or make a regular
 * grid, take logs, then per series deseason and detrend. Every failure prints one message
 * naming the file, row, column or option, and returns an exit code. */
#include "cli.h"
#include "slowscan/status.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

/* How a source is named in messages: io/ records standard input as "-". */
static const char *shown(const char *source)
{
    return strcmp(source, "-") == 0 ? "standard input" : source;
}

static int io_fail(int status, const io_error *err)
{
    cli_error("%s", err->message);
    return status == SLOWSCAN_ENOMEM ? EXIT_INTERNAL : EXIT_BAD_INPUT;
}

/* Rows of a table below which nothing can be said (fewer than 8 samples). */
enum { MIN_ROWS = 8 };

static int ready_table(const cli_options *opts, series_table *t)
{
    io_error err = {{0}};
    int st;
    if (!isnan(opts->from) || !isnan(opts->until))
        if ((st = table_select_span(t, opts->from, opts->until, &err)) != SLOWSCAN_OK)
            return io_fail(st, &err);
    double dt;
    if (!isnan(opts->resample))
        st = table_resample(t, opts->resample, &err);
    else
        st = table_check_grid(t, &dt, &err);
    if (st != SLOWSCAN_OK)
        return io_fail(st, &err);
    if (opts->log_values && (st = table_log(t, &err)) != SLOWSCAN_OK)
        return io_fail(st, &err);
    if (t->n < MIN_ROWS) {
        cli_error("%s: %zu samples in the analysed span; at least %d are needed", shown(t->source), t->n,
                  MIN_ROWS);
        return EXIT_BAD_INPUT;
    }
    return EXIT_OK;
}

/* The control run is read with the same columns, grid and logarithm as the inputs, but never
 * cut by --from/--until: those select the forced run's span, not the control's. */
static int load_control(const cli_options *opts, cli_inputs *in)
{
    for (size_t f = 0; f < opts->nfiles; f++)
        if (io_same_file(opts->control_file, opts->files[f])) {
            cli_error("option --control: %s is also an input; a control run must be another file",
                      opts->control_file);
            return EXIT_BAD_INPUT;
        }
    csv_read_options ro = {opts->time_column, opts->vars};
    io_error err = {{0}};
    int st = csv_read_table(opts->control_file, &ro, &in->control, &err);
    if (st != SLOWSCAN_OK) {
        cli_error("option --control: %s", err.message);
        return st == SLOWSCAN_ENOMEM ? EXIT_INTERNAL : EXIT_BAD_INPUT;
    }
    in->has_control = 1;
    cli_options whole = *opts;
    whole.from = whole.until = NAN;
    return ready_table(&whole, &in->control);
}

int cli_inputs_load(const cli_options *opts, cli_inputs *in)
{
    memset(in, 0, sizeof *in);
    in->tables = calloc(opts->nfiles, sizeof *in->tables);
    if (!in->tables)
        return EXIT_INTERNAL;
    csv_read_options ro = {opts->time_column, opts->vars};
    for (size_t f = 0; f < opts->nfiles; f++) {
        for (size_t g = 0; g < f; g++)
            if (strcmp(opts->files[f], opts->files[g]) == 0 || io_same_file(opts->files[f], opts->files[g])) {
                cli_error("%s: the same input is given twice", opts->files[f]);
                return EXIT_BAD_INPUT;
            }
        io_error err = {{0}};
        int st = csv_read_table(opts->files[f], &ro, &in->tables[f], &err);
        in->ntables = f + 1;
        if (st != SLOWSCAN_OK)
            return io_fail(st, &err);
        int rc = ready_table(opts, &in->tables[f]);
        if (rc != EXIT_OK)
            return rc;
    }
    return opts->control_file ? load_control(opts, in) : EXIT_OK;
}

void cli_inputs_free(cli_inputs *in)
{
    if (in->has_control)
        series_table_free(&in->control);
    for (size_t f = 0; f < in->ntables; f++)
        series_table_free(&in->tables[f]);
    free(in->tables);
    memset(in, 0, sizeof *in);
}

size_t cli_inputs_series_count(const cli_inputs *in)
{
    size_t total = 0;
    for (size_t f = 0; f < in->ntables; f++)
        total += in->tables[f].nseries;
    return total;
}

/* A length option in time units: percent of the span, or as given; must fit in the span. */
static int resolve_length(const cli_length *len, const char *option, const series_table *t,
                          double span, double *out)
{
    double v = len->percent ? len->amount / 100.0 * span : len->amount;
    if (!(v <= span * (1 + 1e-9))) {
        cli_error("%s: option %s %s is longer than the span %.12g of the analysed series",
                  shown(t->source), option, len->text, span);
        return EXIT_BAD_INPUT;
    }
    *out = v;
    return EXIT_OK;
}

/* Samples in a window, DESIGN §3: round(window/dt)+1 or round(p/100 (n-1))+1. */
static int resolve_window(const cli_options *o, const series_table *t, double dt, double span,
                          size_t *window)
{
    double length;
    int rc = resolve_length(&o->window, "--window", t, span, &length);
    if (rc != EXIT_OK)
        return rc;
    double w = o->window.percent ? floor(o->window.amount / 100.0 * (double)(t->n - 1) + 0.5)
                                 : floor(length / dt + 0.5);
    *window = (size_t)w + 1;
    if (*window < 3) {
        cli_error("%s: option --window %s gives %zu samples per window; at least 3 are needed",
                  shown(t->source), o->window.text, *window);
        return EXIT_BAD_INPUT;
    }
    return EXIT_OK;
}

int cli_series_window(const cli_options *o, const series_table *t, size_t *window)
{
    double span = t->time[t->n - 1] - t->time[0];
    return resolve_window(o, t, span / (double)(t->n - 1), span, window);
}

static int detrend_fail(int st, const cli_options *o, const prepared_series *ps)
{
    if (st == SLOWSCAN_ENOMEM) {
        cli_error("out of memory");
        return EXIT_INTERNAL;
    }
    /* robustness detrends with each method of its --detrends list in turn */
    const char *option = o->ndetrends > 0 ? "--detrends" : "--detrend";
    if (st == SLOWSCAN_EINVAL && o->detrend.method == DETREND_POLY)
        cli_error("%s: column '%s': option %s %s: the degree is too high for %zu finite "
                  "samples", ps->source, ps->name, option, o->detrend_text, ps->finite);
    else
        cli_error("%s: column '%s': detrending (%s %s) failed: %s", ps->source, ps->name,
                  option, o->detrend_text, slowscan_strerror(st));
    return EXIT_BAD_INPUT;
}

/* The option at fault in a deseasoning spec, with what its value must satisfy. */
static int deseason_refuse(deseason_problem problem, const cli_options *o,
                           const prepared_series *ps, double steps)
{
    const char *where = ps->source, *col = ps->name;
    if (problem == DESEASON_BAD_HARMONICS)
        cli_error("%s: column '%s': option --harmonics %ld%s: twice the number of harmonics must "
                  "be below the period in time steps (%.12g; the Nyquist limit)", where, col,
                  o->harmonics ? o->harmonics : (long)DETREND_DESEASON_HARMONICS,
                  o->harmonics ? "" : " (the default, as the period is not a whole number of "
                                      "steps)", steps);
    else if (problem == DESEASON_BAD_WINDOW)
        cli_error("%s: column '%s': option --deseason-window %s must hold at least two periods "
                  "(2 x %.12g) and at most the record (%.12g)", where, col,
                  o->deseason_window.text, o->deseason, ps->span);
    else
        cli_error("%s: column '%s': option --deseason %.12g must be at least 2 time steps (%.12g) "
                  "and at most half the record", where, col, o->deseason, ps->dt);
    return EXIT_BAD_INPUT;
}

/* Removes the cycle of --deseason (with --deseason-window, --harmonics) from ps->value. */
static int deseason_series(const cli_options *o, const series_table *t, prepared_series *ps)
{
    deseason_spec spec = detrend_deseason_default();
    spec.period = o->deseason;
    spec.harmonics = (int)o->harmonics;
    int rc = EXIT_OK;
    if (o->deseason_window.text)
        rc = resolve_length(&o->deseason_window, "--deseason-window", t, ps->span, &spec.window);
    if (rc != EXIT_OK)
        return rc;
    deseason_problem problem;
    if (detrend_deseason_check(&spec, ps->dt, ps->n, &problem, &ps->harmonics) != SLOWSCAN_OK)
        return deseason_refuse(problem, o, ps, o->deseason / ps->dt);
    int st = detrend_deseason_apply(&spec, ps->dt, ps->value, ps->n);
    if (st == SLOWSCAN_ESHORT)
        cli_error("%s: column '%s': option --deseason %.12g: %s", ps->source, ps->name,
                  o->deseason, ps->harmonics ? "a window has too few finite samples to fit the "
                  "harmonics" : "a phase of the cycle has no finite sample in some window");
    else if (st != SLOWSCAN_OK)
        cli_error("%s: column '%s': deseasoning failed: %s", ps->source, ps->name,
                  slowscan_strerror(st));
    return st == SLOWSCAN_OK ? EXIT_OK : st == SLOWSCAN_ENOMEM ? EXIT_INTERNAL : EXIT_BAD_INPUT;
}

static void count_finite(prepared_series *ps)
{
    double lo = INFINITY, hi = -INFINITY;
    ps->finite = 0;
    for (size_t i = 0; i < ps->n; i++)
        if (isfinite(ps->value[i])) {
            ps->finite++;
            lo = fmin(lo, ps->value[i]);
            hi = fmax(hi, ps->value[i]);
        }
    ps->constant = ps->finite > 0 && lo == hi;
}

/* A residual at round-off level (a straight line under --detrend linear, say) carries no
 * information: its lag-1 autocorrelation would be computed from rounding noise. Treat it as
 * constant rather than report numbers made of round-off. */
static void flag_flat_residual(prepared_series *ps)
{
    double res = 0, scale = 0;
    for (size_t i = 0; i < ps->n; i++)
        if (isfinite(ps->residual[i])) {
            res = fmax(res, fabs(ps->residual[i]));
            scale = fmax(scale, fabs(ps->value[i]));
        }
    if (res <= 1e-11 * scale)
        ps->constant = 2;
}

/* The trend-leakage diagnostic over edge spans of one bandwidth (--bandwidth, even for a
 * method that has none, so every method is judged on the same spans), at level 0.01. */
enum { LEAKAGE_MIN_EDGE = 8 };
#define LEAKAGE_LEVEL 0.01

static void test_leakage(const cli_options *o, prepared_series *ps)
{
    double length = o->bandwidth.percent ? o->bandwidth.amount / 100.0 * ps->span
                                         : o->bandwidth.amount;
    double edge = floor(length / ps->dt + 0.5);
    if (!(edge >= LEAKAGE_MIN_EDGE) || edge > (double)(ps->n / 2))
        return; /* too short to say anything, or the edges would overlap */
    ps->leakage_tested = detrend_leakage_test(ps->residual, ps->n, (size_t)edge, LEAKAGE_LEVEL,
                                              &ps->leakage) == SLOWSCAN_OK;
}

int cli_prepare_series(const cli_options *o, const series_table *t, size_t k, prepared_series *ps)
{
    memset(ps, 0, sizeof *ps);
    ps->name = t->names[k];
    ps->source = shown(t->source);
    ps->time_name = t->time_name;
    ps->n = t->n;
    ps->time = t->time;
    ps->span = t->time[t->n - 1] - t->time[0];
    ps->dt = ps->span / (double)(t->n - 1);
    int rc = resolve_window(o, t, ps->dt, ps->span, &ps->window);
    detrend_spec spec = o->detrend;
    ps->bandwidth = NAN;
    if (rc == EXIT_OK && detrend_uses_bandwidth(spec.method)) {
        rc = resolve_length(&o->bandwidth, "--bandwidth", t, ps->span, &spec.bandwidth);
        ps->bandwidth = spec.bandwidth;
    }
    if (rc != EXIT_OK)
        return rc;
    ps->value = malloc(3 * t->n * sizeof(double));
    if (!ps->value)
        return EXIT_INTERNAL;
    ps->trend = ps->value + t->n;
    ps->residual = ps->trend + t->n;
    ps->null_source = ps->residual;
    memcpy(ps->value, t->values[k], t->n * sizeof(double));
    count_finite(ps);
    int st;
    if (!isnan(o->deseason) && (rc = deseason_series(o, t, ps)) != EXIT_OK)
        return rc;
    if (ps->finite < 2 || ps->constant) {
        /* Nothing to detrend: the caller reports the series as insufficient. */
        for (size_t i = 0; i < t->n; i++)
            ps->trend[i] = ps->residual[i] = NAN;
        return EXIT_OK;
    }
    if ((st = detrend_apply(&spec, ps->dt, ps->value, t->n, ps->trend, ps->residual)) != SLOWSCAN_OK)
        return detrend_fail(st, o, ps);
    flag_flat_residual(ps);
    if (!ps->constant)
        test_leakage(o, ps);
    return EXIT_OK;
}

void cli_prepared_free(prepared_series *ps)
{
    free(ps->value);
    free(ps->owned);
    memset(ps, 0, sizeof *ps);
}

void cli_indicator_values_free(const cli_options *o, double **values)
{
    for (size_t j = 0; j < o->nindicators; j++) {
        free(values[j]);
        values[j] = NULL;
    }
}

static void fill_nan(double *v, size_t n)
{
    for (size_t i = 0; i < n; i++)
        v[i] = NAN;
}

rolling_spec cli_rolling_spec(const cli_options *o, const prepared_series *ps)
{
    return (rolling_spec){ps->window, o->min_coverage, ps->dt, o->recovery, (size_t)o->step,
                          o->band_lo, o->band_hi, NULL};
}

/* The window and the band against the per-window indicators requested; one message each. */
static int check_per_window(const cli_options *o, const prepared_series *ps)
{
    for (size_t j = 0; j < o->nindicators; j++) {
        indicator_kind kind = o->indicators[j];
        size_t need = indicator_min_window(kind);
        if (indicator_per_window(kind) && ps->window < need) {
            cli_error("%s: option --window %s gives %zu samples per window; %s needs at least %zu",
                      ps->source, o->window.text, ps->window, indicator_name(kind), need);
            return EXIT_BAD_INPUT;
        }
        if (kind != INDICATOR_SPECTRAL_EXPONENT || !o->band_text)
            continue;
        double nyquist = 0.5 / ps->dt;
        if (o->band_hi > nyquist * (1 + 1e-9)) {
            cli_error("%s: option --band %s is outside (0, %.12g]: the Nyquist frequency of time "
                      "step %.12g is %.12g cycles per time unit", ps->source, o->band_text, nyquist,
                      ps->dt, nyquist);
            return EXIT_BAD_INPUT;
        }
        size_t inside = rolling_band_count(ps->window, ps->dt, o->band_lo, o->band_hi);
        if (inside < SPECTRAL_MIN_FREQUENCIES) {
            cli_error("%s: option --band %s holds %zu of the window's frequencies k/(W dt) "
                      "(W = %zu); spectral_exponent needs at least %d", ps->source, o->band_text,
                      inside, ps->window, SPECTRAL_MIN_FREQUENCIES);
            return EXIT_BAD_INPUT;
        }
    }
    return EXIT_OK;
}

int cli_rolling_plan(const cli_options *o, const prepared_series *ps, rolling_spec *spec,
                     rolling_plan **plan)
{
    *plan = NULL;
    int per_window = 0;
    for (size_t j = 0; j < o->nindicators; j++)
        per_window |= indicator_per_window(o->indicators[j]);
    if (!per_window)
        return EXIT_OK;
    int rc = check_per_window(o, ps);
    if (rc != EXIT_OK)
        return rc;
    int st = rolling_plan_alloc(spec, plan);
    if (st != SLOWSCAN_OK) {
        cli_error("%s: column '%s': spectral plan failed: %s", ps->source, ps->name,
                  slowscan_strerror(st));
        return st == SLOWSCAN_ENOMEM ? EXIT_INTERNAL : EXIT_BAD_INPUT;
    }
    spec->plan = *plan;
    return EXIT_OK;
}

int cli_indicator_values(const cli_options *o, const prepared_series *ps, double **values)
{
    for (size_t j = 0; j < o->nindicators; j++)
        values[j] = malloc(ps->n * sizeof(double));
    for (size_t j = 0; j < o->nindicators; j++)
        if (!values[j]) {
            cli_error("out of memory");
            return EXIT_INTERNAL;
        }
    if (ps->window > ps->n) {
        cli_error("%s: option --window %s: the window (%zu samples) is longer than the series "
                  "(%zu samples)", ps->source, o->window.text, ps->window, ps->n);
        return EXIT_BAD_INPUT;
    }
    rolling_spec spec = cli_rolling_spec(o, ps);
    rolling_plan *plan = NULL;
    int rc = cli_rolling_plan(o, ps, &spec, &plan);
    if (rc != EXIT_OK)
        return rc;
    if (ps->constant || ps->finite < 2) {
        cli_warning("%s: column '%s' %s; its indicators are NA", ps->source, ps->name,
                    ps->constant == 1   ? "is constant"
                    : ps->constant == 2 ? "has no variation left after detrending"
                                        : "has fewer than 2 finite samples");
        for (size_t j = 0; j < o->nindicators; j++)
            fill_nan(values[j], ps->n);
        rolling_plan_free(plan);
        return EXIT_OK;
    }
    int st = rolling_compute(&spec, ps->residual, ps->value, ps->n, o->indicators, o->nindicators,
                             values);
    rolling_plan_free(plan);
    if (st != SLOWSCAN_OK) {
        cli_error("%s: column '%s': rolling indicators failed: %s", ps->source, ps->name,
                  slowscan_strerror(st));
        return st == SLOWSCAN_ENOMEM ? EXIT_INTERNAL : EXIT_BAD_INPUT;
    }
    return EXIT_OK;
}

int cli_attach_control(const cli_options *o, const cli_inputs *in, prepared_series *ps)
{
    if (!in->has_control)
        return EXIT_OK;
    const series_table *c = &in->control;
    const char *cname = shown(c->source);
    size_t k = 0;
    while (k < c->nseries && strcmp(c->names[k], ps->name) != 0)
        k++;
    if (k == c->nseries) {
        cli_error("option --control: %s has no series '%s'", cname, ps->name);
        return EXIT_BAD_INPUT;
    }
    if (c->n < ps->n) {
        cli_error("option --control: series '%s' of %s has %zu samples, fewer than the %zu "
                  "analysed", ps->name, cname, c->n, ps->n);
        return EXIT_BAD_INPUT;
    }
    double cdt = (c->time[c->n - 1] - c->time[0]) / (double)(c->n - 1);
    if (fabs(cdt - ps->dt) > 1e-6 * ps->dt) {
        cli_error("option --control: %s has time step %.12g, the analysed series %.12g "
                  "(use --resample)", cname, cdt, ps->dt);
        return EXIT_BAD_INPUT;
    }
    /* The first n samples of the control, detrended exactly as the series was. */
    series_table cut = *c;
    cut.n = ps->n;
    cli_options same = *o;
    same.bandwidth = (cli_length){isnan(ps->bandwidth) ? 1.0 : ps->bandwidth, 0, o->bandwidth.text};
    same.window = (cli_length){(double)(ps->window - 1) * ps->dt, 0, o->window.text};
    prepared_series cps;
    int rc = cli_prepare_series(&same, &cut, k, &cps);
    if (rc == EXIT_OK && (cps.constant || cps.finite < 8)) {
        cli_error("option --control: series '%s' of %s has no usable variation", ps->name, cname);
        rc = EXIT_BAD_INPUT;
    }
    if (rc == EXIT_OK) {
        ps->owned = cps.value; /* residual lives in the same block */
        ps->null_source = cps.residual;
        cps.value = NULL;
    }
    cli_prepared_free(&cps);
    return rc;
}
