/* grid.c - the porkchop grid engine.
 *
 * Work is O(N + M) ephemeris evaluations plus one Lambert solve per cell:
 * the departure body is tabulated at each departure epoch and the target
 * at each distinct arrival epoch.  On a time-of-flight axis the arrival
 * epochs x0 + i dx + y0 + j dy fall on one lattice whenever one step is an
 * integer multiple of the other (the usual case: both in whole days), so
 * they are tabulated once too; otherwise each cell evaluates its own
 * arrival state (documented fallback).
 *
 * Cells are independent and computed with OpenMP; each cell's arithmetic
 * does not depend on which thread runs it, so the fields are identical
 * bit for bit for any thread count.  A sweep is one parallel region over
 * fixed work units; progress is reported, and a cancel request honoured,
 * as units complete (see sy_grid_compute).
 *
 * Two cell kernels (see SY_KERNEL_* in synodic/grid.h):
 *   - vector (lambert_batch.c, block loops in grid_block.c): each arrival
 *     row is cut into fixed blocks of SY_BATCH_W departure epochs starting
 *     at i = 0, 64, 128, ..., gathered into structure-of-arrays form and
 *     solved lane-wide; a work unit is one such column block in a run
 *     of consecutive rows, each row seeded from the rows before;
 *     the last block of a row is padded with dead lanes rather than run by
 *     a scalar tail, and unit boundaries do not depend on the thread
 *     count, so the fields stay bit-identical for any number of threads;
 *   - scalar: one sy_transfer_from_states() per cell; used for revs >= 1
 *     (the vector kernel is single-revolution), when the build has no
 *     vector kernel, or on request (SYNODIC_KERNEL=scalar).
 */
#include "config.h"
#include "synodic.h"
#include "synodic/grid.h"
#include "lambert_batch.h"
#include "grid_block.h"

#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>
#include <unistd.h>
#ifdef _OPENMP
#include <omp.h>
#endif

static double now_s(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return ts.tv_sec + 1e-9 * ts.tv_nsec;
}

static size_t count_steps(double start, double end, double step)
{
    return (size_t)floor((end - start) / step + 1e-9) + 1;
}

sy_status sy_grid_spec_from_study(const sy_study *st, const sy_body *from,
                                  const sy_body *to, sy_grid_spec *spec,
                                  sy_error *err)
{
    memset(spec, 0, sizeof *spec);
    if (!from || !to) return sy_fail(err, SY_ERR_ARG, "missing body");
    spec->from = from;
    spec->to = to;
    spec->x0_jd = st->dep_start_jd;
    spec->dx_days = st->dep_step_days;
    spec->nx = count_steps(st->dep_start_jd, st->dep_end_jd, st->dep_step_days);
    spec->y_is_tof = st->y_is_tof;
    if (st->y_is_tof) {
        spec->y0 = st->tof_start_days;
        spec->dy_days = st->tof_step_days;
        spec->ny = count_steps(st->tof_start_days, st->tof_end_days, st->tof_step_days);
    } else {
        spec->y0 = st->arr_start_jd;
        spec->dy_days = st->arr_step_days;
        spec->ny = count_steps(st->arr_start_jd, st->arr_end_jd, st->arr_step_days);
    }
    spec->revs = st->revs;
    spec->branch = st->branch;
    spec->opts = st->orbits;
    spec->threads = 0;
    if (spec->nx < 2 || spec->ny < 2)
        return sy_fail(err, SY_ERR_ARG, "the grid has %zu x %zu nodes; a chart needs at least 2 x 2 (widen the windows or shorten step_days)", spec->nx, spec->ny);
    return SY_OK;
}

/* Arrival lattice on a time-of-flight axis: arrival(i, j) = base + (a i +
 * b j) step.  Returns 0 when the steps are incommensurate. */
static int tof_lattice(const sy_grid_spec *s, long *a, long *b, double *step,
                       size_t *n)
{
    double r = s->dy_days / s->dx_days;
    double kr = nearbyint(r), km = nearbyint(1.0 / r);
    if (kr >= 1 && fabs(r - kr) < 1e-9 * kr) {
        *a = 1; *b = (long)kr; *step = s->dx_days;
    } else if (km >= 1 && fabs(1.0 / r - km) < 1e-9 * km) {
        *a = (long)km; *b = 1; *step = s->dy_days;
    } else {
        return 0;
    }
    *n = (size_t)(*a) * (s->nx - 1) + (size_t)(*b) * (s->ny - 1) + 1;
    return 1;
}

static size_t n_arrival_states(const sy_grid_spec *s)
{
    if (!s->y_is_tof) return s->ny;
    long a, b;
    double step;
    size_t n;
    return tof_lattice(s, &a, &b, &step, &n) ? n : 0;
}

size_t sy_grid_bytes(const sy_grid_spec *s)
{
    if (s->nx == 0 || s->ny == 0) return 0;
    if (s->nx > SIZE_MAX / s->ny) return SIZE_MAX;
    size_t cells = s->nx * s->ny;
    size_t nf = 0;
    for (int f = 0; f < SY_NFIELDS; f++)
        nf += !s->fields || (s->fields & SY_FIELD_BIT(f));
    size_t per_cell = nf * sizeof(float) + 2;
    if (cells > SIZE_MAX / per_cell) return SIZE_MAX;
    size_t states = (s->nx + n_arrival_states(s)) * (6 * sizeof(double) + 1);
    return cells * per_cell + states;
}

/* Memory this process may use: MemAvailable, else physical memory. */
static size_t memory_available(void)
{
    FILE *f = fopen("/proc/meminfo", "r");
    if (f) {
        char line[256];
        unsigned long long kb;
        while (fgets(line, sizeof line, f)) {
            if (sscanf(line, "MemAvailable: %llu kB", &kb) == 1) {
                fclose(f);
                return (size_t)(kb * 1024ULL);
            }
        }
        fclose(f);
    }
    long pages = sysconf(_SC_PHYS_PAGES), psz = sysconf(_SC_PAGESIZE);
    if (pages > 0 && psz > 0) return (size_t)pages * (size_t)psz;
    return (size_t)1 << 30;
}

static int field_available(const sy_grid_spec *s, sy_field f)
{
    const sy_transfer_opts *o = &s->opts;
    int from_ok = s->from->gm_km3_s2 > 0 && s->from->radius_km > 0;
    int to_ok = s->to->gm_km3_s2 > 0 && s->to->radius_km > 0;
    switch (f) {
    case SY_F_DV_DEP: return o->want_park && from_ok;
    case SY_F_DV_CAP: return o->want_capture && to_ok;
    case SY_F_DV_TOTAL: return o->want_park && o->want_capture && from_ok && to_ok;
    case SY_F_V_ENTRY: return o->want_entry && to_ok;
    default: return 1;
    }
}

void sy_grid_free(sy_grid *g)
{
    if (!g) return;
    for (int f = 0; f < SY_NFIELDS; f++) free(g->field[f]);
    free(g->status);
    free(g->type);
    free(g);
}

static void fmt_bytes(size_t b, char *buf, size_t n)
{
    if (b == SIZE_MAX) snprintf(buf, n, "more than this machine can address");
    else if (b >= ((size_t)1 << 30)) snprintf(buf, n, "%.1f GiB", b / 1073741824.0);
    else snprintf(buf, n, "%.1f MiB", b / 1048576.0);
}

typedef struct {
    double r[3], v[3];
    int ok;
} state6;

static void tabulate(const sy_body *b, double t0, double step, size_t n,
                     state6 *out)
{
    for (size_t k = 0; k < n; k++)
        out[k].ok = sy_body_state(b, t0 + (double)k * step, out[k].r, out[k].v) == SY_OK;
}

static void store_cell(sy_grid *g, size_t k, const sy_transfer *t)
{
    float *const *F = g->field;
    const float vals[SY_NFIELDS] = {
        [SY_F_C3] = (float)t->c3_km2_s2,
        [SY_F_VINF_DEP] = (float)t->vinf_dep_km_s,
        [SY_F_DLA] = (float)t->dla_deg,
        [SY_F_RLA] = (float)t->rla_deg,
        [SY_F_VINF_ARR] = (float)t->vinf_arr_km_s,
        [SY_F_C3_ARR] = (float)t->c3_arr_km2_s2,
        [SY_F_DAP] = (float)t->dap_deg,
        [SY_F_RAP] = (float)t->rap_deg,
        [SY_F_TOF] = (float)t->tof_days,
        [SY_F_ANGLE] = (float)t->transfer_angle_deg,
        [SY_F_MIN_SUN] = (float)t->min_sun_dist_au,
        [SY_F_DV_DEP] = (float)t->dv_dep_km_s,
        [SY_F_DV_CAP] = (float)t->dv_cap_km_s,
        [SY_F_DV_TOTAL] = (float)t->dv_total_km_s,
        [SY_F_V_ENTRY] = (float)t->v_entry_km_s,
    };
    for (int f = 0; f < SY_NFIELDS; f++)
        if (F[f]) F[f][k] = vals[f];
    g->type[k] = (unsigned char)t->type;
}

static void mark_cell(sy_grid *g, size_t k, unsigned char status)
{
    for (int f = 0; f < SY_NFIELDS; f++)
        if (g->field[f]) g->field[f][k] = NAN;
    g->status[k] = status;
    g->type[k] = 0;
}

static unsigned char cell_status_of(sy_status st)
{
    switch (st) {
    case SY_OK: return SY_CELL_OK;
    case SY_ERR_NOSOL: return SY_CELL_NOSOL;
    case SY_ERR_DEGENERATE: return SY_CELL_DEGENERATE;
    default: return SY_CELL_NOCONV;
    }
}

/* Kernel choice (synodic/grid.h SY_KERNEL_*). */
static int use_vector_kernel(const sy_grid_spec *s)
{
    if (s->revs != 0 || !sy_batch_available() || s->kernel == SY_KERNEL_SCALAR)
        return 0;
    if (s->kernel == SY_KERNEL_VECTOR) return 1;
    const char *e = getenv("SYNODIC_KERNEL");
    return !(e && strcmp(e, "scalar") == 0);
}

/* Work units of the vector sweep: a unit is one block of columns in a
 * run of consecutive rows, solved in order, so that each row after the
 * first starts Izzo's iteration from the solutions of the rows before
 * (sy_block_seed).  x is a smooth function of both dates (also across
 * the 180-degree ridge, where lambda passes through zero), so an
 * extrapolation from the rows before is within 1e-4 of the root for most
 * cells of a 1-day lattice and one Householder step (order four)
 * finishes it; the first rows of a unit need the initial guess and two
 * or three steps, so runs are long: the grid is cut into about
 * UNIT_TARGET units, of at least UNIT_MIN_ROWS rows.  The cut depends on
 * the grid's size only, never on the thread count, so neither do the
 * seeds nor any bit of the fields. */
#define UNIT_TARGET 64
#define UNIT_MIN_ROWS 16

/* Who solves which unit.  The units form nbands x ncols (runs of rows x
 * column blocks; the scalar sweep: 1 x its runs of cells).  Each thread
 * owns a contiguous range of columns, all bands, and takes its units
 * band by band, left to right, from the front; when its range is done
 * it takes from the back of the range with the most left.  So a thread
 * mostly writes neighbouring column blocks itself, one after the other:
 * the cache lines where two blocks of a grid row meet (rows are not
 * padded to whole lines) seldom pass between cores, which a shared
 * dynamic schedule made them do at every block boundary (about 7 % of a
 * two-thread sweep, measured).  Only who computes a unit changes, never
 * the unit, so the fields do not depend on it. */
typedef struct {
    _Alignas(64) long long c0; /* one range a cache line; its columns are */
    long long w;               /* c0 .. c0+w-1, every band                */
    long long front, back;     /* positions front .. back-1 are left      */
#ifdef _OPENMP
    omp_lock_t lock;
#endif
} unit_seg;

static void seg_lock(unit_seg *s)
{
#ifdef _OPENMP
    omp_set_lock(&s->lock);
#else
    (void)s;
#endif
}

static void seg_unlock(unit_seg *s)
{
#ifdef _OPENMP
    omp_unset_lock(&s->lock);
#else
    (void)s;
#endif
}

/* A position of range s from its front (or back), -1 when it is empty. */
static long long seg_take(unit_seg *s, int back)
{
    seg_lock(s);
    long long p = s->front < s->back ? (back ? --s->back : s->front++) : -1;
    seg_unlock(s);
    return p;
}

static long long seg_left(unit_seg *s)
{
    seg_lock(s);
    long long n = s->back - s->front;
    seg_unlock(s);
    return n;
}

/* The next unit (band * ncols + column) for thread me of nt, or -1
 * when none is left. */
static long long claim_unit(unit_seg *seg, int nt, int me, long long ncols)
{
    int from = me;
    long long p = seg_take(&seg[me], 0);
    while (p < 0) {
        long long most = 0;
        from = -1;
        for (int t = 0; t < nt; t++) {
            long long n = seg_left(&seg[t]);
            if (n > most) { most = n; from = t; }
        }
        if (from < 0) return -1;
        p = seg_take(&seg[from], 1);
    }
    const unit_seg *s = &seg[from];
    return p / s->w * ncols + s->c0 + p % s->w;
}

static size_t unit_rows(size_t ny, size_t nblk)
{
    size_t groups = (UNIT_TARGET + nblk - 1) / nblk;
    size_t rows = (ny + groups - 1) / groups;
    return rows < UNIT_MIN_ROWS ? UNIT_MIN_ROWS : rows;
}

/* The vector tables: entry k of st into o (sy_soa_set derives the
 * position's norm, unit vector and square root once per epoch). */
static int soa_from_states(const state6 *st, size_t n, sy_soa *o)
{
    if (!sy_soa_init(o, n)) return 0;
    for (size_t k = 0; k < n; k++) sy_soa_set(o, k, st[k].r, st[k].v, st[k].ok);
    return 1;
}

/* Incommensurate flight-time axis: each live lane's own arrival state.
 * Updates *nlive; returns the seconds spent in the ephemeris. */
static double arrival_states(const sy_grid *g, size_t i0, sy_block *b, int *nlive)
{
    const sy_grid_spec *spec = &g->spec;
    double t0 = now_s();
    int n = 0;
    for (int l = 0; l < SY_BATCH_W; l++) {
        if (!b->in.live[l]) continue;
        double jd_dep = spec->x0_jd + (double)(i0 + (size_t)l) * spec->dx_days, r[3], v[3];
        int ok = sy_body_state(spec->to, jd_dep + b->tof_d[l], r, v) == SY_OK;
        sy_block_set_arrival(b, l, r, v, ok);
        n += ok;
    }
    *nlive = n;
    return now_s() - t0;
}

/* Cells per work unit of the scalar sweep. */
#define SCALAR_UNIT 64

/* One cell by the scalar kernel; returns the seconds spent evaluating its
 * own arrival state (incommensurate flight-time axis only). */
static double scalar_cell(sy_grid *g, const state6 *dep, const state6 *arr,
                          size_t narr, long la, long lb, size_t k)
{
    const sy_grid_spec *spec = &g->spec;
    double extra = 0;
    size_t i = k % g->nx, j = k / g->nx;
    double jd_dep = spec->x0_jd + (double)i * spec->dx_days;
    double tof_d = spec->y_is_tof ? spec->y0 + (double)j * spec->dy_days
                                  : spec->y0 + (double)j * spec->dy_days - jd_dep;
    g->status[k] = SY_CELL_OK;
    if (!(tof_d >= SY_MIN_FLIGHT_DAYS)) { mark_cell(g, k, SY_CELL_NOTIME); return 0; }
    const state6 *d = &dep[i];
    state6 a_local;
    const state6 *a;
    if (!spec->y_is_tof) {
        a = &arr[j];
    } else if (narr) {
        a = &arr[(size_t)la * i + (size_t)lb * j];
    } else {
        double ta = now_s();
        a_local.ok = sy_body_state(spec->to, jd_dep + tof_d, a_local.r, a_local.v) == SY_OK;
        extra += now_s() - ta;
        a = &a_local;
    }
    if (!d->ok || !a->ok) { mark_cell(g, k, SY_CELL_RANGE); return extra; }
    sy_transfer t;
    sy_status st = sy_transfer_from_states(d->r, d->v, a->r, a->v, tof_d * SY_DAY_S,
                                           spec->revs, spec->branch,
                                           spec->from->gm_km3_s2, spec->from->radius_km,
                                           spec->to->gm_km3_s2, spec->to->radius_km,
                                           &spec->opts, &t);
    if (st != SY_OK) { mark_cell(g, k, cell_status_of(st)); return extra; }
    store_cell(g, k, &t);
    return extra;
}

/* The spec's checks shared by compute and recompute. */
static sy_status check_spec(const sy_grid_spec *spec, sy_error *err)
{
    if (!spec->from || !spec->to || spec->nx == 0 || spec->ny == 0 ||
        !(spec->dx_days > 0) || !(spec->dy_days > 0))
        return sy_fail(err, SY_ERR_ARG, "empty grid or non-positive step");
    return SY_OK;
}

/* 1 when the grid holds field f for this spec. */
static int field_wanted(const sy_grid_spec *spec, int f)
{
    return field_available(spec, (sy_field)f) &&
           (!spec->fields || (spec->fields & SY_FIELD_BIT(f)));
}

static sy_status sweep(sy_grid *g, sy_progress_fn progress, void *user, sy_error *err);

sy_status sy_grid_compute(const sy_grid_spec *spec, sy_progress_fn progress,
                          void *user, sy_grid **out, sy_error *err)
{
    *out = NULL;
    sy_status r = check_spec(spec, err);
    if (r != SY_OK) return r;
    size_t need = sy_grid_bytes(spec), avail = memory_available();
    if (need == SIZE_MAX || need > avail / 10 * 8) {
        char nb[64], ab[64];
        fmt_bytes(need, nb, sizeof nb);
        fmt_bytes(avail, ab, sizeof ab);
        /* the study asks for more than the machine has: bad input (its
         * steps and windows), not a failure of the program */
        return sy_fail(err, SY_ERR_RANGE, "a grid of %zu x %zu cells needs %s but only %s of memory is available; use a larger step_days or narrower windows", spec->nx, spec->ny, nb, ab);
    }
    sy_grid *g = calloc(1, sizeof *g);
    if (!g) return sy_fail(err, SY_ERR_NOMEM, "out of memory");
    g->spec = *spec;
    g->nx = spec->nx;
    g->ny = spec->ny;
    size_t cells = g->nx * g->ny;
    g->status = calloc(cells, 1);
    g->type = calloc(cells, 1);
    int ok = g->status && g->type;
    for (int f = 0; f < SY_NFIELDS && ok; f++)
        if (field_wanted(spec, f)) {
            g->field[f] = malloc(cells * sizeof(float));
            ok = g->field[f] != NULL;
        }
    if (!ok) {
        sy_grid_free(g);
        return sy_fail(err, SY_ERR_NOMEM, "out of memory allocating the grid");
    }
    r = sweep(g, progress, user, err);
    if (r != SY_OK) {
        sy_grid_free(g);
        return r;
    }
    *out = g;
    return SY_OK;
}

sy_status sy_grid_recompute(sy_grid *g, const sy_grid_spec *spec, sy_progress_fn progress,
                            void *user, sy_error *err)
{
    sy_status r = check_spec(spec, err);
    if (r != SY_OK) return r;
    int same = spec->nx == g->nx && spec->ny == g->ny;
    for (int f = 0; f < SY_NFIELDS && same; f++)
        same = field_wanted(spec, f) == (g->field[f] != NULL);
    if (!same)
        return sy_fail(err, SY_ERR_ARG, "a grid is recomputed only for a spec of its own size and fields (%zu x %zu); compute a new grid instead", g->nx, g->ny);
    g->spec = *spec;
    return sweep(g, progress, user, err);
}

/* Tabulate the states and solve every cell of g (g->spec). */
static sy_status sweep(sy_grid *g, sy_progress_fn progress, void *user, sy_error *err)
{
    const sy_grid_spec *spec = &g->spec;
    const size_t cells = g->nx * g->ny;
    size_t narr = n_arrival_states(spec);
    state6 *dep = malloc(g->nx * sizeof *dep);
    state6 *arr = narr ? malloc(narr * sizeof *arr) : NULL;
    if (!dep || (narr && !arr)) {
        free(dep); free(arr);
        return sy_fail(err, SY_ERR_NOMEM, "out of memory allocating the grid");
    }

    double t0 = now_s();
    long la = 0, lb = 0;
    double lstep = 0, lbase = 0;
    tabulate(spec->from, spec->x0_jd, spec->dx_days, g->nx, dep);
    if (!spec->y_is_tof) {
        tabulate(spec->to, spec->y0, spec->dy_days, g->ny, arr);
    } else if (narr) {
        size_t n;
        tof_lattice(spec, &la, &lb, &lstep, &n);
        lbase = spec->x0_jd + spec->y0;
        tabulate(spec->to, lbase, lstep, n, arr);
    }
    double t1 = now_s();
    g->seconds_ephem = t1 - t0;

    const double gm1 = spec->from->gm_km3_s2, R1 = spec->from->radius_km;
    const double gm2 = spec->to->gm_km3_s2, R2 = spec->to->radius_km;
    int threads = spec->threads;
#ifdef _OPENMP
    if (threads <= 0) threads = omp_get_num_procs();
#else
    threads = 1;
#endif
    sy_status result = SY_OK;
    double ephem_cells = 0;
    const int vec = use_vector_kernel(spec);
    g->kernel = vec ? sy_batch_isa() : "scalar";
    sy_batch_ctx ctx;
    memset(&ctx, 0, sizeof ctx);
    for (int f = 0; f < SY_NFIELDS; f++)
        if (g->field[f]) ctx.fields |= SY_FIELD_BIT(f);
    if (ctx.fields & (SY_FIELD_BIT(SY_F_DV_DEP) | SY_FIELD_BIT(SY_F_DV_TOTAL))) {
        ctx.gm_from = gm1;
        ctx.r_park_km = R1 + spec->opts.park_alt_km;
    }
    if (ctx.fields & (SY_FIELD_BIT(SY_F_DV_CAP) | SY_FIELD_BIT(SY_F_DV_TOTAL) |
                      SY_FIELD_BIT(SY_F_V_ENTRY))) {
        ctx.gm_to = gm2;
        ctx.r_cap_peri_km = R2 + spec->opts.capture_peri_km;
        ctx.r_cap_apo_km = R2 + spec->opts.capture_apo_km;
        ctx.r_entry_km = R2 + spec->opts.entry_alt_km;
    }
    const size_t nblk = (g->nx + SY_BATCH_W - 1) / SY_BATCH_W;
    sy_soa dsoa, asoa;
    memset(&dsoa, 0, sizeof dsoa);
    memset(&asoa, 0, sizeof asoa);
    if (vec && (!soa_from_states(dep, g->nx, &dsoa) ||
                (arr && !soa_from_states(arr, narr, &asoa)))) {
        result = sy_fail(err, SY_ERR_NOMEM, "out of memory allocating the sweep tables");
    }
    const sy_sweep sweep = {g->nx, spec->x0_jd, spec->dx_days, spec->y0, spec->dy_days,
                            spec->y_is_tof, la, lb, &dsoa, arr ? &asoa : NULL};
    /* One parallel region per sweep over fixed work units (a column
     * block in a run of rows for the vector kernel, a run of SCALAR_UNIT
     * cells for the scalar one), claimed as claim_unit says.
     * Unit boundaries do not depend on the thread count, so neither do
     * the fields.  Progress is counted in an atomic unit counter; only
     * the master thread calls the callback (about every 1/64 of the
     * sweep, and once with 1.0 after the region), so the callback never
     * runs concurrently with itself.  A cancel request sets a shared
     * flag and the remaining units are skipped. */
    const size_t urows = unit_rows(g->ny, nblk);
    const long long units = vec ? (long long)(((g->ny + urows - 1) / urows) * nblk)
                                : (long long)((cells + SCALAR_UNIT - 1) / SCALAR_UNIT);
    const long long report_step = units > 64 ? (units + 63) / 64 : 1;
    long long done_units = 0, next_report = report_step;
    int cancelled = 0, nomem = 0;
    double extra = 0;
    long long nsolved = 0, nsweeps = 0;
    unit_seg *seg = result == SY_OK ? aligned_alloc(64, (size_t)threads * sizeof *seg) : NULL;
    if (result == SY_OK && !seg)
        result = sy_fail(err, SY_ERR_NOMEM, "out of memory allocating the sweep buffers");
    if (result == SY_OK) {
#ifdef _OPENMP
        for (int t = 0; t < threads; t++) omp_init_lock(&seg[t].lock);
#endif
#pragma omp parallel num_threads(threads) reduction(+:extra, nsolved, nsweeps) reduction(|:nomem)
        {
            sy_block *b = NULL;
            if (vec) {
                b = aligned_alloc(64, (sizeof *b + 63) / 64 * 64);
                if (b) {
                    memset(b, 0, sizeof *b); /* no lane is ever read uninitialised */
                    b->dep_i0 = SIZE_MAX;
                } else {
                    nomem = 1;
                }
            }
#ifdef _OPENMP
            const int me = omp_get_thread_num(), nt = omp_get_num_threads();
#else
            const int me = 0, nt = 1;
#endif
            const int master = me == 0;
            /* the team may be smaller than asked: cut for its real size */
            const long long ncols = vec ? (long long)nblk : units, nrows = units / ncols;
            seg[me].c0 = ncols * me / nt;
            seg[me].w = ncols * (me + 1) / nt - seg[me].c0;
            seg[me].front = 0;
            seg[me].back = seg[me].w * nrows;
#pragma omp barrier
            for (long long u; (u = claim_unit(seg, nt, me, ncols)) >= 0;) {
                int stop;
#pragma omp atomic read
                stop = cancelled;
                if (stop || (vec && !b)) continue;
                if (vec) {
                    size_t j0 = (size_t)u / nblk * urows;
                    size_t i0 = (size_t)u % nblk * SY_BATCH_W;
                    size_t j1 = j0 + urows < g->ny ? j0 + urows : g->ny;
                    for (size_t j = j0; j < j1; j++) {
                        int any = sy_block_gather(&sweep, j, i0, b);
                        if (any && !sweep.arr) extra += arrival_states(g, i0, b, &any);
                        sy_block_seed(b, j - j0);
                        /* the grid lines of the next row (see grid_block.h) */
                        if (j == j0) sy_block_prefetch(g, j, i0);
                        if (j + 1 < j1) sy_block_prefetch(g, j + 1, i0);
                        if (any) {
                            sy_batch_solve(&ctx, &b->in, &b->out);
                            nsolved++;
                            nsweeps += b->out.iterations;
                        }
                        sy_block_scatter(g, j, i0, b, any);
                        sy_block_keep(b, any);
                    }
                } else {
                    size_t kb = (size_t)u * SCALAR_UNIT;
                    size_t ke = kb + SCALAR_UNIT < cells ? kb + SCALAR_UNIT : cells;
                    for (size_t k = kb; k < ke; k++)
                        extra += scalar_cell(g, dep, arr, narr, la, lb, k);
                }
                long long d;
#pragma omp atomic capture
                d = ++done_units;
                if (master && progress && d >= next_report && d < units) {
                    next_report = (d / report_step + 1) * report_step;
                    if (progress((double)d / (double)units, user)) {
#pragma omp atomic write
                        cancelled = 1;
                    }
                }
            }
            free(b);
        }
#ifdef _OPENMP
        for (int t = 0; t < threads; t++) omp_destroy_lock(&seg[t].lock);
#endif
    }
    free(seg);
    ephem_cells += extra;
    g->mean_sweeps = nsolved ? (double)nsweeps / (double)nsolved : 0.0;
    if (result == SY_OK && nomem)
        result = sy_fail(err, SY_ERR_NOMEM, "out of memory allocating the sweep buffers");
    if (result == SY_OK && !cancelled && progress && progress(1.0, user))
        cancelled = 1;
    if (result == SY_OK && cancelled)
        result = sy_fail(err, SY_ERR_IO, "interrupted");
    sy_soa_free(&dsoa);
    sy_soa_free(&asoa);
    g->seconds_ephem += ephem_cells / threads;
    g->seconds_cells = now_s() - t1 - ephem_cells / threads;
    free(dep);
    free(arr);
    return result;
}

int sy_grid_cell_feasible(const sy_grid *g, const sy_study *st, size_t k)
{
    if (g->status[k] != SY_CELL_OK) return 0;
    /* a limit on a field the grid was not asked to store cannot be
     * checked here; the caller asks for the fields its limits need */
    float *const *F = g->field;
    if (isfinite(st->c3_max_km2_s2) && F[SY_F_C3] && !(F[SY_F_C3][k] <= st->c3_max_km2_s2)) return 0;
    if (isfinite(st->vinf_arr_max_km_s) && F[SY_F_VINF_ARR] && !(F[SY_F_VINF_ARR][k] <= st->vinf_arr_max_km_s)) return 0;
    if (isfinite(st->dla_max_deg) && F[SY_F_DLA] && !(fabsf(F[SY_F_DLA][k]) <= st->dla_max_deg)) return 0;
    if (isfinite(st->tof_min_days) && F[SY_F_TOF] && !(F[SY_F_TOF][k] >= st->tof_min_days)) return 0;
    if (isfinite(st->tof_max_days) && F[SY_F_TOF] && !(F[SY_F_TOF][k] <= st->tof_max_days)) return 0;
    return 1;
}

unsigned char *sy_grid_violations(const sy_grid *g, const sy_study *st)
{
    size_t cells = g->nx * g->ny;
    unsigned char *m = calloc(cells, 1);
    if (!m) return NULL;
    for (size_t k = 0; k < cells; k++)
        m[k] = g->status[k] == SY_CELL_OK && !sy_grid_cell_feasible(g, st, k);
    return m;
}
