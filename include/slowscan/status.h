/* slowscan — status codes shared by every module.
 *
 * The numerical core never prints or exits: every function that can fail returns one of these
 * codes and the command-line layer turns it into a message and an exit status. */
#ifndef SLOWSCAN_STATUS_H
#define SLOWSCAN_STATUS_H

enum slowscan_status {
    SLOWSCAN_OK = 0,
    SLOWSCAN_EINVAL,   /* an argument is out of its domain (bandwidth <= 0, degree too high, ...) */
    SLOWSCAN_ENOMEM,   /* an allocation failed */
    SLOWSCAN_ESHORT,   /* too few (finite) samples for the requested computation */
    SLOWSCAN_ECONST,   /* the data carry no variation (constant series, all ties) */
    SLOWSCAN_ENUMERIC, /* a numerical routine failed (singular design, non-convergence) */
    SLOWSCAN_EIO       /* reading or writing failed (io/ only) */
};

static inline const char *slowscan_strerror(int status)
{
    switch (status) {
    case SLOWSCAN_OK: return "success";
    case SLOWSCAN_EINVAL: return "invalid argument";
    case SLOWSCAN_ENOMEM: return "out of memory";
    case SLOWSCAN_ESHORT: return "too few finite samples";
    case SLOWSCAN_ECONST: return "no variation in the data";
    case SLOWSCAN_ENUMERIC: return "numerical failure";
    case SLOWSCAN_EIO: return "input/output failure";
    default: return "unknown status";
    }
}

#endif
