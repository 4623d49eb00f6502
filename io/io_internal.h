/* Private helpers of io/ (not installed).
 *
 * The CSV reader is split by concern: csv_input.c owns the byte stream (chunks, BOM,
 * delimiter detection, libcsv, file rows) and the data rows; csv_header.c turns the header
 * record into a column selection. They share the csv_reader state below. */
#ifndef SLOWSCAN_IO_INTERNAL_H
#define SLOWSCAN_IO_INTERNAL_H

#include "slowscan/io.h"
#include "slowscan/status.h"

/* Formats the message into err (which may be NULL) and returns status. */
int io_fail(io_error *err, int status, const char *fmt, ...) __attribute__((format(printf, 3, 4)));
char *io_strdup(const char *s);
/* qsort's order of doubles (ascending). */
int io_compare_doubles(const void *a, const void *b);
/* Whether v is one of the codes for a missing value (to 1e-7 relative, so that a fill value
 * written to six digits, 9.96921e36, matches the float it stands for). */
int io_missing_code(const csv_read_options *o, double v);
/* The median of the n-1 steps of time[n] (n >= 2); NaN when out of memory. */
double io_median_step(const double *time, size_t n);
/* Records a temporary output file just made, so a signal's handler can remove it
 * (temporaries.c); slowscan_atomic_temp_done forgets it once it is renamed or removed. */
void io_temp_register(const char *path);
/* mkstemp(template) registered from before the file exists (a signal between mkstemp and
 * io_temp_register left the file behind): the file descriptor and *name, the file's name
 * (malloc'd), or -1 with errno set and *name NULL. */
int io_temp_make(const char *template, char **name);
/* A scratch file with no name, in dir (NULL: $TMPDIR, else /tmp), opened "w+b": unlinked as
 * soon as it is made, so no run — failed, killed or crashed — leaves it behind. `stem` names
 * it while it is being made. SLOWSCAN_EIO naming the folder, or SLOWSCAN_ENOMEM. */
int io_unnamed_temporary(const char *dir, const char *stem, FILE **fp, io_error *err);

/* The name used in messages: "standard input" for "-" (or NULL), else the path as given. */
const char *io_display_name(const char *source);
/* strerror without the shared static buffer (io may run on several threads). */
const char *io_strerror(int errnum, char *buf, size_t size);
/* Where sample i came from, for messages: "row 12" while the file rows are known, else
 * "time 3.5" (after resampling). */
void io_sample_where(const series_table *t, size_t i, char *buf, size_t size);

/* The time column while it is read: numbers, or dates (ISO 8601 or a format), or numbers in
 * CF units, all stored as numbers of the axis-to-be (day numbers for dates). */
typedef struct {
    const csv_read_options *options;
    int kind;                         /* unknown until the first cell, then numbers or dates */
    date_precision finest, coarsest;  /* of the dates read */
    int decimals;                     /* most decimals of the numbers read (-1: unknown) */
} time_reader;
void time_reader_init(time_reader *tr, const csv_read_options *options);
/* One time cell into *value (NaN when missing); SLOWSCAN_EINVAL with the end of a sentence
 * in why ("is not a date of the noleap calendar ..."). */
int time_reader_cell(time_reader *tr, const char *cell, double *value, char *why, size_t size);
/* A time read so far as text for messages (a date for dated columns). */
void time_reader_text(const time_reader *tr, double value, char *buffer, size_t size);
/* Numbers in CF units as an axis: day numbers, then settled as below (a NetCDF time). */
void time_axis_from_units(const time_units *units, double *time, size_t n, time_axis *axis);
/* After the last row: the axis of time[n], monthly and yearly records moved onto their index
 * (in place). Also for a NetCDF time coordinate, read as numbers in CF units. */
void time_reader_settle(const time_reader *tr, double *time, size_t n, time_axis *axis);

/* Column roles: a file column is ignored, the time, or series k >= 0. */
enum { SERIES_UNSEEN = 0, SERIES_NUMERIC, SERIES_TEXT };
enum { IO_ROLE_SKIP = -1, IO_ROLE_TIME = -2 };

typedef struct {
    const char *name;       /* the file as shown in messages */
    io_error *err;
    int status;             /* the first error wins; later callbacks do nothing */
    const csv_read_options *options;
    series_table *t;

    int in_header;          /* still waiting for the header record */
    char **header;          /* trimmed column names */
    size_t ncols, header_cap;
    long *role;             /* ncols roles */

    size_t line;            /* file row on which the current record starts (1-based) */
    size_t record_nl;       /* line feeds inside quoted fields of the current record */
    int prev_cr;            /* the last record ended with CR, so a following LF is CRLF */
    size_t field;           /* fields seen so far in the current record */

    double *row_values;     /* selected cells of the current record: [0] time, [k+1] series k */
    int cell_status;        /* first bad cell of the current record ... */
    char cell_msg[900];     /* ... reported when the record is not ragged (raggedness first) */
    size_t cap;             /* rows allocated in every data array */
    time_reader time;       /* the time column's cells */
    unsigned char *series_state; /* per series: nothing read yet, numbers seen, or text */
    char first_text[300];   /* the first text cell of a column left out, for messages */
    FILE *rows_out;         /* streaming: each record's series values appended here, row-major,
                               instead of kept in the table (csv_columns.c) */
    size_t *file_column;    /* after reading: the file column (series index at the header) of
                               each series kept (text columns left out) */
    int direction;          /* +1: times must rise; -1: (ages) they fall, rows turned at the end */
    struct {
        int quoted, line_start, comment;
    } filter;               /* comment lines, across chunks */
} csv_reader;

/* Reads a CSV as slowscan_csv_read_table does; with rows_out, the series' values go there
 * (row-major, in file order, one double per series of the header) and the table's values
 * stay NULL; *file_column (may be NULL) gets the file column of each series kept and
 * *backward whether the rows run backward in the file (ages youngest first, turned round
 * in the table). */
int csv_read(const char *path, const csv_read_options *options, series_table *t, FILE *rows_out,
             size_t **file_column, int *backward, io_error *err);

/* Sets the reader's error once ("NAME: " is prepended); returns the reader's status. */
int csv_failf(csv_reader *r, int status, const char *fmt, ...) __attribute__((format(printf, 3, 4)));
/* A cell as a number: 0 with *v (NaN for empty, NA, NaN), 1 not a number, 2 not finite (inf,
 * Infinity, or too large for a double). The data cells' rule and the time column's. */
int csv_cell_number(const char *s, double *v);
/* 1 with *v when s is a plain decimal ([+-]digits[.digits][e[+-]digits]) whose value one
 * floating-point operation gives exactly as strtod would; 0 otherwise (s is then strtod's). */
int io_decimal_exact(const char *s, double *v);
/* Narrows s[0..*len) to drop surrounding spaces and tabs; NUL-terminates in place. */
char *csv_trim(char *s, size_t *len);

/* Header record: one name at a time, then the end of the record, which checks the names,
 * resolves --time and --vars and sets up the table's columns. */
void csv_header_field(csv_reader *r, char *s, size_t len);
void csv_header_end(csv_reader *r);

#endif
