/* check_transfer.c - transfer figures against closed-form results. */
#include "config.h"
#include "synodic.h"
#include "testutil.h"

#include <string.h>

#define MU SY_GM_SUN_KM3_S2

/* Two invented circular, coplanar heliocentric orbits (radii 1.0 and
 * 1.6 AU).  The Hohmann transfer between them (Hohmann 1925; any
 * astrodynamics text, e.g. Curtis, "Orbital Mechanics for Engineering
 * Students", sec. 6.2) has closed-form end speeds and time of flight:
 *   v_inf1 = sqrt(mu/r1) (sqrt(2 r2/(r1+r2)) - 1)
 *   v_inf2 = sqrt(mu/r2) (1 - sqrt(2 r1/(r1+r2)))
 *   tof    = pi sqrt(((r1+r2)/2)^3 / mu)
 * At exactly 180 deg the Lambert plane is undefined, so the arrival point
 * is placed `delta` short of 180 deg; the figures then differ from
 * Hohmann's by O(delta^2) for coplanar orbits. */
static void circular_state(double r, double ang, double pos[3], double vel[3])
{
    double v = sqrt(MU / r);
    pos[0] = r * cos(ang); pos[1] = r * sin(ang); pos[2] = 0;
    vel[0] = -v * sin(ang); vel[1] = v * cos(ang); vel[2] = 0;
}

START_TEST(test_hohmann_limit)
{
    const double r1 = 1.0 * SY_AU_KM, r2 = 1.6 * SY_AU_KM;
    const double a = 0.5 * (r1 + r2);
    const double tof = M_PI * sqrt(a * a * a / MU);
    const double vinf1 = sqrt(MU / r1) * (sqrt(2 * r2 / (r1 + r2)) - 1);
    const double vinf2 = sqrt(MU / r2) * (1 - sqrt(2 * r1 / (r1 + r2)));
    double p1[3], v1[3], p2[3], v2[3];
    circular_state(r1, 0.0, p1, v1);
    const double deltas[] = {1e-3, 1e-4};
    double last_err = 1;
    for (int k = 0; k < 2; k++) {
        circular_state(r2, M_PI - deltas[k] * M_PI / 180.0, p2, v2);
        sy_transfer t;
        ck_assert_int_eq(sy_transfer_from_states(p1, v1, p2, v2, tof, 0, SY_BRANCH_LEFT,
                                                 0, 0, 0, 0, NULL, &t), SY_OK);
        double e1 = tu_reldiff(t.vinf_dep_km_s, vinf1, 1e-9);
        double e2 = tu_reldiff(t.vinf_arr_km_s, vinf2, 1e-9);
        ck_assert_msg(e1 < 1e-6 && e2 < 1e-6, "delta %g deg: vinf %.9f/%.9f vs %.9f/%.9f",
                      deltas[k], t.vinf_dep_km_s, t.vinf_arr_km_s, vinf1, vinf2);
        ck_assert_double_eq_tol(t.c3_km2_s2, vinf1 * vinf1, 1e-5 * vinf1 * vinf1);
        ck_assert_double_eq_tol(t.tof_days, tof / SY_DAY_S, 1e-9);
        ck_assert_int_eq(t.type, 1);
        ck_assert_double_eq_tol(t.transfer_angle_deg, 180.0 - deltas[k], 1e-9);
        /* Coplanar ecliptic orbits: v_inf lies in the ecliptic. */
        ck_assert_double_lt(fabs(t.vinf_dep_vec_km_s[2]), 1e-9);
        /* Perihelion of the Hohmann ellipse is the departure point. */
        ck_assert_double_eq_tol(t.min_sun_dist_au, 1.0, 1e-6);
        double err = e1 > e2 ? e1 : e2;
        ck_assert_double_le(err, last_err);
        last_err = err;
    }
    /* Exactly 180 deg: a status, not a NaN. */
    circular_state(r2, M_PI, p2, v2);
    sy_transfer t;
    ck_assert_int_eq(sy_transfer_from_states(p1, v1, p2, v2, tof, 0, SY_BRANCH_LEFT,
                                             0, 0, 0, 0, NULL, &t), SY_ERR_DEGENERATE);
}
END_TEST

/* A point on the Hohmann ellipse short of aphelion, with the flight time
 * from Kepler's equation (closed form): Lambert must return the ellipse's
 * own velocities. */
START_TEST(test_arc_on_known_ellipse)
{
    const double r1 = 1.0 * SY_AU_KM, r2 = 1.6 * SY_AU_KM;
    const double a = 0.5 * (r1 + r2), e = (r2 - r1) / (r2 + r1);
    const double nu = 150.0 * M_PI / 180.0;
    const double E = 2 * atan(sqrt((1 - e) / (1 + e)) * tan(nu / 2));
    const double tof = (E - e * sin(E)) * sqrt(a * a * a / MU);
    const double p = a * (1 - e * e), r = p / (1 + e * cos(nu));
    double p1[3], v1[3], p2[3] = {r * cos(nu), r * sin(nu), 0}, vb2[3] = {0, 0, 0};
    circular_state(r1, 0.0, p1, v1);
    sy_transfer t;
    ck_assert_int_eq(sy_transfer_from_states(p1, v1, p2, vb2, tof, 0, SY_BRANCH_LEFT,
                                             0, 0, 0, 0, NULL, &t), SY_OK);
    double vp = sqrt(MU / p);
    double v2x = -vp * sin(nu), v2y = vp * (e + cos(nu));
    ck_assert_double_eq_tol(t.v1_km_s[0], 0.0, 1e-8);
    ck_assert_double_eq_tol(t.v1_km_s[1], vp * (1 + e), 1e-8);
    ck_assert_double_eq_tol(t.v2_km_s[0], v2x, 1e-8);
    ck_assert_double_eq_tol(t.v2_km_s[1], v2y, 1e-8);
    ck_assert_double_eq_tol(t.transfer_angle_deg, 150.0, 1e-9);
    ck_assert_double_eq_tol(t.min_sun_dist_au, 1.0, 1e-9);
}
END_TEST

/* Type II: the same pair of circles with the arrival 210 deg ahead. */
START_TEST(test_type_two)
{
    double p1[3], v1[3], p2[3], v2[3];
    circular_state(1.0 * SY_AU_KM, 0.3, p1, v1);
    circular_state(1.6 * SY_AU_KM, 0.3 + 210.0 * M_PI / 180.0, p2, v2);
    sy_transfer t;
    ck_assert_int_eq(sy_transfer_from_states(p1, v1, p2, v2, 300 * SY_DAY_S, 0,
                                             SY_BRANCH_LEFT, 0, 0, 0, 0, NULL, &t), SY_OK);
    ck_assert_int_eq(t.type, 2);
    ck_assert_double_eq_tol(t.transfer_angle_deg, 210.0, 1e-9);
}
END_TEST

/* Escape from a circular orbit costs (sqrt(2) - 1) v_circ at C3 = 0
 * (common practice: v_esc = sqrt(2) v_circ). */
START_TEST(test_escape_speed)
{
    const double gm = 398600.435507, r = 6378.137 + 200.0;
    const double vc = sqrt(gm / r);
    ck_assert_double_eq_tol(sy_dv_departure(gm, r, 0.0), (M_SQRT2 - 1) * vc, 1e-12);
    /* vis-viva at periapsis of the departure hyperbola (common practice) */
    const double c3 = 12.5;
    ck_assert_double_eq_tol(sy_dv_departure(gm, r, c3) + vc, sqrt(c3 + 2 * gm / r), 1e-12);
    /* Capture into a circular orbit (ra = rp) at v_inf = 0 costs the same
     * (sqrt(2) - 1) v_circ; into a parabola (ra -> inf) it costs nothing. */
    const double gmm = 42828.375816, rp = 3396.19 + 400.0;
    ck_assert_double_eq_tol(sy_dv_capture(gmm, 0.0, rp, rp), (M_SQRT2 - 1) * sqrt(gmm / rp), 1e-12);
    ck_assert_double_lt(sy_dv_capture(gmm, 0.0, rp, 1e12), 1e-6);
    /* Entry speed at v_inf = 0 is the local escape speed. */
    ck_assert_double_eq_tol(sy_entry_speed(gmm, 0.0, rp), M_SQRT2 * sqrt(gmm / rp), 1e-12);
}
END_TEST

/* DLA/RLA: a v_inf along the ecliptic pole has DLA = 90 - eps and
 * RLA = 270 deg; along +x (the equinox) DLA = 0, RLA = 0. */
START_TEST(test_asymptote)
{
    double dec, ra;
    double pole[3] = {0, 0, 2.5};
    sy_asymptote_radec(pole, &dec, &ra);
    ck_assert_double_eq_tol(dec, 90.0 - SY_OBLIQUITY_J2000_ARCSEC / 3600.0, 1e-12);
    ck_assert_double_eq_tol(ra, 270.0, 1e-9);
    double x[3] = {3, 0, 0};
    sy_asymptote_radec(x, &dec, &ra);
    ck_assert_double_eq_tol(dec, 0.0, 1e-12);
    ck_assert_double_eq_tol(ra, 0.0, 1e-12);
}
END_TEST

/* A real Earth -> Mars transfer through the catalogue; the figures are
 * consistent with each other (C3 = vinf^2, options only when asked). */
START_TEST(test_compute_consistency)
{
    sy_catalog *cat = sy_catalog_new();
    const sy_body *e, *m;
    ck_assert_int_eq(sy_catalog_find(cat, "earth", &e, NULL), SY_OK);
    ck_assert_int_eq(sy_catalog_find(cat, "Mars", &m, NULL), SY_OK);
    sy_transfer_opts o = {1, 200.0, 1, 400.0, 33793.0, 1, 125.0};
    sy_transfer t;
    sy_error err;
    double d, a;
    sy_date_parse("2033-04-20", &d, NULL);
    sy_date_parse("2033-11-01", &a, NULL);
    ck_assert_int_eq(sy_transfer_compute(e, m, d, a, 0, SY_BRANCH_LEFT, &o, &t, &err), SY_OK);
    ck_assert_double_eq_tol(t.c3_km2_s2, t.vinf_dep_km_s * t.vinf_dep_km_s, 1e-9);
    ck_assert_double_eq_tol(t.dv_total_km_s, t.dv_dep_km_s + t.dv_cap_km_s, 1e-12);
    ck_assert(isfinite(t.v_entry_km_s));
    /* Broad plausibility for a 2033 Earth-Mars Type I (common practice:
     * C3 of roughly 8-20 km2/s2, arrival v_inf 2-5 km/s). */
    ck_assert_double_gt(t.c3_km2_s2, 5.0);
    ck_assert_double_lt(t.c3_km2_s2, 30.0);
    ck_assert_double_gt(t.vinf_arr_km_s, 1.5);
    ck_assert_double_lt(t.vinf_arr_km_s, 6.0);
    /* arrival before departure */
    ck_assert_int_eq(sy_transfer_compute(e, m, a, d, 0, SY_BRANCH_LEFT, NULL, &t, &err), SY_ERR_ARG);
    ck_assert_ptr_nonnull(strstr(err.msg, "not after departure"));
    /* negative parking altitude */
    o.park_alt_km = -5;
    ck_assert_int_eq(sy_transfer_compute(e, m, d, a, 0, SY_BRANCH_LEFT, &o, &t, &err), SY_ERR_ARG);
    ck_assert_ptr_nonnull(strstr(err.msg, "parking"));
    /* too short a flight for one revolution */
    ck_assert_int_eq(sy_transfer_compute(e, m, d, a, 1, SY_BRANCH_LEFT, NULL, &t, &err), SY_ERR_NOSOL);
    sy_catalog_free(cat);
}
END_TEST

int main(void)
{
    Suite *s = suite_create("transfer");
    TCase *tc = tcase_create("core");
    tcase_add_test(tc, test_hohmann_limit);
    tcase_add_test(tc, test_arc_on_known_ellipse);
    tcase_add_test(tc, test_type_two);
    tcase_add_test(tc, test_escape_speed);
    tcase_add_test(tc, test_asymptote);
    tcase_add_test(tc, test_compute_consistency);
    suite_add_tcase(s, tc);
    return tu_run(s);
}
