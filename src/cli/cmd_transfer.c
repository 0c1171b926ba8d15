/* cmd_transfer.c - `synodic transfer`: figures of one transfer. */
#include "config.h"
#include "cli.h"

#include <getopt.h>
#include <math.h>

void usage_transfer(FILE *out)
{
    fprintf(out,
            "usage: synodic transfer FROM TO DEPART ARRIVE [--revs N --branch left|right]\n"
            "                        [--park-alt KM] [--capture-peri KM --capture-apo KM]\n"
            "                        [--entry-alt KM] [--bodies FILE] [--json]\n\n"
            "Launch and arrival figures of the transfer leaving FROM at DEPART and\n"
            "reaching TO at ARRIVE (dates in TDB): C3, v-infinity, DLA/RLA and\n"
            "DAP/RAP (EME2000), time of flight, transfer angle and type.\n\n"
            "  --revs N           complete revolutions (default 0); needs --branch\n"
            "  --branch B         left or right multi-revolution solution\n"
            "  --park-alt KM      departure delta-v from a circular parking orbit\n"
            "  --capture-peri KM  capture delta-v into an orbit of this periapsis\n"
            "  --capture-apo KM   ... and this apoapsis altitude (default: periapsis)\n"
            "  --entry-alt KM     atmospheric entry speed at this interface altitude\n"
            "  --bodies FILE      small bodies defined in FILE\n"
            "  --json             print JSON instead of a table\n"
            "  --help             show this help\n\n"
            "Preliminary two-body, patched-conic, mean-element figures; confirm them\n"
            "with high-fidelity ephemerides and the responsible authorities.\n");
}

int cmd_transfer(int argc, char **argv)
{
    static const struct option longopts[] = {
        {"revs", required_argument, NULL, 'n'},
        {"branch", required_argument, NULL, 'B'},
        {"park-alt", required_argument, NULL, 'p'},
        {"capture-peri", required_argument, NULL, 'q'},
        {"capture-apo", required_argument, NULL, 'Q'},
        {"entry-alt", required_argument, NULL, 'e'},
        {"bodies", required_argument, NULL, 'b'},
        {"json", no_argument, NULL, 'j'},
        {"help", no_argument, NULL, 'h'},
        {NULL, 0, NULL, 0}};
    sy_transfer_opts o = {0};
    const char *bodies = NULL;
    int revs = 0, json = 0, haveb = 0, have_apo = 0, c, rc;
    sy_branch branch = SY_BRANCH_LEFT;
    opterr = 0;
    while ((c = getopt_long(argc, argv, ":", longopts, NULL)) != -1) {
        switch (c) {
        case 'n': if ((rc = cli_parse_int("--revs", optarg, 0, 1000, &revs))) return rc; break;
        case 'B': if ((rc = cli_parse_branch(optarg, &branch))) return rc; haveb = 1; break;
        case 'p': if ((rc = cli_parse_double("--park-alt", optarg, &o.park_alt_km))) return rc; o.want_park = 1; break;
        case 'q': if ((rc = cli_parse_double("--capture-peri", optarg, &o.capture_peri_km))) return rc; o.want_capture = 1; break;
        case 'Q': if ((rc = cli_parse_double("--capture-apo", optarg, &o.capture_apo_km))) return rc; have_apo = 1; break;
        case 'e': if ((rc = cli_parse_double("--entry-alt", optarg, &o.entry_alt_km))) return rc; o.want_entry = 1; break;
        case 'b': bodies = optarg; break;
        case 'j': json = 1; break;
        case 'h': usage_transfer(stdout); return CLI_EXIT_OK;
        default: return cli_bad_option("transfer", c, argv[optind - 1]);
        }
    }
    if (argc - optind != 4)
        return cli_error(CLI_EXIT_USAGE, "transfer: expected FROM TO DEPART ARRIVE, got %d argument(s); see 'synodic transfer --help'", argc - optind);
    if (have_apo && !o.want_capture)
        return cli_error(CLI_EXIT_USAGE, "transfer: --capture-apo needs --capture-peri");
    if (o.want_capture && !have_apo) o.capture_apo_km = o.capture_peri_km;
    if (revs > 0 && !haveb)
        return cli_error(CLI_EXIT_USAGE, "transfer: --revs %d has two solutions; choose one with --branch left or --branch right", revs);
    double jd_dep, jd_arr;
    if ((rc = cli_parse_date("DEPART", argv[optind + 2], &jd_dep))) return rc;
    if ((rc = cli_parse_date("ARRIVE", argv[optind + 3], &jd_arr))) return rc;
    sy_catalog *cat;
    if ((rc = cli_catalog(bodies, &cat))) return rc;
    const sy_body *from, *to;
    if ((rc = cli_find_body(cat, argv[optind], &from)) ||
        (rc = cli_find_body(cat, argv[optind + 1], &to))) {
        sy_catalog_free(cat);
        return rc;
    }
    sy_transfer t;
    sy_error err;
    sy_status st = sy_transfer_compute(from, to, jd_dep, jd_arr, revs, branch, &o, &t, &err);
    if (st != SY_OK) {
        sy_catalog_free(cat);
        return cli_error(cli_exit_for(st), "%s", err.msg);
    }
    if (json) {
        json_t *j = json_pack(
            "{s:s,s:s,s:f,s:f,s:f,s:f,s:f,s:f,s:f,s:f,s:f,s:f,s:f,s:f,s:s,s:i,s:o,s:o,s:o,s:o,s:f}",
            "from", from->name, "to", to->name, "departure_jd", jd_dep, "arrival_jd", jd_arr,
            "c3_km2_s2", t.c3_km2_s2, "vinf_dep_km_s", t.vinf_dep_km_s,
            "dla_deg", t.dla_deg, "rla_deg", t.rla_deg,
            "vinf_arr_km_s", t.vinf_arr_km_s, "c3_arr_km2_s2", t.c3_arr_km2_s2,
            "dap_deg", t.dap_deg, "rap_deg", t.rap_deg, "tof_days", t.tof_days,
            "transfer_angle_deg", t.transfer_angle_deg,
            "type", t.type == 1 ? "I" : "II", "revs", revs,
            "v1_km_s", cli_json_vec3(t.v1_km_s), "v2_km_s", cli_json_vec3(t.v2_km_s),
            "vinf_dep_vec_km_s", cli_json_vec3(t.vinf_dep_vec_km_s),
            "vinf_arr_vec_km_s", cli_json_vec3(t.vinf_arr_vec_km_s),
            "min_sun_dist_au", t.min_sun_dist_au);
        if (revs > 0) json_object_set_new(j, "branch", json_string(branch == SY_BRANCH_LEFT ? "left" : "right"));
        if (o.want_park) {
            json_object_set_new(j, "park_alt_km", json_real(o.park_alt_km));
            json_object_set_new(j, "dv_dep_km_s", json_real(t.dv_dep_km_s));
        }
        if (o.want_capture) {
            json_object_set_new(j, "capture_peri_km", json_real(o.capture_peri_km));
            json_object_set_new(j, "capture_apo_km", json_real(o.capture_apo_km));
            json_object_set_new(j, "dv_cap_km_s", json_real(t.dv_cap_km_s));
        }
        if (o.want_park && o.want_capture)
            json_object_set_new(j, "dv_total_km_s", json_real(t.dv_total_km_s));
        if (o.want_entry) {
            json_object_set_new(j, "entry_alt_km", json_real(o.entry_alt_km));
            json_object_set_new(j, "v_entry_km_s", json_real(t.v_entry_km_s));
        }
        sy_catalog_free(cat);
        return cli_print_json(j);
    }
    char d1[40], d2[40];
    sy_date_format(jd_dep, 1, d1, sizeof d1);
    sy_date_format(jd_arr, 1, d2, sizeof d2);
    printf("%s -> %s\n", from->name, to->name);
    printf("  departure            %s TDB  (JD %.4f)\n", d1, jd_dep);
    printf("  arrival              %s TDB  (JD %.4f)\n", d2, jd_arr);
    printf("  time of flight       %10.3f  days\n", t.tof_days);
    printf("  transfer angle       %10.3f  deg   Type %s", t.transfer_angle_deg, t.type == 1 ? "I" : "II");
    if (revs > 0) printf(", %d rev, %s branch", revs, branch == SY_BRANCH_LEFT ? "left" : "right");
    printf("\n");
    printf("  C3                   %10.3f  km2/s2\n", t.c3_km2_s2);
    printf("  v-inf departure      %10.4f  km/s\n", t.vinf_dep_km_s);
    printf("  DLA                  %10.3f  deg   (EME2000)\n", t.dla_deg);
    printf("  RLA                  %10.3f  deg   (EME2000)\n", t.rla_deg);
    printf("  v-inf arrival        %10.4f  km/s\n", t.vinf_arr_km_s);
    printf("  arrival C3           %10.3f  km2/s2\n", t.c3_arr_km2_s2);
    printf("  DAP                  %10.3f  deg   (EME2000)\n", t.dap_deg);
    printf("  RAP                  %10.3f  deg   (EME2000)\n", t.rap_deg);
    printf("  min. Sun distance    %10.4f  AU\n", t.min_sun_dist_au);
    if (o.want_park)
        printf("  departure dv         %10.4f  km/s  (from %.0f km circular orbit)\n", t.dv_dep_km_s, o.park_alt_km);
    if (o.want_capture)
        printf("  capture dv           %10.4f  km/s  (into %.0f x %.0f km orbit)\n", t.dv_cap_km_s, o.capture_peri_km, o.capture_apo_km);
    if (o.want_park && o.want_capture)
        printf("  total dv             %10.4f  km/s\n", t.dv_total_km_s);
    if (o.want_entry)
        printf("  entry speed          %10.4f  km/s  (at %.0f km altitude)\n", t.v_entry_km_s, o.entry_alt_km);
    printf("\n  Preliminary two-body, patched-conic, mean-element figures; confirm with\n"
           "  high-fidelity ephemerides and the responsible launch and mission authorities.\n");
    sy_catalog_free(cat);
    if (fflush(stdout) != 0) return cli_error(CLI_EXIT_IO, "cannot write to standard output");
    return CLI_EXIT_OK;
}
