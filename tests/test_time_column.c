/* Suite time_column: what the CSV reader makes of the time column and of the cells around it
 * (io/time_axis.c, io/regular_grid.c, io/suspect_codes.c): dates on CF calendars, CF time
 * units, monthly and yearly records on their index, ages, comment lines, text columns, gaps,
 * missing-value codes and values that look like unflagged ones.
 *
 * Outside references: day numbers against Debian's python3-cftime (date2num, num2date);
 * statsmodels' weekly co2 (Mauna Loa 1958-2001, python3-statsmodels) read with its dates and
 * its 59 missing weeks left out as rows. Tolerances and the spike rule are the project's own
 * (io.h), marked where used. */
#include "check.h"
#include "slowscan/io.h"
#include "slowscan/status.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* Reads `text` with `o` (NULL: defaults). */
static int read_with(const char *text, const csv_read_options *o, series_table *t, io_error *err)
{
    const char *path = check_tmp_path("time.csv");
    check_write_file(path, text);
    csv_read_options defaults = slowscan_csv_read_options_default();
    memset(err, 0, sizeof *err);
    return slowscan_csv_read_table(path, o ? o : &defaults, t, err);
}

/* Reading fails and the message holds `needle`. */
static void expect_refused(const char *what, const char *text, const csv_read_options *o,
                           const char *needle)
{
    series_table t;
    io_error err;
    int st = read_with(text, o, &t, &err);
    CHECK(st == SLOWSCAN_EINVAL && strstr(err.message, needle),
          "%s: refused naming '%s' (status %d: %s)", what, needle, st, err.message);
    if (st == SLOWSCAN_OK)
        slowscan_series_table_free(&t);
}

/* Daily ISO dates on three calendars: day numbers equal cftime.date2num (python3-cftime). */
static void check_dated_days(void)
{
    static const char *const calendars[] = {"standard", "noleap", "360_day"};
    const char *text = "date,x\n1850-01-30,1\n1850-02-27,2\n1850-02-28,3\n1850-03-01,4\n"
                       "1900-02-28,5\n1900-03-01,6\n2000-02-28,7\n2000-03-01,8\n";
    for (size_t c = 0; c < 3; c++) {
        csv_read_options o = slowscan_csv_read_options_default();
        slowscan_calendar_lookup(calendars[c], &o.calendar);
        series_table t;
        io_error err;
        int st = read_with(text, &o, &t, &err);
        double want[8];
        char args[512];
        snprintf(args, sizeof args, "cftime_dates.py csv %s %s", check_tmp_path("time.csv"),
                 calendars[c]);
        int got = check_python(args, want, 8);
        CHECK(st == SLOWSCAN_OK && t.axis.unit == TIME_AXIS_DAYS && got == 8 &&
                  check_max_diff(t.time, want, 8) == 0.0,
              "%s: daily dates -> day numbers equal cftime.date2num (status %d, %s)",
              calendars[c], st, err.message);
        char stamp[32];
        if (st == SLOWSCAN_OK) {
            slowscan_time_axis_format(&t.axis, t.time[4], stamp, sizeof stamp);
            CHECK(strcmp(stamp, "1900-02-28") == 0, "%s: stamped back as %s", calendars[c],
                  stamp);
            slowscan_series_table_free(&t);
        }
    }
}

/* A record with one row per month goes on the month index, whatever the day stamps (CF
 * monthly means are stamped mid-month: 16th, 15th, ...); one row per year on the year. */
static void check_monthly_yearly(void)
{
    series_table t;
    io_error err;
    int st = read_with("t,x\n1999-11,1\n1999-12,2\n2000-01,3\n2000-02,4\n", NULL, &t, &err);
    CHECK(st == SLOWSCAN_OK && t.axis.unit == TIME_AXIS_MONTHS && t.time[0] == 1999 * 12 + 10 &&
              t.time[3] - t.time[0] == 3.0,
          "YYYY-MM dates on the month index (status %d)", st);
    if (st == SLOWSCAN_OK)
        slowscan_series_table_free(&t);
    csv_read_options o = slowscan_csv_read_options_default();
    o.calendar = CALENDAR_NOLEAP;
    st = read_with("t,x\n1850-01-16T12:00,1\n1850-02-15,2\n1850-03-16T12:00,3\n1850-04-16,4\n"
                   "1850-05-16T12:00,5\n",
                   &o, &t, &err);
    char stamp[32] = "";
    if (st == SLOWSCAN_OK)
        slowscan_time_axis_format(&t.axis, t.time[1], stamp, sizeof stamp);
    CHECK(st == SLOWSCAN_OK && t.axis.unit == TIME_AXIS_MONTHS && t.time[4] - t.time[0] == 4.0 &&
              strcmp(stamp, "1850-02") == 0,
          "mid-month stamps (noleap) on the month index, stamped %s (status %d)", stamp, st);
    if (st == SLOWSCAN_OK)
        slowscan_series_table_free(&t);
    st = read_with("t,x\n1958-07-01,1\n1959-07-01,2\n1960-07-01,3\n1962-07-01,4\n", NULL, &t,
                   &err);
    CHECK(st == SLOWSCAN_OK && t.axis.unit == TIME_AXIS_YEARS && t.time[0] == 1958.0 &&
              t.time[3] == 1962.0,
          "one row per year on the year, a missing year kept as a gap (status %d)", st);
    if (st == SLOWSCAN_OK)
        slowscan_series_table_free(&t);
}

/* Numbers in "days since 1850-01-01" on noleap, stamped mid-month as CMIP monthly files are:
 * on the month index, with the months cftime.num2date gives (python3-cftime). */
static void check_units_column(void)
{
    time_units u;
    int st = slowscan_time_units_parse("days since 1850-01-01", CALENDAR_NOLEAP, &u, NULL);
    csv_read_options o = slowscan_csv_read_options_default();
    o.calendar = CALENDAR_NOLEAP;
    o.units = &u;
    series_table t;
    io_error err;
    /* cftime.num2date([15.5, 45, 74.5, 105, 135.5], "days since 1850-01-01", "noleap"):
     * 1850-01-16 12:00, 02-15, 03-16 12:00, 04-16, 05-16 12:00 */
    if (st == SLOWSCAN_OK)
        st = read_with("time,x\n15.5,1\n45,2\n74.5,3\n105,4\n135.5,5\n", &o, &t, &err);
    CHECK(st == SLOWSCAN_OK && t.axis.unit == TIME_AXIS_MONTHS &&
              t.time[0] == 1850.0 * 12 && t.time[4] == 1850.0 * 12 + 4,
          "CF units column on the month index (status %d: %s)", st, err.message);
    if (st == SLOWSCAN_OK)
        slowscan_series_table_free(&t);
    expect_refused("a date in a units column", "time,x\n1,1\n1850-01-03,2\n", &o, "--time-units");
}

static void check_refusals(void)
{
    expect_refused("dates then a number", "t,x\n2000-01-01,1\n2000-01-02,2\n3,3\n", NULL,
                   "row 4, column 't': \"3\" is a number, but the rows above hold dates");
    expect_refused("numbers then a date", "t,x\n1,1\n2000-01-02,2\n", NULL,
                   "is a date (or text), but the rows above hold numbers");
    expect_refused("a date the calendar lacks", "t,x\n2001-02-28,1\n2001-02-29,2\n", NULL,
                   "row 3, column 't': \"2001-02-29\" is not a date of the standard calendar");
    expect_refused("dates out of order", "t,x\n2001-02-28,1\n2001-02-27,2\n", NULL,
                   "time 2001-02-27 is not greater than the previous time 2001-02-28");
    expect_refused("text in the time column", "t,x\nyesterday,1\n", NULL,
                   "is not a number or a date");
    csv_read_options o = slowscan_csv_read_options_default();
    o.time_format = "%Y%m%d";
    expect_refused("a format that does not match", "t,x\n19580329,1\n1958-03-30,2\n", &o,
                   "is not a date in the format '%Y%m%d'");
    series_table t;
    io_error err;
    o.calendar = CALENDAR_360_DAY;
    int st = read_with("t,x\n20000229,1\n20000230,2\n20000301,3\n", &o, &t, &err);
    CHECK(st == SLOWSCAN_OK && t.n == 3 && t.time[2] - t.time[1] == 1.0,
          "compact dates with --time-format, 2000-02-30 on 360_day (status %d: %s)", st,
          err.message);
    if (st == SLOWSCAN_OK)
        slowscan_series_table_free(&t);
}

/* '#' lines anywhere are skipped and file rows still count them; text columns are left out
 * without --vars, a column that turns to text is refused (common practice, no source). */
static void check_friendlier_csv(void)
{
    series_table t;
    io_error err;
    int st = read_with("# station A\n# units: K\ntime,id,a\n1,st1,2\n# maintenance\n2,st1,3\n"
                       "3,st1,4\n", NULL, &t, &err);
    CHECK(st == SLOWSCAN_OK && t.n == 3 && t.nseries == 1 && strcmp(t.names[0], "a") == 0 &&
              t.nskipped == 1 && strcmp(t.skipped[0], "id") == 0 && t.rows[1] == 6,
          "comment lines skipped, file rows kept, text column 'id' left out (status %d: %s)",
          st, err.message);
    if (st == SLOWSCAN_OK)
        slowscan_series_table_free(&t);
    expect_refused("a number column turning to text", "# c\ntime,a\n1,2\n2,x\n", NULL,
                   "row 4, column 'a': \"x\" is not a number");
    expect_refused("only text columns", "time,id\n1,a\n2,b\n", NULL, "no column besides");
    csv_read_options o = slowscan_csv_read_options_default();
    o.vars = "id";
    expect_refused("a text column named in --vars", "time,id\n1,a\n2,b\n", &o,
                   "\"a\" is not a number");
}

/* Weekly data with missing rows: the gaps are filled with missing values, not refused. The
 * co2 record (python3-statsmodels) has 2284 weeks, 59 of them missing. */
static void check_gaps(void)
{
    char out[64] = "";
    const char *path = check_tmp_path("co2_dates.csv");
    char args[512];
    snprintf(args, sizeof args, "co2_csv.py %s --dates", path);
    double counts[2] = {0, 0};
    int got = check_python(args, counts, 2);
    series_table t = {0}; /* freed whatever happens: a failed read leaves it zeroed */
    io_error err = {{0}};
    csv_read_options o = slowscan_csv_read_options_default();
    int st = got == 2 ? slowscan_csv_read_table(path, &o, &t, &err) : SLOWSCAN_EIO;
    size_t gaps = 0, nan = 0;
    if (st == SLOWSCAN_OK)
        st = slowscan_table_regularize(&t, &gaps, &err);
    for (size_t i = 0; st == SLOWSCAN_OK && i < t.n; i++)
        nan += isnan(t.values[0][i]);
    if (st == SLOWSCAN_OK)
        slowscan_time_axis_format(&t.axis, t.time[t.n - 1], out, sizeof out);
    CHECK(st == SLOWSCAN_OK && t.n == (size_t)counts[0] && gaps == (size_t)counts[1] &&
              nan == gaps && t.time[1] - t.time[0] == 7.0 && strcmp(out, "2001-12-29") == 0,
          "co2 with its missing weeks as gaps: %zu rows (want %g), %zu gaps (want %g), last %s "
          "(status %d: %s)", st == SLOWSCAN_OK ? t.n : 0, counts[0], gaps, counts[1], out, st,
          err.message);
    slowscan_series_table_free(&t);
    /* monthly decimal years written to 3 decimals: regular to the precision printed */
    st = read_with("t,x\n2000.042,1\n2000.125,2\n2000.208,3\n2000.292,4\n2000.375,5\n"
                   "2000.542,7\n",
                   NULL, &t, &err);
    if (st == SLOWSCAN_OK)
        st = slowscan_table_regularize(&t, &gaps, &err);
    CHECK(st == SLOWSCAN_OK && t.n == 7 && gaps == 1 && isnan(t.values[0][5]) &&
              fabs(t.time[1] - t.time[0] - 0.5 / 6) < 1e-12,
          "3-decimal monthly years: one gap, times on the grid (status %d: %s)", st,
          err.message);
    slowscan_series_table_free(&t);
    st = read_with("t,x\n0,1\n1,2\n2,3\n3.5,4\n4.5,5\n", NULL, &t, &err);
    if (st == SLOWSCAN_OK)
        st = slowscan_table_regularize(&t, &gaps, &err);
    CHECK(st == SLOWSCAN_EINVAL && strstr(err.message, "row 5") &&
              strstr(err.message, "not a whole number of the base step 1"),
          "an irregular step refused naming its row: %s", err.message);
    slowscan_series_table_free(&t);
}

/* Ages before present, youngest first or oldest first: forward in time either way, written
 * back as ages. */
static void check_ages(void)
{
    csv_read_options o = slowscan_csv_read_options_default();
    o.age = 1;
    series_table young, old;
    io_error err;
    int a = read_with("age,x\n100,5\n200,4\n300,3\n400,2\n", &o, &young, &err);
    int b = read_with("age,x\n400,2\n300,3\n200,4\n100,5\n", &o, &old, &err);
    char stamp[32] = "";
    if (a == SLOWSCAN_OK)
        slowscan_time_axis_format(&young.axis, young.time[0], stamp, sizeof stamp);
    CHECK(a == SLOWSCAN_OK && b == SLOWSCAN_OK && young.time[0] == -400 &&
              old.time[0] == -400 && young.values[0][0] == 2 && old.values[0][3] == 5 &&
              young.rows[0] == 5 && strcmp(stamp, "400") == 0,
          "ages in either order run forward, printed as ages (%s)", stamp);
    if (a == SLOWSCAN_OK)
        slowscan_series_table_free(&young);
    if (b == SLOWSCAN_OK)
        slowscan_series_table_free(&old);
    expect_refused("ages that turn back", "age,x\n100,1\n200,2\n150,3\n", &o,
                   "row 4: age 150 does not continue the order");
}

/* --missing codes and values that look like unflagged codes (the project's rule, io.h). */
static void check_missing_codes(void)
{
    enum { N = 200 };
    static char text[N * 40];
    double x[N];
    check_rng *rng = check_rng_alloc(11);
    for (size_t i = 0; i < N; i++)
        x[i] = 10 + check_rng_gaussian(rng);
    check_rng_free(rng);
    /* -999 at file rows 19, 92, 93; a regime shift of +50 written to one decimal (so values
     * repeat); counts that are 0 but every seventh */
    size_t len = (size_t)snprintf(text, sizeof text, "t,coded,shifted,counts\n");
    for (size_t i = 0; i < N; i++) {
        int code = i == 17 || i == 90 || i == 91;
        len += (size_t)snprintf(text + len, sizeof text - len, "%zu,%.4f,%.1f,%d\n", i,
                                code ? -999.0 : x[i], x[i] + (i >= 120 ? 50.0 : 0.0),
                                i % 7 == 0 ? 3 : 0);
    }
    series_table t;
    io_error err;
    int st = read_with(text, NULL, &t, &err);
    suspect_code found[3];
    int hit[3] = {0, 0, 0};
    for (size_t k = 0; st == SLOWSCAN_OK && k < 3; k++)
        hit[k] = slowscan_table_suspect_code(&t, k, &found[k]);
    CHECK(st == SLOWSCAN_OK && hit[0] && found[0].value == -999.0 && found[0].count == 3 &&
              found[0].first_row == 19,
          "-999 in a noisy series found: value %g, %zu times, first row %zu", found[0].value,
          found[0].count, found[0].first_row);
    CHECK(st == SLOWSCAN_OK && !hit[1], "a regime shift with repeated rounded values is no "
          "code (found %g)", hit[1] ? found[1].value : 0.0);
    CHECK(st == SLOWSCAN_OK && !hit[2], "a series of counts (no spread of differences) is "
          "not judged");
    if (st == SLOWSCAN_OK)
        slowscan_series_table_free(&t);
    static const double codes[] = {-999.0, 9.96921e36};
    csv_read_options o = slowscan_csv_read_options_default();
    o.missing = codes;
    o.nmissing = 2;
    st = read_with("t,a\n1,1\n2,-999\n3,9.969209968386869e+36\n4,-999.5\n", &o, &t, &err);
    CHECK(st == SLOWSCAN_OK && t.coded_missing == 2 && isnan(t.values[0][1]) &&
              isnan(t.values[0][2]) && t.values[0][3] == -999.5,
          "--missing codes read as missing, the float fill to its 6 printed digits (status %d)",
          st);
    if (st == SLOWSCAN_OK)
        slowscan_series_table_free(&t);
}

/* A table read through the column store equals the same table read whole, series by series
 * and bit for bit, with text columns left out and ages turned round; its temporary file has
 * no name (common practice, no source). */
static void check_column_store(void)
{
    enum { ROWS = 300, COLS = 11 };
    static char text[ROWS * COLS * 16];
    size_t len = (size_t)snprintf(text, sizeof text, "age");
    for (size_t c = 0; c < COLS; c++)
        len += (size_t)snprintf(text + len, sizeof text - len, c == 4 ? ",station" : ",s%zu", c);
    check_rng *rng = check_rng_alloc(9);
    for (size_t i = 0; i < ROWS; i++) { /* youngest first: turned round when read */
        len += (size_t)snprintf(text + len, sizeof text - len, "\n%zu", 100 + 10 * i);
        for (size_t c = 0; c < COLS; c++)
            len += c == 4 ? (size_t)snprintf(text + len, sizeof text - len, ",lake%zu", i % 3)
                          : (size_t)snprintf(text + len, sizeof text - len, ",%.5f",
                                             check_rng_gaussian(rng));
    }
    check_rng_free(rng);
    snprintf(text + len, sizeof text - len, "\n");
    const char *path = check_tmp_path("wide.csv");
    check_write_file(path, text);
    char dir[600];
    snprintf(dir, sizeof dir, "%s", check_tmp_path("columns"));
    char cmd[700];
    snprintf(cmd, sizeof cmd, "mkdir -p '%s'", dir);
    check_run(cmd, NULL, NULL);
    csv_read_options o = slowscan_csv_read_options_default();
    o.age = 1;
    series_table whole = {0};
    io_error err;
    csv_column_store *store = NULL;
    int a = slowscan_csv_read_table(path, &o, &whole, &err);
    int b = slowscan_csv_open_columns(path, &o, dir, &store, &err);
    size_t bad = 0, seen = 0;
    for (size_t first = 0; a == 0 && b == 0 && first < whole.nseries; first += 3) {
        series_table part;
        if (slowscan_csv_columns_table(store, first, 3, &part, &err) != SLOWSCAN_OK) {
            bad++;
            break;
        }
        for (size_t k = 0; k < part.nseries; k++, seen++)
            bad += strcmp(part.names[k], whole.names[first + k]) != 0 ||
                   check_max_diff(part.values[k], whole.values[first + k], whole.n) != 0.0 ||
                   check_max_diff(part.time, whole.time, whole.n) != 0.0 ||
                   part.rows[k] != whole.rows[k];
        slowscan_series_table_free(&part);
    }
    snprintf(cmd, sizeof cmd, "ls -A '%s' | wc -l", dir);
    char *listed = NULL;
    check_run(cmd, &listed, NULL);
    CHECK(a == 0 && b == 0 && whole.nseries == COLS - 1 && seen == whole.nseries && bad == 0 &&
              slowscan_csv_columns_header(store)->nskipped == 1 && listed && atoi(listed) == 0,
          "column store = whole table (%zu series, %zu differ), its file unnamed (%s): %s", seen,
          bad, listed ? listed : "", err.message);
    free(listed);
    slowscan_csv_columns_close(store);
    slowscan_series_table_free(&whole);
}

/* A table made from cells in memory (slowscan_table_from_memory, for bindings) is the table
 * the CSV reader makes of the same cells: times, axis, values, codes read as missing; and it
 * refuses what the reader refuses (common practice, no source: the reader is the reference). */
static void check_memory_table(void)
{
    static const char *const cells[] = {"1850-01-15", "1850-02-15", "1850-03-15", "1850-04-15",
                                        "1850-05-15"};
    const double a[] = {1, -999, 3, 4, 5}, b[] = {2, 4, 6, 8, NAN};
    const double *values[] = {a, b};
    const char *names[] = {"a", "b"};
    double code = -999;
    csv_read_options o = slowscan_csv_read_options_default();
    slowscan_calendar_lookup("noleap", &o.calendar);
    o.missing = &code, o.nmissing = 1;
    series_table file, mem;
    io_error err, err2 = {{0}};
    int st = read_with("date,a,b\n1850-01-15,1,2\n1850-02-15,-999,4\n1850-03-15,3,6\n"
                       "1850-04-15,4,8\n1850-05-15,5,NA\n", &o, &file, &err);
    int st2 = slowscan_table_from_memory("arrays", "date", cells, 5, names, values, 2, &o, &mem,
                                         &err2);
    int same = st == SLOWSCAN_OK && st2 == SLOWSCAN_OK && mem.n == file.n &&
               memcmp(&mem.axis, &file.axis, sizeof mem.axis) == 0 &&
               mem.coded_missing == 1 && file.coded_missing == 1 && mem.rows == NULL;
    for (size_t i = 0; same && i < mem.n; i++)
        for (size_t k = 0; k < 2; k++)
            same = mem.time[i] == file.time[i] && !strcmp(mem.names[k], file.names[k]) &&
                   (mem.values[k][i] == file.values[k][i] ||
                    (isnan(mem.values[k][i]) && isnan(file.values[k][i])));
    CHECK(same && mem.axis.unit == TIME_AXIS_MONTHS, "memory table = CSV table (%d %d): %s",
          st, st2, err2.message);
    if (st == SLOWSCAN_OK)
        slowscan_series_table_free(&file);
    if (st2 == SLOWSCAN_OK)
        slowscan_series_table_free(&mem);
    static const struct { const char *cells[3]; double x; int age; const char *needle; } bad[] = {
        {{"1", "NA", "3"}, 0, 0, "date[1]: the time is missing"},
        {{"1", "3", "2"}, 0, 0, "date[2] = 2 is not greater than the previous time 3"},
        {{"1", "2", "x"}, 0, 0, "date[2] 'x' is a date (or text), but the rows above hold numbers"},
        {{"1", "2", "3"}, INFINITY, 0, "series 'a', sample 0: an infinite value"},
        {{"1", "2", "3"}, 0, 1, "ages are not read from memory"},
    };
    for (size_t c = 0; c < sizeof bad / sizeof bad[0]; c++) {
        const double x[] = {bad[c].x, 1, 2};
        const double *v[] = {x};
        csv_read_options d = slowscan_csv_read_options_default();
        d.age = bad[c].age;
        memset(&err2, 0, sizeof err2);
        st = slowscan_table_from_memory("arrays", "date", bad[c].cells, 3, names, v, 1, &d,
                                        &mem, &err2);
        CHECK(st == SLOWSCAN_EINVAL && strstr(err2.message, bad[c].needle) &&
                  mem.time == NULL && mem.names == NULL,
              "memory table refuses '%s': %s", bad[c].needle, err2.message);
    }
}

void suite_time_column(void)
{
    check_memory_table();
    check_column_store();
    check_dated_days();
    check_monthly_yearly();
    check_units_column();
    check_refusals();
    check_friendlier_csv();
    check_gaps();
    check_ages();
    check_missing_codes();
}
