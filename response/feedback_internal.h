/* Helpers shared by the files of response/feedback (not exported). */
#ifndef SLOWSCAN_FEEDBACK_INTERNAL_H
#define SLOWSCAN_FEEDBACK_INTERNAL_H

#include "slowscan/feedback.h"

/* slowscan_feedback_fit with scratch of 4 * len doubles. */
int feedback_fit_with(const double *time, const double *flux, const double *response,
                      size_t first, size_t len, const feedback_config *cfg, double *scratch,
                      feedback_window *out);

#endif
