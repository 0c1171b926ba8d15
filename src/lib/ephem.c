/* ephem.c - heliocentric states of the built-in planets (mean elements)
 * and of small bodies (osculating conics).
 *
 * Planets follow the procedure that accompanies the tables: E. M. Standish,
 * "Keplerian Elements for Approximate Positions of the Major Planets", JPL
 * Solar System Dynamics: elements at T, M = L - varpi (+ Table 2b terms),
 * Kepler's equation, coordinates in the orbital plane, rotation by omega,
 * I, Omega to the mean ecliptic and equinox of J2000.
 */
#include "config.h"
#include "synodic.h"

#include "elements.h"

#include <math.h>

#ifndef M_PI
#define M_PI 3.14159265358979323846
#endif
#define DEG (M_PI / 180.0)
#define CENTURY_S (SY_JULIAN_CENTURY_DAYS * SY_DAY_S)

/* Solve Kepler's equation E - e sin E = M for 0 <= e < 1 by Newton's
 * method.  M is first reduced to [-pi, pi]; the starting guess
 * E0 = M + 0.85 e sign(sin M) (Danby 1988, "Fundamentals of Celestial
 * Mechanics", sec. 6.6) keeps Newton monotone for every e < 1.  The
 * iteration stops when the correction is below 1e-14 rad. */
static sy_status kepler_ellipse(double M, double e, double *E_out)
{
    if (!(e >= 0.0 && e < 1.0) || !isfinite(M))
        return SY_ERR_ARG;
    M = remainder(M, 2.0 * M_PI);
    double E = M + 0.85 * e * (sin(M) >= 0.0 ? 1.0 : -1.0);
    for (int it = 0; it < 50; it++) {
        double dE = (E - e * sin(E) - M) / (1.0 - e * cos(E));
        E -= dE;
        if (fabs(dE) <= 1e-14) {
            *E_out = E;
            return SY_OK;
        }
    }
    return SY_ERR_NOCONV;
}

/* Rotate an orbital-plane vector (x along perihelion, y 90 deg ahead in
 * the direction of motion) by argument of perihelion w, inclination i and
 * node n into the ecliptic frame (Standish, ibid., eq. 8.34 of the
 * Explanatory Supplement, 1992). */
static void plane_to_ecliptic(double w, double i, double n, double x,
                              double y, double out[3])
{
    double cw = cos(w), sw = sin(w), ci = cos(i), si = sin(i);
    double cn = cos(n), sn = sin(n);
    out[0] = (cw * cn - sw * sn * ci) * x + (-sw * cn - cw * sn * ci) * y;
    out[1] = (cw * sn + sw * cn * ci) * x + (-sw * sn + cw * cn * ci) * y;
    out[2] = (sw * si) * x + (cw * si) * y;
}

sy_status sy_planet_state_from_set(const sy_elem_set *set, double jd_tdb,
                                   double r_km[3], double v_km_s[3])
{
    if (!set || !set->row || !r_km || !v_km_s || !isfinite(jd_tdb))
        return SY_ERR_ARG;
    const sy_elem6 *e0 = &set->row->j2000, *de = &set->row->rate_cy;
    double T = (jd_tdb - SY_J2000_JD) / SY_JULIAN_CENTURY_DAYS;

    double a_au = e0->a_au + de->a_au * T;
    double e = e0->e + de->e * T;
    double I = (e0->i_deg + de->i_deg * T) * DEG;
    double L_deg = e0->L_deg + de->L_deg * T;
    double varpi_deg = e0->varpi_deg + de->varpi_deg * T;
    double node_deg = e0->node_deg + de->node_deg * T;

    /* Mean anomaly and its rate.  The rate is dL/dt plus the derivative of
     * the Table 2b terms; d(varpi)/dt is not subtracted because varpi is
     * held fixed together with the other slow elements (see below), and
     * the partial derivative of the position with respect to L at fixed
     * varpi is the partial with respect to M. */
    double M_deg = L_deg - varpi_deg;
    double Mdot_deg_cy = de->L_deg;
    if (set->extra) {
        const sy_elem_2b *x = set->extra;
        double fT = x->f_deg * T * DEG;
        M_deg += x->b_deg * T * T + x->c_deg * cos(fT) + x->s_deg * sin(fT);
        Mdot_deg_cy += 2.0 * x->b_deg * T +
                       (-x->c_deg * sin(fT) + x->s_deg * cos(fT)) * x->f_deg * DEG;
    }
    double n_rad_s = Mdot_deg_cy * DEG / CENTURY_S;

    double E;
    sy_status st = kepler_ellipse(M_deg * DEG, e, &E);
    if (st != SY_OK)
        return st;

    double a_km = a_au * SY_AU_KM;
    double cE = cos(E), sE = sin(E), sq = sqrt(1.0 - e * e);
    double x = a_km * (cE - e), y = a_km * sq * sE;
    /* Analytic time derivative with a, e, I, varpi, Omega frozen at their
     * values at T.  Their rates (< 0.6 deg/century in the angles, < 2e-3
     * au/century in a) are small against the mean motion; measured against
     * a finite difference of the full position model (tests/check_ephem.c)
     * the neglected part is < 1e-5 of the speed for Mercury..Jupiter but
     * reaches 6e-5 (Saturn), 1e-4 (Uranus) and 1.7e-4 (Pluto) with
     * Table 1, whose outer-planet element rates are largest relative to
     * the slow mean motions.  That is still ~10x below the elements' own
     * velocity error (~1e-3 against eraPlan94). */
    double Edot = n_rad_s / (1.0 - e * cE);
    double xd = -a_km * sE * Edot, yd = a_km * sq * cE * Edot;

    double w = (varpi_deg - node_deg) * DEG, Om = node_deg * DEG;
    plane_to_ecliptic(w, I, Om, x, y, r_km);
    plane_to_ecliptic(w, I, Om, xd, yd, v_km_s);
    return SY_OK;
}

sy_status sy_body_state(const sy_body *body, double jd_tdb, double r_km[3],
                        double v_km_s[3])
{
    if (!body || !r_km || !v_km_s || !isfinite(jd_tdb))
        return SY_ERR_ARG;
    if (jd_tdb < body->valid_from_jd || jd_tdb >= body->valid_to_jd)
        return SY_ERR_RANGE;

    if (body->kind == SY_BODY_PLANET) {
        sy_elem_set set;
        sy_status st = sy_planet_elements_at(body->planet, jd_tdb, &set);
        if (st != SY_OK)
            return st;
        return sy_planet_state_from_set(&set, jd_tdb, r_km, v_km_s);
    }
    if (body->kind != SY_BODY_SMALL)
        return SY_ERR_ARG;

    /* Small body: state at perihelion from (q, e, i, node, argp), then a
     * two-body propagation to jd.  At perihelion the velocity is normal
     * to the radius with speed sqrt(mu (1 + e) / q) (vis-viva with
     * r = q = a (1 - e), valid for every e including the parabola).  mu is
     * the Sun's GM alone: a small body's own GM (< 1e-10 of the Sun's for
     * anything below 1000 km) is negligible. */
    if (!(body->q_km > 0.0) || !(body->e >= 0.0) || !isfinite(body->e) ||
        !isfinite(body->tp_jd_tdb))
        return SY_ERR_ARG;
    double mu = SY_GM_SUN_KM3_S2;
    double vp = sqrt(mu * (1.0 + body->e) / body->q_km);
    double r0[3], v0[3];
    plane_to_ecliptic(body->argp_rad, body->i_rad, body->node_rad, body->q_km,
                      0.0, r0);
    plane_to_ecliptic(body->argp_rad, body->i_rad, body->node_rad, 0.0, vp,
                      v0);
    return sy_kepler_propagate(mu, r0, v0, (jd_tdb - body->tp_jd_tdb) * SY_DAY_S,
                               r_km, v_km_s);
}
