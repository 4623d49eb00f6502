/* The committed demo table data/stations.csv, read for the suites that screen it. Apart from
 * check.c, which the validation program links without the library. */
#ifndef SLOWSCAN_TESTS_STATIONS_CHECK_H
#define SLOWSCAN_TESTS_STATIONS_CHECK_H

#include "slowscan/io.h"

/* Reads data/stations.csv into *t; 1 on success, else a failed check naming the file and 0. */
int check_read_stations(series_table *t);

#endif
