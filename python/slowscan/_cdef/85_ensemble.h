/* ensemble.h (the grouping, the mean and the split test; not the pooled test) and its two
 * messages of message.h: what feedback and timescales need for ensemble=True */
typedef struct {
    const char *const *members;
    size_t nmembers;
    size_t min_members;
} ensemble_grouping;
ensemble_grouping slowscan_ensemble_grouping_default(void);

typedef enum {
    ENSEMBLE_RULE_NONE = 0, ENSEMBLE_RULE_NO_MEMBERS, ENSEMBLE_RULE_FEW_MEMBERS,
    ENSEMBLE_RULE_MISSING_MEMBER, ENSEMBLE_RULE_MIXED_LENGTHS, ENSEMBLE_RULE_FEW_LISTED
} ensemble_rule;

typedef struct {
    ensemble_rule rule;
    size_t series, other;
    size_t count, need;
    const char *member;
} ensemble_detail;

typedef struct {
    char *name;
    size_t nmembers;
    size_t *members;
} ensemble_group;

typedef struct {
    ensemble_group *groups;
    size_t ngroups;
} ensemble_set;

int slowscan_ensemble_group(const char *const *names, const size_t *lengths, size_t count,
                            const ensemble_grouping *how, ensemble_set *out,
                            ensemble_detail *detail);
void slowscan_ensemble_set_free(ensemble_set *set);
int slowscan_ensemble_mean(const double *const *members, size_t nmembers, size_t n,
                           double *mean);

typedef struct {
    double final_share;
    double bimodality_limit;
    double gap_ratio;
} ensemble_split_options;
ensemble_split_options slowscan_ensemble_split_options_default(void);

typedef struct {
    size_t members;
    double bimodality;
    double gap, spread, cut;
    size_t lower, upper;
    int flags;
} ensemble_split;
int slowscan_ensemble_split_test(const double *const *members, size_t nmembers, size_t n,
                                 const ensemble_split_options *options, ensemble_split *out);

size_t slowscan_message_ensemble_refusal(char *buf, size_t size, const ensemble_detail *detail,
                                         const char *const *names, const char *option,
                                         const message_context *ctx);
size_t slowscan_message_ensemble_split(char *buf, size_t size, const char *ensemble,
                                       const ensemble_split *split,
                                       const ensemble_split_options *options,
                                       const message_context *ctx);
