/* cmd_lambert.c - `synodic lambert`: Lambert's problem between vectors. */
#include "config.h"
#include "cli.h"

#include <getopt.h>
#include <math.h>

void usage_lambert(FILE *out)
{
    fprintf(out,
            "usage: synodic lambert --r1 X,Y,Z --r2 X,Y,Z --tof SECONDS\n"
            "                       [--mu KM3_S2] [--revs N] [--branch left|right]\n"
            "                       [--retrograde] [--json]\n\n"
            "Velocities at both ends of the conic from r1 to r2 (km) in the given\n"
            "time of flight (s), by Izzo's 2015 method.\n\n"
            "  --mu KM3_S2     gravitational parameter (default: the Sun, %.11g)\n"
            "  --revs N        complete revolutions (default 0)\n"
            "  --branch B      left or right solution, required when N >= 1\n"
            "  --retrograde    clockwise transfer as seen from +z\n"
            "  --json          print JSON instead of a table\n"
            "  --help          show this help\n",
            SY_GM_SUN_KM3_S2);
}

int cmd_lambert(int argc, char **argv)
{
    static const struct option longopts[] = {
        {"r1", required_argument, NULL, '1'},
        {"r2", required_argument, NULL, '2'},
        {"tof", required_argument, NULL, 't'},
        {"mu", required_argument, NULL, 'm'},
        {"revs", required_argument, NULL, 'n'},
        {"branch", required_argument, NULL, 'B'},
        {"retrograde", no_argument, NULL, 'r'},
        {"json", no_argument, NULL, 'j'},
        {"help", no_argument, NULL, 'h'},
        {NULL, 0, NULL, 0}};
    double r1[3], r2[3], tof = 0, mu = SY_GM_SUN_KM3_S2;
    int have1 = 0, have2 = 0, havet = 0, revs = 0, retro = 0, json = 0, haveb = 0;
    sy_branch branch = SY_BRANCH_LEFT;
    int c, rc;
    opterr = 0;
    while ((c = getopt_long(argc, argv, ":", longopts, NULL)) != -1) {
        switch (c) {
        case '1': if ((rc = cli_parse_vec3("--r1", optarg, r1))) return rc; have1 = 1; break;
        case '2': if ((rc = cli_parse_vec3("--r2", optarg, r2))) return rc; have2 = 1; break;
        case 't': if ((rc = cli_parse_double("--tof", optarg, &tof))) return rc; havet = 1; break;
        case 'm': if ((rc = cli_parse_double("--mu", optarg, &mu))) return rc; break;
        case 'n': if ((rc = cli_parse_int("--revs", optarg, 0, 1000, &revs))) return rc; break;
        case 'B': if ((rc = cli_parse_branch(optarg, &branch))) return rc; haveb = 1; break;
        case 'r': retro = 1; break;
        case 'j': json = 1; break;
        case 'h': usage_lambert(stdout); return CLI_EXIT_OK;
        default: return cli_bad_option("lambert", c, argv[optind - 1]);
        }
    }
    if (optind < argc)
        return cli_error(CLI_EXIT_USAGE, "lambert: unexpected argument '%s'; see 'synodic lambert --help'", argv[optind]);
    if (!have1 || !have2 || !havet)
        return cli_error(CLI_EXIT_USAGE, "lambert: %s is required; see 'synodic lambert --help'",
                         !have1 ? "--r1" : !have2 ? "--r2" : "--tof");
    if (!(tof > 0))
        return cli_error(CLI_EXIT_INPUT, "--tof: the time of flight must be positive seconds, not %g", tof);
    if (!(mu > 0))
        return cli_error(CLI_EXIT_INPUT, "--mu: the gravitational parameter must be positive, not %g", mu);
    if (revs > 0 && !haveb)
        return cli_error(CLI_EXIT_USAGE, "lambert: --revs %d has two solutions; choose one with --branch left or --branch right", revs);
    double n1 = sqrt(r1[0] * r1[0] + r1[1] * r1[1] + r1[2] * r1[2]);
    double n2 = sqrt(r2[0] * r2[0] + r2[1] * r2[1] + r2[2] * r2[2]);
    if (n1 == 0 || n2 == 0)
        return cli_error(CLI_EXIT_INPUT, "%s: the position vector is zero; give a non-zero position in km", n1 == 0 ? "--r1" : "--r2");

    sy_lambert_solution sol;
    sy_status st = sy_lambert(mu, r1, r2, tof, revs, branch, retro, &sol);
    switch (st) {
    case SY_OK: break;
    case SY_ERR_NOSOL:
        return cli_error(CLI_EXIT_NOSOL, "no %d-revolution solution: the time of flight %g s is below the minimum for %d revolution(s); lengthen --tof or lower --revs", revs, tof, revs);
    case SY_ERR_DEGENERATE:
        return cli_error(CLI_EXIT_INPUT, "r1 and r2 are collinear with the centre (transfer angle 0 or 180 deg), so the transfer plane is undefined; move one vector off that line");
    default:
        return cli_error(cli_exit_for(st), "Lambert solution failed: %s", sy_status_str(st));
    }
    const char *bname = revs == 0 ? "none" : sol.branch == SY_BRANCH_LEFT ? "left" : "right";
    if (json)
        return cli_print_json(json_pack("{s:o,s:o,s:i,s:s,s:i}", "v1_km_s",
                                        cli_json_vec3(sol.v1_km_s), "v2_km_s",
                                        cli_json_vec3(sol.v2_km_s), "revs", revs,
                                        "branch", bname, "iterations", sol.iterations));
    printf("v1_km_s     %16.9f %16.9f %16.9f\n", sol.v1_km_s[0], sol.v1_km_s[1], sol.v1_km_s[2]);
    printf("v2_km_s     %16.9f %16.9f %16.9f\n", sol.v2_km_s[0], sol.v2_km_s[1], sol.v2_km_s[2]);
    printf("revs        %d\n", revs);
    printf("branch      %s\n", bname);
    printf("direction   %s\n", retro ? "retrograde" : "prograde");
    printf("iterations  %d\n", sol.iterations);
    if (fflush(stdout) != 0) return cli_error(CLI_EXIT_IO, "cannot write to standard output");
    return CLI_EXIT_OK;
}
