/* The test runner's shared machinery: counters, scratch files, subprocesses, python. */
#include "check.h"

#include <gsl/gsl_randist.h>
#include <gsl/gsl_rng.h>
#include <dirent.h>
#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <sys/wait.h>
#include <unistd.h>

static int passed, failed;
static char tmp_dir[256];

void check_record(int ok, const char *file, int line, const char *fmt, ...)
{
    if (ok) {
        passed++;
        return;
    }
    failed++;
    va_list ap;
    va_start(ap, fmt);
    fprintf(stderr, "FAIL %s:%d: ", file, line);
    vfprintf(stderr, fmt, ap);
    fputc('\n', stderr);
    va_end(ap);
}

/* Largest |got - want| over the samples; a NaN in one and not the other counts as infinite. */
double check_max_diff(const double *got, const double *want, size_t n)
{
    double m = 0.0;
    for (size_t i = 0; i < n; i++) {
        if (isnan(got[i]) || isnan(want[i])) {
            if (isnan(got[i]) != isnan(want[i]))
                return INFINITY;
            continue;
        }
        double d = fabs(got[i] - want[i]);
        m = d > m ? d : m;
    }
    return m;
}

int check_close(double got, double want, double rel_tol, double abs_tol)
{
    if (isnan(want) || isnan(got))
        return isnan(want) && isnan(got);
    if (isinf(want) || isinf(got))
        return got == want;
    return fabs(got - want) <= abs_tol + rel_tol * fabs(want);
}

const char *check_binary(void)
{
    const char *b = getenv("SLOWSCAN_BIN");
    return b && *b ? b : "build/slowscan";
}

static void remove_tmp_dir(void)
{
    if (tmp_dir[0]) {
        char cmd[300];
        snprintf(cmd, sizeof cmd, "rm -rf '%s'", tmp_dir);
        if (system(cmd) != 0)
            fprintf(stderr, "warning: could not remove %s\n", tmp_dir);
    }
}

const char *check_tmp_path(const char *name)
{
    static char paths[16][512];
    static int next;
    if (!tmp_dir[0]) {
        snprintf(tmp_dir, sizeof tmp_dir, "/tmp/slowscan-tests-XXXXXX");
        if (!mkdtemp(tmp_dir)) {
            perror("mkdtemp");
            exit(2);
        }
        atexit(remove_tmp_dir);
    }
    char *p = paths[next++ % 16];
    snprintf(p, 512, "%s/%s", tmp_dir, name);
    return p;
}

int check_write_file(const char *path, const char *text)
{
    FILE *f = fopen(path, "wb");
    if (!f)
        return -1;
    size_t len = strlen(text);
    int ok = fwrite(text, 1, len, f) == len;
    return (fclose(f) == 0 && ok) ? 0 : -1;
}

char *check_read_file(const char *path)
{
    FILE *f = fopen(path, "rb");
    if (!f)
        return NULL;
    size_t cap = 4096, len = 0;
    char *buf = malloc(cap);
    size_t got;
    while (buf && (got = fread(buf + len, 1, cap - len - 1, f)) > 0) {
        len += got;
        if (cap - len < 2) {
            char *bigger = realloc(buf, cap *= 2);
            if (!bigger) {
                free(buf);
                buf = NULL;
            }
            buf = bigger;
        }
    }
    fclose(f);
    if (buf)
        buf[len] = '\0';
    return buf;
}

int check_file_exists(const char *path)
{
    struct stat st;
    return stat(path, &st) == 0;
}

int check_run(const char *command, char **out, char **err)
{
    static int serial;
    char out_path[512], err_path[600], line[2048];
    snprintf(out_path, sizeof out_path, "%s", check_tmp_path("run.out"));
    snprintf(err_path, sizeof err_path, "%s.%d.err", out_path, serial++);
    snprintf(line, sizeof line, "( %s ) >'%s' 2>'%s' </dev/null", command, out_path, err_path);
    int status = system(line);
    if (out)
        *out = check_read_file(out_path);
    if (err)
        *err = check_read_file(err_path);
    unlink(err_path);
    if (status == -1 || !WIFEXITED(status))
        return -1;
    return WEXITSTATUS(status);
}

int check_python(const char *script_and_args, double *values, size_t max)
{
    char cmd[2048];
    snprintf(cmd, sizeof cmd, "/usr/bin/python3 tests/reference/%s", script_and_args);
    char *out = NULL, *err = NULL;
    int status = check_run(cmd, &out, &err);
    int count = -1;
    if (status == 0 && out) {
        count = 0;
        char *p = out, *end;
        while ((size_t)count < max) {
            double v = strtod(p, &end);
            if (end == p)
                break;
            values[count++] = v;
            p = end;
        }
    } else {
        fprintf(stderr, "python reference %s failed (%d): %s\n", script_and_args, status,
                err ? err : "");
    }
    free(out);
    free(err);
    return count;
}

int check_python_on(const char *script, const double *x, size_t n, const char *extra,
                    double *values, size_t max)
{
    static int serial;
    char name[64], args[1400];
    snprintf(name, sizeof name, "python-input-%d.txt", serial++);
    const char *path = check_tmp_path(name);
    FILE *f = fopen(path, "w");
    if (!f)
        return -1;
    for (size_t i = 0; i < n; i++)
        fprintf(f, "%.17g\n", x[i]);
    if (fclose(f) != 0)
        return -1;
    snprintf(args, sizeof args, "%s %s %s", script, path, extra ? extra : "");
    return check_python(args, values, max);
}

int check_scratch_files(const char *prefix)
{
    check_tmp_path("probe");
    DIR *d = opendir(tmp_dir);
    int found = 0;
    for (struct dirent *e; d && (e = readdir(d));)
        found += strncmp(e->d_name, prefix, strlen(prefix)) == 0;
    if (d)
        closedir(d);
    return found;
}

struct check_rng {
    gsl_rng *r;
};

check_rng *check_rng_alloc(unsigned long seed)
{
    check_rng *c = malloc(sizeof *c);
    c->r = gsl_rng_alloc(gsl_rng_mt19937);
    gsl_rng_set(c->r, seed);
    return c;
}
double check_rng_gaussian(check_rng *rng) { return gsl_ran_gaussian_ziggurat(rng->r, 1.0); }
double check_rng_uniform(check_rng *rng) { return gsl_rng_uniform(rng->r); }
void check_rng_free(check_rng *rng)
{
    if (rng) {
        gsl_rng_free(rng->r);
        free(rng);
    }
}

int check_totals(const char *label)
{
    printf("%s: %d passed, %d failed\n", label, passed, failed);
    return failed ? 1 : 0;
}

/* Columns t (0, 1, ...), s0, s1, ...; NaN is written as NA (a missing cell). */
int check_write_table_csv(const char *path, const char *header, size_t count, size_t n,
                          double step, const double *x)
{
    FILE *f = fopen(path, "w");
    if (!f)
        return -1;
    if (header)
        fputs(header, f);
    else {
        fputs("t", f);
        for (size_t k = 0; k < count; k++)
            fprintf(f, ",s%zu", k);
    }
    fputc('\n', f);
    for (size_t i = 0; i < n; i++) {
        fprintf(f, "%.12g", step * (double)i);
        for (size_t k = 0; k < count; k++) {
            double v = x[k * n + i];
            if (isnan(v))
                fputs(",NA", f);
            else
                fprintf(f, ",%.10g", v);
        }
        fputc('\n', f);
    }
    return fclose(f) == 0 ? 0 : -1;
}

int check_write_columns_csv(const char *path, size_t count, size_t n, const double *x)
{
    return check_write_table_csv(path, NULL, count, n, 1.0, x);
}

/* Series k sample i from gen, series-major draws. */
void check_write_series_csv(const char *path, size_t count, size_t n, check_sample_fn gen,
                            unsigned long seed)
{
    check_rng *rng = check_rng_alloc(seed);
    double *state = calloc(count, sizeof *state);
    double *x = malloc(count * n * sizeof *x);
    for (size_t k = 0; k < count; k++)
        for (size_t i = 0; i < n; i++)
            x[k * n + i] = gen(rng, k, i, n, &state[k]);
    if (check_write_columns_csv(path, count, n, x) != 0)
        fprintf(stderr, "could not write %s\n", path);
    free(x);
    free(state);
    check_rng_free(rng);
}

void check_wilson(size_t hits, size_t trials, double *lo, double *hi)
{
    const double z = 1.959963984540054;
    double n = (double)trials, p = n > 0 ? (double)hits / n : 0, z2 = z * z / n;
    double mid = (p + z2 / 2) / (1 + z2), half = z / (1 + z2) * sqrt(p * (1 - p) / n + z2 / n / 4);
    *lo = n > 0 ? fmax(0, mid - half) : 0;
    *hi = n > 0 ? fmin(1, mid + half) : 1;
}
