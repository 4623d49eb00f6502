/* slowscan — ensembles of runs (module prefix: ensemble_).
 *
 * An ensemble is a set of series that are runs of one experiment (members): columns named
 * NAME.MEMBER, or an explicit list of member suffixes. From them: the ensemble mean, each
 * member's anomaly (member minus the mean: the forced response removed, what an indicator of
 * internal variability needs), the `split` test (do the members end in different states, so
 * that the mean follows a path no member follows?), and the pooled surrogate test of an
 * indicator over the members.
 *
 * Missing values: a time at which any member is missing is missing in the mean (and so in
 * every anomaly), so the mean never changes its composition along the record (a member
 * leaving would otherwise show up as a jump). Nothing here prints or keeps state. */
#ifndef SLOWSCAN_ENSEMBLE_H
#define SLOWSCAN_ENSEMBLE_H

#include "slowscan/export.h"

#include "slowscan/significance.h"

#include <stddef.h>

/* Fewer members than this are refused: a mean, a spread or a bimodality of three runs says
 * little (and the sample bimodality coefficient needs four values). */
enum { ENSEMBLE_MIN_MEMBERS = 4 };

/* How series names form ensembles. */
typedef struct {
    /* NULL: every name NAME.MEMBER (split at its last '.') is member MEMBER of ensemble NAME;
     * else only these member suffixes, and every ensemble must have each of them. */
    const char *const *members;
    size_t nmembers;
    size_t min_members; /* ENSEMBLE_MIN_MEMBERS */
} ensemble_grouping;

SLOWSCAN_API
ensemble_grouping slowscan_ensemble_grouping_default(void);

/* Why names were refused as ensembles. */
typedef enum {
    ENSEMBLE_RULE_NONE = 0,
    ENSEMBLE_RULE_NO_MEMBERS,     /* no name is NAME.MEMBER (with members: none has a listed
                                     suffix) */
    ENSEMBLE_RULE_FEW_MEMBERS,    /* ensemble of `series` has count members, need */
    ENSEMBLE_RULE_MISSING_MEMBER, /* ensemble of `series` lacks member suffix `member` */
    ENSEMBLE_RULE_MIXED_LENGTHS,  /* member `series` has count samples, member `other` need */
    ENSEMBLE_RULE_FEW_LISTED      /* an explicit member list of count suffixes, need */
} ensemble_rule;

typedef struct {
    ensemble_rule rule;
    size_t series, other;  /* indices into the names */
    size_t count, need;
    const char *member;    /* MISSING_MEMBER: the listed suffix (the caller's string) */
} ensemble_detail;

typedef struct {
    char *name;       /* NAME (owned) */
    size_t nmembers;
    size_t *members;  /* indices into the names, in their order (owned) */
} ensemble_group;

typedef struct {
    ensemble_group *groups; /* in the order of their first member */
    size_t ngroups;
} ensemble_set;

/* Groups count names into ensembles; lengths[k] (NULL: all equal) is series k's length (a
 * caller may pass the index of its last finite value + 1, so that a member that stops early is
 * refused rather than cutting the mean short). Names that are no member stay out of every
 * group. SLOWSCAN_OK; SLOWSCAN_EINVAL with the rule in *detail; SLOWSCAN_ENOMEM. Free *out
 * with slowscan_ensemble_set_free (also after a refusal). */
SLOWSCAN_API
int slowscan_ensemble_group(const char *const *names, const size_t *lengths, size_t count,
                            const ensemble_grouping *how, ensemble_set *out,
                            ensemble_detail *detail);
SLOWSCAN_API
void slowscan_ensemble_set_free(ensemble_set *set);

/* mean[i] = the members' mean at i; NaN when any member is NaN at i. */
SLOWSCAN_API
int slowscan_ensemble_mean(const double *const *members, size_t nmembers, size_t n,
                           double *mean);
/* out[m][i] = members[m][i] - mean[i] (out[m] may be members[m]). */
SLOWSCAN_API
void slowscan_ensemble_anomalies(const double *const *members, size_t nmembers, size_t n,
                                 const double *mean, double *const *out);

/* A member's final value: the mean of the finite samples among its last
 * max(1, round(share * n)) samples (share 0.1: the last tenth of the record); NaN when none
 * of them is finite. */
SLOWSCAN_API
double slowscan_ensemble_final_value(const double *x, size_t n, double share);

/* The sample bimodality coefficient (Pfister et al. 2013, Front. Psychol. 4:700):
 * b = (G1^2 + 1) / (G2 + 3 (m-1)^2 / ((m-2)(m-3))), with G1 and G2 the sample skewness and
 * excess kurtosis with their small-sample corrections (scipy's skew and kurtosis with
 * bias=False). Above 5/9 (the value of a uniform distribution) suggests two modes. NaN for
 * m < 4 or values without variation. */
SLOWSCAN_API
double slowscan_ensemble_bimodality(const double *x, size_t m);

/* What the split test found. */
enum { ENSEMBLE_SPLIT_BIMODAL = 1, ENSEMBLE_SPLIT_GAP = 2 };

typedef struct {
    double final_share;      /* 0.1: the last tenth of the record gives the final value */
    double bimodality_limit; /* 5/9 */
    double gap_ratio;        /* 4: a gap more than 4 within-group spreads */
} ensemble_split_options;

SLOWSCAN_API
ensemble_split_options slowscan_ensemble_split_options_default(void);

typedef struct {
    size_t members;    /* members with a finite final value */
    double bimodality; /* of the final values (NaN: fewer than 4, or all equal) */
    /* The largest gap between consecutive sorted final values cuts the members into a lower
     * and an upper group (each of at least 2 members, else no gap test: one member apart is
     * not a split); spread is the pooled within-group standard deviation (m - 2 degrees of
     * freedom). */
    double gap, spread, cut; /* cut: the middle of the gap */
    size_t lower, upper;
    int flags;               /* ENSEMBLE_SPLIT_* that fired; 0: no split */
} ensemble_split;

/* The split test of members[nmembers][n]. SLOWSCAN_OK (the result may be flags = 0 with NaN
 * numbers when fewer than 4 members have a final value); SLOWSCAN_ENOMEM. */
SLOWSCAN_API
int slowscan_ensemble_split_test(const double *const *members, size_t nmembers, size_t n,
                                 const ensemble_split_options *options, ensemble_split *out);

/* A test pooled over the members: the mean of their statistics against the mean over their
 * surrogates' statistics, replicate j of every member pooled into replicate j of the mean
 * (members' surrogates are independent draws, so the pooled null is a null of the mean). */
typedef struct {
    double statistic; /* mean of the members' statistics */
    double p_value;   /* (1 + #{pooled_s >= pooled_obs}) / (M + 1), by the alternative; NaN
                         when a member has no statistic or no null */
    size_t null_used; /* replicates finite in every member */
} ensemble_pooled;

/* statistics[nmembers]; nulls[nmembers] of `replicates` values each (a NULL entry: that member
 * has no null). Non-finite values of a replicate leave it out. pooled_null (NULL, or room for
 * `replicates` values) receives the pooled replicates (NaN where left out) when p is made.
 * SLOWSCAN_OK, SLOWSCAN_ENOMEM. */
SLOWSCAN_API
int slowscan_ensemble_pooled_test(const double *statistics, const double *const *nulls,
                                  size_t nmembers, size_t replicates,
                                  significance_alternative alternative, ensemble_pooled *out,
                                  double *pooled_null);

#endif
