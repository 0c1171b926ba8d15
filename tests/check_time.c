/* check_time.c - calendar <-> Julian date, the date parser, and the
 * ecliptic <-> EME2000 rotation, against ERFA (Debian liberfa-dev). */
#include "config.h"
#include "synodic.h"
#include "testutil.h"

#include <erfa.h>
#include <erfam.h>
#include <string.h>

/* Calendar -> JD against ERFA's eraCal2jd (IAU SOFA algorithm) across
 * 1800-2200 on every 37th day; exact to the last bit of a half-day. */
START_TEST(test_cal2jd_vs_erfa)
{
    int n = 0;
    for (int y = 1800; y <= 2200; y++)
        for (int m = 1; m <= 12; m++)
            for (int d = 1; d <= 28; d += 9) {
                double djm0, djm;
                ck_assert_int_eq(eraCal2jd(y, m, d, &djm0, &djm), 0);
                double jd = sy_jd_from_calendar(y, m, d, 0, 0, 0.0);
                ck_assert_msg(jd == djm0 + djm, "%d-%d-%d: %.1f vs %.1f", y, m, d, jd, djm0 + djm);
                n++;
            }
    ck_assert_int_gt(n, 10000);
}
END_TEST

/* JD -> calendar against ERFA's eraJd2cal, including times of day. */
START_TEST(test_jd2cal_vs_erfa)
{
    for (double jd = 2378496.5; jd < 2524594.0; jd += 13.37) {
        int ey, em, ed, y, m, d, hh, mi;
        double efd, ss;
        ck_assert_int_eq(eraJd2cal(jd, 0.0, &ey, &em, &ed, &efd), 0);
        sy_calendar_from_jd(jd, &y, &m, &d, &hh, &mi, &ss);
        ck_assert_int_eq(y, ey);
        ck_assert_int_eq(m, em);
        ck_assert_int_eq(d, ed);
        double fd = (hh * 3600 + mi * 60 + ss) / 86400.0;
        ck_assert_double_eq_tol(fd, efd, 1e-9);
    }
}
END_TEST

/* Known epochs (IAU definition and common practice). */
START_TEST(test_known_epochs)
{
    double jd;
    ck_assert_int_eq(sy_date_parse("2000-01-01T12:00", &jd, NULL), SY_OK);
    ck_assert_double_eq(jd, SY_J2000_JD); /* J2000.0 = JD 2451545.0 (IAU) */
    ck_assert_int_eq(sy_date_parse("JD2461234.5", &jd, NULL), SY_OK);
    ck_assert_double_eq(jd, 2461234.5);
    ck_assert_int_eq(sy_date_parse("jd 2461234.25", &jd, NULL), SY_OK);
    ck_assert_double_eq(jd, 2461234.25);
    ck_assert_int_eq(sy_date_parse("2033-04-10T06:30:15", &jd, NULL), SY_OK);
    double e0, e1;
    eraCal2jd(2033, 4, 10, &e0, &e1);
    ck_assert_double_eq_tol(jd, e0 + e1 + (6 * 3600 + 30 * 60 + 15) / 86400.0, 1e-9);
    /* 1858-11-17 is MJD 0 = JD 2400000.5 (common practice) */
    ck_assert_int_eq(sy_date_parse("1858-11-17", &jd, NULL), SY_OK);
    ck_assert_double_eq(jd, 2400000.5);
    /* Leap days: 2000 is a leap year, 1900 and 2100 are not (Gregorian). */
    ck_assert_int_eq(sy_date_parse("2000-02-29", &jd, NULL), SY_OK);
    ck_assert_int_ne(sy_date_parse("1900-02-29", &jd, NULL), SY_OK);
    ck_assert_int_ne(sy_date_parse("2100-02-29", &jd, NULL), SY_OK);
    /* Proleptic Gregorian before 1582: 3000 BC is astronomical year -2999. */
    ck_assert_int_eq(sy_date_parse("-2999-01-01", &jd, NULL), SY_OK);
    double b0, b1;
    eraCal2jd(-2999, 1, 1, &b0, &b1); /* ERFA is Gregorian for all years */
    ck_assert_double_eq(jd, b0 + b1);
}
END_TEST

START_TEST(test_round_trip_format)
{
    char buf[40];
    for (double jd = 1000000.5; jd < 3000000.0; jd += 1234.56789) {
        double back;
        sy_date_format(jd, 1, buf, sizeof buf);
        ck_assert_int_eq(sy_date_parse(buf, &back, NULL), SY_OK);
        ck_assert_msg(fabs(back - jd) * 86400.0 <= 0.5 + 1e-3, "%s: %.9f vs %.9f", buf, back, jd);
    }
    /* Rounding up to midnight rolls the date. */
    sy_date_format(2451545.0 + 0.5 - 0.2 / 86400.0, 1, buf, sizeof buf);
    ck_assert_str_eq(buf, "2000-01-02T00:00:00");
    sy_date_format(2463697.5, 0, buf, sizeof buf);
    ck_assert_str_eq(buf, "2033-04-10");
}
END_TEST

/* The accepted forms of seconds (ISO 8601 style SS and SS.fff). */
START_TEST(test_seconds_forms)
{
    double a, b;
    ck_assert_int_eq(sy_date_parse("2033-04-10T12:00:05", &a, NULL), SY_OK);
    ck_assert_int_eq(sy_date_parse("2033-04-10T12:00:05.250", &b, NULL), SY_OK);
    ck_assert_double_eq_tol((b - a) * 86400.0, 0.25, 1e-4);
    ck_assert_int_eq(sy_date_parse("2033-04-10T12:00", &b, NULL), SY_OK);
    ck_assert_double_eq_tol((a - b) * 86400.0, 5.0, 1e-4);
    ck_assert_int_eq(sy_date_parse("JD2463697.75", &a, NULL), SY_OK);
    ck_assert_double_eq(a, 2463697.75);
}
END_TEST

/* Impossible dates name the offending field. */
START_TEST(test_bad_dates)
{
    static const struct { const char *text, *field; } bad[] = {
        {"2033-02-30", "day 30"},  {"2033-13-01", "month 13"},
        {"2033-00-10", "month 0"}, {"2033-04-31", "day 31"},
        {"2033-04-10T24:00", "hour 24"}, {"2033-04-10T12:60", "minute 60"},
        {"2033-04-10T12:00:61", "second 61"}, {"2033/04/10", "year"},
        {"tomorrow", "year"}, {"JDx", "Julian date"}, {"JD", "Julian date"},
        {"", "empty"}, {"2033-04-10junk", "unexpected"},
        /* seconds are SS or SS.fff (ISO 8601 style), nothing strtod
         * would also read; a Julian date is decimal */
        {"2033-04-10T12:00:0x1p3", "seconds"}, {"2033-04-10T12:00:1e1", "seconds"},
        {"2033-04-10T12:00:5", "seconds"}, {"2033-04-10T12:00:05.", "seconds"},
        {"2033-04-10T12:00:+5", "seconds"}, {"JD0x1p21", "Julian date"},
    };
    for (size_t i = 0; i < sizeof bad / sizeof bad[0]; i++) {
        sy_error err = {{0}};
        double jd = -1;
        ck_assert_int_eq(sy_date_parse(bad[i].text, &jd, &err), SY_ERR_PARSE);
        ck_assert_msg(strstr(err.msg, bad[i].field) != NULL, "'%s': message '%s' lacks '%s'",
                      bad[i].text, err.msg, bad[i].field);
        ck_assert_double_eq(jd, -1);
    }
}
END_TEST

/* Ecliptic -> EME2000 against ERFA: R1(-eps0) with eps0 from eraObl80 at
 * J2000, which is the IAU 1976 value 84381.448 arcsec. */
START_TEST(test_frames_vs_erfa)
{
    double eps = eraObl80(2451545.0, 0.0);
    ck_assert_double_eq_tol(eps * ERFA_DR2AS, 84381.448, 1e-6);
    double rm[3][3];
    eraIr(rm);
    eraRx(-eps, rm); /* equatorial = Rx(-eps) ecliptic */
    double v[3] = {0.3, -1.2, 0.7}, eq[3], ref[3], back[3];
    sy_ecl_to_eq(v, eq);
    eraRxp(rm, v, ref);
    for (int k = 0; k < 3; k++) ck_assert_double_eq_tol(eq[k], ref[k], 1e-15);
    sy_eq_to_ecl(eq, back);
    for (int k = 0; k < 3; k++) ck_assert_double_eq_tol(back[k], v[k], 1e-15);
    /* The ecliptic pole lies at declination 90 - eps in EME2000. */
    double z[3] = {0, 0, 1}, zq[3];
    sy_ecl_to_eq(z, zq);
    ck_assert_double_eq_tol(asin(zq[2]), M_PI / 2 - eps, 1e-15);
    ck_assert_double_lt(zq[1], 0.0); /* pole towards RA 270 deg */
}
END_TEST

int main(void)
{
    Suite *s = suite_create("time and frames");
    TCase *tc = tcase_create("core");
    tcase_add_test(tc, test_cal2jd_vs_erfa);
    tcase_add_test(tc, test_jd2cal_vs_erfa);
    tcase_add_test(tc, test_known_epochs);
    tcase_add_test(tc, test_round_trip_format);
    tcase_add_test(tc, test_bad_dates);
    tcase_add_test(tc, test_seconds_forms);
    tcase_add_test(tc, test_frames_vs_erfa);
    suite_add_tcase(s, tc);
    return tu_run(s);
}
