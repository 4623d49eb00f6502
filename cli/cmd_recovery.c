/* slowscan recovery: the recovery-rate path of an AR(1) whose coefficient drifts linearly,
 * x_{t+1} = (a0 + a1 s_t) x_t + c + e_t, fitted to each residual:
 * `series,time,lambda,lambda_lo,lambda_hi` (a pointwise 95% band). With --json FILE, per
 * series a0, a1, their standard errors, the t-value of a1 and, with --surrogates M, its
 * surrogate p-value (one-sided: a1 > 0, memory growing). */
#include "cli.h"
#include "slowscan/recovery.h"
#include "slowscan/status.h"

#include <math.h>
#include <stdlib.h>

typedef struct {
    const cli_options *opts;
    FILE *out, *json, *projection;
    size_t written;
    recovery_workspace *ws; /* made on first use, for --threads threads */
    double *path;           /* lambda, lo, hi of the series */
    size_t path_cap;
    report_batch *figures;
} recovery_run;

/* Every projection output carries this, so no reader takes a crossing for a forecast. */
static const char projection_basis[] = "extrapolated_linear_trend_in_recovery_rate";
static const char *const projection_status[] = {"ahead", "within_record", "none_within_2x_record"};
/* A projection that could not be computed (draws = 0): a perfect fit has no residuals to
 * draw, and must not read as "no crossing". */
static const char not_computed[] = "not_computed";

/* Time of a fractional sample index (the projection's positions; infinite stays infinite). */
static double index_time(const prepared_series *ps, double index)
{
    return ps->time[0] + index * ps->dt;
}

/* The same as a figure's x value (a decimal year on a dated axis; cli_figure_times). */
static double index_x(const prepared_series *ps, double index)
{
    double t = index_time(ps, index);
    return ps->axis.unit == TIME_AXIS_NUMBER || !isfinite(t)
               ? t : slowscan_time_axis_decimal_year(&ps->axis, t);
}

static const char *status_name(const ar1_projection *pr)
{
    return pr->draws == 0 ? not_computed : projection_status[pr->kind];
}

static int open_outputs(const cli_options *opts, cli_outputs *outs, void *context)
{
    recovery_run *run = context;
    run->opts = opts;
    int rc = cli_outputs_open(outs, opts, opts->output, "-o", &run->out);
    if (rc == EXIT_OK)
        cli_put_header(run->out, opts, "series,time,lambda,lambda_lo,lambda_hi\n");
    if (rc == EXIT_OK && opts->json_output)
        rc = cli_outputs_open(outs, opts, opts->json_output, "--json", &run->json);
    if (rc == EXIT_OK && opts->projection_output)
        rc = cli_outputs_open(outs, opts, opts->projection_output, "--project", &run->projection);
    if (rc == EXIT_OK && run->projection) {
        cli_put_header(run->projection, opts, "series,status,crossing_time,crossing_lo,"
                       "crossing_hi,interval,share_crossing,draws,basis\n");
    }
    if (rc == EXIT_OK && run->json)
        fprintf(run->json, "{\n  \"program\": \"slowscan\",\n  \"null\": \"%s\",\n  \"surrogates\": %ld,\n"
                "  \"seed\": %lu,\n  \"series\": [", cli_null_name(opts), opts->surrogates, opts->seed);
    if (rc == EXIT_OK)
        rc = cli_figures_open(outs, opts, &run->figures);
    return rc;
}

/* The projected crossing (the library's), one CSV row per series. */
static void write_projection(recovery_run *run, const prepared_series *ps,
                             const recovery_result *r)
{
    const ar1_projection *pr = &r->projection;
    if (r->projection_status != SLOWSCAN_OK)
        cli_warning("%s: column '%s': no projected crossing (%s)", ps->source, ps->name,
                    slowscan_strerror(r->projection_status));
    cli_put_series(run->projection, run->opts, ps->source, ps->name);
    fprintf(run->projection, ",%s,", status_name(pr));
    const double times[] = {r->crossing_time, r->crossing_lo, r->crossing_hi};
    for (int k = 0; k < 3; k++) {
        cli_put_time(run->projection, &ps->axis, times[k]);
        fputc(',', run->projection);
    }
    fprintf(run->projection, "%s,", pr->draws == 0 ? "NA" : isinf(pr->index_hi) ? "open_above" : "closed");
    cli_put_number(run->projection, pr->share_crossing);
    fprintf(run->projection, ",%zu,%s\n", pr->draws, projection_basis);
}

enum { EXTENSION_POINTS = 64 };

/* The projection in the figure's terms (an interval open above has hi = +INFINITY). The
 * fitted path is continued from the end of the record to the crossing (or the horizon) in
 * ext[2 * EXTENSION_POINTS]: times, then lambda. */
static report_crossing figure_crossing(const prepared_series *ps, const ar1_drift_fit *fit,
                                       const ar1_projection *pr, double *ext)
{
    double last = (double)(ps->n - 1);
    double end = pr->kind == PROJECTION_AHEAD ? pr->index : 2.0 * last;
    size_t m = 0;
    for (size_t k = 0; pr->kind != PROJECTION_WITHIN_RECORD && k < EXTENSION_POINTS; k++) {
        double index = last + (end - last) * (double)k / (EXTENSION_POINTS - 1);
        double phi = fit->a0 + fit->a1 * (index / last - 0.5);
        if (!(phi > 0))
            break;
        ext[m] = index_x(ps, index);
        ext[EXTENSION_POINTS + m++] = fmin(log(phi) / ps->dt, 0.0);
    }
    report_crossing c = {pr->kind != PROJECTION_NONE, index_x(ps, pr->index),
                         index_x(ps, pr->index_lo), index_x(ps, pr->index_hi),
                         pr->kind == PROJECTION_NONE, index_x(ps, 2.0 * last), m, ext,
                         ext + EXTENSION_POINTS};
    return c;
}

static void write_json_projection(FILE *fp, const recovery_result *r)
{
    const ar1_projection *pr = &r->projection;
    fprintf(fp, ", \"projection\": {\"basis\": \"%s\", \"status\": \"%s\"", projection_basis,
            status_name(pr));
    const char *k[] = {"crossing_time", "crossing_lo", "crossing_hi"};
    const double times[] = {r->crossing_time, r->crossing_lo, r->crossing_hi};
    for (int i = 0; i < 3; i++) {
        fprintf(fp, ", \"%s\": ", k[i]);
        cli_json_number(fp, times[i]);
    }
    fprintf(fp, ", \"open_above\": %s, \"share_crossing\": ", isinf(pr->index_hi) ? "true" : "false");
    cli_json_number(fp, pr->share_crossing);
    fprintf(fp, ", \"draws\": %zu}", pr->draws);
}

static void write_json(recovery_run *run, const prepared_series *ps, const recovery_result *r)
{
    const ar1_drift_fit *f = &r->fit;
    double p = r->p_value;
    fprintf(run->json, "%s\n    {", run->written++ ? "," : "");
    if (cli_several_inputs(run->opts)) {
        fputs("\"file\": ", run->json);
        cli_json_string(run->json, ps->source);
        fputs(", ", run->json);
    }
    fputs("\"series\": ", run->json);
    cli_json_string(run->json, ps->name);
    fputs(", \"time_unit\": ", run->json); /* of the recovery rate lambda (per unit) */
    ps->axis.unit != TIME_AXIS_NUMBER ? cli_json_string(run->json, cli_time_unit(&ps->axis))
                                      : (void)fputs("null", run->json);
    /* se_* are HC3; the model-based error of a1 and its t are kept beside them */
    /* c is in the series' units (a series near 1e300 was fitted scaled: screen.h) */
    const double v[] = {f->a0, f->a1, slowscan_screen_unscale(ps, f->c, 1), f->se_a0, f->se_a1, f->t_a1, f->se_a1_model,
                        f->t_a1_model, p};
    const char *k[] = {"a0", "a1", "c", "se_a0", "se_a1", "t_a1", "se_a1_model_based",
                       "t_a1_model_based", "p_value"};
    for (size_t i = 0; i < sizeof v / sizeof v[0]; i++) {
        fprintf(run->json, ", \"%s\": ", k[i]);
        cli_json_number(run->json, v[i]);
    }
    fprintf(run->json, ", \"pairs\": %zu", f->pairs);
    if (r->projected)
        write_json_projection(run->json, r);
    fputc('}', run->json);
}

/* After the path rows: the projection (--project), the JSON entry, the figure. */
static int project_and_draw(recovery_run *run, const prepared_series *ps,
                            const recovery_result *r, const double *path)
{
    if (run->projection)
        write_projection(run, ps, r);
    if (run->json)
        write_json(run, ps, r);
    if (!run->figures)
        return EXIT_OK;
    report_crossing crossing = {0};
    double extension[2 * EXTENSION_POINTS];
    int drawn = run->projection && r->projection.draws > 0;
    if (drawn)
        crossing = figure_crossing(ps, &r->fit, &r->projection, extension);
    double *owned;
    char label[300];
    const double *x = cli_figure_times(ps, &owned, label, sizeof label);
    if (!x)
        return EXIT_INTERNAL;
    report_recovery_data data = {ps->name, label, ps->n, x, path,
                                 path + ps->n, path + 2 * ps->n, r->fit.t_a1, r->p_value,
                                 drawn ? &crossing : NULL};
    int rc = cli_figure_draw(run->figures, &slowscan_report_recovery_figure, &data, "recovery",
                             ps->name);
    free(owned);
    return rc;
}

/* The library's analysis of one series, then its rows. */
static int analyse(const cli_options *opts, recovery_run *run, const prepared_series *ps,
                   recovery_result *r)
{
    if (!run->ws && !(run->ws = slowscan_recovery_workspace_alloc((size_t)opts->threads))) {
        cli_error("out of memory");
        return EXIT_INTERNAL;
    }
    if (run->path_cap < 3 * ps->n) {
        free(run->path);
        run->path = malloc(3 * ps->n * sizeof *run->path);
        run->path_cap = run->path ? 3 * ps->n : 0;
        if (!run->path) {
            cli_error("out of memory");
            return EXIT_INTERNAL;
        }
    }
    screen_config cfg;
    cli_screen_config(opts, &cfg);
    recovery_config rcfg = slowscan_recovery_config_default();
    if (run->projection)
        rcfg.projection_draws = (size_t)opts->projection_draws;
    screen_detail d;
    double *path = run->path;
    int st = slowscan_recovery_series(run->ws, &cfg, &rcfg, ps, path, path + ps->n,
                                      path + 2 * ps->n, r, &d);
    for (size_t w = 0; w < r->nwarnings; w++)
        cli_screen_warn(opts, ps, &r->warnings[w]);
    return st == SLOWSCAN_OK ? EXIT_OK : cli_screen_refuse(opts, ps, &d);
}

static int recovery_series(const cli_options *opts, const prepared_series *ps, void *context)
{
    recovery_run *run = context;
    recovery_result r;
    int rc = analyse(opts, run, ps, &r);
    if (rc != EXIT_OK)
        return rc;
    if (r.fit_status != SLOWSCAN_OK) {
        cli_warning("%s: column '%s': no drifting AR(1) fit (%s); no rows written for it",
                    ps->source, ps->name, slowscan_strerror(r.fit_status));
        return EXIT_OK;
    }
    const double *path = run->path;
    for (size_t i = 0; i < ps->n; i++) {
        cli_put_series(run->out, opts, ps->source, ps->name);
        for (int c = -1; c < 3; c++) {
            fputc(',', run->out);
            if (c < 0)
                cli_put_time(run->out, &ps->axis, ps->time[i]);
            else
                cli_put_number(run->out, path[c * ps->n + i]);
        }
        fputc('\n', run->out);
    }
    return project_and_draw(run, ps, &r, path);
}

static int finish(const cli_options *opts, void *context)
{
    (void)opts;
    recovery_run *run = context;
    if (run->json)
        fputs("\n  ]\n}\n", run->json);
    if (run->projection)
        cli_warning("the crossing times in %s extrapolate a linear trend in the recovery "
                    "rate beyond what was observed; they are not forecasts (see 'slowscan help "
                    "recovery')", opts->projection_output);
    return EXIT_OK;
}

int cmd_recovery(const cli_options *opts)
{
    recovery_run run = {0};
    series_command cmd = {open_outputs, recovery_series, finish, &run, NULL, NULL, NULL};
    int rc = cli_run_series_command(opts, &cmd);
    slowscan_recovery_workspace_free(run.ws);
    free(run.path);
    return rc;
}
