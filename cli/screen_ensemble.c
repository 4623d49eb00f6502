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
        if (in->grid_cells[f] > 0 || in->columns[f])
            option = in->grid_cells[f] > 0 ? "a NetCDF input" : "a CSV input this wide";
    if (!option)
        return EXIT_OK;
    cli_error("option --ensemble: not available with %s (screen the ensemble's columns "
              "from a CSV file in one process)", option);
    return EXIT_BAD_INPUT;
}

/* --members A,B,C into suffixes (in *text, which the caller frees). */
static int member_list(const cli_options *o, char **text, const char ***list, size_t *count)
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
    slowscan_ensemble_split_test(members, g->nmembers, t->n, &e->split, &info->split);
    if (info->split.flags) {
        char msg[1024];
        message_context ctx = slowscan_message_context_default();
        ctx.source = info->source;
        slowscan_message_ensemble_split(msg, sizeof msg, g->name, &info->split, &e->split, &ctx);
        cli_warning("%s", msg);
    }
    slowscan_ensemble_mean(members, g->nmembers, t->n, mean);
    if (o->ensemble.anomalies)
        slowscan_ensemble_anomalies(members, g->nmembers, t->n, mean,
                                    (double *const *)members);
    free(members);
    t->names[t->nseries] = joined(info->mean_name, "");
    t->values[t->nseries] = mean;
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
    ensemble_info *groups = realloc(e->groups, (e->ngroups + set->ngroups) * sizeof *groups);
    if (groups)
        e->groups = groups;
    ensemble_role *roles = realloc(e->roles, (e->nroles + members + set->ngroups) * sizeof *roles);
    if (roles)
        e->roles = roles;
    return names && values && groups && roles ? EXIT_OK : EXIT_INTERNAL;
}

/* The ensembles of table f. A table without any is left alone (the run refuses when no
 * table has one). */
static int group_table(const cli_options *o, struct cli_ensemble_run *e, series_table *t,
                       size_t f, const ensemble_grouping *how)
{
    size_t *len = reaches(t);
    ensemble_set set = {0};
    ensemble_detail d = {0};
    int st = len ? slowscan_ensemble_group((const char *const *)t->names, len, t->nseries, how,
                                           &set, &d)
                 : SLOWSCAN_ENOMEM;
    free(len);
    int rc = st == SLOWSCAN_OK || d.rule == ENSEMBLE_RULE_NO_MEMBERS ? EXIT_OK
             : st == SLOWSCAN_ENOMEM                                 ? EXIT_INTERNAL
                                                                     : EXIT_BAD_INPUT;
    if (rc == EXIT_BAD_INPUT) {
        char msg[1024];
        message_context ctx = slowscan_message_context_default();
        ctx.source = cli_source_name(t->source);
        slowscan_message_ensemble_refusal(msg, sizeof msg, &d, (const char *const *)t->names,
                                          o->ensemble.members_text ? "--members" : "--ensemble",
                                          &ctx);
        cli_error("%s", msg);
    } else if (rc == EXIT_INTERNAL) {
        cli_error("out of memory");
    }
    if (rc == EXIT_OK && st == SLOWSCAN_OK)
        rc = clashes(t, &set) ? EXIT_BAD_INPUT : grow(e, t, &set);
    for (size_t g = 0; rc == EXIT_OK && st == SLOWSCAN_OK && g < set.ngroups; g++)
        rc = add_ensemble(o, e, t, f, &set.groups[g]);
    slowscan_ensemble_set_free(&set);
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
    rc = member_list(opts, &text, &list, &how.nmembers);
    how.members = list;
    for (size_t f = 0; rc == EXIT_OK && f < in->ntables; f++)
        rc = group_table(opts, e, &in->tables[f], f, &how);
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
