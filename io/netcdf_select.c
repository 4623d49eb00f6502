/* --select for NetCDF input: "lat=-30:30,lon=0:90,lev=850" keeps, per named dimension, the
 * indices whose coordinate values lie in the range (inclusive, given in either order), or
 * the one index at a single value. Dimensions without a coordinate variable are selected by
 * index. The kept indices must be contiguous (coordinates are monotone in CF files). */
#include "netcdf_internal.h"

#include <errno.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

typedef struct {
    char dim[64];
    double lo, hi;
    int single;
    const char *text; /* the item as written, for messages */
} select_item;

static double coordinate(const netcdf_dim *d, size_t i)
{
    return d->coord ? d->coord[i] : (double)i;
}

/* A number of an item; 0 when the whole text is one. */
static int item_number(const char *s, size_t len, double *v)
{
    char buf[64];
    if (len == 0 || len >= sizeof buf)
        return -1;
    memcpy(buf, s, len);
    buf[len] = '\0';
    char *end;
    errno = 0;
    *v = strtod(buf, &end);
    return *end == '\0' && isfinite(*v) ? 0 : -1;
}

static int parse_item(const char *text, size_t len, select_item *item)
{
    const char *eq = memchr(text, '=', len);
    if (!eq || eq == text || (size_t)(eq - text) >= sizeof item->dim)
        return -1;
    memcpy(item->dim, text, (size_t)(eq - text));
    item->dim[eq - text] = '\0';
    const char *value = eq + 1;
    size_t vlen = len - (size_t)(value - text);
    const char *colon = memchr(value, ':', vlen);
    item->single = !colon;
    if (item->single) {
        if (item_number(value, vlen, &item->lo) != 0)
            return -1;
        item->hi = item->lo;
        return 0;
    }
    double a, b;
    if (item_number(value, (size_t)(colon - value), &a) != 0 ||
        item_number(colon + 1, vlen - (size_t)(colon + 1 - value), &b) != 0)
        return -1;
    item->lo = fmin(a, b), item->hi = fmax(a, b);
    return 0;
}

/* The index range of `item` on dimension d; a message for an empty or broken one. */
static int select_range(const netcdf_reader *r, netcdf_dim *d, const select_item *item,
                        io_error *err)
{
    size_t first = d->length, last = 0, best = 0;
    double best_gap = INFINITY;
    for (size_t i = 0; i < d->length; i++) {
        double c = coordinate(d, i), gap = fabs(c - item->lo);
        if (gap < best_gap)
            best_gap = gap, best = i;
        if (!item->single && c >= item->lo && c <= item->hi) {
            first = i < first ? i : first;
            last = i;
        }
    }
    if (item->single) {
        double tol = 1e-6 * fmax(1.0, fabs(item->lo));
        if (!(best_gap <= tol))
            return netcdf_fail(r, err, SLOWSCAN_EINVAL, "option --select %s: %s has no value "
                               "%g (nearest: %g)", item->text, d->name, item->lo,
                               d->length ? coordinate(d, best) : NAN);
        first = last = best;
    } else if (first > last) {
        return netcdf_fail(r, err, SLOWSCAN_EINVAL, "option --select %s: no %s in that range "
                           "(%s runs from %g to %g)", item->text, d->name, d->name,
                           coordinate(d, 0), coordinate(d, d->length - 1));
    }
    for (size_t i = first; i <= last; i++) {
        double c = coordinate(d, i);
        if (!item->single && !(c >= item->lo && c <= item->hi))
            return netcdf_fail(r, err, SLOWSCAN_EINVAL, "option --select %s: the values of %s "
                               "in that range are not contiguous (its coordinate is not "
                               "monotone)", item->text, d->name);
    }
    d->start = first, d->count = last - first + 1;
    return SLOWSCAN_OK;
}

/* Applies one item to every variable that has the dimension. */
static int apply_item(netcdf_reader *r, const select_item *item, io_error *err)
{
    if (strcmp(item->dim, r->time_name) == 0)
        return netcdf_fail(r, err, SLOWSCAN_EINVAL, "option --select %s: the time span is "
                           "chosen with --from and --until", item->text);
    int found = 0;
    for (size_t v = 0; v < r->nvars; v++)
        for (int k = 0; k < r->vars[v].ncoords; k++) {
            netcdf_dim *d = &r->vars[v].dims[k];
            if (strcmp(d->name, item->dim) != 0)
                continue;
            found = 1;
            int st = select_range(r, d, item, err);
            if (st != SLOWSCAN_OK)
                return st;
        }
    if (!found)
        return netcdf_fail(r, err, SLOWSCAN_EINVAL, "option --select %s: no variable read has "
                           "a dimension '%s'", item->text, item->dim);
    return SLOWSCAN_OK;
}

int netcdf_apply_selection(netcdf_reader *r, io_error *err)
{
    int st = SLOWSCAN_OK;
    const char *s = r->options.select;
    while (s && *s && st == SLOWSCAN_OK) {
        const char *comma = strchr(s, ',');
        size_t len = comma ? (size_t)(comma - s) : strlen(s);
        char text[128];
        snprintf(text, sizeof text, "%.*s", (int)(len < 120 ? len : 120), s);
        select_item item = {.text = text};
        if (parse_item(s, len, &item) != 0)
            st = netcdf_fail(r, err, SLOWSCAN_EINVAL, "option --select: \"%s\" is not "
                             "DIM=VALUE or DIM=FROM:TO", text);
        else
            st = apply_item(r, &item, err);
        s = comma ? comma + 1 : NULL;
    }
    r->total_cells = 0;
    for (size_t v = 0; st == SLOWSCAN_OK && v < r->nvars; v++) {
        netcdf_variable *var = &r->vars[v];
        var->ncells = 1;
        for (int k = 0; k < var->ncoords; k++)
            var->ncells *= var->dims[k].count;
        r->total_cells += var->ncells;
    }
    return st;
}
