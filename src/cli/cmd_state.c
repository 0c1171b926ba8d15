/* cmd_state.c - `synodic state`: a body's heliocentric state vector. */
#include "config.h"
#include "cli.h"

#include <getopt.h>
#include <math.h>
#include <string.h>

void usage_state(FILE *out)
{
    fprintf(out,
            "usage: synodic state BODY DATE [--frame ecliptic|equatorial]\n"
            "                     [--bodies FILE] [--json]\n\n"
            "Heliocentric position (km) and velocity (km/s) of BODY at DATE (TDB).\n\n"
            "  --frame F      ecliptic: mean ecliptic and equinox of J2000 (default)\n"
            "                 equatorial: J2000 mean equator (EME2000)\n"
            "  --bodies FILE  small bodies defined in FILE\n"
            "  --json         print JSON instead of a table\n"
            "  --help         show this help\n");
}

int cmd_state(int argc, char **argv)
{
    static const struct option longopts[] = {
        {"frame", required_argument, NULL, 'f'},
        {"bodies", required_argument, NULL, 'b'},
        {"json", no_argument, NULL, 'j'},
        {"help", no_argument, NULL, 'h'},
        {NULL, 0, NULL, 0}};
    const char *bodies = NULL;
    int json = 0, equatorial = 0, c;
    opterr = 0;
    while ((c = getopt_long(argc, argv, ":", longopts, NULL)) != -1) {
        switch (c) {
        case 'f':
            if (strcmp(optarg, "ecliptic") == 0) equatorial = 0;
            else if (strcmp(optarg, "equatorial") == 0) equatorial = 1;
            else return cli_error(CLI_EXIT_INPUT, "--frame: '%s' is not a frame; use ecliptic or equatorial", optarg);
            break;
        case 'b': bodies = optarg; break;
        case 'j': json = 1; break;
        case 'h': usage_state(stdout); return CLI_EXIT_OK;
        default: return cli_bad_option("state", c, argv[optind - 1]);
        }
    }
    if (argc - optind != 2)
        return cli_error(CLI_EXIT_USAGE, "state: expected BODY and DATE, got %d argument(s); see 'synodic state --help'", argc - optind);
    double jd;
    int rc = cli_parse_date("DATE", argv[optind + 1], &jd);
    if (rc) return rc;
    sy_catalog *cat;
    if ((rc = cli_catalog(bodies, &cat))) return rc;
    const sy_body *b;
    if ((rc = cli_find_body(cat, argv[optind], &b))) {
        sy_catalog_free(cat);
        return rc;
    }
    double r[3], v[3];
    sy_status st = sy_body_state(b, jd, r, v);
    if (st != SY_OK) {
        char d[40], d0[40], d1[40];
        sy_date_format(jd, 0, d, sizeof d);
        sy_date_format(b->valid_from_jd, 0, d0, sizeof d0);
        sy_date_format(b->valid_to_jd, 0, d1, sizeof d1);
        rc = st == SY_ERR_RANGE
                 ? cli_error(CLI_EXIT_INPUT, "%s is outside the validity of %s's model (%s to %s)", d, b->name, d0, d1)
                 : cli_error(cli_exit_for(st), "position of %s at %s: %s", b->name, d, sy_status_str(st));
        sy_catalog_free(cat);
        return rc;
    }
    if (equatorial) {
        double t[3];
        sy_ecl_to_eq(r, t); memcpy(r, t, sizeof t);
        sy_ecl_to_eq(v, t); memcpy(v, t, sizeof t);
    }
    const char *frame = equatorial ? "eme2000" : "ecliptic-j2000";
    if (json) {
        json_t *o = json_pack("{s:s,s:f,s:s,s:s,s:o,s:o}", "body", b->name,
                              "jd_tdb", jd, "frame", frame, "center", "sun",
                              "r_km", cli_json_vec3(r), "v_km_s", cli_json_vec3(v));
        sy_catalog_free(cat);
        return cli_print_json(o);
    }
    char iso[40];
    sy_date_format(jd, 1, iso, sizeof iso);
    double rn = sqrt(r[0] * r[0] + r[1] * r[1] + r[2] * r[2]);
    double vn = sqrt(v[0] * v[0] + v[1] * v[1] + v[2] * v[2]);
    printf("body     %s\n", b->name);
    printf("epoch    %s TDB (JD %.6f)\n", iso, jd);
    printf("frame    %s\n", equatorial ? "EME2000 (J2000 mean equator), heliocentric"
                                       : "mean ecliptic and equinox of J2000, heliocentric");
    printf("r_km     %18.3f %18.3f %18.3f   |r| %.9f AU\n", r[0], r[1], r[2], rn / SY_AU_KM);
    printf("v_km_s   %18.9f %18.9f %18.9f   |v| %.6f km/s\n", v[0], v[1], v[2], vn);
    sy_catalog_free(cat);
    if (fflush(stdout) != 0) return cli_error(CLI_EXIT_IO, "cannot write to standard output");
    return CLI_EXIT_OK;
}
