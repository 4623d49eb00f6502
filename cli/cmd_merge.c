/* slowscan merge: the summaries of a field screened in parts (several jobs, each a share of
 * the series) as one run: every row kept as written, the q-values recomputed by
 * Benjamini-Hochberg over the tests of all parts and the flags decided again — the library's
 * own decision (slowscan_screen_decide), so the result is the summary one run over all the
 * series would have written, when the parts used the same options. */
#include "cli.h"
#include "slowscan/status.h"

#include <csv.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

enum { MAX_COLUMNS = 16 };

/* One summary row: its fields as read, and what the decision needs. */
typedef struct {
    char *field[MAX_COLUMNS];
    screen_test test; /* p_value and statistic; kind unused */
    screen_flag flag; /* as written, kept for rows without a p-value */
} merge_row;

typedef struct {
    const char *path;
    char *header[MAX_COLUMNS];
    size_t ncols, field, line;
    merge_row *rows;
    size_t nrows, cap;
    int status;
    char *cell[MAX_COLUMNS];
} merge_reader;

static void on_field(void *data, size_t len, void *context)
{
    merge_reader *m = context;
    if (m->field < MAX_COLUMNS && !m->status) {
        char *copy = malloc(len + 1);
        if (copy) {
            memcpy(copy, data ? data : "", len);
            copy[len] = '\0';
        }
        m->cell[m->field] = copy;
        m->status = copy ? 0 : EXIT_INTERNAL;
    }
    m->field++;
}

/* The column named `name` in the header, or -1. */
static long column(const merge_reader *m, const char *name)
{
    for (size_t c = 0; c < m->ncols; c++)
        if (strcmp(m->header[c], name) == 0)
            return (long)c;
    return -1;
}

static screen_flag flag_named(const char *name)
{
    for (int f = 0; f <= SCREEN_FLAG_INSUFFICIENT; f++)
        if (strcmp(slowscan_screen_flag_name((screen_flag)f), name) == 0)
            return (screen_flag)f;
    return SCREEN_FLAG_UNTESTED;
}

/* A number of a row: NA (as screen writes a missing one), or a finite number within
 * [lo, hi]. Anything else — text, a p-value above 1 — used to be taken as NA, and the row
 * left out of BH silently, or fed into it, changing every q of the run. */
static double number_of(merge_reader *m, const merge_row *r, const char *name, double lo,
                        double hi)
{
    const char *text = r->field[column(m, name)];
    if (!text || strcmp(text, "NA") == 0)
        return NAN;
    char *end;
    double v = strtod(text, &end);
    if (end == text || *end != '\0' || !isfinite(v) || v < lo || v > hi) {
        char range[64] = "a finite number";
        if (isfinite(lo))
            snprintf(range, sizeof range, "a number from %g to %g", lo, hi);
        cli_error("%s: row %zu, column '%s': \"%.40s\" is not NA or %s", m->path, m->line,
                  name, text, range);
        m->status = EXIT_BAD_INPUT;
        return NAN;
    }
    return v;
}

/* A complete record: the header (first), or a row checked against it. */
static void on_row(int c, void *context)
{
    (void)c;
    merge_reader *m = context;
    size_t n = m->field < MAX_COLUMNS ? m->field : MAX_COLUMNS;
    m->field = 0;
    m->line++;
    if (m->status || n == 0)
        goto done;
    if (m->ncols == 0) {
        memcpy(m->header, m->cell, n * sizeof *m->cell);
        m->ncols = n;
        memset(m->cell, 0, sizeof m->cell);
        static const char *const needed[] = {"series", "statistic", "p_value", "q_value", "flag"};
        for (size_t k = 0; k < sizeof needed / sizeof needed[0] && !m->status; k++)
            if (column(m, needed[k]) < 0) {
                cli_error("%s: no column '%s': not a summary written by 'slowscan screen'",
                          m->path, needed[k]);
                m->status = EXIT_BAD_INPUT;
            }
        return;
    }
    if (n != m->ncols) {
        cli_error("%s: row %zu has %zu fields but the header has %zu", m->path, m->line, n,
                  m->ncols);
        m->status = EXIT_BAD_INPUT;
        goto done;
    }
    void *rows = m->rows;
    if (slowscan_io_reserve(&rows, &m->cap, m->nrows, sizeof *m->rows, 256) != SLOWSCAN_OK) {
        m->status = EXIT_INTERNAL;
        goto done;
    }
    m->rows = rows;
    merge_row *r = &m->rows[m->nrows++];
    memset(r, 0, sizeof *r);
    memcpy(r->field, m->cell, n * sizeof *m->cell);
    memset(m->cell, 0, sizeof m->cell);
    r->test.p_value = number_of(m, r, "p_value", 0, 1);
    r->test.statistic = number_of(m, r, "statistic", -HUGE_VAL, HUGE_VAL);
    r->flag = flag_named(r->field[column(m, "flag")]);
    return;
done:
    for (size_t k = 0; k < MAX_COLUMNS; k++) {
        free(m->cell[k]);
        m->cell[k] = NULL;
    }
}

static int read_part(merge_reader *m)
{
    FILE *fp = strcmp(m->path, "-") == 0 ? stdin : fopen(m->path, "rb");
    if (!fp) {
        cli_error("%s: cannot open the file", m->path);
        return EXIT_BAD_INPUT;
    }
    struct csv_parser p;
    if (csv_init(&p, CSV_STRICT | CSV_STRICT_FINI | CSV_APPEND_NULL) != 0) {
        if (fp != stdin)
            fclose(fp);
        return EXIT_INTERNAL;
    }
    char buf[1 << 16];
    size_t got;
    int parse_failed = 0;
    while (!m->status && !parse_failed && (got = fread(buf, 1, sizeof buf, fp)) > 0)
        parse_failed = csv_parse(&p, buf, got, on_field, on_row, m) != got;
    if (!m->status && !parse_failed)
        parse_failed = csv_fini(&p, on_field, on_row, m) != 0;
    csv_free(&p);
    if (fp != stdin)
        fclose(fp);
    if (!m->status && parse_failed) {
        cli_error("%s: row %zu: malformed CSV", m->path, m->line + 1);
        m->status = EXIT_BAD_INPUT;
    }
    if (!m->status && m->ncols == 0) {
        cli_error("%s: the file is empty", m->path);
        m->status = EXIT_BAD_INPUT;
    }
    return m->status;
}

static void free_part(merge_reader *m)
{
    for (size_t r = 0; r < m->nrows; r++)
        for (size_t c = 0; c < m->ncols; c++)
            free(m->rows[r].field[c]);
    for (size_t c = 0; c < MAX_COLUMNS; c++) {
        free(m->header[c]);
        free(m->cell[c]);
    }
    free(m->rows);
}

/* Every part's rows in order, the q-values and flags of all of them decided at once. */
static int decide_all(merge_reader *parts, size_t nparts, double fdr, double **q,
                      screen_flag **flags, size_t *total)
{
    *total = 0;
    for (size_t f = 0; f < nparts; f++)
        *total += parts[f].nrows;
    const screen_test **tests = malloc((*total + 1) * sizeof *tests);
    *q = malloc((*total + 1) * sizeof **q);
    *flags = malloc((*total + 1) * sizeof **flags);
    int st = tests && *q && *flags ? SLOWSCAN_OK : SLOWSCAN_ENOMEM;
    for (size_t f = 0, i = 0; st == SLOWSCAN_OK && f < nparts; f++)
        for (size_t r = 0; r < parts[f].nrows; r++)
            tests[i++] = &parts[f].rows[r].test;
    if (st == SLOWSCAN_OK)
        st = slowscan_screen_decide(tests, *total, fdr, *q, *flags);
    free(tests);
    return st;
}

/* A row as read, but its q-value and its flag (when it has a p-value) decided again. */
static void write_row(FILE *out, const merge_reader *m, const merge_row *r, double q,
                      screen_flag flag)
{
    long qc = column(m, "q_value"), fc = column(m, "flag");
    for (size_t c = 0; c < m->ncols; c++) {
        if (c)
            fputc(',', out);
        if ((long)c == qc)
            cli_put_number(out, isnan(r->test.p_value) ? NAN : q);
        else if ((long)c == fc)
            fputs(slowscan_screen_flag_name(isnan(r->test.p_value) ? r->flag : flag), out);
        else
            cli_put_field(out, r->field[c]);
    }
    fputc('\n', out);
}

static int write_merged(const cli_options *opts, merge_reader *parts, size_t nparts,
                        const double *q, const screen_flag *flags)
{
    cli_outputs outs = {0};
    FILE *out = NULL;
    int rc = cli_outputs_open(&outs, opts, opts->output, "-o", &out);
    for (size_t c = 0; rc == EXIT_OK && c < parts[0].ncols; c++) {
        if (c)
            fputc(',', out);
        fputs(parts[0].header[c], out);
    }
    if (rc == EXIT_OK)
        fputc('\n', out);
    for (size_t f = 0, i = 0; rc == EXIT_OK && f < nparts; f++)
        for (size_t r = 0; r < parts[f].nrows; r++, i++)
            write_row(out, &parts[f], &parts[f].rows[r], q[i], flags[i]);
    if (rc == EXIT_OK)
        rc = cli_outputs_commit(&outs);
    else
        cli_outputs_abort(&outs);
    return rc;
}

/* The parts must have the same columns (the same options wrote them). */
static int same_columns(const merge_reader *a, const merge_reader *b)
{
    if (a->ncols != b->ncols)
        return 0;
    for (size_t c = 0; c < a->ncols; c++)
        if (strcmp(a->header[c], b->header[c]) != 0)
            return 0;
    return 1;
}

int cmd_merge(const cli_options *opts)
{
    merge_reader *parts = calloc(opts->nfiles, sizeof *parts);
    if (!parts)
        return EXIT_INTERNAL;
    int rc = EXIT_OK;
    for (size_t f = 0; rc == EXIT_OK && f < opts->nfiles; f++) {
        parts[f].path = opts->files[f];
        /* a part given twice would count its tests twice in BH */
        for (size_t g = 0; g < f && rc == EXIT_OK; g++)
            if (slowscan_io_same_file(opts->files[f], opts->files[g])) {
                cli_error("%s: the same summary is given twice", opts->files[f]);
                rc = EXIT_BAD_INPUT;
            }
        if (rc == EXIT_OK)
            rc = read_part(&parts[f]);
        if (rc == EXIT_OK && f > 0 && !same_columns(&parts[0], &parts[f])) {
            cli_error("%s: its columns are not those of %s: parts of one run are written by "
                      "the same command", parts[f].path, parts[0].path);
            rc = EXIT_BAD_INPUT;
        }
    }
    double *q = NULL;
    screen_flag *flags = NULL;
    size_t total = 0;
    if (rc == EXIT_OK && decide_all(parts, opts->nfiles, opts->fdr, &q, &flags, &total) !=
                             SLOWSCAN_OK) {
        cli_error("out of memory");
        rc = EXIT_INTERNAL;
    }
    if (rc == EXIT_OK)
        rc = write_merged(opts, parts, opts->nfiles, q, flags);
    for (size_t f = 0; f < opts->nfiles; f++)
        free_part(&parts[f]);
    free(parts);
    free(q);
    free(flags);
    return rc;
}
