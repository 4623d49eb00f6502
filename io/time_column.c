/* The time column of a table: numbers, dates or numbers in CF units, cell by cell while the
 * CSV is read (time_reader_cell), then the axis the analysis runs on (time_reader_settle:
 * day numbers, or a month or year index for monthly and yearly records). The way back from
 * an axis value to a date is calendar/time_axis.c. */
#include "io_internal.h"

#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>

enum { TIME_CELLS_UNKNOWN = 0, TIME_CELLS_NUMBERS, TIME_CELLS_DATES };

void time_reader_init(time_reader *tr, const csv_read_options *options)
{
    memset(tr, 0, sizeof *tr);
    tr->options = options;
    tr->finest = DATE_YEAR;
    tr->coarsest = DATE_SECOND;
}

/* Decimals written after the point of a plain number; -1 with an exponent or beyond 15. */
static int written_decimals(const char *s)
{
    if (strpbrk(s, "eE"))
        return -1;
    const char *point = strchr(s, '.');
    size_t n = point ? strspn(point + 1, "0123456789") : 0;
    return n > 15 ? -1 : (int)n;
}

static int read_date(time_reader *tr, const char *cell, double *value, char *why, size_t size)
{
    const csv_read_options *o = tr->options;
    calendar_date date;
    date_precision p;
    if (slowscan_date_parse(cell, o->time_format, &date, &p) != SLOWSCAN_OK) {
        if (o->time_format)
            snprintf(why, size, "is not a date in the format '%s' (--time-format)", o->time_format);
        else
            snprintf(why, size, "is not a number or a date (ISO 8601 dates such as 1958-03-29 "
                     "are read; other layouts with --time-format)");
        return SLOWSCAN_EINVAL;
    }
    if (slowscan_calendar_day_number(o->calendar, &date, value) != SLOWSCAN_OK) {
        snprintf(why, size, "is not a date of the %s calendar (--calendar names another)",
                 slowscan_calendar_name(o->calendar));
        return SLOWSCAN_EINVAL;
    }
    tr->finest = p > tr->finest ? p : tr->finest;
    tr->coarsest = p < tr->coarsest ? p : tr->coarsest;
    return SLOWSCAN_OK;
}

int time_reader_cell(time_reader *tr, const char *cell, double *value, char *why, size_t size)
{
    if (!*cell || !strcasecmp(cell, "NA") || !strcasecmp(cell, "NaN")) {
        *value = NAN;
        return SLOWSCAN_OK;
    }
    int number = tr->options->time_format ? 1 : csv_cell_number(cell, value);
    int kind = number == 1 ? TIME_CELLS_DATES : TIME_CELLS_NUMBERS;
    if (kind == TIME_CELLS_DATES && tr->options->age) {
        snprintf(why, size, "is not a number, and --age says the column holds ages");
        return SLOWSCAN_EINVAL;
    }
    if (kind == TIME_CELLS_DATES && tr->options->units) {
        snprintf(why, size, "is not a number, and --time-units says the column holds numbers");
        return SLOWSCAN_EINVAL;
    }
    if (tr->kind != TIME_CELLS_UNKNOWN && kind != tr->kind) {
        snprintf(why, size, "is a %s, but the rows above hold %s",
                 kind == TIME_CELLS_DATES ? "date (or text)" : "number",
                 kind == TIME_CELLS_DATES ? "numbers" : "dates");
        return SLOWSCAN_EINVAL;
    }
    tr->kind = kind;
    if (kind == TIME_CELLS_DATES)
        return read_date(tr, cell, value, why, size);
    if (number == 2) {
        snprintf(why, size, "is not a finite number");
        return SLOWSCAN_EINVAL;
    }
    int decimals = written_decimals(cell);
    if (tr->decimals >= 0)
        tr->decimals = decimals < 0 ? -1 : decimals > tr->decimals ? decimals : tr->decimals;
    if (tr->options->units)
        *value = slowscan_time_units_day_number(tr->options->units, *value);
    if (tr->options->age)
        *value = -*value;
    return SLOWSCAN_OK;
}

/* Whether every step of the dated rows moves on by k whole periods (months when per_year is
 * 12, years when 1) of `low`..`high` days each, k >= 1. */
static int steps_by_period(const double *time, size_t n, calendar_kind cal, int per_year,
                           double low, double high)
{
    long previous = 0;
    for (size_t i = 0; i < n; i++) {
        calendar_date d;
        if (slowscan_calendar_from_day_number(cal, time[i], &d) != SLOWSCAN_OK)
            return 0;
        long month = slowscan_calendar_month_index(cal, &d);
        /* the year of month index m is floor(m / 12): month -1 is in year -1 */
        long index = per_year == 12 ? month : (long)floor((double)month / 12.0);
        long k = index - previous;
        double days = i ? time[i] - time[i - 1] : 0.0;
        if (i && (k < 1 || days < low * (double)k || days > high * (double)k))
            return 0;
        previous = index;
    }
    return 1;
}

/* Monthly or yearly records go on a month or year index (see io.h); anything else stays on
 * day numbers. Year steps are tried first: twelve months of steps pass the month rule too. */
static time_axis_unit dated_unit(const double *time, size_t n, const time_reader *tr)
{
    calendar_kind cal = tr->options->calendar;
    /* dates written to the year or the month say so themselves */
    if (tr->kind == TIME_CELLS_DATES && tr->finest == DATE_YEAR)
        return TIME_AXIS_YEARS;
    if (tr->kind == TIME_CELLS_DATES && tr->finest == DATE_MONTH)
        return TIME_AXIS_MONTHS;
    if (n < 2)
        return TIME_AXIS_DAYS;
    double median = io_median_step(time, n);
    if (median >= 359.0 && median <= 367.0 && steps_by_period(time, n, cal, 1, 359.0, 367.0))
        return TIME_AXIS_YEARS;
    if (median >= 27.0 && median <= 32.0 && steps_by_period(time, n, cal, 12, 27.0, 32.0))
        return TIME_AXIS_MONTHS;
    return TIME_AXIS_DAYS;
}

/* The finest field the day numbers need, for numbers read through CF units: whole days print
 * as dates, anything finer with its time of day. */
static date_precision units_precision(const double *time, size_t n)
{
    date_precision p = DATE_DAY;
    for (size_t i = 0; i < n && p < DATE_SECOND; i++) {
        double seconds = (time[i] - floor(time[i])) * 86400.0;
        double rounded = round(seconds);
        if (fabs(seconds - rounded) > 1e-3)
            p = DATE_SECOND;
        else if (fmod(rounded, 60.0) != 0.0)
            p = DATE_SECOND;
        else if (fmod(rounded, 3600.0) != 0.0 && p < DATE_MINUTE)
            p = DATE_MINUTE;
        else if (rounded != 0.0 && p < DATE_HOUR)
            p = DATE_HOUR;
    }
    return p;
}

void time_reader_settle(const time_reader *tr, double *time, size_t n, time_axis *out)
{
    time_axis axis = {TIME_AXIS_NUMBER, tr->options->calendar, tr->finest, tr->decimals,
                      tr->options->age};
    if (tr->kind == TIME_CELLS_NUMBERS && !tr->options->units) {
        *out = axis;
        return;
    }
    if (tr->options->units)
        axis.precision = units_precision(time, n);
    axis.decimals = -1;
    axis.unit = dated_unit(time, n, tr);
    for (size_t i = 0; axis.unit != TIME_AXIS_DAYS && i < n; i++) {
        calendar_date d;
        slowscan_calendar_from_day_number(axis.calendar, time[i], &d);
        long month = slowscan_calendar_month_index(axis.calendar, &d);
        time[i] = axis.unit == TIME_AXIS_MONTHS ? (double)month : floor((double)month / 12.0);
    }
    if (axis.unit == TIME_AXIS_MONTHS)
        axis.precision = DATE_MONTH;
    else if (axis.unit == TIME_AXIS_YEARS)
        axis.precision = DATE_YEAR;
    else if (axis.precision < DATE_DAY)
        axis.precision = DATE_DAY;
    *out = axis;
}

void time_reader_text(const time_reader *tr, double value, char *buffer, size_t size)
{
    time_axis axis = {TIME_AXIS_NUMBER, tr->options->calendar, tr->finest, -1,
                      tr->options->age};
    if (tr->kind == TIME_CELLS_DATES || tr->options->units)
        axis.unit = TIME_AXIS_DAYS;
    if (axis.precision < DATE_DAY)
        axis.precision = DATE_DAY;
    slowscan_time_axis_format(&axis, value, buffer, size);
}

void time_axis_from_units(const time_units *units, double *time, size_t n, time_axis *axis)
{
    csv_read_options o = slowscan_csv_read_options_default();
    o.calendar = units->calendar;
    o.units = units;
    time_reader tr;
    time_reader_init(&tr, &o);
    tr.kind = TIME_CELLS_NUMBERS;
    tr.decimals = -1;
    for (size_t i = 0; i < n; i++)
        time[i] = slowscan_time_units_day_number(units, time[i]);
    time_reader_settle(&tr, time, n, axis);
}
