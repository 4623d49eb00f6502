/* slowscan timescales: relaxation modes of a step response (timescales.h), one CSV row per
 * mode of the chosen fit:
 * `series,modes_chosen,mode,amplitude,amplitude_se,efold_time,efold_time_se,flux_at_onset,
 * flux_at_onset_se,equilibrium,equilibrium_se,n_eff,flags`;
 * --json FILE adds the model-choice table; --figures DIR draws the modes over the data. */
#include "modes_cli.h"
#include "modes_run.h"
#include "slowscan/status.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

typedef struct {
    FILE *out, *json;
    size_t written;
    report_batch *figures;
    timescales_workspace *ws;
    size_t ws_n;
} timescales_run;

static int open_outputs(const cli_options *opts, cli_outputs *outs, void *context)
{
    timescales_run *run = context;
    int rc = cli_outputs_open(outs, opts, opts->output, "-o", &run->out);
    if (rc == EXIT_OK && opts->ensemble.on)
        fputs("member,", run->out);
    if (rc == EXIT_OK)
        cli_put_header(run->out, opts, "series,modes_chosen,mode,amplitude,amplitude_se,"
                       "efold_time,efold_time_se,flux_at_onset,flux_at_onset_se,equilibrium,"
                       "equilibrium_se,n_eff,flags\n");
    if (rc == EXIT_OK && opts->json_output)
        rc = cli_outputs_open(outs, opts, opts->json_output, "--json", &run->json);
    if (rc == EXIT_OK && run->json)
        fprintf(run->json, "{\n  \"program\": \"slowscan\",\n  \"command\": \"timescales\",\n"
                "  \"standard_errors\": \"Jacobian covariance at the optimum x residual variance "
                "rss/(m-p), inflated by n/n_eff (variance)\",\n  \"series\": [");
    if (rc == EXIT_OK)
        rc = cli_figures_open(outs, opts, &run->figures);
    return rc;
}

void cli_modes_flag_names(unsigned flags, char *buf, size_t size)
{
    snprintf(buf, size, "%s%s%s", flags & TIMESCALES_FLAG_UNRESOLVED ? "unresolved" : "",
             flags == (TIMESCALES_FLAG_UNRESOLVED | TIMESCALES_FLAG_MULTISCALE) ? ";" : "",
             flags & TIMESCALES_FLAG_MULTISCALE ? "multiscale" : flags ? "" : "none");
}

static void write_rows(timescales_run *run, const cli_options *opts, const modes_series *s,
                       const timescales_result *r)
{
    char flags[64];
    cli_modes_flag_names(r->flags, flags, sizeof flags);
    for (size_t k = 0; k < r->nmodes; k++) {
        const timescales_mode *m = &r->modes[k];
        if (s->member) {
            cli_put_field(run->out, s->member);
            fputc(',', run->out);
        }
        cli_put_series(run->out, opts, s->source, s->name);
        fprintf(run->out, ",%zu,%zu", r->nmodes, k + 1);
        const double v[] = {m->a, m->se_a, m->tau, m->se_tau, m->c, m->se_c, r->equilibrium,
                            r->se_equilibrium, r->n_eff};
        for (size_t j = 0; j < sizeof v / sizeof v[0]; j++) {
            fputc(',', run->out);
            cli_put_number(run->out, v[j]);
        }
        fprintf(run->out, ",%s\n", flags);
    }
}

static void json_field(FILE *fp, const char *key, double v)
{
    fprintf(fp, ", \"%s\": ", key);
    cli_json_number(fp, v);
}

static void write_json(timescales_run *run, const cli_options *opts, const modes_series *s,
                       const timescales_result *r)
{
    FILE *fp = run->json;
    fprintf(fp, "%s\n    {", run->written++ ? "," : "");
    if (cli_several_inputs(opts)) {
        fputs("\"file\": ", fp);
        cli_json_string(fp, s->source);
        fputs(", ", fp);
    }
    if (s->member) {
        fputs("\"member\": ", fp);
        cli_json_string(fp, s->member);
        fputs(", ", fp);
    }
    fputs("\"series\": ", fp);
    cli_json_string(fp, s->name);
    fputs(", \"time_unit\": ", fp); /* of the e-folding times and the onset */
    s->axis->unit != TIME_AXIS_NUMBER ? cli_json_string(fp, cli_time_unit(s->axis))
                                      : (void)fputs("null", fp);
    fprintf(fp, ", \"joint\": %s, \"samples\": %zu, \"onset\": ", r->joint ? "true" : "false", r->n);
    cli_json_number(fp, s->onset);
    json_field(fp, "lag1_residuals", r->r1);
    json_field(fp, "n_eff", r->n_eff);
    json_field(fp, "se_inflation", r->se_inflation);
    json_field(fp, "residual_sd", r->sigma);
    json_field(fp, "equilibrium", r->equilibrium);
    json_field(fp, "equilibrium_se", r->se_equilibrium);
    json_field(fp, "forcing", r->forcing);
    json_field(fp, "forcing_se", r->se_forcing);
    char flags[64];
    cli_modes_flag_names(r->flags, flags, sizeof flags);
    fprintf(fp, ", \"flags\": \"%s\", \"modes_chosen\": %zu, \"choice\": [", flags, r->nmodes);
    for (size_t K = 1; K <= (size_t)opts->modes.max_modes; K++) {
        fprintf(fp, "%s{\"modes\": %zu, \"fitted\": %s", K > 1 ? ", " : "", K,
                r->choice[K - 1].status == SLOWSCAN_OK ? "true" : "false");
        json_field(fp, "rss", r->choice[K - 1].rss);
        json_field(fp, "bic", r->choice[K - 1].bic);
        fputc('}', fp);
    }
    fputs("]}", fp);
}

/* One line on stderr per series: the modes, the equilibrium, and the flags' meaning. */
static void verdict(const cli_options *opts, const modes_series *s, const timescales_result *r)
{
    char taus[256] = "";
    size_t used = 0;
    for (size_t k = 0; k < r->nmodes && used < sizeof taus; k++)
        used += (size_t)snprintf(taus + used, sizeof taus - used, "%s%.4g", k ? ", " : "",
                                 r->modes[k].tau);
    char se[32] = "NA"; /* a standard error the fit could not give */
    if (isfinite(r->se_equilibrium))
        snprintf(se, sizeof se, "%.2g", r->se_equilibrium);
    cli_modes_say(opts, "%s: column '%s': %zu mode%s (e-folding times %s); equilibrium %.4g +- %s, "
                "an extrapolation of the fitted modes, not a forecast", s->source, s->name,
                r->nmodes, r->nmodes == 1 ? "" : "s", taus, r->equilibrium, se);
    if (r->flags & TIMESCALES_FLAG_UNRESOLVED)
        cli_warning("%s: column '%s': unresolved: the longest e-folding time (%.4g) exceeds a "
                    "third of the record; the run cannot pin it or the equilibrium down",
                    s->source, s->name, r->modes[r->nmodes - 1].tau);
    if (r->flags & TIMESCALES_FLAG_MULTISCALE)
        cli_warning("%s: column '%s': multiscale: e-folding times %.4g and %.4g differ by more "
                    "than 10x", s->source, s->name, r->modes[0].tau, r->modes[r->nmodes - 1].tau);
}

static int fit_series(const cli_options *opts, const modes_series *s, void *context)
{
    timescales_run *run = context;
    if (!run->ws || run->ws_n < s->n) {
        slowscan_timescales_workspace_free(run->ws);
        run->ws = slowscan_timescales_workspace_alloc(s->n);
        run->ws_n = s->n;
        if (!run->ws) {
            cli_error("out of memory");
            return EXIT_INTERNAL;
        }
    }
    timescales_config cfg = slowscan_timescales_config_default();
    cfg.max_modes = (size_t)opts->modes.max_modes;
    timescales_result r;
    int st = s->flux ? slowscan_timescales_fit_joint(run->ws, &cfg, s->t, s->y, s->flux, s->n, &r)
                     : slowscan_timescales_fit(run->ws, &cfg, s->t, s->y, s->n, &r);
    if (st != SLOWSCAN_OK)
        return cli_modes_refuse(opts, s, st);
    write_rows(run, opts, s, &r);
    if (run->json)
        write_json(run, opts, s, &r);
    verdict(opts, s, &r);
    return run->figures ? cli_timescales_figure(run->figures, s, &r) : EXIT_OK;
}

static int finish(const cli_options *opts, void *context)
{
    (void)opts;
    timescales_run *run = context;
    if (run->json)
        fputs("\n  ]\n}\n", run->json);
    return EXIT_OK;
}

int cmd_timescales(const cli_options *opts)
{
    timescales_run run = {0};
    int rc = cli_modes_run(opts, open_outputs, fit_series, finish, &run);
    slowscan_timescales_workspace_free(run.ws);
    return rc;
}
