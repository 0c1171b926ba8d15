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

/* Lanes per call.  A fixed block width, a multiple of every vector width
 * the kernel is compiled for (2, 4, 8 doubles), so the vector loops have
 * no scalar remainder: a cell's bits never depend on its lane position. */
#define SY_BATCH_W 64

typedef struct {
    /* inputs: heliocentric ecliptic J2000 states (km, km/s), flight time */
    double r1[3][SY_BATCH_W], vb1[3][SY_BATCH_W];
    double r2[3][SY_BATCH_W], vb2[3][SY_BATCH_W];
    double tof_s[SY_BATCH_W];
    /* 1: solve this lane; 0: skip it (its inputs are replaced by a
     * harmless problem so the vector math stays finite) */
    unsigned char live[SY_BATCH_W];
} sy_batch_in;

typedef struct {
    /* SY_CELL_OK / SY_CELL_DEGENERATE / SY_CELL_NOCONV for live lanes */
    unsigned char status[SY_BATCH_W];
    unsigned char type[SY_BATCH_W];   /* 1 or 2 */
    int iterations;                   /* Householder sweeps of the block */
    unsigned char iters[SY_BATCH_W];  /* T evaluations of each lane      */
    /* values of the requested fields (bit 1u << SY_F_xxx of `fields`),
     * NaN in lanes that are not live or whose status is not SY_CELL_OK;
     * others are left untouched */
    double f[SY_NFIELDS][SY_BATCH_W];
    double v1[3][SY_BATCH_W], v2[3][SY_BATCH_W]; /* Lambert velocities */
} sy_batch_out;

typedef struct {
    unsigned fields;                    /* bit mask of SY_F_xxx to derive */
    double gm_from, r_park_km;          /* for DV_DEP / DV_TOTAL          */
    double gm_to, r_cap_peri_km, r_cap_apo_km, r_entry_km;
} sy_batch_ctx;

/* 1 when this build has the vector kernel (configure --enable-simd). */
int sy_batch_available(void);
/* Name of the variant the loader picks on this CPU (or "none"). */
const char *sy_batch_isa(void);
/* Solve one block.  in->live lanes are solved; the kernel may modify the
 * input arrays of lanes that are not live. */
void sy_batch_solve(const sy_batch_ctx *ctx, sy_batch_in *in,
                    sy_batch_out *out);

#endif
