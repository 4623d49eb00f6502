/* feedback and timescales --ensemble through the binary on the demo's overshoot ensembles:
 * the split warning where the members part (overshoot-high) and not where they do not
 * (overshoot-low); each member's rows equal a run on that member's columns alone (written by
 * pandas); the mean's rows equal a run on numpy's mean columns; the refusals. */
#include "check.h"
#include "timescales_check.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

static const char *const HIGH = "data/forced-overshoot-high.csv";
static const char *const LOW = "data/forced-overshoot-low.csv";
static const char *const CONTROL = "data/forced-control.csv";

/* The lines of out that start with prefix, prefix removed (malloc'd). */
static char *rows_with(const char *out, const char *prefix)
{
    size_t len = out ? strlen(out) : 0, pl = strlen(prefix), used = 0;
    char *rows = calloc(len + 1, 1);
    for (const char *p = out; rows && p && *p;) {
        const char *e = strchr(p, '\n');
        size_t n = e ? (size_t)(e - p) + 1 : strlen(p);
        if (strncmp(p, prefix, pl) == 0) {
            memcpy(rows + used, p + pl, n - pl);
            used += n - pl;
        }
        p += n;
    }
    return rows;
}

/* Largest relative difference between the numeric fields of two tables of the same shape;
 * INFINITY when a text field differs or the shapes do not match. */
static double fields_diff(const char *a, const char *b)
{
    double worst = 0;
    while (a && b && *a && *b) {
        size_t na = strcspn(a, ",\n"), nb = strcspn(b, ",\n");
        char *ea, *eb;
        double x = strtod(a, &ea), y = strtod(b, &eb);
        if (ea == a + na && eb == b + nb && na && nb)
            worst = fmax(worst, x == y ? 0 : fabs(x - y) / fmax(fabs(y), 1e-300));
        else if (na != nb || strncmp(a, b, na) != 0)
            return INFINITY;
        if (a[na] != b[nb])
            return INFINITY;
        a += na + (a[na] != '\0');
        b += nb + (b[nb] != '\0');
    }
    return a && b && !*a && !*b ? worst : INFINITY;
}

static size_t count(const char *text, const char *needle)
{
    size_t n = 0;
    for (const char *p = text; p && (p = strstr(p, needle)); p++)
        n++;
    return n;
}

/* pandas/numpy: the member's (or the mean's) columns of FILE as a single run; its path. */
static const char *single_run(const char *file, const char *names, const char *member)
{
    char name[64], args[1024];
    snprintf(name, sizeof name, "ens-%s-%s.csv", member, strchr(names, ',') ? "pair" : "one");
    const char *path = check_tmp_path(name);
    double m = 0;
    snprintf(args, sizeof args, "ensemble_columns.py %s %s %s %s", file, path, names, member);
    CHECK(check_python(args, &m, 1) == 1 && m == 8, "pandas wrote %s of %s (%g members)", member,
          file, m);
    return path;
}

/* The split warning: once over the overshoot-high members, never over overshoot-low's. */
static void test_split(const char *command)
{
    const char *files[] = {HIGH, LOW};
    for (int j = 0; j < 2; j++) {
        char args[1024], *out = NULL, *err = NULL;
        snprintf(args, sizeof args, "%s --ensemble --flux net_flux --response tas --baseline %s "
                 "--baseline-mode drift --max-modes 1 %s", command, CONTROL, files[j]);
        if (strcmp(command, "feedback") == 0) /* --max-modes is timescales' */
            *strstr(args, " --max-modes 1") = '\0', strcat(args, " "), strcat(args, files[j]);
        if (strcmp(command, "timescales") == 0) /* --flux is --joint's */
            memmove(strstr(args, "--flux"), strstr(args, "--response"),
                    strlen(strstr(args, "--response")) + 1);
        CHECK(modes_run(args, &out, &err) == 0, "%s --ensemble on %s runs: %s", command, files[j],
              err ? err : "");
        CHECK(count(err, "ensemble 'tas' splits") == (j == 0 ? 1u : 0u),
              "%s on %s: %s split warning: %s", command, files[j], j == 0 ? "one" : "no",
              err ? err : "");
        CHECK(out && strncmp(out, "member,", 7) == 0 && count(out, "\nmean,") > 0 &&
              count(out, "\nm08,") > 0, "%s: a leading member column, members m01..m08 and "
              "mean", command);
        free(out), free(err);
    }
}

/* feedback: each member's rows are a run on its two columns alone, byte for byte; the mean's
 * are a run on numpy's mean columns (written with 12 digits: 1e-8). */
static void test_feedback_members(void)
{
    char args[2048], *ens = NULL, *one = NULL;
    snprintf(args, sizeof args, "feedback --ensemble --flux net_flux --response tas --baseline %s "
             "--baseline-mode drift --quiet %s", CONTROL, HIGH);
    CHECK(modes_run(args, &ens, NULL) == 0, "feedback --ensemble --baseline runs");
    const char *members[] = {"m01", "m04", "m08"};
    for (int j = 0; j < 3; j++) {
        snprintf(args, sizeof args, "feedback --flux net_flux --response tas --baseline %s "
                 "--baseline-mode drift --quiet %s", CONTROL, single_run(HIGH, "net_flux,tas", members[j]));
        CHECK(modes_run(args, &one, NULL) == 0, "feedback on member %s alone runs", members[j]);
        char prefix[16];
        snprintf(prefix, sizeof prefix, "%s,", members[j]);
        char *rows = rows_with(ens, prefix);
        const char *body = one ? strchr(one, '\n') + 1 : "";
        CHECK(rows && *rows && strcmp(rows, body) == 0, "feedback member %s: the rows of a run on "
              "its columns alone", members[j]);
        free(rows), free(one);
        one = NULL;
    }
    snprintf(args, sizeof args, "feedback --flux net_flux --response tas --baseline %s "
             "--baseline-mode drift --quiet %s", CONTROL, single_run(HIGH, "net_flux,tas", "mean"));
    CHECK(modes_run(args, &one, NULL) == 0, "feedback on numpy's mean runs");
    char *rows = rows_with(ens, "mean,");
    double d = one ? fields_diff(rows, strchr(one, '\n') + 1) : INFINITY;
    printf("  forced: feedback ensemble mean vs numpy's mean columns: largest relative "
           "difference %.2g\n", d);
    CHECK(d < 1e-8, "feedback mean: the rows of a run on numpy's mean columns (%.2g)", d);
    /* without --baseline: a member's rows are those of --flux net_flux.m05 --response tas.m05 */
    free(rows), free(one), free(ens);
    ens = one = NULL;
    snprintf(args, sizeof args, "feedback --ensemble --flux net_flux --response tas --quiet %s", LOW);
    modes_run(args, &ens, NULL);
    snprintf(args, sizeof args, "feedback --flux net_flux.m05 --response tas.m05 --quiet %s", LOW);
    modes_run(args, &one, NULL);
    rows = rows_with(ens, "m05,");
    CHECK(rows && one && *rows && strcmp(rows, strchr(one, '\n') + 1) == 0,
          "feedback member m05: the rows of --flux net_flux.m05 --response tas.m05");
    free(rows), free(one), free(ens);
}

/* timescales: the same for the response's members (--max-modes 1: a well-posed fit of an
 * overshoot, so that the mean's 12-digit copy gives the same fit to 1e-6). */
static void test_timescales_members(void)
{
    char args[2048], *ens = NULL, *one = NULL;
    snprintf(args, sizeof args, "timescales --ensemble --response tas --max-modes 1 --baseline %s "
             "--baseline-mode drift --quiet %s", CONTROL, HIGH);
    CHECK(modes_run(args, &ens, NULL) == 0, "timescales --ensemble --baseline runs");
    const char *members[] = {"m02", "m07"};
    for (int j = 0; j < 2; j++) {
        snprintf(args, sizeof args, "timescales --response tas --max-modes 1 --baseline %s "
                 "--baseline-mode drift --quiet %s", CONTROL, single_run(HIGH, "tas", members[j]));
        CHECK(modes_run(args, &one, NULL) == 0, "timescales on member %s alone runs", members[j]);
        char prefix[32];
        snprintf(prefix, sizeof prefix, "%s,tas.%s,", members[j], members[j]);
        char *rows = rows_with(ens, prefix), *want = rows_with(one, "tas,");
        CHECK(rows && want && *rows && strcmp(rows, want) == 0, "timescales member %s: the rows "
              "of a run on its column alone", members[j]);
        free(rows), free(want), free(one);
        one = NULL;
    }
    snprintf(args, sizeof args, "timescales --response tas --max-modes 1 --baseline %s "
             "--baseline-mode drift --quiet %s", CONTROL, single_run(HIGH, "tas", "mean"));
    CHECK(modes_run(args, &one, NULL) == 0, "timescales on numpy's mean runs");
    char *rows = rows_with(ens, "mean,tas[mean],"), *want = rows_with(one, "tas,");
    double d = fields_diff(rows, want);
    printf("  forced: timescales ensemble mean vs numpy's mean column: largest relative "
           "difference %.2g\n", d);
    CHECK(d < 1e-6, "timescales mean: the rows of a run on numpy's mean column (%.2g)", d);
    free(rows), free(want), free(one), free(ens);
    /* --joint: the flux's members paired with the response's by suffix */
    ens = one = NULL;
    snprintf(args, sizeof args, "timescales --ensemble --joint --response tas --flux net_flux "
             "--max-modes 1 --baseline %s --quiet %s", CONTROL, HIGH);
    CHECK(modes_run(args, &ens, NULL) == 0, "timescales --ensemble --joint runs");
    snprintf(args, sizeof args, "timescales --joint --response tas --flux net_flux --max-modes 1 "
             "--baseline %s --quiet %s", CONTROL, single_run(HIGH, "net_flux,tas", "m06"));
    CHECK(modes_run(args, &one, NULL) == 0, "timescales --joint on member m06 alone runs");
    rows = rows_with(ens, "m06,tas.m06,"), want = rows_with(one, "tas,");
    CHECK(rows && want && *rows && strcmp(rows, want) == 0, "timescales --joint member m06: the "
          "rows of a run on its two columns alone");
    free(rows), free(want), free(one), free(ens);
    /* --members: only the listed members, and their mean */
    ens = NULL;
    snprintf(args, sizeof args, "timescales --members m01,m03,m05,m07 --response tas --max-modes 1 "
             "--quiet %s", LOW);
    CHECK(modes_run(args, &ens, NULL) == 0 && count(ens, "\nm0") == 4 && count(ens, "\nm03,") == 1
          && count(ens, "\nm02,") == 0 && count(ens, "\nmean,") == 1,
          "--members: four members and their mean: %s", ens ? ens : "");
    free(ens);
}

static void test_refusals(void)
{
    const char *odd = check_tmp_path("ens-odd.csv");
    FILE *fp = fopen(odd, "w");
    if (fp) {
        fputs("year,tas.a,tas.b,tas.c,tas.d,net_flux.a,net_flux.b,net_flux.c,net_flux.e\n", fp);
        for (int i = 1; i <= 12; i++)
            fprintf(fp, "%d,%d,%d,%d,%d,%d,%d,%d,%d\n", i, i, i + 1, 2 * i, i * i, -i, 1 - i, 3 - i, -2 * i);
        fclose(fp);
    }
    char args[1024];
    snprintf(args, sizeof args, "feedback --ensemble --flux net_flux --response tas "
             "data/forced-step2x.csv");
    modes_expect_refusal("feedback --ensemble without members", args, "--ensemble");
    snprintf(args, sizeof args, "feedback --ensemble --flux net_flux --response tas %s", odd);
    modes_expect_refusal("a response member without its flux", args, "net_flux.d");
    snprintf(args, sizeof args, "timescales --ensemble %s", HIGH);
    modes_expect_refusal("timescales --ensemble without --response", args, "--response");
    snprintf(args, sizeof args, "timescales --ensemble --response pr %s", HIGH);
    modes_expect_refusal("no such ensemble", args, "pr.MEMBER");
    snprintf(args, sizeof args, "timescales --members m01,m02,m03,m09 --response tas %s", HIGH);
    modes_expect_refusal("a listed member missing", args, "--members");
    snprintf(args, sizeof args, "feedback --member-anomalies --flux net_flux --response tas %s", HIGH);
    modes_expect_refusal("--member-anomalies is screen's", args, "--member-anomalies");
}

void forced_ensemble_tests(void);
void forced_ensemble_tests(void)
{
    test_split("feedback");
    test_split("timescales");
    test_feedback_members();
    test_timescales_members();
    test_refusals();
}
