/* The box manifest report/ writes beside a figure (FIGURE.EXT.boxes, see
 * slowscan_report_batch_record_boxes), read for the figure tests. */
#ifndef SLOWSCAN_TESTS_FIGURE_MANIFEST_H
#define SLOWSCAN_TESTS_FIGURE_MANIFEST_H

#include <stddef.h>

typedef struct {
    char kind[8]; /* "text" or "panel" */
    double x0, y0, x1, y1;
    char text[200];
} box;

typedef struct {
    double width, height;
    box *boxes;
    size_t count;
} manifest;

/* Reads path into *m (free m->boxes); -1 when it cannot be read. */
int read_manifest(const char *path, manifest *m);

#endif
