/* status.h, calendar.h */
enum slowscan_status {
    SLOWSCAN_OK = 0, SLOWSCAN_EINVAL, SLOWSCAN_ENOMEM, SLOWSCAN_ESHORT, SLOWSCAN_ECONST,
    SLOWSCAN_ENUMERIC, SLOWSCAN_EIO
};

typedef enum {
    CALENDAR_STANDARD = 0, CALENDAR_PROLEPTIC_GREGORIAN, CALENDAR_NOLEAP, CALENDAR_ALL_LEAP,
    CALENDAR_360_DAY, CALENDAR_JULIAN, CALENDAR_COUNT
} calendar_kind;

typedef struct {
    long year;
    int month, day;
    int hour, minute;
    double second;
    int offset_minutes;
} calendar_date;

typedef enum { DATE_YEAR = 0, DATE_MONTH, DATE_DAY, DATE_HOUR, DATE_MINUTE, DATE_SECOND } date_precision;

int slowscan_calendar_lookup(const char *name, calendar_kind *kind);
const char *slowscan_calendar_name(calendar_kind kind);

typedef enum { TIME_AXIS_NUMBER = 0, TIME_AXIS_DAYS, TIME_AXIS_MONTHS, TIME_AXIS_YEARS } time_axis_unit;

typedef struct {
    time_axis_unit unit;
    calendar_kind calendar;
    date_precision precision;
    int decimals;
    int backward;
} time_axis;

const char *slowscan_time_axis_unit_name(time_axis_unit unit);
int slowscan_time_axis_format(const time_axis *axis, double value, char *buffer, size_t size);
double slowscan_time_axis_decimal_year(const time_axis *axis, double value);
const char *slowscan_version(void);
int slowscan_time_axis_value(const time_axis *axis, const char *text, const char *format,
                             double *value);
