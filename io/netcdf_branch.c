/* The CF branch-time attributes of a run (CMIP practice: global attributes
 * branch_time_in_parent in parent_time_units, branch_time_in_child in the file's own time
 * units), as day numbers of the file's calendar, to align a run with its baseline (control). */
#include "netcdf_internal.h"
#include "slowscan/status.h"

#include <netcdf.h>
#include <string.h>

static int number(int ncid, const char *name, double *v)
{
    nc_type type;
    size_t len;
    return nc_inq_att(ncid, NC_GLOBAL, name, &type, &len) == NC_NOERR && type != NC_CHAR &&
           type != NC_STRING && len == 1 && nc_get_att_double(ncid, NC_GLOBAL, name, v) == NC_NOERR;
}

int slowscan_netcdf_branch_days(const netcdf_reader *r, int *found, double *parent_day,
                                double *child_day, io_error *err)
{
    *found = 0;
    double parent, child = 0;
    char parent_units[256], units[256], calendar[64];
    if (!number(r->ncid, "branch_time_in_parent", &parent))
        return SLOWSCAN_OK;
    netcdf_text_attribute(r->ncid, NC_GLOBAL, "parent_time_units", parent_units,
                          sizeof parent_units);
    number(r->ncid, "branch_time_in_child", &child);
    int varid;
    if (nc_inq_varid(r->ncid, r->time_name, &varid) != NC_NOERR)
        return SLOWSCAN_OK;
    netcdf_text_attribute(r->ncid, varid, "units", units, sizeof units);
    netcdf_text_attribute(r->ncid, varid, "calendar", calendar, sizeof calendar);
    calendar_kind kind = CALENDAR_STANDARD;
    if (calendar[0])
        slowscan_calendar_lookup(calendar, &kind);
    time_units pu, cu;
    if (slowscan_time_units_parse(parent_units[0] ? parent_units : units, kind, &pu, NULL) != SLOWSCAN_OK)
        return netcdf_fail(r, err, SLOWSCAN_EINVAL, "parent_time_units = \"%s\" is not \"UNIT "
                           "since DATE\"", parent_units);
    if (slowscan_time_units_parse(units, kind, &cu, NULL) != SLOWSCAN_OK)
        return SLOWSCAN_OK; /* the reader refused these already */
    *parent_day = slowscan_time_units_day_number(&pu, parent);
    *child_day = slowscan_time_units_day_number(&cu, child);
    *found = 1;
    return SLOWSCAN_OK;
}
