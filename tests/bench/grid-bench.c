/* grid-bench.c - performance figures of the grid engine (`make bench`).
 *
 * A benchmark, not a test: it measures and prints, it never fails on a
 * time.  Earth -> Mars, 1-day steps.
 *
 *   grid-bench [--dep-start JD] [--nd N] [--arr-start JD] [--na M]
 *              [--threads T] [--fields LIST] [--repeat R] [--render]
 *
 * LIST is a comma-separated list of field names (c3,vinf_arr,...; see
 * sy_field_name) or "all" (the default: every field the engine stores).
 * The first run computes a new grid; the R runs after it recompute into
 * that grid (sy_grid_recompute, as a re-run with tuned options does).
 * Prints one JSON line: cells, finite_cells, threads, fields, kernel,
 * seconds (best of the R recomputes, planet states already tabulated:
 * the tabulation time is measured by the engine and subtracted),
 * seconds_total (best wall time including it), cells_per_s (cells /
 * seconds), finite_cells_per_s (solved cells / seconds: cells without
 * a transfer, such as arrivals before departure, cost almost nothing, so
 * this is the rate to compare between grids of different shapes),
 * seconds_first and cells_per_s_first (the first run, whose
 * time includes allocating and first touching the grid's memory: on
 * this VM class ~0.4 ms per MiB, a third of an all-fields sweep),
 * mean_sweeps (Householder sweeps per solved block of the vector
 * kernel), ephem_share, c3_min and where, peak_rss_mib, bytes_per_cell
 * (peak RSS / cells, so it includes the process's fixed footprint),
 * cpu_seconds (least process CPU time of one recompute,
 * tabulation included, all threads added; OpenMP threads spinning at a
 * barrier count too) and cells_per_cpu_s (cells /
 * cpu_seconds: on a machine shared with other work the wall time counts
 * time the sweep spent waiting for a core, the CPU time does not, so on
 * one thread this is the figure to compare between builds), and
 * with --render the time to contour and render one PNG chart of C3 and
 * arrival v-infinity (which --render adds to the fields).
 */
#include "config.h"
#include "synodic.h"
#include "synodic/figure.h"
#include "synodic/grid.h"
#include "synodic/study.h"

#include <getopt.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/resource.h>
#include <time.h>
#include <unistd.h>
#ifdef _OPENMP
#include <omp.h>
#endif

static double now_s(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return ts.tv_sec + 1e-9 * ts.tv_nsec;
}

/* Process CPU time (user + system, every thread). */
static double cpu_s(void)
{
    struct rusage ru;
    getrusage(RUSAGE_SELF, &ru);
    return ru.ru_utime.tv_sec + 1e-6 * ru.ru_utime.tv_usec + ru.ru_stime.tv_sec +
           1e-6 * ru.ru_stime.tv_usec;
}

static double arg_double(const char *opt, const char *s)
{
    char *end;
    double v = strtod(s, &end);
    if (end == s || *end) {
        fprintf(stderr, "grid-bench: %s needs a number, not '%s'\n", opt, s);
        exit(2);
    }
    return v;
}

int main(int argc, char **argv)
{
    double dep0 = 2463458.5, arr0 = 2463630.5; /* 2032-08-14, 2033-02-02 */
    long nd = 1000, na = 1000, repeat = 3;
    int threads = 0, render = 0, c;
    unsigned fields = 0;
    char fields_txt[256] = "all";
    static const struct option lo[] = {
        {"dep-start", required_argument, NULL, 'd'}, {"nd", required_argument, NULL, 'n'},
        {"arr-start", required_argument, NULL, 'a'}, {"na", required_argument, NULL, 'm'},
        {"threads", required_argument, NULL, 't'}, {"repeat", required_argument, NULL, 'r'},
        {"fields", required_argument, NULL, 'f'},
        {"render", no_argument, NULL, 'R'}, {"help", no_argument, NULL, 'h'}, {NULL, 0, NULL, 0}};
    while ((c = getopt_long(argc, argv, "", lo, NULL)) != -1) {
        switch (c) {
        case 'd': dep0 = arg_double("--dep-start", optarg); break;
        case 'n': nd = (long)arg_double("--nd", optarg); break;
        case 'a': arr0 = arg_double("--arr-start", optarg); break;
        case 'm': na = (long)arg_double("--na", optarg); break;
        case 't': threads = (int)arg_double("--threads", optarg); break;
        case 'r': repeat = (long)arg_double("--repeat", optarg); break;
        case 'R': render = 1; break;
        case 'f': {
            snprintf(fields_txt, sizeof fields_txt, "%s", optarg);
            fields = 0;
            if (strcmp(optarg, "all") == 0) break;
            char buf[256], *save = NULL;
            snprintf(buf, sizeof buf, "%s", optarg);
            for (char *tok = strtok_r(buf, ",", &save); tok; tok = strtok_r(NULL, ",", &save)) {
                int f = sy_field_from_name(tok);
                if (f < 0) {
                    fprintf(stderr, "grid-bench: unknown field '%s' in --fields (e.g. c3,vinf_arr)\n", tok);
                    return 2;
                }
                fields |= SY_FIELD_BIT(f);
            }
            break;
        }
        case 'h':
            puts("usage: grid-bench [--dep-start JD] [--nd N] [--arr-start JD] [--na M] "
                 "[--threads T] [--fields LIST] [--repeat R] [--render]");
            return 0;
        default: return 2;
        }
    }
    if (nd < 2 || na < 2 || repeat < 1) {
        fprintf(stderr, "grid-bench: --nd and --na must be >= 2, --repeat >= 1\n");
        return 2;
    }
#ifdef _OPENMP
    if (threads <= 0) threads = omp_get_num_procs();
#else
    threads = 1;
#endif
    sy_catalog *cat = sy_catalog_new();
    const sy_body *earth, *mars;
    sy_catalog_find(cat, "Earth", &earth, NULL);
    sy_catalog_find(cat, "Mars", &mars, NULL);
    sy_grid_spec s;
    memset(&s, 0, sizeof s);
    s.from = earth;
    s.to = mars;
    s.x0_jd = dep0;
    s.dx_days = 1.0;
    s.nx = (size_t)nd;
    s.y0 = arr0;
    s.dy_days = 1.0;
    s.ny = (size_t)na;
    s.opts = (sy_transfer_opts){1, 185.0, 1, 400.0, 33793.0, 1, 125.0};
    s.threads = threads;
    if (render && fields) fields |= SY_FIELD_BIT(SY_F_C3) | SY_FIELD_BIT(SY_F_VINF_ARR) |
                                    SY_FIELD_BIT(SY_F_TOF) | SY_FIELD_BIT(SY_F_ANGLE);
    /* 0 stores every available field; c3_min is always reported */
    if (fields) fields |= SY_FIELD_BIT(SY_F_C3);
    s.fields = fields;

    /* The first run computes a new grid (sy_grid_compute: allocation and
     * first touch of its memory included, reported as seconds_first);
     * the --repeat runs after it recompute into that grid
     * (sy_grid_recompute), as a re-run with tuned options does, and the
     * best of them is `seconds`.  Planet states are tabulated in every
     * run; their time is reported apart (ephem_share) and not counted. */
    double best = INFINITY, best_total = INFINITY, ephem_share = 0, best_cpu = INFINITY;
    double first = 0;
    sy_grid *g = NULL;
    sy_error err;
    for (long r = 0; r <= repeat; r++) {
        double t0 = now_s(), c0 = cpu_s();
        sy_status st = r == 0 ? sy_grid_compute(&s, NULL, NULL, &g, &err)
                              : sy_grid_recompute(g, &s, NULL, NULL, &err);
        if (st != SY_OK) {
            fprintf(stderr, "grid-bench: %s\n", err.msg);
            return 1;
        }
        double dt = now_s() - t0, dc = cpu_s() - c0;
        double sweep = dt - g->seconds_ephem;
        if (r == 0) {
            first = sweep;
            continue;
        }
        if (dc < best_cpu) best_cpu = dc;
        if (sweep < best) {
            best = sweep;
            ephem_share = g->seconds_ephem / dt;
        }
        if (dt < best_total) best_total = dt;
    }
    size_t cells = g->nx * g->ny, finite = 0, kmin = 0;
    for (size_t k = 0; k < cells; k++) {
        if (g->status[k] != SY_CELL_OK) continue;
        finite++;
        if (g->status[kmin] != SY_CELL_OK || g->field[SY_F_C3][k] < g->field[SY_F_C3][kmin]) kmin = k;
    }
    double render_s = -1;
    if (render) {
        sy_study st;
        memset(&st, 0, sizeof st);
        snprintf(st.title, sizeof st.title, "grid-bench Earth-Mars");
        st.c3_max_km2_s2 = 30;
        st.vinf_arr_max_km_s = NAN;
        st.dla_max_deg = st.tof_min_days = st.tof_max_days = NAN;
        st.nfields = 2;
        st.fields[0] = (sy_chart_field){SY_F_C3, 1, 0, {0}};
        st.fields[1] = (sy_chart_field){SY_F_VINF_ARR, 1, 0, {0}};
        st.tof_lines_auto = 1;
        st.show_types = 1;
        st.width_in = 7.5;
        st.height_in = 5.5;
        st.dpi = 200;
        char path[64];
        snprintf(path, sizeof path, "/tmp/grid-bench-%ld.png", (long)getpid());
        double t0 = now_s();
        if (sy_figure_write(g, &st, NULL, 0, path, &err) != SY_OK) {
            fprintf(stderr, "grid-bench: %s\n", err.msg);
            return 1;
        }
        render_s = now_s() - t0;
        unlink(path);
    }
    struct rusage ru;
    getrusage(RUSAGE_SELF, &ru);
    printf("{\"cells\": %zu, \"finite_cells\": %zu, \"threads\": %d, \"fields\": \"%s\", "
           "\"kernel\": \"%s\", \"seconds\": %.4f, \"seconds_total\": %.4f, "
           "\"cells_per_s\": %.0f, \"ephem_share\": %.4f, \"c3_min\": %.4f, "
           "\"c3_min_dep_jd\": %.1f, \"c3_min_arr_jd\": %.1f, \"peak_rss_mib\": %.1f, "
           "\"bytes_per_cell\": %.1f, \"cpu_seconds\": %.4f, \"cells_per_cpu_s\": %.0f",
           cells, finite, threads, fields_txt, g->kernel ? g->kernel : "?", best, best_total,
           cells / best, ephem_share,
           (double)g->field[SY_F_C3][kmin], sy_grid_x_jd(g, (double)(kmin % g->nx)),
           sy_grid_arr_jd(g, (double)(kmin % g->nx), (double)(kmin / g->nx)),
           ru.ru_maxrss / 1024.0, ru.ru_maxrss * 1024.0 / (double)cells, best_cpu,
           cells / best_cpu);
    printf(", \"finite_cells_per_s\": %.0f, \"seconds_first\": %.4f, \"cells_per_s_first\": %.0f, "
           "\"mean_sweeps\": %.3f", finite / best, first, cells / first, g->mean_sweeps);
    if (render) printf(", \"render_seconds\": %.3f", render_s);
    printf("}\n");
    sy_grid_free(g);
    sy_catalog_free(cat);
    return 0;
}
