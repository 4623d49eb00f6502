/* The demo scenario: weekly turbidity at eight invented lake stations (see include/slowscan/demo.h
 * and data/README.md). Four stations drift toward a fold, four are controls. */
#include "slowscan/demo.h"
#include "slowscan/status.h"

#include <gsl/gsl_randist.h>
#include <gsl/gsl_rng.h>
#include <math.h>

static const demo_station stations[] = {
    /* name          a_start a_end  level  drift */
    {"north_bay",    1.00,   0.05,  12.0,  1.5},
    {"reed_inlet",   1.00,   0.08,  15.0,  0.0},
    {"mill_pond",    0.80,   0.04,   9.0, -1.0},
    {"east_shoal",   1.20,   0.15,  18.0,  2.5},
    {"deep_basin",   1.00,   1.00,  11.0,  0.0},
    {"outflow",      0.60,   0.60,  14.0,  1.5},
    {"west_cove",    1.00,   1.00,  16.0, -2.0},
    {"spring_head",  0.30,   0.30,  10.0,  0.0},
};

size_t slowscan_demo_station_count(void) { return sizeof stations / sizeof stations[0]; }

const demo_station *slowscan_demo_station_get(size_t k)
{
    return k < slowscan_demo_station_count() ? &stations[k] : NULL;
}

/* Dynamics run in weeks (one sample per week) with a lake response time of TAU weeks:
 * dx = (a - x^2) dt / TAU + NOISE dW, so the recovery rate 2 sqrt(a) / TAU falls from 0.5 to
 * about 0.1 per week on the drifting stations (weekly lag-1 autocorrelation 0.6 -> 0.9).
 * 20 Euler-Maruyama substeps per week keep the discretisation error far below the noise; the
 * noise 0.015 per sqrt(week) keeps escape over the barrier (4/3 a^{3/2} / TAU) negligible. */
enum { SUBSTEPS = 20 };
static const double TAU = 4.0;
static const double NOISE = 0.015;
static const double SCALE_NTU = 4.0;    /* NTU per unit of the normal-form state */
static const double SEASON_NTU = 1.2;   /* amplitude of the annual cycle */
static const double SENSOR_NTU = 0.01;  /* white measurement noise */

static int simulate_station(const demo_station *s, gsl_rng *rng, size_t n, double *out)
{
    double x = sqrt(s->forcing_start), h = 1.0 / SUBSTEPS;
    for (size_t i = 0; i < n; i++) {
        double frac = (double)i / (double)(n - 1);
        double a = s->forcing_start + (s->forcing_end - s->forcing_start) * frac;
        for (int k = 0; k < SUBSTEPS; k++)
            x += (a - x * x) * h / TAU + NOISE * sqrt(h) * gsl_ran_gaussian_ziggurat(rng, 1.0);
        if (!(x > -sqrt(a)))
            return SLOWSCAN_ENUMERIC; /* left the basin of the stable state */
        double season = SEASON_NTU * sin(2.0 * 3.14159265358979323846 * (double)i / 52.0);
        /* Turbidity falls as the clear-water state x grows: reading = level - scale*x. */
        out[i] = s->base_level + s->drift * frac - SCALE_NTU * x + season +
                 SENSOR_NTU * gsl_ran_gaussian_ziggurat(rng, 1.0);
    }
    return SLOWSCAN_OK;
}

int slowscan_demo_generate(unsigned long seed, size_t n, double *time, double **values)
{
    if (n < 8)
        return SLOWSCAN_EINVAL;
    gsl_rng *rng = gsl_rng_alloc(gsl_rng_mt19937);
    if (!rng)
        return SLOWSCAN_ENOMEM;
    for (size_t i = 0; i < n; i++)
        time[i] = DEMO_STEP_DAYS * (double)i;
    int status = SLOWSCAN_OK;
    for (size_t k = 0; k < slowscan_demo_station_count() && status == SLOWSCAN_OK; k++) {
        /* One stream per station, so adding a station never changes the others. */
        gsl_rng_set(rng, seed * 1000003UL + k);
        status = simulate_station(&stations[k], rng, n, values[k]);
    }
    gsl_rng_free(rng);
    return status;
}
