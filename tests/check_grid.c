/* check_grid.c - the porkchop grid engine and the optimum refinement. */
#include "config.h"
#include "synodic.h"
#include "synodic/grid.h"
#include "synodic/report.h"
#include "synodic/study.h"
#include "testutil.h"

#include <stdio.h>
#include <string.h>
#include <unistd.h>

static sy_catalog *cat;
static const sy_body *earth, *mars;

static void setup(void) { tu_earth_mars(&cat, &earth, &mars); }

static void teardown(void)
{
    sy_catalog_free(cat);
}

/* A study with no limits (every solved cell feasible). */
static void open_study(sy_study *st)
{
    memset(st, 0, sizeof *st);
    st->c3_max_km2_s2 = st->vinf_arr_max_km_s = st->dla_max_deg = NAN;
    st->tof_min_days = st->tof_max_days = NAN;
}

/* Earth -> Mars 2033, 1-day steps. */
static sy_grid_spec mars_spec(size_t nx, size_t ny, int threads)
{
    sy_grid_spec s;
    memset(&s, 0, sizeof s);
    s.from = earth;
    s.to = mars;
    sy_date_parse("2033-02-15", &s.x0_jd, NULL);
    s.dx_days = 1.0;
    s.nx = nx;
    sy_date_parse("2033-08-01", &s.y0, NULL);
    s.dy_days = 1.0;
    s.ny = ny;
    s.opts = (sy_transfer_opts){1, 185.0, 1, 400.0, 33793.0, 1, 125.0};
    s.threads = threads;
    return s;
}

/* Every sampled cell equals the point query (sy_transfer_compute, the
 * code behind `synodic transfer`) to float precision. */
START_TEST(test_cells_match_point_queries)
{
    sy_grid_spec s = mars_spec(120, 200, 0);
    sy_grid *g;
    sy_error err;
    ck_assert_int_eq(sy_grid_compute(&s, NULL, NULL, &g, &err), SY_OK);
    unsigned seed = 12345;
    int compared = 0;
    for (int n = 0; n < 300; n++) {
        seed = seed * 1103515245u + 12345u;
        size_t i = (seed >> 8) % g->nx;
        seed = seed * 1103515245u + 12345u;
        size_t j = (seed >> 8) % g->ny;
        size_t k = j * g->nx + i;
        sy_transfer t;
        sy_status st = sy_transfer_compute(earth, mars, sy_grid_x_jd(g, (double)i),
                                           sy_grid_arr_jd(g, (double)i, (double)j), 0,
                                           SY_BRANCH_LEFT, &s.opts, &t, &err);
        if (st != SY_OK) {
            ck_assert_int_ne(g->status[k], SY_CELL_OK);
            continue;
        }
        ck_assert_int_eq(g->status[k], SY_CELL_OK);
        ck_assert_double_le(tu_reldiff(g->field[SY_F_C3][k], t.c3_km2_s2, 1e-3), 1e-6);
        ck_assert_double_le(tu_reldiff(g->field[SY_F_VINF_ARR][k], t.vinf_arr_km_s, 1e-3), 1e-6);
        ck_assert_double_le(fabs(g->field[SY_F_DLA][k] - t.dla_deg), 1e-4);
        ck_assert_double_le(tu_reldiff(g->field[SY_F_DV_TOTAL][k], t.dv_total_km_s, 1e-3), 1e-6);
        ck_assert_double_le(tu_reldiff(g->field[SY_F_V_ENTRY][k], t.v_entry_km_s, 1e-3), 1e-6);
        ck_assert_int_eq(g->type[k], t.type);
        compared++;
    }
    ck_assert_int_gt(compared, 250);
    sy_grid_free(g);
}
END_TEST

/* A time-of-flight axis gives the same cells as the arrival axis. */
START_TEST(test_tof_axis)
{
    sy_grid_spec s = mars_spec(40, 60, 0);
    s.y_is_tof = 1;
    s.y0 = 150.0;
    s.dy_days = 2.0; /* lattice: 2 x the departure step */
    sy_grid *g;
    ck_assert_int_eq(sy_grid_compute(&s, NULL, NULL, &g, NULL), SY_OK);
    for (size_t j = 0; j < g->ny; j += 7)
        for (size_t i = 0; i < g->nx; i += 5) {
            sy_transfer t;
            double dep = sy_grid_x_jd(g, (double)i);
            ck_assert_int_eq(sy_transfer_compute(earth, mars, dep, dep + 150.0 + 2.0 * (double)j, 0,
                                                 SY_BRANCH_LEFT, NULL, &t, NULL), SY_OK);
            ck_assert_double_le(tu_reldiff(g->field[SY_F_C3][j * g->nx + i], t.c3_km2_s2, 1e-3), 1e-6);
        }
    sy_grid_free(g);
    /* incommensurate steps fall back to per-cell states and still agree */
    s.dy_days = 1.7;
    ck_assert_int_eq(sy_grid_compute(&s, NULL, NULL, &g, NULL), SY_OK);
    sy_transfer t;
    double dep = sy_grid_x_jd(g, 9);
    ck_assert_int_eq(sy_transfer_compute(earth, mars, dep, dep + 150.0 + 1.7 * 11, 0,
                                         SY_BRANCH_LEFT, NULL, &t, NULL), SY_OK);
    ck_assert_double_le(tu_reldiff(g->field[SY_F_C3][11 * g->nx + 9], t.c3_km2_s2, 1e-3), 1e-6);
    sy_grid_free(g);
}
END_TEST

/* Same input, same bytes: fields and CSV with 1 and 2 threads. */
/* sy_grid_recompute into a grid of the same layout gives the same bits as
 * computing a new grid for the new spec (other dates, other options);
 * a spec of another size or field set is refused and leaves the grid
 * usable. */
START_TEST(test_recompute)
{
    sy_grid_spec a = mars_spec(130, 90, 2), b = mars_spec(130, 90, 1);
    b.x0_jd += 37.0;
    b.y0 -= 11.0;
    b.opts.park_alt_km = 300.0;
    sy_grid *g, *fresh;
    ck_assert_int_eq(sy_grid_compute(&a, NULL, NULL, &g, NULL), SY_OK);
    ck_assert_int_eq(sy_grid_recompute(g, &b, NULL, NULL, NULL), SY_OK);
    ck_assert_int_eq(sy_grid_compute(&b, NULL, NULL, &fresh, NULL), SY_OK);
    size_t cells = g->nx * g->ny, ok = 0;
    ck_assert_int_eq(memcmp(g->status, fresh->status, cells), 0);
    ck_assert_int_eq(memcmp(g->type, fresh->type, cells), 0);
    for (size_t k = 0; k < cells; k++) ok += g->status[k] == SY_CELL_OK;
    ck_assert_int_gt(ok, cells / 2);
    for (int f = 0; f < SY_NFIELDS; f++) {
        ck_assert((g->field[f] == NULL) == (fresh->field[f] == NULL));
        if (g->field[f])
            ck_assert_int_eq(memcmp(g->field[f], fresh->field[f], cells * sizeof(float)), 0);
    }
    ck_assert(g->spec.x0_jd == b.x0_jd);
    sy_grid_spec wrong = mars_spec(131, 90, 1);
    sy_error err;
    ck_assert_int_eq(sy_grid_recompute(g, &wrong, NULL, NULL, &err), SY_ERR_ARG);
    ck_assert_ptr_nonnull(strstr(err.msg, "130 x 90"));
    wrong = mars_spec(130, 90, 1);
    wrong.fields = SY_FIELD_BIT(SY_F_C3);
    ck_assert_int_eq(sy_grid_recompute(g, &wrong, NULL, NULL, &err), SY_ERR_ARG);
    ck_assert(g->spec.x0_jd == b.x0_jd);
    sy_grid_free(g);
    sy_grid_free(fresh);
}
END_TEST

START_TEST(test_thread_determinism)
{
    sy_grid_spec s1 = mars_spec(150, 150, 1), s2 = mars_spec(150, 150, 2);
    sy_grid *g1, *g2;
    ck_assert_int_eq(sy_grid_compute(&s1, NULL, NULL, &g1, NULL), SY_OK);
    ck_assert_int_eq(sy_grid_compute(&s2, NULL, NULL, &g2, NULL), SY_OK);
    size_t cells = g1->nx * g1->ny;
    for (int f = 0; f < SY_NFIELDS; f++) {
        ck_assert((g1->field[f] == NULL) == (g2->field[f] == NULL));
        if (g1->field[f]) ck_assert_int_eq(memcmp(g1->field[f], g2->field[f], cells * sizeof(float)), 0);
    }
    ck_assert_int_eq(memcmp(g1->status, g2->status, cells), 0);
    sy_study st;
    open_study(&st);
    char dir[] = "/tmp/sy_gridXXXXXX";
    ck_assert_ptr_nonnull(mkdtemp(dir));
    char p1[128], p2[128];
    snprintf(p1, sizeof p1, "%s/a.csv", dir);
    snprintf(p2, sizeof p2, "%s/b.csv", dir);
    ck_assert_int_eq(sy_report_csv(g1, &st, p1, NULL), SY_OK);
    ck_assert_int_eq(sy_report_csv(g2, &st, p2, NULL), SY_OK);
    ck_assert(tu_files_equal(p1, p2));
    unlink(p1);
    unlink(p2);
    rmdir(dir);
    /* teams of 3 and 7 on 3 column blocks: ranges of one block, empty
     * ranges, units taken from other threads' ranges; the same bits.
     * Both kernels (the scalar one cuts its runs of cells the same way). */
    const int teams[2] = {3, 7};
    const int kernels[2] = {SY_KERNEL_AUTO, SY_KERNEL_SCALAR};
    for (int q = 0; q < 2; q++)
        for (int t = 0; t < 2; t++) {
            sy_grid_spec sk = mars_spec(150, 150, teams[t]), s0 = mars_spec(150, 150, 1);
            sk.kernel = s0.kernel = kernels[q];
            sy_grid *gk, *g0;
            ck_assert_int_eq(sy_grid_compute(&sk, NULL, NULL, &gk, NULL), SY_OK);
            ck_assert_int_eq(sy_grid_compute(&s0, NULL, NULL, &g0, NULL), SY_OK);
            for (int f = 0; f < SY_NFIELDS; f++)
                if (g0->field[f])
                    ck_assert_msg(memcmp(gk->field[f], g0->field[f], cells * sizeof(float)) == 0,
                                  "kernel %d, %d threads: field %d differs", kernels[q], teams[t], f);
            ck_assert_int_eq(memcmp(gk->status, g0->status, cells), 0);
            ck_assert_int_eq(memcmp(gk->type, g0->type, cells), 0);
            sy_grid_free(gk);
            sy_grid_free(g0);
        }
    sy_grid_free(g1);
    sy_grid_free(g2);
}
END_TEST

/* The Earth-Mars 2033 grid of 120 x 300 days and its refined minimum C3
 * without limits. */
static sy_grid *mars_c3_optimum(sy_grid_spec *s, sy_study *st, sy_optimum *o)
{
    *s = mars_spec(120, 300, 0);
    sy_grid *g;
    ck_assert_int_eq(sy_grid_compute(s, NULL, NULL, &g, NULL), SY_OK);
    open_study(st);
    ck_assert_int_eq(sy_grid_optimum(g, st, SY_F_C3, o), SY_OK);
    ck_assert(o->found);
    return g;
}

/* The refined minimum C3 agrees with a dense local grid of 0.01-day
 * spacing around it (an independent brute-force minimum). */
START_TEST(test_optimum_vs_dense_grid)
{
    sy_grid_spec s;
    sy_study st;
    sy_optimum o;
    sy_grid *g = mars_c3_optimum(&s, &st, &o);
    /* dense grid: +-0.6 day around the refined point, 0.01-day steps */
    double best = INFINITY, bd = 0, ba = 0;
    for (int a = -60; a <= 60; a++)
        for (int b = -60; b <= 60; b++) {
            double dep = o.jd_dep + a * 0.01, arr = o.jd_arr + b * 0.01;
            sy_transfer t;
            if (sy_transfer_compute(earth, mars, dep, arr, 0, SY_BRANCH_LEFT, NULL, &t, NULL) != SY_OK)
                continue;
            if (t.c3_km2_s2 < best) { best = t.c3_km2_s2; bd = dep; ba = arr; }
        }
    /* the refined value is no worse than the dense grid's, which lies
     * within 0.01 day of it; and it beats the best grid cell */
    ck_assert_double_le(o.value, best + 1e-9);
    ck_assert_double_le(fabs(bd - o.jd_dep), 0.011);
    ck_assert_double_le(fabs(ba - o.jd_arr), 0.011);
    float cellmin = INFINITY;
    for (size_t k = 0; k < g->nx * g->ny; k++)
        if (g->status[k] == SY_CELL_OK && g->field[SY_F_C3][k] < cellmin) cellmin = g->field[SY_F_C3][k];
    ck_assert_double_le(o.value, (double)cellmin + 1e-6);
    ck_assert_double_eq_tol(o.transfer.c3_km2_s2, o.value, 1e-12);
    /* the constraint is honoured: with C3 <= 0.9 x minimum nothing is feasible */
    st.c3_max_km2_s2 = 0.9 * o.value;
    sy_optimum none;
    ck_assert_int_eq(sy_grid_optimum(g, &st, SY_F_C3, &none), SY_OK);
    ck_assert(!none.found);
    /* with a flight-time cap the optimum moves inside it */
    open_study(&st);
    st.tof_max_days = o.transfer.tof_days - 20.0;
    sy_optimum capped;
    ck_assert_int_eq(sy_grid_optimum(g, &st, SY_F_C3, &capped), SY_OK);
    ck_assert(capped.found);
    ck_assert_double_le(capped.transfer.tof_days, st.tof_max_days + 1e-9);
    ck_assert_double_ge(capped.value, o.value);
    sy_grid_free(g);
}
END_TEST

/* A minimum held by the grid window is flagged, an interior one is not.
 * The reference is the interior minimum of a wider window (checked
 * against a dense grid in test_optimum_vs_dense_grid): a window that
 * starts 15 days after its departure, or ends 15 days before its
 * arrival, cannot contain it, so its best point must lie on that side
 * and cost more (a minimum over a subset is never lower). */
START_TEST(test_optimum_at_edge)
{
    sy_grid_spec s;
    sy_study st;
    sy_optimum o;
    sy_grid *g = mars_c3_optimum(&s, &st, &o);
    ck_assert_uint_eq(o.edges, 0);
    char txt[96];
    ck_assert_str_eq(sy_optimum_edge_text(&o, 0, txt, sizeof txt), "");

    sy_grid_spec late = s;
    late.x0_jd = floor(o.jd_dep) + 15.0;
    late.nx = 60;
    sy_grid *gl;
    ck_assert_int_eq(sy_grid_compute(&late, NULL, NULL, &gl, NULL), SY_OK);
    sy_optimum ol;
    ck_assert_int_eq(sy_grid_optimum(gl, &st, SY_F_C3, &ol), SY_OK);
    ck_assert(ol.found);
    ck_assert_uint_eq(ol.edges, SY_EDGE_DEP_FIRST);
    ck_assert_double_le(ol.jd_dep - late.x0_jd, SY_EDGE_TOL_DAYS);
    ck_assert_double_gt(ol.value, o.value);
    ck_assert_str_eq(sy_optimum_edge_text(&ol, 0, txt, sizeof txt), "first departure");

    /* and the arrival side too: the window's last arrival 15 days short */
    sy_grid_spec both = late;
    both.ny = (size_t)(floor(o.jd_arr) - 15.0 - both.y0) + 1;
    sy_grid *gb;
    ck_assert_int_eq(sy_grid_compute(&both, NULL, NULL, &gb, NULL), SY_OK);
    sy_optimum ob;
    ck_assert_int_eq(sy_grid_optimum(gb, &st, SY_F_C3, &ob), SY_OK);
    ck_assert(ob.found);
    ck_assert(ob.edges & SY_EDGE_Y_LAST);
    ck_assert(!(ob.edges & (SY_EDGE_DEP_LAST | SY_EDGE_Y_FIRST)));
    ck_assert_double_ge(ob.value, ol.value);
    sy_optimum_edge_text(&ob, 0, txt, sizeof txt);
    ck_assert_msg(strstr(txt, "last arrival") != NULL, "edge text '%s'", txt);
    sy_optimum_edge_text(&ob, 1, txt, sizeof txt);
    ck_assert_msg(strstr(txt, "longest flight") != NULL, "edge text '%s'", txt);
    /* a buffer too short for the text still ends in a terminator */
    ck_assert_uint_lt(strlen(sy_optimum_edge_text(&ob, 0, txt, 8)), 8);
    sy_grid_free(gb);
    sy_grid_free(gl);
    sy_grid_free(g);
}
END_TEST

/* Earth-Mars opportunities recur with the synodic period: the minimum-C3
 * departures found by scanning 2026-2045 are spaced by about 780 days
 * (common practice: 1 / (1/365.256 - 1/686.98) = 779.9 d from the mean
 * motions), with a spread from Mars's eccentricity (e = 0.093) of a few
 * tens of days. */
START_TEST(test_synodic_period)
{
    sy_grid_spec s;
    memset(&s, 0, sizeof s);
    s.from = earth;
    s.to = mars;
    sy_date_parse("2026-01-01", &s.x0_jd, NULL);
    s.dx_days = 4.0;
    s.nx = (size_t)(20 * 365.25 / 4.0);
    s.y_is_tof = 1;
    s.y0 = 120.0;
    s.dy_days = 4.0;
    s.ny = 71; /* 120 .. 400 days */
    sy_grid *g;
    ck_assert_int_eq(sy_grid_compute(&s, NULL, NULL, &g, NULL), SY_OK);
    /* best C3 over flight time, per departure */
    double *best = malloc(g->nx * sizeof *best);
    for (size_t i = 0; i < g->nx; i++) {
        best[i] = INFINITY;
        for (size_t j = 0; j < g->ny; j++) {
            size_t k = j * g->nx + i;
            if (g->status[k] == SY_CELL_OK && g->field[SY_F_C3][k] < best[i]) best[i] = g->field[SY_F_C3][k];
        }
    }
    /* opportunities: minima of best[] below 40 km2/s2 that are the lowest
     * within +-200 days */
    double dep[16];
    int n = 0;
    int w = (int)(200.0 / s.dx_days);
    for (int i = 0; i < (int)g->nx && n < 16; i++) {
        if (!(best[i] < 40.0)) continue;
        int is_min = 1;
        for (int d = -w; d <= w && is_min; d++) {
            int q = i + d;
            if (q >= 0 && q < (int)g->nx && d != 0 && best[q] < best[i]) is_min = 0;
        }
        if (is_min) dep[n++] = sy_grid_x_jd(g, (double)i);
    }
    ck_assert_int_ge(n, 9); /* 20 years / 2.135 years */
    ck_assert_int_le(n, 10);
    double sum = 0;
    for (int k = 1; k < n; k++) {
        double gap = dep[k] - dep[k - 1];
        ck_assert_msg(gap > 700 && gap < 860, "gap %d: %.0f days", k, gap);
        sum += gap;
    }
    double mean = sum / (n - 1);
    ck_assert_msg(fabs(mean - 779.9) < 25, "mean spacing %.1f days", mean);
    free(best);
    sy_grid_free(g);
}
END_TEST

/* Masks instead of NaN poisoning; refusal of an oversized grid. */
START_TEST(test_masks_and_memory)
{
    sy_grid_spec s = mars_spec(50, 50, 0);
    s.y0 = s.x0_jd - 10.0; /* some arrivals before departure */
    sy_grid *g;
    ck_assert_int_eq(sy_grid_compute(&s, NULL, NULL, &g, NULL), SY_OK);
    ck_assert_int_eq(g->status[0], SY_CELL_NOTIME);
    ck_assert(isnan(g->field[SY_F_C3][0]));
    ck_assert_int_eq(g->type[0], 0);
    sy_grid_free(g);

    s = mars_spec(2000000, 2000000, 0);
    sy_error err;
    ck_assert_int_eq(sy_grid_compute(&s, NULL, NULL, &g, &err), SY_ERR_RANGE);
    ck_assert_ptr_null(g);
    ck_assert_ptr_nonnull(strstr(err.msg, "needs"));
    ck_assert_ptr_nonnull(strstr(err.msg, "step_days"));
}
END_TEST

static int cancel_half(double frac, void *user)
{
    (void)user;
    return frac >= 0.5;
}

START_TEST(test_cancel)
{
    sy_grid_spec s = mars_spec(100, 200, 0);
    sy_grid *g = (sy_grid *)1;
    sy_error err;
    ck_assert_int_eq(sy_grid_compute(&s, cancel_half, NULL, &g, &err), SY_ERR_IO);
    ck_assert_ptr_null(g);
    ck_assert_ptr_nonnull(strstr(err.msg, "interrupted"));
}
END_TEST

int main(void)
{
    Suite *s = suite_create("grid");
    TCase *tc = tcase_create("core");
    tcase_add_checked_fixture(tc, setup, teardown);
    tcase_set_timeout(tc, 300);
    tcase_add_test(tc, test_cells_match_point_queries);
    tcase_add_test(tc, test_tof_axis);
    tcase_add_test(tc, test_thread_determinism);
    tcase_add_test(tc, test_recompute);
    tcase_add_test(tc, test_optimum_vs_dense_grid);
    tcase_add_test(tc, test_optimum_at_edge);
    tcase_add_test(tc, test_synodic_period);
    tcase_add_test(tc, test_masks_and_memory);
    tcase_add_test(tc, test_cancel);
    suite_add_tcase(s, tc);
    return tu_run(s);
}
