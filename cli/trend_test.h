/* The trend test every analysing command shares (screen, robustness, recovery): the
 * screening library's statistics and surrogate null (slowscan_screen_test_series) with its warnings
 * and refusals printed in the command's words. The tester keeps the library's workspace (all
 * that is sized by the series length) between series. */
#ifndef SLOWSCAN_CLI_TREND_TEST_H
#define SLOWSCAN_CLI_TREND_TEST_H

#include "cli.h"

typedef struct {
    screen_workspace *ws; /* made on first use, for opts->threads threads */
} trend_tester;

/* How many tests a run has (rolling indicators, plus the drift test when asked for). */
size_t trend_test_count(const cli_options *opts);

/* res->tests[j] for indicator j of opts (paths in values[j]), then the drift test. Returns an
 * exit code (the message printed). */
int trend_test(trend_tester *tester, const cli_options *opts, const prepared_series *ps,
               double *const *values, screen_result *res);
void trend_tester_free(trend_tester *tester);

#endif
