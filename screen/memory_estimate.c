/* What a screening or robustness run holds in memory, from its configuration alone, so a
 * caller can compare it with the memory available before any work starts (the command reads
 * the cgroup's limit and MemAvailable: cli/memory.c). Nothing here allocates or reads.
 *
 * The model counts doubles per sample of the longest series and per surrogate, from the
 * workspaces' allocations: the prepared series (value, trend, residual; a control run's
 * residual beside them), the rolling paths, the detrend workspace's padded FFT transforms (the
 * data, its moments and the kernel's, about 2n complex values each), Kendall's and the drift
 * fit's scratch, the surrogate plan; per surrogate thread the null pipeline's surrogate,
 * level, paths, sort, drift and rolling scratch and the null model's buffers; and per test
 * the surrogates' statistics plus one sorted copy; with keep_series the batch driver's
 * reorder buffer (2 slots per worker, each a copy of the arrays, paths and nulls).
 *
 * Measured (the command's peak resident size, /usr/bin/time, on a 2-core machine): a series
 * of 10^6 samples screened with 19 surrogates peaked at 470 MB with its CSV input read in,
 * against 560 MB counted here without the input (with no surrogates: 331 MB, 368 MB counted); 10^6 surrogates of a 200-sample series took
 * 38 MB above 1000 surrogates, against 32 MB for the arrays counted, so the surrogate arrays
 * are counted with a quarter more (the allocator's rounding and copies not tracked). */
#include "slowscan/robustness.h"
#include "slowscan/screen.h"

#include <stdint.h>

/* Doubles per sample held once per workspace beyond the paths (prepared 3 + control 3,
 * detrend 24, Kendall 4, drift fit 6, surrogate plan 4), and per surrogate thread beyond
 * its paths (surrogate, level, Kendall 4, drift 6, rolling scratch 4, null model 6). */
enum { PER_SAMPLE_WORKSPACE = 44, PER_SAMPLE_THREAD = 22 };

static size_t saturate(double bytes)
{
    return bytes >= (double)SIZE_MAX ? SIZE_MAX : (size_t)bytes;
}

#define SURROGATE_MARGIN 1.25

static double workspace_bytes(const screen_config *cfg, size_t n, size_t threads)
{
    double k = (double)cfg->nindicators, tests = (double)slowscan_screen_test_count(cfg);
    /* the null pipeline's workspaces are made only when surrogates are drawn */
    double per_thread = cfg->surrogates > 0 ? (k + PER_SAMPLE_THREAD) * (double)n : 0.0;
    double doubles = (k + PER_SAMPLE_WORKSPACE) * (double)n + (double)threads * per_thread +
                     SURROGATE_MARGIN * (tests + 1.0) * (double)cfg->surrogates;
    return doubles * sizeof(double);
}

size_t slowscan_screen_memory_estimate(const screen_config *cfg, size_t n, size_t workers,
                                       int keep_series)
{
    size_t threads = cfg->threads < 1 ? 1 : cfg->threads;
    double w = (double)(workers < 1 ? 1 : workers);
    double bytes = w * workspace_bytes(cfg, n, threads);
    if (keep_series) {
        double k = (double)cfg->nindicators, tests = (double)slowscan_screen_test_count(cfg);
        bytes += 2.0 * w * ((3.0 + k) * (double)n + tests * (double)cfg->surrogates) * sizeof(double);
    }
    return saturate(bytes);
}

size_t slowscan_robustness_memory_estimate(const screen_config *cfg, const robustness_grid *grid,
                                           size_t n)
{
    /* two screening workspaces (the rolling cells and recovery_trend) and one prepared series
     * per bandwidth of the method being walked */
    size_t threads = cfg->threads < 1 ? 1 : cfg->threads;
    double bandwidths = grid->nbandwidths > 0 ? (double)grid->nbandwidths : 1.0;
    return saturate(2.0 * workspace_bytes(cfg, n, threads) + bandwidths * 3.0 * (double)n * sizeof(double));
}
