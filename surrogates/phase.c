/* Fourier phase-randomised surrogates (Theiler, Eubank, Longtin, Galdrikian & Farmer 1992,
 * Physica D 58:77): keep every Fourier amplitude, draw the phases of frequencies
 * 1 .. ceil(n/2)-1 uniformly, keep DC and (for even n) Nyquist, transform back. */
#include "mt_stream.h"
#include "slowscan/status.h"
#include "surrogate_internal.h"

#include <math.h>
#include <string.h>
#if defined(__SSE2__)
#include <emmintrin.h>
#endif

int surrogate_phase_prepare(surrogate_source *s)
{
    /* The r2c may overwrite its input only with FFTW_DESTROY_INPUT plans; copy to be safe. */
    memcpy(s->aligned, s->filled, s->n * sizeof *s->aligned);
    fftw_execute_dft_r2c(s->plan->forward, s->aligned, s->spectrum);
    double n = (double)s->n;
    for (size_t k = 0; k < s->nfreq; k++)
        s->amplitude[k] = hypot(s->spectrum[k][0], s->spectrum[k][1]) / n;
    s->dc = s->spectrum[0][0] / n;
    s->nyquist = s->n % 2 == 0 ? s->spectrum[s->n / 2][0] / n : 0;
    return SLOWSCAN_OK;
}

/* 2 U - 1 for U = gsl_rng_uniform(rng). For mt19937 (every stream of ours) U is k / 2^32 for
 * the next 32-bit output k, so 2U - 1 = (k - 2^31) / 2^31 exactly, in both forms; taking k
 * straight from the generator skips a division and a call per coordinate, the same numbers
 * (inline for our own, mt_stream.h; through its pointer for GSL's). */
typedef enum { UNIFORM_ANY, UNIFORM_GSL_MT, UNIFORM_OWN_MT } uniform_source;

static inline double symmetric_uniform(gsl_rng *rng, uniform_source source)
{
    if (source == UNIFORM_ANY)
        return 2.0 * gsl_rng_uniform(rng) - 1.0;
    double k = source == UNIFORM_OWN_MT ? (double)surrogate_mt_next(rng)
                                        : (double)rng->type->get(rng->state);
    return (k - 2147483648.0) * (1.0 / 2147483648.0);
}

/* The accepted points of the rejection below, in order, into spectrum[1 .. top-1]. Each
 * candidate is written to the next free slot and the slot kept when the point is inside the
 * disc: a rejection (one candidate in five) is then no branch to mispredict. */
static void disc_points(surrogate_source *s, size_t top, gsl_rng *rng, uniform_source source)
{
    for (size_t k = 1; k < top;) {
        double u = symmetric_uniform(rng, source), v = symmetric_uniform(rng, source);
        double r2 = u * u + v * v;
        s->spectrum[k][0] = u;
        s->spectrum[k][1] = v;
        k += (r2 <= 1.0) & (r2 >= 1e-12);
    }
}

/* Each point (u, v) of spectrum[lo .. hi-1] becomes amp[k] (u, v) / |(u, v)|. sqrt may set
 * errno, so GCC keeps it scalar behind a test; on x86-64 two frequencies go through the
 * packed instructions at once (the same correctly rounded operations, the same numbers). */
static void scale_points(fftw_complex *spectrum, const double *amp, size_t lo, size_t hi)
{
    size_t k = lo;
#if defined(__SSE2__)
    for (; k + 2 <= hi; k += 2) {
        __m128d a = _mm_loadu_pd(spectrum[k]), b = _mm_loadu_pd(spectrum[k + 1]);
        __m128d u = _mm_unpacklo_pd(a, b), v = _mm_unpackhi_pd(a, b);
        __m128d r2 = _mm_add_pd(_mm_mul_pd(u, u), _mm_mul_pd(v, v));
        __m128d scale = _mm_div_pd(_mm_loadu_pd(amp + k), _mm_sqrt_pd(r2));
        _mm_storeu_pd(spectrum[k], _mm_mul_pd(_mm_unpacklo_pd(scale, scale), a));
        _mm_storeu_pd(spectrum[k + 1], _mm_mul_pd(_mm_unpackhi_pd(scale, scale), b));
    }
#endif
    for (; k < hi; k++) {
        double u = spectrum[k][0], v = spectrum[k][1];
        double scale = amp[k] / sqrt(u * u + v * v);
        spectrum[k][0] = scale * u;
        spectrum[k][1] = scale * v;
    }
}

void surrogate_random_phases(surrogate_source *s, const double *amp, double dc, double nyquist,
                             gsl_rng *rng)
{
    uniform_source source = rng->type == surrogate_mt19937 ? UNIFORM_OWN_MT
                            : rng->type == gsl_rng_mt19937 ? UNIFORM_GSL_MT : UNIFORM_ANY;
    size_t n = s->n, top = (n + 1) / 2; /* frequencies 1 .. ceil(n/2)-1 get random phases */
    /* A uniform point of the unit disc, by rejection from the square, gives a uniform
     * direction: exactly uniform phases without a sine and cosine per frequency. The draws
     * come first, in their order; the scaling is a separate loop without dependencies. */
    if (source == UNIFORM_OWN_MT)
        disc_points(s, top, rng, UNIFORM_OWN_MT);
    else
        disc_points(s, top, rng, source);
    scale_points(s->spectrum, amp, 1, top);
    s->spectrum[0][0] = dc;
    s->spectrum[0][1] = 0;
    if (n % 2 == 0) {
        s->spectrum[n / 2][0] = nyquist;
        s->spectrum[n / 2][1] = 0;
    }
}

int surrogate_phase_draw(surrogate_source *s, gsl_rng *rng, double *out)
{
    surrogate_random_phases(s, s->amplitude, s->dc, s->nyquist, rng);
    surrogate_inverse(s, out);
    return SLOWSCAN_OK;
}
