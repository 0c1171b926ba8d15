/* figure.c - from a computed grid and its study to a chart description:
 * levels, iso-lines, constraint regions, Type I/II boundary, optima
 * markers, titles and footer.  See synodic/figure.h. */
#include "config.h"
#include "synodic.h"
#include "synodic/contour.h"
#include "synodic/figure.h"
#include "synodic/lvcap.h"
#include "synodic/report.h"

#include <gsl/gsl_statistics_float.h>

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* Half-width (deg) of the bands around transfer angles of 180 and 0/360
 * deg where unresolvable iso-lines are left out (see ridge_mask()). */
#define SY_FIGURE_RIDGE_DEG 12.0f

/* Near a transfer angle of 180 deg every field climbs a narrow ridge (the
 * transfer plane swings to high inclination), and so it does near 0/360
 * deg on long flights to a body close to the departure orbit.  Where more than two levels
 * cross one grid step the grid cannot resolve the iso-lines: they bunch
 * into a solid band that says nothing but "avoid" and buries the labels.
 * Such nodes inside the ridge band become gaps for this field's lines. */
static void ridge_mask(const sy_grid *g, const float *z, const double *lv,
                       size_t nlv, const unsigned char *base,
                       unsigned char *out)
{
    const size_t nx = g->nx, ny = g->ny;
    const float *ang = g->field[SY_F_ANGLE];
    memcpy(out, base, nx * ny);
    if (!ang || nlv < 2) return;
    double gap = (lv[nlv - 1] - lv[0]) / (double)(nlv - 1);
    for (size_t j = 0; j < ny; j++)
        for (size_t i = 0; i < nx; i++) {
            size_t k = j * nx + i;
            /* the ridges of 180 and 0/360 degrees alike */
            float a = ang[k], off = fminf(fabsf(a - 180.0f), fminf(a, 360.0f - a));
            if (out[k] || !(off < SY_FIGURE_RIDGE_DEG)) continue;
            double d = 0;
            const size_t nb[4] = {i > 0 ? k - 1 : k, i + 1 < nx ? k + 1 : k,
                                  j > 0 ? k - nx : k, j + 1 < ny ? k + nx : k};
            for (int q = 0; q < 4; q++)
                if (!base[nb[q]]) d = fmax(d, fabs((double)z[nb[q]] - (double)z[k]));
            if (d > 2.0 * gap) out[k] = 1;
        }
}

/* The study's limit on a field, NAN when it has none. */
static double field_limit(const sy_study *st, sy_field f)
{
    switch (f) {
    case SY_F_C3: return st->c3_max_km2_s2;
    case SY_F_VINF_ARR: return st->vinf_arr_max_km_s;
    default: return NAN;
    }
}

size_t sy_figure_levels(const sy_grid *g, const sy_study *st,
                        const sy_chart_field *cf, double *levels, size_t max)
{
    if (!cf->auto_levels) {
        size_t n = cf->nlevels < max ? cf->nlevels : max;
        memcpy(levels, cf->levels, n * sizeof *levels);
        return n;
    }
    const float *z = g->field[cf->field];
    if (!z) return 0;
    size_t cells = g->nx * g->ny, n = 0;
    float *v = malloc(cells * sizeof *v);
    if (!v) return 0;
    for (size_t k = 0; k < cells; k++)
        if (g->status[k] == SY_CELL_OK && isfinite(z[k])) v[n++] = z[k];
    if (n < 4) {
        free(v);
        return 0;
    }
    /* smallest, largest and the 40 % order statistic: GSL's scan and
     * selection (quickselect, linear time) instead of sorting the field,
     * which took a tenth of a second on a 1000 x 1000 grid */
    float vmin, vmax;
    gsl_stats_float_minmax(&vmin, &vmax, v, 1, n);
    double zmin = vmin;
    /* Porkchop fields rise steeply towards the 180-degree ridge and the
     * window edges; an analyst contours the basin, not the walls.  Take
     * the lower part of the distribution, or a bit beyond the limit. */
    double zmax = gsl_stats_float_select(v, 1, n, (size_t)(0.40 * (double)(n - 1)));
    double lim = field_limit(st, cf->field);
    if (isfinite(lim) && lim > zmin) zmax = 1.5 * lim - 0.5 * zmin;
    if (zmax > vmax) zmax = vmax;
    free(v);
    if (!(zmax > zmin)) zmax = zmin + 1.0;
    /* Start from the first nice level above the minimum so the innermost
     * contour encloses the optimum. */
    return sy_nice_levels(zmin, zmax, 10, levels, max);
}

sy_status sy_figure_mass_field(const sy_grid *g, const sy_lvcap *cap,
                               float **mass_kg, unsigned char **invalid,
                               sy_error *err)
{
    const size_t cells = g->nx * g->ny;
    const float *c3 = g->field[SY_F_C3];
    *mass_kg = NULL;
    *invalid = NULL;
    if (!c3) return sy_fail(err, SY_ERR_ARG, "delivered mass needs the grid's C3 field");
    float *m = malloc(cells * sizeof *m);
    unsigned char *bad = malloc(cells);
    if (!m || !bad) {
        free(m);
        free(bad);
        return sy_fail(err, SY_ERR_NOMEM, "out of memory");
    }
    for (size_t k = 0; k < cells; k++) {
        double v = NAN;
        /* Outside the table: blank, not extrapolated (sy_lvcap_mass). */
        if (g->status[k] == SY_CELL_OK) (void)sy_lvcap_mass(cap, c3[k], &v, NULL);
        bad[k] = !isfinite(v);
        m[k] = bad[k] ? 0.0f : (float)v;
    }
    *mass_kg = m;
    *invalid = bad;
    return SY_OK;
}

/* Automatic mass levels over the range the C3 contours cover: injected
 * mass falls as C3 rises, so the C3 basin maps to the upper masses. */
static size_t mass_levels(const sy_grid *g, const sy_study *st, const sy_lvcap *cap,
                          double *levels, size_t max)
{
    if (!st->mass_auto_levels) {
        size_t n = st->nmass_levels < max ? st->nmass_levels : max;
        memcpy(levels, st->mass_levels_kg, n * sizeof *levels);
        return n;
    }
    sy_chart_field cf = {SY_F_C3, 1, 0, {0}};
    double c3lv[SY_MAX_LEVELS], lo, hi, m0, m1;
    size_t n = sy_figure_levels(g, st, &cf, c3lv, SY_MAX_LEVELS);
    if (n < 2) return 0;
    sy_lvcap_range(cap, &lo, &hi);
    double c0 = fmax(c3lv[0], lo), c1 = fmin(c3lv[n - 1], hi);
    if (!(c1 > c0) || sy_lvcap_mass(cap, c0, &m1, NULL) != SY_OK ||
        sy_lvcap_mass(cap, c1, &m0, NULL) != SY_OK || !(m1 > m0))
        return 0;
    return sy_nice_levels(m0, m1, 8, levels, max);
}

static void fmt_value(double v, char *buf, size_t n)
{
    if (fabs(v) >= 100) snprintf(buf, n, "%.0f", v);
    else if (fabs(v) >= 10) snprintf(buf, n, "%.1f", v);
    else snprintf(buf, n, "%.2f", v);
}

static const char *field_unit(sy_field f)
{
    switch (f) {
    case SY_F_C3: case SY_F_C3_ARR: return "km²/s²";
    case SY_F_DLA: case SY_F_RLA: case SY_F_DAP: case SY_F_RAP: case SY_F_ANGLE: return "deg";
    case SY_F_TOF: return "d";
    case SY_F_MIN_SUN: return "AU";
    default: return "km/s";
    }
}

static const char *short_name(sy_field f)
{
    switch (f) {
    case SY_F_C3: return "C3";
    case SY_F_VINF_ARR: return "arrival v∞";
    case SY_F_DV_TOTAL: return "total Δv";
    default: return sy_field_name(f);
    }
}

typedef struct {
    sy_isoline_set *sets;
    size_t nsets;
} traced;

static void traced_free(traced *t)
{
    for (size_t k = 0; k < t->nsets; k++) sy_isoline_set_free(&t->sets[k]);
    free(t->sets);
    t->sets = NULL;
    t->nsets = 0;
}

static sy_status trace_levels(const float *z, const unsigned char *mask, size_t nx,
                              size_t ny, const double *lv, size_t n, traced *out)
{
    out->sets = calloc(n ? n : 1, sizeof *out->sets);
    out->nsets = 0;
    if (!out->sets) return SY_ERR_NOMEM;
    for (size_t k = 0; k < n; k++) {
        int st = sy_contour_trace(z, mask, nx, ny, lv[k], &out->sets[k]);
        if (st != SY_OK) {
            traced_free(out);
            return (sy_status)st;
        }
        out->nsets++;
    }
    return SY_OK;
}

#define SY_FIGURE_MAX_MARKS 8

struct sy_figure {
    sy_chart ch;
    sy_lvcap *cap;
    float *mass;
    unsigned char *mass_bad, *nosol, *ridge, *angle_mask, *regmask[4];
    traced tr[SY_MAX_CHART_FIELDS], mass_tr, boundary;
    double levels[SY_MAX_CHART_FIELDS][SY_MAX_LEVELS], mass_lv[SY_MAX_LEVELS],
        tofs[SY_MAX_LEVELS];
    sy_chart_isolines iso[SY_MAX_CHART_FIELDS + 1];
    char legends[SY_MAX_CHART_FIELDS][96];
    sy_chart_fill fill;
    sy_chart_tof_lines tl;
    sy_chart_boundary bd;
    sy_chart_region regions[4];
    char reglabel[4][96];
    sy_chart_marker marks[SY_FIGURE_MAX_MARKS];
    char mlabel[SY_FIGURE_MAX_MARKS][200];
    char title[256], subtitle[256];
    char f1[256], f3[512], f4[700], f5[512];
    const char *footer[5];
    double width_in, height_in, dpi;
    char software[64], comment[6144];
    sy_chart_text text[4];
};

void sy_figure_free(sy_figure *f)
{
    if (!f) return;
    traced_free(&f->mass_tr);
    free(f->mass);
    free(f->mass_bad);
    sy_lvcap_free(f->cap);
    for (size_t k = 0; k < SY_MAX_CHART_FIELDS; k++) traced_free(&f->tr[k]);
    traced_free(&f->boundary);
    for (int r = 0; r < 4; r++) free(f->regmask[r]);
    free(f->angle_mask);
    free(f->nosol);
    free(f->ridge);
    free(f);
}

const sy_chart *sy_figure_chart(const sy_figure *f) { return &f->ch; }

void sy_figure_page(const sy_figure *f, sy_chart_page *page)
{
    sy_chart_page_init(page);
    page->width_in = f->width_in;
    page->height_in = f->height_in;
    page->dpi = f->dpi;
    page->format = SY_CHART_FMT_AUTO;
    page->text = f->text;
    page->ntext = sizeof f->text / sizeof f->text[0];
}

static sy_chart_role role_of(size_t n)
{
    return n == 0 ? SY_CHART_PRIMARY : n == 1 ? SY_CHART_SECONDARY : SY_CHART_TERTIARY;
}

/* Everything below fills f; on failure the caller frees it. */
static sy_status figure_fill(sy_figure *f, const sy_grid *g, const sy_study *st,
                             const sy_optimum *opt, size_t nopt,
                             const sy_figure_opts *o, sy_error *err)
{
    const size_t nx = g->nx, ny = g->ny, cells = nx * ny;
    sy_status status;
    f->nosol = malloc(cells);
    f->ridge = malloc(cells);
    if (!f->nosol || !f->ridge) return sy_fail(err, SY_ERR_NOMEM, "out of memory");
    unsigned char *nosol = f->nosol, *ridge = f->ridge;
    size_t n_nosol = 0;
    for (size_t k = 0; k < cells; k++) {
        nosol[k] = g->status[k] != SY_CELL_OK;
        n_nosol += nosol[k];
        ridge[k] = nosol[k];
    }

    sy_chart *ch = &f->ch;
    sy_chart_init(ch);
    ch->yaxis = g->spec.y_is_tof ? SY_CHART_Y_TOF : SY_CHART_Y_ARRIVAL;
    ch->nx = nx;
    ch->ny = ny;
    ch->x0_jd = g->spec.x0_jd;
    ch->dx_days = g->spec.dx_days;
    ch->y0 = g->spec.y0;
    ch->dy = g->spec.dy_days;
    snprintf(f->title, sizeof f->title, "%s", o->title ? o->title : st->title);
    snprintf(f->subtitle, sizeof f->subtitle, "%s", o->subtitle ? o->subtitle : st->subtitle);
    ch->title = f->title;
    ch->subtitle = f->subtitle[0] ? f->subtitle : NULL;
    ch->xtitle = "Departure date (TDB)";
    ch->ytitle = g->spec.y_is_tof ? "Time of flight (days)" : "Arrival date (TDB)";
    if (n_nosol) {
        ch->nosol_mask = nosol;
        ch->nosol_legend = "No transfer solution";
    }

    /* Iso-lines of every charted field. */
    const sy_chart_field *fields = o->fields ? o->fields : st->fields;
    size_t nfields = o->fields ? o->nfields : st->nfields;
    if (nfields > SY_MAX_CHART_FIELDS)
        return sy_fail(err, SY_ERR_ARG, "a figure charts at most %d fields, not %zu",
                       SY_MAX_CHART_FIELDS, nfields);
    size_t niso = 0;
    for (size_t k = 0; k < nfields; k++) {
        const sy_chart_field *cf = &fields[k];
        const float *z = g->field[cf->field];
        if (!z) continue;
        size_t n = sy_figure_levels(g, st, cf, f->levels[k], SY_MAX_LEVELS);
        ridge_mask(g, z, f->levels[k], n, nosol, ridge);
        if ((status = trace_levels(z, ridge, nx, ny, f->levels[k], n, &f->tr[k])) != SY_OK)
            return sy_fail(err, status, "contouring %s failed", sy_field_name(cf->field));
        snprintf(f->legends[k], sizeof f->legends[k], "%s", sy_field_label(cf->field));
        f->iso[niso].role = role_of(niso);
        f->iso[niso].sets = f->tr[k].sets;
        f->iso[niso].nsets = f->tr[k].nsets;
        f->iso[niso].legend = f->legends[k];
        f->iso[niso].label_every = o->label_every[k] > 1 ? o->label_every[k] : 1;
        niso++;
    }
    /* Delivered-mass contours: derived from C3 through the capability
     * curve, after the grid (the grid engine stores no mass).  Part of
     * the study's field list, so a caller's list replaces them too. */
    if (!o->fields && st->chart_mass && st->lv_capability[0] && g->field[SY_F_C3]) {
        if ((status = sy_lvcap_load(st->lv_capability, &f->cap, err)) != SY_OK) return status;
        if ((status = sy_figure_mass_field(g, f->cap, &f->mass, &f->mass_bad, err)) != SY_OK)
            return status;
        size_t n = mass_levels(g, st, f->cap, f->mass_lv, SY_MAX_LEVELS);
        for (size_t k = 0; k < cells; k++) f->mass_bad[k] |= nosol[k];
        ridge_mask(g, f->mass, f->mass_lv, n, f->mass_bad, ridge);
        if ((status = trace_levels(f->mass, ridge, nx, ny, f->mass_lv, n, &f->mass_tr)) != SY_OK)
            return sy_fail(err, status, "contouring the delivered mass failed");
        f->iso[niso].role = role_of(niso);
        f->iso[niso].sets = f->mass_tr.sets;
        f->iso[niso].nsets = f->mass_tr.nsets;
        f->iso[niso].legend = "Injected mass (kg)";
        f->iso[niso].label_every = 1;
        niso++;
    }
    ch->isolines = f->iso;
    ch->nisolines = niso;
    ch->paths = o->paths;
    ch->npaths = o->npaths;

    /* Filled bands of the primary field. */
    if ((st->filled || o->force_filled) && nfields > 0 && g->field[fields[0].field] &&
        f->tr[0].nsets >= 2) {
        f->fill.z = g->field[fields[0].field];
        f->fill.invalid = nosol;
        f->fill.levels = f->levels[0];
        f->fill.nlevels = f->tr[0].nsets;
        f->fill.title = sy_field_label(fields[0].field);
        ch->fill = &f->fill;
    }

    /* Time-of-flight iso-lines: the caller's, the study's, or nice round
     * values. */
    size_t ntof = 0;
    if (o->tof_days) {
        ntof = o->ntof < SY_MAX_LEVELS ? o->ntof : SY_MAX_LEVELS;
        memcpy(f->tofs, o->tof_days, ntof * sizeof *f->tofs);
    } else if (st->tof_lines_auto) {
        const float *tof = g->field[SY_F_TOF];
        double lo = INFINITY, hi = -INFINITY;
        for (size_t k = 0; k < cells; k++)
            if (g->status[k] == SY_CELL_OK) {
                if (tof[k] < lo) lo = tof[k];
                if (tof[k] > hi) hi = tof[k];
            }
        if (hi > lo && !g->spec.y_is_tof) ntof = sy_nice_levels(lo, hi, 6, f->tofs, SY_MAX_LEVELS);
    } else {
        ntof = st->ntof_lines;
        memcpy(f->tofs, st->tof_lines_days, ntof * sizeof *f->tofs);
    }
    if (ntof) {
        f->tl.tof_days = f->tofs;
        f->tl.n = ntof;
        f->tl.legend = "Time of flight (days)";
        ch->tof = &f->tl;
    }

    /* Type I / II boundary: the 180-degree contour of the transfer angle.
     * The angle wraps from 360 to 0 where the arrival point passes the
     * departure direction; nodes near the wrap are masked so that jump
     * is not mistaken for a crossing of 180 deg. */
    if (st->show_types && g->field[SY_F_ANGLE]) {
        const float *angle = g->field[SY_F_ANGLE];
        f->angle_mask = malloc(cells);
        if (!f->angle_mask) return sy_fail(err, SY_ERR_NOMEM, "out of memory");
        for (size_t k = 0; k < cells; k++)
            f->angle_mask[k] = nosol[k] || !(angle[k] > 60.0f && angle[k] < 300.0f);
        double l180 = 180.0;
        if ((status = trace_levels(angle, f->angle_mask, nx, ny, &l180, 1, &f->boundary)) != SY_OK)
            return sy_fail(err, status, "tracing the Type I/II boundary failed");
        if (f->boundary.sets[0].nlines > 0) {
            f->bd.lines = f->boundary.sets[0].lines;
            f->bd.nlines = f->boundary.sets[0].nlines;
            /* Longer flights sweep more angle: Type II lies towards larger y. */
            f->bd.low_text = "Type I";
            f->bd.high_text = "Type II";
            f->bd.legend = "Type I / Type II boundary";
            ch->boundary = &f->bd;
        }
    }

    /* Constraint regions. */
    size_t nreg = 0;
    const float *F_c3 = g->field[SY_F_C3], *F_v = g->field[SY_F_VINF_ARR];
    const float *F_dla = g->field[SY_F_DLA], *F_tof = g->field[SY_F_TOF];
    for (int r = 0; r < 4; r++) {
        double lim = r == 0 ? st->c3_max_km2_s2 : r == 1 ? st->vinf_arr_max_km_s : r == 2 ? st->dla_max_deg : NAN;
        int tof_lim = r == 3 && (isfinite(st->tof_min_days) || isfinite(st->tof_max_days));
        if (!isfinite(lim) && !tof_lim) continue;
        unsigned char *m = calloc(cells, 1);
        if (!m) return sy_fail(err, SY_ERR_NOMEM, "out of memory");
        f->regmask[nreg] = m;
        size_t hits = 0;
        for (size_t k = 0; k < cells; k++) {
            if (g->status[k] != SY_CELL_OK) continue;
            int bad = 0;
            if (r == 0) bad = !(F_c3[k] <= lim);
            if (r == 1) bad = !(F_v[k] <= lim);
            if (r == 2) bad = !(fabsf(F_dla[k]) <= lim);
            if (r == 3) bad = (isfinite(st->tof_min_days) && F_tof[k] < st->tof_min_days) ||
                              (isfinite(st->tof_max_days) && F_tof[k] > st->tof_max_days);
            m[k] = (unsigned char)bad;
            hits += (size_t)bad;
        }
        char *lab = f->reglabel[nreg];
        const size_t nlab = sizeof f->reglabel[nreg];
        char a[32], b[32];
        if (r == 0) snprintf(lab, nlab, "C3 > %g km²/s²", lim);
        if (r == 1) snprintf(lab, nlab, "Arrival v∞ > %g km/s", lim);
        if (r == 2) snprintf(lab, nlab, "|DLA| > %g°", lim);
        if (r == 3) {
            snprintf(a, sizeof a, "%g", st->tof_min_days);
            snprintf(b, sizeof b, "%g", st->tof_max_days);
            if (isfinite(st->tof_min_days) && isfinite(st->tof_max_days))
                snprintf(lab, nlab, "Flight time outside %s–%s d", a, b);
            else if (isfinite(st->tof_min_days))
                snprintf(lab, nlab, "Flight time < %s d", a);
            else
                snprintf(lab, nlab, "Flight time > %s d", b);
        }
        if (hits == 0) { free(m); f->regmask[nreg] = NULL; continue; }
        f->regions[nreg].mask = m;
        f->regions[nreg].legend = lab;
        nreg++;
    }
    ch->regions = f->regions;
    ch->nregions = nreg;

    /* Optima markers, then the caller's. */
    size_t nm = 0;
    for (size_t k = 0; k < nopt && nm < SY_FIGURE_MAX_MARKS; k++) {
        if (!opt[k].found) continue;
        char v[32], d1[40], d2[40];
        fmt_value(opt[k].value, v, sizeof v);
        sy_date_format(opt[k].jd_dep, 0, d1, sizeof d1);
        sy_date_format(opt[k].jd_arr, 0, d2, sizeof d2);
        const char *ty = opt[k].type == 1 ? " (Type I)" : opt[k].type == 2 ? " (Type II)" : "";
        if (st->width_in < 5.0)
            /* a report column has no room for dates: value and type only
             * (the dates are in the JSON summary and the printed table) */
            snprintf(f->mlabel[nm], sizeof f->mlabel[nm], "%s %s%s%s", short_name(opt[k].field), v,
                     opt[k].type == 1 ? " I" : opt[k].type == 2 ? " II" : "",
                     opt[k].edges ? " (edge)" : "");
        else
            snprintf(f->mlabel[nm], sizeof f->mlabel[nm], "min %s%s %s %s\n%s → %s%s",
                     short_name(opt[k].field), ty, v, field_unit(opt[k].field), d1, d2,
                     /* held by the window, not found: say so where it is read */
                     opt[k].edges ? "\nat the grid's edge" : "");
        f->marks[nm].x_jd = opt[k].jd_dep;
        f->marks[nm].y = g->spec.y_is_tof ? opt[k].jd_arr - opt[k].jd_dep : opt[k].jd_arr;
        f->marks[nm].symbol = opt[k].field == SY_F_C3 ? SY_CHART_MARK_CIRCLE
                              : opt[k].field == SY_F_VINF_ARR ? SY_CHART_MARK_SQUARE
                                                              : SY_CHART_MARK_DIAMOND;
        f->marks[nm].label = f->mlabel[nm];
        f->marks[nm].legend = NULL;
        nm++;
    }
    for (size_t k = 0; k < o->nmarkers && nm < SY_FIGURE_MAX_MARKS; k++) {
        f->marks[nm] = o->markers[k];
        if (o->markers[k].label) {
            snprintf(f->mlabel[nm], sizeof f->mlabel[nm], "%s", o->markers[k].label);
            f->marks[nm].label = f->mlabel[nm];
        }
        nm++;
    }
    ch->markers = f->marks;
    ch->nmarkers = nm;

    /* Footer: model, caution, program and grid, then the capability
     * table and the caller's line. */
    char d0[40], d1[40];
    snprintf(f->f1, sizeof f->f1, "%s.", SY_MODEL_TEXT);
    sy_date_format(g->spec.x0_jd, 0, d0, sizeof d0);
    sy_date_format(sy_grid_x_jd(g, (double)(nx - 1)), 0, d1, sizeof d1);
    snprintf(f->f3, sizeof f->f3, "synodic %s · %s → %s · grid %zu × %zu, %g d × %g d · %d rev%s",
             sy_version(), g->spec.from->name, g->spec.to->name, nx, ny,
             g->spec.dx_days, g->spec.dy_days, g->spec.revs,
             g->spec.revs ? (g->spec.branch == SY_BRANCH_LEFT ? ", left branch" : ", right branch") : "");
    size_t nf = 0;
    f->footer[nf++] = f->f1;
    f->footer[nf++] = SY_CAUTION;
    f->footer[nf++] = f->f3;
    if (f->cap) {
        const char *src = strrchr(sy_lvcap_source(f->cap), '/');
        snprintf(f->f4, sizeof f->f4, "Injected mass from the capability table %s (user-supplied; not extrapolated).",
                 src ? src + 1 : sy_lvcap_source(f->cap));
        f->footer[nf++] = f->f4;
    }
    if (o->footer_extra) {
        snprintf(f->f5, sizeof f->f5, "%s", o->footer_extra);
        f->footer[nf++] = f->f5;
    }
    ch->footer = f->footer;
    ch->nfooter = nf;

    /* The page and its text chunks. */
    f->width_in = st->width_in;
    f->height_in = st->height_in;
    f->dpi = st->dpi;
    snprintf(f->software, sizeof f->software, "synodic %s", sy_version());
    snprintf(f->comment, sizeof f->comment,
             "study=%s; %s->%s; departure %s..%s step %g d; %s %.5f..%.5f step %g; revs=%d; %s",
             st->path, g->spec.from->name, g->spec.to->name, d0, d1, g->spec.dx_days,
             g->spec.y_is_tof ? "tof_days" : "arrival_jd", g->spec.y0,
             sy_grid_y(g, (double)(ny - 1)), g->spec.dy_days, g->spec.revs, SY_CAUTION);
    f->text[0] = (sy_chart_text){"Title", f->title};
    f->text[1] = (sy_chart_text){"Software", f->software};
    f->text[2] = (sy_chart_text){"Source", SY_MODEL_TEXT};
    f->text[3] = (sy_chart_text){"Comment", f->comment};
    return SY_OK;
}

sy_status sy_figure_build(const sy_grid *g, const sy_study *st,
                          const sy_optimum *opt, size_t nopt,
                          const sy_figure_opts *o, sy_figure **out,
                          sy_error *err)
{
    static const sy_figure_opts none;
    *out = NULL;
    sy_figure *f = calloc(1, sizeof *f);
    if (!f) return sy_fail(err, SY_ERR_NOMEM, "out of memory");
    sy_status s = figure_fill(f, g, st, opt, nopt, o ? o : &none, err);
    if (s != SY_OK) {
        sy_figure_free(f);
        return s;
    }
    *out = f;
    return SY_OK;
}

sy_status sy_figure_write(const sy_grid *g, const sy_study *st,
                          const sy_optimum *opt, size_t nopt,
                          const char *path, sy_error *err)
{
    return sy_figure_write_paths(g, st, opt, nopt, NULL, 0, path, err);
}

sy_status sy_figure_write_paths(const sy_grid *g, const sy_study *st,
                                const sy_optimum *opt, size_t nopt,
                                const sy_chart_path *paths, size_t npaths,
                                const char *path, sy_error *err)
{
    sy_figure_opts o;
    memset(&o, 0, sizeof o);
    o.paths = paths;
    o.npaths = npaths;
    sy_figure *f;
    sy_status s = sy_figure_build(g, st, opt, nopt, &o, &f, err);
    if (s != SY_OK) return s;
    sy_chart_page page;
    sy_figure_page(f, &page);
    s = sy_chart_write(&f->ch, &page, path, err);
    sy_figure_free(f);
    return s;
}
