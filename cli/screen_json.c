/* screen --json: the summary plus the null distribution's quantiles and every parameter
 * needed to reproduce the run (RFC 8259 JSON; non-finite numbers are written as null). */
#include "screen.h"
#include "slowscan/version.h"

#include <math.h>
#include <string.h>

static void json_length(FILE *fp, const char *key, const cli_length *len)
{
    fprintf(fp, "    \"%s\": ", key);
    cli_json_string(fp, len->text);
    fputs(",\n", fp);
}

static void write_parameters(FILE *fp, const cli_options *o)
{
    char surrogates[32]; /* --surrogates auto: the counts are per test in the rows */
    snprintf(surrogates, sizeof surrogates, o->surrogates_auto ? "\"auto\"" : "%ld", o->surrogates);
    fprintf(fp, "  \"program\": \"slowscan\",\n  \"version\": \"%s\",\n  \"parameters\": {\n",
            slowscan_version());
    fputs("    \"inputs\": [", fp);
    for (size_t f = 0; f < o->nfiles; f++) {
        fputs(f ? ", " : "", fp);
        cli_json_string(fp, o->files[f]);
    }
    fputs("],\n    \"time\": ", fp);
    o->time_column ? cli_json_string(fp, o->time_column) : (void)fputs("null", fp);
    fputs(",\n    \"vars\": ", fp);
    o->vars ? cli_json_string(fp, o->vars) : (void)fputs("null", fp);
    const struct { const char *key; double v; } numbers[] = {
        {"from", o->from}, {"until", o->until}, {"resample", o->resample},
        {"deseason", o->deseason}, {"min_coverage", o->min_coverage}, {"fdr", o->fdr},
        {"iaaft_tol", o->null_options.iaaft_tolerance}};
    for (size_t k = 0; k < sizeof numbers / sizeof numbers[0]; k++) {
        fprintf(fp, ",\n    \"%s\": ", numbers[k].key);
        cli_json_number(fp, numbers[k].v);
    }
    fprintf(fp, ",\n    \"log\": %s,\n    \"noise_trend\": %s,\n"
            "    \"recovery_trend_standard_error\": \"HC3\",\n    \"detrend\": ",
            o->log_values ? "true" : "false", o->noise_trend ? "true" : "false");
    cli_json_string(fp, o->detrend_text);
    fputs(",\n", fp);
    fputs("    \"deseason_window\": ", fp); /* null: the whole record */
    o->deseason_window.text ? cli_json_string(fp, o->deseason_window.text) : (void)fputs("null", fp);
    fputs(",\n    \"harmonics\": ", fp); /* null: not given (rows say what was used) */
    o->harmonics ? (void)fprintf(fp, "%ld", o->harmonics) : (void)fputs("null", fp);
    fputs(",\n", fp);
    json_length(fp, "bandwidth", &o->bandwidth);
    json_length(fp, "window", &o->window);
    fputs("    \"indicators\": ", fp);
    cli_json_string(fp, o->indicators_text);
    fputs(",\n    \"step\": ", fp); /* null: the default step of each indicator */
    o->step ? (void)fprintf(fp, "%ld", o->step) : (void)fputs("null", fp);
    fputs(",\n    \"band\": ", fp);
    o->band_text ? cli_json_string(fp, o->band_text) : (void)fputs("null", fp);
    fprintf(fp, ",\n    \"recovery\": \"%s\",\n    \"null\": \"%s\",\n    \"surrogates\": %s,\n"
            "    \"iaaft_iterations\": %d,\n    \"block_length\": %zu,\n    \"alternative\": \"%s\",\n"
            "    \"seed\": %lu\n  },\n",
            o->recovery == RECOVERY_INCREMENTS ? "increments" : "log",
            cli_null_name(o), surrogates,
            o->null_options.iaaft_max_iterations, o->null_options.block_length,
            o->alternative < 0 ? "per-indicator"
            : o->alternative == 0 ? "increasing"
            : o->alternative == 1 ? "decreasing" : "two-sided",
            o->seed);
}

/* The series' trend-leakage test (null when it could not be made). */
static void write_leakage(FILE *fp, const screen_row *row)
{
    fputs(", \"trend_leakage\": ", fp);
    if (!row->leakage_tested) {
        fputs("null", fp);
        return;
    }
    const detrend_leakage *l = &row->leakage;
    const detrend_edge *edges[2] = {&l->first, &l->last};
    fprintf(fp, "{\"level\": %g, \"leaking\": %s, \"residual_lag1\": ", l->level,
            l->leaking ? "true" : "false");
    cli_json_number(fp, l->r1);
    for (int e = 0; e < 2; e++) {
        fprintf(fp, ", \"%s\": {\"mean\": ", e ? "last" : "first");
        cli_json_number(fp, edges[e]->mean);
        fputs(", \"z\": ", fp);
        cli_json_number(fp, edges[e]->z);
        fputs(", \"p_value\": ", fp);
        cli_json_number(fp, edges[e]->p);
        fprintf(fp, ", \"samples\": %zu, \"effective_samples\": ", edges[e]->samples);
        cli_json_number(fp, edges[e]->effective);
        fputc('}', fp);
    }
    fputc('}', fp);
}

static void write_row(FILE *fp, const cli_options *o, const screen_row *row, int several, int seq)
{
    fputs("    {", fp);
    if (row->file && several) {
        fputs("\"file\": ", fp);
        cli_json_string(fp, row->file);
        fputs(", ", fp);
    }
    fputs("\"series\": ", fp);
    cli_json_string(fp, row->series);
    fputs(", \"time_unit\": ", fp);
    row->time_unit[0] ? cli_json_string(fp, row->time_unit) : (void)fputs("null", fp);
    fprintf(fp, ", \"indicator\": \"%s\", \"n\": %zu", slowscan_screen_test_name(row->result.kind), row->n);
    const struct { const char *key; double v; } cells[] = {
        {"window", row->window}, {"bandwidth", row->bandwidth}, {"tau", row->result.tau},
        {"statistic", row->result.statistic},
        {"p_value", row->result.p_value}, {"q_value", row->q_value}};
    for (size_t k = 0; k < sizeof cells / sizeof cells[0]; k++) {
        fprintf(fp, ", \"%s\": ", cells[k].key);
        cli_json_number(fp, cells[k].v);
    }
    fprintf(fp, ", \"flag\": \"%s\", \"deseason_harmonics\": ", slowscan_screen_flag_name(row->flag));
    /* the cycle removed from this series: null none, 0 the mean cycle, K harmonics */
    row->harmonics < 0 ? (void)fputs("null", fp) : (void)fprintf(fp, "%d", row->harmonics);
    /* recovery_trend: the statistic is t(a1) with the HC3 standard error; this one uses the
     * model-based (OLS, or WLS under --noise-trend) error, kept for comparison */
    fputs(", \"statistic_model_based\": ", fp);
    cli_json_number(fp, row->result.statistic_model);
    write_leakage(fp, row);
    fprintf(fp, ", \"null_count\": %zu, \"null_quantiles\": {", row->result.null_used);
    for (int q = 0; q < SCREEN_QUANTILES; q++) {
        fprintf(fp, "%s\"%g\": ", q ? ", " : "", screen_quantile_levels[q]);
        cli_json_number(fp, row->result.null_used ? row->result.quantile[q] : NAN);
    }
    fputs("}", fp);
    cli_screen_tail_json(fp, o, &row->result);
    if (seq) { /* --surrogates auto: the surrogates of this test and p's 95% interval */
        fprintf(fp, ", \"surrogates\": %zu, \"p_interval\": [", row->result.surrogates);
        cli_json_number(fp, row->p_low);
        fputs(", ", fp);
        cli_json_number(fp, row->p_high);
        fputs("]", fp);
    }
    if (row->role) { /* --ensemble */
        fprintf(fp, ", \"role\": \"%s\", \"share_flagged\": ", row->role);
        cli_json_number(fp, row->share_flagged);
    }
    fputs("}", fp);
}

typedef struct {
    FILE *fp;
    const cli_options *opts;
    size_t rows;
    int several; /* more than one input: each row names its file */
    int seq;     /* --surrogates auto */
} json_rows;

static int put_row(const screen_row *row, size_t index, void *context)
{
    const json_rows *j = context;
    write_row(j->fp, j->opts, row, j->several, j->seq);
    fputs(index + 1 < j->rows ? ",\n" : "\n", j->fp);
    return EXIT_OK;
}

int cli_screen_json(FILE *fp, const cli_options *opts, screen_run *run)
{
    fputs("{\n", fp);
    write_parameters(fp, opts);
    cli_screen_tail_parameters(fp, opts);
    if (run->seq)
        cli_sequential_json(fp, run->seq);
    cli_ensemble_json(fp, run);
    fputs("  \"results\": [\n", fp);
    json_rows rows = {fp, opts, slowscan_screen_store_tests(run->store) + cli_ensemble_rows(run),
                      cli_several_inputs(opts), opts->surrogates_auto};
    int rc = cli_screen_each_row(run, put_row, &rows);
    fputs("  ]\n}\n", fp);
    return rc;
}
