/* The shared trend test: the library's, with its warnings and refusals printed. */
#include "trend_test.h"
#include "slowscan/status.h"

#include <string.h>

size_t trend_test_count(const cli_options *opts)
{
    return opts->nindicators + (opts->drift_test != 0);
}

int trend_test(trend_tester *tester, const cli_options *opts, const prepared_series *ps,
               double *const *values, screen_result *res)
{
    if (!tester->ws && !(tester->ws = slowscan_screen_workspace_alloc((size_t)opts->threads))) {
        cli_error("out of memory");
        return EXIT_INTERNAL;
    }
    screen_config cfg;
    cli_screen_config(opts, &cfg);
    memset(res, 0, sizeof *res);
    screen_detail d;
    int st = slowscan_screen_test_series(tester->ws, &cfg, ps, values, res, &d);
    for (size_t w = 0; w < res->nwarnings; w++)
        cli_screen_warn(opts, ps, &res->warnings[w]);
    return st == SLOWSCAN_OK ? EXIT_OK : cli_screen_refuse(opts, ps, &d);
}

void trend_tester_free(trend_tester *tester)
{
    slowscan_screen_workspace_free(tester->ws);
    tester->ws = NULL;
}
