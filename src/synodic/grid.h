/* synodic/grid.h - departure x arrival grids of transfers (libsynodic).
 *
 * A grid sweeps departure epochs (x, index i) against arrival epochs or
 * flight times (y, index j).  Body states are tabulated once per distinct
 * epoch, then every cell is one Lambert solve.  Fields are stored as float
 * in row-major order, cell (i, j) at j * nx + i, with a per-cell status so
 * that cells without a solution are masked rather than NaN-poisoned.
 */
#ifndef SYNODIC_GRID_H
#define SYNODIC_GRID_H

#include <stddef.h>

#include "synodic.h"
#include "synodic/study.h"

#ifdef __cplusplus
extern "C" {
#endif

/* Per-cell status. */
enum {
    SY_CELL_OK = 0,
    SY_CELL_NOSOL = 1,       /* no N-rev solution for this flight time   */
    SY_CELL_DEGENERATE = 2,  /* transfer angle 0 or 180 deg              */
    SY_CELL_NOCONV = 3,      /* the solver did not converge              */
    SY_CELL_NOTIME = 4,      /* flight under SY_MIN_FLIGHT_DAYS (or none)  */
    SY_CELL_RANGE = 5        /* an epoch outside the ephemeris validity  */
};

typedef struct {
    const sy_body *from, *to;
    double x0_jd, dx_days;   /* departure epochs x0 + i dx, i < nx       */
    size_t nx;
    int y_is_tof;            /* 0: y is the arrival JD; 1: flight days   */
    double y0, dy_days;      /* y0 + j dy, j < ny                        */
    size_t ny;
    int revs;
    sy_branch branch;
    sy_transfer_opts opts;
    int threads;             /* 0: all cores                             */
    /* Fields to store: bits SY_FIELD_BIT(SY_F_xxx); 0 means every field
     * available.  Fields not asked for stay NULL in sy_grid.field. */
    unsigned fields;
    int kernel;              /* SY_KERNEL_*                              */
} sy_grid_spec;

#define SY_FIELD_BIT(f) (1u << (unsigned)(f))

/* Cell kernel.  AUTO uses the vector kernel when the build has it and the
 * grid is single-revolution (revs = 0), unless the environment variable
 * SYNODIC_KERNEL=scalar asks for the scalar one; grids with revs >= 1
 * always use the scalar solver.  Both give the same figures to about
 * 1e-10 relative (tests/check_batch.c); fields are stored as float. */
enum { SY_KERNEL_AUTO = 0, SY_KERNEL_SCALAR = 1, SY_KERNEL_VECTOR = 2 };

typedef struct {
    sy_grid_spec spec;
    size_t nx, ny;
    float *field[SY_NFIELDS];   /* NULL when the field cannot exist      */
    unsigned char *status;      /* SY_CELL_*                             */
    unsigned char *type;        /* 1 or 2 (0 when no solution)           */
    double seconds_ephem;       /* time spent tabulating states          */
    double seconds_cells;       /* time spent solving cells              */
    const char *kernel;         /* "scalar" or "vector ..." (what ran)   */
    double mean_sweeps;         /* vector kernel: Householder sweeps per
                                 * solved block (0 for the scalar one)   */
} sy_grid;

/* Build the grid spec of a study with its bodies. */
sy_status sy_grid_spec_from_study(const sy_study *st, const sy_body *from,
                                  const sy_body *to, sy_grid_spec *spec,
                                  sy_error *err);
/* Bytes a grid needs (the fields asked for and work arrays). */
size_t sy_grid_bytes(const sy_grid_spec *spec);
/* Progress callback: fraction done 0..1; return non-zero to cancel. */
typedef int (*sy_progress_fn)(double fraction, void *user);
/* Compute.  Refuses (SY_ERR_NOMEM, with the estimate in err) a grid that
 * would not fit in memory.  Returns SY_ERR_IO (message "interrupted")
 * when the progress callback cancels. */
sy_status sy_grid_compute(const sy_grid_spec *spec, sy_progress_fn progress,
                          void *user, sy_grid **out, sy_error *err);
/* Compute again into an existing grid, for a spec of the same size
 * (nx, ny) and fields: other dates, steps, bodies or transfer options,
 * without allocating (and first touching) the grid's memory again.
 * SY_ERR_ARG when the layout differs; on any failure the grid's contents
 * are unspecified (free it or recompute). */
sy_status sy_grid_recompute(sy_grid *g, const sy_grid_spec *spec, sy_progress_fn progress,
                            void *user, sy_error *err);
void sy_grid_free(sy_grid *g);

static inline double sy_grid_x_jd(const sy_grid *g, double i)
{
    return g->spec.x0_jd + i * g->spec.dx_days;
}
static inline double sy_grid_y(const sy_grid *g, double j)
{
    return g->spec.y0 + j * g->spec.dy_days;
}
/* Arrival JD of node (i, j) on either kind of y axis. */
static inline double sy_grid_arr_jd(const sy_grid *g, double i, double j)
{
    return g->spec.y_is_tof ? sy_grid_x_jd(g, i) + sy_grid_y(g, j)
                            : sy_grid_y(g, j);
}

/* Constraint violation mask of a study over a grid: 1 where a limit of
 * the study is exceeded, 0 where feasible or unsolved.  Caller frees. */
unsigned char *sy_grid_violations(const sy_grid *g, const sy_study *st);
/* 1 where the cell satisfies every limit of the study. */
int sy_grid_cell_feasible(const sy_grid *g, const sy_study *st, size_t k);

/* Optimum of one field, refined off the grid. */
typedef struct {
    sy_field field;
    int type;               /* 1 or 2 when restricted to one type, else 0 */
    int found;              /* 0: no feasible cell                       */
    double jd_dep, jd_arr;  /* refined to better than 0.01 day           */
    double value;           /* the field's value there                   */
    sy_transfer transfer;   /* every figure at the optimum               */
    int iterations;         /* minimiser iterations                      */
    unsigned edges;         /* SY_EDGE_* bits: where it touches the grid */
} sy_optimum;

/* An optimum within SY_EDGE_TOL_DAYS of the grid window's first or last
 * departure, or first or last arrival (flight time on a flight-time
 * axis), has been held back by the window, not found: the field may go
 * on falling beyond it.  Widen the study's range on that side to find
 * the minimum. */
#define SY_EDGE_DEP_FIRST 1u
#define SY_EDGE_DEP_LAST 2u
#define SY_EDGE_Y_FIRST 4u
#define SY_EDGE_Y_LAST 8u
#define SY_EDGE_TOL_DAYS 0.01
/* "first departure", "last arrival and first departure", ... of the
 * bits in o->edges (flight time on a flight-time axis); "" for none. */
const char *sy_optimum_edge_text(const sy_optimum *o, int y_is_tof, char *buf, size_t n);

/* Minimum of `field` over the feasible cells, refined with GSL's
 * Nelder-Mead simplex (gsl_multimin_fminimizer_nmsimplex2) inside the
 * grid window, the study's limits and the cell's transfer type. */
sy_status sy_grid_optimum(const sy_grid *g, const sy_study *st,
                          sy_field field, sy_optimum *opt);

/* The value of field f among a transfer's figures (NAN when not set). */
double sy_transfer_field(const sy_transfer *t, sy_field f);

/* The same, restricted to Type I (type 1) or Type II (type 2) cells;
 * type 0 means either. */
sy_status sy_grid_optimum_of_type(const sy_grid *g, const sy_study *st,
                                  sy_field field, int type, sy_optimum *opt);

#ifdef __cplusplus
}
#endif
#endif
