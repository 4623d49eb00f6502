/* Suite fuzz: every committed fuzzing input (tests/fuzz/corpus/NAME/, the seeds and the
 * minimised corpus; tests/fuzz/regressions/NAME/, each input that once crashed, hung or leaked)
 * replayed through its harness by build/fuzz_replay, beside the binary under test (the
 * sanitized run uses build/asan/fuzz_replay, so ASan and UBSan watch the replay). */
#include "check.h"

#include <stdio.h>
#include <stdlib.h>
#include <string.h>

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
}
