/* The forced-run commands' shared inputs (cli/forced_inputs.c) through the binary: timescales
 * and emulate on the demo's absolute forced runs with --baseline (modes against the two-layer
 * model's analytic eigenvalues, anomalies against numpy), --skip as one length for every
 * command, and the refusals. */
#include "check.h"
#include "timescales_check.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

static const char *const STEP2X = "data/forced-step2x.csv";
static const char *const RAMP = "data/forced-ramp.csv";
static const char *const CONTROL = "data/forced-control.csv";

/* A constant `name = VALUE` of data/demo_forced.c (the model the demo runs were made with),
 * read from its source so that the test follows the model. */
static double model_constant(const char *name)
{
    char *src = check_read_file("data/demo_forced.c");
    char key[64];
    snprintf(key, sizeof key, " %s = ", name);
    const char *at = src ? strstr(src, key) : NULL;
    double v = at ? strtod(at + strlen(key), NULL) : NAN;
    free(src);
    return v;
}

/* The e-folding times of the two-layer energy balance model's linear response, analytic
 * eigenvalues of [[-(lambda+gamma)/C, gamma/C], [gamma/Cd, -gamma/Cd]] (two-layer energy
 * balance model, analytic eigenvalues): tau = -1/eigenvalue, fast first. */
static void two_layer_times(double tau[2])
{
    double C = model_constant("HEAT_UPPER"), Cd = model_constant("HEAT_DEEP");
    double g = model_constant("EXCHANGE"), lam = model_constant("LAMBDA");
    double tr = -(lam + g) / C - g / Cd, det = lam * g / (C * Cd);
    double root = sqrt(tr * tr - 4 * det);
    tau[0] = -1 / ((tr - root) / 2);
    tau[1] = -1 / ((tr + root) / 2);
}

/* Mode k (1-based) of series `name` in a timescales table: modes chosen, a, se a, tau, se tau. */
static int mode_row(const char *out, const char *name, int k, double *v)
{
    char key[128];
    const char *p = out;
    for (;;) {
        snprintf(key, sizeof key, "\n%s,", name);
        p = p ? strstr(p, key) : NULL;
        if (!p)
            return 0;
        p += strlen(key);
        int chosen, mode;
        if (sscanf(p, "%d,%d,%lf,%lf,%lf,%lf", &chosen, &mode, &v[1], &v[2], &v[3], &v[4]) == 6 &&
            mode == k) {
            v[0] = chosen;
            return 1;
        }
    }
}

/* timescales --baseline on the demo's step run: two modes near the model's analytic ones. */
static void test_step_modes(void)
{
    double tau[2];
    two_layer_times(tau);
    CHECK(fabs(tau[0] - 3.9) < 0.05 && fabs(tau[1] - 68) < 0.5,
          "analytic two-layer times %.4g and %.4g (data/README.md: about 3.9 and 68)", tau[0], tau[1]);
    char args[1024], *out = NULL, *err = NULL;
    snprintf(args, sizeof args, "timescales --response tas --baseline %s --baseline-mode drift %s",
             CONTROL, STEP2X);
    CHECK(modes_run(args, &out, &err) == 0, "timescales --baseline runs: %s", err ? err : "");
    double m[2][5] = {{0}};
    int found = out && mode_row(out, "tas", 1, m[0]) && mode_row(out, "tas", 2, m[1]);
    CHECK(found && m[0][0] == 2, "two modes chosen: %s", out ? out : "");
    for (int k = 0; found && k < 2; k++) {
        /* within two standard errors (a 95% interval): the fold's lower branch adds a weak
         * positive feedback (data/README.md), which lengthens both times a little */
        double z = (m[k][3] - tau[k]) / m[k][4];
        printf("  forced: step2x mode %d: e-folding time %.4g +- %.3g, analytic %.4g (z = %.2f)\n",
               k + 1, m[k][3], m[k][4], tau[k], z);
        CHECK(fabs(z) <= 2, "mode %d: %.4g +- %.3g is within 2 standard errors of %.4g", k + 1,
              m[k][3], m[k][4], tau[k]);
    }
    free(out), free(err);
    /* without the baseline the absolute temperature (287 K) is fitted: no such modes */
    snprintf(args, sizeof args, "timescales --response tas --quiet %s", STEP2X);
    out = NULL;
    CHECK(modes_run(args, &out, NULL) == 0 && out && mode_row(out, "tas", 1, m[0]) &&
          m[0][1] > 100, "without --baseline the first amplitude is the absolute level");
    free(out);
}

/* Column `col` (1-based) of every data row of a CSV text into v; the count. */
static size_t csv_column(const char *text, int col, double *v, size_t max)
{
    size_t n = 0;
    const char *line = text ? strchr(text, '\n') : NULL;
    while (line && line[1] && n < max) {
        const char *p = line + 1;
        for (int c = 1; c < col && p; c++)
            p = strchr(p, ',') ? strchr(p, ',') + 1 : NULL;
        v[n++] = p ? strtod(p, NULL) : NAN;
        line = strchr(line + 1, '\n');
    }
    return n;
}

/* timescales --baseline on `run` gives the table timescales gives on numpy's anomalies. */
static void same_as_numpy(const char *run, const char *base, const char *mode, double offset)
{
    char args[2048], *a = NULL, *b = NULL;
    const char *anom = check_tmp_path("forced-anomalies.csv");
    double dummy[300];
    snprintf(args, sizeof args, "baseline_anomalies.py %s %s tas %s %g %s", run, base, mode,
             offset, anom);
    CHECK(check_python(args, dummy, 300) > 100, "numpy anomalies of %s written", run);
    snprintf(args, sizeof args, "timescales --response tas --quiet --baseline %s --baseline-mode "
             "%s --baseline-offset %g %s", base, mode, offset, run);
    modes_run(args, &a, NULL);
    snprintf(args, sizeof args, "timescales --response tas --quiet %s", anom);
    modes_run(args, &b, NULL);
    double ma[5] = {0}, mb[5] = {0};
    /* numpy's anomalies are written with 12 digits, hence 1e-6 on the fitted modes */
    for (int k = 1; k <= 2; k++)
        CHECK(a && b && mode_row(a, "tas", k, ma) && mode_row(b, "tas", k, mb) &&
              check_close(ma[3], mb[3], 1e-6, 0) && check_close(ma[1], mb[1], 1e-6, 0),
              "timescales --baseline-mode %s --baseline-offset %g on %s: mode %d as on numpy's "
              "anomalies (%.10g vs %.10g)", mode, offset, run, k, ma[3], mb[3]);
    free(a), free(b);
}

/* emulate's compared run (column `actual`) is the ramp minus the control, as numpy makes it;
 * timescales --baseline gives the table timescales gives on numpy's anomalies. */
static void test_anomalies_numpy(void)
{
    const char *modes[] = {"drift", "mean"};
    const double offsets[] = {0, 0};
    for (int j = 0; j < 2; j++) {
        char args[2048], *out = NULL, *err = NULL;
        snprintf(args, sizeof args, "emulate --response tas --step-forcing 3.7 --forcing %s:forcing "
                 "--compare %s:tas --baseline %s --baseline-mode %s --baseline-offset %g --quiet %s",
                 RAMP, RAMP, CONTROL, modes[j], offsets[j], STEP2X);
        CHECK(modes_run(args, &out, &err) == 0, "emulate --baseline-mode %s runs: %s", modes[j],
              err ? err : "");
        double got[200], want[200];
        size_t n = csv_column(out, 4, got, 200);
        snprintf(args, sizeof args, "baseline_anomalies.py %s %s tas %s %g", RAMP, CONTROL,
                 modes[j], offsets[j]);
        int m = check_python(args, want, 200);
        CHECK(n == 180 && m == 180, "180 anomalies (%zu, %d)", n, m);
        /* numpy.polyfit / mean (Debian python3-numpy); the CSV carries 12 digits */
        double worst = n == 180 && m == 180 ? check_max_diff(got, want, n) : INFINITY;
        printf("  forced: emulate --compare anomalies (%s, offset %g) vs numpy: largest "
               "difference %.2g\n", modes[j], offsets[j], worst);
        CHECK(worst < 1e-9, "--baseline-mode %s: anomalies equal numpy's (%.2g)", modes[j], worst);
        free(out), free(err);
    }
    same_as_numpy(STEP2X, CONTROL, "drift", 0);
    /* the control on an axis 100 years later, aligned by --baseline-offset 100 */
    const char *later = check_tmp_path("control-later.csv");
    char *ctl = check_read_file(CONTROL);
    FILE *fp = fopen(later, "w");
    for (char *p = ctl ? strchr(ctl, '\n') : NULL; fp && p && p[1]; p = strchr(p + 1, '\n')) {
        char *comma = strchr(p + 1, ',');
        if (p == strchr(ctl, '\n'))
            fputs("year,net_flux,tas\n", fp);
        if (comma)
            fprintf(fp, "%ld%.*s", strtol(p + 1, NULL, 10) + 100, (int)(strcspn(comma, "\n") + 1), comma);
    }
    if (fp)
        fclose(fp);
    free(ctl);
    same_as_numpy(STEP2X, later, "mean", 100);
}

/* --skip is one length for feedback, timescales and emulate: N% of the span, or time units. */
static void test_skip(void)
{
    char args[2048], *a = NULL, *b = NULL;
    snprintf(args, sizeof args, "timescales --response tas --quiet --baseline %s --skip 10%% %s",
             CONTROL, STEP2X);
    CHECK(modes_run(args, &a, NULL) == 0, "timescales --skip 10%% runs");
    /* 10% of the span 1850..2149 (299 years) */
    snprintf(args, sizeof args, "timescales --response tas --quiet --baseline %s --skip 29.9 %s",
             CONTROL, STEP2X);
    CHECK(modes_run(args, &b, NULL) == 0 && a && strcmp(a, b) == 0,
          "--skip 10%% is --skip 29.9 on a 299-year span");
    free(a), free(b);
}

/* A copy of an annual CSV as a monthly one (every month holds its year's values); its path. */
static const char *monthly_copy(const char *annual, const char *name)
{
    const char *path = check_tmp_path(name);
    char *text = check_read_file(annual);
    FILE *fp = fopen(path, "w");
    char *p = text ? strchr(text, '\n') : NULL;
    if (fp && p)
        fprintf(fp, "time%.*s", (int)(p - strchr(text, ',') + 1), strchr(text, ','));
    for (; fp && p && p[1]; p = strchr(p + 1, '\n')) {
        const char *comma = strchr(p + 1, ',');
        int len = comma ? (int)strcspn(comma, "\n") : 0;
        for (int m = 1; comma && m <= 12; m++)
            fprintf(fp, "%ld-%02d%.*s\n", strtol(p + 1, NULL, 10), m, len, comma);
    }
    if (fp)
        fclose(fp);
    free(text);
    return path;
}

/* --annual: monthly copies of the step run and the control (each month its year's values)
 * give, as annual means weighted by month length, the modes of the annual files. */
static void test_annual(void)
{
    char step[600], ctl[600], args[2048], *a = NULL, *b = NULL;
    snprintf(step, sizeof step, "%s", monthly_copy(STEP2X, "step2x-monthly.csv"));
    snprintf(ctl, sizeof ctl, "%s", monthly_copy(CONTROL, "control-monthly.csv"));
    snprintf(args, sizeof args, "timescales --response tas --quiet --annual --baseline %s "
             "--baseline-mode drift %s", ctl, step);
    CHECK(modes_run(args, &a, NULL) == 0, "timescales --annual --baseline on monthly copies runs");
    snprintf(args, sizeof args, "timescales --response tas --quiet --baseline %s --baseline-mode "
             "drift %s", CONTROL, STEP2X);
    modes_run(args, &b, NULL);
    double ma[5] = {0}, mb[5] = {0};
    /* a mean of twelve equal values weighted by month length is the value to round-off */
    for (int k = 1; k <= 2; k++)
        CHECK(a && b && mode_row(a, "tas", k, ma) && mode_row(b, "tas", k, mb) &&
              check_close(ma[3], mb[3], 1e-8, 0) && check_close(ma[1], mb[1], 1e-8, 0),
              "--annual: mode %d of the monthly copies is the annual file's (%.10g vs %.10g)", k,
              ma[3], mb[3]);
    free(a), free(b);
}

static void test_refusals(void)
{
    const char *no_tas = check_tmp_path("control-no-tas.csv");
    const char *short_ctl = check_tmp_path("control-short.csv");
    char *ctl = check_read_file(CONTROL);
    FILE *a = fopen(no_tas, "w"), *s = fopen(short_ctl, "w");
    int lines = 0;
    for (char *p = ctl, *e; a && s && p && *p; p = e + 1, lines++) {
        if (!(e = strchr(p, '\n')))
            break;
        const char *comma = memchr(p, ',', (size_t)(e - p));
        const char *second = comma ? memchr(comma + 1, ',', (size_t)(e - comma - 1)) : NULL;
        fprintf(a, "%.*s\n", (int)((second ? second : e) - p), p); /* year,net_flux */
        if (lines <= 100)
            fprintf(s, "%.*s\n", (int)(e - p), p); /* 1850..1949 */
    }
    if (a)
        fclose(a);
    if (s)
        fclose(s);
    free(ctl);
    const struct { const char *what, *fmt, *needle; } cases[] = {
        {"baseline without the column", "timescales --response tas --baseline %s %s", "--baseline"},
        {"baseline not covering", "timescales --response tas --baseline %s %s", "does not cover"},
        {"offset past the baseline", "timescales --response tas --baseline-offset 100 --baseline %s %s", "does not cover"},
        {"emulate: baseline without the column", "emulate --response tas --step-forcing 3.7 "
         "--forcing data/forced-ramp.csv:forcing --baseline %s %s", "no column 'tas'"},
        {"emulate: compared run not covered", "emulate --response tas --step-forcing 3.7 "
         "--forcing data/forced-ramp.csv:forcing --compare data/forced-ramp.csv:tas "
         "--baseline-offset 150 --baseline %s %s", "does not cover"},
    };
    const char *bases[] = {no_tas, short_ctl, CONTROL, no_tas, CONTROL};
    char args[2048];
    for (size_t k = 0; k < sizeof cases / sizeof cases[0]; k++) {
        snprintf(args, sizeof args, cases[k].fmt, bases[k], STEP2X);
        modes_expect_refusal(cases[k].what, args, cases[k].needle);
    }
    snprintf(args, sizeof args, "timescales --response tas --baseline-mode drift %s", STEP2X);
    modes_expect_refusal("--baseline-mode without --baseline", args, "--baseline-mode");
    snprintf(args, sizeof args, "emulate --response tas --step-forcing 3.7 --forcing "
             "data/forced-ramp.csv:forcing --baseline-offset 3 %s", STEP2X);
    modes_expect_refusal("--baseline-offset without --baseline", args, "--baseline-offset");
    snprintf(args, sizeof args, "timescales --response tas --baseline %s --baseline-mode linear %s",
             CONTROL, STEP2X);
    modes_expect_refusal("unknown baseline mode", args, "--baseline-mode");
    snprintf(args, sizeof args, "timescales --response tas --annual %s", STEP2X);
    modes_expect_refusal("--annual on annual data", args, "--annual");
    snprintf(args, sizeof args, "timescales --response tas --skip 5x %s", STEP2X);
    modes_expect_refusal("a skip that is no length", args, "--skip");
}

void forced_ensemble_tests(void); /* test_forced_ensemble.c */
void suite_forced(void);
void suite_forced(void)
{
    test_step_modes();
    test_anomalies_numpy();
    test_skip();
    test_annual();
    test_refusals();
    forced_ensemble_tests();
}
