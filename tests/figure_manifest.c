/* Reads the box manifest of a figure (figure_manifest.h). */
#include "figure_manifest.h"

#include <stdio.h>
#include <stdlib.h>
#include <string.h>

enum { MAX_BOXES = 4000 };

int read_manifest(const char *path, manifest *m)
{
    FILE *f = fopen(path, "r");
    char line[512];
    m->count = 0;
    m->boxes = malloc(MAX_BOXES * sizeof *m->boxes);
    if (!f || !m->boxes) {
        if (f)
            fclose(f);
        return -1;
    }
    while (fgets(line, sizeof line, f) && m->count < MAX_BOXES) {
        box b = {{0}, 0, 0, 0, 0, {0}};
        line[strcspn(line, "\n")] = '\0';
        char *text = line;
        for (int field = 0; field < 5 && text; field++)
            text = strchr(text, '\t') ? strchr(text, '\t') + 1 : NULL;
        if (sscanf(line, "%7[a-z]\t%lf\t%lf\t%lf\t%lf", b.kind, &b.x0, &b.y0, &b.x1, &b.y1) != 5)
            continue;
        snprintf(b.text, sizeof b.text, "%s", text ? text : "");
        if (strcmp(b.kind, "page") == 0) {
            m->width = b.x1;
            m->height = b.y1;
        } else {
            m->boxes[m->count++] = b;
        }
    }
    fclose(f);
    return 0;
}

