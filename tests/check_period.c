/* check_period.c - launch-period design: the minimax and longest-period
 * solutions on synthetic fields whose answers are known in closed form,
 * against exhaustive enumeration, the fixed/free ordering, bad inputs,
 * and the `synodic period` command on the Mars example. */
#include "config.h"
#include "synodic.h"
#include "synodic/grid.h"
#include "synodic/lvcap.h"
#include "synodic/period.h"
#include "synodic/study.h"
#include "testutil_cli.h"

#include <jansson.h>
#include <stdint.h>
#include <stdio.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

/* ------------------------------------------------------------------ */
/* Synthetic grids                                                     */

typedef double (*c3_fn)(size_t i, size_t j);

static sy_grid *make_grid(size_t nx, size_t ny, c3_fn f)
{
    sy_grid *g = calloc(1, sizeof *g);
    g->nx = g->spec.nx = nx;
    g->ny = g->spec.ny = ny;
    g->spec.x0_jd = 2462000.5;
    g->spec.dx_days = 1.0;
    g->spec.y0 = 2462200.5;
    g->spec.dy_days = 1.0;
    size_t cells = nx * ny;
    const sy_field used[] = {SY_F_C3, SY_F_DLA, SY_F_RLA, SY_F_VINF_ARR, SY_F_TOF};
    for (size_t q = 0; q < sizeof used / sizeof used[0]; q++)
        g->field[used[q]] = calloc(cells, sizeof(float));
    g->status = calloc(cells, 1);
    g->type = calloc(cells, 1);
    for (size_t j = 0; j < ny; j++)
        for (size_t i = 0; i < nx; i++) {
            size_t k = j * nx + i;
            g->field[SY_F_C3][k] = (float)f(i, j);
            g->field[SY_F_TOF][k] = (float)(sy_grid_arr_jd(g, (double)i, (double)j) - sy_grid_x_jd(g, (double)i));
            g->field[SY_F_VINF_ARR][k] = 3.0f;
            g->type[k] = 1;
        }
    return g;
}

static void free_grid(sy_grid *g)
{
    for (int f = 0; f < SY_NFIELDS; f++) free(g->field[f]);
    free(g->status);
    free(g->type);
    free(g);
}

static void no_limits(sy_study *st)
{
    memset(st, 0, sizeof *st);
    st->c3_max_km2_s2 = st->vinf_arr_max_km_s = st->dla_max_deg = NAN;
    st->tof_min_days = st->tof_max_days = NAN;
    st->spacecraft_mass_kg = NAN;
}

/* Closed-form field: C3 = A + P (i - IC)^2 + Q (j - JC - i)^2.  The best
 * arrival drifts one node per departure day. */
#define A 5.0
#define P 0.25
#define Q 0.5
#define IC 40
#define JC 10
static double drift(size_t i, size_t j)
{
    double di = (double)i - IC, dj = (double)j - JC - (double)i;
    return A + P * di * di + Q * dj * dj;
}
/* Separable field: the best arrival is JC + IC on every day. */
static double separable(size_t i, size_t j)
{
    double di = (double)i - IC, dj = (double)j - JC - IC;
    return A + P * di * di + Q * dj * dj;
}
/* Pseudo-random field (a fixed LCG, so the test is reproducible). */
static uint32_t lcg_state;
static double noise(size_t i, size_t j)
{
    (void)i;
    (void)j;
    lcg_state = lcg_state * 1664525u + 1013904223u;
    return 5.0 + 30.0 * (double)(lcg_state >> 8) / 16777216.0;
}

/* ------------------------------------------------------------------ */

/* Exact mathematics: the definition of a window maximum, evaluated
 * naively, for every window length. */
START_TEST(test_sliding_max_definition)
{
    double z[57], out[57];
    lcg_state = 7;
    for (size_t k = 0; k < 57; k++) z[k] = noise(0, 0);
    z[20] = INFINITY;
    for (size_t L = 1; L <= 57; L++) {
        ck_assert(sy_sliding_max(z, 57, L, out));
        for (size_t s = 0; s + L <= 57; s++) {
            double m = -INFINITY;
            for (size_t i = s; i < s + L; i++) m = fmax(m, z[i]);
            ck_assert_msg(out[s] == m, "L %zu s %zu: %g vs %g", L, s, out[s], m);
        }
    }
    ck_assert(!sy_sliding_max(z, 57, 0, out));
    ck_assert(!sy_sliding_max(z, 57, 58, out));
}
END_TEST

/* Exact mathematics (closed form).  Free arrival: each day's minimum is
 * A + P (i-IC)^2, so the best L = 2h+1 day window is centred on IC with
 * value A + P h^2.  Fixed arrival j: C3 along the row is the convex
 * quadratic (P+Q)(i-m)^2 + c, c >= 0, and any window of 2h+1 days holds
 * two days 2h apart, so its max is >= (P+Q) h^2 + c >= (P+Q) h^2, with
 * equality only for j = JC + IC and the window centred on IC. */
START_TEST(test_minimax_closed_form)
{
    sy_grid *g = make_grid(81, 100, drift);
    sy_study st;
    no_limits(&st);
    sy_error err;
    const size_t h = 10, L = 2 * h + 1;
    sy_period fr, fx;
    ck_assert_int_eq(sy_period_minimax(g, &st, SY_PERIOD_FREE, L, &fr, &err), SY_OK);
    ck_assert_int_eq(sy_period_minimax(g, &st, SY_PERIOD_FIXED, L, &fx, &err), SY_OK);
    ck_assert_uint_eq(fr.ndays, L);
    ck_assert_double_eq(fr.c3_max_km2_s2, A + P * h * h);          /* 30 */
    ck_assert_uint_eq(fr.days[0].i, IC - h);
    for (size_t d = 0; d < L; d++) ck_assert_uint_eq(fr.days[d].j, JC + fr.days[d].i);
    ck_assert(isnan(fr.jd_arr_fixed));
    ck_assert_uint_eq(fx.ndays, L);
    ck_assert_double_eq(fx.c3_max_km2_s2, A + (P + Q) * h * h);    /* 80 */
    ck_assert_uint_eq(fx.days[0].i, IC - h);
    for (size_t d = 0; d < L; d++) ck_assert_uint_eq(fx.days[d].j, JC + IC);
    ck_assert_double_eq(fx.jd_arr_fixed, g->spec.y0 + (JC + IC));
    /* the worst day is an end of the window (convexity) */
    ck_assert(fx.worst_day == 0 || fx.worst_day == L - 1);
    /* the table carries the grid's figures */
    ck_assert_double_eq(fr.days[3].tof_days, fr.days[3].jd_arr - fr.days[3].jd_dep);
    sy_period_free(&fr);
    sy_period_free(&fx);
    free_grid(g);
}
END_TEST

/* Brute-force minimax of an L-day period over the cells that are solved
 * and (ty 1 or 2) of that transfer type: the definitions of the free and
 * fixed answers evaluated naively, INFINITY when no period exists. */
static int cell_usable(const sy_grid *g, size_t k, int ty)
{
    return g->status[k] == SY_CELL_OK && (ty == 0 || g->type[k] == ty);
}

static void brute_minimax(const sy_grid *g, int ty, size_t L, double *bf_free, double *bf_fixed)
{
    const size_t nx = g->nx, ny = g->ny;
    const float *C = g->field[SY_F_C3];
    *bf_free = *bf_fixed = INFINITY;
    for (size_t s = 0; s + L <= nx; s++) {
        double wfree = -INFINITY;
        for (size_t i = s; i < s + L; i++) {
            double m = INFINITY;
            for (size_t j = 0; j < ny; j++)
                if (cell_usable(g, j * nx + i, ty)) m = fmin(m, C[j * nx + i]);
            wfree = fmax(wfree, m);
        }
        *bf_free = fmin(*bf_free, wfree);
        for (size_t j = 0; j < ny; j++) {
            double w = -INFINITY;
            for (size_t i = s; i < s + L; i++)
                w = fmax(w, cell_usable(g, j * nx + i, ty) ? (double)C[j * nx + i] : INFINITY);
            *bf_fixed = fmin(*bf_fixed, w);
        }
    }
}

/* Brute-force longest periods with C3 <= lim over the same cells: free,
 * the longest run of days with some usable cell within the limit; fixed,
 * the longest such run along one arrival node. */
static void brute_longest(const sy_grid *g, int ty, double lim, size_t *lfree, size_t *lfixed)
{
    const size_t nx = g->nx, ny = g->ny;
    const float *C = g->field[SY_F_C3];
    size_t run = 0;
    *lfree = *lfixed = 0;
    for (size_t i = 0; i < nx; i++) {
        int any = 0;
        for (size_t j = 0; j < ny; j++)
            any |= cell_usable(g, j * nx + i, ty) && (double)C[j * nx + i] <= lim;
        run = any ? run + 1 : 0;
        if (run > *lfree) *lfree = run;
    }
    for (size_t j = 0; j < ny; j++) {
        run = 0;
        for (size_t i = 0; i < nx; i++) {
            size_t k = j * nx + i;
            run = cell_usable(g, k, ty) && (double)C[k] <= lim ? run + 1 : 0;
            if (run > *lfixed) *lfixed = run;
        }
    }
}

/* Exhaustive enumeration (exact mathematics: the minimax over a finite
 * set, evaluated by brute force) on a pseudo-random field, and the
 * ordering free <= fixed for every length (m(i) <= C(i, j) for all j). */
START_TEST(test_minimax_bruteforce_and_ordering)
{
    lcg_state = 12345;
    const size_t nx = 37, ny = 23;
    sy_grid *g = make_grid(nx, ny, noise);
    /* some unsolved cells and a fully blocked column */
    for (size_t k = 0; k < nx * ny; k += 7) g->status[k] = SY_CELL_NOSOL;
    for (size_t j = 0; j < ny; j++) g->status[j * nx + 30] = SY_CELL_NOSOL;
    sy_study st;
    no_limits(&st);
    sy_error err;
    for (size_t L = 1; L <= 30; L++) {
        double bf_fixed, bf_free;
        brute_minimax(g, 0, L, &bf_free, &bf_fixed);
        sy_period fr, fx;
        sy_status a = sy_period_minimax(g, &st, SY_PERIOD_FREE, L, &fr, &err);
        sy_status b = sy_period_minimax(g, &st, SY_PERIOD_FIXED, L, &fx, &err);
        if (isfinite(bf_free)) {
            ck_assert_int_eq(a, SY_OK);
            ck_assert_msg(fr.c3_max_km2_s2 == bf_free, "L %zu free %g vs %g", L, fr.c3_max_km2_s2, bf_free);
        } else {
            ck_assert_int_eq(a, SY_ERR_NOSOL);
        }
        if (isfinite(bf_fixed)) {
            ck_assert_int_eq(b, SY_OK);
            ck_assert_msg(fx.c3_max_km2_s2 == bf_fixed, "L %zu fixed %g vs %g", L, fx.c3_max_km2_s2, bf_fixed);
            ck_assert(fr.c3_max_km2_s2 <= fx.c3_max_km2_s2);
            /* no day of the fixed period sits in the blocked column */
            for (size_t d = 0; d < fx.ndays; d++) ck_assert_uint_ne(fx.days[d].i, 30);
        } else {
            ck_assert_int_eq(b, SY_ERR_NOSOL);
            ck_assert_uint_eq(fx.ndays, 0);
        }
        sy_period_free(&fr);
        sy_period_free(&fx);
    }
    free_grid(g);
}
END_TEST

/* Limits other than C3 shape the minimax period: a day whose |DLA| is
 * over the limit on every arrival splits the window.  Closed form on the
 * drift field with day IC blocked: the best 21-day window lies wholly on
 * one side; both sides reach |i - IC| = 21 at their far end, value
 * A + P 21^2 = 115.25; the tie goes to the earlier start, IC - 21. */
START_TEST(test_minimax_respects_other_limits)
{
    sy_grid *g = make_grid(81, 100, drift);
    for (size_t j = 0; j < 100; j++) g->field[SY_F_DLA][j * 81 + IC] = 40.0f;
    sy_study st;
    no_limits(&st);
    st.dla_max_deg = 28.5;
    sy_error err;
    sy_period fr;
    ck_assert_int_eq(sy_period_minimax(g, &st, SY_PERIOD_FREE, 21, &fr, &err), SY_OK);
    ck_assert_double_eq(fr.c3_max_km2_s2, A + P * 21 * 21);
    ck_assert_uint_eq(fr.days[0].i, IC - 21);
    ck_assert_uint_eq(fr.days[20].i, IC - 1);
    sy_period_free(&fr);
    /* the C3 limit does not constrain the minimax (it is the answer) */
    st.dla_max_deg = NAN;
    st.c3_max_km2_s2 = 10;
    ck_assert_int_eq(sy_period_minimax(g, &st, SY_PERIOD_FREE, 21, &fr, &err), SY_OK);
    ck_assert_double_eq(fr.c3_max_km2_s2, A + P * 10 * 10);
    sy_period_free(&fr);
    free_grid(g);
}
END_TEST

/* One transfer type for the whole period, closed form on the drift field
 * with Type II wherever the arrival lies 3 or more nodes past the drift
 * line (dj = j - JC - i >= 3) and Type I elsewhere.  Type II only: each
 * day's least C3 is at dj = 3, A + P (i-IC)^2 + 9 Q, so the best 21-day
 * window is centred on IC with A + P 10^2 + 9 Q = 34.5.  Type I only: dj
 * = 0 is allowed, the unrestricted answer 30 again.  Either: 30. */
START_TEST(test_minimax_one_type_closed_form)
{
    sy_grid *g = make_grid(81, 100, drift);
    for (size_t j = 0; j < 100; j++)
        for (size_t i = 0; i < 81; i++)
            g->type[j * 81 + i] = (long)j - JC - (long)i >= 3 ? 2 : 1;
    sy_study st;
    no_limits(&st);
    sy_error err;
    const size_t h = 10, L = 2 * h + 1;
    sy_period p;
    st.period_type = 2;
    ck_assert_int_eq(sy_period_minimax(g, &st, SY_PERIOD_FREE, L, &p, &err), SY_OK);
    ck_assert_double_eq(p.c3_max_km2_s2, A + P * h * h + 9 * Q);
    ck_assert_uint_eq(p.days[0].i, IC - h);
    for (size_t d = 0; d < L; d++) {
        ck_assert_int_eq(p.days[d].type, 2);
        ck_assert_uint_eq(p.days[d].j, JC + p.days[d].i + 3);
    }
    sy_period_free(&p);
    st.period_type = 1;
    ck_assert_int_eq(sy_period_minimax(g, &st, SY_PERIOD_FREE, L, &p, &err), SY_OK);
    ck_assert_double_eq(p.c3_max_km2_s2, A + P * h * h);
    for (size_t d = 0; d < L; d++) ck_assert_int_eq(p.days[d].type, 1);
    sy_period_free(&p);
    st.period_type = 0;
    ck_assert_int_eq(sy_period_minimax(g, &st, SY_PERIOD_FREE, L, &p, &err), SY_OK);
    ck_assert_double_eq(p.c3_max_km2_s2, A + P * h * h);
    sy_period_free(&p);
    /* no Type II cell at all: no period, and the message says which type */
    for (size_t k = 0; k < 81 * 100; k++) g->type[k] = 1;
    st.period_type = 2;
    ck_assert_int_eq(sy_period_minimax(g, &st, SY_PERIOD_FIXED, L, &p, &err), SY_ERR_NOSOL);
    ck_assert_ptr_nonnull(strstr(err.msg, "Type II"));
    ck_assert_int_eq(sy_period_longest(g, &st, SY_PERIOD_FREE, &p, &err), SY_ERR_ARG); /* no C3 limit */
    st.c3_max_km2_s2 = 1e9;
    ck_assert_int_eq(sy_period_longest(g, &st, SY_PERIOD_FREE, &p, &err), SY_OK);
    ck_assert_uint_eq(p.ndays, 0);
    sy_period_free(&p);
    free_grid(g);
}
END_TEST

/* Exhaustive enumeration with random transfer types: for each type
 * restriction, both strategies, both questions, against brute force over
 * the cells of that type (exact mathematics on a finite set). */
START_TEST(test_one_type_bruteforce)
{
    lcg_state = 4242;
    const size_t nx = 31, ny = 19;
    sy_grid *g = make_grid(nx, ny, noise);
    for (size_t k = 0; k < nx * ny; k++) {
        lcg_state = lcg_state * 1664525u + 1013904223u;
        g->type[k] = (lcg_state >> 20) % 3 ? 2 : 1;   /* about 2/3 Type II */
    }
    sy_study st;
    no_limits(&st);
    st.c3_max_km2_s2 = 22.0;
    sy_error err;
    for (int ty = 0; ty <= 2; ty++) {
        st.period_type = ty;
        size_t lf, lx;
        brute_longest(g, ty, st.c3_max_km2_s2, &lf, &lx);
        sy_period pf, px;
        ck_assert_int_eq(sy_period_longest(g, &st, SY_PERIOD_FREE, &pf, &err), SY_OK);
        ck_assert_int_eq(sy_period_longest(g, &st, SY_PERIOD_FIXED, &px, &err), SY_OK);
        ck_assert_msg(pf.ndays == lf, "type %d free longest %zu vs %zu", ty, pf.ndays, lf);
        ck_assert_msg(px.ndays == lx, "type %d fixed longest %zu vs %zu", ty, px.ndays, lx);
        for (size_t d = 0; d < pf.ndays; d++) ck_assert(ty == 0 || pf.days[d].type == ty);
        for (size_t d = 0; d < px.ndays; d++) ck_assert(ty == 0 || px.days[d].type == ty);
        sy_period_free(&pf);
        sy_period_free(&px);
        /* minimax of every length */
        for (size_t L = 1; L <= 12; L++) {
            double bf_free, bf_fixed;
            brute_minimax(g, ty, L, &bf_free, &bf_fixed);
            sy_status a = sy_period_minimax(g, &st, SY_PERIOD_FREE, L, &pf, &err);
            sy_status b = sy_period_minimax(g, &st, SY_PERIOD_FIXED, L, &px, &err);
            ck_assert_int_eq(a, isfinite(bf_free) ? SY_OK : SY_ERR_NOSOL);
            ck_assert_int_eq(b, isfinite(bf_fixed) ? SY_OK : SY_ERR_NOSOL);
            if (a == SY_OK) ck_assert_msg(pf.c3_max_km2_s2 == bf_free, "type %d L %zu free", ty, L);
            if (b == SY_OK) ck_assert_msg(px.c3_max_km2_s2 == bf_fixed, "type %d L %zu fixed", ty, L);
            for (size_t d = 0; d < pf.ndays; d++) ck_assert(ty == 0 || pf.days[d].type == ty);
            for (size_t d = 0; d < px.ndays; d++) ck_assert(ty == 0 || px.days[d].type == ty);
            sy_period_free(&pf);
            sy_period_free(&px);
        }
    }
    free_grid(g);
}
END_TEST

/* Longest period, exact mathematics.  Separable field, C3 <= 30: days
 * with P (i-IC)^2 <= 25, i.e. |i - IC| <= 10: 21 days for both
 * strategies, the fixed one at arrival JC + IC.  Drift field: free is 21
 * days again; fixed at arrival offset k holds the days d = i - IC with
 * P d^2 + Q (k - d)^2 <= 25, i.e. 3 d^2 - 4 k d + 2 k^2 <= 100 (times 4,
 * integers: no rounding), an interval; its largest count over k is the
 * answer, and free >= fixed. */
START_TEST(test_longest_closed_form)
{
    sy_study st;
    no_limits(&st);
    st.c3_max_km2_s2 = 30;
    sy_error err;
    sy_period fr, fx;
    sy_grid *g = make_grid(81, 100, separable);
    ck_assert_int_eq(sy_period_longest(g, &st, SY_PERIOD_FREE, &fr, &err), SY_OK);
    ck_assert_int_eq(sy_period_longest(g, &st, SY_PERIOD_FIXED, &fx, &err), SY_OK);
    ck_assert_uint_eq(fr.ndays, 21);
    ck_assert_uint_eq(fx.ndays, 21);
    ck_assert_uint_eq(fx.days[0].i, IC - 10);
    ck_assert_uint_eq(fx.days[0].j, JC + IC);
    ck_assert_double_eq(fx.c3_max_km2_s2, 30.0);
    sy_period_free(&fr);
    sy_period_free(&fx);
    free_grid(g);

    g = make_grid(81, 100, drift);
    ck_assert_int_eq(sy_period_longest(g, &st, SY_PERIOD_FREE, &fr, &err), SY_OK);
    ck_assert_int_eq(sy_period_longest(g, &st, SY_PERIOD_FIXED, &fx, &err), SY_OK);
    ck_assert_uint_eq(fr.ndays, 21);
    long best = 0;
    for (long k = -30; k <= 30; k++) {
        long n = 0;
        for (long d = -40; d <= 40; d++) n += 3 * d * d - 4 * k * d + 2 * k * k <= 100;
        if (n > best) best = n;
    }
    ck_assert_uint_eq(fx.ndays, (size_t)best);
    ck_assert(fr.ndays >= fx.ndays);
    for (size_t d = 0; d < fx.ndays; d++) ck_assert(fx.days[d].c3_km2_s2 <= 30.0);
    sy_period_free(&fr);
    sy_period_free(&fx);
    /* nothing feasible: a period of 0 days, not an error */
    st.c3_max_km2_s2 = 1;
    ck_assert_int_eq(sy_period_longest(g, &st, SY_PERIOD_FREE, &fr, &err), SY_OK);
    ck_assert_uint_eq(fr.ndays, 0);
    sy_period_free(&fr);
    free_grid(g);
}
END_TEST

/* Mass and margin from a capability curve; linear table, so exact. */
START_TEST(test_capability_margin)
{
    sy_grid *g = make_grid(81, 100, drift);
    sy_study st;
    no_limits(&st);
    sy_error err;
    sy_period fx;
    ck_assert_int_eq(sy_period_minimax(g, &st, SY_PERIOD_FIXED, 21, &fx, &err), SY_OK);
    double c3[] = {0, 100}, m[] = {3000, 1000};  /* 3000 - 20 C3 */
    sy_lvcap *cap;
    ck_assert_int_eq(sy_lvcap_from_table(c3, m, 2, "line", &cap, &err), SY_OK);
    ck_assert_int_eq(sy_period_apply_capability(&fx, cap, 1200, &err), SY_OK);
    ck_assert_double_eq_tol(fx.mass_kg, 3000 - 20 * 80.0, 1e-9);
    ck_assert_double_eq_tol(fx.margin_kg, 3000 - 20 * 80.0 - 1200, 1e-9);
    for (size_t d = 0; d < fx.ndays; d++)
        ck_assert_double_eq_tol(fx.days[d].mass_kg, 3000 - 20 * fx.days[d].c3_km2_s2, 1e-9);
    sy_lvcap_free(cap);
    /* a table that stops below the period's C3: refused, not extrapolated */
    double c3b[] = {0, 50}, mb[] = {3000, 2000};
    ck_assert_int_eq(sy_lvcap_from_table(c3b, mb, 2, "short", &cap, &err), SY_OK);
    ck_assert_int_eq(sy_period_apply_capability(&fx, cap, NAN, &err), SY_ERR_RANGE);
    sy_lvcap_free(cap);
    sy_period_free(&fx);
    free_grid(g);
}
END_TEST

START_TEST(test_bad_inputs)
{
    sy_grid *g = make_grid(30, 40, separable);
    sy_study st;
    no_limits(&st);
    sy_error err;
    sy_period p;
    ck_assert_int_eq(sy_period_minimax(g, &st, SY_PERIOD_FREE, 31, &p, &err), SY_ERR_ARG);
    ck_assert_ptr_nonnull(strstr(err.msg, "longer than the departure window of 30 days"));
    ck_assert_uint_eq(p.ndays, 0);
    ck_assert_int_eq(sy_period_minimax(g, &st, SY_PERIOD_FREE, 30, &p, &err), SY_OK);
    sy_period_free(&p);
    ck_assert_int_eq(sy_period_minimax(g, &st, SY_PERIOD_FREE, 0, &p, &err), SY_ERR_ARG);
    ck_assert_int_eq(sy_period_longest(g, &st, SY_PERIOD_FREE, &p, &err), SY_ERR_ARG);
    ck_assert_ptr_nonnull(strstr(err.msg, "c3_max_km2_s2"));
    g->spec.dx_days = 2.0;
    ck_assert_int_eq(sy_period_minimax(g, &st, SY_PERIOD_FREE, 5, &p, &err), SY_ERR_ARG);
    ck_assert_ptr_nonnull(strstr(err.msg, "step_days = 1"));
    g->spec.dx_days = 1.0;
    g->spec.y_is_tof = 1;
    ck_assert_int_eq(sy_period_minimax(g, &st, SY_PERIOD_FIXED, 5, &p, &err), SY_ERR_ARG);
    ck_assert_ptr_nonnull(strstr(err.msg, "[arrival]"));
    ck_assert_int_eq(sy_period_minimax(g, &st, SY_PERIOD_FREE, 5, &p, &err), SY_OK);
    sy_period_free(&p);
    g->spec.y_is_tof = 0;
    st.vinf_arr_max_km_s = 1.0; /* every cell has 3 km/s */
    ck_assert_int_eq(sy_period_minimax(g, &st, SY_PERIOD_FIXED, 5, &p, &err), SY_ERR_NOSOL);
    ck_assert_ptr_nonnull(strstr(err.msg, "relax a limit"));
    free_grid(g);
}
END_TEST

/* ------------------------------------------------------------------ */
/* The command                                                         */

static int count_lines(const char *s)
{
    int n = 0;
    for (; *s; s++) n += *s == '\n';
    return n;
}

static size_t file_size(const char *path)
{
    struct stat sb;
    return stat(path, &sb) == 0 ? (size_t)sb.st_size : 0;
}

START_TEST(test_cli_mars_example)
{
    char dir[] = "/tmp/sy_periodXXXXXX", args[512], path[600];
    ck_assert_ptr_nonnull(mkdtemp(dir));
    snprintf(args, sizeof args, "period examples/tern-mars-2033.ini -o %s --threads 2", dir);
    tu_run_result r = tu_run_synodic(args);
    ck_assert_msg(r.status == 0, "exit %d: %s", r.status, r.err);
    ck_assert_str_eq(r.err, "");
    ck_assert_ptr_nonnull(strstr(r.out, "Minimax 20-day launch period, fixed arrival"));
    ck_assert_ptr_nonnull(strstr(r.out, "Minimax 20-day launch period, free arrival"));
    ck_assert_ptr_nonnull(strstr(r.out, "period C3"));
    ck_assert_ptr_nonnull(strstr(r.out, "margin over the 1650.0 kg spacecraft"));
    ck_assert_ptr_nonnull(strstr(r.out, "Preliminary two-body"));
    /* two 20-row daily tables: rows "  N  YYYY-MM-DD  YYYY-MM-DD ..." */
    int rows = 0;
    for (const char *p = r.out; (p = strstr(p, "\n   ")); p++) {
        int day;
        char d1[16], d2[16];
        if (sscanf(p + 1, "%d %15s %15s", &day, d1, d2) == 3 && strlen(d1) == 10 && d1[4] == '-') rows++;
    }
    ck_assert_int_eq(rows, 40);
    static const char *ext[] = {"png", "svg", "pdf", "csv", "json"};
    for (int k = 0; k < 5; k++) {
        snprintf(path, sizeof path, "%s/tern-mars-2033-period.%s", dir, ext[k]);
        ck_assert_msg(file_size(path) > 200, "%s missing or empty", path);
    }
    /* JSON: both minimax periods of 20 days, free never worse than fixed,
     * C3 of every day <= the period C3, mass margin = mass - 1650. */
    snprintf(path, sizeof path, "%s/tern-mars-2033-period.json", dir);
    json_error_t je;
    json_t *root = json_load_file(path, 0, &je);
    ck_assert_ptr_nonnull(root);
    json_t *ps = json_object_get(root, "periods");
    double c3_fixed = NAN, c3_free = NAN;
    for (size_t k = 0; k < json_array_size(ps); k++) {
        json_t *p = json_array_get(ps, k);
        if (strcmp(json_string_value(json_object_get(p, "question")), "minimax")) continue;
        ck_assert_int_eq(json_integer_value(json_object_get(p, "length_days")), 20);
        double c3 = json_real_value(json_object_get(p, "period_c3_km2_s2"));
        json_t *days = json_object_get(p, "days");
        ck_assert_uint_eq(json_array_size(days), 20);
        for (size_t d = 0; d < 20; d++)
            ck_assert(json_real_value(json_object_get(json_array_get(days, d), "c3_km2_s2")) <= c3);
        double m = json_real_value(json_object_get(p, "injected_mass_kg"));
        ck_assert_double_eq_tol(json_real_value(json_object_get(p, "mass_margin_kg")), m - 1650.0, 1e-6);
        if (!strcmp(json_string_value(json_object_get(p, "arrival_strategy")), "fixed")) c3_fixed = c3;
        else c3_free = c3;
    }
    ck_assert(isfinite(c3_fixed) && isfinite(c3_free));
    ck_assert(c3_free <= c3_fixed);
    json_decref(root);
    tu_run_free(&r);

    /* --type II: every day of every period Type II, said in the JSON */
    snprintf(args, sizeof args, "period examples/tern-mars-2033.ini -o %s/t2 --type II --quiet", dir);
    r = tu_run_synodic(args);
    ck_assert_msg(r.status == 0, "%s", r.err);
    snprintf(path, sizeof path, "%s/t2/tern-mars-2033-period.json", dir);
    root = json_load_file(path, 0, &je);
    ck_assert_ptr_nonnull(root);
    ps = json_object_get(root, "periods");
    ck_assert_uint_eq(json_array_size(ps), 4);
    for (size_t k = 0; k < json_array_size(ps); k++) {
        json_t *p = json_array_get(ps, k), *days = json_object_get(p, "days");
        ck_assert_str_eq(json_string_value(json_object_get(p, "transfer_type")), "II");
        ck_assert_uint_ge(json_array_size(days), 1);
        for (size_t d = 0; d < json_array_size(days); d++)
            ck_assert_str_eq(json_string_value(json_object_get(json_array_get(days, d), "type")), "II");
    }
    json_decref(root);
    tu_run_free(&r);

    /* --arrival fixed --length 10 --quiet: nothing printed, files written */
    snprintf(args, sizeof args, "period examples/tern-mars-2033.ini -o %s/q --arrival fixed --length 10 --quiet", dir);
    r = tu_run_synodic(args);
    ck_assert_int_eq(r.status, 0);
    ck_assert_str_eq(r.out, "");
    snprintf(path, sizeof path, "%s/q/tern-mars-2033-period.csv", dir);
    char *csv = tu_slurp(path);
    ck_assert_ptr_nonnull(strstr(csv, "minimax,fixed,10,"));
    ck_assert_ptr_null(strstr(csv, "minimax,free,"));
    free(csv);
    tu_run_free(&r);

    /* `synodic chart` still reads the example; its JSON carries the mass
     * margin at each optimum. */
    snprintf(args, sizeof args, "chart examples/tern-mars-2033.ini -o %s/c --format json --quiet", dir);
    r = tu_run_synodic(args);
    ck_assert_msg(r.status == 0, "%s", r.err);
    snprintf(path, sizeof path, "%s/c/tern-mars-2033.json", dir);
    root = json_load_file(path, 0, &je);
    ck_assert_ptr_nonnull(root);
    json_t *o = json_array_get(json_object_get(root, "optima"), 0);
    ck_assert(json_is_number(json_object_get(o, "injected_mass_kg")));
    ck_assert_double_eq_tol(json_real_value(json_object_get(o, "mass_margin_kg")),
                            json_real_value(json_object_get(o, "injected_mass_kg")) - 1650.0, 1e-6);
    json_decref(root);
    tu_run_free(&r);
    snprintf(args, sizeof args, "rm -rf '%s'", dir);
    ck_assert_int_eq(system(args), 0);
}
END_TEST

/* Bad inputs: one line on stderr naming the problem, nothing on stdout,
 * the documented exit code. */
START_TEST(test_cli_errors)
{
    char dir[] = "/tmp/sy_perrXXXXXX", args[1024];
    ck_assert_ptr_nonnull(mkdtemp(dir));
    static const struct { const char *name, *text; } csv[] = {
        {"unsorted.csv", "c3_km2_s2,mass_kg\n0,2600\n20,1500\n10,2000\n"},
        {"dup.csv", "0,2600\n10,2000\n10,1900\n"},
        {"neg.csv", "0,2600\n10,-1\n"},
        {"short.csv", "20,1500\n60,200\n"},
    };
    for (size_t k = 0; k < 4; k++) {
        char p[256];
        snprintf(p, sizeof p, "%s/%s", dir, csv[k].name);
        FILE *f = fopen(p, "w");
        fputs(csv[k].text, f);
        fclose(f);
    }
    static const struct { const char *fmt, *want; int code; } cases[] = {
        {"period examples/tern-mars-2033.ini -o %s --length 500", "longer than the departure window", 3},
        {"period examples/tern-mars-2033.ini -o %s --arrival sometimes", "fixed, free or both", 3},
        {"period examples/tern-mars-2033.ini -o %s --length 0", "--length", 3},
        {"period examples/tern-mars-2033.ini -o %s --set period.length_days=2.5", "whole number", 3},
        {"period examples/tern-mars-2033.ini -o %s --set launch_vehicle.capability=%s/unsorted.csv", "unsorted.csv:4", 3},
        {"period examples/tern-mars-2033.ini -o %s --set launch_vehicle.capability=%s/dup.csv", "repeats", 3},
        {"period examples/tern-mars-2033.ini -o %s --set launch_vehicle.capability=%s/neg.csv", "negative", 3},
        {"period examples/tern-mars-2033.ini -o %s --set launch_vehicle.capability=%s/short.csv", "does not extrapolate", 3},
        {"period examples/tern-mars-2033.ini -o %s --set departure.step_days=2", "step_days = 1", 3},
        {"period examples/tern-mars-2033.ini -o %s --set limits.dla_max_deg=0.01", "no 20 consecutive", 4},
        {"period examples/tern-mars-2033.ini -o %s --bogus", "unknown option", 2},
        {"period examples/tern-mars-2033.ini -o %s --type III", "I, II or either", 3},
        {"period examples/tern-mars-2033.ini -o %s --set period.type=3", "type = II", 3},
        {"period examples/tern-mars-2033.ini -o %s --type I --set limits.c3_max_km2_s2=8.2", "Type I transfer", 4},
    };
    for (size_t k = 0; k < sizeof cases / sizeof cases[0]; k++) {
        snprintf(args, sizeof args, cases[k].fmt, dir, dir);
        tu_run_result r = tu_run_synodic(args);
        ck_assert_msg(r.status == cases[k].code, "case %zu: exit %d, want %d: %s", k, r.status,
                      cases[k].code, r.err);
        ck_assert_msg(strstr(r.err, cases[k].want) != NULL, "case %zu: '%s'", k, r.err);
        ck_assert_msg(count_lines(r.err) == 1, "case %zu: not one line: '%s'", k, r.err);
        ck_assert_msg(strncmp(r.err, "synodic: error: ", 16) == 0, "case %zu: %s", k, r.err);
        ck_assert_msg(r.out[0] == '\0', "case %zu: stdout '%s'", k, r.out);
        tu_run_free(&r);
    }
    snprintf(args, sizeof args, "rm -rf '%s'", dir);
    ck_assert_int_eq(system(args), 0);
}
END_TEST

int main(void)
{
    Suite *s = suite_create("period");
    TCase *tc = tcase_create("algorithm");
    tcase_add_test(tc, test_sliding_max_definition);
    tcase_add_test(tc, test_minimax_closed_form);
    tcase_add_test(tc, test_minimax_bruteforce_and_ordering);
    tcase_add_test(tc, test_minimax_respects_other_limits);
    tcase_add_test(tc, test_longest_closed_form);
    tcase_add_test(tc, test_minimax_one_type_closed_form);
    tcase_add_test(tc, test_one_type_bruteforce);
    tcase_add_test(tc, test_capability_margin);
    tcase_add_test(tc, test_bad_inputs);
    suite_add_tcase(s, tc);
    TCase *cli = tcase_create("cli");
    tcase_set_timeout(cli, 300);
    tcase_add_test(cli, test_cli_mars_example);
    tcase_add_test(cli, test_cli_errors);
    suite_add_tcase(s, cli);
    return tu_run(s);
}
