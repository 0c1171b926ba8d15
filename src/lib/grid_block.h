/* grid_block.h - internal: the block loops of the vector grid sweep.
 *
 * The grid (grid.c) decides what is computed; these functions move data
 * between its tables and the kernel's structure-of-arrays blocks.  They
 * live beside the kernel (libsykernel, compiled with the vector flags and
 * one variant per instruction-set level) because at ~60 cycles per cell
 * the copies, the lane statuses and the float conversion of the fields
 * are a fifth of the sweep when compiled for the x86-64 baseline.
 */
#ifndef SY_GRID_BLOCK_H
#define SY_GRID_BLOCK_H

#include "synodic.h"
#include "synodic/grid.h"
#include "lambert_batch.h"

#include <stddef.h>

/* States of one body at a run of epochs in structure-of-arrays form, with
 * what the kernel derives from the position alone (norm, unit vector,
 * square root of the norm), computed once per epoch instead of once per
 * cell (ni = 1/n).  Padded with SY_BATCH_W zero entries past n so that a block
 * starting at any valid index can be copied whole. */
typedef struct {
    double *r[3], *v[3], *u[3], *n, *sn, *ni;
    unsigned char *ok;
    double *mem;
    size_t len;
} sy_soa;

/* 0 when out of memory. */
int sy_soa_init(sy_soa *o, size_t n);
/* Entry k from a state (ok = 0: outside the ephemeris). */
void sy_soa_set(sy_soa *o, size_t k, const double r[3], const double v[3], int ok);
void sy_soa_free(sy_soa *o);

/* One thread's block buffer. */
typedef struct {
    sy_batch_in in;
    sy_batch_out out;
    unsigned char st0[SY_BATCH_W]; /* status of lanes that are not solved */
    _Alignas(64) double tof_d[SY_BATCH_W]; /* flight time of each lane, days */
    /* column block whose departure states the inputs hold, unmodified by
     * the kernel (dep_i0 = SIZE_MAX: none), so that the rows of a work
     * unit after the first copy only the arrival side */
    size_t dep_i0;
    /* x of the rows before, same columns (NaN: none), for the seeds */
    double xp1[SY_BATCH_W], xp2[SY_BATCH_W], xp3[SY_BATCH_W];
} sy_block;

/* The sweep's lattice: departure epoch x0 + i dx; row j is the arrival
 * epoch y0 + j dy (y_is_tof = 0) or the flight time y0 + j dy in days.
 * arr holds the arrival states: one per row, or on a flight-time axis the
 * lattice entry la i + lb j; NULL on an incommensurate flight-time axis,
 * where the caller supplies each lane's state (sy_block_set_arrival). */
typedef struct {
    size_t nx;
    double x0_jd, dx_days, y0, dy_days;
    int y_is_tof;
    long la, lb;
    const sy_soa *dep, *arr;
} sy_sweep;

/* Fill the block of row j starting at column i0.  Lanes past the row's
 * end, with a flight under SY_MIN_FLIGHT_DAYS or a state outside the
 * ephemeris are dead, their status in st0.  Returns the number of live
 * lanes; when it is 0 the states are not copied.  With arr == NULL the
 * arrival states are left to the caller and lanes are live pending them. */
int sy_block_gather(const sy_sweep *sw, size_t j, size_t i0, sy_block *b);
/* Arrival state of lane l (sweeps with arr == NULL); ok = 0 kills it. */
void sy_block_set_arrival(sy_block *b, int l, const double r[3], const double v[3], int ok);
/* Seeds of the k-th row of a work unit from the rows before (see grid.c). */
void sy_block_seed(sy_block *b, size_t k);
/* Keep the block's solutions as the next row's seeds (solved = 0: none). */
void sy_block_keep(sy_block *b, int solved);
/* Ask the cache for the lines that sy_block_scatter will write for row j.
 * A work unit walks down a column block, so consecutive stores are a row
 * apart (nx floats per field), a stride the hardware prefetchers do not
 * follow: without this the scatter waits on a read-for-ownership miss per
 * line and the store buffer backs up into the kernel.  Called one row
 * ahead, so the lines arrive in L2 while the kernel computes (measured
 * on the bench grid, all fields: 14 -> 22 M cells/s on one thread). */
void sy_block_prefetch(const sy_grid *g, size_t j, size_t i0);
/* Store the block into row j of the grid: statuses, types and, as float,
 * the fields the grid holds (solved = 0: the kernel did not run). */
void sy_block_scatter(sy_grid *g, size_t j, size_t i0, const sy_block *b, int solved);

#endif
