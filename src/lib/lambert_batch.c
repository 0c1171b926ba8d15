/* lambert_batch.c - vectorised Lambert sweep for porkchop grids.
 *
 * The same method as the scalar solver (src/lib/lambert.c): D. Izzo,
 * "Revisiting Lambert's problem", Celestial Mechanics and Dynamical
 * Astronomy 121 (2015) 1-15, single revolution, prograde motion, with
 * lambert.c's choices (lambda from |ir1 + ir2| for precision near 180 deg,
 * sigma from |ir1 - ir2|, Battin's series within 0.05 of x = 1, psi from
 * atan2 of sine and cosine expressions, a bracket of monotonicity).
 * Then the figures of src/lib/transfer.c for the fields asked for.
 *
 * How it is vectorised.  A block of SY_BATCH_W problems is held in
 * structure-of-arrays form and every step is a `#pragma omp simd` loop
 * over the lanes, written without branches (selects only), so that gcc's
 * auto-vectoriser turns each loop into vector code and calls glibc's
 * vector math library (libmvec, the _ZGV* entry points) for atan2, asinh,
 * acos, asin, log and exp.  Those functions are declared here with
 * __attribute__((simd("notinbranch"))), which is what glibc's <math.h>
 * itself does under -ffast-math; declaring them ourselves lets this file
 * be compiled with only -fopenmp-simd -fno-math-errno (Makefile.am), so
 * the arithmetic stays IEEE (no reassociation, no finite-math
 * assumption: isnan/isfinite keep working).  The Householder iteration
 * runs lane-wide: converged, failed and dead lanes are frozen by a mask
 * (their x no longer changes), and dead lanes are given a harmless
 * problem so the vector math never sees NaN, Inf or zero-length vectors.
 * The block loops exactly SY_BATCH_W lanes, a multiple of every vector
 * width used, so there is no scalar remainder loop: each lane's result
 * is bit-identical whatever its position in the block.
 *
 * Differences from lambert.c, all far below the 1e-10 relative agreement
 * checked by tests/check_batch.c:
 *   - the iteration stops when the Householder step is below 1e-4
 *     (relative to max(1, |x|)) and that step is taken: the method
 *     converges with order four, so the error left is of order
 *     (1e-4)^4 (see XTOL_STEP).  lambert.c evaluates T once more to
 *     confirm, which a sweep cannot afford;
 *   - the Battin series is summed with a fixed 20 terms (Horner), not
 *     until a term drops below 1e-17 (see battin_q);
 *   - the derivatives use 1/y and 1/(1 - x^2) from one shared division
 *     (T itself is divided as in lambert.c);
 *   - the initial guess's power is exp(e log(base)), not pow;
 *   - the hyperbolic psi = asinh(...) and the Battin series are only
 *     evaluated in a block where some lane needs them;
 *   - libmvec's functions are accurate to a few ulp, not the < 1 ulp of
 *     the scalar libm;
 *   - a lane may start from a seed (sy_batch_in.xs; a grid passes its
 *     neighbours' solutions) instead of the initial guess: the root is
 *     the same to rounding, reached in fewer steps;
 *   - the norms and unit vectors of r1 and r2 come with the input
 *     (sy_batch_position, computed once per epoch by the grid) with the
 *     same operations the scalar path uses per cell;
 *   - T* comes from gamma (2 gamma tof / s^2), and sigma times the unit
 *     tangent from the unnormalised tangent (the norm of ir1 x ir2
 *     cancels; sigma is not clamped to 1), see the geometry loop;
 *   - the minimum Sun distance decides whether the arc passes periapsis
 *     by comparing pseudo-angles instead of two inverse cosines.
 *
 * ISA: the kernel is compiled for x86-64-v4 (AVX-512), v3 (AVX2) and the
 * baseline with gcc's target_clones; the loader picks the variant once
 * (ifunc) for the CPU it runs on.  This file is built with
 * -ffp-contract=fast (configure's SIMD_KERNEL_CFLAGS): the v3 and v4
 * variants fuse multiply-adds (about a tenth fewer instructions in a
 * sweep bound by instruction throughput), the baseline has no FMA.  So
 * the variants may differ from each other in the last bits, as they do
 * in libmvec's variants; one process always runs one variant, so the
 * bits never depend on the thread count.
 */
#include "config.h"
#include "synodic.h"
#include "synodic/grid.h"
#include "lambert_batch.h"

#include <math.h>
#include <stddef.h>

#ifndef M_PI
#define M_PI 3.14159265358979323846
#endif
#ifndef M_LN2
#define M_LN2 0.69314718055994530942
#endif

#if defined(SY_BATCH_KERNEL)

/* libmvec entry points (see the note above). */
#define SY_VEC_DECL __attribute__((simd("notinbranch")))
SY_VEC_DECL double atan2(double, double);
SY_VEC_DECL double asinh(double);
SY_VEC_DECL double acos(double);
SY_VEC_DECL double asin(double);
SY_VEC_DECL double log(double);
SY_VEC_DECL double exp(double);

#define W SY_BATCH_W
/* sqrt of the dead lanes' radii (1 AU and 1.5 AU), folded at compile time */
#define SQRT_AU sqrt(SY_AU_KM)
#define SQRT_AU15 sqrt(1.5 * SY_AU_KM)
#define LANES _Pragma("omp simd") for (int l = 0; l < W; l++)
#define SY_PRAGMA(x) _Pragma(#x)
/* Number of set lanes of a mask.  A plain loop, not an omp simd
 * reduction: gcc privatises such a reduction into a stack array and sums
 * it by scalar loads that wait on the vector store (a store-forwarding
 * stall, measured as a third of the block loop around the kernel), while
 * the auto-vectoriser sums the whole-vector loop in registers. */
static inline __attribute__((always_inline)) long lanes_count_n(const long *m, int width)
{
    long n = 0;
    for (int l = 0; l < width; l++) n += m[l];
    return n;
}
#define lanes_count(m) lanes_count_n((m), W)

/* As in lambert.c. */
#define MAX_ITER 50
/* Householder's method with derivatives to the third has convergence of
 * order four (a textbook property, from memory: Householder 1970), so
 * after a step of size d the error left is of order d^4: stopping once
 * the step is below 1e-4 max(1, |x|) and taking it leaves ~1e-16.  The
 * worst check_batch differences are the same with 1e-7, 1e-5 and 1e-4
 * and grow at 3e-4 (ordinary cells 2.5e-14 -> 3.6e-13: the d^4 term
 * showing), so 1e-4 keeps a factor 3^4 = 81 below where it shows.  With
 * seeded rows, 1e-5 -> 1e-4 cuts the mean sweeps per block on the
 * Earth-Mars bench grid from 1.60 to 1.46 (measured). */
#define XTOL_STEP 1e-4
#define XTOL 1e-13
#define TTOL 4e-15
#define BATTIN_DIST 0.05
#define PLANE_EPS 1e-10
#define BATTIN_TERMS 20
/* plain selects, not fmin/fmax (libm calls under IEEE NaN rules) */
#define VMIN(a, b) ((a) < (b) ? (a) : (b))
#define VMAX(a, b) ((a) > (b) ? (a) : (b))

typedef struct {
    /* geometry (64-byte aligned arrays: whole-vector loads); it1 and
     * it2 are the tangent directions scaled by |ir1 x ir2|, sig the
     * matching sigma (see the geometry loop) */
    _Alignas(64) double it1[3][W], it2[3][W];
    double lam[W], oml2[W], gam[W], ic[W], sig[W], tstar[W];
    /* iteration */
    double x[W], lo[W], hi[W];
    double y[W], eta[W], u[W], sq[W], pa[W], pb[W], psi[W], tb[W];
    double iy[W], iu[W];     /* 1/y and 1/u of the last T evaluation */
    double iy2[W];           /* 1/(sq u) of the last T evaluation    */
    /* masks as 64-bit integers, the width of a double lane, so that every
     * loop is single-width for the vectoriser */
    long act[W], bad[W], battin[W], hyp[W], st[W], ty[W], nit[W];
    long live[W];            /* in->live as a lane mask; then: solved */
    double cth[W], hz[W];    /* cos of the transfer angle, (r1 x r2)_z */
} work;

/* Lanes of the block that finishes the last few unconverged lanes of a
 * full block (finish_few): one AVX-512 vector, two AVX2 or four SSE2
 * vectors, so again no scalar remainder. */
#define CW 8
typedef struct {
    _Alignas(64) double x[CW];
    double lo[CW], hi[CW], lam[CW], oml2[CW], tstar[CW];
    double y[CW], eta[CW], u[CW], sq[CW], pa[CW], pb[CW], psi[CW];
    double iy[CW], iu[CW], iy2[CW];
    long act[CW], bad[CW], battin[CW], hyp[CW], nit[CW];
} cwork;

/* Battin's Q(z) = 4/3 2F1(3, 1; 5/2; z) (Izzo): the series' term ratio is
 * (3 + j)(1 + j) / ((5/2 + j)(j + 1)) z = (3 + j)/(5/2 + j) z, summed by
 * Horner with a fixed count.  Where it is used, |x - 1| < 0.05, z =
 * (1 - lambda - x eta)/2 stays within |z| <= 0.1025 (evaluated on a
 * lambda x x lattice of [-1, 1] x [0.95, 1.05]); the ratio is then below
 * 0.123, so after 20 terms the next is below 1e-18 of the sum (lambert.c
 * stops at a term below 1e-17). */
#define BQ(j) ((3.0 + (j)) / (2.5 + (j)))
static const double battin_ratio[BATTIN_TERMS] = {
    BQ(0), BQ(1), BQ(2), BQ(3), BQ(4), BQ(5), BQ(6), BQ(7), BQ(8), BQ(9),
    BQ(10), BQ(11), BQ(12), BQ(13), BQ(14), BQ(15), BQ(16), BQ(17), BQ(18), BQ(19)};
#undef BQ
/* (the ratios are constant expressions, folded by the compiler: no
 * division is left in the series) */
static inline __attribute__((always_inline)) double battin_q(double z)
{
    double acc = 1.0;
#pragma GCC unroll 20
    for (int j = BATTIN_TERMS - 1; j >= 0; j--)
        acc = 1.0 + battin_ratio[j] * z * acc;
    return 4.0 / 3.0 * acc;
}

#define SWEEP_CAT2(a, b) a##b
#define SWEEP_CAT(a, b) SWEEP_CAT2(a, b)
#define SWEEP_NAME(n) SWEEP_CAT(n, SWEEP_SFX)
#define SWEEP_T work
#define SWEEP_N W
#define SWEEP_SFX _full
#include "lambert_batch_sweep.h"
#undef SWEEP_T
#undef SWEEP_N
#undef SWEEP_SFX
#define SWEEP_T cwork
#define SWEEP_N CW
#define SWEEP_SFX _few
#include "lambert_batch_sweep.h"
#undef SWEEP_T
#undef SWEEP_N
#undef SWEEP_SFX

/* Initial guess for M = 0 (Izzo 2015, eq. 30; lambert.c):
 *   T >= T00: x0 = (T00/T)^(2/3) - 1
 *   T <  T1 : x0 = 5/2 T1 (T1 - T)/(T (1 - lambda^5)) + 1
 *   else    : x0 = (T/T00)^(ln 2 / ln(T1/T00)) - 1
 * The power is taken as exp(e ln(base)), with both logarithms
 * (ln(T1/T00) and ln(base)) from one vector log pass over 2W values:
 * cheaper than libmvec's pow, whose extra-precise result only seeds
 * the iteration (the root is set by the Householder steps; on the
 * 500 x 500 Earth-Mars bench grid the number of block sweeps is the
 * same as with pow). */
static inline __attribute__((always_inline)) void initial_guess(work *w)
{
    double lg[2 * W] __attribute__((aligned(64)));
    LANES w->psi[l] = acos(w->lam[l]);
    LANES {
        double lam = w->lam[l], ts = w->tstar[l];
        double t00 = w->psi[l] + lam * sqrt(w->oml2[l]);
        double t1 = 2.0 / 3.0 * (1.0 - lam * lam * lam);
        w->pb[l] = t00;
        w->tb[l] = t1;
        lg[l] = (t1 > 0.0 ? t1 : 1.0) / t00;
        lg[W + l] = ts >= t00 ? t00 / ts : ts / t00;
    }
    _Pragma("omp simd") for (int l = 0; l < 2 * W; l++) lg[l] = log(lg[l]);
    LANES {
        double ts = w->tstar[l], t00 = w->pb[l];
        double la = lg[l];
        double ex = ts >= t00 ? 2.0 / 3.0 : (la < 0.0 ? M_LN2 / la : 1.0);
        w->y[l] = ex * lg[W + l];
    }
    LANES w->u[l] = exp(w->y[l]);
    LANES {
        double lam = w->lam[l], ts = w->tstar[l];
        double t00 = w->pb[l], t1 = w->tb[l];
        double xb = 2.5 * t1 * (t1 - ts) / (ts * (1.0 - lam * lam * lam * lam * lam)) + 1.0;
        double x0 = ts >= t00 ? w->u[l] - 1.0 : (ts < t1 ? xb : w->u[l] - 1.0);
        /* bracket (-1, +inf): T decreases monotonically for M = 0 */
        x0 = (x0 > -1.0) & (x0 < INFINITY) ? x0 : 3.0;
        w->x[l] = x0;
    }
}

/* Finish the (at most CW) active lanes of w in a CW-lane block, starting
 * at sweep number it; returns the sweep number after the last, as the
 * full loop would.  Filler lanes repeat the first active lane, inactive. */
static inline __attribute__((always_inline)) int finish_few(work *w, int it)
{
    cwork cw, *c = &cw;
    double tc[CW] __attribute__((aligned(64)));
    int idx[CW], n = 0;
    for (int l = 0; l < W; l++)
        if (w->act[l] && n < CW) idx[n++] = l;
    for (int k = n; k < CW; k++) idx[k] = idx[0];
    for (int k = 0; k < CW; k++) {
        int l = idx[k];
        c->x[k] = w->x[l];
        c->lo[k] = w->lo[l];
        c->hi[k] = w->hi[l];
        c->lam[k] = w->lam[l];
        c->oml2[k] = w->oml2[l];
        c->tstar[k] = w->tstar[l];
        c->act[k] = k < n;
        c->bad[k] = w->bad[l];
        c->nit[k] = w->nit[l];
    }
    long cn = n;
    for (; it <= MAX_ITER && cn; it++) {
        tof_pass_few(c, tc);
        cn = step_pass_few(c, tc);
    }
    /* back what the later stages read (lo and hi are scratch from here) */
    for (int k = 0; k < n; k++) {
        int l = idx[k];
        w->x[l] = c->x[k];
        w->act[l] = c->act[k];
        w->bad[l] = c->bad[k];
        w->nit[l] = c->nit[k];
    }
    return it;
}

SY_CLONES
static void solve_block(const sy_batch_ctx *ctx, sy_batch_in *in,
                        sy_batch_out *out)
{
    work wk, *w = &wk;
    double t[W] __attribute__((aligned(64)));
    const double mu = SY_GM_SUN_KM3_S2;

    /* ---- dead lanes get a harmless problem (1 AU to 1.5 AU, 90 deg,
     * 200 days), so every vector lane computes finite numbers ---- */
    LANES {
        long live = in->live[l] != 0;
        w->act[l] = live;
        w->live[l] = live;
    }
    /* (a block without dead lanes, the common case, is left untouched:
     * the caller may keep its inputs for the next block) */
    out->in_modified = lanes_count(w->act) != W;
    if (out->in_modified) LANES {
        long live = w->act[l];
        in->r1[0][l] = live ? in->r1[0][l] : SY_AU_KM;
        in->r1[1][l] = live ? in->r1[1][l] : 0.0;
        in->r1[2][l] = live ? in->r1[2][l] : 0.0;
        in->r2[0][l] = live ? in->r2[0][l] : 0.0;
        in->r2[1][l] = live ? in->r2[1][l] : 1.5 * SY_AU_KM;
        in->r2[2][l] = live ? in->r2[2][l] : 0.0;
        in->tof_s[l] = live ? in->tof_s[l] : 200.0 * SY_DAY_S;
        in->vb1[0][l] = live ? in->vb1[0][l] : 0.0;
        in->vb1[1][l] = live ? in->vb1[1][l] : 0.0;
        in->vb1[2][l] = live ? in->vb1[2][l] : 0.0;
        in->vb2[0][l] = live ? in->vb2[0][l] : 0.0;
        in->vb2[1][l] = live ? in->vb2[1][l] : 0.0;
        in->vb2[2][l] = live ? in->vb2[2][l] : 0.0;
        /* sy_batch_position of those positions */
        in->r1n[l] = live ? in->r1n[l] : SY_AU_KM;
        in->ir1[0][l] = live ? in->ir1[0][l] : 1.0;
        in->ir1[1][l] = live ? in->ir1[1][l] : 0.0;
        in->ir1[2][l] = live ? in->ir1[2][l] : 0.0;
        in->sr1[l] = live ? in->sr1[l] : SQRT_AU;
        in->r1i[l] = live ? in->r1i[l] : 1.0 / SY_AU_KM;
        in->r2n[l] = live ? in->r2n[l] : 1.5 * SY_AU_KM;
        in->ir2[0][l] = live ? in->ir2[0][l] : 0.0;
        in->ir2[1][l] = live ? in->ir2[1][l] : 1.0;
        in->ir2[2][l] = live ? in->ir2[2][l] : 0.0;
        in->sr2[l] = live ? in->sr2[l] : SQRT_AU15;
        in->r2i[l] = live ? in->r2i[l] : 1.0 / (1.5 * SY_AU_KM);
    }

    /* ---- geometry (Izzo, Algorithm 1; lambert.c) ---- */
    LANES {
        double a0 = in->r1[0][l], a1 = in->r1[1][l], a2 = in->r1[2][l];
        double b0 = in->r2[0][l], b1 = in->r2[1][l], b2 = in->r2[2][l];
        /* norms and unit vectors come with the input (sy_batch_position) */
        double r1n = in->r1n[l], r2n = in->r2n[l];
        double u0 = in->ir1[0][l], u1 = in->ir1[1][l], u2 = in->ir1[2][l];
        double v0 = in->ir2[0][l], v1 = in->ir2[1][l], v2 = in->ir2[2][l];
        double h0 = u1 * v2 - u2 * v1, h1 = u2 * v0 - u0 * v2, h2 = u0 * v1 - u1 * v0;
        /* |ir1 x ir2| >= PLANE_EPS, compared squared: the norm itself is
         * not needed (below) */
        double hq = h0 * h0 + h1 * h1 + h2 * h2;
        long degen = (long)!(r1n > 0.0) | (long)!(r2n > 0.0) |
                     (long)!(hq >= PLANE_EPS * PLANE_EPS);
        double c0 = b0 - a0, c1 = b1 - a1, c2 = b2 - a2;
        double c = sqrt(c0 * c0 + c1 * c1 + c2 * c2);
        double s = 0.5 * (r1n + r2n + c);
        double s0 = u0 + v0, s1 = u1 + v1, s2 = u2 + v2;
        double upv = sqrt(s0 * s0 + s1 * s1 + s2 * s2); /* |ir1 + ir2| */
        /* degenerate lanes divide by ones (their results are replaced
         * below); sigma and rho share one division, 1/(|ir1 + ir2| c) */
        double sd = degen ? 1.0 : s;
        double pcd = degen ? 1.0 : upv * c;
        double is = 1.0 / sd, ipc = 1.0 / pcd;
        double ic = ipc * upv;
        double sq12 = in->sr1[l] * in->sr2[l];
        double lam = VMIN(1.0, sq12 * upv * (0.5 * is));
        /* gamma = sqrt(mu s / 2) of the velocities (Izzo, Algorithm 1);
         * T* = sqrt(2 mu / s^3) tof = 2 gamma tof / s^2, no second root */
        double gamma = sqrt(0.5 * mu * sd);
        /* The tangential velocity is gamma sigma (y + lambda x) / r along
         * the unit tangent it = sg (ih x ir), with sigma = sqrt(r1 r2)
         * |ir1 - ir2| / c (lambert.c).  For unit vectors |ir1 - ir2| =
         * 2 |h| / |ir1 + ir2|, h = ir1 x ir2 (|a + b|^2 |a - b|^2 =
         * (2 + 2 cos)(2 - 2 cos) = 4 sin^2), and |h x ir| = |h|; so
         * sigma it = sigma' t with t = sg (h x ir), not normalised, and
         * sigma' = 2 sqrt(r1 r2) / (|ir1 + ir2| c): |h| cancels, which
         * saves a root and a division.  Both factors are formed without
         * cancellation near 0 deg (|ir1 + ir2| -> 2) and near 180 deg. */
        double sigma = sq12 * 2.0 * ipc;
        /* h_z < 0: prograde is the long way round */
        double sg = h2 < 0.0 ? -1.0 : 1.0;
        lam *= sg;
        w->it1[0][l] = sg * (h1 * u2 - h2 * u1);
        w->it1[1][l] = sg * (h2 * u0 - h0 * u2);
        w->it1[2][l] = sg * (h0 * u1 - h1 * u0);
        w->it2[0][l] = sg * (h1 * v2 - h2 * v1);
        w->it2[1][l] = sg * (h2 * v0 - h0 * v2);
        w->it2[2][l] = sg * (h0 * v1 - h1 * v0);
        w->gam[l] = gamma;
        w->ic[l] = ic;
        w->sig[l] = sigma;
        w->lam[l] = degen ? 0.5 : lam;
        w->oml2[l] = degen ? 0.75 : c * is;
        w->tstar[l] = degen ? 3.0 : 2.0 * gamma * (is * is) * in->tof_s[l];
        w->st[l] = degen ? SY_CELL_DEGENERATE : SY_CELL_OK;
        w->act[l] = w->act[l] & (1 - degen);
        w->bad[l] = 0;
    }

    /* Seeds (sy_batch_in.xs): a live lane with a seed in (-1, 1e3)
     * starts there (code 1 in ty, used here as scratch); dead and
     * degenerate lanes start at 0, harmless and never counted (code 2);
     * the initial guess is evaluated only if some lane has no seed. */
    LANES {
        double xs = in->xs[l];
        long sd = (xs > -1.0) & (xs < 1e3);
        long code = w->act[l] ? sd : 2;
        w->ty[l] = code;
        w->nit[l] = code == 0;
    }
    const long nguess = lanes_count(w->nit);
    if (!nguess) {
        LANES w->x[l] = 0.0;
    } else {
        initial_guess(w);
    }
    LANES {
        long code = w->ty[l];
        w->x[l] = code == 1 ? in->xs[l] : (code == 2 ? 0.0 : w->x[l]);
        w->lo[l] = -1.0;
        w->hi[l] = INFINITY;
        w->nit[l] = 0;
    }

    /* ---- Householder iterations, lane-wide with masks ---- */
    int it = 0;
    long nact = lanes_count(w->act);
    for (it = 1; it <= MAX_ITER && nact; it++) {
        if (nact <= CW) {
            /* a few lanes left: finish them in a block of CW lanes, at an
             * eighth of the cost of a full sweep (most blocks end here
             * after one step, with their slowest lanes to go) */
            it = finish_few(w, it);
            break;
        }
        tof_pass_full(w, t);
        nact = step_pass_full(w, t);
    }
    out->iterations = it - 1;

    /* ---- velocities (Izzo, Algorithm 1; lambert.c) and the figures ---- */
    const unsigned fm = ctx->fields;
    const double eps = SY_OBLIQUITY_J2000_ARCSEC / 3600.0 * (M_PI / 180.0);
    const double ce = cos(eps), se = sin(eps);
    const double rad2deg = 180.0 / M_PI;
    LANES {
        double x = w->x[l], lam = w->lam[l];
        double r1n = in->r1n[l], r2n = in->r2n[l];
        /* divisions by c, r1 and r2 as products with reciprocals (from
         * the geometry's shared division and the per-epoch tables) */
        double ic = w->ic[l], ir1n = in->r1i[l], ir2n = in->r2i[l];
        double gamma = w->gam[l], sigma = w->sig[l];
        double rho = (r1n - r2n) * ic;
        double y = sqrt(w->oml2[l] + lam * lam * x * x);
        double vr1 = gamma * ((lam * y - x) - rho * (lam * y + x)) * ir1n;
        double vr2 = -gamma * ((lam * y - x) + rho * (lam * y + x)) * ir2n;
        double vt = gamma * sigma * (y + lam * x);
        double vt1 = vt * ir1n, vt2 = vt * ir2n;
        double p0 = vr1 * in->ir1[0][l] + vt1 * w->it1[0][l];
        double p1 = vr1 * in->ir1[1][l] + vt1 * w->it1[1][l];
        double p2 = vr1 * in->ir1[2][l] + vt1 * w->it1[2][l];
        double q0 = vr2 * in->ir2[0][l] + vt2 * w->it2[0][l];
        double q1 = vr2 * in->ir2[1][l] + vt2 * w->it2[1][l];
        double q2 = vr2 * in->ir2[2][l] + vt2 * w->it2[2][l];
        out->v1[0][l] = p0; out->v1[1][l] = p1; out->v1[2][l] = p2;
        out->v2[0][l] = q0; out->v2[1][l] = q1; out->v2[2][l] = q2;
        double e0 = p0 - in->vb1[0][l], e1 = p1 - in->vb1[1][l], e2 = p2 - in->vb1[2][l];
        double g0 = q0 - in->vb2[0][l], g1 = q1 - in->vb2[1][l], g2 = q2 - in->vb2[2][l];
        double c3 = e0 * e0 + e1 * e1 + e2 * e2;
        double c3a = g0 * g0 + g1 * g1 + g2 * g2;
        /* non-finite velocities (lambert.c) or C3 (transfer.c): no
         * convergence.  A non-finite velocity component makes its C3 Inf
         * or NaN (the planets' velocities are finite), so the two C3
         * tests cover all eight of lambert.c and transfer.c */
        long fin = (c3 < INFINITY) & (c3a < INFINITY);
        long okst = w->st[l] == SY_CELL_OK;
        /* lanes still active after MAX_ITER did not converge */
        long ok = okst & (1 - (w->bad[l] | w->act[l])) & fin;
        w->st[l] = (okst & (1 - ok)) ? SY_CELL_NOCONV : w->st[l];
        /* solved: live and converged (the fields of other lanes are NaN) */
        long sol = w->live[l] & ok;
        w->live[l] = sol;
        /* type from the sign of r1 x r2 (transfer.c) */
        double hz = in->r1[0][l] * in->r2[1][l] - in->r1[1][l] * in->r2[0][l];
        double cth = in->ir1[0][l] * in->ir2[0][l] + in->ir1[1][l] * in->ir2[1][l] +
                     in->ir1[2][l] * in->ir2[2][l];
        cth = VMAX(-1.0, VMIN(1.0, cth));
        w->ty[l] = (hz >= 0.0) & (cth > -1.0) ? 1 : 2;
        w->cth[l] = cth;
        w->hz[l] = hz;
        w->u[l] = c3;
        w->eta[l] = sqrt(c3a);
        /* cheap figures are stored for every lane (no masked stores),
         * NaN where not solved */
        out->f[SY_F_C3][l] = sol ? c3 : NAN;
        out->f[SY_F_VINF_ARR][l] = sol ? w->eta[l] : NAN;
        out->f[SY_F_C3_ARR][l] = sol ? c3a : NAN;
        out->x[l] = sol ? x : NAN;
    }
    /* figures that cost a square root or a division: only when asked.
     * Each loop stores NaN where the lane is not solved (w->live). */
    const long *sol = w->live;
    if (fm & (1u << SY_F_VINF_DEP)) {
        LANES out->f[SY_F_VINF_DEP][l] = sol[l] ? sqrt(w->u[l]) : NAN;
    }
    if (fm & (1u << SY_F_TOF)) {
        LANES out->f[SY_F_TOF][l] = sol[l] ? in->tof_s[l] / SY_DAY_S : NAN;
    }
    if (fm & (1u << SY_F_ANGLE)) {
        LANES {
            double th = acos(w->cth[l]);
            th = w->hz[l] < 0.0 ? 2.0 * M_PI - th : th;
            out->f[SY_F_ANGLE][l] = sol[l] ? th * rad2deg : NAN;
        }
    }
    /* asymptote declination / right ascension in EME2000 (transfer.c
     * sy_asymptote_radec; frames.c rotation) */
    for (int end = 0; end < 2; end++) {
        int fd = end ? SY_F_DAP : SY_F_DLA, fr = end ? SY_F_RAP : SY_F_RLA;
        if (!(fm & ((1u << fd) | (1u << fr)))) continue;
        double (*v)[W] = end ? out->v2 : out->v1;
        double (*vb)[W] = end ? in->vb2 : in->vb1;
        LANES {
            double ex = v[0][l] - vb[0][l], ey = v[1][l] - vb[1][l], ez = v[2][l] - vb[2][l];
            double qx = ex, qy = ce * ey - se * ez, qz = se * ey + ce * ez;
            double n = sqrt(qx * qx + qy * qy + qz * qz);
            double sn = n == 0.0 ? 0.0 : qz / n;
            sn = VMAX(-1.0, VMIN(1.0, sn));
            w->pa[l] = sn;
            w->tb[l] = n == 0.0 ? 0.0 : qx;
            w->hi[l] = n == 0.0 ? 0.0 : qy;
        }
        if (fm & (1u << fd)) {
            LANES out->f[fd][l] = sol[l] ? asin(w->pa[l]) * rad2deg : NAN;
        }
        if (fm & (1u << fr)) {
            LANES {
            double ra = atan2(w->hi[l], w->tb[l]) * rad2deg;
            ra = ra < 0.0 ? ra + 360.0 : ra;
            ra = ra >= 360.0 ? ra - 360.0 : ra;
            out->f[fr][l] = sol[l] ? ra : NAN;
            }
        }
    }
    if (fm & (1u << SY_F_MIN_SUN)) {
        /* closest approach to the Sun along the arc (transfer.c
         * min_sun_distance_km, revs = 0) */
        const double imu = 1.0 / mu;
        LANES {
            double r0 = in->r1[0][l], r1 = in->r1[1][l], r2 = in->r1[2][l];
            double v0 = out->v1[0][l], v1 = out->v1[1][l], v2 = out->v1[2][l];
            double r1n = in->r1n[l];
            double h0 = r1 * v2 - r2 * v1, h1 = r2 * v0 - r0 * v2, h2 = r0 * v1 - r1 * v0;
            double q0 = v1 * h2 - v2 * h1, q1 = v2 * h0 - v0 * h2, q2 = v0 * h1 - v1 * h0;
            /* divisions by mu and r1 as products with reciprocals (the
             * unit vector of r1 is tabulated), two left per lane */
            double u0 = in->ir1[0][l], u1 = in->ir1[1][l], u2 = in->ir1[2][l];
            double e0 = q0 * imu - u0, e1 = q1 * imu - u1, e2 = q2 * imu - u2;
            double e = sqrt(e0 * e0 + e1 * e1 + e2 * e2);
            double p = (h0 * h0 + h1 * h1 + h2 * h2) * imu;
            double rp = p / (1.0 + e);
            double r2n = in->r2n[l];
            double rend = r1n < r2n ? r1n : r2n;
            double cn = (e0 * u0 + e1 * u1 + e2 * u2) / (e < 1e-12 ? 1.0 : e);
            cn = VMAX(-1.0, VMIN(1.0, cn));
            double rv = r0 * v0 + r1 * v1 + r2 * v2;
            /* transfer.c: the arc passes periapsis when nu1 + theta >=
             * 2 pi, nu1 the true anomaly at departure (acos(cn), 2 pi -
             * that where r.v < 0) and theta the transfer angle (acos(cth),
             * 2 pi - that where (r1 x r2)_z < 0).  That is theta >= 2 pi -
             * nu1, compared here without inverse cosines through the
             * pseudo-angle P = 1 - cos (angles in [0, pi]) or 3 + cos
             * (angles in [pi, 2 pi]), which increases with the angle over
             * [0, 2 pi] (common practice in computational geometry). */
            double cth = w->cth[l];
            double pth = w->hz[l] < 0.0 ? 3.0 + cth : 1.0 - cth;
            double pal = rv < 0.0 ? 1.0 - cn : 3.0 + cn; /* of 2 pi - nu1 */
            double d = pth >= pal ? (rp < rend ? rp : rend) : rend;
            d = e < 1e-12 ? rend : d;
            out->f[SY_F_MIN_SUN][l] = sol[l] ? d / SY_AU_KM : NAN;
        }
    }
    for (int l = 0; l < W; l++) {
        out->status[l] = (unsigned char)w->st[l];
        out->type[l] = (unsigned char)w->ty[l];
        out->iters[l] = (unsigned char)w->nit[l];
    }
    /* delta-v and entry speed (transfer.c, common practice formulas) */
    const unsigned dvbits = (1u << SY_F_DV_DEP) | (1u << SY_F_DV_CAP) |
                            (1u << SY_F_DV_TOTAL) | (1u << SY_F_V_ENTRY);
    if (fm & dvbits) {
        /* unused ends get unit stand-ins so the math stays finite */
        const int okd = ctx->gm_from > 0.0 && ctx->r_park_km > 0.0;
        const int okc = ctx->gm_to > 0.0 && ctx->r_cap_peri_km > 0.0 &&
                        ctx->r_cap_apo_km > 0.0 && ctx->r_entry_km > 0.0;
        const double g1 = okd ? ctx->gm_from : 1.0, rpk = okd ? ctx->r_park_km : 1.0;
        const double g2 = okc ? ctx->gm_to : 1.0, rp = okc ? ctx->r_cap_peri_km : 1.0;
        const double ra = okc ? ctx->r_cap_apo_km : 1.0, re = okc ? ctx->r_entry_km : 1.0;
        const double vcirc = sqrt(g1 / rpk);
        const double vell = sqrt(2.0 * g2 / rp * ra / (ra + rp));
        LANES {
            double c3 = w->u[l], va = w->eta[l];
            double dd = sqrt(c3 + 2.0 * g1 / rpk) - vcirc;
            double dc = sqrt(va * va + 2.0 * g2 / rp) - vell;
            long ok = sol[l];
            out->f[SY_F_DV_DEP][l] = ok ? dd : NAN;
            out->f[SY_F_DV_CAP][l] = ok ? dc : NAN;
            out->f[SY_F_DV_TOTAL][l] = ok ? dd + dc : NAN;
            out->f[SY_F_V_ENTRY][l] = ok ? sqrt(va * va + 2.0 * g2 / re) : NAN;
        }
    }
}

int sy_batch_available(void)
{
    return 1;
}

void sy_batch_derive(sy_batch_in *in)
{
    for (int l = 0; l < W; l++) {
        double r[3], u[3];
        for (int c = 0; c < 3; c++) r[c] = in->r1[c][l];
        sy_batch_position(r, &in->r1n[l], u, &in->sr1[l], &in->r1i[l]);
        for (int c = 0; c < 3; c++) in->ir1[c][l] = u[c];
        for (int c = 0; c < 3; c++) r[c] = in->r2[c][l];
        sy_batch_position(r, &in->r2n[l], u, &in->sr2[l], &in->r2i[l]);
        for (int c = 0; c < 3; c++) in->ir2[c][l] = u[c];
    }
}

const char *sy_batch_isa(void)
{
#if defined(__x86_64__) && defined(__GNUC__) && !defined(__clang__) && \
    !defined(__SANITIZE_ADDRESS__)
    __builtin_cpu_init();
    if (__builtin_cpu_supports("x86-64-v4")) return "vector x86-64-v4 (AVX-512)";
    if (__builtin_cpu_supports("x86-64-v3")) return "vector x86-64-v3 (AVX2)";
    return "vector x86-64 (SSE2)";
#else
    return "vector";
#endif
}

void sy_batch_solve(const sy_batch_ctx *ctx, sy_batch_in *in,
                    sy_batch_out *out)
{
    solve_block(ctx, in, out);
}

#else /* !SY_BATCH_KERNEL: configure found no vector toolchain */

int sy_batch_available(void)
{
    return 0;
}

void sy_batch_derive(sy_batch_in *in)
{
    (void)in;
}

const char *sy_batch_isa(void)
{
    return "none";
}

void sy_batch_solve(const sy_batch_ctx *ctx, sy_batch_in *in,
                    sy_batch_out *out)
{
    (void)ctx;
    (void)in;
    (void)out;
}

#endif
