/* slowscan — dates on the calendars of the CF conventions (module prefix: calendar_, date_).
 *
 * Model output is dated on calendars that are not the civil one: a "noleap" year has 365 days,
 * a "360_day" year twelve months of 30 (so 2000-02-30 is a date), a "standard" record switches
 * from the Julian to the Gregorian rule on 1582-10-15. Day arithmetic therefore always says
 * which calendar it is in, and a day number is only comparable with another of the same
 * calendar.
 *
 * Year numbering follows CF 1.9 (and the defaults of cftime): the real-world calendars
 * (standard, julian) have no year 0 — year -1 precedes year 1 — while proleptic_gregorian
 * (ISO 8601) and the idealised calendars (noleap, all_leap, 360_day) count 0, -1, ...
 *
 * Nothing here does I/O or allocates. */
#ifndef SLOWSCAN_CALENDAR_H
#define SLOWSCAN_CALENDAR_H

#include "slowscan/export.h"

#include <stddef.h>

typedef enum {
    CALENDAR_STANDARD = 0,        /* "standard", "gregorian": Julian before 1582-10-15 */
    CALENDAR_PROLEPTIC_GREGORIAN, /* "proleptic_gregorian": the Gregorian rule at all dates */
    CALENDAR_NOLEAP,              /* "noleap", "365_day" */
    CALENDAR_ALL_LEAP,            /* "all_leap", "366_day" */
    CALENDAR_360_DAY,             /* "360_day": twelve months of 30 days */
    CALENDAR_JULIAN,              /* "julian": a leap year every fourth year */
    CALENDAR_COUNT
} calendar_kind;

/* A date and time of day, as written (the year in the calendar's own numbering). */
typedef struct {
    long year;
    int month, day;     /* 1-based */
    int hour, minute;   /* 0-23, 0-59 */
    double second;      /* [0, 60) */
    int offset_minutes; /* a written UTC offset (+01:00 is 60); the day number is in UTC */
} calendar_date;

/* How much of a date was written, coarsest first: decides how output stamps are printed and
 * helps recognise monthly and yearly records. */
typedef enum {
    DATE_YEAR = 0,
    DATE_MONTH,
    DATE_DAY,
    DATE_HOUR,
    DATE_MINUTE,
    DATE_SECOND
} date_precision;

/* The calendar named `name` (CF names and their aliases, case-insensitive). SLOWSCAN_EINVAL
 * for an unknown name. */
SLOWSCAN_API
int slowscan_calendar_lookup(const char *name, calendar_kind *kind);
/* The CF name of a calendar ("standard", "noleap", ...); "unknown" outside the enum. */
SLOWSCAN_API
const char *slowscan_calendar_name(calendar_kind kind);

/* Days in `month` of `year` (the calendar's numbering); 0 when the month or year does not
 * exist (month outside 1-12, year 0 of standard or julian). October 1582 of the standard
 * calendar has 31 day labels of which 21 exist (slowscan_calendar_check refuses the 10 dropped). */
SLOWSCAN_API
int slowscan_calendar_month_days(calendar_kind kind, long year, int month);

/* SLOWSCAN_OK when *date exists in the calendar (fields in range, the day within its month,
 * not in the dropped days 1582-10-05..14 of the standard calendar), else SLOWSCAN_EINVAL.
 * Years are limited to |year| <= 5000000 so that day numbers stay exact in a double; in the
 * two limit years a UTC offset is refused (it could move the instant beyond them). */
SLOWSCAN_API
int slowscan_calendar_check(calendar_kind kind, const calendar_date *date);

/* Days (with the time of day as a fraction) from 1970-01-01 00:00 of the same calendar to
 * *date, in UTC. SLOWSCAN_EINVAL for a date the calendar does not have. */
SLOWSCAN_API
int slowscan_calendar_day_number(calendar_kind kind, const calendar_date *date, double *days);

/* The date `days` after 1970-01-01 00:00 of the calendar, to the microsecond (offset 0).
 * SLOWSCAN_EINVAL for a non-finite value or one beyond the year limit. */
SLOWSCAN_API
int slowscan_calendar_from_day_number(calendar_kind kind, double days, calendar_date *date);

/* Months from January of year 0 (astronomical numbering) to the date's month: consecutive
 * months differ by 1 in every calendar, whatever their lengths. */
SLOWSCAN_API
long slowscan_calendar_month_index(calendar_kind kind, const calendar_date *date);
/* The year and month (1-12) of a month index, in the calendar's numbering. */
SLOWSCAN_API
void slowscan_calendar_month_of_index(calendar_kind kind, long index, long *year, int *month);

/* Parses `text` as a date. With format NULL: ISO 8601 calendar dates — YYYY-MM, YYYY-MM-DD,
 * then optionally T (or one space) and hh, hh:mm, hh:mm:ss or hh:mm:ss.fff, then optionally
 * Z or an offset +hh:mm / +hhmm / +hh; years of more than four digits or before year 0 carry a
 * sign (+10000, -0044); month, day and hour may have one digit (CF reference dates such as
 * "1850-1-1 0:0:0" write them so). A bare year is not a date here (a column of years is a
 * number column). With a format: strftime-like directives %Y (year, up to 4 digits, optional
 * sign), %m, %d, %H, %M (up to 2 digits), %S (up to 2 digits and an optional fraction), %%;
 * any other character must match itself ("%Y%m%d" reads 19580329). Leading and trailing
 * blanks are ignored. The date is not checked against a calendar (slowscan_calendar_check does
 * that). Returns SLOWSCAN_OK, or SLOWSCAN_EINVAL for text that is not such a date or a bad
 * format. *precision (may be NULL) is the finest field written. */
SLOWSCAN_API
int slowscan_date_parse(const char *text, const char *format, calendar_date *date,
                        date_precision *precision);

/* Writes *date in ISO 8601 to the given precision (seconds with their fraction to the
 * microsecond, trailing zeros dropped; the offset is not written: pass UTC dates). Returns the
 * length the full text needs (as snprintf); the buffer always ends in NUL when size > 0. */
SLOWSCAN_API
int slowscan_date_format(const calendar_date *date, date_precision precision, char *buffer,
                         size_t size);

/* What the numbers of a table's time column are. A column of numbers is taken as it is
 * (TIME_AXIS_NUMBER). A column of dates, or of numbers in CF units ("days since ..."), becomes
 * day numbers of its calendar (calendar.h); a record with one row per month (dates written
 * to the month, or steps of 28-31 days each in a month of its own) is put on a month index
 * instead, and one with one row per year on the year, so that months of 28 to 31 days make a
 * regular grid. Outputs turn the numbers back into dates (slowscan_time_axis_format). */
typedef enum {
    TIME_AXIS_NUMBER = 0, /* the column's own numbers */
    TIME_AXIS_DAYS,       /* day numbers: days since 1970-01-01 of the calendar */
    TIME_AXIS_MONTHS,     /* months since January of year 0 (slowscan_calendar_month_index) */
    TIME_AXIS_YEARS       /* the astronomical year */
} time_axis_unit;

typedef struct {
    time_axis_unit unit;
    calendar_kind calendar;   /* dated axes */
    date_precision precision; /* the finest date field written: output stamps use it */
    int decimals;             /* TIME_AXIS_NUMBER: most decimals written in the column
                                 (-1: some value had an exponent or more than 15) */
    int backward;             /* the column counts back in time (ages before present): the
                                 axis holds minus the written numbers, so it runs forward */
} time_axis;

/* The unit of an axis in words ("days", "months", "years"); NULL for TIME_AXIS_NUMBER. */
SLOWSCAN_API
const char *slowscan_time_axis_unit_name(time_axis_unit unit);

/* A time of the axis as text: the date at the axis' precision (a month axis prints YYYY-MM,
 * a year axis YYYY), or the number with %.15g (an age axis prints the age as written).
 * Returns the length needed (as snprintf). */
SLOWSCAN_API
int slowscan_time_axis_format(const time_axis *axis, double value, char *buffer, size_t size);

/* Reads `text` as a time of the axis (for --from/--until): a date on a dated axis, a number on
 * a number axis. SLOWSCAN_EINVAL for text that is neither, or a date the calendar lacks. */
/* A time of a dated axis as a decimal year (the date's year plus the fraction of its
 * calendar year elapsed), for plotting against a readable axis; a number axis' value as it is. */
SLOWSCAN_API
double slowscan_time_axis_decimal_year(const time_axis *axis, double value);

SLOWSCAN_API
int slowscan_time_axis_value(const time_axis *axis, const char *text, const char *format,
                             double *value);

#endif
