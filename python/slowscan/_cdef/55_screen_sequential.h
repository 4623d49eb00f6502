/* sequential.h (the configuration), screen_sequential.h (screen's rounds of surrogates) */
typedef enum {
    SEQUENTIAL_SPEND_ROUNDS = 0,
    SEQUENTIAL_SPEND_DRAWS
} sequential_spending;

typedef struct {
    double fdr;
    double epsilon;
    size_t max_per_series;
    size_t budget;
    size_t first_round;
    size_t block;
    int joint;
    sequential_spending spending;
} sequential_config;
sequential_config slowscan_sequential_config_default(void);

typedef struct screen_sequential screen_sequential;
typedef struct {
    sequential_config config;
    size_t series, per_series;
    size_t budget;
    size_t spent;
    size_t rounds, max_rounds;
    size_t tested;
    size_t undecided;
} screen_sequential_summary;

screen_sequential *slowscan_screen_sequential_alloc(const sequential_config *seq,
                                                    const screen_config *cfg, size_t series);
void slowscan_screen_sequential_free(screen_sequential *run);
int slowscan_screen_sequential_order(screen_sequential *run, const size_t *order);
screen_flag slowscan_screen_sequential_flag(const screen_sequential *run, size_t g, size_t j,
                                            const screen_test *test, screen_flag stored);
void slowscan_screen_sequential_interval(const screen_sequential *run, size_t g, size_t j,
                                         double *lo, double *hi);
screen_sequential_summary slowscan_screen_sequential_summary(const screen_sequential *run);
