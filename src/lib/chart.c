/* chart.c - porkchop chart renderer: layout, label placement, drawing and
 * the SVG/PDF/PNG back ends.  See synodic/chart.h.
 *
 * Everything is laid out in PostScript points (1/72 in) with the origin at
 * the top left of the page; the PNG back end merely scales the cairo
 * context by dpi/72.  Text goes through pango with hinting switched off
 * and a fixed 72 dpi resolution, so that text metrics (and hence every
 * layout decision, label position and tick choice) are identical for the
 * raster and the vector formats and do not depend on the output dpi.
 */
#include "config.h"
#include "synodic.h"
#include "synodic/chart.h"
#include "synodic/io.h"
#include "chart_priv.h"

#include <cairo.h>
#include <cairo-pdf.h>
#include <cairo-svg.h>
#include <errno.h>
#include <math.h>
#include <fontconfig/fontconfig.h>
#include <pango/pangocairo.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

#ifndef M_PI
#define M_PI 3.14159265358979323846
#endif

#define FONT_FAMILY "DejaVu Sans"

/* ------------------------------------------------------------------ */
/* Palette.
 *
 * Our own scheme, designed around two rules: (1) every line role differs
 * from the others in dash pattern and weight, and most also in lightness,
 * so a grayscale copy still separates them; (2) hues are chosen to stay
 * apart for the common red-green deficiencies.  Relative luminance Y
 * (sRGB, WCAG 2 formula) and CIE L*:
 *     primary   deep blue     #1F4A99  Y 0.075  L* 33  solid, heaviest
 *     secondary burnt orange  #D35F0D  Y 0.22   L* 54  long dash
 *     tertiary  brick red     #993333  Y 0.094  L* 37  dash-dot, thinner
 *     TOF       mid grey      #8A8A8A  Y 0.25   L* 58  short dash, thin
 *     boundary  charcoal      #222222  Y 0.016  L* 13  dash-dot-dot, thick
 * Check made: the colours were passed through the protanopia and
 * deuteranopia simulation matrices of Machado, Oliveira & Fernandes
 * (IEEE TVCG 15(6), 2009, severity 1.0; matrix values from memory) and
 * compared by CIE76 colour difference: the closest role pair is tertiary
 * vs boundary under protanopia, dE ~ 23; every pair with the primary is
 * at least 50 in all three visions (a plum tertiary was rejected: dE 11
 * against the primary under protanopia).
 * The filled-contour ramp runs from cream to dark blue with monotonically
 * falling lightness (L* 96, 88, 79, 68, 53, 40, 26), through muted
 * yellow-green and teal, so its order reads without colour vision.
 * Constraint regions use hatching (a pattern, not a colour) over a faint
 * tint; "no solution" is neutral grey. */

const syc_rgb SYC_COL_ROLE[3] = {SYC_HEX(0x1F4A99), SYC_HEX(0xD35F0D), SYC_HEX(0x993333)};
static const syc_rgb COL_TOF = SYC_HEX(0x8A8A8A);
static const syc_rgb COL_BOUNDARY = SYC_HEX(0x222222);
const syc_rgb SYC_COL_GRID = SYC_HEX(0xE4E4E4);
const syc_rgb SYC_COL_FRAME = SYC_HEX(0x4D4D4D);
const syc_rgb SYC_COL_TEXT = SYC_HEX(0x1A1A1A);
const syc_rgb SYC_COL_FOOT = SYC_HEX(0x444444);
static const syc_rgb COL_NOSOL = SYC_HEX(0xD0D0D0);
static const syc_rgb COL_HATCH[4] = {SYC_HEX(0x4C4C66), SYC_HEX(0x2F5F4F), SYC_HEX(0x6A5A3A), SYC_HEX(0x5A5A5A)};
static const syc_rgb RAMP[7] = {SYC_HEX(0xFBF3D2), SYC_HEX(0xE6DFA0), SYC_HEX(0xB4CD8F), SYC_HEX(0x76B09A),
                            SYC_HEX(0x43899A), SYC_HEX(0x2F6190), SYC_HEX(0x283B6F)};

/* Dash patterns in units of the base line width scale. */
static const double DASH_SECONDARY[] = {4.2, 1.8};
static const double DASH_TERTIARY[] = {4.0, 1.4, 0.9, 1.4};
static const double DASH_TOF[] = {1.6, 1.6};
static const double DASH_BOUNDARY[] = {7.0, 1.6, 1.2, 1.6, 1.2, 1.6};

/* ------------------------------------------------------------------ */
/* Small utilities                                                     */


void syc_mb_put(syc_membuf *m, const void *data, size_t n)
{
    if (m->oom) return;
    if (m->n + n + 1 > m->cap) {
        size_t c = m->cap ? m->cap : 4096;
        while (c < m->n + n + 1) c *= 2;
        char *q = realloc(m->p, c);
        if (!q) { m->oom = 1; return; }
        m->p = q;
        m->cap = c;
    }
    memcpy(m->p + m->n, data, n);
    m->n += n;
    m->p[m->n] = '\0';
}

void syc_mb_puts(syc_membuf *m, const char *s) { syc_mb_put(m, s, strlen(s)); }

/* XML text escaping for the SVG title/desc. */
void syc_mb_put_xml(syc_membuf *m, const char *s)
{
    for (; s && *s; s++) {
        switch (*s) {
        case '&': syc_mb_puts(m, "&amp;"); break;
        case '<': syc_mb_puts(m, "&lt;"); break;
        case '>': syc_mb_puts(m, "&gt;"); break;
        case '"': syc_mb_puts(m, "&quot;"); break;
        default:
            if ((unsigned char)*s < 32 && *s != '\n' && *s != '\t') syc_mb_puts(m, " ");
            else syc_mb_put(m, s, 1);
        }
    }
}

/* Civil date from JD (proleptic Gregorian), the integer algorithm of
 * Richards, Explanatory Supplement to the Astronomical Almanac (3rd ed.,
 * 2013), section 15.11.  Kept here so that the renderer depends on
 * nothing but its inputs. */
static void civil_from_jd(double jd, int *y, int *m, int *d)
{
    long J = (long)floor(jd + 0.5);
    long f = J + 1401 + (((4 * J + 274277) / 146097) * 3) / 4 - 38;
    long e = 4 * f + 3;
    long g = (e % 1461) / 4;
    long h = 5 * g + 2;
    *d = (int)((h % 153) / 5 + 1);
    *m = (int)(((h / 153 + 2) % 12) + 1);
    *y = (int)(e / 1461 - 4716 + (12 + 2 - *m) / 12);
}

/* JD of 0h on a civil date (Fliegel & Van Flandern 1968, CACM 11, 657). */
static double jd_from_civil(int y, int m, int d)
{
    long a = (14 - m) / 12, yy = y + 4800 - a, mm = m + 12 * a - 3;
    long jdn = d + (153 * mm + 2) / 5 + 365 * yy + yy / 4 - yy / 100 + yy / 400 - 32045;
    return (double)jdn - 0.5;
}

static const char *MONTH_ABBR[12] = {"Jan", "Feb", "Mar", "Apr", "May", "Jun",
                                     "Jul", "Aug", "Sep", "Oct", "Nov", "Dec"};

void sy_chart_format_level(double value, double step, char *buf, size_t len)
{
    int dec = 0;
    if (step > 0 && isfinite(step)) {
        double l = -floor(log10(step) + 1e-9);
        dec = l > 0 ? (int)l : 0;
        /* a step like 2.5 needs one decimal more than its magnitude says */
        double scaled = step * pow(10.0, dec);
        if (fabs(scaled - floor(scaled + 0.5)) > 1e-6) dec++;
        if (dec > 6) dec = 6;
    } else {
        dec = 3;
    }
    snprintf(buf, len, "%.*f", dec, value);
    if (strchr(buf, '.')) {
        size_t n = strlen(buf);
        while (n > 0 && buf[n - 1] == '0') buf[--n] = '\0';
        if (n > 0 && buf[n - 1] == '.') buf[--n] = '\0';
    }
    if (strcmp(buf, "-0") == 0) snprintf(buf, len, "0");
}

sy_chart_format sy_chart_format_from_path(const char *path)
{
    const char *dot = path ? strrchr(path, '.') : NULL;
    if (!dot) return SY_CHART_FMT_AUTO;
    char ext[8] = {0};
    for (size_t i = 0; i < sizeof ext - 1 && dot[1 + i]; i++) {
        char ch = dot[1 + i];
        ext[i] = (char)(ch >= 'A' && ch <= 'Z' ? ch - 'A' + 'a' : ch);
    }
    if (!strcmp(ext, "png")) return SY_CHART_FMT_PNG;
    if (!strcmp(ext, "svg")) return SY_CHART_FMT_SVG;
    if (!strcmp(ext, "pdf")) return SY_CHART_FMT_PDF;
    return SY_CHART_FMT_AUTO;
}

void sy_chart_init(sy_chart *chart)
{
    memset(chart, 0, sizeof *chart);
    chart->yaxis = SY_CHART_Y_ARRIVAL;
}

void sy_chart_page_init(sy_chart_page *page)
{
    memset(page, 0, sizeof *page);
    page->width_in = 3.5;
    page->height_in = 3.0;
    page->dpi = 300.0;
    page->format = SY_CHART_FMT_AUTO;
}

/* ------------------------------------------------------------------ */
/* Oriented boxes                                                      */

int sy_chart_boxes_overlap(const sy_chart_box *a, const sy_chart_box *b,
                           double gap_pt)
{
    /* Separating-axis test for two rectangles (Gottschalk, Lin & Manocha
     * 1996, "OBBTree"): they are disjoint iff some edge normal of either
     * separates their projections. */
    double ax[2][2] = {{cos(a->angle_rad), sin(a->angle_rad)},
                       {-sin(a->angle_rad), cos(a->angle_rad)}};
    double bx[2][2] = {{cos(b->angle_rad), sin(b->angle_rad)},
                       {-sin(b->angle_rad), cos(b->angle_rad)}};
    double d[2] = {b->cx - a->cx, b->cy - a->cy};
    for (int k = 0; k < 4; k++) {
        const double *u = k < 2 ? ax[k] : bx[k - 2];
        double dist = fabs(d[0] * u[0] + d[1] * u[1]);
        double ra = a->half_w * fabs(ax[0][0] * u[0] + ax[0][1] * u[1]) +
                    a->half_h * fabs(ax[1][0] * u[0] + ax[1][1] * u[1]);
        double rb = b->half_w * fabs(bx[0][0] * u[0] + bx[0][1] * u[1]) +
                    b->half_h * fabs(bx[1][0] * u[0] + bx[1][1] * u[1]);
        if (dist > ra + rb + gap_pt) return 0;
    }
    return 1;
}

static void box_corners(const sy_chart_box *b, double c[4][2])
{
    double ca = cos(b->angle_rad), sa = sin(b->angle_rad);
    static const double sx[4] = {-1, 1, 1, -1}, sy[4] = {-1, -1, 1, 1};
    for (int k = 0; k < 4; k++) {
        double x = sx[k] * b->half_w, y = sy[k] * b->half_h;
        c[k][0] = b->cx + x * ca - y * sa;
        c[k][1] = b->cy + x * sa + y * ca;
    }
}

/* ------------------------------------------------------------------ */
/* Render context                                                      */


static int box_push(syc_ctx *x, const sy_chart_box *b)
{
    if (x->nboxes == x->capboxes) {
        size_t c = x->capboxes ? 2 * x->capboxes : 64;
        sy_chart_box *q = realloc(x->boxes, c * sizeof *q);
        if (!q) { x->oom = 1; return 0; }
        x->boxes = q;
        int *r = realloc(x->styles, c * sizeof *r);
        if (!r) { x->oom = 1; return 0; }
        x->styles = r;
        x->capboxes = c;
    }
    x->styles[x->nboxes] = x->cur_style;
    x->boxes[x->nboxes++] = *b;
    return 1;
}

static int box_free_spot(const syc_ctx *x, const sy_chart_box *b, double gap,
                         double inset)
{
    double c[4][2];
    box_corners(b, c);
    for (int k = 0; k < 4; k++)
        if (c[k][0] < x->px0 + inset || c[k][0] > x->px1 - inset ||
            c[k][1] < x->py0 + inset || c[k][1] > x->py1 - inset)
            return 0;
    for (size_t k = 0; k < x->nboxes; k++)
        if (sy_chart_boxes_overlap(b, &x->boxes[k], gap)) return 0;
    return 1;
}

/* Data -> page. */
static double X_of(const syc_ctx *x, double xd)
{
    return x->px0 + (xd - x->xmin) / (x->xmax - x->xmin) * (x->px1 - x->px0);
}
static double Y_of(const syc_ctx *x, double yd)
{
    return x->py1 - (yd - x->ymin) / (x->ymax - x->ymin) * (x->py1 - x->py0);
}
/* Grid index -> page. */
static double Xi(const syc_ctx *x, double i) { return X_of(x, x->c->x0_jd + i * x->c->dx_days); }
static double Yj(const syc_ctx *x, double j) { return Y_of(x, x->c->y0 + j * x->c->dy); }

/* ------------------------------------------------------------------ */
/* Text                                                                */

PangoLayout *syc_layout(syc_ctx *x, const char *text, double size_pt, int bold,
                              int italic, double wrap_w, PangoAlignment al)
{
    PangoLayout *l = pango_layout_new(x->pc);
    PangoFontDescription *fd = pango_font_description_new();
    pango_font_description_set_family(fd, FONT_FAMILY);
    pango_font_description_set_absolute_size(fd, size_pt * PANGO_SCALE);
    if (bold) pango_font_description_set_weight(fd, PANGO_WEIGHT_BOLD);
    if (italic) pango_font_description_set_style(fd, PANGO_STYLE_ITALIC);
    pango_layout_set_font_description(l, fd);
    pango_font_description_free(fd);
    if (wrap_w > 0) {
        pango_layout_set_width(l, (int)(wrap_w * PANGO_SCALE));
        pango_layout_set_wrap(l, PANGO_WRAP_WORD_CHAR);
    }
    pango_layout_set_alignment(l, al);
    pango_layout_set_text(l, text ? text : "", -1);
    return l;
}

void syc_layout_size(PangoLayout *l, double *w, double *h)
{
    PangoRectangle lr;
    pango_layout_get_extents(l, NULL, &lr);
    if (w) *w = (double)lr.width / PANGO_SCALE;
    if (h) *h = (double)lr.height / PANGO_SCALE;
}

void syc_text_size(syc_ctx *x, const char *t, double fs, int bold, double *w, double *h)
{
    PangoLayout *l = syc_layout(x, t, fs, bold, 0, 0, PANGO_ALIGN_LEFT);
    syc_layout_size(l, w, h);
    g_object_unref(l);
}

/* Draw l with its logical box anchored at (px, py): ax, ay in 0..1 pick
 * the anchor point inside the box (0,0 top left, 0.5,0.5 centre), and the
 * box is rotated by ang about the anchor. */
void syc_draw_layout(syc_ctx *x, PangoLayout *l, double px, double py, double ax,
                        double ay, double ang, syc_rgb col)
{
    PangoRectangle lr;
    pango_layout_get_extents(l, NULL, &lr);
    double w = (double)lr.width / PANGO_SCALE, h = (double)lr.height / PANGO_SCALE;
    cairo_save(x->cr);
    cairo_translate(x->cr, px, py);
    cairo_rotate(x->cr, ang);
    cairo_move_to(x->cr, -(double)lr.x / PANGO_SCALE - ax * w,
                  -(double)lr.y / PANGO_SCALE - ay * h);
    cairo_set_source_rgb(x->cr, col.r, col.g, col.b);
    pango_cairo_update_layout(x->cr, l);
    pango_cairo_show_layout(x->cr, l);
    cairo_restore(x->cr);
}

void syc_draw_text(syc_ctx *x, const char *t, double fs, int bold, double px, double py,
                      double ax, double ay, double ang, syc_rgb col)
{
    PangoAlignment al = ax < 0.25 ? PANGO_ALIGN_LEFT : ax > 0.75 ? PANGO_ALIGN_RIGHT
                                                                 : PANGO_ALIGN_CENTER;
    PangoLayout *l = syc_layout(x, t, fs, bold, 0, 0, al);
    syc_draw_layout(x, l, px, py, ax, ay, ang, col);
    g_object_unref(l);
}

/* ------------------------------------------------------------------ */
/* Ticks                                                               */

typedef enum { TK_DAYS, TK_WEEKS, TK_MDAYS, TK_MONTHS, TK_YEARS } tick_kind;
typedef struct { tick_kind kind; int n; } tick_step;

/* From fine to coarse.  TK_MDAYS n = 3: days 1, 11, 21; n = 2: 1, 16. */
static const tick_step DATE_STEPS[] = {
    {TK_DAYS, 1}, {TK_DAYS, 2}, {TK_WEEKS, 1}, {TK_MDAYS, 3}, {TK_MDAYS, 2},
    {TK_MONTHS, 1}, {TK_MONTHS, 2}, {TK_MONTHS, 3}, {TK_MONTHS, 6},
    {TK_YEARS, 1}, {TK_YEARS, 2}, {TK_YEARS, 5}, {TK_YEARS, 10},
    {TK_YEARS, 20}, {TK_YEARS, 50}, {TK_YEARS, 100}};

static void date_ticks(double a, double b, tick_step st, syc_ticks *t)
{
    t->n = 0;
    int y, m, d;
    civil_from_jd(a, &y, &m, &d);
    int prev_year = -100000;
    /* walk candidate midnights; months/years by calendar arithmetic */
    if (st.kind == TK_DAYS || st.kind == TK_WEEKS) {
        double j = floor(a - 0.5) + 0.5;
        if (j < a - 1e-9) j += 1.0;
        for (; j <= b + 1e-9 && t->n < SYC_MAX_TICKS; j += 1.0) {
            long jdn = (long)floor(j + 0.5);
            /* JDN mod 7 == 0 is a Monday (common practice) */
            if (st.kind == TK_DAYS && jdn % st.n != 0) continue;
            if (st.kind == TK_WEEKS && jdn % 7 != 0) continue;
            t->v[t->n++] = j;
        }
    } else {
        int yy = y, mm = m;
        for (int guard = 0; guard < 20000 && t->n < SYC_MAX_TICKS; guard++) {
            static const int md3[3] = {1, 11, 21}, md2[2] = {1, 16};
            int nd = st.kind == TK_MDAYS ? st.n : 1;
            for (int k = 0; k < nd && t->n < SYC_MAX_TICKS; k++) {
                int day = st.kind == TK_MDAYS ? (st.n == 3 ? md3[k] : md2[k]) : 1;
                if (st.kind == TK_MONTHS && (mm - 1) % st.n != 0) continue;
                if (st.kind == TK_YEARS && (mm != 1 || yy % st.n != 0)) continue;
                double j = jd_from_civil(yy, mm, day);
                if (j >= a - 1e-9 && j <= b + 1e-9) t->v[t->n++] = j;
            }
            if (jd_from_civil(yy, mm, 1) > b) break;
            if (++mm > 12) { mm = 1; yy++; }
        }
    }
    for (int k = 0; k < t->n; k++) {
        civil_from_jd(t->v[k], &y, &m, &d);
        int show_year = (y != prev_year);
        prev_year = y;
        const char *sep = " ";
        if (st.kind == TK_YEARS)
            snprintf(t->lab[k], sizeof t->lab[k], "%d", y);
        else if (st.kind == TK_MONTHS)
            snprintf(t->lab[k], sizeof t->lab[k], show_year ? "%s%s%d" : "%s",
                     MONTH_ABBR[m - 1], sep, y);
        else if (show_year)
            snprintf(t->lab[k], sizeof t->lab[k], "%d %s%s%d", d, MONTH_ABBR[m - 1], sep, y);
        else
            snprintf(t->lab[k], sizeof t->lab[k], "%d %s", d, MONTH_ABBR[m - 1]);
    }
}

void syc_num_ticks_step(double a, double b, double step, syc_ticks *t)
{
    t->n = 0;
    double first = ceil(a / step - 1e-9) * step;
    for (double v = first; v <= b + 1e-9 * fabs(step) && t->n < SYC_MAX_TICKS; v += step) {
        double vv = fabs(v) < 1e-9 * step ? 0.0 : v;
        t->v[t->n] = vv;
        sy_chart_format_level(vv, step, t->lab[t->n], sizeof t->lab[t->n]);
        t->n++;
    }
}

/* Does the tick set fit along an axis of `len` points?  Horizontal axis:
 * neighbouring labels must be apart by their half widths plus a gap;
 * vertical axis: by their heights.  min_sp keeps grids from crowding. */
static int ticks_fit(syc_ctx *x, const syc_ticks *t, int horizontal, double len, double span,
                     double min_sp)
{
    if (t->n > 40) return 0;
    double prev_pos = 0, prev_ext = 0;
    for (int k = 0; k < t->n; k++) {
        double w, h;
        syc_text_size(x, t->lab[k], x->fs_tick, 0, &w, &h);
        double pos = t->v[k] / span * len;
        double ext = horizontal ? w / 2 : h / 2;
        if (k > 0) {
            double sp = pos - prev_pos;
            if (sp < prev_ext + ext + (horizontal ? 0.9 : 0.35) * x->fs_tick || sp < min_sp)
                return 0;
        }
        prev_pos = pos;
        prev_ext = ext;
    }
    return 1;
}

void syc_date_ticks(syc_ctx *x, double a, double b, int horizontal, double len,
                              syc_ticks *t)
{
    size_t ns = sizeof DATE_STEPS / sizeof DATE_STEPS[0];
    for (size_t k = 0; k < ns; k++) {
        /* skip steps producing absurd counts before measuring */
        static const double approx[] = {1, 2, 7, 10, 15, 30, 61, 91, 182, 365, 730,
                                        1826, 3652, 7305, 18262, 36525};
        _Static_assert(sizeof approx / sizeof approx[0] ==
                           sizeof DATE_STEPS / sizeof DATE_STEPS[0],
                       "one spacing per tick step");
        if ((b - a) / approx[k] > 60) continue;
        date_ticks(a, b, DATE_STEPS[k], t);
        if (t->n == 0) continue;
        syc_ticks shifted = *t;
        for (int q = 0; q < shifted.n; q++) shifted.v[q] -= a;
        if (ticks_fit(x, &shifted, horizontal, len, b - a, len / 14.0)) return;
    }
    /* nothing fits: fall back to the two ends */
    date_ticks(a, b, DATE_STEPS[ns - 1], t);
}

void syc_num_ticks(syc_ctx *x, double a, double b, int horizontal, double len,
                             syc_ticks *t)
{
    double span = b - a;
    double p = pow(10.0, floor(log10(span / 20.0)));
    static const double mult[] = {1, 2, 5, 10, 20, 50, 100, 200, 500, 1000};
    for (size_t k = 0; k < sizeof mult / sizeof mult[0]; k++) {
        syc_num_ticks_step(a, b, mult[k] * p, t);
        syc_ticks shifted = *t;
        for (int q = 0; q < shifted.n; q++) shifted.v[q] -= a;
        if (t->n >= 2 && ticks_fit(x, &shifted, horizontal, len, span, len / 14.0)) return;
    }
    syc_num_ticks_step(a, b, span, t);
}

/* ------------------------------------------------------------------ */
/* Line styles                                                         */

/* style: 0-2 roles, 3 TOF, 4 boundary */
void syc_line_style(syc_ctx *x, int style, double scale_w)
{
    cairo_t *cr = x->cr;
    double u = x->lw;
    double dash[8];
    int nd = 0;
    const double *pat = NULL;
    syc_rgb col;
    double w;
    switch (style) {
    case 0: col = SYC_COL_ROLE[0]; w = 1.05; break;
    case 1: col = SYC_COL_ROLE[1]; w = 0.95; pat = DASH_SECONDARY; nd = 2; break;
    case 2: col = SYC_COL_ROLE[2]; w = 0.8; pat = DASH_TERTIARY; nd = 4; break;
    case 3: col = COL_TOF; w = 0.55; pat = DASH_TOF; nd = 2; break;
    default: col = COL_BOUNDARY; w = 1.5; pat = DASH_BOUNDARY; nd = 6; break;
    }
    for (int k = 0; k < nd; k++) dash[k] = pat[k] * u;
    cairo_set_source_rgb(cr, col.r, col.g, col.b);
    cairo_set_line_width(cr, w * u * scale_w);
    cairo_set_line_join(cr, CAIRO_LINE_JOIN_ROUND);
    cairo_set_line_cap(cr, nd ? CAIRO_LINE_CAP_BUTT : CAIRO_LINE_CAP_ROUND);
    cairo_set_dash(cr, dash, nd, 0);
}

static syc_rgb style_colour(int style)
{
    switch (style) {
    case 0: case 1: case 2: return SYC_COL_ROLE[style];
    case 3: return COL_TOF;
    default: return COL_BOUNDARY;
    }
}

/* ------------------------------------------------------------------ */
/* Layout                                                              */

static void legend_collect(syc_ctx *x)
{
    const sy_chart *c = x->c;
    x->nleg = 0;
#define LEG(k, s, t) do { if (x->nleg < 24 && (t)) { x->leg[x->nleg].kind = (k); \
    x->leg[x->nleg].style = (s); x->leg[x->nleg].text = (t); x->nleg++; } } while (0)
    /* primary first, whatever order the caller gave */
    for (int role = 0; role < 3; role++)
        for (size_t k = 0; k < c->nisolines; k++)
            if ((int)c->isolines[k].role == role && c->isolines[k].nsets)
                LEG(SYC_LEG_LINE, role, c->isolines[k].legend);
    if (c->tof && c->tof->n) LEG(SYC_LEG_LINE, 3, c->tof->legend ? c->tof->legend : "Time of flight, days");
    if (c->boundary && c->boundary->nlines)
        LEG(SYC_LEG_LINE, 4, c->boundary->legend ? c->boundary->legend : "Type I / Type II boundary");
    for (size_t k = 0; k < c->nregions && k < 4; k++)
        if (c->regions[k].mask) LEG(SYC_LEG_REGION, (int)k, c->regions[k].legend);
    if (c->nosol_mask) LEG(SYC_LEG_NOSOL, 0, c->nosol_legend ? c->nosol_legend : "No solution");
    for (size_t k = 0; k < c->nmarkers; k++)
        if (c->markers[k].legend) LEG(SYC_LEG_MARKER, (int)c->markers[k].symbol, c->markers[k].legend);
    for (size_t k = 0; k < c->npaths; k++)
        if (c->paths[k].legend) LEG(SYC_LEG_PATH, (int)k, c->paths[k].legend);
#undef LEG
}

double syc_legend_flow(syc_ctx *x, double avail_w)
{
    /* entries flow left to right and wrap; returns the block height */
    double sw = 2.4 * x->fs_leg, gap = 0.45 * x->fs_leg, egap = 1.3 * x->fs_leg;
    double pad = 0.5 * x->fs_leg;
    double rowh = 0, lx = pad, ly = pad, maxw = 0;
    double th;
    syc_text_size(x, "Ag", x->fs_leg, 0, NULL, &th);
    rowh = th;
    for (int k = 0; k < x->nleg; k++) {
        double w;
        syc_text_size(x, x->leg[k].text, x->fs_leg, 0, &w, NULL);
        x->leg[k].w = sw + gap + w;
        if (lx > pad && lx + x->leg[k].w > avail_w - pad) {
            lx = pad;
            ly += rowh * 1.1;
        }
        x->leg[k].x = lx;
        x->leg[k].y = ly;
        lx += x->leg[k].w + egap;
        if (lx - egap > maxw) maxw = lx - egap;
    }
    x->leg_w = maxw + pad;
    return x->nleg ? ly + rowh + pad : 0;
}

void syc_fonts(syc_ctx *x, double width_in, double height_in)
{
    x->W = width_in * 72.0;
    x->H = height_in * 72.0;
    /* Base size grows with the page but much more slowly than the page:
     * 7.3 pt at a 3.5 in column, 10.5 pt at 10 in, clamped to 6.5..12. */
    double ref = fmin(width_in, height_in * 1.35);
    double base = 5.6 + 0.5 * ref;
    if (base < 6.5) base = 6.5;
    if (base > 12.0) base = 12.0;
    x->fs_title = base * 1.25;
    x->fs_sub = base * 0.95;
    x->fs_axis = base;
    x->fs_tick = base * 0.9;
    x->fs_label = base * 0.8;
    x->fs_mark = base * 0.76;
    x->fs_leg = base * 0.8;
    x->fs_foot = fmax(5.6, base * 0.72);
    x->lw = fmax(0.75, base / 9.0);
    x->m = 0.7 * base;
}

double syc_layout_head(syc_ctx *x, const char *title, const char *subtitle)
{
    double full_w = x->W - 2 * x->m, top = x->m, h;
    if (title && *title) {
        PangoLayout *l = syc_layout(x, title, x->fs_title, 1, 0, full_w, PANGO_ALIGN_LEFT);
        syc_layout_size(l, NULL, &h);
        g_object_unref(l);
        x->title_y = top;
        top += h;
    }
    if (subtitle && *subtitle) {
        PangoLayout *l = syc_layout(x, subtitle, x->fs_sub, 0, 0, full_w, PANGO_ALIGN_LEFT);
        syc_layout_size(l, NULL, &h);
        g_object_unref(l);
        x->sub_y = top;
        top += h;
    }
    return top + 0.6 * x->fs_axis;
}

double syc_layout_foot(syc_ctx *x, const char *const *footer, size_t nfooter)
{
    double full_w = x->W - 2 * x->m, bottom = x->H - x->m, foot_h = 0, h;
    for (size_t k = 0; k < nfooter; k++) {
        PangoLayout *l = syc_layout(x, footer[k], x->fs_foot, 0, 0, full_w, PANGO_ALIGN_LEFT);
        syc_layout_size(l, NULL, &h);
        g_object_unref(l);
        foot_h += h;
    }
    x->foot_y = bottom - foot_h;
    return x->foot_y - (foot_h > 0 ? 0.5 * x->fs_axis : 0);
}

static void do_layout(syc_ctx *x)
{
    const sy_chart *c = x->c;
    const sy_chart_page *pg = x->pg;
    syc_fonts(x, pg->width_in, pg->height_in);
    double base = x->fs_axis;

    x->xmin = c->x0_jd;
    x->xmax = c->x0_jd + (double)(c->nx - 1) * c->dx_days;
    x->ymin = c->y0;
    x->ymax = c->y0 + (double)(c->ny - 1) * c->dy;

    double W = x->W, m = x->m, full_w = W - 2 * m;
    double top = syc_layout_head(x, c->title, c->subtitle);
    double bottom = syc_layout_foot(x, c->footer, c->nfooter);

    legend_collect(x);
    double leg_h = syc_legend_flow(x, full_w);
    x->leg_h = leg_h;
    x->leg_y = bottom - leg_h;
    if (leg_h > 0) bottom = x->leg_y - 0.5 * base;

    double tl, lh;
    syc_text_size(x, "Ag", x->fs_tick, 0, NULL, &lh);
    tl = 0.35 * base;                              /* tick length    */
    double xtitle_h = 0;
    if (c->xtitle && *c->xtitle) syc_text_size(x, c->xtitle, x->fs_axis, 0, NULL, &xtitle_h);
    x->xtitle_y = bottom - xtitle_h;
    x->xtick_top = 0; /* set below */
    double plot_bottom = x->xtitle_y - 0.25 * base - lh - tl - 0.2 * base;
    x->py0 = top;
    x->py1 = plot_bottom;
    if (x->py1 - x->py0 < 3 * base) x->py1 = x->py0 + 3 * base; /* tiny page */
    x->xtick_top = x->py1 + tl + 0.2 * base;

    /* y ticks need the plot height only */
    double plot_h = x->py1 - x->py0;
    if (c->yaxis == SY_CHART_Y_ARRIVAL)
        syc_date_ticks(x, x->ymin, x->ymax, 0, plot_h, &x->yt);
    else
        syc_num_ticks(x, x->ymin, x->ymax, 0, plot_h, &x->yt);
    double ylab_w = 0;
    for (int k = 0; k < x->yt.n; k++) {
        double w;
        syc_text_size(x, x->yt.lab[k], x->fs_tick, 0, &w, NULL);
        if (w > ylab_w) ylab_w = w;
    }
    double ytitle_h = 0;
    if (c->ytitle && *c->ytitle) syc_text_size(x, c->ytitle, x->fs_axis, 0, NULL, &ytitle_h);
    x->ytitle_x = m;
    x->px0 = m + ytitle_h + 0.35 * base + ylab_w + tl + 0.2 * base;

    /* right side: colour bar or a small pad for the last x label */
    double right = W - m - 1.0 * base;
    if (c->fill && c->fill->nlevels >= 2) {
        double lw_max = 0, ct_h = 0;
        double step = (c->fill->levels[c->fill->nlevels - 1] - c->fill->levels[0]) /
                      (double)(c->fill->nlevels - 1);
        for (size_t k = 0; k < c->fill->nlevels; k++) {
            char b[32];
            sy_chart_format_level(c->fill->levels[k], step, b, sizeof b);
            double w;
            syc_text_size(x, b, x->fs_tick, 0, &w, NULL);
            if (w > lw_max) lw_max = w;
        }
        if (c->fill->title) syc_text_size(x, c->fill->title, x->fs_axis, 0, NULL, &ct_h);
        x->cbar_w = 0.8 * base;
        x->cbar_x = W - m - ct_h - 0.4 * base - lw_max - 0.3 * base - tl - x->cbar_w;
        right = x->cbar_x - 1.1 * base;
    }
    x->px1 = right;
    if (x->px1 - x->px0 < 3 * base) x->px1 = x->px0 + 3 * base;
    /* one-line labels; the year is shown on the first tick and where it
     * changes */
    syc_date_ticks(x, x->xmin, x->xmax, 1, x->px1 - x->px0, &x->xt);

    /* legend block: aligned with the plot if it fits there */
    x->leg_x = m;
    if (x->leg_w <= x->px1 - x->px0 + 1e-9) x->leg_x = x->px0;
    else if (x->leg_w <= W - m - x->px0) x->leg_x = x->px0;
}

/* ------------------------------------------------------------------ */
/* Label placement                                                     */

typedef struct {
    double *p;          /* page points x0 y0 x1 y1 ... */
    size_t n;
    double *s;          /* cumulative arc length */
} pline;

static int pline_from_grid(syc_ctx *x, const sy_polyline *pl, pline *o)
{
    o->n = pl->n + (pl->closed ? 1 : 0);
    o->p = malloc(2 * o->n * sizeof *o->p);
    o->s = malloc(o->n * sizeof *o->s);
    if (!o->p || !o->s) { free(o->p); free(o->s); o->p = o->s = NULL; x->oom = 1; return 0; }
    for (size_t k = 0; k < o->n; k++) {
        size_t q = k < pl->n ? k : 0;
        o->p[2 * k] = Xi(x, pl->xy[2 * q]);
        o->p[2 * k + 1] = Yj(x, pl->xy[2 * q + 1]);
        o->s[k] = k ? o->s[k - 1] + hypot(o->p[2 * k] - o->p[2 * k - 2],
                                          o->p[2 * k + 1] - o->p[2 * k - 1])
                    : 0.0;
    }
    return 1;
}

static void pline_at(const pline *pl, double s, double *px, double *py, size_t *seg)
{
    size_t lo = 0, hi = pl->n - 1;
    while (hi - lo > 1) {
        size_t mid = (lo + hi) / 2;
        if (pl->s[mid] <= s) lo = mid; else hi = mid;
    }
    double L = pl->s[hi] - pl->s[lo];
    double t = L > 0 ? (s - pl->s[lo]) / L : 0;
    if (t < 0) t = 0;
    if (t > 1) t = 1;
    *px = pl->p[2 * lo] + t * (pl->p[2 * hi] - pl->p[2 * lo]);
    *py = pl->p[2 * lo + 1] + t * (pl->p[2 * hi + 1] - pl->p[2 * lo + 1]);
    if (seg) *seg = lo;
}

/* Place up to `maxn` labels of size tw x th along pl.  Candidates are the
 * stretches of the line whose chord deviates from the line by less than a
 * quarter of the text height (the text then reads along the line); among
 * them the flattest, most horizontal one away from the plot border wins,
 * further labels on the same line only at least `spacing` further along.
 * Deterministic: candidates are scanned in arc-length order and ties keep
 * the first. */
static int place_on_line(syc_ctx *x, const pline *pl, double tw, double th,
                         sy_chart_box_kind kind, const char *text, int maxn,
                         double spacing)
{
    if (pl->n < 2) return 0;
    double T = pl->s[pl->n - 1];
    double pad = 0.35 * th;
    double need = tw + 2 * pad;
    if (T < need * 1.3) return 0;
    double placed_s[8];
    int nplaced = 0;
    double step = fmax(need / 4.0, 1.0);
    size_t ncand = (size_t)((T - need) / step) + 1;
    if (ncand > 2000) { ncand = 2000; step = (T - need) / 1999.0; }
    double cx_mid = 0.5 * (x->px0 + x->px1), cy_mid = 0.5 * (x->py0 + x->py1);
    double half_diag = 0.5 * hypot(x->px1 - x->px0, x->py1 - x->py0);
    while (nplaced < maxn && nplaced < 8) {
        double best = INFINITY;
        sy_chart_box bestb = {0};
        double best_s = 0;
        for (size_t k = 0; k < ncand; k++) {
            double s = need / 2 + (double)k * step;
            int far = 1;
            for (int q = 0; q < nplaced; q++)
                if (fabs(s - placed_s[q]) < spacing) far = 0;
            if (!far) continue;
            double ax_, ay_, bx_, by_;
            size_t sa, sb;
            pline_at(pl, s - need / 2, &ax_, &ay_, &sa);
            pline_at(pl, s + need / 2, &bx_, &by_, &sb);
            double chx = bx_ - ax_, chy = by_ - ay_, ch = hypot(chx, chy);
            if (ch < 0.85 * need) continue;
            double dev = 0;
            for (size_t q = sa + 1; q <= sb && q < pl->n; q++) {
                double vx = pl->p[2 * q] - ax_, vy = pl->p[2 * q + 1] - ay_;
                double dd = fabs(vx * chy - vy * chx) / ch;
                if (dd > dev) dev = dd;
            }
            if (dev > 0.25 * th) continue;
            double ang = atan2(chy, chx);
            /* upright: keep the text's up vector pointing up the page */
            if (ang > M_PI / 2) ang -= M_PI;
            if (ang <= -M_PI / 2) ang += M_PI;
            sy_chart_box b;
            b.cx = 0.5 * (ax_ + bx_);
            b.cy = 0.5 * (ay_ + by_);
            /* the box length is the chord, so a slightly bent stretch is
             * still fully covered */
            b.half_w = 0.5 * fmax(ch, need);
            b.half_h = 0.5 * th + 0.25 * pad + dev;
            b.angle_rad = ang;
            b.kind = kind;
            snprintf(b.text, sizeof b.text, "%s", text);
            if (!box_free_spot(x, &b, 0.8, 1.5)) continue;
            /* the same value twice close together (two pieces of one
             * level, or a loop) reads as clutter */
            int near = 0;
            for (size_t q = 0; q < x->nboxes && !near; q++)
                if (x->boxes[q].kind == kind && !strcmp(x->boxes[q].text, b.text) &&
                    hypot(x->boxes[q].cx - b.cx, x->boxes[q].cy - b.cy) < 0.3 * spacing)
                    near = 1;
            if (near) continue;
            double r = hypot(b.cx - cx_mid, b.cy - cy_mid) / half_diag;
            double score = dev / th + 0.35 * fabs(ang) + 0.5 * r * r;
            if (score < best) { best = score; bestb = b; best_s = s; }
        }
        if (!isfinite(best)) break;
        if (!box_push(x, &bestb)) return nplaced;
        placed_s[nplaced++] = best_s;
    }
    return nplaced;
}

static int marker_inside(const syc_ctx *x, const sy_chart_marker *m)
{
    return m->x_jd >= x->xmin && m->x_jd <= x->xmax && m->y >= x->ymin && m->y <= x->ymax;
}

static void place_markers(syc_ctx *x, int labels)
{
    const sy_chart *c = x->c;
    double r = 0.3 * x->fs_mark + 0.7;
    /* symbols first, so that no label covers any optimum */
    for (size_t k = 0; k < c->nmarkers && !labels; k++) {
        if (!marker_inside(x, &c->markers[k])) continue;   /* off the chart */
        sy_chart_box b = {0};
        x->cur_style = (int)k;
        b.cx = X_of(x, c->markers[k].x_jd);
        b.cy = Y_of(x, c->markers[k].y);
        b.half_w = b.half_h = r + 0.6;
        b.kind = SY_CHART_BOX_MARKER;
        snprintf(b.text, sizeof b.text, "%s", "marker");
        box_push(x, &b);
    }
    for (size_t k = 0; k < c->nmarkers && labels; k++) {
        if (!c->markers[k].label || !*c->markers[k].label || !marker_inside(x, &c->markers[k]))
            continue;
        x->cur_style = (int)k;
        double w, h;
        PangoLayout *l = syc_layout(x, c->markers[k].label, x->fs_mark, 0, 0, 0, PANGO_ALIGN_LEFT);
        syc_layout_size(l, &w, &h);
        g_object_unref(l);
        double pad = 0.3 * x->fs_mark;
        double hw = w / 2 + pad, hh = h / 2 + pad * 0.7;
        double mx = X_of(x, c->markers[k].x_jd), my = Y_of(x, c->markers[k].y);
        double off = r + 0.25 * x->fs_mark;
        /* E, W, NE, SE, NW, SW, N, S, then further out */
        static const double dir[8][2] = {{1, 0}, {-1, 0}, {1, -1}, {1, 1}, {-1, -1}, {-1, 1}, {0, -1}, {0, 1}};
        sy_chart_box best = {0};
        int found = 0;
        for (int ring = 0; ring < 4 && !found; ring++) {
            double o = off + ring * 1.2 * x->fs_mark;
            for (int d = 0; d < 8 && !found; d++) {
                sy_chart_box b = {0};
                b.cx = mx + dir[d][0] * (o + hw);
                b.cy = my + dir[d][1] * (o + hh);
                b.half_w = hw;
                b.half_h = hh;
                b.kind = SY_CHART_BOX_MARKER_LABEL;
                snprintf(b.text, sizeof b.text, "%s", c->markers[k].label);
                if (box_free_spot(x, &b, 1.0, 1.5)) { best = b; found = 1; }
            }
        }
        if (!found) {
            /* crowded: keep it inside the plot to the east or west, even
             * if it touches another marker's text */
            best.half_w = hw;
            best.half_h = hh;
            best.cx = mx + (mx + off + 2 * hw < x->px1 ? 1 : -1) * (off + hw);
            best.cy = fmin(fmax(my, x->py0 + hh + 1.5), x->py1 - hh - 1.5);
            best.kind = SY_CHART_BOX_MARKER_LABEL;
            snprintf(best.text, sizeof best.text, "%s", c->markers[k].label);
        }
        box_push(x, &best);
    }
}

static void place_boundary(syc_ctx *x)
{
    const sy_chart_boundary *bd = x->c->boundary;
    if (!bd || !bd->nlines) return;
    const char *t[2] = {bd->low_text, bd->high_text};
    double tw[2] = {0, 0}, th = 0;
    for (int s = 0; s < 2; s++)
        if (t[s]) syc_text_size(x, t[s], x->fs_label, 1, &tw[s], &th);
    if (!t[0] && !t[1]) return;
    double need = fmax(tw[0], tw[1]) + 0.8 * th;
    /* scan the longest boundary line for a straight stretch with room on
     * both sides */
    size_t li = 0;
    double best_len = -1;
    pline pls[16];
    size_t npl = bd->nlines < 16 ? bd->nlines : 16;
    for (size_t k = 0; k < npl; k++) {
        pls[k].p = pls[k].s = NULL;
        pls[k].n = 0;
        if (bd->lines[k].n < 2) continue;
        if (!pline_from_grid(x, &bd->lines[k], &pls[k])) break;
        if (pls[k].s[pls[k].n - 1] > best_len) { best_len = pls[k].s[pls[k].n - 1]; li = k; }
    }
    if (best_len > need * 1.5) {
        const pline *pl = &pls[li];
        double T = pl->s[pl->n - 1];
        double bestscore = INFINITY;
        sy_chart_box bb[2];
        for (int k = 0; k <= 200; k++) {
            double s = need / 2 + (T - need) * k / 200.0;
            double ax_, ay_, bx_, by_;
            pline_at(pl, s - need / 2, &ax_, &ay_, NULL);
            pline_at(pl, s + need / 2, &bx_, &by_, NULL);
            double chx = bx_ - ax_, chy = by_ - ay_, ch = hypot(chx, chy);
            if (ch < 0.9 * need) continue;
            double ang = atan2(chy, chx);
            if (ang > M_PI / 2) ang -= M_PI;
            if (ang <= -M_PI / 2) ang += M_PI;
            /* normal pointing down the page = towards smaller y data */
            double nx_ = -sin(ang), ny_ = cos(ang);
            if (ny_ < 0) { nx_ = -nx_; ny_ = -ny_; }
            sy_chart_box b[2];
            int ok = 1;
            for (int sd = 0; sd < 2; sd++) {
                double sign = sd == 0 ? 1 : -1;
                double off = 0.5 * th + 0.35 * th + 1.0 * x->lw;
                b[sd].cx = 0.5 * (ax_ + bx_) + sign * nx_ * off;
                b[sd].cy = 0.5 * (ay_ + by_) + sign * ny_ * off;
                b[sd].half_w = tw[sd] / 2 + 0.15 * th;
                b[sd].half_h = 0.5 * th;
                b[sd].angle_rad = ang;
                b[sd].kind = SY_CHART_BOX_BOUNDARY;
                snprintf(b[sd].text, sizeof b[sd].text, "%s", t[sd] ? t[sd] : "");
                if (t[sd] && !box_free_spot(x, &b[sd], 0.8, 1.5)) ok = 0;
            }
            if (!ok) continue;
            double score = fabs(ang) + fabs((double)k / 200.0 - 0.5);
            if (score < bestscore) { bestscore = score; bb[0] = b[0]; bb[1] = b[1]; }
        }
        if (isfinite(bestscore))
            for (int sd = 0; sd < 2; sd++)
                if (t[sd]) box_push(x, &bb[sd]);
    }
    for (size_t k = 0; k < npl; k++) { free(pls[k].p); free(pls[k].s); }
}

/* TOF line (data coordinates) clipped to the plot, as a page pline. */
static int tof_segment(syc_ctx *x, double tof, double *seg)
{
    if (x->c->yaxis == SY_CHART_Y_TOF) {
        if (tof < x->ymin || tof > x->ymax) return 0;
        seg[0] = x->px0; seg[1] = Y_of(x, tof);
        seg[2] = x->px1; seg[3] = seg[1];
        return 1;
    }
    double a = fmax(x->xmin, x->ymin - tof), b = fmin(x->xmax, x->ymax - tof);
    if (!(b > a)) return 0;
    seg[0] = X_of(x, a); seg[1] = Y_of(x, a + tof);
    seg[2] = X_of(x, b); seg[3] = Y_of(x, b + tof);
    return 1;
}

static double set_step(const sy_chart_isolines *il)
{
    double step = INFINITY;
    for (size_t k = 1; k < il->nsets; k++) {
        double d = fabs(il->sets[k].level - il->sets[k - 1].level);
        if (d > 0 && d < step) step = d;
    }
    return isfinite(step) ? step : 0;
}


/* ------------------------------------------------------------------ */
/* Highlighted paths (e.g. a launch period)                            */

/* A cased line: a white halo, a dark warm casing and a gold core.  Gold
 * (L* 78) between dark edges (L* 22) is unlike every other line on the
 * chart in colour, weight and in grayscale alike, and gold stays gold
 * for the common red-green deficiencies (it lies on the confusion lines'
 * common yellow end). */
static const syc_rgb COL_PATH_CORE = SYC_HEX(0xF2B600);
static const syc_rgb COL_PATH_CASE = SYC_HEX(0x4A3200);
#define PATH_HALO_W 5.4
#define PATH_CASE_W 3.4
#define PATH_CORE_W 1.9
#define PATH_DOT_R 0.95
#define PATH_END_R 2.1

/* Stroke the current path as a path layer line; halo = 1 adds the white
 * ground under it. */
static void path_stroke(syc_ctx *x, int halo)
{
    cairo_t *cr = x->cr;
    cairo_set_dash(cr, NULL, 0, 0);
    cairo_set_line_join(cr, CAIRO_LINE_JOIN_ROUND);
    cairo_set_line_cap(cr, CAIRO_LINE_CAP_ROUND);
    if (halo) {
        cairo_set_source_rgba(cr, 1, 1, 1, 0.85);
        cairo_set_line_width(cr, PATH_HALO_W * x->lw);
        cairo_stroke_preserve(cr);
    }
    cairo_set_source_rgb(cr, COL_PATH_CASE.r, COL_PATH_CASE.g, COL_PATH_CASE.b);
    cairo_set_line_width(cr, PATH_CASE_W * x->lw);
    cairo_stroke_preserve(cr);
    cairo_set_source_rgb(cr, COL_PATH_CORE.r, COL_PATH_CORE.g, COL_PATH_CORE.b);
    cairo_set_line_width(cr, PATH_CORE_W * x->lw);
    cairo_stroke(cr);
}

/* An end dot: gold with a dark rim. */
static void path_dot(syc_ctx *x, double cx, double cy, double r)
{
    cairo_t *cr = x->cr;
    cairo_new_path(cr);
    cairo_arc(cr, cx, cy, r, 0, 2 * M_PI);
    cairo_set_source_rgb(cr, COL_PATH_CORE.r, COL_PATH_CORE.g, COL_PATH_CORE.b);
    cairo_fill_preserve(cr);
    cairo_set_source_rgb(cr, COL_PATH_CASE.r, COL_PATH_CASE.g, COL_PATH_CASE.b);
    cairo_set_line_width(cr, 0.8 * x->lw);
    cairo_set_dash(cr, NULL, 0, 0);
    cairo_stroke(cr);
}

static int path_pt(const syc_ctx *x, const sy_chart_path *p, size_t k, double *px, double *py)
{
    if (!isfinite(p->x_jd[k]) || !isfinite(p->y[k])) return 0;
    *px = X_of(x, p->x_jd[k]);
    *py = Y_of(x, p->y[k]);
    return 1;
}

static int inside_plot(const syc_ctx *x, double px, double py, double inset)
{
    return px >= x->px0 + inset && px <= x->px1 - inset && py >= x->py0 + inset &&
           py <= x->py1 - inset;
}

/* Reserve the line itself (so that no later label sits under it), then
 * place its label: tried beside points spread from the middle of the
 * path outwards, in eight directions and growing rings, first spot that
 * is clear wins (deterministic). */
static void place_paths(syc_ctx *x, int labels)
{
    const sy_chart *c = x->c;
    double half = 0.5 * PATH_HALO_W * x->lw;
    for (size_t k = 0; k < c->npaths && !labels; k++) {
        const sy_chart_path *p = &c->paths[k];
        x->cur_style = (int)k;
        for (size_t q = 0; q + 1 < p->n; q++) {
            double ax, ay, bx, by;
            if (!path_pt(x, p, q, &ax, &ay) || !path_pt(x, p, q + 1, &bx, &by)) continue;
            sy_chart_box b = {0};
            b.cx = 0.5 * (ax + bx);
            b.cy = 0.5 * (ay + by);
            b.half_w = 0.5 * hypot(bx - ax, by - ay) + half;
            b.half_h = half;
            b.angle_rad = atan2(by - ay, bx - ax);
            if (b.angle_rad > M_PI / 2) b.angle_rad -= M_PI;
            if (b.angle_rad <= -M_PI / 2) b.angle_rad += M_PI;
            b.kind = SY_CHART_BOX_PATH;
            snprintf(b.text, sizeof b.text, "%s", p->label ? p->label : "path");
            double cn[4][2];
            box_corners(&b, cn);
            int in = 1;
            for (int t = 0; t < 4; t++) in &= inside_plot(x, cn[t][0], cn[t][1], 0);
            if (in) box_push(x, &b);
        }
    }
    for (size_t k = 0; k < c->npaths && labels; k++) {
        const sy_chart_path *p = &c->paths[k];
        if (!p->label || !*p->label) continue;
        x->cur_style = (int)k;
        /* visible points */
        size_t nv = 0;
        for (size_t q = 0; q < p->n; q++) {
            double px, py;
            if (path_pt(x, p, q, &px, &py) && inside_plot(x, px, py, 0)) nv++;
        }
        if (!nv) continue;
        double w, h;
        PangoLayout *l = syc_layout(x, p->label, x->fs_mark, 1, 0, 0, PANGO_ALIGN_LEFT);
        syc_layout_size(l, &w, &h);
        g_object_unref(l);
        double pad = 0.3 * x->fs_mark, stripe = 0.35 * x->fs_mark;
        double hw = (w + stripe) / 2 + pad, hh = h / 2 + pad * 0.7;
        double off = half + 0.3 * x->fs_mark;
        static const double frac[] = {0.5, 0.38, 0.62, 0.25, 0.75, 0.12, 0.88, 0.0, 1.0};
        static const double dir[8][2] = {{0, -1}, {0, 1}, {1, -1}, {-1, 1}, {-1, -1}, {1, 1}, {1, 0}, {-1, 0}};
        sy_chart_box best = {0};
        int found = 0;
        for (int ring = 0; ring < 5 && !found; ring++) {
            double o = off + ring * 1.1 * x->fs_mark;
            for (size_t f = 0; f < sizeof frac / sizeof frac[0] && !found; f++) {
                /* the visible point at this fraction */
                size_t want = (size_t)lround(frac[f] * (double)(nv - 1)), seen = 0;
                double mx = 0, my = 0;
                for (size_t q = 0; q < p->n; q++) {
                    double px, py;
                    if (!path_pt(x, p, q, &px, &py) || !inside_plot(x, px, py, 0)) continue;
                    if (seen++ == want) { mx = px; my = py; break; }
                }
                for (int d = 0; d < 8 && !found; d++) {
                    sy_chart_box b = {0};
                    b.cx = mx + dir[d][0] * (o + hw);
                    b.cy = my + dir[d][1] * (o + hh);
                    b.half_w = hw;
                    b.half_h = hh;
                    b.kind = SY_CHART_BOX_PATH_LABEL;
                    snprintf(b.text, sizeof b.text, "%s", p->label);
                    if (box_free_spot(x, &b, 1.0, 1.5)) { best = b; found = 1; }
                }
            }
        }
        if (!found) {
            /* crowded: the top left corner of the plot, still inside */
            best.half_w = hw;
            best.half_h = hh;
            best.cx = x->px0 + 1.5 + hw;
            best.cy = x->py0 + 1.5 + hh;
            best.kind = SY_CHART_BOX_PATH_LABEL;
            snprintf(best.text, sizeof best.text, "%s", p->label);
        }
        box_push(x, &best);
    }
}

static void draw_paths(syc_ctx *x)
{
    const sy_chart *c = x->c;
    cairo_t *cr = x->cr;
    cairo_save(cr);
    cairo_rectangle(cr, x->px0, x->py0, x->px1 - x->px0, x->py1 - x->py0);
    cairo_clip(cr);
    for (size_t k = 0; k < c->npaths; k++) {
        const sy_chart_path *p = &c->paths[k];
        cairo_new_path(cr);
        int pen = 0;
        double sum = 0;
        size_t nseg = 0;
        for (size_t q = 0; q < p->n; q++) {
            double px, py;
            if (!path_pt(x, p, q, &px, &py)) { pen = 0; continue; }
            if (pen) {
                double cx0, cy0;
                cairo_get_current_point(cr, &cx0, &cy0);
                sum += hypot(px - cx0, py - cy0);
                nseg++;
                cairo_line_to(cr, px, py);
            } else {
                cairo_move_to(cr, px, py);
                /* a lone point still shows as a round dab */
                cairo_line_to(cr, px, py);
            }
            pen = 1;
        }
        path_stroke(x, 1);
        /* dots at the points when they are far enough apart to read as
         * separate days; always at the two ends */
        double dr = PATH_DOT_R * x->lw;
        if (nseg && sum / (double)nseg >= 4.5 * dr) {
            cairo_set_source_rgb(cr, COL_PATH_CASE.r, COL_PATH_CASE.g, COL_PATH_CASE.b);
            for (size_t q = 0; q < p->n; q++) {
                double px, py;
                if (!path_pt(x, p, q, &px, &py)) continue;
                cairo_new_sub_path(cr);
                cairo_arc(cr, px, py, dr, 0, 2 * M_PI);
            }
            cairo_fill(cr);
        }
        size_t first = p->n, last = p->n;
        for (size_t q = 0; q < p->n; q++)
            if (isfinite(p->x_jd[q]) && isfinite(p->y[q])) { if (first == p->n) first = q; last = q; }
        if (first < p->n) {
            double px, py;
            path_pt(x, p, first, &px, &py);
            path_dot(x, px, py, PATH_END_R * x->lw);
            if (last != first) {
                path_pt(x, p, last, &px, &py);
                path_dot(x, px, py, PATH_END_R * x->lw);
            }
        }
    }
    cairo_restore(cr);
}

static void draw_path_labels(syc_ctx *x)
{
    cairo_t *cr = x->cr;
    for (size_t k = 0; k < x->nboxes; k++) {
        const sy_chart_box *b = &x->boxes[k];
        if (b->kind != SY_CHART_BOX_PATH_LABEL) continue;
        const sy_chart_path *p = &x->c->paths[x->styles[k]];
        double stripe = 0.35 * x->fs_mark;
        double l0 = b->cx - b->half_w, t0 = b->cy - b->half_h;
        cairo_save(cr);
        cairo_set_dash(cr, NULL, 0, 0);
        cairo_rectangle(cr, l0, t0, 2 * b->half_w, 2 * b->half_h);
        cairo_set_source_rgba(cr, 1, 1, 1, 0.92);
        cairo_fill_preserve(cr);
        cairo_set_source_rgb(cr, COL_PATH_CASE.r, COL_PATH_CASE.g, COL_PATH_CASE.b);
        cairo_set_line_width(cr, 0.5 * x->lw);
        cairo_stroke(cr);
        /* the gold stripe ties the text to its line */
        cairo_rectangle(cr, l0, t0, stripe, 2 * b->half_h);
        cairo_set_source_rgb(cr, COL_PATH_CORE.r, COL_PATH_CORE.g, COL_PATH_CORE.b);
        cairo_fill(cr);
        cairo_restore(cr);
        PangoLayout *l = syc_layout(x, p->label, x->fs_mark, 1, 0, 0, PANGO_ALIGN_LEFT);
        syc_draw_layout(x, l, b->cx + stripe / 2, b->cy, 0.5, 0.5, 0, SYC_COL_TEXT);
        g_object_unref(l);
    }
}

static void place_all(syc_ctx *x)
{
    const sy_chart *c = x->c;
    x->nboxes = 0;
    /* marker symbols, then the paths' lines, then the texts, so that no
     * text covers an optimum or a path */
    place_markers(x, 0);   /* style slot = marker index */
    place_paths(x, 0);     /* style slot = path index */
    place_markers(x, 1);
    place_paths(x, 1);
    x->cur_style = 4;
    place_boundary(x);
    double th;
    syc_text_size(x, "0123456789", x->fs_label, 0, NULL, &th);
    double spacing = 0.55 * ((x->px1 - x->px0) + (x->py1 - x->py0));
    for (int role = 0; role < 3; role++) {
        for (size_t k = 0; k < c->nisolines; k++) {
            const sy_chart_isolines *il = &c->isolines[k];
            if ((int)il->role != role || il->label_every < 0) continue;
            x->cur_style = role;
            int every = il->label_every > 1 ? il->label_every : 1;
            double step = set_step(il);
            for (size_t s = 0; s < il->nsets; s += (size_t)every) {
                char txt[32];
                double tw;
                sy_chart_format_level(il->sets[s].level, step, txt, sizeof txt);
                syc_text_size(x, txt, x->fs_label, 0, &tw, NULL);
                for (size_t q = 0; q < il->sets[s].nlines; q++) {
                    pline pl;
                    if (il->sets[s].lines[q].n < 2) continue;
                    if (!pline_from_grid(x, &il->sets[s].lines[q], &pl)) return;
                    place_on_line(x, &pl, tw, th, SY_CHART_BOX_LEVEL, txt, 3, spacing);
                    free(pl.p);
                    free(pl.s);
                }
            }
        }
    }
    x->cur_style = 3;
    if (c->tof) {
        for (size_t k = 0; k < c->tof->n; k++) {
            double seg[4], s2[2];
            if (!tof_segment(x, c->tof->tof_days[k], seg)) continue;
            pline pl = {seg, 2, s2};
            s2[0] = 0;
            s2[1] = hypot(seg[2] - seg[0], seg[3] - seg[1]);
            char txt[40], num[32];
            sy_chart_format_level(c->tof->tof_days[k], 0.1, num, sizeof num);
            snprintf(txt, sizeof txt, "%s d", num);
            double tw;
            syc_text_size(x, txt, x->fs_label, 0, &tw, NULL);
            place_on_line(x, &pl, tw, th, SY_CHART_BOX_TOF, txt, 1, spacing);
        }
    }
}

/* ------------------------------------------------------------------ */
/* Drawing                                                             */

static void path_polyline(syc_ctx *x, const sy_polyline *pl)
{
    if (pl->n < 2) return;
    cairo_move_to(x->cr, Xi(x, pl->xy[0]), Yj(x, pl->xy[1]));
    for (size_t k = 1; k < pl->n; k++)
        cairo_line_to(x->cr, Xi(x, pl->xy[2 * k]), Yj(x, pl->xy[2 * k + 1]));
    if (pl->closed) cairo_close_path(x->cr);
}

/* The region where the bilinear interpolant of the 0/1 mask is >= 1/2,
 * built cell by cell as in marching squares (boundary through the edge
 * midpoints; a saddle cell keeps its two masked corners connected).
 * Fully masked cells are merged into row runs.  Everything goes into one
 * path filled with the non-zero rule, so abutting pieces leave no seams. */
static void path_mask(syc_ctx *x, const unsigned char *mask)
{
    const sy_chart *c = x->c;
    size_t nx = c->nx;
    for (size_t j = 0; j + 1 < c->ny; j++) {
        size_t run0 = 0;
        int in_run = 0;
        for (size_t i = 0; i + 1 <= nx; i++) {
            int full = 0, any = 0, in[4] = {0, 0, 0, 0};
            if (i + 1 < nx) {
                in[0] = mask[j * nx + i] != 0;
                in[1] = mask[j * nx + i + 1] != 0;
                in[2] = mask[(j + 1) * nx + i + 1] != 0;
                in[3] = mask[(j + 1) * nx + i] != 0;
                full = in[0] && in[1] && in[2] && in[3];
                any = in[0] || in[1] || in[2] || in[3];
            }
            if (full) {
                if (!in_run) { run0 = i; in_run = 1; }
                continue;
            }
            if (in_run) {
                double xa = Xi(x, (double)run0), xb = Xi(x, (double)i);
                double ya = Yj(x, (double)j), yb = Yj(x, (double)j + 1);
                cairo_rectangle(x->cr, xa, yb, xb - xa, ya - yb);
                in_run = 0;
            }
            if (!any) continue;
            static const double cxy[4][2] = {{0, 0}, {1, 0}, {1, 1}, {0, 1}};
            int first = 1;
            for (int k = 0; k < 4; k++) {
                int k1 = (k + 1) & 3;
                if (in[k]) {
                    double px = Xi(x, (double)i + cxy[k][0]), py = Yj(x, (double)j + cxy[k][1]);
                    if (first) cairo_move_to(x->cr, px, py); else cairo_line_to(x->cr, px, py);
                    first = 0;
                }
                if (in[k] != in[k1]) {
                    double px = Xi(x, (double)i + 0.5 * (cxy[k][0] + cxy[k1][0]));
                    double py = Yj(x, (double)j + 0.5 * (cxy[k][1] + cxy[k1][1]));
                    if (first) cairo_move_to(x->cr, px, py); else cairo_line_to(x->cr, px, py);
                    first = 0;
                }
            }
            cairo_close_path(x->cr);
        }
    }
}

static syc_rgb ramp(double t)
{
    if (t <= 0) return RAMP[0];
    if (t >= 1) return RAMP[6];
    double f = t * 6.0;
    int k = (int)f;
    if (k > 5) k = 5;
    f -= k;
    syc_rgb o = {RAMP[k].r + f * (RAMP[k + 1].r - RAMP[k].r),
             RAMP[k].g + f * (RAMP[k + 1].g - RAMP[k].g),
             RAMP[k].b + f * (RAMP[k + 1].b - RAMP[k].b)};
    return o;
}

static syc_rgb band_colour(const sy_chart_fill *f, size_t band)
{
    return ramp((double)band / (double)f->nlevels);   /* nlevels+1 bands */
}

static size_t band_of(const sy_chart_fill *f, double z)
{
    size_t lo = 0, hi = f->nlevels;      /* band = number of levels <= z */
    while (lo < hi) {
        size_t mid = (lo + hi) / 2;
        if (f->levels[mid] <= z) lo = mid + 1; else hi = mid;
    }
    return lo;
}

static int draw_fill(syc_ctx *x, double px_per_pt)
{
    const sy_chart *c = x->c;
    const sy_chart_fill *f = c->fill;
    if (!f || !f->z || f->nlevels < 2) return 1;
    double pw = x->px1 - x->px0, ph = x->py1 - x->py0;
    int rw = (int)ceil(pw * px_per_pt), rh = (int)ceil(ph * px_per_pt);
    if (rw < 2) rw = 2;
    if (rh < 2) rh = 2;
    cairo_surface_t *img = cairo_image_surface_create(CAIRO_FORMAT_ARGB32, rw, rh);
    if (cairo_surface_status(img) != CAIRO_STATUS_SUCCESS) {
        cairo_surface_destroy(img);
        return 0;
    }
    cairo_surface_flush(img);
    unsigned char *data = cairo_image_surface_get_data(img);
    int stride = cairo_image_surface_get_stride(img);
    size_t nx = c->nx, ny = c->ny;
    uint32_t lut[64];
    size_t nb = f->nlevels + 1 < 64 ? f->nlevels + 1 : 64;
    for (size_t b = 0; b < nb; b++) {
        syc_rgb q = band_colour(f, b);
        lut[b] = 0xff000000u | (uint32_t)lround(q.r * 255) << 16 |
                 (uint32_t)lround(q.g * 255) << 8 | (uint32_t)lround(q.b * 255);
    }
    for (int py = 0; py < rh; py++) {
        uint32_t *row = (uint32_t *)(void *)(data + (size_t)py * stride);
        /* pixel centre -> grid index (bilinear interpolation within the
         * cell; cells touching an invalid node stay transparent, as in
         * sy_contour_trace) */
        double yd = x->ymax - (py + 0.5) / rh * (x->ymax - x->ymin);
        double fj = (yd - c->y0) / c->dy;
        for (int pxl = 0; pxl < rw; pxl++) {
            double xd = x->xmin + (pxl + 0.5) / rw * (x->xmax - x->xmin);
            double fi = (xd - c->x0_jd) / c->dx_days;
            size_t i = (size_t)fmin(fmax(floor(fi), 0), (double)nx - 2);
            size_t j = (size_t)fmin(fmax(floor(fj), 0), (double)ny - 2);
            double u = fi - (double)i, v = fj - (double)j;
            size_t k00 = j * nx + i, k10 = k00 + 1, k01 = k00 + nx, k11 = k01 + 1;
            const size_t kk[4] = {k00, k10, k01, k11};
            const double wt[4] = {(1 - u) * (1 - v), u * (1 - v), (1 - u) * v, u * v};
            /* a point is invalid where the bilinear weight of invalid
             * corners reaches 1/2 - the same boundary the "no solution"
             * shading uses; elsewhere z is the weighted mean of the
             * valid corners */
            double zs = 0, ws = 0, wbad = 0;
            for (int q = 0; q < 4; q++) {
                float zq = f->z[kk[q]];
                if (!isfinite(zq) || (f->invalid && f->invalid[kk[q]])) wbad += wt[q];
                else { zs += wt[q] * zq; ws += wt[q]; }
            }
            if (wbad >= 0.5 || ws <= 0) { row[pxl] = 0; continue; }
            double z = zs / ws;
            size_t b = band_of(f, z);
            row[pxl] = lut[b < nb ? b : nb - 1];
        }
    }
    cairo_surface_mark_dirty(img);
    cairo_save(x->cr);
    cairo_rectangle(x->cr, x->px0, x->py0, pw, ph);
    cairo_clip(x->cr);
    cairo_translate(x->cr, x->px0, x->py0);
    cairo_scale(x->cr, pw / rw, ph / rh);
    cairo_set_source_surface(x->cr, img, 0, 0);
    cairo_pattern_set_filter(cairo_get_source(x->cr), CAIRO_FILTER_NEAREST);
    cairo_paint(x->cr);
    cairo_restore(x->cr);
    cairo_surface_destroy(img);
    return 1;
}

static void hatch(syc_ctx *x, int idx, double x0, double y0, double x1, double y1, double sp)
{
    static const double angles[4] = {45, -45, 0, 90};
    double a = angles[idx & 3] * M_PI / 180.0;
    double ux = cos(a), uy = -sin(a), nx_ = -uy, ny_ = ux;
    double cx = 0.5 * (x0 + x1), cy = 0.5 * (y0 + y1), R = hypot(x1 - x0, y1 - y0) / 2 + sp;
    for (double o = -R; o <= R; o += sp) {
        cairo_move_to(x->cr, cx + nx_ * o - ux * R, cy + ny_ * o - uy * R);
        cairo_line_to(x->cr, cx + nx_ * o + ux * R, cy + ny_ * o + uy * R);
    }
}

static void draw_regions(syc_ctx *x)
{
    const sy_chart *c = x->c;
    cairo_t *cr = x->cr;
    for (size_t k = 0; k < c->nregions && k < 4; k++) {
        if (!c->regions[k].mask) continue;
        syc_rgb h = COL_HATCH[k];
        cairo_save(cr);
        path_mask(x, c->regions[k].mask);
        cairo_clip(cr);
        cairo_set_source_rgba(cr, h.r, h.g, h.b, 0.05);
        cairo_paint(cr);
        /* light and open, so that two or three overlapping constraint
         * regions still leave the iso-lines readable */
        hatch(x, (int)k, x->px0, x->py0, x->px1, x->py1, 0.9 * x->fs_label);
        cairo_set_source_rgba(cr, h.r, h.g, h.b, 0.30);
        cairo_set_line_width(cr, 0.40 * x->lw);
        cairo_stroke(cr);
        cairo_restore(cr);
    }
    if (c->nosol_mask) {
        cairo_save(cr);
        path_mask(x, c->nosol_mask);
        cairo_set_source_rgb(cr, COL_NOSOL.r, COL_NOSOL.g, COL_NOSOL.b);
        cairo_fill(cr);
        cairo_restore(cr);
    }
}

static void clip_labels(syc_ctx *x)
{
    /* plot rectangle minus every label box (boxes do not overlap, so the
     * even-odd rule cuts each one out exactly once) */
    cairo_t *cr = x->cr;
    cairo_new_path(cr);
    cairo_rectangle(cr, x->px0, x->py0, x->px1 - x->px0, x->py1 - x->py0);
    for (size_t k = 0; k < x->nboxes; k++) {
        const sy_chart_box *b = &x->boxes[k];
        if (b->kind == SY_CHART_BOX_MARKER || b->kind == SY_CHART_BOX_PATH) continue;
        double cn[4][2];
        box_corners(b, cn);
        cairo_move_to(cr, cn[0][0], cn[0][1]);
        for (int q = 1; q < 4; q++) cairo_line_to(cr, cn[q][0], cn[q][1]);
        cairo_close_path(cr);
    }
    cairo_set_fill_rule(cr, CAIRO_FILL_RULE_EVEN_ODD);
    cairo_clip(cr);
    cairo_set_fill_rule(cr, CAIRO_FILL_RULE_WINDING);
}

static void draw_lines(syc_ctx *x)
{
    const sy_chart *c = x->c;
    cairo_t *cr = x->cr;
    cairo_save(cr);
    clip_labels(x);
    if (c->tof) {
        for (size_t k = 0; k < c->tof->n; k++) {
            double seg[4];
            if (!tof_segment(x, c->tof->tof_days[k], seg)) continue;
            cairo_move_to(cr, seg[0], seg[1]);
            cairo_line_to(cr, seg[2], seg[3]);
        }
        syc_line_style(x, 3, 1.0);
        cairo_stroke(cr);
    }
    /* tertiary under secondary under primary */
    for (int role = 2; role >= 0; role--) {
        for (size_t k = 0; k < c->nisolines; k++) {
            const sy_chart_isolines *il = &c->isolines[k];
            if ((int)il->role != role) continue;
            for (size_t s = 0; s < il->nsets; s++)
                for (size_t q = 0; q < il->sets[s].nlines; q++)
                    path_polyline(x, &il->sets[s].lines[q]);
        }
        syc_line_style(x, role, 1.0);
        cairo_stroke(cr);
    }
    if (c->boundary) {
        for (size_t k = 0; k < c->boundary->nlines; k++) path_polyline(x, &c->boundary->lines[k]);
        syc_line_style(x, 4, 1.0);
        cairo_stroke(cr);
    }
    cairo_restore(cr);
}

void syc_symbol(syc_ctx *x, sy_chart_symbol sym, double cx, double cy, double r,
                syc_rgb fill)
{
    cairo_t *cr = x->cr;
    cairo_new_path(cr);
    switch (sym) {
    case SY_CHART_MARK_SQUARE:
        cairo_rectangle(cr, cx - 0.85 * r, cy - 0.85 * r, 1.7 * r, 1.7 * r);
        break;
    case SY_CHART_MARK_DIAMOND:
        cairo_move_to(cr, cx, cy - 1.15 * r);
        cairo_line_to(cr, cx + 1.15 * r, cy);
        cairo_line_to(cr, cx, cy + 1.15 * r);
        cairo_line_to(cr, cx - 1.15 * r, cy);
        cairo_close_path(cr);
        break;
    case SY_CHART_MARK_TRIANGLE:
        cairo_move_to(cr, cx, cy - 1.15 * r);
        cairo_line_to(cr, cx + r, cy + 0.65 * r);
        cairo_line_to(cr, cx - r, cy + 0.65 * r);
        cairo_close_path(cr);
        break;
    case SY_CHART_MARK_STAR:
        for (int k = 0; k < 10; k++) {
            double a = -M_PI / 2 + k * M_PI / 5, rr = k % 2 ? 0.45 * r : 1.2 * r;
            if (k == 0) cairo_move_to(cr, cx + rr * cos(a), cy + rr * sin(a));
            else cairo_line_to(cr, cx + rr * cos(a), cy + rr * sin(a));
        }
        cairo_close_path(cr);
        break;
    default:
        cairo_arc(cr, cx, cy, r, 0, 2 * M_PI);
        cairo_close_path(cr);
    }
    cairo_set_dash(cr, NULL, 0, 0);
    cairo_set_line_join(cr, CAIRO_LINE_JOIN_MITER);
    cairo_set_source_rgb(cr, 1, 1, 1);
    cairo_set_line_width(cr, 1.6 * x->lw);
    cairo_stroke_preserve(cr);
    cairo_set_source_rgb(cr, fill.r, fill.g, fill.b);
    cairo_fill_preserve(cr);
    /* a dark rim keeps light fills apart from a light ground */
    cairo_set_source_rgb(cr, 0.6 * fill.r, 0.6 * fill.g, 0.6 * fill.b);
    cairo_set_line_width(cr, 0.5 * x->lw);
    cairo_stroke(cr);
}

static const syc_rgb COL_MARK = SYC_HEX(0x0D0D0D);

static void draw_symbol(syc_ctx *x, sy_chart_symbol sym, double cx, double cy, double r)
{
    syc_symbol(x, sym, cx, cy, r, COL_MARK);
}

static void draw_labels(syc_ctx *x)
{
    /* iso-line, TOF and boundary labels, each in its line's colour */
    for (size_t k = 0; k < x->nboxes; k++) {
        const sy_chart_box *b = &x->boxes[k];
        if (b->kind == SY_CHART_BOX_MARKER || b->kind == SY_CHART_BOX_MARKER_LABEL ||
            b->kind == SY_CHART_BOX_PATH || b->kind == SY_CHART_BOX_PATH_LABEL)
            continue;
        int bold = b->kind == SY_CHART_BOX_BOUNDARY;
        if (x->c->fill && x->c->fill->nlevels >= 2) {
            /* over colour bands the text needs a light ground */
            double cn[4][2];
            box_corners(b, cn);
            cairo_move_to(x->cr, cn[0][0], cn[0][1]);
            for (int q = 1; q < 4; q++) cairo_line_to(x->cr, cn[q][0], cn[q][1]);
            cairo_close_path(x->cr);
            cairo_set_source_rgba(x->cr, 1, 1, 1, 0.6);
            cairo_fill(x->cr);
        }
        syc_rgb col = b->kind == SY_CHART_BOX_TOF ? (syc_rgb)SYC_HEX(0x5C5C5C) : style_colour(x->styles[k]);
        syc_draw_text(x, b->text, x->fs_label, bold, b->cx, b->cy, 0.5, 0.5, b->angle_rad, col);
    }
}

static void draw_marker_layer(syc_ctx *x)
{
    const sy_chart *c = x->c;
    cairo_t *cr = x->cr;
    double r = 0.3 * x->fs_mark + 0.7;
    for (size_t k = 0; k < c->nmarkers; k++)
        if (marker_inside(x, &c->markers[k]))
            draw_symbol(x, c->markers[k].symbol, X_of(x, c->markers[k].x_jd),
                        Y_of(x, c->markers[k].y), r);
    for (size_t k = 0; k < x->nboxes; k++) {
        const sy_chart_box *b = &x->boxes[k];
        if (b->kind != SY_CHART_BOX_MARKER_LABEL) continue;
        const sy_chart_marker *m = &c->markers[x->styles[k]];  /* marker index */
        cairo_save(cr);
        cairo_rectangle(cr, b->cx - b->half_w, b->cy - b->half_h, 2 * b->half_w, 2 * b->half_h);
        cairo_set_source_rgba(cr, 1, 1, 1, 0.88);
        cairo_fill_preserve(cr);
        cairo_set_source_rgb(cr, 0.55, 0.55, 0.55);
        cairo_set_line_width(cr, 0.4 * x->lw);
        cairo_set_dash(cr, NULL, 0, 0);
        cairo_stroke(cr);
        cairo_restore(cr);
        PangoLayout *l = syc_layout(x, m->label, x->fs_mark, 0, 0, 0, PANGO_ALIGN_LEFT);
        syc_draw_layout(x, l, b->cx, b->cy, 0.5, 0.5, 0, SYC_COL_TEXT);
        g_object_unref(l);
    }
}

static void draw_axes(syc_ctx *x)
{
    double px[SYC_MAX_TICKS], py[SYC_MAX_TICKS];
    for (int k = 0; k < x->xt.n; k++) px[k] = X_of(x, x->xt.v[k]);
    for (int k = 0; k < x->yt.n; k++) py[k] = Y_of(x, x->yt.v[k]);
    syc_draw_grid(x->cr, x->lw, px, x->xt.n, py, x->yt.n, x->px0, x->py0, x->px1, x->py1);
}

void syc_draw_grid(cairo_t *cr, double lw, const double *px, int npx,
                   const double *py, int npy, double x0, double y0, double x1,
                   double y1)
{
    cairo_save(cr);
    cairo_set_source_rgb(cr, SYC_COL_GRID.r, SYC_COL_GRID.g, SYC_COL_GRID.b);
    cairo_set_line_width(cr, 0.4 * lw);
    cairo_set_dash(cr, NULL, 0, 0);
    for (int k = 0; k < npx; k++) {
        cairo_move_to(cr, px[k], y0);
        cairo_line_to(cr, px[k], y1);
    }
    for (int k = 0; k < npy; k++) {
        cairo_move_to(cr, x0, py[k]);
        cairo_line_to(cr, x1, py[k]);
    }
    cairo_stroke(cr);
    cairo_restore(cr);
}

static void draw_frame_and_ticks(syc_ctx *x)
{
    const sy_chart *c = x->c;
    cairo_t *cr = x->cr;
    double base = x->fs_axis, tl = 0.35 * base;
    cairo_save(cr);
    cairo_set_dash(cr, NULL, 0, 0);
    cairo_set_source_rgb(cr, SYC_COL_FRAME.r, SYC_COL_FRAME.g, SYC_COL_FRAME.b);
    cairo_set_line_width(cr, 0.7 * x->lw);
    cairo_rectangle(cr, x->px0, x->py0, x->px1 - x->px0, x->py1 - x->py0);
    cairo_stroke(cr);
    cairo_set_line_width(cr, 0.55 * x->lw);
    for (int k = 0; k < x->xt.n; k++) {
        double px = X_of(x, x->xt.v[k]);
        cairo_move_to(cr, px, x->py1);
        cairo_line_to(cr, px, x->py1 + tl);
    }
    for (int k = 0; k < x->yt.n; k++) {
        double py = Y_of(x, x->yt.v[k]);
        cairo_move_to(cr, x->px0, py);
        cairo_line_to(cr, x->px0 - tl, py);
    }
    cairo_stroke(cr);
    cairo_restore(cr);
    for (int k = 0; k < x->xt.n; k++) {
        double px = X_of(x, x->xt.v[k]), w;
        PangoLayout *l = syc_layout(x, x->xt.lab[k], x->fs_tick, 0, 0, 0, PANGO_ALIGN_CENTER);
        syc_layout_size(l, &w, NULL);
        /* keep end labels on the page */
        if (px + w / 2 > x->W - 0.5 * x->m) px = x->W - 0.5 * x->m - w / 2;
        syc_draw_layout(x, l, px, x->xtick_top, 0.5, 0, 0, SYC_COL_TEXT);
        g_object_unref(l);
    }
    for (int k = 0; k < x->yt.n; k++) {
        double py = Y_of(x, x->yt.v[k]);
        syc_draw_text(x, x->yt.lab[k], x->fs_tick, 0, x->px0 - tl - 0.2 * base, py, 1, 0.5, 0, SYC_COL_TEXT);
    }
    if (c->xtitle)
        syc_draw_text(x, c->xtitle, x->fs_axis, 0, 0.5 * (x->px0 + x->px1), x->xtitle_y, 0.5, 0, 0, SYC_COL_TEXT);
    if (c->ytitle)
        syc_draw_text(x, c->ytitle, x->fs_axis, 0, x->ytitle_x, 0.5 * (x->py0 + x->py1), 0.5, 0,
                  -M_PI / 2, SYC_COL_TEXT);
}

static void draw_colour_bar(syc_ctx *x)
{
    const sy_chart_fill *f = x->c->fill;
    if (!f || f->nlevels < 2) return;
    cairo_t *cr = x->cr;
    double base = x->fs_axis, tl = 0.35 * base;
    double bx = x->cbar_x, bw = x->cbar_w;
    double ext = 1.2 * bw;                       /* open-ended triangles */
    double top = x->py0 + ext, bot = x->py1 - ext;
    size_t nl = f->nlevels;
    double seg = (bot - top) / (double)(nl - 1);
    cairo_save(cr);
    cairo_set_dash(cr, NULL, 0, 0);
    for (size_t b = 1; b < nl; b++) {
        syc_rgb q = band_colour(f, b);
        double y1 = bot - (double)(b - 1) * seg, y0 = bot - (double)b * seg;
        cairo_rectangle(cr, bx, y0, bw, y1 - y0 + 0.01);
        cairo_set_source_rgb(cr, q.r, q.g, q.b);
        cairo_fill(cr);
    }
    syc_rgb lo = band_colour(f, 0), hi = band_colour(f, nl);
    cairo_move_to(cr, bx, bot);
    cairo_line_to(cr, bx + bw, bot);
    cairo_line_to(cr, bx + bw / 2, bot + ext);
    cairo_close_path(cr);
    cairo_set_source_rgb(cr, lo.r, lo.g, lo.b);
    cairo_fill(cr);
    cairo_move_to(cr, bx, top);
    cairo_line_to(cr, bx + bw, top);
    cairo_line_to(cr, bx + bw / 2, top - ext);
    cairo_close_path(cr);
    cairo_set_source_rgb(cr, hi.r, hi.g, hi.b);
    cairo_fill(cr);
    /* outline */
    cairo_move_to(cr, bx, bot);
    cairo_line_to(cr, bx + bw / 2, bot + ext);
    cairo_line_to(cr, bx + bw, bot);
    cairo_line_to(cr, bx + bw, top);
    cairo_line_to(cr, bx + bw / 2, top - ext);
    cairo_line_to(cr, bx, top);
    cairo_close_path(cr);
    cairo_set_source_rgb(cr, SYC_COL_FRAME.r, SYC_COL_FRAME.g, SYC_COL_FRAME.b);
    cairo_set_line_width(cr, 0.5 * x->lw);
    cairo_stroke(cr);
    cairo_restore(cr);
    /* tick labels, thinned when crowded */
    double lh;
    syc_text_size(x, "0", x->fs_tick, 0, NULL, &lh);
    size_t every = 1;
    while (seg * (double)every < 1.15 * lh) every++;
    double step = (f->levels[nl - 1] - f->levels[0]) / (double)(nl - 1);
    for (size_t k = 0; k < nl; k += every) {
        char b[32];
        sy_chart_format_level(f->levels[k], step, b, sizeof b);
        double py = bot - (double)k * seg;
        cairo_move_to(cr, bx + bw, py);
        cairo_line_to(cr, bx + bw + tl, py);
        cairo_set_source_rgb(cr, SYC_COL_FRAME.r, SYC_COL_FRAME.g, SYC_COL_FRAME.b);
        cairo_set_line_width(cr, 0.5 * x->lw);
        cairo_stroke(cr);
        syc_draw_text(x, b, x->fs_tick, 0, bx + bw + tl + 0.2 * base, py, 0, 0.5, 0, SYC_COL_TEXT);
    }
    if (f->title)
        syc_draw_text(x, f->title, x->fs_axis, 0, x->W - x->m, 0.5 * (x->py0 + x->py1), 0.5, 0,
                  M_PI / 2, SYC_COL_TEXT);
}

void syc_draw_legend(syc_ctx *x)
{
    if (!x->nleg) return;
    cairo_t *cr = x->cr;
    double fs = x->fs_leg, sw = 2.4 * fs, gap = 0.45 * fs;
    double th;
    syc_text_size(x, "Ag", fs, 0, NULL, &th);
    cairo_save(cr);
    cairo_rectangle(cr, x->leg_x, x->leg_y, x->leg_w, x->leg_h);
    cairo_set_source_rgb(cr, 0.985, 0.985, 0.985);
    cairo_fill_preserve(cr);
    cairo_set_source_rgb(cr, 0.72, 0.72, 0.72);
    cairo_set_line_width(cr, 0.4 * x->lw);
    cairo_stroke(cr);
    cairo_restore(cr);
    for (int k = 0; k < x->nleg; k++) {
        const syc_leg_entry *e = &x->leg[k];
        double ex = x->leg_x + e->x, ey = x->leg_y + e->y, cy = ey + th / 2;
        cairo_save(cr);
        switch (e->kind) {
        case SYC_LEG_LINE:
            cairo_move_to(cr, ex, cy);
            cairo_line_to(cr, ex + sw, cy);
            syc_line_style(x, e->style, 1.0);
            cairo_stroke(cr);
            break;
        case SYC_LEG_REGION: {
            syc_rgb h = COL_HATCH[e->style & 3];
            double s = 0.75 * th;
            cairo_rectangle(cr, ex + sw / 2 - s, cy - s / 2, 2 * s, s);
            cairo_clip_preserve(cr);
            cairo_set_source_rgba(cr, h.r, h.g, h.b, 0.07);
            cairo_fill_preserve(cr);
            cairo_new_path(cr);
            hatch(x, e->style, ex + sw / 2 - s, cy - s / 2, ex + sw / 2 + s, cy + s / 2, 0.55 * x->fs_label);
            cairo_set_source_rgba(cr, h.r, h.g, h.b, 0.45);
            cairo_set_line_width(cr, 0.45 * x->lw);
            cairo_stroke(cr);
            cairo_reset_clip(cr);
            cairo_rectangle(cr, ex + sw / 2 - s, cy - s / 2, 2 * s, s);
            cairo_set_source_rgba(cr, h.r, h.g, h.b, 0.6);
            cairo_set_line_width(cr, 0.4 * x->lw);
            cairo_stroke(cr);
            break;
        }
        case SYC_LEG_NOSOL: {
            double s = 0.75 * th;
            cairo_rectangle(cr, ex + sw / 2 - s, cy - s / 2, 2 * s, s);
            cairo_set_source_rgb(cr, COL_NOSOL.r, COL_NOSOL.g, COL_NOSOL.b);
            cairo_fill(cr);
            break;
        }
        case SYC_LEG_MARKER:
            draw_symbol(x, (sy_chart_symbol)e->style, ex + sw / 2, cy, 0.3 * x->fs_mark + 0.7);
            break;
        case SYC_LEG_PATH:
            cairo_move_to(cr, ex + 0.1 * sw, cy);
            cairo_line_to(cr, ex + 0.9 * sw, cy);
            path_stroke(x, 0);
            path_dot(x, ex + sw / 2, cy, PATH_END_R * x->lw);
            break;
        case SYC_LEG_SERIES: {
            int role = (e->style >> 4) % 3, sym = (e->style >> 1) & 7, conn = e->style & 1;
            if (conn) {
                cairo_move_to(cr, ex, cy);
                cairo_line_to(cr, ex + sw, cy);
                syc_line_style(x, role, SYC_XY_LINE_SCALE);
                cairo_stroke(cr);
            }
            syc_symbol(x, (sy_chart_symbol)sym, ex + sw / 2, cy, SYC_XY_MARK_R(x), SYC_COL_ROLE[role]);
            break;
        }
        }
        cairo_restore(cr);
        syc_draw_text(x, e->text, fs, 0, ex + sw + gap, ey, 0, 0, 0, SYC_COL_TEXT);
    }
}

void syc_draw_head_foot(syc_ctx *x, const char *title, const char *subtitle,
                        const char *const *footer, size_t nfooter)
{
    double full_w = x->W - 2 * x->m;
    if (title && *title) {
        PangoLayout *l = syc_layout(x, title, x->fs_title, 1, 0, full_w, PANGO_ALIGN_LEFT);
        syc_draw_layout(x, l, x->m, x->title_y, 0, 0, 0, SYC_COL_TEXT);
        g_object_unref(l);
    }
    if (subtitle && *subtitle) {
        PangoLayout *l = syc_layout(x, subtitle, x->fs_sub, 0, 0, full_w, PANGO_ALIGN_LEFT);
        syc_draw_layout(x, l, x->m, x->sub_y, 0, 0, 0, SYC_COL_FOOT);
        g_object_unref(l);
    }
    double y = x->foot_y;
    if (nfooter) {
        cairo_save(x->cr);
        cairo_move_to(x->cr, x->m, y - 0.25 * x->fs_axis);
        cairo_line_to(x->cr, x->W - x->m, y - 0.25 * x->fs_axis);
        cairo_set_source_rgb(x->cr, 0.75, 0.75, 0.75);
        cairo_set_line_width(x->cr, 0.4 * x->lw);
        cairo_set_dash(x->cr, NULL, 0, 0);
        cairo_stroke(x->cr);
        cairo_restore(x->cr);
    }
    for (size_t k = 0; k < nfooter; k++) {
        double h;
        PangoLayout *l = syc_layout(x, footer[k], x->fs_foot, 0, 0, full_w, PANGO_ALIGN_LEFT);
        syc_layout_size(l, NULL, &h);
        syc_draw_layout(x, l, x->m, y, 0, 0, 0, SYC_COL_FOOT);
        g_object_unref(l);
        y += h;
    }
}

static void draw_titles_footer(syc_ctx *x)
{
    const sy_chart *c = x->c;
    syc_draw_head_foot(x, c->title, c->subtitle, c->footer, c->nfooter);
}

/* ------------------------------------------------------------------ */
/* Validation, rendering, back ends                                    */

sy_status syc_chart_validate(const sy_chart *c, const sy_chart_page *pg, sy_error *err)
{
    if (!c || !pg) return sy_fail(err, SY_ERR_ARG, "chart: no chart or page given");
    if (c->nx < 2 || c->ny < 2)
        return sy_fail(err, SY_ERR_ARG, "chart: grid needs at least 2 x 2 nodes (nx = %zu, ny = %zu)",
                       c->nx, c->ny);
    if (!isfinite(c->x0_jd) || !isfinite(c->y0) || !(c->dx_days > 0) || !(c->dy > 0) ||
        !isfinite(c->dx_days) || !isfinite(c->dy))
        return sy_fail(err, SY_ERR_ARG, "chart: grid origin must be finite and dx_days, dy positive");
    if (c->yaxis != SY_CHART_Y_ARRIVAL && c->yaxis != SY_CHART_Y_TOF)
        return sy_fail(err, SY_ERR_ARG, "chart: unknown yaxis %d", (int)c->yaxis);
    if (!(pg->width_in >= 1.0 && pg->width_in <= 60.0 && pg->height_in >= 1.0 && pg->height_in <= 60.0))
        return sy_fail(err, SY_ERR_ARG, "chart: page %.3g x %.3g in is outside 1..60 in",
                       pg->width_in, pg->height_in);
    if (c->nregions > 4) return sy_fail(err, SY_ERR_ARG, "chart: at most 4 constraint regions (got %zu)", c->nregions);
    if (c->nisolines && !c->isolines) return sy_fail(err, SY_ERR_ARG, "chart: nisolines > 0 but isolines is NULL");
    for (size_t k = 0; k < c->nisolines; k++) {
        const sy_chart_isolines *il = &c->isolines[k];
        if ((int)il->role < 0 || (int)il->role > 2)
            return sy_fail(err, SY_ERR_ARG, "chart: isoline layer %zu has an unknown role", k);
        if (il->nsets && !il->sets)
            return sy_fail(err, SY_ERR_ARG, "chart: isoline layer %zu has nsets > 0 but no sets", k);
        for (size_t s = 0; s < il->nsets; s++)
            for (size_t q = 0; q < il->sets[s].nlines; q++)
                if (il->sets[s].lines[q].n && !il->sets[s].lines[q].xy)
                    return sy_fail(err, SY_ERR_ARG, "chart: isoline layer %zu level %zu line %zu has no points", k, s, q);
    }
    if (c->nregions && !c->regions) return sy_fail(err, SY_ERR_ARG, "chart: nregions > 0 but regions is NULL");
    if (c->nmarkers && !c->markers) return sy_fail(err, SY_ERR_ARG, "chart: nmarkers > 0 but markers is NULL");
    for (size_t k = 0; k < c->nmarkers; k++)
        if (!isfinite(c->markers[k].x_jd) || !isfinite(c->markers[k].y))
            return sy_fail(err, SY_ERR_ARG, "chart: marker %zu has a non-finite position", k);
    if (c->npaths && !c->paths) return sy_fail(err, SY_ERR_ARG, "chart: npaths > 0 but paths is NULL");
    for (size_t k = 0; k < c->npaths; k++)
        if (c->paths[k].n && (!c->paths[k].x_jd || !c->paths[k].y))
            return sy_fail(err, SY_ERR_ARG, "chart: paths[%zu] has n = %zu but x_jd or y is NULL", k,
                           c->paths[k].n);
    if (c->tof && c->tof->n && !c->tof->tof_days) return sy_fail(err, SY_ERR_ARG, "chart: tof lines without values");
    if (c->boundary && c->boundary->nlines && !c->boundary->lines)
        return sy_fail(err, SY_ERR_ARG, "chart: boundary nlines > 0 but lines is NULL");
    if (c->nfooter && !c->footer) return sy_fail(err, SY_ERR_ARG, "chart: nfooter > 0 but footer is NULL");
    for (size_t k = 0; k < c->nfooter; k++)
        if (!c->footer[k]) return sy_fail(err, SY_ERR_ARG, "chart: footer line %zu is NULL", k);
    if (c->fill) {
        const sy_chart_fill *f = c->fill;
        if (!f->z || !f->levels || f->nlevels < 2 || f->nlevels > 62)
            return sy_fail(err, SY_ERR_ARG, "chart: filled mode needs z and 2..62 levels (got %zu)", f->nlevels);
        for (size_t k = 1; k < f->nlevels; k++)
            if (!(f->levels[k] > f->levels[k - 1]))
                return sy_fail(err, SY_ERR_ARG, "chart: fill levels must be strictly ascending (level %zu)", k);
    }
    return SY_OK;
}

/* Set once any text has been laid out: only then do pango's font map and
 * fontconfig exist to be released (see sy_chart_release_caches). */
static volatile int fonts_in_use;

PangoContext *syc_make_pango(cairo_t *cr)
{
    fonts_in_use = 1;
    PangoContext *pc = pango_cairo_create_context(cr);
    if (!pc) return NULL;
    /* No hinting and unrounded glyph positions: metrics then scale
     * linearly, so every format and dpi gets the same layout. */
    cairo_font_options_t *fo = cairo_font_options_create();
    cairo_font_options_set_hint_style(fo, CAIRO_HINT_STYLE_NONE);
    cairo_font_options_set_hint_metrics(fo, CAIRO_HINT_METRICS_OFF);
    cairo_font_options_set_antialias(fo, CAIRO_ANTIALIAS_GRAY);
    pango_cairo_context_set_font_options(pc, fo);
    cairo_font_options_destroy(fo);
    pango_cairo_context_set_resolution(pc, 72.0);
    pango_context_set_round_glyph_positions(pc, FALSE);
    return pc;
}

/* Lay out and (when draw != 0) draw on cr, whose user space is points. */
static sy_status render(syc_ctx *x, cairo_t *cr, double px_per_pt, int draw, sy_error *err)
{
    x->cr = cr;
    x->pc = syc_make_pango(cr);
    if (!x->pc) return sy_fail(err, SY_ERR_NOMEM, "chart: cannot create a text context");
    do_layout(x);
    place_all(x);
    if (x->oom) return sy_fail(err, SY_ERR_NOMEM, "chart: out of memory while placing labels");
    if (draw) {
        cairo_set_source_rgb(cr, 1, 1, 1);
        cairo_paint(cr);
        if (!draw_fill(x, px_per_pt))
            return sy_fail(err, SY_ERR_NOMEM, "chart: out of memory for the filled contours");
        draw_regions(x);
        draw_axes(x);
        draw_lines(x);
        draw_labels(x);
        draw_paths(x);
        /* the frame under the optima: a minimum on the grid's edge keeps
         * its whole symbol instead of a frame line through it */
        draw_frame_and_ticks(x);
        draw_marker_layer(x);
        draw_path_labels(x);
        draw_colour_bar(x);
        syc_draw_legend(x);
        draw_titles_footer(x);
        cairo_status_t cs = cairo_status(cr);
        if (cs != CAIRO_STATUS_SUCCESS)
            return sy_fail(err, cs == CAIRO_STATUS_NO_MEMORY ? SY_ERR_NOMEM : SY_ERR_IO,
                           "chart: drawing failed: %s", cairo_status_to_string(cs));
    }
    return SY_OK;
}

void syc_ctx_free(syc_ctx *x)
{
    if (x->pc) g_object_unref(x->pc);
    free(x->boxes);
    free(x->styles);
    x->pc = NULL;
    x->boxes = NULL;
    x->styles = NULL;
}

static const char *page_text(const sy_chart_page *pg, const char *key)
{
    for (size_t k = 0; k < pg->ntext; k++)
        if (pg->text[k].key && pg->text[k].value && !strcmp(pg->text[k].key, key))
            return pg->text[k].value;
    return NULL;
}

/* A plain-text account of the chart for the SVG <desc>: cairo draws pango
 * text as glyph outlines, so without this an SVG would hold none of its
 * words for search engines, screen readers or tests. */
static void describe(const syc_ctx *x, syc_membuf *m)
{
    const sy_chart *c = x->c;
    const char *parts[3] = {c->subtitle, c->xtitle, c->ytitle};
    for (int k = 0; k < 3; k++)
        if (parts[k] && *parts[k]) { syc_mb_put_xml(m, parts[k]); syc_mb_puts(m, "\n"); }
    for (int k = 0; k < x->nleg; k++) {
        syc_mb_puts(m, "Legend: ");
        syc_mb_put_xml(m, x->leg[k].text);
        syc_mb_puts(m, "\n");
    }
    static const char *kind[] = {"Level", "Time of flight", "Boundary side", "Marker", "Marker"};
    for (size_t k = 0; k < x->nboxes; k++) {
        const sy_chart_box *b = &x->boxes[k];
        if (b->kind == SY_CHART_BOX_MARKER || b->kind == SY_CHART_BOX_MARKER_LABEL ||
            b->kind == SY_CHART_BOX_PATH || b->kind == SY_CHART_BOX_PATH_LABEL)
            continue;
        syc_mb_puts(m, kind[b->kind]);
        syc_mb_puts(m, ": ");
        syc_mb_put_xml(m, b->text);
        syc_mb_puts(m, "\n");
    }
    for (size_t k = 0; k < c->nmarkers; k++)
        if (c->markers[k].label) {
            /* full text (box texts are truncated to 63 bytes) */
            syc_mb_puts(m, "Marked: ");
            syc_mb_put_xml(m, c->markers[k].label);
            syc_mb_puts(m, "\n");
        }
    for (size_t k = 0; k < c->npaths; k++)
        if (c->paths[k].label) {
            syc_mb_puts(m, "Path: ");
            syc_mb_put_xml(m, c->paths[k].label);
            syc_mb_puts(m, "\n");
        }
    for (size_t k = 0; k < c->nfooter; k++) { syc_mb_put_xml(m, c->footer[k]); syc_mb_puts(m, "\n"); }
}

/* cairo numbers its SVG element ids (surfaceN, patternN, imageN, clipN,
 * ...) from process-wide counters, so a second chart drawn by the same
 * process would differ from the first.  Renumber every id="nameN" in
 * order of first appearance, and every reference to it, so the bytes
 * depend on the chart alone. */
typedef struct { char name[40]; char repl[40]; } idmap;

static int id_char(char ch) { return (ch >= 'a' && ch <= 'z') || (ch >= 'A' && ch <= 'Z') || ch == '-'; }

static int normalise_svg_ids(const char *in, size_t n, syc_membuf *out)
{
    size_t cap = 256, nm = 0;
    idmap *map = malloc(cap * sizeof *map);
    if (!map) return 0;
    int counts[16] = {0};
    char prefixes[16][24];
    int np = 0;
    /* pass 1: definitions, in order */
    for (const char *p = in; (p = strstr(p, " id=\"")) != NULL; p += 5) {
        const char *q = p + 5, *e = strchr(q, '"');
        if (!e || e - q >= 40) continue;
        size_t len = (size_t)(e - q), pl = 0;
        while (pl < len && id_char(q[pl])) pl++;
        if (pl == 0 || pl == len || pl >= 24) continue;
        int digits = 1;
        for (size_t t = pl; t < len; t++) if (q[t] < '0' || q[t] > '9') digits = 0;
        if (!digits) continue;   /* glyph ids like glyph0-1 are per document */
        int pi = -1;
        for (int t = 0; t < np; t++) if (strlen(prefixes[t]) == pl && !strncmp(prefixes[t], q, pl)) pi = t;
        if (pi < 0) {
            if (np == 16) continue;
            pi = np++;
            memcpy(prefixes[pi], q, pl);
            prefixes[pi][pl] = '\0';
        }
        if (nm == cap) {
            cap *= 2;
            idmap *mm = realloc(map, cap * sizeof *mm);
            if (!mm) { free(map); return 0; }
            map = mm;
        }
        memcpy(map[nm].name, q, len);
        map[nm].name[len] = '\0';
        snprintf(map[nm].repl, sizeof map[nm].repl, "%s%d", prefixes[pi], ++counts[pi]);
        nm++;
    }
    /* pass 2: rewrite id="X", "#X" (in href and url(#X)) */
    const char *p = in, *end = in + n;
    while (p < end) {
        const char *hit = NULL;
        size_t skip = 0;
        const char *a = strstr(p, "id=\""), *b = strchr(p, '#');
        if (a && (!b || a < b)) { hit = a; skip = 4; }
        else if (b) { hit = b; skip = 1; }
        if (!hit) { syc_mb_put(out, p, (size_t)(end - p)); break; }
        syc_mb_put(out, p, (size_t)(hit - p) + skip);
        const char *q = hit + skip;
        size_t len = 0;
        while (q + len < end && (id_char(q[len]) || (q[len] >= '0' && q[len] <= '9'))) len++;
        const char *r = NULL;
        for (size_t k = 0; k < nm && len; k++)
            if (strlen(map[k].name) == len && !strncmp(map[k].name, q, len)) { r = map[k].repl; break; }
        if (r) { syc_mb_puts(out, r); p = q + len; }
        else p = q;
    }
    free(map);
    return !out->oom;
}

static cairo_status_t mem_write(void *closure, const unsigned char *data, unsigned int len)
{
    syc_membuf *m = closure;
    syc_mb_put(m, data, len);
    return m->oom ? CAIRO_STATUS_NO_MEMORY : CAIRO_STATUS_SUCCESS;
}


cairo_status_t syc_file_write(void *closure, const unsigned char *data, unsigned int len)
{
    syc_file_sink *fs = closure;
    if (fwrite(data, 1, len, fs->fp) == len) return CAIRO_STATUS_SUCCESS;
    if (!fs->err) fs->err = errno ? errno : EIO;
    return CAIRO_STATUS_WRITE_ERROR;
}

sy_status syc_surface_status(cairo_surface_t *s, const char *path, int write_errno,
                                sy_error *err)
{
    cairo_status_t cs = cairo_surface_status(s);
    if (cs == CAIRO_STATUS_SUCCESS) return SY_OK;
    if (cs == CAIRO_STATUS_NO_MEMORY) return sy_fail(err, SY_ERR_NOMEM, "cannot render %s: out of memory", path);
    if (cs == CAIRO_STATUS_WRITE_ERROR)
        return sy_fail(err, SY_ERR_IO, "cannot write %s: %s", path,
                       strerror(write_errno ? write_errno : EIO));
    return sy_fail(err, SY_ERR_IO, "cannot render %s: %s", path, cairo_status_to_string(cs));
}

static sy_status write_png(const syc_job *job, FILE *fp, const char *path, sy_error *err)
{
    const sy_chart_page *pg = job->pg;
    if (!(pg->dpi >= 10 && pg->dpi <= 2400))
        return sy_fail(err, SY_ERR_ARG, "%s: dpi %.6g is outside 10..2400", path, pg->dpi);
    int w = (int)lround(pg->width_in * pg->dpi), h = (int)lround(pg->height_in * pg->dpi);
    if ((double)w * h > 400e6)
        return sy_fail(err, SY_ERR_ARG, "%s: %d x %d pixels is too large; lower the dpi", path, w, h);
    cairo_surface_t *s = cairo_image_surface_create(CAIRO_FORMAT_ARGB32, w, h);
    sy_status st = syc_surface_status(s, path, 0, err);
    if (st != SY_OK) { cairo_surface_destroy(s); return st; }
    cairo_t *cr = cairo_create(s);
    cairo_scale(cr, w / (pg->width_in * 72.0), h / (pg->height_in * 72.0));
    st = job->draw(job->ud, cr, pg->dpi / 72.0, err);
    cairo_destroy(cr);
    if (st == SY_OK) {
        cairo_surface_flush(s);
        st = sy_chart_png_encode(fp, cairo_image_surface_get_data(s), w, h,
                                 cairo_image_surface_get_stride(s), pg->dpi, pg->text,
                                 pg->ntext, path, err);
    }
    cairo_surface_destroy(s);
    return st;
}

void syc_pdf_metadata(cairo_surface_t *s, const char *title, const char *creator,
                      const char *subject)
{
    if (title) cairo_pdf_surface_set_metadata(s, CAIRO_PDF_METADATA_TITLE, title);
    cairo_pdf_surface_set_metadata(s, CAIRO_PDF_METADATA_CREATOR,
                                   creator ? creator : "synodic " PACKAGE_VERSION);
    /* Reproducible output: cairo stamps the current time as the creation
     * date unless told otherwise; an unparsable (empty) date makes cairo
     * 1.16 omit the entry.  SOURCE_DATE_EPOCH (reproducible-builds.org
     * convention) supplies a fixed date when the caller wants one. */
    const char *sde = getenv("SOURCE_DATE_EPOCH");
    char datebuf[32] = "";
    if (sde && *sde) {
        char *end = NULL;
        long long t = strtoll(sde, &end, 10);
        if (end && *end == '\0' && t >= 0) {
            double jd = 2440587.5 + (double)(t / 86400);
            int yy, mo, dd;
            civil_from_jd(jd, &yy, &mo, &dd);
            long long r = t % 86400;
            snprintf(datebuf, sizeof datebuf, "%04d-%02d-%02dT%02d:%02d:%02dZ", yy, mo, dd,
                     (int)(r / 3600), (int)(r / 60 % 60), (int)(r % 60));
        }
    }
    cairo_pdf_surface_set_metadata(s, CAIRO_PDF_METADATA_CREATE_DATE, datebuf);
    if (subject) cairo_pdf_surface_set_metadata(s, CAIRO_PDF_METADATA_SUBJECT, subject);
}

static sy_status write_pdf(const syc_job *job, FILE *fp, const char *path, sy_error *err)
{
    const sy_chart_page *pg = job->pg;
    syc_file_sink sink = {fp, 0};
    cairo_surface_t *s = cairo_pdf_surface_create_for_stream(syc_file_write, &sink,
                                                             pg->width_in * 72.0,
                                                             pg->height_in * 72.0);
    sy_status st = syc_surface_status(s, path, 0, err);
    if (st != SY_OK) { cairo_surface_destroy(s); return st; }
    const char *title = page_text(pg, "Title");
    syc_pdf_metadata(s, title ? title : job->title, page_text(pg, "Software"),
                     page_text(pg, "Comment"));
    cairo_t *cr = cairo_create(s);
    st = job->draw(job->ud, cr, 2.0, err);
    cairo_show_page(cr);
    cairo_destroy(cr);
    cairo_surface_finish(s);
    if (st == SY_OK) st = syc_surface_status(s, path, sink.err, err);
    cairo_surface_destroy(s);
    return st;
}

static sy_status write_svg(const syc_job *job, FILE *fp, const char *path, sy_error *err)
{
    const sy_chart_page *pg = job->pg;
    syc_membuf raw = {0}, out = {0};
    cairo_surface_t *s = cairo_svg_surface_create_for_stream(mem_write, &raw, pg->width_in * 72.0,
                                                             pg->height_in * 72.0);
    sy_status st = syc_surface_status(s, path, 0, err);
    if (st == SY_OK) {
        cairo_svg_surface_restrict_to_version(s, CAIRO_SVG_VERSION_1_1);
        cairo_t *cr = cairo_create(s);
        st = job->draw(job->ud, cr, 2.0, err);
        cairo_show_page(cr);
        cairo_destroy(cr);
        cairo_surface_finish(s);
        if (st == SY_OK) st = syc_surface_status(s, path, 0, err);
    }
    cairo_surface_destroy(s);
    if (st == SY_OK && (raw.oom || !raw.p)) st = sy_fail(err, SY_ERR_NOMEM, "cannot render %s: out of memory", path);
    if (st == SY_OK && !normalise_svg_ids(raw.p, raw.n, &out))
        st = sy_fail(err, SY_ERR_NOMEM, "cannot render %s: out of memory", path);
    if (st == SY_OK) {
        /* insert <title> and <desc> right after the root element's start tag */
        char *root = strstr(out.p, "<svg");
        char *gt = root ? strchr(root, '>') : NULL;
        if (!gt) {
            st = sy_fail(err, SY_ERR_IO, "cannot render %s: cairo produced no <svg> element", path);
        } else {
            syc_membuf meta = {0};
            const char *title = page_text(pg, "Title");
            if (!title) title = job->title;
            syc_mb_puts(&meta, "\n<title>");
            syc_mb_put_xml(&meta, title ? title : "synodic chart");
            syc_mb_puts(&meta, "</title>\n<desc>");
            if (job->describe) job->describe(job->ud, &meta);
            syc_mb_puts(&meta, "</desc>");
            size_t head = (size_t)(gt + 1 - out.p);
            if (meta.oom) {
                st = sy_fail(err, SY_ERR_NOMEM, "cannot render %s: out of memory", path);
            } else if (fwrite(out.p, 1, head, fp) != head ||
                       fwrite(meta.p, 1, meta.n, fp) != meta.n ||
                       fwrite(out.p + head, 1, out.n - head, fp) != out.n - head) {
                st = sy_fail(err, SY_ERR_IO, "cannot write %s: %s", path, strerror(errno));
            }
            free(meta.p);
        }
    }
    free(raw.p);
    free(out.p);
    return st;
}

sy_status syc_write_job(const syc_job *job, sy_chart_format fmt, const char *path,
                        sy_error *err)
{
    if (!path || !*path) return sy_fail(err, SY_ERR_ARG, "chart: no output path given");
    if (fmt == SY_CHART_FMT_AUTO) fmt = sy_chart_format_from_path(path);
    if (fmt == SY_CHART_FMT_AUTO)
        return sy_fail(err, SY_ERR_ARG,
                       "cannot tell the chart format of %s: name it .png, .svg or .pdf or set the format",
                       path);
    sy_outfile of;
    sy_status st = (sy_status)sy_outfile_open(&of, path, err);
    if (st != SY_OK) return st;
    errno = 0;
    if (fmt == SY_CHART_FMT_PNG) st = write_png(job, of.fp, path, err);
    else if (fmt == SY_CHART_FMT_PDF) st = write_pdf(job, of.fp, path, err);
    else st = write_svg(job, of.fp, path, err);
    if (st != SY_OK) {
        sy_outfile_abort(&of);
        return st;
    }
    return (sy_status)sy_outfile_commit(&of, err);
}

/* Job callbacks for a porkchop chart: ud is its syc_ctx. */
static sy_status chart_job_draw(void *ud, cairo_t *cr, double px_per_pt, sy_error *err)
{
    return render(ud, cr, px_per_pt, 1, err);
}

static void chart_job_describe(void *ud, syc_membuf *m) { describe(ud, m); }

sy_status sy_chart_write(const sy_chart *chart, const sy_chart_page *page,
                         const char *path, sy_error *err)
{
    sy_status st = syc_chart_validate(chart, page, err);
    if (st != SY_OK) return st;
    syc_ctx x;
    memset(&x, 0, sizeof x);
    x.c = chart;
    x.pg = page;
    syc_job job = {page, chart->title, chart_job_draw, chart_job_describe, &x};
    st = syc_write_job(&job, page->format, path, err);
    syc_ctx_free(&x);
    return st;
}

sy_status syc_chart_draw(const sy_chart *c, double width_in, double height_in, cairo_t *cr,
                         double px_per_pt, sy_error *err)
{
    sy_chart_page pg;
    sy_chart_page_init(&pg);
    pg.width_in = width_in;
    pg.height_in = height_in;
    sy_status st = syc_chart_validate(c, &pg, err);
    if (st != SY_OK) return st;
    syc_ctx x;
    memset(&x, 0, sizeof x);
    x.c = c;
    x.pg = &pg;
    cairo_save(cr);
    st = render(&x, cr, px_per_pt, 1, err);
    cairo_restore(cr);
    syc_ctx_free(&x);
    return st;
}

sy_status sy_chart_layout_boxes(const sy_chart *chart, const sy_chart_page *page,
                                sy_chart_box *boxes, size_t max, size_t *nboxes,
                                double plot_rect[4], sy_error *err)
{
    sy_status st = syc_chart_validate(chart, page, err);
    if (st != SY_OK) return st;
    cairo_surface_t *s = cairo_image_surface_create(CAIRO_FORMAT_ARGB32, 1, 1);
    cairo_t *cr = cairo_create(s);
    syc_ctx x;
    memset(&x, 0, sizeof x);
    x.c = chart;
    x.pg = page;
    st = render(&x, cr, 1.0, 0, err);
    if (st == SY_OK) {
        if (nboxes) *nboxes = x.nboxes;
        for (size_t k = 0; k < x.nboxes && k < max && boxes; k++) boxes[k] = x.boxes[k];
        if (plot_rect) {
            plot_rect[0] = x.px0;
            plot_rect[1] = x.py0;
            plot_rect[2] = x.px1;
            plot_rect[3] = x.py1;
        }
    }
    syc_ctx_free(&x);
    cairo_destroy(cr);
    cairo_surface_destroy(s);
    return st;
}

void sy_chart_release_caches(void)
{
    /* Asking pango for its default font map creates one (and starts its
     * fontconfig worker thread), which FcFini would then race: release
     * nothing unless text was actually drawn. */
    if (!fonts_in_use) return;
    fonts_in_use = 0;
    /* pango (1.50) sorts fontconfig patterns in a worker thread that holds
     * a reference to the font map; dropping the default map while that
     * thread runs leaves the thread to finalise it - destroying cairo
     * fonts - at the same time as cairo's static data is reset below
     * (an assertion in cairo-hash.c, seen in about one run in five).
     * So keep a reference, wait (up to 5 s) until it is the only one,
     * and finalise the map here, in this thread.  GObject's ref_count
     * is a public member (GObject reference manual, "GObject"). */
    PangoFontMap *fm = pango_cairo_font_map_get_default();
    if (fm) g_object_ref(fm);
    pango_cairo_font_map_set_default(NULL);
    if (fm) {
        for (int k = 0; k < 5000 && g_atomic_int_get(&G_OBJECT(fm)->ref_count) > 1; k++)
            g_usleep(1000);
        g_object_unref(fm);
    }
    cairo_debug_reset_static_data();
    FcFini();
}
