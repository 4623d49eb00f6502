/* make validate's table of `--tail gpd`'s size (tests/tail_size.c): i.i.d. normal and
 * Student t (5 df) nulls, M = 1000 and 10^4, alpha 1e-4, 1e-5, 1e-6; the reported p (the
 * upper limit) and, for comparison, the point estimate. Usage: tail_size [SETS [NULL M]]
 * (NULL normal or t5: that row only). */
#include "../tail_size.h"

#include <stdio.h>
#include <stdlib.h>
#include <string.h>

int main(int argc, char **argv)
{
    int sets = argc > 1 ? atoi(argv[1]) : 300;
    const double alpha[3] = {1e-4, 1e-5, 1e-6};
    const char *names[2] = {"normal", "Student t 5 df"};
    const size_t ms[2] = {1000, 10000};
    printf("| null | M | p | size/alpha at 1e-4 | at 1e-5 | at 1e-6 | p/exact at 1e-5 (median) "
           "| ms per estimate |\n|---|---|---|---|---|---|---|---|\n");
    const char *only = argc > 3 ? argv[2] : NULL;
    size_t only_m = argc > 3 ? (size_t)atol(argv[3]) : 0;
    for (int n = 0; n < 2; n++)
        for (int k = 0; k < 2; k++)
            for (int point = 1; point >= 0; point--) {
                if ((point && getenv("TAIL_SIZE_LIMIT_ONLY")) ||
                    (!point && getenv("TAIL_SIZE_POINT_ONLY")))
                    continue;
                if (only && (strcmp(only, n ? "t5" : "normal") != 0 || only_m != ms[k]))
                    continue;
                tail_size_result r;
                tail_size_run((tail_null)n, ms[k], sets, 5000, alpha, point, 1, &r);
                printf("| %s | %zu | %s |", names[n], ms[k], point ? "point" : "upper limit");
                for (int a = 0; a < 3; a++)
                    printf(" %.2f [%.2f, %.2f] |", r.size[a], r.lo[a], r.hi[a]);
                printf(" %.2f (%d of %d sets) | %.1f |\n", point ? r.median_point : r.median_ratio,
                       r.used_exact, sets, r.ms_per_estimate);
                fflush(stdout);
            }
    return 0;
}
