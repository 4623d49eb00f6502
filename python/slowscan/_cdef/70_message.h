/* message.h (the screening messages) */
typedef struct {
    const char *source;
    const char *series;
    const char *control_source;
    const screen_config *config;
    const char *const *option_names;
    const char *const *option_values;
} message_context;

message_context slowscan_message_context_default(void);
const char *slowscan_message_option_name(screen_option option);
size_t slowscan_message_refusal(char *buf, size_t size, const screen_detail *detail,
                                const message_context *ctx);
size_t slowscan_message_warning(char *buf, size_t size, const screen_warning *warning,
                                const message_context *ctx);
size_t slowscan_message_detrended(char *buf, size_t size, const screen_prepared *ps,
                                  const message_context *ctx);
const char *slowscan_message_reason(screen_reason reason);
size_t slowscan_message_insufficient(char *buf, size_t size, const screen_test *test,
                                     const message_context *ctx);
size_t slowscan_message_leakage(char *buf, size_t size, const detrend_leakage *leakage,
                                const message_context *ctx);
size_t slowscan_message_leakage_summary(char *buf, size_t size, size_t count, size_t tested,
                                        const char *const *first, size_t nfirst,
                                        const message_context *ctx);
size_t slowscan_message_sequential_floor(char *buf, size_t size,
                                         const screen_sequential_summary *summary);
size_t slowscan_message_sequential_undecided(char *buf, size_t size,
                                             const screen_sequential_summary *summary);
