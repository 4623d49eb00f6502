/* Running the binary for the suites of timescales and emulate: runs, refusals, files. */
#include "check.h"
#include "timescales_check.h"

#include <stdio.h>
#include <stdlib.h>
#include <string.h>

int modes_run(const char *args, char **out, char **err)
{
    char line[8192];
    snprintf(line, sizeof line, "%s %s", check_binary(), args);
    return check_run(line, out, err);
}

void modes_expect_refusal(const char *what, const char *args, const char *needle)
{
    const char *out = check_tmp_path("modes-refused.csv");
    remove(out);
    char line[6000], *err = NULL;
    snprintf(line, sizeof line, "%s -o %s", args, out);
    int rc = modes_run(line, NULL, &err);
    size_t lines = 0;
    for (const char *c = err ? err : ""; *c; c++)
        lines += *c == '\n';
    CHECK(rc == 1, "%s: exit %d, want 1 (%s)", what, rc, err ? err : "");
    CHECK(lines == 1, "%s: want one message line, got: %s", what, err ? err : "(none)");
    CHECK(err && strstr(err, needle), "%s: message lacks '%s': %s", what, needle, err ? err : "");
    CHECK(!check_file_exists(out) && check_scratch_files("modes-refused.csv") == 0,
          "%s: an output file was left behind", what);
    free(err);
}

const char *modes_write_csv(const char *name, const char *header, size_t n, double t0, double dt,
                            const double *const *columns, size_t ncol)
{
    const char *path = check_tmp_path(name);
    FILE *fp = fopen(path, "w");
    if (!fp)
        return path;
    fprintf(fp, "%s\n", header);
    for (size_t i = 0; i < n; i++) {
        fprintf(fp, "%.10g", t0 + dt * (double)i);
        for (size_t c = 0; c < ncol; c++)
            fprintf(fp, ",%.12g", columns[c][i]);
        fputc('\n', fp);
    }
    fclose(fp);
    return path;
}
