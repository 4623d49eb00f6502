/* Decimal numbers of a table's cells without strtod, when that is exact (io_internal.h). A cell
 * such as "-0.123456" or "1.5e-05" has few digits: its digits as an integer m and its power of
 * ten p give the value as m * 10^p, and when m <= 2^53 and |p| <= 22 both m and 10^|p| are
 * doubles exactly, so one IEEE multiplication or division rounds the true value once, to
 * nearest: the correctly rounded value strtod returns (Clinger 1990, "How to read floating
 * point numbers accurately", PLDI; the "fast path"). glibc's strtod takes the long road for
 * every cell: it was over a third of the instructions spent loading a table as the batch
 * benchmark writes it (callgrind, 400 series x 500 rows: 343 M, and 221 M with this path).
 * Anything else (more digits, larger powers, hexadecimal, inf, nan, stray characters) is left
 * to strtod, so what is accepted and what a value is stay strtod's. */
#include "io_internal.h"

#include <float.h>
#include <stdint.h>

/* 10^0 .. 10^22, all exact in a double. */
static const double POWERS_OF_TEN[] = {1e0,  1e1,  1e2,  1e3,  1e4,  1e5,  1e6,  1e7,
                                       1e8,  1e9,  1e10, 1e11, 1e12, 1e13, 1e14, 1e15,
                                       1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22};

enum { MAX_DIGITS = 19, MAX_POWER = 22 }; /* 19 digits fit a uint64_t */

/* Digits from *p into *m; *count significant ones so far (leading zeros are not), *seen
 * all. 0 when there are too many to hold. */
static int take_digits(const char **p, uint64_t *m, int *count, int *seen)
{
    for (; **p >= '0' && **p <= '9'; (*p)++, (*seen)++) {
        if (*m == 0 && **p == '0')
            continue;
        if (++*count > MAX_DIGITS)
            return 0;
        *m = *m * 10 + (uint64_t)(**p - '0');
    }
    return 1;
}

int io_decimal_exact(const char *s, double *v)
{
#if FLT_EVAL_METHOD != 0 /* wider intermediate results would round twice */
    (void)s, (void)v;
    return 0;
#else
    const char *p = s;
    int negative = *p == '-';
    p += *p == '-' || *p == '+';
    uint64_t m = 0;
    int count = 0, whole = 0, fraction = 0;
    if (!take_digits(&p, &m, &count, &whole))
        return 0;
    if (*p == '.') {
        p++;
        if (!take_digits(&p, &m, &count, &fraction))
            return 0;
    }
    if (whole + fraction == 0)
        return 0;
    long power = 0;
    if (*p == 'e' || *p == 'E') {
        p++;
        int below = *p == '-';
        p += *p == '-' || *p == '+';
        if (*p < '0' || *p > '9')
            return 0;
        for (; *p >= '0' && *p <= '9' && power <= 1000; p++)
            power = power * 10 + (*p - '0');
        power = below ? -power : power;
    }
    power -= fraction;
    if (*p != '\0' || m > ((uint64_t)1 << 53) || power < -MAX_POWER || power > MAX_POWER)
        return 0;
    double x = (double)m;
    x = power < 0 ? x / POWERS_OF_TEN[-power] : x * POWERS_OF_TEN[power];
    *v = negative ? -x : x;
    return 1;
#endif
}
