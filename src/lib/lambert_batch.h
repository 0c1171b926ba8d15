/* lambert_batch.h - internal: the vectorised grid kernel (not installed).
 *
 * One call solves SY_BATCH_W single-revolution (revs = 0), prograde
 * Lambert problems held in structure-of-arrays form and derives the
 * requested transfer figures, with the same per-cell status semantics as
 * sy_transfer_from_states() (src/lib/transfer.c).  See lambert_batch.c for
 * the method and the numerical choices.
 */
#ifndef SY_LAMBERT_BATCH_H
#define SY_LAMBERT_BATCH_H

#include "synodic.h"
#include "synodic/study.h"

#include <math.h>

/* Lanes per call.  A fixed block width, a multiple of every vector width
 * the kernel is compiled for (2, 4, 8 doubles), so the vector loops have
 * no scalar remainder: a cell's bits never depend on its lane position. */
#define SY_BATCH_W 64

typedef struct {
    /* inputs: heliocentric ecliptic J2000 states (km, km/s), flight time */
    /* (every array starts on a 64-byte line: whole-vector loads) */
    _Alignas(64) double r1[3][SY_BATCH_W], vb1[3][SY_BATCH_W];
    double r2[3][SY_BATCH_W], vb2[3][SY_BATCH_W];
    double tof_s[SY_BATCH_W];
    /* derived from r1 and r2 by sy_batch_position() (a grid tabulates them
     * once per epoch): norms (km), unit vectors, square roots of the
     * norms, reciprocals of the norms */
    double r1n[SY_BATCH_W], ir1[3][SY_BATCH_W], sr1[SY_BATCH_W], r1i[SY_BATCH_W];
    double r2n[SY_BATCH_W], ir2[3][SY_BATCH_W], sr2[SY_BATCH_W], r2i[SY_BATCH_W];
    /* 1: solve this lane; 0: skip it (its inputs are replaced by a
     * harmless problem so the vector math stays finite) */
    unsigned char live[SY_BATCH_W];
    /* optional starting values of Izzo's x, one per lane: a lane whose
     * xs[l] lies in (-1, 1e3) starts its Householder iteration there
     * instead of at the initial guess (Izzo 2015, eq. 30); NaN (or any
     * value outside) means "no seed".  A grid passes the solutions of the
     * neighbouring rows, so most lanes converge in one step. */
    _Alignas(64) double xs[SY_BATCH_W];
} sy_batch_in;

typedef struct {
    /* SY_CELL_OK / SY_CELL_DEGENERATE / SY_CELL_NOCONV for live lanes */
    unsigned char status[SY_BATCH_W];
    unsigned char type[SY_BATCH_W];   /* 1 or 2 */
    int iterations;                   /* Householder sweeps of the block */
    int in_modified;                  /* 1: dead lanes' inputs replaced  */
    unsigned char iters[SY_BATCH_W];  /* T evaluations of each lane      */
    /* values of the requested fields (bit 1u << SY_F_xxx of `fields`),
     * NaN in lanes that are not live or whose status is not SY_CELL_OK;
     * others are left untouched */
    _Alignas(64) double f[SY_NFIELDS][SY_BATCH_W];
    double v1[3][SY_BATCH_W], v2[3][SY_BATCH_W]; /* Lambert velocities */
    double x[SY_BATCH_W];  /* converged x of SY_CELL_OK lanes, else NaN */
} sy_batch_out;

typedef struct {
    unsigned fields;                    /* bit mask of SY_F_xxx to derive */
    double gm_from, r_park_km;          /* for DV_DEP / DV_TOTAL          */
    double gm_to, r_cap_peri_km, r_cap_apo_km, r_entry_km;
} sy_batch_ctx;

/* What the kernel needs of a position vector r (km): its norm n, the
 * unit vector u = r / n, sqrt(n) and 1/n (u = 0 and 1/n = 1 when n = 0).
 * Inline so that every caller computes the same bits (IEEE basic
 * operations only). */
static inline void sy_batch_position(const double r[3], double *n, double u[3], double *sn,
                                     double *inv)
{
    double nn = sqrt(r[0] * r[0] + r[1] * r[1] + r[2] * r[2]);
    double d = nn > 0.0 ? nn : 1.0;
    *n = nn;
    u[0] = r[0] / d;
    u[1] = r[1] / d;
    u[2] = r[2] / d;
    *sn = sqrt(nn);
    *inv = 1.0 / d;
}

/* Fill the derived position fields of every lane from in->r1 and in->r2
 * (for callers without tabulated states, such as the tests). */
void sy_batch_derive(sy_batch_in *in);

/* Instruction-set variants (gcc's target_clones; the loader picks one per
 * CPU) for the kernel and the block loops around it. */
#if defined(SY_BATCH_KERNEL) && defined(__x86_64__) && defined(__GNUC__) && \
    !defined(__clang__) && !defined(__SANITIZE_ADDRESS__)
#define SY_CLONES __attribute__((target_clones("arch=x86-64-v4", "arch=x86-64-v3", "default")))
#else
#define SY_CLONES
#endif

/* 1 when this build has the vector kernel (configure --enable-simd). */
int sy_batch_available(void);
/* Name of the variant the loader picks on this CPU (or "none"). */
const char *sy_batch_isa(void);
/* Solve one block.  in->live lanes are solved; the kernel may modify the
 * input arrays of lanes that are not live. */
void sy_batch_solve(const sy_batch_ctx *ctx, sy_batch_in *in,
                    sy_batch_out *out);

#endif
