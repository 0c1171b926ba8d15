/* check_windows.c - the opportunity scan (`synodic windows`): spacing of
 * the opportunities against the synodic periods, each optimum against a
 * dense brute-force grid, the feasible departure runs against a per-day
 * scan, thread determinism, the command line (JSON shape, atlas pages,
 * bad inputs). */
#include "config.h"
#include "synodic.h"
#include "synodic/chart.h"
#include "synodic/study.h"
#include "synodic/windows.h"
#include "testutil_cli.h"

#include <jansson.h>
#include <stdio.h>
#include <string.h>
#include <unistd.h>

static sy_catalog *cat;

static void setup(void) { cat = sy_catalog_new(); }
static void teardown(void)
{
    sy_catalog_free(cat);
    sy_chart_release_caches();
}

static const sy_body *body(const char *name)
{
    const sy_body *b = NULL;
    ck_assert_int_eq(sy_catalog_find(cat, name, &b, NULL), SY_OK);
    return b;
}

/* Mean-longitude rates, deg per Julian century: Standish, "Keplerian
 * Elements for Approximate Positions of the Major Planets" (JPL), Table 1
 * (1800-2050); transcribed here independently of src/lib/elements.c. */
#define RATE_VENUS 58517.81538729
#define RATE_EARTH 35999.37244981
#define RATE_MARS 19140.30268499
#define RATE_JUPITER 3034.74612775

/* Synodic period 1 / |1/T1 - 1/T2| from the mean motions (common
 * practice), in days. */
static double synodic_ref(double rate1, double rate2)
{
    return 360.0 / fabs(rate1 - rate2) * 36525.0;
}

/* The scan of the quick form: flight times 0.4 .. 1.6 x Hohmann, coarse
 * steps as cmd_windows picks them, no limits. */
static sy_windows *scan(const sy_body *a, const sy_body *b, int y1, int y2, int threads,
                        const sy_study *limits)
{
    sy_windows_spec sp;
    memset(&sp, 0, sizeof sp);
    sp.from = a;
    sp.to = b;
    sp.dep_start_jd = sy_jd_from_calendar(y1, 1, 1, 0, 0, 0);
    sp.dep_end_jd = sy_jd_from_calendar(y2, 12, 31, 0, 0, 0);
    double H = sy_hohmann_tof_days(a, b), T = sy_synodic_period_days(a, b);
    sp.tof_min_days = floor(0.4 * H);
    sp.tof_max_days = ceil(1.6 * H);
    sp.coarse_dep_days = fmax(1.0, fmin(5.0, floor(T / 150.0)));
    sp.coarse_tof_days = sp.coarse_dep_days *
                         fmax(1.0, nearbyint((sp.tof_max_days - sp.tof_min_days) / (100.0 * sp.coarse_dep_days)));
    sp.threads = threads;
    sy_windows *w = NULL;
    sy_error err;
    sy_status s = sy_windows_scan(&sp, limits, NULL, NULL, &w, &err);
    ck_assert_msg(s == SY_OK, "scan failed: %s", err.msg);
    return w;
}

/* Opportunities recur near the synodic period.  For each pair: the
 * library's period equals the one from the tabulated rates; per transfer
 * type, the mean spacing of the optima over 2028-2045 lies within a
 * stated tolerance of it, and every individual gap within the spread the
 * eccentricities allow.  Common practice values, from the mean motions:
 * Earth-Mars about 780 d, Earth-Venus about 584 d, Earth-Jupiter about
 * 399 d. */
static void check_spacing(const char *target, double rate, double common_days,
                          double mean_tol, double gap_tol)
{
    const sy_body *e = body("Earth"), *t = body(target);
    double Tref = synodic_ref(RATE_EARTH, rate);
    ck_assert_msg(fabs(Tref - common_days) < 1.0, "%s: %.2f vs %.0f", target, Tref, common_days);
    ck_assert_double_le(fabs(sy_synodic_period_days(e, t) - Tref), 1e-6);
    sy_windows *w = scan(e, t, 2028, 2045, 0, NULL);
    double span = w->spec.dep_end_jd - w->spec.dep_start_jd;
    /* every opportunity wholly inside the span is found, none twice */
    ck_assert_msg(w->nseasons + 1 >= (size_t)floor(span / Tref) && w->nseasons <= (size_t)ceil(span / Tref),
                  "%s: %zu opportunities in %.0f days", target, w->nseasons, span);
    for (int type = 1; type <= 2; type++) {
        double dep[64];
        int n = 0;
        for (size_t k = 0; k < w->nwindows && n < 64; k++)
            if (w->windows[k].type == type) dep[n++] = w->windows[k].best.jd_dep;
        ck_assert_msg(n >= (int)floor(span / Tref) - 1, "%s type %d: only %d", target, type, n);
        for (int k = 1; k < n; k++) {
            double gap = dep[k] - dep[k - 1];
            ck_assert_msg(fabs(gap - Tref) <= gap_tol * Tref, "%s type %d gap %d: %.1f d vs %.1f d",
                          target, type, k, gap, Tref);
        }
        double mean = (dep[n - 1] - dep[0]) / (n - 1);
        ck_assert_msg(fabs(mean - Tref) <= mean_tol * Tref, "%s type %d: mean spacing %.1f d vs %.1f d",
                      target, type, mean, Tref);
    }
    sy_windows_free(w);
}

/* Mars (e = 0.093, from memory): the optimum's phase wanders over the
 * 15-17-year cycle, individual gaps within 15% (the 2026-2045 scan of
 * check_grid.c sees 700-860 d), the mean of 7 gaps within 3%. */
START_TEST(test_spacing_mars) { check_spacing("Mars", RATE_MARS, 780.0, 0.03, 0.15); }
END_TEST
/* Venus (e = 0.007) and Earth (0.017), from memory: nearly circular;
 * gaps within 10% (the Type I/II optima move with the launch geometry),
 * mean of 11 gaps within 2%. */
START_TEST(test_spacing_venus) { check_spacing("Venus", RATE_VENUS, 584.0, 0.02, 0.10); }
END_TEST
/* Jupiter (e = 0.048, from memory): gaps within 10%, mean of 15 within 2%. */
START_TEST(test_spacing_jupiter) { check_spacing("Jupiter", RATE_JUPITER, 399.0, 0.02, 0.10); }
END_TEST

/* Every scanned optimum against a dense single-opportunity grid: 1-day
 * steps over +-40 days of departure and the whole flight-time window,
 * solved point by point with sy_transfer_compute() (the code behind
 * `synodic transfer`, not the grid engine), its minimum polished on a
 * 0.05-day grid.  The scanned optimum is no worse than the 1-day minimum
 * of its type; within 0.05 km2/s2 and 1 day (departure and arrival) of
 * the polished minimum; the 1-day nodes within a day of it come within
 * 0.05 km2/s2 of the 1-day minimum.  (The 1-day minimum's node itself
 * may lie more than a day away: basins are long valleys slanted across
 * the lattice, and near the 180-degree ridge narrower than a day.) */
START_TEST(test_optimum_vs_dense)
{
    const sy_body *e = body("Earth"), *m = body("Mars");
    sy_windows *w = scan(e, m, 2028, 2045, 0, NULL);
    ck_assert_int_ge(w->nwindows, 14);
    for (size_t k = 0; k < w->nwindows; k++) {
        const sy_window *wd = &w->windows[k];
        double d0 = floor(wd->best.jd_dep) + 0.5;
        double best = INFINITY, bd = 0, ba = 0;
        for (int a = -40; a <= 40; a++)
            for (double tof = w->spec.tof_min_days; tof <= w->spec.tof_max_days; tof += 1.0) {
                sy_transfer t;
                double dep = d0 + a;
                if (sy_transfer_compute(e, m, dep, dep + tof, 0, SY_BRANCH_LEFT, NULL, &t, NULL) != SY_OK)
                    continue;
                if (t.type == wd->type && t.c3_km2_s2 < best) {
                    best = t.c3_km2_s2;
                    bd = dep;
                    ba = dep + tof;
                }
            }
        ck_assert(isfinite(best));
        /* Near the 180-degree ridge the valley is narrower than a day:
         * polish the dense minimum by brute force on a 0.05-day grid of
         * +-1.5 days around it. */
        double fine = best, fd = bd, fa = ba;
        for (int a = -30; a <= 30; a++)
            for (int b = -30; b <= 30; b++) {
                sy_transfer t;
                double dep = bd + 0.05 * a, arr = ba + 0.05 * b;
                if (arr - dep < w->spec.tof_min_days || arr - dep > w->spec.tof_max_days) continue;
                if (sy_transfer_compute(e, m, dep, arr, 0, SY_BRANCH_LEFT, NULL, &t, NULL) != SY_OK)
                    continue;
                if (t.type == wd->type && t.c3_km2_s2 < fine) {
                    fine = t.c3_km2_s2;
                    fd = dep;
                    fa = arr;
                }
            }
        ck_assert_msg(fabs(wd->best.c3_km2_s2 - fine) <= 0.05, "window %zu: %.4f vs polished dense %.4f", k,
                      wd->best.c3_km2_s2, fine);
        ck_assert_msg(fabs(fd - wd->best.jd_dep) <= 1.0 && fabs(fa - wd->best.jd_arr) <= 1.0,
                      "window %zu: %.2f %.2f vs polished dense %.2f %.2f", k, wd->best.jd_dep,
                      wd->best.jd_arr, fd, fa);
        ck_assert_msg(wd->best.c3_km2_s2 <= best + 1e-9, "window %zu: %.4f > dense %.4f (%.2f %.2f vs %.2f %.2f)", k,
                      wd->best.c3_km2_s2, best, wd->best.jd_dep, wd->best.jd_arr, bd, ba);
        /* and the 1-day nodes around the optimum reach the 1-day minimum */
        double near = INFINITY;
        for (int a = -1; a <= 1; a++)
            for (int b = -1; b <= 1; b++) {
                double dep = floor(wd->best.jd_dep) + 0.5 + a;
                double tof = w->spec.tof_min_days + floor(wd->best.jd_arr - dep - w->spec.tof_min_days) + b;
                sy_transfer t;
                if (fabs(dep - wd->best.jd_dep) > 1.0 || fabs(dep + tof - wd->best.jd_arr) > 1.0 ||
                    tof < w->spec.tof_min_days || tof > w->spec.tof_max_days)
                    continue;
                if (sy_transfer_compute(e, m, dep, dep + tof, 0, SY_BRANCH_LEFT, NULL, &t, NULL) == SY_OK &&
                    t.type == wd->type)
                    near = fmin(near, t.c3_km2_s2);
            }
        ck_assert_msg(near - best <= 0.05, "window %zu: nodes within a day reach %.4f, dense %.4f", k, near, best);
        ck_assert_int_eq(wd->best.type, wd->type);
        ck_assert(isnan(wd->open_jd) && isnan(wd->close_jd)); /* no limits */
    }
    sy_windows_free(w);
}
END_TEST

static int meets(const sy_study *st, const sy_transfer *t)
{
    if (isfinite(st->c3_max_km2_s2) && !(t->c3_km2_s2 <= st->c3_max_km2_s2)) return 0;
    if (isfinite(st->vinf_arr_max_km_s) && !(t->vinf_arr_km_s <= st->vinf_arr_max_km_s)) return 0;
    if (isfinite(st->dla_max_deg) && !(fabs(t->dla_deg) <= st->dla_max_deg)) return 0;
    return 1;
}

/* Does departure day dep have an arrival of this type, on the scan's
 * 1-day flight-time lattice, that meets the limits? */
static int day_feasible(const sy_body *a, const sy_body *b, const sy_study *st,
                        const sy_windows *w, int type, double dep)
{
    for (double tof = w->spec.tof_min_days; tof <= w->spec.tof_max_days + 1e-9; tof += 1.0) {
        sy_transfer t;
        if (sy_transfer_compute(a, b, dep, dep + tof, 0, SY_BRANCH_LEFT, &st->orbits, &t, NULL) != SY_OK)
            continue;
        if (t.type == type && meets(st, &t)) return 1;
    }
    return 0;
}

/* Opens/closes of the example study (limits C3 <= 16, arrival v-inf <=
 * 4.5, |DLA| <= 40), over 2030-2034 to stay quick, against a brute-force
 * per-day feasibility scan with the point query: every day of the run is
 * feasible, the days just outside it are not. */
START_TEST(test_open_close_brute_force)
{
    char path[4096];
    snprintf(path, sizeof path, "%s/examples/tern-mars-decade.ini", tu_srcdir());
    const char *ovr[] = {"departure.start=2030-06-01", "departure.end=2034-06-30"};
    sy_study st;
    sy_error err;
    ck_assert_msg(sy_study_load(path, ovr, 2, &st, &err) == SY_OK, "%s", err.msg);
    const sy_body *e = body("Earth"), *m = body("Mars");
    sy_windows_spec sp;
    ck_assert_int_eq(sy_windows_spec_from_study(&st, e, m, &sp, &err), SY_OK);
    sy_windows *w = NULL;
    ck_assert_msg(sy_windows_scan(&sp, &st, NULL, NULL, &w, &err) == SY_OK, "%s", err.msg);
    ck_assert(w->has_limits);
    ck_assert_int_eq(w->nseasons, 2); /* 2031 and 2033 */
    int runs = 0;
    for (size_t k = 0; k < w->nwindows; k++) {
        const sy_window *wd = &w->windows[k];
        if (!wd->within_limits) continue;
        ck_assert(meets(&st, &wd->best));
        ck_assert(isfinite(wd->open_jd) && isfinite(wd->close_jd));
        ck_assert_double_le(wd->open_jd, wd->best.jd_dep + 0.5);
        ck_assert_double_ge(wd->close_jd, wd->best.jd_dep - 0.5);
        /* on the scan's day lattice */
        ck_assert_double_eq_tol(fmod(wd->open_jd - sp.dep_start_jd, 1.0), 0.0, 1e-9);
        for (double d = wd->open_jd; d <= wd->close_jd + 1e-9; d += 1.0)
            ck_assert_msg(day_feasible(e, m, &st, w, wd->type, d), "window %zu: day %.1f inside the run is not feasible", k, d);
        if (!wd->open_at_edge)
            ck_assert_msg(!day_feasible(e, m, &st, w, wd->type, wd->open_jd - 1.0), "window %zu: the day before opening is feasible", k);
        if (!wd->close_at_edge)
            ck_assert_msg(!day_feasible(e, m, &st, w, wd->type, wd->close_jd + 1.0), "window %zu: the day after closing is feasible", k);
        runs++;
    }
    ck_assert_int_ge(runs, 3);
    sy_windows_free(w);
}
END_TEST

/* Same scan, 1 and 2 threads: identical results. */
START_TEST(test_thread_determinism)
{
    const sy_body *e = body("Earth"), *v = body("Venus");
    sy_windows *a = scan(e, v, 2030, 2036, 1, NULL), *b = scan(e, v, 2030, 2036, 2, NULL);
    ck_assert_int_eq(a->nwindows, b->nwindows);
    ck_assert_int_eq(a->nseasons, b->nseasons);
    for (size_t k = 0; k < a->nwindows; k++) {
        ck_assert_int_eq(a->windows[k].type, b->windows[k].type);
        ck_assert(a->windows[k].best.jd_dep == b->windows[k].best.jd_dep);
        ck_assert(a->windows[k].best.jd_arr == b->windows[k].best.jd_arr);
        ck_assert(a->windows[k].best.c3_km2_s2 == b->windows[k].best.c3_km2_s2);
    }
    sy_windows_free(a);
    sy_windows_free(b);
}
END_TEST

/* ---- command line ---------------------------------------------------- */

/* The --json contract of the quick form, exactly. */
START_TEST(test_cli_json_shape)
{
    tu_run_result r = tu_run_synodic("windows earth venus 2030 2034 --json");
    ck_assert_msg(r.status == 0, "exit %d: %s", r.status, r.err);
    ck_assert_str_eq(r.err, "");
    json_error_t je;
    json_t *j = json_loads(r.out, 0, &je);
    ck_assert_msg(j && json_is_object(j), "not JSON: %s", r.out);
    ck_assert_int_eq(json_object_size(j), 1);
    json_t *arr = json_object_get(j, "opportunities");
    ck_assert(json_is_array(arr));
    /* 5 years / 1.6 years: 3 opportunities of each type */
    ck_assert_int_ge(json_array_size(arr), 5);
    static const char *keys[] = {"type", "departure_jd", "arrival_jd", "tof_days", "c3_km2_s2",
                                 "vinf_arr_km_s", "dla_deg", "open_jd", "close_jd"};
    for (size_t k = 0; k < json_array_size(arr); k++) {
        json_t *o = json_array_get(arr, k);
        ck_assert_int_eq(json_object_size(o), 9);
        for (size_t q = 0; q < 9; q++) ck_assert_msg(json_object_get(o, keys[q]), "missing %s", keys[q]);
        const char *t = json_string_value(json_object_get(o, "type"));
        ck_assert(t && (strcmp(t, "I") == 0 || strcmp(t, "II") == 0));
        for (size_t q = 1; q < 7; q++) ck_assert(json_is_number(json_object_get(o, keys[q])));
        ck_assert(json_is_null(json_object_get(o, "open_jd")));
        ck_assert(json_is_null(json_object_get(o, "close_jd")));
        double dep = json_number_value(json_object_get(o, "departure_jd"));
        double arrv = json_number_value(json_object_get(o, "arrival_jd"));
        double tof = json_number_value(json_object_get(o, "tof_days"));
        ck_assert_double_le(fabs(arrv - dep - tof), 0.011);
        /* Earth-Venus C3 minima are of order 6-16 km2/s2 (common practice) */
        double c3 = json_number_value(json_object_get(o, "c3_km2_s2"));
        ck_assert(c3 > 3 && c3 < 25);
    }
    json_decref(j);
    tu_run_free(&r);
}
END_TEST

/* The atlas has a cover page (the table fits one page here) and one
 * page per opportunity, counted by pdfinfo (poppler-utils). */
START_TEST(test_atlas_pages)
{
    char dir[] = "/tmp/sy_winatlasXXXXXX";
    ck_assert_ptr_nonnull(mkdtemp(dir));
    char args[512];
    snprintf(args, sizeof args, "windows earth mars 2030 2034 -o %s", dir);
    tu_run_result r = tu_run_synodic(args);
    ck_assert_msg(r.status == 0, "exit %d: %s", r.status, r.err);
    tu_run_free(&r);
    char path[1024];
    snprintf(path, sizeof path, "%s/earth-mars-2030-2034.json", dir);
    json_error_t je;
    json_t *j = json_load_file(path, 0, &je);
    ck_assert_ptr_nonnull(j);
    json_t *arr = json_object_get(j, "opportunities");
    json_int_t nopp = 0;
    for (size_t k = 0; k < json_array_size(arr); k++) {
        json_int_t o = json_integer_value(json_object_get(json_array_get(arr, k), "opportunity"));
        if (o > nopp) nopp = o;
    }
    json_decref(j);
    ck_assert_int_eq(nopp, 2); /* 2031 and 2033 */
    char cmd[1024];
    snprintf(cmd, sizeof cmd, "pdfinfo '%s/earth-mars-2030-2034-atlas.pdf' | sed -n 's/^Pages: *//p'", dir);
    r = tu_run_shell(cmd);
    ck_assert_msg(r.status == 0, "pdfinfo failed: %s", r.err);
    ck_assert_msg(atoi(r.out) == (int)nopp + 1, "pdfinfo says '%s' pages (stderr: %s), want %d", r.out, r.err, (int)nopp + 1);
    tu_run_free(&r);
    for (int k = 1; k <= (int)nopp; k++) {
        snprintf(path, sizeof path, "%s/earth-mars-2030-2034-%02d.png", dir, k);
        ck_assert_msg(access(path, R_OK) == 0, "missing %s", path);
    }
    snprintf(cmd, sizeof cmd, "rm -rf '%s'", dir);
    ck_assert_int_eq(system(cmd), 0);
}
END_TEST

/* Bad inputs: one line "synodic: error: ...", non-zero exit, nothing on
 * stdout. */
static void expect_error(const char *args, int code, const char *needle)
{
    tu_run_result r = tu_run_synodic(args);
    ck_assert_msg(r.status == code, "%s: exit %d (want %d): %s", args, r.status, code, r.err);
    ck_assert_msg(r.out[0] == '\0', "%s: stdout not empty: %s", args, r.out);
    ck_assert_msg(strncmp(r.err, "synodic: error: ", 16) == 0, "%s: %s", args, r.err);
    char *nl = strchr(r.err, '\n');
    ck_assert_msg(nl && nl[1] == '\0', "%s: not one line: %s", args, r.err);
    ck_assert_msg(strstr(r.err, needle), "%s: '%s' not in %s", args, needle, r.err);
    tu_run_free(&r);
}

START_TEST(test_cli_bad_inputs)
{
    expect_error("windows earth mars 2045 2028", 3, "after LAST_YEAR");
    expect_error("windows earth mars 1800 2099", 3, "at most 200 years");
    expect_error("windows earth marz 2028 2045", 3, "marz");
    expect_error("windows earth mars 2028 2045 --tof-min 300 --tof-max 200", 3, "not larger");
    expect_error("windows earth mars 2028 2045 --tof-min 300 --tof-max 300 --json", 3, "not larger");
    expect_error("windows earth mars 2028", 2, "expected STUDY");
    expect_error("windows earth mars 2028 2045 --frobnicate", 2, "unknown option");
    /* a study with an arrival window cannot recur across the years */
    expect_error("windows examples/tern-mars-2033.ini -o /tmp", 3, "[flight]");
}
END_TEST

int main(void)
{
    Suite *s = suite_create("windows");
    TCase *tc = tcase_create("scan");
    tcase_add_checked_fixture(tc, setup, teardown);
    tcase_set_timeout(tc, 600);
    tcase_add_test(tc, test_spacing_mars);
    tcase_add_test(tc, test_spacing_venus);
    tcase_add_test(tc, test_spacing_jupiter);
    tcase_add_test(tc, test_optimum_vs_dense);
    tcase_add_test(tc, test_open_close_brute_force);
    tcase_add_test(tc, test_thread_determinism);
    suite_add_tcase(s, tc);
    TCase *cli = tcase_create("cli");
    tcase_add_checked_fixture(cli, setup, teardown);
    tcase_set_timeout(cli, 600);
    tcase_add_test(cli, test_cli_json_shape);
    tcase_add_test(cli, test_atlas_pages);
    tcase_add_test(cli, test_cli_bad_inputs);
    suite_add_tcase(s, cli);
    return tu_run(s);
}
