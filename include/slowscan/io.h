/* slowscan — input and output: the series table, CSV reading (libcsv), grid checks,
 * resampling, atomic output files and the record spill store (module prefixes: series_table_,
 * csv_, table_, atomic_, spill_).
 *
 * Unlike the numerical core, io/ deals with files, but it still never prints or exits: errors
 * come back as a status code plus a message in an io_error that names the file, the row
 * (1-based, the header being row 1) and the column where it applies. */
#ifndef SLOWSCAN_IO_H
#define SLOWSCAN_IO_H

#include "slowscan/export.h"

#include "slowscan/calendar.h"
#include "slowscan/time_units.h"

#include <stddef.h>
#include <stdio.h>


typedef struct {
    char message[1024];
} io_error;

/* Where a series of a NetCDF grid lies (netcdf_input.h): which of the variables read, and
 * its cell within that variable (row-major over the selected non-time indices). */
typedef struct {
    size_t variable;
    size_t cell;
} grid_position;

/* A set of series sharing one time column. values[k][i] is series k at time[i]; NaN is
 * missing. Rows are strictly increasing in time once read. */
typedef struct {
    char *source;     /* file name as given ("-" for standard input), for messages */
    char *time_name;  /* name of the time column */
    size_t n;         /* rows */
    size_t nseries;
    double *time;     /* n */
    char **names;     /* nseries */
    double **values;  /* nseries arrays of n */
    size_t *rows;     /* n: the file row each sample came from (for messages); NULL after resampling */
    time_axis axis;   /* what the times are (numbers, day numbers, month or year indices) */
    char **skipped;   /* nskipped columns left out because their first value is text */
    size_t nskipped;
    size_t coded_missing; /* cells read as missing because they held a csv_read_options code */
    grid_position *grid; /* nseries: each series' place in its NetCDF grid; NULL for CSV */
} series_table;

SLOWSCAN_API
void slowscan_series_table_free(series_table *table);

typedef struct {
    const char *time_column;  /* NULL: the first column */
    const char *vars;         /* comma-separated list, NULL: every column but time */
    calendar_kind calendar;   /* of dates in the time column: standard */
    const char *time_format;  /* NULL: numbers or ISO 8601 dates; else slowscan_date_parse's */
    const time_units *units;  /* NULL: numbers are numbers; else "UNIT since DATE" */
    int age;                  /* the time column holds ages (before present), either order */
    const double *missing;    /* nmissing values that stand for a missing value (-999, ...) */
    size_t nmissing;
} csv_read_options;

/* The defaults: the first column is time, every other column a series, numbers or ISO 8601
 * dates on the standard calendar. */
SLOWSCAN_API
csv_read_options slowscan_csv_read_options_default(void);

/* Reads a CSV file with a header row ("-" reads standard input). The time column holds numbers,
 * or dates (ISO 8601, or options->time_format) on options->calendar; the table's axis says
 * which (time_axis above). The delimiter (comma,
 * semicolon or tab) is detected from the header; quoted fields, CRLF line ends and a UTF-8
 * byte-order mark are accepted. Empty cells, NA, NaN (any case) are missing. Errors, each
 * naming file, row and column: unreadable file, empty file, header only, ragged row, a cell
 * that is not a number, an infinite value, a missing time, a non-increasing time, an unknown
 * or duplicated column in `vars`, a header with no series column. */
SLOWSCAN_API
int slowscan_csv_read_table(const char *path, const csv_read_options *options, series_table *table,
                   io_error *err);

/* A CSV read once into an unnamed temporary file (in temp_dir, or $TMPDIR, or /tmp) and
 * handed out a few series at a time, for tables too wide to hold: memory keeps the time
 * column and the names. The same checks and messages as slowscan_csv_read_table; the header
 * table (values NULL) says what was read; slowscan_csv_columns_table gives series first ..
 * first+count-1 as a table of their own (fewer at the end), identical to the same series
 * of slowscan_csv_read_table. */
typedef struct csv_column_store csv_column_store;
SLOWSCAN_API
int slowscan_csv_open_columns(const char *path, const csv_read_options *options,
                              const char *temp_dir, csv_column_store **store, io_error *err);
SLOWSCAN_API
const series_table *slowscan_csv_columns_header(const csv_column_store *store);
SLOWSCAN_API
int slowscan_csv_columns_table(csv_column_store *store, size_t first, size_t count,
                               series_table *table, io_error *err);
SLOWSCAN_API
void slowscan_csv_columns_close(csv_column_store *store);

/* A table from a caller's arrays in memory (a binding's columns), with the checks of
 * slowscan_csv_read_table: time_cells[n] are read as a CSV's time column would be (numbers,
 * ISO 8601 dates on options->calendar, options->time_format, options->units) and the axis
 * settled the same way (monthly and yearly records on their index); a missing, unreadable or
 * non-increasing time and an infinite value are refused naming `source` (NULL: "input"),
 * time_name[index] or the series and sample (from 0); a value equal to one of
 * options->missing becomes NaN (counted in coded_missing). options NULL: the defaults;
 * time_column and vars are not used; ages (options->age) are refused. values[k][n] are
 * copied; rows is NULL, so later messages about a sample name its time. */
SLOWSCAN_API
int slowscan_table_from_memory(const char *source, const char *time_name,
                               const char *const *time_cells, size_t n,
                               const char *const *names, const double *const *values,
                               size_t nseries, const csv_read_options *options,
                               series_table *table, io_error *err);

/* Keeps the rows with from <= time <= until (NaN: no limit). SLOWSCAN_ESHORT with a message
 * when fewer than 2 rows remain. */
SLOWSCAN_API
int slowscan_table_select_span(series_table *table, double from, double until, io_error *err);

/* Checks that the time steps are regular: every step within 1e-6 (relative) of
 * dt = (t_last - t_first)/(n-1). On failure the message names the first offending row and
 * suggests --resample. */
SLOWSCAN_API
int slowscan_table_check_grid(const series_table *table, double *dt, io_error *err);

/* Puts the rows on a regular grid: the base step is the most common step; a step that is a
 * whole number of base steps is a gap, filled with missing rows (NaN; *gaps says how many);
 * times within the precision they were written with (axis.decimals) of the grid are moved
 * onto it. Anything else is an irregular grid: SLOWSCAN_EINVAL naming the first row off it. A
 * grid regular to 1e-6 already is left as it is. */
SLOWSCAN_API
int slowscan_table_regularize(series_table *table, size_t *gaps, io_error *err);

/* A value of one series that looks like an unflagged missing-value code. */
typedef struct {
    double value;
    size_t count;       /* samples holding it */
    size_t first_index; /* the first of them */
    size_t first_row;   /* its file row (0 when not known) */
} suspect_code;

/* 1 with *found when series k holds a value that every time it occurs jumps out of the
 * series and straight back — by more than 12 robust spreads of the first differences — and
 * either repeats exactly or is one of the usual codes (-999, -9999, -99999, 9.96921e36, 1e20);
 * else 0. Silent for series whose first differences have no spread, or fewer than 8. */
SLOWSCAN_API
int slowscan_table_suspect_code(const series_table *table, size_t k, suspect_code *found);

/* Interpolates every series linearly onto t_first, t_first+step, ... <= t_last. A grid point
 * whose bracketing samples include a missing one is missing (unless it hits a present sample
 * exactly). SLOWSCAN_EINVAL for step <= 0 or step > span. */
SLOWSCAN_API
int slowscan_table_resample(series_table *table, double step, io_error *err);
/* The same with two guards against invented memory: a step finer than the median time step
 * is refused (interpolation would make neighbours alike), and a grid point between samples
 * more than max_gap median steps apart stays missing instead of being interpolated across
 * the gap (max_gap infinite: no guard, as slowscan_table_resample). */
SLOWSCAN_API
int slowscan_table_resample_within(series_table *table, double step, double max_gap,
                                   io_error *err);

/* Replaces every value by its natural logarithm; a value <= 0 is an error naming row and
 * column. */
SLOWSCAN_API
int slowscan_table_log(series_table *table, io_error *err);

/* Output written to a temporary file next to the target and renamed into place on commit, so
 * a failed run leaves no partial file. path NULL or "-" is standard output, spooled to an
 * anonymous temporary file (tmpfile) and copied out on commit, so a failed run writes nothing
 * there either; an existing target that is not a regular file (a FIFO, a device) is written directly too
 * (temp_path NULL), since renaming over it would replace it. */
typedef struct {
    FILE *fp;
    char *path;      /* final path, NULL for stdout (fp is then the spool) */
    char *temp_path; /* NULL for stdout */
} atomic_file;

SLOWSCAN_API
int slowscan_atomic_open(atomic_file *file, const char *path, io_error *err);
/* Flushes, checks for write errors, closes and renames. On failure the temp file is removed. */
SLOWSCAN_API
int slowscan_atomic_commit(atomic_file *file, io_error *err);
/* Closes and removes the temporary file; safe to call on a committed or unopened file. */
SLOWSCAN_API
void slowscan_atomic_abort(atomic_file *file);

/* Every temporary file made by slowscan_atomic_open and slowscan_atomic_temp_beside is
 * recorded until it is committed or removed, so that a program stopped by a signal can call
 * slowscan_atomic_remove_temporaries from its handler: it only unlinks, takes no lock and
 * allocates nothing (async-signal-safe). A caller of slowscan_atomic_temp_beside says
 * slowscan_atomic_temp_done once it has renamed or removed the file. */
SLOWSCAN_API
void slowscan_atomic_remove_temporaries(void);
SLOWSCAN_API
void slowscan_atomic_temp_done(const char *temp);

/* Creates an empty temporary file beside `path` (same directory, so a rename into place is
 * atomic), with the permissions a plain fopen of `path` would give; returns its malloc'd
 * name, or NULL with errno set. For writers that open files by name (the figure drivers). */
SLOWSCAN_API
char *slowscan_atomic_temp_beside(const char *path);

/* Makes room for one more element in a growing array: when count == *cap, doubles *cap
 * (first: `first` elements) and reallocates *array. SLOWSCAN_ENOMEM leaves it unchanged. */
SLOWSCAN_API
int slowscan_io_reserve(void **array, size_t *cap, size_t count, size_t size, size_t first);

/* A record spill store (module prefix: spill_): records of plain data (no pointers; any
 * size, 0 included) appended in order and read back by index, any number of times, in any
 * order. The first `spill_after` records are kept in memory; the next append moves them to a
 * temporary file in `dir` (NULL: $TMPDIR, else /tmp), where every later record goes too, so
 * memory holds only an offset per record. The file is removed as soon as it is made (it has
 * no name; the system frees it when the store is freed or the process ends, however it
 * ends). SLOWSCAN_EIO with a message naming the folder when the file cannot be made,
 * written or read; SLOWSCAN_ENOMEM. One thread at a time. */
typedef struct record_spill record_spill;
SLOWSCAN_API
record_spill *slowscan_spill_alloc(size_t spill_after, const char *dir);
SLOWSCAN_API
void slowscan_spill_free(record_spill *store);
SLOWSCAN_API
int slowscan_spill_append(record_spill *store, const void *record, size_t size, io_error *err);
SLOWSCAN_API
size_t slowscan_spill_count(const record_spill *store);
/* The size of record `index` (0 past the end); read it into out[size]. */
SLOWSCAN_API
size_t slowscan_spill_size(const record_spill *store, size_t index);
SLOWSCAN_API
int slowscan_spill_read(record_spill *store, size_t index, void *out, io_error *err);
/* 1 once the records are in the file. */
SLOWSCAN_API
int slowscan_spill_spilled(const record_spill *store);

/* 1 if the two paths name the same existing file (same device and inode), else 0. */
SLOWSCAN_API
int slowscan_io_same_file(const char *a, const char *b);

#endif
