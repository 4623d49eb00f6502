/* What the command asks of the readers and tells about what they found: the CSV reading
 * options (calendar, date format, CF units, ages, missing codes), --from/--until read on each
 * input's time axis, the grid (gaps filled, or --resample with its guards), and the notices
 * about left-out text columns, codes read as missing and values that look like codes. */
#include "cli.h"
#include "slowscan/status.h"

#include <math.h>
#include <string.h>

int cli_read_options(const cli_options *o, time_units *units, csv_read_options *ro)
{
    *ro = slowscan_csv_read_options_default();
    ro->time_column = o->time_column;
    ro->vars = o->vars;
    ro->calendar = o->calendar;
    ro->time_format = o->time_format;
    ro->age = o->age;
    ro->missing = o->missing;
    ro->nmissing = o->nmissing;
    if (!o->time_units)
        return EXIT_OK;
    time_units_problem why;
    int st = slowscan_time_units_parse(o->time_units, o->calendar, units, &why);
    if (st != SLOWSCAN_OK) {
        cli_error("option --time-units: '%s': %s", o->time_units,
                  slowscan_time_units_problem_text(why));
        return st == SLOWSCAN_EIO ? EXIT_INTERNAL : EXIT_BAD_INPUT;
    }
    ro->units = units;
    return EXIT_OK;
}

/* One bound on the table's axis: a number on a number axis (an age on an age axis), a date on
 * a dated one. NaN when not given. */
static int bound_on_axis(const cli_options *o, const series_table *t, const char *option,
                         const char *text, double number, double *out)
{
    *out = NAN;
    if (!text)
        return EXIT_OK;
    if (t->axis.unit == TIME_AXIS_NUMBER && !t->axis.backward && !isnan(number)) {
        *out = number;
        return EXIT_OK;
    }
    if (slowscan_time_axis_value(&t->axis, text, NULL, out) == SLOWSCAN_OK ||
        (o->time_format &&
         slowscan_time_axis_value(&t->axis, text, o->time_format, out) == SLOWSCAN_OK))
        return EXIT_OK;
    if (t->axis.unit == TIME_AXIS_NUMBER)
        cli_error("option %s: '%s' is not a number, and the time column '%s' of %s holds "
                  "numbers", option, text, t->time_name, cli_source_name(t->source));
    else
        cli_error("option %s: '%s' is not a date of the time column '%s' of %s (dates such as "
                  "1958-03-29, on the %s calendar)", option, text, t->time_name,
                  cli_source_name(t->source), slowscan_calendar_name(t->axis.calendar));
    return EXIT_BAD_INPUT;
}

int cli_span_on_axis(const cli_options *o, const series_table *t, double *from, double *until)
{
    if (bound_on_axis(o, t, "--from", o->from_text, o->from, from) != EXIT_OK ||
        bound_on_axis(o, t, "--until", o->until_text, o->until, until) != EXIT_OK)
        return EXIT_BAD_INPUT;
    /* ages may be given in either order: the span is the same stretch of the past */
    if (t->axis.backward && !isnan(*from) && !isnan(*until) && *from > *until) {
        double swap = *from;
        *from = *until, *until = swap;
    }
    return EXIT_OK;
}

/* The grid: --resample with its guards, or the rows as they are with gaps filled. */
int cli_grid(const cli_options *o, series_table *t, int announce, io_error *err)
{
    if (!isnan(o->resample))
        return slowscan_table_resample_within(t, o->resample,
                                              isnan(o->max_gap) ? 2.0 : o->max_gap, err);
    size_t gaps = 0;
    int st = slowscan_table_regularize(t, &gaps, err);
    if (st == SLOWSCAN_OK && gaps > 0 && announce) {
        const char *unit = slowscan_time_axis_unit_name(t->axis.unit);
        cli_warning("%s: %zu row%s missing from the regular grid (step %.15g%s%s) were read as "
                    "missing values", cli_source_name(t->source), gaps, gaps == 1 ? "" : "s",
                    t->time[1] - t->time[0], unit ? " " : "", unit ? unit : "");
    }
    return st;
}

void cli_series_notices(const series_table *t)
{
    const char *name = cli_source_name(t->source);
    for (size_t k = 0; k < t->nseries; k++) {
        suspect_code code;
        if (!slowscan_table_suspect_code(t, k, &code))
            continue;
        char where[48] = "";
        if (code.first_row)
            snprintf(where, sizeof where, ", first in row %zu", code.first_row);
        cli_warning("%s: column '%s': the value %.15g occurs %zu time%s%s, each time far "
                    "outside its neighbours; if it stands for missing data, give --missing "
                    "%.15g", name, t->names[k], code.value, code.count,
                    code.count == 1 ? "" : "s", where, code.value);
    }
}

void cli_input_notices(const cli_options *o, const series_table *t)
{
    const char *name = cli_source_name(t->source);
    for (size_t k = 0; k < t->nskipped; k++)
        cli_warning("%s: column '%s' holds text, not numbers, and is left out (--vars names "
                    "the series to read)", name, t->skipped[k]);
    if (t->coded_missing > 0)
        cli_warning("%s: %zu value%s given by --missing %s read as missing", name,
                    t->coded_missing, t->coded_missing == 1 ? "" : "s",
                    t->coded_missing == 1 ? "was" : "were");
    if (t->nseries && t->values && t->values[0]) /* a streamed table's come a table at a time */
        cli_series_notices(t);
    (void)o;
}
