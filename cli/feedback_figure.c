/* slowscan feedback --figures: the run's figure (report_feedback_figure), its per-window
 * arrays gathered from the library's windows. */
#include "feedback_run.h"
#include "slowscan/status.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

/* The response's finite range over [start, end]. */
static void response_range(const cli_feedback_run *r, double start, double end, double *lo,
                           double *hi)
{
    *lo = INFINITY, *hi = -INFINITY;
    for (size_t i = 0; i < r->n; i++)
        if (r->time[i] >= start && r->time[i] <= end && isfinite(r->response[i]) &&
            isfinite(r->flux[i])) {
            *lo = fmin(*lo, r->response[i]);
            *hi = fmax(*hi, r->response[i]);
        }
    if (!(*lo <= *hi))
        *lo = *hi = NAN;
}

int cli_feedback_figure(report_batch *figures, const cli_options *o, const cli_feedback_run *r,
                        const feedback_window *w, size_t count, const char *verdict)
{
    double *buf = malloc(7 * count * sizeof *buf);
    unsigned *flags = malloc(count * sizeof *flags);
    if (!buf || !flags) {
        free(buf);
        free(flags);
        return EXIT_INTERNAL;
    }
    double *mid = buf, *lam = buf + count, *lo = buf + 2 * count, *hi = buf + 3 * count,
           *F = buf + 4 * count, *tmin = buf + 5 * count, *tmax = buf + 6 * count;
    time_axis axis = r->axis;
    for (size_t j = 0; j < count; j++) {
        double m = 0.5 * (w[j].start + w[j].end);
        mid[j] = axis.unit == TIME_AXIS_NUMBER ? m : slowscan_time_axis_decimal_year(&axis, m);
        lam[j] = w[j].lambda, lo[j] = w[j].lo, hi[j] = w[j].hi, F[j] = w[j].forcing;
        flags[j] = w[j].flags;
        response_range(r, w[j].start, w[j].end, &tmin[j], &tmax[j]);
    }
    const char *unit = cli_time_unit(&axis);
    report_feedback_data data = {r->source, o->forced.flux, o->forced.response,
                                 axis.unit == TIME_AXIS_NUMBER ? "time" : unit[0] ? "year" : "time",
                                 r->n, r->flux, r->response, count, mid, lam, lo, hi, F, tmin,
                                 tmax, flags, verdict};
    /* named after the file without its directories and extension: feedback-RUN.png, an
     * ensemble's member feedback-RUN-m01.png */
    const char *slash = strrchr(r->source, '/'), *base = slash ? slash + 1 : r->source;
    const char *dot = strrchr(base, '.');
    int stem = dot && dot != base ? (int)(dot - base) : (int)strlen(base);
    char name[1024];
    snprintf(name, sizeof name, "%.*s%s%s", stem, base, r->member ? "-" : "",
             r->member ? r->member : "");
    int rc = cli_figure_draw(figures, &slowscan_report_feedback_figure, &data, "feedback", name);
    free(buf);
    free(flags);
    return rc;
}
