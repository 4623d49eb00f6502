/* A table in memory through the batch driver into a store (screen_memory.h): the source
 * hands out the table's columns as they are (nothing copied), or is the caller's own; the
 * sink adds each result to the store in input order. */
#include "slowscan/screen_memory.h"
#include "slowscan/status.h"

#include <stdlib.h>
#include <string.h>

typedef struct {
    screen_memory_run *run;
    int status;            /* the store's failure */
    screen_input *controls; /* with run->control: each series' control, by index (the batch
                              driver holds a series' input while it runs) */
} memory_state;

screen_memory_run slowscan_screen_memory_default(void)
{
    screen_memory_run run;
    memset(&run, 0, sizeof run);
    return run;
}

screen_input slowscan_screen_control_input(const series_table *control, const char *name,
                                           const char *source)
{
    screen_input in = {.name = name, .source = source ? source : control->source,
                       .time_name = control->time_name, .time = control->time, .values = NULL,
                       .n = control->n, .control = NULL, .axis = control->axis};
    for (size_t k = 0; k < control->nseries; k++)
        if (strcmp(control->names[k], name) == 0) {
            in.values = control->values[k];
            break;
        }
    return in;
}

static int next_series(void *state, size_t index, screen_input *in, screen_detail *detail)
{
    (void)detail;
    memory_state *m = state;
    const screen_memory_run *run = m->run;
    const series_table *t = run->table;
    if (index >= t->nseries)
        return SCREEN_BATCH_END;
    *in = (screen_input){.name = t->names[index],
                         .source = run->source ? run->source : t->source,
                         .time_name = t->time_name, .time = t->time,
                         .values = t->values[index], .n = t->n, .control = NULL,
                         .axis = t->axis};
    if (m->controls) {
        m->controls[index] = slowscan_screen_control_input(run->control, t->names[index],
                                                           run->control_source);
        in->control = &m->controls[index];
    }
    return SLOWSCAN_OK;
}

static int put_series(void *state, const screen_batch_item *item)
{
    memory_state *m = state;
    screen_memory_run *run = m->run;
    const screen_result *res = item->result;
    screen_result patched;
    if (run->sequential) { /* the rounds' p-values, counts and warnings */
        memcpy(&patched, res, sizeof patched);
        slowscan_screen_sequential_patch(run->sequential, item->index, &patched);
        res = &patched;
    }
    m->status = slowscan_screen_store_add(run->store, item->input->name, res, NULL, 0,
                                          &run->error);
    if (m->status != SLOWSCAN_OK)
        return m->status;
    run->stored++;
    if (run->progress) {
        screen_progress done = {.series = item->input->name, .index = item->index};
        run->progress(run->context, &done);
    }
    return SLOWSCAN_OK;
}

static void surrogates_drawn(void *state, const screen_progress *progress)
{
    const screen_memory_run *run = ((memory_state *)state)->run;
    run->progress(run->context, progress);
}

/* The rounds (with run->sequential), then the ordinary pass into the store. */
static int run_passes(const screen_config *cfg, memory_state *m, screen_source *source,
                      screen_batch_failure *failure)
{
    screen_memory_run *run = m->run;
    screen_config fixed = *cfg;
    if (run->sequential) { /* the rounds set each series' replicate range */
        fixed.surrogates = 0;
        cfg = &fixed;
        int st = slowscan_screen_sequential_run(run->sequential, cfg, source, NULL, failure);
        if (st != SLOWSCAN_OK)
            return st;
    }
    screen_sink sink = {.put = put_series, .state = m, .keep_series = 0,
                        .progress = run->progress ? surrogates_drawn : NULL};
    int st = slowscan_screen_batch_run(cfg, source, &sink, failure);
    return m->status != SLOWSCAN_OK ? m->status : st;
}

int slowscan_screen_memory_run(const screen_config *cfg, screen_memory_run *run,
                               screen_batch_failure *failure)
{
    memset(failure, 0, sizeof *failure);
    run->stored = 0;
    run->error.message[0] = '\0';
    if ((!run->table && !run->series) || !run->store)
        return SLOWSCAN_EINVAL;
    /* a control is matched by the table's names: not with a caller's source */
    if (run->series && run->control)
        return SLOWSCAN_EINVAL;
    memory_state m = {run, SLOWSCAN_OK, NULL};
    screen_source source = run->series ? *run->series
                                       : (screen_source){next_series, NULL, run->table->nseries,
                                                         &m};
    if (run->sequential &&
        slowscan_screen_sequential_summary(run->sequential).series != source.count)
        return SLOWSCAN_EINVAL;
    if (run->control && !(m.controls = calloc(run->table->nseries + 1, sizeof *m.controls)))
        return SLOWSCAN_ENOMEM;
    int st = run_passes(cfg, &m, &source, failure);
    free(m.controls);
    failure->input.control = NULL; /* it pointed into m.controls */
    return st;
}
