/* windows.c - launch opportunities across a multi-year departure span.
 *
 * Method (see synodic/windows.h):
 *  1. a coarse departure x flight-time grid over the whole span (the
 *     study's steps, typically 4-5 days);
 *  2. per transfer type, the best C3 over flight time at each departure;
 *     its local minima, each the lowest within +-0.4 synodic periods
 *     (opportunities recur at the synodic period 1 / |1/T1 - 1/T2|, common
 *     practice; the eccentricity of the orbits moves them by up to a few
 *     tenths of it, never by half), are the opportunities of that type;
 *     (a minimum near the span's ends, where that window is cut, must
 *     also have a C3 of the order of the others: see below);
 *  3. Type I and Type II minima less than 0.3 synodic periods apart form
 *     one opportunity (launch season);
 *  4. each minimum is refined on a 1-day grid of +-0.1 synodic periods
 *     around it (the whole flight-time window) and then off the grid with
 *     sy_grid_optimum_of_type() (Nelder-Mead);
 *  5. with limits, a 1-day grid over the season (+-0.25 synodic periods,
 *     the whole flight-time window) gives the best transfer meeting the
 *     limits and the contiguous run of departure days around it on which
 *     some arrival of the type meets them.
 * Every grid is deterministic for any thread count and the refinement is
 * sequential, so the result is too.
 */
#include "config.h"
#include "synodic.h"
#include "synodic/grid.h"
#include "synodic/windows.h"
#include "elements.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

/* Fractions of the synodic period used by the method above. */
#define MIN_SEPARATION 0.4   /* a minimum is the lowest within +- this    */
#define SEASON_GROUPING 0.3  /* Type I/II minima closer than this pair up */
#define SEASON_HALF 0.25     /* season grid half-width around the minima  */
#define REFINE_HALF 0.1      /* refinement grid half-width (no limits)    */

static double now_s(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return ts.tv_sec + 1e-9 * ts.tv_nsec;
}

double sy_mean_motion_deg_day(const sy_body *b)
{
    if (!b) return NAN;
    if (b->kind == SY_BODY_PLANET) {
        if (b->planet < 0 || b->planet >= SY_NPLANETS) return NAN;
        /* Standish Table 1: mean longitude rate, deg per Julian century */
        return sy_planet_table[b->planet].table1.rate_cy.L_deg / SY_JULIAN_CENTURY_DAYS;
    }
    if (!(b->e < 1.0) || !(b->q_km > 0)) return NAN;
    double a = b->q_km / (1.0 - b->e);
    return sqrt(SY_GM_SUN_KM3_S2 / (a * a * a)) * SY_DAY_S * 180.0 / M_PI;
}

double sy_mean_sma_km(const sy_body *b)
{
    if (!b) return NAN;
    if (b->kind == SY_BODY_PLANET) {
        if (b->planet < 0 || b->planet >= SY_NPLANETS) return NAN;
        return sy_planet_table[b->planet].table1.j2000.a_au * SY_AU_KM;
    }
    if (!(b->e < 1.0) || !(b->q_km > 0)) return NAN;
    return b->q_km / (1.0 - b->e);
}

double sy_synodic_period_days(const sy_body *a, const sy_body *b)
{
    double d = fabs(sy_mean_motion_deg_day(a) - sy_mean_motion_deg_day(b));
    if (!(d > 1e-12)) return NAN;
    return 360.0 / d;
}

double sy_hohmann_tof_days(const sy_body *a, const sy_body *b)
{
    double at = 0.5 * (sy_mean_sma_km(a) + sy_mean_sma_km(b));
    if (!(at > 0)) return NAN;
    return M_PI * sqrt(at * at * at / SY_GM_SUN_KM3_S2) / SY_DAY_S;
}

sy_status sy_windows_spec_from_study(const sy_study *st, const sy_body *from,
                                     const sy_body *to, sy_windows_spec *spec,
                                     sy_error *err)
{
    memset(spec, 0, sizeof *spec);
    if (!from || !to) return sy_fail(err, SY_ERR_ARG, "missing body");
    if (!st->y_is_tof)
        return sy_fail(err, SY_ERR_ARG, "an opportunity scan needs a [flight] window (tof_min_days, tof_max_days, step_days) instead of [arrival]: fixed arrival dates cannot recur across the years");
    spec->from = from;
    spec->to = to;
    spec->dep_start_jd = st->dep_start_jd;
    spec->dep_end_jd = st->dep_end_jd;
    spec->coarse_dep_days = st->dep_step_days;
    spec->tof_min_days = st->tof_start_days;
    spec->tof_max_days = st->tof_end_days;
    spec->coarse_tof_days = st->tof_step_days;
    spec->revs = st->revs;
    spec->branch = st->branch;
    spec->opts = st->orbits;
    return SY_OK;
}

static void no_limits(sy_study *s)
{
    memset(s, 0, sizeof *s);
    s->c3_max_km2_s2 = s->vinf_arr_max_km_s = s->dla_max_deg = NAN;
    s->tof_min_days = s->tof_max_days = NAN;
}

static int study_has_limits(const sy_study *s)
{
    return s && (isfinite(s->c3_max_km2_s2) || isfinite(s->vinf_arr_max_km_s) ||
                 isfinite(s->dla_max_deg) || isfinite(s->tof_min_days) ||
                 isfinite(s->tof_max_days));
}

void sy_windows_free(sy_windows *w)
{
    if (!w) return;
    free(w->windows);
    free(w->seasons);
    free(w);
}

typedef struct {
    int type;
    size_t i;        /* coarse departure index of the minimum */
    double c3;
    double tof_days; /* flight time of the best cell there    */
} candidate;

static int cmp_double(const void *a, const void *b)
{
    double x = *(const double *)a, y = *(const double *)b;
    return (x > y) - (x < y);
}

static int cmp_candidate(const void *a, const void *b)
{
    const candidate *x = a, *y = b;
    if (x->i != y->i) return x->i < y->i ? -1 : 1;
    return x->type - y->type;
}

/* Grid on the scan's 1-day lattice: departures dep_start + k for k in
 * [k0, k1], flight times tof_lo .. tof_hi (whole days from tof_min). */
static sy_status day_grid(const sy_windows_spec *sp, long k0, long k1,
                          double tof_lo, double tof_hi, sy_grid **g,
                          sy_error *err)
{
    sy_grid_spec s;
    memset(&s, 0, sizeof s);
    s.from = sp->from;
    s.to = sp->to;
    s.x0_jd = sp->dep_start_jd + (double)k0;
    s.dx_days = 1.0;
    s.nx = (size_t)(k1 - k0 + 1);
    s.y_is_tof = 1;
    double m0 = ceil(tof_lo - sp->tof_min_days - 1e-9);
    double m1 = floor(tof_hi - sp->tof_min_days + 1e-9);
    double mmax = floor(sp->tof_max_days - sp->tof_min_days + 1e-9);
    if (m0 < 0) m0 = 0;
    if (m1 > mmax) m1 = mmax;
    s.y0 = sp->tof_min_days + m0;
    s.dy_days = 1.0;
    s.ny = m1 >= m0 ? (size_t)(m1 - m0) + 1 : 1;
    s.revs = sp->revs;
    s.branch = sp->branch;
    s.opts = sp->opts;
    s.threads = sp->threads;
    return sy_grid_compute(&s, NULL, NULL, g, err);
}

/* Integer day offset (from the span start) of a departure, clipped. */
static long day_of(const sy_windows_spec *sp, double jd, long kmax)
{
    double k = floor(jd - sp->dep_start_jd + 0.5);
    if (k < 0) k = 0;
    if (k > (double)kmax) k = (double)kmax;
    return (long)k;
}

sy_status sy_windows_scan(const sy_windows_spec *sp, const sy_study *limits,
                          sy_progress_fn progress, void *user,
                          sy_windows **out, sy_error *err)
{
    *out = NULL;
    if (!sp || !sp->from || !sp->to)
        return sy_fail(err, SY_ERR_ARG, "opportunity scan: missing body");
    if (sp->from == sp->to)
        return sy_fail(err, SY_ERR_ARG, "opportunity scan: origin and target are both %s; choose two different bodies", sp->from->name);
    if (!(sp->dep_end_jd > sp->dep_start_jd))
        return sy_fail(err, SY_ERR_ARG, "opportunity scan: the departure span must end after it starts");
    if (!(sp->tof_min_days > 0) || !(sp->tof_max_days > sp->tof_min_days))
        return sy_fail(err, SY_ERR_ARG, "opportunity scan: the flight-time window must satisfy 0 < tof_min_days < tof_max_days (got %g .. %g)", sp->tof_min_days, sp->tof_max_days);
    if (!(sp->coarse_dep_days > 0) || !(sp->coarse_tof_days > 0))
        return sy_fail(err, SY_ERR_ARG, "opportunity scan: the steps must be positive");
    double T = sy_synodic_period_days(sp->from, sp->to);
    if (!isfinite(T))
        return sy_fail(err, SY_ERR_ARG, "%s and %s have no synodic period (equal or unbound mean motions); an opportunity scan needs two bound orbits of different periods", sp->from->name, sp->to->name);
    if (sp->coarse_dep_days > 0.05 * T)
        return sy_fail(err, SY_ERR_ARG, "a departure step of %g days is too coarse for a synodic period of %.0f days; use at most %.0f days (step_days of [departure])", sp->coarse_dep_days, T, floor(0.05 * T));
    double span = sp->dep_end_jd - sp->dep_start_jd;
    if (span < 0.5 * T)
        return sy_fail(err, SY_ERR_ARG, "a departure span of %.0f days is shorter than half the %s-%s synodic period (%.0f days); scan at least %.0f days", span, sp->from->name, sp->to->name, T, ceil(0.5 * T));

    double t_start = now_s();
    sy_study nolim;
    no_limits(&nolim);
    const sy_study *lim = study_has_limits(limits) ? limits : &nolim;

    /* 1. coarse grid */
    sy_grid_spec cs;
    memset(&cs, 0, sizeof cs);
    cs.from = sp->from;
    cs.to = sp->to;
    cs.x0_jd = sp->dep_start_jd;
    cs.dx_days = sp->coarse_dep_days;
    cs.nx = (size_t)floor(span / sp->coarse_dep_days + 1e-9) + 1;
    cs.y_is_tof = 1;
    cs.y0 = sp->tof_min_days;
    cs.dy_days = sp->coarse_tof_days;
    cs.ny = (size_t)floor((sp->tof_max_days - sp->tof_min_days) / sp->coarse_tof_days + 1e-9) + 1;
    cs.revs = sp->revs;
    cs.branch = sp->branch;
    cs.opts = sp->opts;
    cs.threads = sp->threads;
    sy_grid *g = NULL;
    sy_status s = sy_grid_compute(&cs, NULL, NULL, &g, err);
    if (s != SY_OK) return s;
    if (progress && progress(0.3, user)) {
        sy_grid_free(g);
        return sy_fail(err, SY_ERR_IO, "interrupted");
    }

    /* 2. best C3 over flight time per departure and type; local minima */
    const size_t nx = g->nx, ny = g->ny;
    double *best = malloc(2 * nx * sizeof *best);
    double *btof = malloc(2 * nx * sizeof *btof);
    candidate *cand = malloc(2 * nx * sizeof *cand);
    if (!best || !btof || !cand) {
        free(best); free(btof); free(cand); sy_grid_free(g);
        return sy_fail(err, SY_ERR_NOMEM, "out of memory");
    }
    for (size_t q = 0; q < 2 * nx; q++) { best[q] = INFINITY; btof[q] = NAN; }
    for (size_t j = 0; j < ny; j++)
        for (size_t i = 0; i < nx; i++) {
            size_t k = j * nx + i;
            if (g->status[k] != SY_CELL_OK) continue;
            int t = g->type[k];
            if (t != 1 && t != 2) continue;
            double c3 = g->field[SY_F_C3][k];
            size_t q = (size_t)(t - 1) * nx + i;
            if (c3 < best[q]) { best[q] = c3; btof[q] = sy_grid_y(g, (double)j); }
        }
    size_t ncand = 0;
    long w = (long)floor(MIN_SEPARATION * T / sp->coarse_dep_days);
    if (w < 1) w = 1;
    for (int t = 1; t <= 2; t++) {
        const double *b = best + (size_t)(t - 1) * nx;
        for (long i = 1; i + 1 < (long)nx; i++) {
            if (!isfinite(b[i])) continue;
            int is_min = 1;
            double rise_lo = b[i], rise_hi = b[i];
            for (long d = -w; d <= w && is_min; d++) {
                long q = i + d;
                if (d == 0 || q < 0 || q >= (long)nx) continue;
                /* ties go to the earliest node, so a flat bottom gives one */
                if (b[q] < b[i] || (b[q] == b[i] && q < i)) is_min = 0;
                if (d < 0 && b[q] > rise_lo) rise_lo = b[q];
                if (d > 0 && b[q] > rise_hi) rise_hi = b[q];
            }
            /* a real opportunity stands out of the C3 between two of them:
             * demand a rise of 25% (+1 km2/s2) on at least one side (the
             * other may be cut by the span) */
            double need = 1.25 * b[i] + 1.0;
            if (is_min && (rise_lo >= need || rise_hi >= need)) {
                cand[ncand].type = t;
                cand[ncand].i = (size_t)i;
                cand[ncand].c3 = b[i];
                cand[ncand].tof_days = btof[(size_t)(t - 1) * nx + (size_t)i];
                ncand++;
            }
        }
    }
    free(best);
    free(btof);
    sy_grid_free(g);
    /* A minimum whose +-0.4 T window is cut by the span's start or end may
     * be the flank of an opportunity outside the span (a bump on its way
     * down) rather than an opportunity: keep it only when its C3 is of
     * the order of the others, at most 4 times their median. */
    if (ncand > 1) {
        double *v = malloc(ncand * sizeof *v);
        if (!v) { free(cand); return sy_fail(err, SY_ERR_NOMEM, "out of memory"); }
        for (size_t c = 0; c < ncand; c++) v[c] = cand[c].c3;
        qsort(v, ncand, sizeof *v, cmp_double);
        double median = ncand % 2 ? v[ncand / 2] : 0.5 * (v[ncand / 2 - 1] + v[ncand / 2]);
        free(v);
        size_t keep = 0;
        for (size_t c = 0; c < ncand; c++) {
            int cut = (long)cand[c].i < w || (long)cand[c].i > (long)nx - 1 - w;
            if (cut && cand[c].c3 > 4.0 * median) continue;
            cand[keep++] = cand[c];
        }
        ncand = keep;
    }
    qsort(cand, ncand, sizeof *cand, cmp_candidate);

    sy_windows *res = calloc(1, sizeof *res);
    if (res) {
        res->windows = calloc(ncand ? ncand : 1, sizeof *res->windows);
        res->seasons = calloc(ncand ? ncand : 1, sizeof *res->seasons);
    }
    if (!res || !res->windows || !res->seasons) {
        free(cand); sy_windows_free(res);
        return sy_fail(err, SY_ERR_NOMEM, "out of memory");
    }
    res->spec = *sp;
    res->synodic_days = T;
    res->has_limits = lim != &nolim;
    res->coarse_nx = nx;
    res->coarse_ny = ny;

    /* 3. seasons */
    size_t *cand_season = malloc((ncand ? ncand : 1) * sizeof *cand_season);
    if (!cand_season) {
        free(cand); sy_windows_free(res);
        return sy_fail(err, SY_ERR_NOMEM, "out of memory");
    }
    size_t first = 0;
    int have[2] = {0, 0};
    for (size_t c = 0; c < ncand; c++) {
        double gap = (double)(cand[c].i - cand[first].i) * sp->coarse_dep_days;
        if (c == 0 || gap > SEASON_GROUPING * T || have[cand[c].type - 1]) {
            res->seasons[res->nseasons].window[0] = res->seasons[res->nseasons].window[1] = -1;
            res->nseasons++;
            first = c;
            have[0] = have[1] = 0;
        }
        have[cand[c].type - 1] = 1;
        cand_season[c] = res->nseasons - 1;
    }

    /* 4./5. refinement, per season */
    const long kmax = (long)floor(span + 1e-9);
    const double cdx = sp->coarse_dep_days;
    s = SY_OK;
    for (size_t si = 0; si < res->nseasons && s == SY_OK; si++) {
        sy_season *se = &res->seasons[si];
        double lo = INFINITY, hi = -INFINITY;
        for (size_t c = 0; c < ncand; c++)
            if (cand_season[c] == si) {
                double d = sp->dep_start_jd + (double)cand[c].i * cdx;
                lo = fmin(lo, d);
                hi = fmax(hi, d);
            }
        se->dep_lo_jd = sp->dep_start_jd + (double)day_of(sp, lo - SEASON_HALF * T, kmax);
        se->dep_hi_jd = sp->dep_start_jd + (double)day_of(sp, hi + SEASON_HALF * T, kmax);
        sy_grid *sg = NULL;
        if (res->has_limits) {
            s = day_grid(sp, day_of(sp, se->dep_lo_jd, kmax), day_of(sp, se->dep_hi_jd, kmax),
                         sp->tof_min_days, sp->tof_max_days, &sg, err);
            if (s != SY_OK) break;
        }
        /* Type I first, then Type II: the table's order within a season */
        for (size_t pass = 0; pass < 2 * ncand && s == SY_OK; pass++) {
            size_t c = pass % ncand;
            if (cand_season[c] != si || cand[c].type != (int)(pass / ncand) + 1) continue;
            const candidate *cd = &cand[c];
            sy_window *wd = &res->windows[res->nwindows];
            wd->season = si;
            wd->type = cd->type;
            wd->within_limits = 1;
            wd->open_jd = wd->close_jd = NAN;
            /* unconstrained minimum: 1-day grid around the coarse one,
             * over the whole flight-time window: near the 180-degree
             * ridge a type can have two basins of nearly equal C3 (Mars
             * 2033 Type I: 178 and 266 days, 35 days apart in departure)
             * that the coarse grid cannot rank */
            double d0 = sp->dep_start_jd + (double)cd->i * cdx;
            double half = fmax(REFINE_HALF * T, 3 * cdx + 10);
            sy_grid *rg = NULL;
            s = day_grid(sp, day_of(sp, d0 - half, kmax), day_of(sp, d0 + half, kmax),
                         sp->tof_min_days, sp->tof_max_days, &rg, err);
            if (s != SY_OK) break;
            sy_optimum o;
            s = sy_grid_optimum_of_type(rg, &nolim, SY_F_C3, cd->type, &o);
            sy_grid_free(rg);
            if (s != SY_OK) { sy_fail(err, s, "refining an opportunity failed"); break; }
            if (!o.found) continue; /* the coarse minimum did not survive */
            /* a minimum on the span's first or last day belongs to an
             * opportunity whose optimum lies outside the span */
            if (o.jd_dep < sp->dep_start_jd + 1.0 || o.jd_dep > sp->dep_end_jd - 1.0) continue;
            wd->best = o.transfer;
            if (sg) {
                sy_optimum oc;
                s = sy_grid_optimum_of_type(sg, lim, SY_F_C3, cd->type, &oc);
                if (s != SY_OK) { sy_fail(err, s, "refining an opportunity failed"); break; }
                if (!oc.found) {
                    wd->within_limits = 0;
                } else {
                    wd->best = oc.transfer;
                    /* feasible departure columns of this type */
                    long n = (long)sg->nx, c0 = (long)floor(oc.jd_dep - sg->spec.x0_jd + 0.5);
                    unsigned char *col = calloc((size_t)n, 1);
                    if (!col) { s = sy_fail(err, SY_ERR_NOMEM, "out of memory"); break; }
                    for (size_t j = 0; j < sg->ny; j++)
                        for (long i = 0; i < n; i++) {
                            size_t k = j * sg->nx + (size_t)i;
                            if (!col[i] && sg->type[k] == cd->type && sy_grid_cell_feasible(sg, lim, k))
                                col[i] = 1;
                        }
                    if (c0 < 0) c0 = 0;
                    if (c0 >= n) c0 = n - 1;
                    /* the refined optimum may sit between two day columns */
                    if (!col[c0] && c0 > 0 && col[c0 - 1]) c0--;
                    else if (!col[c0] && c0 + 1 < n && col[c0 + 1]) c0++;
                    if (col[c0]) {
                        long a = c0, b = c0;
                        while (a > 0 && col[a - 1]) a--;
                        while (b + 1 < n && col[b + 1]) b++;
                        wd->open_jd = sy_grid_x_jd(sg, (double)a);
                        wd->close_jd = sy_grid_x_jd(sg, (double)b);
                        wd->open_at_edge = a == 0;
                        wd->close_at_edge = b == n - 1;
                    }
                    free(col);
                }
            }
            wd->tof_at_edge = wd->best.tof_days < sp->tof_min_days + 1.0 ||
                              wd->best.tof_days > sp->tof_max_days - 1.0;
            if (se->window[cd->type - 1] < 0) se->window[cd->type - 1] = (int)res->nwindows;
            res->nwindows++;
        }
        sy_grid_free(sg);
        if (s == SY_OK && progress &&
            progress(0.3 + 0.7 * (double)(si + 1) / (double)res->nseasons, user))
            s = sy_fail(err, SY_ERR_IO, "interrupted");
    }
    free(cand);
    free(cand_season);
    if (s != SY_OK) {
        sy_windows_free(res);
        return s;
    }
    /* drop seasons whose every minimum vanished on refinement */
    size_t ns = 0;
    for (size_t si = 0; si < res->nseasons; si++) {
        sy_season *se = &res->seasons[si];
        if (se->window[0] < 0 && se->window[1] < 0) continue;
        for (int t = 0; t < 2; t++)
            if (se->window[t] >= 0) res->windows[se->window[t]].season = ns;
        res->seasons[ns++] = *se;
    }
    res->nseasons = ns;
    res->seconds = now_s() - t_start;
    *out = res;
    return SY_OK;
}
