/* Tests of io/: CSV reading (RFC 4180 quoting, delimiters, BOM, CRLF, missing cells), the
 * error messages' file/row/column, span cuts, the grid check, resampling, logs, atomic output.
 *
 * Sources: quoting and line ends follow RFC 4180 (CSV format); the UTF-8 byte-order mark is
 * EF BB BF (Unicode Standard, ch. 23.8, recalled from memory); grid tolerance, missing-cell
 * spellings and message wording are the project's own conventions (DESIGN §3-§4, no outside
 * source); interpolated values are checked against hand computation (analytic). */
#include "check.h"
#include "slowscan/io.h"
#include "slowscan/status.h"

#include <fcntl.h>
#include <math.h>
#include <signal.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/resource.h>
#include <sys/stat.h>
#include <time.h>
#include <unistd.h>

static int read_opts(const char *text, const char *time, const char *vars, series_table *t,
                     io_error *err)
{
    const char *path = check_tmp_path("io.csv");
    check_write_file(path, text);
    csv_read_options o = slowscan_csv_read_options_default();
    o.time_column = time;
    o.vars = vars;
    memset(err, 0, sizeof *err);
    return slowscan_csv_read_table(path, &o, t, err);
}

static int read_text(const char *text, series_table *t, io_error *err)
{
    return read_opts(text, NULL, NULL, t, err);
}

static int table_is_zero(const series_table *t)
{
    return !t->source && !t->time_name && t->n == 0 && t->nseries == 0 && !t->time && !t->names &&
           !t->values && !t->rows;
}

/* Reading `text` fails with `status`, the table is left zeroed, and the message names the
 * file and contains every needle (a NULL-terminated list). */
static void expect_error(const char *what, const char *text, const char *time, const char *vars,
                         int status, ...)
{
    series_table t;
    io_error err;
    int rc = read_opts(text, time, vars, &t, &err);
    int found = strstr(err.message, "io.csv: ") != NULL;
    va_list ap;
    va_start(ap, status);
    for (const char *needle; (needle = va_arg(ap, const char *)) != NULL;)
        found = found && strstr(err.message, needle) != NULL;
    va_end(ap);
    CHECK(rc == status && found && table_is_zero(&t), "%s: rc %d (want %d), message '%s'", what,
          rc, status, err.message);
    slowscan_series_table_free(&t);
}

static void test_delimiters(void)
{
    series_table t;
    io_error err;
    /* Comma, semicolon, tab (common practice, no source); CRLF line ends (RFC 4180 §2.1);
     * a UTF-8 BOM; quoted cells (RFC 4180 §2.5); a last line without a line end (RFC 4180
     * §2.2); lone CR line ends (classic Mac OS, common practice, no source). */
    const char *texts[] = {"t,a,b\n0,1,2\n1,3,4\n", "t;a;b\r\n0;1;2\r\n1;3;4\r\n",
                           "t\ta\tb\n0\t1\t2\n1\t3\t4\n", "\xEF\xBB\xBFt,a,b\n0,1,2\n1,3,4\n",
                           "\xEF\xBB\xBFt;a;b\r\n0;1;2\r\n1;3;4", "t,a,b\r0,1,2\r1,3,4\r",
                           "\"t\",\"a\",\"b\"\n\"0\",1,\"2\"\n1,3,4\n\n"};
    for (size_t i = 0; i < sizeof texts / sizeof texts[0]; i++) {
        int rc = read_text(texts[i], &t, &err);
        CHECK(rc == SLOWSCAN_OK && t.n == 2 && t.nseries == 2 && !strcmp(t.names[0], "a") &&
                  !strcmp(t.names[1], "b") && !strcmp(t.time_name, "t") && t.time[0] == 0 &&
                  t.time[1] == 1 && t.values[0][0] == 1 && t.values[1][1] == 4 && t.rows[0] == 2 &&
                  t.rows[1] == 3, "format %zu: %s", i, err.message);
        slowscan_series_table_free(&t);
    }
    /* An empty cell between two tabs is a field, not collapsed whitespace. */
    int rc = read_text("t\ta\tb\n0\t\t2\n1\t3\t\n", &t, &err);
    CHECK(rc == SLOWSCAN_OK && t.n == 2 && isnan(t.values[0][0]) && t.values[1][0] == 2 &&
              t.values[0][1] == 3 && isnan(t.values[1][1]), "tab-separated empty cells: %s", err.message);
    slowscan_series_table_free(&t);
    /* Ties go to the comma: one comma and one semicolon outside quotes. */
    rc = read_text("t,a;b\n0,1;2\n1,3;4\n", &t, &err);
    CHECK(rc != SLOWSCAN_OK && strstr(err.message, "'a;b'"), "tie picks comma: %s", err.message);
    slowscan_series_table_free(&t);
}

static void test_quoting(void)
{
    series_table t;
    io_error err;
    /* Quoted names with commas and doubled quotes (RFC 4180 §2.6-2.7). */
    int rc = read_text("time,\"flux, net\",\"a \"\"quoted\"\" name\"\n0,1,2\n1,3,4\n", &t, &err);
    CHECK(rc == SLOWSCAN_OK && t.nseries == 2 && !strcmp(t.names[0], "flux, net") &&
              !strcmp(t.names[1], "a \"quoted\" name"), "quoted header names: %s", err.message);
    slowscan_series_table_free(&t);
    /* Commas inside quotes must not count for detection: 2 semicolons beat 0 commas. */
    rc = read_text("t;\"a,b,c\";\"d,e\"\n0;1;2\n1;3;4\n", &t, &err);
    CHECK(rc == SLOWSCAN_OK && t.nseries == 2 && !strcmp(t.names[0], "a,b,c") &&
              !strcmp(t.names[1], "d,e") && t.values[1][1] == 4, "semicolon with quoted commas: %s",
          err.message);
    slowscan_series_table_free(&t);
    rc = read_text("t\t\"x, y\"\t\"p;q\"\n0\t1\t2\n1\t3\t4\n", &t, &err);
    CHECK(rc == SLOWSCAN_OK && t.nseries == 2 && !strcmp(t.names[0], "x, y") &&
              !strcmp(t.names[1], "p;q"), "tab with quoted , and ;: %s", err.message);
    slowscan_series_table_free(&t);
    /* A quoted line break inside a (skipped) text column (RFC 4180 §2.6): the record still
     * counts as one sample, and the next record's file row is counted past the break. */
    rc = read_opts("t,note,a\n0,\"two\nlines\",1\n1,plain,2\n", NULL, "a", &t, &err);
    CHECK(rc == SLOWSCAN_OK && t.n == 2 && t.rows[0] == 2 && t.rows[1] == 4 && t.values[0][1] == 2,
          "quoted line break: %s", err.message);
    slowscan_series_table_free(&t);
}

static void test_cells_and_rows(void)
{
    series_table t;
    io_error err;
    /* Missing: empty, NA, NaN in any case, blanks only (DESIGN §4; no outside source). */
    int rc = read_text("t,a,b,c\n0,NA,,NaN\n1,nan,  ,NAN\n2,na,\"\",1e3\n", &t, &err);
    CHECK(rc == SLOWSCAN_OK && t.n == 3 && isnan(t.values[0][0]) && isnan(t.values[1][0]) &&
              isnan(t.values[2][0]) && isnan(t.values[0][1]) && isnan(t.values[1][1]) &&
              isnan(t.values[0][2]) && isnan(t.values[1][2]) && isnan(t.values[2][0]) &&
              isnan(t.values[2][1]) && t.values[2][2] == 1000, "missing cells: %s", err.message);
    slowscan_series_table_free(&t);
    /* Spaces around names and cells are trimmed; C number syntax via strtod (C11 7.22.1.3). */
    rc = read_text(" t , a \n 0 , -2.5E-1 \n 1 ,\" +4 \"\n2, 1e-400\n", &t, &err);
    CHECK(rc == SLOWSCAN_OK && !strcmp(t.time_name, "t") && !strcmp(t.names[0], "a") &&
              t.values[0][0] == -0.25 && t.values[0][1] == 4 && fabs(t.values[0][2]) < 1e-300,
          "trimmed cells and names, underflow accepted: %s", err.message);
    slowscan_series_table_free(&t);
    /* Blank lines (also before the header and blanks-only) are skipped but still counted in
     * the file rows, so a row number matches what an editor shows. */
    rc = read_text("\n\nt;a\n0;1\n\n   \n1;2\n", &t, &err);
    CHECK(rc == SLOWSCAN_OK && t.n == 2 && t.rows[0] == 4 && t.rows[1] == 7 && t.values[0][1] == 2,
          "blank lines skipped, rows counted: %s", err.message);
    slowscan_series_table_free(&t);
    rc = read_text("t,a\r\n0,1\r\n\r\n1,2\r\n", &t, &err);
    CHECK(rc == SLOWSCAN_OK && t.n == 2 && t.rows[1] == 4, "CRLF blank line rows: %s", err.message);
    slowscan_series_table_free(&t);
}

static void test_selection(void)
{
    series_table t;
    io_error err;
    int rc = read_opts("a,t,b,c\n1,0,2,3\n4,1,5,6\n", "t", " c , a ", &t, &err);
    CHECK(rc == SLOWSCAN_OK && t.nseries == 2 && !strcmp(t.names[0], "c") && !strcmp(t.names[1], "a") &&
              !strcmp(t.time_name, "t") && t.values[0][1] == 6 && t.values[1][0] == 1 &&
              t.time[1] == 1 && t.rows[1] == 3, "--time and --vars select and order: %s", err.message);
    slowscan_series_table_free(&t);
    rc = read_opts("a,t,b\n1,0,2\n4,1,5\n", "t", NULL, &t, &err);
    CHECK(rc == SLOWSCAN_OK && t.nseries == 2 && !strcmp(t.names[0], "a") && !strcmp(t.names[1], "b"),
          "--time without --vars: every other column in file order: %s", err.message);
    slowscan_series_table_free(&t);
    /* A text column left out by --vars is never parsed. */
    rc = read_opts("t,station,a\n0,Mauna Loa,1\n1,Alert,2\n", NULL, "a", &t, &err);
    CHECK(rc == SLOWSCAN_OK && t.nseries == 1 && t.values[0][1] == 2, "unselected text column: %s",
          err.message);
    slowscan_series_table_free(&t);
    /* Without --vars a text column is left out (listed in skipped); named in --vars it is
     * refused. */
    rc = read_opts("t,station,a\n0,Mauna Loa,1\n1,Alert,2\n", NULL, NULL, &t, &err);
    CHECK(rc == SLOWSCAN_OK && t.nseries == 1 && t.nskipped == 1 &&
              !strcmp(t.skipped[0], "station"), "text column left out: %s", err.message);
    slowscan_series_table_free(&t);
    expect_error("selected text column", "t,station,a\n0,Mauna Loa,1\n", NULL, "station,a",
                 SLOWSCAN_EINVAL, "row 2, column 'station': \"Mauna Loa\" is not a number", NULL);
}

static void test_cell_errors(void)
{
    expect_error("non-number", "t,temp,b\n0,1,2\n1,2,abc\n", NULL, NULL, SLOWSCAN_EINVAL,
                 "row 3, column 'b': \"abc\" is not a number", NULL);
    expect_error("trailing junk", "t,a\n0,1.5x\n", NULL, NULL, SLOWSCAN_EINVAL,
                 "row 2, column 'a': \"1.5x\" is not a number", NULL);
    expect_error("decimal comma", "t;a\n0;1,5\n", NULL, NULL, SLOWSCAN_EINVAL,
                 "row 2, column 'a': \"1,5\" is not a number", NULL);
    expect_error("inf", "t,a\n0,1\n1,-inf\n", NULL, NULL, SLOWSCAN_EINVAL,
                 "row 3, column 'a': \"-inf\" is not a finite number", NULL);
    expect_error("Infinity", "t,a\n0,Infinity\n", NULL, NULL, SLOWSCAN_EINVAL,
                 "row 2, column 'a': \"Infinity\" is not a finite number", NULL);
    expect_error("overflow", "t,a\n0,1\n1,1e999\n", NULL, NULL, SLOWSCAN_EINVAL,
                 "row 3, column 'a': \"1e999\" is not a finite number", NULL);
    expect_error("missing time", "t,a\n0,1\n,2\n", NULL, NULL, SLOWSCAN_EINVAL,
                 "row 3, column 't': the time is missing", NULL);
    expect_error("NA time", "t,a\n0,1\nNA,2\n", NULL, NULL, SLOWSCAN_EINVAL,
                 "row 3, column 't': the time is missing", NULL);
    expect_error("infinite time", "t,a\n0,1\ninf,2\n", NULL, NULL, SLOWSCAN_EINVAL,
                 "row 3, column 't': \"inf\" is not a finite number", NULL);
    expect_error("unsorted", "t,a\n0,1\n4,2\n3.5,3\n", NULL, NULL, SLOWSCAN_EINVAL,
                 "row 4: time 3.5 is not greater than the previous time 4 (rows must be in "
                 "increasing time order)", NULL);
    expect_error("duplicate time", "t,a\n0,1\n0,2\n", NULL, NULL, SLOWSCAN_EINVAL,
                 "row 3: time 0 is not greater than the previous time 0", NULL);
    expect_error("ragged, more", "t,a\n0,1\n1,2,3\n", NULL, NULL, SLOWSCAN_EINVAL,
                 "row 3 has 3 fields but the header has 2 columns", NULL);
    /* Raggedness is reported before the (shifted) cells of the same record. */
    expect_error("ragged, fewer", "t,a,b\n0,1,2\n1,x\n", NULL, NULL, SLOWSCAN_EINVAL,
                 "row 3 has 2 fields but the header has 3 columns", NULL);
    /* File rows count blank lines, CRLF pairs once, and line breaks inside quotes. */
    expect_error("row after blank lines", "t,a\n0,1\n\n\n1,2\n1,3\n", NULL, NULL, SLOWSCAN_EINVAL,
                 "row 6: time 1", NULL);
    expect_error("row in CRLF file", "t,a\r\n0,1\r\n1,2\r\n2,x\r\n", NULL, NULL, SLOWSCAN_EINVAL,
                 "row 4, column 'a'", NULL);
    expect_error("row after quoted break", "t,n,a\n0,\"x\ny\",1\n1,z,oops\n", NULL, "a",
                 SLOWSCAN_EINVAL, "row 4, column 'a': \"oops\"", NULL);
}

static void test_file_errors(void)
{
    expect_error("empty", "", NULL, NULL, SLOWSCAN_EINVAL, "the file is empty", NULL);
    expect_error("blank lines only", "\n  \r\n\n", NULL, NULL, SLOWSCAN_EINVAL, "is empty", NULL);
    expect_error("BOM only", "\xEF\xBB\xBF", NULL, NULL, SLOWSCAN_EINVAL, "is empty", NULL);
    expect_error("header only", "t,a\n", NULL, NULL, SLOWSCAN_EINVAL,
                 "the file has a header but no data rows", NULL);
    /* An unclosed quote swallows the rest of the file; strict libcsv reports it (RFC 4180
     * §2.5-2.7: quotes must pair). */
    expect_error("unclosed quote", "t,a\n0,1\n1,\"2\n2,3\n", NULL, NULL, SLOWSCAN_EINVAL,
                 "row 3: malformed CSV", "not closed", NULL);
    expect_error("stray quote", "t,a\n0,1\n1,2\"\n", NULL, NULL, SLOWSCAN_EINVAL,
                 "row 3: malformed CSV", NULL);
    series_table t;
    io_error err;
    csv_read_options o = slowscan_csv_read_options_default();
    int rc = slowscan_csv_read_table("/nonexistent/x.csv", &o, &t, &err);
    CHECK(rc == SLOWSCAN_EIO && strstr(err.message, "/nonexistent/x.csv: cannot open the file: ") &&
              strstr(err.message, "No such file") && table_is_zero(&t),
          "unreadable file: rc %d, %s", rc, err.message);
    char dir[512];
    snprintf(dir, sizeof dir, "%s", check_tmp_path("a-directory"));
    mkdir(dir, 0755);
    rc = slowscan_csv_read_table(dir, &o, &t, &err);
    CHECK(rc == SLOWSCAN_EIO && strstr(err.message, dir) && table_is_zero(&t),
          "directory as input: rc %d, %s", rc, err.message);
    slowscan_series_table_free(&t); /* on a zeroed table */
    slowscan_series_table_free(&t); /* and again */
    slowscan_series_table_free(NULL);
}

static void test_header_errors(void)
{
    expect_error("no series", "t\n0\n1\n", NULL, NULL, SLOWSCAN_EINVAL,
                 "row 1: the header has no series column besides the time column 't'", NULL);
    expect_error("no series, --time", "a,b\n0,1\n", "b", "", SLOWSCAN_EINVAL, "--vars",
                 "empty name", NULL);
    expect_error("empty name", "t,,b\n0,1,2\n", NULL, NULL, SLOWSCAN_EINVAL,
                 "row 1: column 2 of the header has an empty name", NULL);
    expect_error("duplicate name", "t,a,b,a\n0,1,2,3\n", NULL, NULL, SLOWSCAN_EINVAL,
                 "row 1: columns 2 and 4 of the header have the same name 'a'", NULL);
    expect_error("duplicate after trimming", "t,b, b\n0,1,2\n", NULL, NULL, SLOWSCAN_EINVAL,
                 "columns 2 and 3", "'b'", NULL);
    expect_error("unknown time", "t,a\n0,1\n", "when", NULL, SLOWSCAN_EINVAL,
                 "option --time: there is no column 'when' (columns: t, a)", NULL);
    expect_error("unknown var", "t,a,b\n0,1,2\n", NULL, "a,zz", SLOWSCAN_EINVAL,
                 "option --vars: there is no column 'zz' (columns: t, a, b)", NULL);
    expect_error("var is time", "t,a\n0,1\n", NULL, "a, t", SLOWSCAN_EINVAL,
                 "option --vars: column 't' is the time column", NULL);
    expect_error("var twice", "t,a,b\n0,1,2\n", NULL, "a,b,a", SLOWSCAN_EINVAL,
                 "option --vars: column 'a' is listed twice", NULL);
    expect_error("var empty entry", "t,a,b\n0,1,2\n", NULL, "a,,b", SLOWSCAN_EINVAL,
                 "option --vars: the list \"a,,b\" has an empty name", NULL);
}

/* Reads `text` as standard input ("-"), with file descriptor 0 pointed at a scratch file. */
static int read_stdin(const char *text, series_table *t, io_error *err)
{
    const char *path = check_tmp_path("stdin.csv");
    check_write_file(path, text);
    int saved = dup(0), fd = open(path, O_RDONLY);
    int rc = -1;
    if (saved >= 0 && fd >= 0 && dup2(fd, 0) == 0) {
        clearerr(stdin);
        rc = slowscan_csv_read_table("-", NULL, t, err);
    }
    close(fd);
    dup2(saved, 0);
    close(saved);
    clearerr(stdin);
    return rc;
}

/* The table's source is "-" as given; messages say "standard input". */
static void test_stdin(void)
{
    series_table t;
    io_error err;
    int rc = read_stdin("t;a\n0;1\n1;2\n2;x\n", &t, &err);
    CHECK(rc == SLOWSCAN_EINVAL && !strcmp(err.message, "standard input: row 4, column 'a': \"x\" "
                                           "is not a number"), "stdin error: %s", err.message);
    rc = read_stdin("t;a\n0;1\n1;2\n", &t, &err);
    CHECK(rc == SLOWSCAN_OK && t.n == 2 && !strcmp(t.source, "-") && t.values[0][1] == 2,
          "stdin: %s", err.message);
    slowscan_series_table_free(&t);
}

static void test_span(void)
{
    series_table t;
    io_error err;
    read_text("t,a\n0,1\n1,2\n2,4\n3,8\n4,16\n", &t, &err);
    CHECK(slowscan_table_select_span(&t, NAN, NAN, &err) == SLOWSCAN_OK && t.n == 5, "no limits keep all");
    CHECK(slowscan_table_select_span(&t, 0.5, 3, &err) == SLOWSCAN_OK && t.n == 3 && t.time[0] == 1 &&
              t.time[2] == 3 && t.values[0][2] == 8 && t.rows[0] == 3 && t.rows[2] == 5,
          "--from 0.5 --until 3 keep times 1..3 and their rows");
    CHECK(slowscan_table_select_span(&t, 2, NAN, &err) == SLOWSCAN_OK && t.n == 2 && t.time[0] == 2,
          "--from alone (inclusive)");
    CHECK(slowscan_table_select_span(&t, 10, NAN, &err) == SLOWSCAN_ESHORT && strstr(err.message, "--from 10") &&
              strstr(err.message, "leave 0 rows") && t.n == 2, "span with no rows: %s", err.message);
    CHECK(slowscan_table_select_span(&t, NAN, 2, &err) == SLOWSCAN_ESHORT && strstr(err.message, "--until 2") &&
              strstr(err.message, "leave 1 row of"), "span with one row: %s", err.message);
    CHECK(slowscan_table_select_span(&t, 3, 2, &err) == SLOWSCAN_EINVAL && strstr(err.message, "after"),
          "--from after --until: %s", err.message);
    slowscan_series_table_free(&t);
}

static void test_grid(void)
{
    series_table t;
    io_error err;
    double dt = 0;
    read_text("t,a\n0,1\n0.1,2\n0.2,4\n0.3,8\n0.4,16\n", &t, &err);
    /* Decimal steps are not exact in binary; the 1e-6 tolerance (DESIGN §3) absorbs that. */
    CHECK(slowscan_table_check_grid(&t, &dt, &err) == SLOWSCAN_OK && check_close(dt, 0.1, 1e-15, 0),
          "regular grid, dt %g: %s", dt, err.message);
    slowscan_series_table_free(&t);
    read_text("t,a\n0,1\n1,2\n2.000000001,4\n3,8\n", &t, &err);
    CHECK(slowscan_table_check_grid(&t, &dt, &err) == SLOWSCAN_OK, "step off by 1e-9 relative passes: %s",
          err.message);
    slowscan_series_table_free(&t);
    read_text("t,a\n0,1\n1,2\n2.00001,4\n3,8\n", &t, &err);
    CHECK(slowscan_table_check_grid(&t, &dt, &err) == SLOWSCAN_EINVAL && strstr(err.message, "io.csv: row 4: "),
          "step off by 1e-5 relative fails: %s", err.message);
    slowscan_series_table_free(&t);
    read_text("t,a\n0,1\n1,2\n\n2.5,4\n3,8\n", &t, &err);
    CHECK(slowscan_table_check_grid(&t, &dt, &err) == SLOWSCAN_EINVAL &&
              strstr(err.message, "io.csv: row 5: the time step 1.5 (from time 1 to 2.5) is not the "
                                  "regular step 1 that the span and the number of rows imply") &&
              strstr(err.message, "--resample STEP"), "irregular grid: %s", err.message);
    slowscan_series_table_free(&t);
}

static void test_resample(void)
{
    series_table t;
    io_error err;
    /* Linear interpolation reproduces a straight line exactly (analytic): y = 3t + 1. */
    read_text("t,y\n0,1\n0.7,3.1\n1.3,4.9\n2.9,9.7\n4,13\n", &t, &err);
    int rc = slowscan_table_resample(&t, 0.5, &err);
    int ok = rc == SLOWSCAN_OK && t.n == 9 && !t.rows;
    for (size_t k = 0; ok && k < t.n; k++)
        ok = t.time[k] == 0.5 * (double)k && check_close(t.values[0][k], 3 * t.time[k] + 1, 1e-12, 1e-12);
    CHECK(ok, "straight line through resampling: %s", err.message);
    double dt = 0;
    CHECK(slowscan_table_check_grid(&t, &dt, &err) == SLOWSCAN_OK && dt == 0.5, "resampled grid is regular");
    slowscan_series_table_free(&t);
    /* By hand: at 1.5, 2 + (0.5/1.5)*(4-2) = 8/3; at 2, 2 + (1/1.5)*2 = 10/3. */
    read_text("t,a\n0,1\n1,2\n2.5,4\n3,8\n", &t, &err);
    rc = slowscan_table_resample(&t, 0.5, &err);
    CHECK(rc == SLOWSCAN_OK && t.n == 7 && t.values[0][0] == 1 && check_close(t.values[0][1], 1.5, 1e-15, 0) &&
              t.values[0][2] == 2 && check_close(t.values[0][3], 8.0 / 3, 1e-15, 0) &&
              check_close(t.values[0][4], 10.0 / 3, 1e-15, 0) && t.values[0][5] == 4 &&
              t.values[0][6] == 8, "hand-computed interpolation: %s", err.message);
    slowscan_series_table_free(&t);
    /* Missing rule: a missing neighbour makes a point missing; a hit takes the sample. */
    read_text("t,a\n0,1\n1,NA\n2,3\n3,0\n", &t, &err);
    rc = slowscan_table_resample(&t, 0.5, &err);
    CHECK(rc == SLOWSCAN_OK && t.n == 7 && t.values[0][0] == 1 && isnan(t.values[0][1]) &&
              isnan(t.values[0][2]) && isnan(t.values[0][3]) && t.values[0][4] == 3 &&
              t.values[0][5] == 1.5 && t.values[0][6] == 0, "missing neighbours: %s", err.message);
    slowscan_series_table_free(&t);
    /* 0.9 / 0.3 is 3.0000000000000004 in binary and 3 * 0.3 is 0.8999999999999999: still
     * 4 grid points, the last one a hit on the sample at 0.9 (IEEE 754 double rounding). */
    read_text("t,a\n0,0\n0.3,3\n0.6,6\n0.7,NA\n0.9,9\n", &t, &err);
    rc = slowscan_table_resample(&t, 0.3, &err);
    CHECK(rc == SLOWSCAN_OK && t.n == 4 && t.values[0][2] == 6 && t.values[0][3] == 9,
          "grid points hit samples despite rounding: n %zu: %s", t.n, err.message);
    slowscan_series_table_free(&t);
    /* 3 * 0.2 is 0.6000000000000001: still a hit on the sample at 0.6, so the missing
     * sample at 0.7 does not spoil it. */
    read_text("t,a\n0,0\n0.2,2\n0.4,4\n0.6,6\n0.7,NA\n1,10\n", &t, &err);
    rc = slowscan_table_resample(&t, 0.2, &err);
    CHECK(rc == SLOWSCAN_OK && t.n == 6 && t.values[0][3] == 6 && isnan(t.values[0][4]) &&
              t.values[0][5] == 10, "0.6 hit, 0.8 between 0.7 (NA) and 1: %s", err.message);
    slowscan_series_table_free(&t);
    read_text("t,a\n0,1\n1,2\n3,4\n", &t, &err);
    CHECK(slowscan_table_resample(&t, 3, &err) == SLOWSCAN_OK && t.n == 2 && t.values[0][1] == 4,
          "step equal to the span gives 2 points");
    slowscan_series_table_free(&t);
    read_text("t,a\n0,1\n1,2\n3,4\n", &t, &err);
    const double bad_steps[] = {3.5, 0, -1, NAN, INFINITY};
    for (size_t i = 0; i < sizeof bad_steps / sizeof bad_steps[0]; i++)
        CHECK(slowscan_table_resample(&t, bad_steps[i], &err) == SLOWSCAN_EINVAL &&
                  strstr(err.message, "io.csv: option --resample") && t.n == 3 && t.rows,
              "bad step %g rejected, table unchanged: %s", bad_steps[i], err.message);
    CHECK(slowscan_table_resample(&t, 1e-12, &err) == SLOWSCAN_EINVAL && strstr(err.message, "grid points"),
          "too fine a step: %s", err.message);
    slowscan_series_table_free(&t);
}

static void test_log(void)
{
    series_table t;
    io_error err;
    read_text("t,a,b\n0,1,NA\n1,2.5,1\n2,100,3\n", &t, &err);
    CHECK(slowscan_table_log(&t, &err) == SLOWSCAN_OK && t.values[0][0] == 0 &&
              check_close(t.values[0][1], log(2.5), 1e-15, 0) &&
              check_close(t.values[0][2], log(100.0), 1e-15, 0) && isnan(t.values[1][0]),
          "log, NaN stays NaN: %s", err.message);
    slowscan_series_table_free(&t);
    read_text("t,a,b\n0,1,2\n1,2,3\n\n2,3,-1\n", &t, &err);
    CHECK(slowscan_table_log(&t, &err) == SLOWSCAN_EINVAL &&
              strstr(err.message, "io.csv: row 5, column 'b': the value -1 is not positive") &&
              strstr(err.message, "--log") && t.values[0][1] == 2,
          "log of a negative value; table unchanged: %s", err.message);
    slowscan_series_table_free(&t);
    read_text("t,a\n0,1\n1,0\n2,3\n", &t, &err);
    slowscan_table_resample(&t, 0.5, &err);
    CHECK(slowscan_table_log(&t, &err) == SLOWSCAN_EINVAL &&
              strstr(err.message, "time 1, column 'a': the value 0 is not positive"),
          "after resampling the message names the time: %s", err.message);
    slowscan_series_table_free(&t);
}

static void test_atomic_commit_abort(void)
{
    char path[512], other[512];
    snprintf(path, sizeof path, "%s", check_tmp_path("atomic-out.csv"));
    snprintf(other, sizeof other, "%s", check_tmp_path("atomic-aborted.csv"));
    atomic_file f;
    io_error err;
    CHECK(slowscan_atomic_open(&f, path, &err) == SLOWSCAN_OK && f.fp && f.temp_path &&
              !strncmp(f.temp_path, path, strlen(path)), "open: %s", err.message);
    fputs("x,y\n1,2\n", f.fp);
    CHECK(!check_file_exists(path) && check_scratch_files("atomic-out.csv.tmp.") == 1,
          "before commit: only the temporary file, in the same directory");
    CHECK(slowscan_atomic_commit(&f, &err) == SLOWSCAN_OK && !f.fp && !f.path && !f.temp_path, "commit");
    char *s = check_read_file(path);
    CHECK(s && !strcmp(s, "x,y\n1,2\n") && check_scratch_files("atomic-out.csv.tmp") == 0,
          "committed whole, no temporary file left");
    free(s);
    mode_t mask = umask(022);
    umask(mask);
    struct stat st;
    CHECK(stat(path, &st) == 0 && (st.st_mode & 0777) == (0666 & ~mask),
          "new file mode %o is 0666 under the umask %o", (unsigned)(st.st_mode & 0777), (unsigned)mask);
    chmod(path, 0640);
    slowscan_atomic_open(&f, path, &err);
    fputs("z\n", f.fp);
    CHECK(slowscan_atomic_commit(&f, &err) == SLOWSCAN_OK && (s = check_read_file(path)) && !strcmp(s, "z\n") &&
              stat(path, &st) == 0 && (st.st_mode & 0777) == 0640,
          "replacing a file keeps its permissions");
    free(s);
    CHECK(slowscan_atomic_commit(&f, &err) == SLOWSCAN_EINVAL, "a second commit is refused");
    slowscan_atomic_abort(&f); /* after a commit: nothing to do, the file stays */
    CHECK(check_file_exists(path), "abort after commit keeps the file");
    CHECK(slowscan_atomic_open(&f, other, &err) == SLOWSCAN_OK, "open for abort");
    fputs("partial", f.fp);
    slowscan_atomic_abort(&f);
    slowscan_atomic_abort(&f); /* idempotent */
    CHECK(!check_file_exists(other) && check_scratch_files("atomic-aborted") == 0 && !f.fp &&
              !f.temp_path, "abort leaves nothing");
    atomic_file zero = {0};
    slowscan_atomic_abort(&zero); /* unopened */
    CHECK(slowscan_io_same_file(path, path) && !slowscan_io_same_file(path, other) && !slowscan_io_same_file("-", "-") &&
              !slowscan_io_same_file(path, NULL), "same file");
    char link[512];
    snprintf(link, sizeof link, "%s", check_tmp_path("atomic-link.csv"));
    CHECK(symlink(path, link) == 0 && slowscan_io_same_file(path, link), "a symbolic link is the same file");
}

static void test_atomic_failures(void)
{
    atomic_file f;
    io_error err;
    CHECK(slowscan_atomic_open(&f, "/nonexistent-dir/out.csv", &err) == SLOWSCAN_EIO &&
              strstr(err.message, "cannot write /nonexistent-dir/out.csv: No such file or directory") &&
              !f.fp && !f.path && !f.temp_path, "missing directory: %s", err.message);
    char dir[512], target[600];
    snprintf(dir, sizeof dir, "%s", check_tmp_path("read-only"));
    mkdir(dir, 0555);
    snprintf(target, sizeof target, "%s/out.csv", dir);
    if (geteuid() != 0) { /* root writes anywhere, so the check would be void */
        CHECK(slowscan_atomic_open(&f, target, &err) == SLOWSCAN_EIO && strstr(err.message, target) &&
                  strstr(err.message, "Permission denied"),
              "read-only directory: %s", err.message);
    }
    CHECK(slowscan_atomic_open(&f, dir, &err) == SLOWSCAN_EIO && strstr(err.message, "is a directory"),
          "target is a directory: %s", err.message);
    /* A write failure at commit (file size limit, EFBIG): no target, no temporary file. */
    char big[512];
    snprintf(big, sizeof big, "%s", check_tmp_path("fsize-out.csv"));
    struct rlimit old, small = {4096, 0};
    getrlimit(RLIMIT_FSIZE, &old);
    small.rlim_max = old.rlim_max;
    void (*prev)(int) = signal(SIGXFSZ, SIG_IGN);
    int opened = slowscan_atomic_open(&f, big, &err) == SLOWSCAN_OK;
    setrlimit(RLIMIT_FSIZE, &small);
    for (int i = 0; opened && i < 2000; i++)
        fputs("0123456789\n", f.fp);
    int rc = opened ? slowscan_atomic_commit(&f, &err) : -1;
    setrlimit(RLIMIT_FSIZE, &old);
    signal(SIGXFSZ, prev);
    CHECK(rc == SLOWSCAN_EIO && strstr(err.message, "cannot write ") && strstr(err.message, big) &&
              !check_file_exists(big) && check_scratch_files("fsize-out") == 0,
          "write failure at commit: rc %d, %s", rc, err.message);
    /* Standard output is spooled (never written before the commit) and never closed. */
    CHECK(slowscan_atomic_open(&f, NULL, &err) == SLOWSCAN_OK && f.fp && f.fp != stdout && !f.path &&
              !f.temp_path && slowscan_atomic_commit(&f, &err) == SLOWSCAN_OK && !f.fp, "stdout (NULL)");
    CHECK(slowscan_atomic_open(&f, "-", &err) == SLOWSCAN_OK && f.fp && f.fp != stdout, "stdout (-)");
    slowscan_atomic_abort(&f);
    CHECK(fflush(stdout) == 0 && !ferror(stdout), "stdout still usable after abort");
}

static double seconds(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (double)ts.tv_sec + 1e-9 * (double)ts.tv_nsec;
}

/* 10^5 rows (the chunked path: the file is many 64 KiB chunks). */
static void test_large(void)
{
    char path[512];
    snprintf(path, sizeof path, "%s", check_tmp_path("large.csv"));
    FILE *f = fopen(path, "w");
    fputs("t,a,b,c\n", f);
    for (int i = 0; i < 100000; i++)
        fprintf(f, "%d,%.6f,%d,%s\n", i, sin(i * 0.01), i % 7, i % 10 ? "1.5" : "NA");
    fclose(f);
    series_table t;
    io_error err;
    double start = seconds();
    int rc = slowscan_csv_read_table(path, NULL, &t, &err);
    double took = seconds() - start;
    CHECK(rc == SLOWSCAN_OK && t.n == 100000 && t.values[1][99999] == 99999 % 7 &&
              check_close(t.values[0][5000], sin(50.0), 0, 1e-6) && isnan(t.values[2][50000]) &&
              t.values[2][50001] == 1.5 && t.rows[99999] == 100001 && t.time[77777] == 77777,
          "large file: %s", err.message);
    /* About 40 ms here (130 ms under ASan+UBSan); the bound leaves room for slow machines. */
    CHECK(took < 3.0, "10^5 rows read in %.3f s", took);
    slowscan_series_table_free(&t);
}

/* A header longer than one 64 KiB chunk (one column per grid cell). */
static void test_wide(void)
{
    char path[512];
    snprintf(path, sizeof path, "%s", check_tmp_path("wide.csv"));
    FILE *f = fopen(path, "w");
    fputs("time", f);
    for (int c = 0; c < 10000; c++)
        fprintf(f, ";cell_%05d", c);
    for (int r = 0; r < 3; r++) {
        fprintf(f, "\n%d", r);
        for (int c = 0; c < 10000; c++)
            fprintf(f, ";%d", r * 10000 + c);
    }
    fputc('\n', f);
    fclose(f);
    series_table t;
    io_error err;
    csv_read_options o = slowscan_csv_read_options_default();
    o.vars = "cell_09999,cell_00002";
    int rc = slowscan_csv_read_table(path, &o, &t, &err);
    CHECK(rc == SLOWSCAN_OK && t.n == 3 && t.nseries == 2 && !strcmp(t.names[0], "cell_09999") &&
              t.values[0][2] == 29999 && t.values[1][1] == 10002, "wide header: %s", err.message);
    slowscan_series_table_free(&t);
    o.vars = "nope"; /* a long header is listed only in part */
    CHECK(slowscan_csv_read_table(path, &o, &t, &err) == SLOWSCAN_EINVAL && strstr(err.message, "'nope'") &&
              strstr(err.message, "(columns: time, cell_00000, cell_00001") &&
              strstr(err.message, ", ... (10001 columns)") && strlen(err.message) < 500,
          "long column list truncated: %s", err.message);
    rc = slowscan_csv_read_table(path, NULL, &t, &err);
    CHECK(rc == SLOWSCAN_OK && t.nseries == 10000 && !strcmp(t.names[9999], "cell_09999") &&
              t.values[5000][2] == 25000, "every column of a wide file: %s", err.message);
    slowscan_series_table_free(&t);
}

void suite_io(void)
{
    test_delimiters();
    test_quoting();
    test_cells_and_rows();
    test_selection();
    test_cell_errors();
    test_file_errors();
    test_header_errors();
    test_stdin();
    test_span();
    test_grid();
    test_resample();
    test_log();
    test_atomic_commit_abort();
    test_atomic_failures();
    test_large();
    test_wide();
}
