/* Surrogate plans and sources: what every null model shares — names, the FFTW plans of one
 * length, the gap handling, the dispatch to the model's own preparation and draw. */
#include "slowscan/status.h"
#include "surrogate_internal.h"

#include <math.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

static const char *const names[SURROGATE_COUNT] = {"phase", "aaft", "iaaft", "ar1", "block"};

typedef struct {
    int (*prepare)(surrogate_source *s);
    int (*draw)(surrogate_source *s, gsl_rng *rng, double *out);
} surrogate_model;

static const surrogate_model models[SURROGATE_COUNT] = {
    [SURROGATE_PHASE] = {surrogate_phase_prepare, surrogate_phase_draw},
    [SURROGATE_AAFT] = {surrogate_amplitude_prepare, surrogate_aaft_draw},
    [SURROGATE_IAAFT] = {surrogate_amplitude_prepare, surrogate_iaaft_draw},
    [SURROGATE_AR1] = {surrogate_ar1_prepare, surrogate_ar1_draw},
    [SURROGATE_BLOCK] = {surrogate_block_prepare, surrogate_block_draw},
};

const char *slowscan_surrogate_name(surrogate_kind kind)
{
    return (unsigned)kind < SURROGATE_COUNT ? names[kind] : "unknown";
}

int slowscan_surrogate_lookup(const char *name, surrogate_kind *kind)
{
    for (int k = 0; k < SURROGATE_COUNT; k++)
        if (strcmp(name, names[k]) == 0) {
            *kind = (surrogate_kind)k;
            return SLOWSCAN_OK;
        }
    return SLOWSCAN_EINVAL;
}

surrogate_options slowscan_surrogate_default_options(void)
{
    return (surrogate_options){1e-4, 200, 0};
}

surrogate_plan *slowscan_surrogate_plan_alloc(size_t n, unsigned fftw_flags)
{
    if (n < 2 || n > (size_t)INT32_MAX)
        return NULL;
    surrogate_plan *p = calloc(1, sizeof *p);
    double *real = fftw_alloc_real(n);
    fftw_complex *cplx = fftw_alloc_complex(n / 2 + 1);
    if (p && real && cplx) {
        p->n = n;
        /* Planning with MEASURE overwrites the arrays, which are scratch here. */
        p->forward = fftw_plan_dft_r2c_1d((int)n, real, cplx, fftw_flags);
        p->backward = fftw_plan_dft_c2r_1d((int)n, cplx, real, fftw_flags);
    }
    fftw_free(real);
    fftw_free(cplx);
    if (p && (!p->forward || !p->backward)) {
        slowscan_surrogate_plan_free(p);
        p = NULL;
    }
    return p;
}

void slowscan_surrogate_plan_free(surrogate_plan *p)
{
    if (!p)
        return;
    if (p->forward)
        fftw_destroy_plan(p->forward);
    if (p->backward)
        fftw_destroy_plan(p->backward);
    free(p);
}

size_t slowscan_surrogate_plan_length(const surrogate_plan *p) { return p->n; }

void slowscan_surrogate_source_free(surrogate_source *s)
{
    if (!s)
        return;
    free(s->missing);
    free(s->filled);
    free(s->amplitude);
    fftw_free(s->spectrum);
    fftw_free(s->aligned);
    free(s->sorted);
    free(s->rank);
    free(s->pairs);
    free(s->work);
    free(s);
}

/* Copies x with NaN replaced by the finite mean; records the gaps. */
static int fill_gaps(surrogate_source *s, const double *x)
{
    double sum = 0, lo = INFINITY, hi = -INFINITY;
    size_t finite = 0;
    for (size_t i = 0; i < s->n; i++)
        if (isfinite(x[i])) {
            sum += x[i];
            finite++;
            lo = fmin(lo, x[i]);
            hi = fmax(hi, x[i]);
        }
    if (finite < 8)
        return SLOWSCAN_ESHORT;
    if (lo == hi)
        return SLOWSCAN_ECONST;
    double mean = sum / (double)finite;
    for (size_t i = 0; i < s->n; i++) {
        s->missing[i] = !isfinite(x[i]);
        s->filled[i] = s->missing[i] ? mean : x[i];
    }
    s->nmissing = s->n - finite;
    return SLOWSCAN_OK;
}

static int allocate(surrogate_source *s)
{
    size_t n = s->n;
    s->missing = malloc(n);
    s->filled = malloc(n * sizeof *s->filled);
    s->amplitude = malloc(s->nfreq * sizeof *s->amplitude);
    s->spectrum = fftw_alloc_complex(s->nfreq);
    s->aligned = fftw_alloc_real(n);
    s->sorted = malloc(n * sizeof *s->sorted);
    s->rank = malloc(n * sizeof *s->rank);
    s->pairs = malloc(n * sizeof *s->pairs);
    s->work = malloc(n * sizeof *s->work);
    return s->missing && s->filled && s->amplitude && s->spectrum && s->aligned && s->sorted &&
                   s->rank && s->pairs && s->work
               ? SLOWSCAN_OK
               : SLOWSCAN_ENOMEM;
}

surrogate_source *slowscan_surrogate_source_alloc(const surrogate_plan *plan, surrogate_kind kind,
                                         const double *x, const surrogate_options *options,
                                         int *status)
{
    *status = SLOWSCAN_EINVAL;
    if (!plan || (unsigned)kind >= SURROGATE_COUNT)
        return NULL;
    surrogate_source *s = calloc(1, sizeof *s);
    *status = SLOWSCAN_ENOMEM;
    if (!s)
        return NULL;
    s->plan = plan;
    s->kind = kind;
    s->options = options ? *options : slowscan_surrogate_default_options();
    s->n = plan->n;
    s->nfreq = plan->n / 2 + 1;
    if ((*status = allocate(s)) == SLOWSCAN_OK && (*status = fill_gaps(s, x)) == SLOWSCAN_OK)
        *status = models[kind].prepare(s);
    if (*status != SLOWSCAN_OK) {
        slowscan_surrogate_source_free(s);
        return NULL;
    }
    return s;
}

int slowscan_surrogate_draw(surrogate_source *s, gsl_rng *rng, double *out)
{
    int st = models[s->kind].draw(s, rng, out);
    for (size_t i = 0; s->nmissing && i < s->n; i++)
        if (s->missing[i])
            out[i] = NAN;
    return st;
}

void slowscan_surrogate_iaaft_report(const surrogate_source *s, int *iterations, double *error,
                            size_t *unconverged)
{
    if (iterations)
        *iterations = s->last_iterations;
    if (error)
        *error = s->last_error;
    if (unconverged)
        *unconverged = s->unconverged;
}

void surrogate_inverse(surrogate_source *s, double *out)
{
    /* New-array execution needs the plan's SIMD alignment; a caller's buffer from
     * fftw_alloc_real has it, any other goes through the aligned scratch. */
    if (fftw_alignment_of(out) == 0) {
        fftw_execute_dft_c2r(s->plan->backward, s->spectrum, out);
    } else {
        fftw_execute_dft_c2r(s->plan->backward, s->spectrum, s->aligned);
        memcpy(out, s->aligned, s->n * sizeof *out);
    }
}
