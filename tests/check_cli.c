/* check_cli.c - the command line: JSON contract and bad-input handling.
 * Runs the built `synodic` (path in $SYNODIC_BIN) as a user would. */
#include "config.h"
#include "synodic.h"
#include "testutil_cli.h"

#include <jansson.h>
#include <stdio.h>
#include <string.h>
#include <unistd.h>

START_TEST(test_state_json)
{
    tu_run_result r = tu_run_synodic("state mars 2033-04-10 --json");
    ck_assert_msg(r.status == 0, "exit %d: %s", r.status, r.err);
    json_t *j = tu_parse_json(r.out);
    tu_expect_string(j, "body", "Mars");
    tu_expect_number(j, "jd_tdb");
    ck_assert_double_eq(json_number_value(json_object_get(j, "jd_tdb")), 2463697.5);
    tu_expect_string(j, "frame", "ecliptic-j2000");
    tu_expect_string(j, "center", "sun");
    tu_expect_vec3(j, "r_km");
    tu_expect_vec3(j, "v_km_s");
    double rn = 0;
    for (int k = 0; k < 3; k++) {
        double x = json_number_value(json_array_get(json_object_get(j, "r_km"), k));
        rn += x * x;
    }
    rn = sqrt(rn) / SY_AU_KM;
    /* Mars stays between perihelion 1.381 and aphelion 1.666 AU
     * (a = 1.5237 AU, e = 0.0934 from the mean elements). */
    ck_assert(rn > 1.38 && rn < 1.67);
    json_decref(j);
    tu_run_free(&r);

    r = tu_run_synodic("state Earth JD2451545.0 --frame equatorial --json");
    ck_assert_int_eq(r.status, 0);
    j = tu_parse_json(r.out);
    tu_expect_string(j, "frame", "eme2000");
    tu_expect_string(j, "body", "Earth");
    json_decref(j);
    tu_run_free(&r);
}
END_TEST

START_TEST(test_lambert_json)
{
    /* Vallado's Lambert example (from memory, see check_lambert.c). */
    tu_run_result r = tu_run_synodic("lambert --r1 15945.34,0,0 --r2 12214.83899,10249.46731,0 "
                                     "--tof 4560 --mu 398600.4418 --json");
    ck_assert_msg(r.status == 0, "exit %d: %s", r.status, r.err);
    json_t *j = tu_parse_json(r.out);
    tu_expect_vec3(j, "v1_km_s");
    tu_expect_vec3(j, "v2_km_s");
    tu_expect_number(j, "revs");
    tu_expect_number(j, "iterations");
    tu_expect_string(j, "branch", NULL);
    double v1x = json_number_value(json_array_get(json_object_get(j, "v1_km_s"), 0));
    ck_assert_double_eq_tol(v1x, 2.058913, 2e-5);
    json_decref(j);
    tu_run_free(&r);

    r = tu_run_synodic("lambert --r1 1.5e8,0,0 --r2 0,2.2e8,1e6 --tof 9e7 --revs 1 --branch right --json");
    ck_assert_msg(r.status == 0, "exit %d: %s", r.status, r.err);
    j = tu_parse_json(r.out);
    tu_expect_string(j, "branch", "right");
    ck_assert_int_eq(json_integer_value(json_object_get(j, "revs")), 1);
    json_decref(j);
    tu_run_free(&r);
}
END_TEST

START_TEST(test_transfer_json)
{
    tu_run_result r = tu_run_synodic("transfer earth mars 2033-04-20 2033-11-01 --json");
    ck_assert_msg(r.status == 0, "exit %d: %s", r.status, r.err);
    json_t *j = tu_parse_json(r.out);
    const char *nums[] = {"c3_km2_s2", "vinf_dep_km_s", "dla_deg", "rla_deg", "vinf_arr_km_s",
                          "c3_arr_km2_s2", "dap_deg", "rap_deg", "tof_days",
                          "transfer_angle_deg", "min_sun_dist_au"};
    for (size_t i = 0; i < sizeof nums / sizeof nums[0]; i++) tu_expect_number(j, nums[i]);
    tu_expect_vec3(j, "v1_km_s");
    tu_expect_vec3(j, "v2_km_s");
    tu_expect_string(j, "type", "I");
    ck_assert_ptr_null(json_object_get(j, "dv_dep_km_s"));
    ck_assert_double_eq_tol(json_number_value(json_object_get(j, "tof_days")), 195.0, 1e-9);
    json_decref(j);
    tu_run_free(&r);

    r = tu_run_synodic("transfer Earth Mars 2033-04-20 2033-11-01 --park-alt 200 "
                       "--capture-peri 400 --capture-apo 33793 --entry-alt 125 --json");
    ck_assert_msg(r.status == 0, "exit %d: %s", r.status, r.err);
    j = tu_parse_json(r.out);
    tu_expect_number(j, "dv_dep_km_s");
    tu_expect_number(j, "dv_cap_km_s");
    tu_expect_number(j, "dv_total_km_s");
    tu_expect_number(j, "v_entry_km_s");
    json_decref(j);
    tu_run_free(&r);
}
END_TEST

START_TEST(test_tables_and_help)
{
    const char *cmds[] = {"bodies --help", "state --help", "lambert --help",
                          "transfer --help", "chart --help", "--help", "help transfer"};
    for (size_t i = 0; i < sizeof cmds / sizeof cmds[0]; i++) {
        tu_run_result r = tu_run_synodic(cmds[i]);
        ck_assert_msg(r.status == 0, "%s: exit %d", cmds[i], r.status);
        ck_assert_msg(strstr(r.out, "usage:") != NULL, "%s: no usage", cmds[i]);
        tu_run_free(&r);
    }
    tu_run_result r = tu_run_synodic("--version");
    ck_assert_int_eq(r.status, 0);
    ck_assert_ptr_nonnull(strstr(r.out, "synodic "));
    tu_run_free(&r);

    r = tu_run_synodic("bodies");
    ck_assert_int_eq(r.status, 0);
    const char *names[] = {"Mercury", "Venus", "Earth", "Mars", "Jupiter", "Saturn",
                           "Uranus", "Neptune", "Pluto"};
    for (size_t i = 0; i < 9; i++) ck_assert_ptr_nonnull(strstr(r.out, names[i]));
    tu_run_free(&r);

    r = tu_run_synodic("bodies --bodies share/synodic/demo-bodies.ini --json");
    ck_assert_msg(r.status == 0, "exit %d: %s", r.status, r.err);
    json_t *j = tu_parse_json(r.out);
    ck_assert_int_ge(json_array_size(json_object_get(j, "bodies")), 10);
    json_decref(j);
    tu_run_free(&r);

    r = tu_run_synodic("transfer earth mars 2033-04-20 2033-11-01");
    ck_assert_int_eq(r.status, 0);
    ck_assert_ptr_nonnull(strstr(r.out, "C3"));
    ck_assert_ptr_nonnull(strstr(r.out, "DLA"));
    ck_assert_ptr_nonnull(strstr(r.out, "Preliminary"));
    tu_run_free(&r);
}
END_TEST

/* Every bad input: one line "synodic: error: ..." naming the problem, a
 * non-zero exit, nothing on stdout, no crash. */
START_TEST(test_bad_inputs)
{
    static const struct { const char *args, *needle; int code; } bad[] = {
        {"state Marz 2033-04-10", "unknown body 'Marz'", 3},
        {"transfer earth vulcan 2033-04-20 2033-11-01", "vulcan", 3},
        {"state mars 2033-02-30", "day 30", 3},
        {"state mars 2033-13-01", "month 13", 3},
        {"transfer earth mars 2033-11-01 2033-04-20", "not after departure", 3},
        {"transfer earth mars 2033-04-20 2033-04-20", "not after departure", 3},
        {"lambert --r1 1e8,0,0 --r2 0,1e8,0 --tof -5", "--tof", 3},
        {"lambert --r1 1e8,0,0 --r2 0,1e8,0 --tof abc", "--tof", 3},
        {"lambert --r1 1e8,0,0 --r2 0,1e8,0 --tof 0", "--tof", 3},
        {"lambert --r1 0,0,0 --r2 0,1e8,0 --tof 1e6", "--r1", 3},
        {"lambert --r1 1e8,0 --r2 0,1e8,0 --tof 1e6", "--r1", 3},
        {"lambert --r1 1e8,0,0 --r2 0,1e8,0", "--tof", 2},
        {"lambert --r1 1e8,0,0 --r2 -1e8,0,0 --tof 1e7", "collinear", 3},
        {"lambert --r1 1e8,0,0 --r2 0,1e8,0 --tof 1e5 --revs 1 --branch left", "minimum", 4},
        {"state mars 2033-04-10 --colour red", "unknown option '--colour'", 2},
        {"transfer earth mars 2033-04-20 2033-11-01 --frobnicate", "--frobnicate", 2},
        {"state mars 2033-04-10 --frame galactic", "galactic", 3},
        {"state mars 3500-01-01", "outside the validity", 3},
        {"state", "expected BODY and DATE", 2},
        {"orbit mars", "unknown command 'orbit'", 2},
        {"transfer earth mars 2033-04-20 2034-11-01 --revs 1", "--branch", 2},
        {"transfer earth mars 2033-04-20 2033-11-01 --park-alt -10", "parking", 3},
        {"state mars 2033-04-10 --bodies /nonexistent/bodies.ini", "/nonexistent/bodies.ini", 5},
    };
    for (size_t i = 0; i < sizeof bad / sizeof bad[0]; i++) {
        tu_run_result r = tu_run_synodic(bad[i].args);
        ck_assert_msg(r.status == bad[i].code, "'%s': exit %d (want %d), stderr: %s",
                      bad[i].args, r.status, bad[i].code, r.err);
        ck_assert_msg(r.out[0] == '\0', "'%s': stdout not empty: %s", bad[i].args, r.out);
        ck_assert_msg(strncmp(r.err, "synodic: error: ", 16) == 0, "'%s': stderr '%s'", bad[i].args, r.err);
        char *nl = strchr(r.err, '\n');
        ck_assert_msg(nl && nl[1] == '\0', "'%s': not one line: %s", bad[i].args, r.err);
        ck_assert_msg(strstr(r.err, bad[i].needle) != NULL, "'%s': '%s' lacks '%s'",
                      bad[i].args, r.err, bad[i].needle);
        tu_run_free(&r);
    }
}
END_TEST

static int same_file(const char *a, const char *b)
{
    char *x = tu_slurp(a), *y = tu_slurp(b);
    int same = strlen(x) > 0 && strcmp(x, y) == 0;
    free(x);
    free(y);
    return same;
}

static int exists(const char *path)
{
    return access(path, F_OK) == 0;
}

/* `synodic chart` on the Mars example: every output written, the optimum
 * printed, and the same bytes for 1 and 2 threads (CSV, SVG, JSON). */
START_TEST(test_chart_outputs)
{
    char dir[] = "/tmp/sy_chartXXXXXX";
    ck_assert_ptr_nonnull(mkdtemp(dir));
    char args[1024], p1[1200], p2[1200];
    snprintf(args, sizeof args, "chart examples/tern-mars-2033.ini -o %s/t1 --threads 1 "
             "--set departure.step_days=3 --set arrival.step_days=3", dir);
    tu_run_result r = tu_run_synodic(args);
    ck_assert_msg(r.status == 0, "exit %d: %s", r.status, r.err);
    ck_assert_ptr_nonnull(strstr(r.out, "minimum c3"));
    ck_assert_ptr_nonnull(strstr(r.out, "wrote"));
    ck_assert_ptr_nonnull(strstr(r.out, "Preliminary"));
    tu_run_free(&r);
    snprintf(args, sizeof args, "chart examples/tern-mars-2033.ini -o %s/t2 --threads 2 "
             "--set departure.step_days=3 --set arrival.step_days=3 --quiet", dir);
    r = tu_run_synodic(args);
    ck_assert_msg(r.status == 0, "exit %d: %s", r.status, r.err);
    ck_assert_str_eq(r.out, "");
    tu_run_free(&r);
    const char *ext[] = {"png", "svg", "pdf", "csv", "json"};
    for (int k = 0; k < 5; k++) {
        snprintf(p1, sizeof p1, "%s/t1/tern-mars-2033.%s", dir, ext[k]);
        snprintf(p2, sizeof p2, "%s/t2/tern-mars-2033.%s", dir, ext[k]);
        ck_assert_msg(exists(p1) && exists(p2), "missing %s", p1);
        if (k == 1 || k == 3 || k == 4)
            ck_assert_msg(same_file(p1, p2), "%s differs between thread counts", ext[k]);
    }
    snprintf(p1, sizeof p1, "%s/t1/tern-mars-2033.json", dir);
    char *text = tu_slurp(p1);
    json_t *j = tu_parse_json(text);
    free(text);
    json_t *opt = json_object_get(j, "optima");
    ck_assert(json_is_array(opt) && json_array_size(opt) >= 2);
    json_t *o0 = json_array_get(opt, 0);
    tu_expect_string(o0, "minimum_of", "c3_km2_s2");
    tu_expect_number(o0, "c3_km2_s2");
    tu_expect_number(o0, "departure_jd");
    /* the study's limits hold at the reported optimum */
    ck_assert_double_le(json_number_value(json_object_get(o0, "c3_km2_s2")), 20.0);
    ck_assert_double_le(fabs(json_number_value(json_object_get(o0, "dla_deg"))), 28.5);
    ck_assert_double_le(json_number_value(json_object_get(o0, "vinf_arr_km_s")), 4.5);
    ck_assert_ptr_nonnull(json_object_get(json_object_get(j, "model"), "caution"));
    /* at_grid_edge names the first departure exactly when an optimum
     * departs within 0.01 day of the grid's first departure; the printed
     * summary says so for the same optima */
    double dep0 = json_number_value(json_object_get(json_object_get(j, "grid"), "departure_start_jd"));
    int on_edge = 0;
    for (size_t k = 0; k < json_array_size(opt); k++) {
        json_t *ok = json_array_get(opt, k), *ed = json_object_get(ok, "at_grid_edge");
        if (!json_is_true(json_object_get(ok, "found"))) continue;
        ck_assert_msg(json_is_array(ed), "optimum %zu: no at_grid_edge array", k);
        int first = 0;
        for (size_t q = 0; q < json_array_size(ed); q++)
            first |= strcmp(json_string_value(json_array_get(ed, q)), "departure_first") == 0;
        double d = json_number_value(json_object_get(ok, "departure_jd"));
        ck_assert_msg(first == (fabs(d - dep0) <= 0.01), "optimum %zu departs %.3f, grid %.3f", k, d, dep0);
        on_edge += first;
    }
    /* the demo's minimum arrival v-infinity is held by its first departure */
    ck_assert_int_ge(on_edge, 1);
    ck_assert_uint_eq(json_array_size(json_object_get(o0, "at_grid_edge")), 0);
    json_decref(j);
    snprintf(args, sizeof args, "chart examples/tern-mars-2033.ini -o %s/t3 --threads 1 "
             "--set departure.step_days=3 --set arrival.step_days=3 --format json", dir);
    r = tu_run_synodic(args);
    ck_assert_msg(r.status == 0, "exit %d: %s", r.status, r.err);
    ck_assert_ptr_nonnull(strstr(r.out, "at the grid's edge (first departure)"));
    tu_run_free(&r);
    snprintf(args, sizeof args, "rm -rf '%s'", dir);
    ck_assert_int_eq(system(args), 0);
}
END_TEST

/* Study-file and output errors through the command line. */
START_TEST(test_chart_errors)
{
    char dir[] = "/tmp/sy_charterrXXXXXX";
    ck_assert_ptr_nonnull(mkdtemp(dir));
    char args[1024], path[1200];
    snprintf(path, sizeof path, "%s/bad.ini", dir);
    FILE *f = fopen(path, "w");
    fputs("[study]\ntitle = x\n[transfer]\norigin = earth\ntarget = mars\n"
          "[departure]\nstart = 2033-02-15\nend = 2033-03-15\nstep_days = 2\n"
          "[arrival]\nstart = 2033-08-01\nend = 2033-12-01\nstep_days = 2\n"
          "[limits]\nc3max = 20\n", f);
    fclose(f);
    static const struct { const char *fmt, *needle; int code; } cases[] = {
        {"chart %s/bad.ini -o %s", "c3max", 3},
        {"chart %s/missing.ini -o %s", "missing.ini", 5},
        {"chart examples/tern-mars-2033.ini -o %s/no/such/dir", "no/such", 5},
        {"chart examples/tern-mars-2033.ini --set transfer.target=vulcan -o %s", "vulcan", 3},
        {"chart examples/tern-mars-2033.ini --set limits.c3_max_km2_s2=abc -o %s", "--set", 3},
        {"chart examples/tern-mars-2033.ini --format png,gif -o %s", "gif", 3},
        {"chart examples/tern-mars-2033.ini --threads 0 -o %s", "--threads", 3},
        {"chart -o %s", "STUDY", 2},
    };
    for (size_t k = 0; k < sizeof cases / sizeof cases[0]; k++) {
        if (strstr(cases[k].fmt, "%s/bad") || strstr(cases[k].fmt, "%s/missing"))
            snprintf(args, sizeof args, cases[k].fmt, dir, dir);
        else
            snprintf(args, sizeof args, cases[k].fmt, dir);
        tu_run_result r = tu_run_synodic(args);
        ck_assert_msg(r.status == cases[k].code, "'%s': exit %d (want %d): %s", args, r.status,
                      cases[k].code, r.err);
        ck_assert_msg(r.out[0] == '\0', "'%s': stdout %s", args, r.out);
        ck_assert_msg(strncmp(r.err, "synodic: error: ", 16) == 0, "'%s': %s", args, r.err);
        ck_assert_msg(strstr(r.err, cases[k].needle), "'%s': '%s' lacks '%s'", args, r.err, cases[k].needle);
        tu_run_free(&r);
    }
    /* nothing but the bad study file was left in the directory */
    snprintf(args, sizeof args, "test \"$(ls -A '%s')\" = bad.ini", dir);
    ck_assert_int_eq(system(args), 0);
    snprintf(args, sizeof args, "rm -rf '%s'", dir);
    ck_assert_int_eq(system(args), 0);
}
END_TEST

int main(void)
{
    Suite *s = suite_create("command line");
    TCase *tc = tcase_create("core");
    tcase_set_timeout(tc, 120);
    tcase_add_test(tc, test_state_json);
    tcase_add_test(tc, test_lambert_json);
    tcase_add_test(tc, test_transfer_json);
    tcase_add_test(tc, test_tables_and_help);
    tcase_add_test(tc, test_bad_inputs);
    tcase_add_test(tc, test_chart_outputs);
    tcase_add_test(tc, test_chart_errors);
    suite_add_tcase(s, tc);
    return tu_run(s);
}
