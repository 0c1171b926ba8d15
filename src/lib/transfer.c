/* transfer.c - launch and arrival figures of a patched-conic transfer.
 *
 * The heliocentric arc comes from Lambert's problem; at each end the
 * hyperbolic excess velocity is the arc's velocity minus the body's
 * (patched-conic approximation: the planet's sphere of influence is
 * shrunk to a point).  Formulas of the trade used here (common practice,
 * e.g. Vallado, "Fundamentals of Astrodynamics and Applications", ch. 12):
 *   C3 = |v_inf|^2
 *   DLA/RLA = declination / right ascension of v_inf in EME2000
 *   dv_dep  = sqrt(C3 + 2 GM / r_park) - sqrt(GM / r_park)
 *   dv_cap  = sqrt(v_inf^2 + 2 GM / r_p) - sqrt(2 GM / r_p * r_a / (r_a + r_p))
 *   v_entry = sqrt(v_inf^2 + 2 GM / r_entry)
 */
#include "config.h"
#include "synodic.h"

#include <math.h>
#include <string.h>

static double dot3(const double a[3], const double b[3])
{
    return a[0] * b[0] + a[1] * b[1] + a[2] * b[2];
}

static void cross3(const double a[3], const double b[3], double c[3])
{
    c[0] = a[1] * b[2] - a[2] * b[1];
    c[1] = a[2] * b[0] - a[0] * b[2];
    c[2] = a[0] * b[1] - a[1] * b[0];
}

double sy_dv_departure(double gm, double r_park_km, double c3_km2_s2)
{
    return sqrt(c3_km2_s2 + 2.0 * gm / r_park_km) - sqrt(gm / r_park_km);
}

double sy_dv_capture(double gm, double vinf_km_s, double rp_km, double ra_km)
{
    double v_peri_hyp = sqrt(vinf_km_s * vinf_km_s + 2.0 * gm / rp_km);
    double v_peri_ell = sqrt(2.0 * gm / rp_km * ra_km / (ra_km + rp_km));
    return v_peri_hyp - v_peri_ell;
}

double sy_entry_speed(double gm, double vinf_km_s, double r_km)
{
    return sqrt(vinf_km_s * vinf_km_s + 2.0 * gm / r_km);
}

void sy_asymptote_radec(const double vec_ecl[3], double *dec_deg,
                        double *ra_deg)
{
    double eq[3];
    sy_ecl_to_eq(vec_ecl, eq);
    double n = sqrt(dot3(eq, eq));
    if (n == 0.0) {
        *dec_deg = 0.0;
        *ra_deg = 0.0;
        return;
    }
    double s = eq[2] / n;
    if (s > 1.0) s = 1.0;
    if (s < -1.0) s = -1.0;
    *dec_deg = asin(s) * (180.0 / M_PI);
    double ra = atan2(eq[1], eq[0]) * (180.0 / M_PI);
    if (ra < 0.0) ra += 360.0;
    if (ra >= 360.0) ra -= 360.0;
    *ra_deg = ra;
}

/* Closest approach to the Sun along the arc r1 -> r2: the conic's
 * periapsis when the arc sweeps through it, otherwise the nearer end. */
static double min_sun_distance_km(double mu, const double r1[3],
                                  const double v1[3], double sweep_rad,
                                  int revs, double r2n)
{
    double r1n = sqrt(dot3(r1, r1));
    double h[3], vxh[3];
    cross3(r1, v1, h);
    cross3(v1, h, vxh);
    double ev[3];
    for (int k = 0; k < 3; k++) ev[k] = vxh[k] / mu - r1[k] / r1n;
    double e = sqrt(dot3(ev, ev));
    double p = dot3(h, h) / mu;
    double rp = p / (1.0 + e);
    double rend = r1n < r2n ? r1n : r2n;
    if (revs > 0) return rp < rend ? rp : rend;
    if (e < 1e-12) return rend;
    double c = dot3(ev, r1) / (e * r1n);
    if (c > 1.0) c = 1.0;
    if (c < -1.0) c = -1.0;
    double nu1 = acos(c);
    if (dot3(r1, v1) < 0.0) nu1 = 2.0 * M_PI - nu1;
    if (nu1 + sweep_rad >= 2.0 * M_PI) return rp < rend ? rp : rend;
    return rend;
}

static int finite3(const double v[3])
{
    return isfinite(v[0]) && isfinite(v[1]) && isfinite(v[2]);
}

sy_status sy_transfer_from_states(const double r1_km[3],
                                  const double vb1_km_s[3],
                                  const double r2_km[3],
                                  const double vb2_km_s[3], double tof_s,
                                  int revs, sy_branch branch,
                                  double gm_from, double radius_from_km,
                                  double gm_to, double radius_to_km,
                                  const sy_transfer_opts *opts,
                                  sy_transfer *out)
{
    if (!out || !finite3(vb1_km_s) || !finite3(vb2_km_s))
        return SY_ERR_ARG;
    sy_lambert_solution sol;
    sy_status st = sy_lambert(SY_GM_SUN_KM3_S2, r1_km, r2_km, tof_s, revs,
                              branch, 0, &sol);
    if (st != SY_OK) return st;

    out->tof_days = tof_s / SY_DAY_S;
    out->revs = revs;
    out->branch = branch;
    memcpy(out->v1_km_s, sol.v1_km_s, sizeof out->v1_km_s);
    memcpy(out->v2_km_s, sol.v2_km_s, sizeof out->v2_km_s);

    /* Transfer angle in the direction of (prograde) motion. */
    double r1n = sqrt(dot3(r1_km, r1_km)), r2n = sqrt(dot3(r2_km, r2_km));
    double c = dot3(r1_km, r2_km) / (r1n * r2n);
    if (c > 1.0) c = 1.0;
    if (c < -1.0) c = -1.0;
    double theta = acos(c);
    double h[3];
    cross3(r1_km, r2_km, h);
    if (h[2] < 0.0) theta = 2.0 * M_PI - theta;
    out->transfer_angle_deg = theta * (180.0 / M_PI);
    out->type = theta < M_PI ? 1 : 2;

    for (int k = 0; k < 3; k++) {
        out->vinf_dep_vec_km_s[k] = sol.v1_km_s[k] - vb1_km_s[k];
        out->vinf_arr_vec_km_s[k] = sol.v2_km_s[k] - vb2_km_s[k];
    }
    out->c3_km2_s2 = dot3(out->vinf_dep_vec_km_s, out->vinf_dep_vec_km_s);
    out->vinf_dep_km_s = sqrt(out->c3_km2_s2);
    out->c3_arr_km2_s2 = dot3(out->vinf_arr_vec_km_s, out->vinf_arr_vec_km_s);
    out->vinf_arr_km_s = sqrt(out->c3_arr_km2_s2);
    sy_asymptote_radec(out->vinf_dep_vec_km_s, &out->dla_deg, &out->rla_deg);
    sy_asymptote_radec(out->vinf_arr_vec_km_s, &out->dap_deg, &out->rap_deg);
    out->min_sun_dist_au =
        min_sun_distance_km(SY_GM_SUN_KM3_S2, r1_km, sol.v1_km_s, theta,
                            revs, r2n) / SY_AU_KM;

    out->dv_dep_km_s = NAN;
    out->dv_cap_km_s = NAN;
    out->dv_total_km_s = NAN;
    out->v_entry_km_s = NAN;
    if (opts && opts->want_park && gm_from > 0 && radius_from_km > 0)
        out->dv_dep_km_s = sy_dv_departure(gm_from, radius_from_km + opts->park_alt_km,
                                           out->c3_km2_s2);
    if (opts && opts->want_capture && gm_to > 0 && radius_to_km > 0)
        out->dv_cap_km_s = sy_dv_capture(gm_to, out->vinf_arr_km_s,
                                         radius_to_km + opts->capture_peri_km,
                                         radius_to_km + opts->capture_apo_km);
    if (opts && opts->want_entry && gm_to > 0 && radius_to_km > 0)
        out->v_entry_km_s = sy_entry_speed(gm_to, out->vinf_arr_km_s,
                                           radius_to_km + opts->entry_alt_km);
    if (isfinite(out->dv_dep_km_s) && isfinite(out->dv_cap_km_s))
        out->dv_total_km_s = out->dv_dep_km_s + out->dv_cap_km_s;
    if (!isfinite(out->c3_km2_s2) || !isfinite(out->c3_arr_km2_s2))
        return SY_ERR_NOCONV;
    return SY_OK;
}

/* Check the options against the bodies; explain what is missing. */
static sy_status check_opts(const sy_body *from, const sy_body *to,
                            const sy_transfer_opts *o, sy_error *err)
{
    if (!o) return SY_OK;
    if (o->want_park) {
        if (!(o->park_alt_km >= 0 && isfinite(o->park_alt_km)))
            return sy_fail(err, SY_ERR_ARG, "parking-orbit altitude %g km must be zero or positive", o->park_alt_km);
        if (!(from->gm_km3_s2 > 0 && from->radius_km > 0))
            return sy_fail(err, SY_ERR_ARG, "departure delta-v needs the GM and radius of %s; give gm_km3_s2 and radius_km in its bodies file", from->name);
    }
    if (o->want_capture) {
        if (!(o->capture_peri_km >= 0 && isfinite(o->capture_peri_km) &&
              isfinite(o->capture_apo_km)))
            return sy_fail(err, SY_ERR_ARG, "capture periapsis altitude %g km must be zero or positive", o->capture_peri_km);
        if (!(o->capture_apo_km >= o->capture_peri_km))
            return sy_fail(err, SY_ERR_ARG, "capture apoapsis altitude %g km must not be below the periapsis altitude %g km", o->capture_apo_km, o->capture_peri_km);
        if (!(to->gm_km3_s2 > 0 && to->radius_km > 0))
            return sy_fail(err, SY_ERR_ARG, "capture delta-v needs the GM and radius of %s; give gm_km3_s2 and radius_km in its bodies file", to->name);
    }
    if (o->want_entry) {
        if (!(o->entry_alt_km >= 0 && isfinite(o->entry_alt_km)))
            return sy_fail(err, SY_ERR_ARG, "entry-interface altitude %g km must be zero or positive", o->entry_alt_km);
        if (!(to->gm_km3_s2 > 0 && to->radius_km > 0))
            return sy_fail(err, SY_ERR_ARG, "entry speed needs the GM and radius of %s; give gm_km3_s2 and radius_km in its bodies file", to->name);
    }
    return SY_OK;
}

static sy_status body_state_err(const sy_body *b, double jd, const char *what,
                                double r[3], double v[3], sy_error *err)
{
    sy_status st = sy_body_state(b, jd, r, v);
    if (st == SY_OK) return SY_OK;
    char d[40], d0[40], d1[40];
    sy_date_format(jd, 0, d, sizeof d);
    sy_date_format(b->valid_from_jd, 0, d0, sizeof d0);
    sy_date_format(b->valid_to_jd, 0, d1, sizeof d1);
    if (st == SY_ERR_RANGE)
        return sy_fail(err, st, "%s date %s is outside the validity of %s's model (%s to %s)", what, d, b->name, d0, d1);
    return sy_fail(err, st, "position of %s at %s: %s", b->name, d, sy_status_str(st));
}

sy_status sy_transfer_compute(const sy_body *from, const sy_body *to,
                              double jd_dep, double jd_arr, int revs,
                              sy_branch branch, const sy_transfer_opts *opts,
                              sy_transfer *out, sy_error *err)
{
    if (!from || !to || !out) return sy_fail(err, SY_ERR_ARG, "missing body");
    if (from == to || strcmp(from->name, to->name) == 0)
        return sy_fail(err, SY_ERR_ARG, "departure and arrival body are both %s; choose two different bodies", from->name);
    if (!isfinite(jd_dep) || !isfinite(jd_arr))
        return sy_fail(err, SY_ERR_ARG, "dates must be finite");
    if (!(jd_arr > jd_dep)) {
        char a[40], b[40];
        sy_date_format(jd_dep, 1, a, sizeof a);
        sy_date_format(jd_arr, 1, b, sizeof b);
        return sy_fail(err, SY_ERR_ARG, "arrival %s is not after departure %s; give an arrival date later than the departure", b, a);
    }
    /* Patched conics assume the flight is long compared with the hours
     * spent leaving the departure body's sphere of influence (common
     * practice): below a day the figures would be numbers without meaning
     * (a one-second Earth-Mars flight would be faster than light). */
    if ((jd_arr - jd_dep) < SY_MIN_FLIGHT_DAYS) {
        char a[40], b[40];
        sy_date_format(jd_dep, 1, a, sizeof a);
        sy_date_format(jd_arr, 1, b, sizeof b);
        return sy_fail(err, SY_ERR_ARG, "a flight of %.3g s (%s to %s) is shorter than the 1 day minimum of the patched-conic model; give an arrival at least a day after the departure", (jd_arr - jd_dep) * SY_DAY_S, a, b);
    }
    if (revs < 0 || revs > 1000)
        return sy_fail(err, SY_ERR_ARG, "revolutions %d must be between 0 and 1000", revs);
    sy_status st = check_opts(from, to, opts, err);
    if (st != SY_OK) return st;
    double r1[3], v1[3], r2[3], v2[3];
    if ((st = body_state_err(from, jd_dep, "departure", r1, v1, err)) != SY_OK)
        return st;
    if ((st = body_state_err(to, jd_arr, "arrival", r2, v2, err)) != SY_OK)
        return st;
    st = sy_transfer_from_states(r1, v1, r2, v2, (jd_arr - jd_dep) * SY_DAY_S,
                                 revs, branch, from->gm_km3_s2, from->radius_km,
                                 to->gm_km3_s2, to->radius_km, opts, out);
    out->jd_dep = jd_dep;
    out->jd_arr = jd_arr;
    switch (st) {
    case SY_OK: return SY_OK;
    case SY_ERR_NOSOL:
        return sy_fail(err, st, "no %d-revolution transfer exists for a %.2f-day flight; lengthen the flight or use fewer revolutions", revs, jd_arr - jd_dep);
    case SY_ERR_DEGENERATE:
        return sy_fail(err, st, "the transfer angle is 0 or 180 deg, where the transfer plane is undefined; move either date by a day");
    default:
        return sy_fail(err, st, "Lambert solution failed: %s", sy_status_str(st));
    }
}
