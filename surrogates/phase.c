/* Fourier phase-randomised surrogates (Theiler, Eubank, Longtin, Galdrikian & Farmer 1992,
 * Physica D 58:77): keep every Fourier amplitude, draw the phases of frequencies
 * 1 .. ceil(n/2)-1 uniformly, keep DC and (for even n) Nyquist, transform back. */
#include "slowscan/status.h"
#include "slowscan/surrogates.h"

#include <fftw3.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

struct surrogate_plan {
    size_t n;
    fftw_plan forward;  /* r2c, n */
    fftw_plan backward; /* c2r, n */
};

struct surrogate_source {
    const surrogate_plan *plan;
    surrogate_kind kind;
    size_t n, nfreq;
    double *amplitude;    /* |X_k| / n, so the c2r output needs no rescaling */
    fftw_complex *spectrum; /* scratch for one draw */
    double dc, nyquist;   /* X_0/n and (even n) X_{n/2}/n: real, kept with their signs */
    unsigned char *missing; /* n: positions to set back to NaN */
    double *aligned;        /* n: output scratch for callers' unaligned buffers */
    size_t nmissing;
};

static const char *const names[SURROGATE_COUNT] = {"phase"};

const char *surrogate_name(surrogate_kind kind)
{
    return (unsigned)kind < SURROGATE_COUNT ? names[kind] : "unknown";
}

int surrogate_lookup(const char *name, surrogate_kind *kind)
{
    for (int k = 0; k < SURROGATE_COUNT; k++)
        if (strcmp(name, names[k]) == 0) {
            *kind = (surrogate_kind)k;
            return SLOWSCAN_OK;
        }
    return SLOWSCAN_EINVAL;
}

surrogate_plan *surrogate_plan_alloc(size_t n, unsigned fftw_flags)
{
    if (n < 2)
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
        surrogate_plan_free(p);
        p = NULL;
    }
    return p;
}

void surrogate_plan_free(surrogate_plan *p)
{
    if (!p)
        return;
    if (p->forward)
        fftw_destroy_plan(p->forward);
    if (p->backward)
        fftw_destroy_plan(p->backward);
    free(p);
}

size_t surrogate_plan_length(const surrogate_plan *p) { return p->n; }

void surrogate_source_free(surrogate_source *s)
{
    if (!s)
        return;
    free(s->amplitude);
    fftw_free(s->spectrum);
    free(s->missing);
    fftw_free(s->aligned);
    free(s);
}

/* Copies x into a transform buffer with NaN replaced by the finite mean; records the gaps. */
static int fill_gaps(surrogate_source *s, const double *x, double *buf)
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
        buf[i] = s->missing[i] ? mean : x[i];
    }
    s->nmissing = s->n - finite;
    return SLOWSCAN_OK;
}

static int phase_prepare(surrogate_source *s, const double *x)
{
    double *buf = fftw_alloc_real(s->n);
    if (!buf)
        return SLOWSCAN_ENOMEM;
    int status = fill_gaps(s, x, buf);
    if (status == SLOWSCAN_OK) {
        fftw_execute_dft_r2c(s->plan->forward, buf, s->spectrum);
        for (size_t k = 0; k < s->nfreq; k++)
            s->amplitude[k] = hypot(s->spectrum[k][0], s->spectrum[k][1]) / (double)s->n;
        s->dc = s->spectrum[0][0] / (double)s->n;
        s->nyquist = s->n % 2 == 0 ? s->spectrum[s->n / 2][0] / (double)s->n : 0;
    }
    fftw_free(buf);
    return status;
}

surrogate_source *surrogate_source_alloc(const surrogate_plan *plan, surrogate_kind kind,
                                         const double *x, int *status)
{
    surrogate_source *s = calloc(1, sizeof *s);
    *status = SLOWSCAN_ENOMEM;
    if (!s)
        return NULL;
    s->plan = plan;
    s->kind = kind;
    s->n = plan->n;
    s->nfreq = plan->n / 2 + 1;
    s->amplitude = malloc(s->nfreq * sizeof *s->amplitude);
    s->spectrum = fftw_alloc_complex(s->nfreq);
    s->missing = malloc(s->n);
    s->aligned = fftw_alloc_real(s->n);
    if (s->amplitude && s->spectrum && s->missing && s->aligned)
        *status = SLOWSCAN_OK;
    if (*status != SLOWSCAN_OK || (*status = phase_prepare(s, x)) != SLOWSCAN_OK) {
        surrogate_source_free(s);
        return NULL;
    }
    return s;
}

int surrogate_draw(surrogate_source *s, gsl_rng *rng, double *out)
{
    size_t n = s->n, top = (n + 1) / 2; /* frequencies 1 .. ceil(n/2)-1 get random phases */
    s->spectrum[0][0] = s->dc;
    s->spectrum[0][1] = 0;
    for (size_t k = 1; k < top; k++) {
        double phase = 2.0 * 3.14159265358979323846 * gsl_rng_uniform(rng);
        s->spectrum[k][0] = s->amplitude[k] * cos(phase);
        s->spectrum[k][1] = s->amplitude[k] * sin(phase);
    }
    if (n % 2 == 0) {
        s->spectrum[n / 2][0] = s->nyquist;
        s->spectrum[n / 2][1] = 0;
    }
    /* New-array execution needs the plan's SIMD alignment; a caller's buffer from
     * fftw_alloc_real has it, any other goes through an aligned scratch copy. */
    if (fftw_alignment_of(out) == 0) {
        fftw_execute_dft_c2r(s->plan->backward, s->spectrum, out);
    } else {
        fftw_execute_dft_c2r(s->plan->backward, s->spectrum, s->aligned);
        memcpy(out, s->aligned, n * sizeof *out);
    }
    for (size_t i = 0; s->nmissing && i < n; i++)
        if (s->missing[i])
            out[i] = NAN;
    return SLOWSCAN_OK;
}
