/* windows_out.c - what an opportunity scan writes: the text table, CSV,
 * JSON and Markdown, the comparison figure, the porkchop chart of every
 * opportunity on one common colour scale, and the atlas PDF.  Numbers are
 * printed with fixed formats so the same scan gives the same bytes. */
#include "config.h"
#include "synodic.h"
#include "synodic/atlas.h"
#include "synodic/chart.h"
#include "synodic/figure.h"
#include "synodic/io.h"
#include "synodic/report.h"
#include "synodic/windows.h"

#include <jansson.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* Departures charted around each optimum, days. */
#define CHART_DEP_MARGIN 60.0

static const char *type_name(int t) { return t == 1 ? "I" : "II"; }

static int any_dv(const sy_windows *w)
{
    for (size_t k = 0; k < w->nwindows; k++)
        if (isfinite(w->windows[k].best.dv_total_km_s)) return 1;
    return 0;
}

/* Date of the nearest midnight (TDB): tables give days, and a refined
 * optimum at 20:00 belongs to the next day, as the feasibility lattice
 * (midnights) does. */
static void day_format(double jd, char *buf, size_t n)
{
    sy_date_format(nearbyint(jd - 0.5) + 0.5, 0, buf, n);
}

static void date_or_dash(double jd, char *buf, size_t n)
{
    if (isfinite(jd)) day_format(jd, buf, n);
    else snprintf(buf, n, "-");
}

/* Table cells of one window, as text. */
typedef struct {
    char opp[16], type[8], dep[32], arr[32], tof[16], c3[16], vinf[16],
        dla[16], dv[16], open[40], close[40], ok[8];
} row_text;

static void row_of(const sy_windows *w, size_t k, row_text *r)
{
    const sy_window *wd = &w->windows[k];
    const sy_transfer *t = &wd->best;
    snprintf(r->opp, sizeof r->opp, "%zu", wd->season + 1);
    snprintf(r->type, sizeof r->type, "%s", type_name(wd->type));
    day_format(t->jd_dep, r->dep, sizeof r->dep);
    day_format(t->jd_arr, r->arr, sizeof r->arr);
    snprintf(r->tof, sizeof r->tof, "%.1f%s", t->tof_days, wd->tof_at_edge ? "†" : "");
    snprintf(r->c3, sizeof r->c3, "%.2f", t->c3_km2_s2);
    snprintf(r->vinf, sizeof r->vinf, "%.2f", t->vinf_arr_km_s);
    snprintf(r->dla, sizeof r->dla, "%.1f", t->dla_deg);
    if (isfinite(t->dv_total_km_s)) snprintf(r->dv, sizeof r->dv, "%.2f", t->dv_total_km_s);
    else snprintf(r->dv, sizeof r->dv, "-");
    date_or_dash(wd->open_jd, r->open, sizeof r->open);
    date_or_dash(wd->close_jd, r->close, sizeof r->close);
    /* a run cut by the searched span: the date lies at or beyond it */
    if (isfinite(wd->open_jd) && wd->open_at_edge) strcat(r->open, "*");
    if (isfinite(wd->close_jd) && wd->close_at_edge) strcat(r->close, "*");
    snprintf(r->ok, sizeof r->ok, "%s", wd->within_limits ? "yes" : "no");
}

#define MAX_COLS 13

/* Column set shared by every table output. */
typedef struct {
    const char *head[MAX_COLS];
    size_t n;
    int dv, lim;
} columns;

static void columns_of(const sy_windows *w, columns *c)
{
    static const char *base[] = {"Opp.", "Type", "Departure", "Arrival", "TOF (d)",
                                 "C3 (km²/s²)", "Arr. v∞ (km/s)", "DLA (°)"};
    c->n = 0;
    for (size_t k = 0; k < sizeof base / sizeof base[0]; k++) c->head[c->n++] = base[k];
    c->dv = any_dv(w);
    c->lim = w->has_limits;
    if (c->dv) c->head[c->n++] = "Total Δv (km/s)";
    if (c->lim) {
        c->head[c->n++] = "Within limits";
        c->head[c->n++] = "Opens";
        c->head[c->n++] = "Closes";
    }
}

static int any_tof_edge(const sy_windows *w)
{
    for (size_t k = 0; k < w->nwindows; k++)
        if (w->windows[k].tof_at_edge) return 1;
    return 0;
}

static const char TOF_EDGE_NOTE[] =
    "† flight time at the end of the scanned window: a longer or shorter flight may need less C3; widen the window to see.";

static void row_cells(const columns *c, const row_text *r, const char **cell)
{
    size_t n = 0;
    const char *base[] = {r->opp, r->type, r->dep, r->arr, r->tof, r->c3, r->vinf, r->dla};
    for (size_t k = 0; k < 8; k++) cell[n++] = base[k];
    if (c->dv) cell[n++] = r->dv;
    if (c->lim) {
        cell[n++] = r->ok;
        cell[n++] = r->open;
        cell[n++] = r->close;
    }
}

/* Display width of UTF-8 text (code points; every one used is narrow). */
static size_t u8width(const char *s)
{
    size_t n = 0;
    for (; *s; s++) n += ((unsigned char)*s & 0xC0) != 0x80;
    return n;
}

void sy_windows_print(const sy_windows *w, FILE *out)
{
    columns c;
    columns_of(w, &c);
    row_text *rows = calloc(w->nwindows ? w->nwindows : 1, sizeof *rows);
    if (!rows) return;
    size_t width[MAX_COLS];
    for (size_t k = 0; k < c.n; k++) width[k] = u8width(c.head[k]);
    const char *cell[MAX_COLS];
    for (size_t r = 0; r < w->nwindows; r++) {
        row_of(w, r, &rows[r]);
        row_cells(&c, &rows[r], cell);
        for (size_t k = 0; k < c.n; k++)
            if (u8width(cell[k]) > width[k]) width[k] = u8width(cell[k]);
    }
    char d0[32], d1[32];
    sy_date_format(w->spec.dep_start_jd, 0, d0, sizeof d0);
    sy_date_format(w->spec.dep_end_jd, 0, d1, sizeof d1);
    fprintf(out, "%s -> %s opportunities, departures %s .. %s, flight %g .. %g d\n",
            w->spec.from->name, w->spec.to->name, d0, d1, w->spec.tof_min_days,
            w->spec.tof_max_days);
    fprintf(out, "synodic period %.1f d (mean motions); %zu opportunities, %zu windows (minimum C3 per type)\n\n",
            w->synodic_days, w->nseasons, w->nwindows);
    for (int pass = 0; pass <= (int)w->nwindows; pass++) {
        if (pass == 0) {
            for (size_t k = 0; k < c.n; k++) cell[k] = c.head[k];
        } else {
            row_cells(&c, &rows[pass - 1], cell);
        }
        fputs("  ", out);
        for (size_t k = 0; k < c.n; k++) {
            size_t pad = width[k] - u8width(cell[k]);
            /* text columns left, numbers right */
            int left = k == 1 || (pass == 0 && k >= 2 && k <= 3);
            if (k > 0) fputs("  ", out);
            if (!left) for (size_t p = 0; p < pad; p++) fputc(' ', out);
            fputs(cell[k], out);
            if (left && k + 1 < c.n) for (size_t p = 0; p < pad; p++) fputc(' ', out);
        }
        fputc('\n', out);
    }
    free(rows);
    if (any_tof_edge(w)) fprintf(out, "\n  %s\n", TOF_EDGE_NOTE);
    if (w->has_limits) {
        int edge = 0;
        for (size_t k = 0; k < w->nwindows; k++)
            edge |= w->windows[k].open_at_edge || w->windows[k].close_at_edge;
        fprintf(out, "\n  Opens/Closes: first and last departure day on which some arrival of the type\n"
                     "  meets every limit of the study.%s\n",
                edge ? "  * the run reaches the edge of the searched span." : "");
    }
}

sy_status sy_windows_write_csv(const sy_windows *w, const char *path, sy_error *err)
{
    sy_outfile of;
    sy_status s = (sy_status)sy_outfile_open(&of, path, err);
    if (s != SY_OK) return s;
    FILE *f = of.fp;
    fputs("opportunity,type,departure_tdb,departure_jd,arrival_tdb,arrival_jd,tof_days,"
          "c3_km2_s2,vinf_dep_km_s,dla_deg,rla_deg,vinf_arr_km_s,dv_total_km_s,"
          "within_limits,open_tdb,open_jd,close_tdb,close_jd\n", f);
    for (size_t k = 0; k < w->nwindows; k++) {
        const sy_window *wd = &w->windows[k];
        const sy_transfer *t = &wd->best;
        char a[32], b[32], o[32], c[32];
        day_format(t->jd_dep, a, sizeof a);
        day_format(t->jd_arr, b, sizeof b);
        fprintf(f, "%zu,%s,%s,%.2f,%s,%.2f,%.2f,%.4f,%.4f,%.3f,%.3f,%.4f,", wd->season + 1,
                type_name(wd->type), a, t->jd_dep, b, t->jd_arr, t->tof_days, t->c3_km2_s2,
                t->vinf_dep_km_s, t->dla_deg, t->rla_deg, t->vinf_arr_km_s);
        if (isfinite(t->dv_total_km_s)) fprintf(f, "%.4f", t->dv_total_km_s);
        fprintf(f, ",%d,", wd->within_limits);
        if (isfinite(wd->open_jd)) {
            sy_date_format(wd->open_jd, 0, o, sizeof o);
            sy_date_format(wd->close_jd, 0, c, sizeof c);
            fprintf(f, "%s,%.2f,%s,%.2f\n", o, wd->open_jd, c, wd->close_jd);
        } else {
            fputs(",,,\n", f);
        }
    }
    return (sy_status)sy_outfile_commit(&of, err);
}

static double r2(double v) { return nearbyint(v * 100.0) / 100.0; }

sy_status sy_windows_write_json(const sy_windows *w, const sy_study *st,
                                const char *path, sy_error *err)
{
    json_t *root = json_object();
    json_object_set_new(root, "program", json_string("synodic"));
    json_object_set_new(root, "version", json_string(sy_version()));
    json_object_set_new(root, "study", json_string(st->path));
    json_object_set_new(root, "title", json_string(st->title));
    json_object_set_new(root, "origin", json_string(w->spec.from->name));
    json_object_set_new(root, "target", json_string(w->spec.to->name));
    json_object_set_new(root, "model", json_string(SY_MODEL_TEXT));
    json_object_set_new(root, "caution", json_string(SY_CAUTION));
    json_t *scan = json_object();
    json_object_set_new(scan, "departure_start_jd", json_real(w->spec.dep_start_jd));
    json_object_set_new(scan, "departure_end_jd", json_real(w->spec.dep_end_jd));
    json_object_set_new(scan, "tof_min_days", json_real(w->spec.tof_min_days));
    json_object_set_new(scan, "tof_max_days", json_real(w->spec.tof_max_days));
    json_object_set_new(scan, "coarse_departure_step_days", json_real(w->spec.coarse_dep_days));
    json_object_set_new(scan, "coarse_tof_step_days", json_real(w->spec.coarse_tof_days));
    json_object_set_new(scan, "fine_step_days", json_real(1.0));
    json_object_set_new(scan, "synodic_period_days", json_real(r2(w->synodic_days)));
    json_object_set_new(root, "scan", scan);
    json_object_set_new(root, "constraints", sy_report_limits_json(st));
    json_t *arr = json_array();
    for (size_t k = 0; k < w->nwindows; k++) {
        const sy_window *wd = &w->windows[k];
        const sy_transfer *t = &wd->best;
        json_t *o = json_object();
        json_object_set_new(o, "opportunity", json_integer((json_int_t)wd->season + 1));
        json_object_set_new(o, "type", json_string(type_name(wd->type)));
        json_object_set_new(o, "departure_jd", json_real(r2(t->jd_dep)));
        json_object_set_new(o, "arrival_jd", json_real(r2(t->jd_arr)));
        json_object_set_new(o, "tof_days", json_real(r2(t->tof_days)));
        json_object_set_new(o, "c3_km2_s2", sy_json_number(t->c3_km2_s2));
        json_object_set_new(o, "vinf_arr_km_s", sy_json_number(t->vinf_arr_km_s));
        json_object_set_new(o, "dla_deg", sy_json_number(t->dla_deg));
        json_object_set_new(o, "rla_deg", sy_json_number(t->rla_deg));
        json_object_set_new(o, "vinf_dep_km_s", sy_json_number(t->vinf_dep_km_s));
        json_object_set_new(o, "dv_total_km_s", sy_json_number(t->dv_total_km_s));
        json_object_set_new(o, "tof_at_window_edge", json_boolean(wd->tof_at_edge));
        json_object_set_new(o, "within_limits", json_boolean(wd->within_limits));
        json_object_set_new(o, "open_jd", sy_json_number(wd->open_jd));
        json_object_set_new(o, "close_jd", sy_json_number(wd->close_jd));
        json_object_set_new(o, "open_at_span_edge", json_boolean(wd->open_at_edge));
        json_object_set_new(o, "close_at_span_edge", json_boolean(wd->close_at_edge));
        json_array_append_new(arr, o);
    }
    json_object_set_new(root, "opportunities", arr);
    return sy_report_write_json(root, path, err);
}

sy_status sy_windows_write_markdown(const sy_windows *w, const sy_study *st,
                                    const char *path, sy_error *err)
{
    sy_outfile of;
    sy_status s = (sy_status)sy_outfile_open(&of, path, err);
    if (s != SY_OK) return s;
    FILE *f = of.fp;
    char d0[32], d1[32];
    sy_date_format(w->spec.dep_start_jd, 0, d0, sizeof d0);
    sy_date_format(w->spec.dep_end_jd, 0, d1, sizeof d1);
    fprintf(f, "# %s\n\n", st->title);
    if (st->subtitle[0]) fprintf(f, "%s\n\n", st->subtitle);
    fprintf(f, "%s to %s, departures %s to %s (TDB), flight times %g to %g days; "
               "synodic period %.1f days. One row per transfer type and opportunity: "
               "the minimum-C3 transfer%s.\n\n",
            w->spec.from->name, w->spec.to->name, d0, d1, w->spec.tof_min_days,
            w->spec.tof_max_days, w->synodic_days,
            w->has_limits ? " meeting the study's limits (Within limits: no, the unconstrained minimum "
                            "when no departure of that type meets them)" : "");
    columns c;
    columns_of(w, &c);
    const char *cell[MAX_COLS];
    fputc('|', f);
    for (size_t k = 0; k < c.n; k++) fprintf(f, " %s |", c.head[k]);
    fputs("\n|", f);
    for (size_t k = 0; k < c.n; k++) fputs(k == 1 || k == 2 || k == 3 ? "---|" : "---:|", f);
    fputc('\n', f);
    for (size_t r = 0; r < w->nwindows; r++) {
        row_text rt;
        row_of(w, r, &rt);
        row_cells(&c, &rt, cell);
        fputc('|', f);
        for (size_t k = 0; k < c.n; k++) fprintf(f, " %s |", cell[k]);
        fputc('\n', f);
    }
    fputc('\n', f);
    if (w->has_limits) {
        fputs("Limits:", f);
        if (isfinite(st->c3_max_km2_s2)) fprintf(f, " C3 <= %g km²/s²;", st->c3_max_km2_s2);
        if (isfinite(st->vinf_arr_max_km_s)) fprintf(f, " arrival v∞ <= %g km/s;", st->vinf_arr_max_km_s);
        if (isfinite(st->dla_max_deg)) fprintf(f, " |DLA| <= %g°;", st->dla_max_deg);
        if (isfinite(st->tof_min_days)) fprintf(f, " flight time >= %g d;", st->tof_min_days);
        if (isfinite(st->tof_max_days)) fprintf(f, " flight time <= %g d;", st->tof_max_days);
        fputs(" Opens/Closes are the first and last departure day on which some arrival of "
              "the type meets them (* where the run reaches the edge of the searched span).\n\n", f);
    }
    if (any_tof_edge(w)) fprintf(f, "%s\n\n", TOF_EDGE_NOTE);
    fprintf(f, "Dates are TDB. %s. %s\n", SY_MODEL_TEXT, SY_CAUTION);
    return (sy_status)sy_outfile_commit(&of, err);
}

static const char *footer_lines[2];

static void page_of(const sy_study *st, sy_chart_page *page, sy_chart_text *text,
                    char *software, size_t nsoft)
{
    sy_chart_page_init(page);
    page->width_in = st->width_in > 0 ? st->width_in : 7.5;
    page->height_in = st->height_in > 0 ? st->height_in : 5.5;
    page->dpi = st->dpi > 0 ? st->dpi : 200;
    page->format = SY_CHART_FMT_AUTO;
    snprintf(software, nsoft, "synodic %s", sy_version());
    text[0].key = "Title";
    text[0].value = st->title;
    text[1].key = "Software";
    text[1].value = software;
    text[2].key = "Comment";
    text[2].value = SY_CAUTION;
    page->text = text;
    page->ntext = 3;
}

/* The comparison figure, ready for sy_xy_write or an atlas page.  Series
 * 0 and 1 are Type I and II within the limits (a gap where none is met);
 * series 2 holds the unconstrained minima of those gaps, unconnected. */
typedef struct {
    double *x[3], *c3[3], *v[3];
    size_t n[3];
    sy_xy_series sc3[3], sv[3];
    char subtitle[256];
    sy_xy_chart xy;
} comparison;

static void comparison_free(comparison *c)
{
    for (int t = 0; t < 3; t++) { free(c->x[t]); free(c->c3[t]); free(c->v[t]); }
}

static sy_status comparison_build(const sy_windows *w, const sy_study *st, comparison *c)
{
    memset(c, 0, sizeof *c);
    size_t nseries = 0;
    for (int t = 0; t < 3; t++) {
        size_t m = w->nwindows ? w->nwindows : 1;
        c->x[t] = malloc(m * sizeof(double));
        c->c3[t] = malloc(m * sizeof(double));
        c->v[t] = malloc(m * sizeof(double));
        if (!c->x[t] || !c->c3[t] || !c->v[t]) { comparison_free(c); return SY_ERR_NOMEM; }
    }
    for (size_t k = 0; k < w->nwindows; k++) {
        const sy_window *wd = &w->windows[k];
        int t = wd->type - 1;
        int ok = wd->within_limits;
        c->x[t][c->n[t]] = wd->best.jd_dep;
        c->c3[t][c->n[t]] = ok ? wd->best.c3_km2_s2 : NAN;
        c->v[t][c->n[t]] = ok ? wd->best.vinf_arr_km_s : NAN;
        c->n[t]++;
        if (!ok) {
            c->x[2][c->n[2]] = wd->best.jd_dep;
            c->c3[2][c->n[2]] = wd->best.c3_km2_s2;
            c->v[2][c->n[2]] = wd->best.vinf_arr_km_s;
            c->n[2]++;
        }
    }
    for (int t = 0; t < 3; t++) {
        if (!c->n[t]) continue;
        static const char *const legend[3] = {"Type I", "Type II",
                                              "No departure within the limits (unconstrained minimum)"};
        sy_xy_series a = {c->x[t], c->c3[t], c->n[t],
                          t == 0 ? SY_CHART_MARK_CIRCLE : t == 1 ? SY_CHART_MARK_SQUARE : SY_CHART_MARK_TRIANGLE,
                          t == 0 ? SY_CHART_PRIMARY : t == 1 ? SY_CHART_SECONDARY : SY_CHART_TERTIARY,
                          t < 2, legend[t]};
        c->sc3[nseries] = a;
        a.y = c->v[t];
        c->sv[nseries] = a;
        nseries++;
    }
    snprintf(c->subtitle, sizeof c->subtitle,
             "%s → %s: minimum C3 of each opportunity and transfer type%s, with its arrival v∞",
             w->spec.from->name, w->spec.to->name, w->has_limits ? " within the limits" : "");
    c->xy.title = st->title;
    c->xy.subtitle = c->subtitle;
    c->xy.xtitle = "Departure date (TDB)";
    c->xy.x_is_date = 1;
    c->xy.panels[0].ytitle = "Minimum C3 (km²/s²)";
    c->xy.panels[0].series = c->sc3;
    c->xy.panels[0].nseries = nseries;
    c->xy.panels[1].ytitle = "Arrival v∞ (km/s)";
    c->xy.panels[1].series = c->sv;
    c->xy.panels[1].nseries = nseries;
    c->xy.npanels = 2;
    footer_lines[0] = SY_MODEL_TEXT;
    footer_lines[1] = SY_CAUTION;
    c->xy.footer = footer_lines;
    c->xy.nfooter = 2;
    return SY_OK;
}

sy_status sy_windows_write_comparison(const sy_windows *w, const sy_study *st,
                                      const char *path, sy_error *err)
{
    comparison c;
    if (comparison_build(w, st, &c) != SY_OK) return sy_fail(err, SY_ERR_NOMEM, "out of memory");
    sy_chart_page page;
    sy_chart_text text[3];
    char soft[64];
    page_of(st, &page, text, soft, sizeof soft);
    sy_status s = sy_xy_write(&c.xy, &page, path, err);
    comparison_free(&c);
    return s;
}

/* ------------------------------------------------------------------ */
/* Porkchop charts on a common scale                                   */

/* The levels shared by every opportunity's chart: C3 (primary, filled)
 * and arrival v-infinity as fixed lists, and the time-of-flight lines. */
typedef struct {
    sy_chart_field field[2];
    double tof[SY_MAX_LEVELS];
    size_t ntof;
} common_levels;

static void levels_of(const sy_windows *w, const sy_study *st, common_levels *L)
{
    double c3lo = INFINITY, c3hi = -INFINITY, vlo = INFINITY, vhi = -INFINITY;
    for (size_t k = 0; k < w->nwindows; k++) {
        const sy_transfer *t = &w->windows[k].best;
        c3lo = fmin(c3lo, t->c3_km2_s2);
        c3hi = fmax(c3hi, t->c3_km2_s2);
        vlo = fmin(vlo, t->vinf_arr_km_s);
        vhi = fmax(vhi, t->vinf_arr_km_s);
    }
    memset(L, 0, sizeof *L);
    L->field[0].field = SY_F_C3;
    L->field[1].field = SY_F_VINF_ARR;
    /* From the best opportunity's minimum to well above the worst one's
     * (or past the study's limit), so every basin shows its shape. */
    double ztop = fmax(2.0 * c3hi, c3lo + 10.0);
    if (isfinite(st->c3_max_km2_s2)) ztop = fmax(ztop, 1.5 * st->c3_max_km2_s2);
    L->field[0].nlevels = sy_nice_levels(c3lo, ztop, 12, L->field[0].levels, SY_MAX_LEVELS);
    double vtop = fmax(2.0 * vhi, vlo + 2.0);
    if (isfinite(st->vinf_arr_max_km_s)) vtop = fmax(vtop, 1.5 * st->vinf_arr_max_km_s);
    L->field[1].nlevels = sy_nice_levels(vlo, vtop, 6, L->field[1].levels, SY_MAX_LEVELS);
    L->ntof = sy_nice_levels(w->spec.tof_min_days, w->spec.tof_max_days, 6, L->tof, SY_MAX_LEVELS);
}

/* The grid of one opportunity: departures +-60 d around its optima on
 * whole days, arrivals around theirs by a share of the flight-time
 * window.  *dlo is the earliest optimum's departure. */
static sy_status season_grid(const sy_windows *w, size_t si, sy_grid **g, double *dlo,
                             sy_error *err)
{
    const sy_season *se = &w->seasons[si];
    double lo = INFINITY, dhi = -INFINITY, alo = INFINITY, ahi = -INFINITY;
    for (int t = 0; t < 2; t++) {
        if (se->window[t] < 0) continue;
        const sy_transfer *b = &w->windows[se->window[t]].best;
        lo = fmin(lo, b->jd_dep);
        dhi = fmax(dhi, b->jd_dep);
        alo = fmin(alo, b->jd_arr);
        ahi = fmax(ahi, b->jd_arr);
    }
    *dlo = lo;
    double x0 = floor(lo - CHART_DEP_MARGIN) + 0.5, x1 = ceil(dhi + CHART_DEP_MARGIN) + 0.5;
    double am = fmax(75.0, 0.3 * (w->spec.tof_max_days - w->spec.tof_min_days));
    double y0 = floor(alo - am) + 0.5, y1 = ceil(ahi + am) + 0.5;
    if (y0 < x0 + 1.0) y0 = x0 + 1.0;
    double dy = fmax(1.0, floor((y1 - y0) / 300.0));
    sy_grid_spec gs;
    memset(&gs, 0, sizeof gs);
    gs.from = w->spec.from;
    gs.to = w->spec.to;
    gs.x0_jd = x0;
    gs.dx_days = 1.0;
    gs.nx = (size_t)(x1 - x0) + 1;
    gs.y0 = y0;
    gs.dy_days = dy;
    gs.ny = (size_t)floor((y1 - y0) / dy) + 1;
    gs.revs = w->spec.revs;
    gs.branch = w->spec.branch;
    gs.opts = w->spec.opts;
    gs.threads = w->spec.threads;
    return sy_grid_compute(&gs, NULL, NULL, g, err);
}

/* One opportunity's porkchop: the figure module's chart of its grid
 * (sy_figure_build), with what differs here: C3 and arrival v-infinity
 * on the common levels whatever the study's [chart] fields, C3 always
 * filled, the common time-of-flight lines, and as markers the scan's
 * minimum-C3 window of each type (dates rounded to the day as in the
 * table, flagged when outside the limits) instead of grid optima. */
static sy_status season_figure(const sy_windows *w, const sy_study *st, size_t si,
                               const common_levels *L, const sy_grid *g, double dlo,
                               sy_figure **out, sy_error *err)
{
    const sy_season *se = &w->seasons[si];
    char a[32], b[32], subtitle[256], mlabel[2][160];
    sy_date_format(dlo, 0, a, sizeof a);
    a[7] = '\0';
    snprintf(subtitle, sizeof subtitle, "Opportunity %zu of %zu (%s): %s → %s, common C3 scale",
             si + 1, w->nseasons, a, w->spec.from->name, w->spec.to->name);
    sy_chart_marker marks[2];
    size_t nm = 0;
    for (int t = 0; t < 2; t++) {
        if (se->window[t] < 0) continue;
        const sy_window *wd = &w->windows[se->window[t]];
        day_format(wd->best.jd_dep, a, sizeof a);
        day_format(wd->best.jd_arr, b, sizeof b);
        snprintf(mlabel[nm], sizeof mlabel[nm], "min C3 (Type %s) %.2f km²/s²%s\n%s → %s",
                 type_name(wd->type), wd->best.c3_km2_s2, wd->within_limits ? "" : " (outside limits)", a, b);
        marks[nm] = (sy_chart_marker){wd->best.jd_dep, wd->best.jd_arr,
                                      t == 0 ? SY_CHART_MARK_CIRCLE : SY_CHART_MARK_SQUARE,
                                      mlabel[nm], NULL};
        nm++;
    }
    sy_figure_opts o;
    memset(&o, 0, sizeof o);
    o.fields = L->field;
    o.nfields = 2;
    o.label_every[0] = L->field[0].nlevels > 10 ? 2 : 1;
    o.tof_days = L->tof;
    o.ntof = L->ntof;
    o.force_filled = 1;
    o.subtitle = subtitle;
    o.footer_extra = "Same C3 and arrival v∞ levels on every opportunity.";
    o.markers = marks;
    o.nmarkers = nm;
    return sy_figure_build(g, st, NULL, 0, &o, out, err);
}

/* The cover table: every window, the caution in the notes. */
static sy_status add_cover(sy_doc *doc, const sy_windows *w, const sy_study *st, sy_error *err)
{
    columns c;
    columns_of(w, &c);
    size_t nrows = w->nwindows;
    row_text *rows = calloc(nrows ? nrows : 1, sizeof *rows);
    const char **cells = calloc((nrows ? nrows : 1) * c.n, sizeof *cells);
    if (!rows || !cells) {
        free(rows); free(cells);
        return sy_fail(err, SY_ERR_NOMEM, "out of memory");
    }
    for (size_t r = 0; r < nrows; r++) {
        row_of(w, r, &rows[r]);
        row_cells(&c, &rows[r], cells + r * c.n);
    }
    char sub[256], n1[1024], n2[512], n3[512], d0[32], d1[32];
    sy_date_format(w->spec.dep_start_jd, 0, d0, sizeof d0);
    sy_date_format(w->spec.dep_end_jd, 0, d1, sizeof d1);
    snprintf(sub, sizeof sub, "%s → %s launch opportunities, departures %s to %s (TDB)",
             w->spec.from->name, w->spec.to->name, d0, d1);
    snprintf(n1, sizeof n1,
             "One row per opportunity and transfer type: the minimum-C3 transfer%s, flight times "
             "%g to %g days. Opportunities recur with the %.1f-day synodic period (from the mean "
             "motions). The following pages chart each opportunity on one common C3 colour scale.",
             w->has_limits ? " meeting the study's limits (Within limits: no, the unconstrained minimum "
                             "when no departure of that type meets them)" : "",
             w->spec.tof_min_days, w->spec.tof_max_days, w->synodic_days);
    size_t nn = 0;
    const char *notes[4];
    notes[nn++] = n1;
    if (w->has_limits) {
        char l[256] = "";
        size_t u = 0;
        if (isfinite(st->c3_max_km2_s2)) u += (size_t)snprintf(l + u, sizeof l - u, " C3 ≤ %g km²/s²;", st->c3_max_km2_s2);
        if (isfinite(st->vinf_arr_max_km_s) && u < sizeof l) u += (size_t)snprintf(l + u, sizeof l - u, " arrival v∞ ≤ %g km/s;", st->vinf_arr_max_km_s);
        if (isfinite(st->dla_max_deg) && u < sizeof l) u += (size_t)snprintf(l + u, sizeof l - u, " |DLA| ≤ %g°;", st->dla_max_deg);
        if (isfinite(st->tof_min_days) && u < sizeof l) u += (size_t)snprintf(l + u, sizeof l - u, " flight time ≥ %g d;", st->tof_min_days);
        if (isfinite(st->tof_max_days) && u < sizeof l) snprintf(l + u, sizeof l - u, " flight time ≤ %g d;", st->tof_max_days);
        snprintf(n2, sizeof n2, "Limits:%s Opens and Closes are the first and last departure day on "
                 "which some arrival of the type meets every limit (* where that run reaches the "
                 "edge of the searched span).", l);
        notes[nn++] = n2;
    }
    if (any_tof_edge(w)) notes[nn++] = TOF_EDGE_NOTE;
    snprintf(n3, sizeof n3, "Caution: %s", SY_CAUTION);
    notes[nn++] = n3;
    const char *footer[1] = {SY_MODEL_TEXT};
    sy_table_page tp = {st->title, sub, c.head, c.n, cells, nrows, notes, nn, footer, 1};
    sy_status s = sy_doc_add_table(doc, &tp, NULL, err);
    free(rows);
    free(cells);
    return s;
}

sy_status sy_windows_write_charts(const sy_windows *w, const sy_study *st,
                                  const char *dir, const char *base,
                                  int write_png, const char *atlas_path,
                                  size_t *npages, sy_error *err)
{
    if (npages) *npages = 0;
    common_levels L;
    levels_of(w, st, &L);
    sy_chart_page page;
    sy_chart_text text[3];
    char soft[64];
    page_of(st, &page, text, soft, sizeof soft);
    sy_doc *doc = NULL;
    sy_status s = SY_OK;
    if (atlas_path) {
        s = sy_doc_open(&doc, atlas_path, page.width_in, page.height_in, st->title, soft, err);
        if (s != SY_OK) return s;
        s = add_cover(doc, w, st, err);
    }
    for (size_t si = 0; si < w->nseasons && s == SY_OK; si++) {
        sy_grid *g = NULL;
        sy_figure *fig = NULL;
        double dlo;
        s = season_grid(w, si, &g, &dlo, err);
        if (s == SY_OK) s = season_figure(w, st, si, &L, g, dlo, &fig, err);
        if (s == SY_OK && write_png) {
            char path[4400];
            sy_chart_page fpage;
            sy_figure_page(fig, &fpage);
            /* the size of the comparison figure and atlas (page_of) */
            fpage.width_in = page.width_in;
            fpage.height_in = page.height_in;
            fpage.dpi = page.dpi;
            snprintf(path, sizeof path, "%s/%s-%02zu.png", dir, base, si + 1);
            s = sy_chart_write(sy_figure_chart(fig), &fpage, path, err);
        }
        if (s == SY_OK && doc) s = sy_doc_add_chart(doc, sy_figure_chart(fig), err);
        sy_figure_free(fig);
        sy_grid_free(g);
    }
    if (doc) {
        if (s != SY_OK) {
            sy_doc_abort(doc);
            return s;
        }
        size_t n = sy_doc_page_count(doc);
        s = sy_doc_close(doc, err);
        if (s == SY_OK && npages) *npages = n;
    }
    return s;
}
