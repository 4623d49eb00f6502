/* slowscan — the version of the headers, and of the library actually loaded.
 *
 * This file is the one place the version is written: the Makefile reads VERSION (and the
 * shared library's soname, libslowscan.so.MAJOR) from the string below. Bump all four lines
 * together. */
#ifndef SLOWSCAN_VERSION_H
#define SLOWSCAN_VERSION_H

#include "slowscan/export.h"

#define SLOWSCAN_VERSION_MAJOR 3
#define SLOWSCAN_VERSION_MINOR 0
#define SLOWSCAN_VERSION_PATCH 0
#define SLOWSCAN_VERSION_STRING "3.0.0"

/* The version of the library linked at run time (SLOWSCAN_VERSION_STRING of its build), to
 * compare with the headers a program was compiled against. */
SLOWSCAN_API
const char *slowscan_version(void);

#endif
