/* check_batch.c - the vectorised grid kernel (src/lib/lambert_batch.c)
 * against the scalar path (sy_transfer_from_states, whose Lambert solver
 * tests/check_lambert.c checks against independent references).
 *
 * Tolerance: 1e-10 relative (issue 4).  Both paths solve the same
 * equations in double precision; they differ by the stopping rule of the
 * iteration and by libmvec's few-ulp elementary functions, which leave
 * ~1e-14 relative on ordinary cells and up to ~1e-11 where the problem
 * amplifies rounding (near 180 deg).  Grids store float, so grid-level
 * comparisons allow one float rounding (2^-23 relative). */
#include "config.h"
#include "synodic.h"
#include "synodic/grid.h"
#include "synodic/study.h"
#include "lib/lambert_batch.h"
#include "testutil.h"


#include <stdio.h>
#include <stdlib.h>
#include <string.h>

static sy_catalog *cat;
static const sy_body *earth, *mars;

static void setup(void) { tu_earth_mars(&cat, &earth, &mars); }

static void teardown(void)
{
    sy_catalog_free(cat);
}

static unsigned long long rng = 88172645463325252ULL;
static double urand(void) /* xorshift64, [0, 1) */
{
    rng ^= rng << 13;
    rng ^= rng >> 7;
    rng ^= rng << 17;
    return (double)(rng >> 11) * (1.0 / 9007199254740992.0);
}

/* Transfer-figure options of a Mars study (values of the demo scenario). */
static const sy_transfer_opts OPTS = {1, 185.0, 1, 400.0, 33793.0, 1, 125.0};
#define GM_E 398600.435
#define R_E 6378.137
#define GM_M 42828.37
#define R_M 3396.19

static void full_ctx(sy_batch_ctx *ctx)
{
    memset(ctx, 0, sizeof *ctx);
    ctx->fields = (1u << SY_NFIELDS) - 1u;
    ctx->gm_from = GM_E;
    ctx->r_park_km = R_E + OPTS.park_alt_km;
    ctx->gm_to = GM_M;
    ctx->r_cap_peri_km = R_M + OPTS.capture_peri_km;
    ctx->r_cap_apo_km = R_M + OPTS.capture_apo_km;
    ctx->r_entry_km = R_M + OPTS.entry_alt_km;
}


/* Floors for the relative comparison: angles compare absolutely at the
 * 1e-10 x 360 deg scale; right ascensions near 0/360 wrap. */
static double field_err(int f, double a, double b)
{
    if (f == SY_F_RLA || f == SY_F_RAP) {
        double d = fabs(a - b);
        if (d > 180.0) d = 360.0 - d;
        return d / 360.0;
    }
    if (f == SY_F_DLA || f == SY_F_DAP || f == SY_F_ANGLE) return fabs(a - b) / 360.0;
    /* A minimum Sun distance far inside the Sun (random near-radial
     * hyperbolas reach 1e-6 AU) is set by h = r x v, which cancels, so it
     * is conditioned like a quantity of the problem's scale: below 0.01 AU
     * (two solar radii) it compares absolutely, 1e-10 of 0.01 AU = 150 m. */
    if (f == SY_F_MIN_SUN) return tu_reldiff(a, b, 0.01);
    return tu_reldiff(a, b, 1e-6);
}

enum { KIND_ORDINARY, KIND_NEAR_PI, KIND_HYPER, KIND_NKINDS };

/* A random prograde problem of one kind, heliocentric, km and km/s. */
static void random_problem(int kind, double r1[3], double v1[3], double r2[3],
                           double v2[3], double *tof_s)
{
    double a1 = 2 * M_PI * urand(), rad1 = (0.4 + 4.6 * urand()) * SY_AU_KM;
    double rad2 = (0.4 + 4.6 * urand()) * SY_AU_KM;
    double th;
    if (kind == KIND_NEAR_PI) {
        /* within 1e-7 .. 1e-2 rad of 180 deg, either side */
        double d = pow(10.0, -7.0 + 5.0 * urand());
        th = M_PI + (urand() < 0.5 ? -d : d);
    } else {
        th = 2 * M_PI * (0.02 + 0.96 * urand());
    }
    double inc1 = 0.1 * (urand() - 0.5), inc2 = 0.1 * (urand() - 0.5);
    r1[0] = rad1 * cos(a1); r1[1] = rad1 * sin(a1); r1[2] = rad1 * sin(inc1);
    r2[0] = rad2 * cos(a1 + th); r2[1] = rad2 * sin(a1 + th); r2[2] = rad2 * sin(inc2);
    for (int k = 0; k < 3; k++) {
        v1[k] = 40.0 * (urand() - 0.5);
        v2[k] = 40.0 * (urand() - 0.5);
    }
    double days = kind == KIND_HYPER ? 2.0 + 25.0 * urand() : 30.0 + 1500.0 * urand();
    *tof_s = days * SY_DAY_S;
}

/* Random problems, including near-180-degree and hyperbolic transfers:
 * every figure of every cell within 1e-10 relative of the scalar path,
 * and the same status. */
START_TEST(test_batch_vs_scalar_random)
{
    if (!sy_batch_available()) {
        fprintf(stderr, "check_batch: this build has no vector kernel; skipped\n");
        return;
    }
    sy_batch_ctx ctx;
    full_ctx(&ctx);
    static sy_batch_in in;
    static sy_batch_out out, out1;
    double worst[KIND_NKINDS] = {0}, worst_f[SY_NFIELDS] = {0};
    int n_ok[KIND_NKINDS] = {0}, n_hyp = 0, n_degen = 0, n_dead = 0, n_seeded = 0;
    for (int blk = 0; blk < 300; blk++) {
        int kind = blk % KIND_NKINDS;
        double r1[SY_BATCH_W][3], v1[SY_BATCH_W][3], r2[SY_BATCH_W][3], v2[SY_BATCH_W][3];
        double tof[SY_BATCH_W];
        for (int l = 0; l < SY_BATCH_W; l++) {
            random_problem(kind, r1[l], v1[l], r2[l], v2[l], &tof[l]);
            if (blk % 10 == 5 && l == 7) {
                /* exactly collinear: degenerate */
                for (int k = 0; k < 3; k++) r2[l][k] = -2.0 * r1[l][k];
            }
            for (int k = 0; k < 3; k++) {
                in.r1[k][l] = r1[l][k]; in.vb1[k][l] = v1[l][k];
                in.r2[k][l] = r2[l][k]; in.vb2[k][l] = v2[l][k];
            }
            in.tof_s[l] = tof[l];
            in.live[l] = (unsigned char)!(blk % 7 == 3 && l % 5 == 0); /* some dead lanes */
            in.xs[l] = NAN;
        }
        sy_batch_derive(&in);
        sy_batch_solve(&ctx, &in, &out);
        /* every block twice more, started from seeds (sy_batch_in.xs): the
         * solution moved by up to 1e-3 relative, as a grid's neighbours
         * give, and wild seeds anywhere in (-1, 5) or outside the accepted
         * range; every pass is checked against the scalar path */
        for (int pass = 0; pass < 3; pass++) {
        if (pass > 0) {
            static sy_batch_in sd;
            sd = in;
            for (int l = 0; l < SY_BATCH_W; l++) {
                double x = out1.x[l];
                if (pass == 1) sd.xs[l] = x * (1.0 + 2e-3 * (urand() - 0.5)) + 1e-4 * (urand() - 0.5);
                else sd.xs[l] = l % 9 == 0 ? -3.0 : (l % 11 == 0 ? NAN : -0.999 + 6.0 * urand());
            }
            sy_batch_solve(&ctx, &sd, &out);
            n_seeded++;
        } else {
            out1 = out;
        }
        for (int l = 0; l < SY_BATCH_W; l++) {
            if (!in.live[l]) { n_dead += pass == 0; continue; }
            sy_transfer t;
            sy_status st = sy_transfer_from_states(r1[l], v1[l], r2[l], v2[l], tof[l], 0,
                                                   SY_BRANCH_LEFT, GM_E, R_E, GM_M, R_M,
                                                   &OPTS, &t);
            if (st == SY_ERR_DEGENERATE) {
                ck_assert_int_eq(out.status[l], SY_CELL_DEGENERATE);
                ck_assert(isnan(out.x[l]));
                n_degen += pass == 0;
                continue;
            }
            ck_assert_msg(st == SY_OK, "scalar status %d", st);
            ck_assert_int_eq(out.status[l], SY_CELL_OK);
            ck_assert_int_eq(out.type[l], t.type);
            for (int f = 0; f < SY_NFIELDS; f++) {
                double e = field_err(f, out.f[f][l], sy_transfer_field(&t, (sy_field)(f)));
                ck_assert_msg(e <= 1e-10, "block %d lane %d field %s: vector %.17g scalar %.17g (%.3g)",
                              blk, l, sy_field_name((sy_field)f), out.f[f][l], sy_transfer_field(&t, (sy_field)(f)), e);
                if (e > worst[kind]) worst[kind] = e;
                if (e > worst_f[f]) worst_f[f] = e;
            }
            ck_assert(isfinite(out.x[l]) && out.x[l] > -1.0);
            /* hyperbolic transfer arc: positive heliocentric energy */
            double vv = tu_norm3(t.v1_km_s), rr = tu_norm3(r1[l]);
            if (pass == 0 && 0.5 * vv * vv - SY_GM_SUN_KM3_S2 / rr > 0) n_hyp++;
            if (pass == 0) n_ok[kind]++;
        }
        }
    }
    fprintf(stderr, "check_batch: worst relative difference: ordinary %.2e (%d cells), "
            "near 180 deg %.2e (%d), short/hyperbolic %.2e (%d, %d hyperbolic arcs); "
            "%d degenerate, %d dead lanes\n",
            worst[0], n_ok[0], worst[1], n_ok[1], worst[2], n_ok[2], n_hyp, n_degen, n_dead);
    for (int f = 0; f < SY_NFIELDS; f++)
        fprintf(stderr, "  %-9s %.2e\n", sy_field_name((sy_field)f), worst_f[f]);
    /* the sample really covers what it claims to */
    ck_assert_int_gt(n_ok[KIND_NEAR_PI], 5000);
    ck_assert_int_gt(n_hyp, 3000);
    ck_assert_int_gt(n_degen, 20);
    ck_assert_int_gt(n_dead, 100);
    ck_assert_int_eq(n_seeded, 600);
}
END_TEST

/* A block of random problems, one kind after another across the lanes,
 * unseeded; with_dead: every lane l with l % 11 == 3 dead. */
static void random_block(sy_batch_in *in, int with_dead)
{
    for (int l = 0; l < SY_BATCH_W; l++) {
        double r1[3], v1[3], r2[3], v2[3], tof;
        random_problem(l % KIND_NKINDS, r1, v1, r2, v2, &tof);
        for (int k = 0; k < 3; k++) {
            in->r1[k][l] = r1[k]; in->vb1[k][l] = v1[k];
            in->r2[k][l] = r2[k]; in->vb2[k][l] = v2[k];
        }
        in->tof_s[l] = tof;
        in->live[l] = (unsigned char)(!with_dead || l % 11 != 3);
        in->xs[l] = NAN;
    }
    sy_batch_derive(in);
}

/* A cell's bits do not depend on its lane or on its neighbours. */
START_TEST(test_lane_independence)
{
    if (!sy_batch_available()) return;
    sy_batch_ctx ctx;
    full_ctx(&ctx);
    static sy_batch_in in;
    static sy_batch_out ref, out;
    random_block(&in, 0);
    static sy_batch_in keep;
    keep = in;
    sy_batch_solve(&ctx, &in, &ref);
    for (int shift = 1; shift < SY_BATCH_W; shift += 13) {
        /* problem p goes to lane (p + shift) mod W; the first 5 lanes of
         * the shifted block are dead (other neighbours, fewer live) */
        static sy_batch_in sh;
        for (int p = 0; p < SY_BATCH_W; p++) {
            int l = (p + shift) % SY_BATCH_W;
            for (int k = 0; k < 3; k++) {
                sh.r1[k][l] = keep.r1[k][p]; sh.vb1[k][l] = keep.vb1[k][p];
                sh.r2[k][l] = keep.r2[k][p]; sh.vb2[k][l] = keep.vb2[k][p];
            }
            sh.tof_s[l] = keep.tof_s[p];
            sh.live[l] = (unsigned char)(l >= 5);
            sh.xs[l] = NAN;
        }
        sy_batch_derive(&sh);
        sy_batch_solve(&ctx, &sh, &out);
        for (int p = 0; p < SY_BATCH_W; p++) {
            int l = (p + shift) % SY_BATCH_W;
            if (l < 5) continue;
            ck_assert_int_eq(out.status[l], ref.status[p]);
            for (int f = 0; f < SY_NFIELDS; f++)
                ck_assert_msg(memcmp(&out.f[f][l], &ref.f[f][p], sizeof(double)) == 0,
                              "field %d of problem %d changed with its lane", f, p);
        }
    }
}
END_TEST

/* A field's values do not depend on which other fields are asked for:
 * every field asked alone, and in pairs with each other field, gives the
 * bits of the all-fields solve (the kernel shares scratch arrays between
 * the figures; a figure reading another's scratch would show here). */
START_TEST(test_field_subsets)
{
    if (!sy_batch_available()) return;
    sy_batch_ctx ctx;
    full_ctx(&ctx);
    static sy_batch_in in, keep;
    static sy_batch_out ref, out;
    random_block(&in, 1); /* some dead lanes */
    keep = in;
    sy_batch_solve(&ctx, &in, &ref);
    int solved = 0;
    for (int l = 0; l < SY_BATCH_W; l++) solved += ref.status[l] == SY_CELL_OK && keep.live[l];
    ck_assert_int_gt(solved, SY_BATCH_W / 2);
    for (int f = 0; f < SY_NFIELDS; f++) {
        for (int g = -1; g < SY_NFIELDS; g++) {
            sy_batch_ctx c = ctx;
            c.fields = (1u << f) | (g >= 0 ? 1u << g : 0u);
            in = keep;
            sy_batch_solve(&c, &in, &out);
            for (int l = 0; l < SY_BATCH_W; l++) {
                ck_assert_int_eq(out.status[l], ref.status[l]);
                ck_assert_msg(memcmp(&out.f[f][l], &ref.f[f][l], sizeof(double)) == 0,
                              "field %d of lane %d changed when asked with field %d: %.17g vs %.17g",
                              f, l, g, out.f[f][l], ref.f[f][l]);
            }
        }
    }
}
END_TEST

static sy_grid_spec mars_spec(size_t nx, size_t ny, int threads, int kernel)
{
    sy_grid_spec s;
    memset(&s, 0, sizeof s);
    s.from = earth;
    s.to = mars;
    sy_date_parse("2032-11-01", &s.x0_jd, NULL);
    s.dx_days = 1.0;
    s.nx = nx;
    sy_date_parse("2033-01-01", &s.y0, NULL);
    s.dy_days = 1.0;
    s.ny = ny;
    s.opts = OPTS;
    s.threads = threads;
    s.kernel = kernel;
    return s;
}

/* Whole grids: the vector and the scalar kernel give the same statuses
 * and types and the same floats to one rounding; nx = 203 is not a
 * multiple of the block width, so the padded last block is exercised. */
START_TEST(test_grid_vector_vs_scalar)
{
    sy_grid_spec sv = mars_spec(203, 170, 0, SY_KERNEL_VECTOR);
    sy_grid_spec ss = mars_spec(203, 170, 0, SY_KERNEL_SCALAR);
    /* a departure window reaching past arrivals: NOTIME cells too */
    sy_grid *gv, *gs;
    ck_assert_int_eq(sy_grid_compute(&sv, NULL, NULL, &gv, NULL), SY_OK);
    ck_assert_int_eq(sy_grid_compute(&ss, NULL, NULL, &gs, NULL), SY_OK);
    ck_assert_str_eq(gs->kernel, "scalar");
    if (sy_batch_available()) ck_assert_ptr_nonnull(strstr(gv->kernel, "vector"));
    size_t cells = gv->nx * gv->ny, ok = 0, notime = 0;
    double worst = 0;
    for (size_t k = 0; k < cells; k++) {
        ck_assert_int_eq(gv->status[k], gs->status[k]);
        ck_assert_int_eq(gv->type[k], gs->type[k]);
        if (gv->status[k] == SY_CELL_NOTIME) notime++;
        if (gv->status[k] != SY_CELL_OK) {
            for (int f = 0; f < SY_NFIELDS; f++)
                if (gv->field[f]) ck_assert(isnan(gv->field[f][k]));
            continue;
        }
        ok++;
        for (int f = 0; f < SY_NFIELDS; f++) {
            ck_assert((gv->field[f] == NULL) == (gs->field[f] == NULL));
            if (!gv->field[f]) continue;
            ck_assert(isfinite(gv->field[f][k]));
            double e = field_err(f, gv->field[f][k], gs->field[f][k]);
            if (e > worst) worst = e;
            ck_assert_msg(e <= 1.2e-7, "cell %zu field %s: %.9g vs %.9g", k,
                          sy_field_name((sy_field)f), gv->field[f][k], gs->field[f][k]);
        }
    }
    fprintf(stderr, "check_batch: grid 203x170: %zu solved, %zu no-time cells, worst float difference %.2e\n",
            ok, notime, worst);
    ck_assert_int_gt(ok, 20000);
    ck_assert_int_gt(notime, 100);
    sy_grid_free(gv);
    sy_grid_free(gs);
}
END_TEST

/* Multi-revolution grids go through the scalar solver (documented in
 * synodic/grid.h): the automatic kernel gives the scalar grid exactly,
 * with both solved and no-solution cells present, for both branches. */
START_TEST(test_multirev_routed_to_scalar)
{
    for (int br = 0; br < 2; br++) {
        sy_grid_spec sa = mars_spec(70, 60, 0, SY_KERNEL_AUTO);
        sa.y0 += 500.0; /* flights of 440 .. 560 days */
        sa.dy_days = 2.0;
        sa.revs = 1;
        sa.branch = br ? SY_BRANCH_RIGHT : SY_BRANCH_LEFT;
        sy_grid_spec ss = sa;
        ss.kernel = SY_KERNEL_SCALAR;
        sy_grid *ga, *gs;
        ck_assert_int_eq(sy_grid_compute(&sa, NULL, NULL, &ga, NULL), SY_OK);
        ck_assert_int_eq(sy_grid_compute(&ss, NULL, NULL, &gs, NULL), SY_OK);
        ck_assert_str_eq(ga->kernel, "scalar");
        size_t cells = ga->nx * ga->ny, ok = 0, nosol = 0;
        ck_assert_int_eq(memcmp(ga->status, gs->status, cells), 0);
        for (int f = 0; f < SY_NFIELDS; f++)
            if (ga->field[f]) ck_assert_int_eq(memcmp(ga->field[f], gs->field[f], cells * sizeof(float)), 0);
        for (size_t k = 0; k < cells; k++) {
            ok += ga->status[k] == SY_CELL_OK;
            nosol += ga->status[k] == SY_CELL_NOSOL;
        }
        ck_assert_int_gt(ok, 100);
        ck_assert_int_gt(nosol, 100);
        sy_grid_free(ga);
        sy_grid_free(gs);
    }
}
END_TEST

/* Same bits for 1 and 2 threads with the vector kernel. */
START_TEST(test_vector_thread_determinism)
{
    sy_grid_spec s1 = mars_spec(150, 131, 1, SY_KERNEL_AUTO);
    sy_grid_spec s2 = mars_spec(150, 131, 2, SY_KERNEL_AUTO);
    sy_grid *g1, *g2;
    ck_assert_int_eq(sy_grid_compute(&s1, NULL, NULL, &g1, NULL), SY_OK);
    ck_assert_int_eq(sy_grid_compute(&s2, NULL, NULL, &g2, NULL), SY_OK);
    size_t cells = g1->nx * g1->ny;
    for (int f = 0; f < SY_NFIELDS; f++)
        if (g1->field[f]) ck_assert_int_eq(memcmp(g1->field[f], g2->field[f], cells * sizeof(float)), 0);
    ck_assert_int_eq(memcmp(g1->status, g2->status, cells), 0);
    ck_assert_int_eq(memcmp(g1->type, g2->type, cells), 0);
    sy_grid_free(g1);
    sy_grid_free(g2);
}
END_TEST

/* Only the fields asked for are stored, and the estimate shrinks. */
START_TEST(test_field_selection)
{
    sy_grid_spec s = mars_spec(100, 80, 0, SY_KERNEL_AUTO);
    size_t all = sy_grid_bytes(&s);
    s.fields = SY_FIELD_BIT(SY_F_C3) | SY_FIELD_BIT(SY_F_VINF_ARR);
    size_t two = sy_grid_bytes(&s);
    ck_assert_uint_lt(two, all);
    ck_assert_uint_le(two, (size_t)(100 * 80) * (2 * sizeof(float) + 2) + (100 + 80) * 64);
    sy_grid *g, *gall;
    ck_assert_int_eq(sy_grid_compute(&s, NULL, NULL, &g, NULL), SY_OK);
    s.fields = 0;
    ck_assert_int_eq(sy_grid_compute(&s, NULL, NULL, &gall, NULL), SY_OK);
    for (int f = 0; f < SY_NFIELDS; f++) {
        int want = f == SY_F_C3 || f == SY_F_VINF_ARR;
        ck_assert_msg((g->field[f] != NULL) == want, "field %s", sy_field_name((sy_field)f));
        ck_assert_ptr_nonnull(gall->field[f]);
        if (want)
            ck_assert_int_eq(memcmp(g->field[f], gall->field[f], g->nx * g->ny * sizeof(float)), 0);
    }
    ck_assert_int_eq(memcmp(g->status, gall->status, g->nx * g->ny), 0);
    sy_grid_free(g);
    sy_grid_free(gall);
}
END_TEST

int main(void)
{
    Suite *s = suite_create("batch");
    TCase *tc = tcase_create("core");
    tcase_add_checked_fixture(tc, setup, teardown);
    tcase_set_timeout(tc, 300);
    tcase_add_test(tc, test_batch_vs_scalar_random);
    tcase_add_test(tc, test_lane_independence);
    tcase_add_test(tc, test_field_subsets);
    tcase_add_test(tc, test_grid_vector_vs_scalar);
    tcase_add_test(tc, test_multirev_routed_to_scalar);
    tcase_add_test(tc, test_vector_thread_determinism);
    tcase_add_test(tc, test_field_selection);
    suite_add_tcase(s, tc);
    return tu_run(s);
}
