/* slowscan — every public header of the core library (libslowscan).
 *
 * Link with `pkg-config --cflags --libs slowscan`. The figure and demo-data modules
 * (slowscan/report.h, slowscan/demo.h) belong to libslowscan-report, which needs PLplot, and
 * are not included here. */
#ifndef SLOWSCAN_H
#define SLOWSCAN_H

#include "slowscan/version.h"
#include "slowscan/status.h"
#include "slowscan/detrend.h"
#include "slowscan/indicators.h"
#include "slowscan/kendall.h"
#include "slowscan/surrogates.h"
#include "slowscan/null_trend.h"
#include "slowscan/significance.h"
#include "slowscan/tail.h"
#include "slowscan/sequential.h"
#include "slowscan/ar1_drift.h"
#include "slowscan/calendar.h"
#include "slowscan/time_units.h"
#include "slowscan/io.h"
#include "slowscan/netcdf_input.h"
#include "slowscan/journal.h"
#include "slowscan/screen.h"
#include "slowscan/screen_batch.h"
#include "slowscan/screen_sequential.h"
#include "slowscan/robustness.h"
#include "slowscan/recovery.h"
#include "slowscan/ensemble.h"
#include "slowscan/feedback.h"
#include "slowscan/timescales.h"
#include "slowscan/emulate.h"
#include "slowscan/message.h"
#include "slowscan/screen_store.h"
#include "slowscan/netcdf_maps.h"
#include "slowscan/screen_memory.h"

#endif
