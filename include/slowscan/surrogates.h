/* slowscan — surrogate null models (module prefix: surrogate_).
 *
 * Plan once, draw many (the FFTW habit). A surrogate_plan holds what depends only on the
 * series length: FFTW plans, made once and shared read-only by every thread (execution uses
 * the new-array interface). A surrogate_source holds what depends on one series — its
 * Fourier amplitudes, sorted values, fitted AR(1) — plus the scratch of one thread; make one
 * source per thread and series. slowscan_surrogate_draw then allocates nothing.
 *
 * Missing samples: the source series is filled at its NaN positions by the mean of its finite
 * samples before transforming, and every surrogate gets NaN back at exactly those positions,
 * so the surrogate's windows have the same coverage as the observed ones. (For aaft and iaaft
 * the set of values is then kept exactly only when the series has no gaps, and block
 * bootstrap blocks may carry filled values into present positions: with long gaps prefer
 * phase, or fill the gaps first with --resample.) */
#ifndef SLOWSCAN_SURROGATES_H
#define SLOWSCAN_SURROGATES_H

#include "slowscan/export.h"

#include <gsl/gsl_rng.h>
#include <stddef.h>

typedef enum {
    SURROGATE_PHASE, /* Fourier phase randomisation: periodogram kept exactly (Theiler et al. 1992) */
    SURROGATE_AAFT,  /* amplitude-adjusted FT: the set of values kept exactly (Theiler et al. 1992) */
    SURROGATE_IAAFT, /* iterated AAFT: values exact, periodogram iterated toward the original's
                        (Schreiber & Schmitz 1996, Phys. Rev. Lett. 77:635) */
    SURROGATE_AR1,   /* AR(1) fitted to the series (coefficient, innovation variance, mean),
                        simulated from its stationary distribution */
    SURROGATE_BLOCK, /* moving-block bootstrap (Kunsch 1989, Ann. Statist. 17:1217) */
    SURROGATE_COUNT
} surrogate_kind;

typedef struct {
    double iaaft_tolerance; /* stop when the relative spectral error improves by less (1e-4) */
    int iaaft_max_iterations; /* (200) */
    size_t block_length;    /* 0: round(n^(1/3)), the order Hall, Horowitz & Jing (1995,
                               Biometrika 82:561) give for variance-type statistics */
} surrogate_options;

/* The defaults above. */
SLOWSCAN_API
surrogate_options slowscan_surrogate_default_options(void);

SLOWSCAN_API
const char *slowscan_surrogate_name(surrogate_kind kind);
SLOWSCAN_API
int slowscan_surrogate_lookup(const char *name, surrogate_kind *kind);

typedef struct surrogate_plan surrogate_plan;
typedef struct surrogate_source surrogate_source;

/* fftw_flags: FFTW_ESTIMATE for a few draws; FFTW_MEASURE pays off only when thousands of
 * draws reuse the plan. Planning is not thread-safe unless fftw_make_planner_thread_safe()
 * was called: make plans before starting threads. NULL on failure. */
SLOWSCAN_API
surrogate_plan *slowscan_surrogate_plan_alloc(size_t n, unsigned fftw_flags);
SLOWSCAN_API
void slowscan_surrogate_plan_free(surrogate_plan *plan);
SLOWSCAN_API
size_t slowscan_surrogate_plan_length(const surrogate_plan *plan);

/* The source of surrogates of x[n] (n = plan length). *status: SLOWSCAN_ESHORT when fewer
 * than 8 finite samples, SLOWSCAN_ECONST when they do not vary, SLOWSCAN_ENOMEM. */
SLOWSCAN_API
surrogate_source *slowscan_surrogate_source_alloc(const surrogate_plan *plan, surrogate_kind kind,
                                         const double *x, const surrogate_options *options,
                                         int *status);
SLOWSCAN_API
void slowscan_surrogate_source_free(surrogate_source *source);

/* One replicate into out[n], drawing from rng. */
SLOWSCAN_API
int slowscan_surrogate_draw(surrogate_source *source, gsl_rng *rng, double *out);

/* IAAFT only: iterations of the last draw, its final relative spectral error
 * sqrt(sum (|S_k| - A_k)^2 / sum A_k^2), and whether it met the tolerance before the
 * iteration limit. Counts of draws that did not converge accumulate in *unconverged. */
SLOWSCAN_API
void slowscan_surrogate_iaaft_report(const surrogate_source *source, int *iterations, double *error,
                            size_t *unconverged);

#endif
