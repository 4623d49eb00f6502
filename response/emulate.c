/* Linear-response emulation (emulate.h): the step response of fitted modes, the convolution
 * of forcing increments with it (direct or FFTW), the noise of a control run, and the
 * persisting departure of an actual run from the emulation. */
#include "slowscan/emulate.h"
#include "slowscan/status.h"
#include "../detrend/detrend_internal.h"
#include "modes_internal.h"

#include <fftw3.h>
#include <gsl/gsl_cdf.h>
#include <gsl/gsl_fit.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

struct emulate_workspace {
    size_t cap, direct_max;
    size_t size;                  /* FFT length >= 2 cap - 1; 0: direct sums only */
    double *real_a, *real_b, *inc; /* size each (inc: cap) */
    fftw_complex *spec_a, *spec_b;
    fftw_plan forward, backward;
};

emulate_config slowscan_emulate_config_default(void)
{
    emulate_config c = {.band_level = 0.99, .persist = 0, .direct_max = 256};
    return c;
}

void slowscan_emulate_workspace_free(emulate_workspace *ws)
{
    if (!ws)
        return;
    if (ws->forward)
        fftw_destroy_plan(ws->forward);
    if (ws->backward)
        fftw_destroy_plan(ws->backward);
    fftw_free(ws->real_a);
    fftw_free(ws->real_b);
    fftw_free(ws->spec_a);
    fftw_free(ws->spec_b);
    free(ws->inc);
    free(ws);
}

/* Plans for a linear (not circular) convolution of two records of cap samples. FFTW's planner
 * is not thread-safe: allocate workspaces from one thread (or after
 * fftw_make_planner_thread_safe, as the command does). */
emulate_workspace *slowscan_emulate_workspace_alloc(size_t n, const emulate_config *cfg)
{
    if (n < 1 || !cfg)
        return NULL;
    emulate_workspace *ws = calloc(1, sizeof *ws);
    if (!ws || !(ws->inc = malloc(n * sizeof *ws->inc))) {
        free(ws);
        return NULL;
    }
    ws->cap = n;
    ws->direct_max = cfg->direct_max;
    if (n <= cfg->direct_max)
        return ws;
    ws->size = detrend_fft_size(2 * n - 1);
    size_t nc = ws->size / 2 + 1;
    ws->real_a = fftw_malloc(ws->size * sizeof(double));
    ws->real_b = fftw_malloc(ws->size * sizeof(double));
    ws->spec_a = fftw_malloc(nc * sizeof(fftw_complex));
    ws->spec_b = fftw_malloc(nc * sizeof(fftw_complex));
    if (ws->real_a && ws->real_b && ws->spec_a && ws->spec_b) {
        ws->forward = fftw_plan_dft_r2c_1d((int)ws->size, ws->real_a, ws->spec_a, FFTW_ESTIMATE);
        ws->backward = fftw_plan_dft_c2r_1d((int)ws->size, ws->spec_a, ws->real_a, FFTW_ESTIMATE);
    }
    if (!ws->forward || !ws->backward) {
        slowscan_emulate_workspace_free(ws);
        return NULL;
    }
    return ws;
}

int slowscan_emulate_modes_response(const timescales_result *modes, double step_forcing,
                                    double dt, double lag0, size_t n, double *response)
{
    if (!modes || !(step_forcing != 0) || !isfinite(step_forcing) || !(dt > 0) || !(lag0 >= 0))
        return SLOWSCAN_EINVAL;
    for (size_t m = 0; m < n; m++) {
        double lag = lag0 + (double)m * dt;
        slowscan_timescales_evaluate(modes, &lag, 1, &response[m], NULL);
        response[m] /= step_forcing;
    }
    return SLOWSCAN_OK;
}

int slowscan_emulate_empirical_response(const double *t, const double *y, size_t m, double dt,
                                        double step_forcing, size_t n, double *response,
                                        size_t *gap)
{
    if (!(dt > 0) || !(step_forcing != 0) || !isfinite(step_forcing))
        return SLOWSCAN_EINVAL;
    for (size_t k = 0; k < n; k++)
        response[k] = k == 0 ? 0.0 : NAN;
    for (size_t i = 0; i < m; i++) {
        double lag = t[i] / dt;
        size_t k = (size_t)llround(lag);
        if (!(fabs(lag - (double)k) <= 1e-6))
            return SLOWSCAN_EINVAL;
        if (k < n)
            response[k] = y[i] / step_forcing;
    }
    for (size_t k = 0; k < n; k++)
        if (isnan(response[k])) {
            if (gap)
                *gap = k;
            return SLOWSCAN_ESHORT;
        }
    return SLOWSCAN_OK;
}

/* The linear convolution by FFT: both inputs zero-padded to the planned length. */
static void convolve_fft(emulate_workspace *ws, const double *response, size_t n, double *out)
{
    size_t nc = ws->size / 2 + 1;
    memset(ws->real_a, 0, ws->size * sizeof(double));
    memset(ws->real_b, 0, ws->size * sizeof(double));
    memcpy(ws->real_a, ws->inc, n * sizeof(double));
    memcpy(ws->real_b, response, n * sizeof(double));
    fftw_execute_dft_r2c(ws->forward, ws->real_a, ws->spec_a);
    fftw_execute_dft_r2c(ws->forward, ws->real_b, ws->spec_b);
    for (size_t k = 0; k < nc; k++) {
        double re = ws->spec_a[k][0] * ws->spec_b[k][0] - ws->spec_a[k][1] * ws->spec_b[k][1];
        double im = ws->spec_a[k][0] * ws->spec_b[k][1] + ws->spec_a[k][1] * ws->spec_b[k][0];
        ws->spec_a[k][0] = re;
        ws->spec_a[k][1] = im;
    }
    fftw_execute_dft_c2r(ws->backward, ws->spec_a, ws->real_a);
    for (size_t i = 0; i < n; i++)
        out[i] = ws->real_a[i] / (double)ws->size; /* FFTW's transforms are unnormalised */
}

int slowscan_emulate_convolve(emulate_workspace *ws, const double *response,
                              const double *forcing, size_t n, double *out)
{
    if (!ws || n > ws->cap)
        return SLOWSCAN_EINVAL;
    for (size_t i = 0; i < n; i++) {
        if (!isfinite(forcing[i]) || !isfinite(response[i]))
            return SLOWSCAN_EINVAL;
        ws->inc[i] = forcing[i] - (i ? forcing[i - 1] : 0.0);
    }
    if (n > ws->direct_max && ws->size > 0) {
        convolve_fft(ws, response, n, out);
        return SLOWSCAN_OK;
    }
    for (size_t i = 0; i < n; i++) {
        double s = 0;
        for (size_t j = 0; j <= i; j++)
            s += ws->inc[j] * response[i - j];
        out[i] = s;
    }
    return SLOWSCAN_OK;
}

size_t slowscan_emulate_default_persist(double r1)
{
    double r = !(r1 > 0) ? 0.0 : r1 > 0.9 ? 0.9 : r1;
    return (size_t)ceil(3.0 * (1.0 + r) / (1.0 - r) - 1e-9);
}

int slowscan_emulate_control_noise(const double *x, size_t n, double *sd, double *r1)
{
    if (n < 4)
        return SLOWSCAN_ESHORT;
    double *res = malloc(n * sizeof *res), *idx = malloc(n * sizeof *idx);
    if (!res || !idx) {
        free(res);
        free(idx);
        return SLOWSCAN_ENOMEM;
    }
    int st = SLOWSCAN_OK;
    for (size_t i = 0; i < n; i++) {
        idx[i] = (double)i;
        st = isfinite(x[i]) ? st : SLOWSCAN_EINVAL;
    }
    double c0, c1, v00, v01, v11, ss = 0;
    if (st == SLOWSCAN_OK && gsl_fit_linear(idx, 1, x, 1, n, &c0, &c1, &v00, &v01, &v11, &ss))
        st = SLOWSCAN_ENUMERIC;
    if (st == SLOWSCAN_OK) {
        for (size_t i = 0; i < n; i++)
            res[i] = x[i] - (c0 + c1 * idx[i]);
        *sd = sqrt(ss / (double)(n - 2));
        *r1 = modes_lag1(res, n);
        st = *sd > 0 ? SLOWSCAN_OK : SLOWSCAN_ECONST;
    }
    free(res);
    free(idx);
    return st;
}

static emulate_side band_side(double d, double half)
{
    return !isfinite(d) ? EMULATE_NOT_COMPARED : d > half ? EMULATE_ABOVE
           : d < -half ? EMULATE_BELOW : EMULATE_INSIDE;
}

/* The side of the band sample i is on: +1 above, -1 below, 0 inside or not compared. */
static int side(const double *actual, const double *emulated, size_t i, double half)
{
    emulate_side s = band_side(actual[i] - emulated[i], half);
    return s == EMULATE_ABOVE ? 1 : s == EMULATE_BELOW ? -1 : 0;
}

void slowscan_emulate_band(const double *actual, const double *emulated, size_t n,
                           double half_width, double *difference, double *lower, double *upper,
                           emulate_side *side_of)
{
    for (size_t i = 0; i < n; i++) {
        difference[i] = actual[i] - emulated[i];
        lower[i] = emulated[i] - half_width;
        upper[i] = emulated[i] + half_width;
        side_of[i] = band_side(difference[i], half_width);
    }
}

int slowscan_emulate_departure(const emulate_config *cfg, const double *actual,
                               const double *emulated, size_t n, double sd, double r1,
                               emulate_departure *out)
{
    memset(out, 0, sizeof *out);
    if (!cfg || !(sd > 0) || !(cfg->band_level > 0.5 && cfg->band_level < 1))
        return SLOWSCAN_EINVAL;
    out->persist = cfg->persist ? cfg->persist : slowscan_emulate_default_persist(r1);
    out->half_width = gsl_cdf_ugaussian_Pinv(0.5 + 0.5 * cfg->band_level) * sd;
    out->size = NAN;
    size_t run = 0;
    int run_side = 0;
    for (size_t i = 0; i < n; i++) {
        int s = side(actual, emulated, i, out->half_width);
        out->outside += s != 0;
        run = s != 0 && s == run_side ? run + 1 : s != 0;
        run_side = s;
        if (out->departed || run < out->persist)
            continue;
        out->departed = 1;
        out->first = i + 1 - run;
        out->confirmed = i;
        out->sign = s;
    }
    if (!out->departed)
        return SLOWSCAN_OK;
    double sum = 0;
    out->last = out->first;
    for (size_t i = out->first; i < n && side(actual, emulated, i, out->half_width) == out->sign; i++) {
        sum += actual[i] - emulated[i];
        out->last = i;
    }
    out->size = sum / (double)(out->last - out->first + 1);
    return SLOWSCAN_OK;
}
