/* The hostile-input catalogue's two tables and the files they need (see hostile_cases.h).
 * Bytes are made here at test time; nothing large is committed. Every value is invented:
 * these tests check refusals and equal readings, not numbers against a reference. */
#include "hostile_cases.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* Sixteen rows of a series after the header "t,a" (screen needs 8 samples or more). */
#define ROWS                                                                                 \
    "0,1.2\n1,0.7\n2,1.9\n3,1.1\n4,2.4\n5,0.3\n6,1.8\n7,2.9\n8,1.4\n9,0.6\n10,2.2\n11,1.5\n" \
    "12,3.1\n13,0.9\n14,2.6\n15,1.7\n"
#define TA "t,a\n" ROWS
/* Daily dates (the 16 days of January 2023) with the same values. */
#define DATED                                                                                \
    "date,a\n2023-01-01,1.2\n2023-01-02,0.7\n2023-01-03,1.9\n2023-01-04,1.1\n"              \
    "2023-01-05,2.4\n2023-01-06,0.3\n2023-01-07,1.8\n2023-01-08,2.9\n2023-01-09,1.4\n"      \
    "2023-01-10,0.6\n2023-01-11,2.2\n2023-01-12,1.5\n"
#define SCREEN "screen --surrogates 19 -o {out} "
/* The head of a summary as screen writes it, and a row that is fine. */
#define SUMMARY                                                                              \
    "series,indicator,n,window,bandwidth,tau,statistic,p_value,q_value,null,surrogates,flag\n" \
    "a,variance,40,20,3.9,0.41,0.41,0.2,0.6,phase,19,none\n"

static FILE *open_or_die(const char *path, const char *mode)
{
    FILE *fp = fopen(path, mode);
    if (!fp) {
        perror(path);
        exit(2);
    }
    return fp;
}

static void write_bytes(const char *path, const char *bytes, size_t len)
{
    FILE *fp = open_or_die(path, "wb");
    fwrite(bytes, 1, len, fp);
    fclose(fp);
}

/* Deterministic noise bytes (a 64-bit LCG's top byte; Knuth's MMIX constants). */
static void make_garbage(const char *path)
{
    char buf[4096];
    unsigned long long x = 20261202;
    for (size_t i = 0; i < sizeof buf; i++) {
        x = x * 6364136223846793005ULL + 1442695040888963407ULL;
        buf[i] = (char)(x >> 56);
    }
    write_bytes(path, buf, sizeof buf);
}

/* The standard rows in UTF-16 (little-endian, with its byte-order mark). */
static void make_utf16(const char *path)
{
    static const char text[] = TA;
    char buf[2 * sizeof text + 2] = "\xFF\xFE";
    for (size_t i = 0; i + 1 < sizeof text; i++)
        buf[2 + 2 * i] = text[i], buf[3 + 2 * i] = '\0';
    write_bytes(path, buf, 2 * (sizeof text - 1) + 2);
}

/* The first bytes of a gzip stream and of a zip archive (an .xlsx is one), then noise. */
static void make_signed(const char *path, const char *magic, size_t len)
{
    make_garbage(path);
    FILE *fp = open_or_die(path, "r+b");
    fwrite(magic, 1, len, fp);
    fclose(fp);
}
static void make_gzip(const char *path) { make_signed(path, "\x1F\x8B\x08\x00", 4); }
static void make_zip(const char *path) { make_signed(path, "PK\x03\x04", 4); }

static void make_nul_cell(const char *path)
{
    static const char text[] = "t,a\n0,1\n1,2\n2,3\n3,1\0002\n4,2\n5,1\n6,3\n7,2\n8,1\n9,2\n";
    write_bytes(path, text, sizeof text - 1);
}

static void make_nul_header(const char *path)
{
    static const char text[] = "t,a\000b\n" ROWS;
    write_bytes(path, text, sizeof text - 1);
}

/* A classic NetCDF grid (time x lat, a record dimension) from CDL by ncgen (netcdf-bin). */
static const char grid_cdl[] =
    "netcdf g {\ndimensions: time = UNLIMITED ; lat = 2 ;\nvariables:\n"
    "  double time(time) ; time:units = \"days since 2000-01-01\" ; time:calendar = \"standard\" ;\n"
    "  double lat(lat) ; lat:units = \"degrees_north\" ;\n  float tas(time, lat) ; tas:units = \"K\" ;\n"
    "data:\n lat = 10, 20 ;\n time = 0,1,2,3,4,5,6,7,8,9,10,11,12,13,14,15,16,17,18,19 ;\n"
    " tas = 1,2, 3,1, 2,5, 4,2, 6,3, 5,7, 8,4, 7,9, 9,5, 3,8, 1,2, 3,1, 2,5, 4,2, 6,3, 5,7, 8,4,"
    " 7,9, 9,5, 3,8 ;\n}\n";

static void run_ncgen(const char *path, const char *kind, const char *text)
{
    char cdl[600], cmd[1400];
    snprintf(cdl, sizeof cdl, "%s.cdl", path);
    write_bytes(cdl, text, strlen(text));
    snprintf(cmd, sizeof cmd, "ncgen -k %s -o '%s' '%s'", kind, path, cdl);
    int rc = system(cmd);
    remove(cdl);
    if (rc != 0) {
        fprintf(stderr, "hostile: ncgen -k %s failed\n", kind);
        exit(2);
    }
}

/* The grid with tas[time 1, lat 10] = Infinity (ncgen reads the CDL word). */
static void make_nc_infinite(const char *path)
{
    static const char before[] = "tas = 1,2, ";
    char text[sizeof grid_cdl + 16];
    size_t head = (size_t)(strstr(grid_cdl, before) - grid_cdl) + strlen(before);
    snprintf(text, sizeof text, "%.*sInfinity%s", (int)head, grid_cdl, grid_cdl + head + 1);
    run_ncgen(path, "classic", text);
}

/* The grid in a format ("classic", "cdf5", "netcdf4"); ncgen runs once per format, later
 * calls copy its bytes (each process costs much under the sanitizers). */
static void ncgen(const char *path, const char *kind)
{
    static struct {
        const char *kind;
        char *bytes;
        size_t len;
    } made[4];
    size_t k = 0;
    while (k < 4 && made[k].kind && strcmp(made[k].kind, kind) != 0)
        k++;
    if (k < 4 && made[k].kind) {
        write_bytes(path, made[k].bytes, made[k].len);
        return;
    }
    run_ncgen(path, kind, grid_cdl);
    FILE *fp = fopen(path, "rb");
    static char buf[1 << 16];
    size_t len = fp ? fread(buf, 1, sizeof buf, fp) : 0;
    if (fp)
        fclose(fp);
    if (len == 0 || k == 4 || !(made[k].bytes = malloc(len))) {
        fprintf(stderr, "hostile: ncgen -k %s failed\n", kind);
        exit(2);
    }
    memcpy(made[k].bytes, buf, len);
    made[k].len = len;
    made[k].kind = kind;
}

void hostile_make_grid(const char *path) { ncgen(path, "classic"); }

/* The grid cut to `keep` bytes (keep < 0: that many bytes off the end), or with bytes
 * overwritten at `at`. */
static void damage(const char *path, const char *kind, long keep, long at, const char *with)
{
    ncgen(path, kind);
    FILE *fp = open_or_die(path, "rb");
    static char buf[1 << 16];
    size_t len = fread(buf, 1, sizeof buf, fp);
    fclose(fp);
    if (keep != 0)
        len = keep > 0 ? (size_t)keep : len - (size_t)-keep;
    if (with)
        memcpy(buf + at, with, strlen(with));
    write_bytes(path, buf, len);
}

static void make_nc_cut(const char *path) { damage(path, "classic", -100, 0, NULL); }
static void make_nc_cut_last(const char *path) { damage(path, "classic", -4, 0, NULL); }
static void make_nc_stub(const char *path) { damage(path, "classic", 100, 0, NULL); }
static void make_nc_cut_cdf5(const char *path) { damage(path, "cdf5", -40, 0, NULL); }
static void make_nc_magic(const char *path) { damage(path, "classic", 0, 1, "X"); }
static void make_nc_version(const char *path) { damage(path, "classic", 0, 3, "\x09"); }
/* numrecs (bytes 4-7, big-endian) from 20 to 0x7f000014 records */
static void make_nc_numrecs(const char *path) { damage(path, "classic", 0, 4, "\x7f"); }
static void make_nc4_cut(const char *path) { damage(path, "netcdf4", 3000, 0, NULL); }

/* A NetCDF-4 grid whose second dimension (unlimited, allowed there in NetCDF-4) has no
 * entry: no cell, and no --select to blame (the fuzzer's empty-dimension inputs). */
static void make_nc_empty_dimension(const char *path)
{
    run_ncgen(path, "netCDF-4",
              "netcdf e {\ndimensions: time = 3 ; lat = UNLIMITED ;\nvariables:\n"
              "  double time(time) ; time:units = \"days since 2000-01-01\" ;\n"
              "  double lat(lat) ;\n  float tas(time, lat) ;\ndata:\n time = 0,1,2 ;\n}\n");
}

static void make_journal_garbage(const char *path) { make_garbage(path); }

/* A well-formed journal header naming another run. */
static void make_journal_foreign(const char *path)
{
    write_bytes(path, "slowscan-journal 1\nXXXXXXXX", 27);
}

static void make_journal_version(const char *path)
{
    write_bytes(path, "slowscan-journal 99\n", 20);
}

const hostile_refusal hostile_refusals[] = {
    /* bytes that are not a text table */
    {"binary garbage", NULL, make_garbage, NULL, SCREEN "{in}", "in.csv: row 1"},
    {"binary garbage on standard input", NULL, make_garbage, NULL,
     "indicators -o {out} - < {in}", "row 1"},
    {"UTF-16 text", NULL, make_utf16, NULL, SCREEN "{in}",
     "in.csv: not a text table: the file is UTF-16"},
    {"gzip-compressed table", NULL, make_gzip, NULL, "indicators -o {out} {in}", "gzip"},
    {"a spreadsheet (zip)", NULL, make_zip, NULL, "detrend -o {out} {in}", "spreadsheet"},
    {"NetCDF on standard input", NULL, NULL, NULL, SCREEN "- < {nc}",
     "standard input: not a text table: the file is NetCDF"},
    {"NUL byte in a cell", NULL, make_nul_cell, NULL, SCREEN "{in}", "row 5, column 'a': a NUL"},
    {"NUL byte in the header", NULL, make_nul_header, NULL, "detrend -o {out} {in}",
     "row 1, field 2"},
    {"invalid UTF-8 name (Latin-1 degree sign)", "t,temp_\xb0" "C\n" ROWS, NULL, NULL,
     SCREEN "{in}", "column 2 of the header is not UTF-8"},
    {"invalid UTF-8 name (overlong slash)", "t,a\xc0\xaf\n" ROWS, NULL, NULL,
     "indicators -o {out} {in}", "column 2 of the header"},
    {"invalid UTF-8 name (encoded surrogate)", "\xed\xa0\x80,a\n" ROWS, NULL, NULL,
     "recovery -o {out} {in}", "column 1 of the header"},
    {"invalid UTF-8 name (cut sequence)", "t,a\xe2\x82\n" ROWS, NULL, NULL,
     "surrogates --surrogates 2 -o {out} {in}", "column 2 of the header"},
    /* delimiters and quoting */
    {"mixed delimiters in a row", TA "16;2.0\n17,1.1\n", NULL, NULL, SCREEN "{in}", "row 18"},
    {"semicolon header, comma rows", "t;a\n0,1.2\n1,0.7\n2,1.9\n", NULL, NULL,
     "indicators -o {out} {in}", "row 2"},
    {"a row with an extra field", TA "16,2.0,7\n17,1.1\n", NULL, NULL, SCREEN "{in}", "row 18"},
    {"quote never closed", TA "16,\"2.0\n17,1.1\n", NULL, NULL, SCREEN "{in}", "not closed"},
    {"stray quote in a field", TA "16,2\"0\n17,1.1\n", NULL, NULL, "detrend -o {out} {in}",
     "row 18"},
    {"empty file", "", NULL, NULL, SCREEN "{in}", "empty"},
    {"blank lines only", "\n\n  \n\n", NULL, NULL, SCREEN "{in}", "in.csv"},
    {"header only", "t,a\n", NULL, NULL, SCREEN "{in}", "no data"},
    /* numbers */
    {"1e400 in data", TA "16,1e400\n17,1.1\n", NULL, NULL, SCREEN "{in}", "row 18, column 'a'"},
    {"-1e400 in data", TA "16,-1e400\n17,1.1\n", NULL, NULL, "indicators -o {out} {in}",
     "row 18, column 'a'"},
    {"0x10 in data", TA "16,0x10\n17,1.1\n", NULL, NULL, SCREEN "{in}", "\"0x10\" is not a number"},
    {"0x1p3 in data", TA "16,0x1p3\n17,1.1\n", NULL, NULL, "detrend -o {out} {in}",
     "\"0x1p3\" is not a number"},
    {"inf in data", TA "16,inf\n17,1.1\n", NULL, NULL, SCREEN "{in}", "row 18, column 'a'"},
    {"Infinity in data", TA "16,Infinity\n17,1.1\n", NULL, NULL, "recovery -o {out} {in}",
     "row 18, column 'a'"},
    {"text after numbers", TA "16,1.5.3\n17,1.1\n", NULL, NULL, SCREEN "{in}", "\"1.5.3\""},
    {"1e400 in a forced run", TA "16,1e400\n17,1.1\n", NULL, NULL,
     "timescales --response a -o {out} {in}", "row 18, column 'a'"},
    /* column names */
    {"duplicated column names", "t,a,a\n0,1,2\n1,2,3\n", NULL, NULL, SCREEN "{in}", "'a'"},
    {"duplicated names after trimming", "t, a ,a\n0,1,2\n1,2,3\n", NULL, NULL,
     "indicators -o {out} {in}", "'a'"},
    /* the time column */
    {"time NaN", "t,a\n0,1\n1,2\nNaN,3\n3,4\n4,5\n5,6\n6,7\n7,8\n8,9\n", NULL, NULL,
     SCREEN "{in}", "row 4, column 't'"},
    {"time missing (empty)", "t,a\n0,1\n1,2\n,3\n3,4\n4,5\n5,6\n6,7\n7,8\n8,9\n", NULL, NULL,
     "detrend -o {out} {in}", "row 4, column 't'"},
    {"time duplicated", TA "15,2.0\n", NULL, NULL, SCREEN "{in}", "row 18"},
    {"time going back", TA "14,2.0\n", NULL, NULL, "robustness -o {out} {in}", "row 18"},
    {"time 0x10", TA "0x10,2.0\n", NULL, NULL, SCREEN "{in}", "row 18, column 't'"},
    {"time 1e400", TA "1e400,2.0\n", NULL, NULL, SCREEN "{in}", "row 18, column 't'"},
    /* dates and calendars */
    {"2023-02-30 (standard calendar)", DATED "2023-02-30,1.0\n", NULL, NULL, SCREEN "{in}",
     "row 14"},
    {"month 13", DATED "2023-13-01,1.0\n", NULL, NULL, "indicators -o {out} {in}", "row 14"},
    {"2023-02-31 on standard", DATED "2023-02-31,1.0\n", NULL, NULL, SCREEN "{in}", "row 14"},
    {"2023-02-31 on 360_day (30-day months)", DATED "2023-02-31,1.0\n", NULL, NULL,
     SCREEN "--calendar 360_day {in}", "row 14"},
    {"2023-02-29 on noleap", DATED "2023-02-29,1.0\n", NULL, NULL,
     SCREEN "--calendar noleap {in}", "row 14"},
    {"day 0", DATED "2023-02-00,1.0\n", NULL, NULL, "detrend -o {out} {in}", "row 14"},
    {"unknown calendar", DATED, NULL, NULL, SCREEN "--calendar martian {in}", "--calendar"},
    {"unknown calendar in time units", TA, NULL, NULL,
     SCREEN "--time-units 'days since 2000-01-01' --calendar julian_ish {in}", "--calendar"},
    /* windows */
    {"window of 1 sample (time units)", TA, NULL, NULL, SCREEN "--window 0.4 {in}", "--window"},
    {"window of 1 sample (percent)", TA, NULL, NULL, "indicators -o {out} --window 2% {in}",
     "--window"},
    {"window of n+1 samples", TA, NULL, NULL, SCREEN "--window 16 {in}", "--window"},
    {"window over 100%", TA, NULL, NULL, "indicators -o {out} --window 101% {in}", "--window"},
    {"robustness grid with a window of n+1", TA, NULL, NULL,
     "robustness -o {out} --windows 50%,16 {in}", "--window"},
    /* option values */
    {"option with no value", NULL, NULL, NULL, SCREEN "{good} --window", "--window needs a value"},
    {"option with an empty value", NULL, NULL, NULL, SCREEN "--window= {good}", "--window"},
    {"empty item in --indicators", NULL, NULL, NULL, SCREEN "--indicators variance,,ar1 {good}",
     "--indicators: empty item"},
    {"leading comma in --indicators", NULL, NULL, NULL,
     "indicators -o {out} --indicators ,variance {good}", "--indicators: empty item"},
    {"trailing comma in --vars", NULL, NULL, NULL, SCREEN "--vars a, {good}", "--vars"},
    {"empty item in --windows", NULL, NULL, NULL, "robustness -o {out} --windows 30%,,50% {good}",
     "--windows: empty item"},
    {"empty item in --bandwidths", NULL, NULL, NULL,
     "robustness -o {out} --bandwidths 5%,,10% {good}", "--bandwidths: empty item"},
    {"empty item in --detrends", NULL, NULL, NULL, "robustness -o {out} --detrends linear,,none {good}",
     "--detrends: empty item"},
    {"empty item in --missing", NULL, NULL, NULL, SCREEN "--missing -999,,9999 {good}", "--missing"},
    {"hexadecimal option value", NULL, NULL, NULL, SCREEN "--window 0x10 {good}", "--window"},
    {"1e400 option value", NULL, NULL, NULL, "detrend -o {out} --bandwidth 1e400 {good}",
     "--bandwidth"},
    {"surrogates beyond a long", NULL, NULL, NULL, "screen -o {out} --surrogates 1e400 {good}",
     "--surrogates"},
    {"unknown option", NULL, NULL, NULL, SCREEN "--widnow 5 {good}", "--widnow"},
    /* the option-given-twice policy */
    {"--window twice", NULL, NULL, NULL, SCREEN "--window 30% --window 40% {good}",
     "option --window is given twice"},
    {"--seed twice, same value", NULL, NULL, NULL, SCREEN "--seed 3 --seed 3 {good}",
     "option --seed is given twice"},
    {"-o and --output", NULL, NULL, NULL, SCREEN "--output {dir}/other.csv {good}",
     "-o and --output"},
    {"--progress and --no-progress", NULL, NULL, NULL, SCREEN "--progress --no-progress {good}",
     "--progress and --no-progress"},
    {"--quiet twice", NULL, NULL, NULL, "detrend -o {out} --quiet --quiet {good}",
     "option --quiet is given twice"},
    {"--flux twice (feedback)", NULL, NULL, NULL,
     "feedback -o {out} --flux a --flux b --response b {good}", "option --flux is given twice"},
    {"--step twice (emulate)", NULL, NULL, NULL,
     "emulate -o {out} --step {good}:a --step {good}:b --response a --step-forcing 4 "
     "--forcing {good}:b", "option --step is given twice"},
    {"--out twice (demo)", NULL, NULL, NULL, "demo --out {dir}/a --out {dir}/b",
     "option --out is given twice"},
    {"--fdr twice (merge)", NULL, NULL, NULL, "merge -o {out} --fdr 0.1 --fdr 0.2 {good}",
     "option --fdr is given twice"},
    /* NetCDF */
    {"NetCDF cut short", NULL, make_nc_cut, "in/in.nc", SCREEN "{in}", "in.nc: the file is cut short"},
    {"NetCDF missing its last value", NULL, make_nc_cut_last, "in/in.nc",
     "indicators -o {out} {in}", "cut short"},
    {"NetCDF (CDF-5) cut short", NULL, make_nc_cut_cdf5, "in/in.nc", SCREEN "{in}", "cut short"},
    {"NetCDF stub of 100 bytes", NULL, make_nc_stub, "in/in.nc", SCREEN "{in}", "in.nc"},
    {"NetCDF with a flipped magic byte", NULL, make_nc_magic, "in/in.nc", SCREEN "{in}",
     "in.nc: not a NetCDF file"},
    {"NetCDF with an unknown version byte", NULL, make_nc_version, "in/in.nc", SCREEN "{in}",
     "in.nc: not a NetCDF file"},
    {"a CSV named .nc as a baseline", TA, NULL, "in/in.nc",
     "feedback -o {out} --flux a --response b --baseline {in} {good}",
     "--baseline: " },
    {"NetCDF with a corrupted record count", NULL, make_nc_numrecs, "in/in.nc",
     "detrend -o {out} {in}", "a record count larger than the file"},
    {"NetCDF-4 cut short", NULL, make_nc4_cut, "in/in.nc", SCREEN "{in}", "in.nc"},
    {"NetCDF with an empty dimension", NULL, make_nc_empty_dimension, "in/in.nc", SCREEN "{in}",
     "in.nc: no cell to analyse (a dimension"},
    {"NetCDF with an infinite value", NULL, make_nc_infinite, "in/in.nc",
     "indicators -o {out} {in}", "variable 'tas', cell tas[lat=10], time index 1"},
    {"--maps is a directory", NULL, NULL, NULL, SCREEN "--maps {dir} {nc}", "--maps"},
    {"--maps for a CSV input", NULL, NULL, NULL, SCREEN "--maps {dir}/m.nc {good}", "--maps"},
    /* resume journals */
    {"corrupt --resume journal", NULL, make_journal_garbage, "out/out.csv.journal",
     SCREEN "--resume {good}", "journal"},
    {"foreign --resume journal", NULL, make_journal_foreign, "out/out.csv.journal",
     SCREEN "--resume {good}", "journal"},
    {"--resume journal of another version", NULL, make_journal_version, "out/out.csv.journal",
     SCREEN "--resume {good}", "journal"},
    /* outputs */
    {"output in a directory nobody may write", NULL, NULL, NULL, "detrend -o /proc/s.csv {good}",
     "/proc/s.csv"},
    {"output directory missing", NULL, NULL, NULL, "screen -o {dir}/no/such/dir/s.csv {good}",
     "no/such/dir"},
    {"output under a regular file", NULL, NULL, NULL, "indicators -o {good}/s.csv {good}",
     "good.csv/s.csv"},
    {"output is a directory", NULL, NULL, NULL, "detrend -o {dir} {good}", "out"},
    {"output is the input", NULL, NULL, NULL, "screen -o {good} {good}", "input"},
    {"--json in a missing directory", NULL, NULL, NULL, SCREEN "--json {dir}/no/x.json {good}",
     "no/x.json"},
    {"--figures is a file", NULL, NULL, NULL, SCREEN "--figures {good} {good}", "--figures"},
    {"--json on the --figures directory", NULL, NULL, NULL,
     SCREEN "--figures {dir}/figs --json {dir}/figs {good}", "also the --figures directory"},
    {"demo --out is a file", NULL, NULL, NULL, "demo --out {good}", "good.csv"},
    /* other commands on bad tables */
    {"merge of a binary file", NULL, make_garbage, NULL, "merge -o {out} {in}", "in.csv"},
    {"merge of a table that is no summary", TA, NULL, NULL, "merge -o {out} {in}", "in.csv"},
    {"input is a directory", NULL, NULL, NULL, SCREEN "{dir}", "Is a directory"},
    {"--control is a directory", NULL, NULL, NULL, SCREEN "--null control --control {dir} {good}",
     "--control"},
    {"--from after --until", NULL, NULL, NULL, SCREEN "--from 30 --until 10 {good}", "--from 30"},
    {"--from beyond the record", NULL, NULL, NULL, "recovery -o {out} --from 100 {good}",
     "--from 100"},
    {"--select a value the grid lacks", NULL, NULL, NULL, SCREEN "--select lat=99 {nc}",
     "--select lat=99"},
    {"--select with an empty value", NULL, NULL, NULL, SCREEN "--select lat= {nc}", "--select"},
    {"NetCDF variable listed twice", NULL, NULL, NULL, SCREEN "--vars tas,tas {nc}", "'tas'"},
    {"time units of an unknown unit", NULL, NULL, NULL,
     "detrend -o {out} --time-units 'furlongs since 2000-01-01' {good}", "--time-units"},
    {"time units from month 13", NULL, NULL, NULL,
     "detrend -o {out} --time-units 'days since 2000-13-01' {good}", "--time-units"},
    {"--threads 0", NULL, NULL, NULL, SCREEN "--threads 0 {good}", "--threads"},
    {"merge: a p-value above 1", SUMMARY "a,lag1,40,20,3.9,-0.7,-0.7,1.5,0.95,phase,19,none\n",
     NULL, NULL, "merge -o {out} {in}", "row 3, column 'p_value'"},
    {"merge: a statistic that is text", SUMMARY "a,lag1,40,20,3.9,-0.7,abc,0.9,0.95,phase,19,none\n",
     NULL, NULL, "merge -o {out} {in}", "row 3, column 'statistic'"},
    {"merge: the same summary twice", SUMMARY, NULL, NULL, "merge -o {out} {in} {in}",
     "the same summary is given twice"},
    {"feedback without the flux column", NULL, NULL, NULL,
     "feedback -o {out} --flux zz --response a {good}", "zz"},
};
const size_t hostile_nrefusals = sizeof hostile_refusals / sizeof hostile_refusals[0];

/* The standard table: t = 0..59, a and b smooth-ish, c holding exact zeros and gaps. */
static double cell(int series, int i)
{
    if (series == 2 && i % 7 == 0)
        return 0.0;
    if (series == 2 && i % 11 == 5)
        return NAN;
    return sin(0.7 * i + series) * (1 + i / 20.0) + 0.3 * cos(2.3 * i * (series + 1));
}

static void put_value(FILE *fp, const hostile_style *s, double v, int i)
{
    static const char *const zeros[] = {"-0", "-0.0", "-0e0"};
    static const char *const missing[] = {"", "nan", "NaN", "na", "NA"};
    char text[64];
    if (isnan(v))
        snprintf(text, sizeof text, "%s", s->missing_spellings ? missing[i % 5] : "NA");
    else if (v == 0 && s->minus_zero)
        snprintf(text, sizeof text, "%s", zeros[i % 3]);
    else if (s->exponent) /* the plain digits with an exponent of zero, two spellings */
        snprintf(text, sizeof text, i % 2 ? "%s%.6fe0" : "%s%.6fE+00",
                 s->plus_sign && v > 0 ? "+" : "", v);
    else
        snprintf(text, sizeof text, "%s%.6f", s->plus_sign && v > 0 ? "+" : "", v);
    const char *pad = s->spaces ? "  " : "";
    fprintf(fp, s->quoted ? "%s\"%s\"%s" : "%s%s%s", pad, text, pad);
}

void hostile_write_table(const char *path, const hostile_style *s)
{
    FILE *fp = open_or_die(path, "wb");
    char delim = s->delim ? s->delim : ',';
    const char *eol = s->crlf ? "\r\n" : s->cr_only ? "\r" : "\n";
    if (s->bom)
        fputs("\xEF\xBB\xBF", fp);
    if (s->comments)
        fprintf(fp, "# an invented table%s# second comment line%s", eol, eol);
    fprintf(fp, s->quoted ? "\"t\"%c\"a\"%c\"b\"%c\"c\"" : "t%ca%cb%cc", delim, delim, delim);
    for (int i = 0; i < 60; i++) {
        fputs(eol, fp);
        if (s->comments && i == 30)
            fprintf(fp, "# a comment between rows%s", eol);
        fprintf(fp, s->quoted ? "\"%d\"" : "%d", i);
        for (int k = 0; k < 3; k++) {
            fputc(delim, fp);
            put_value(fp, s, cell(k, i), i + k);
        }
    }
    if (!s->no_final_newline)
        fputs(eol, fp);
    if (s->blank_tail)
        fprintf(fp, "%s%s   %s%s", eol, eol, eol, eol);
    fclose(fp);
}

/* A row far longer than any buffer: a 4 MiB quoted text cell (with commas, doubled quotes
 * and line feeds inside) in a column that is left out as text; the plain table lacks it. */
static void make_long_field(const char *path)
{
    FILE *fp = open_or_die(path, "wb");
    fputs("t,a,note\n", fp);
    for (int i = 0; i < 40; i++) {
        fprintf(fp, "%d,%.6f,", i, cell(0, i));
        if (i == 3) {
            fputc('"', fp);
            for (int k = 0; k < (4 << 20) / 64; k++)
                fputs("long text, with commas, \"\"quotes\"\" and\nline feeds.........\n", fp);
            fputs("\"\n", fp);
        } else {
            fputs("x\n", fp);
        }
    }
    fclose(fp);
}

static void make_long_field_plain(const char *path)
{
    FILE *fp = open_or_die(path, "wb");
    fputs("t,a\n", fp);
    for (int i = 0; i < 40; i++)
        fprintf(fp, "%d,%.6f\n", i, cell(0, i));
    fclose(fp);
}

/* 10^5 series columns and 64 rows (about 30 MB: every column kept as doubles would take
 * 51 MB); one is analysed. The plain table holds that column alone. */
enum { WIDE_COLUMNS = 100000, WIDE_ROWS = 64, WIDE_PICK = 77777 };

static double wide_cell(long k, int i) { return (double)((i * 31 + k * 17 + i * i) % 97) / 10; }

static void make_wide(const char *path)
{
    FILE *fp = open_or_die(path, "wb");
    fputs("t", fp);
    for (long k = 0; k < WIDE_COLUMNS; k++)
        fprintf(fp, ",c%ld", k);
    for (int i = 0; i < WIDE_ROWS; i++) {
        fprintf(fp, "\n%d", i);
        for (long k = 0; k < WIDE_COLUMNS; k++)
            fprintf(fp, ",%g", wide_cell(k, i));
    }
    fputc('\n', fp);
    fclose(fp);
}

static void make_wide_plain(const char *path)
{
    FILE *fp = open_or_die(path, "wb");
    fprintf(fp, "t,c%d\n", WIDE_PICK);
    for (int i = 0; i < WIDE_ROWS; i++)
        fprintf(fp, "%d,%g\n", i, wide_cell(WIDE_PICK, i));
    fclose(fp);
}

/* Daily values on the 360_day calendar across February's 29th and 30th, and the same as
 * day numbers in CF units. */
static void make_360_day(const char *path, int dated)
{
    FILE *fp = open_or_die(path, "wb");
    fputs(dated ? "date,a\n" : "days,a\n", fp);
    for (int i = 0; i < 40; i++) {
        int d = 40 + i; /* from 2023-02-11 */
        if (dated)
            fprintf(fp, "2023-%02d-%02d,%.6f\n", d / 30 + 1, d % 30 + 1, cell(1, i));
        else
            fprintf(fp, "%d,%.6f\n", d, cell(1, i));
    }
    fclose(fp);
}
static void make_360_dated(const char *path) { make_360_day(path, 1); }
static void make_360_days(const char *path) { make_360_day(path, 0); }

#define IND "indicators --indicators variance,lag1 -o {out} {in}"
#define SCR "screen --surrogates 19 -o {out} {in}"

const hostile_accept hostile_accepts[] = {
    {.name = "CRLF line ends", .style = {.crlf = 1}, .args = SCR},
    {.name = "CR-only line ends", .style = {.cr_only = 1}, .args = IND},
    {.name = "UTF-8 byte-order mark", .style = {.bom = 1}, .args = SCR},
    {.name = "every field quoted", .style = {.quoted = 1}, .args = SCR},
    {.name = "quoted, CRLF and a byte-order mark", .style = {.quoted = 1, .crlf = 1, .bom = 1},
     .args = "detrend -o {out} {in}"},
    {.name = "trailing blank lines", .style = {.blank_tail = 1}, .args = SCR},
    {.name = "no final line end", .style = {.no_final_newline = 1}, .args = IND},
    {.name = "-0 for zeros", .style = {.minus_zero = 1}, .args = IND},
    {.name = "spaces around cells", .style = {.spaces = 1}, .args = SCR},
    {.name = "semicolon delimiter", .style = {.delim = ';'}, .args = SCR},
    {.name = "tab delimiter", .style = {.delim = '\t'}, .args = "recovery -o {out} {in}"},
    {.name = "comment lines", .style = {.comments = 1}, .args = SCR},
    {.name = "missing cells spelt five ways", .style = {.missing_spellings = 1}, .args = SCR},
    {.name = "+ signs and exponents", .style = {.plus_sign = 1, .exponent = 1}, .args = IND},
    {.name = "standard input with CRLF", .style = {.crlf = 1}, .args = SCR, .stdin_input = 1},
    {.name = "a 4 MiB quoted field", .make_hostile = make_long_field,
     .make_plain = make_long_field_plain, .args = IND},
    {.name = "10^5 columns, one analysed", .make_hostile = make_wide, .make_plain = make_wide_plain,
     .args = "screen --vars c77777 --surrogates 19 -o {out} {in}", .rss_margin_kb = 24 * 1024},
    /* the same read a table of series at a time, as files over 64 MiB are */
    {.name = "10^5 columns, one analysed, streamed", .make_hostile = make_wide,
     .make_plain = make_wide_plain, .args = "screen --vars c77777 --surrogates 19 -o {out} {in}",
     .rss_margin_kb = 24 * 1024, .env = "SLOWSCAN_STREAM_AFTER=1000000"},
    {.name = "2023-02-30 on 360_day", .make_hostile = make_360_dated, .make_plain = make_360_days,
     .args = "indicators --calendar 360_day -o {out} {in}",
     .plain_args = "indicators --calendar 360_day --time-units 'days since 2023-01-01' -o {out} {in}"},
};
const size_t hostile_naccepts = sizeof hostile_accepts / sizeof hostile_accepts[0];
