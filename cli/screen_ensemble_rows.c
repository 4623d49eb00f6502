/* screen --ensemble: the members' statistics and nulls kept as they are screened, the pooled
 * test of each ensemble x indicator once the run is decided, and the rows the ensembles add
 * (their means', then the pooled rows).
 *
 * Multiple testing: the run's Benjamini-Hochberg family is the members (and plain series);
 * the ensemble means form a family of their own, and so do the pooled rows, each decided at
 * the run's --fdr. */
#include "screen_ensemble.h"

#include "slowscan/status.h"

#include <math.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

screen_store *cli_ensemble_store_for(screen_run *run, size_t input, const char *name)
{
    const ensemble_role *r = run->ensemble ? ensemble_find(run->ensemble, input, name) : NULL;
    return r && r->role == ROLE_MEAN ? run->ensemble->means : run->store;
}

screen_store *cli_ensemble_means(const screen_run *run)
{
    return run->ensemble ? run->ensemble->means : NULL;
}

const char *cli_ensemble_role(const screen_run *run, size_t input, const char *name)
{
    if (!run->ensemble)
        return NULL;
    const ensemble_role *r = ensemble_find(run->ensemble, input, name);
    return !r ? "series" : r->role == ROLE_MEMBER ? "member" : "mean";
}

int cli_ensemble_collect(screen_run *run, size_t input, const screen_batch_item *item)
{
    struct cli_ensemble_run *e = run->ensemble;
    const ensemble_role *r = e ? ensemble_find(e, input, item->input->name) : NULL;
    if (!r || r->role != ROLE_MEMBER)
        return EXIT_OK;
    ensemble_info *info = &e->groups[r->group];
    info->stored[r->member] = slowscan_screen_store_count(run->store); /* its index there */
    const screen_result *res = item->result;
    for (size_t j = 0; j < res->ntests && j < e->ntests; j++) {
        size_t c = r->member * e->ntests + j, m = res->tests[j].surrogates;
        info->statistic[c] = res->tests[j].statistic;
        info->tau[c] = res->tests[j].tau;
        const double *null = item->nulls ? item->nulls[j] : NULL;
        if (!null || m == 0)
            continue;
        if (!(info->nulls[c] = malloc(m * sizeof *info->nulls[c]))) {
            cli_error("out of memory");
            return EXIT_INTERNAL;
        }
        memcpy(info->nulls[c], null, m * sizeof *null);
        info->replicates[c] = m;
    }
    info->collected++;
    return EXIT_OK;
}

/* Member 0's rows (what the pooled rows repeat: n, window, bandwidth, time unit) and the
 * count of members flagged per test. */
static int member_rows(screen_run *run, ensemble_info *info, size_t *flagged)
{
    screen_row rows[SCREEN_MAX_TESTS];
    int rc = EXIT_OK;
    for (size_t m = 0; rc == EXIT_OK && m < info->nmembers; m++) {
        size_t tests = cli_screen_series_rows(run, info->stored[m], rows, &rc);
        if (m == 0) {
            info->ntests = tests;
            memcpy(info->first, rows, tests * sizeof *rows);
            snprintf(info->unit, sizeof info->unit, "%s", tests ? rows[0].time_unit : "");
        }
        for (size_t j = 0; j < tests && j < info->ntests; j++)
            flagged[j] += rows[j].flag == SCREEN_FLAG_RISING || rows[j].flag == SCREEN_FLAG_FALLING;
    }
    return rc;
}

/* The pooled test of each of the ensemble's tests, and its share of members flagged. */
static int pool(screen_run *run, ensemble_info *info)
{
    struct cli_ensemble_run *e = run->ensemble;
    size_t flagged[SCREEN_MAX_TESTS] = {0}, k = info->nmembers;
    int rc = info->collected == k ? member_rows(run, info, flagged) : EXIT_INTERNAL;
    double *stats = malloc(k * sizeof *stats), *taus = malloc(k * sizeof *taus);
    const double **nulls = malloc(k * sizeof *nulls);
    size_t most = 0;
    for (size_t c = 0; c < k * e->ntests; c++)
        most = info->replicates[c] > most ? info->replicates[c] : most;
    double *pooled = malloc((2 * most + 1) * sizeof *pooled); /* the null, then scratch */
    rc = rc == EXIT_OK && (!stats || !taus || !nulls || !pooled) ? EXIT_INTERNAL : rc;
    for (size_t j = 0; rc == EXIT_OK && j < info->ntests; j++) {
        size_t replicates = SIZE_MAX;
        for (size_t m = 0; m < k; m++) {
            size_t c = m * e->ntests + j;
            stats[m] = info->statistic[c], taus[m] = info->tau[c], nulls[m] = info->nulls[c];
            replicates = info->replicates[c] < replicates ? info->replicates[c] : replicates;
        }
        ensemble_pooled p;
        ensemble_pooled tau;
        int alt = slowscan_screen_test_alternative(&e->cfg, j);
        if (slowscan_ensemble_pooled_test(stats, nulls, k, replicates, alt, &p, pooled) !=
                SLOWSCAN_OK ||
            slowscan_ensemble_pooled_test(taus, nulls, k, 0, alt, &tau, NULL) != SLOWSCAN_OK)
            rc = EXIT_INTERNAL;
        screen_test *t = &info->pooled[j];
        *t = (screen_test){.kind = info->first[j].result.kind, .tau = tau.statistic,
                           .statistic = p.statistic, .statistic_model = NAN,
                           .p_value = p.p_value, .surrogates = replicates, .null_used = p.null_used,
                           .reason = isnan(p.statistic) ? SCREEN_REASON_FEW_VALUES
                                     : isnan(p.p_value) ? SCREEN_REASON_NO_SURROGATES
                                                        : SCREEN_REASON_NONE};
        for (size_t q = 0; q < SCREEN_QUANTILES; q++)
            t->quantile[q] = NAN;
        for (size_t q = 0; q < SCREEN_TAIL_QUANTILES; q++)
            t->quantile_tail[q] = NAN;
        if (!isnan(p.p_value)) /* the pooled null's quantiles, as a member's are summarised */
            slowscan_screen_null_quantiles(pooled, replicates, pooled + most, t);
        info->share[j] = (double)flagged[j] / (double)k;
    }
    free(stats), free(taus), free(nulls), free(pooled);
    if (rc == EXIT_INTERNAL)
        cli_error("out of memory");
    return rc;
}

int cli_ensemble_finish(const cli_options *opts, screen_run *run)
{
    struct cli_ensemble_run *e = run->ensemble;
    if (!e)
        return EXIT_OK;
    int rc = slowscan_screen_store_decide(e->means, opts->fdr) == SLOWSCAN_OK ? EXIT_OK
                                                                              : EXIT_INTERNAL;
    size_t count = 0;
    for (size_t g = 0; rc == EXIT_OK && g < e->ngroups; g++) {
        rc = pool(run, &e->groups[g]);
        count += e->groups[g].ntests;
        int width = (int)strlen(e->groups[g].pooled_name);
        if (width > run->name_width)
            run->name_width = width;
    }
    const screen_test **tests = malloc((count + 1) * sizeof *tests);
    double *q = malloc((count + 1) * sizeof *q);
    screen_flag *flags = malloc((count + 1) * sizeof *flags);
    rc = rc == EXIT_OK && (!tests || !q || !flags) ? EXIT_INTERNAL : rc;
    for (size_t g = 0, c = 0; rc == EXIT_OK && g < e->ngroups; g++)
        for (size_t j = 0; j < e->groups[g].ntests; j++)
            tests[c++] = &e->groups[g].pooled[j];
    if (rc == EXIT_OK && slowscan_screen_decide(tests, count, opts->fdr, q, flags) != SLOWSCAN_OK)
        rc = EXIT_INTERNAL;
    for (size_t g = 0, c = 0; rc == EXIT_OK && g < e->ngroups; g++)
        for (size_t j = 0; j < e->groups[g].ntests; j++, c++)
            e->groups[g].q[j] = q[c], e->groups[g].flag[j] = flags[c];
    free(tests), free(q), free(flags);
    if (rc == EXIT_INTERNAL)
        cli_error("out of memory");
    return rc;
}

int cli_ensemble_pooled_rows(screen_run *run, screen_row_visitor visit, void *context,
                             size_t index)
{
    struct cli_ensemble_run *e = run->ensemble;
    int rc = EXIT_OK;
    for (size_t g = 0; e && rc == EXIT_OK && g < e->ngroups; g++) {
        ensemble_info *info = &e->groups[g];
        for (size_t j = 0; rc == EXIT_OK && j < info->ntests; j++) {
            screen_row row = info->first[j];
            row.series = info->pooled_name, row.file = info->source, row.time_unit = info->unit;
            row.result = info->pooled[j], row.q_value = info->q[j], row.flag = info->flag[j];
            row.leakage_tested = 0, row.role = "pooled", row.share_flagged = info->share[j];
            rc = visit(&row, index++, context);
        }
    }
    return rc;
}

size_t cli_ensemble_rows(const screen_run *run)
{
    const struct cli_ensemble_run *e = run->ensemble;
    size_t rows = e ? slowscan_screen_store_tests(e->means) : 0;
    for (size_t g = 0; e && g < e->ngroups; g++)
        rows += e->groups[g].ntests;
    return rows;
}

void cli_ensemble_json(FILE *fp, const screen_run *run)
{
    const struct cli_ensemble_run *e = run->ensemble;
    if (!e)
        return;
    fprintf(fp, "  \"ensembles\": {\n    \"final_share\": %g, \"bimodality_limit\": %.17g, "
            "\"gap_ratio\": %g,\n    \"list\": [\n", e->split.final_share,
            e->split.bimodality_limit, e->split.gap_ratio);
    for (size_t g = 0; g < e->ngroups; g++) {
        const ensemble_info *info = &e->groups[g];
        const ensemble_split *s = &info->split;
        fputs("      {\"file\": ", fp);
        cli_json_string(fp, info->source);
        fputs(", \"name\": ", fp);
        cli_json_string(fp, info->name);
        fprintf(fp, ", \"members\": %zu, \"split\": %s, \"split_bimodal\": %s, "
                "\"split_gap\": %s, \"bimodality\": ", info->nmembers, s->flags ? "true" : "false",
                s->flags & ENSEMBLE_SPLIT_BIMODAL ? "true" : "false",
                s->flags & ENSEMBLE_SPLIT_GAP ? "true" : "false");
        const double numbers[] = {s->bimodality, s->gap, s->spread, s->cut};
        const char *keys[] = {"", "gap", "spread", "cut"};
        for (size_t k = 0; k < 4; k++) {
            if (k)
                fprintf(fp, ", \"%s\": ", keys[k]);
            cli_json_number(fp, numbers[k]);
        }
        fprintf(fp, "}%s\n", g + 1 < e->ngroups ? "," : "");
    }
    fputs("    ]\n  },\n", fp);
}
