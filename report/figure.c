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

static int row_height(const report_layout *layout, size_t row)
{
    return layout->heights[row] > 0 ? layout->heights[row] : layout->row_height;
}

/* Page units from the page top to the top of `row`. */
static int row_top(const report_layout *layout, size_t row)
{
    int top = REPORT_PAGE_TOP;
    for (size_t r = 0; r < row && r < layout->rows; r++)
        top += row_height(layout, r);
    return top;
}

int slowscan_report_page_height(const report_layout *layout)
{
    return row_top(layout, layout->rows) + REPORT_PAGE_BOTTOM;
}

report_box slowscan_report_cell(const report_layout *layout, size_t row, size_t col)
{
    double height = slowscan_report_page_height(layout);
    double usable = REPORT_PAGE_WIDTH - layout->right_margin;
    double cell_width = usable / (double)(layout->cols[row] ? layout->cols[row] : 1);
    double top = row_top(layout, row);
    report_box box;
    box.x0 = ((double)col * cell_width + CELL_LEFT) / REPORT_PAGE_WIDTH;
    box.x1 = ((double)(col + 1) * cell_width - CELL_RIGHT) / REPORT_PAGE_WIDTH;
    box.y1 = 1.0 - (top + CELL_TOP) / height;
    box.y0 = 1.0 - (top + row_height(layout, row) - CELL_BOTTOM) / height;
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

/* A recorded box of the manifest. */
typedef struct {
    report_box_kind kind;
    report_rect_px rect;
    char *what;
} figure_box;

struct report_figure {
    report_layout layout;
    text_meter *meter;
    int recording;
    figure_box *boxes;
    size_t nboxes, cap;
    int failed; /* a box could not be recorded (no memory): the manifest is not written */
};

const report_layout *slowscan_report_figure_layout(const report_figure *figure)
{
    return &figure->layout;
}

text_meter *report_figure_meter(report_figure *fig)
{
    return fig->meter;
}

double report_figure_height(const report_figure *fig)
{
    return slowscan_report_page_height(&fig->layout);
}

report_rect_px report_row_rect(const report_figure *fig, size_t row)
{
    double top = row_top(&fig->layout, row);
    return (report_rect_px){0, REPORT_PAGE_WIDTH, top, top + row_height(&fig->layout, row)};
}

report_rect_px report_cell_rect(const report_figure *fig, size_t row, size_t col)
{
    report_rect_px r = report_row_rect(fig, row);
    size_t cols = fig->layout.cols[row] ? fig->layout.cols[row] : 1;
    double width = (REPORT_PAGE_WIDTH - fig->layout.right_margin) / (double)cols;
    r.x0 = (double)col * width;
    r.x1 = (double)(col + 1) * width;
    return r;
}

void report_record(report_figure *fig, report_box_kind kind, report_rect_px r, const char *what)
{
    if (!fig->recording || fig->failed)
        return;
    void *boxes = fig->boxes;
    char *copy = strdup(what ? what : "");
    if (!copy || slowscan_io_reserve(&boxes, &fig->cap, fig->nboxes, sizeof *fig->boxes, 64) != SLOWSCAN_OK) {
        free(copy);
        fig->failed = 1;
        return;
    }
    fig->boxes = boxes;
    fig->boxes[fig->nboxes++] = (figure_box){kind, r, copy};
}

/* The manifest: the page, then one line per box (kind, x0 y0 x1 y1 in page units from the
 * top left, what it is), tab-separated; tabs and newlines in text become spaces. */
static int write_manifest(const report_figure *fig, const char *path)
{
    FILE *f = fopen(path, "w");
    if (!f)
        return SLOWSCAN_EIO;
    fprintf(f, "page\t0\t0\t%d\t%d\t\n", REPORT_PAGE_WIDTH, slowscan_report_page_height(&fig->layout));
    for (size_t i = 0; i < fig->nboxes; i++) {
        const figure_box *b = &fig->boxes[i];
        for (char *c = b->what; *c; c++)
            *c = *c == '\t' || *c == '\n' ? ' ' : *c;
        fprintf(f, "%s\t%.1f\t%.1f\t%.1f\t%.1f\t%s\n", b->kind == REPORT_BOX_TEXT ? "text" : "panel",
                b->rect.x0, b->rect.y0, b->rect.x1, b->rect.y1, b->what);
    }
    return fclose(f) == 0 ? SLOWSCAN_OK : SLOWSCAN_EIO;
}

static void figure_release(report_figure *fig)
{
    for (size_t i = 0; i < fig->nboxes; i++)
        free(fig->boxes[i].what);
    free(fig->boxes);
}

/* Our own restrained palette (see report_internal.h). */
static void set_palette(void)
{
    static const unsigned char rgb[INK_COUNT][3] = {
        {255, 255, 255}, {34, 34, 40},   {214, 214, 214}, {44, 62, 120},  {214, 150, 40},
        {186, 30, 74},   {214, 226, 242}, {250, 238, 196}, {120, 140, 178}, {170, 170, 170},
        {112, 112, 112}, {236, 230, 246},
        /* the traces: hues far apart first, so that few indicators get the clearest pair */
        {0, 128, 110},   {140, 70, 170},  {200, 100, 0},  {40, 120, 200}, {150, 120, 0},
        {200, 60, 140},  {70, 140, 40},   {110, 80, 40},  {0, 150, 170},  {170, 60, 40},
        {90, 90, 180}};
    plscmap0n(INK_COUNT);
    for (int k = 0; k < INK_COUNT; k++)
        plscol0(k, rgb[k][0], rgb[k][1], rgb[k][2]);
    /* Colour map 1: a sequential ramp for ordered choices (the robustness figure's
     * bandwidths), pale sea-green through steel blue to deep violet; every shade stays
     * clearly chromatic and the ends differ in lightness as well as hue. */
    PLFLT pos[3] = {0.0, 0.5, 1.0};
    PLFLT r[3] = {110 / 255.0, 50 / 255.0, 70 / 255.0};
    PLFLT g[3] = {196 / 255.0, 120 / 255.0, 28 / 255.0};
    PLFLT b[3] = {160 / 255.0, 180 / 255.0, 110 / 255.0};
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
    plspage(REPORT_DPI, REPORT_DPI, REPORT_PAGE_WIDTH, slowscan_report_page_height(layout), 0, 0);
    set_palette();
    plinit();
    plfontld(0);
    plsfci(0x80000000); /* sans-serif, upright, medium */
    report_set_size(REPORT_SIZE_BODY);
    pladv(0);
}

/* ---- the batch --------------------------------------------------------------------------- */

typedef struct {
    char *final, *temp;
    char *boxes_final, *boxes_temp; /* the manifest beside it, when recorded */
} batch_entry;

struct report_batch {
    char *dir;
    report_format format;
    int made_dir;
    int record_boxes;
    text_meter *meter; /* text extents, kept across the figures of the batch */
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
    b->entries[b->count++] = (batch_entry){final, temp, NULL, NULL};
    return SLOWSCAN_OK;
}

/* The manifest of a drawn figure, into a temporary file beside FIGURE.EXT.boxes. */
static int keep_manifest(batch_entry *e, const report_figure *fig)
{
    size_t len = strlen(e->final) + sizeof ".boxes";
    if (!(e->boxes_final = malloc(len)))
        return SLOWSCAN_ENOMEM;
    snprintf(e->boxes_final, len, "%s.boxes", e->final);
    if (!(e->boxes_temp = slowscan_atomic_temp_beside(e->boxes_final)))
        return SLOWSCAN_EIO;
    return write_manifest(fig, e->boxes_temp);
}

void slowscan_report_batch_record_boxes(report_batch *b, int on)
{
    b->record_boxes = on != 0;
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
        if (temp) {
            unlink(temp);
            slowscan_atomic_temp_done(temp);
        }
        int st = fail(err, SLOWSCAN_EIO, "cannot write figure %s: %s", final ? final : name,
                      final && temp ? "out of memory" : strerror(e));
        free(final);
        free(temp);
        return st;
    }
    if (!b->meter && !(b->meter = report_meter_alloc()))
        return fail(err, SLOWSCAN_ENOMEM, "cannot draw figure %s: %s", final, "out of memory");
    report_figure fig;
    memset(&fig, 0, sizeof fig);
    fig.meter = b->meter;
    fig.recording = b->record_boxes;
    type->layout(data, &fig.layout);
    drawing_batch = b;
    open_stream(&fig.layout, b->format, temp);
    int st = type->draw(&fig, data);
    plend1();
    drawing_batch = NULL;
    struct stat s;
    if (st == SLOWSCAN_OK && (stat(temp, &s) != 0 || s.st_size == 0))
        st = SLOWSCAN_EIO; /* the driver could not write (a full disk) */
    if (st == SLOWSCAN_OK && b->record_boxes)
        st = fig.failed ? SLOWSCAN_ENOMEM : keep_manifest(&b->entries[b->count - 1], &fig);
    figure_release(&fig);
    if (st != SLOWSCAN_OK)
        return fail(err, st, "cannot draw figure %s: %s", final,
                    st == SLOWSCAN_EIO ? "the file was not written" : slowscan_strerror(st));
    return SLOWSCAN_OK;
}

int slowscan_report_batch_commit(report_batch *b, io_error *err)
{
    for (; b->committed < b->count; b->committed++) {
        batch_entry *e = &b->entries[b->committed];
        if (rename(e->temp, e->final) != 0 ||
            (e->boxes_temp && rename(e->boxes_temp, e->boxes_final) != 0))
            return fail(err, SLOWSCAN_EIO, "cannot write figure %s: %s", e->final, strerror(errno));
        slowscan_atomic_temp_done(e->temp);
        slowscan_atomic_temp_done(e->boxes_temp);
        free(e->temp);
        free(e->boxes_temp);
        e->temp = e->boxes_temp = NULL;
    }
    return SLOWSCAN_OK;
}

static void remove_uncommitted(report_batch *b)
{
    for (size_t i = 0; i < b->count; i++) {
        if (b->entries[i].temp)
            unlink(b->entries[i].temp);
        if (b->entries[i].boxes_temp)
            unlink(b->entries[i].boxes_temp);
        slowscan_atomic_temp_done(b->entries[i].temp);
        slowscan_atomic_temp_done(b->entries[i].boxes_temp);
    }
}

void slowscan_report_batch_free(report_batch *b)
{
    if (!b)
        return;
    remove_uncommitted(b);
    for (size_t i = 0; i < b->count; i++) {
        free(b->entries[i].temp);
        free(b->entries[i].final);
        free(b->entries[i].boxes_temp);
        free(b->entries[i].boxes_final);
    }
    report_meter_free(b->meter);
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
