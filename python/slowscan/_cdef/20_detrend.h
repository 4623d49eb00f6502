/* detrend.h */
typedef enum {
    DETREND_GAUSSIAN, DETREND_GAUSSIAN_LINEAR, DETREND_MOVING, DETREND_LOESS, DETREND_LINEAR,
    DETREND_POLY, DETREND_DIFFERENCE, DETREND_NONE
} detrend_method;

typedef struct {
    detrend_method method;
    double bandwidth;
    int degree;
} detrend_spec;

int slowscan_detrend_parse_method(const char *text, detrend_spec *spec);
const char *slowscan_detrend_method_name(detrend_method method);
int slowscan_detrend_uses_bandwidth(detrend_method method);

typedef struct {
    double mean;
    double z, p;
    size_t samples;
    double effective;
} detrend_edge;

typedef struct {
    detrend_edge first, last;
    double r1;
    double level;
    int leaking;
} detrend_leakage;
