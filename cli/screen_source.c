/* screen's series source: the inputs walked in order for the batch driver (screen_batch.h),
 * with each series' origin, control and (for a grid read a table at a time) its copy. A run
 * of --surrogates auto walks it once per round. */
#include "cli.h"
#include "screen.h"
#include "share.h"
#include "slowscan/status.h"

#include <stdlib.h>
#include <string.h>

static int copy_series(series_copy *c, const series_table *t, size_t k)
{
    c->name = strdup(t->names[k]);
    c->source = strdup(cli_source_name(t->source));
    c->time_name = strdup(t->time_name);
    c->time = malloc(t->n * sizeof *c->time);
    c->values = malloc(t->n * sizeof *c->values);
    if (!c->name || !c->source || !c->time_name || !c->time || !c->values)
        return SLOWSCAN_ENOMEM;
    memcpy(c->time, t->time, t->n * sizeof *c->time);
    memcpy(c->values, t->values[k], t->n * sizeof *c->values);
    return SLOWSCAN_OK;
}

void cli_screen_release_series(void *state, size_t index)
{
    input_source *src = state;
    if (!src->copies)
        return;
    series_copy *c = &src->copies[index];
    free(c->name), free(c->source), free(c->time_name), free(c->time), free(c->values);
    memset(c, 0, sizeof *c);
}

int cli_screen_next_series(void *state, size_t index, screen_input *out, screen_detail *detail)
{
    (void)detail;
    input_source *src = state;
    const series_table *t;
    size_t k;
    /* a shared run started before the others were known to start: stop when one could not */
    int rc = src->share ? cli_share_stopped(src->share) : EXIT_OK;
    if (rc != EXIT_OK) {
        src->rc = rc;
        return SLOWSCAN_EINVAL;
    }
    do /* the journal's series and those of other processes are skipped, unread */
        rc = cli_cursor_next(&src->cursor, &t, &k);
    while (rc == EXIT_OK && (src->skip > 0 ? (src->skip--, 1)
                                           : src->walked++ % src->ranks != src->rank));
    if (rc == CLI_CURSOR_END)
        return SCREEN_BATCH_END;
    if (rc != EXIT_OK) {
        src->rc = rc;
        return SLOWSCAN_EINVAL;
    }
    *out = (screen_input){.name = t->names[k], .source = cli_source_name(t->source),
                          .time_name = t->time_name, .time = t->time, .values = t->values[k],
                          .n = t->n, .control = NULL, .axis = t->axis};
    if (t == &src->cursor.chunk) {
        series_copy *c = &src->copies[index];
        if (copy_series(c, t, k) != SLOWSCAN_OK) {
            cli_error("out of memory");
            src->rc = EXIT_INTERNAL;
            return SLOWSCAN_ENOMEM;
        }
        out->name = c->name, out->source = c->source, out->time_name = c->time_name;
        out->time = c->time, out->values = c->values;
    }
    screen_origin *origin = &src->origins[index];
    *origin = (screen_origin){.input = src->cursor.input - 1, .gridded = t->grid != NULL};
    if (t->grid)
        origin->position = t->grid[k];
    if (src->controls) {
        src->controls[index] = cli_control_input(src->cursor.in, t->names[k]);
        out->control = &src->controls[index];
    }
    return SLOWSCAN_OK;
}

int cli_screen_source_arrays(const cli_inputs *in, input_source *src, size_t all)
{
    int grids = 0;
    for (size_t f = 0; f < in->ntables; f++) /* inputs read a table at a time */
        grids |= in->grid_cells[f] > 0 || in->columns[f] != NULL;
    src->origins = calloc(all + 1, sizeof *src->origins);
    if (!src->origins ||
        (in->has_control && !(src->controls = calloc(all + 1, sizeof *src->controls))) ||
        (grids && !(src->copies = calloc(all + 1, sizeof *src->copies)))) {
        cli_error("out of memory");
        return EXIT_INTERNAL;
    }
    return EXIT_OK;
}

void cli_screen_source_end(input_source *src, size_t all)
{
    for (size_t i = 0; src->copies && i <= all; i++)
        cli_screen_release_series(src, i);
    cli_cursor_end(&src->cursor);
    free(src->origins);
    free(src->controls);
    free(src->copies);
    src->origins = NULL, src->controls = NULL, src->copies = NULL;
}
