/* slowscan detrend — the harmonic cycle model of deseasoning (see deseason.c for why it is
 * fitted to the series minus its one-period average, and detrend.h for the definition).
 *
 * The columns (1, cos 2 pi k j/P, sin 2 pi k j/P for k = 1..K) depend on the sample index j
 * only, not on the window, so the normal equations X'X c = X'd of a window are running sums:
 * moving the window by one sample costs O(K^2), and each window position one (2K+1)-square
 * solve. The columns are nearly orthogonal over two periods or more, so forming X'X loses
 * little; GSL's modified Cholesky factorisation solves it and reports, through its diagonal
 * perturbation, a system that is not positive definite (too few usable samples, or samples
 * in too few phases) — returned as SLOWSCAN_ESHORT rather than a fit of noise. */
#include "detrend_internal.h"
#include "slowscan/status.h"

#include <gsl/gsl_linalg.h>
#include <gsl/gsl_math.h> /* M_PI, which strict C11 lacks */
#include <math.h>
#include <stdlib.h>
#include <string.h>

typedef struct {
    deseason_model base;
    size_t k, p;      /* harmonics, columns 2K+1 */
    size_t count;     /* samples in the window */
    double steps;     /* the period in samples */
    double *gain;     /* k: 1 - H(k/P) of the moving average */
    double *ata, *atb; /* p x p (lower triangle kept up to date) and p */
    double *coef, *row, *factor, *perturb;
    size_t *perm;
} harmonic_model;

/* Columns at sample j. The angle is reduced exactly (k j is an exact integer in a double)
 * before it is scaled, so late samples of a long record keep their phase to round-off. */
static void basis(const harmonic_model *h, size_t j, double *row)
{
    row[0] = 1.0;
    for (size_t k = 1; k <= h->k; k++) {
        double angle = 2.0 * M_PI * fmod((double)k * (double)j, h->steps) / h->steps;
        row[2 * k - 1] = cos(angle);
        row[2 * k] = sin(angle);
    }
}

static void harmonic_reset(deseason_model *model)
{
    harmonic_model *h = (harmonic_model *)model;
    memset(h->ata, 0, h->p * h->p * sizeof *h->ata);
    memset(h->atb, 0, h->p * sizeof *h->atb);
    h->count = 0;
}

static void harmonic_add(deseason_model *model, size_t j, double d, double sign)
{
    harmonic_model *h = (harmonic_model *)model;
    basis(h, j, h->row);
    for (size_t r = 0; r < h->p; r++) {
        double s = sign * h->row[r];
        for (size_t c = 0; c <= r; c++)
            h->ata[r * h->p + c] += s * h->row[c];
        h->atb[r] += s * d;
    }
    h->count = sign > 0 ? h->count + 1 : h->count - 1;
}

static int harmonic_solve(deseason_model *model, int rebuilt)
{
    harmonic_model *h = (harmonic_model *)model;
    (void)rebuilt;
    if (h->count < h->p)
        return SLOWSCAN_ESHORT;
    size_t p = h->p;
    for (size_t r = 0; r < p; r++)
        for (size_t c = 0; c <= r; c++)
            h->factor[r * p + c] = h->factor[c * p + r] = h->ata[r * p + c];
    gsl_matrix_view a = gsl_matrix_view_array(h->factor, p, p);
    gsl_vector_view e = gsl_vector_view_array(h->perturb, p);
    gsl_vector_view b = gsl_vector_view_array(h->atb, p);
    gsl_vector_view x = gsl_vector_view_array(h->coef, p);
    gsl_permutation perm = {p, h->perm};
    if (gsl_linalg_mcholesky_decomp(&a.matrix, &perm, &e.vector) != GSL_SUCCESS)
        return SLOWSCAN_ENUMERIC;
    for (size_t r = 0; r < p; r++)
        if (h->perturb[r] != 0.0) /* X'X was not positive definite */
            return SLOWSCAN_ESHORT;
    if (gsl_linalg_mcholesky_solve(&a.matrix, &perm, &b.vector, &x.vector) != GSL_SUCCESS)
        return SLOWSCAN_ENUMERIC;
    for (size_t k = 1; k <= h->k; k++) { /* the cycle of x, not of x minus its average */
        h->coef[2 * k - 1] /= h->gain[k - 1];
        h->coef[2 * k] /= h->gain[k - 1];
    }
    return SLOWSCAN_OK;
}

/* The fitted cycle without the intercept: zero mean over a period, so the level stays. */
static double harmonic_cycle(const deseason_model *model, size_t i)
{
    const harmonic_model *h = (const harmonic_model *)model;
    basis(h, i, h->row);
    double sum = 0.0;
    for (size_t c = 1; c < h->p; c++)
        sum += h->coef[c] * h->row[c];
    return sum;
}

deseason_model *detrend_harmonic_model_alloc(int harmonics, double steps, const double *gain)
{
    if (harmonics < 1)
        return NULL;
    harmonic_model *h = calloc(1, sizeof *h);
    if (!h)
        return NULL;
    h->base = (deseason_model){harmonic_reset, harmonic_add, harmonic_solve, harmonic_cycle};
    h->k = (size_t)harmonics;
    h->p = 2 * h->k + 1;
    h->steps = steps;
    size_t p = h->p;
    h->gain = malloc(h->k * sizeof *h->gain);
    h->ata = malloc((2 * p * p + 4 * p) * sizeof *h->ata); /* ata, factor, atb, coef, row, e */
    h->perm = malloc(p * sizeof *h->perm);
    if (!h->gain || !h->ata || !h->perm) {
        detrend_harmonic_model_free(&h->base);
        return NULL;
    }
    memcpy(h->gain, gain, h->k * sizeof *h->gain);
    h->factor = h->ata + p * p;
    h->atb = h->factor + p * p;
    h->coef = h->atb + p;
    h->row = h->coef + p;
    h->perturb = h->row + p;
    return &h->base;
}

void detrend_harmonic_model_free(deseason_model *model)
{
    harmonic_model *h = (harmonic_model *)model;
    if (!h)
        return;
    free(h->gain);
    free(h->ata);
    free(h->perm);
    free(h);
}
