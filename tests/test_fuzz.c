/* Suite fuzz: every committed fuzzing input (tests/fuzz/corpus/NAME/, the seeds and the
 * minimised corpus; tests/fuzz/regressions/NAME/, each input that once crashed, hung or leaked)
 * replayed through its harness by build/fuzz_replay, beside the binary under test (the
 * sanitized run uses build/asan/fuzz_replay, so ASan and UBSan watch the replay). */
#include "check.h"

#include <dirent.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* The NetCDF regressions are corrupt classic headers that crashed netcdf-c or made it
 * allocate gigabytes (io/netcdf_screen.c refuses them), and files the reader itself failed
 * on; through the binary, as files, each is one refusal naming the file and exit 1. The
 * harness input's first byte is its options. */
static void netcdf_regressions_refused(void)
{
    DIR *d = opendir("tests/fuzz/regressions/netcdf");
    CHECK(d != NULL, "tests/fuzz/regressions/netcdf exists");
    if (!d)
        return;
    for (struct dirent *e; (e = readdir(d)) != NULL;) {
        if (e->d_name[0] == '.')
            continue;
        char in[600], command[2048];
        snprintf(in, sizeof in, "tests/fuzz/regressions/netcdf/%s", e->d_name);
        const char *nc = check_tmp_path("corrupt.nc");
        snprintf(command, sizeof command, "tail -c +2 '%s' > '%s' && %s screen --surrogates 19 '%s'",
                 in, nc, check_binary(), nc);
        char *out = NULL, *err = NULL;
        int rc = check_run(command, &out, &err);
        CHECK(rc == 1 && err && strstr(err, nc) && strchr(err, '\n') == err + strlen(err) - 1,
              "%s as a file: exit 1 (got %d), one message naming it: %s", e->d_name, rc,
              err ? err : "");
        free(out);
        free(err);
    }
    closedir(d);
}

void suite_fuzz(void);
void suite_fuzz(void)
{
    char replay[600];
    const char *bin = check_binary();
    const char *slash = strrchr(bin, '/');
    snprintf(replay, sizeof replay, "%.*sfuzz_replay", slash ? (int)(slash - bin + 1) : 0, bin);
    char *out = NULL, *err = NULL;
    char command[700];
    snprintf(command, sizeof command, "%s tests/fuzz", replay);
    int rc = check_run(command, &out, &err);
    CHECK(rc == 0, "%s exits 0 (got %d): %s", command, rc, err ? err : "");
    static const char *const names[] = {"csv", "dates", "netcdf", "options", "lengths"};
    for (size_t k = 0; k < sizeof names / sizeof names[0]; k++) {
        char label[64];
        snprintf(label, sizeof label, "%s corpus: ", names[k]);
        const char *line = out ? strstr(out, label) : NULL;
        long files = line ? strtol(line + strlen(label), NULL, 10) : 0;
        CHECK(files > 0, "harness %s replayed its seed corpus (%ld files)", names[k], files);
    }
    free(out);
    free(err);
    netcdf_regressions_refused();
}
