/* data/stations.csv for the suites (stations_check.h). */
#include "stations_check.h"
#include "check.h"
#include "slowscan/status.h"

int check_read_stations(series_table *t)
{
    io_error err;
    csv_read_options ro = slowscan_csv_read_options_default();
    int st = slowscan_csv_read_table("data/stations.csv", &ro, t, &err);
    CHECK(st == SLOWSCAN_OK, "data/stations.csv: %s", err.message);
    return st == SLOWSCAN_OK;
}
