/* screen_batch.h, screen_store.h, screen_memory.h */
enum { SCREEN_BATCH_END = -1 };
typedef struct {
    int (*next)(void *state, size_t index, screen_input *in, screen_detail *detail);
    void (*release)(void *state, size_t index);
    size_t count;
    void *state;
} screen_source;

typedef struct {
    size_t index;
    screen_input input;
    screen_prepared prepared;
    screen_result result;
    screen_detail detail;
} screen_batch_failure;

typedef struct screen_store screen_store;
screen_store *slowscan_screen_store_alloc(size_t spill_after, const char *dir);
void slowscan_screen_store_free(screen_store *store);
size_t slowscan_screen_store_count(const screen_store *store);
int slowscan_screen_store_decide(screen_store *store, double fdr);
typedef struct {
    const char *name;
    screen_result result;
    double q_value[12];
    screen_flag flag[12];
    const void *extra;
    size_t extra_size;
} screen_stored;
int slowscan_screen_store_read(screen_store *store, size_t index, screen_stored *out,
                               io_error *err);

typedef struct {
    const series_table *table;
    const char *source;
    screen_store *store;
    screen_progress_fn progress;
    void *context;
    size_t stored;
    io_error error;
    screen_sequential *sequential;
    const series_table *control;
    const char *control_source;
    screen_source *series;
} screen_memory_run;
screen_memory_run slowscan_screen_memory_default(void);
screen_input slowscan_screen_control_input(const series_table *control, const char *name,
                                           const char *source);
int slowscan_screen_memory_run(const screen_config *cfg, screen_memory_run *run,
                               screen_batch_failure *failure);
enum { SCREEN_STORE_SPILL_AFTER = 4096 };
