/* Scaling by a power of two for data of extreme magnitude (see magnitude.h). */
#include "magnitude.h"

#include <math.h>

int magnitude_exponent(const double *x, size_t n)
{
    double top = 0.0;
    for (size_t i = 0; i < n; i++)
        if (isfinite(x[i]))
            top = fmax(top, fabs(x[i]));
    if (top == 0.0 || (top >= ldexp(1.0, -MAGNITUDE_BOUND_EXP) && top <= ldexp(1.0, MAGNITUDE_BOUND_EXP)))
        return 0;
    int e;
    frexp(top, &e); /* top = m 2^e, m in [0.5, 1) */
    return e;
}

void magnitude_scale(double *x, size_t n, int e)
{
    if (e != 0)
        for (size_t i = 0; i < n; i++)
            x[i] = ldexp(x[i], -e);
}
