/* screen --ensemble: the run's ensembles, shared by screen_ensemble.c (grouping, columns)
 * and screen_ensemble_rows.c (pooled tests, rows). */
#ifndef SLOWSCAN_CLI_SCREEN_ENSEMBLE_H
#define SLOWSCAN_CLI_SCREEN_ENSEMBLE_H

#include "screen.h"

#include "slowscan/ensemble.h"

enum { ROLE_SERIES, ROLE_MEMBER, ROLE_MEAN };

/* One ensemble of an input table. */
typedef struct {
    size_t input;
    const char *source;  /* the input as messages and rows name it */
    char *name;          /* NAME */
    char *mean_name;     /* NAME[mean], the column appended */
    char *pooled_name;   /* NAME[pooled], its pooled rows */
    size_t nmembers, ntests;
    ensemble_split split;
    /* per member m and test j (m * ntests + j): what the pooled test needs */
    double *statistic, *tau;
    double **nulls;      /* a copy of the member's null, NULL when it had none */
    size_t *replicates;  /* values in nulls */
    size_t *stored;      /* the member's series in the run's store */
    size_t collected;    /* members seen */
    /* the pooled rows (after cli_ensemble_finish) */
    screen_test pooled[SCREEN_MAX_TESTS];
    double q[SCREEN_MAX_TESTS], share[SCREEN_MAX_TESTS];
    screen_flag flag[SCREEN_MAX_TESTS];
    screen_row first[SCREEN_MAX_TESTS]; /* member 0's rows: n, window, bandwidth, unit */
    char unit[16];
} ensemble_info;

/* A stored series' name and what it is, sorted by (input, name) for lookups. */
typedef struct {
    size_t input;
    const char *name;
    int role;
    size_t group, member;
} ensemble_role;

struct cli_ensemble_run {
    ensemble_info *groups;
    size_t ngroups;
    ensemble_role *roles;
    size_t nroles;
    screen_store *means; /* the ensemble means' records: their own BH family */
    size_t ntests;
    screen_config cfg;
    ensemble_split_options split;
};

/* --members A,B,C into suffixes (in *text, which the caller frees; *list too). */
int cli_ensemble_member_list(const cli_options *o, char **text, const char ***list,
                             size_t *count);
/* The split test of an ensemble's members into *split, and its warning (the library's
 * message) when it fires. */
void cli_ensemble_split(const char *source, const char *name, const double *const *members,
                        size_t nmembers, size_t n, const ensemble_split_options *options,
                        ensemble_split *split);

/* The library's words for names of t refused as ensembles (slowscan_ensemble_group). */
void cli_ensemble_refusal(const cli_options *o, const series_table *t, const ensemble_detail *d);

const ensemble_role *ensemble_find(const struct cli_ensemble_run *e, size_t input,
                                   const char *name);

#endif
