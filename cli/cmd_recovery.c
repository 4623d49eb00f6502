/* slowscan recovery: the recovery-rate path of an AR(1) whose coefficient drifts linearly,
 * x_{t+1} = (a0 + a1 s_t) x_t + c + e_t, fitted to each residual:
 * `series,time,lambda,lambda_lo,lambda_hi` (a pointwise 95% band). With --json FILE, per
 * series a0, a1, their standard errors, the t-value of a1 and, with --surrogates M, its
 * surrogate p-value (one-sided: a1 > 0, memory growing). */
#include "cli.h"
#include "slowscan/ar1_drift.h"
#include "slowscan/significance.h"
#include "slowscan/status.h"

#include <fftw3.h>
#include <gsl/gsl_rng.h>
#include <math.h>
#include <stdlib.h>

typedef struct {
    FILE *out, *json;
    size_t written;
    gsl_rng *rng;
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
    return rc;
}

/* The t-value of a1 over M surrogates of the series' null source; p one-sided (a1 > 0). */
static double surrogate_p(const cli_options *opts, const prepared_series *ps, recovery_run *run,
                          ar1_drift_workspace *ws, double observed, int *status)
{
    size_t m = (size_t)opts->surrogates;
    surrogate_plan *plan = surrogate_plan_alloc(ps->n, FFTW_ESTIMATE);
    surrogate_source *src = plan ? surrogate_source_alloc(plan, (surrogate_kind)opts->null_model,
                                                          ps->null_source, &opts->null_options, status)
                                 : NULL;
    double *y = fftw_alloc_real(ps->n), *null = malloc(m * sizeof *null), p = NAN;
    if (src && y && null) {
        for (size_t j = 0; j < m; j++) {
            null_trend_stream(run->rng, opts->seed, ps->name, cli_null_name(opts), j);
            ar1_drift_fit f;
            surrogate_draw(src, run->rng, y);
            null[j] = ar1_drift_estimate(ws, y, ps->n, &f) == SLOWSCAN_OK ? f.t_a1 : NAN;
        }
        p = significance_p_value(observed, null, m, ALTERNATIVE_INCREASING, NULL);
    } else if (*status == SLOWSCAN_OK) {
        *status = SLOWSCAN_ENOMEM;
    }
    free(null);
    fftw_free(y);
    surrogate_source_free(src);
    surrogate_plan_free(plan);
    return p;
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
    if (st == SLOWSCAN_OK) {
        double p = NAN;
        if (opts->surrogates > 0)
            p = surrogate_p(opts, ps, run, ws, fit.t_a1, &st);
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
    recovery_run run = {NULL, NULL, 0, gsl_rng_alloc(gsl_rng_mt19937)};
    if (!run.rng)
        return EXIT_INTERNAL;
    series_command cmd = {open_outputs, recovery_series, finish, &run, NULL};
    int rc = cli_run_series_command(opts, &cmd);
    gsl_rng_free(run.rng);
    return rc;
}
