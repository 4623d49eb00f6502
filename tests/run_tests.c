/* slowscan test runner: runs every suite, then prints "LABEL: N passed, N failed". */
#include "check.h"

#include <stdio.h>
#include <stdlib.h>
#include <string.h>

int check_totals(const char *label);

void suite_detrend(void);
void suite_sequential(void);
void suite_deseason(void);
void suite_io(void);
void suite_decimal(void);
void suite_indicators(void);
void suite_spectral(void);
void suite_kendall(void);
void suite_surrogates(void);
void suite_significance(void);
void suite_ar1_drift(void);
void suite_cli(void);
void suite_projection(void);
void suite_report(void);
void suite_figure_layout(void);
void suite_robustness(void);
void suite_leakage(void);
void suite_co2(void);
void suite_calibration(void);
void suite_library(void);
void suite_golden(void);
void suite_screen(void);
void suite_batch(void);
void suite_messages(void);
void suite_series_calls(void);
void suite_calendar(void);
void suite_time_column(void);
void suite_netcdf(void);
void suite_maps(void);
void suite_dated_cli(void);
void suite_interrupt(void);
void suite_merge(void);
void suite_resume(void);
void suite_store(void);
void suite_progress(void);
void suite_mpi(void);
void suite_ensemble(void);
void suite_feedback(void);
void suite_feedback_rates(void);
void suite_timescales(void);
void suite_emulate(void);
void suite_forced(void);
void suite_tail(void);
void suite_hostile(void);
void suite_edges(void);
void suite_limits(void);
void suite_fuzz(void);

static const struct {
    const char *name;
    void (*run)(void);
} suites[] = {
    {"detrend", suite_detrend},       {"deseason", suite_deseason}, {"io", suite_io}, {"decimal", suite_decimal},   {"indicators", suite_indicators},
    {"spectral", suite_spectral},
    {"kendall", suite_kendall},       {"surrogates", suite_surrogates}, {"ar1_drift", suite_ar1_drift}, {"cli", suite_cli},
    {"significance", suite_significance}, {"projection", suite_projection},
    {"report", suite_report},         {"figure_layout", suite_figure_layout},
    {"robustness", suite_robustness}, {"leakage", suite_leakage},
    {"co2", suite_co2},               {"calibration", suite_calibration},
    {"library", suite_library},
    {"golden", suite_golden},         {"screen", suite_screen},
    {"batch", suite_batch},           {"messages", suite_messages},
    {"store", suite_store},           {"progress", suite_progress},
    {"series_calls", suite_series_calls},
    {"timescales", suite_timescales}, {"emulate", suite_emulate}, {"forced", suite_forced},
    {"tail", suite_tail},             {"hostile", suite_hostile},
    {"fuzz", suite_fuzz},
    {"calendar", suite_calendar},
    {"time_column", suite_time_column}, {"netcdf", suite_netcdf},
    {"maps", suite_maps},
    {"dated_cli", suite_dated_cli},   {"interrupt", suite_interrupt},
    {"merge", suite_merge},           {"resume", suite_resume},
    {"mpi", suite_mpi},           {"sequential", suite_sequential},
    {"ensemble", suite_ensemble},
    {"feedback", suite_feedback},     {"feedback_rates", suite_feedback_rates},
    {"edges", suite_edges},           {"limits", suite_limits},
};

int main(int argc, char **argv)
{
    const char *label = getenv("SLOWSCAN_LABEL");
    for (size_t i = 0; i < sizeof suites / sizeof suites[0]; i++) {
        if (argc > 1 && strcmp(argv[1], suites[i].name) != 0)
            continue;
        fprintf(stderr, "-- %s\n", suites[i].name);
        suites[i].run();
    }
    return check_totals(label && *label ? label : "tests");
}
