/* Pre-processing of forced runs that changes the feedback estimate and is usually scripted
 * by hand: anomalies against a baseline (control) run, a noise-variance ratio from it, annual
 * means of monthly data by month length, and area-weighted means of a grid. */
#include "slowscan/feedback.h"
#include "slowscan/status.h"

#include <gsl/gsl_fit.h>
#include <gsl/gsl_math.h> /* M_PI, which strict C11 lacks */
#include <gsl/gsl_statistics_double.h>
#include <math.h>
#include <stdlib.h>

/* The finite baseline samples with from <= time <= until, copied into x, y; their count. */
static size_t baseline_period(const double *bt, const double *bv, size_t nb, double from,
                              double until, double *x, double *y)
{
    size_t m = 0;
    double tol = 1e-9 * (fabs(from) + fabs(until) + 1);
    for (size_t i = 0; i < nb; i++)
        if (isfinite(bv[i]) && bt[i] >= from - tol && bt[i] <= until + tol) {
            x[m] = bt[i];
            y[m++] = bv[i];
        }
    return m;
}

/* The least-squares line through the baseline over [from, until] (slope 0 for a mean). */
static int baseline_line(const double *bt, const double *bv, size_t nb, double from,
                         double until, int drift, double *c0, double *c1)
{
    double *x = malloc(2 * (nb ? nb : 1) * sizeof *x);
    if (!x)
        return SLOWSCAN_ENOMEM;
    size_t m = baseline_period(bt, bv, nb, from, until, x, x + nb);
    int st = SLOWSCAN_OK;
    double c00, c01, c11, ss;
    *c1 = 0;
    if (m < (drift ? 2u : 1u))
        st = SLOWSCAN_ESHORT;
    else if (!drift)
        *c0 = gsl_stats_mean(x + nb, 1, m);
    else if (gsl_fit_linear(x, 1, x + nb, 1, m, c0, c1, &c00, &c01, &c11, &ss))
        st = SLOWSCAN_ENUMERIC;
    free(x);
    return st;
}

int slowscan_feedback_baseline_covers(const double *time, size_t n, const double *btime,
                                      const double *bvalues, size_t nb, double offset,
                                      double *first, double *last)
{
    *first = *last = NAN;
    for (size_t i = 0; i < nb; i++)
        if (isfinite(bvalues[i])) {
            if (isnan(*first))
                *first = btime[i];
            *last = btime[i];
        }
    if (n == 0)
        return SLOWSCAN_ESHORT;
    double from = time[0] + offset, until = time[n - 1] + offset;
    double step = nb > 1 ? (btime[nb - 1] - btime[0]) / (double)(nb - 1) : 0;
    /* NaN ends (no finite sample) fail both comparisons */
    return *first <= from + 0.5 * step && *last >= until - 0.5 * step ? SLOWSCAN_OK
                                                                        : SLOWSCAN_ESHORT;
}

int slowscan_feedback_anomalies(const double *time, double *values, size_t n,
                                const double *btime, const double *bvalues, size_t nb,
                                double offset, feedback_baseline_mode mode)
{
    if (!time || !values || !btime || !bvalues || n == 0 || !isfinite(offset))
        return SLOWSCAN_EINVAL;
    double c0, c1;
    int st = baseline_line(btime, bvalues, nb, time[0] + offset, time[n - 1] + offset,
                           mode == FEEDBACK_BASELINE_DRIFT, &c0, &c1);
    if (st != SLOWSCAN_OK)
        return st;
    for (size_t i = 0; i < n; i++)
        values[i] -= c0 + c1 * (time[i] + offset);
    return SLOWSCAN_OK;
}

/* Sample variance of a series about its least-squares line over [from, until]. */
static int detrended_variance(const double *bt, const double *bv, size_t nb, double from,
                              double until, double *var)
{
    double *x = malloc(2 * (nb ? nb : 1) * sizeof *x);
    if (!x)
        return SLOWSCAN_ENOMEM;
    size_t m = baseline_period(bt, bv, nb, from, until, x, x + nb);
    double c0, c1, c00, c01, c11, ss = NAN;
    int st = m < 3 ? SLOWSCAN_ESHORT
             : gsl_fit_linear(x, 1, x + nb, 1, m, &c0, &c1, &c00, &c01, &c11, &ss)
                 ? SLOWSCAN_ENUMERIC : SLOWSCAN_OK;
    *var = ss / (double)(m - 2);
    free(x);
    return st;
}

int slowscan_feedback_noise_ratio(const double *btime, const double *bflux,
                                  const double *bresponse, size_t nb, double from,
                                  double until, double *ratio)
{
    if (!btime || !bflux || !bresponse || !ratio)
        return SLOWSCAN_EINVAL;
    double vn, vt;
    int st = detrended_variance(btime, bflux, nb, from, until, &vn);
    if (st == SLOWSCAN_OK)
        st = detrended_variance(btime, bresponse, nb, from, until, &vt);
    if (st == SLOWSCAN_OK && !(vn > 0 && vt > 0))
        st = SLOWSCAN_ECONST;
    *ratio = st == SLOWSCAN_OK ? vn / vt : NAN;
    return st;
}

/* Mean of one year starting at month[i] (January), weighted by month length; NaN when a
 * month is missing. */
static double year_mean(calendar_kind cal, long year, const double *values)
{
    double sum = 0, days = 0;
    for (int m = 0; m < 12; m++) {
        int d = slowscan_calendar_month_days(cal, year, m + 1);
        if (!isfinite(values[m]) || d <= 0)
            return NAN;
        sum += d * values[m];
        days += d;
    }
    return sum / days;
}

int slowscan_feedback_annual_means(calendar_kind calendar, const double *month,
                                   const double *values, size_t n, double *years,
                                   double *means, size_t *nyears)
{
    if (!month || !values || !years || !means || !nyears)
        return SLOWSCAN_EINVAL;
    *nyears = 0;
    for (size_t i = 1; i < n; i++)
        if (month[i] - month[i - 1] != 1)
            return SLOWSCAN_EINVAL; /* not consecutive month indices */
    size_t i = 0;
    while (i < n && (long)floor(month[i]) - 12 * (long)floor(month[i] / 12) != 0)
        i++; /* the first January */
    for (; i + 12 <= n; i += 12) {
        long year = (long)floor(month[i] / 12);
        years[*nyears] = (double)year;
        means[(*nyears)++] = year_mean(calendar, year, values + i);
    }
    return *nyears > 0 ? SLOWSCAN_OK : SLOWSCAN_ESHORT;
}

double slowscan_feedback_weighted_mean(const double *values, const double *weights,
                                       size_t cells)
{
    double sum = 0, wsum = 0;
    for (size_t c = 0; c < cells; c++)
        if (isfinite(values[c]) && isfinite(weights[c])) {
            sum += weights[c] * values[c];
            wsum += weights[c];
        }
    return wsum > 0 ? sum / wsum : NAN;
}

int slowscan_feedback_latitude_weights(const double *latitude, size_t cells, double *weights)
{
    for (size_t c = 0; c < cells; c++) {
        if (!(latitude[c] >= -90 && latitude[c] <= 90))
            return SLOWSCAN_EINVAL;
        weights[c] = cos(latitude[c] * M_PI / 180);
    }
    return SLOWSCAN_OK;
}
