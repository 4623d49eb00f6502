/* The hostile-input catalogue (issue 18): inputs nobody planned for, in two lists run through
 * the binary by tests/test_hostile.c (suite `hostile`).
 *
 * Refusals: exit 1, exactly one message line holding `needle` (the file, row, column or
 * option at fault), and every file of the case's directories (inputs, outputs, $TMPDIR)
 * byte for byte as before the run: nothing written, nothing left, the input unchanged.
 *
 * Acceptances: the hostile spelling of a table and its plain spelling give byte-identical
 * outputs (both exit 0, the output not empty), so "accepted" means "read as meant". */
#ifndef SLOWSCAN_TESTS_HOSTILE_CASES_H
#define SLOWSCAN_TESTS_HOSTILE_CASES_H

#include <stddef.h>

/* Writes one input file at path. */
typedef void (*hostile_make)(const char *path);

/* Placeholders in args, replaced by the runner with paths in the case's own directory:
 * {in} the case's input (written from text or by make, at in_name), {good} a valid
 * 40-row CSV, {nc} a valid classic NetCDF grid, {out} an output file in the output
 * directory {dir}, {tmp} the run's $TMPDIR. */
typedef struct {
    const char *name;
    const char *text;    /* the input's bytes, or NULL: written by make (or no input) */
    hostile_make make;
    const char *in_name; /* where {in} is, under the case's directory (NULL: in/in.csv) */
    const char *args;    /* the command line after the binary */
    const char *needle;  /* the culprit, as the one message must name it */
} hostile_refusal;

/* A table's spelling: plain is all zeros (comma, LF, no quotes, NA for missing). */
typedef struct {
    char delim;              /* ',' (0), ';' or '\t' */
    int quoted, crlf, cr_only, bom, blank_tail, no_final_newline, spaces, comments;
    int minus_zero;          /* zeros written -0, -0.0, -0e0 */
    int missing_spellings;   /* missing cells written "", nan, NaN, na, n/a-free cycle */
    int plus_sign, exponent; /* +1.5; 1.5e0 */
} hostile_style;

typedef struct {
    const char *name;
    hostile_style style;      /* the hostile spelling of the standard table, or */
    hostile_make make_hostile, make_plain; /* both files made by hand (style unused) */
    const char *args;         /* run on each; {in} is the file, {out} the output compared */
    const char *plain_args;   /* NULL: args */
    int stdin_input;          /* the hostile run reads {in} from standard input ('-') */
    long rss_margin_kb;       /* > 0: the hostile run's peak RSS stays within this of the
                               * plain run's (a streamed reader) */
    const char *env;          /* NAME=VALUE set for the hostile run only, or NULL */
} hostile_accept;

extern const hostile_refusal hostile_refusals[];
extern const size_t hostile_nrefusals;
extern const hostile_accept hostile_accepts[];
extern const size_t hostile_naccepts;

/* A valid classic NetCDF grid (time x lat) made by ncgen: the runner's {nc}. */
void hostile_make_grid(const char *path);

/* The standard table of the acceptances (t, a, b, c; 60 rows) in a spelling. */
void hostile_write_table(const char *path, const hostile_style *style);

#endif
