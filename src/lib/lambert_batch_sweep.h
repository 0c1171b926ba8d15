/* lambert_batch_sweep.h - internal to lambert_batch.c: one T evaluation
 * (tof_pass) and one Householder step (step_pass) over the lanes of a
 * work structure, written once and included twice: for the full block
 * (SWEEP_T work, SWEEP_N = SY_BATCH_W) and for the few lanes left after
 * the first steps (SWEEP_T cwork, SWEEP_N = CW).  The same operations in
 * the same order on every lane, in both instances, so a lane's bits do
 * not depend on which instance finished it.  Names get the SWEEP_SFX
 * suffix. */
#define SLANES _Pragma("omp simd") for (int l = 0; l < SWEEP_N; l++)
#define tof_pass SWEEP_NAME(tof_pass)
#define step_pass SWEEP_NAME(step_pass)

/* T(x) of the lanes in w->x (all lanes; dead ones are harmless), into t. */
static inline __attribute__((always_inline)) void tof_pass(SWEEP_T *w, double *restrict t)
{
    SLANES {
        double x = w->x[l], lam = w->lam[l], oml2 = w->oml2[l];
        double y = sqrt(oml2 + lam * lam * x * x);
        double lx = lam * x;
        /* eta = y - lambda x without cancellation (lambert.c lam_eta) */
        double eta = lx > 0.0 ? oml2 / (y + lx) : y - lx;
        double u = (1.0 - x) * (1.0 + x);
        long b = fabs(x - 1.0) < BATTIN_DIST;
        double sq = b ? 1.0 : sqrt(fabs(u));
        /* T, 1/y and 1/u (for the derivatives) share one division
         * R = 1/(y sq u), since a divide or square root costs several
         * multiplies on every vector unit and the sweep is bound by them.
         * This leaves T within a few ulp of lambert.c's two divisions,
         * which moves the root by a few ulp times T/T' (the agreement
         * with the scalar path is checked in tests/check_batch.c). */
        double squ = sq * u;
        double R = 1.0 / (y * squ);
        double Ry = R * y;
        w->y[l] = y;
        w->iy[l] = R * squ;
        w->iu[l] = Ry * sq;
        w->iy2[l] = Ry;
        w->eta[l] = eta;
        w->u[l] = u;
        w->sq[l] = sq;
        w->pa[l] = sq * eta;
        w->pb[l] = x * y + lam * u;
        w->battin[l] = b;
        w->hyp[l] = (1 - b) & (long)!(u > 0.0);
    }
    const long nb = lanes_count_n(w->battin, SWEEP_N), nh = lanes_count_n(w->hyp, SWEEP_N);
    /* ellipse: psi = atan2(sqrt(1 - x^2) eta, x y + lambda (1 - x^2)) */
    SLANES w->psi[l] = atan2(w->pa[l], w->pb[l]);
    if (nh) {
        /* hyperbola: psi = asinh(sqrt(x^2 - 1) eta) */
        SLANES {
            double ph = asinh(w->pa[l]);
            w->psi[l] = w->hyp[l] ? ph : w->psi[l];
        }
    }
    /* T = ((psi / sq) - x + lambda y) / (1 - x^2) (Izzo 2015; lambert.c),
     * as (psi - sq (x - lambda y)) / (sq (1 - x^2)) = (...) R y */
    SLANES {
        t[l] = (w->psi[l] - w->sq[l] * (w->x[l] - w->lam[l] * w->y[l])) * w->iy2[l];
    }
    if (nb) {
        /* Battin's form near x = 1: T = (eta^3 Q + 4 lambda eta)/2 */
        SLANES {
            double eta = w->eta[l], lam = w->lam[l];
            double s1 = 0.5 * (1.0 - lam - w->x[l] * eta);
            double z = w->battin[l] ? s1 : 0.0;
            double tb = 0.5 * (eta * eta * eta * battin_q(z) + 4.0 * lam * eta);
            t[l] = w->battin[l] ? tb : t[l];
        }
    }
}

/* One Householder step of every active lane (Izzo 2015, eq. 22-24 with
 * the derivatives of lambert.c); returns the lanes still active. */
static inline __attribute__((always_inline)) long step_pass(SWEEP_T *w, const double *restrict t)
{
    SLANES {
        long a = w->act[l];
        double x = w->x[l], lam = w->lam[l], oml2 = w->oml2[l];
        double tt = t[l], ts = w->tstar[l];
        double f = tt - ts;
        long fin = fabs(tt) < INFINITY;
        long done_f = fabs(f) <= TTOL * ts;
        /* bracket: T decreasing, root above x when f > 0 */
        double lo = f > 0.0 ? x : w->lo[l];
        double hi = f > 0.0 ? w->hi[l] : x;
        /* derivatives (Izzo; lambert.c lam_dtdx) */
        double iy = w->iy[l], iy2 = iy * iy;
        double iu = w->iu[l];
        double l2 = lam * lam, l3 = l2 * lam;
        double d1 = (3.0 * tt * x - 2.0 + 2.0 * l3 * x * iy) * iu;
        double d2 = (3.0 * tt + 5.0 * x * d1 + 2.0 * oml2 * l3 * iy2 * iy) * iu;
        double d3 = (7.0 * x * d2 + 8.0 * d1 -
                     6.0 * oml2 * l2 * l3 * x * iy2 * iy2 * iy) * iu;
        double d1s = d1 * d1;
        double num = f * (d1s - 0.5 * f * d2);
        double den = d1 * (d1s - f * d2) + d3 * f * f * (1.0 / 6.0);
        double xn = x - num / den;
        long xfin = fabs(xn) < INFINITY;
        double ax = VMAX(1.0, fabs(x));
        long inb = (xn > lo) & (xn < hi);
        long done_x = xfin & (fabs(xn - x) <= XTOL_STEP * ax);
        double xs = inb ? xn : x;
        long hfin = hi < INFINITY;
        double xbis = hfin ? 0.5 * (lo + hi) : 2.0 * fabs(lo) + 1.0;
        double xnext = (xfin & inb) ? xn : xbis;
        long done_b = hfin & (hi - lo <= XTOL * VMAX(1.0, fabs(xnext)));
        /* priority as in lambert.c: non-finite T fails; |f| small
         * keeps x; a small step takes it; else bisect if needed */
        double xr = done_f ? x : (done_x ? xs : xnext);
        long stop = (1 - fin) | done_f | done_x | done_b;
        w->bad[l] = w->bad[l] | (a & (1 - fin));
        w->x[l] = (a & fin) ? xr : x;
        w->lo[l] = a ? lo : w->lo[l];
        w->hi[l] = a ? hi : w->hi[l];
        long still = a & (1 - stop);
        w->nit[l] += a;
        w->act[l] = still;
    }
    return lanes_count_n(w->act, SWEEP_N);
}

#undef tof_pass
#undef step_pass
#undef SLANES
