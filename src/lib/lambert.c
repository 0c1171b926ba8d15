/* lambert.c - Lambert's problem by the method of D. Izzo, "Revisiting
 * Lambert's problem", Celestial Mechanics and Dynamical Astronomy 121
 * (2015) 1-15, cited below as "Izzo".  Equations are cited by what they
 * define (the paper was not at hand to check its equation numbering, so
 * no numbers are given rather than possibly wrong ones).
 *
 * Outline (Izzo, following its Algorithm 1):
 *   1. geometry: chord c, semi-perimeter s, lambda with lambda^2 = 1 - c/s,
 *      the sign of lambda and the tangential unit vectors from the sense of
 *      motion;
 *   2. non-dimensional time T = sqrt(2 mu / s^3) tof;
 *   3. solve T(x) = T for the variable x with Householder (third order)
 *      iterations from the paper's initial guesses; for revs >= 1 the
 *      N-revolution minimum T_min is found first by Halley iterations on
 *      dT/dx = 0, and tof below it is reported as SY_ERR_NOSOL;
 *   4. velocities from x via gamma, rho, sigma (radial and tangential
 *      components).
 *
 * Choices of this implementation (not dictated by the paper):
 *
 *   Degenerate geometry.  The transfer plane is spanned by r1 and r2; when
 *   |r1 x r2| < 1e-10 |r1| |r2| (transfer angle within ~1e-10 rad of 0 or
 *   180 deg) the plane, hence the direction of v1 and v2, is undefined
 *   (at 180 deg every plane through the line of apsides is a solution; at
 *   0 deg the chord vanishes).  Rather than pick an arbitrary plane we
 *   return SY_ERR_DEGENERATE; callers (porkchop grids) skip such cells.
 *   A zero position vector, or one whose norm overflows, is also
 *   SY_ERR_DEGENERATE.  Non-finite inputs (NaN/Inf in any component, mu
 *   or tof), mu <= 0, tof <= 0, revs < 0, a NULL pointer or an invalid
 *   branch for revs >= 1 are SY_ERR_ARG.
 *
 *   Sense of motion.  As in Izzo (Algorithm 1): with h = r1 x r2, if
 *   h_z >= 0 the prograde (counter-clockwise seen from +z) transfer is the
 *   short way (lambda >= 0), otherwise the long way (lambda < 0, tangential
 *   directions reversed).  retrograde != 0 flips lambda and the tangential
 *   directions.  When h_z == 0 exactly (plane contains the z axis)
 *   "prograde" means the motion along r1 x r2, i.e. the short way.
 *
 *   Branches (revs >= 1).  Following Izzo (figure of T(x) for
 *   M >= 1), T(x) has a single minimum at x_min in (0, 1); the LEFT
 *   solution is the one with x < x_min (x near -1 for long tof), the
 *   RIGHT solution the one with x > x_min (x near +1 for long tof).  For
 *   an ellipse x = cos(alpha/2) with 1 - x^2 = a_m/a (alpha of Lagrange's
 *   equation), so LEFT is the solution with the larger alpha.  We bracket
 *   each branch with x_min so an iterate can never wander onto the other
 *   branch; tests/check_lambert.c checks the convention by recovering x
 *   from each returned conic.
 *
 *   Time-of-flight evaluation.  Near x = 1 (|x - 1| < 0.05) we use the
 *   Battin hypergeometric series form given in Izzo (the
 *   Lagrange-derived form has a 0/0 there); elsewhere the Lagrange-derived
 *   form T(x) = [(psi + M pi)/sqrt|1-x^2| - x + lambda y]/(1 - x^2).  The
 *   auxiliary angle psi is computed with atan2 / asinh of sine and cosine
 *   expressions (rather than acos / acosh of the cosine alone) so it keeps
 *   full precision near psi = 0 and psi = pi.
 *
 *   Everything is scalar, on the stack, with no globals and no allocation,
 *   so the function is reentrant and safe to call from OpenMP threads.
 */
#include "config.h"
#include "synodic.h"

#include <math.h>
#include <stddef.h>

#ifndef M_PI
#define M_PI 3.14159265358979323846
#endif
#ifndef M_LN2
#define M_LN2 0.69314718055994530942
#endif

/* Iteration limits and tolerances.  Householder converges cubically, so
 * from the paper's initial guesses 2-5 iterations are typical; 50 is a
 * bound that is only reached on pathological input. */
#define LAMBERT_MAX_ITER 50
#define LAMBERT_HALLEY_MAX_ITER 50
/* Stop when the Householder correction is below this (absolute, x is
 * O(1) except on fast hyperbolae where we scale by |x|). */
#define LAMBERT_XTOL 1e-13
/* ... or when T(x) matches the target to a few ulps. */
#define LAMBERT_TTOL 4e-15
/* Switch to the Battin series when |x - 1| is below this.  Measured
 * against a long-double evaluation: the Lagrange-derived form loses
 * ~1e-13 relative at |x - 1| = 0.01 (cancellation ~ 1/(1 - x^2)), the
 * series stays at ~1e-15 out to 0.05. */
#define LAMBERT_BATTIN_DIST 0.05
/* Relative size of |r1 x r2| below which the plane is undefined. */
#define LAMBERT_PLANE_EPS 1e-10

static void cross3(const double a[3], const double b[3], double out[3])
{
    out[0] = a[1] * b[2] - a[2] * b[1];
    out[1] = a[2] * b[0] - a[0] * b[2];
    out[2] = a[0] * b[1] - a[1] * b[0];
}

static double norm3(const double v[3])
{
    return sqrt(v[0] * v[0] + v[1] * v[1] + v[2] * v[2]);
}

/* Non-dimensional problem: lambda and 1 - lambda^2 (= c/s, kept separately
 * so that y is accurate when |lambda| is close to 1). */
typedef struct {
    double lambda;
    double one_m_l2;
    int revs;
} lam_problem;

/* y(x) = sqrt(1 - lambda^2 (1 - x^2))  (Izzo, definition of y). */
static double lam_y(const lam_problem *p, double x)
{
    double l = p->lambda;
    return sqrt(p->one_m_l2 + l * l * x * x);
}

/* eta = y - lambda x without cancellation: when lambda x > 0 use
 * (y^2 - lambda^2 x^2)/(y + lambda x) = (1 - lambda^2)/(y + lambda x). */
static double lam_eta(const lam_problem *p, double x, double y)
{
    double lx = p->lambda * x;
    if (lx > 0.0)
        return p->one_m_l2 / (y + lx);
    return y - lx;
}

/* Gauss hypergeometric function 2F1(3, 1; 5/2; z) by its series, used by
 * the Battin form of T (Izzo).  Only called with |z| small
 * (x within 0.05 of 1, so |z| < 0.1), where the series converges in
 * under 20 terms. */
static double hyp2f1_3_1_52(double z)
{
    double sum = 1.0, term = 1.0;
    for (int j = 0; j < 200; ++j) {
        term *= (3.0 + j) * (1.0 + j) / (2.5 + j) * z / (j + 1.0);
        sum += term;
        if (fabs(term) <= 1e-17 * fabs(sum))
            break;
    }
    return sum;
}

/* Time of flight T(x) for p->revs complete revolutions. */
static double lam_tof(const lam_problem *p, double x)
{
    const double l = p->lambda;
    const double M = (double)p->revs;
    const double y = lam_y(p, x);
    const double one_m_x2 = (1.0 - x) * (1.0 + x);

    if (fabs(x - 1.0) < LAMBERT_BATTIN_DIST) {
        /* Battin series form (Izzo):
         *   eta = y - lambda x,  S1 = (1 - lambda - x eta)/2,
         *   Q = 4/3 2F1(3, 1; 5/2; S1),
         *   T = (eta^3 Q + 4 lambda eta)/2 + M pi / |1 - x^2|^(3/2). */
        double eta = lam_eta(p, x, y);
        double s1 = 0.5 * (1.0 - l - x * eta);
        double q = 4.0 / 3.0 * hyp2f1_3_1_52(s1);
        double t = 0.5 * (eta * eta * eta * q + 4.0 * l * eta);
        if (p->revs > 0)
            t += M * M_PI / pow(fabs(one_m_x2), 1.5);
        return t;
    }

    /* Lagrange-derived form (Izzo):
     *   T = [ (psi + M pi)/sqrt|1 - x^2| - x + lambda y ] / (1 - x^2),
     * with cos psi = x y + lambda (1 - x^2) (ellipse) or
     * cosh psi = x y - lambda (x^2 - 1) (hyperbola).  Writing x = cos a,
     * lambda sin a = sin b, y = cos b shows psi = a - b, whence
     * sin psi = sqrt(1 - x^2) (y - lambda x) (and the sinh analogue). */
    double eta = lam_eta(p, x, y);
    double sq = sqrt(fabs(one_m_x2));
    double psi;
    if (one_m_x2 > 0.0)
        psi = atan2(sq * eta, x * y + l * one_m_x2);
    else
        psi = asinh(sq * eta);
    return ((psi + M * M_PI) / sq - x + l * y) / one_m_x2;
}

/* First three derivatives of T(x) (Izzo, derivatives of the
 * time-of-flight function):
 *   (1 - x^2) T'   = 3 T x - 2 + 2 lambda^3 x / y
 *   (1 - x^2) T''  = 3 T + 5 x T' + 2 (1 - lambda^2) lambda^3 / y^3
 *   (1 - x^2) T''' = 7 x T'' + 8 T' - 6 (1 - lambda^2) lambda^5 x / y^5 */
static void lam_dtdx(const lam_problem *p, double x, double t, double *d1,
                     double *d2, double *d3)
{
    const double l = p->lambda;
    const double l2 = l * l, l3 = l2 * l;
    const double y = lam_y(p, x);
    const double y2 = y * y, y3 = y2 * y;
    const double u = (1.0 - x) * (1.0 + x);
    *d1 = (3.0 * t * x - 2.0 + 2.0 * l3 * x / y) / u;
    *d2 = (3.0 * t + 5.0 * x * *d1 + 2.0 * p->one_m_l2 * l3 / y3) / u;
    *d3 = (7.0 * x * *d2 + 8.0 * *d1 -
           6.0 * p->one_m_l2 * l2 * l3 * x / (y3 * y2)) / u;
}

/* Minimum of T(x) for revs >= 1 by Halley iterations on T'(x) = 0, from
 * x = 0 (where T' = -2 < 0, so the minimum lies at x > 0) as in Izzo.
 * Returns 0 on success. */
static int lam_tmin(const lam_problem *p, double *x_min, double *t_min)
{
    double x = 0.0;
    double t = lam_tof(p, x);
    for (int it = 0; it < LAMBERT_HALLEY_MAX_ITER; ++it) {
        double d1, d2, d3;
        lam_dtdx(p, x, t, &d1, &d2, &d3);
        double den = d2 * d2 - 0.5 * d1 * d3;
        if (!(den != 0.0) || !isfinite(den))
            return -1;
        double xn = x - d1 * d2 / den;
        /* the minimum lies in (0, 1) since T' < 0 at 0 and T -> inf at 1 */
        if (!(xn > -1.0 && xn < 1.0))
            xn = 0.5 * (x + (xn >= 1.0 ? 1.0 : -1.0));
        double dx = fabs(xn - x);
        x = xn;
        t = lam_tof(p, x);
        if (dx < 1e-13) {
            *x_min = x;
            *t_min = t;
            return 0;
        }
    }
    return -1;
}

/* Householder (third-order) iterations on f(x) = T(x) - T* (Izzo):
 *
 *   x <- x - f [f'^2 - f f''/2] / [f' (f'^2 - f f'') + f''' f^2 / 6],
 * safeguarded by a bracket [lo, hi] within which T is monotone
 * (decreasing when `decreasing`, otherwise increasing); a step leaving the
 * bracket is replaced by bisection (or expansion when hi is +inf).
 * Returns 0 and sets *x_out, *iters on success. */
static int lam_householder(const lam_problem *p, double t_star, double x0,
                           double lo, double hi, int decreasing,
                           double *x_out, int *iters)
{
    double x = x0;
    if (!(x > lo && x < hi))
        x = isfinite(hi) ? 0.5 * (lo + hi) : 2.0 * fabs(lo) + 1.0;
    for (int it = 1; it <= LAMBERT_MAX_ITER; ++it) {
        double t = lam_tof(p, x);
        double f = t - t_star;
        *iters = it;
        if (!isfinite(t))
            return -1;
        if (fabs(f) <= LAMBERT_TTOL * t_star) {
            *x_out = x;
            return 0;
        }
        /* shrink the bracket: the root is above x when T(x) is on the
         * "before the root" side of T* */
        if ((f > 0.0) == (decreasing != 0))
            lo = x;
        else
            hi = x;
        double d1, d2, d3;
        lam_dtdx(p, x, t, &d1, &d2, &d3);
        double d1s = d1 * d1;
        double num = f * (d1s - 0.5 * f * d2);
        double den = d1 * (d1s - f * d2) + d3 * f * f / 6.0;
        double xn = x - num / den;
        /* A correction below the tolerance means x is the root to working
         * precision.  Test this before the bracket: at the root the step
         * can land on (or round just past) the bracket end x itself set,
         * and bisecting from there would only waste iterations. */
        if (isfinite(xn) &&
            fabs(xn - x) <= LAMBERT_XTOL * fmax(1.0, fabs(x))) {
            *x_out = (xn > lo && xn < hi) ? xn : x;
            return 0;
        }
        if (!isfinite(xn) || !(xn > lo && xn < hi))
            xn = isfinite(hi) ? 0.5 * (lo + hi) : 2.0 * fabs(lo) + 1.0;
        x = xn;
        if (isfinite(hi) && hi - lo <= LAMBERT_XTOL * fmax(1.0, fabs(x))) {
            *x_out = x;
            return 0;
        }
    }
    return -1;
}

static void sol_clear(sy_lambert_solution *sol, int revs, sy_branch branch)
{
    for (int i = 0; i < 3; ++i) {
        sol->v1_km_s[i] = 0.0;
        sol->v2_km_s[i] = 0.0;
    }
    sol->revs = revs;
    sol->branch = branch;
    sol->iterations = 0;
}

sy_status sy_lambert(double mu_km3_s2, const double r1_km[3],
                     const double r2_km[3], double tof_s, int revs,
                     sy_branch branch, int retrograde,
                     sy_lambert_solution *sol)
{
    if (!sol)
        return SY_ERR_ARG;
    int branch_ok = (branch == SY_BRANCH_LEFT || branch == SY_BRANCH_RIGHT);
    sol_clear(sol, revs < 0 ? 0 : revs, branch_ok ? branch : SY_BRANCH_LEFT);
    if (!r1_km || !r2_km)
        return SY_ERR_ARG;
    if (!isfinite(mu_km3_s2) || !(mu_km3_s2 > 0.0))
        return SY_ERR_ARG;
    if (!isfinite(tof_s) || !(tof_s > 0.0))
        return SY_ERR_ARG;
    if (revs < 0 || (revs > 0 && !branch_ok))
        return SY_ERR_ARG;
    for (int i = 0; i < 3; ++i)
        if (!isfinite(r1_km[i]) || !isfinite(r2_km[i]))
            return SY_ERR_ARG;

    /* ---- geometry (Izzo, Algorithm 1) ---- */
    const double r1n = norm3(r1_km), r2n = norm3(r2_km);
    if (!(r1n > 0.0) || !(r2n > 0.0) || !isfinite(r1n) || !isfinite(r2n))
        return SY_ERR_DEGENERATE;
    double ir1[3], ir2[3], ih[3], it1[3], it2[3], cvec[3];
    for (int i = 0; i < 3; ++i) {
        ir1[i] = r1_km[i] / r1n;
        ir2[i] = r2_km[i] / r2n;
        cvec[i] = r2_km[i] - r1_km[i];
    }
    cross3(ir1, ir2, ih);
    const double hn = norm3(ih);
    if (!(hn >= LAMBERT_PLANE_EPS))
        return SY_ERR_DEGENERATE;
    for (int i = 0; i < 3; ++i)
        ih[i] /= hn;

    const double c = norm3(cvec);
    const double s = 0.5 * (r1n + r2n + c);
    /* |lambda| = sqrt(1 - c/s) = sqrt(r1 r2) cos(theta/2) / s, and
     * 2 cos(theta/2) = |ir1 + ir2|.  The second form keeps full relative
     * precision near theta = 180 deg, where 1 - c/s cancels (s - c is
     * the small difference of r1 + r2 and c).  Measured with the ODE
     * check on random arcs within 1e-7..1e-1 rad of 0/180 deg: with
     * lambda = sqrt(1 - c/s), 41 of ~5000 arcs on ordinary conics missed
     * by 1e-8..9e-8; with this form none did.  (On the near-line set of
     * tests/check_lambert.c the worst miss drops from 3e-9 to 4e-11.) */
    double sum_u[3], dif_u[3];
    for (int i = 0; i < 3; ++i) {
        sum_u[i] = ir1[i] + ir2[i];
        dif_u[i] = ir1[i] - ir2[i];
    }
    const double sqrt_r1r2 = sqrt(r1n) * sqrt(r2n);
    lam_problem p;
    p.one_m_l2 = c / s;
    p.lambda = fmin(1.0, sqrt_r1r2 * norm3(sum_u) / (2.0 * s));
    p.revs = revs;
    if (ih[2] < 0.0) {
        /* prograde is the long way round: transfer angle > 180 deg */
        p.lambda = -p.lambda;
        cross3(ir1, ih, it1);
        cross3(ir2, ih, it2);
    } else {
        cross3(ih, ir1, it1);
        cross3(ih, ir2, it2);
    }
    if (retrograde) {
        p.lambda = -p.lambda;
        for (int i = 0; i < 3; ++i) {
            it1[i] = -it1[i];
            it2[i] = -it2[i];
        }
    }

    /* ---- non-dimensional time (Izzo): T = sqrt(2 mu/s^3) t ---- */
    const double t_star = sqrt(2.0 * mu_km3_s2 / (s * s * s)) * tof_s;
    if (!isfinite(t_star) || !(t_star > 0.0))
        return SY_ERR_ARG;

    const double l = p.lambda;
    double x = 0.0;
    int iters = 0;
    int rc;
    if (revs == 0) {
        /* Initial guess for M = 0 (Izzo):
         *   T(x=0) = T00 = acos(lambda) + lambda sqrt(1 - lambda^2),
         *   T(x=1) = T1  = 2/3 (1 - lambda^3);
         *   T >= T00      : x0 = (T00/T)^(2/3) - 1
         *   T <  T1       : x0 = 5/2 T1 (T1 - T) / (T (1 - lambda^5)) + 1
         *   T1 <= T < T00 : x0 = (T/T00)^(ln 2 / ln(T1/T00)) - 1
         *                   (the power law through x0 = 0 at T00 and
         *                   x0 = 1 at T1). */
        const double t00 = acos(l) + l * sqrt(p.one_m_l2);
        const double t1 = 2.0 / 3.0 * (1.0 - l * l * l);
        double x0;
        if (t_star >= t00)
            x0 = pow(t00 / t_star, 2.0 / 3.0) - 1.0;
        else if (t_star < t1)
            x0 = 2.5 * t1 * (t1 - t_star) /
                     (t_star * (1.0 - l * l * l * l * l)) + 1.0;
        else
            x0 = pow(t_star / t00, M_LN2 / log(t1 / t00)) - 1.0;
        /* T(x) decreases monotonically on (-1, +inf) for M = 0 */
        rc = lam_householder(&p, t_star, x0, -1.0, INFINITY, 1, &x, &iters);
    } else {
        /* Quick exclusion: M revolutions of an orbit with a >= a_m take at
         * least M periods of the minimum-energy ellipse, T >= M pi. */
        if (t_star < (double)revs * M_PI)
            return SY_ERR_NOSOL;
        double x_min, t_min;
        if (lam_tmin(&p, &x_min, &t_min) != 0)
            return SY_ERR_NOCONV;
        if (t_star < t_min)
            return SY_ERR_NOSOL;
        /* Initial guesses for M >= 1 (Izzo):
         *   left:  x0 = (q - 1)/(q + 1), q = ((M + 1) pi / (8 T))^(2/3)
         *   right: x0 = (q - 1)/(q + 1), q = (8 T / (M pi))^(2/3) */
        const double M = (double)revs;
        if (branch == SY_BRANCH_LEFT) {
            double q = pow((M + 1.0) * M_PI / (8.0 * t_star), 2.0 / 3.0);
            double x0 = (q - 1.0) / (q + 1.0);
            rc = lam_householder(&p, t_star, x0, -1.0, x_min, 1, &x, &iters);
        } else {
            double q = pow(8.0 * t_star / (M * M_PI), 2.0 / 3.0);
            double x0 = (q - 1.0) / (q + 1.0);
            rc = lam_householder(&p, t_star, x0, x_min, 1.0, 0, &x, &iters);
        }
    }
    sol->iterations = iters;
    if (rc != 0)
        return SY_ERR_NOCONV;

    /* ---- velocities (Izzo, Algorithm 1):
     *   gamma = sqrt(mu s / 2), rho = (r1 - r2)/c, sigma = sqrt(1 - rho^2)
     *   V_r1 =  gamma [(lambda y - x) - rho (lambda y + x)] / r1
     *   V_r2 = -gamma [(lambda y - x) + rho (lambda y + x)] / r2
     *   V_t1 =  gamma sigma (y + lambda x) / r1
     *   V_t2 =  gamma sigma (y + lambda x) / r2 ---- */
    const double gamma = sqrt(0.5 * mu_km3_s2 * s);
    const double rho = (r1n - r2n) / c;
    /* sigma = sqrt(1 - rho^2) = 2 sqrt(r1 r2) sin(theta/2) / c (since
     * c^2 - (r1 - r2)^2 = 4 r1 r2 sin^2(theta/2)), with
     * 2 sin(theta/2) = |ir1 - ir2|: no cancellation near theta = 0,
     * where 1 - rho^2 loses digits.  (The same measurement as for lambda
     * showed no visible effect of this one; kept because it is the same
     * exact algebra at no extra cost.) */
    const double sigma = fmin(1.0, sqrt_r1r2 * norm3(dif_u) / c);
    const double y = lam_y(&p, x);
    const double vr1 = gamma * ((l * y - x) - rho * (l * y + x)) / r1n;
    const double vr2 = -gamma * ((l * y - x) + rho * (l * y + x)) / r2n;
    const double vt = gamma * sigma * (y + l * x);
    const double vt1 = vt / r1n, vt2 = vt / r2n;
    double v1[3], v2[3];
    for (int i = 0; i < 3; ++i) {
        v1[i] = vr1 * ir1[i] + vt1 * it1[i];
        v2[i] = vr2 * ir2[i] + vt2 * it2[i];
        if (!isfinite(v1[i]) || !isfinite(v2[i]))
            return SY_ERR_NOCONV;
    }
    for (int i = 0; i < 3; ++i) {
        sol->v1_km_s[i] = v1[i];
        sol->v2_km_s[i] = v2[i];
    }
    return SY_OK;
}
