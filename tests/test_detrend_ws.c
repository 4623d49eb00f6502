/* Tests of the detrend workspace (slowscan_detrend_workspace_alloc, slowscan_detrend_apply_with): the contract in
 * include/slowscan/detrend.h. These are internal-consistency checks (the reused workspace
 * against the one-shot call, bit for bit; no outside reference applies): slowscan_detrend_apply itself
 * is checked against numpy/statsmodels and analytic results in test_detrend.c and
 * test_gaussian.c. Run by the detrend suite. */
#include "detrend_check.h"
#include "slowscan/status.h"

#include <math.h>
#include <pthread.h>
#include <stdlib.h>
#include <string.h>

static const char *const ws_methods[] = {"gaussian-linear", "gaussian", "moving", "loess",
                                         "linear", "poly:3", "difference", "none"};
enum { WS_METHODS = sizeof ws_methods / sizeof ws_methods[0] };

static detrend_spec spec_of(const char *method, double bandwidth)
{
    detrend_spec spec = {.bandwidth = bandwidth};
    slowscan_detrend_parse_method(method, &spec);
    return spec;
}

/* Series k of a family: gap-free when k is even, with gaps when odd, so that a workspace sees
 * both kinds in turn (the precomputed mask sums must not leak into a series with gaps). */
static void family_series(check_rng *rng, size_t k, double *x, size_t n)
{
    dc_make_series(rng, k % 3 == 0 ? 1e4 : 0.0, x, n);
    if (k % 2 == 1)
        dc_punch_gaps(x, n, n / 3 + 5, n / 20 + 1);
}

/* 1 when apply_with on ws gives the same status and the same bits as slowscan_detrend_apply. */
static int same_as_apply(detrend_workspace *ws, const detrend_spec *spec, double dt,
                         const double *x, size_t n, double *buf)
{
    double *t1 = buf, *r1 = buf + n, *t2 = buf + 2 * n, *r2 = buf + 3 * n;
    int s1 = slowscan_detrend_apply(spec, dt, x, n, t1, r1);
    int s2 = slowscan_detrend_apply_with(ws, x, n, t2, r2);
    return s1 == s2 && (s1 != SLOWSCAN_OK || (memcmp(t1, t2, n * sizeof *t1) == 0 &&
                                              memcmp(r1, r2, n * sizeof *r1) == 0));
}

/* Every method, several lengths and bandwidths (short kernels summed directly, long ones by
 * FFT), series with and without gaps through one workspace per configuration. */
static void check_every_method(check_rng *rng)
{
    static const size_t lengths[] = {40, 301, 2000};
    static const double share[] = {0.004, 0.02, 0.1, 0.45}; /* bandwidth / span */
    double dt = 0.5;
    for (size_t m = 0; m < WS_METHODS; m++)
        for (size_t a = 0; a < sizeof lengths / sizeof lengths[0]; a++)
            for (size_t b = 0; b < sizeof share / sizeof share[0]; b++) {
                size_t n = lengths[a], bad = 0;
                detrend_spec spec = spec_of(ws_methods[m], share[b] * dt * (double)(n - 1));
                detrend_workspace *ws = slowscan_detrend_workspace_alloc(&spec, dt, n);
                double *x = malloc(5 * n * sizeof *x);
                for (size_t k = 0; k < 4 && ws; k++) {
                    family_series(rng, k, x, n);
                    bad += !same_as_apply(ws, &spec, dt, x, n, x + n);
                }
                CHECK(ws && bad == 0, "%s n=%zu bandwidth %.3g of the span: %zu of 4 differ",
                      ws_methods[m], n, share[b], bad);
                slowscan_detrend_workspace_free(ws);
                free(x);
            }
}

/* One workspace over 100 different series of one length gives what 100 fresh calls give. */
static void check_reuse(check_rng *rng, const char *method, size_t n)
{
    detrend_spec spec = spec_of(method, 0.1 * (double)(n - 1));
    detrend_workspace *ws = slowscan_detrend_workspace_alloc(&spec, 1.0, n);
    double *x = malloc(5 * n * sizeof *x);
    size_t bad = 0;
    for (size_t k = 0; k < 100 && ws; k++) {
        family_series(rng, k, x, n);
        bad += !same_as_apply(ws, &spec, 1.0, x, n, x + n);
    }
    CHECK(ws && bad == 0, "%s n=%zu: %zu of 100 reused-workspace fits differ", method, n, bad);
    slowscan_detrend_workspace_free(ws);
    free(x);
}

enum { THREAD_SERIES = 12 };

typedef struct {
    detrend_workspace *ws;
    const double *x; /* THREAD_SERIES series of n */
    size_t n;
    double *out;     /* their residuals */
    int status;
} thread_job;

static void *thread_run(void *arg)
{
    thread_job *job = arg;
    job->status = SLOWSCAN_OK;
    for (size_t k = 0; k < THREAD_SERIES && job->status == SLOWSCAN_OK; k++)
        job->status = slowscan_detrend_apply_with(job->ws, job->x + k * job->n, job->n, NULL,
                                         job->out + k * job->n);
    return NULL;
}

/* Two threads, each with its own workspace (allocated here, on one thread, as the header asks),
 * detrend the same series concurrently; both give what serial slowscan_detrend_apply gives. */
static void check_threads(check_rng *rng, const char *method, size_t n)
{
    detrend_spec spec = spec_of(method, 0.1 * (double)(n - 1));
    double *x = malloc(4 * THREAD_SERIES * n * sizeof *x);
    double *serial = x + THREAD_SERIES * n;
    thread_job job[2];
    for (size_t k = 0; k < THREAD_SERIES; k++) {
        family_series(rng, k, x + k * n, n);
        slowscan_detrend_apply(&spec, 1.0, x + k * n, n, NULL, serial + k * n);
    }
    pthread_t tid[2];
    int started[2] = {0, 0};
    for (int t = 0; t < 2; t++) {
        job[t] = (thread_job){.ws = slowscan_detrend_workspace_alloc(&spec, 1.0, n), .x = x, .n = n,
                              .out = x + (size_t)(2 + t) * THREAD_SERIES * n,
                              .status = SLOWSCAN_ENOMEM};
        started[t] = job[t].ws && pthread_create(&tid[t], NULL, thread_run, &job[t]) == 0;
    }
    for (int t = 0; t < 2; t++) {
        if (started[t])
            pthread_join(tid[t], NULL);
        CHECK(started[t] && job[t].status == SLOWSCAN_OK &&
                  memcmp(job[t].out, serial, THREAD_SERIES * n * sizeof *x) == 0,
              "%s n=%zu: thread %d differs from the serial fits (status %d)", method, n, t,
              job[t].status);
        slowscan_detrend_workspace_free(job[t].ws);
    }
    free(x);
}

/* A series shorter than the workspace's: the same bits where nothing depends on the length's
 * transform; the Gaussian fits to round-off (the header's promise: ~1e-12 of the spread). */
static void check_shorter(check_rng *rng)
{
    size_t n = 2000, m = 1500;
    double *x = malloc(5 * n * sizeof *x);
    family_series(rng, 1, x, m);
    for (size_t k = 0; k < WS_METHODS; k++) {
        detrend_spec spec = spec_of(ws_methods[k], 150.0);
        detrend_workspace *ws = slowscan_detrend_workspace_alloc(&spec, 1.0, n);
        int gauss = spec.method == DETREND_GAUSSIAN || spec.method == DETREND_GAUSSIAN_LINEAR;
        if (!gauss) {
            CHECK(ws && same_as_apply(ws, &spec, 1.0, x, m, x + n), "%s: n %zu in a workspace "
                  "of %zu differs from slowscan_detrend_apply", ws_methods[k], m, n);
        } else {
            double *want = x + n, *got = x + 2 * n;
            int s1 = slowscan_detrend_apply(&spec, 1.0, x, m, want, NULL);
            int s2 = ws ? slowscan_detrend_apply_with(ws, x, m, got, NULL) : SLOWSCAN_ENOMEM;
            double err = s1 == SLOWSCAN_OK && s2 == SLOWSCAN_OK ? check_max_diff(got, want, m)
                                                                : INFINITY;
            CHECK(err <= 1e-11 * dc_max_abs(x, m), "%s: n %zu in a workspace of %zu: "
                  "max difference %.3g", ws_methods[k], m, n, err);
        }
        slowscan_detrend_workspace_free(ws);
    }
    free(x);
}

static void check_errors(void)
{
    double x[64], out[64];
    for (size_t i = 0; i < 64; i++)
        x[i] = sin(0.3 * (double)i);
    detrend_spec good = spec_of("gaussian-linear", 5.0);
    detrend_workspace *ws = slowscan_detrend_workspace_alloc(&good, 1.0, 32);
    CHECK(ws != NULL, "workspace for n = 32");
    CHECK(slowscan_detrend_apply_with(ws, x, 33, out, out) == SLOWSCAN_EINVAL, "n above the workspace's");
    CHECK(slowscan_detrend_apply_with(NULL, x, 10, out, out) == SLOWSCAN_EINVAL, "NULL workspace");
    CHECK(slowscan_detrend_apply_with(ws, NULL, 10, out, out) == SLOWSCAN_EINVAL, "NULL x");
    CHECK(slowscan_detrend_apply_with(ws, x, 1, out, out) == SLOWSCAN_ESHORT, "one sample");
    CHECK(slowscan_detrend_apply_with(ws, x, 32, out, out) == SLOWSCAN_OK, "after errors, still usable");
    slowscan_detrend_workspace_free(ws);
    slowscan_detrend_workspace_free(NULL); /* a no-op, like free */
    detrend_spec bad[] = {spec_of("gaussian", 0.0), spec_of("loess", -1.0),
                          spec_of("moving", NAN), {.method = (detrend_method)99},
                          {.method = DETREND_POLY, .degree = 13}};
    for (size_t k = 0; k < sizeof bad / sizeof bad[0]; k++)
        CHECK(slowscan_detrend_workspace_alloc(&bad[k], 1.0, 32) == NULL, "bad spec %zu: no workspace", k);
    CHECK(slowscan_detrend_workspace_alloc(NULL, 1.0, 32) == NULL, "NULL spec: no workspace");
    CHECK(slowscan_detrend_workspace_alloc(&good, 0.0, 32) == NULL, "dt 0: no workspace");
    CHECK(slowscan_detrend_workspace_alloc(&good, 1.0, 0) == NULL, "n 0: no workspace");
    detrend_spec poly = spec_of("poly:5", 0.0);
    ws = slowscan_detrend_workspace_alloc(&poly, 1.0, 32);
    CHECK(ws && slowscan_detrend_apply_with(ws, x, 5, out, out) == SLOWSCAN_EINVAL,
          "poly:5 on 5 samples (as slowscan_detrend_apply)");
    slowscan_detrend_workspace_free(ws);
}

void detrend_workspace_checks(check_rng *rng)
{
    check_every_method(rng);
    check_reuse(rng, "gaussian-linear", 2000);
    check_reuse(rng, "gaussian", 777);
    check_reuse(rng, "loess", 500);
    check_threads(rng, "gaussian-linear", 2000);
    check_threads(rng, "loess", 600);
    check_shorter(rng);
    check_errors();
}
