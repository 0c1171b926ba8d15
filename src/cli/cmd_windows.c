/* cmd_windows.c - `synodic windows`: launch opportunities across years. */
#include "config.h"
#include "cli.h"
#include "synodic/chart.h"
#include "synodic/io.h"
#include "synodic/report.h"
#include "synodic/study.h"
#include "synodic/windows.h"

#include <ctype.h>
#include <errno.h>
#include <getopt.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

/* Quick-form defaults (documented in usage and synodic(1)). */
#define QUICK_TOF_LO 0.4      /* x the Hohmann time of the mean orbits   */
#define QUICK_TOF_HI 1.6
#define QUICK_TOF_CAP 3650.0  /* days: longest default flight (10 years) */
#define MAX_SCAN_YEARS 200

void usage_windows(FILE *out)
{
    fprintf(out,
            "usage: synodic windows STUDY [-o DIR] [--set SECTION.KEY=VALUE ...]\n"
            "                       [--threads N] [--quiet]\n"
            "       synodic windows FROM TO FIRST_YEAR LAST_YEAR [--tof-min DAYS]\n"
            "                       [--tof-max DAYS] [--bodies FILE] [--json] [-o DIR]\n\n"
            "Scan a multi-year departure span for launch opportunities, separately for\n"
            "Type I and Type II transfers: the minimum-C3 transfer of each (within the\n"
            "study's limits), its figures, and the first and last feasible departure day.\n\n"
            "With a STUDY ([departure] span and steps, [flight] window; see synodic(1))\n"
            "it prints the table and writes NAME.csv, NAME.json, NAME.md, the comparison\n"
            "figure NAME-comparison.png/.svg/.pdf, a porkchop chart NAME-NN.png per\n"
            "opportunity on one common colour scale, and the atlas NAME-atlas.pdf.\n\n"
            "The quick form needs no study file: departures from 1 January of\n"
            "FIRST_YEAR to 31 December of LAST_YEAR, flight times from 0.4 to 1.6 times\n"
            "the Hohmann time between the two mean orbits (at most 3650 days), no\n"
            "limits; it prints the table, writes files only with -o.\n\n"
            "  -o, --output DIR   write into DIR (default: the study's [output] directory)\n"
            "  --set S.K=V        override key K of section [S] (repeatable)\n"
            "  --threads N        worker threads (default: all cores)\n"
            "  --quiet            print nothing but errors\n"
            "  --tof-min DAYS     quick form: shortest flight time\n"
            "  --tof-max DAYS     quick form: longest flight time\n"
            "  --bodies FILE      quick form: bodies file with small bodies\n"
            "  --json             quick form: print the opportunities as JSON only\n"
            "  --help             show this help\n");
}



static double r2(double v) { return nearbyint(v * 100.0) / 100.0; }

static int print_quick_json(const sy_windows *w)
{
    json_t *root = json_object(), *arr = json_array();
    for (size_t k = 0; k < w->nwindows; k++) {
        const sy_window *wd = &w->windows[k];
        json_t *o = json_object();
        json_object_set_new(o, "type", json_string(wd->type == 1 ? "I" : "II"));
        json_object_set_new(o, "departure_jd", json_real(r2(wd->best.jd_dep)));
        json_object_set_new(o, "arrival_jd", json_real(r2(wd->best.jd_arr)));
        json_object_set_new(o, "tof_days", json_real(r2(wd->best.tof_days)));
        json_object_set_new(o, "c3_km2_s2", sy_json_number(wd->best.c3_km2_s2));
        json_object_set_new(o, "vinf_arr_km_s", sy_json_number(wd->best.vinf_arr_km_s));
        json_object_set_new(o, "dla_deg", sy_json_number(wd->best.dla_deg));
        json_object_set_new(o, "open_jd", sy_json_number(wd->open_jd));
        json_object_set_new(o, "close_jd", sy_json_number(wd->close_jd));
        json_array_append_new(arr, o);
    }
    json_object_set_new(root, "opportunities", arr);
    return cli_print_json(root);
}

/* Every output of a scan into st->out_dir; lists what was written. */
static int write_outputs(const sy_windows *w, const sy_study *st, char (*written)[8800], int *nwritten)
{
    int rc = cli_ensure_dir(st->out_dir);
    if (rc) return rc;
    int nw = 0;
    char path[8800];
    sy_error err;
    sy_status s = SY_OK;
#define OUT(ext, call)                                                           \
    do {                                                                         \
        snprintf(path, sizeof path, "%s/%s%s", st->out_dir, st->basename, ext); \
        if ((s = (call)) != SY_OK) return cli_error(cli_exit_for(s), "%s", err.msg); \
        if (nw < 16) snprintf(written[nw++], sizeof written[0], "%s", path);   \
    } while (0)
    if (st->formats & SY_FMT_CSV) OUT(".csv", sy_windows_write_csv(w, path, &err));
    if (st->formats & SY_FMT_JSON) OUT(".json", sy_windows_write_json(w, st, path, &err));
    OUT(".md", sy_windows_write_markdown(w, st, path, &err));
    if (st->formats & SY_FMT_PNG) OUT("-comparison.png", sy_windows_write_comparison(w, st, path, &err));
    if (st->formats & SY_FMT_SVG) OUT("-comparison.svg", sy_windows_write_comparison(w, st, path, &err));
    if (st->formats & SY_FMT_PDF) OUT("-comparison.pdf", sy_windows_write_comparison(w, st, path, &err));
#undef OUT
    if (st->formats & (SY_FMT_PNG | SY_FMT_PDF)) {
        char atlas[4400];
        snprintf(atlas, sizeof atlas, "%s/%s-atlas.pdf", st->out_dir, st->basename);
        size_t pages = 0;
        s = sy_windows_write_charts(w, st, st->out_dir, st->basename, (st->formats & SY_FMT_PNG) != 0,
                                    (st->formats & SY_FMT_PDF) ? atlas : NULL, &pages, &err);
        if (s != SY_OK) return cli_error(cli_exit_for(s), "%s", err.msg);
        if (st->formats & SY_FMT_PNG && w->nseasons && nw < 16)
            snprintf(written[nw++], sizeof written[0], "%s/%s-01.png .. -%02zu.png (%zu porkchop charts)",
                     st->out_dir, st->basename, w->nseasons, w->nseasons);
        if (st->formats & SY_FMT_PDF && nw < 16)
            snprintf(written[nw++], sizeof written[0], "%s (%zu pages)", atlas, pages);
    }
    *nwritten = nw;
    return 0;
}

static int run_scan(const sy_windows_spec *spec, const sy_study *st, sy_windows **w)
{
    sy_error err;
    sy_status s = sy_windows_scan(spec, st, NULL, NULL, w, &err);
    if (s != SY_OK) return cli_error(cli_exit_for(s), "%s", err.msg);
    return 0;
}

/* A study built from the quick form's arguments: no limits. */
static void quick_study(sy_study *st, const sy_body *from, const sy_body *to, int y1, int y2,
                        const char *outdir)
{
    memset(st, 0, sizeof *st);
    snprintf(st->path, sizeof st->path, "(command line)");
    snprintf(st->title, sizeof st->title, "%s → %s launch opportunities %d–%d", from->name,
             to->name, y1, y2);
    st->c3_max_km2_s2 = st->vinf_arr_max_km_s = st->dla_max_deg = NAN;
    st->tof_min_days = st->tof_max_days = NAN;
    st->formats = SY_FMT_PNG | SY_FMT_SVG | SY_FMT_PDF | SY_FMT_CSV | SY_FMT_JSON;
    snprintf(st->out_dir, sizeof st->out_dir, "%s", outdir ? outdir : "");
    char base[256];
    snprintf(base, sizeof base, "%s-%s-%d-%d", from->name, to->name, y1, y2);
    for (char *p = base; *p; p++) {
        *p = (char)tolower((unsigned char)*p);
        if (*p == ' ' || *p == '/') *p = '_';
    }
    snprintf(st->basename, sizeof st->basename, "%s", base);
    st->width_in = 7.5;
    st->height_in = 5.5;
    st->dpi = 200;
    st->show_types = 1;
}

int cmd_windows(int argc, char **argv)
{
    static const struct option longopts[] = {
        {"output", required_argument, NULL, 'o'},
        {"set", required_argument, NULL, 's'},
        {"threads", required_argument, NULL, 't'},
        {"quiet", no_argument, NULL, 'q'},
        {"tof-min", required_argument, NULL, 'm'},
        {"tof-max", required_argument, NULL, 'M'},
        {"bodies", required_argument, NULL, 'b'},
        {"json", no_argument, NULL, 'j'},
        {"help", no_argument, NULL, 'h'},
        {NULL, 0, NULL, 0}};
    const char *outdir = NULL, *bodies = NULL;
    const char **sets = calloc((size_t)argc + 1, sizeof *sets);
    size_t nsets = 0;
    int threads = 0, quiet = 0, json = 0, c, rc = 0;
    double tof_min = NAN, tof_max = NAN;
    if (!sets) return cli_error(CLI_EXIT_INTERNAL, "out of memory");
    opterr = 0;
    while ((c = getopt_long(argc, argv, ":o:", longopts, NULL)) != -1) {
        switch (c) {
        case 'o': outdir = optarg; break;
        case 's': sets[nsets++] = optarg; break;
        case 't': rc = cli_parse_int("--threads", optarg, 1, 1024, &threads); break;
        case 'q': quiet = 1; break;
        case 'm': rc = cli_parse_double("--tof-min", optarg, &tof_min); break;
        case 'M': rc = cli_parse_double("--tof-max", optarg, &tof_max); break;
        case 'b': bodies = optarg; break;
        case 'j': json = 1; break;
        case 'h': usage_windows(stdout); free(sets); return CLI_EXIT_OK;
        default: rc = cli_bad_option("windows", c, argv[optind - 1]); break;
        }
        if (rc) { free(sets); return rc; }
    }
    int npos = argc - optind;
    if (npos != 1 && npos != 4) {
        free(sets);
        return cli_error(CLI_EXIT_USAGE, "windows: expected STUDY or FROM TO FIRST_YEAR LAST_YEAR, got %d argument(s); see 'synodic windows --help'", npos);
    }
    int quick = npos == 4;
    if (quick && nsets) { free(sets); return cli_error(CLI_EXIT_USAGE, "windows: --set needs a STUDY file; the quick form takes --tof-min/--tof-max"); }
    if (!quick && (json || bodies || isfinite(tof_min) || isfinite(tof_max))) {
        free(sets);
        return cli_error(CLI_EXIT_USAGE, "windows: --json, --bodies, --tof-min and --tof-max belong to the quick form; with a STUDY use --set (e.g. --set flight.tof_max_days=400)");
    }
    sy_study *st = calloc(1, sizeof *st);
    if (!st) { free(sets); return cli_error(CLI_EXIT_INTERNAL, "out of memory"); }
    sy_catalog *cat = NULL;
    sy_windows *w = NULL;
    const sy_body *from, *to;
    sy_windows_spec spec;
    sy_error err;
    sy_status s;

    if (!quick) {
        s = sy_study_load(argv[optind], sets, nsets, st, &err);
        if (s != SY_OK) { rc = cli_error(cli_exit_for(s), "%s", err.msg); goto out; }
        if (outdir) snprintf(st->out_dir, sizeof st->out_dir, "%s", outdir);
        if ((rc = cli_study_bodies(st, &cat, &from, &to))) goto out;
        if ((s = sy_windows_spec_from_study(st, from, to, &spec, &err)) != SY_OK) {
            rc = cli_error(cli_exit_for(s), "%s: %s", st->path, err.msg);
            goto out;
        }
    } else {
        int y1, y2;
        if ((rc = cli_parse_int("FIRST_YEAR", argv[optind + 2], 1, 9999, &y1))) goto out;
        if ((rc = cli_parse_int("LAST_YEAR", argv[optind + 3], 1, 9999, &y2))) goto out;
        if (y1 > y2) { rc = cli_error(CLI_EXIT_INPUT, "FIRST_YEAR %d is after LAST_YEAR %d; give the earlier year first", y1, y2); goto out; }
        if (y2 - y1 + 1 > MAX_SCAN_YEARS) { rc = cli_error(CLI_EXIT_INPUT, "%d to %d is %d years; scan at most %d years at a time", y1, y2, y2 - y1 + 1, MAX_SCAN_YEARS); goto out; }
        if ((rc = cli_catalog(bodies, &cat))) goto out;
        if ((rc = cli_find_body(cat, argv[optind], &from))) goto out;
        if ((rc = cli_find_body(cat, argv[optind + 1], &to))) goto out;
        if (from == to) { rc = cli_error(CLI_EXIT_INPUT, "origin and target are both %s; choose two different bodies", from->name); goto out; }
        double T = sy_synodic_period_days(from, to), H = sy_hohmann_tof_days(from, to);
        if (!isfinite(T) || !isfinite(H)) { rc = cli_error(CLI_EXIT_INPUT, "%s and %s have no synodic period (equal or unbound mean motions); choose two bodies on bound orbits of different periods", from->name, to->name); goto out; }
        /* whole days, as a person would write them */
        if (!isfinite(tof_min)) tof_min = fmax(1.0, floor(QUICK_TOF_LO * H));
        if (!isfinite(tof_max)) tof_max = fmin(ceil(QUICK_TOF_HI * H), QUICK_TOF_CAP);
        if (!(tof_min > 0)) { rc = cli_error(CLI_EXIT_INPUT, "--tof-min: %g is not positive; give a flight time of more than 0 days", tof_min); goto out; }
        if (!(tof_max > tof_min)) { rc = cli_error(CLI_EXIT_INPUT, "--tof-max %g is not larger than the shortest flight time %g days; give a maximum above the minimum", tof_max, tof_min); goto out; }
        if (tof_max > 73050) { rc = cli_error(CLI_EXIT_INPUT, "--tof-max: %g days is more than the 73050 days (200 years) allowed", tof_max); goto out; }
        quick_study(st, from, to, y1, y2, outdir);
        memset(&spec, 0, sizeof spec);
        spec.from = from;
        spec.to = to;
        spec.dep_start_jd = sy_jd_from_calendar(y1, 1, 1, 0, 0, 0);
        spec.dep_end_jd = sy_jd_from_calendar(y2, 12, 31, 0, 0, 0);
        spec.tof_min_days = tof_min;
        spec.tof_max_days = tof_max;
        /* about 150 departures per synodic period, whole days of at most
         * 5; flight-time step a whole multiple of it, about 100 steps */
        double cd = fmax(1.0, fmin(5.0, floor(T / 150.0)));
        spec.coarse_dep_days = cd;
        spec.coarse_tof_days = cd * fmax(1.0, nearbyint((tof_max - tof_min) / (100.0 * cd)));
    }
    spec.threads = threads;
    /* the ephemeris must cover every departure and arrival */
    double need_lo = spec.dep_start_jd, need_hi = spec.dep_end_jd + spec.tof_max_days;
    const sy_body *bs[2] = {from, to};
    for (int k = 0; k < 2; k++)
        if (need_lo < bs[k]->valid_from_jd || need_hi >= bs[k]->valid_to_jd) {
            char a[32], b[32], c1[32], c2[32];
            sy_date_format(need_lo, 0, a, sizeof a);
            sy_date_format(need_hi, 0, b, sizeof b);
            sy_date_format(bs[k]->valid_from_jd, 0, c1, sizeof c1);
            sy_date_format(bs[k]->valid_to_jd, 0, c2, sizeof c2);
            rc = cli_error(CLI_EXIT_INPUT, "the scan needs %s positions from %s to %s but its model covers %s to %s; shorten the span or the flight times", bs[k]->name, a, b, c1, c2);
            goto out;
        }
    if (!quick || outdir) {
    }
    if ((rc = run_scan(&spec, st, &w))) goto out;
    if (json) {
        rc = print_quick_json(w);
        goto out;
    }
    /* files first, so that a failure leaves nothing on stdout */
    static char written[16][8800];
    int nw = 0;
    if (!quick || outdir)
        if ((rc = write_outputs(w, st, written, &nw))) goto out;
    if (!quiet) {
        printf("%s\n", st->title);
        sy_windows_print(w, stdout);
        printf("\n");
        for (int k = 0; k < nw; k++) printf("  wrote %s\n", written[k]);
        printf("  scan %.1f s; %s\n", w->seconds, SY_CAUTION);
        if (fflush(stdout) != 0) rc = cli_error(CLI_EXIT_IO, "cannot write to standard output");
    }
out:
    sy_chart_release_caches();
    sy_windows_free(w);
    sy_catalog_free(cat);
    free(st);
    free(sets);
    return rc;
}
