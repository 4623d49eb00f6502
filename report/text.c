/* Text with measured extents. PLplot has no public string-length query, so a string is
 * measured the way it will be drawn: rendered once by the same cairo driver (memcairo, same
 * fonts, sizes in millimetres so the page size does not change them) into a small memory
 * page, and its ink found. Results are kept per batch (text_meter), so each distinct string
 * costs one rendering. Every string drawn is recorded as a box on the figure (the manifest
 * the geometry test reads), and layout code asks for boxes before it draws. */
#include "report_internal.h"

#include <math.h>
#include <plplot.h>
#include <stdlib.h>
#include <string.h>

/* The memory page: wide enough for the longest line of a figure, tall enough for the
 * largest size. The anchor sits at ANCHOR_Y rows from the top. */
enum { METER_W = 2000, METER_H = 64, ANCHOR_Y = 32, METER_SLOTS = 4096 };

typedef struct {
    char *text;
    int size;
    double just;
    double u0, u1, d0, d1; /* ink: right of the anchor u, below it d, page units */
} meter_entry;

struct text_meter {
    meter_entry *slots; /* open addressing; text NULL: empty */
    size_t used;
    unsigned char *page;
    double line_top[REPORT_SIZE_COUNT], line_bottom[REPORT_SIZE_COUNT];
};

static const double size_mm[REPORT_SIZE_COUNT] = {3.2, 2.8, 3.9};

void report_set_size(report_size size)
{
    plschr(size_mm[size], 1.0);
}

text_meter *report_meter_alloc(void)
{
    text_meter *m = calloc(1, sizeof *m);
    if (m) {
        m->slots = calloc(METER_SLOTS, sizeof *m->slots);
        m->page = malloc((size_t)METER_W * METER_H * 3);
    }
    if (!m || !m->slots || !m->page) {
        report_meter_free(m);
        return NULL;
    }
    for (int s = 0; s < REPORT_SIZE_COUNT; s++)
        m->line_top[s] = NAN;
    return m;
}

void report_meter_free(text_meter *m)
{
    if (!m)
        return;
    for (size_t i = 0; m->slots && i < METER_SLOTS; i++)
        free(m->slots[i].text);
    free(m->slots);
    free(m->page);
    free(m);
}

/* Renders `text` on a fresh memcairo page and returns its ink relative to the anchor. The
 * driver ends its surface with the page, so each measurement is a stream of its own. */
static void render_ink(text_meter *m, const char *text, int size, double just, double ink[4])
{
    PLINT caller, stream;
    plgstrm(&caller);
    plmkstrm(&stream);
    memset(m->page, 255, (size_t)METER_W * METER_H * 3);
    plsdev("memcairo");
    plsmem(METER_W, METER_H, m->page);
    plspage(REPORT_DPI, REPORT_DPI, METER_W, METER_H, 0, 0);
    plscolbg(255, 255, 255);
    plscol0(1, 0, 0, 0);
    plinit();
    plfontld(0);
    plsfci(0x80000000);
    report_set_size((report_size)size);
    pladv(0);
    plvpor(0, 1, 0, 1);
    plwind(0, METER_W, 0, METER_H);
    plcol0(1);
    double ax = 40 + just * (METER_W - 80);
    plptex(ax, METER_H - ANCHOR_Y, 1.0, 0.0, just, text);
    plend1();
    plsstrm(caller);
    int x0 = METER_W, x1 = -1, y0 = METER_H, y1 = -1;
    for (int y = 0; y < METER_H; y++)
        for (int x = 0; x < METER_W; x++) {
            const unsigned char *p = m->page + 3 * ((size_t)y * METER_W + (size_t)x);
            if (p[0] < 250 || p[1] < 250 || p[2] < 250) {
                x0 = x < x0 ? x : x0;
                x1 = x > x1 ? x : x1;
                y0 = y < y0 ? y : y0;
                y1 = y > y1 ? y : y1;
            }
        }
    if (x1 < 0) { /* blank text: a zero-width box at the anchor */
        ink[0] = ink[1] = 0;
        ink[2] = ink[3] = 0;
        return;
    }
    ink[0] = x0 - ax;
    ink[1] = x1 + 1 - ax;
    ink[2] = y0 - ANCHOR_Y;
    ink[3] = y1 + 1 - ANCHOR_Y;
}

static size_t hash_of(const char *text, int size, double just)
{
    size_t h = 1469598103934665603u ^ (size_t)size ^ (size_t)(just * 1000);
    for (const unsigned char *c = (const unsigned char *)text; *c; c++)
        h = (h ^ *c) * 1099511628211u;
    return h;
}

static const meter_entry *lookup(text_meter *m, const char *text, int size, double just)
{
    static meter_entry scratch; /* a full table measures without keeping */
    size_t i = hash_of(text, size, just) % METER_SLOTS;
    for (size_t probe = 0; probe < METER_SLOTS; probe++, i = (i + 1) % METER_SLOTS) {
        meter_entry *e = &m->slots[i];
        if (e->text && e->size == size && e->just == just && strcmp(e->text, text) == 0)
            return e;
        if (!e->text)
            break;
    }
    meter_entry *e = &m->slots[i];
    if (e->text || m->used * 4 >= METER_SLOTS * 3 || !(e->text = strdup(text)))
        e = &scratch;
    else
        m->used++;
    double ink[4];
    render_ink(m, text, size, just, ink);
    e->size = size;
    e->just = just;
    e->u0 = ink[0];
    e->u1 = ink[1];
    e->d0 = ink[2];
    e->d1 = ink[3];
    return e;
}

/* The line's height: ascender to descender of a reference string, so that boxes of one size
 * share their top and bottom whatever letters they hold. */
static void line_extent(text_meter *m, report_size size, double *top, double *bottom)
{
    if (isnan(m->line_top[size])) {
        const meter_entry *e = lookup(m, "ÅÉbdfhklgjpqy|", size, 0.0);
        m->line_top[size] = e->d0;
        m->line_bottom[size] = e->d1;
    }
    *top = m->line_top[size];
    *bottom = m->line_bottom[size];
}

/* PLplot reads '#' as the start of an escape sequence; "##" is a literal '#'. */
static const char *escaped(const char *text, char *out, size_t size)
{
    size_t k = 0;
    for (const char *c = text; *c && k + 2 < size; c++) {
        if (*c == '#')
            out[k++] = '#';
        out[k++] = *c;
    }
    out[k] = '\0';
    return out;
}

report_rect_px report_text_box(report_figure *fig, const report_textspec *t, double x, double y)
{
    char buf[REPORT_TEXT_MAX];
    text_meter *m = report_figure_meter(fig);
    const meter_entry *e = lookup(m, escaped(t->text, buf, sizeof buf), t->size, t->just);
    double top, bottom;
    line_extent(m, t->size, &top, &bottom);
    top = fmin(top, e->d0) - 1;
    bottom = fmax(bottom, e->d1) + 1;
    report_rect_px r;
    if (t->vertical) { /* reads upwards: the text's "down" is the page's right */
        r = (report_rect_px){x + top, x + bottom, y - e->u1 - 1, y - e->u0 + 1};
    } else {
        r = (report_rect_px){x + e->u0 - 1, x + e->u1 + 1, y + top, y + bottom};
    }
    return r;
}

double report_text_width(report_figure *fig, const char *text, report_size size)
{
    report_textspec t = {text, size, 0.0, 0};
    report_rect_px r = report_text_box(fig, &t, 0, 0);
    return r.x1 - r.x0;
}

double report_line_height(report_figure *fig, report_size size)
{
    report_textspec t = {"x", size, 0.0, 0};
    report_rect_px r = report_text_box(fig, &t, 0, 0);
    return r.y1 - r.y0;
}

report_rect_px report_text_draw(report_figure *fig, const report_textspec *t, double x, double y,
                                int colour)
{
    char buf[REPORT_TEXT_MAX];
    report_rect_px r = report_text_box(fig, t, x, y);
    report_page_view view = report_page_enter(fig);
    double height = view.height;
    report_set_size(t->size);
    plcol0(colour);
    plptex(x, height - y, t->vertical ? 0.0 : 1.0, t->vertical ? 1.0 : 0.0, t->just,
           escaped(t->text, buf, sizeof buf));
    report_set_size(REPORT_SIZE_BODY);
    report_page_leave(&view);
    report_record(fig, REPORT_BOX_TEXT, r, t->text);
    return r;
}

report_rect_px report_say(report_figure *fig, const char *text, report_size size, double just,
                          double x, double top, int colour)
{
    report_textspec t = {text, size, just, 0};
    return report_text_draw(fig, &t, x, report_anchor_below(fig, size, top), colour);
}

double report_anchor_below(report_figure *fig, report_size size, double top)
{
    double line_top, line_bottom;
    line_extent(report_figure_meter(fig), size, &line_top, &line_bottom);
    return top - (line_top - 1);
}

double report_anchor_centred(report_figure *fig, report_size size, double middle)
{
    double line_top, line_bottom;
    line_extent(report_figure_meter(fig), size, &line_top, &line_bottom);
    return middle - 0.5 * (line_top + line_bottom);
}

int report_rects_meet(report_rect_px a, report_rect_px b)
{
    return a.x0 < b.x1 && b.x0 < a.x1 && a.y0 < b.y1 && b.y0 < a.y1;
}
