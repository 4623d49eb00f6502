/* --ensemble for feedback and timescales: columns NAME.MEMBER grouped as screen groups them
 * (slowscan_ensemble_group, --members), each member made into the table a single run would
 * be (its columns named as --response and --flux, so --baseline finds the control's columns
 * of those names), then the members' mean; the split warning on the response's members. */
#include "forced_inputs.h"
#include "screen_ensemble.h"
#include "slowscan/message.h"
#include "slowscan/status.h"

#include <stdlib.h>
#include <string.h>

/* The group named `name`, or a refusal naming the option. */
static const ensemble_group *find_group(const cli_options *o, const series_table *t,
                                        const ensemble_set *set, const char *option,
                                        const char *name)
{
    for (size_t g = 0; g < set->ngroups; g++)
        if (strcmp(set->groups[g].name, name) == 0)
            return &set->groups[g];
    cli_error("option %s: %s has no ensemble of columns %s.MEMBER%s", option,
              cli_source_name(t->source), name,
              o->ensemble.members_text ? " with the listed --members" : "");
    return NULL;
}

static const char *suffix(const series_table *t, const ensemble_group *g, size_t m)
{
    return t->names[g->members[m]] + strlen(g->name) + 1;
}

/* cols[m] = the flux member with response member m's suffix, or a refusal. */
static int pair(const series_table *t, const ensemble_group *r, const ensemble_group *f,
                size_t *cols)
{
    for (size_t m = 0; m < r->nmembers; m++) {
        size_t j = 0;
        while (j < f->nmembers && strcmp(suffix(t, f, j), suffix(t, r, m)) != 0)
            j++;
        if (j == f->nmembers) {
            cli_error("option --ensemble: %s has %s but no %s.%s (the flux of that member)",
                      cli_source_name(t->source), t->names[r->members[m]], f->name,
                      suffix(t, r, m));
            return EXIT_BAD_INPUT;
        }
        cols[m] = f->members[j];
    }
    if (f->nmembers != r->nmembers) {
        cli_error("option --ensemble: %s has %zu members of %s and %zu of %s",
                  cli_source_name(t->source), f->nmembers, f->name, r->nmembers, r->name);
        return EXIT_BAD_INPUT;
    }
    return EXIT_OK;
}

/* Columns k (and f, or (size_t)-1) of t as a member's table, named as the options. */
static int member_table(const cli_options *o, const series_table *t, size_t k, size_t f,
                        const char *response, const char *flux, series_table *out)
{
    cli_options plain = *o; /* --annual is taken later, as for a single run */
    plain.forced.annual = 0;
    const size_t cols[2] = {k, f};
    int rc = cli_forced_table(&plain, t, cols, f == (size_t)-1 ? 1 : 2,
                              cli_source_name(t->source), out);
    const char *names[2] = {response, flux};
    for (size_t j = 0; rc == EXIT_OK && j < out->nseries; j++) {
        char *name = malloc(strlen(names[j]) + 1);
        if (!name) {
            cli_error("out of memory");
            slowscan_series_table_free(out);
            return EXIT_INTERNAL;
        }
        free(out->names[j]);
        out->names[j] = strcpy(name, names[j]);
    }
    return rc;
}

/* The members' mean of each column of the member tables, into the first one's copy. */
static int mean_table(const cli_options *o, const series_table *t, const ensemble_group *r,
                      const size_t *fcols, const char *response, const char *flux,
                      series_table *out)
{
    int rc = member_table(o, t, r->members[0], fcols ? fcols[0] : (size_t)-1, response, flux, out);
    const double **members = malloc(r->nmembers * sizeof *members);
    for (size_t j = 0; rc == EXIT_OK && j < out->nseries; j++) {
        if (!members) {
            rc = EXIT_INTERNAL;
            break;
        }
        for (size_t m = 0; m < r->nmembers; m++)
            members[m] = t->values[j == 0 ? r->members[m] : fcols[m]];
        if (slowscan_ensemble_mean(members, r->nmembers, t->n, out->values[j]) != SLOWSCAN_OK)
            rc = EXIT_INTERNAL;
    }
    free(members);
    if (rc == EXIT_INTERNAL) {
        cli_error("out of memory");
        slowscan_series_table_free(out);
    }
    return rc;
}

/* Visits the members of r (and their mean). */
static int visit_members(const cli_options *o, const series_table *t, const ensemble_group *r,
                         const size_t *fcols, const char *response, const char *flux,
                         cli_forced_member_visit visit, void *context)
{
    int rc = EXIT_OK;
    char *mean_name = malloc(strlen(r->name) + 7);
    if (!mean_name) {
        cli_error("out of memory");
        return EXIT_INTERNAL;
    }
    sprintf(mean_name, "%s[mean]", r->name);
    for (size_t m = 0; rc == EXIT_OK && m <= r->nmembers; m++) {
        cli_forced_member mb = {m < r->nmembers ? suffix(t, r, m) : "mean",
                                m < r->nmembers ? t->names[r->members[m]] : mean_name, {0}};
        rc = m < r->nmembers ? member_table(o, t, r->members[m], fcols ? fcols[m] : (size_t)-1,
                                            response, flux, &mb.table)
                             : mean_table(o, t, r, fcols, response, flux, &mb.table);
        if (rc == EXIT_OK) {
            rc = visit(context, &mb);
            slowscan_series_table_free(&mb.table);
        }
    }
    free(mean_name);
    return rc;
}

/* The groups of t's names, or a refusal in the library's words. */
static int group(const cli_options *o, const series_table *t, ensemble_set *set)
{
    ensemble_grouping how = slowscan_ensemble_grouping_default();
    char *text;
    const char **list;
    int rc = cli_ensemble_member_list(o, &text, &list, &how.nmembers);
    how.members = list;
    ensemble_detail d = {0};
    int st = rc == EXIT_OK ? slowscan_ensemble_group((const char *const *)t->names, NULL,
                                                     t->nseries, &how, set, &d)
                           : SLOWSCAN_OK;
    if (rc == EXIT_OK && st == SLOWSCAN_ENOMEM) {
        cli_error("out of memory");
        rc = EXIT_INTERNAL;
    } else if (rc == EXIT_OK && st != SLOWSCAN_OK) {
        cli_ensemble_refusal(o, t, &d); /* (d.member points into the list) */
        rc = EXIT_BAD_INPUT;
    }
    free(text);
    free(list);
    return rc;
}

int cli_forced_ensemble(const cli_options *o, const series_table *t, const char *response,
                        const char *flux, cli_forced_member_visit visit, void *context)
{
    ensemble_set set = {0};
    int rc = group(o, t, &set);
    const ensemble_group *r = NULL, *f = NULL;
    if (rc == EXIT_OK)
        r = find_group(o, t, &set, "--response", response);
    if (r && flux)
        f = find_group(o, t, &set, "--flux", flux);
    size_t *fcols = f ? malloc(r->nmembers * sizeof *fcols) : NULL;
    if (rc == EXIT_OK && (!r || (flux && !f)))
        rc = EXIT_BAD_INPUT;
    else if (rc == EXIT_OK && f && !fcols) {
        cli_error("out of memory");
        rc = EXIT_INTERNAL;
    }
    if (rc == EXIT_OK && f)
        rc = pair(t, r, f, fcols);
    if (rc == EXIT_OK) {
        const double **members = malloc(r->nmembers * sizeof *members);
        for (size_t m = 0; members && m < r->nmembers; m++)
            members[m] = t->values[r->members[m]];
        ensemble_split_options so = slowscan_ensemble_split_options_default();
        ensemble_split split;
        if (members)
            cli_ensemble_split(cli_source_name(t->source), r->name, members, r->nmembers, t->n,
                               &so, &split);
        free(members);
        rc = visit_members(o, t, r, fcols, response, flux, visit, context);
    }
    free(fcols);
    slowscan_ensemble_set_free(&set);
    return rc;
}
