/* Output files that appear whole or not at all: write to a temporary file in the target's
 * directory (so the final rename stays on one file system and is atomic), rename on commit. */
#include "io_internal.h"

#include <errno.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

/* The process umask, read without umask(2): setting it to read it back would briefly change
 * it for every thread. Linux reports it in /proc/self/status; elsewhere assume the usual. */
static mode_t current_umask(void)
{
    unsigned mask = 022;
    FILE *f = fopen("/proc/self/status", "r");
    char line[256];
    while (f && fgets(line, sizeof line, f))
        if (sscanf(line, "Umask: %o", &mask) == 1)
            break;
    if (f)
        fclose(f);
    return (mode_t)mask;
}

/* mkstemp makes the file 0600. Give it what a plain fopen would: the replaced file's
 * permissions, or 0666 under the umask for a new file. */
static void set_mode(int fd, const char *path)
{
    struct stat st;
    mode_t mode = stat(path, &st) == 0 ? (st.st_mode & 0777) : (0666 & ~current_umask());
    if (fchmod(fd, mode) != 0) {
        /* Not fatal: the output is still complete, only its permissions are tighter. */
    }
}

char *slowscan_atomic_temp_beside(const char *path)
{
    size_t len = strlen(path) + sizeof ".tmp.XXXXXX";
    char *template = malloc(len), *temp = NULL;
    if (!template)
        return NULL;
    snprintf(template, len, "%s.tmp.XXXXXX", path);
    int fd = io_temp_make(template, &temp);
    free(template);
    if (fd < 0)
        return NULL;
    set_mode(fd, path);
    close(fd);
    return temp;
}

int slowscan_atomic_open(atomic_file *f, const char *path, io_error *err)
{
    char why[128];
    memset(f, 0, sizeof *f);
    if (!path || strcmp(path, "-") == 0) {
        /* Spooled to an anonymous temporary file and copied out on commit: a run that fails
         * half-way (a bad second input, a band beyond a file's Nyquist frequency) must not
         * leave a header and some rows in a pipe or a redirected file either. */
        if (!(f->fp = tmpfile())) {
            int e = errno;
            return io_fail(err, SLOWSCAN_EIO, "cannot buffer standard output: %s",
                           io_strerror(e, why, sizeof why));
        }
        return SLOWSCAN_OK;
    }
    struct stat st;
    int exists = stat(path, &st) == 0;
    if (exists && S_ISDIR(st.st_mode))
        return io_fail(err, SLOWSCAN_EIO, "cannot write %s: it is a directory", path);
    if (exists && !S_ISREG(st.st_mode)) {
        /* A FIFO or a device (/dev/null, a pipe to another program): renaming a temporary
         * file over it would replace it, so write to it directly; there is no partial file
         * to avoid. */
        if (!(f->fp = fopen(path, "w")) || !(f->path = io_strdup(path))) {
            int e = errno;
            slowscan_atomic_abort(f);
            return io_fail(err, SLOWSCAN_EIO, "cannot write %s: %s", path, io_strerror(e, why, sizeof why));
        }
        return SLOWSCAN_OK;
    }
    size_t len = strlen(path);
    f->path = io_strdup(path);
    char *template = malloc(len + sizeof ".tmp.XXXXXX");
    if (!f->path || !template) {
        free(template);
        slowscan_atomic_abort(f);
        return io_fail(err, SLOWSCAN_ENOMEM, "cannot write %s: out of memory", path);
    }
    snprintf(template, len + sizeof ".tmp.XXXXXX", "%s.tmp.XXXXXX", path);
    int fd = io_temp_make(template, &f->temp_path), e = errno;
    free(template);
    if (fd < 0) { /* nothing was created: there is nothing to remove */
        slowscan_atomic_abort(f);
        return io_fail(err, SLOWSCAN_EIO, "cannot write %s: %s", path, io_strerror(e, why, sizeof why));
    }
    set_mode(fd, path);
    if (!(f->fp = fdopen(fd, "w"))) {
        int e = errno;
        close(fd);
        slowscan_atomic_abort(f);
        return io_fail(err, SLOWSCAN_EIO, "cannot write %s: %s", path, io_strerror(e, why, sizeof why));
    }
    return SLOWSCAN_OK;
}

static int commit_stdout(atomic_file *f, io_error *err)
{
    errno = 0;
    int bad = fflush(f->fp) != 0 || ferror(f->fp);
    if (!bad)
        rewind(f->fp);
    char chunk[1 << 16];
    for (size_t got; !bad && (got = fread(chunk, 1, sizeof chunk, f->fp)) > 0;)
        bad = fwrite(chunk, 1, got, stdout) != got;
    bad = bad || ferror(f->fp) || fflush(stdout) != 0 || ferror(stdout);
    int e = errno;
    fclose(f->fp); /* the spool; standard output stays open: it is not ours to close */
    f->fp = NULL;
    char why[128];
    return bad ? io_fail(err, SLOWSCAN_EIO, "cannot write standard output: %s",
                         e ? io_strerror(e, why, sizeof why) : "a write failed")
               : SLOWSCAN_OK;
}

int slowscan_atomic_commit(atomic_file *f, io_error *err)
{
    if (!f->fp)
        return io_fail(err, SLOWSCAN_EINVAL, "slowscan_atomic_commit: the output file is not open");
    if (!f->path)
        return commit_stdout(f, err);
    /* errno is only meaningful from the call that failed; keep the first one. */
    int e = 0;
    if (fflush(f->fp) != 0)
        e = errno ? errno : EIO;
    else if (ferror(f->fp))
        e = EIO; /* an earlier write failed; its errno is long gone */
    if (fclose(f->fp) != 0 && !e)
        e = errno ? errno : EIO;
    f->fp = NULL;
    if (!e && f->temp_path && rename(f->temp_path, f->path) != 0)
        e = errno;
    if (e) {
        char why[128];
        io_fail(err, SLOWSCAN_EIO, "cannot write %s: %s", f->path, io_strerror(e, why, sizeof why));
        slowscan_atomic_abort(f); /* removes the temporary file */
        return SLOWSCAN_EIO;
    }
    slowscan_atomic_temp_done(f->temp_path);
    free(f->temp_path);
    free(f->path);
    f->temp_path = f->path = NULL;
    return SLOWSCAN_OK;
}

void slowscan_atomic_abort(atomic_file *f)
{
    if (f->fp) /* a file of ours, or the spool of standard output (deleted on close) */
        fclose(f->fp);
    f->fp = NULL;
    if (f->temp_path) {
        unlink(f->temp_path);
        slowscan_atomic_temp_done(f->temp_path);
    }
    free(f->temp_path);
    free(f->path);
    f->temp_path = f->path = NULL;
}

int slowscan_io_reserve(void **array, size_t *cap, size_t count, size_t size, size_t first)
{
    if (count < *cap)
        return SLOWSCAN_OK;
    size_t bigger = *cap ? 2 * *cap : first;
    void *grown = realloc(*array, bigger * size);
    if (!grown)
        return SLOWSCAN_ENOMEM;
    *array = grown;
    *cap = bigger;
    return SLOWSCAN_OK;
}

int slowscan_io_same_file(const char *a, const char *b)
{
    struct stat sa, sb;
    if (!a || !b || strcmp(a, "-") == 0 || strcmp(b, "-") == 0)
        return 0;
    return stat(a, &sa) == 0 && stat(b, &sb) == 0 && sa.st_dev == sb.st_dev && sa.st_ino == sb.st_ino;
}
