/* Private to surrogates/: the plan and source behind every null model. */
#ifndef SLOWSCAN_SURROGATE_INTERNAL_H
#define SLOWSCAN_SURROGATE_INTERNAL_H

#include "slowscan/surrogates.h"

#include <fftw3.h>

struct surrogate_plan {
    size_t n;
    fftw_plan forward;  /* r2c, n */
    fftw_plan backward; /* c2r, n */
};

typedef struct {
    double value;
    size_t index;
} surrogate_ranked;

struct surrogate_source {
    const surrogate_plan *plan;
    surrogate_kind kind;
    surrogate_options options;
    size_t n, nfreq;
    unsigned char *missing; /* n: positions set back to NaN in every surrogate */
    size_t nmissing;
    double *filled;         /* n: the series, gaps filled with the finite mean */
    double *amplitude;      /* nfreq: |X_k| / n (phase, iaaft) */
    double dc, nyquist;     /* X_0 / n and X_{n/2} / n, real (phase) */
    fftw_complex *spectrum; /* nfreq scratch */
    double *aligned;        /* n scratch, FFTW-aligned */
    double *sorted;         /* n: the filled values in increasing order (aaft, iaaft) */
    size_t *rank;           /* n: rank of filled[i] (aaft) */
    surrogate_ranked *pairs;/* n scratch for rank ordering */
    double *work;           /* n scratch */
    double ar_phi, ar_sigma, ar_mean; /* ar1 fit */
    size_t block;           /* block length (block) */
    int last_iterations;    /* iaaft report */
    double last_error;
    size_t unconverged;
};

/* Kind-specific preparation (once per source) and draws. */
int surrogate_phase_prepare(surrogate_source *s);
int surrogate_phase_draw(surrogate_source *s, gsl_rng *rng, double *out);
int surrogate_amplitude_prepare(surrogate_source *s);
int surrogate_aaft_draw(surrogate_source *s, gsl_rng *rng, double *out);
int surrogate_iaaft_draw(surrogate_source *s, gsl_rng *rng, double *out);
int surrogate_ar1_prepare(surrogate_source *s);
int surrogate_ar1_draw(surrogate_source *s, gsl_rng *rng, double *out);
int surrogate_block_prepare(surrogate_source *s);
int surrogate_block_draw(surrogate_source *s, gsl_rng *rng, double *out);

/* Spectrum of s->amplitude-style magnitudes `amp` (nfreq, already divided by n) with random
 * phases on 1 .. ceil(n/2)-1 and the given DC / Nyquist, into s->spectrum. */
void surrogate_random_phases(surrogate_source *s, const double *amp, double dc, double nyquist,
                             gsl_rng *rng);
/* c2r of s->spectrum into out (through the aligned scratch when out is not aligned). */
void surrogate_inverse(surrogate_source *s, double *out);
/* out[i] = sorted value of rank(key[i]): the values of s->sorted in the order of key. */
void surrogate_rank_order(surrogate_source *s, const double *key, double *out);

#endif
