/* io.h, time_units.h (the parts a binding uses) */
typedef struct {
    char message[1024];
} io_error;

typedef struct {
    size_t variable;
    size_t cell;
} grid_position;

typedef struct {
    char *source;
    char *time_name;
    size_t n;
    size_t nseries;
    double *time;
    char **names;
    double **values;
    size_t *rows;
    time_axis axis;
    char **skipped;
    size_t nskipped;
    size_t coded_missing;
    grid_position *grid;
} series_table;

void slowscan_series_table_free(series_table *table);

typedef struct {
    calendar_kind calendar;
    double unit_days;
    calendar_date origin;
    double origin_days;
    date_precision origin_precision;
    char unit[32];
} time_units;

typedef enum {
    TIME_UNITS_OK = 0, TIME_UNITS_NO_SINCE, TIME_UNITS_UNKNOWN_UNIT,
    TIME_UNITS_VARIABLE_LENGTH, TIME_UNITS_BAD_DATE, TIME_UNITS_NO_DATABASE
} time_units_problem;
int slowscan_time_units_parse(const char *text, calendar_kind calendar, time_units *units,
                              time_units_problem *problem);
const char *slowscan_time_units_problem_text(time_units_problem problem);

typedef struct {
    const char *time_column;
    const char *vars;
    calendar_kind calendar;
    const char *time_format;
    const time_units *units;
    int age;
    const double *missing;
    size_t nmissing;
} csv_read_options;

csv_read_options slowscan_csv_read_options_default(void);

int slowscan_table_from_memory(const char *source, const char *time_name,
                               const char *const *time_cells, size_t n,
                               const char *const *names, const double *const *values,
                               size_t nseries, const csv_read_options *options,
                               series_table *table, io_error *err);
int slowscan_table_select_span(series_table *table, double from, double until, io_error *err);
int slowscan_table_regularize(series_table *table, size_t *gaps, io_error *err);
int slowscan_table_resample_within(series_table *table, double step, double max_gap,
                                   io_error *err);
int slowscan_table_log(series_table *table, io_error *err);

typedef struct {
    double value;
    size_t count;
    size_t first_index;
    size_t first_row;
} suspect_code;
int slowscan_table_suspect_code(const series_table *table, size_t k, suspect_code *found);

/* netcdf_input.h: a grid cell's series name */
size_t slowscan_netcdf_series_name(char *buf, size_t size, const char *variable,
                                   const char *const *coord_name, const double *coord_value,
                                   size_t ncoords);

/* netcdf_maps.h: the maps' long_names */
typedef enum {
    NETCDF_MAP_STATISTIC = 0,
    NETCDF_MAP_P_VALUE,
    NETCDF_MAP_Q_VALUE,
    NETCDF_MAP_FLAG
} netcdf_map_kind;
size_t slowscan_netcdf_maps_long_name(char *buf, size_t size, netcdf_map_kind kind, int test,
                                      const char *var, int tail_estimates);
