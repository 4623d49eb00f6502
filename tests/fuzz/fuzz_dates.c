/* Fuzzing the date and calendar parser (calendar/date_text.c, calendar.c) and CF time units
 * (io/time_units.c: the unit word through UDUNITS-2, the reference date through calendar/).
 *
 * Input: one byte of mode, then text.
 *   bits 0-2  the calendar (modulo the number of calendars)
 *   bits 3-4  0: a date in ISO 8601; 1: "FORMAT\nDATE" with a strftime-like format;
 *             2: CF units "UNIT since DATE"; 3: a time of a dated axis (--from / --until)
 * A date that parses and exists in its calendar must survive the round trips the outputs
 * rely on: day number -> date -> day number, and date -> ISO 8601 text -> date. */
#include "fuzz.h"

#include "slowscan/calendar.h"
#include "slowscan/status.h"
#include "slowscan/time_units.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

/* Day numbers are exact to about a microsecond near 1970 and to double rounding at the year
 * limit (5e6 years, 2e9 days). */
static int same_day(double a, double b)
{
    return fabs(a - b) <= 1e-6 + 4e-16 * fabs(a);
}

static void round_trip(calendar_kind cal, const calendar_date *d, date_precision precision)
{
    double days, again;
    calendar_date back;
    if (slowscan_calendar_day_number(cal, d, &days) != SLOWSCAN_OK)
        abort(); /* slowscan_calendar_check accepted it */
    if (slowscan_calendar_from_day_number(cal, days, &back) != SLOWSCAN_OK ||
        slowscan_calendar_day_number(cal, &back, &again) != SLOWSCAN_OK || !same_day(days, again))
        abort();
    slowscan_calendar_month_index(cal, d);
    if (d->offset_minutes != 0 || precision < DATE_MONTH)
        return; /* the text drops the offset; a bare year does not read back as a date */
    char text[96];
    calendar_date reread;
    date_precision p2;
    int len = slowscan_date_format(d, precision, text, sizeof text);
    if (len < 0 || (size_t)len >= sizeof text)
        abort();
    if (slowscan_date_parse(text, NULL, &reread, &p2) != SLOWSCAN_OK || p2 != precision ||
        reread.year != d->year || reread.month != d->month ||
        (precision >= DATE_DAY && reread.day != d->day))
        abort();
}

static void parse_date(calendar_kind cal, const char *format, const char *text)
{
    calendar_date d;
    date_precision precision;
    if (slowscan_date_parse(text, format, &d, &precision) == SLOWSCAN_OK &&
        slowscan_calendar_check(cal, &d) == SLOWSCAN_OK)
        round_trip(cal, &d, precision);
}

static void parse_units(calendar_kind cal, const char *text)
{
    static const double values[] = {0, 1.5, -1e5, 3.7e8, 1e300, -0.0};
    time_units units;
    time_units_problem problem;
    if (slowscan_time_units_parse(text, cal, &units, &problem) != SLOWSCAN_OK) {
        slowscan_time_units_problem_text(problem);
        return;
    }
    for (size_t k = 0; k < sizeof values / sizeof values[0]; k++) {
        calendar_date d;
        slowscan_time_units_day_number(&units, values[k]);
        slowscan_time_units_date(&units, values[k], &d);
    }
}

static void parse_axis_time(calendar_kind cal, const char *text)
{
    static const time_axis_unit units[] = {TIME_AXIS_NUMBER, TIME_AXIS_DAYS, TIME_AXIS_MONTHS,
                                           TIME_AXIS_YEARS};
    for (size_t k = 0; k < sizeof units / sizeof units[0]; k++) {
        time_axis axis = {.unit = units[k], .calendar = cal, .precision = DATE_DAY};
        double value;
        char stamp[128];
        if (slowscan_time_axis_value(&axis, text, NULL, &value) == SLOWSCAN_OK) {
            slowscan_time_axis_format(&axis, value, stamp, sizeof stamp);
            slowscan_time_axis_decimal_year(&axis, value);
        }
    }
}

int FUZZ_ENTRY(dates)(const uint8_t *data, size_t size)
{
    if (size < 1)
        return 0;
    calendar_kind cal = (calendar_kind)((data[0] & 7u) % CALENDAR_COUNT);
    unsigned mode = (data[0] >> 3) & 3u;
    char *text = fuzz_text(data + 1, size - 1);
    if (!text)
        return 0;
    char *newline = strchr(text, '\n');
    if (mode == 0)
        parse_date(cal, NULL, text);
    else if (mode == 1 && newline) {
        *newline = '\0';
        parse_date(cal, text, newline + 1);
    } else if (mode == 2)
        parse_units(cal, text);
    else
        parse_axis_time(cal, text);
    free(text);
    return 0;
}
