/* cmd_chart.c - `synodic chart`: a study's porkchop chart and its data. */
#include "config.h"
#include "cli.h"
#include "synodic/chart.h"
#include "synodic/figure.h"
#include "synodic/grid.h"
#include "synodic/io.h"
#include "synodic/report.h"
#include "synodic/study.h"

#include <errno.h>
#include <getopt.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

void usage_chart(FILE *out)
{
    fprintf(out,
            "usage: synodic chart STUDY [-o DIR] [--set SECTION.KEY=VALUE ...]\n"
            "                     [--format LIST] [--threads N] [--quiet]\n\n"
            "Sweep the study's departure x arrival grid, find the optima and write\n"
            "the porkchop chart (PNG, SVG, PDF) with its data (CSV, JSON).\n\n"
            "  -o, --output DIR   write into DIR (default: the study's [output] directory)\n"
            "  --set S.K=V        override key K of section [S] (repeatable)\n"
            "  --format LIST      comma list of png, svg, pdf, csv, json\n"
            "  --threads N        worker threads (default: all cores)\n"
            "  --quiet            no progress bar, no summary; only errors\n"
            "  --help             show this help\n\n"
            "Study files are described in synodic(1); see examples/ for three.\n");
}





static void print_optimum(const sy_optimum *o, int y_is_tof)
{
    char name[32];
    snprintf(name, sizeof name, "%s%s", sy_field_name(o->field),
             o->type == 1 ? " (I)" : o->type == 2 ? " (II)" : "");
    if (!o->found) {
        printf("  minimum %-10s none within the constraints\n", name);
        return;
    }
    const sy_transfer *t = &o->transfer;
    char d1[40], d2[40];
    sy_date_format(o->jd_dep, 0, d1, sizeof d1);
    sy_date_format(o->jd_arr, 0, d2, sizeof d2);
    printf("  minimum %-10s %9.3f   depart %s (JD %.2f)  arrive %s (JD %.2f)\n",
           name, o->value, d1, o->jd_dep, d2, o->jd_arr);
    printf("      C3 %.3f km2/s2, DLA %.2f deg, RLA %.2f deg, arrival v-inf %.3f km/s, "
           "flight %.2f d, Type %s",
           t->c3_km2_s2, t->dla_deg, t->rla_deg, t->vinf_arr_km_s, t->tof_days,
           t->type == 1 ? "I" : "II");
    if (isfinite(t->dv_total_km_s)) printf(", total dv %.3f km/s", t->dv_total_km_s);
    printf("\n");
    char edge[96];
    if (*sy_optimum_edge_text(o, y_is_tof, edge, sizeof edge))
        printf("      at the grid's edge (%s): the minimum may lie outside it; widen the study's dates there\n", edge);
}

int cmd_chart(int argc, char **argv)
{
    static const struct option longopts[] = {
        {"output", required_argument, NULL, 'o'},
        {"set", required_argument, NULL, 's'},
        {"format", required_argument, NULL, 'f'},
        {"threads", required_argument, NULL, 't'},
        {"quiet", no_argument, NULL, 'q'},
        {"help", no_argument, NULL, 'h'},
        {NULL, 0, NULL, 0}};
    const char *outdir = NULL;
    const char **sets = calloc((size_t)argc + 1, sizeof *sets);
    size_t nsets = 0;
    unsigned formats = 0;
    int threads = 0, quiet = 0, c, rc = 0;
    if (!sets) return cli_error(CLI_EXIT_INTERNAL, "out of memory");
    /* From the start, so that an interrupt at any moment exits with 6
     * (and removes any temporary); a file-size limit (ulimit -f) must be
     * a reported write error (EFBIG, removing the temporary), not a kill
     * by SIGXFSZ. */
    opterr = 0;
    while ((c = getopt_long(argc, argv, ":o:", longopts, NULL)) != -1) {
        switch (c) {
        case 'o': outdir = optarg; break;
        case 's': sets[nsets++] = optarg; break;
        case 'f': rc = cli_parse_formats(optarg, &formats); break;
        case 't': rc = cli_parse_int("--threads", optarg, 1, 1024, &threads); break;
        case 'q': quiet = 1; break;
        case 'h': usage_chart(stdout); free(sets); return CLI_EXIT_OK;
        default: rc = cli_bad_option("chart", c, argv[optind - 1]); break;
        }
        if (rc) { free(sets); return rc; }
    }
    if (argc - optind != 1) {
        free(sets);
        return cli_error(CLI_EXIT_USAGE, "chart: expected one STUDY file, got %d argument(s); see 'synodic chart --help'", argc - optind);
    }
    sy_study *st;
    rc = cli_load_study(argv[optind], sets, nsets, outdir, &st);
    free(sets);
    if (rc) return rc;
    sy_error err;
    sy_status s;
    if (formats) st->formats = formats;

    sy_catalog *cat = NULL;
    sy_grid *g = NULL;
    const sy_body *from, *to;
    if ((rc = cli_study_bodies(st, &cat, &from, &to))) goto out;
    sy_grid_spec spec;
    if ((s = sy_grid_spec_from_study(st, from, to, &spec, &err)) != SY_OK) {
        rc = cli_error(cli_exit_for(s), "%s: %s", st->path, err.msg);
        goto out;
    }
    spec.threads = threads;
    if ((rc = cli_ensure_dir(st->out_dir))) goto out;

    int last = -1;
    int show = !quiet && isatty(STDERR_FILENO) && spec.nx * spec.ny >= 200000;
    s = sy_grid_compute(&spec, show ? cli_progress_bar : NULL, &last, &g, &err);
    if (s != SY_OK) { rc = cli_error(cli_exit_for(s), "%s: %s", st->path, err.msg); goto out; }

    /* Optima: minimum C3 of each transfer type (both are flown), then the
     * minimum arrival v-infinity and total delta-v of either type. */
    sy_optimum opt[4];
    size_t nopt = 0;
    const struct { sy_field f; int type; } want[4] = {
        {SY_F_C3, 1}, {SY_F_C3, 2}, {SY_F_VINF_ARR, 0}, {SY_F_DV_TOTAL, 0}};
    for (int k = 0; k < 4; k++) {
        if (!g->field[want[k].f]) continue;
        if ((s = sy_grid_optimum_of_type(g, st, want[k].f, want[k].type, &opt[nopt])) != SY_OK) {
            rc = cli_error(cli_exit_for(s), "refining the minimum of %s failed: %s", sy_field_name(want[k].f), sy_status_str(s));
            goto out;
        }
        nopt++;
    }

    static const struct { unsigned bit; const char *ext; } kinds[] = {
        {SY_FMT_PNG, "png"}, {SY_FMT_SVG, "svg"}, {SY_FMT_PDF, "pdf"},
        {SY_FMT_CSV, "csv"}, {SY_FMT_JSON, "json"}};
    char written[5][4400];
    int nw = 0;
    for (size_t k = 0; k < 5; k++) {
        if (!(st->formats & kinds[k].bit)) continue;
        char path[4400];
        snprintf(path, sizeof path, "%s/%s.%s", st->out_dir, st->basename, kinds[k].ext);
        if (kinds[k].bit == SY_FMT_CSV) s = sy_report_csv(g, st, path, &err);
        else if (kinds[k].bit == SY_FMT_JSON) s = sy_report_json(g, st, opt, nopt, path, &err);
        else s = sy_figure_write(g, st, opt, nopt, path, &err);
        if (s != SY_OK) { rc = cli_error(cli_exit_for(s), "%s", err.msg); goto out; }
        snprintf(written[nw++], sizeof written[0], "%s", path);
    }
    if (!quiet) {
        printf("%s\n  %s -> %s, %zu x %zu cells\n", st->title, from->name, to->name, g->nx, g->ny);
        for (size_t k = 0; k < nopt; k++) print_optimum(&opt[k], g->spec.y_is_tof);
        for (int k = 0; k < nw; k++) printf("  wrote %s\n", written[k]);
        printf("  %s\n", SY_CAUTION);
        if (fflush(stdout) != 0) rc = cli_error(CLI_EXIT_IO, "cannot write to standard output");
    }
out:
    sy_chart_release_caches();
    sy_grid_free(g);
    sy_catalog_free(cat);
    free(st);
    return rc;
}
