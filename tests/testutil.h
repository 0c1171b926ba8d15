/* testutil.h - small helpers shared by the Check test programs. */
#ifndef SYNODIC_TESTUTIL_H
#define SYNODIC_TESTUTIL_H

#include <check.h>
#include <math.h>
#include <stdlib.h>

/* Relative difference with a floor, so that values near zero compare by
 * absolute difference against `floor`. */
static inline double tu_reldiff(double a, double b, double floor)
{
    double s = fabs(b) > floor ? fabs(b) : floor;
    return fabs(a - b) / s;
}

static inline double tu_norm3(const double v[3])
{
    return sqrt(v[0] * v[0] + v[1] * v[1] + v[2] * v[2]);
}

static inline double tu_dist3(const double a[3], const double b[3])
{
    double d[3] = {a[0] - b[0], a[1] - b[1], a[2] - b[2]};
    return tu_norm3(d);
}

/* Run a suite and return the process exit status automake expects. */
static inline int tu_run(Suite *s)
{
    SRunner *sr = srunner_create(s);
    srunner_run_all(sr, CK_NORMAL);
    int failed = srunner_ntests_failed(sr);
    srunner_free(sr);
    return failed == 0 ? EXIT_SUCCESS : EXIT_FAILURE;
}

#endif
