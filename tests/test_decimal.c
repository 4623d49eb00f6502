/* The fast path for a table's decimal cells (io/decimal.c): wherever it answers, its value is
 * bit for bit strtod's, and it leaves everything else to strtod.
 *
 * Source: glibc's strtod, which rounds correctly to nearest (C11 7.22.1.3 recommends it; glibc
 * does it for every input, recalled from memory), is the reference for every value; the
 * exactness of one multiplication or division by an exact power of ten below 10^23 is Clinger
 * 1990, "How to read floating point numbers accurately", PLDI. The strings are drawn: printf's
 * %g, %e and %f of random doubles, integers near 2^53, and random digit strings with a point
 * and an exponent; the edge cases are written out. */
#include "check.h"
#include "../io/io_internal.h"

#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* 1 when the fast path declines s, or gives strtod's value to the bit for a string strtod
 * reads whole. *taken counts the strings it answered. */
static int agrees(const char *s, size_t *taken)
{
    double fast;
    if (!io_decimal_exact(s, &fast))
        return 1;
    (*taken)++;
    char *end;
    double want = strtod(s, &end);
    return *end == '\0' && end != s && memcmp(&fast, &want, sizeof fast) == 0;
}

/* A random string of digits with a point somewhere (or none) and an exponent (or none). */
static void digit_string(check_rng *rng, char *s, size_t room)
{
    size_t digits = 1 + (size_t)(check_rng_uniform(rng) * 22);
    size_t point = (size_t)(check_rng_uniform(rng) * (double)(digits + 2)); /* past the end: none */
    size_t used = 0;
    if (check_rng_uniform(rng) < 0.5)
        s[used++] = '-';
    for (size_t i = 0; i < digits && used + 2 < room; i++) {
        if (i == point)
            s[used++] = '.';
        s[used++] = (char)('0' + (int)(check_rng_uniform(rng) * 10));
    }
    s[used] = '\0';
    if (check_rng_uniform(rng) < 0.5)
        snprintf(s + used, room - used, "e%d", (int)(check_rng_uniform(rng) * 60) - 30);
}

/* One drawn string checked; the first that differs is kept for the message. */
static void try_string(const char *s, size_t *tried, size_t *taken, size_t *wrong, char *first)
{
    (*tried)++;
    if (!agrees(s, taken) && !(*wrong)++)
        snprintf(first, 96, "%s", s);
}

static void drawn_strings(void)
{
    static const char *const formats[] = {"%.*g", "%.*e", "%.*f"};
    check_rng *rng = check_rng_alloc(20260);
    size_t tried = 0, wrong = 0, taken = 0;
    char s[96], first[96] = "";
    for (int k = 0; rng && k < 100000; k++) {
        double x = check_rng_gaussian(rng) *
                   pow(10.0, (double)((int)(check_rng_uniform(rng) * 40) - 20));
        int digits = 1 + (int)(check_rng_uniform(rng) * 17);
        for (int f = 0; f < 3; f++) {
            snprintf(s, sizeof s, formats[f], f == 1 ? digits - 1 : digits, x);
            try_string(s, &tried, &taken, &wrong, first);
        }
        long long near = (1LL << 53) + (long long)(check_rng_uniform(rng) * 64) - 32;
        snprintf(s, sizeof s, "%lld", k % 2 ? near : -near);
        try_string(s, &tried, &taken, &wrong, first);
        digit_string(rng, s, sizeof s);
        try_string(s, &tried, &taken, &wrong, first);
    }
    check_rng_free(rng);
    CHECK(rng && wrong == 0, "decimal fast path: %zu of %zu drawn strings differ from strtod "
          "(first: %s)", wrong, tried, first);
    CHECK(taken > tried / 2, "decimal fast path: answers most drawn strings (%zu of %zu)", taken,
          tried);
}

/* Cells as the benchmark and most tables write them (%.6g of values near 1): every one fast. */
static void usual_cells(void)
{
    check_rng *rng = check_rng_alloc(7);
    size_t taken = 0, wrong = 0;
    char s[64];
    for (int k = 0; rng && k < 20000; k++) {
        snprintf(s, sizeof s, "%.6g", check_rng_gaussian(rng) * (k % 3 ? 1.0 : 1e-4));
        size_t before = taken;
        wrong += !agrees(s, &taken) || taken == before;
    }
    check_rng_free(rng);
    CHECK(rng && wrong == 0, "decimal fast path: %%.6g cells all answered, as strtod (%zu not)",
          wrong);
}

static void edge_cases(void)
{
    /* answered: exact integers up to 2^53, powers to 10^22, signs, a bare point at either end */
    static const char *const fast[] = {"9007199254740992", "-9007199254740992", "1e22", "1E-22",
                                       "0.1", "+5", "1.", ".5", "-0.000", "00012.5000",
                                       "0.0000000000000000000001", "1234567890123456e-5"};
    /* declined: more than 2^53, powers beyond 22, 20 digits, and all that is not plain */
    static const char *const declined[] = {"9007199254740993", "1e23", "1e-23",
                                           "12345678901234567890", "0x10", "inf", "-Infinity", "nan", "1e", "1e+",
                                           "1.5x", ".", "-", "+", "", "e5", "1,5", " 1", "1e99999"};
    size_t taken = 0;
    int ok = 1;
    for (size_t i = 0; i < sizeof fast / sizeof fast[0]; i++) {
        size_t before = taken;
        ok &= agrees(fast[i], &taken) && taken == before + 1;
    }
    double v;
    ok &= io_decimal_exact("-0", &v) && v == 0.0 && signbit(v);
    for (size_t i = 0; i < sizeof declined / sizeof declined[0]; i++)
        ok &= !io_decimal_exact(declined[i], &v);
    CHECK(ok, "decimal fast path: written-out edge cases answered or declined as stated");
}

void suite_decimal(void)
{
    drawn_strings();
    usual_cells();
    edge_cases();
}
