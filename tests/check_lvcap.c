/* check_lvcap.c - launch-vehicle capability curves: reading, checks and
 * the monotone (Steffen) interpolation.  The tables here are built from
 * closed-form functions so that the expected values are exact
 * mathematics, not invented figures. */
#include "config.h"
#include "synodic.h"
#include "synodic/lvcap.h"
#include "testutil.h"

#include <stdio.h>
#include <string.h>
#include <unistd.h>

static char tmpdir[64];

static const char *write_file(const char *name, const char *text)
{
    static char path[256];
    snprintf(path, sizeof path, "%s/%s", tmpdir, name);
    FILE *f = fopen(path, "w");
    ck_assert_ptr_nonnull(f);
    fputs(text, f);
    fclose(f);
    return path;
}

static void setup(void)
{
    snprintf(tmpdir, sizeof tmpdir, "/tmp/sy_lvcapXXXXXX");
    ck_assert_ptr_nonnull(mkdtemp(tmpdir));
}

static void teardown(void)
{
    char cmd[128];
    snprintf(cmd, sizeof cmd, "rm -rf '%s'", tmpdir);
    if (system(cmd) != 0) fprintf(stderr, "could not remove %s\n", tmpdir);
}

/* Exact mathematics: on data from a straight line every Steffen slope
 * equals the line's slope (Steffen 1990, eqs. 11-13: the harmonic-type
 * mean of two equal secants is that secant), so the interpolant is the
 * line itself everywhere between the points. */
START_TEST(test_linear_data_is_reproduced_everywhere)
{
    double c3[] = {-2, 0, 3.5, 10, 11, 25, 60};
    double m[7];
    for (int k = 0; k < 7; k++) m[k] = 3000.0 - 40.0 * c3[k];
    sy_lvcap *cap;
    sy_error err;
    ck_assert_int_eq(sy_lvcap_from_table(c3, m, 7, "line", &cap, &err), SY_OK);
    for (double x = -2; x <= 60; x += 0.37) {
        double y;
        ck_assert_int_eq(sy_lvcap_mass(cap, x, &y, &err), SY_OK);
        ck_assert_msg(fabs(y - (3000.0 - 40.0 * x)) < 1e-9, "C3 %g: %.12g", x, y);
    }
    sy_lvcap_free(cap);
}
END_TEST

/* Exact mathematics: an interpolant passes through its nodes; Steffen's
 * method (1990) is monotone between nodes of monotone data, so on
 * non-increasing data every value between two nodes lies between their
 * masses and a dense sweep never rises. */
START_TEST(test_nodes_and_monotone_between)
{
    /* m = 2800 exp(-c3 / 22) at irregular C3, plus a flat stretch (a
     * fairing-limited plateau): both must stay monotone, no overshoot. */
    double c3[] = {0, 2, 3, 7, 12, 13, 13.5, 20, 31, 45, 60};
    double m[11];
    for (int k = 0; k < 11; k++) m[k] = 2800.0 * exp(-c3[k] / 22.0);
    m[0] = m[1] = m[2]; /* plateau at the low-C3 end */
    sy_lvcap *cap;
    sy_error err;
    ck_assert_int_eq(sy_lvcap_from_table(c3, m, 11, "exp", &cap, &err), SY_OK);
    for (int k = 0; k < 11; k++) {
        double y;
        ck_assert_int_eq(sy_lvcap_mass(cap, c3[k], &y, &err), SY_OK);
        ck_assert_msg(fabs(y - m[k]) < 1e-9 * m[k], "node %d: %.12g vs %.12g", k, y, m[k]);
    }
    double prev = INFINITY;
    for (int k = 0; k + 1 < 11; k++)
        for (int s = 0; s <= 200; s++) {
            double x = c3[k] + (c3[k + 1] - c3[k]) * s / 200.0, y;
            ck_assert_int_eq(sy_lvcap_mass(cap, x, &y, &err), SY_OK);
            ck_assert_msg(y <= prev + 1e-9, "rises at C3 %g: %.12g after %.12g", x, y, prev);
            ck_assert_msg(y <= m[k] + 1e-9 && y >= m[k + 1] - 1e-9,
                          "overshoot at C3 %g: %.12g outside [%g, %g]", x, y, m[k + 1], m[k]);
            prev = y;
        }
    sy_lvcap_free(cap);
}
END_TEST

/* Two rows: the straight line between them (exact mathematics). */
START_TEST(test_two_rows_linear)
{
    const char *p = write_file("two.csv", "10, 2000\n30, 1000\n");
    sy_lvcap *cap;
    sy_error err;
    ck_assert_int_eq(sy_lvcap_load(p, &cap, &err), SY_OK);
    double y;
    ck_assert_int_eq(sy_lvcap_mass(cap, 15, &y, &err), SY_OK);
    ck_assert_double_eq_tol(y, 1750.0, 1e-9);
    ck_assert_uint_eq(sy_lvcap_rows(cap), 2);
    sy_lvcap_free(cap);
}
END_TEST

/* Header, comments, blanks, CRLF and trailing comments are read; the
 * result equals the bare table. */
START_TEST(test_format_header_comments)
{
    const char *p = write_file("fmt.csv",
                               "# capability, made up from a formula for this test\r\n"
                               "\r\n"
                               "c3_km2_s2,mass_kg\r\n"
                               "  0 , 3000   # plateau start\r\n"
                               "# a comment between rows\n"
                               "10,2600\n"
                               "20,2200\n"
                               "40,1400\n");
    sy_lvcap *cap;
    sy_error err;
    ck_assert_msg(sy_lvcap_load(p, &cap, &err) == SY_OK, "%s", err.msg);
    ck_assert_uint_eq(sy_lvcap_rows(cap), 4);
    double lo, hi, y;
    sy_lvcap_range(cap, &lo, &hi);
    ck_assert_double_eq(lo, 0);
    ck_assert_double_eq(hi, 40);
    /* linear data 3000 - 40 c3: exact everywhere (see above) */
    ck_assert_int_eq(sy_lvcap_mass(cap, 33, &y, &err), SY_OK);
    ck_assert_double_eq_tol(y, 3000 - 40 * 33.0, 1e-9);
    sy_lvcap_free(cap);
}
END_TEST

/* Never extrapolate: outside the table is SY_ERR_RANGE and NAN; the ends
 * themselves are inside. */
START_TEST(test_refuses_outside)
{
    double c3[] = {5, 10, 20}, m[] = {2000, 1800, 1500};
    sy_lvcap *cap;
    sy_error err;
    ck_assert_int_eq(sy_lvcap_from_table(c3, m, 3, "t.csv", &cap, &err), SY_OK);
    double y;
    ck_assert_int_eq(sy_lvcap_mass(cap, 4.999, &y, &err), SY_ERR_RANGE);
    ck_assert(isnan(y));
    ck_assert_ptr_nonnull(strstr(err.msg, "does not extrapolate"));
    ck_assert_ptr_nonnull(strstr(err.msg, "t.csv"));
    ck_assert_int_eq(sy_lvcap_mass(cap, 20.001, &y, &err), SY_ERR_RANGE);
    ck_assert_int_eq(sy_lvcap_mass(cap, NAN, &y, &err), SY_ERR_RANGE);
    ck_assert_int_eq(sy_lvcap_mass(cap, 5, &y, &err), SY_OK);
    ck_assert_double_eq_tol(y, 2000, 1e-9);
    ck_assert_int_eq(sy_lvcap_mass(cap, 20, &y, &err), SY_OK);
    ck_assert_double_eq_tol(y, 1500, 1e-9);
    sy_lvcap_free(cap);
}
END_TEST

/* Bad tables: each refused with SY_ERR_PARSE naming FILE:LINE and a fix. */
START_TEST(test_bad_tables)
{
    static const struct { const char *text, *want_line, *want_word; } bad[] = {
        {"c3,mass\n0,2000\n10,1800\n5,1900\n", ":4:", "sort"},            /* unsorted   */
        {"0,2000\n10,1800\n10,1700\n", ":3:", "repeats"},                  /* duplicate  */
        {"0,2000\n10,-5\n", ":2:", "negative"},                           /* negative   */
        {"0,2000\n10,2100\n", ":2:", "cannot rise"},                      /* rising     */
        {"# only one\n0,2000\n", "1 data row", "at least 2"},             /* too few    */
        {"0,2000\n10,lots\n", ":2:", "mass"},                             /* not number */
        {"0,2000\nten,1800\n", ":2:", "C3"},                              /* not number */
        {"0,2000\n10,1800,5\n", ":2:", "two comma-separated"},            /* 3 fields   */
        {"0,2000\n10\n", ":2:", "two comma-separated"},                   /* 1 field    */
        {"0,2000\nnan,1800\n", ":2:", "finite"},                          /* NaN        */
        {"0,2000\n10,1e999\n", ":2:", "finite"},                          /* overflow   */
        {"", "0 data rows", "at least 2"},                                /* empty      */
    };
    for (size_t k = 0; k < sizeof bad / sizeof bad[0]; k++) {
        char name[32];
        snprintf(name, sizeof name, "bad%zu.csv", k);
        const char *p = write_file(name, bad[k].text);
        sy_lvcap *cap = (sy_lvcap *)1;
        sy_error err;
        err.msg[0] = '\0';
        ck_assert_int_eq(sy_lvcap_load(p, &cap, &err), SY_ERR_PARSE);
        ck_assert_ptr_null(cap);
        ck_assert_msg(strstr(err.msg, name) && strstr(err.msg, bad[k].want_line) &&
                          strstr(err.msg, bad[k].want_word),
                      "case %zu: '%s'", k, err.msg);
        ck_assert_ptr_null(strchr(err.msg, '\n'));
    }
    sy_lvcap *cap;
    sy_error err;
    ck_assert_int_eq(sy_lvcap_load("/nonexistent/cap.csv", &cap, &err), SY_ERR_IO);
    ck_assert_ptr_nonnull(strstr(err.msg, "/nonexistent/cap.csv"));
}
END_TEST

int main(void)
{
    Suite *s = suite_create("lvcap");
    TCase *tc = tcase_create("lvcap");
    tcase_add_checked_fixture(tc, setup, teardown);
    tcase_add_test(tc, test_linear_data_is_reproduced_everywhere);
    tcase_add_test(tc, test_nodes_and_monotone_between);
    tcase_add_test(tc, test_two_rows_linear);
    tcase_add_test(tc, test_format_header_comments);
    tcase_add_test(tc, test_refuses_outside);
    tcase_add_test(tc, test_bad_tables);
    suite_add_tcase(s, tc);
    return tu_run(s);
}
