/* Parsing option values that are numbers and lengths: finite and positive numbers, a length
 * (N%, a number of time units, or N with a calendar unit) and a list of lengths for
 * robustness grids, the --indicators list and the --band range. Every refusal is one message naming the option. */
#include "cli.h"
#include "slowscan/status.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

int cli_parse_number(const char *name, const char *value, double *out)
{
    /* strtod would read C's hexadecimal forms (0x10 as 16); the data reader refuses them
     * too (io/csv_input.c), so an option and a cell mean the same by the same text */
    const char *digits = value + (*value == '+' || *value == '-');
    if (digits[0] == '0' && (digits[1] == 'x' || digits[1] == 'X')) {
        cli_error("option %s: '%s' is not a decimal number", name, value);
        return EXIT_BAD_INPUT;
    }
    char *end;
    double v = strtod(value, &end);
    if (end == value || *end != '\0' || !isfinite(v)) {
        cli_error("option %s: '%s' is not a finite number", name, value);
        return EXIT_BAD_INPUT;
    }
    *out = v;
    return EXIT_OK;
}

int cli_parse_positive(const char *name, const char *value, double *out)
{
    int rc = cli_parse_number(name, value, out);
    if (rc == EXIT_OK && !(*out > 0)) {
        cli_error("option %s: %s must be positive", name, value);
        return EXIT_BAD_INPUT;
    }
    return rc;
}

/* Calendar units a length may carry, the longest suffix ("mon") tried first; their spelling
 * is the library's (slowscan_screen_length_suffix). */
static const length_unit length_units[] = {LENGTH_MONTHS, LENGTH_YEARS, LENGTH_DAYS};

const char *cli_length_suffix(int percent, length_unit unit)
{
    return percent ? "%" : slowscan_screen_length_suffix(unit);
}

/* "N%", "N" in time units, or N with a calendar unit (30y, 6mon, 10d: a dated time column
 * is needed, checked per input); must be positive (the span check comes later). */
int cli_parse_length(const char *name, const char *value, cli_length *len)
{
    size_t n = strlen(value);
    char buf[64];
    len->text = value;
    len->percent = n > 0 && value[n - 1] == '%';
    len->unit = LENGTH_AXIS;
    if (n == 0 || n >= sizeof buf) {
        cli_error("option %s: '%s' is not a length (write N%% of the span, a number of time "
                  "units, or N with y, mon or d)", name, value);
        return EXIT_BAD_INPUT;
    }
    memcpy(buf, value, n + 1);
    if (len->percent)
        buf[n - 1] = '\0';
    for (size_t k = 0; !len->percent && k < sizeof length_units / sizeof length_units[0]; k++) {
        const char *suffix = slowscan_screen_length_suffix(length_units[k]);
        size_t m = strlen(suffix);
        if (n > m && strcmp(buf + n - m, suffix) == 0) {
            buf[n - m] = '\0';
            len->unit = length_units[k];
            break;
        }
    }
    int rc = cli_parse_positive(name, buf, &len->amount);
    if (rc == EXIT_OK && len->percent && len->amount > 100) {
        cli_error("option %s: %s is more than 100%% of the span", name, value);
        return EXIT_BAD_INPUT;
    }
    return rc;
}

/* Lists are items separated by single commas. An empty item ("variance,,ar1", a leading or
 * trailing comma) is refused rather than skipped: it usually marks a name that a script's
 * variable failed to fill in, and skipping it would run a different analysis silently. */
int cli_list_check(const char *name, const char *v)
{
    size_t len = strlen(v);
    if (len == 0 || v[0] == ',' || v[len - 1] == ',' || strstr(v, ",,")) {
        cli_error("option %s: empty item in '%s' (a list is items separated by single commas)",
                  name, v);
        return EXIT_BAD_INPUT;
    }
    return EXIT_OK;
}

/* "A:B:STEP" (inclusive of B within rounding) or "A,B,C"; every entry a positive length,
 * all in % or all in time units. */
int cli_parse_grid(const char *name, const char *v, cli_length *items, char (*texts)[32],
                      size_t *count)
{
    char buf[512];
    if (strlen(v) >= sizeof buf) {
        cli_error("option %s: list too long", name);
        return EXIT_BAD_INPUT;
    }
    strcpy(buf, v);
    *count = 0;
    char *colon = strchr(buf, ':');
    if (colon) {
        cli_length lo, hi, step;
        char *second = colon + 1, *third = strchr(second, ':');
        if (!third) {
            cli_error("option %s: '%s' is not A:B:STEP", name, v);
            return EXIT_BAD_INPUT;
        }
        *colon = *third = '\0';
        if (cli_parse_length(name, buf, &lo) || cli_parse_length(name, second, &hi) ||
            cli_parse_length(name, third + 1, &step))
            return EXIT_BAD_INPUT;
        if (lo.percent != hi.percent || lo.percent != step.percent || lo.unit != hi.unit ||
            lo.unit != step.unit || hi.amount < lo.amount) {
            cli_error("option %s: '%s' mixes units or runs backwards", name, v);
            return EXIT_BAD_INPUT;
        }
        for (double a = lo.amount; a <= hi.amount * (1 + 1e-9); a = lo.amount + (double)*count * step.amount) {
            if (*count == CLI_MAX_GRID) {
                cli_error("option %s: more than %d values", name, CLI_MAX_GRID);
                return EXIT_BAD_INPUT;
            }
            snprintf(texts[*count], 32, "%g%s", a, cli_length_suffix(lo.percent, lo.unit));
            items[*count] = (cli_length){a, lo.percent, texts[*count], lo.unit};
            (*count)++;
        }
        return EXIT_OK;
    }
    if (cli_list_check(name, v) != EXIT_OK)
        return EXIT_BAD_INPUT;
    for (char *save = NULL, *tok = strtok_r(buf, ",", &save); tok; tok = strtok_r(NULL, ",", &save)) {
        if (*count == CLI_MAX_GRID) {
            cli_error("option %s: more than %d values", name, CLI_MAX_GRID);
            return EXIT_BAD_INPUT;
        }
        if (strlen(tok) >= 32) {
            cli_error("option %s: '%s' is too long for a length", name, tok);
            return EXIT_BAD_INPUT;
        }
        snprintf(texts[*count], 32, "%s", tok);
        if (cli_parse_length(name, texts[*count], &items[*count]))
            return EXIT_BAD_INPUT;
        (*count)++;
    }
    if (*count == 0) {
        cli_error("option %s: no value given", name);
        return EXIT_BAD_INPUT;
    }
    return EXIT_OK;
}

/* --indicators LIST: rolling indicators by name, and recovery_trend (a test of the whole
 * residual) in screen and robustness. */
int cli_set_indicators(cli_options *o, const char *n, const char *v)
{
    char buf[512];
    if (strlen(v) >= sizeof buf) {
        cli_error("option %s: list too long", n);
        return EXIT_BAD_INPUT;
    }
    if (cli_list_check(n, v) != EXIT_OK)
        return EXIT_BAD_INPUT;
    strcpy(buf, v);
    o->nindicators = 0;
    o->drift_test = 0;
    o->indicators_text = v;
    for (char *save = NULL, *tok = strtok_r(buf, ",", &save); tok; tok = strtok_r(NULL, ",", &save)) {
        indicator_kind kind;
        if (strcmp(tok, "recovery_trend") == 0) {
            /* Not a rolling indicator but a test of the whole residual: screen and robustness. */
            if (strcmp(o->command, "screen") != 0 && strcmp(o->command, "robustness") != 0) {
                cli_error("option %s: recovery_trend is a test of screen and robustness, not a "
                          "rolling indicator (the 'recovery' command gives its path)", n);
                return EXIT_BAD_INPUT;
            }
            o->drift_test = 1;
            continue;
        }
        if (slowscan_indicator_lookup(tok, &kind) != SLOWSCAN_OK) {
            cli_error("option %s: unknown indicator '%s' (variance, sd, cv, skewness, kurtosis, "
                      "lag1, ar1, recovery, redness, spectral_exponent, dfa; recovery_trend in "
                      "screen and robustness)", n, tok);
            return EXIT_BAD_INPUT;
        }
        for (size_t j = 0; j < o->nindicators; j++)
            if (o->indicators[j] == kind) {
                cli_error("option %s: indicator '%s' is listed twice", n, tok);
                return EXIT_BAD_INPUT;
            }
        o->indicators[o->nindicators++] = kind;
    }
    if (o->nindicators == 0 && !o->drift_test) {
        cli_error("option %s: no indicator given", n);
        return EXIT_BAD_INPUT;
    }
    return EXIT_OK;
}

/* LO:HI in cycles per time unit, 0 < LO < HI; the Nyquist limit and the number of
 * frequencies inside are checked per series, once the time step and window are known. */
int cli_set_band(cli_options *o, const char *n, const char *v)
{
    char buf[128];
    const char *colon = strchr(v, ':');
    if (!colon || strlen(v) >= sizeof buf) {
        cli_error("option %s: '%s' is not LO:HI (frequencies in cycles per time unit)", n, v);
        return EXIT_BAD_INPUT;
    }
    memcpy(buf, v, (size_t)(colon - v));
    buf[colon - v] = '\0';
    if (cli_parse_number(n, buf, &o->band_lo) || cli_parse_number(n, colon + 1, &o->band_hi))
        return EXIT_BAD_INPUT;
    if (!(o->band_lo > 0 && o->band_lo < o->band_hi)) {
        cli_error("option %s: %s must satisfy 0 < LO < HI", n, v);
        return EXIT_BAD_INPUT;
    }
    o->band_text = v;
    return EXIT_OK;
}
