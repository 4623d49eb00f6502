/* Replays fuzzing inputs through the harnesses without libFuzzer (built with -DFUZZ_REPLAY by
 * any C compiler; `make check` builds it plainly and under ASan + UBSan, suite `fuzz` runs it).
 *
 *   fuzz_replay [ROOT]             every file of ROOT/corpus/NAME/ and ROOT/regressions/NAME/
 *                                  through harness NAME (ROOT: tests/fuzz)
 *   fuzz_replay NAME FILE...       those files through harness NAME (to reproduce one)
 *
 * Prints a line per harness and directory, "NAME: N files"; exits 0 when every input went
 * through, 1 when one could not be read. A crash is the sanitizer's report and exit code. */
#define _DEFAULT_SOURCE /* DT_REG */
#include "fuzz.h"

#include <dirent.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

static const struct {
    const char *name;
    int (*run)(const uint8_t *data, size_t size);
} harnesses[] = {
    {"csv", fuzz_csv_one},         {"dates", fuzz_dates_one},     {"netcdf", fuzz_netcdf_one},
    {"options", fuzz_options_one}, {"lengths", fuzz_lengths_one},
};
enum { NHARNESS = sizeof harnesses / sizeof harnesses[0] };

/* Read by AddressSanitizer at start-up in the sanitized build (the environment's ASAN_OPTIONS
 * are added to these). netcdf-c allocates what a corrupt header claims, up to 2^64 bytes; as
 * under `make fuzz`, an allocation over 2 GiB returns NULL (as malloc would on a machine
 * without that memory) instead of ending the replay. */
const char *__asan_default_options(void);
const char *__asan_default_options(void)
{
    return "allocator_may_return_null=1:max_allocation_size_mb=2048";
}

static int replay_file(int h, const char *path)
{
    FILE *fp = fopen(path, "rb");
    if (!fp) {
        fprintf(stderr, "fuzz_replay: cannot open %s\n", path);
        return 1;
    }
    size_t cap = 1 << 12, size = 0;
    uint8_t *data = malloc(cap);
    for (size_t got; data && (got = fread(data + size, 1, cap - size, fp)) > 0;) {
        size += got;
        if (size == cap) {
            uint8_t *more = realloc(data, cap *= 2);
            if (!more)
                free(data);
            data = more;
        }
    }
    fclose(fp);
    if (!data) {
        fprintf(stderr, "fuzz_replay: out of memory reading %s\n", path);
        return 1;
    }
    /* the input in a buffer of exactly its size, as libFuzzer gives it, so that ASan sees a
     * read past its end */
    uint8_t *exact = malloc(size ? size : 1);
    if (exact && size)
        memcpy(exact, data, size);
    free(data);
    if (!exact)
        return 1;
    /* twice, as libFuzzer runs an input again and again: memory a library keeps only until
     * its next call (a parser's last token) is lost by the second run, so LeakSanitizer sees
     * at exit what it would otherwise take for a live pointer */
    harnesses[h].run(exact, size);
    harnesses[h].run(exact, size);
    free(exact);
    return 0;
}

static int compare_names(const void *a, const void *b)
{
    return strcmp(*(char *const *)a, *(char *const *)b);
}

/* Every regular file of dir, in name order (so a failure reproduces in the same order). */
static int replay_dir(int h, const char *dir, size_t *count)
{
    DIR *d = opendir(dir);
    if (!d)
        return 0; /* a harness may have no regressions yet */
    char **names = NULL;
    size_t n = 0, cap = 0;
    int bad = 0;
    for (struct dirent *e; (e = readdir(d)) != NULL && !bad;) {
        if (e->d_name[0] == '.')
            continue;
        if (n == cap) {
            char **more = realloc(names, (cap = cap ? 2 * cap : 64) * sizeof *names);
            bad = !more;
            if (more)
                names = more;
        }
        if (!bad)
            bad = !(names[n++] = strdup(e->d_name));
    }
    closedir(d);
    if (!bad && n > 0)
        qsort(names, n, sizeof *names, compare_names);
    for (size_t k = 0; k < n; k++) {
        char path[4096];
        if (!bad && names[k]) {
            snprintf(path, sizeof path, "%s/%s", dir, names[k]);
            bad = replay_file(h, path);
        }
        free(names[k]);
    }
    free(names);
    *count += n;
    return bad;
}

static int find_harness(const char *name)
{
    for (int h = 0; h < NHARNESS; h++)
        if (strcmp(harnesses[h].name, name) == 0)
            return h;
    return -1;
}

int main(int argc, char **argv)
{
    int h = argc > 2 ? find_harness(argv[1]) : -1;
    if (argc > 2) {
        if (h < 0) {
            fprintf(stderr, "fuzz_replay: no harness '%s'\n", argv[1]);
            return 1;
        }
        for (int k = 2; k < argc; k++)
            if (replay_file(h, argv[k]))
                return 1;
        printf("%s: %d files\n", argv[1], argc - 2);
        return 0;
    }
    const char *root = argc > 1 ? argv[1] : "tests/fuzz";
    int bad = 0;
    for (h = 0; h < NHARNESS && !bad; h++) {
        static const char *const kinds[] = {"corpus", "regressions"};
        for (int k = 0; k < 2 && !bad; k++) {
            char dir[2048];
            size_t count = 0;
            snprintf(dir, sizeof dir, "%s/%s/%s", root, kinds[k], harnesses[h].name);
            bad = replay_dir(h, dir, &count);
            printf("%s %s: %zu files\n", harnesses[h].name, kinds[k], count);
        }
    }
    return bad;
}
