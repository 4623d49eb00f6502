/* slowscan — the library's refusals, warnings and reasons in words (module prefix: message_).
 *
 * The screening functions (screen.h) report through data: a status with a screen_detail, a
 * screen_warning on the result, a screen_reason on a test, the trend-leakage test of the
 * residual. These functions turn that data
 * into the one sentence every front end prints, so the command line and a binding say the
 * same words. A message_context says which series it is about and how the caller's users
 * name the settings (the command line says "--window", a Python caller may say "window=").
 *
 * The writers work like snprintf: at most `size` bytes go into buf, NUL-terminated whenever
 * size > 0 (buf may be NULL when size is 0), and the return value is the length of the whole
 * text without its NUL, so a caller whose buffer was too short can make one of that length
 * + 1 and call again. Unknown enum values give a generic sentence. Nothing here allocates,
 * keeps state or prints: safe from any thread. */
#ifndef SLOWSCAN_MESSAGE_H
#define SLOWSCAN_MESSAGE_H

#include "slowscan/export.h"

#include "slowscan/ensemble.h"
#include "slowscan/screen.h"
#include "slowscan/screen_sequential.h"

#include <stddef.h>

typedef struct {
    const char *source;         /* where the series came from, as messages name it
                                   ("data.csv", "standard input"); NULL: not named */
    const char *series;         /* the series (a file's column); NULL: "" */
    const char *control_source; /* the control run (--null control): refusals with
                                   detail->control name it instead of source */
    const screen_config *config; /* the settings the message quotes (the period, the
                                    harmonics, the iaaft limit); NULL: the defaults */
    /* SCREEN_OPTION_COUNT entries each, or NULL. option_names: how the caller's users spell
     * each setting (NULL entry: the command line's, slowscan_message_option_name).
     * option_values: each value as the user wrote it ("10%"; NULL entry: written from
     * config, "%g" or "%g%%" for a length). */
    const char *const *option_names;
    const char *const *option_values;
} message_context;

/* Every field NULL: no source, the command line's names, the default settings. */
SLOWSCAN_API
message_context slowscan_message_context_default(void);

/* The command line's spelling of a setting ("--window"); "" for SCREEN_OPTION_NONE or an
 * unknown value. */
SLOWSCAN_API
const char *slowscan_message_option_name(screen_option option);

/* Why a series or an option was refused: detail as a screening function filled it (its
 * status inside). SCREEN_RULE_NONE is a run that failed before naming a rule: its status
 * in words, "out of memory" when the status is SLOWSCAN_OK. */
SLOWSCAN_API
size_t slowscan_message_refusal(char *buf, size_t size, const screen_detail *detail,
                                const message_context *ctx);

/* One warning of a screened series (screen_result.warnings). */
SLOWSCAN_API
size_t slowscan_message_warning(char *buf, size_t size, const screen_warning *warning,
                                const message_context *ctx);

/* The warning of a prepared series (slowscan_screen_prepare) left without a trend: constant,
 * fewer than 2 finite samples, or a residual at round-off level. 0 and an empty text when
 * it has its trend. */
SLOWSCAN_API
size_t slowscan_message_detrended(char *buf, size_t size, const screen_prepared *ps,
                                  const message_context *ctx);

/* Why a test has no statistic ("fewer than 8 finite indicator values"): a static string. */
SLOWSCAN_API
const char *slowscan_message_reason(screen_reason reason);

/* The warning of a test left without a statistic, and so flagged insufficient: its series,
 * its name and its reason. */
SLOWSCAN_API
size_t slowscan_message_insufficient(char *buf, size_t size, const screen_test *test,
                                     const message_context *ctx);

/* The trend-leakage warning of one series whose residual leaks (screen_result.leakage,
 * screen_prepared.leakage with leaking set): the edge that leaks more, its mean and p. */
SLOWSCAN_API
size_t slowscan_message_leakage(char *buf, size_t size, const detrend_leakage *leakage,
                                const message_context *ctx);

/* One line for a run in which `count` of the `tested` series leak, naming the first nfirst
 * of them (a caller names a few series one by one, and sums up beyond that). */
SLOWSCAN_API
size_t slowscan_message_leakage_summary(char *buf, size_t size, size_t count, size_t tested,
                                        const char *const *first, size_t nfirst,
                                        const message_context *ctx);

/* Why names were refused as ensembles (slowscan_ensemble_group): names as given to it,
 * option as the caller's users spell the setting ("--ensemble", "--members"); ctx->source
 * names the file. */
SLOWSCAN_API
size_t slowscan_message_ensemble_refusal(char *buf, size_t size, const ensemble_detail *detail,
                                         const char *const *names, const char *option,
                                         const message_context *ctx);

/* The warning of an ensemble whose members split by the end (split->flags non-zero). */
SLOWSCAN_API
size_t slowscan_message_ensemble_split(char *buf, size_t size, const char *ensemble,
                                       const ensemble_split *split,
                                       const ensemble_split_options *options,
                                       const message_context *ctx);

/* The warnings of a run of --surrogates auto (screen_sequential.h), each 0 and an empty
 * text when it does not apply: the smallest p, 1/(K+1), above what BH needs for a discovery
 * (none possible, or only with enough tests tied at that floor); tests the budget left
 * undecided. The options are named as the command line spells them. */
SLOWSCAN_API
size_t slowscan_message_sequential_floor(char *buf, size_t size,
                                         const screen_sequential_summary *summary);
SLOWSCAN_API
size_t slowscan_message_sequential_undecided(char *buf, size_t size,
                                             const screen_sequential_summary *summary);

#endif
