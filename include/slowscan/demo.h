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

#endif
