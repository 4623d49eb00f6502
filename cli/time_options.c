/* The options about time and missing values (--from, --until, --max-gap, --calendar,
 * --time-format, --time-units, --age, --missing): their setters, listed in the option table
 * of options.c. */
#include "cli.h"
#include "slowscan/status.h"

#include <errno.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

/* --from/--until: a number stays a number (as before); anything else (a date) is read
 * against each input's time axis once the input is read. */
static int set_bound(const char *v, const char **text, double *value)
{
    char *end;
    double x = strtod(v, &end);
    *text = v;
    *value = end != v && *end == '\0' && isfinite(x) ? x : NAN;
    return EXIT_OK;
}
int cli_set_from(cli_options *o, const char *n, const char *v) { (void)n; return set_bound(v, &o->from_text, &o->from); }
int cli_set_until(cli_options *o, const char *n, const char *v) { (void)n; return set_bound(v, &o->until_text, &o->until); }
int cli_set_max_gap(cli_options *o, const char *n, const char *v)
{
    return cli_parse_positive(n, v, &o->max_gap);
}
int cli_set_time_format(cli_options *o, const char *n, const char *v)
{
    if (!strstr(v, "%Y") || !strstr(v, "%m")) {
        cli_error("option %s: '%s' needs at least %%Y and %%m (e.g. %%Y%%m%%d)", n, v);
        return EXIT_BAD_INPUT;
    }
    o->time_format = v;
    return EXIT_OK;
}
int cli_set_time_units(cli_options *o, const char *n, const char *v) { (void)n; o->time_units = v; return EXIT_OK; }
int cli_set_age(cli_options *o, const char *n, const char *v) { (void)n; (void)v; o->age = 1; return EXIT_OK; }
int cli_set_calendar(cli_options *o, const char *n, const char *v)
{
    if (slowscan_calendar_lookup(v, &o->calendar) != SLOWSCAN_OK) {
        cli_error("option %s: '%s' is not a CF calendar (standard, gregorian, "
                  "proleptic_gregorian, noleap, 365_day, all_leap, 366_day, 360_day, julian)", n, v);
        return EXIT_BAD_INPUT;
    }
    o->calendar_given = 1;
    return EXIT_OK;
}
/* --missing V1,V2,...: numbers that stand for a missing value. */
int cli_set_missing(cli_options *o, const char *n, const char *v)
{
    const size_t max = sizeof o->missing / sizeof o->missing[0];
    o->nmissing = 0;
    for (const char *p = v;;) {
        const char *comma = strchr(p, ',');
        size_t len = comma ? (size_t)(comma - p) : strlen(p);
        char item[64];
        if (len == 0 || len >= sizeof item || o->nmissing == max) {
            cli_error("option %s: '%s' is not a list of at most %zu numbers", n, v, max);
            return EXIT_BAD_INPUT;
        }
        memcpy(item, p, len);
        item[len] = '\0';
        if (cli_parse_number(n, item, &o->missing[o->nmissing++]) != EXIT_OK)
            return EXIT_BAD_INPUT;
        if (!comma)
            return EXIT_OK;
        p = comma + 1;
    }
}
