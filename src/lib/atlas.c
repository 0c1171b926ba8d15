/* atlas.c - comparison figures (stacked xy panels), table pages and
 * multi-page PDF documents.  See synodic/atlas.h.
 *
 * Everything shares the porkchop renderer's fonts, palette, tick choice,
 * symbols, legend, title and footer (chart_priv.h), so that a document
 * reads as one piece: page coordinates are PostScript points, origin top
 * left, text through pango at a fixed 72 dpi without hinting (the layout
 * is the same for PNG, SVG and PDF and for any dpi).
 */
#include "config.h"
#include "synodic.h"
#include "synodic/atlas.h"
#include "synodic/chart.h"
#include "synodic/io.h"
#include "chart_priv.h"

#include <cairo-pdf.h>
#include <ctype.h>
#include <errno.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

#ifndef M_PI
#define M_PI 3.14159265358979323846
#endif

/* ------------------------------------------------------------------ */
/* Comparison figure: validation                                       */

static sy_status xy_validate(const sy_xy_chart *xy, sy_error *err)
{
    if (!xy) return sy_fail(err, SY_ERR_ARG, "xy chart: no chart given");
    if (xy->npanels < 1 || xy->npanels > SY_XY_MAX_PANELS)
        return sy_fail(err, SY_ERR_ARG, "xy chart: npanels = %zu, must be 1..%d", xy->npanels,
                       SY_XY_MAX_PANELS);
    if (xy->nfooter && !xy->footer)
        return sy_fail(err, SY_ERR_ARG, "xy chart: nfooter = %zu but footer is NULL", xy->nfooter);
    for (size_t k = 0; k < xy->nfooter; k++)
        if (!xy->footer[k]) return sy_fail(err, SY_ERR_ARG, "xy chart: footer[%zu] is NULL", k);
    for (size_t p = 0; p < xy->npanels; p++) {
        const sy_xy_panel *pn = &xy->panels[p];
        if (pn->nseries && !pn->series)
            return sy_fail(err, SY_ERR_ARG, "xy chart: panels[%zu].nseries = %zu but series is NULL",
                           p, pn->nseries);
        for (size_t s = 0; s < pn->nseries; s++) {
            const sy_xy_series *se = &pn->series[s];
            if (se->n && (!se->x || !se->y))
                return sy_fail(err, SY_ERR_ARG,
                               "xy chart: panels[%zu].series[%zu] has n = %zu but %s is NULL", p, s,
                               se->n, !se->x ? "x" : "y");
            if ((int)se->role < 0 || (int)se->role > 2)
                return sy_fail(err, SY_ERR_ARG, "xy chart: panels[%zu].series[%zu].role %d is unknown",
                               p, s, (int)se->role);
            if ((int)se->symbol < 0 || (int)se->symbol > (int)SY_CHART_MARK_STAR)
                return sy_fail(err, SY_ERR_ARG,
                               "xy chart: panels[%zu].series[%zu].symbol %d is unknown", p, s,
                               (int)se->symbol);
        }
    }
    return SY_OK;
}

static sy_status page_validate(double w_in, double h_in, const char *what, sy_error *err)
{
    if (!(w_in >= 1.0 && w_in <= 60.0 && h_in >= 1.0 && h_in <= 60.0))
        return sy_fail(err, SY_ERR_ARG, "%s: page %.3g x %.3g in is outside 1..60 in", what, w_in,
                       h_in);
    return SY_OK;
}

/* Copy s with a WORD JOINER (U+2060) after every '/', so that a unit
 * such as "km/s" is never split across lines (UAX #14 allows a break
 * after a solidus; the joiner forbids it and is not drawn). */
static const char *nobreak_slash(const char *s, char *buf, size_t n)
{
    size_t o = 0;
    if (!s) s = "";
    if (4 * strlen(s) + 1 > n) return s;   /* long text: left as it is */
    for (; *s && o + 4 < n; s++) {
        buf[o++] = *s;
        if (*s == '/') { memcpy(buf + o, "\xe2\x81\xa0", 3); o += 3; }
    }
    buf[o] = '\0';
    return buf;
}

/* ------------------------------------------------------------------ */
/* Comparison figure: layout and drawing                               */

#define XY_GAP(x) (1.25 * (x)->fs_axis)   /* between stacked panels */

typedef struct {
    double py0, py1, ymin, ymax;
    syc_ticks yt;
    int has_data;
} xy_panel_lay;

typedef struct {
    syc_ctx x;                        /* fonts, plot x extent, x ticks, legend */
    const sy_xy_chart *xy;
    xy_panel_lay pl[SY_XY_MAX_PANELS];
} xy_ctx;

static double xy_Y(const xy_panel_lay *p, double y)
{
    return p->py1 - (y - p->ymin) / (p->ymax - p->ymin) * (p->py1 - p->py0);
}

static double xy_X(const syc_ctx *x, double v)
{
    return x->px0 + (v - x->xmin) / (x->xmax - x->xmin) * (x->px1 - x->px0);
}

/* Data range of one coordinate over the chosen series (x: which = 0). */
static int data_range(const sy_xy_chart *xy, size_t panel, int all_panels, int which,
                      double *lo, double *hi)
{
    *lo = INFINITY;
    *hi = -INFINITY;
    for (size_t p = 0; p < xy->npanels; p++) {
        if (!all_panels && p != panel) continue;
        for (size_t s = 0; s < xy->panels[p].nseries; s++) {
            const sy_xy_series *se = &xy->panels[p].series[s];
            for (size_t k = 0; k < se->n; k++) {
                if (!isfinite(se->x[k]) || !isfinite(se->y[k])) continue;
                double v = which ? se->y[k] : se->x[k];
                if (v < *lo) *lo = v;
                if (v > *hi) *hi = v;
            }
        }
    }
    return *lo <= *hi;
}

/* A "nice" numeric range around [lo, hi] for an axis of len points: pad
 * by 6 %, keep a positive quantity's axis from dipping below zero, then
 * round outwards to the tick step when that costs little. */
static void nice_num_axis(syc_ctx *x, double lo, double hi, int horizontal, double len,
                          double *a_out, double *b_out, syc_ticks *t)
{
    if (!(hi - lo > 1e-12 * fmax(1.0, fabs(hi)))) {
        double d = fabs(hi) > 0 ? 0.1 * fabs(hi) : 1.0;
        lo -= d;
        hi += d;
    }
    double pad = 0.06 * (hi - lo), a = lo - pad, b = hi + pad;
    if (lo >= 0 && a < 0) a = 0;
    syc_num_ticks(x, a, b, horizontal, len, t);
    if (t->n >= 2) {
        double step = t->v[1] - t->v[0];
        /* a panel reads best with a handful of values: at most 7 */
        while (t->n > 7) {
            double p10 = pow(10.0, floor(log10(step) + 1e-9)), f = step / p10;
            step = (f < 1.5 ? 2 : f < 3 ? 5 : 10) * p10;
            syc_num_ticks_step(a, b, step, t);
        }
        double na = floor(a / step + 1e-9) * step, nb = ceil(b / step - 1e-9) * step;
        if (nb - na <= 1.3 * (b - a)) {
            a = na;
            b = nb;
            syc_num_ticks_step(a, b, step, t);
        }
    }
    *a_out = a;
    *b_out = b;
}

static void xy_legend_collect(xy_ctx *c)
{
    syc_ctx *x = &c->x;
    const sy_xy_chart *xy = c->xy;
    x->nleg = 0;
    for (size_t p = 0; p < xy->npanels; p++)
        for (size_t s = 0; s < xy->panels[p].nseries; s++) {
            const sy_xy_series *se = &xy->panels[p].series[s];
            if (!se->legend || !*se->legend) continue;
            int style = (int)se->role * 16 + (int)se->symbol * 2 + (se->connect ? 1 : 0);
            int dup = 0;
            for (int k = 0; k < x->nleg; k++)
                if (x->leg[k].style == style && !strcmp(x->leg[k].text, se->legend)) dup = 1;
            if (dup || x->nleg >= SYC_MAX_LEGEND) continue;
            x->leg[x->nleg].kind = SYC_LEG_SERIES;
            x->leg[x->nleg].style = style;
            x->leg[x->nleg].text = se->legend;
            x->nleg++;
        }
}

/* A panel title runs up the panel's left edge: one line when it fits
 * the panel height and the gaps beside it, else wrapped at blanks to the
 * panel height. */
static PangoLayout *ytitle_layout(xy_ctx *c, size_t p, double ph, double gap)
{
    char buf[512];
    const char *t = nobreak_slash(c->xy->panels[p].ytitle, buf, sizeof buf);
    double w;
    syc_text_size(&c->x, t, c->x.fs_axis, 0, &w, NULL);
    return syc_layout(&c->x, t, c->x.fs_axis, 0, 0, w <= ph + 0.9 * gap ? 0 : ph,
                      PANGO_ALIGN_CENTER);
}

static void xy_layout(xy_ctx *c, double w_in, double h_in)
{
    syc_ctx *x = &c->x;
    const sy_xy_chart *xy = c->xy;
    syc_fonts(x, w_in, h_in);
    double base = x->fs_axis, m = x->m, W = x->W, full_w = W - 2 * m;
    double top = syc_layout_head(x, xy->title, xy->subtitle);
    double bottom = syc_layout_foot(x, xy->footer, xy->nfooter);
    xy_legend_collect(c);
    x->leg_h = syc_legend_flow(x, full_w);
    x->leg_y = bottom - x->leg_h;
    if (x->leg_h > 0) bottom = x->leg_y - 0.5 * base;

    double lh, tl = 0.35 * base, xtitle_h = 0;
    syc_text_size(x, "Ag", x->fs_tick, 0, NULL, &lh);
    if (xy->xtitle && *xy->xtitle) syc_text_size(x, xy->xtitle, x->fs_axis, 0, NULL, &xtitle_h);
    x->xtitle_y = bottom - xtitle_h;
    double plot_bottom = x->xtitle_y - 0.25 * base - lh - tl - 0.2 * base;
    if (plot_bottom - top < 3 * base * (double)xy->npanels)
        plot_bottom = top + 3 * base * (double)xy->npanels;   /* tiny page */
    x->xtick_top = plot_bottom + tl + 0.2 * base;

    /* panels of equal height, a gap between them */
    size_t np = xy->npanels;
    double gap = XY_GAP(x);
    double ph = (plot_bottom - top - gap * (double)(np - 1)) / (double)np;
    double ylab_w = 0, ytitle_h = 0;
    for (size_t p = 0; p < np; p++) {
        xy_panel_lay *pl = &c->pl[p];
        pl->py0 = top + (double)p * (ph + gap);
        pl->py1 = pl->py0 + ph;
        double lo, hi;
        pl->has_data = data_range(xy, p, 0, 1, &lo, &hi);
        if (!pl->has_data) { lo = 0; hi = 1; }
        nice_num_axis(x, lo, hi, 0, ph, &pl->ymin, &pl->ymax, &pl->yt);
        for (int k = 0; k < pl->yt.n; k++) {
            double w;
            syc_text_size(x, pl->yt.lab[k], x->fs_tick, 0, &w, NULL);
            if (w > ylab_w) ylab_w = w;
        }
        /* the panel title runs up the left edge, wrapped to the panel
         * height */
        const char *yt = xy->panels[p].ytitle;
        if (yt && *yt) {
            double h;
            PangoLayout *l = ytitle_layout(c, p, ph, gap);
            syc_layout_size(l, NULL, &h);
            g_object_unref(l);
            if (h > ytitle_h) ytitle_h = h;
        }
    }
    x->py0 = c->pl[0].py0;
    x->py1 = c->pl[np - 1].py1;
    x->ytitle_x = m;
    x->px0 = m + ytitle_h + 0.35 * base + ylab_w + tl + 0.2 * base;
    x->px1 = W - m - 1.0 * base;
    if (x->px1 - x->px0 < 3 * base) x->px1 = x->px0 + 3 * base;

    double lo, hi;
    if (!data_range(xy, 0, 1, 0, &lo, &hi)) { lo = 0; hi = 1; }
    if (xy->x_is_date) {
        if (!(hi - lo > 0)) { lo -= 15; hi += 15; }
        double pad = 0.04 * (hi - lo);
        x->xmin = lo - pad;
        x->xmax = hi + pad;
        syc_date_ticks(x, x->xmin, x->xmax, 1, x->px1 - x->px0, &x->xt);
    } else {
        nice_num_axis(x, lo, hi, 1, x->px1 - x->px0, &x->xmin, &x->xmax, &x->xt);
    }
    x->leg_x = x->leg_w <= W - m - x->px0 ? x->px0 : m;
}

static void xy_draw_panel(xy_ctx *c, size_t p, int last)
{
    syc_ctx *x = &c->x;
    cairo_t *cr = x->cr;
    const xy_panel_lay *pl = &c->pl[p];
    const sy_xy_panel *pn = &c->xy->panels[p];
    double base = x->fs_axis, tl = 0.35 * base;
    double pw = x->px1 - x->px0, ph = pl->py1 - pl->py0;

    /* grid */
    {
        double gx[SYC_MAX_TICKS], gy[SYC_MAX_TICKS];
        for (int k = 0; k < x->xt.n; k++) gx[k] = xy_X(x, x->xt.v[k]);
        for (int k = 0; k < pl->yt.n; k++) gy[k] = xy_Y(pl, pl->yt.v[k]);
        syc_draw_grid(cr, x->lw, gx, x->xt.n, gy, pl->yt.n, x->px0, pl->py0, x->px1, pl->py1);
    }

    /* series: lines first (tertiary under secondary under primary), then
     * all symbols above every line */
    cairo_save(cr);
    cairo_rectangle(cr, x->px0, pl->py0, pw, ph);
    cairo_clip(cr);
    for (int role = 2; role >= 0; role--)
        for (size_t s = 0; s < pn->nseries; s++) {
            const sy_xy_series *se = &pn->series[s];
            if ((int)se->role != role || !se->connect) continue;
            int pen = 0;
            cairo_new_path(cr);
            for (size_t k = 0; k < se->n; k++) {
                if (!isfinite(se->x[k]) || !isfinite(se->y[k])) { pen = 0; continue; }
                double px = xy_X(x, se->x[k]), py = xy_Y(pl, se->y[k]);
                if (pen) cairo_line_to(cr, px, py); else cairo_move_to(cr, px, py);
                pen = 1;
            }
            syc_line_style(x, role, SYC_XY_LINE_SCALE);
            cairo_stroke(cr);
        }
    double r = SYC_XY_MARK_R(x);
    for (int role = 2; role >= 0; role--)
        for (size_t s = 0; s < pn->nseries; s++) {
            const sy_xy_series *se = &pn->series[s];
            if ((int)se->role != role) continue;
            for (size_t k = 0; k < se->n; k++) {
                if (!isfinite(se->x[k]) || !isfinite(se->y[k])) continue;
                syc_symbol(x, se->symbol, xy_X(x, se->x[k]), xy_Y(pl, se->y[k]), r,
                           SYC_COL_ROLE[role]);
            }
        }
    cairo_restore(cr);
    if (!pl->has_data)
        syc_draw_text(x, "No data", x->fs_label, 0, 0.5 * (x->px0 + x->px1),
                      0.5 * (pl->py0 + pl->py1), 0.5, 0.5, 0, SYC_COL_FOOT);

    /* frame and ticks */
    cairo_save(cr);
    cairo_set_dash(cr, NULL, 0, 0);
    cairo_set_source_rgb(cr, SYC_COL_FRAME.r, SYC_COL_FRAME.g, SYC_COL_FRAME.b);
    cairo_set_line_width(cr, 0.7 * x->lw);
    cairo_rectangle(cr, x->px0, pl->py0, pw, ph);
    cairo_stroke(cr);
    cairo_set_line_width(cr, 0.55 * x->lw);
    for (int k = 0; k < x->xt.n; k++) {
        double px = xy_X(x, x->xt.v[k]);
        cairo_move_to(cr, px, pl->py1);
        cairo_line_to(cr, px, pl->py1 + (last ? tl : 0.6 * tl));
    }
    for (int k = 0; k < pl->yt.n; k++) {
        double py = xy_Y(pl, pl->yt.v[k]);
        cairo_move_to(cr, x->px0, py);
        cairo_line_to(cr, x->px0 - tl, py);
    }
    cairo_stroke(cr);
    cairo_restore(cr);
    for (int k = 0; k < pl->yt.n; k++)
        syc_draw_text(x, pl->yt.lab[k], x->fs_tick, 0, x->px0 - tl - 0.2 * base,
                      xy_Y(pl, pl->yt.v[k]), 1, 0.5, 0, SYC_COL_TEXT);
    if (pn->ytitle && *pn->ytitle) {
        PangoLayout *l = ytitle_layout(c, p, ph, XY_GAP(x));
        syc_draw_layout(x, l, x->ytitle_x, 0.5 * (pl->py0 + pl->py1), 0.5, 0, -M_PI / 2,
                        SYC_COL_TEXT);
        g_object_unref(l);
    }
    if (last) {
        for (int k = 0; k < x->xt.n; k++) {
            double px = xy_X(x, x->xt.v[k]), w;
            PangoLayout *l = syc_layout(x, x->xt.lab[k], x->fs_tick, 0, 0, 0, PANGO_ALIGN_CENTER);
            syc_layout_size(l, &w, NULL);
            if (px + w / 2 > x->W - 0.5 * x->m) px = x->W - 0.5 * x->m - w / 2;
            syc_draw_layout(x, l, px, x->xtick_top, 0.5, 0, 0, SYC_COL_TEXT);
            g_object_unref(l);
        }
    }
}

/* Lay out and draw on cr (user space in points), page w_in x h_in. */
static sy_status xy_render(xy_ctx *c, cairo_t *cr, double w_in, double h_in, sy_error *err)
{
    syc_ctx *x = &c->x;
    x->cr = cr;
    if (!x->pc) x->pc = syc_make_pango(cr);
    if (!x->pc) return sy_fail(err, SY_ERR_NOMEM, "xy chart: cannot create a text context");
    xy_layout(c, w_in, h_in);
    cairo_save(cr);
    cairo_set_source_rgb(cr, 1, 1, 1);
    cairo_paint(cr);
    for (size_t p = 0; p < c->xy->npanels; p++) xy_draw_panel(c, p, p + 1 == c->xy->npanels);
    if (c->xy->xtitle && *c->xy->xtitle)
        syc_draw_text(x, c->xy->xtitle, x->fs_axis, 0, 0.5 * (x->px0 + x->px1), x->xtitle_y, 0.5, 0,
                      0, SYC_COL_TEXT);
    syc_draw_legend(x);
    syc_draw_head_foot(x, c->xy->title, c->xy->subtitle, c->xy->footer, c->xy->nfooter);
    cairo_restore(cr);
    cairo_status_t cs = cairo_status(cr);
    if (cs != CAIRO_STATUS_SUCCESS)
        return sy_fail(err, cs == CAIRO_STATUS_NO_MEMORY ? SY_ERR_NOMEM : SY_ERR_IO,
                       "xy chart: drawing failed: %s", cairo_status_to_string(cs));
    return SY_OK;
}

typedef struct {
    xy_ctx c;
    double w_in, h_in;
} xy_job_ud;

static sy_status xy_job_draw(void *ud, cairo_t *cr, double px_per_pt, sy_error *err)
{
    (void)px_per_pt;
    xy_job_ud *u = ud;
    return xy_render(&u->c, cr, u->w_in, u->h_in, err);
}

static void xy_job_describe(void *ud, syc_membuf *m)
{
    const xy_job_ud *u = ud;
    const sy_xy_chart *xy = u->c.xy;
    if (xy->subtitle && *xy->subtitle) { syc_mb_put_xml(m, xy->subtitle); syc_mb_puts(m, "\n"); }
    if (xy->xtitle && *xy->xtitle) { syc_mb_put_xml(m, xy->xtitle); syc_mb_puts(m, "\n"); }
    for (size_t p = 0; p < xy->npanels; p++) {
        char buf[32];
        snprintf(buf, sizeof buf, "Panel %zu: ", p + 1);
        syc_mb_puts(m, buf);
        syc_mb_put_xml(m, xy->panels[p].ytitle ? xy->panels[p].ytitle : "");
        syc_mb_puts(m, "\n");
    }
    for (int k = 0; k < u->c.x.nleg; k++) {
        syc_mb_puts(m, "Legend: ");
        syc_mb_put_xml(m, u->c.x.leg[k].text);
        syc_mb_puts(m, "\n");
    }
    for (size_t k = 0; k < xy->nfooter; k++) {
        syc_mb_put_xml(m, xy->footer[k]);
        syc_mb_puts(m, "\n");
    }
}

sy_status sy_xy_write(const sy_xy_chart *xy, const sy_chart_page *page, const char *path,
                      sy_error *err)
{
    sy_status st = xy_validate(xy, err);
    if (st != SY_OK) return st;
    if (!page) return sy_fail(err, SY_ERR_ARG, "xy chart: no page given");
    st = page_validate(page->width_in, page->height_in, "xy chart", err);
    if (st != SY_OK) return st;
    xy_job_ud *u = calloc(1, sizeof *u);
    if (!u) return sy_fail(err, SY_ERR_NOMEM, "xy chart: out of memory");
    u->c.xy = xy;
    u->w_in = page->width_in;
    u->h_in = page->height_in;
    syc_job job = {page, xy->title, xy_job_draw, xy_job_describe, u};
    st = syc_write_job(&job, page->format, path, err);
    syc_ctx_free(&u->c.x);
    free(u);
    return st;
}

/* ------------------------------------------------------------------ */
/* Table pages                                                         */

#define TAB_MAX_COLS 64

static const syc_rgb COL_ZEBRA = SYC_HEX(0xEEF1F6);
static const syc_rgb COL_HEAD = SYC_HEX(0xDCE3EE);

static const char *cell(const sy_table_page *t, size_t r, size_t c)
{
    const char *s = t->cells[r * t->ncols + c];
    return s ? s : "";
}

/* A number, possibly signed (ASCII or U+2212 minus), with optional
 * exponent, and nothing after it but blanks. */
static int is_number(const char *s)
{
    while (*s == ' ') s++;
    char buf[64];
    if (!strncmp(s, "\xe2\x88\x92", 3)) {
        snprintf(buf, sizeof buf, "-%s", s + 3);
        s = buf;
    }
    if (!*s) return 0;
    char *end = NULL;
    errno = 0;
    double v = strtod(s, &end);
    (void)v;
    if (end == s) return 0;
    while (*end == ' ') end++;
    return *end == '\0' && (isdigit((unsigned char)s[0]) || s[0] == '-' || s[0] == '+' || s[0] == '.');
}

typedef struct {
    size_t row0, row1;                /* rows [row0, row1) on this page */
    size_t note0, note1;              /* notes [note0, note1)           */
} tab_page;

typedef struct {
    syc_ctx x;
    const sy_table_page *t;
    double fs, pad_x, pad_y;          /* table text size and cell padding */
    double colw[TAB_MAX_COLS];
    int right[TAB_MAX_COLS];
    double *rowh;                     /* nrows                          */
    double headh, table_w;
    double body_top1, body_topn;      /* first row's top, page 1 / later */
    double body_bottom;
    double *noteh;                    /* nnotes                         */
    tab_page *pages;
    size_t npages;
} tab_ctx;

static PangoLayout *cell_layout(tab_ctx *c, const char *s, size_t col, int bold)
{
    char buf[1024];
    s = nobreak_slash(s, buf, sizeof buf);
    PangoLayout *l = syc_layout(&c->x, s, c->fs, bold, 0, c->colw[col] - 2 * c->pad_x,
                                c->right[col] ? PANGO_ALIGN_RIGHT : PANGO_ALIGN_LEFT);
    return l;
}

/* Draw l with its layout box (not its ink or logical extents) at the
 * top left (px, py), so that its alignment inside the width holds. */
static void show_layout_at(syc_ctx *x, PangoLayout *l, double px, double py, syc_rgb col)
{
    cairo_save(x->cr);
    cairo_move_to(x->cr, px, py);
    cairo_set_source_rgb(x->cr, col.r, col.g, col.b);
    pango_cairo_update_layout(x->cr, l);
    pango_cairo_show_layout(x->cr, l);
    cairo_restore(x->cr);
}

static double natural_w(tab_ctx *c, const char *s, int bold)
{
    double w;
    syc_text_size(&c->x, s, c->fs, bold, &w, NULL);
    return w;
}

/* Widest single word of s (header cells may wrap at blanks). */
static double widest_word(tab_ctx *c, const char *s, int bold)
{
    double best = 0;
    char buf[256];
    while (*s) {
        size_t n = strcspn(s, " \n");
        if (n >= sizeof buf) n = sizeof buf - 1;
        memcpy(buf, s, n);
        buf[n] = '\0';
        double w = natural_w(c, buf, bold);
        if (w > best) best = w;
        s += n;
        while (*s == ' ' || *s == '\n') s++;
    }
    return best;
}

static void tab_columns(tab_ctx *c, double avail)
{
    const sy_table_page *t = c->t;
    double base = c->x.fs_tick;
    for (int attempt = 0; attempt < 8; attempt++) {
        c->fs = base * pow(0.9, attempt);
        if (c->fs < 5.5) c->fs = 5.5;
        c->pad_x = 0.55 * c->fs;
        c->pad_y = 0.25 * c->fs;
        double sum = 0;
        for (size_t k = 0; k < t->ncols; k++) {
            double w = 0;
            for (size_t r = 0; r < t->nrows; r++) w = fmax(w, natural_w(c, cell(t, r, k), 0));
            const char *h = t->header && t->header[k] ? t->header[k] : "";
            double hw = natural_w(c, h, 1);
            /* the header may wrap rather than widen the column */
            if (hw > w) w = fmax(w, fmin(hw, fmax(widest_word(c, h, 1), 0.5 * hw)));
            c->colw[k] = w + 2 * c->pad_x;
            sum += c->colw[k];
        }
        if (sum <= avail || c->fs <= 5.5) {
            if (sum > avail) {
                /* still too wide at the smallest text: shrink the widest
                 * columns (their cells wrap) */
                double scale = avail / sum;
                for (size_t k = 0; k < t->ncols; k++) c->colw[k] *= scale;
                sum = avail;
            }
            /* a narrow table gets some more air between its columns */
            if (sum < avail) {
                double extra = fmin((avail - sum) / (double)t->ncols, 1.2 * c->fs);
                for (size_t k = 0; k < t->ncols; k++) c->colw[k] += extra;
                sum += extra * (double)t->ncols;
            }
            c->table_w = sum;
            return;
        }
    }
}

static double layout_h(PangoLayout *l)
{
    double h;
    syc_layout_size(l, NULL, &h);
    return h;
}

static const char *cont_title(const sy_table_page *t, char *buf, size_t n)
{
    snprintf(buf, n, "%s (continued)", t->title ? t->title : "Table");
    return buf;
}

/* Page plan: rows that fit between the header row and the footer; the
 * notes follow the last row, and spill paragraph by paragraph to further
 * pages when they do not fit. */
static sy_status tab_plan(tab_ctx *c, double w_in, double h_in, sy_error *err)
{
    syc_ctx *x = &c->x;
    const sy_table_page *t = c->t;
    syc_fonts(x, w_in, h_in);
    double full_w = x->W - 2 * x->m;
    for (size_t k = 0; k < t->ncols; k++) {
        const char *s = NULL;
        for (size_t r = 0; r < t->nrows && !s; r++)
            if (*cell(t, r, k)) s = cell(t, r, k);
        c->right[k] = s && is_number(s);
    }
    tab_columns(c, full_w);
    c->rowh = calloc(t->nrows ? t->nrows : 1, sizeof *c->rowh);
    c->noteh = calloc(t->nnotes ? t->nnotes : 1, sizeof *c->noteh);
    if (!c->rowh || !c->noteh) return sy_fail(err, SY_ERR_NOMEM, "table: out of memory");
    c->headh = 0;
    for (size_t k = 0; k < t->ncols; k++) {
        PangoLayout *l = cell_layout(c, t->header && t->header[k] ? t->header[k] : "", k, 1);
        c->headh = fmax(c->headh, layout_h(l) + 2 * c->pad_y);
        g_object_unref(l);
    }
    for (size_t r = 0; r < t->nrows; r++) {
        double h = 0;
        for (size_t k = 0; k < t->ncols; k++) {
            PangoLayout *l = cell_layout(c, cell(t, r, k), k, 0);
            h = fmax(h, layout_h(l));
            g_object_unref(l);
        }
        c->rowh[r] = h + 2 * c->pad_y;
    }
    for (size_t k = 0; k < t->nnotes; k++) {
        PangoLayout *l = syc_layout(x, t->notes[k], x->fs_leg, 0, 0, full_w, PANGO_ALIGN_LEFT);
        c->noteh[k] = layout_h(l) + 0.45 * x->fs_leg;
        g_object_unref(l);
    }
    char tbuf[600];
    double top1 = syc_layout_head(x, t->title, t->subtitle);
    double topn = syc_layout_head(x, cont_title(t, tbuf, sizeof tbuf), NULL);
    /* room for the page number above the footer */
    double pnh;
    syc_text_size(x, "Page 1", x->fs_foot, 0, NULL, &pnh);
    c->body_bottom = syc_layout_foot(x, t->footer, t->nfooter) - pnh;
    c->body_top1 = top1 + c->headh;
    c->body_topn = topn + c->headh;

    size_t cap = 8;
    c->pages = calloc(cap, sizeof *c->pages);
    if (!c->pages) return sy_fail(err, SY_ERR_NOMEM, "table: out of memory");
    c->npages = 0;
    size_t r = 0, nt = 0;
    double note_gap = 0.8 * x->fs_leg;
    int empty_table = t->nrows == 0;
    while (c->npages == 0 || r < t->nrows || nt < t->nnotes) {
        if (c->npages == cap) {
            cap *= 2;
            tab_page *q = realloc(c->pages, cap * sizeof *q);
            if (!q) return sy_fail(err, SY_ERR_NOMEM, "table: out of memory");
            c->pages = q;
        }
        tab_page *pg = &c->pages[c->npages];
        double y = c->npages == 0 ? c->body_top1 : c->body_topn;
        if (empty_table && c->npages == 0) y += c->rowh[0] > 0 ? c->rowh[0] : 1.6 * c->fs;
        pg->row0 = r;
        while (r < t->nrows && (r == pg->row0 || y + c->rowh[r] <= c->body_bottom)) {
            y += c->rowh[r];
            r++;
        }
        pg->row1 = r;
        pg->note0 = pg->note1 = nt;
        if (r == t->nrows) {
            y += note_gap;
            /* a page that holds no rows holds at least one note */
            while (nt < t->nnotes &&
                   (y + c->noteh[nt] <= c->body_bottom || (pg->row0 == pg->row1 && nt == pg->note0))) {
                y += c->noteh[nt];
                nt++;
            }
            pg->note1 = nt;
        }
        c->npages++;
        if (c->npages > 100000) return sy_fail(err, SY_ERR_ARG, "table: too many pages");
    }
    return SY_OK;
}

static void tab_draw_page(tab_ctx *c, size_t pi)
{
    syc_ctx *x = &c->x;
    cairo_t *cr = x->cr;
    const sy_table_page *t = c->t;
    const tab_page *pg = &c->pages[pi];
    double m = x->m, full_w = x->W - 2 * m;
    cairo_save(cr);
    cairo_set_source_rgb(cr, 1, 1, 1);
    cairo_paint(cr);
    cairo_restore(cr);

    /* title: continuation pages say so; a multi-page table numbers them */
    char tbuf[600];
    const char *title = pi > 0 ? cont_title(t, tbuf, sizeof tbuf) : t->title;
    double head_y = syc_layout_head(x, title, pi == 0 ? t->subtitle : NULL);
    syc_draw_head_foot(x, title, pi == 0 ? t->subtitle : NULL, t->footer, t->nfooter);
    if (c->npages > 1) {
        char pb[64];
        snprintf(pb, sizeof pb, "Page %zu of %zu", pi + 1, c->npages);
        syc_draw_text(x, pb, x->fs_foot, 0, x->W - m, x->foot_y - 0.3 * x->fs_axis, 1, 1, 0,
                      SYC_COL_FOOT);
    }

    double y = head_y, tx0 = m, tw = c->table_w;
    int has_rows = pg->row1 > pg->row0 || (t->nrows == 0 && pi == 0);
    if (has_rows) {
        /* header row */
        cairo_save(cr);
        cairo_rectangle(cr, tx0, y, tw, c->headh);
        cairo_set_source_rgb(cr, COL_HEAD.r, COL_HEAD.g, COL_HEAD.b);
        cairo_fill(cr);
        cairo_restore(cr);
        double cx = tx0;
        for (size_t k = 0; k < t->ncols; k++) {
            PangoLayout *l = cell_layout(c, t->header && t->header[k] ? t->header[k] : "", k, 1);
            /* headers sit on the row's bottom, as their columns' labels */
            double h = layout_h(l);
            show_layout_at(x, l, cx + c->pad_x, y + c->headh - c->pad_y - h, SYC_COL_TEXT);
            g_object_unref(l);
            cx += c->colw[k];
        }
        y += c->headh;
        double rule_y = y;
        for (size_t r = pg->row0; r < pg->row1; r++) {
            if (r % 2 == 1) {
                cairo_save(cr);
                cairo_rectangle(cr, tx0, y, tw, c->rowh[r]);
                cairo_set_source_rgb(cr, COL_ZEBRA.r, COL_ZEBRA.g, COL_ZEBRA.b);
                cairo_fill(cr);
                cairo_restore(cr);
            }
            cx = tx0;
            for (size_t k = 0; k < t->ncols; k++) {
                PangoLayout *l = cell_layout(c, cell(t, r, k), k, 0);
                show_layout_at(x, l, cx + c->pad_x, y + c->pad_y, SYC_COL_TEXT);
                g_object_unref(l);
                cx += c->colw[k];
            }
            y += c->rowh[r];
        }
        if (t->nrows == 0) {
            double h = 1.6 * c->fs;
            syc_draw_text(x, "No rows.", c->fs, 0, tx0 + c->pad_x, y + 0.5 * h, 0, 0.5, 0, SYC_COL_FOOT);
            y += h;
        }
        /* rules: heavy above and below the header, light at the end */
        cairo_save(cr);
        cairo_set_dash(cr, NULL, 0, 0);
        cairo_set_source_rgb(cr, SYC_COL_FRAME.r, SYC_COL_FRAME.g, SYC_COL_FRAME.b);
        cairo_set_line_width(cr, 0.9 * x->lw);
        cairo_move_to(cr, tx0, head_y);
        cairo_line_to(cr, tx0 + tw, head_y);
        cairo_move_to(cr, tx0, rule_y);
        cairo_line_to(cr, tx0 + tw, rule_y);
        cairo_stroke(cr);
        cairo_set_line_width(cr, 0.6 * x->lw);
        cairo_move_to(cr, tx0, y);
        cairo_line_to(cr, tx0 + tw, y);
        cairo_stroke(cr);
        cairo_restore(cr);
    }
    if (pg->note1 > pg->note0) {
        y += 0.8 * x->fs_leg;
        for (size_t k = pg->note0; k < pg->note1; k++) {
            PangoLayout *l = syc_layout(x, t->notes[k], x->fs_leg, 0, 0, full_w, PANGO_ALIGN_LEFT);
            syc_draw_layout(x, l, m, y, 0, 0, 0, SYC_COL_TEXT);
            g_object_unref(l);
            y += c->noteh[k];
        }
    }
}

static sy_status tab_validate(const sy_table_page *t, sy_error *err)
{
    if (!t) return sy_fail(err, SY_ERR_ARG, "table: no table given");
    if (t->ncols < 1 || t->ncols > TAB_MAX_COLS)
        return sy_fail(err, SY_ERR_ARG, "table: ncols = %zu, must be 1..%d", t->ncols, TAB_MAX_COLS);
    if (t->nrows && !t->cells)
        return sy_fail(err, SY_ERR_ARG, "table: nrows = %zu but cells is NULL", t->nrows);
    if (t->nnotes && !t->notes)
        return sy_fail(err, SY_ERR_ARG, "table: nnotes = %zu but notes is NULL", t->nnotes);
    for (size_t k = 0; k < t->nnotes; k++)
        if (!t->notes[k]) return sy_fail(err, SY_ERR_ARG, "table: notes[%zu] is NULL", k);
    if (t->nfooter && !t->footer)
        return sy_fail(err, SY_ERR_ARG, "table: nfooter = %zu but footer is NULL", t->nfooter);
    for (size_t k = 0; k < t->nfooter; k++)
        if (!t->footer[k]) return sy_fail(err, SY_ERR_ARG, "table: footer[%zu] is NULL", k);
    return SY_OK;
}

static void tab_free(tab_ctx *c)
{
    syc_ctx_free(&c->x);
    free(c->rowh);
    free(c->noteh);
    free(c->pages);
}

/* ------------------------------------------------------------------ */
/* Documents                                                           */

struct sy_doc {
    sy_outfile of;
    syc_file_sink sink;
    cairo_surface_t *s;
    cairo_t *cr;
    double w_in, h_in;
    size_t npages;
    int broken;                        /* a cairo error: only abort/close remain */
};

sy_status sy_doc_open(sy_doc **doc, const char *path, double width_in, double height_in,
                      const char *title, const char *creator, sy_error *err)
{
    if (!doc) return sy_fail(err, SY_ERR_ARG, "document: no handle given");
    *doc = NULL;
    if (!path || !*path) return sy_fail(err, SY_ERR_ARG, "document: no output path given");
    sy_status st = page_validate(width_in, height_in, path, err);
    if (st != SY_OK) return st;
    sy_doc *d = calloc(1, sizeof *d);
    if (!d) return sy_fail(err, SY_ERR_NOMEM, "%s: out of memory", path);
    st = (sy_status)sy_outfile_open(&d->of, path, err);
    if (st != SY_OK) {
        free(d);
        return st;
    }
    d->w_in = width_in;
    d->h_in = height_in;
    d->sink.fp = d->of.fp;
    d->s = cairo_pdf_surface_create_for_stream(syc_file_write, &d->sink, width_in * 72.0,
                                               height_in * 72.0);
    st = syc_surface_status(d->s, path, 0, err);
    if (st != SY_OK) {
        sy_doc_abort(d);
        return st;
    }
    syc_pdf_metadata(d->s, title, creator, NULL);
    d->cr = cairo_create(d->s);
    *doc = d;
    return SY_OK;
}

static sy_status doc_usable(sy_doc *d, sy_error *err)
{
    if (!d) return sy_fail(err, SY_ERR_ARG, "document: no document given (NULL)");
    if (d->broken)
        return sy_fail(err, SY_ERR_IO, "cannot write %s: an earlier page failed; abort the document",
                       d->of.path);
    return SY_OK;
}

/* After drawing a page: show it, or note the failure. */
static sy_status doc_page_done(sy_doc *d, sy_status st, size_t *count, sy_error *err)
{
    cairo_show_page(d->cr);
    cairo_status_t cs = cairo_status(d->cr);
    if (cs == CAIRO_STATUS_SUCCESS) cs = cairo_surface_status(d->s);
    if (cs != CAIRO_STATUS_SUCCESS) {
        d->broken = 1;
        if (st == SY_OK) st = syc_surface_status(d->s, d->of.path, d->sink.err, err);
        if (st == SY_OK)
            st = sy_fail(err, SY_ERR_IO, "cannot write %s: %s", d->of.path, cairo_status_to_string(cs));
        return st;
    }
    if (st == SY_OK && count) (*count)++;
    return st;
}

sy_status sy_doc_add_chart(sy_doc *doc, const sy_chart *chart, sy_error *err)
{
    sy_status st = doc_usable(doc, err);
    if (st != SY_OK) return st;
    sy_chart_page pg;
    sy_chart_page_init(&pg);
    pg.width_in = doc->w_in;
    pg.height_in = doc->h_in;
    /* validate first: a rejected chart leaves no page behind */
    st = syc_chart_validate(chart, &pg, err);
    if (st != SY_OK) return st;
    st = syc_chart_draw(chart, doc->w_in, doc->h_in, doc->cr, 2.0, err);
    return doc_page_done(doc, st, &doc->npages, err);
}

sy_status sy_doc_add_xy(sy_doc *doc, const sy_xy_chart *xy, sy_error *err)
{
    sy_status st = doc_usable(doc, err);
    if (st != SY_OK) return st;
    st = xy_validate(xy, err);
    if (st != SY_OK) return st;
    xy_ctx *c = calloc(1, sizeof *c);
    if (!c) return sy_fail(err, SY_ERR_NOMEM, "xy chart: out of memory");
    c->xy = xy;
    cairo_save(doc->cr);
    st = xy_render(c, doc->cr, doc->w_in, doc->h_in, err);
    cairo_restore(doc->cr);
    syc_ctx_free(&c->x);
    free(c);
    return doc_page_done(doc, st, &doc->npages, err);
}

sy_status sy_doc_add_table(sy_doc *doc, const sy_table_page *t, size_t *npages, sy_error *err)
{
    if (npages) *npages = 0;
    sy_status st = doc_usable(doc, err);
    if (st != SY_OK) return st;
    st = tab_validate(t, err);
    if (st != SY_OK) return st;
    tab_ctx *c = calloc(1, sizeof *c);
    if (!c) return sy_fail(err, SY_ERR_NOMEM, "table: out of memory");
    c->t = t;
    c->x.cr = doc->cr;
    c->x.pc = syc_make_pango(doc->cr);
    if (!c->x.pc) st = sy_fail(err, SY_ERR_NOMEM, "table: cannot create a text context");
    if (st == SY_OK) st = tab_plan(c, doc->w_in, doc->h_in, err);
    for (size_t p = 0; st == SY_OK && p < c->npages; p++) {
        cairo_save(doc->cr);
        tab_draw_page(c, p);
        cairo_restore(doc->cr);
        size_t before = doc->npages;
        st = doc_page_done(doc, SY_OK, &doc->npages, err);
        if (npages) *npages += doc->npages - before;
    }
    tab_free(c);
    free(c);
    return st;
}

size_t sy_doc_page_count(const sy_doc *doc) { return doc ? doc->npages : 0; }

static void doc_free(sy_doc *d)
{
    if (d->cr) cairo_destroy(d->cr);
    if (d->s) cairo_surface_destroy(d->s);
    d->cr = NULL;
    d->s = NULL;
}

sy_status sy_doc_close(sy_doc *doc, sy_error *err)
{
    if (!doc) return sy_fail(err, SY_ERR_ARG, "document: no document given (NULL)");
    sy_status st = SY_OK;
    if (doc->broken)
        st = sy_fail(err, SY_ERR_IO, "cannot write %s: an earlier page failed", doc->of.path);
    else if (doc->npages == 0)
        st = sy_fail(err, SY_ERR_ARG,
                     "%s: the document has no pages; add a chart, figure or table before closing",
                     doc->of.path);
    if (st == SY_OK) {
        cairo_destroy(doc->cr);
        doc->cr = NULL;
        cairo_surface_finish(doc->s);
        st = syc_surface_status(doc->s, doc->of.path, doc->sink.err, err);
    }
    doc_free(doc);
    if (st == SY_OK) st = (sy_status)sy_outfile_commit(&doc->of, err);
    else sy_outfile_abort(&doc->of);
    free(doc);
    return st;
}

void sy_doc_abort(sy_doc *doc)
{
    if (!doc) return;
    /* finishing the surface still writes to the temporary; it is removed
     * right after */
    doc_free(doc);
    sy_outfile_abort(&doc->of);
    free(doc);
}
