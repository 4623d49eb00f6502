/* The drifting-AR(1) workspace, shared by the fit (ar1_drift.c) and the projection
 * (ar1_projection.c): the projection bootstraps the residuals of the fit the workspace holds. */
#ifndef SLOWSCAN_AR1_DRIFT_INTERNAL_H
#define SLOWSCAN_AR1_DRIFT_INTERNAL_H

#include "slowscan/ar1_drift.h"

#include <gsl/gsl_multifit.h>

struct ar1_drift_workspace {
    size_t nmax;
    gsl_matrix *design; /* rows: x_t, s_t x_t, 1 */
    gsl_vector *response, *coef;
    gsl_matrix *cov;
    gsl_multifit_linear_workspace *lw; /* sized for nmax - 1 rows; GSL 2 fits fewer in it */
    gsl_vector *s, *weight;            /* per row: rescaled time, WLS weight */
    int noise_trend;
};

#endif
