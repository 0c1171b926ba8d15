/* testutil.h - small helpers shared by the Check test programs. */
#ifndef SYNODIC_TESTUTIL_H
#define SYNODIC_TESTUTIL_H

#include "synodic.h"

#include <check.h>
#include <math.h>
#include <stdio.h>
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

/* 1 when both files open and hold the same bytes (a missing file is never
 * equal), else 0. */
static inline int tu_files_equal(const char *a, const char *b)
{
    FILE *fa = fopen(a, "rb"), *fb = fopen(b, "rb");
    int same = fa && fb;
    while (same) {
        int ca = fgetc(fa), cb = fgetc(fb);
        if (ca != cb) same = 0;
        if (ca == EOF || cb == EOF) break;
    }
    if (fa) fclose(fa);
    if (fb) fclose(fb);
    return same;
}

/* Fixture of the Earth -> Mars programs: a fresh catalogue and its two
 * bodies; the caller frees *cat with sy_catalog_free in its teardown. */
static inline void tu_earth_mars(sy_catalog **cat, const sy_body **earth, const sy_body **mars)
{
    *cat = sy_catalog_new();
    ck_assert_int_eq(sy_catalog_find(*cat, "Earth", earth, NULL), SY_OK);
    ck_assert_int_eq(sy_catalog_find(*cat, "Mars", mars, NULL), SY_OK);
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
