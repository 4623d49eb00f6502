/* The option values of timescales and emulate (cli/modes.h), set from options.c's table. */
#include "modes_cli.h"
#include "slowscan/emulate.h"

#include <errno.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

void cli_modes_defaults(cli_options *o)
{
    memset(&o->modes, 0, sizeof o->modes);
    o->modes.max_modes = (long)slowscan_timescales_config_default().max_modes;
    o->modes.onset = NAN;
    o->modes.step_forcing = NAN;
    o->modes.band_level = slowscan_emulate_config_default().band_level;
}

int cli_set_joint(cli_options *o, const char *n, const char *v)
{
    (void)n, (void)v;
    o->modes.joint = 1;
    return EXIT_OK;
}

int cli_set_empirical(cli_options *o, const char *n, const char *v)
{
    (void)n, (void)v;
    o->modes.empirical = 1;
    return EXIT_OK;
}

/* A whole number from lo to hi (the message names the option and the range). */
static int whole_in(const char *n, const char *v, long lo, long hi, long *out)
{
    char *end;
    errno = 0;
    long x = strtol(v, &end, 10);
    if (end == v || *end != '\0' || errno == ERANGE || x < lo || x > hi) {
        cli_error("option %s: '%s' is not a whole number from %ld to %ld", n, v, lo, hi);
        return EXIT_BAD_INPUT;
    }
    *out = x;
    return EXIT_OK;
}

int cli_set_max_modes(cli_options *o, const char *n, const char *v)
{
    return whole_in(n, v, 1, TIMESCALES_MAX_MODES, &o->modes.max_modes);
}

int cli_set_persist(cli_options *o, const char *n, const char *v)
{
    return whole_in(n, v, 1, 100000, &o->modes.persist);
}

int cli_set_onset(cli_options *o, const char *n, const char *v)
{
    return cli_parse_number(n, v, &o->modes.onset);
}

int cli_set_step_forcing(cli_options *o, const char *n, const char *v)
{
    int rc = cli_parse_number(n, v, &o->modes.step_forcing);
    if (rc == EXIT_OK && o->modes.step_forcing == 0) {
        cli_error("option %s: the step's forcing cannot be 0 (the response is divided by it)", n);
        return EXIT_BAD_INPUT;
    }
    return rc;
}

int cli_set_band_level(cli_options *o, const char *n, const char *v)
{
    int rc = cli_parse_number(n, v, &o->modes.band_level);
    if (rc == EXIT_OK && !(o->modes.band_level > 0.5 && o->modes.band_level < 1)) {
        cli_error("option %s: %s is outside (0.5, 1) (e.g. 0.99 for a 99%% band)", n, v);
        return EXIT_BAD_INPUT;
    }
    return rc;
}

/* FILE:COL, split at the last colon (a file name may hold colons, a column name rarely). */
static int series_ref(const char *n, const char *v, cli_series_ref *r)
{
    const char *colon = strrchr(v, ':');
    if (!colon || colon == v || colon[1] == '\0' || (size_t)(colon - v) >= sizeof r->file ||
        strlen(colon + 1) >= sizeof r->column) {
        cli_error("option %s: '%s' is not FILE:COLUMN", n, v);
        return EXIT_BAD_INPUT;
    }
    memcpy(r->file, v, (size_t)(colon - v));
    r->file[colon - v] = '\0';
    strcpy(r->column, colon + 1);
    r->text = v;
    return EXIT_OK;
}

int cli_set_step_run(cli_options *o, const char *n, const char *v) { return series_ref(n, v, &o->modes.step); }
int cli_set_forcing(cli_options *o, const char *n, const char *v) { return series_ref(n, v, &o->modes.forcing); }
int cli_set_compare(cli_options *o, const char *n, const char *v) { return series_ref(n, v, &o->modes.compare); }
int cli_set_noise_run(cli_options *o, const char *n, const char *v) { return series_ref(n, v, &o->modes.control); }

int cli_modes_check(const cli_options *o)
{
    const cli_modes_options *m = &o->modes;
    if (strcmp(o->command, "timescales") == 0) {
        if (m->joint && (!o->forced.response || !o->forced.flux)) {
            cli_error("option --joint needs --response COL and --flux COL (the response and the "
                      "net flux of the same run)");
            return EXIT_BAD_INPUT;
        }
        if (o->ensemble.on && !o->forced.response) {
            cli_error("option %s needs --response NAME (the ensemble's columns NAME.MEMBER)",
                      o->ensemble.members_text ? "--members" : "--ensemble");
            return EXIT_BAD_INPUT;
        }
        if (o->forced.flux && !m->joint) {
            cli_error("option --flux is used by --joint only");
            return EXIT_BAD_INPUT;
        }
        return EXIT_OK;
    }
    if (m->step.text && (o->nfiles > 0 || o->forced.response)) {
        cli_error("option --step FILE:COL names the step run; give it either so or as an input "
                  "file with --response COL, not both");
        return EXIT_BAD_INPUT;
    }
    if (!m->step.text && o->nfiles > 0 && !o->forced.response) {
        cli_error("emulate: option --response COL is needed (the step run's column in %s)",
                  o->files[0]);
        return EXIT_BAD_INPUT;
    }
    if (o->nfiles > 1) {
        cli_error("emulate: one step run only (%s and %s given)", o->files[0], o->files[1]);
        return EXIT_BAD_INPUT;
    }
    const char *missing = isnan(m->step_forcing) ? "--step-forcing F (the step run's forcing)"
                          : !m->forcing.text ? "--forcing FILE:COL (the forcing to emulate)"
                                             : NULL;
    if (missing && (o->nfiles > 0 || m->step.text)) {
        cli_error("emulate: option %s is needed", missing);
        return EXIT_BAD_INPUT;
    }
    if (m->persist && !m->compare.text) {
        cli_error("option --persist needs --compare FILE:COL (the run the emulation is compared with)");
        return EXIT_BAD_INPUT;
    }
    return EXIT_OK;
}
