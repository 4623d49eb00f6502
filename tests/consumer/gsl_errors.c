/* A program linked against libslowscan alone that drives the library into GSL's error
 * handler (tests/test_library.c builds and runs it). GSL's default handler abort()s; inside
 * the library it is off (library/library.c), so the calls below come back with a status.
 *
 * Built with -DDEFAULT_HANDLER (and GSL linked) the program first puts GSL's default handler
 * back: it must then abort — the proof that the first call really reaches a GSL error. */
#include <slowscan.h>

#include <math.h>
#include <stdio.h>
#ifdef DEFAULT_HANDLER
#include <gsl/gsl_errno.h>
#endif

int main(void)
{
#ifdef DEFAULT_HANDLER
    gsl_set_error_handler(NULL);
#endif
    /* A workspace for 2^50 samples: gsl_matrix_alloc cannot get the memory and reports
     * GSL_ENOMEM through the error handler (GSL manual, "Error handlers"). */
    ar1_drift_workspace *huge = slowscan_ar1_drift_alloc((size_t)1 << 50);
    printf("slowscan_ar1_drift_alloc(2^50): %s\n", huge ? "allocated" : "NULL");
    slowscan_ar1_drift_free(huge);

    /* A constant series: the drifting-AR(1) design is singular. */
    double x[64];
    for (size_t i = 0; i < 64; i++)
        x[i] = 3.0;
    ar1_drift_workspace *ws = slowscan_ar1_drift_alloc(64);
    ar1_drift_fit fit;
    int st = ws ? slowscan_ar1_drift_estimate(ws, x, 64, &fit) : SLOWSCAN_ENOMEM;
    printf("slowscan_ar1_drift_estimate(constant): %s\n", slowscan_strerror(st));
    slowscan_ar1_drift_free(ws);
    return huge == NULL && st == SLOWSCAN_ECONST ? 0 : 1;
}
