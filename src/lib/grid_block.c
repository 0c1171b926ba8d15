/* grid_block.c - the block loops of the vector grid sweep (grid_block.h).
 *
 * Every loop runs the full SY_BATCH_W lanes (lanes past a row's end are
 * dead), without branches, so that each is one vector loop in every
 * instruction-set variant (SY_CLONES).
 */
#include "config.h"
#include "grid_block.h"

#include <math.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

#define W SY_BATCH_W

int sy_soa_init(sy_soa *o, size_t n)
{
    memset(o, 0, sizeof *o);
    size_t np = n + W;
    o->mem = calloc(12 * np, sizeof(double));
    o->ok = calloc(np, 1);
    if (!o->mem || !o->ok) {
        sy_soa_free(o);
        return 0;
    }
    for (int c = 0; c < 3; c++) {
        o->r[c] = o->mem + (size_t)c * np;
        o->v[c] = o->mem + (size_t)(3 + c) * np;
        o->u[c] = o->mem + (size_t)(6 + c) * np;
    }
    o->n = o->mem + 9 * np;
    o->sn = o->mem + 10 * np;
    o->ni = o->mem + 11 * np;
    o->len = n;
    return 1;
}

void sy_soa_set(sy_soa *o, size_t k, const double r[3], const double v[3], int ok)
{
    double u[3];
    sy_batch_position(r, &o->n[k], u, &o->sn[k], &o->ni[k]);
    for (int c = 0; c < 3; c++) {
        o->r[c][k] = r[c];
        o->v[c][k] = v[c];
        o->u[c][k] = u[c];
    }
    o->ok[k] = (unsigned char)(ok != 0);
}

void sy_soa_free(sy_soa *o)
{
    free(o->mem);
    free(o->ok);
    o->mem = NULL;
    o->ok = NULL;
}

/* Lane l of the arrival inputs from entry k of a table. */
static void arrival_from(sy_batch_in *in, int l, const sy_soa *a, size_t k)
{
    for (int c = 0; c < 3; c++) {
        in->r2[c][l] = a->r[c][k];
        in->vb2[c][l] = a->v[c][k];
        in->ir2[c][l] = a->u[c][k];
    }
    in->r2n[l] = a->n[k];
    in->sr2[l] = a->sn[k];
    in->r2i[l] = a->ni[k];
}

/* Byte-lane selects for the status loops: m is 0xff (take a) or 0 (take
 * b).  Written with ?: on bytes, gcc kept those loops scalar with a
 * data-dependent branch per lane; masks and bitwise selects vectorise. */
static inline __attribute__((always_inline)) unsigned char mask_u8(int c)
{
    return (unsigned char)-(unsigned char)(c != 0);
}
static inline __attribute__((always_inline)) unsigned char sel_u8(unsigned char m,
                                                                  unsigned char a,
                                                                  unsigned char b)
{
    return (unsigned char)((m & a) | (~m & b));
}

/* W consecutive table entries from k0 into one side of the inputs. */
static void copy_run(const sy_soa *t, size_t k0, double (*r)[W], double (*v)[W],
                     double (*u)[W], double *n, double *sn, double *ni)
{
    const size_t bytes = W * sizeof(double);
    for (int c = 0; c < 3; c++) {
        memcpy(r[c], t->r[c] + k0, bytes);
        memcpy(v[c], t->v[c] + k0, bytes);
        memcpy(u[c], t->u[c] + k0, bytes);
    }
    memcpy(n, t->n + k0, bytes);
    memcpy(sn, t->sn + k0, bytes);
    memcpy(ni, t->ni + k0, bytes);
}

SY_CLONES
int sy_block_gather(const sy_sweep *sw, size_t j, size_t i0, sy_block *b)
{
    sy_batch_in *in = &b->in;
    const sy_soa *dep = sw->dep, *arr = sw->arr;
    const size_t n = sw->nx - i0 < W ? sw->nx - i0 : W;
    const int nl = (int)n;
    /* arrival-state validity of each lane */
    unsigned char aok[W];
    size_t k0 = 0;
    if (!sw->y_is_tof) {
        memset(aok, arr->ok[j], sizeof aok);
    } else if (!arr) {
        memset(aok, 1, sizeof aok); /* pending the caller's states */
    } else {
        k0 = (size_t)sw->la * i0 + (size_t)sw->lb * j;
        if (sw->la == 1) {
            memcpy(aok, arr->ok + k0, sizeof aok);
        } else {
            for (int l = 0; l < W; l++)
                aok[l] = arr->ok[k0 + (size_t)sw->la * (size_t)(l < nl ? l : nl - 1)];
        }
    }
    /* flight times in days as the scalar sweep computes them; lanes past
     * the row's end repeat the block's first cell.  (double)i0 + lane is
     * the exact integer i0 + lane (< 2^53), written so that the index
     * conversion is a 32-bit one that vectorises. */
    const double x0 = sw->x0_jd, dx = sw->dx_days;
    const double yj = sw->y0 + (double)j * sw->dy_days;
    const int tof_axis = sw->y_is_tof;
    const double di0 = (double)i0;
    const unsigned char *dok = dep->ok + i0;
    /* two loops, each of one element width, so that both vectorise:
     * flight times (doubles), then statuses (bytes) */
    unsigned char tok[W];
    long tokl[W];
#pragma omp simd
    for (int l = 0; l < W; l++) {
        double jd_dep = x0 + (di0 + (double)(l < nl ? l : 0)) * dx;
        double t = tof_axis ? yj : yj - jd_dep;
        b->tof_d[l] = t;
        in->tof_s[l] = t * SY_DAY_S;
        long ok = (t >= SY_MIN_FLIGHT_DAYS) & (l < nl);
        tokl[l] = ok;
    }
    /* counts by plain loops (see lanes_count in lambert_batch.c) */
    long ntime = 0;
    for (int l = 0; l < W; l++) ntime += tokl[l];
    if (!ntime) {
        memset(b->st0, SY_CELL_NOTIME, sizeof b->st0);
        memset(in->live, 0, sizeof in->live);
        return 0;
    }
    for (int l = 0; l < W; l++) tok[l] = (unsigned char)tokl[l];
#pragma omp simd
    for (int l = 0; l < W; l++) {
        unsigned char mt = mask_u8(tok[l]), mg = mask_u8(dok[l] & aok[l]);
        b->st0[l] = sel_u8(mt, sel_u8(mg, SY_CELL_OK, SY_CELL_RANGE), SY_CELL_NOTIME);
        in->live[l] = mt & mg & 1;
    }
    unsigned nlive = 0;
    for (int l = 0; l < W; l++) nlive += in->live[l];
    if (!nlive) return 0;
    /* departure states: contiguous (the tables are padded); already in
     * place when the last block was this column block and the kernel
     * left the inputs alone */
    if (b->dep_i0 != i0) {
        copy_run(dep, i0, in->r1, in->vb1, in->ir1, in->r1n, in->sr1, in->r1i);
        b->dep_i0 = i0;
    }
    if (!sw->y_is_tof) {
        /* one arrival epoch per row: broadcast */
        const double rn = arr->n[j], rs = arr->sn[j], ri = arr->ni[j];
        for (int c = 0; c < 3; c++) {
            const double rc = arr->r[c][j], vc = arr->v[c][j], uc = arr->u[c][j];
#pragma omp simd
            for (int l = 0; l < W; l++) {
                in->r2[c][l] = rc;
                in->vb2[c][l] = vc;
                in->ir2[c][l] = uc;
            }
        }
#pragma omp simd
        for (int l = 0; l < W; l++) {
            in->r2n[l] = rn;
            in->sr2[l] = rs;
            in->r2i[l] = ri;
        }
    } else if (arr && sw->la == 1) {
        /* consecutive departures, consecutive arrivals (padded) */
        copy_run(arr, k0, in->r2, in->vb2, in->ir2, in->r2n, in->sr2, in->r2i);
    } else if (arr) {
        /* strided; lanes past the row end repeat its last cell */
        for (int l = 0; l < W; l++)
            arrival_from(in, l, arr, k0 + (size_t)sw->la * (size_t)(l < nl ? l : nl - 1));
    }
    return (int)nlive;
}

void sy_block_set_arrival(sy_block *b, int l, const double r[3], const double v[3], int ok)
{
    sy_batch_in *in = &b->in;
    double u[3];
    sy_batch_position(r, &in->r2n[l], u, &in->sr2[l], &in->r2i[l]);
    for (int c = 0; c < 3; c++) {
        in->r2[c][l] = r[c];
        in->vb2[c][l] = v[c];
        in->ir2[c][l] = u[c];
    }
    if (!ok) {
        in->live[l] = 0;
        if (b->st0[l] == SY_CELL_OK) b->st0[l] = SY_CELL_RANGE;
    }
}

/* Row k of a work unit starts from the rows before, same columns: the
 * row before (k = 1), a linear (k = 2) or quadratic (k >= 3) extrapolation.
 * On a 1-day lattice the quadratic one is within 1e-5 of the root for
 * ~88 % of the Earth-Mars bench cells, against ~54 % for the linear one
 * (measured), so most lanes finish in one Householder step.  A missing
 * row (NaN) or an extrapolation past the bracket falls back to the row
 * before; NaN there means "no seed" (the kernel's initial guess). */
SY_CLONES
void sy_block_seed(sy_block *b, size_t k)
{
    const double *p1 = b->xp1, *p2 = b->xp2, *p3 = b->xp3;
    double *xs = b->in.xs;
    const int order = k >= 3 ? 3 : (int)k;
#pragma omp simd
    for (int l = 0; l < W; l++) {
        double e2 = 2.0 * p1[l] - p2[l];
        double e3 = 3.0 * (p1[l] - p2[l]) + p3[l];
        double e = order == 3 ? e3 : e2;
        long use = (long)(order >= 2) & (e > -1.0) & (e < 1e3);
        double s = use ? e : p1[l];
        xs[l] = order == 0 ? NAN : s;
    }
}

SY_CLONES
void sy_block_keep(sy_block *b, int solved)
{
    if (solved && b->out.in_modified) b->dep_i0 = SIZE_MAX;
    const double *x = b->out.x;
#pragma omp simd
    for (int l = 0; l < W; l++) {
        b->xp3[l] = b->xp2[l];
        b->xp2[l] = b->xp1[l];
        b->xp1[l] = solved ? x[l] : NAN;
    }
}

void sy_block_prefetch(const sy_grid *g, size_t j, size_t i0)
{
    /* write intent, into L2 (locality 2): prefetching into L1 filled the
     * line-fill buffers the kernel's own loads need */
    const size_t n = g->nx - i0 < W ? g->nx - i0 : W;
    const size_t k0 = j * g->nx + i0;
    for (int f = 0; f < SY_NFIELDS; f++) {
        const float *F = g->field[f];
        if (!F) continue;
        for (size_t l = 0; l < n; l += 64 / sizeof(float)) __builtin_prefetch(F + k0 + l, 1, 2);
        __builtin_prefetch(F + k0 + n - 1, 1, 2);
    }
    __builtin_prefetch(g->status + k0, 1, 2);
    __builtin_prefetch(g->status + k0 + n - 1, 1, 2);
    __builtin_prefetch(g->type + k0, 1, 2);
    __builtin_prefetch(g->type + k0 + n - 1, 1, 2);
}

SY_CLONES
void sy_block_scatter(sy_grid *g, size_t j, size_t i0, const sy_block *b, int solved)
{
    const size_t n = g->nx - i0 < W ? g->nx - i0 : W;
    const size_t k0 = j * g->nx + i0;
    unsigned char *restrict st = g->status + k0, *restrict ty = g->type + k0;
    const sy_batch_in *in = &b->in;
    const sy_batch_out *bo = &b->out;
    if (solved) {
#pragma omp simd
        for (size_t l = 0; l < n; l++) {
            unsigned char s = sel_u8(mask_u8(in->live[l]), bo->status[l], b->st0[l]);
            st[l] = s;
            ty[l] = mask_u8(s == SY_CELL_OK) & bo->type[l];
        }
    } else {
        memcpy(st, b->st0, n);
        memset(ty, 0, n);
    }
    for (int f = 0; f < SY_NFIELDS; f++) {
        float *restrict F = g->field[f];
        if (!F) continue;
        F += k0;
        const double *v = bo->f[f];
        if (solved) {
#pragma omp simd
            for (size_t l = 0; l < n; l++) F[l] = (float)v[l];
        } else {
#pragma omp simd
            for (size_t l = 0; l < n; l++) F[l] = NAN;
        }
    }
}
