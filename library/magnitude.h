/* Bringing data of extreme magnitude near 1 by a power of two (internal to the library).
 *
 * Sums of squares and fourth powers overflow beyond about 1e154 and 1e77 and lose their
 * digits to underflow below the reciprocals; a record in joules or in mol/m^3 can sit there
 * and a 1e300 one certainly does. Multiplying by 2^-e changes no significand bit, so every
 * ratio, rank, correlation and t-value computed afterwards is exactly what it is for the
 * unscaled data (scale invariance), and the caller gives back the units of what it reports.
 * Data whose largest magnitude lies within 2^-100 .. 2^100 are never touched. */
#ifndef SLOWSCAN_LIBRARY_MAGNITUDE_H
#define SLOWSCAN_LIBRARY_MAGNITUDE_H

#include <stddef.h>

enum { MAGNITUDE_BOUND_EXP = 100 };

/* e such that the largest finite |x| is in [2^(e-1), 2^e), or 0 when it is within the bounds
 * (or there is no finite non-zero value). */
int magnitude_exponent(const double *x, size_t n);
/* x[i] *= 2^-e (NaN stays NaN). */
void magnitude_scale(double *x, size_t n, int e);

#endif
