/* slowscan recovery: the recovery-rate path of an AR(1) whose coefficient drifts linearly,
 * x_{t+1} = (a0 + a1 s_t) x_t + c + e_t, fitted to each residual:
 * `series,time,lambda,lambda_lo,lambda_hi` (a pointwise 95% band). With --json FILE, per
 * series a0, a1, their standard errors, the t-value of a1 and, with --surrogates M, its
 * surrogate p-value (one-sided: a1 > 0, memory growing). */
#include "cli.h"
#include "trend_test.h"
#include "slowscan/ar1_drift.h"
#include "slowscan/status.h"

#include <math.h>
#include <stdlib.h>

typedef struct {
    FILE *out, *json;
    size_t written;
    trend_tester tester;
    report_batch *figures;
} recovery_run;

static int open_outputs(const cli_options *opts, cli_outputs *outs, void *context)
{
    recovery_run *run = context;
    int rc = cli_outputs_open(outs, opts, opts->output, "-o", &run->out);
    if (rc == EXIT_OK)
        fputs("series,time,lambda,lambda_lo,lambda_hi\n", run->out);
    if (rc == EXIT_OK && opts->json_output)
        rc = cli_outputs_open(outs, opts, opts->json_output, "--json", &run->json);
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
    trend_result result;
    *rc = trend_test(&run->tester, &drift_only, ps, NULL, &result);
    return result.p_value;
}

static void write_json(recovery_run *run, const prepared_series *ps, const ar1_drift_fit *f, double p)
{
    fprintf(run->json, "%s\n    {\"series\": ", run->written++ ? "," : "");
    cli_json_string(run->json, ps->name);
    const double v[] = {f->a0, f->a1, f->c, f->se_a0, f->se_a1, f->t_a1, p};
    const char *k[] = {"a0", "a1", "c", "se_a0", "se_a1", "t_a1", "p_value"};
    for (size_t i = 0; i < 7; i++) {
        fprintf(run->json, ", \"%s\": ", k[i]);
        cli_json_number(run->json, v[i]);
    }
    fprintf(run->json, ", \"pairs\": %zu}", f->pairs);
}

static int recovery_series(const cli_options *opts, const prepared_series *ps, void *context)
{
    recovery_run *run = context;
    ar1_drift_workspace *ws = ar1_drift_alloc(ps->n);
    if (ws)
        ar1_drift_set_noise_trend(ws, opts->noise_trend);
    double *path = malloc(3 * ps->n * sizeof *path);
    ar1_drift_fit fit;
    int st = ws && path ? (ps->constant ? SLOWSCAN_ECONST : ar1_drift_estimate(ws, ps->residual, ps->n, &fit))
                        : SLOWSCAN_ENOMEM;
    int rc = st == SLOWSCAN_ENOMEM ? EXIT_INTERNAL : EXIT_OK;
    double p = NAN;
    if (st == SLOWSCAN_OK && opts->surrogates > 0)
        p = surrogate_p(opts, ps, run, &rc);
    if (st == SLOWSCAN_OK && rc == EXIT_OK) {
        ar1_drift_path(&fit, ps->n, ps->dt, path, path + ps->n, path + 2 * ps->n);
        for (size_t i = 0; i < ps->n; i++) {
            cli_put_field(run->out, ps->name);
            for (int c = -1; c < 3; c++) {
                fputc(',', run->out);
                cli_put_number(run->out, c < 0 ? ps->time[i] : path[c * ps->n + i]);
            }
            fputc('\n', run->out);
        }
        if (run->json)
            write_json(run, ps, &fit, p);
        /* No projected crossing yet: the figure takes one when the command computes it. */
        report_recovery_data data = {ps->name, ps->time_name, ps->n, ps->time, path,
                                     path + ps->n, path + 2 * ps->n, fit.t_a1, p, NULL};
        if (run->figures)
            rc = cli_figure_draw(run->figures, &report_recovery_figure, &data, "recovery", ps->name);
    } else if (rc == EXIT_OK) {
        cli_warning("%s: column '%s': no drifting AR(1) fit (%s); no rows written for it",
                    ps->source, ps->name, slowscan_strerror(st));
    }
    free(path);
    ar1_drift_free(ws);
    return rc;
}

static int finish(const cli_options *opts, void *context)
{
    (void)opts;
    recovery_run *run = context;
    if (run->json)
        fputs("\n  ]\n}\n", run->json);
    return EXIT_OK;
}

int cmd_recovery(const cli_options *opts)
{
    recovery_run run = {0};
    series_command cmd = {open_outputs, recovery_series, finish, &run, NULL, NULL};
    int rc = cli_run_series_command(opts, &cmd);
    trend_tester_free(&run.tester);
    return rc;
}
