/* CSV input with libcsv: header row, detected delimiter, selected columns, strict numbers.
 * The file is parsed in chunks, so memory grows with the selected columns only. */
#include "io_internal.h"

#include <csv.h>
#include <errno.h>
#include <math.h>
#include <stdarg.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>

enum { CHUNK = 1 << 16, MAX_COLUMNS = 1 << 20 };

typedef struct {
    const char *path;
    io_error *err;
    int status;   /* the first error wins; later callbacks do nothing */
    size_t row;   /* 1-based record number being parsed (header = 1) */
    size_t field; /* field index within the current row */
    char **header;
    size_t ncols, header_cap;
    long *role; /* per file column: -1 unused, 0 the time, k+1 series k */
    const csv_read_options *options;
    series_table *t;
    size_t cap;         /* capacity of every data array */
    double *row_values; /* selected cells of the row being parsed: [0] time, [k+1] series k */
} csv_reader;

static int failf(csv_reader *r, int status, const char *fmt, ...) __attribute__((format(printf, 3, 4)));
static int failf(csv_reader *r, int status, const char *fmt, ...)
{
    if (r->status != SLOWSCAN_OK)
        return r->status;
    char what[900];
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(what, sizeof what, fmt, ap);
    va_end(ap);
    r->status = io_fail(r->err, status, "%s: %s", r->path, what);
    return r->status;
}

static char *trimmed(char *s, size_t *len)
{
    while (*len && (*s == ' ' || *s == '\t'))
        s++, (*len)--;
    while (*len && (s[*len - 1] == ' ' || s[*len - 1] == '\t'))
        (*len)--;
    s[*len] = '\0';
    return s;
}

/* A cell: NaN for empty / NA / NaN; else 0 and a finite number, 1 not a number, 2 infinite. */
static int parse_cell(const char *s, double *v)
{
    if (!*s || !strcasecmp(s, "NA") || !strcasecmp(s, "NaN")) {
        *v = NAN;
        return 0;
    }
    char *end;
    errno = 0;
    *v = strtod(s, &end);
    if (end == s || *end != '\0')
        return 1;
    if (!isfinite(*v) || (errno == ERANGE && fabs(*v) > 1))
        return 2;
    return 0;
}

static void add_header_field(csv_reader *r, char *s, size_t len)
{
    if (r->ncols == MAX_COLUMNS) {
        failf(r, SLOWSCAN_EINVAL, "row 1: more than %d columns", MAX_COLUMNS);
        return;
    }
    if (r->ncols == r->header_cap) {
        size_t cap = r->header_cap ? 2 * r->header_cap : 16;
        char **h = realloc(r->header, cap * sizeof *h);
        if (!h) {
            failf(r, SLOWSCAN_ENOMEM, "out of memory reading the header");
            return;
        }
        r->header = h;
        r->header_cap = cap;
    }
    if (!(r->header[r->ncols] = io_strdup(trimmed(s, &len))))
        failf(r, SLOWSCAN_ENOMEM, "out of memory reading the header");
    else
        r->ncols++;
}

static void on_field(void *data, size_t len, void *context)
{
    csv_reader *r = context;
    if (r->status != SLOWSCAN_OK)
        return;
    char empty[1] = {0};
    char *s = data ? data : empty;
    if (!data)
        len = 0;
    if (r->row == 1) {
        add_header_field(r, s, len);
    } else if (r->field < r->ncols && r->role[r->field] >= 0) {
        char *cell = trimmed(s, &len);
        double v;
        int bad = parse_cell(cell, &v);
        if (bad == 1)
            failf(r, SLOWSCAN_EINVAL, "row %zu, column '%s': \"%s\" is not a number", r->row,
                  r->header[r->field], cell);
        else if (bad == 2)
            failf(r, SLOWSCAN_EINVAL, "row %zu, column '%s': %s is not a finite value", r->row,
                  r->header[r->field], cell);
        r->row_values[r->role[r->field]] = v;
    }
    r->field++;
}

static long column_index(const csv_reader *r, const char *name)
{
    for (size_t c = 0; c < r->ncols; c++)
        if (strcmp(r->header[c], name) == 0)
            return (long)c;
    return -1;
}

/* "a, b, c" (at most ~200 characters, for messages). */
static void list_columns(const csv_reader *r, char *buf, size_t size)
{
    size_t used = 0;
    buf[0] = '\0';
    for (size_t c = 0; c < r->ncols && used + 8 < size; c++) {
        int w = snprintf(buf + used, size - used, "%s%s", c ? ", " : "", r->header[c]);
        used += w > 0 ? (size_t)w : 0;
    }
    if (used >= size - 8)
        strcpy(buf + size - 8, ", ...");
}

static int add_series(csv_reader *r, long col)
{
    series_table *t = r->t;
    if (r->role[col] >= 0)
        return failf(r, SLOWSCAN_EINVAL, "option --vars: column '%s' is %s", r->header[col],
                     r->role[col] == 0 ? "the time column" : "listed twice");
    char **names = realloc(t->names, (t->nseries + 1) * sizeof *names);
    double **values = names ? realloc(t->values, (t->nseries + 1) * sizeof *values) : NULL;
    if (names)
        t->names = names;
    if (values)
        t->values = values;
    if (!names || !values || !(t->names[t->nseries] = io_strdup(r->header[col])))
        return failf(r, SLOWSCAN_ENOMEM, "out of memory");
    t->values[t->nseries] = NULL;
    r->role[col] = (long)++t->nseries;
    return SLOWSCAN_OK;
}

static int select_vars(csv_reader *r, const char *vars)
{
    char *list = io_strdup(vars), *save = NULL;
    if (!list)
        return failf(r, SLOWSCAN_ENOMEM, "out of memory");
    for (char *tok = strtok_r(list, ",", &save); tok && r->status == SLOWSCAN_OK;
         tok = strtok_r(NULL, ",", &save)) {
        size_t len = strlen(tok);
        char *name = trimmed(tok, &len);
        long col = column_index(r, name);
        char cols[256];
        list_columns(r, cols, sizeof cols);
        if (col < 0)
            failf(r, SLOWSCAN_EINVAL, "option --vars: no column '%s' (columns: %s)", name, cols);
        else
            add_series(r, col);
    }
    free(list);
    return r->status;
}

/* After the header: check names, find the time column, choose the series. */
static int resolve_header(csv_reader *r)
{
    for (size_t c = 0; c < r->ncols; c++) {
        if (!r->header[c][0])
            return failf(r, SLOWSCAN_EINVAL, "row 1, column %zu: empty column name", c + 1);
        for (size_t d = 0; d < c; d++)
            if (!strcmp(r->header[c], r->header[d]))
                return failf(r, SLOWSCAN_EINVAL, "row 1: column name '%s' appears twice (columns %zu and %zu)",
                             r->header[c], d + 1, c + 1);
    }
    if (!(r->role = malloc(r->ncols * sizeof *r->role)))
        return failf(r, SLOWSCAN_ENOMEM, "out of memory");
    for (size_t c = 0; c < r->ncols; c++)
        r->role[c] = -1;
    long time_col = r->options->time_column ? column_index(r, r->options->time_column) : 0;
    if (time_col < 0) {
        char cols[256];
        list_columns(r, cols, sizeof cols);
        return failf(r, SLOWSCAN_EINVAL, "option --time: no column '%s' (columns: %s)",
                     r->options->time_column, cols);
    }
    r->role[time_col] = 0;
    if (!(r->t->time_name = io_strdup(r->header[time_col])))
        return failf(r, SLOWSCAN_ENOMEM, "out of memory");
    if (r->options->vars)
        select_vars(r, r->options->vars);
    else
        for (size_t c = 0; c < r->ncols && r->status == SLOWSCAN_OK; c++)
            if (r->role[c] < 0)
                add_series(r, (long)c);
    if (r->status == SLOWSCAN_OK && r->t->nseries == 0)
        failf(r, SLOWSCAN_EINVAL, "row 1: no series column besides the time column '%s'",
              r->t->time_name);
    if (r->status == SLOWSCAN_OK && !(r->row_values = malloc((r->t->nseries + 1) * sizeof(double))))
        failf(r, SLOWSCAN_ENOMEM, "out of memory");
    return r->status;
}

static int grow_data(csv_reader *r)
{
    series_table *t = r->t;
    if (t->n < r->cap)
        return SLOWSCAN_OK;
    size_t cap = r->cap ? 2 * r->cap : 1024, tc = r->cap;
    int bad = io_reserve(&t->time, &tc, cap);
    size_t *rows = bad ? NULL : realloc(t->rows, cap * sizeof *rows);
    bad = bad || !rows;
    if (rows)
        t->rows = rows;
    for (size_t k = 0; k < t->nseries && !bad; k++) {
        size_t c = r->cap;
        bad = io_reserve(&t->values[k], &c, cap);
    }
    if (bad)
        return failf(r, SLOWSCAN_ENOMEM, "out of memory at row %zu", r->row);
    r->cap = cap;
    return SLOWSCAN_OK;
}

/* A data row is complete: check its shape and time, then store it. */
static void store_row(csv_reader *r)
{
    series_table *t = r->t;
    if (r->field != r->ncols) {
        failf(r, SLOWSCAN_EINVAL, "row %zu has %zu fields, the header has %zu", r->row, r->field,
              r->ncols);
        return;
    }
    double time = r->row_values[0];
    if (isnan(time)) {
        failf(r, SLOWSCAN_EINVAL, "row %zu, column '%s': the time is missing", r->row, t->time_name);
        return;
    }
    if (t->n > 0 && !(time > t->time[t->n - 1])) {
        failf(r, SLOWSCAN_EINVAL, "row %zu: time %.12g is not greater than the previous time %.12g "
              "(rows must be in strictly increasing time order)", r->row, time, t->time[t->n - 1]);
        return;
    }
    if (grow_data(r) != SLOWSCAN_OK)
        return;
    t->time[t->n] = time;
    t->rows[t->n] = r->row;
    for (size_t k = 0; k < t->nseries; k++)
        t->values[k][t->n] = r->row_values[k + 1];
    t->n++;
}

static void on_row(int c, void *context)
{
    (void)c;
    csv_reader *r = context;
    if (r->status == SLOWSCAN_OK) {
        if (r->row == 1)
            resolve_header(r);
        else
            store_row(r);
    }
    r->row++;
    r->field = 0;
}

/* The delimiter is whichever of , ; TAB occurs most often in the header, outside quotes. */
static unsigned char detect_delimiter(const char *buf, size_t len)
{
    size_t comma = 0, semicolon = 0, tab = 0;
    int quoted = 0;
    for (size_t i = 0; i < len; i++) {
        char c = buf[i];
        if (c == '"')
            quoted = !quoted;
        else if (!quoted && (c == '\n' || c == '\r'))
            break;
        else if (!quoted)
            comma += c == ',', semicolon += c == ';', tab += c == '\t';
    }
    if (semicolon > comma && semicolon >= tab)
        return ';';
    if (tab > comma && tab > semicolon)
        return '\t';
    return ',';
}

/* Reads until the first line end outside quotes is in the buffer (or the input ends). */
static size_t read_header_chunk(FILE *fp, char **buf, size_t *cap)
{
    size_t len = 0;
    for (;;) {
        if (*cap - len < CHUNK) {
            char *b = realloc(*buf, *cap + 2 * CHUNK);
            if (!b)
                return (size_t)-1;
            *buf = b;
            *cap += 2 * CHUNK;
        }
        size_t got = fread(*buf + len, 1, CHUNK, fp);
        len += got;
        int quoted = 0, done = got == 0;
        for (size_t i = 0; i < len && !done; i++) {
            if ((*buf)[i] == '"')
                quoted = !quoted;
            else if (!quoted && ((*buf)[i] == '\n' || (*buf)[i] == '\r'))
                done = 1;
        }
        if (done)
            return len;
    }
}

static int parse_stream(csv_reader *r, FILE *fp)
{
    char *buf = NULL;
    size_t cap = 0, len = read_header_chunk(fp, &buf, &cap);
    if (len == (size_t)-1) {
        free(buf);
        return failf(r, SLOWSCAN_ENOMEM, "out of memory");
    }
    size_t skip = len >= 3 && !memcmp(buf, "\xEF\xBB\xBF", 3) ? 3 : 0;
    struct csv_parser p;
    if (csv_init(&p, CSV_STRICT | CSV_STRICT_FINI | CSV_APPEND_NULL) != 0) {
        free(buf);
        return failf(r, SLOWSCAN_ENOMEM, "out of memory");
    }
    csv_set_delim(&p, detect_delimiter(buf + skip, len - skip));
    char *data = buf + skip;
    len -= skip;
    while (len > 0 && r->status == SLOWSCAN_OK) {
        if (csv_parse(&p, data, len, on_field, on_row, r) != len)
            failf(r, SLOWSCAN_EINVAL, "row %zu: malformed CSV (%s)", r->row, csv_strerror(csv_error(&p)));
        data = buf;
        len = fread(buf, 1, cap, fp);
    }
    if (r->status == SLOWSCAN_OK && ferror(fp))
        failf(r, SLOWSCAN_EIO, "read error: %s", strerror(errno));
    if (r->status == SLOWSCAN_OK && csv_fini(&p, on_field, on_row, r) != 0)
        failf(r, SLOWSCAN_EINVAL, "row %zu: malformed CSV (%s)", r->row, csv_strerror(csv_error(&p)));
    csv_free(&p);
    free(buf);
    return r->status;
}

static void reader_free(csv_reader *r)
{
    for (size_t c = 0; c < r->ncols; c++)
        free(r->header[c]);
    free(r->header);
    free(r->role);
    free(r->row_values);
}

int csv_read_table(const char *path, const csv_read_options *options, series_table *t,
                   io_error *err)
{
    static const csv_read_options defaults = {NULL, NULL};
    memset(t, 0, sizeof *t);
    int is_stdin = strcmp(path, "-") == 0;
    const char *shown = is_stdin ? "(standard input)" : path;
    csv_reader r = {.path = shown, .err = err, .row = 1, .options = options ? options : &defaults, .t = t};
    FILE *fp = is_stdin ? stdin : fopen(path, "rb");
    if (!fp)
        return io_fail(err, SLOWSCAN_EINVAL, "%s: cannot open: %s", path, strerror(errno));
    if (!(t->source = io_strdup(shown)))
        failf(&r, SLOWSCAN_ENOMEM, "out of memory");
    else
        parse_stream(&r, fp);
    if (!is_stdin)
        fclose(fp);
    if (r.status == SLOWSCAN_OK && r.ncols == 0)
        failf(&r, SLOWSCAN_EINVAL, "the file is empty (a header row and data rows are needed)");
    else if (r.status == SLOWSCAN_OK && t->n == 0)
        failf(&r, SLOWSCAN_EINVAL, "the file has a header but no data rows");
    reader_free(&r);
    if (r.status != SLOWSCAN_OK)
        series_table_free(t);
    return r.status;
}
