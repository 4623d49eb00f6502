/* Lengths with calendar units (30y, 6mon, 10d) on a series' time axis
 * (slowscan_screen_length_on_axis, slowscan_screen_config_on_axis; screen.h). */
#include "screen_internal.h"
#include "slowscan/screen.h"
#include "slowscan/status.h"

#include <math.h>

/* The mean length of the calendar's year in days (its leap rule averaged over its cycle). */
static double year_days(calendar_kind calendar)
{
    switch (calendar) {
    case CALENDAR_JULIAN: return 365.25;
    case CALENDAR_NOLEAP: return 365.0;
    case CALENDAR_ALL_LEAP: return 366.0;
    case CALENDAR_360_DAY: return 360.0;
    default: return 365.2425; /* the Gregorian rule: 97 leap years in 400 */
    }
}

int slowscan_screen_length_on_axis(const screen_length *len, const time_axis *axis,
                                   screen_length *out)
{
    *out = *len;
    if (len->percent || len->unit == LENGTH_AXIS)
        return SLOWSCAN_OK;
    double factor = NAN; /* axis units per unit of the length */
    switch (axis->unit) {
    case TIME_AXIS_DAYS:
        factor = len->unit == LENGTH_DAYS     ? 1.0
                 : len->unit == LENGTH_MONTHS ? year_days(axis->calendar) / 12.0
                                              : year_days(axis->calendar);
        break;
    case TIME_AXIS_MONTHS:
        factor = len->unit == LENGTH_MONTHS ? 1.0 : len->unit == LENGTH_YEARS ? 12.0 : NAN;
        break;
    case TIME_AXIS_YEARS:
        factor = len->unit == LENGTH_YEARS ? 1.0 : len->unit == LENGTH_MONTHS ? 1.0 / 12 : NAN;
        break;
    default: break; /* a plain number axis has no calendar unit */
    }
    if (isnan(factor))
        return SLOWSCAN_EINVAL;
    out->amount = len->amount * factor;
    out->unit = LENGTH_AXIS;
    return SLOWSCAN_OK;
}

int screen_length_to_axis(screen_length *len, screen_option option, const time_axis *axis,
                          screen_detail *d)
{
    screen_length converted;
    if (slowscan_screen_length_on_axis(len, axis, &converted) != SLOWSCAN_OK) {
        d->rule = SCREEN_RULE_LENGTH_UNIT;
        d->option = option;
        d->status = SLOWSCAN_EINVAL;
        d->count = (size_t)len->unit;
        d->need = (size_t)axis->unit;
        return SLOWSCAN_EINVAL;
    }
    *len = converted;
    return SLOWSCAN_OK;
}

int slowscan_screen_config_on_axis(screen_config *cfg, const time_axis *axis,
                                   screen_detail *d)
{
    struct {
        screen_length *len;
        screen_option option;
    } lengths[] = {{&cfg->window, SCREEN_OPTION_WINDOW},
                   {&cfg->bandwidth, SCREEN_OPTION_BANDWIDTH},
                   {&cfg->deseason_window, SCREEN_OPTION_DESEASON_WINDOW}};
    int st = SLOWSCAN_OK;
    for (size_t k = 0; k < sizeof lengths / sizeof lengths[0] && st == SLOWSCAN_OK; k++)
        if (!isnan(lengths[k].len->amount)) /* NaN: not given (the deseason window) */
            st = screen_length_to_axis(lengths[k].len, lengths[k].option, axis, d);
    return st;
}

const char *slowscan_screen_length_suffix(length_unit unit)
{
    switch (unit) {
    case LENGTH_DAYS: return "d";
    case LENGTH_MONTHS: return "mon";
    case LENGTH_YEARS: return "y";
    default: return "";
    }
}
