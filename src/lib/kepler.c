/* kepler.c - two-body propagation with the universal variable.
 *
 * Method: universal-variable formulation of Kepler's problem with the
 * Stumpff functions c2(psi), c3(psi) and the Lagrange coefficients f, g,
 * fdot, gdot: R. R. Bate, D. D. Mueller, J. E. White, "Fundamentals of
 * Astrodynamics" (1971), ch. 4, and D. A. Vallado, "Fundamentals of
 * Astrodynamics and Applications", Algorithm 8 (KEPLER).  One formulation
 * covers ellipses, the parabola (psi = 0 exactly) and hyperbolas.
 *
 * Root finding: the time of flight t(chi) is strictly increasing in the
 * universal variable chi (dt/dchi = r / sqrt(mu) > 0), so the root is
 * bracketed by expanding an interval from chi = 0 in the direction of dt
 * and then found with GSL's Brent solver (gsl_root_fsolver_brent), polished
 * with a few Newton steps (the derivative r is free).
 *
 * Numerics: the problem is made dimensionless with the length |r0| and the
 * time sqrt(|r0|^3 / mu), so that mu = 1 and |r0| = 1; for ellipses dt is
 * first reduced modulo the period, which keeps chi small and the result
 * accurate after many revolutions.
 */
#include "config.h"
#include "synodic.h"

#include <float.h>
#include <math.h>

#include <gsl/gsl_errno.h>
#include <gsl/gsl_roots.h>

#ifndef M_PI
#define M_PI 3.14159265358979323846
#endif

/* Largest hyperbolic anomaly difference sqrt(-psi) accepted: sinh(300) is
 * about 1e130, far beyond any time of flight of interest, and well clear of
 * overflow in cosh/sinh (~710) and in the products chi^3 c3. */
#define SQRT_MINUS_PSI_MAX 300.0

/* Stumpff functions c2 = (1 - cos sqrt(psi)) / psi and
 * c3 = (sqrt(psi) - sin sqrt(psi)) / psi^(3/2) (and their hyperbolic forms
 * for psi < 0).  Near psi = 0 the closed forms cancel catastrophically, so
 * |psi| < 1 uses the series c2 = sum (-psi)^k / (2k+2)!,
 * c3 = sum (-psi)^k / (2k+3)! (Bate, Mueller, White, eq. 4.5-10/11),
 * summed until the terms fall below 1e-17 of the result. */
static void stumpff(double psi, double *c2, double *c3)
{
    if (fabs(psi) < 1.0) {
        double t2 = 0.5, t3 = 1.0 / 6.0, s2 = 0.0, s3 = 0.0;
        for (int k = 0; k < 30; k++) {
            s2 += t2;
            s3 += t3;
            if (fabs(t2) < 1e-17 * fabs(s2) && fabs(t3) < 1e-17 * fabs(s3))
                break;
            t2 *= -psi / ((2.0 * k + 3.0) * (2.0 * k + 4.0));
            t3 *= -psi / ((2.0 * k + 4.0) * (2.0 * k + 5.0));
        }
        *c2 = s2;
        *c3 = s3;
    } else if (psi > 0.0) {
        double s = sqrt(psi);
        *c2 = (1.0 - cos(s)) / psi;
        *c3 = (s - sin(s)) / (s * psi);
    } else {
        double s = sqrt(-psi);
        *c2 = (1.0 - cosh(s)) / psi;
        *c3 = (sinh(s) - s) / (s * -psi);
    }
}

/* Dimensionless problem (mu = 1, |r0| = 1). */
typedef struct {
    double sigma0;   /* r0 . v0 / sqrt(mu)        */
    double alpha;    /* 1/a = 2/r0 - v0^2/mu      */
    double dt;       /* target time of flight     */
} ukep;

/* Time of flight t(chi) (universal Kepler equation, BMW eq. 4.4-14 with
 * r0 = 1) and the radius r(chi) = dt/dchi (eq. 4.4-17). */
static double ukep_time(const ukep *k, double chi, double *r)
{
    double psi = k->alpha * chi * chi, c2, c3;
    stumpff(psi, &c2, &c3);
    double chi2 = chi * chi;
    if (r)
        *r = chi2 * c2 + k->sigma0 * chi * (1.0 - psi * c3) + (1.0 - psi * c2);
    return k->sigma0 * chi2 * c2 + (1.0 - k->alpha) * chi2 * chi * c3 + chi;
}

static double ukep_residual(double chi, void *params)
{
    const ukep *k = params;
    return ukep_time(k, chi, NULL) - k->dt;
}

/* True when chi stays within the overflow guard for hyperbolas. */
static int chi_allowed(const ukep *k, double chi)
{
    return !(k->alpha < 0.0 &&
             chi * chi * -k->alpha > SQRT_MINUS_PSI_MAX * SQRT_MINUS_PSI_MAX);
}

static sy_status solve_chi(const ukep *k, double *chi_out)
{
    double dir = k->dt > 0.0 ? 1.0 : -1.0;
    /* Expand [lo, hi] (in the direction of dt) until t(hi) passes dt;
     * t(0) = 0.  dt/dchi = r ~ 1 near the start, so |dt| is a natural
     * first step. */
    double lo = 0.0, step = fabs(k->dt), hi = dir * step;
    int it;
    for (it = 0; it < 2000; it++) {
        if (!chi_allowed(k, hi)) {
            hi = dir * SQRT_MINUS_PSI_MAX / sqrt(-k->alpha);
            if (dir * ukep_residual(hi, (void *)k) < 0.0)
                return SY_ERR_ARG; /* beyond the overflow guard */
            break;
        }
        double res = ukep_residual(hi, (void *)k);
        if (!isfinite(res))
            return SY_ERR_NOCONV;
        if (dir * res >= 0.0)
            break;
        lo = hi;
        step *= 2.0;
        hi = lo + dir * step;
    }
    if (it == 2000)
        return SY_ERR_NOCONV;

    double a = dir > 0 ? lo : hi, b = dir > 0 ? hi : lo;
    double fa = ukep_residual(a, (void *)k), fb = ukep_residual(b, (void *)k);
    double chi;
    if (fa == 0.0) {
        chi = a;
    } else if (fb == 0.0) {
        chi = b;
    } else {
        if (!(fa < 0.0 && fb > 0.0))
            return SY_ERR_NOCONV;
        gsl_root_fsolver *s = gsl_root_fsolver_alloc(gsl_root_fsolver_brent);
        if (!s)
            return SY_ERR_NOMEM;
        gsl_function F = {ukep_residual, (void *)k};
        if (gsl_root_fsolver_set(s, &F, a, b) != GSL_SUCCESS) {
            gsl_root_fsolver_free(s);
            return SY_ERR_NOCONV;
        }
        int status = GSL_CONTINUE;
        for (it = 0; it < 300 && status == GSL_CONTINUE; it++) {
            if (gsl_root_fsolver_iterate(s) != GSL_SUCCESS)
                break;
            status = gsl_root_test_interval(gsl_root_fsolver_x_lower(s),
                                            gsl_root_fsolver_x_upper(s),
                                            1e-15 * fmax(fabs(a), fabs(b)), 1e-13);
        }
        chi = gsl_root_fsolver_root(s);
        gsl_root_fsolver_free(s);
        if (status != GSL_SUCCESS)
            return SY_ERR_NOCONV;
    }
    /* Newton polish (quadratic convergence; r = dt/dchi > 0), staying in
     * the bracket. */
    for (it = 0; it < 4; it++) {
        double r, f = ukep_time(k, chi, &r) - k->dt;
        if (f == 0.0 || !(r > 0.0))
            break;
        double next = chi - f / r;
        if (!(next >= a && next <= b))
            break;
        chi = next;
    }
    double resid = ukep_residual(chi, (void *)k);
    if (!(fabs(resid) <= 1e-11 * (1.0 + fabs(k->dt))))
        return SY_ERR_NOCONV;
    *chi_out = chi;
    return SY_OK;
}

sy_status sy_kepler_propagate(double mu_km3_s2, const double r0_km[3],
                              const double v0_km_s[3], double dt_s,
                              double r_km[3], double v_km_s[3])
{
    if (!r0_km || !v0_km_s || !r_km || !v_km_s)
        return SY_ERR_ARG;
    if (!(mu_km3_s2 > 0.0) || !isfinite(mu_km3_s2) || !isfinite(dt_s))
        return SY_ERR_ARG;
    for (int i = 0; i < 3; i++)
        if (!isfinite(r0_km[i]) || !isfinite(v0_km_s[i]))
            return SY_ERR_ARG;
    double R = sqrt(r0_km[0] * r0_km[0] + r0_km[1] * r0_km[1] +
                    r0_km[2] * r0_km[2]);
    if (!(R > 0.0))
        return SY_ERR_ARG;

    /* Units: length R, time TU = sqrt(R^3/mu), speed VU = R / TU. */
    double TU = sqrt(R * R * R / mu_km3_s2), VU = R / TU;
    double r0[3], v0[3];
    for (int i = 0; i < 3; i++) {
        r0[i] = r0_km[i] / R;
        v0[i] = v0_km_s[i] / VU;
    }
    double v2 = v0[0] * v0[0] + v0[1] * v0[1] + v0[2] * v0[2];
    ukep k;
    k.sigma0 = r0[0] * v0[0] + r0[1] * v0[1] + r0[2] * v0[2];
    k.alpha = 2.0 - v2;
    k.dt = dt_s / TU;

    /* Ellipse: only dt modulo the period matters; keep |dt| <= P/2. */
    if (k.alpha > 0.0) {
        double P = 2.0 * M_PI / (k.alpha * sqrt(k.alpha));
        if (fabs(k.dt) > 0.5 * P)
            k.dt -= P * nearbyint(k.dt / P);
    }

    double chi = 0.0;
    if (k.dt != 0.0) {
        sy_status st = solve_chi(&k, &chi);
        if (st != SY_OK)
            return st;
    }

    double psi = k.alpha * chi * chi, c2, c3, r;
    stumpff(psi, &c2, &c3);
    ukep_time(&k, chi, &r);
    if (!(r > 0.0))
        return SY_ERR_NOCONV;
    double chi2 = chi * chi;
    /* Lagrange coefficients (BMW eq. 4.4-31 .. 4.4-36, mu = r0 = 1). */
    double f = 1.0 - chi2 * c2;
    double g = k.dt - chi2 * chi * c3;
    double fdot = chi * (psi * c3 - 1.0) / r;
    double gdot = 1.0 - chi2 * c2 / r;
    for (int i = 0; i < 3; i++) {
        r_km[i] = (f * r0[i] + g * v0[i]) * R;
        v_km_s[i] = (fdot * r0[i] + gdot * v0[i]) * VU;
    }
    return SY_OK;
}
