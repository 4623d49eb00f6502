/* Ensembles: names into groups, the ensemble mean and the members' anomalies (ensemble.h). */
#include "slowscan/ensemble.h"
#include "slowscan/status.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

ensemble_grouping slowscan_ensemble_grouping_default(void)
{
    return (ensemble_grouping){.members = NULL, .nmembers = 0,
                               .min_members = ENSEMBLE_MIN_MEMBERS};
}

/* A name as a candidate member: its ensemble's name is the part before the last '.'. */
typedef struct {
    const char *name;
    size_t base; /* length of NAME */
    size_t index;
} member_name;

static int by_base(const void *a, const void *b)
{
    const member_name *x = a, *y = b;
    size_t len = x->base < y->base ? x->base : y->base;
    int c = memcmp(x->name, y->name, len);
    if (c == 0 && x->base != y->base)
        c = x->base < y->base ? -1 : 1;
    return c != 0 ? c : (x->index > y->index) - (x->index < y->index);
}

static int by_first_member(const void *a, const void *b)
{
    const ensemble_group *x = a, *y = b;
    return (x->members[0] > y->members[0]) - (x->members[0] < y->members[0]);
}

/* The position of name's member suffix in how's list, how->nmembers when not listed; -1
 * when the name is no NAME.MEMBER at all. */
static long member_slot(const char *name, const ensemble_grouping *how, size_t *base)
{
    const char *dot = strrchr(name, '.');
    if (!dot || dot == name || dot[1] == '\0')
        return -1;
    *base = (size_t)(dot - name);
    if (!how->members)
        return 0;
    for (size_t s = 0; s < how->nmembers; s++)
        if (strcmp(dot + 1, how->members[s]) == 0)
            return (long)s;
    return -1;
}

static int same_base(const member_name *a, const member_name *b)
{
    return a->base == b->base && memcmp(a->name, b->name, a->base) == 0;
}

/* Group g from the sorted candidates [from, to). */
static int make_group(ensemble_group *g, const member_name *c, size_t from, size_t to)
{
    g->nmembers = to - from;
    g->members = malloc(g->nmembers * sizeof *g->members);
    g->name = malloc(c[from].base + 1);
    if (!g->members || !g->name)
        return SLOWSCAN_ENOMEM;
    memcpy(g->name, c[from].name, c[from].base);
    g->name[c[from].base] = '\0';
    for (size_t k = from; k < to; k++)
        g->members[k - from] = c[k].index;
    return SLOWSCAN_OK;
}

/* The rules every group must meet: enough members, every listed one, equal lengths. */
static int check_group(const ensemble_group *g, const char *const *names, const size_t *lengths,
                       const ensemble_grouping *how, ensemble_detail *d)
{
    *d = (ensemble_detail){.series = g->members[0], .count = g->nmembers,
                           .need = how->min_members};
    for (size_t s = 0; how->members && s < how->nmembers; s++) {
        size_t k = 0, base = 0;
        while (k < g->nmembers && member_slot(names[g->members[k]], how, &base) != (long)s)
            k++;
        if (k == g->nmembers) {
            d->rule = ENSEMBLE_RULE_MISSING_MEMBER, d->member = how->members[s];
            return SLOWSCAN_EINVAL;
        }
    }
    if (g->nmembers < how->min_members) {
        d->rule = ENSEMBLE_RULE_FEW_MEMBERS;
        return SLOWSCAN_EINVAL;
    }
    for (size_t k = 1; lengths && k < g->nmembers; k++)
        if (lengths[g->members[k]] != lengths[g->members[0]]) {
            *d = (ensemble_detail){ENSEMBLE_RULE_MIXED_LENGTHS, g->members[k], g->members[0],
                                   lengths[g->members[k]], lengths[g->members[0]], NULL};
            return SLOWSCAN_EINVAL;
        }
    d->rule = ENSEMBLE_RULE_NONE;
    return SLOWSCAN_OK;
}

/* The candidates sorted by ensemble name, then grouped; *out holds the groups. */
static int group_sorted(const member_name *c, size_t nc, ensemble_set *out)
{
    size_t groups = 0;
    for (size_t k = 0; k < nc; k++)
        groups += k == 0 || !same_base(&c[k], &c[k - 1]);
    if (!(out->groups = calloc(groups, sizeof *out->groups)))
        return SLOWSCAN_ENOMEM;
    for (size_t k = 0, from = 0; k < nc; k++)
        if (k + 1 == nc || !same_base(&c[k + 1], &c[k])) {
            if (make_group(&out->groups[out->ngroups++], c, from, k + 1) != SLOWSCAN_OK)
                return SLOWSCAN_ENOMEM;
            from = k + 1;
        }
    qsort(out->groups, out->ngroups, sizeof *out->groups, by_first_member);
    return SLOWSCAN_OK;
}

int slowscan_ensemble_group(const char *const *names, const size_t *lengths, size_t count,
                            const ensemble_grouping *how, ensemble_set *out,
                            ensemble_detail *detail)
{
    *out = (ensemble_set){0};
    *detail = (ensemble_detail){.rule = ENSEMBLE_RULE_NONE};
    if (how->members && how->nmembers < how->min_members) {
        *detail = (ensemble_detail){.rule = ENSEMBLE_RULE_FEW_LISTED, .count = how->nmembers,
                                    .need = how->min_members};
        return SLOWSCAN_EINVAL;
    }
    member_name *c = malloc((count + 1) * sizeof *c);
    if (!c)
        return SLOWSCAN_ENOMEM;
    size_t nc = 0;
    for (size_t k = 0; k < count; k++) {
        size_t base = 0;
        if (member_slot(names[k], how, &base) >= 0)
            c[nc++] = (member_name){names[k], base, k};
    }
    qsort(c, nc, sizeof *c, by_base);
    int st = nc == 0 ? SLOWSCAN_EINVAL : group_sorted(c, nc, out);
    free(c);
    if (nc == 0)
        detail->rule = ENSEMBLE_RULE_NO_MEMBERS;
    for (size_t g = 0; st == SLOWSCAN_OK && g < out->ngroups; g++)
        st = check_group(&out->groups[g], names, lengths, how, detail);
    return st;
}

void slowscan_ensemble_set_free(ensemble_set *set)
{
    for (size_t g = 0; set->groups && g < set->ngroups; g++) {
        free(set->groups[g].name);
        free(set->groups[g].members);
    }
    free(set->groups);
    *set = (ensemble_set){0};
}

int slowscan_ensemble_mean(const double *const *members, size_t nmembers, size_t n, double *mean)
{
    if (nmembers == 0)
        return SLOWSCAN_EINVAL;
    for (size_t i = 0; i < n; i++) {
        double sum = 0;
        for (size_t m = 0; m < nmembers; m++)
            sum += members[m][i]; /* a NaN member makes the sum NaN: missing in the mean */
        mean[i] = isfinite(sum) ? sum / (double)nmembers : NAN;
    }
    return SLOWSCAN_OK;
}

void slowscan_ensemble_anomalies(const double *const *members, size_t nmembers, size_t n,
                                 const double *mean, double *const *out)
{
    for (size_t m = 0; m < nmembers; m++)
        for (size_t i = 0; i < n; i++)
            out[m][i] = members[m][i] - mean[i];
}
