/* slowscan feedback: the sliding regression N = F + lambda T of a forced run's net flux on its
 * response (response/feedback), one CSV row per window, a one-line verdict per run on stderr,
 * and with --json the drift test of each run. */
#include "feedback_run.h"
#include "forced_inputs.h"
#include "slowscan/status.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

typedef struct {
    const cli_options *opts;
    FILE *out, *json;
    size_t written;
    report_batch *figures;
    series_table baseline;
    int has_baseline;
} feedback_command;

static const char header[] =
    "start,end,pairs,lambda,lambda_se,lambda_se_adjusted,lambda_lo,lambda_hi,n_effective,"
    "forcing,forcing_se,forcing_se_adjusted,r_squared,equilibrium,equilibrium_se,"
    "equilibrium_note,flags\n";

/* Takes over the baseline's table of area means (cli_feedback_grid). */
static int keep_baseline(void *context, series_table *t, const double *branch)
{
    (void)branch;
    series_table *dst = context;
    *dst = *t;
    memset(t, 0, sizeof *t);
    return EXIT_OK;
}

/* The baseline run: a CSV read like the inputs, or a NetCDF grid's area means; never cut
 * to --from/--until (its period is the run's, after alignment). */
static int load_baseline(const cli_options *opts, feedback_command *run)
{
    const char *path = opts->forced.baseline;
    if (!cli_is_netcdf(path))
        return cli_load_whole_table(opts, path, "--baseline", "a baseline run", &run->baseline);
    cli_options whole = *opts;
    whole.from = whole.until = NAN;
    whole.from_text = whole.until_text = NULL;
    whole.select = NULL;
    return cli_feedback_grid(&whole, path, keep_baseline, &run->baseline);
}

static int open_outputs(const cli_options *opts, cli_outputs *outs, void *context)
{
    feedback_command *run = context;
    run->opts = opts;
    int rc = cli_outputs_open(outs, opts, opts->output, "-o", &run->out);
    if (rc == EXIT_OK && opts->ensemble.on)
        fputs("member,", run->out);
    if (rc == EXIT_OK)
        cli_put_header(run->out, opts, header);
    if (rc == EXIT_OK && opts->json_output)
        rc = cli_outputs_open(outs, opts, opts->json_output, "--json", &run->json);
    if (rc == EXIT_OK && run->json)
        fputs("{\n  \"program\": \"slowscan\",\n  \"command\": \"feedback\",\n  \"runs\": [", run->json);
    if (rc == EXIT_OK && opts->forced.baseline) {
        if (cli_output_clashes(outs, opts, opts->forced.baseline, "--baseline"))
            return EXIT_BAD_INPUT;
        rc = load_baseline(opts, run);
        run->has_baseline = rc == EXIT_OK;
    }
    if (rc == EXIT_OK)
        rc = cli_figures_open(outs, opts, &run->figures);
    return rc;
}

/* The library's refusal of the run's windows (slowscan_feedback_windows) in the options'
 * words; `unread`: --fit-span's times could not be read on the run's axis. */
static int refused(const cli_options *o, const cli_feedback_run *r, const feedback_config *c,
                   const feedback_windows_detail *d, int unread)
{
    const cli_feedback_options *f = &o->feedback;
    const char *window = o->window.text ? o->window.text : "(default)";
    const char *names[] = {"--skip", "--window", "--stride"};
    const char *texts[] = {o->forced.skip.text, o->window.text, f->stride.text};
    switch (d->refusal) {
    case FEEDBACK_REFUSAL_SAMPLES:
        cli_error("%s: %zu samples; a feedback regression needs at least 4", r->source, r->n);
        break;
    case FEEDBACK_REFUSAL_SPAN:
        if (unread)
            cli_error("option --fit-span: '%s' is not two times of %s", f->span_text, r->source);
        else
            cli_error("option --fit-span: %s is not an increasing span inside the record of %s",
                      f->span_text, r->source);
        break;
    case FEEDBACK_REFUSAL_UNIT:
        return cli_forced_unmeasurable(names[d->length], texts[d->length], &r->axis);
    case FEEDBACK_REFUSAL_SKIP:
        cli_error("option --skip %s: leaves less than 4 samples of %s", o->forced.skip.text,
                  r->source);
        break;
    case FEEDBACK_REFUSAL_WINDOW_LONG:
        cli_error("option --window %s: %.12g time units is longer than the record of %s "
                  "(%.12g after --skip)", window, c->window, r->source, d->rest);
        break;
    case FEEDBACK_REFUSAL_WINDOW_SHORT:
        cli_error("option --window %s: fewer than 4 samples per window in %s", window, r->source);
        break;
    default:
        cli_error("option --stride %s: shorter than the time step (%.12g) of %s", f->stride.text,
                  d->step, r->source);
    }
    return EXIT_BAD_INPUT;
}

/* The library's configuration for one run: the options as given, their defaults and checks
 * by slowscan_feedback_windows. */
static int configure(const cli_options *o, const cli_feedback_run *r, feedback_config *c)
{
    const cli_feedback_options *f = &o->feedback;
    *c = slowscan_feedback_config_default();
    c->fit = f->fit;
    c->noise_ratio = r->noise_ratio;
    c->scale = f->scale;
    feedback_request q = slowscan_feedback_request_default();
    const cli_forced_length *skip = &o->forced.skip;
    q.skip = cli_forced_request(skip->amount, skip->percent, skip->unit, skip->text);
    q.window = cli_forced_request(o->window.amount, o->window.percent, (int)o->window.unit,
                                  o->window.text);
    q.stride = cli_forced_request(f->stride.amount, f->stride.percent, f->stride.unit,
                                  f->stride.text);
    int unread = 0;
    if (f->span_text) {
        q.span = 1;
        /* a time the axis cannot read stays NaN: the library refuses the span after its
         * sample count */
        if (slowscan_time_axis_value(&r->axis, f->span_from, NULL, &q.span_from) != SLOWSCAN_OK ||
            slowscan_time_axis_value(&r->axis, f->span_until, NULL, &q.span_until) != SLOWSCAN_OK) {
            q.span_from = q.span_until = NAN;
            unread = 1;
        }
    }
    feedback_windows_detail d;
    if (slowscan_feedback_windows(r->time, r->n, &r->axis, &q, c, &d) != SLOWSCAN_OK)
        return refused(o, r, c, &d, unread);
    return EXIT_OK;
}

static const char *equilibrium_note(const feedback_window *w)
{
    static const char *const notes[] = {"", "no_restoring_feedback", "no_fit"};
    return notes[w->teq_reason];
}

static const char *flag_text(unsigned flags)
{
    static const char *const names[] = {"none", "weak", "reversed", "weak+reversed"};
    return names[flags & 3];
}

static void write_rows(FILE *fp, const cli_options *o, const cli_feedback_run *r,
                       const feedback_window *w, size_t count)
{
    for (size_t j = 0; j < count; j++) {
        if (r->member) {
            cli_put_field(fp, r->member);
            fputc(',', fp);
        }
        if (cli_several_inputs(o)) {
            cli_put_field(fp, r->source);
            fputc(',', fp);
        }
        cli_put_time(fp, &r->axis, w[j].start);
        fputc(',', fp);
        cli_put_time(fp, &r->axis, w[j].end);
        fprintf(fp, ",%zu", w[j].n);
        const double v[] = {w[j].lambda, w[j].se_lambda, w[j].se_lambda_adj, w[j].lo, w[j].hi,
                            w[j].n_eff, w[j].forcing, w[j].se_forcing, w[j].se_forcing_adj,
                            w[j].r2, w[j].t_eq, w[j].se_t_eq};
        for (size_t k = 0; k < sizeof v / sizeof v[0]; k++) {
            fputc(',', fp);
            cli_put_number(fp, v[k]);
        }
        fprintf(fp, ",%s,%s\n", equilibrium_note(&w[j]), flag_text(w[j].flags));
    }
}

static const char *drift_word(const feedback_drift *d)
{
    static const char *const words[] = {"untested", "steady", "drifting"};
    return words[d->verdict];
}

static const char *drift_method(const feedback_drift *d)
{
    static const char *const names[] = {"none", "first_vs_last", "weighted_trend"};
    return names[d->method];
}

/* The one-line verdict of a run on stderr. */
static void verdict(const cli_feedback_run *r, const feedback_config *c, const feedback_window *w,
                    size_t count, const feedback_drift *d)
{
    size_t weak = 0, reversed = 0, fitted = 0;
    for (size_t j = 0; j < count; j++) {
        fitted += w[j].status == SLOWSCAN_OK;
        weak += (w[j].flags & FEEDBACK_FLAG_WEAK) != 0;
        reversed += (w[j].flags & FEEDBACK_FLAG_REVERSED) != 0;
    }
    char drift[160] = "";
    if (!isnan(c->span_from))
        snprintf(drift, sizeof drift, "drift not tested (one fit over --fit-span)");
    else if (d->verdict == FEEDBACK_DRIFT_UNTESTED)
        snprintf(drift, sizeof drift, "drift not tested (fewer than 2 fitted halves)");
    else
        snprintf(drift, sizeof drift, "%s (%s over %zu non-overlapping windows, p = %.3g)",
                 drift_word(d), drift_method(d), d->windows, d->p_value);
    char first[32] = "NA", last[32] = "NA";
    if (isfinite(w[0].lambda))
        snprintf(first, sizeof first, "%.4g", w[0].lambda);
    if (isfinite(w[count - 1].lambda))
        snprintf(last, sizeof last, "%.4g", w[count - 1].lambda);
    cli_progress_message_begin();
    fprintf(stderr, "slowscan: feedback %s%s%s: %zu window%s (%zu fitted, %s), lambda %s to %s; "
            "%zu weak, %zu reversed; %s%s\n", r->source, r->member ? " member " : "",
            r->member ? r->member : "", count, count == 1 ? "" : "s", fitted,
            c->fit == FEEDBACK_TLS ? "tls" : "ols", first, last, weak, reversed, drift,
            d->verdict == FEEDBACK_DRIFT_DRIFTING
            ? ": extrapolating one window's equilibrium is not justified" : "");
    cli_progress_message_end();
}

static void write_json(feedback_command *run, const cli_feedback_run *r,
                       const feedback_config *c, size_t count, const feedback_drift *d)
{
    FILE *fp = run->json;
    fprintf(fp, "%s\n    {\"file\": ", run->written++ ? "," : "");
    cli_json_string(fp, r->source);
    if (r->member) {
        fputs(", \"member\": ", fp);
        cli_json_string(fp, r->member);
    }
    fprintf(fp, ", \"fit\": \"%s\", \"noise_ratio\": ", c->fit == FEEDBACK_TLS ? "tls" : "ols");
    cli_json_number(fp, c->fit == FEEDBACK_TLS ? c->noise_ratio : NAN);
    fprintf(fp, ", \"noise_ratio_from_baseline\": %s, \"baseline_offset\": ",
            r->ratio_estimated ? "true" : "false");
    cli_json_number(fp, r->baseline_offset);
    const char *k[] = {"window", "stride", "skip", "scale"};
    const double v[] = {c->window, c->stride, c->skip, c->scale};
    for (size_t i = 0; i < 4; i++) {
        fprintf(fp, ", \"%s\": ", k[i]);
        cli_json_number(fp, isnan(c->span_from) ? v[i] : i == 3 ? v[i] : NAN);
    }
    fprintf(fp, ", \"windows\": %zu, \"drift\": {\"verdict\": \"%s\", \"method\": \"%s\", "
            "\"windows\": %zu", count, drift_word(d), drift_method(d), d->windows);
    const char *dk[] = {"slope", "slope_se", "z", "p_value"};
    const double dv[] = {d->slope, d->se_slope, d->z, d->p_value};
    for (size_t i = 0; i < 4; i++) {
        fprintf(fp, ", \"%s\": ", dk[i]);
        cli_json_number(fp, dv[i]);
    }
    fputs("}}", fp);
}

/* The figure (--figures), with the drift test in words. */
static int draw(feedback_command *run, const cli_feedback_run *r, const feedback_config *c,
                const feedback_window *w, size_t count, const feedback_drift *d)
{
    char verdict[96];
    if (!isnan(c->span_from) || d->verdict == FEEDBACK_DRIFT_UNTESTED)
        snprintf(verdict, sizeof verdict, "not tested");
    else
        snprintf(verdict, sizeof verdict, "%s (p = %.3g)", drift_word(d), d->p_value);
    return cli_feedback_figure(run->figures, run->opts, r, w, count, verdict);
}

/* One input (or a member of an ensemble in one: NULL for none): its run made ready, the
 * windows fitted, rows, verdict, JSON, figure. */
static int feedback_run_one(feedback_command *run, const series_table *t, const double *branch,
                            const char *member)
{
    const cli_options *o = run->opts;
    cli_feedback_run r;
    feedback_config c;
    feedback_window *w = NULL;
    feedback_drift d;
    size_t count = 0;
    int rc = cli_feedback_take(o, t, &r);
    r.member = member;
    if (branch && branch[0]) {
        r.has_branch = 1;
        r.branch_parent_day = branch[1];
        r.branch_child_day = branch[2];
    }
    if (rc == EXIT_OK && run->has_baseline)
        rc = cli_feedback_anomalies(o, &run->baseline, &r);
    if (rc == EXIT_OK)
        rc = configure(o, &r, &c);
    if (rc == EXIT_OK && slowscan_feedback_window_count(r.time, r.n, &c, &count) != SLOWSCAN_OK) {
        cli_error("%s: no window fits the record with these options", r.source);
        rc = EXIT_BAD_INPUT;
    }
    if (rc == EXIT_OK && !(w = malloc(count * sizeof *w)))
        rc = EXIT_INTERNAL;
    if (rc == EXIT_OK && slowscan_feedback_run(r.time, r.flux, r.response, r.n, &c, w, count, &d)
                             != SLOWSCAN_OK) {
        cli_error("%s: the feedback regression failed", r.source);
        rc = EXIT_INTERNAL;
    }
    if (rc == EXIT_OK) {
        write_rows(run->out, o, &r, w, count);
        verdict(&r, &c, w, count, &d);
        if (run->json)
            write_json(run, &r, &c, count, &d);
        if (run->figures)
            rc = draw(run, &r, &c, w, count, &d);
    }
    free(w);
    cli_feedback_run_free(&r);
    return rc;
}

static int feedback_input(void *context, series_table *t, const double *branch)
{
    return feedback_run_one(context, t, branch, NULL);
}

static int feedback_member(void *context, const cli_forced_member *m)
{
    return feedback_run_one(context, &m->table, NULL, m->member);
}

static int run_inputs(const cli_options *opts, const cli_inputs *in, void *context)
{
    feedback_command *run = context;
    run->opts = opts;
    int rc = EXIT_OK;
    for (size_t f = 0; rc == EXIT_OK && f < in->ntables; f++) {
        if (opts->ensemble.on && (in->grid_cells[f] > 0 || in->columns[f])) {
            cli_error("option --ensemble: %s: give a CSV table of the members' columns (not a "
                      "NetCDF grid, nor a CSV read in parts)", opts->files[f]);
            rc = EXIT_BAD_INPUT;
        } else if (opts->ensemble.on)
            rc = cli_forced_ensemble(opts, &in->tables[f], opts->forced.response,
                                     opts->forced.flux, feedback_member, run);
        else if (in->grid_cells[f] > 0)
            rc = cli_feedback_grid(opts, opts->files[f], feedback_input, run);
        else if (in->columns[f]) {
            cli_error("%s: too large for feedback (a run is two columns; keep only those)",
                      opts->files[f]);
            rc = EXIT_BAD_INPUT;
        } else
            rc = feedback_input(run, &in->tables[f], NULL);
    }
    return rc;
}

static int finish(const cli_options *opts, void *context)
{
    (void)opts;
    feedback_command *run = context;
    if (run->json)
        fputs("\n  ]\n}\n", run->json);
    return EXIT_OK;
}

int cmd_feedback(const cli_options *opts)
{
    feedback_command run = {0};
    series_command cmd = {.open = open_outputs, .finish = finish, .context = &run,
                          .run = run_inputs};
    int rc = cli_run_series_command(opts, &cmd);
    if (run.has_baseline)
        slowscan_series_table_free(&run.baseline);
    return rc;
}
