/* check_numerics.c - numerical edge cases must not lie (issue 6).
 *
 * Every case returns a status (or a flagged grid cell) or a value that an
 * independent check confirms; never a silent NaN or an unconverged value,
 * and the iteration counts stay within their documented bounds.
 *
 * Independent checks used:
 *   - a Lambert solution is confirmed by propagating (r1, v1) over tof with
 *     the universal-variable Kepler solver (a different algorithm: Bate,
 *     Mueller & White, "Fundamentals of Astrodynamics", 1971, ch. 4) and
 *     comparing with r2;
 *   - two-body states are confirmed by the conserved energy (vis-viva,
 *     v^2/2 - mu/r = -mu (1 - e) / (2 q)) and angular momentum
 *     (|r x v| = sqrt(mu q (1 + e))), textbook two-body facts (BMW ch. 1);
 *   - the Table 1 / Table 2 seam is bounded by the sum of the two tables'
 *     stated errors (E. M. Standish, "Keplerian Elements for Approximate
 *     Positions of the Major Planets", JPL SSD; figures FROM MEMORY, the
 *     same as in tests/check_ephem.c, with that file's measured Table 1
 *     bounds where they exceed the remembered ones): both tables are
 *     within their error of the truth, so they are within the sum of each
 *     other.
 */
#include "config.h"
#include "synodic.h"
#include "synodic/grid.h"
#include "synodic/study.h"

#include "lib/elements.h"
#include "testutil.h"

#include <stdio.h>
#include <string.h>

#ifndef M_PI
#define M_PI 3.14159265358979323846
#endif
#define DEG (M_PI / 180.0)
#define ARCSEC (DEG / 3600.0)
#define MU SY_GM_SUN_KM3_S2
#define AU SY_AU_KM

/* Documented in src/lib/lambert.c: LAMBERT_MAX_ITER. */
#define LAMBERT_ITER_BOUND 50

static void vcross(const double a[3], const double b[3], double c[3])
{
    c[0] = a[1] * b[2] - a[2] * b[1];
    c[1] = a[2] * b[0] - a[0] * b[2];
    c[2] = a[0] * b[1] - a[1] * b[0];
}

static int finite3(const double v[3])
{
    return isfinite(v[0]) && isfinite(v[1]) && isfinite(v[2]);
}

/* Solve and confirm: returns the status; on SY_OK checks finiteness, the
 * iteration bound and the propagated arrival point (relative to |r2|),
 * storing that error in *miss_rel. */
static sy_status lambert_checked(const double r1[3], const double r2[3],
                                 double tof_s, int revs, sy_branch br,
                                 sy_lambert_solution *sol, double *miss_rel)
{
    sy_status st = sy_lambert(MU, r1, r2, tof_s, revs, br, 0, sol);
    *miss_rel = NAN;
    if (st != SY_OK) return st;
    ck_assert_msg(finite3(sol->v1_km_s) && finite3(sol->v2_km_s),
                  "SY_OK with a non-finite velocity");
    ck_assert_msg(sol->iterations >= 0 && sol->iterations <= LAMBERT_ITER_BOUND,
                  "iterations %d outside 0..%d", sol->iterations,
                  LAMBERT_ITER_BOUND);
    double r[3], v[3];
    ck_assert_int_eq(sy_kepler_propagate(MU, r1, sol->v1_km_s, tof_s, r, v),
                     SY_OK);
    *miss_rel = tu_dist3(r, r2) / tu_norm3(r2);
    /* and the arrival velocity */
    double dv = tu_dist3(v, sol->v2_km_s) / tu_norm3(sol->v2_km_s);
    ck_assert_msg(dv < 1e-6, "arrival velocity differs by %g (relative)", dv);
    return st;
}

/* ------------------------------------------------------------------ */
/* transfer angles near 0 and 180 deg                                  */

/* lambert.c refuses |r1 x r2| < 1e-10 |r1| |r2| (the plane is undefined)
 * with SY_ERR_DEGENERATE, i.e. within 1e-10 rad = 5.7e-9 deg of 0 or 180
 * deg; outside that band it must solve, and the solution must fly. */
START_TEST(test_angles_near_0_and_180)
{
    static const double off_deg[] = {1e-2, 1e-4, 1e-6, 1e-7, 1e-8,
                                     1e-9, 1e-12, 0.0};
    const double r1[3] = {AU, 0, 0};
    double worst = 0;
    for (int side = 0; side < 3; side++) {
        /* side 0: 180 - d (Type I), 1: 180 + d (Type II), 2: 0 + d */
        for (size_t k = 0; k < sizeof off_deg / sizeof off_deg[0]; k++) {
            double th = side == 0 ? 180.0 - off_deg[k]
                        : side == 1 ? 180.0 + off_deg[k] : off_deg[k];
            double r2[3] = {1.5 * AU * cos(th * DEG), 1.5 * AU * sin(th * DEG),
                            0};
            if (side < 2 && off_deg[k] == 0.0) r2[1] = 0; /* exactly 180 */
            double tof = (side == 2 ? 60.0 : 250.0) * SY_DAY_S;
            sy_lambert_solution sol;
            double miss;
            sy_status st = lambert_checked(r1, r2, tof, 0, SY_BRANCH_LEFT,
                                           &sol, &miss);
            double c[3];
            vcross(r1, r2, c);
            double sin_ang = tu_norm3(c) / (tu_norm3(r1) * tu_norm3(r2));
            if (sin_ang < 1e-10) {
                ck_assert_msg(st == SY_ERR_DEGENERATE,
                              "angle %.15g deg: status %s, want degenerate",
                              th, sy_status_str(st));
            } else {
                ck_assert_msg(st == SY_OK, "angle %.15g deg: status %s", th,
                              sy_status_str(st));
                /* 1e-7 of |r2| = 22 km at 1.5 AU: far below the planet
                 * ephemeris errors (>= 1000 km) the grid is fed with. */
                ck_assert_msg(miss < 1e-7, "angle %.15g deg: propagated "
                              "arrival misses r2 by %g of |r2|", th, miss);
                if (miss > worst) worst = miss;
            }
        }
    }
    fprintf(stderr, "numerics: near 0/180 deg: worst propagated miss %.2e "
            "of |r2|\n", worst);
}
END_TEST

/* ------------------------------------------------------------------ */
/* multi-revolution minimum and many revolutions                       */

/* The minimum flight time of an N-revolution transfer, found from the
 * outside by bisection on the solver's own NOSOL/OK answer; just above it
 * both branches exist, fly, and meet (at the minimum they coincide). */
START_TEST(test_multirev_minimum)
{
    const double r1[3] = {AU, 0, 0};
    const double r2[3] = {1.5 * AU * cos(100 * DEG), 1.5 * AU * sin(100 * DEG),
                          0.02 * AU};
    for (int revs = 1; revs <= 3; revs++) {
        double lo = 0.1 * 365.25 * SY_DAY_S, hi = 10.0 * revs * 365.25 * SY_DAY_S;
        sy_lambert_solution sol;
        ck_assert_int_eq(sy_lambert(MU, r1, r2, lo, revs, SY_BRANCH_LEFT, 0, &sol),
                         SY_ERR_NOSOL);
        ck_assert_int_eq(sy_lambert(MU, r1, r2, hi, revs, SY_BRANCH_LEFT, 0, &sol),
                         SY_OK);
        for (int it = 0; it < 200 && hi - lo > 1e-7 * hi; it++) {
            double mid = 0.5 * (lo + hi);
            sy_status st = sy_lambert(MU, r1, r2, mid, revs, SY_BRANCH_LEFT, 0, &sol);
            ck_assert_msg(st == SY_OK || st == SY_ERR_NOSOL,
                          "revs %d tof %.9g s: status %s", revs, mid,
                          sy_status_str(st));
            if (st == SY_OK) hi = mid; else lo = mid;
        }
        double tmin = hi;
        sy_lambert_solution L, R;
        double mL, mR;
        for (int q = 0; q < 3; q++) {
            /* just above the minimum, and a little further */
            double tof = tmin * (1.0 + (q == 0 ? 1e-7 : q == 1 ? 1e-5 : 1e-3));
            sy_status sl = lambert_checked(r1, r2, tof, revs, SY_BRANCH_LEFT, &L, &mL);
            sy_status sr = lambert_checked(r1, r2, tof, revs, SY_BRANCH_RIGHT, &R, &mR);
            ck_assert_msg(sl == SY_OK && sr == SY_OK,
                          "revs %d at Tmin(1+%g): %s / %s", revs,
                          tof / tmin - 1, sy_status_str(sl), sy_status_str(sr));
            ck_assert_msg(mL < 1e-7 && mR < 1e-7, "revs %d at Tmin(1+%g): "
                          "miss %g / %g", revs, tof / tmin - 1, mL, mR);
            if (q == 0) {
                /* the two branches merge at Tmin: close velocities */
                double dv = tu_dist3(L.v1_km_s, R.v1_km_s) / tu_norm3(L.v1_km_s);
                /* they separate like sqrt(tof - Tmin): ~3e-4 at 1e-7 */
                ck_assert_msg(dv < 1e-2, "revs %d: branches %g apart at Tmin",
                              revs, dv);
                fprintf(stderr, "numerics: %d-rev branches at Tmin(1+1e-7) "
                        "differ by %.1e in v1 (relative)\n", revs, dv);
            }
        }
        fprintf(stderr, "numerics: %d-rev minimum %.6f days; iterations at "
                "Tmin(1+1e-3): left %d right %d\n", revs, tmin / SY_DAY_S,
                L.iterations, R.iterations);
        /* below the minimum: a status, not a value */
        sy_lambert_solution below;
        ck_assert_int_eq(sy_lambert(MU, r1, r2, tmin * (1 - 1e-5), revs,
                                    SY_BRANCH_RIGHT, 0, &below), SY_ERR_NOSOL);
    }
}
END_TEST

/* 50 revolutions: solved and confirmed when the flight is long enough,
 * SY_ERR_NOSOL when it is not; 1000 revolutions are refused or solved,
 * never answered with garbage. */
START_TEST(test_fifty_revolutions)
{
    const double r1[3] = {AU, 0, 0};
    const double r2[3] = {1.5 * AU * cos(100 * DEG), 1.5 * AU * sin(100 * DEG), 0};
    sy_lambert_solution sol;
    double miss;
    ck_assert_int_eq(lambert_checked(r1, r2, 30 * 365.25 * SY_DAY_S, 50,
                                     SY_BRANCH_LEFT, &sol, &miss), SY_ERR_NOSOL);
    for (int b = 0; b < 2; b++) {
        sy_status st = lambert_checked(r1, r2, 80 * 365.25 * SY_DAY_S, 50,
                                       (sy_branch)b, &sol, &miss);
        ck_assert_msg(st == SY_OK, "50 revs, branch %d: %s", b, sy_status_str(st));
        /* 80 years of propagation: allow 1e-6 of |r2| (220 km) */
        ck_assert_msg(miss < 1e-6, "50 revs branch %d: miss %g", b, miss);
        fprintf(stderr, "numerics: 50 revs branch %s: %d iterations, miss "
                "%.2e\n", b ? "right" : "left", sol.iterations, miss);
    }
    sy_status st = lambert_checked(r1, r2, 1200 * 365.25 * SY_DAY_S, 1000,
                                   SY_BRANCH_RIGHT, &sol, &miss);
    ck_assert_msg(st == SY_OK || st == SY_ERR_NOSOL || st == SY_ERR_NOCONV,
                  "1000 revs: %s", sy_status_str(st));
    if (st == SY_OK) ck_assert_msg(miss < 1e-5, "1000 revs: miss %g", miss);
}
END_TEST

/* ------------------------------------------------------------------ */
/* near-parabolic and hyperbolic small bodies                          */

static sy_body small_body(double q_au, double e)
{
    sy_body b;
    memset(&b, 0, sizeof b);
    snprintf(b.name, sizeof b.name, "Test e=%g", e);
    b.kind = SY_BODY_SMALL;
    b.planet = -1;
    b.q_km = q_au * AU;
    b.e = e;
    b.i_rad = 30 * DEG;
    b.node_rad = 80 * DEG;
    b.argp_rad = 120 * DEG;
    b.tp_jd_tdb = 2462000.5;
    b.epoch_jd_tdb = b.tp_jd_tdb;
    b.valid_from_jd = b.tp_jd_tdb - 73050;
    b.valid_to_jd = b.tp_jd_tdb + 73050;
    return b;
}

START_TEST(test_conic_small_bodies)
{
    static const double ecc[] = {0.0, 0.5, 0.99, 1 - 1e-6, 1 - 1e-9, 1.0,
                                 1 + 1e-9, 1 + 1e-6, 1.01, 2.0, 40.0};
    static const double dt_days[] = {-20000, -1000, -30, -1, -1e-6, 0, 1e-6,
                                     0.5, 10, 365.25, 3000, 20000};
    double worst_e = 0, worst_h = 0;
    for (size_t ie = 0; ie < sizeof ecc / sizeof ecc[0]; ie++) {
        sy_body b = small_body(0.8, ecc[ie]);
        double E_expect = -MU * (1.0 - b.e) / (2.0 * b.q_km);
        double h_expect = sqrt(MU * b.q_km * (1.0 + b.e));
        for (size_t it = 0; it < sizeof dt_days / sizeof dt_days[0]; it++) {
            double r[3], v[3];
            sy_status st = sy_body_state(&b, b.tp_jd_tdb + dt_days[it], r, v);
            ck_assert_msg(st == SY_OK, "e=%.12g dt=%g d: %s", b.e, dt_days[it],
                          sy_status_str(st));
            ck_assert_msg(finite3(r) && finite3(v), "e=%.12g dt=%g: not finite",
                          b.e, dt_days[it]);
            double rn = tu_norm3(r), v2 = v[0] * v[0] + v[1] * v[1] + v[2] * v[2];
            double En = 0.5 * v2 - MU / rn;
            double scale = 0.5 * v2 + MU / rn;
            double de = fabs(En - E_expect) / scale;
            double hv[3];
            vcross(r, v, hv);
            double dh = fabs(tu_norm3(hv) - h_expect) / h_expect;
            if (de > worst_e) worst_e = de;
            if (dh > worst_h) worst_h = dh;
            ck_assert_msg(de < 1e-10 && dh < 1e-10, "e=%.12g dt=%g d: energy "
                          "%g, momentum %g off (relative)", b.e, dt_days[it],
                          de, dh);
            ck_assert_msg(rn >= b.q_km * (1 - 1e-12), "e=%.12g dt=%g: r %g "
                          "below perihelion %g", b.e, dt_days[it], rn, b.q_km);
        }
    }
    /* no seam across the parabola: e = 1 - 1e-9, 1, 1 + 1e-9 fly the same
     * path to within what a 1e-9 change of e moves them */
    for (size_t it = 0; it < sizeof dt_days / sizeof dt_days[0]; it++) {
        double r[3][3], v[3];
        const double e3[3] = {1 - 1e-9, 1.0, 1 + 1e-9};
        for (int k = 0; k < 3; k++) {
            sy_body b = small_body(0.8, e3[k]);
            ck_assert_int_eq(sy_body_state(&b, b.tp_jd_tdb + dt_days[it], r[k], v),
                             SY_OK);
        }
        double rn = tu_norm3(r[1]);
        ck_assert_msg(tu_dist3(r[0], r[1]) < 1e-6 * rn &&
                      tu_dist3(r[2], r[1]) < 1e-6 * rn,
                      "dt=%g d: seam at e = 1: %g km, %g km", dt_days[it],
                      tu_dist3(r[0], r[1]), tu_dist3(r[2], r[1]));
    }
    fprintf(stderr, "numerics: conics e=0..40: worst energy %.1e, momentum "
            "%.1e (relative)\n", worst_e, worst_h);
}
END_TEST

/* ------------------------------------------------------------------ */
/* edges of the mean-element tables                                    */

START_TEST(test_table_edges)
{
    sy_catalog *cat = sy_catalog_new();
    ck_assert_ptr_nonnull(cat);
    const double eps = 1e-6; /* day */
    for (int p = 0; p < SY_NPLANETS; p++) {
        const sy_body *b = sy_catalog_at(cat, (size_t)p);
        const sy_elem6 *el = &sy_planet_table[p].table2a.j2000;
        /* the orbit over 6000 years: radius within 30 % of its J2000
         * perihelion..aphelion range (elements drift slowly) */
        double rmin = 0.7 * el->a_au * (1 - el->e) * AU;
        double rmax = 1.3 * el->a_au * (1 + el->e) * AU;
        const struct { double jd; sy_status want; const void *row; } at[] = {
            {SY_TABLE2_FROM_JD - eps, SY_ERR_RANGE, NULL},
            {SY_TABLE2_FROM_JD, SY_OK, &sy_planet_table[p].table2a},
            {SY_TABLE1_FROM_JD - eps, SY_OK, &sy_planet_table[p].table2a},
            {SY_TABLE1_FROM_JD, SY_OK, &sy_planet_table[p].table1},
            {SY_TABLE1_TO_JD - eps, SY_OK, &sy_planet_table[p].table1},
            {SY_TABLE1_TO_JD, SY_OK, &sy_planet_table[p].table2a},
            {SY_TABLE2_TO_JD - eps, SY_OK, &sy_planet_table[p].table2a},
            {SY_TABLE2_TO_JD, SY_ERR_RANGE, NULL},
        };
        for (size_t k = 0; k < sizeof at / sizeof at[0]; k++) {
            double r[3], v[3];
            sy_status st = sy_body_state(b, at[k].jd, r, v);
            ck_assert_msg(st == at[k].want, "%s at JD %.7f: %s", b->name,
                          at[k].jd, sy_status_str(st));
            if (st != SY_OK) continue;
            ck_assert(finite3(r) && finite3(v));
            double rn = tu_norm3(r);
            ck_assert_msg(rn > rmin && rn < rmax, "%s at JD %.7f: r %g AU",
                          b->name, at[k].jd, rn / AU);
            sy_elem_set set;
            ck_assert_int_eq(sy_planet_elements_at(p, at[k].jd, &set), SY_OK);
            ck_assert_msg((const void *)set.row == at[k].row,
                          "%s at JD %.7f: wrong table", b->name, at[k].jd);
        }
    }
    sy_catalog_free(cat);
}
END_TEST

/* ------------------------------------------------------------------ */
/* the Table 1 / Table 2 seam                                          */

/* Standish's stated errors (FROM MEMORY; the figures of
 * tests/check_ephem.c): RA", Dec", r [1000 km] for Table 1 and Table 2. */
static const double std_err[2][SY_NPLANETS][3] = {
    {{15, 1, 1}, {20, 1, 4}, {20, 8, 6}, {40, 2, 25}, {400, 10, 600},
     {600, 25, 1500}, {50, 2, 1000}, {10, 1, 200}, {5, 2, 300}},
    {{20, 5, 15}, {40, 5, 30}, {40, 15, 40}, {100, 40, 200}, {600, 100, 1000},
     {1000, 100, 4000}, {2000, 30, 8000}, {400, 20, 4000}, {400, 100, 8000}},
};
/* Table 1 differences MEASURED against eraPlan94 in tests/check_ephem.c
 * where they exceed the remembered budget (sep ", dr km; 0: none). */
static const double t1_measured[SY_NPLANETS][2] = {
    {40, 2600}, {0, 0}, {0, 0}, {137, 55000}, {0, 0}, {0, 3700000}, {0, 0},
    {86, 2100000}, {0, 0}};

/* 3-D position error bound of table t for planet p at distance r. */
static double pos_err_km(int t, int p, double r_km)
{
    double ang = hypot(std_err[t][p][0], std_err[t][p][1]);
    double dr = std_err[t][p][2] * 1000.0;
    if (t == 0 && t1_measured[p][0] > ang) ang = t1_measured[p][0];
    if (t == 0 && t1_measured[p][1] > dr) dr = t1_measured[p][1];
    return r_km * ang * ARCSEC + dr;
}

static void state_of(int p, const sy_planet_data *pd, int table, double jd,
                     double r[3], double v[3])
{
    sy_elem_set set = {table == 0 ? &pd->table1 : &pd->table2a,
                       table == 0 || !pd->has_2b ? NULL : &pd->table2b};
    (void)p;
    ck_assert_int_eq(sy_planet_state_from_set(&set, jd, r, v), SY_OK);
}

/* Position and velocity jumps at both seams (1800-01-01, 2051-01-01),
 * each within the two tables' summed error; the largest are printed. */
START_TEST(test_seam_positions)
{
    const double seams[2] = {SY_TABLE1_FROM_JD, SY_TABLE1_TO_JD};
    for (int s = 0; s < 2; s++)
        for (int p = 0; p < SY_NPLANETS; p++) {
            const sy_planet_data *pd = &sy_planet_table[p];
            double r1[3], v1[3], r2[3], v2[3];
            state_of(p, pd, 0, seams[s], r1, v1);
            state_of(p, pd, 1, seams[s], r2, v2);
            double rn = tu_norm3(r1);
            double tol = 1.5 * (pos_err_km(0, p, rn) + pos_err_km(1, p, rn));
            double jump = tu_dist3(r1, r2);
            /* velocity: the same angular + radial error over the orbit
             * (relative dv ~ dr / r, as in tests/check_ephem.c), x3 */
            double dvrel = tu_dist3(v1, v2) / tu_norm3(v1);
            fprintf(stderr, "numerics: seam %s %-8s |dr| %9.0f km (bound "
                    "%9.0f), |dv|/v %.1e (bound %.1e)\n",
                    s ? "2051" : "1800", pd->name, jump, tol, dvrel,
                    3.0 * tol / rn);
            ck_assert_msg(jump < tol, "%s seam %d: position jump %g km > %g",
                          pd->name, s, jump, tol);
            ck_assert_msg(dvrel < 3.0 * tol / rn, "%s seam %d: velocity jump "
                          "%g > %g", pd->name, s, dvrel, 3.0 * tol / rn);
        }
}
END_TEST

/* C3 across the 2051 seam.  A grid of Earth -> Mars departures with one
 * day steps straddles 2051-01-01; at the first Table 2 column the same
 * transfers are recomputed with Earth's Table 1 state continued past its
 * range, which isolates the seam in C3 from the day-to-day change.  The
 * seam must stay below what the tables' own errors allow: a
 * departure-velocity error dv gives dC3 = 2 vinf dv + dv^2 (from
 * C3 = vinf^2), and dv is the seam in Earth's velocity plus the change in
 * the Lambert velocity that the seam in Earth's position causes, bounded
 * (common practice, order of magnitude) by 3 |dr| / tof.  Earth's seam
 * (dr, dv) is itself bounded by the tables' errors in test_seam_positions.
 * The seam is also compared with the day-to-day change of C3 next to it,
 * and the largest of each is printed. */
START_TEST(test_seam_grid_c3)
{
    sy_catalog *cat = sy_catalog_new();
    const sy_body *earth = sy_catalog_at(cat, 2), *mars = sy_catalog_at(cat, 3);
    double rE1[3], vE1[3], rE2[3], vE2[3];
    state_of(2, &sy_planet_table[2], 0, SY_TABLE1_TO_JD, rE1, vE1);
    state_of(2, &sy_planet_table[2], 1, SY_TABLE1_TO_JD, rE2, vE2);
    double drE = tu_dist3(rE1, rE2), dvE = tu_dist3(vE1, vE2);

    sy_grid_spec spec;
    memset(&spec, 0, sizeof spec);
    spec.from = earth;
    spec.to = mars;
    spec.x0_jd = SY_TABLE1_TO_JD - 10.0;  /* 2050-12-22 .. 2051-01-11 */
    spec.dx_days = 1.0;
    spec.nx = 21;
    spec.y_is_tof = 1;
    spec.y0 = 120.0;
    spec.dy_days = 10.0;
    spec.ny = 31;                        /* 120 .. 420 days */
    spec.threads = 1;
    sy_grid *g = NULL;
    sy_error err;
    ck_assert_int_eq(sy_grid_compute(&spec, NULL, NULL, &g, &err), SY_OK);
    const size_t ib = 10; /* the first column on Table 2 */
    ck_assert_double_eq(sy_grid_x_jd(g, (double)ib), SY_TABLE1_TO_JD);
    const float *c3 = g->field[SY_F_C3], *ang = g->field[SY_F_ANGLE];
    double worst = 0, worst_tol = 0, worst_day = 0, worst_ratio = 0;
    size_t used = 0;
    for (size_t j = 0; j < g->ny; j++) {
        size_t k = j * g->nx + ib;
        if (g->status[k] != SY_CELL_OK || g->status[k - 1] != SY_CELL_OK ||
            g->status[k + 1] != SY_CELL_OK || fabsf(ang[k] - 180.0f) < 5.0f)
            continue;
        double tof_d = sy_grid_y(g, (double)j);
        double ra[3], va[3];
        ck_assert_int_eq(sy_body_state(mars, SY_TABLE1_TO_JD + tof_d, ra, va),
                         SY_OK);
        sy_transfer t1, t2;
        ck_assert_int_eq(sy_transfer_from_states(rE1, vE1, ra, va, tof_d * SY_DAY_S,
                                                 0, SY_BRANCH_LEFT, 0, 0, 0, 0,
                                                 NULL, &t1), SY_OK);
        ck_assert_int_eq(sy_transfer_from_states(rE2, vE2, ra, va, tof_d * SY_DAY_S,
                                                 0, SY_BRANCH_LEFT, 0, 0, 0, 0,
                                                 NULL, &t2), SY_OK);
        /* the grid is the Table 2 side (float storage) */
        ck_assert_msg(fabs(c3[k] - t2.c3_km2_s2) <= 1e-6 * t2.c3_km2_s2 + 1e-6,
                      "grid C3 %g vs point %g", c3[k], t2.c3_km2_s2);
        double seam = fabs(t2.c3_km2_s2 - t1.c3_km2_s2);
        double dv = dvE + 3.0 * drE / (tof_d * SY_DAY_S);
        double tol = 2.0 * t2.vinf_dep_km_s * dv + dv * dv;
        double day = 0.5 * (fabs((double)c3[k + 1] - c3[k]) +
                            fabs((double)c3[k] - c3[k - 1]));
        ck_assert_msg(seam <= tol, "tof %g d: C3 seam %.4f km2/s2 > allowed "
                      "%.4f", tof_d, seam, tol);
        if (seam > worst) worst = seam, worst_tol = tol, worst_day = day;
        if (day > 0 && seam / day > worst_ratio) worst_ratio = seam / day;
        used++;
    }
    ck_assert_msg(used >= 10, "only %zu rows usable", used);
    fprintf(stderr, "numerics: 2051 seam, Earth -> Mars, tof 120..420 d: "
            "largest C3 jump %.2e km2/s2 (allowed %.2e; the day-to-day change "
            "there %.2e); largest jump / daily change %.2f; Earth seam %.0f km, "
            "%.2e km/s\n", worst, worst_tol, worst_day, worst_ratio, drE, dvE);
    sy_grid_free(g);
    sy_catalog_free(cat);
}
END_TEST

/* ------------------------------------------------------------------ */
/* grids flag, never poison                                            */

/* A 1-revolution grid where short flights have no solution: every cell
 * is either OK with every stored field finite, or flagged with a status
 * and NaN fields; both kinds occur. */
START_TEST(test_grid_flags)
{
    sy_catalog *cat = sy_catalog_new();
    sy_grid_spec spec;
    memset(&spec, 0, sizeof spec);
    spec.from = sy_catalog_at(cat, 2);
    spec.to = sy_catalog_at(cat, 3);
    spec.x0_jd = 2463000.5;
    spec.dx_days = 10;
    spec.nx = 40;
    spec.y_is_tof = 1;
    spec.y0 = 100;
    spec.dy_days = 20;
    spec.ny = 60;   /* 100 .. 1280 days */
    spec.revs = 1;
    spec.branch = SY_BRANCH_RIGHT;
    spec.threads = 1;
    sy_grid *g = NULL;
    sy_error err;
    ck_assert_int_eq(sy_grid_compute(&spec, NULL, NULL, &g, &err), SY_OK);
    size_t nok = 0, nflag = 0;
    for (size_t k = 0; k < g->nx * g->ny; k++) {
        int ok = g->status[k] == SY_CELL_OK;
        ck_assert(g->status[k] <= SY_CELL_RANGE);
        for (int f = 0; f < SY_NFIELDS; f++) {
            if (!g->field[f]) continue;
            if (ok)
                ck_assert_msg(isfinite(g->field[f][k]), "cell %zu OK but %s "
                              "is not finite", k, sy_field_name((sy_field)f));
            else
                ck_assert_msg(isnan(g->field[f][k]), "flagged cell %zu has "
                              "a value in %s", k, sy_field_name((sy_field)f));
        }
        if (ok) ck_assert(g->type[k] == 1 || g->type[k] == 2);
        nok += ok;
        nflag += !ok;
    }
    ck_assert_msg(nok > 0 && nflag > 0, "ok %zu flagged %zu", nok, nflag);
    sy_grid_free(g);
    sy_catalog_free(cat);
}
END_TEST

int main(void)
{
    Suite *s = suite_create("numerics");
    TCase *tc = tcase_create("edges");
    tcase_set_timeout(tc, 300);
    tcase_add_test(tc, test_angles_near_0_and_180);
    tcase_add_test(tc, test_multirev_minimum);
    tcase_add_test(tc, test_fifty_revolutions);
    tcase_add_test(tc, test_conic_small_bodies);
    tcase_add_test(tc, test_table_edges);
    tcase_add_test(tc, test_seam_positions);
    tcase_add_test(tc, test_seam_grid_c3);
    tcase_add_test(tc, test_grid_flags);
    suite_add_tcase(s, tc);
    return tu_run(s);
}
