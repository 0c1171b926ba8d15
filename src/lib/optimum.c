/* optimum.c - refine a grid's minimum off the grid spacing.
 *
 * The best feasible cell seeds a Nelder-Mead simplex (Nelder & Mead,
 * Computer Journal 7 (1965) 308; GSL's gsl_multimin_fminimizer_nmsimplex2)
 * in (departure, arrival) days.  Points outside the grid window, outside
 * the study's limits, or of the other transfer type are given a barrier
 * value, so the simplex stays in the feasible region that contains the
 * seed.  Iteration stops when the simplex is smaller than 1e-3 day, well
 * below the 0.01-day resolution the result is reported to.
 */
#include "config.h"
#include "synodic.h"
#include "synodic/grid.h"

#include <gsl/gsl_errno.h>
#include <gsl/gsl_multimin.h>
#include <math.h>
#include <stdio.h>
#include <string.h>

typedef struct {
    const sy_grid *g;
    const sy_study *st;
    sy_field field;
    int type;
    double dep_lo, dep_hi, y_lo, y_hi;
    double barrier;
} opt_ctx;

double sy_transfer_field(const sy_transfer *t, sy_field f)
{
    switch (f) {
    case SY_F_C3: return t->c3_km2_s2;
    case SY_F_VINF_DEP: return t->vinf_dep_km_s;
    case SY_F_DLA: return t->dla_deg;
    case SY_F_RLA: return t->rla_deg;
    case SY_F_VINF_ARR: return t->vinf_arr_km_s;
    case SY_F_C3_ARR: return t->c3_arr_km2_s2;
    case SY_F_DAP: return t->dap_deg;
    case SY_F_RAP: return t->rap_deg;
    case SY_F_TOF: return t->tof_days;
    case SY_F_ANGLE: return t->transfer_angle_deg;
    case SY_F_MIN_SUN: return t->min_sun_dist_au;
    case SY_F_DV_DEP: return t->dv_dep_km_s;
    case SY_F_DV_CAP: return t->dv_cap_km_s;
    case SY_F_DV_TOTAL: return t->dv_total_km_s;
    case SY_F_V_ENTRY: return t->v_entry_km_s;
    default: return NAN;
    }
}

static int feasible_transfer(const sy_study *st, const sy_transfer *t)
{
    if (isfinite(st->c3_max_km2_s2) && !(t->c3_km2_s2 <= st->c3_max_km2_s2)) return 0;
    if (isfinite(st->vinf_arr_max_km_s) && !(t->vinf_arr_km_s <= st->vinf_arr_max_km_s)) return 0;
    if (isfinite(st->dla_max_deg) && !(fabs(t->dla_deg) <= st->dla_max_deg)) return 0;
    if (isfinite(st->tof_min_days) && !(t->tof_days >= st->tof_min_days)) return 0;
    if (isfinite(st->tof_max_days) && !(t->tof_days <= st->tof_max_days)) return 0;
    return 1;
}

/* Figures at (dep, arr); SY_OK only inside the window and the limits. */
static sy_status evaluate(const opt_ctx *c, double dep, double arr,
                          sy_transfer *t)
{
    const sy_grid_spec *s = &c->g->spec;
    double y = s->y_is_tof ? arr - dep : arr;
    if (dep < c->dep_lo || dep > c->dep_hi || y < c->y_lo || y > c->y_hi)
        return SY_ERR_RANGE;
    if (!(arr - dep >= SY_MIN_FLIGHT_DAYS)) return SY_ERR_ARG;
    double r1[3], v1[3], r2[3], v2[3];
    sy_status stt;
    if ((stt = sy_body_state(s->from, dep, r1, v1)) != SY_OK) return stt;
    if ((stt = sy_body_state(s->to, arr, r2, v2)) != SY_OK) return stt;
    stt = sy_transfer_from_states(r1, v1, r2, v2, (arr - dep) * SY_DAY_S, s->revs,
                                  s->branch, s->from->gm_km3_s2, s->from->radius_km,
                                  s->to->gm_km3_s2, s->to->radius_km, &s->opts, t);
    if (stt != SY_OK) return stt;
    t->jd_dep = dep;
    t->jd_arr = arr;
    if (!feasible_transfer(c->st, t) || t->type != c->type) return SY_ERR_RANGE;
    if (!isfinite(sy_transfer_field(t, c->field))) return SY_ERR_ARG;
    return SY_OK;
}

static double objective(const gsl_vector *x, void *p)
{
    const opt_ctx *c = p;
    sy_transfer t;
    if (evaluate(c, gsl_vector_get(x, 0), gsl_vector_get(x, 1), &t) != SY_OK)
        return c->barrier;
    return sy_transfer_field(&t, c->field);
}

sy_status sy_grid_optimum(const sy_grid *g, const sy_study *st, sy_field field,
                          sy_optimum *opt)
{
    return sy_grid_optimum_of_type(g, st, field, 0, opt);
}

sy_status sy_grid_optimum_of_type(const sy_grid *g, const sy_study *st,
                                  sy_field field, int type, sy_optimum *opt)
{
    memset(opt, 0, sizeof *opt);
    opt->field = field;
    opt->type = type;
    if ((int)field < 0 || field >= SY_NFIELDS || !g->field[field]) return SY_ERR_ARG;
    const float *F = g->field[field];
    size_t best = (size_t)-1;
    for (size_t k = 0; k < g->nx * g->ny; k++) {
        if (!sy_grid_cell_feasible(g, st, k) || !isfinite(F[k])) continue;
        if (type && g->type[k] != type) continue;
        if (best == (size_t)-1 || F[k] < F[best]) best = k;
    }
    if (best == (size_t)-1) return SY_OK; /* found = 0 */

    const sy_grid_spec *s = &g->spec;
    opt_ctx c = {g, st, field, g->type[best], s->x0_jd,
                 s->x0_jd + (double)(g->nx - 1) * s->dx_days, s->y0,
                 s->y0 + (double)(g->ny - 1) * s->dy_days, 0};
    size_t bi = best % g->nx, bj = best / g->nx;
    double dep0 = sy_grid_x_jd(g, (double)bi), arr0 = sy_grid_arr_jd(g, (double)bi, (double)bj);
    sy_transfer t0;
    /* The seed can fail in double precision when a limit sits within
     * float rounding of the stored cell value; then only the refined
     * point can be reported. */
    int seed_ok = evaluate(&c, dep0, arr0, &t0) == SY_OK;
    c.barrier = fabs(F[best]) * 10.0 + 1e6;

    gsl_error_handler_t *old = gsl_set_error_handler_off();
    const gsl_multimin_fminimizer_type *T = gsl_multimin_fminimizer_nmsimplex2;
    gsl_multimin_fminimizer *m = gsl_multimin_fminimizer_alloc(T, 2);
    gsl_vector *x = gsl_vector_alloc(2), *step = gsl_vector_alloc(2);
    if (!m || !x || !step) {
        if (m) gsl_multimin_fminimizer_free(m);
        if (x) gsl_vector_free(x);
        if (step) gsl_vector_free(step);
        gsl_set_error_handler(old);
        return SY_ERR_NOMEM;
    }
    gsl_vector_set(x, 0, dep0);
    gsl_vector_set(x, 1, arr0);
    gsl_vector_set(step, 0, 0.5 * s->dx_days);
    gsl_vector_set(step, 1, 0.5 * s->dy_days);
    gsl_multimin_function fn = {objective, 2, &c};
    gsl_multimin_fminimizer_set(m, &fn, x, step);
    int it = 0, status = GSL_CONTINUE;
    while (status == GSL_CONTINUE && it < 400) {
        it++;
        if (gsl_multimin_fminimizer_iterate(m)) break;
        status = gsl_multimin_test_size(gsl_multimin_fminimizer_size(m), 1e-3);
    }
    double dep = gsl_vector_get(m->x, 0), arr = gsl_vector_get(m->x, 1);
    sy_transfer t;
    int refined_ok = evaluate(&c, dep, arr, &t) == SY_OK;
    if (seed_ok && (!refined_ok || sy_transfer_field(&t0, field) < sy_transfer_field(&t, field))) {
        t = t0;
        dep = dep0;
        arr = arr0;
        refined_ok = 1;
    }
    gsl_multimin_fminimizer_free(m);
    gsl_vector_free(x);
    gsl_vector_free(step);
    gsl_set_error_handler(old);

    if (!refined_ok) return SY_OK; /* nothing usable: found = 0 */
    opt->found = 1;
    opt->jd_dep = dep;
    opt->jd_arr = arr;
    opt->transfer = t;
    opt->value = sy_transfer_field(&t, field);
    opt->iterations = it;
    /* the barrier holds the simplex inside the window; a minimum pressed
     * against a side of it is the window's, not the field's */
    if (dep - c.dep_lo <= SY_EDGE_TOL_DAYS) opt->edges |= SY_EDGE_DEP_FIRST;
    if (c.dep_hi - dep <= SY_EDGE_TOL_DAYS) opt->edges |= SY_EDGE_DEP_LAST;
    double y = s->y_is_tof ? arr - dep : arr;
    if (y - c.y_lo <= SY_EDGE_TOL_DAYS) opt->edges |= SY_EDGE_Y_FIRST;
    if (c.y_hi - y <= SY_EDGE_TOL_DAYS) opt->edges |= SY_EDGE_Y_LAST;
    return SY_OK;
}

const char *sy_optimum_edge_text(const sy_optimum *o, int y_is_tof, char *buf, size_t n)
{
    static const unsigned bit[4] = {SY_EDGE_DEP_FIRST, SY_EDGE_DEP_LAST,
                                    SY_EDGE_Y_FIRST, SY_EDGE_Y_LAST};
    const char *name[4] = {"first departure", "last departure",
                           y_is_tof ? "shortest flight" : "first arrival",
                           y_is_tof ? "longest flight" : "last arrival"};
    if (!n) return buf;
    buf[0] = '\0';
    size_t len = 0;
    for (int k = 0; k < 4; k++) {
        if (!o->found || !(o->edges & bit[k])) continue;
        int w = snprintf(buf + len, n - len, "%s%s", len ? " and " : "", name[k]);
        if (w < 0 || (size_t)w >= n - len) break;
        len += (size_t)w;
    }
    return buf;
}
