/* The header record of a CSV file: column names, then which column is the time and which
 * are the series (--time, --vars). Names are looked up through a sorted index so that files
 * with thousands of columns (one per grid cell) stay fast. */
#include "io_internal.h"

#include <stdlib.h>
#include <string.h>

enum { MAX_COLUMNS = 1 << 20, LIST_CHARS = 300 };

typedef struct {
    const char *name;
    size_t col;
} name_ref;

/* Sorted by name, then by position, so equal names sit together in file order. */
static int by_name_then_col(const void *a, const void *b)
{
    const name_ref *x = a, *y = b;
    int c = strcmp(x->name, y->name);
    return c ? c : (x->col > y->col) - (x->col < y->col);
}

static int by_name(const void *key, const void *elem)
{
    return strcmp(((const name_ref *)key)->name, ((const name_ref *)elem)->name);
}

/* Whether s[len] is well-formed UTF-8 (RFC 3629: no overlong forms, no surrogates, nothing
 * above U+10FFFF). */
static int is_utf8(const unsigned char *s, size_t len)
{
    for (size_t i = 0; i < len;) {
        unsigned c = s[i];
        if (c < 0x80) {
            i++;
            continue;
        }
        size_t more = c >= 0xC2 && c <= 0xDF ? 1 : c >= 0xE0 && c <= 0xEF ? 2
                    : c >= 0xF0 && c <= 0xF4 ? 3 : 0;
        if (more == 0 || i + more >= len)
            return 0;
        unsigned lo = 0x80, hi = 0xBF; /* the second byte's range excludes the bad forms */
        if (c == 0xE0) lo = 0xA0;
        if (c == 0xED) hi = 0x9F;
        if (c == 0xF0) lo = 0x90;
        if (c == 0xF4) hi = 0x8F;
        for (size_t k = 1; k <= more; k++, lo = 0x80, hi = 0xBF)
            if (s[i + k] < lo || s[i + k] > hi)
                return 0;
        i += more + 1;
    }
    return 1;
}

void csv_header_field(csv_reader *r, char *s, size_t len)
{
    /* Names end up in every output and message; bytes that are not UTF-8 (a Latin-1 '°', or
     * a binary file read as a table) would be copied into them undecodable. */
    if (!is_utf8((const unsigned char *)s, len)) {
        csv_failf(r, SLOWSCAN_EINVAL, "row %zu: the name in column %zu of the header is not "
                  "UTF-8 text (save the file as UTF-8)", r->line, r->ncols + 1);
        return;
    }
    if (r->ncols == MAX_COLUMNS) {
        csv_failf(r, SLOWSCAN_EINVAL, "row %zu: the header has more than %d columns", r->line,
                  MAX_COLUMNS);
        return;
    }
    if (r->ncols == r->header_cap) {
        size_t cap = r->header_cap ? 2 * r->header_cap : 16;
        char **h = realloc(r->header, cap * sizeof *h);
        if (!h) {
            csv_failf(r, SLOWSCAN_ENOMEM, "out of memory reading the header");
            return;
        }
        r->header = h;
        r->header_cap = cap;
    }
    if (!(r->header[r->ncols] = io_strdup(csv_trim(s, &len))))
        csv_failf(r, SLOWSCAN_ENOMEM, "out of memory reading the header");
    else
        r->ncols++;
}

/* "a, b, c" for messages; long headers end in ", ... (N columns)". */
static void list_columns(const csv_reader *r, char *buf, size_t size)
{
    size_t used = 0;
    buf[0] = '\0';
    for (size_t c = 0; c < r->ncols; c++) {
        size_t need = strlen(r->header[c]) + 2;
        if (used + need > LIST_CHARS || used + need + 32 > size) {
            snprintf(buf + used, size - used, ", ... (%zu columns)", r->ncols);
            return;
        }
        used += (size_t)snprintf(buf + used, size - used, "%s%s", c ? ", " : "", r->header[c]);
    }
}

/* Empty and duplicated names, reported by position; on success *index is the sorted index. */
static int check_names(csv_reader *r, name_ref **index)
{
    for (size_t c = 0; c < r->ncols; c++)
        if (!r->header[c][0])
            return csv_failf(r, SLOWSCAN_EINVAL, "row %zu: column %zu of the header has an empty "
                             "name", r->line, c + 1);
    name_ref *ix = malloc(r->ncols * sizeof *ix);
    if (!ix)
        return csv_failf(r, SLOWSCAN_ENOMEM, "out of memory reading the header");
    for (size_t c = 0; c < r->ncols; c++)
        ix[c] = (name_ref){r->header[c], c};
    qsort(ix, r->ncols, sizeof *ix, by_name_then_col);
    size_t first = 0, second = 0; /* the earliest second occurrence of any name */
    for (size_t i = 1; i < r->ncols; i++)
        if (!strcmp(ix[i].name, ix[i - 1].name) && (!second || ix[i].col < second))
            first = ix[i - 1].col, second = ix[i].col;
    if (second) {
        free(ix);
        return csv_failf(r, SLOWSCAN_EINVAL, "row %zu: columns %zu and %zu of the header have the "
                         "same name '%s'", r->line, first + 1, second + 1, r->header[second]);
    }
    *index = ix;
    return SLOWSCAN_OK;
}

static long find_column(const csv_reader *r, const name_ref *index, const char *name)
{
    name_ref key = {name, 0};
    const name_ref *hit = bsearch(&key, index, r->ncols, sizeof *index, by_name);
    return hit ? (long)hit->col : -1;
}

static int unknown_column(csv_reader *r, const char *option, const char *name)
{
    char cols[LIST_CHARS + 64];
    list_columns(r, cols, sizeof cols);
    return csv_failf(r, SLOWSCAN_EINVAL, "option %s: there is no column '%s' (columns: %s)",
                     option, name, cols);
}

/* One --vars entry: it must name a column that is neither the time nor listed before. */
static int take_var(csv_reader *r, const name_ref *index, const char *name, long *nseries)
{
    if (!*name)
        return csv_failf(r, SLOWSCAN_EINVAL, "option --vars: the list \"%s\" has an empty name",
                         r->options->vars);
    long col = find_column(r, index, name);
    if (col < 0)
        return unknown_column(r, "--vars", name);
    if (r->role[col] == IO_ROLE_TIME)
        return csv_failf(r, SLOWSCAN_EINVAL, "option --vars: column '%s' is the time column",
                         name);
    if (r->role[col] >= 0)
        return csv_failf(r, SLOWSCAN_EINVAL, "option --vars: column '%s' is listed twice", name);
    r->role[col] = (*nseries)++;
    return SLOWSCAN_OK;
}

/* Roles from the comma-separated --vars list (spaces around names do not count). */
static int select_vars(csv_reader *r, const name_ref *index, long *nseries)
{
    char *list = io_strdup(r->options->vars);
    if (!list)
        return csv_failf(r, SLOWSCAN_ENOMEM, "out of memory");
    /* Split by hand rather than with strtok_r, which would hide empty entries ("a,,b"). */
    for (char *tok = list, *next; tok && r->status == SLOWSCAN_OK; tok = next) {
        char *comma = strchr(tok, ',');
        next = comma ? comma + 1 : NULL;
        size_t len = comma ? (size_t)(comma - tok) : strlen(tok);
        take_var(r, index, csv_trim(tok, &len), nseries);
    }
    free(list);
    return r->status;
}

static int assign_roles(csv_reader *r, const name_ref *index, long *nseries)
{
    if (!(r->role = malloc(r->ncols * sizeof *r->role)))
        return csv_failf(r, SLOWSCAN_ENOMEM, "out of memory");
    for (size_t c = 0; c < r->ncols; c++)
        r->role[c] = IO_ROLE_SKIP;
    const char *time_name = r->options->time_column;
    long time_col = time_name ? find_column(r, index, time_name) : 0;
    if (time_col < 0)
        return unknown_column(r, "--time", time_name);
    r->role[time_col] = IO_ROLE_TIME;
    if (!(r->t->time_name = io_strdup(r->header[time_col])))
        return csv_failf(r, SLOWSCAN_ENOMEM, "out of memory");
    *nseries = 0;
    if (r->options->vars)
        return select_vars(r, index, nseries);
    for (size_t c = 0; c < r->ncols; c++)
        if (r->role[c] == IO_ROLE_SKIP)
            r->role[c] = (*nseries)++;
    return SLOWSCAN_OK;
}

/* The table's per-series arrays; the data arrays themselves grow as rows arrive. */
static int setup_series(csv_reader *r, size_t nseries)
{
    series_table *t = r->t;
    t->names = calloc(nseries, sizeof *t->names);
    t->values = calloc(nseries, sizeof *t->values);
    r->row_values = malloc((nseries + 1) * sizeof *r->row_values);
    r->series_state = calloc(nseries, 1);
    if (!t->names || !t->values || !r->row_values || !r->series_state)
        return csv_failf(r, SLOWSCAN_ENOMEM, "out of memory");
    t->nseries = nseries; /* set first so that slowscan_series_table_free sees every name */
    for (size_t c = 0; c < r->ncols; c++)
        if (r->role[c] >= 0 && !(t->names[r->role[c]] = io_strdup(r->header[c])))
            return csv_failf(r, SLOWSCAN_ENOMEM, "out of memory");
    return SLOWSCAN_OK;
}

void csv_header_end(csv_reader *r)
{
    name_ref *index = NULL;
    long nseries = 0;
    r->in_header = 0;
    if (check_names(r, &index) == SLOWSCAN_OK && assign_roles(r, index, &nseries) == SLOWSCAN_OK) {
        if (nseries == 0)
            csv_failf(r, SLOWSCAN_EINVAL, "row %zu: the header has no series column besides the "
                      "time column '%s'", r->line, r->t->time_name);
        else
            setup_series(r, (size_t)nseries);
    }
    free(index);
}
