/* slowscan recovery: the recovery-rate path of an AR(1) whose coefficient drifts linearly,
 * x_{t+1} = (a0 + a1 s_t) x_t + c + e_t, fitted to each residual:
 * `series,time,lambda,lambda_lo,lambda_hi` (a pointwise 95% band). With --json FILE, per
 * series a0, a1, their standard errors, the t-value of a1 and, with --surrogates M, its
 * surrogate p-value (one-sided: a1 > 0, memory growing). */
#include "cli.h"
#include "trend_test.h"
#include "slowscan/ar1_drift.h"
#include "slowscan/significance.h"
#include "slowscan/status.h"

#include <math.h>
#include <gsl/gsl_rng.h>
#include <stdlib.h>

typedef struct {
    FILE *out, *json, *projection;
    size_t written;
    trend_tester tester;
    gsl_rng *rng; /* for the projection's bootstrap; reseeded per series */
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

static const char *status_name(const ar1_projection *pr)
{
    return pr->draws == 0 ? not_computed : projection_status[pr->kind];
}

static int open_outputs(const cli_options *opts, cli_outputs *outs, void *context)
{
    recovery_run *run = context;
    int rc = cli_outputs_open(outs, opts, opts->output, "-o", &run->out);
    if (rc == EXIT_OK)
        fputs("series,time,lambda,lambda_lo,lambda_hi\n", run->out);
    if (rc == EXIT_OK && opts->json_output)
        rc = cli_outputs_open(outs, opts, opts->json_output, "--json", &run->json);
    if (rc == EXIT_OK && opts->projection_output)
        rc = cli_outputs_open(outs, opts, opts->projection_output, "--project", &run->projection);
    if (rc == EXIT_OK && run->projection) {
        fputs("series,status,crossing_time,crossing_lo,crossing_hi,interval,share_crossing,draws,"
              "basis\n", run->projection);
        run->rng = gsl_rng_alloc(gsl_rng_mt19937);
        if (!run->rng)
            rc = EXIT_INTERNAL;
    }
    if (rc == EXIT_OK && run->json)
        fprintf(run->json, "{\n  \"program\": \"slowscan\",\n  \"null\": \"%s\",\n  \"surrogates\": %ld,\n"
                "  \"seed\": %lu,\n  \"series\": [", cli_null_name(opts), opts->surrogates, opts->seed);
    if (rc == EXIT_OK)
        rc = cli_figures_open(outs, opts, &run->figures);
    return rc;
}

/* The surrogate p-value of t(a1): the drift test of screen (trend_test.c), run alone, so the
 * same surrogates, streams and threads give the same p as screen's recovery_trend row. */
static double surrogate_p(const cli_options *opts, const prepared_series *ps, recovery_run *run,
                          int *rc)
{
    cli_options drift_only = *opts;
    drift_only.nindicators = 0;
    drift_only.drift_test = 1;
    screen_result result;
    *rc = trend_test(&run->tester, &drift_only, ps, NULL, &result);
    return result.tests[0].p_value;
}

/* The crossing of lambda = 0 within twice the record, with its residual-bootstrap interval
 * (slowscan_ar1_drift_project), one CSV row per series; *projected is filled for the JSON. */
static int write_projection(const cli_options *opts, recovery_run *run, const prepared_series *ps,
                            ar1_drift_workspace *ws, const ar1_drift_fit *fit, ar1_projection *pr)
{
    gsl_rng_set(run->rng, slowscan_stream_seed(opts->seed, ps->name, "projection", 0));
    int st = slowscan_ar1_drift_project(ws, fit, ps->n, 2.0 * (double)(ps->n - 1),
                               (size_t)opts->projection_draws, run->rng, pr);
    if (st == SLOWSCAN_ENOMEM)
        return EXIT_INTERNAL;
    if (st != SLOWSCAN_OK) {
        cli_warning("%s: column '%s': no projected crossing (%s)", ps->source, ps->name,
                    slowscan_strerror(st));
        pr->kind = PROJECTION_NONE, pr->index = pr->index_lo = pr->index_hi = NAN;
        pr->share_crossing = NAN, pr->draws = 0;
    }
    cli_put_field(run->projection, ps->name);
    fprintf(run->projection, ",%s,", status_name(pr));
    const double index[] = {pr->index, pr->index_lo, pr->index_hi};
    for (int k = 0; k < 3; k++) {
        cli_put_number(run->projection, index_time(ps, index[k]));
        fputc(',', run->projection);
    }
    fprintf(run->projection, "%s,", pr->draws == 0 ? "NA" : isinf(pr->index_hi) ? "open_above" : "closed");
    cli_put_number(run->projection, pr->share_crossing);
    fprintf(run->projection, ",%zu,%s\n", pr->draws, projection_basis);
    return EXIT_OK;
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
        ext[m] = index_time(ps, index);
        ext[EXTENSION_POINTS + m++] = fmin(log(phi) / ps->dt, 0.0);
    }
    report_crossing c = {pr->kind != PROJECTION_NONE, index_time(ps, pr->index),
                         index_time(ps, pr->index_lo), index_time(ps, pr->index_hi),
                         pr->kind == PROJECTION_NONE, index_time(ps, 2.0 * last), m, ext,
                         ext + EXTENSION_POINTS};
    return c;
}

static void write_json_projection(FILE *fp, const prepared_series *ps, const ar1_projection *pr)
{
    fprintf(fp, ", \"projection\": {\"basis\": \"%s\", \"status\": \"%s\"", projection_basis,
            status_name(pr));
    const char *k[] = {"crossing_time", "crossing_lo", "crossing_hi"};
    const double index[] = {pr->index, pr->index_lo, pr->index_hi};
    for (int i = 0; i < 3; i++) {
        fprintf(fp, ", \"%s\": ", k[i]);
        cli_json_number(fp, index_time(ps, index[i]));
    }
    fprintf(fp, ", \"open_above\": %s, \"share_crossing\": ", isinf(pr->index_hi) ? "true" : "false");
    cli_json_number(fp, pr->share_crossing);
    fprintf(fp, ", \"draws\": %zu}", pr->draws);
}

static void write_json(recovery_run *run, const prepared_series *ps, const ar1_drift_fit *f, double p,
                       const ar1_projection *pr)
{
    fprintf(run->json, "%s\n    {\"series\": ", run->written++ ? "," : "");
    cli_json_string(run->json, ps->name);
    /* se_* are HC3; the model-based error of a1 and its t are kept beside them */
    const double v[] = {f->a0, f->a1, f->c, f->se_a0, f->se_a1, f->t_a1, f->se_a1_model,
                        f->t_a1_model, p};
    const char *k[] = {"a0", "a1", "c", "se_a0", "se_a1", "t_a1", "se_a1_model_based",
                       "t_a1_model_based", "p_value"};
    for (size_t i = 0; i < sizeof v / sizeof v[0]; i++) {
        fprintf(run->json, ", \"%s\": ", k[i]);
        cli_json_number(run->json, v[i]);
    }
    fprintf(run->json, ", \"pairs\": %zu", f->pairs);
    if (pr)
        write_json_projection(run->json, ps, pr);
    fputc('}', run->json);
}

/* After the path rows: the projection (--project), the JSON entry, the figure. */
static int project_and_draw(const cli_options *opts, recovery_run *run, const prepared_series *ps,
                            ar1_drift_workspace *ws, const ar1_drift_fit *fit, double p,
                            const double *path)
{
    ar1_projection projected;
    int rc = run->projection ? write_projection(opts, run, ps, ws, fit, &projected) : EXIT_OK;
    if (rc != EXIT_OK)
        return rc;
    if (run->json)
        write_json(run, ps, fit, p, run->projection ? &projected : NULL);
    if (!run->figures)
        return EXIT_OK;
    report_crossing crossing = {0};
    double extension[2 * EXTENSION_POINTS];
    int drawn = run->projection && projected.draws > 0;
    if (drawn)
        crossing = figure_crossing(ps, fit, &projected, extension);
    report_recovery_data data = {ps->name, ps->time_name, ps->n, ps->time, path,
                                 path + ps->n, path + 2 * ps->n, fit->t_a1, p,
                                 drawn ? &crossing : NULL};
    return cli_figure_draw(run->figures, &slowscan_report_recovery_figure, &data, "recovery", ps->name);
}

static int recovery_series(const cli_options *opts, const prepared_series *ps, void *context)
{
    recovery_run *run = context;
    ar1_drift_workspace *ws = slowscan_ar1_drift_alloc(ps->n);
    if (ws)
        slowscan_ar1_drift_set_noise_trend(ws, opts->noise_trend);
    double *path = malloc(3 * ps->n * sizeof *path);
    ar1_drift_fit fit;
    int st = ws && path ? (ps->constant ? SLOWSCAN_ECONST : slowscan_ar1_drift_estimate(ws, ps->residual, ps->n, &fit))
                        : SLOWSCAN_ENOMEM;
    int rc = st == SLOWSCAN_ENOMEM ? EXIT_INTERNAL : EXIT_OK;
    double p = NAN;
    if (st == SLOWSCAN_OK && opts->surrogates > 0)
        p = surrogate_p(opts, ps, run, &rc);
    if (st == SLOWSCAN_OK && rc == EXIT_OK) {
        slowscan_ar1_drift_path(&fit, ps->n, ps->dt, path, path + ps->n, path + 2 * ps->n);
        for (size_t i = 0; i < ps->n; i++) {
            cli_put_field(run->out, ps->name);
            for (int c = -1; c < 3; c++) {
                fputc(',', run->out);
                cli_put_number(run->out, c < 0 ? ps->time[i] : path[c * ps->n + i]);
            }
            fputc('\n', run->out);
        }
        rc = project_and_draw(opts, run, ps, ws, &fit, p, path);
    } else if (rc == EXIT_OK) {
        cli_warning("%s: column '%s': no drifting AR(1) fit (%s); no rows written for it",
                    ps->source, ps->name, slowscan_strerror(st));
    }
    free(path);
    slowscan_ar1_drift_free(ws);
    return rc;
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
    trend_tester_free(&run.tester);
    if (run.rng)
        gsl_rng_free(run.rng);
    return rc;
}
