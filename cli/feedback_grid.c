/* slowscan feedback --area-mean: a gridded NetCDF run reduced to its area-weighted means. */
#include "feedback_run.h"

int cli_feedback_grid(const cli_options *o, const char *path,
                      int (*visit)(void *context, const series_table *t), void *context)
{
    (void)visit, (void)context;
    if (!o->feedback.area_mean)
        cli_error("%s: a NetCDF grid needs --area-mean (feedback takes one global series per "
                  "variable)", path);
    else
        cli_error("option --area-mean: not available yet for %s", path);
    return EXIT_BAD_INPUT;
}
