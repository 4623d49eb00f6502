/* Suite `hostile`: the hostile-input catalogue of tests/hostile_cases.c run through the
 * binary (issue 18). Each case gets its own directory (in/, out/, tmp/ as $TMPDIR), removed
 * afterwards, so that "nothing left behind" and "input unchanged" are one comparison of
 * every file's bytes before and after the run. Checks are of the command's own contract
 * (DESIGN.md section 4: exit 1, one message naming the culprit, no partial output): common
 * practice, no outside source. */
#define _XOPEN_SOURCE 700 /* nftw */
#include "check.h"
#include "hostile_cases.h"

#include <dirent.h>
#include <ftw.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>

enum { MAX_FILES = 32 };

typedef struct {
    size_t count;
    char name[MAX_FILES][96];
    uint64_t hash[MAX_FILES];
    long size[MAX_FILES];
} snapshot;

/* FNV-1a over the file's bytes (Fowler, Noll, Vo; common practice, no source). */
static uint64_t file_hash(const char *path, long *size)
{
    FILE *fp = fopen(path, "rb");
    uint64_t h = 1469598103934665603ULL;
    *size = 0;
    if (!fp)
        return 0;
    for (int c; (c = getc(fp)) != EOF; (*size)++)
        h = (h ^ (unsigned char)c) * 1099511628211ULL;
    fclose(fp);
    return h;
}

/* Every file of root/in, root/out and root/tmp with its size and hash. */
static void take_snapshot(const char *root, snapshot *s)
{
    static const char *const dirs[] = {"in", "out", "tmp"};
    s->count = 0;
    for (size_t d = 0; d < 3; d++) {
        char dir[700], path[1000];
        snprintf(dir, sizeof dir, "%s/%s", root, dirs[d]);
        DIR *dp = opendir(dir);
        for (struct dirent *e; dp && (e = readdir(dp));) {
            if (e->d_name[0] == '.' && (!e->d_name[1] || !strcmp(e->d_name, "..")))
                continue;
            if (s->count == MAX_FILES)
                break;
            snprintf(s->name[s->count], sizeof s->name[0], "%.3s/%.80s", dirs[d], e->d_name);
            snprintf(path, sizeof path, "%s/%s", dir, e->d_name);
            s->hash[s->count] = file_hash(path, &s->size[s->count]);
            s->count++;
        }
        if (dp)
            closedir(dp);
    }
}

/* "" when equal, else the first difference (a new, missing or changed file). */
static const char *snapshot_change(const snapshot *a, const snapshot *b, char *why, size_t size)
{
    why[0] = '\0';
    for (size_t i = 0; i < b->count && !why[0]; i++) {
        size_t j = 0;
        while (j < a->count && strcmp(a->name[j], b->name[i]) != 0)
            j++;
        if (j == a->count)
            snprintf(why, size, "%s was left behind", b->name[i]);
        else if (a->hash[j] != b->hash[i] || a->size[j] != b->size[i])
            snprintf(why, size, "%s changed", b->name[i]);
    }
    if (!why[0] && a->count != b->count)
        snprintf(why, size, "a file was removed");
    return why;
}

static void make_case_dir(char *root, size_t size, const char *list, size_t k)
{
    char name[64];
    snprintf(name, sizeof name, "hostile-%s-%zu", list, k);
    snprintf(root, size, "%s", check_tmp_path(name));
    static const char *const dirs[] = {"", "/in", "/out", "/tmp"};
    for (size_t d = 0; d < 4; d++) {
        char dir[700];
        snprintf(dir, sizeof dir, "%s%s", root, dirs[d]);
        mkdir(dir, 0755);
    }
}

static int remove_entry(const char *path, const struct stat *st, int flag, struct FTW *ftw)
{
    (void)st, (void)flag, (void)ftw;
    return remove(path);
}

/* In process rather than by rm -rf: every process started costs much under the sanitizers. */
static void remove_case_dir(const char *root)
{
    if (nftw(root, remove_entry, 8, FTW_DEPTH | FTW_PHYS) != 0)
        fprintf(stderr, "hostile: could not remove %s\n", root);
}

/* args with its placeholders replaced by the case's paths. */
static void expand(const char *args, const char *root, const char *in, char *out, size_t size)
{
    size_t used = 0;
    out[0] = '\0';
    for (const char *p = args; *p && used + 1 < size;) {
        static const char *const keys[] = {"{in}", "{good}", "{nc}", "{out}", "{dir}", "{tmp}"};
        char value[800] = "";
        size_t k = 0;
        while (k < 6 && strncmp(p, keys[k], strlen(keys[k])) != 0)
            k++;
        if (k == 6) {
            out[used++] = *p++;
            out[used] = '\0';
            continue;
        }
        if (k == 0)
            snprintf(value, sizeof value, "%s", in);
        else
            snprintf(value, sizeof value, "%s/%s", root,
                     k == 1 ? "in/good.csv" : k == 2 ? "in/good.nc" : k == 3 ? "out/out.csv"
                     : k == 4 ? "out" : "tmp");
        used += (size_t)snprintf(out + used, size - used, "%s", value);
        p += strlen(keys[k]);
    }
}

static size_t count_lines(const char *s)
{
    size_t n = 0;
    for (; s && *s; s++)
        n += *s == '\n';
    return n;
}

static void write_good(const char *root)
{
    char path[800];
    snprintf(path, sizeof path, "%s/in/good.csv", root);
    char text[2048] = "t,a,b\n";
    for (int i = 0; i < 40; i++) {
        size_t len = strlen(text);
        snprintf(text + len, sizeof text - len, "%d,%.3f,%.3f\n", i,
                 (i * 37 % 11) / 3.0 + i / 17.0, (i * 13 % 7) / 2.0 + i / 10.0);
    }
    check_write_file(path, text);
    snprintf(path, sizeof path, "%s/in/good.nc", root);
    hostile_make_grid(path);
}

static void run_refusal(const hostile_refusal *c, size_t k)
{
    char root[600], in[800], args[1400], cmd[4096], why[200];
    make_case_dir(root, sizeof root, "refuse", k);
    write_good(root);
    snprintf(in, sizeof in, "%s/%s", root, c->in_name ? c->in_name : "in/in.csv");
    if (c->text)
        check_write_file(in, c->text);
    else if (c->make)
        c->make(in);
    expand(c->args, root, in, args, sizeof args);
    snapshot before, after;
    take_snapshot(root, &before);
    snprintf(cmd, sizeof cmd, "TMPDIR='%s/tmp' %s %s", root, check_binary(), args);
    char *out = NULL, *err = NULL;
    int rc = check_run(cmd, &out, &err);
    take_snapshot(root, &after);
    CHECK(rc == 1, "refuse '%s': exit %d, want 1 (stderr: %s)", c->name, rc, err ? err : "");
    CHECK(err && count_lines(err) == 1 && strncmp(err, "slowscan: ", 10) == 0,
          "refuse '%s': want one message line, got: %s", c->name, err ? err : "(none)");
    CHECK(err && strstr(err, c->needle), "refuse '%s': message lacks '%s': %s", c->name,
          c->needle, err ? err : "");
    CHECK(!snapshot_change(&before, &after, why, sizeof why)[0], "refuse '%s': %s", c->name, why);
    if (getenv("HOSTILE_VERBOSE")) /* the catalogue with its messages, for review */
        printf("refuse %-45s %s", c->name, err ? err : "(none)\n");
    free(out);
    free(err);
    remove_case_dir(root);
}

/* Runs one side of an acceptance; returns its output file (malloc'd) or NULL, and its
 * peak RSS in KiB by GNU time (0 when /usr/bin/time is missing). */
static char *run_side(const hostile_accept *c, const char *root, int plain, long *rss_kb)
{
    char in[800], stdin_in[820], args[1400], cmd[4096], rss_path[800], why[200] = "";
    snprintf(in, sizeof in, "%s/in/%s.csv", root, plain ? "plain" : "hostile");
    if (c->make_hostile)
        (plain ? c->make_plain : c->make_hostile)(in);
    else {
        hostile_style none = {0};
        hostile_write_table(in, plain ? &none : &c->style);
    }
    snprintf(stdin_in, sizeof stdin_in, "- < %s", in);
    const char *spec = plain && c->plain_args ? c->plain_args : c->args;
    expand(spec, root, !plain && c->stdin_input ? stdin_in : in, args, sizeof args);
    snprintf(rss_path, sizeof rss_path, "%s/rss", root);
    int timed = c->rss_margin_kb > 0 && check_file_exists("/usr/bin/time");
    const char *env = !plain && c->env ? c->env : "";
    snprintf(cmd, sizeof cmd, "TMPDIR='%s/tmp' %s %s%s%s %s %s", root, env,
             timed ? "/usr/bin/time -f %M -o " : "", timed ? rss_path : "", timed ? " " : "",
             check_binary(), args);
    char *err = NULL;
    int rc = check_run(cmd, NULL, &err);
    CHECK(rc == 0, "accept '%s' (%s): exit %d: %s", c->name, plain ? "plain" : "hostile", rc,
          err ? err : "");
    free(err);
    char out_path[800];
    snprintf(out_path, sizeof out_path, "%s/out/out.csv", root);
    char *text = check_read_file(out_path);
    remove(out_path);
    snapshot left;
    take_snapshot(root, &left); /* in/: the two inputs; out/ and tmp/ must be empty */
    for (size_t i = 0; i < left.count; i++)
        if (strncmp(left.name[i], "in/", 3) != 0)
            snprintf(why, sizeof why, "%s", left.name[i]);
    CHECK(left.count <= 3, "accept '%s': a file was left behind (%s)", c->name, why);
    char *rss = timed ? check_read_file(rss_path) : NULL;
    *rss_kb = rss ? atol(rss) : 0;
    free(rss);
    return text;
}

static void run_acceptance(const hostile_accept *c, size_t k)
{
    char root[600];
    make_case_dir(root, sizeof root, "accept", k);
    long rss_plain = 0, rss_hostile = 0;
    char *plain = run_side(c, root, 1, &rss_plain);
    char *hostile = run_side(c, root, 0, &rss_hostile);
    CHECK(plain && count_lines(plain) > 1, "accept '%s': the plain run gave no rows", c->name);
    CHECK(plain && hostile && strcmp(plain, hostile) == 0,
          "accept '%s': output differs from the plain table's", c->name);
    if (c->rss_margin_kb > 0 && rss_plain > 0) {
        CHECK(rss_hostile - rss_plain <= c->rss_margin_kb,
              "accept '%s': peak RSS %ld KiB against %ld for the plain table (margin %ld)",
              c->name, rss_hostile, rss_plain, c->rss_margin_kb);
        printf("hostile: '%s': peak RSS %ld KiB, plain table %ld KiB\n", c->name, rss_hostile,
               rss_plain);
    }
    free(plain);
    free(hostile);
    remove_case_dir(root);
}

void suite_hostile(void)
{
    for (size_t k = 0; k < hostile_nrefusals; k++)
        run_refusal(&hostile_refusals[k], k);
    for (size_t k = 0; k < hostile_naccepts; k++)
        run_acceptance(&hostile_accepts[k], k);
    printf("hostile: %zu inputs refused, %zu accepted as their plain tables\n",
           hostile_nrefusals, hostile_naccepts);
}
