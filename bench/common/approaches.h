/* Approaches to a threshold and their matched nulls, for the power benchmark.
 *
 * A model is a two-component drift dx = f(x, p) dt + sigma dW whose parameter p is ramped
 * linearly from p_start (first sample) to p_end (last sample). One-dimensional models use
 * the first component only (the second stays 0 and gets no noise). The observed series is the
 * first component, sampled every SAMPLE_DT time units; between samples the path is advanced by
 * SUBSTEPS Euler-Maruyama steps.
 *
 * The matched null of a model keeps its mean path but not its growing memory: the noise-free
 * run of the same model under the same ramp (same Euler steps), plus a linear process
 * du = J0 u dt + sigma dW with J0 the Jacobian of f at the start state and p_start (the
 * linearisation at t = 0), u(0) = 0 like the approach's own deviation. The noise-free run
 * is the mean path to first order in sigma; near the end of the transcritical ramp, where the
 * noise is as large as the distance to the unstable branch x = 0, the noisy mean lies below it
 * (noise-induced shift, and survival of the paths that did not escape) — a slow difference the
 * detrending removes. */
#ifndef BENCH_APPROACHES_H
#define BENCH_APPROACHES_H

#include <gsl/gsl_rng.h>
#include <stddef.h>

#define SAMPLE_DT 0.1
#define SUBSTEPS 10
#define NOISE_SIGMA 0.05
/* A path farther than this from the origin has left every model's basin (it runs off to
 * -infinity under the fold and transcritical normal forms); the series is redrawn. */
#define ESCAPE_BOUND 2.0

typedef struct {
    const char *name;
    double p_start, p_end;
    int noise_dims; /* 1: real noise on the first component; 2: complex noise */
    void (*drift)(const double x[2], double p, double f[2]);
    void (*start)(double p, double x[2]);
} approach_model;

typedef enum { PATH_APPROACH, PATH_NULL } path_kind;

extern const approach_model approach_models[];
extern const size_t approach_model_count;

/* Writes n samples of one path of the given kind. Returns 0, or 1 when an approach path
 * escaped (|x| > ESCAPE_BOUND; out is then incomplete and the caller draws again). */
int approach_simulate(const approach_model *m, path_kind kind, size_t n, gsl_rng *r, double *out);

#endif
