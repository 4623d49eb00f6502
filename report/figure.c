/* The figure module: formats, page layout, one PLplot stream per figure on a cairo driver,
 * the palette, and the batch of figures committed together. */
#include "report_internal.h"
#include "slowscan/status.h"

#include <errno.h>
#include <plplot.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

static const struct {
    const char *name, *device;
} formats[] = {{"png", "pngcairo"}, {"svg", "svgcairo"}, {"pdf", "pdfcairo"}};

int slowscan_report_format_parse(const char *name, report_format *format)
{
    for (size_t k = 0; k < sizeof formats / sizeof formats[0]; k++)
        if (strcmp(name, formats[k].name) == 0) {
            *format = (report_format)k;
            return SLOWSCAN_OK;
        }
    return SLOWSCAN_EINVAL;
}

const char *slowscan_report_format_extension(report_format format)
{
    return formats[format].name;
}

/* ---- layout ------------------------------------------------------------------------------ */

/* Room around each cell, in page units: a title line above, axis numbers and a label below,
 * numbers and a label on the left. */
enum { CELL_LEFT = 78, CELL_RIGHT = 22, CELL_TOP = 24, CELL_BOTTOM = 46 };

int slowscan_report_page_height(const report_layout *layout)
{
    return REPORT_PAGE_TOP + (int)layout->rows * layout->row_height + REPORT_PAGE_BOTTOM;
}

report_box slowscan_report_cell(const report_layout *layout, size_t row, size_t col)
{
    double height = slowscan_report_page_height(layout);
    double usable = REPORT_PAGE_WIDTH - layout->right_margin;
    double cell_width = usable / (double)(layout->cols[row] ? layout->cols[row] : 1);
    double top = REPORT_PAGE_TOP + (double)row * layout->row_height; /* from the page top */
    report_box box;
    box.x0 = ((double)col * cell_width + CELL_LEFT) / REPORT_PAGE_WIDTH;
    box.x1 = ((double)(col + 1) * cell_width - CELL_RIGHT) / REPORT_PAGE_WIDTH;
    box.y1 = 1.0 - (top + CELL_TOP) / height;
    box.y0 = 1.0 - (top + layout->row_height - CELL_BOTTOM) / height;
    return box;
}

void slowscan_report_layout_grid(report_layout *layout, size_t panels, size_t max_cols, int row_height)
{
    size_t n = panels ? panels : 1, cols = n < max_cols ? n : max_cols;
    layout->rows = (n + cols - 1) / cols;
    for (size_t r = 0; r < layout->rows; r++)
        layout->cols[r] = cols;
    layout->row_height = row_height;
}

/* ---- the stream --------------------------------------------------------------------------- */

struct report_figure {
    report_layout layout;
};

const report_layout *slowscan_report_figure_layout(const report_figure *figure)
{
    return &figure->layout;
}

/* Our own restrained palette (see report_internal.h). */
static void set_palette(void)
{
    static const unsigned char rgb[INK_COUNT][3] = {
        {255, 255, 255}, {38, 38, 44},   {205, 205, 205}, {31, 86, 150},
        {222, 125, 20},  {82, 106, 156}, {0, 122, 122},   {204, 72, 32},
        {206, 220, 238}, {246, 243, 232}, {128, 152, 190}, {170, 170, 170}};
    plscmap0n(INK_COUNT);
    for (int k = 0; k < INK_COUNT; k++)
        plscol0(k, rgb[k][0], rgb[k][1], rgb[k][2]);
    /* Colour map 1 for heat maps: blue through near-white to brown-orange, so that the sign
     * of tau reads without relying on red against green. */
    PLFLT pos[3] = {0.0, 0.5, 1.0};
    PLFLT r[3] = {31 / 255.0, 247 / 255.0, 179 / 255.0};
    PLFLT g[3] = {86 / 255.0, 246 / 255.0, 88 / 255.0};
    PLFLT b[3] = {150 / 255.0, 242 / 255.0, 6 / 255.0};
    plscmap1n(256);
    plscmap1l(1, 3, pos, r, g, b, NULL);
}

/* PLplot ends the process on a fatal error (it has no other way to report one); the handler
 * removes the temporary files of every figure of the batch not yet in place, the one being
 * drawn among them (the command's exit handler removes those of its tables). PLplot's
 * callback takes no context, hence the one static: the batch being drawn into. */
static report_batch *drawing_batch;

static void remove_uncommitted(report_batch *b);

static int on_plplot_exit(PLCHAR_VECTOR message)
{
    (void)message;
    if (drawing_batch)
        remove_uncommitted(drawing_batch);
    return 2; /* internal failure */
}

static void open_stream(const report_layout *layout, report_format format, const char *path)
{
    PLINT stream;
    plmkstrm(&stream);
    plsexit(on_plplot_exit);
    plsdev(formats[format].device);
    plsfnam(path);
    /* 90 dots per inch: the cairo drivers size text from it, so fonts are the same size in
     * every format relative to the page. */
    plspage(90, 90, REPORT_PAGE_WIDTH, slowscan_report_page_height(layout), 0, 0);
    set_palette();
    plinit();
    plfontld(0);
    plsfci(0x80000000); /* sans-serif, upright, medium */
    plschr(0, REPORT_TEXT_SCALE);
    plsmaj(0, 0.7);
    plsmin(0, 0.5);
    plsyax(6, 0); /* plain numbers on y, no separate "x10^k" that would hit the title */
    plsxax(7, 0); /* and on the time axis (days since 1850 still fit) */
    pladv(0);
}

/* ---- the batch --------------------------------------------------------------------------- */

typedef struct {
    char *final, *temp;
} batch_entry;

struct report_batch {
    char *dir;
    report_format format;
    int made_dir;
    batch_entry *entries;
    size_t count, cap, committed;
};

static int fail(io_error *err, int status, const char *fmt, const char *a, const char *b)
{
    snprintf(err->message, sizeof err->message, fmt, a, b);
    return status;
}

/* A probe file: the only test of writability that also holds for root and read-only mounts. */
static int probe_dir(const char *dir, io_error *err)
{
    size_t len = strlen(dir) + sizeof "/.slowscan-probe.XXXXXX";
    char *probe = malloc(len);
    if (!probe)
        return fail(err, SLOWSCAN_ENOMEM, "%s%s", "out of memory", "");
    snprintf(probe, len, "%s/.slowscan-probe.XXXXXX", dir);
    int fd = mkstemp(probe);
    int e = errno;
    if (fd >= 0) {
        close(fd);
        unlink(probe);
    }
    free(probe);
    if (fd < 0)
        return fail(err, SLOWSCAN_EIO, "cannot write figures into %s: %s", dir, strerror(e));
    return SLOWSCAN_OK;
}

int slowscan_report_batch_open(report_batch **out, const char *dir, report_format format, io_error *err)
{
    *out = NULL;
    struct stat st;
    int made = 0;
    if (stat(dir, &st) != 0) {
        if (mkdir(dir, 0777) != 0)
            return fail(err, SLOWSCAN_EIO, "cannot create directory %s: %s", dir, strerror(errno));
        made = 1;
    } else if (!S_ISDIR(st.st_mode)) {
        return fail(err, SLOWSCAN_EIO, "%s exists and is not a directory%s", dir, "");
    }
    int st_probe = probe_dir(dir, err);
    report_batch *b = calloc(1, sizeof *b);
    if (st_probe != SLOWSCAN_OK || !b || !(b->dir = strdup(dir))) {
        if (made)
            rmdir(dir);
        free(b);
        return st_probe != SLOWSCAN_OK ? st_probe : fail(err, SLOWSCAN_ENOMEM, "%s%s", "out of memory", "");
    }
    b->format = format;
    b->made_dir = made;
    *out = b;
    return SLOWSCAN_OK;
}

void slowscan_report_safe_name(const char *name, char *out, size_t size)
{
    size_t k = 0;
    for (const char *c = name; *c && k + 1 < size; c++) {
        int keep = (*c >= 'a' && *c <= 'z') || (*c >= 'A' && *c <= 'Z') || (*c >= '0' && *c <= '9') ||
                   *c == '-' || *c == '_' || (*c == '.' && k > 0);
        out[k++] = keep ? *c : '_';
    }
    out[k] = '\0';
    if (k == 0)
        snprintf(out, size, "series");
}

static int name_taken(const report_batch *b, const char *path)
{
    for (size_t i = 0; i < b->count; i++)
        if (strcmp(b->entries[i].final, path) == 0)
            return 1;
    return 0;
}

/* DIR/PREFIX-SAFE.EXT, or DIR/PREFIX-SAFE-2.EXT, -3, ... when two names meet. */
static char *unique_path(const report_batch *b, const char *prefix, const char *name)
{
    char safe[128];
    slowscan_report_safe_name(name, safe, sizeof safe);
    size_t len = strlen(b->dir) + strlen(prefix) + strlen(safe) + 40;
    char *path = malloc(len);
    for (unsigned k = 1; path; k++) {
        char suffix[16] = "";
        if (k > 1)
            snprintf(suffix, sizeof suffix, "-%u", k);
        snprintf(path, len, "%s/%s%s%s%s.%s", b->dir, prefix, *prefix ? "-" : "", safe, suffix,
                 slowscan_report_format_extension(b->format));
        if (!name_taken(b, path))
            break;
    }
    return path;
}

static int add_entry(report_batch *b, char *final, char *temp)
{
    void *entries = b->entries;
    int st = slowscan_io_reserve(&entries, &b->cap, b->count, sizeof *b->entries, 16);
    b->entries = entries;
    if (st != SLOWSCAN_OK)
        return st;
    b->entries[b->count++] = (batch_entry){final, temp};
    return SLOWSCAN_OK;
}

int slowscan_report_batch_draw(report_batch *b, const report_figure_type *type, const void *data,
                      const char *prefix, const char *name, io_error *err)
{
    char *final = unique_path(b, prefix, name);
    struct stat there;
    if (final && lstat(final, &there) == 0 && !S_ISREG(there.st_mode)) {
        /* Renaming over a directory, a link or a device would fail (or replace it) only at
         * the commit, after other outputs are in place: refuse while nothing is. */
        int st = fail(err, SLOWSCAN_EIO, "cannot write figure %s: %s", final,
                      "it exists and is not a regular file");
        free(final);
        return st;
    }
    char *temp = final ? slowscan_atomic_temp_beside(final) : NULL;
    if (!temp || add_entry(b, final, temp) != SLOWSCAN_OK) {
        int e = errno;
        if (temp)
            unlink(temp);
        int st = fail(err, SLOWSCAN_EIO, "cannot write figure %s: %s", final ? final : name,
                      final && temp ? "out of memory" : strerror(e));
        free(final);
        free(temp);
        return st;
    }
    report_figure fig;
    memset(&fig, 0, sizeof fig);
    type->layout(data, &fig.layout);
    drawing_batch = b;
    open_stream(&fig.layout, b->format, temp);
    int st = type->draw(&fig, data);
    plend1();
    drawing_batch = NULL;
    struct stat s;
    if (st == SLOWSCAN_OK && (stat(temp, &s) != 0 || s.st_size == 0))
        st = SLOWSCAN_EIO; /* the driver could not write (a full disk) */
    if (st != SLOWSCAN_OK)
        return fail(err, st, "cannot draw figure %s: %s", final,
                    st == SLOWSCAN_EIO ? "the file was not written" : slowscan_strerror(st));
    return SLOWSCAN_OK;
}

int slowscan_report_batch_commit(report_batch *b, io_error *err)
{
    for (; b->committed < b->count; b->committed++) {
        batch_entry *e = &b->entries[b->committed];
        if (rename(e->temp, e->final) != 0)
            return fail(err, SLOWSCAN_EIO, "cannot write figure %s: %s", e->final, strerror(errno));
        free(e->temp);
        e->temp = NULL;
    }
    return SLOWSCAN_OK;
}

static void remove_uncommitted(report_batch *b)
{
    for (size_t i = 0; i < b->count; i++)
        if (b->entries[i].temp)
            unlink(b->entries[i].temp);
}

void slowscan_report_batch_free(report_batch *b)
{
    if (!b)
        return;
    remove_uncommitted(b);
    for (size_t i = 0; i < b->count; i++) {
        free(b->entries[i].temp);
        free(b->entries[i].final);
    }
    if (b->made_dir && b->committed == 0)
        rmdir(b->dir); /* only succeeds when nothing else was put there */
    free(b->entries);
    free(b->dir);
    free(b);
}

size_t slowscan_report_batch_count(const report_batch *b)
{
    return b ? b->count : 0;
}

const char *slowscan_report_batch_path(const report_batch *b, size_t i)
{
    return i < b->count ? b->entries[i].final : NULL;
}
