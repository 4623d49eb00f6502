/* The forced-run demo: an invented two-layer energy-balance model, "the Tarn model", run
 * through the experiments a modeller screens with feedback, timescales and emulate
 * (include/slowscan/demo.h, data/README.md). Everything here is invented for the demo.
 *
 * Upper layer (T, K) and deep layer (D, K), annual time in years:
 *   C  dT/dt = F(t) + A(s) - R(T) - gamma (T - D) + weather noise
 *   Cd dD/dt = gamma (T - D)
 * Net flux at the top of the atmosphere: N = F + A(s) - R(T) + flux noise.
 * Two mechanisms make the model leave linear response, each only in some experiments:
 *  - the restoring feedback weakens above T_WEAK: the restoring flux is
 *    R(T) = LAMBDA T - KAPPA/2 max(0, T - T_WEAK)^2, so the local feedback dR/dT falls from
 *    LAMBDA to about 0.75 W m-2 K-1 at 7.8 K (only the quadrupled step warms that far);
 *  - a bistable ice patch s obeys the fold ds/dt = (s - s^3 + K_PATCH (T - T_PATCH)) / TAU_PATCH
 *    + noise; its lower branch ends at a fold near T = 3.8 K, where s jumps to the upper branch
 *    and darkens the surface: A(s) = PATCH_FORCING (s + 1) / 2.
 * With the shipped constants the linear modes have e-folding times of about 3.9 and 68 years. */
#include "slowscan/demo.h"
#include "slowscan/status.h"

#include <gsl/gsl_randist.h>
#include <gsl/gsl_rng.h>
#include <math.h>

static const double HEAT_UPPER = 8.0;   /* C, W yr m-2 K-1 */
static const double HEAT_DEEP = 30.0;   /* Cd */
static const double EXCHANGE = 0.7;     /* gamma, W m-2 K-1 */
static const double LAMBDA = 1.3;       /* restoring feedback magnitude, W m-2 K-1 */
static const double T_WEAK = 4.0, KAPPA = 0.15;
static const double T_PATCH = 3.0, K_PATCH = 0.5, TAU_PATCH = 2.0, PATCH_NOISE = 0.04;
static const double PATCH_FORCING = 2.4; /* W m-2 once the patch has flipped */
static const double WEATHER = 0.9;      /* W m-2 per sqrt(yr), stirring the upper layer */
static const double FLUX_NOISE = 0.35;  /* W m-2, white, on the annual net flux */
/* The control climate the anomalies are taken against, with a small model drift. */
static const double BASE_TAS = 287.4, TAS_DRIFT = 0.08;   /* K, K per century */
static const double BASE_FLUX = 0.45, FLUX_DRIFT = -0.05; /* W m-2, W m-2 per century */
static const double FORCING_DOUBLING = 3.7;               /* W m-2 */
enum { SUBSTEPS = 12 };

static const demo_experiment experiments[] = {
    /* name      kind               years level members settle */
    {"control",  DEMO_FORCING_NONE,  300, 0.0,  1, 0.0},
    {"step2x",   DEMO_FORCING_STEP,  300, 1.0,  1, 0.0},
    {"step4x",   DEMO_FORCING_STEP,  300, 2.0,  1, 0.0},
    {"ramp",     DEMO_FORCING_RAMP,  180, 0.0,  1, 0.0},
    {"overshoot-high", DEMO_FORCING_HOLD, 300, 1.66, 8, 0.9},
    {"overshoot-low", DEMO_FORCING_HOLD, 300, 1.00, 8, 0.9},
};

size_t slowscan_demo_experiment_count(void) { return sizeof experiments / sizeof experiments[0]; }

const demo_experiment *slowscan_demo_experiment_get(size_t k)
{
    return k < slowscan_demo_experiment_count() ? &experiments[k] : NULL;
}

/* Forcing in W m-2 at year t (t = 0 the first year): a step of `level` doublings, a CO2
 * increase of 1% a year (logarithmic forcing, 0.01436 doublings a year), or that ramp up to a
 * peak of `level` doublings and back to `settle`. */
static double forcing_at(const demo_experiment *e, double t)
{
    double ramp = FORCING_DOUBLING * t * log2(1.01);
    switch (e->kind) {
    case DEMO_FORCING_STEP: return FORCING_DOUBLING * e->level;
    case DEMO_FORCING_RAMP: return ramp;
    case DEMO_FORCING_HOLD: {
        /* Up at 1% a year to `level`, down twice as fast to `settle`, then held. */
        double rate = FORCING_DOUBLING * log2(1.01), peak = FORCING_DOUBLING * e->level;
        double peak_year = peak / rate;
        if (t < peak_year)
            return ramp;
        return fmax(FORCING_DOUBLING * e->settle, peak - 2.0 * rate * (t - peak_year));
    }
    default: return 0.0;
    }
}

typedef struct {
    double upper, deep, patch;
} layer_state;

/* One year of the model in SUBSTEPS Euler-Maruyama steps; returns the year's mean net flux
 * (before flux noise) and leaves the state at the end of the year. */
static double advance_year(layer_state *x, double forcing, gsl_rng *rng, double *mean_upper)
{
    const double h = 1.0 / SUBSTEPS;
    double flux = 0.0, upper = 0.0;
    for (int k = 0; k < SUBSTEPS; k++) {
        double excess = fmax(0.0, x->upper - T_WEAK);
        double albedo = PATCH_FORCING * (x->patch + 1.0) / 2.0;
        double net = forcing + albedo - LAMBDA * x->upper + 0.5 * KAPPA * excess * excess;
        double drive = K_PATCH * (x->upper - T_PATCH);
        double d_upper = (net - EXCHANGE * (x->upper - x->deep)) * h / HEAT_UPPER +
                         WEATHER * sqrt(h) * gsl_ran_gaussian_ziggurat(rng, 1.0) / HEAT_UPPER;
        x->deep += EXCHANGE * (x->upper - x->deep) * h / HEAT_DEEP;
        x->patch += (x->patch - x->patch * x->patch * x->patch + drive) * h / TAU_PATCH +
                    PATCH_NOISE * sqrt(h) * gsl_ran_gaussian_ziggurat(rng, 1.0);
        x->upper += d_upper;
        flux += net * h;
        upper += x->upper * h;
    }
    *mean_upper = upper;
    return flux;
}

int slowscan_demo_forced_run(unsigned long seed, const demo_experiment *e, size_t member,
                             double *year, double *forcing, double *net_flux, double *tas)
{
    if (!e || member >= e->members)
        return SLOWSCAN_EINVAL;
    gsl_rng *rng = gsl_rng_alloc(gsl_rng_mt19937);
    if (!rng)
        return SLOWSCAN_ENOMEM;
    /* One stream per experiment and member: adding one never changes the others. */
    size_t index = (size_t)(e - experiments);
    gsl_rng_set(rng, seed * 1000003UL + 9000 + 100 * index + member);
    layer_state x = {0.0, 0.0, -1.0};
    for (int spin = 0; spin < 400; spin++) { /* settle both layers and the patch */
        double ignored;
        advance_year(&x, 0.0, rng, &ignored);
    }
    int status = SLOWSCAN_OK;
    for (size_t i = 0; i < e->years && status == SLOWSCAN_OK; i++) {
        double t = (double)i, upper = 0.0;
        double f = forcing_at(e, t + 0.5);
        double n = advance_year(&x, f, rng, &upper);
        double century = t / 100.0;
        year[i] = DEMO_FORCED_FIRST_YEAR + t;
        forcing[i] = f;
        net_flux[i] = BASE_FLUX + FLUX_DRIFT * century + n +
                      FLUX_NOISE * gsl_ran_gaussian_ziggurat(rng, 1.0);
        tas[i] = BASE_TAS + TAS_DRIFT * century + upper;
        if (!isfinite(tas[i]) || fabs(x.patch) > 3.0)
            status = SLOWSCAN_ENUMERIC;
    }
    gsl_rng_free(rng);
    return status;
}
