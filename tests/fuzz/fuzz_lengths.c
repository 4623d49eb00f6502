/* Fuzzing the parsers of lengths and grids of lengths (cli/option_values.c): "50%", "25",
 * "30y", "6mon", "25%:75%:5%", "10,20,30", and what screen does with a length next (its
 * conversion to the axis' unit, the window rule on a record).
 *
 * Input: one byte of mode, then the option's value.
 *   bits 0-1  0: a length (--window); 1: a grid (--windows); 2: a number (--fdr);
 *             3: a positive number (--resample)
 *   bits 2-3  the axis the length is measured on: number, days, months, years */
#include "fuzz.h"

#include "../../cli/cli.h"
#include "../../cli/share.h"
#include "slowscan/screen.h"
#include "slowscan/status.h"

#include <stdio.h>
#include <stdlib.h>

/* As screen: the length on the axis, then the window of a 101-sample record. */
static void apply_length(const cli_length *len, time_axis_unit unit)
{
    time_axis axis = {.unit = unit, .calendar = CALENDAR_STANDARD, .precision = DATE_DAY};
    screen_length in = {len->amount, len->percent, len->unit}, on;
    if (slowscan_screen_length_on_axis(&in, &axis, &on) != SLOWSCAN_OK)
        return;
    screen_config cfg = slowscan_screen_config_default();
    cfg.window = on;
    size_t window;
    screen_detail detail;
    slowscan_screen_window(&cfg, 101, 100.0, &window, &detail);
}

int FUZZ_ENTRY(lengths)(const uint8_t *data, size_t size)
{
    static FILE *nowhere;
    static const time_axis_unit units[] = {TIME_AXIS_NUMBER, TIME_AXIS_DAYS, TIME_AXIS_MONTHS,
                                           TIME_AXIS_YEARS};
    if (size < 1)
        return 0;
    if (!nowhere && (nowhere = fopen("/dev/null", "w")))
        cli_messages_to(nowhere);
    char *text = fuzz_text(data + 1, size - 1);
    if (!text)
        return 0;
    time_axis_unit unit = units[(data[0] >> 2) & 3u];
    cli_length len, items[CLI_MAX_GRID];
    char texts[CLI_MAX_GRID][32];
    size_t count;
    double x;
    switch (data[0] & 3u) {
    case 0:
        if (cli_parse_length("--window", text, &len) == EXIT_OK)
            apply_length(&len, unit);
        break;
    case 1:
        if (cli_parse_grid("--windows", text, items, texts, &count) == EXIT_OK)
            for (size_t k = 0; k < count; k++)
                apply_length(&items[k], unit);
        break;
    case 2:
        cli_parse_number("--fdr", text, &x);
        break;
    default:
        cli_parse_positive("--resample", text, &x);
        break;
    }
    free(text);
    return 0;
}
