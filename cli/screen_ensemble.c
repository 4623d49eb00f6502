/* screen --ensemble: before the run, every input table's members are grouped into ensembles
 * (slowscan_ensemble_group), each ensemble's split test is made on the members as read, its
 * mean is appended to the table as a column NAME[mean], and with --member-anomalies the
 * members are replaced by their anomalies. The run then screens the table as usual; the
 * mean's records go to a store of their own (screen_ensemble_rows.c), so that the run's
 * Benjamini-Hochberg family holds the members (and plain series) only. */
#include "screen_ensemble.h"
#include "share.h"

#include "slowscan/message.h"
#include "slowscan/status.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

static int by_input_name(const void *a, const void *b)
{
    const ensemble_role *x = a, *y = b;
    if (x->input != y->input)
        return x->input < y->input ? -1 : 1;
    return strcmp(x->name, y->name);
}

const ensemble_role *ensemble_find(const struct cli_ensemble_run *e, size_t input,
                                   const char *name)
{
    ensemble_role key = {.input = input, .name = name};
    if (e->nroles == 0)
        return NULL;
    return bsearch(&key, e->roles, e->nroles, sizeof *e->roles, by_input_name);
}

/* What this command cannot do with ensembles, refused before any work. */
static int refuse_unsupported(const cli_options *o, const cli_inputs *in)
{
    const char *option = cli_share_get() ? "slowscan-mpi with several processes"
                         : o->resume           ? "--resume"
                         : o->maps_output      ? "--maps"
                         : o->figures_dir      ? "--figures"
                                               : NULL;
    for (size_t f = 0; !option && f < in->ntables; f++)
        if (in->columns[f])
            option = "a CSV input this wide (it is read a part at a time)";
    if (!option)
        return EXIT_OK;
    cli_error("option --ensemble: not available with %s (screen the ensemble in one "
              "process)", option);
    return EXIT_BAD_INPUT;
}

/* A NetCDF input read whole into tables[f] (its members must sit side by side; a grid is
 * otherwise read a part at a time), made ready like a CSV table; its member dimension into
 * member[size]. */
static int load_grid(const cli_options *o, cli_inputs *in, size_t f, char *member, size_t size)
{
    netcdf_read_options ro = cli_netcdf_options(o);
    netcdf_reader *r = NULL;
    io_error err = {{0}};
    int st = slowscan_netcdf_open(o->files[f], &ro, &r, &err);
    if (st == SLOWSCAN_OK && !slowscan_netcdf_member_dimension(r, member, size)) {
        slowscan_netcdf_close(r);
        cli_error("%s: option --ensemble: no member dimension among its variables' (one named "
                  "member, realization, ensemble or ens, or with standard_name realization)",
                  o->files[f]);
        return EXIT_BAD_INPUT;
    }
    if (st == SLOWSCAN_OK)
        st = slowscan_netcdf_next_table(r, slowscan_netcdf_series_count(r) + 1, &in->tables[f],
                                        NULL, &err);
    slowscan_netcdf_close(r);
    if (st == NETCDF_END)
        snprintf(err.message, sizeof err.message, "%s: no cell holds a value", o->files[f]);
    if (st != SLOWSCAN_OK) {
        cli_error("%s", err.message);
        return st == SLOWSCAN_ENOMEM ? EXIT_INTERNAL : EXIT_BAD_INPUT;
    }
    in->grid_cells[f] = 0; /* walked as a table from now on */
    return cli_ready_table(o, &in->tables[f], 1);
}

/* A cell's name VAR[a=1,DIM=3,b=2] as NAME.MEMBER for grouping: VAR[a=1,b=2].3 (a '.' in the
 * member's value becomes '_'); a cell without that dimension gets a name without a dot. */
static char *grid_member_name(const char *name, const char *dim)
{
    size_t len = strlen(name), dl = strlen(dim);
    char *out = malloc(len + 3);
    const char *open = strchr(name, '[');
    const char *item = open;
    while (item && item[1] && !(strncmp(item + 1, dim, dl) == 0 && item[1 + dl] == '='))
        item = strpbrk(item + 1, ",]");
    if (!out || !item || !item[1]) {
        if (out)
            snprintf(out, len + 3, "-");
        return out;
    }
    const char *value = item + 2 + dl, *end = value + strcspn(value, ",]");
    size_t at = (size_t)(item - name);
    memcpy(out, name, at); /* VAR[a=1 */
    if (*end == ',') /* the items after it, keeping the bracket or comma before it */
        at += (size_t)snprintf(out + at, len + 3 - at, "%c%s", *item, end + 1);
    else if (*item == ',')
        at += (size_t)snprintf(out + at, len + 3 - at, "]");
    out[at++] = '.';
    for (const char *c = value; c < end; c++)
        out[at++] = *c == '.' ? '_' : *c;
    out[at] = '\0';
    return out;
}

int cli_ensemble_member_list(const cli_options *o, char **text, const char ***list, size_t *count)
{
    *list = NULL, *count = 0, *text = NULL;
    if (!o->ensemble.members_text)
        return EXIT_OK;
    size_t len = strlen(o->ensemble.members_text);
    *text = malloc(len + 1);
    *list = malloc((len / 2 + 2) * sizeof **list);
    if (!*text || !*list) {
        cli_error("out of memory");
        return EXIT_INTERNAL;
    }
    memcpy(*text, o->ensemble.members_text, len + 1);
    for (char *p = *text, *end; p; p = end) {
        if ((end = strchr(p, ',')))
            *end++ = '\0';
        if (*p == '\0') {
            cli_error("option --members: an empty member in '%s'", o->ensemble.members_text);
            return EXIT_BAD_INPUT;
        }
        (*list)[(*count)++] = p;
    }
    return EXIT_OK;
}

void cli_ensemble_split(const char *source, const char *name, const double *const *members,
                        size_t nmembers, size_t n, const ensemble_split_options *options,
                        ensemble_split *split)
{
    slowscan_ensemble_split_test(members, nmembers, n, options, split);
    if (!split->flags)
        return;
    char msg[1024];
    message_context ctx = slowscan_message_context_default();
    ctx.source = source;
    slowscan_message_ensemble_split(msg, sizeof msg, name, split, options, &ctx);
    cli_warning("%s", msg);
}

void cli_ensemble_refusal(const cli_options *o, const series_table *t, const ensemble_detail *d)
{
    char msg[1024];
    message_context ctx = slowscan_message_context_default();
    ctx.source = cli_source_name(t->source);
    slowscan_message_ensemble_refusal(msg, sizeof msg, d, (const char *const *)t->names,
                                      o->ensemble.members_text ? "--members" : "--ensemble", &ctx);
    cli_error("%s", msg);
}

/* How far each series reaches: the index of its last finite value + 1. */
static size_t *reaches(const series_table *t)
{
    size_t *len = malloc((t->nseries + 1) * sizeof *len);
    for (size_t k = 0; len && k < t->nseries; k++) {
        len[k] = t->n;
        while (len[k] > 0 && !isfinite(t->values[k][len[k] - 1]))
            len[k]--;
    }
    return len;
}

static char *joined(const char *name, const char *suffix)
{
    size_t a = strlen(name), b = strlen(suffix);
    char *s = malloc(a + b + 1);
    if (s)
        memcpy(s, name, a), memcpy(s + a, suffix, b + 1);
    return s;
}

/* The ensemble's mean as a new column of t, its split test (and warning), and with
 * --member-anomalies its members minus the mean. */
static int add_ensemble(const cli_options *o, struct cli_ensemble_run *e, series_table *t,
                        size_t input, const ensemble_group *g)
{
    ensemble_info *info = &e->groups[e->ngroups];
    *info = (ensemble_info){.input = input, .source = cli_source_name(t->source),
                            .nmembers = g->nmembers};
    size_t cells = g->nmembers * e->ntests;
    const double **members = malloc(g->nmembers * sizeof *members);
    double *mean = malloc((t->n + 1) * sizeof *mean);
    info->name = joined(g->name, ""), info->mean_name = joined(g->name, "[mean]");
    info->pooled_name = joined(g->name, "[pooled]");
    info->statistic = calloc(cells + 1, sizeof *info->statistic);
    info->tau = calloc(cells + 1, sizeof *info->tau);
    info->nulls = calloc(cells + 1, sizeof *info->nulls);
    info->replicates = calloc(cells + 1, sizeof *info->replicates);
    info->stored = calloc(g->nmembers, sizeof *info->stored);
    e->ngroups++;
    if (!members || !mean || !info->name || !info->mean_name || !info->pooled_name ||
        !info->statistic || !info->tau || !info->nulls || !info->replicates || !info->stored) {
        free(members), free(mean);
        cli_error("out of memory");
        return EXIT_INTERNAL;
    }
    for (size_t m = 0; m < g->nmembers; m++) {
        members[m] = t->values[g->members[m]];
        e->roles[e->nroles++] = (ensemble_role){input, t->names[g->members[m]], ROLE_MEMBER,
                                                e->ngroups - 1, m};
    }
    cli_ensemble_split(info->source, g->name, members, g->nmembers, t->n, &e->split,
                       &info->split);
    slowscan_ensemble_mean(members, g->nmembers, t->n, mean);
    if (o->ensemble.anomalies)
        slowscan_ensemble_anomalies(members, g->nmembers, t->n, mean,
                                    (double *const *)members);
    free(members);
    t->names[t->nseries] = joined(info->mean_name, "");
    t->values[t->nseries] = mean;
    if (t->grid) /* a grid's mean stands where its first member does */
        t->grid[t->nseries] = t->grid[g->members[0]];
    e->roles[e->nroles++] = (ensemble_role){input, info->mean_name, ROLE_MEAN, e->ngroups - 1, 0};
    if (!t->names[t->nseries++]) {
        cli_error("out of memory");
        return EXIT_INTERNAL;
    }
    return EXIT_OK;
}

/* A column already named like a mean column would be screened twice under one name. */
static int clashes(const series_table *t, const ensemble_set *set)
{
    for (size_t g = 0; g < set->ngroups; g++)
        for (size_t k = 0; k < t->nseries; k++) {
            size_t len = strlen(set->groups[g].name);
            if (strncmp(t->names[k], set->groups[g].name, len) == 0 &&
                strcmp(t->names[k] + len, "[mean]") == 0) {
                cli_error("%s: column '%s' has the name of the ensemble mean of '%s.*' "
                          "(rename it to screen with --ensemble)",
                          cli_source_name(t->source), t->names[k], set->groups[g].name);
                return 1;
            }
        }
    return 0;
}

/* Room for the ensembles of a table: new columns, groups, roles. */
static int grow(struct cli_ensemble_run *e, series_table *t, const ensemble_set *set)
{
    size_t members = 0;
    for (size_t g = 0; g < set->ngroups; g++)
        members += set->groups[g].nmembers;
    char **names = realloc(t->names, (t->nseries + set->ngroups) * sizeof *names);
    if (names)
        t->names = names;
    double **values = realloc(t->values, (t->nseries + set->ngroups) * sizeof *values);
    if (values)
        t->values = values;
    grid_position *grid = t->grid ? realloc(t->grid, (t->nseries + set->ngroups) * sizeof *grid)
                                  : NULL;
    if (grid)
        t->grid = grid;
    ensemble_info *groups = realloc(e->groups, (e->ngroups + set->ngroups) * sizeof *groups);
    if (groups)
        e->groups = groups;
    ensemble_role *roles = realloc(e->roles, (e->nroles + members + set->ngroups) * sizeof *roles);
    if (roles)
        e->roles = roles;
    if (names && values && (grid || !t->grid) && groups && roles)
        return EXIT_OK;
    cli_error("out of memory");
    return EXIT_INTERNAL;
}

/* The ensembles of table f, grouped by names[] (the table's, or its cells' as NAME.MEMBER).
 * A table without any is left alone (the run refuses when no table has one). */
static int group_table(const cli_options *o, struct cli_ensemble_run *e, series_table *t,
                       size_t f, const ensemble_grouping *how, const char *const *names)
{
    size_t *len = reaches(t);
    ensemble_set set = {0};
    ensemble_detail d = {0};
    int st = len && names ? slowscan_ensemble_group(names, len, t->nseries, how, &set, &d)
                          : SLOWSCAN_ENOMEM;
    free(len);
    int rc = st == SLOWSCAN_OK || d.rule == ENSEMBLE_RULE_NO_MEMBERS ? EXIT_OK
             : st == SLOWSCAN_ENOMEM                                 ? EXIT_INTERNAL
                                                                     : EXIT_BAD_INPUT;
    if (rc == EXIT_BAD_INPUT)
        cli_ensemble_refusal(o, t, &d);
    else if (rc == EXIT_INTERNAL) {
        cli_error("out of memory");
    }
    if (rc == EXIT_OK && st == SLOWSCAN_OK)
        rc = clashes(t, &set) ? EXIT_BAD_INPUT : grow(e, t, &set);
    for (size_t g = 0; rc == EXIT_OK && st == SLOWSCAN_OK && g < set.ngroups; g++)
        rc = add_ensemble(o, e, t, f, &set.groups[g]);
    slowscan_ensemble_set_free(&set);
    return rc;
}

/* The ensembles of input f: a CSV table's columns NAME.MEMBER, or a grid's cells along its
 * member dimension. */
static int group_input(const cli_options *o, struct cli_ensemble_run *e, cli_inputs *in,
                       size_t f, const ensemble_grouping *how)
{
    char member[260];
    if (in->grid_cells[f] == 0)
        return group_table(o, e, &in->tables[f], f, how, (const char *const *)in->tables[f].names);
    int rc = load_grid(o, in, f, member, sizeof member);
    series_table *t = &in->tables[f];
    size_t cells = t->nseries; /* before the means are appended */
    char **names = rc == EXIT_OK ? calloc(cells + 1, sizeof *names) : NULL;
    int made = names != NULL;
    for (size_t k = 0; made && k < cells; k++)
        made = (names[k] = grid_member_name(t->names[k], member)) != NULL;
    if (rc == EXIT_OK)
        rc = group_table(o, e, t, f, how, made ? (const char *const *)names : NULL);
    for (size_t k = 0; names && k < cells; k++)
        free(names[k]);
    free(names);
    return rc;
}

int cli_ensemble_start(const cli_options *opts, cli_inputs *in, screen_run *run)
{
    if (!opts->ensemble.on)
        return EXIT_OK;
    int rc = refuse_unsupported(opts, in);
    struct cli_ensemble_run *e = rc == EXIT_OK ? calloc(1, sizeof *e) : NULL;
    if (rc == EXIT_OK && (!e || !(e->means = slowscan_screen_store_alloc(SCREEN_STORE_SPILL_AFTER,
                                                                         NULL)))) {
        cli_error("out of memory");
        rc = EXIT_INTERNAL;
    }
    run->ensemble = e;
    if (rc != EXIT_OK)
        return rc;
    e->cfg = run->cfg;
    e->ntests = slowscan_screen_test_count(&run->cfg);
    e->split = slowscan_ensemble_split_options_default();
    ensemble_grouping how = slowscan_ensemble_grouping_default();
    char *text;
    const char **list;
    rc = cli_ensemble_member_list(opts, &text, &list, &how.nmembers);
    how.members = list;
    for (size_t f = 0; rc == EXIT_OK && f < in->ntables; f++)
        rc = group_input(opts, e, in, f, &how);
    free(text);
    free(list);
    if (rc == EXIT_OK && e->ngroups == 0) {
        cli_error("option %s: no column is named NAME.MEMBER%s",
                  opts->ensemble.members_text ? "--members" : "--ensemble",
                  opts->ensemble.members_text ? " with one of the listed members" : "");
        rc = EXIT_BAD_INPUT;
    }
    if (e->nroles > 0) /* (qsort and bsearch take no NULL array, even of 0 elements) */
        qsort(e->roles, e->nroles, sizeof *e->roles, by_input_name);
    return rc;
}

void cli_ensemble_free(screen_run *run)
{
    struct cli_ensemble_run *e = run->ensemble;
    if (!e)
        return;
    for (size_t g = 0; g < e->ngroups; g++) {
        ensemble_info *info = &e->groups[g];
        for (size_t c = 0; info->nulls && c < info->nmembers * e->ntests; c++)
            free(info->nulls[c]);
        free(info->name), free(info->mean_name), free(info->pooled_name);
        free(info->statistic), free(info->tau), free(info->nulls), free(info->replicates);
        free(info->stored);
    }
    free(e->groups);
    free(e->roles);
    slowscan_screen_store_free(e->means);
    free(e);
    run->ensemble = NULL;
}
