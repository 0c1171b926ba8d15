/* period.c - launch-period design on a computed grid: the longest launch
 * period under the study's limits and the minimax period of a required
 * length, each with a fixed or a free arrival date.  See synodic/period.h.
 *
 * Why the minimax answer is exact and not found by trial.  Write C(i, j)
 * for the departure C3 of departure day i and arrival node j (+infinity
 * where the cell breaks a limit or has no transfer).  A period is a start
 * day s and, per day i in s..s+L-1, an arrival j(i).
 *   Free arrival: the largest C3 of the period is max_i C(i, j(i)); for a
 *   fixed start it is smallest when every day takes its own minimum
 *   m(i) = min_j C(i, j) (lowering one day's C3 never raises the max), so
 *   the answer is  min_s max_{i in s..s+L-1} m(i).
 *   Fixed arrival: j(i) = j for all days, the answer is
 *   min_j min_s max_{i in s..s+L-1} C(i, j).
 * Both are minima over the finite set of (start, arrival) choices of an
 * exactly computed window maximum; every window maximum is evaluated (the
 * van Herk / Gil-Werman sliding maximum gives all of them in O(N) per
 * arrival node, O(N M) in total), so the minimum found is the global
 * minimax on the grid - no C3 level is guessed, bisected or tried.  Since
 * m(i) <= C(i, j) for every j, the free answer is never worse than the
 * fixed one.
 *
 * Nothing is refined between grid nodes: launch days are discrete (the
 * departure step must be 1 day) and a fixed arrival date is an operations
 * choice made on whole days too; a sub-day refinement would report a
 * period nobody can fly.  The arrival step is the analyst's choice of
 * resolution (1 day typical). */
#include "config.h"
#include "synodic.h"
#include "synodic/period.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

int sy_sliding_max(const double *z, size_t n, size_t L, double *out)
{
    if (!z || !out || L == 0 || L > n) return 0;
    double *pre = malloc(n * sizeof *pre), *suf = malloc(n * sizeof *suf);
    if (!pre || !suf) {
        free(pre);
        free(suf);
        return 0;
    }
    /* pre: running max from the start of each block of L; suf: from the
     * end.  A window s..s+L-1 spans at most two blocks, so its max is
     * max(suf[s], pre[s+L-1]). */
    for (size_t i = 0; i < n; i++)
        pre[i] = (i % L == 0) ? z[i] : fmax(pre[i - 1], z[i]);
    for (size_t i = n; i-- > 0;)
        suf[i] = (i % L == L - 1 || i == n - 1) ? z[i] : fmax(suf[i + 1], z[i]);
    for (size_t s = 0; s + L <= n; s++) out[s] = fmax(suf[s], pre[s + L - 1]);
    free(pre);
    free(suf);
    return 1;
}

void sy_period_free(sy_period *p)
{
    if (!p) return;
    free(p->days);
    p->days = NULL;
    p->ndays = 0;
}

/* A cell meets every limit of the study (the C3 limit only when use_c3)
 * and is of the period's transfer type when the study names one. */
static int cell_ok(const sy_grid *g, const sy_study *st, size_t k, int use_c3)
{
    if (g->status[k] != SY_CELL_OK) return 0;
    if (st->period_type && g->type[k] != st->period_type) return 0;
    float *const *F = g->field;
    if (!isfinite(F[SY_F_C3][k])) return 0;
    if (use_c3 && isfinite(st->c3_max_km2_s2) && !(F[SY_F_C3][k] <= st->c3_max_km2_s2)) return 0;
    if (isfinite(st->vinf_arr_max_km_s) && !(F[SY_F_VINF_ARR][k] <= st->vinf_arr_max_km_s)) return 0;
    if (isfinite(st->dla_max_deg) && !(fabsf(F[SY_F_DLA][k]) <= st->dla_max_deg)) return 0;
    if (isfinite(st->tof_min_days) && !(F[SY_F_TOF][k] >= st->tof_min_days)) return 0;
    if (isfinite(st->tof_max_days) && !(F[SY_F_TOF][k] <= st->tof_max_days)) return 0;
    return 1;
}

static sy_status check_grid(const sy_grid *g, const sy_study *st,
                            sy_period_arrival arrival, sy_error *err)
{
    if (!g || !st) return sy_fail(err, SY_ERR_ARG, "launch period: NULL grid or study");
    if (fabs(g->spec.dx_days - 1.0) > 1e-9)
        return sy_fail(err, SY_ERR_ARG, "launch periods are daily, but the departure "
                       "step is %g days; set [departure] step_days = 1", g->spec.dx_days);
    if (arrival == SY_PERIOD_FIXED && g->spec.y_is_tof)
        return sy_fail(err, SY_ERR_ARG, "a fixed arrival date needs an arrival-date "
                       "axis; replace [flight] by an [arrival] window, or use the "
                       "free-arrival strategy");
    if (!g->field[SY_F_C3])
        return sy_fail(err, SY_ERR_ARG, "launch period: the grid holds no C3 field");
    const struct { double lim; sy_field f; const char *what; } need[] = {
        {st->vinf_arr_max_km_s, SY_F_VINF_ARR, "arrival v-infinity"},
        {st->dla_max_deg, SY_F_DLA, "DLA"},
        {st->tof_min_days, SY_F_TOF, "time of flight"},
        {st->tof_max_days, SY_F_TOF, "time of flight"}};
    for (size_t q = 0; q < sizeof need / sizeof need[0]; q++)
        if (isfinite(need[q].lim) && !g->field[need[q].f])
            return sy_fail(err, SY_ERR_ARG, "launch period: the study limits %s but "
                           "the grid holds no %s field", need[q].what, sy_field_name(need[q].f));
    return SY_OK;
}

static double fval(const sy_grid *g, sy_field f, size_t k)
{
    return g->field[f] ? (double)g->field[f][k] : NAN;
}

/* Fill the day table of a period starting at departure node s. */
static sy_status fill_days(const sy_grid *g, sy_period *p, size_t s, size_t n,
                           const size_t *jday, sy_error *err)
{
    p->days = calloc(n, sizeof *p->days);
    if (!p->days) return sy_fail(err, SY_ERR_NOMEM, "out of memory");
    p->ndays = n;
    p->c3_max_km2_s2 = -INFINITY;
    p->worst_day = 0;
    for (size_t d = 0; d < n; d++) {
        size_t i = s + d, j = jday[i], k = j * g->nx + i;
        sy_period_day *y = &p->days[d];
        y->i = i;
        y->j = j;
        y->jd_dep = sy_grid_x_jd(g, (double)i);
        y->jd_arr = sy_grid_arr_jd(g, (double)i, (double)j);
        y->c3_km2_s2 = fval(g, SY_F_C3, k);
        y->dla_deg = fval(g, SY_F_DLA, k);
        y->rla_deg = fval(g, SY_F_RLA, k);
        y->vinf_arr_km_s = fval(g, SY_F_VINF_ARR, k);
        y->tof_days = y->jd_arr - y->jd_dep;
        y->type = g->type[k];
        y->mass_kg = NAN;
        if (y->c3_km2_s2 > p->c3_max_km2_s2) {
            p->c3_max_km2_s2 = y->c3_km2_s2;
            p->worst_day = d;
        }
    }
    return SY_OK;
}

static void period_init(sy_period *p, sy_period_arrival arrival, int minimax)
{
    memset(p, 0, sizeof *p);
    p->arrival = arrival;
    p->minimax = minimax;
    p->c3_max_km2_s2 = NAN;
    p->jd_arr_fixed = NAN;
    p->mass_kg = NAN;
    p->margin_kg = NAN;
}

/* Per departure node, the feasible arrival node of least C3 (or SIZE_MAX)
 * and that C3 (or INFINITY). */
static void free_choice(const sy_grid *g, const sy_study *st, int use_c3,
                        size_t *jbest, double *cbest)
{
    const float *C = g->field[SY_F_C3];
    for (size_t i = 0; i < g->nx; i++) {
        jbest[i] = (size_t)-1;
        cbest[i] = INFINITY;
        for (size_t j = 0; j < g->ny; j++) {
            size_t k = j * g->nx + i;
            if (cell_ok(g, st, k, use_c3) && (double)C[k] < cbest[i]) {
                cbest[i] = C[k];
                jbest[i] = j;
            }
        }
    }
}

sy_status sy_period_longest(const sy_grid *g, const sy_study *st,
                            sy_period_arrival arrival, sy_period *out,
                            sy_error *err)
{
    if (!out) return sy_fail(err, SY_ERR_ARG, "launch period: NULL result");
    period_init(out, arrival, 0);
    sy_status s = check_grid(g, st, arrival, err);
    if (s != SY_OK) return s;
    if (!isfinite(st->c3_max_km2_s2))
        return sy_fail(err, SY_ERR_ARG, "the longest launch period needs a C3 limit; "
                       "add [limits] c3_max_km2_s2 (the launch vehicle's C3)");
    const size_t nx = g->nx, ny = g->ny;
    size_t *jday = malloc(nx * sizeof *jday);
    double *cday = malloc(nx * sizeof *cday);
    if (!jday || !cday) {
        free(jday);
        free(cday);
        return sy_fail(err, SY_ERR_NOMEM, "out of memory");
    }
    /* Best run so far: length, largest C3, start, arrival node. */
    size_t best_len = 0, best_s = 0, best_j = 0;
    double best_c = INFINITY;
    const float *C = g->field[SY_F_C3];
    /* One pass per candidate arrival (fixed) or one pass over the per-day
     * minima (free); each pass scans the maximal runs of feasible days. */
    size_t npass = arrival == SY_PERIOD_FIXED ? ny : 1;
    if (arrival == SY_PERIOD_FREE) free_choice(g, st, 1, jday, cday);
    for (size_t pass = 0; pass < npass; pass++) {
        if (arrival == SY_PERIOD_FIXED)
            for (size_t i = 0; i < nx; i++) {
                size_t k = pass * nx + i;
                jday[i] = pass;
                cday[i] = cell_ok(g, st, k, 1) ? (double)C[k] : INFINITY;
            }
        size_t i = 0;
        while (i < nx) {
            if (!isfinite(cday[i])) { i++; continue; }
            size_t s0 = i;
            double cmax = -INFINITY;
            while (i < nx && isfinite(cday[i])) cmax = fmax(cmax, cday[i++]);
            size_t len = i - s0;
            if (len > best_len || (len == best_len && cmax < best_c)) {
                best_len = len;
                best_c = cmax;
                best_s = s0;
                best_j = pass;
            }
        }
    }
    if (best_len > 0) {
        if (arrival == SY_PERIOD_FIXED)
            for (size_t i = 0; i < nx; i++) jday[i] = best_j;
        s = fill_days(g, out, best_s, best_len, jday, err);
        if (s == SY_OK && arrival == SY_PERIOD_FIXED) out->jd_arr_fixed = out->days[0].jd_arr;
    }
    free(jday);
    free(cday);
    return s;
}

sy_status sy_period_minimax(const sy_grid *g, const sy_study *st,
                            sy_period_arrival arrival, size_t length_days,
                            sy_period *out, sy_error *err)
{
    if (!out) return sy_fail(err, SY_ERR_ARG, "launch period: NULL result");
    period_init(out, arrival, 1);
    sy_status s = check_grid(g, st, arrival, err);
    if (s != SY_OK) return s;
    const size_t nx = g->nx, ny = g->ny, L = length_days;
    if (L == 0)
        return sy_fail(err, SY_ERR_ARG, "a launch period of 0 days; give a length of "
                       "at least 1 day");
    if (L > nx) {
        char a[40], b[40];
        sy_date_format(sy_grid_x_jd(g, 0), 0, a, sizeof a);
        sy_date_format(sy_grid_x_jd(g, (double)(nx - 1)), 0, b, sizeof b);
        return sy_fail(err, SY_ERR_ARG, "a launch period of %zu days is longer than "
                       "the departure window of %zu days (%s to %s); shorten the "
                       "period or widen [departure]", L, nx, a, b);
    }
    size_t *jday = malloc(nx * sizeof *jday);
    double *cday = malloc(nx * sizeof *cday), *wmax = malloc(nx * sizeof *wmax);
    if (!jday || !cday || !wmax) {
        s = sy_fail(err, SY_ERR_NOMEM, "out of memory");
        goto done;
    }
    const float *C = g->field[SY_F_C3];
    double best = INFINITY;
    size_t best_s = 0, best_j = 0;
    size_t npass = arrival == SY_PERIOD_FIXED ? ny : 1;
    if (arrival == SY_PERIOD_FREE) free_choice(g, st, 0, jday, cday);
    for (size_t pass = 0; pass < npass; pass++) {
        if (arrival == SY_PERIOD_FIXED)
            for (size_t i = 0; i < nx; i++) {
                size_t k = pass * nx + i;
                cday[i] = cell_ok(g, st, k, 0) ? (double)C[k] : INFINITY;
            }
        if (!sy_sliding_max(cday, nx, L, wmax)) {
            s = sy_fail(err, SY_ERR_NOMEM, "out of memory");
            goto done;
        }
        /* Strictly smaller only: the earlier start (then the earlier
         * arrival) keeps a tie. */
        for (size_t s0 = 0; s0 + L <= nx; s0++)
            if (wmax[s0] < best) {
                best = wmax[s0];
                best_s = s0;
                best_j = pass;
            }
    }
    if (!isfinite(best)) {
        s = sy_fail(err, SY_ERR_NOSOL, "no %zu consecutive departure days have a "
                    "%stransfer%s within the study's limits (arrival v-infinity, |DLA|, "
                    "flight time); relax a limit%s or shorten the period", L,
                    st->period_type == 1 ? "Type I " : st->period_type == 2 ? "Type II " : "",
                    arrival == SY_PERIOD_FIXED ? " to one common arrival date" : "",
                    st->period_type ? ", allow either type ([period] type = either)" : "");
        goto done;
    }
    if (arrival == SY_PERIOD_FIXED)
        for (size_t i = 0; i < nx; i++) jday[i] = best_j;
    s = fill_days(g, out, best_s, L, jday, err);
    if (s == SY_OK && arrival == SY_PERIOD_FIXED) out->jd_arr_fixed = out->days[0].jd_arr;
done:
    free(jday);
    free(cday);
    free(wmax);
    return s;
}

sy_status sy_period_apply_capability(sy_period *p, const sy_lvcap *cap,
                                     double spacecraft_kg, sy_error *err)
{
    if (!p || !cap) return sy_fail(err, SY_ERR_ARG, "launch period: NULL argument");
    for (size_t d = 0; d < p->ndays; d++) {
        sy_status s = sy_lvcap_mass(cap, p->days[d].c3_km2_s2, &p->days[d].mass_kg, err);
        if (s != SY_OK) return s;
    }
    if (p->ndays == 0) return SY_OK;
    /* Mass is non-increasing in C3, so the period's worst day sets it. */
    p->mass_kg = p->days[p->worst_day].mass_kg;
    p->margin_kg = isfinite(spacecraft_kg) ? p->mass_kg - spacecraft_kg : NAN;
    return SY_OK;
}
