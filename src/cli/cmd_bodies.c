/* cmd_bodies.c - `synodic bodies`: the catalogue with validity ranges. */
#include "config.h"
#include "cli.h"

#include <getopt.h>
#include <string.h>

void usage_bodies(FILE *out)
{
    fprintf(out,
            "usage: synodic bodies [--bodies FILE] [--json]\n\n"
            "List the built-in bodies (Standish mean elements; Earth is the\n"
            "Earth-Moon barycentre) and those defined in a bodies file, with\n"
            "GM, radius and the dates over which their positions are valid.\n\n"
            "  --bodies FILE  also load the small bodies of FILE (INI; see synodic(1))\n"
            "  --json         print JSON instead of a table\n"
            "  --help         show this help\n");
}

int cmd_bodies(int argc, char **argv)
{
    static const struct option longopts[] = {
        {"bodies", required_argument, NULL, 'b'},
        {"json", no_argument, NULL, 'j'},
        {"help", no_argument, NULL, 'h'},
        {NULL, 0, NULL, 0}};
    const char *bodies = NULL;
    int json = 0, c;
    opterr = 0;
    while ((c = getopt_long(argc, argv, ":", longopts, NULL)) != -1) {
        switch (c) {
        case 'b': bodies = optarg; break;
        case 'j': json = 1; break;
        case 'h': usage_bodies(stdout); return CLI_EXIT_OK;
        default: return cli_bad_option("bodies", c, argv[optind - 1]);
        }
    }
    if (optind < argc)
        return cli_error(CLI_EXIT_USAGE, "bodies: unexpected argument '%s'; see 'synodic bodies --help'", argv[optind]);
    sy_catalog *cat;
    int rc = cli_catalog(bodies, &cat);
    if (rc) return rc;
    size_t n = sy_catalog_count(cat);
    if (json) {
        json_t *arr = json_array();
        for (size_t i = 0; i < n; i++) {
            const sy_body *b = sy_catalog_at(cat, i);
            char d0[40], d1[40];
            sy_date_format(b->valid_from_jd, 0, d0, sizeof d0);
            sy_date_format(b->valid_to_jd, 0, d1, sizeof d1);
            json_t *o = json_pack("{s:s,s:s,s:f,s:f,s:f,s:f,s:s,s:s,s:s}",
                                  "name", b->name, "kind",
                                  b->kind == SY_BODY_PLANET ? "planet" : "small-body",
                                  "gm_km3_s2", b->gm_km3_s2, "radius_km", b->radius_km,
                                  "valid_from_jd", b->valid_from_jd,
                                  "valid_to_jd", b->valid_to_jd,
                                  "valid_from", d0, "valid_to", d1,
                                  "source", b->source);
            json_array_append_new(arr, o);
        }
        sy_catalog_free(cat);
        return cli_print_json(json_pack("{s:o}", "bodies", arr));
    }
    printf("%-14s %-10s %16s %11s  %-12s %-12s %s\n", "name", "kind",
           "GM [km3/s2]", "radius [km]", "valid from", "valid to", "source");
    for (size_t i = 0; i < n; i++) {
        const sy_body *b = sy_catalog_at(cat, i);
        char d0[40], d1[40], gm[32], rad[32];
        sy_date_format(b->valid_from_jd, 0, d0, sizeof d0);
        sy_date_format(b->valid_to_jd, 0, d1, sizeof d1);
        if (b->gm_km3_s2 > 0) snprintf(gm, sizeof gm, "%.6g", b->gm_km3_s2);
        else snprintf(gm, sizeof gm, "-");
        if (b->radius_km > 0) snprintf(rad, sizeof rad, "%.6g", b->radius_km);
        else snprintf(rad, sizeof rad, "-");
        printf("%-14s %-10s %16s %11s  %-12s %-12s %s\n", b->name,
               b->kind == SY_BODY_PLANET ? "planet" : "small-body", gm, rad,
               d0, d1, b->source);
    }
    sy_catalog_free(cat);
    if (fflush(stdout) != 0) return cli_error(CLI_EXIT_IO, "cannot write to standard output");
    return CLI_EXIT_OK;
}
