/* CSV input with libcsv: the byte stream (64 KiB chunks, so standard input works and memory
 * grows with the selected columns only), the UTF-8 byte-order mark, delimiter detection,
 * file-row bookkeeping and the data rows. The header record is handled in csv_header.c. */
#include "io_internal.h"

#include <csv.h>
#include <errno.h>
#include <math.h>
#include <stdarg.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>

enum { CHUNK = 1 << 16, SHOWN_CELL = 60 };

int csv_failf(csv_reader *r, int status, const char *fmt, ...)
{
    if (r->status != SLOWSCAN_OK)
        return r->status;
    char what[900];
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(what, sizeof what, fmt, ap);
    va_end(ap);
    r->status = io_fail(r->err, status, "%s: %s", r->name, what);
    return r->status;
}

char *csv_trim(char *s, size_t *len)
{
    while (*len && (*s == ' ' || *s == '\t'))
        s++, (*len)--;
    while (*len && (s[*len - 1] == ' ' || s[*len - 1] == '\t'))
        (*len)--;
    s[*len] = '\0';
    return s;
}

/* A cell: NaN for empty / NA / NaN (any case); else 0 and a finite number, 1 not a number,
 * 2 not finite (inf, Infinity, or too large for a double). */
int csv_cell_number(const char *s, double *v)
{
    /* the words only when the first letter could start them: two strcasecmp calls per cell
     * were a twentieth of loading a wide table of numbers */
    int word = *s == 'n' || *s == 'N';
    if (!*s || (word && (!strcasecmp(s, "NA") || !strcasecmp(s, "NaN")))) {
        *v = NAN;
        return 0;
    }
    /* strtod also reads C's hexadecimal forms (0x10 as 16, 0x1p3 as 8); in a data file
     * "0x10" is far more likely a code or a typo than sixteen, so it is not a number. */
    const char *digits = s + (*s == '+' || *s == '-');
    if (digits[0] == '0' && (digits[1] == 'x' || digits[1] == 'X'))
        return 1;
    if (io_decimal_exact(s, v))
        return 0;
    char *end;
    errno = 0;
    *v = strtod(s, &end);
    if (end == s || *end != '\0')
        return 1;
    /* ERANGE also flags underflow (a tiny value rounded toward 0), which is harmless. */
    if (!isfinite(*v) || (errno == ERANGE && fabs(*v) > 1))
        return 2;
    return 0;
}

/* A selected cell of a data record. A bad cell is remembered, not reported at once, so that
 * a ragged record is reported as ragged (its cells are probably shifted). */
static void data_field(csv_reader *r, char *s, size_t len)
{
    if (r->field >= r->ncols || r->role[r->field] == IO_ROLE_SKIP)
        return;
    char *cell = csv_trim(s, &len);
    double v;
    long role = r->role[r->field];
    if (role == IO_ROLE_TIME) {
        char why[200];
        if (time_reader_cell(&r->time, cell, &v, why, sizeof why) != SLOWSCAN_OK &&
            !r->cell_status) {
            r->cell_status = SLOWSCAN_EINVAL;
            snprintf(r->cell_msg, sizeof r->cell_msg, "row %zu, column '%s': \"%.*s%s\" %s",
                     r->line, r->header[r->field], SHOWN_CELL, cell,
                     len > SHOWN_CELL ? "..." : "", why);
        }
        r->row_values[0] = v;
        return;
    }
    int bad = csv_cell_number(cell, &v);
    /* Without --vars, a column whose first value is text (a station id, a flag column) is
     * not a series: it is left out with a notice. A column that starts with numbers and then
     * holds text is a broken series, refused below. */
    if (bad == 1 && !r->options->vars && r->series_state[role] != SERIES_NUMERIC) {
        if (!r->first_text[0]) /* said when no column holds numbers at all */
            snprintf(r->first_text, sizeof r->first_text, "row %zu, column '%s': \"%.*s%s\" is "
                     "not a number", r->line, r->header[r->field], SHOWN_CELL, cell,
                     len > SHOWN_CELL ? "..." : "");
        r->series_state[role] = SERIES_TEXT;
        r->role[r->field] = IO_ROLE_SKIP;
        r->row_values[role + 1] = NAN;
        return;
    }
    if (!bad && !isnan(v))
        r->series_state[role] = SERIES_NUMERIC;
    if (!bad && io_missing_code(r->options, v)) {
        v = NAN;
        r->t->coded_missing++;
    }
    if (bad && !r->cell_status) {
        r->cell_status = SLOWSCAN_EINVAL;
        snprintf(r->cell_msg, sizeof r->cell_msg, "row %zu, column '%s': \"%.*s%s\" is not a %s",
                 r->line, r->header[r->field], SHOWN_CELL, cell, len > SHOWN_CELL ? "..." : "",
                 bad == 1 ? "number" : "finite number");
    }
    r->row_values[role + 1] = v;
}

static void on_field(void *data, size_t len, void *context)
{
    csv_reader *r = context;
    char empty[1] = {0};
    char *s = data ? data : empty;
    if (!data)
        len = 0;
    /* Line feeds inside quoted fields move the file row on without ending the record. */
    for (const char *p = s; (p = memchr(p, '\n', len - (size_t)(p - s))) != NULL; p++)
        r->record_nl++;
    /* A NUL byte would end the cell for every C string function after this one: "1<NUL>2"
     * would be read as 1. Text files do not hold NUL bytes; binary ones (a NetCDF or
     * spreadsheet file given as CSV) do. */
    if (memchr(s, '\0', len)) {
        if (r->in_header || r->field >= r->ncols)
            csv_failf(r, SLOWSCAN_EINVAL, "row %zu, field %zu: a NUL byte (is this a binary "
                      "file rather than a text table?)", r->line, r->field + 1);
        else
            csv_failf(r, SLOWSCAN_EINVAL, "row %zu, column '%s': a NUL byte (is this a binary "
                      "file rather than a text table?)", r->line, r->header[r->field]);
    }
    if (r->status == SLOWSCAN_OK) {
        if (r->in_header)
            csv_header_field(r, s, len);
        else
            data_field(r, s, len);
    }
    r->field++;
}

static int grow_data(csv_reader *r)
{
    series_table *t = r->t;
    if (t->n < r->cap)
        return SLOWSCAN_OK;
    size_t cap = r->cap ? 2 * r->cap : 1024;
    double *time = realloc(t->time, cap * sizeof *time);
    if (time)
        t->time = time;
    size_t *rows = time ? realloc(t->rows, cap * sizeof *rows) : NULL;
    if (rows)
        t->rows = rows;
    int bad = !time || !rows;
    for (size_t k = 0; k < t->nseries && !bad && !r->rows_out; k++) {
        double *v = realloc(t->values[k], cap * sizeof *v);
        if (v)
            t->values[k] = v;
        bad = !v;
    }
    if (bad)
        return csv_failf(r, SLOWSCAN_ENOMEM, "out of memory at row %zu", r->line);
    r->cap = cap;
    return SLOWSCAN_OK;
}

/* A data record is complete: check its shape, its cells and its time, then store it. */
static void store_row(csv_reader *r)
{
    series_table *t = r->t;
    if (r->field != r->ncols) {
        csv_failf(r, SLOWSCAN_EINVAL, "row %zu has %zu fields but the header has %zu columns",
                  r->line, r->field, r->ncols);
        return;
    }
    if (r->cell_status) {
        csv_failf(r, r->cell_status, "%s", r->cell_msg);
        return;
    }
    double time = r->row_values[0];
    if (isnan(time)) {
        csv_failf(r, SLOWSCAN_EINVAL, "row %zu, column '%s': the time is missing", r->line,
                  t->time_name);
        return;
    }
    /* ages may run either way; the first two rows say which, the rest must follow */
    if (t->n == 1 && r->options->age && time < t->time[0])
        r->direction = -1;
    if (t->n > 0 && !((time - t->time[t->n - 1]) * r->direction > 0)) {
        char now[64], before[64];
        time_reader_text(&r->time, time, now, sizeof now);
        time_reader_text(&r->time, t->time[t->n - 1], before, sizeof before);
        if (r->options->age)
            csv_failf(r, SLOWSCAN_EINVAL, "row %zu: age %s does not continue the order of the "
                      "rows above (previous age %s; ages must all rise or all fall)", r->line,
                      now, before);
        else
            csv_failf(r, SLOWSCAN_EINVAL, "row %zu: time %s is not greater than the previous "
                      "time %s (rows must be in increasing time order)", r->line, now, before);
        return;
    }
    if (grow_data(r) != SLOWSCAN_OK)
        return;
    t->time[t->n] = time;
    t->rows[t->n] = r->line;
    if (r->rows_out) {
        if (fwrite(r->row_values + 1, sizeof(double), t->nseries, r->rows_out) != t->nseries) {
            char why[128];
            csv_failf(r, SLOWSCAN_EIO, "row %zu: cannot write the temporary copy of the table: "
                      "%s", r->line, io_strerror(errno, why, sizeof why));
            return;
        }
    } else {
        for (size_t k = 0; k < t->nseries; k++)
            t->values[k][t->n] = r->row_values[k + 1];
    }
    t->n++;
}

/* End of a record. With CSV_REPALL_NL libcsv reports every unquoted CR and LF, blank lines
 * included (as records without fields), so the file row can be counted exactly: the LF of
 * a CRLF arrives as an empty record right after a CR and must not count twice. */
static void on_row(int c, void *context)
{
    csv_reader *r = context;
    int blank = r->field == 0;
    if (!blank && r->status == SLOWSCAN_OK) {
        if (r->in_header)
            csv_header_end(r);
        else
            store_row(r);
    }
    r->line += r->record_nl;
    if (c == '\r' || (c == '\n' && !(blank && r->prev_cr)))
        r->line++;
    r->prev_cr = c == '\r';
    r->record_nl = 0;
    r->field = 0;
    r->cell_status = 0;
}

/* Delimiter detection state, kept across chunks so a long header is scanned once. */
typedef struct {
    size_t pos, comma, semicolon, tab;
    int quoted, blank;
    int line_start, comment; /* a '#' in the first column makes the line a comment */
} detector;

/* Scans the first non-blank line (up to a line end outside double quotes); returns 1 with
 * *delim set once it is complete or the input has ended: the most frequent of , ; TAB
 * outside quotes, ties going to comma, then semicolon. */
static int detect_delimiter(detector *d, const char *buf, size_t len, int at_end,
                            unsigned char *delim)
{
    int complete = 0;
    for (; d->pos < len && !complete; d->pos++) {
        char c = buf[d->pos];
        int at_start = d->line_start;
        d->line_start = 0;
        if (d->comment || (at_start && c == '#' && !d->quoted)) {
            d->comment = c != '\n' && c != '\r';
            d->line_start = !d->comment;
            continue;
        }
        if (c == '"') {
            d->quoted = !d->quoted;
            d->blank = 0;
        } else if (d->quoted) {
            continue;
        } else if (c == '\n' || c == '\r') {
            d->line_start = 1;
            complete = !d->blank; /* blank lines before the header are skipped, as libcsv does */
            if (!complete)
                d->comma = d->semicolon = d->tab = 0;
        } else {
            d->comma += c == ',', d->semicolon += c == ';', d->tab += c == '\t';
            d->blank = d->blank && (c == ' ' || c == '\t');
        }
    }
    if (!complete && !at_end)
        return 0;
    *delim = ',';
    if (d->semicolon > d->comma && d->semicolon >= d->tab)
        *delim = ';';
    else if (d->tab > d->comma && d->tab > d->semicolon)
        *delim = '\t';
    return 1;
}

/* What a file that is not a text table starts with, when it says so by its first bytes: a
 * named refusal instead of one about a NUL byte or a garbled header. */
static const char *foreign_format(const unsigned char *b, size_t len)
{
    static const struct {
        const char *magic;
        size_t len;
        const char *what;
    } formats[] = {
        {"\xFF\xFE", 2, "UTF-16 text (save it as UTF-8)"},
        {"\xFE\xFF", 2, "UTF-16 text (save it as UTF-8)"},
        {"\x1F\x8B", 2, "gzip-compressed (decompress it first)"},
        {"PK\x03\x04", 4, "a zip archive or a spreadsheet (export the sheet as CSV)"},
        {"CDF\x01", 4, "NetCDF (give its path, not standard input)"},
        {"CDF\x02", 4, "NetCDF (give its path, not standard input)"},
        {"CDF\x05", 4, "NetCDF (give its path, not standard input)"},
        {"\x89HDF\r\n\x1a\n", 8, "HDF5 or NetCDF-4 (give its path, not standard input)"},
    };
    for (size_t k = 0; k < sizeof formats / sizeof formats[0]; k++)
        if (len >= formats[k].len && !memcmp(b, formats[k].magic, formats[k].len))
            return formats[k].what;
    return NULL;
}

/* Reads chunks until the header line is in *buf, so the delimiter is known before libcsv
 * sees a byte. *skip is 3 when the input starts with a UTF-8 byte-order mark. */
static int read_head(csv_reader *r, FILE *fp, char **buf, size_t *len, size_t *skip,
                     unsigned char *delim)
{
    size_t cap = 0;
    detector d = {0, 0, 0, 0, 0, 1, 1, 0};
    for (*len = 0;;) {
        if (cap - *len < CHUNK) {
            char *b = realloc(*buf, cap + 2 * CHUNK);
            if (!b)
                return csv_failf(r, SLOWSCAN_ENOMEM, "out of memory reading the header");
            *buf = b;
            cap += 2 * CHUNK;
        }
        size_t got = fread(*buf + *len, 1, CHUNK, fp);
        if (got == 0 && ferror(fp)) {
            char why[128];
            return csv_failf(r, SLOWSCAN_EIO, "cannot read the file: %s",
                             io_strerror(errno, why, sizeof why));
        }
        if (*len == 0 && got >= 3 && !memcmp(*buf, "\xEF\xBB\xBF", 3))
            d.pos = *skip = 3;
        const char *foreign = *len == 0 ? foreign_format((unsigned char *)*buf, got) : NULL;
        if (foreign)
            return csv_failf(r, SLOWSCAN_EINVAL, "not a text table: the file is %s", foreign);
        *len += got;
        if (detect_delimiter(&d, *buf, *len, got == 0, delim))
            return SLOWSCAN_OK;
    }
}

/* Blanks out comment lines — a '#' in the first column, outside a quoted field — keeping
 * their line ends, so that libcsv sees an empty line (which it skips) and file rows still
 * count. In place: the text only shrinks. The state carries across chunks. */
static size_t drop_comments(csv_reader *r, char *s, size_t len)
{
    size_t out = 0;
    for (size_t i = 0; i < len; i++) {
        char c = s[i];
        int at_start = r->filter.line_start;
        r->filter.line_start = 0;
        if (r->filter.comment || (at_start && c == '#' && !r->filter.quoted)) {
            r->filter.comment = c != '\n' && c != '\r';
            if (r->filter.comment)
                continue;
        } else if (c == '"') {
            r->filter.quoted = !r->filter.quoted;
        }
        r->filter.line_start = !r->filter.quoted && (c == '\n' || c == '\r');
        s[out++] = c;
    }
    return out;
}

static void feed(csv_reader *r, struct csv_parser *p, char *s, size_t len)
{
    len = drop_comments(r, s, len);
    if (len == 0 || csv_parse(p, s, len, on_field, on_row, r) == len)
        return;
    int e = csv_error(p);
    if (e == CSV_EPARSE)
        csv_failf(r, SLOWSCAN_EINVAL, "row %zu: malformed CSV (%s): a double quote inside a field "
                  "must be doubled and the field quoted", r->line, csv_strerror(e));
    else
        csv_failf(r, SLOWSCAN_ENOMEM, "out of memory at row %zu (%s)", r->line, csv_strerror(e));
}

static int parse_stream(csv_reader *r, FILE *fp)
{
    char *buf = NULL, why[128];
    size_t len = 0, skip = 0;
    unsigned char delim = ',';
    struct csv_parser p;
    if (read_head(r, fp, &buf, &len, &skip, &delim) != SLOWSCAN_OK ||
        csv_init(&p, CSV_STRICT | CSV_STRICT_FINI | CSV_APPEND_NULL | CSV_REPALL_NL) != 0) {
        free(buf);
        return csv_failf(r, SLOWSCAN_ENOMEM, "out of memory");
    }
    csv_set_delim(&p, delim);
    feed(r, &p, buf + skip, len - skip);
    while (r->status == SLOWSCAN_OK && (len = fread(buf, 1, CHUNK, fp)) > 0)
        feed(r, &p, buf, len);
    if (r->status == SLOWSCAN_OK && ferror(fp))
        csv_failf(r, SLOWSCAN_EIO, "cannot read the file: %s", io_strerror(errno, why, sizeof why));
    /* csv_fini submits a last record without a line end; with CSV_STRICT_FINI it fails
     * when the input ends inside a quoted field. */
    if (r->status == SLOWSCAN_OK && csv_fini(&p, on_field, on_row, r) != 0)
        csv_failf(r, SLOWSCAN_EINVAL, "row %zu: malformed CSV: a quoted field is not closed "
                  "before the end of the file", r->line);
    csv_free(&p);
    free(buf);
    return r->status;
}

/* Takes the text columns out of the series (their names move to table->skipped) and notes
 * the file column of each series kept. */
static int drop_text_series(csv_reader *r)
{
    series_table *t = r->t;
    size_t kept = 0, ntext = 0;
    if (!(r->file_column = malloc((t->nseries ? t->nseries : 1) * sizeof *r->file_column)))
        return csv_failf(r, SLOWSCAN_ENOMEM, "out of memory");
    for (size_t k = 0; k < t->nseries; k++)
        ntext += r->series_state[k] == SERIES_TEXT;
    if (ntext == t->nseries && ntext > 0)
        return csv_failf(r, SLOWSCAN_EINVAL, "%s (no column besides the time column '%s' "
                         "holds numbers)", r->first_text, t->time_name);
    if (ntext > 0 && !(t->skipped = calloc(ntext, sizeof *t->skipped)))
        return csv_failf(r, SLOWSCAN_ENOMEM, "out of memory");
    for (size_t k = 0; k < t->nseries; k++) {
        if (r->series_state[k] == SERIES_TEXT) {
            t->skipped[t->nskipped++] = t->names[k];
            free(t->values[k]);
            continue;
        }
        r->file_column[kept] = k;
        t->names[kept] = t->names[k];
        t->values[kept++] = t->values[k];
    }
    t->nseries = kept;
    return SLOWSCAN_OK;
}

/* Rows stored youngest age first run backward in time: turned round. */
static void reverse_rows(series_table *t)
{
    for (size_t i = 0, j = t->n - 1; i < j; i++, j--) {
        double tt = t->time[i];
        t->time[i] = t->time[j], t->time[j] = tt;
        size_t rr = t->rows[i];
        t->rows[i] = t->rows[j], t->rows[j] = rr;
        for (size_t k = 0; k < t->nseries && t->values[k]; k++) {
            double v = t->values[k][i];
            t->values[k][i] = t->values[k][j], t->values[k][j] = v;
        }
    }
}

/* Gives back the unused part of the doubling arrays (a failed shrink keeps the larger one). */
static void shrink_data(series_table *t)
{
    double *time = realloc(t->time, t->n * sizeof *time);
    if (time)
        t->time = time;
    size_t *rows = realloc(t->rows, t->n * sizeof *rows);
    if (rows)
        t->rows = rows;
    for (size_t k = 0; k < t->nseries && t->values[k]; k++) {
        double *v = realloc(t->values[k], t->n * sizeof *v);
        if (v)
            t->values[k] = v;
    }
}

static void reader_free(csv_reader *r)
{
    for (size_t c = 0; c < r->ncols; c++)
        free(r->header[c]);
    free(r->header);
    free(r->role);
    free(r->row_values);
}

csv_read_options slowscan_csv_read_options_default(void)
{
    csv_read_options o = {.time_column = NULL, .vars = NULL, .calendar = CALENDAR_STANDARD,
                          .time_format = NULL, .units = NULL, .age = 0, .missing = NULL,
                          .nmissing = 0};
    return o;
}

int csv_read(const char *path, const csv_read_options *options, series_table *t, FILE *rows_out,
             size_t **file_column, int *backward, io_error *err)
{
    const csv_read_options defaults = slowscan_csv_read_options_default();
    if (err)
        err->message[0] = '\0';
    if (!t || !path)
        return io_fail(err, SLOWSCAN_EINVAL, "slowscan_csv_read_table: no %s given", t ? "file" : "table");
    memset(t, 0, sizeof *t);
    int is_stdin = strcmp(path, "-") == 0;
    csv_reader r = {.name = io_display_name(path), .err = err, .options = options ? options : &defaults,
                    .t = t, .in_header = 1, .line = 1, .filter = {.line_start = 1},
                    .direction = 1, .rows_out = rows_out};
    FILE *fp = is_stdin ? stdin : fopen(path, "rb");
    if (!fp) {
        char why[128];
        return io_fail(err, SLOWSCAN_EIO, "%s: cannot open the file: %s", path,
                       io_strerror(errno, why, sizeof why));
    }
    time_reader_init(&r.time, r.options);
    if (!(t->source = io_strdup(path)))
        csv_failf(&r, SLOWSCAN_ENOMEM, "out of memory");
    else
        parse_stream(&r, fp);
    if (!is_stdin)
        fclose(fp);
    if (r.status == SLOWSCAN_OK && r.in_header)
        csv_failf(&r, SLOWSCAN_EINVAL, "the file is empty (a header row and data rows are needed)");
    else if (r.status == SLOWSCAN_OK && t->n == 0)
        csv_failf(&r, SLOWSCAN_EINVAL, "the file has a header but no data rows");
    reader_free(&r);
    if (r.status == SLOWSCAN_OK && drop_text_series(&r) == SLOWSCAN_OK) {
        shrink_data(t);
        if (r.direction < 0)
            reverse_rows(t);
        time_reader_settle(&r.time, t->time, t->n, &t->axis);
    }
    free(r.series_state);
    if (r.status != SLOWSCAN_OK)
        slowscan_series_table_free(t);
    if (backward)
        *backward = r.direction < 0;
    if (file_column && r.status == SLOWSCAN_OK)
        *file_column = r.file_column;
    else
        free(r.file_column);
    return r.status;
}

int slowscan_csv_read_table(const char *path, const csv_read_options *options, series_table *t,
                            io_error *err)
{
    return csv_read(path, options, t, NULL, NULL, NULL, err);
}
