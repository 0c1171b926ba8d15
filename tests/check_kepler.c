/* check_kepler.c - universal-variable propagation and the bodies file.
 *
 * References used here, all independent of src/lib/kepler.c:
 *   - Kepler's equation M = E - e sin E (ellipse) and M = e sinh H - H
 *     (hyperbola) solved in the test with GSL's bracketing Brent solver,
 *     positions from the classical perifocal formulas (Bate, Mueller,
 *     White, "Fundamentals of Astrodynamics", ch. 4 and 5);
 *   - Barker's equation tan(nu/2) + tan^3(nu/2)/3 = sqrt(mu/(2 q^3)) dt for
 *     the parabola, solved in closed form (Cardano), ibid. ch. 4;
 *   - conservation of energy and angular momentum (common practice);
 *   - direct numerical integration of the two-body equations with GSL's
 *     gsl_odeiv2 rk8pd (Prince-Dormand 8(9)).
 * The orbits are invented test cases.
 */
#include "config.h"
#include "synodic.h"

#include "testutil.h"

#include <gsl/gsl_errno.h>
#include <gsl/gsl_odeiv2.h>
#include <gsl/gsl_roots.h>
#include <stdio.h>
#include <string.h>
#include <unistd.h>

#ifndef M_PI
#define M_PI 3.14159265358979323846
#endif
#define MU SY_GM_SUN_KM3_S2
#define DEG (M_PI / 180.0)

/* ---------------------------------------------------------------- */
/* Independent analytic two-body reference                           */

typedef struct { double e, M; int hyp; } kep_eq;

static double kep_f(double x, void *p)
{
    const kep_eq *k = p;
    return k->hyp ? k->e * sinh(x) - x - k->M : x - k->e * sin(x) - k->M;
}

/* Eccentric (or hyperbolic) anomaly by Brent bracketing. */
static double solve_anomaly(double e, double M, int hyp)
{
    kep_eq k = {e, M, hyp};
    double lo, hi;
    if (!hyp) {
        lo = M - 1.0 - 1e-9;  /* |E - M| <= e < 1 */
        hi = M + 1.0 + 1e-9;
    } else {
        /* e sinh H - H >= (e - 1) sinh H for H >= 0: the root lies
         * within |H| <= asinh(|M| / (e - 1)) */
        hi = asinh(fabs(M) / (e - 1.0)) + 1.0;
        lo = -hi;
    }
    gsl_function F = {kep_f, &k};
    gsl_root_fsolver *s = gsl_root_fsolver_alloc(gsl_root_fsolver_brent);
    ck_assert_int_eq(gsl_root_fsolver_set(s, &F, lo, hi), GSL_SUCCESS);
    int st = GSL_CONTINUE;
    for (int i = 0; i < 500 && st == GSL_CONTINUE; i++) {
        gsl_root_fsolver_iterate(s);
        st = gsl_root_test_interval(gsl_root_fsolver_x_lower(s),
                                    gsl_root_fsolver_x_upper(s), 1e-15, 1e-15);
    }
    double x = gsl_root_fsolver_root(s);
    gsl_root_fsolver_free(s);
    ck_assert_int_eq(st, GSL_SUCCESS);
    return x;
}

/* Perifocal position/velocity (x to perihelion) at time dt after
 * perihelion, for perihelion distance q and eccentricity e. */
static void analytic_pf(double q, double e, double dt, double r[3], double v[3])
{
    r[2] = v[2] = 0.0;
    if (e < 1.0) {
        double a = q / (1.0 - e), n = sqrt(MU / (a * a * a));
        double E = solve_anomaly(e, n * dt, 0);
        double b = a * sqrt(1.0 - e * e), rr = a * (1.0 - e * cos(E));
        double Ed = n * a / rr;
        r[0] = a * (cos(E) - e);
        r[1] = b * sin(E);
        v[0] = -a * sin(E) * Ed;
        v[1] = b * cos(E) * Ed;
    } else if (e > 1.0) {
        double a = q / (e - 1.0), n = sqrt(MU / (a * a * a));
        double H = solve_anomaly(e, n * dt, 1);
        double b = a * sqrt(e * e - 1.0), rr = a * (e * cosh(H) - 1.0);
        double Hd = n * a / rr;
        r[0] = a * (e - cosh(H));
        r[1] = b * sinh(H);
        v[0] = -a * sinh(H) * Hd;
        v[1] = b * cosh(H) * Hd;
    } else {
        /* Barker: D + D^3/3 = W, W = sqrt(mu/(2q^3)) dt; Cardano. */
        double W = sqrt(MU / (2.0 * q * q * q)) * dt, A = 1.5 * W;
        double s = sqrt(A * A + 1.0);
        double D = cbrt(A + s) + cbrt(A - s);
        r[0] = q * (1.0 - D * D);
        r[1] = 2.0 * q * D;
        double Dd = sqrt(MU / (2.0 * q * q * q)) / (1.0 + D * D);
        v[0] = -2.0 * q * D * Dd;
        v[1] = 2.0 * q * Dd;
    }
}

static void perihelion_state(double q, double e, double r[3], double v[3])
{
    r[0] = q; r[1] = 0; r[2] = 0;
    v[0] = 0; v[1] = sqrt(MU * (1.0 + e) / q); v[2] = 0;
}

static double energy(const double r[3], const double v[3])
{
    double vv = tu_norm3(v);
    return 0.5 * vv * vv - MU / tu_norm3(r);
}

static void cross(const double a[3], const double b[3], double c[3])
{
    c[0] = a[1] * b[2] - a[2] * b[1];
    c[1] = a[2] * b[0] - a[0] * b[2];
    c[2] = a[0] * b[1] - a[1] * b[0];
}

/* ---------------------------------------------------------------- */

static const double ecc_cases[] = {0.0, 0.5, 0.99, 1.0, 1.5, 40.0};

/* Position and velocity against the analytic references, several dt of
 * both signs, for every eccentricity case (q = 1.2 au). */
START_TEST(vs_analytic)
{
    double e = ecc_cases[_i], q = 1.2 * SY_AU_KM;
    const double dts_d[] = {0.37, 10.0, -25.0, 90.0, -200.0, 365.25, 1500.0};
    double r0[3], v0[3];
    perihelion_state(q, e, r0, v0);
    double worst = 0.0;
    for (size_t k = 0; k < sizeof dts_d / sizeof dts_d[0]; k++) {
        double dt = dts_d[k] * SY_DAY_S, r[3], v[3], ra[3], va[3];
        ck_assert_int_eq(sy_kepler_propagate(MU, r0, v0, dt, r, v), SY_OK);
        analytic_pf(q, e, dt, ra, va);
        double er = tu_dist3(r, ra) / tu_norm3(ra);
        double ev = tu_dist3(v, va) / tu_norm3(va);
        if (er > worst) worst = er;
        if (ev > worst) worst = ev;
    }
    printf("e = %-5g: max relative error vs analytic %.2e\n", e, worst);
    fflush(stdout);
    ck_assert_double_le(worst, 1e-11);
}
END_TEST

/* Energy and angular momentum conserved from an off-perihelion start. */
START_TEST(conservation)
{
    double e = ecc_cases[_i], q = 0.8 * SY_AU_KM, r0[3], v0[3], rp[3], vp[3];
    perihelion_state(q, e, rp, vp);
    /* tilt the orbit and start 40 days after perihelion */
    ck_assert_int_eq(sy_kepler_propagate(MU, rp, vp, 40.0 * SY_DAY_S, r0, v0), SY_OK);
    double c = cos(0.4), s = sin(0.4);
    double rt[3] = {r0[0], c * r0[1], s * r0[1]}, vt[3] = {v0[0], c * v0[1], s * v0[1]};
    double E0 = energy(rt, vt), h0[3];
    cross(rt, vt, h0);
    double scaleE = MU / q; /* energy scale: e=1 has E0 = 0 */
    for (double dt_d = -3000.0; dt_d <= 3000.0; dt_d += 137.0) {
        double r[3], v[3], h[3];
        ck_assert_int_eq(sy_kepler_propagate(MU, rt, vt, dt_d * SY_DAY_S, r, v), SY_OK);
        cross(r, v, h);
        ck_assert_double_le(fabs(energy(r, v) - E0) / scaleE, 1e-11);
        ck_assert_double_le(tu_dist3(h, h0) / tu_norm3(h0), 1e-11);
    }
}
END_TEST

/* Forward then back returns the start (1e-10 relative), including many
 * revolutions of the ellipses. */
START_TEST(round_trip)
{
    double e = ecc_cases[_i], q = 1.0 * SY_AU_KM, rp[3], vp[3], r0[3], v0[3];
    perihelion_state(q, e, rp, vp);
    ck_assert_int_eq(sy_kepler_propagate(MU, rp, vp, -17.0 * SY_DAY_S, r0, v0), SY_OK);
    const double dts_d[] = {1.0, 100.0, 1000.0, 36525.0, -7000.0};
    for (size_t k = 0; k < sizeof dts_d / sizeof dts_d[0]; k++) {
        double r1[3], v1[3], r2[3], v2[3], dt = dts_d[k] * SY_DAY_S;
        ck_assert_int_eq(sy_kepler_propagate(MU, r0, v0, dt, r1, v1), SY_OK);
        ck_assert_int_eq(sy_kepler_propagate(MU, r1, v1, -dt, r2, v2), SY_OK);
        /* 1e-10, plus the conditioning of the Lagrange-coefficient map
         * back from far out on a hyperbola: r0 = f r1 + g v1 cancels terms
         * of size ~ |r1|^2/|r0|, so rounding contributes ~eps (r1/r0)^2
         * (bounded orbits keep r1/r0 bounded; this matters only for e = 40
         * over 100 years, r1/r0 ~ 4000). */
        double ratio = tu_norm3(r1) / tu_norm3(r0);
        double tol = 1e-10 + 2.2e-16 * ratio * ratio;
        ck_assert_double_le(tu_dist3(r2, r0) / tu_norm3(r0), tol);
        ck_assert_double_le(tu_dist3(v2, v0) / tu_norm3(v0), tol);
    }
}
END_TEST

/* Many revolutions: 1000.25 periods of an e = 0.5 ellipse land where a
 * quarter period does (analytic Kepler at the same mean anomaly). */
START_TEST(many_revolutions)
{
    double q = 1.0 * SY_AU_KM, e = 0.5, a = q / (1 - e);
    double P = 2 * M_PI * sqrt(a * a * a / MU), r0[3], v0[3], r[3], v[3], ra[3], va[3];
    perihelion_state(q, e, r0, v0);
    ck_assert_int_eq(sy_kepler_propagate(MU, r0, v0, 1000.25 * P, r, v), SY_OK);
    analytic_pf(q, e, 0.25 * P, ra, va);
    /* dt itself carries ~1e-16 x 1000 periods of rounding */
    ck_assert_double_le(tu_dist3(r, ra) / tu_norm3(ra), 1e-11);
    ck_assert_int_eq(sy_kepler_propagate(MU, r0, v0, -1000.25 * P, r, v), SY_OK);
    analytic_pf(q, e, -0.25 * P, ra, va);
    ck_assert_double_le(tu_dist3(r, ra) / tu_norm3(ra), 1e-11);
}
END_TEST

/* Near-parabolic continuity: e = 1 -+ 1e-9 is within ~1e-8 of e = 1
 * (exercises the Stumpff series near psi = 0). */
START_TEST(near_parabolic)
{
    double q = 0.5 * SY_AU_KM, r0[3], v0[3], r[3], v[3], rp[3], vpar[3];
    perihelion_state(q, 1.0, r0, v0);
    double dt = 300.0 * SY_DAY_S;
    ck_assert_int_eq(sy_kepler_propagate(MU, r0, v0, dt, rp, vpar), SY_OK);
    for (int sgn = -1; sgn <= 1; sgn += 2) {
        perihelion_state(q, 1.0 + sgn * 1e-9, r0, v0);
        ck_assert_int_eq(sy_kepler_propagate(MU, r0, v0, dt, r, v), SY_OK);
        double d = tu_dist3(r, rp) / tu_norm3(rp);
        ck_assert_double_le(d, 1e-7);
        ck_assert_double_gt(d, 0.0);
    }
}
END_TEST

static int twobody_rhs(double t, const double y[], double f[], void *params)
{
    (void)t;
    double mu = *(const double *)params;
    double r = sqrt(y[0] * y[0] + y[1] * y[1] + y[2] * y[2]), r3 = r * r * r;
    for (int i = 0; i < 3; i++) {
        f[i] = y[i + 3];
        f[i + 3] = -mu * y[i] / r3;
    }
    return GSL_SUCCESS;
}

/* Hyperbola (e = 1.5, q = 0.7 au, inclined) against rk8pd integration in
 * au and days, 400 days through perihelion. */
START_TEST(vs_rk8pd_hyperbola)
{
    double q = 0.7 * SY_AU_KM, e = 1.5, rp[3], vp[3], r0[3], v0[3];
    perihelion_state(q, e, rp, vp);
    double c = cos(1.1), s = sin(1.1);
    double rpt[3] = {rp[0], c * rp[1], s * rp[1]}, vpt[3] = {vp[0], c * vp[1], s * vp[1]};
    ck_assert_int_eq(sy_kepler_propagate(MU, rpt, vpt, -200.0 * SY_DAY_S, r0, v0), SY_OK);
    double mu_au = MU * SY_DAY_S * SY_DAY_S / (SY_AU_KM * SY_AU_KM * SY_AU_KM);
    gsl_odeiv2_system sys = {twobody_rhs, NULL, 6, &mu_au};
    gsl_odeiv2_driver *d = gsl_odeiv2_driver_alloc_y_new(&sys, gsl_odeiv2_step_rk8pd,
                                                         1e-3, 1e-14, 1e-14);
    double y[6], t = 0.0;
    for (int i = 0; i < 3; i++) {
        y[i] = r0[i] / SY_AU_KM;
        y[i + 3] = v0[i] * SY_DAY_S / SY_AU_KM;
    }
    double worst = 0.0;
    for (double t1 = 50.0; t1 <= 400.0; t1 += 50.0) {
        ck_assert_int_eq(gsl_odeiv2_driver_apply(d, &t, t1, y), GSL_SUCCESS);
        double r[3], v[3], ri[3];
        ck_assert_int_eq(sy_kepler_propagate(MU, r0, v0, t1 * SY_DAY_S, r, v), SY_OK);
        for (int i = 0; i < 3; i++) ri[i] = y[i] * SY_AU_KM;
        double rel = tu_dist3(r, ri) / tu_norm3(ri);
        if (rel > worst) worst = rel;
    }
    gsl_odeiv2_driver_free(d);
    printf("hyperbola vs rk8pd: max relative position difference %.2e\n", worst);
    fflush(stdout);
    ck_assert_double_le(worst, 1e-9);
}
END_TEST

START_TEST(bad_input)
{
    double r0[3] = {1e8, 0, 0}, v0[3] = {0, 30, 0}, z[3] = {0, 0, 0}, r[3], v[3];
    ck_assert_int_eq(sy_kepler_propagate(0.0, r0, v0, 1.0, r, v), SY_ERR_ARG);
    ck_assert_int_eq(sy_kepler_propagate(-MU, r0, v0, 1.0, r, v), SY_ERR_ARG);
    ck_assert_int_eq(sy_kepler_propagate(MU, z, v0, 1.0, r, v), SY_ERR_ARG);
    ck_assert_int_eq(sy_kepler_propagate(MU, r0, v0, NAN, r, v), SY_ERR_ARG);
    ck_assert_int_eq(sy_kepler_propagate(MU, r0, v0, INFINITY, r, v), SY_ERR_ARG);
    double vn[3] = {0, NAN, 0};
    ck_assert_int_eq(sy_kepler_propagate(MU, r0, vn, 1.0, r, v), SY_ERR_ARG);
    /* hyperbola beyond the overflow guard (sinh(300)) */
    double vh[3] = {0, 200.0, 0};
    ck_assert_int_eq(sy_kepler_propagate(MU, r0, vh, 1e300, r, v), SY_ERR_ARG);
    /* dt = 0 returns the input */
    ck_assert_int_eq(sy_kepler_propagate(MU, r0, v0, 0.0, r, v), SY_OK);
    ck_assert_double_eq(r[0], r0[0]);
    ck_assert_double_eq(v[1], v0[1]);
}
END_TEST

/* ---------------------------------------------------------------- */
/* Bodies file                                                       */

static void demo_path(char *buf, size_t len)
{
    const char *src = getenv("SYNODIC_SRCDIR");
    snprintf(buf, len, "%s/share/synodic/demo-bodies.ini", src ? src : ".");
}

/* Rz(node) Rx(i) Rz(argp) applied to a perifocal vector (textbook form,
 * written independently of ephem.c). */
static void rotate_pf(double node, double inc, double argp, const double in[3],
                      double out[3])
{
    double x1 = cos(argp) * in[0] - sin(argp) * in[1];
    double y1 = sin(argp) * in[0] + cos(argp) * in[1];
    double y2 = cos(inc) * y1, z2 = sin(inc) * y1;
    out[0] = cos(node) * x1 - sin(node) * y2;
    out[1] = sin(node) * x1 + cos(node) * y2;
    out[2] = z2;
}

/* The demo bodies (values typed here from share/synodic/demo-bodies.ini)
 * propagated by the library vs the analytic conic. */
START_TEST(demo_bodies)
{
    char path[1024];
    demo_path(path, sizeof path);
    sy_catalog *cat = sy_catalog_new();
    sy_error err;
    ck_assert_ptr_nonnull(cat);
    ck_assert_msg(sy_catalog_load(cat, path, &err) == SY_OK, "%s", err.msg);
    ck_assert_uint_eq(sy_catalog_count(cat), 12);

    struct {
        const char *name;
        double q_au, e, i, node, argp, epoch_jd, tp_or_M;
        int has_M;
    } want[] = {
        /* 2029-06-01 = JD 2462288.5; 2031-03-14T08:00 = JD 2462939.8333;
         * 2032-09-02T18:30 = JD 2463478.2708 (proleptic Gregorian) */
        {"ilvani", 1.3124 * (1 - 0.2471), 0.2471, 4.136, 211.58, 67.92,
         2462288.5, 123.47, 1},
        {"Varro", 0.624, 1.8, 38.5, 302.14, 141.6, 2462939.5,
         2462939.5 + 8.0 / 24.0, 0},
        {"OSK", 0.41, 0.9995, 112.7, 27.33, 255.81, 2463477.5,
         2463477.5 + 18.5 / 24.0, 0},
    };
    for (size_t k = 0; k < 3; k++) {
        const sy_body *b = NULL;
        ck_assert_int_eq(sy_catalog_find(cat, want[k].name, &b, &err), SY_OK);
        ck_assert_int_eq(b->kind, SY_BODY_SMALL);
        double q = want[k].q_au * SY_AU_KM, e = want[k].e;
        ck_assert_double_le(fabs(b->q_km - q) / q, 1e-14);
        ck_assert_double_eq(b->e, e);
        ck_assert_double_eq_tol(b->epoch_jd_tdb, want[k].epoch_jd, 1e-9);
        double tp;
        if (want[k].has_M) {
            double a = q / (1 - e), n = sqrt(MU / (a * a * a));
            tp = want[k].epoch_jd - want[k].tp_or_M * DEG / n / SY_DAY_S;
        } else {
            tp = want[k].tp_or_M;
        }
        ck_assert_double_eq_tol(b->tp_jd_tdb, tp, 1e-6);
        ck_assert(b->valid_from_jd < b->epoch_jd_tdb && b->valid_to_jd > b->epoch_jd_tdb);
        const double offs_d[] = {0.0, -60.0, 45.0, 400.0};
        for (size_t j = 0; j < 4; j++) {
            double jd = want[k].epoch_jd + offs_d[j], r[3], v[3], rpf[3], vpf[3], ra[3], va[3];
            ck_assert_int_eq(sy_body_state(b, jd, r, v), SY_OK);
            analytic_pf(q, e, (jd - tp) * SY_DAY_S, rpf, vpf);
            rotate_pf(want[k].node * DEG, want[k].i * DEG, want[k].argp * DEG, rpf, ra);
            rotate_pf(want[k].node * DEG, want[k].i * DEG, want[k].argp * DEG, vpf, va);
            ck_assert_double_le(tu_dist3(r, ra) / tu_norm3(ra), 1e-9);
            ck_assert_double_le(tu_dist3(v, va) / tu_norm3(va), 1e-9);
        }
        ck_assert_int_eq(sy_body_state(b, b->valid_to_jd + 1.0, (double[3]){0},
                                       (double[3]){0}), SY_ERR_RANGE);
    }
    /* loading the same file again clashes with the loaded names */
    ck_assert_int_eq(sy_catalog_load(cat, path, &err), SY_ERR_PARSE);
    ck_assert_ptr_nonnull(strstr(err.msg, "Ilvani"));
    ck_assert_uint_eq(sy_catalog_count(cat), 12);
    sy_catalog_free(cat);
}
END_TEST

/* Write text to a temporary file; returns its path in buf. */
static void write_tmp(char *buf, size_t len, const char *text)
{
    snprintf(buf, len, "/tmp/synodic-check-kepler-XXXXXX");
    int fd = mkstemp(buf);
    ck_assert_int_ge(fd, 0);
    FILE *f = fdopen(fd, "w");
    ck_assert_ptr_nonnull(f);
    fputs(text, f);
    fclose(f);
}

#define GOOD_BODY                                                            \
    "epoch = 2030-01-01\n"                                                   \
    "e = 0.2\n"                                                              \
    "i_deg = 3\n"                                                            \
    "node_deg = 10\n"                                                        \
    "argp_deg = 20\n"                                                        \
    "mean_anomaly_deg = 30\n"

static const struct {
    const char *text;
    int line;
    const char *needle;
} parse_cases[] = {
    {"; unknown key\n[body Alpha]\na_au = 1.5\n" GOOD_BODY "colour = red\n", 10,
     "key 'colour': unknown key; accepted keys:"},
    {"[body Alpha]\na_au = 1.5\nepoch = 2030-01-01\ni_deg = 3\nnode_deg = 1\n"
     "argp_deg = 2\nperihelion = 2030-02-01\n", 1, "missing key 'e'"},
    {"[body Alpha]\na_au = 1.5\nq_au = 1.2\n" GOOD_BODY, 3, "both a_au"},
    {"[body Alpha]\na_au = 1.5x\n" GOOD_BODY, 2, "key 'a_au': '1.5x' is not a finite number"},
    {"[body Alpha]\na_au = 1.5\n" GOOD_BODY "\n[body alpha]\nq_au = 1\n" GOOD_BODY, 10,
     "duplicate body name"},
    {"[body mars]\na_au = 1.5\n" GOOD_BODY, 1, "clashes with the existing body 'Mars'"},
    {"[planet Alpha]\na_au = 1.5\n", 1, "unknown section [planet Alpha]"},
    {"[body Alpha]\na_au = -1.5\n" GOOD_BODY, 2, "must be > 0 for an ellipse"},
    {"[body Alpha]\nq_au = 1\nepoch = 2030-01-01\ne = 1\ni_deg = 3\nnode_deg = 1\n"
     "argp_deg = 2\nmean_anomaly_deg = 4\n", 8, "not defined for a parabola"},
    {"[body Alpha]\na_au = 1.5\n" GOOD_BODY "e = 0.3\n", 9, "given twice (first at line 4)"},
    {"[body Alpha]\na_au = inf\n" GOOD_BODY, 2, "not a finite number"},
    {"[body Alpha]\na_au = 1.5\nepoch = 2030-02-30\n", 3, "key 'epoch': invalid date"},
};

START_TEST(parse_errors)
{
    char path[64];
    write_tmp(path, sizeof path, parse_cases[_i].text);
    sy_catalog *cat = sy_catalog_new();
    ck_assert_ptr_nonnull(cat);
    sy_error err;
    err.msg[0] = '\0';
    ck_assert_int_eq(sy_catalog_load(cat, path, &err), SY_ERR_PARSE);
    char prefix[128];
    snprintf(prefix, sizeof prefix, "%s:%d: ", path, parse_cases[_i].line);
    ck_assert_msg(strncmp(err.msg, prefix, strlen(prefix)) == 0,
                  "message '%s' does not start with '%s'", err.msg, prefix);
    ck_assert_msg(strstr(err.msg, parse_cases[_i].needle) != NULL,
                  "message '%s' lacks '%s'", err.msg, parse_cases[_i].needle);
    ck_assert_uint_eq(sy_catalog_count(cat), 9); /* all-or-nothing */
    sy_catalog_free(cat);
    unlink(path);
}
END_TEST

START_TEST(load_ok_and_io_error)
{
    char path[64];
    write_tmp(path, sizeof path,
              "# hyperbola given by a negative a\n[body  Beta  ]\n"
              "a_au = -2.0\nepoch = JD2462000.5\ne = 1.25\ni_deg = 170\n"
              "node_deg = 0\nargp_deg = 0\nmean_anomaly_deg = 10 ; inline\n");
    sy_catalog *cat = sy_catalog_new();
    sy_error err;
    ck_assert_msg(sy_catalog_load(cat, path, &err) == SY_OK, "%s", err.msg);
    const sy_body *b = NULL;
    ck_assert_int_eq(sy_catalog_find(cat, "beta", &b, &err), SY_OK);
    ck_assert_str_eq(b->name, "Beta");
    ck_assert_double_le(fabs(b->q_km - 0.5 * SY_AU_KM) / SY_AU_KM, 1e-15);
    char src[80];
    snprintf(src, sizeof src, "%s:2", path);
    ck_assert_str_eq(b->source, src);
    unlink(path);
    ck_assert_int_eq(sy_catalog_load(cat, "/nonexistent/dir/bodies.ini", &err), SY_ERR_IO);
    ck_assert_ptr_nonnull(strstr(err.msg, "/nonexistent/dir/bodies.ini"));
    sy_catalog_free(cat);
}
END_TEST

int main(void)
{
    Suite *s = suite_create("kepler");
    TCase *tc = tcase_create("kepler");
    tcase_add_loop_test(tc, vs_analytic, 0, 6);
    tcase_add_loop_test(tc, conservation, 0, 6);
    tcase_add_loop_test(tc, round_trip, 0, 6);
    tcase_add_test(tc, many_revolutions);
    tcase_add_test(tc, near_parabolic);
    tcase_add_test(tc, vs_rk8pd_hyperbola);
    tcase_add_test(tc, bad_input);
    suite_add_tcase(s, tc);
    TCase *tb = tcase_create("bodies");
    tcase_add_test(tb, demo_bodies);
    tcase_add_loop_test(tb, parse_errors, 0,
                        (int)(sizeof parse_cases / sizeof parse_cases[0]));
    tcase_add_test(tb, load_ok_and_io_error);
    suite_add_tcase(s, tb);
    return tu_run(s);
}
