/* The memory a run may still take, read before the work starts: the room left under the
 * process's cgroup limit (v2 memory.max - memory.current, v1 memory.limit_in_bytes -
 * memory.usage_in_bytes, the tightest level from the process's group up to the root of the
 * hierarchy; the usage less the page cache the kernel can reclaim, memory.stat's
 * inactive_file) and MemAvailable of /proc/meminfo, whichever is smaller. A container often
 * sees the host's whole memory in /proc/meminfo while its cgroup allows a fraction: the run
 * is then killed by the kernel mid-way, with no message, unless refused here.
 *
 * Testing hooks (not user settings, like SLOWSCAN_SPILL_AFTER): SLOWSCAN_CGROUP=DIR reads
 * that directory's memory.max and memory.current (or the v1 names) instead of the process's
 * groups, SLOWSCAN_MEMINFO=FILE reads FILE instead of /proc/meminfo. */
#include "cli.h"
#include "slowscan/robustness.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* A number of bytes from the first line of dir/name; "max" (v2) and v1's "no limit" (a page
 * count near 2^63) are INFINITY; NAN when the file is missing or unreadable. */
static double read_bytes(const char *dir, const char *name)
{
    char path[4200], line[64];
    snprintf(path, sizeof path, "%s/%s", dir, name);
    FILE *fp = fopen(path, "r");
    if (!fp)
        return NAN;
    int got = fgets(line, sizeof line, fp) != NULL;
    fclose(fp);
    if (!got)
        return NAN;
    if (strncmp(line, "max", 3) == 0)
        return INFINITY;
    char *end;
    double v = strtod(line, &end);
    if (end == line || !(v >= 0))
        return NAN;
    return v >= 0x1p62 ? INFINITY : v;
}

/* The group's page cache that the kernel reclaims before it fails an allocation (memory.stat's
 * inactive_file, v1 total_inactive_file): counted in the usage, but not taken. 0 if unknown. */
static double reclaimable(const char *dir, const char *key)
{
    char path[4200], line[256];
    snprintf(path, sizeof path, "%s/memory.stat", dir);
    FILE *fp = fopen(path, "r");
    double v = 0;
    size_t len = strlen(key);
    while (fp && fgets(line, sizeof line, fp))
        if (strncmp(line, key, len) == 0 && line[len] == ' ') {
            v = strtod(line + len + 1, NULL);
            break;
        }
    if (fp)
        fclose(fp);
    return v > 0 ? v : 0;
}

/* The room left at one level of the hierarchy (INFINITY: no limit there). */
static void level_room(const char *dir, cli_memory *m)
{
    double limit = read_bytes(dir, "memory.max"), usage = read_bytes(dir, "memory.current");
    const char *cache = "inactive_file";
    if (isnan(limit)) {
        limit = read_bytes(dir, "memory.limit_in_bytes");
        usage = read_bytes(dir, "memory.usage_in_bytes");
        cache = "total_inactive_file";
    }
    if (isnan(limit) || isinf(limit))
        return;
    usage = isnan(usage) ? 0 : fmax(0, usage - reclaimable(dir, cache));
    double room = limit > usage ? limit - usage : 0;
    if (room < m->cgroup_room) {
        m->cgroup_room = room;
        m->cgroup_limit = limit;
        m->cgroup_usage = usage;
    }
}

/* Every level from mount/group up to mount itself. */
static void walk_up(const char *mount, const char *group, cli_memory *m)
{
    char dir[4096];
    snprintf(dir, sizeof dir, "%s%s", mount, strcmp(group, "/") == 0 ? "" : group);
    size_t root = strlen(mount);
    for (;;) {
        level_room(dir, m);
        char *slash = strrchr(dir, '/');
        if (strlen(dir) <= root || !slash || (size_t)(slash - dir) < root)
            break;
        *slash = '\0';
    }
}

/* The process's memory groups from /proc/self/cgroup: "0::PATH" (v2) and
 * "N:...memory...:PATH" (v1). */
static void read_cgroups(cli_memory *m)
{
    FILE *fp = fopen("/proc/self/cgroup", "r");
    char line[4096];
    while (fp && fgets(line, sizeof line, fp)) {
        line[strcspn(line, "\n")] = '\0';
        char *first = strchr(line, ':'), *second = first ? strchr(first + 1, ':') : NULL;
        if (!second)
            continue;
        *second = '\0';
        const char *controllers = first + 1, *group = second + 1;
        if (*controllers == '\0')
            walk_up("/sys/fs/cgroup", group, m);
        else if (strstr(controllers, "memory"))
            walk_up("/sys/fs/cgroup/memory", group, m);
    }
    if (fp)
        fclose(fp);
}

static double read_meminfo(const char *path)
{
    FILE *fp = fopen(path, "r");
    char line[256];
    double kib = NAN;
    while (fp && fgets(line, sizeof line, fp))
        if (sscanf(line, "MemAvailable: %lf kB", &kib) == 1)
            break;
    if (fp)
        fclose(fp);
    return isnan(kib) ? INFINITY : kib * 1024.0;
}

void cli_memory_read(cli_memory *m)
{
    *m = (cli_memory){INFINITY, INFINITY, INFINITY, 0, INFINITY};
    const char *fake = getenv("SLOWSCAN_CGROUP");
    if (fake && *fake)
        level_room(fake, m);
    else
        read_cgroups(m);
    const char *meminfo = getenv("SLOWSCAN_MEMINFO");
    m->meminfo = read_meminfo(meminfo && *meminfo ? meminfo : "/proc/meminfo");
    m->available = fmin(m->cgroup_room, m->meminfo);
}

/* Bytes as the messages write them: "1.5 GiB", "200 MiB". */
static const char *amount(double bytes, char *buf, size_t size)
{
    const char *unit[] = {"bytes", "KiB", "MiB", "GiB", "TiB", "PiB", "EiB"};
    size_t u = 0;
    while (bytes >= 1024 && u + 1 < sizeof unit / sizeof unit[0])
        bytes /= 1024, u++;
    snprintf(buf, size, u ? "%.3g %s" : "%.0f %s", bytes, unit[u]);
    return buf;
}

int cli_memory_check(size_t needed, const char *what, const char *advice)
{
    cli_memory m;
    cli_memory_read(&m);
    if (!((double)needed > m.available))
        return EXIT_OK;
    char need[32], avail[32], limit[32], used[32], info[32];
    char source[160];
    if (m.cgroup_room <= m.meminfo)
        snprintf(source, sizeof source, "the cgroup's limit %s less %s in use",
                 amount(m.cgroup_limit, limit, sizeof limit), amount(m.cgroup_usage, used, sizeof used));
    else
        snprintf(source, sizeof source, "MemAvailable in /proc/meminfo");
    if (isfinite(m.meminfo) && m.cgroup_room <= m.meminfo)
        snprintf(source + strlen(source), sizeof source - strlen(source), "; MemAvailable %s",
                 amount(m.meminfo, info, sizeof info));
    cli_error("%s: the run needs about %s of memory, more than the %s available (%s); %s", what,
              amount((double)needed, need, sizeof need), amount(m.available, avail, sizeof avail),
              source, advice);
    return EXIT_BAD_INPUT;
}

/* The samples of the longest series over the inputs, and its input's name. */
static size_t longest_series(const cli_options *opts, const cli_inputs *in, const char **file)
{
    size_t longest = 0;
    *file = opts->nfiles ? opts->files[0] : "-";
    for (size_t f = 0; f < in->ntables; f++) {
        size_t n = in->tables[f].n;
        if (in->columns && in->columns[f])
            n = slowscan_csv_columns_header(in->columns[f])->n;
        if (in->grid_times && in->grid_cells[f] > 0)
            n = in->grid_times[f];
        if (n > longest)
            longest = n, *file = opts->files[f];
    }
    return longest;
}

/* The run's bytes with surrogates m per test and `threads` threads: a series per thread, or,
 * when the series are fewer than the threads, one series' surrogates over them all (as the
 * batch driver deals them: screen_batch.h). */
static size_t run_bytes(const cli_options *opts, screen_config cfg, size_t n, size_t m,
                        size_t threads, size_t series)
{
    cfg.surrogates = m;
    if (strcmp(opts->command, "robustness") == 0) {
        robustness_grid grid = slowscan_robustness_grid_default();
        grid.nbandwidths = opts->nbandwidths;
        cfg.threads = threads;
        return slowscan_robustness_memory_estimate(&cfg, &grid, n);
    }
    /* screen's sink keeps each series for --rolling and --ensemble */
    int keep = opts->rolling_output != NULL || opts->ensemble.on;
    int shared = series < threads;
    cfg.threads = shared ? threads : 1;
    return slowscan_screen_memory_estimate(&cfg, n, shared ? 1 : threads, keep);
}

/* Commands that hold a screening workspace per series, and whether they hold surrogates. */
static int guarded(const char *command, int *surrogates)
{
    static const char *const with[] = {"screen", "robustness", "recovery"};
    static const char *const without[] = {"detrend", "indicators", "surrogates"};
    for (size_t k = 0; k < 3; k++) {
        if (strcmp(command, with[k]) == 0)
            return *surrogates = 1;
        if (strcmp(command, without[k]) == 0)
            return !(*surrogates = 0);
    }
    return 0;
}

int cli_memory_guard(const cli_options *opts, const cli_inputs *in)
{
    int screen = strcmp(opts->command, "screen") == 0, surrogates;
    if (!guarded(opts->command, &surrogates))
        return EXIT_OK;
    screen_config cfg;
    cli_screen_config(opts, &cfg);
    const char *file, *option = "--surrogates";
    size_t n = longest_series(opts, in, &file), threads = (size_t)opts->threads;
    size_t series = cli_inputs_series_count(in);
    long m = surrogates ? opts->surrogates : 0; /* surrogates writes one replicate at a time */
    if (screen && opts->surrogates_auto) {
        /* a series holds at most --max-per-series surrogates per test, fewer when the whole
         * run's --budget is smaller */
        option = opts->budget > 0 && opts->budget < opts->max_per_series ? "--budget" : "--max-per-series";
        m = opts->budget > 0 && opts->budget < opts->max_per_series ? opts->budget : opts->max_per_series;
    }
    if (!screen)
        threads = 1; /* the other commands take one series at a time */
    size_t needed = run_bytes(opts, cfg, n, (size_t)m, threads, series);
    cli_memory room;
    cli_memory_read(&room);
    if (!((double)needed > room.available))
        return EXIT_OK;
    char what[600], advice[200];
    if ((double)run_bytes(opts, cfg, n, 0, threads, series) <= room.available) {
        snprintf(what, sizeof what, "option %s %ld", option, m);
        snprintf(advice, sizeof advice, "lower %s", option);
    } else if (threads > 1 && (double)run_bytes(opts, cfg, n, 0, 1, series) <= room.available) {
        snprintf(what, sizeof what, "option --threads %zu (series of %zu samples)", threads, n);
        snprintf(advice, sizeof advice, "lower --threads");
    } else {
        snprintf(what, sizeof what, "%s: a series of %zu samples", file, n);
        snprintf(advice, sizeof advice, "shorten it (--from, --until, --resample) or run on a "
                 "machine with more memory");
    }
    return cli_memory_check(needed, what, advice);
}
