/* cmd_period.c - `synodic period`: launch-period design on a study's grid.
 * All computing is in libsynodic (period.c, lvcap.c); this file parses the
 * options, prints the daily tables and writes the files. */
#include "config.h"
#include "cli.h"
#include "synodic/chart.h"
#include "synodic/figure.h"
#include "synodic/grid.h"
#include "synodic/io.h"
#include "synodic/lvcap.h"
#include "synodic/period.h"
#include "synodic/report.h"
#include "synodic/study.h"

#include <errno.h>
#include <getopt.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

void usage_period(FILE *out)
{
    fprintf(out,
            "usage: synodic period STUDY [-o DIR] [--set SECTION.KEY=VALUE ...]\n"
            "                      [--length DAYS] [--arrival fixed|free|both]\n"
            "                      [--type I|II|either] [--threads N] [--quiet]\n\n"
            "Launch-period design on the study's porkchop grid (departure step 1 day):\n"
            "with a required length (--length or [period] length_days), the period and\n"
            "arrival choice that minimise the largest C3 over it; with a C3 limit\n"
            "([limits] c3_max_km2_s2), the longest launch period within every limit.\n"
            "Fixed arrival = one arrival date for every day; free = the best per day.\n"
            "Prints the daily table and writes NAME-period.{png,svg,pdf,csv,json}\n"
            "(the chart shows the period as a marked segment).\n\n"
            "  -o, --output DIR   write into DIR (default: the study's [output] directory)\n"
            "  --set S.K=V        override key K of section [S] (repeatable)\n"
            "  --length DAYS      required launch period, whole days (overrides [period])\n"
            "  --arrival WHICH    fixed, free or both (overrides [period] arrival)\n"
            "  --type T           I or II: every day of the period on that transfer type;\n"
            "                     either (default): the better one day by day\n"
            "                     (overrides [period] type)\n"
            "  --threads N        worker threads (default: all cores)\n"
            "  --quiet            print nothing but errors\n"
            "  --help             show this help\n\n"
            "With [launch_vehicle] capability = FILE.csv the table shows the injected\n"
            "mass per day and, with spacecraft_mass_kg, the period's mass margin.\n");
}



/* One computed period with what it answers. */
typedef struct {
    sy_period p;
    char title[160];      /* e.g. "20-day launch period, fixed arrival" */
    char label[320];      /* chart label                               */
    double *px, *py;      /* chart path                                */
} job;

static const char *strategy_name(sy_period_arrival a)
{
    return a == SY_PERIOD_FIXED ? "fixed" : "free";
}

/* full: print the daily table (else the summary only; the CSV and JSON
 * always hold every day). */
static void print_period(const job *jb, const sy_study *st, int have_cap, int full)
{
    const sy_period *p = &jb->p;
    char d0[40], d1[40], da[40];
    printf("\n%s\n", jb->title);
    sy_date_format(p->days[0].jd_dep, 0, d0, sizeof d0);
    sy_date_format(p->days[p->ndays - 1].jd_dep, 0, d1, sizeof d1);
    printf("  departures %s to %s (%zu days)", d0, d1, p->ndays);
    if (p->arrival == SY_PERIOD_FIXED) {
        sy_date_format(p->jd_arr_fixed, 0, da, sizeof da);
        printf(", every day arriving %s", da);
    }
    printf("\n  period C3 (largest over the period, to be delivered by the launch vehicle): %.3f km2/s2 on %s\n",
           p->c3_max_km2_s2, (sy_date_format(p->days[p->worst_day].jd_dep, 0, da, sizeof da), da));
    if (isfinite(st->c3_max_km2_s2) && p->c3_max_km2_s2 > st->c3_max_km2_s2)
        printf("  NOTE: above the study's C3 limit of %g km2/s2\n", st->c3_max_km2_s2);
    if (have_cap) {
        printf("  injected mass at the period C3: %.1f kg", p->mass_kg);
        if (isfinite(p->margin_kg))
            printf("; margin over the %.1f kg spacecraft: %+.1f kg%s", st->spacecraft_mass_kg,
                   p->margin_kg, p->margin_kg < 0 ? " (NEGATIVE)" : "");
        printf("\n");
    }
    int types = 0;
    for (size_t d = 0; d < p->ndays; d++) types |= p->days[d].type == 1 ? 1 : 2;
    if (types == 3)
        printf("  NOTE: the period mixes Type I and Type II transfers (see the type %s)\n",
               full ? "column" : "of each day in the CSV");
    if (!full) {
        printf("  (daily table in the CSV and JSON files)\n");
        return;
    }
    printf("  %3s  %-10s  %-10s  %9s  %8s  %8s  %9s  %7s  %-4s%s\n", "day", "departure", "arrival",
           "C3", "DLA", "RLA", "v-inf arr", "flight", "type", have_cap ? "  injected" : "");
    printf("  %3s  %-10s  %-10s  %9s  %8s  %8s  %9s  %7s  %-4s%s\n", "", "(TDB)", "(TDB)", "km2/s2",
           "deg", "deg", "km/s", "days", "", have_cap ? "   mass kg" : "");
    for (size_t d = 0; d < p->ndays; d++) {
        const sy_period_day *y = &p->days[d];
        sy_date_format(y->jd_dep, 0, d0, sizeof d0);
        sy_date_format(y->jd_arr, 0, d1, sizeof d1);
        printf("  %3zu  %-10s  %-10s  %9.3f  %8.2f  %8.2f  %9.3f  %7.1f  %-4s", d + 1, d0, d1,
               y->c3_km2_s2, y->dla_deg, y->rla_deg, y->vinf_arr_km_s, y->tof_days,
               y->type == 1 ? "I" : y->type == 2 ? "II" : "-");
        if (have_cap) printf("  %8.1f", y->mass_kg);
        printf("%s\n", d == p->worst_day ? "  <- period C3" : "");
    }
}

static sy_status write_csv(const job *jobs, size_t n, const char *path, sy_error *err)
{
    sy_outfile of;
    sy_status s = (sy_status)sy_outfile_open(&of, path, err);
    if (s != SY_OK) return s;
    FILE *f = of.fp;
    fputs("# launch periods; ", f);
    fputs(SY_CAUTION, f);
    fputs("\nquestion,arrival_strategy,day,departure_tdb,departure_jd,arrival_tdb,arrival_jd,"
          "c3_km2_s2,dla_deg,rla_deg,vinf_arr_km_s,tof_days,type,injected_mass_kg,period_c3_km2_s2\n", f);
    for (size_t q = 0; q < n; q++) {
        const sy_period *p = &jobs[q].p;
        for (size_t d = 0; d < p->ndays; d++) {
            const sy_period_day *y = &p->days[d];
            char a[40], b[40], m[32] = "";
            sy_date_format(y->jd_dep, 0, a, sizeof a);
            sy_date_format(y->jd_arr, 0, b, sizeof b);
            if (isfinite(y->mass_kg)) snprintf(m, sizeof m, "%.2f", y->mass_kg);
            fprintf(f, "%s,%s,%zu,%s,%.5f,%s,%.5f,%.5f,%.4f,%.4f,%.5f,%.3f,%s,%s,%.5f\n",
                    p->minimax ? "minimax" : "longest", strategy_name(p->arrival), d + 1, a,
                    y->jd_dep, b, y->jd_arr, y->c3_km2_s2, y->dla_deg, y->rla_deg,
                    y->vinf_arr_km_s, y->tof_days, y->type == 1 ? "I" : "II", m, p->c3_max_km2_s2);
        }
    }
    return (sy_status)sy_outfile_commit(&of, err);
}


static json_t *jdate(double jd)
{
    char b[40];
    sy_date_format(jd, 0, b, sizeof b);
    return json_string(b);
}

static sy_status write_json(const job *jobs, size_t n, const sy_study *st, const sy_grid *g,
                            const char *path, sy_error *err)
{
    json_t *root = json_object();
    json_object_set_new(root, "program", json_string("synodic"));
    json_object_set_new(root, "version", json_string(sy_version()));
    json_object_set_new(root, "study", json_string(st->path));
    json_object_set_new(root, "title", json_string(st->title));
    json_object_set_new(root, "origin", json_string(g->spec.from->name));
    json_object_set_new(root, "target", json_string(g->spec.to->name));
    json_object_set_new(root, "caution", json_string(SY_CAUTION));
    json_object_set_new(root, "constraints", sy_report_limits_json(st));
    if (st->lv_capability[0]) {
        json_t *lv = json_object();
        json_object_set_new(lv, "capability_file", json_string(st->lv_capability));
        json_object_set_new(lv, "spacecraft_mass_kg", sy_json_number(st->spacecraft_mass_kg));
        json_object_set_new(root, "launch_vehicle", lv);
    }
    json_t *arr = json_array();
    for (size_t q = 0; q < n; q++) {
        const sy_period *p = &jobs[q].p;
        json_t *o = json_object();
        json_object_set_new(o, "question", json_string(p->minimax ? "minimax" : "longest"));
        json_object_set_new(o, "arrival_strategy", json_string(strategy_name(p->arrival)));
        json_object_set_new(o, "transfer_type", json_string(st->period_type == 1 ? "I" : st->period_type == 2 ? "II" : "either"));
        json_object_set_new(o, "length_days", json_integer((json_int_t)p->ndays));
        json_object_set_new(o, "first_departure_tdb", jdate(p->days[0].jd_dep));
        json_object_set_new(o, "last_departure_tdb", jdate(p->days[p->ndays - 1].jd_dep));
        json_object_set_new(o, "fixed_arrival_tdb",
                            p->arrival == SY_PERIOD_FIXED ? jdate(p->jd_arr_fixed) : json_null());
        json_object_set_new(o, "period_c3_km2_s2", json_real(p->c3_max_km2_s2));
        json_object_set_new(o, "injected_mass_kg", sy_json_number(p->mass_kg));
        json_object_set_new(o, "mass_margin_kg", sy_json_number(p->margin_kg));
        json_t *days = json_array();
        for (size_t d = 0; d < p->ndays; d++) {
            const sy_period_day *y = &p->days[d];
            json_t *e = json_object();
            json_object_set_new(e, "departure_tdb", jdate(y->jd_dep));
            json_object_set_new(e, "departure_jd", json_real(y->jd_dep));
            json_object_set_new(e, "arrival_tdb", jdate(y->jd_arr));
            json_object_set_new(e, "arrival_jd", json_real(y->jd_arr));
            json_object_set_new(e, "c3_km2_s2", sy_json_number(y->c3_km2_s2));
            json_object_set_new(e, "dla_deg", sy_json_number(y->dla_deg));
            json_object_set_new(e, "rla_deg", sy_json_number(y->rla_deg));
            json_object_set_new(e, "vinf_arr_km_s", sy_json_number(y->vinf_arr_km_s));
            json_object_set_new(e, "tof_days", sy_json_number(y->tof_days));
            json_object_set_new(e, "type", json_string(y->type == 1 ? "I" : "II"));
            json_object_set_new(e, "injected_mass_kg", sy_json_number(y->mass_kg));
            json_array_append_new(days, e);
        }
        json_object_set_new(o, "days", days);
        json_array_append_new(arr, o);
    }
    json_object_set_new(root, "periods", arr);
    return sy_report_write_json(root, path, err);
}

int cmd_period(int argc, char **argv)
{
    static const struct option longopts[] = {
        {"output", required_argument, NULL, 'o'},
        {"set", required_argument, NULL, 's'},
        {"length", required_argument, NULL, 'L'},
        {"arrival", required_argument, NULL, 'a'},
        {"type", required_argument, NULL, 'T'},
        {"threads", required_argument, NULL, 't'},
        {"quiet", no_argument, NULL, 'q'},
        {"help", no_argument, NULL, 'h'},
        {NULL, 0, NULL, 0}};
    const char *outdir = NULL;
    const char **sets = calloc((size_t)argc + 1, sizeof *sets);
    size_t nsets = 0;
    int threads = 0, quiet = 0, c, rc = 0, length = 0;
    unsigned arrival = 0;
    int type = -1;
    if (!sets) return cli_error(CLI_EXIT_INTERNAL, "out of memory");
    opterr = 0;
    while ((c = getopt_long(argc, argv, ":o:", longopts, NULL)) != -1) {
        switch (c) {
        case 'o': outdir = optarg; break;
        case 's': sets[nsets++] = optarg; break;
        case 'L': rc = cli_parse_int("--length", optarg, 1, 73050, &length); break;
        case 'a':
            if (!strcmp(optarg, "fixed")) arrival = SY_PERIOD_ARR_FIXED;
            else if (!strcmp(optarg, "free")) arrival = SY_PERIOD_ARR_FREE;
            else if (!strcmp(optarg, "both")) arrival = SY_PERIOD_ARR_FIXED | SY_PERIOD_ARR_FREE;
            else rc = cli_error(CLI_EXIT_INPUT, "--arrival: '%s' is not a strategy; use fixed, free or both", optarg);
            break;
        case 'T':
            if ((type = sy_type_from_name(optarg)) < 0)
                rc = cli_error(CLI_EXIT_INPUT, "--type: '%s' is not a transfer type; use I, II or either", optarg);
            break;
        case 't': rc = cli_parse_int("--threads", optarg, 1, 1024, &threads); break;
        case 'q': quiet = 1; break;
        case 'h': usage_period(stdout); free(sets); return CLI_EXIT_OK;
        default: rc = cli_bad_option("period", c, argv[optind - 1]); break;
        }
        if (rc) { free(sets); return rc; }
    }
    if (argc - optind != 1) {
        free(sets);
        return cli_error(CLI_EXIT_USAGE, "period: expected one STUDY file, got %d argument(s); see 'synodic period --help'", argc - optind);
    }
    sy_study *st;
    rc = cli_load_study(argv[optind], sets, nsets, outdir, &st);
    free(sets);
    if (rc) return rc;
    sy_error err;
    sy_status s;
    if (length) st->period_length_days = length;
    if (arrival) st->period_arrival = arrival;
    if (type >= 0) st->period_type = type;
    const char *only = st->period_type == 1 ? ", Type I only" : st->period_type == 2 ? ", Type II only" : "";

    sy_catalog *cat = NULL;
    sy_grid *g = NULL;
    sy_lvcap *cap = NULL;
    job jobs[4];
    size_t njobs = 0;
    memset(jobs, 0, sizeof jobs);
    const sy_body *from, *to;
    int want_len = isfinite(st->period_length_days), want_long = isfinite(st->c3_max_km2_s2);
    if (!want_len && !want_long) {
        rc = cli_error(CLI_EXIT_INPUT, "%s: nothing to design; give a launch-period length "
                       "(--length DAYS or [period] length_days) or a C3 limit ([limits] c3_max_km2_s2)",
                       st->path);
        goto out;
    }
    if (st->lv_capability[0] && (s = sy_lvcap_load(st->lv_capability, &cap, &err)) != SY_OK) {
        rc = cli_error(cli_exit_for(s), "%s", err.msg);
        goto out;
    }
    if ((rc = cli_study_bodies(st, &cat, &from, &to))) goto out;
    sy_grid_spec spec;
    if ((s = sy_grid_spec_from_study(st, from, to, &spec, &err)) != SY_OK) {
        rc = cli_error(cli_exit_for(s), "%s: %s", st->path, err.msg);
        goto out;
    }
    spec.threads = threads;
    /* Cheap checks before the grid is computed. */
    if (fabs(spec.dx_days - 1.0) > 1e-9) {
        rc = cli_error(CLI_EXIT_INPUT, "%s: launch periods are daily, but [departure] step_days is %g; set step_days = 1",
                       st->path, spec.dx_days);
        goto out;
    }
    if (want_len && (size_t)st->period_length_days > spec.nx) {
        rc = cli_error(CLI_EXIT_INPUT, "%s: a launch period of %.0f days is longer than the departure window of %zu days; "
                       "shorten the period or widen [departure]", st->path, st->period_length_days, spec.nx);
        goto out;
    }
    if ((st->period_arrival & SY_PERIOD_ARR_FIXED) && spec.y_is_tof) {
        rc = cli_error(CLI_EXIT_INPUT, "%s: a fixed arrival date needs an [arrival] window, not [flight]; "
                       "use --arrival free or give an [arrival] window", st->path);
        goto out;
    }
    if ((rc = cli_ensure_dir(st->out_dir))) goto out;

    if ((s = sy_grid_compute(&spec, NULL, NULL, &g, &err)) != SY_OK) {
        rc = cli_error(cli_exit_for(s), "%s: %s", st->path, err.msg);
        goto out;
    }

    /* The periods asked for: minimax of the required length, and the
     * longest under the limits; each for the fixed and/or free arrival. */
    for (int question = 0; question < 2; question++) {
        if (question == 0 && !want_len) continue;
        if (question == 1 && !want_long) continue;
        for (int a = 0; a < 2; a++) {
            sy_period_arrival arr = a == 0 ? SY_PERIOD_FIXED : SY_PERIOD_FREE;
            if (!(st->period_arrival & (a == 0 ? SY_PERIOD_ARR_FIXED : SY_PERIOD_ARR_FREE))) continue;
            job *jb = &jobs[njobs];
            if (question == 0)
                s = sy_period_minimax(g, st, arr, (size_t)st->period_length_days, &jb->p, &err);
            else
                s = sy_period_longest(g, st, arr, &jb->p, &err);
            if (s != SY_OK) {
                rc = cli_error(cli_exit_for(s), "%s: %s", st->path, err.msg);
                goto out;
            }
            njobs++;
            if (question == 1 && jb->p.ndays == 0) {
                rc = cli_error(CLI_EXIT_NOSOL, "%s: no departure day has a %stransfer%s within the study's limits; "
                               "relax [limits]%s or move the windows", st->path,
                               st->period_type == 1 ? "Type I " : st->period_type == 2 ? "Type II " : "",
                               arr == SY_PERIOD_FIXED ? " to any single arrival date" : "",
                               st->period_type ? ", allow either type (--type either)" : "");
                goto out;
            }
            if (cap && (s = sy_period_apply_capability(&jb->p, cap, st->spacecraft_mass_kg, &err)) != SY_OK) {
                rc = cli_error(cli_exit_for(s), "%s: launch period: %s", st->path, err.msg);
                goto out;
            }
            if (question == 0)
                snprintf(jb->title, sizeof jb->title, "Minimax %zu-day launch period, %s arrival%s",
                         jb->p.ndays, arr == SY_PERIOD_FIXED ? "fixed" : "free", only);
            else
                snprintf(jb->title, sizeof jb->title, "Longest launch period with C3 <= %g km2/s2 (all limits), %s arrival%s: %zu days",
                         st->c3_max_km2_s2, arr == SY_PERIOD_FIXED ? "fixed" : "free", only, jb->p.ndays);
        }
    }

    /* Chart paths: the minimax periods when a length was asked for, else
     * the longest ones. */
    sy_chart_path paths[4];
    size_t npaths = 0;
    for (size_t q = 0; q < njobs; q++) {
        job *jb = &jobs[q];
        if (want_len && !jb->p.minimax) continue;
        size_t n = jb->p.ndays;
        jb->px = malloc(n * sizeof *jb->px);
        jb->py = malloc(n * sizeof *jb->py);
        if (!jb->px || !jb->py) { rc = cli_error(CLI_EXIT_INTERNAL, "out of memory"); goto out; }
        for (size_t d = 0; d < n; d++) {
            jb->px[d] = jb->p.days[d].jd_dep;
            jb->py[d] = g->spec.y_is_tof ? jb->p.days[d].tof_days : jb->p.days[d].jd_arr;
        }
        /* C3 rounded up and mass down: the label never promises more
         * than the table. */
        char a[40], extra[96] = "";
        sy_date_format(jb->p.jd_arr_fixed, 0, a, sizeof a);
        if (isfinite(jb->p.margin_kg))
            snprintf(extra, sizeof extra, "\nmass margin %+.0f kg", floor(jb->p.margin_kg));
        else if (isfinite(jb->p.mass_kg))
            snprintf(extra, sizeof extra, "\ninjected mass ≥ %.0f kg", floor(jb->p.mass_kg));
        snprintf(jb->label, sizeof jb->label, "%s%s: %zu days\nC3 ≤ %.2f km²/s²%s",
                 jb->p.arrival == SY_PERIOD_FIXED ? "Fixed arrival " : "Free arrival",
                 jb->p.arrival == SY_PERIOD_FIXED ? a : "", n,
                 ceil(jb->p.c3_max_km2_s2 * 100.0) / 100.0, extra);
        paths[npaths].x_jd = jb->px;
        paths[npaths].y = jb->py;
        paths[npaths].n = n;
        paths[npaths].label = jb->label;
        paths[npaths].legend = NULL;
        npaths++;
    }

    /* Say on the chart what it shows: the study's subtitle plus the
     * launch-period question. */
    char sub[sizeof st->subtitle + 128];
    if (want_len)
        snprintf(sub, sizeof sub, "%s%s%.0f-day launch periods, minimax C3%s", st->subtitle,
                 st->subtitle[0] ? " · " : "", st->period_length_days, only);
    else
        snprintf(sub, sizeof sub, "%s%sLongest launch periods with C3 ≤ %g km²/s²%s", st->subtitle,
                 st->subtitle[0] ? " · " : "", st->c3_max_km2_s2, only);
    size_t nsub = strlen(sub);
    if (nsub >= sizeof st->subtitle) {
        nsub = sizeof st->subtitle - 1;
        while (nsub && ((unsigned char)sub[nsub] & 0xC0) == 0x80) nsub--; /* whole UTF-8 */
    }
    memcpy(st->subtitle, sub, nsub);
    st->subtitle[nsub] = '\0';

    static const struct { unsigned bit; const char *ext; } kinds[] = {
        {SY_FMT_PNG, "png"}, {SY_FMT_SVG, "svg"}, {SY_FMT_PDF, "pdf"},
        {SY_FMT_CSV, "csv"}, {SY_FMT_JSON, "json"}};
    char written[5][4400];
    int nw = 0;
    for (size_t k = 0; k < 5; k++) {
        if (!(st->formats & kinds[k].bit)) continue;
        char path[4400];
        snprintf(path, sizeof path, "%s/%s-period.%s", st->out_dir, st->basename, kinds[k].ext);
        if (kinds[k].bit == SY_FMT_CSV) s = write_csv(jobs, njobs, path, &err);
        else if (kinds[k].bit == SY_FMT_JSON) s = write_json(jobs, njobs, st, g, path, &err);
        else s = sy_figure_write_paths(g, st, NULL, 0, paths, npaths, path, &err);
        if (s != SY_OK) { rc = cli_error(cli_exit_for(s), "%s", err.msg); goto out; }
        snprintf(written[nw++], sizeof written[0], "%s", path);
    }
    if (!quiet) {
        printf("%s\n  %s -> %s, launch-period design on %zu x %zu cells (1-day departures)\n",
               st->title, from->name, to->name, g->nx, g->ny);
        /* With a required length the minimax periods are the answer; the
         * longest periods are then context and print as a summary. */
        for (size_t q = 0; q < njobs; q++)
            print_period(&jobs[q], st, cap != NULL, !want_len || jobs[q].p.minimax);
        printf("\n");
        for (int k = 0; k < nw; k++) printf("  wrote %s\n", written[k]);
        printf("  %s\n", SY_CAUTION);
        if (fflush(stdout) != 0) rc = cli_error(CLI_EXIT_IO, "cannot write to standard output");
    }
out:
    for (size_t q = 0; q < 4; q++) {
        sy_period_free(&jobs[q].p);
        free(jobs[q].px);
        free(jobs[q].py);
    }
    sy_chart_release_caches();
    sy_lvcap_free(cap);
    sy_grid_free(g);
    sy_catalog_free(cat);
    free(st);
    return rc;
}
