/* slowscan — the invented demo scenario (module prefix: demo_).
 *
 * A network of shallow-lake monitoring stations reports a weekly turbidity reading. At some
 * stations nutrient loading slowly erodes the clear-water state: its dynamics follow the
 * saddle-node normal form dx/dt = a(t) - x^2 + noise, whose stable state x* = sqrt(a) loses
 * resilience (recovery rate 2 sqrt(a) -> 0) as a(t) ramps down toward the fold at a = 0. The
 * other stations are stationary controls. Everything here is invented for the demo. */
#ifndef SLOWSCAN_DEMO_H
#define SLOWSCAN_DEMO_H

#include "slowscan/export.h"

#include <stddef.h>

typedef struct {
    const char *name;
    double forcing_start; /* a at the first sample */
    double forcing_end;   /* a at the last sample (equal to start: a control) */
    double base_level;    /* turbidity of the clear state, NTU */
    double drift;         /* slow linear change of the level over the record, NTU */
} demo_station;

SLOWSCAN_API
size_t slowscan_demo_station_count(void);
SLOWSCAN_API
const demo_station *slowscan_demo_station_get(size_t k);

/* Sampling of the demo: weekly, in days since the start of the record. */
#define DEMO_SAMPLES 1040
#define DEMO_STEP_DAYS 7.0

/* Fills time[n] (days) and, for every station k, values[k][n] (NTU). Deterministic for a
 * given seed. SLOWSCAN_EINVAL for n < 8; SLOWSCAN_ENUMERIC if a path escaped the basin
 * (cannot happen with the shipped parameters, checked anyway). */
SLOWSCAN_API
int slowscan_demo_generate(unsigned long seed, size_t n, double *time, double **values);

/* The gridded demo (data/README.md): monthly Secchi depth on an invented coastal shelf of
 * DEMO_GRID_LAT x DEMO_GRID_LON cells for 50 years, a bay drifting toward a fold amid a
 * stationary open shelf and a strip of land with no data. */
#define DEMO_GRID_MONTHS 600
#define DEMO_GRID_LAT 8
#define DEMO_GRID_LON 10

/* Writes it to `path` as a CF NetCDF file (64-bit offset format, values packed as shorts with
 * a fill value, mid-month times in "days since 1981-01-01" on the noleap calendar); the same
 * bytes for the same seed. SLOWSCAN_EIO when the file cannot be written, SLOWSCAN_ENUMERIC if
 * a cell left its basin (not with the shipped parameters). */
SLOWSCAN_API
int slowscan_demo_grid_write(unsigned long seed, const char *path);

/* The forced-run demo (data/README.md): an invented two-layer energy-balance model run as a
 * control, abrupt steps of one and two doublings, a 1%-a-year ramp and an ensemble that ramps
 * and then comes back to a lower forcing, each with
 * some members past a threshold at the peak (or none). Annual means from DEMO_FORCED_FIRST_YEAR. */
#define DEMO_FORCED_FIRST_YEAR 1850.0

typedef enum {
    DEMO_FORCING_NONE, /* a control run */
    DEMO_FORCING_STEP, /* `level` doublings from the first year on */
    DEMO_FORCING_RAMP, /* 1% more CO2 a year, forcing logarithmic in concentration */
    DEMO_FORCING_HOLD  /* that ramp up to `level` doublings, down to `settle`, then held */
} demo_forcing_kind;

typedef struct {
    const char *name;
    demo_forcing_kind kind;
    size_t years;
    double level;      /* doublings (step; the peak of a hold run) */
    size_t members;    /* ensemble members (1: a single run) */
    double settle;     /* doublings a hold run comes back to and keeps */
} demo_experiment;

SLOWSCAN_API
size_t slowscan_demo_experiment_count(void);
SLOWSCAN_API
const demo_experiment *slowscan_demo_experiment_get(size_t k);

/* One member of an experiment: year[e->years], forcing (W m-2), net flux at the top of the
 * atmosphere (W m-2, with the control's offset and drift) and near-surface temperature (K,
 * absolute). Deterministic for a given seed. SLOWSCAN_EINVAL for a member out of range,
 * SLOWSCAN_ENUMERIC if the model blew up (not with the shipped constants). */
SLOWSCAN_API
int slowscan_demo_forced_run(unsigned long seed, const demo_experiment *e, size_t member,
                             double *year, double *forcing, double *net_flux, double *tas);

#endif
