/* Output files that appear whole or not at all: write to a temporary file in the target's
 * directory (so the final rename stays on one file system and is atomic), rename on commit. */
#include "io_internal.h"

#include <errno.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

int atomic_open(atomic_file *f, const char *path, io_error *err)
{
    memset(f, 0, sizeof *f);
    if (!path || strcmp(path, "-") == 0) {
        f->fp = stdout;
        return SLOWSCAN_OK;
    }
    struct stat st;
    if (stat(path, &st) == 0 && S_ISDIR(st.st_mode))
        return io_fail(err, SLOWSCAN_EIO, "cannot write %s: it is a directory", path);
    size_t len = strlen(path);
    f->path = io_strdup(path);
    f->temp_path = malloc(len + 16);
    if (!f->path || !f->temp_path) {
        atomic_abort(f);
        return io_fail(err, SLOWSCAN_ENOMEM, "out of memory");
    }
    snprintf(f->temp_path, len + 16, "%s.tmp.XXXXXX", path);
    int fd = mkstemp(f->temp_path);
    if (fd < 0) {
        int e = errno;
        free(f->temp_path);
        f->temp_path = NULL;
        atomic_abort(f);
        return io_fail(err, SLOWSCAN_EIO, "cannot write %s: %s", path, strerror(e));
    }
    /* mkstemp makes the file 0600; give it the usual permissions under the umask. */
    mode_t mask = umask(0);
    umask(mask);
    fchmod(fd, 0666 & ~mask);
    if (!(f->fp = fdopen(fd, "w"))) {
        close(fd);
        atomic_abort(f);
        return io_fail(err, SLOWSCAN_EIO, "cannot write %s: %s", path, strerror(errno));
    }
    return SLOWSCAN_OK;
}

int atomic_commit(atomic_file *f, io_error *err)
{
    if (!f->fp)
        return SLOWSCAN_OK;
    if (!f->path) { /* standard output */
        int bad = fflush(f->fp) != 0 || ferror(f->fp);
        f->fp = NULL;
        return bad ? io_fail(err, SLOWSCAN_EIO, "error writing standard output: %s", strerror(errno))
                   : SLOWSCAN_OK;
    }
    int bad = fflush(f->fp) != 0 || ferror(f->fp);
    int e = errno;
    bad = (fclose(f->fp) != 0) || bad;
    f->fp = NULL;
    if (!bad && rename(f->temp_path, f->path) != 0) {
        e = errno;
        bad = 1;
    }
    if (bad) {
        io_fail(err, SLOWSCAN_EIO, "error writing %s: %s", f->path, strerror(e));
        atomic_abort(f);
        return SLOWSCAN_EIO;
    }
    free(f->temp_path);
    free(f->path);
    f->temp_path = f->path = NULL;
    return SLOWSCAN_OK;
}

void atomic_abort(atomic_file *f)
{
    if (f->fp && f->path)
        fclose(f->fp);
    f->fp = NULL;
    if (f->temp_path)
        unlink(f->temp_path);
    free(f->temp_path);
    free(f->path);
    f->temp_path = f->path = NULL;
}

int io_same_file(const char *a, const char *b)
{
    struct stat sa, sb;
    if (!a || !b || strcmp(a, "-") == 0 || strcmp(b, "-") == 0)
        return 0;
    return stat(a, &sa) == 0 && stat(b, &sb) == 0 && sa.st_dev == sb.st_dev && sa.st_ino == sb.st_ino;
}
