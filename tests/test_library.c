/* The library as a program outside the project sees it: `make install` into a scratch prefix,
 * programs built with `pkg-config --cflags --libs slowscan` alone (tests/consumer/), the
 * exported symbols of the installed libslowscan.so against what its headers declare, and its
 * dependencies (no PLplot). Runs the Makefile (which builds `all` first when it is not
 * current), the C compiler and binutils; a few seconds. Plain build only. */
#include "check.h"
#include "slowscan/version.h"

/* The soname's number, from the version header (bumped with the major). */
#define TEXT_OF(x) #x
#define TEXT(x) TEXT_OF(x)
#define SOMAJOR TEXT(SLOWSCAN_VERSION_MAJOR)

#include <dirent.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* The Makefile's own recursion variables are dropped so that a `make install` started from
 * the tests under `make check` is a fresh make, not a job of the outer one. */
#define FRESH_MAKE "env -u MAKEFLAGS -u MFLAGS -u MAKELEVEL make -s --no-print-directory"

/* The Nile's annual flow at Aswan 1871-1970, as shipped with Debian's python3-statsmodels
 * (statsmodels.datasets.nile). */
#define NILE_CSV "/usr/lib/python3/dist-packages/statsmodels/datasets/nile/nile.csv"

static char prefix[512];

/* Runs a command, returns its stdout (malloc'd, "" on failure); *rc gets the exit status. */
static char *run(const char *command, int *rc)
{
    char *out = NULL, *err = NULL;
    int status = check_run(command, &out, &err);
    if (status != 0 && err && *err)
        fprintf(stderr, "    [%s]\n    %s", command, err);
    free(err);
    if (rc)
        *rc = status;
    return out ? out : calloc(1, 1);
}

static void check_installed(const char *relative)
{
    char path[1024];
    snprintf(path, sizeof path, "%s/%s", prefix, relative);
    CHECK(check_file_exists(path), "make install put %s in the prefix", relative);
}

static void install_into_prefix(void)
{
    snprintf(prefix, sizeof prefix, "%s", check_tmp_path("prefix"));
    char cmd[1200];
    int rc;
    snprintf(cmd, sizeof cmd, FRESH_MAKE " install PREFIX='%s' >/dev/null", prefix);
    free(run(cmd, &rc));
    CHECK(rc == 0, "make install PREFIX=%s exits 0 (got %d)", prefix, rc);
    static const char *const files[] = {
        "bin/slowscan", "lib/libslowscan.a", "lib/libslowscan.so", "lib/libslowscan.so." SOMAJOR,
        "lib/libslowscan.so." SLOWSCAN_VERSION_STRING, "lib/libslowscan-report.a",
        "lib/libslowscan-report.so." SOMAJOR, "lib/pkgconfig/slowscan.pc", "include/slowscan.h",
        "include/slowscan/version.h", "include/slowscan/export.h", "include/slowscan/report.h",
        "share/man/man1/slowscan.1"};
    for (size_t i = 0; i < sizeof files / sizeof files[0]; i++)
        check_installed(files[i]);

    /* DESTDIR stages the same tree elsewhere while slowscan.pc keeps naming PREFIX. */
    char stage[512], pc[1200];
    snprintf(stage, sizeof stage, "%s", check_tmp_path("stage"));
    snprintf(cmd, sizeof cmd, FRESH_MAKE " install PREFIX=/opt/slowscan DESTDIR='%s' >/dev/null",
             stage);
    free(run(cmd, &rc));
    snprintf(pc, sizeof pc, "%s/opt/slowscan/lib/pkgconfig/slowscan.pc", stage);
    char *text = check_read_file(pc);
    CHECK(rc == 0 && text && strstr(text, "prefix=/opt/slowscan\n"),
          "make install DESTDIR= stages under DESTDIR, slowscan.pc names PREFIX");
    free(text);
}

/* `PKG_CONFIG_PATH=prefix/lib/pkgconfig pkg-config ARGS slowscan` into out[size]. */
static int pkg_config(const char *args, char *out, size_t size)
{
    char cmd[1200];
    int rc;
    snprintf(cmd, sizeof cmd, "PKG_CONFIG_PATH='%s/lib/pkgconfig' pkg-config %s slowscan", prefix,
             args);
    char *text = run(cmd, &rc);
    text[strcspn(text, "\n")] = 0;
    snprintf(out, size, "%s", text);
    free(text);
    return rc;
}

/* Builds tests/consumer/NAME.c with the installed library's pkg-config flags (plus extra)
 * into the scratch directory; returns the program's path or NULL. With `archive`, links
 * libslowscan.a instead, with the flags of `pkg-config --static`. */
static const char *build_consumer(const char *name, const char *extra, const char *out_name,
                                  int archive)
{
    static char program[512];
    char flags[1024], cmd[3000];
    if (pkg_config(archive ? "--cflags --static --libs" : "--cflags --libs", flags,
                   sizeof flags) != 0)
        return NULL;
    char *lib = strstr(flags, "-lslowscan ");
    if (archive && lib) { /* -l:FILE: GNU ld's search for that exact file */
        memmove(lib + 16, lib + 10, strlen(lib + 10) + 1);
        memcpy(lib, "-l:libslowscan.a", 16);
    }
    snprintf(program, sizeof program, "%s", check_tmp_path(out_name));
    snprintf(cmd, sizeof cmd,
             "${CC:-cc} -std=c11 -Wall -Wextra -Werror -o '%s' tests/consumer/%s.c %s %s "
             "-Wl,-rpath,'%s/lib'", program, name, extra, flags, prefix);
    int rc;
    free(run(cmd, &rc));
    CHECK(rc == 0, "tests/consumer/%s.c builds with pkg-config's flags (%s)", name, flags);
    return rc == 0 ? program : NULL;
}

static void check_pkg_config(void)
{
    char version[256], flags[1024];
    CHECK(pkg_config("--modversion", version, sizeof version) == 0 &&
              !strcmp(version, SLOWSCAN_VERSION_STRING),
          "pkg-config --modversion slowscan: '%s', version.h says %s", version,
          SLOWSCAN_VERSION_STRING);
    pkg_config("--libs", flags, sizeof flags);
    CHECK(strstr(flags, "-lslowscan") && !strstr(flags, "plplot"),
          "pkg-config --libs slowscan: '%s' (-lslowscan, nothing of PLplot)", flags);
    pkg_config("--static --libs", flags, sizeof flags);
    CHECK(strstr(flags, "-lgsl") && strstr(flags, "-lfftw3") && strstr(flags, "-lcsv"),
          "pkg-config --static --libs slowscan: '%s' (the private dependencies)", flags);
    char cmd[600], *out;
    snprintf(cmd, sizeof cmd, "%s --version", check_binary());
    out = run(cmd, NULL);
    CHECK(!strcmp(out, "slowscan " SLOWSCAN_VERSION_STRING "\n"),
          "slowscan --version prints the version of version.h: '%s'", out);
    free(out);
}

/* Field `column` (0-based) of the second line of a CSV text. */
static double csv_field(const char *text, int column)
{
    const char *p = strchr(text, '\n');
    for (int c = 0; p && c < column; c++)
        p = strchr(p + 1, ',');
    return p ? strtod(p + 1, NULL) : NAN;
}

static void check_screen_one(void)
{
    const char *program = build_consumer("screen_one", "", "screen_one", 0);
    if (!program)
        return;
    char cmd[1200];
    int rc;
    snprintf(cmd, sizeof cmd, "'%s' %s", program, NILE_CSV);
    char *mine = run(cmd, &rc);
    snprintf(cmd, sizeof cmd, "%s screen --surrogates 0 --indicators lag1 %s", check_binary(),
             NILE_CSV);
    char *cli = run(cmd, NULL);
    /* The summary's 7th column is the statistic (DESIGN §4); both print %.12g. Same library,
     * same defaults: the two must agree to the printed digits. */
    double tau = strtod(mine, NULL), want = csv_field(cli, 6);
    CHECK(rc == 0 && isfinite(tau), "screen_one on the Nile series runs (%s)", mine);
    CHECK_CLOSE(tau, want, 1e-11, 1e-12, "lag1 tau of the Nile: public API vs slowscan screen");
    free(mine);
    free(cli);
}

static void check_gsl_errors(void)
{
    for (int archive = 0; archive <= 1; archive++) {
        const char *program = build_consumer("gsl_errors", "", "gsl_errors", archive);
        int rc;
        char *out = program ? run(program, &rc) : NULL;
        CHECK(out && rc == 0 && strstr(out, "alloc(2^50): NULL") && strstr(out, "no variation"),
              "GSL errors inside %s come back as statuses, no abort (exit %d): %s",
              archive ? "libslowscan.a" : "libslowscan.so", program ? rc : -1, out ? out : "");
        free(out);
    }
    /* Control: with GSL's default handler put back, the same calls abort — so the program
     * above did reach GSL's error handler. */
    char gsl_libs[300];
    char *libs = run("pkg-config --libs gsl", NULL);
    libs[strcspn(libs, "\n")] = 0;
    snprintf(gsl_libs, sizeof gsl_libs, "-DDEFAULT_HANDLER %s", libs);
    free(libs);
    const char *program = build_consumer("gsl_errors", gsl_libs, "gsl_errors_default", 0);
    char cmd[600];
    /* The shell waits and prints the status (128 + SIGABRT) itself, so its "Aborted" notice
     * lands in the captured output, not on the terminal. */
    snprintf(cmd, sizeof cmd, "'%s' 2>&1; echo \"exit $?\"", program ? program : "false");
    char *out = run(cmd, NULL);
    /* GSL's default handler prints this line before abort() (gsl's err/error.c). */
    CHECK(program && strstr(out, "exit 134") && strstr(out, "Default GSL error handler invoked"),
          "with GSL's default handler the same call aborts: %s", out);
    free(out);
}


/* Lines of a command's output. */
static size_t count_lines(const char *text)
{
    size_t n = 0;
    for (; *text; text++)
        n += *text == '\n';
    return n;
}

/* (b) The dynamic symbols of the installed libslowscan.so are exactly the functions declared
 * (extern, not static inline) in the public core headers, as the compiler itself lists them
 * (gcc -aux-info over the umbrella header): nothing internal leaks, nothing public is hidden
 * (a declaration without SLOWSCAN_API would be missing from the library). */
static void check_exports(void)
{
    char exported[512], declared[512], aux[512], cmd[3000];
    snprintf(exported, sizeof exported, "%s", check_tmp_path("exported.txt"));
    snprintf(declared, sizeof declared, "%s", check_tmp_path("declared.txt"));
    snprintf(aux, sizeof aux, "%s", check_tmp_path("aux.txt"));
    snprintf(cmd, sizeof cmd, "nm -D --defined-only '%s/lib/libslowscan.so' | awk 'NF == 3 "
             "{ print $3 }' | sort -u > '%s'", prefix, exported);
    int rc1, rc2;
    free(run(cmd, &rc1));
    snprintf(cmd, sizeof cmd, "${CC:-cc} -fsyntax-only -aux-info '%s' -I'%s/include' -x c "
             "'%s/include/slowscan.h' && grep '/include/slowscan/[a-z0-9_]*\\.h:.*\\*/ extern' "
             "'%s' | sed 's/^.*[ *]\\([A-Za-z_][A-Za-z0-9_]*\\) (.*$/\\1/' | sort -u > '%s'",
             aux, prefix, prefix, aux, declared);
    free(run(cmd, &rc2));
    snprintf(cmd, sizeof cmd, "comm -3 '%s' '%s'", exported, declared);
    char *diff = run(cmd, NULL);
    snprintf(cmd, sizeof cmd, "cat '%s'", exported);
    char *names = run(cmd, NULL);
    size_t count = count_lines(names);
    fprintf(stderr, "    libslowscan.so exports %zu functions\n", count);
    CHECK(rc1 == 0 && rc2 == 0 && count > 50 && !*diff,
          "exports of libslowscan.so = functions declared in include/slowscan.h's headers "
          "(%zu exported; differences, exported-only left, declared-only right:\n%s)", count,
          diff);
    free(diff);
    free(names);
    /* Every name either library exports carries the project prefix, so a caller's own
     * detrend_apply or report_batch can never collide with ours. */
    snprintf(cmd, sizeof cmd, "nm -D --defined-only '%s/lib/libslowscan.so' "
             "'%s/lib/libslowscan-report.so' | awk 'NF == 3 { print $3 }' | "
             "grep -v '^slowscan_' | sort -u", prefix, prefix);
    char *unprefixed = run(cmd, NULL);
    CHECK(!*unprefixed, "every exported name starts with slowscan_; these do not:\n%s",
          unprefixed);
    free(unprefixed);
}

/* (d) Layering: the libraries are the job, cli/ only translates, so no library source or
 * public header may include anything under cli/ — directly, by a relative path, or through
 * another header. The compiler's own dependency list (-MM) is what is checked, so an include
 * that resolves into cli/ by any route is caught; the sources come from the Makefile. */
static void check_no_cli_includes(void)
{
    char cmd[1200];
    snprintf(cmd, sizeof cmd,
             "for f in $(${MAKE:-make} -s --no-print-directory lib-sources); do "
             "${CC:-cc} -std=c11 -D_POSIX_C_SOURCE=200809L -MM -Iinclude "
             "$(pkg-config --cflags gsl fftw3 netcdf plplot 2>/dev/null) \"$f\" "
             "|| echo \"unreadable: $f\"; done");
    int rc;
    char *deps = run(cmd, &rc);
    size_t sources = 0;
    for (const char *c = deps; (c = strstr(c, ".o:")); c++)
        sources++;
    const char *cli = strstr(deps, "cli/");
    const char *bad = strstr(deps, "unreadable");
    CHECK(rc == 0 && sources > 50 && !cli && !bad,
          "no library source or public header includes a cli/ header (%zu checked; %s)", sources,
          cli ? cli : bad ? bad : "ok");
    free(deps);
}

/* (c) The core library does not need PLplot; the report library does. */
static void check_dependencies(void)
{
    char cmd[1200];
    snprintf(cmd, sizeof cmd, "readelf -d '%s/lib/libslowscan.so' | grep NEEDED", prefix);
    char *core = run(cmd, NULL);
    snprintf(cmd, sizeof cmd, "readelf -d '%s/lib/libslowscan-report.so' | grep NEEDED", prefix);
    char *report = run(cmd, NULL);
    CHECK(strstr(core, "libgsl") && !strstr(core, "plplot"),
          "libslowscan.so needs GSL and no PLplot:\n%s", core);
    CHECK(strstr(report, "plplot") && strstr(report, "libslowscan.so." SOMAJOR),
          "libslowscan-report.so needs PLplot and libslowscan.so." SOMAJOR ":\n%s", report);
    free(core);
    free(report);
}

/* The umbrella header names every public core header (all of include/slowscan/ but the
 * report library's report.h and demo.h). */
static void check_umbrella(void)
{
    char *umbrella = check_read_file("include/slowscan.h");
    DIR *dir = opendir("include/slowscan");
    CHECK(umbrella && dir, "include/slowscan.h and include/slowscan/ readable");
    for (struct dirent *e; umbrella && dir && (e = readdir(dir));) {
        const char *name = e->d_name;
        size_t len = strlen(name);
        if (len < 3 || strcmp(name + len - 2, ".h") || !strcmp(name, "report.h") ||
            !strcmp(name, "demo.h") || !strcmp(name, "export.h"))
            continue;
        char line[300];
        snprintf(line, sizeof line, "#include \"slowscan/%s\"", name);
        CHECK(strstr(umbrella, line) != NULL, "include/slowscan.h includes slowscan/%s", name);
    }
    if (dir)
        closedir(dir);
    free(umbrella);
}

void suite_library(void)
{
    /* It installs and links the plain build's libraries; the sanitized run would repeat the
     * same checks on the same files. */
    const char *label = getenv("SLOWSCAN_LABEL");
    if (label && strcmp(label, "sanitized") == 0) {
        fprintf(stderr, "library: skipped in the sanitized build (runs in the plain one)\n");
        return;
    }
    check_umbrella();
    install_into_prefix();
    check_pkg_config();
    check_screen_one();
    check_gsl_errors();
    check_exports();
    check_dependencies();
    check_no_cli_includes();
}
