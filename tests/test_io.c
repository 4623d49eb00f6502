/* Tests of io/: CSV reading (RFC 4180 quoting, delimiters, BOM, CRLF, missing cells), the
 * error messages' file/row/column, span cuts, the grid check, resampling, logs, atomic output. */
#include "check.h"
#include "slowscan/io.h"
#include "slowscan/status.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

static int read_text(const char *text, const char *time, const char *vars, series_table *t,
                     io_error *err)
{
    const char *path = check_tmp_path("io.csv");
    check_write_file(path, text);
    csv_read_options o = {time, vars};
    memset(err, 0, sizeof *err);
    return csv_read_table(path, &o, t, err);
}

static void test_formats(void)
{
    series_table t;
    io_error err;
    /* comma, semicolon, tab; CRLF; BOM; quoted names with a delimiter (RFC 4180). */
    const char *texts[] = {"t,a,b\n0,1,2\n1,3,4\n",
                           "t;a;b\r\n0;1;2\r\n1;3;4\r\n",
                           "\xEF\xBB\xBFt\ta\tb\n0\t1\t2\n1\t3\t4\n",
                           "\"t\",\"a\",\"b\"\n\"0\",1,\"2\"\n1,3,4\n\n"};
    for (size_t i = 0; i < 4; i++) {
        int rc = read_text(texts[i], NULL, NULL, &t, &err);
        CHECK(rc == SLOWSCAN_OK && t.n == 2 && t.nseries == 2 && !strcmp(t.names[0], "a") &&
                  !strcmp(t.time_name, "t") && t.values[1][1] == 4 && t.time[1] == 1,
              "format %zu: %s", i, err.message);
        series_table_free(&t);
    }
    int rc = read_text("time,\"flux, net\",c\n0,1,2\n1,NA,\n2,nan, 5 \n", NULL, NULL, &t, &err);
    CHECK(rc == SLOWSCAN_OK && !strcmp(t.names[0], "flux, net") && isnan(t.values[0][1]) &&
              isnan(t.values[1][1]) && isnan(t.values[0][2]) && t.values[1][2] == 5,
          "quoted name with comma, NA/empty/nan missing, spaces trimmed: %s", err.message);
    series_table_free(&t);
    rc = read_text("a,t,b,c\n1,0,2,3\n4,1,5,6\n", "t", "c, a", &t, &err);
    CHECK(rc == SLOWSCAN_OK && t.nseries == 2 && !strcmp(t.names[0], "c") && !strcmp(t.names[1], "a") &&
              t.values[0][1] == 6 && t.time[1] == 1 && t.rows[1] == 3,
          "--time and --vars select and order: %s", err.message);
    series_table_free(&t);
}

static void expect_error(const char *what, const char *text, const char *time, const char *vars,
                         const char *needle1, const char *needle2)
{
    series_table t;
    io_error err;
    int rc = read_text(text, time, vars, &t, &err);
    CHECK(rc != SLOWSCAN_OK && strstr(err.message, needle1) && (!needle2 || strstr(err.message, needle2)) &&
              strstr(err.message, "io.csv") && t.n == 0 && !t.time,
          "%s: rc %d, message '%s'", what, rc, err.message);
}

static void test_errors(void)
{
    expect_error("ragged", "t,a\n0,1\n1,2,3\n", NULL, NULL, "row 3", "3 fields");
    expect_error("non-number", "t,a,b\n0,1,2\n1,2,x\n", NULL, NULL, "row 3", "'b'");
    expect_error("infinite", "t,a\n0,1\n1,-inf\n", NULL, NULL, "row 3", "'a'");
    expect_error("overflow", "t,a\n0,1\n1,1e999\n", NULL, NULL, "row 3", "'a'");
    expect_error("missing time", "t,a\n0,1\n,2\n", NULL, NULL, "row 3", "'t'");
    expect_error("unsorted", "t,a\n0,1\n2,2\n1,3\n", NULL, NULL, "row 4", "increasing");
    expect_error("duplicate time", "t,a\n0,1\n0,2\n", NULL, NULL, "row 3", NULL);
    expect_error("empty", "", NULL, NULL, "empty", NULL);
    expect_error("header only", "t,a\n", NULL, NULL, "no data rows", NULL);
    expect_error("no series", "t\n0\n1\n", NULL, NULL, "no series column", NULL);
    expect_error("unknown var", "t,a\n0,1\n", NULL, "a,zz", "--vars", "'zz'");
    expect_error("var is time", "t,a\n0,1\n", NULL, "t", "--vars", "time column");
    expect_error("var twice", "t,a\n0,1\n", NULL, "a,a", "--vars", "twice");
    expect_error("unknown time", "t,a\n0,1\n", "when", NULL, "--time", "'when'");
    expect_error("duplicate name", "t,a,a\n0,1,2\n", NULL, NULL, "row 1", "'a'");
    expect_error("empty name", "t,,b\n0,1,2\n", NULL, NULL, "row 1", "column 2");
    expect_error("bad quote", "t,a\n0,\"1\n1,2\n", NULL, NULL, "malformed", NULL);
    series_table t;
    io_error err;
    csv_read_options o = {NULL, NULL};
    CHECK(csv_read_table("/nonexistent/x.csv", &o, &t, &err) != SLOWSCAN_OK &&
              strstr(err.message, "/nonexistent/x.csv"), "unreadable file named: %s", err.message);
}

static void test_grid_and_transforms(void)
{
    series_table t;
    io_error err;
    double dt = 0;
    read_text("t,a\n0,1\n1,2\n2,4\n3,8\n4,16\n", NULL, NULL, &t, &err);
    CHECK(table_check_grid(&t, &dt, &err) == SLOWSCAN_OK && dt == 1, "regular grid");
    CHECK(table_select_span(&t, 1, 3, &err) == SLOWSCAN_OK && t.n == 3 && t.time[0] == 1 &&
              t.values[0][2] == 8 && t.rows[0] == 3, "--from/--until keep [1, 3] and their rows");
    CHECK(table_log(&t, &err) == SLOWSCAN_OK && check_close(t.values[0][1], log(4.0), 1e-15, 0), "log");
    CHECK(table_select_span(&t, 10, NAN, &err) == SLOWSCAN_ESHORT && strstr(err.message, "--from"),
          "span with no samples: %s", err.message);
    series_table_free(&t);
    read_text("t,a\n0,1\n1,2\n2.5,4\n3,8\n", NULL, NULL, &t, &err);
    CHECK(table_check_grid(&t, &dt, &err) != SLOWSCAN_OK && strstr(err.message, "row 4") &&
              strstr(err.message, "--resample"), "irregular grid: %s", err.message);
    /* Linear interpolation by hand (analytic): at 0.5 -> 1.5, 1.5 -> 2 + 0.5*(4-2)/1.5, 2.5 -> 4. */
    CHECK(table_resample(&t, 0.5, &err) == SLOWSCAN_OK && t.n == 7 && !t.rows &&
              check_close(t.values[0][1], 1.5, 1e-15, 0) &&
              check_close(t.values[0][3], 2.0 + 0.5 * 2.0 / 1.5, 1e-15, 0) &&
              t.values[0][5] == 4 && t.values[0][6] == 8, "resample values");
    series_table_free(&t);
    read_text("t,a\n0,1\n1,NA\n2,3\n3,0\n", NULL, NULL, &t, &err);
    CHECK(table_resample(&t, 0.5, &err) == SLOWSCAN_OK && isnan(t.values[0][1]) && isnan(t.values[0][2]) &&
              t.values[0][4] == 3, "a missing neighbour makes the point missing; exact hits kept");
    CHECK(table_log(&t, &err) != SLOWSCAN_OK && strstr(err.message, "'a'") && strstr(err.message, "--log"),
          "log of 0: %s", err.message);
    series_table_free(&t);
}

static void test_atomic(void)
{
    const char *path = check_tmp_path("atomic-out.csv");
    atomic_file f;
    io_error err;
    CHECK(atomic_open(&f, path, &err) == SLOWSCAN_OK, "open");
    fputs("x\n", f.fp);
    CHECK(!check_file_exists(path), "nothing at the target before commit");
    CHECK(atomic_commit(&f, &err) == SLOWSCAN_OK, "commit");
    char *s = check_read_file(path);
    CHECK(s && !strcmp(s, "x\n") && check_scratch_files("atomic-out.csv.tmp") == 0, "committed whole");
    free(s);
    const char *other = check_tmp_path("atomic-aborted.csv");
    atomic_open(&f, other, &err);
    fputs("partial", f.fp);
    atomic_abort(&f);
    atomic_abort(&f); /* idempotent */
    CHECK(!check_file_exists(other) && check_scratch_files("atomic-aborted") == 0, "abort leaves nothing");
    CHECK(atomic_open(&f, "/nonexistent-dir/out.csv", &err) != SLOWSCAN_OK &&
              strstr(err.message, "/nonexistent-dir/out.csv"), "unwritable: %s", err.message);
    CHECK(io_same_file(path, path) && !io_same_file(path, other), "same file");
}

/* 10^5 rows read in one go (the chunked path: the file is larger than one 64 KiB chunk). */
static void test_large(void)
{
    const char *path = check_tmp_path("large.csv");
    FILE *f = fopen(path, "w");
    fputs("t,a,b\n", f);
    for (int i = 0; i < 100000; i++)
        fprintf(f, "%d,%.6f,%d\n", i, sin(i * 0.01), i % 7);
    fclose(f);
    series_table t;
    io_error err;
    csv_read_options o = {NULL, NULL};
    int rc = csv_read_table(path, &o, &t, &err);
    CHECK(rc == SLOWSCAN_OK && t.n == 100000 && t.values[1][99999] == 99999 % 7 &&
              check_close(t.values[0][5000], sin(50.0), 1e-6, 1e-6) && t.rows[99999] == 100001,
          "large file: %s", err.message);
    series_table_free(&t);
}

void suite_io(void)
{
    test_formats();
    test_errors();
    test_grid_and_transforms();
    test_atomic();
    test_large();
}
