/* Approaches to a threshold and their matched nulls (see approaches.h). */
#include "approaches.h"

#include <gsl/gsl_randist.h>
#include <math.h>

/* Hopf angular frequency: a period of 2 pi time units is about 63 samples, resolved by the
 * sampling and shorter than the rolling window at every length benchmarked (150 samples at
 * n = 300), and of the order of the initial decay time 1/|mu| = 1, so the series oscillates
 * visibly rather than looking like a red-noise AR(1). */
#define HOPF_OMEGA 1.0

/* Saddle-node normal form; stable branch x = sqrt(a), recovery rate -2 sqrt(a). */
static void fold_drift(const double x[2], double a, double f[2])
{
    f[0] = a - x[0] * x[0];
    f[1] = 0.0;
}

static void fold_start(double a, double x[2])
{
    x[0] = sqrt(a);
    x[1] = 0.0;
}

/* Transcritical normal form; stable branch x = a, recovery rate -a. */
static void transcritical_drift(const double x[2], double a, double f[2])
{
    f[0] = a * x[0] - x[0] * x[0];
    f[1] = 0.0;
}

static void transcritical_start(double a, double x[2])
{
    x[0] = a;
    x[1] = 0.0;
}

/* Supercritical Hopf normal form dz = ((mu + i omega) z - |z|^2 z) dt, z = x0 + i x1;
 * recovery rate mu at the origin. */
static void hopf_drift(const double z[2], double mu, double f[2])
{
    double r2 = z[0] * z[0] + z[1] * z[1];
    f[0] = mu * z[0] - HOPF_OMEGA * z[1] - r2 * z[0];
    f[1] = HOPF_OMEGA * z[0] + mu * z[1] - r2 * z[1];
}

static void origin_start(double mu, double z[2])
{
    (void)mu;
    z[0] = z[1] = 0.0;
}

const approach_model approach_models[] = {
    {"fold", 1.0, 0.05, 1, fold_drift, fold_start},
    {"transcritical", 1.0, 0.05, 1, transcritical_drift, transcritical_start},
    {"hopf", -1.0, -0.05, 2, hopf_drift, origin_start},
};
const size_t approach_model_count = sizeof approach_models / sizeof approach_models[0];

/* The linearisation of the drift at (x, p), by central differences: exact up to rounding for
 * the quadratic models, O(h^2) for the cubic term (which vanishes at the Hopf origin anyway).
 * One mechanism for every model instead of a hand-written Jacobian each. */
static void jacobian(const approach_model *m, const double x[2], double p, double J[2][2])
{
    const double h = 1e-6;
    for (int j = 0; j < 2; j++) {
        double up[2] = {x[0], x[1]}, down[2] = {x[0], x[1]}, fu[2], fd[2];
        up[j] += h;
        down[j] -= h;
        m->drift(up, p, fu);
        m->drift(down, p, fd);
        for (int i = 0; i < 2; i++)
            J[i][j] = (fu[i] - fd[i]) / (2 * h);
    }
}

/* The approach moves x with noise; the null moves x without noise (the mean path) and adds
 * the linear process u driven by the same kind of noise. */
int approach_simulate(const approach_model *m, path_kind kind, size_t n, gsl_rng *r, double *out)
{
    const double h = SAMPLE_DT / SUBSTEPS, scale = NOISE_SIGMA * sqrt(h);
    const double span = SAMPLE_DT * (double)(n - 1);
    double x[2], u[2] = {0.0, 0.0}, J[2][2];
    m->start(m->p_start, x);
    jacobian(m, x, m->p_start, J);
    for (size_t i = 0; i < n; i++) {
        out[i] = x[0] + u[0];
        for (int s = 0; s < SUBSTEPS; s++) {
            double t = (double)(i * SUBSTEPS + (size_t)s) * h;
            double p = m->p_start + (m->p_end - m->p_start) * t / span, f[2], dw[2] = {0.0, 0.0};
            m->drift(x, p, f);
            for (int k = 0; k < m->noise_dims; k++)
                dw[k] = scale * gsl_ran_gaussian_ziggurat(r, 1.0);
            double lin[2] = {J[0][0] * u[0] + J[0][1] * u[1], J[1][0] * u[0] + J[1][1] * u[1]};
            for (int k = 0; k < 2; k++) {
                x[k] += f[k] * h + (kind == PATH_APPROACH ? dw[k] : 0.0);
                u[k] += kind == PATH_NULL ? lin[k] * h + dw[k] : 0.0;
            }
            if (fabs(x[0]) > ESCAPE_BOUND || fabs(x[1]) > ESCAPE_BOUND)
                return 1;
        }
    }
    return 0;
}
