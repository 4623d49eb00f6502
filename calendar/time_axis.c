/* A time axis' values as dates and back (include/slowscan/calendar.h): day numbers, month
 * and year indices, and plain numbers (ages printed as written). */
#include "slowscan/calendar.h"
#include "slowscan/status.h"

#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>

/* A plain number, the whole text: 0 with *v, else -1. */
static int read_number(const char *s, double *v)
{
    char *end;
    errno = 0;
    *v = strtod(s, &end);
    return end != s && *end == '\0' && isfinite(*v) ? 0 : -1;
}

const char *slowscan_time_axis_unit_name(time_axis_unit unit)
{
    switch (unit) {
    case TIME_AXIS_DAYS: return "days";
    case TIME_AXIS_MONTHS: return "months";
    case TIME_AXIS_YEARS: return "years";
    default: return NULL;
    }
}

int slowscan_time_axis_format(const time_axis *axis, double value, char *buffer, size_t size)
{
    calendar_date d = {0, 1, 1, 0, 0, 0.0, 0};
    int whole = value == floor(value) && fabs(value) < 1e12;
    int dated = axis->unit == TIME_AXIS_DAYS ||
                ((axis->unit == TIME_AXIS_MONTHS || axis->unit == TIME_AXIS_YEARS) && whole);
    if (axis->unit == TIME_AXIS_DAYS)
        dated = slowscan_calendar_from_day_number(axis->calendar, value, &d) == SLOWSCAN_OK;
    else if (dated)
        slowscan_calendar_month_of_index(axis->calendar,
                                         (long)value * (axis->unit == TIME_AXIS_YEARS ? 12 : 1),
                                         &d.year, &d.month);
    /* a fraction of a month or year (a window's middle) has no date: it prints as a number */
    if (!dated)
        return snprintf(buffer, size, "%.15g", axis->backward ? -value : value);
    return slowscan_date_format(&d, axis->precision, buffer, size);
}

int slowscan_time_axis_value(const time_axis *axis, const char *text, const char *format,
                             double *value)
{
    if (axis->unit == TIME_AXIS_NUMBER) {
        if (read_number(text, value) != 0)
            return SLOWSCAN_EINVAL;
        *value = axis->backward ? -*value : *value;
        return SLOWSCAN_OK;
    }
    /* a year axis also takes a bare year */
    if (axis->unit == TIME_AXIS_YEARS && !format && read_number(text, value) == 0)
        return *value == floor(*value) ? SLOWSCAN_OK : SLOWSCAN_EINVAL;
    calendar_date d;
    double days;
    if (slowscan_date_parse(text, format, &d, NULL) != SLOWSCAN_OK ||
        slowscan_calendar_day_number(axis->calendar, &d, &days) != SLOWSCAN_OK)
        return SLOWSCAN_EINVAL;
    long month = slowscan_calendar_month_index(axis->calendar, &d);
    if (axis->unit == TIME_AXIS_DAYS)
        *value = days;
    else
        *value = axis->unit == TIME_AXIS_MONTHS ? (double)month : floor((double)month / 12.0);
    return SLOWSCAN_OK;
}


double slowscan_time_axis_decimal_year(const time_axis *axis, double value)
{
    switch (axis->unit) {
    case TIME_AXIS_MONTHS: return value / 12.0; /* month 0 is January of year 0 */
    case TIME_AXIS_YEARS: return value;
    case TIME_AXIS_DAYS: {
        calendar_date d, jan1 = {0, 1, 1, 0, 0, 0.0, 0}, next = {0, 1, 1, 0, 0, 0.0, 0};
        double start, end;
        if (slowscan_calendar_from_day_number(axis->calendar, value, &d) != SLOWSCAN_OK)
            return NAN;
        jan1.year = d.year;
        next.year = d.year == -1 && (axis->calendar == CALENDAR_STANDARD ||
                                     axis->calendar == CALENDAR_JULIAN)
                        ? 1 : d.year + 1; /* no year 0 in those two */
        if (slowscan_calendar_day_number(axis->calendar, &jan1, &start) != SLOWSCAN_OK ||
            slowscan_calendar_day_number(axis->calendar, &next, &end) != SLOWSCAN_OK)
            return NAN;
        double year = d.year < 0 && (axis->calendar == CALENDAR_STANDARD ||
                                     axis->calendar == CALENDAR_JULIAN)
                          ? (double)d.year + 1 : (double)d.year; /* astronomical */
        return year + (value - start) / (end - start);
    }
    default: return value;
    }
}
