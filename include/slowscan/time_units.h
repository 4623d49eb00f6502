/* slowscan — CF time units, "UNIT since DATE", on a calendar (module prefix: time_units_).
 *
 * The unit word is read by UDUNITS-2 (any spelling it knows: d, day, days, hr, hours, min,
 * s, ...), the reference date by slowscan_date_parse and checked against the calendar, and a
 * value becomes a day number of that calendar (calendar.h). Months and years have no fixed
 * length, so "months since" is refused except in the 360_day calendar (30 days) and "years
 * since" everywhere, as CF advises and python3-cftime does. Fixed-length units UDUNITS-2
 * knows (common_year: 365 days) are taken at their length.
 *
 * UDUNITS-2 reads its unit database (an XML file) the first time a unit is parsed; that file
 * is the only I/O here. Its error-message handler is set to stay silent, process-wide. */
#ifndef SLOWSCAN_TIME_UNITS_H
#define SLOWSCAN_TIME_UNITS_H

#include "slowscan/export.h"

#include "slowscan/calendar.h"

#include <stddef.h>

typedef struct {
    calendar_kind calendar;
    double unit_days;        /* one unit in days of the calendar (1 for "days") */
    calendar_date origin;    /* the reference date, UTC */
    double origin_days;      /* its day number (slowscan_calendar_day_number) */
    date_precision origin_precision;
    char unit[32];           /* the unit word as written ("days"), for outputs */
} time_units;

/* Why a units string was refused. */
typedef enum {
    TIME_UNITS_OK = 0,
    TIME_UNITS_NO_SINCE,        /* not of the form "UNIT since DATE" */
    TIME_UNITS_UNKNOWN_UNIT,    /* UDUNITS-2 does not know the unit, or it is not a time */
    TIME_UNITS_VARIABLE_LENGTH, /* years, or months outside the 360_day calendar */
    TIME_UNITS_BAD_DATE,        /* the reference is not a date of the calendar */
    TIME_UNITS_NO_DATABASE      /* the UDUNITS-2 database could not be read (SLOWSCAN_EIO) */
} time_units_problem;

/* Parses `text` on `calendar`. SLOWSCAN_OK, SLOWSCAN_EINVAL (with *problem saying why), or
 * SLOWSCAN_EIO when the unit database cannot be read. problem may be NULL. */
SLOWSCAN_API
int slowscan_time_units_parse(const char *text, calendar_kind calendar, time_units *units,
                              time_units_problem *problem);

/* A short English text for a problem ("the unit is not a time unit UDUNITS-2 knows", ...). */
SLOWSCAN_API
const char *slowscan_time_units_problem_text(time_units_problem problem);

/* The day number (calendar.h) of `value` in these units; NaN for a non-finite value. */
SLOWSCAN_API
double slowscan_time_units_day_number(const time_units *units, double value);

/* The date of `value` in these units. SLOWSCAN_EINVAL when it is not finite or out of range. */
SLOWSCAN_API
int slowscan_time_units_date(const time_units *units, double value, calendar_date *date);

#endif
