/* chart_priv.h - renderer internals shared by chart.c (porkchop charts)
 * and atlas.c (comparison figures, tables, multi-page documents).  Not
 * installed; nothing here is part of the public API.
 *
 * Everything is laid out in PostScript points with the origin at the top
 * left of the page; see the notes at the top of chart.c.
 */
#ifndef SYNODIC_CHART_PRIV_H
#define SYNODIC_CHART_PRIV_H

#include <cairo.h>
#include <pango/pangocairo.h>
#include <stddef.h>
#include <stdio.h>

#include "synodic.h"
#include "synodic/chart.h"

#if defined(__GNUC__)
#define SYC_INTERNAL __attribute__((visibility("hidden")))
#else
#define SYC_INTERNAL
#endif

typedef struct { double r, g, b; } syc_rgb;
#define SYC_HEX(h) {((h) >> 16 & 0xff) / 255.0, ((h) >> 8 & 0xff) / 255.0, ((h) & 0xff) / 255.0}

/* Palette entries atlas.c needs (defined and explained in chart.c). */
SYC_INTERNAL extern const syc_rgb SYC_COL_ROLE[3];
SYC_INTERNAL extern const syc_rgb SYC_COL_FRAME, SYC_COL_GRID, SYC_COL_TEXT, SYC_COL_FOOT;

/* Growable byte buffer. */
typedef struct {
    char *p;
    size_t n, cap;
    int oom;
} syc_membuf;

SYC_INTERNAL void syc_mb_put(syc_membuf *m, const void *data, size_t n);
SYC_INTERNAL void syc_mb_puts(syc_membuf *m, const char *s);
SYC_INTERNAL void syc_mb_put_xml(syc_membuf *m, const char *s);

#define SYC_MAX_TICKS 96
typedef struct {
    int n;
    double v[SYC_MAX_TICKS];          /* data values                  */
    char lab[SYC_MAX_TICKS][40];      /* label text                   */
} syc_ticks;

typedef enum {
    SYC_LEG_LINE, SYC_LEG_REGION, SYC_LEG_NOSOL, SYC_LEG_MARKER,
    SYC_LEG_PATH,                     /* highlighted path             */
    SYC_LEG_SERIES                    /* xy series: style = role*16 + symbol*2 + connect */
} syc_leg_kind;

typedef struct {
    syc_leg_kind kind;
    int style;
    const char *text;
    double w;                         /* entry width, pt              */
    double x, y;                      /* placed top left              */
} syc_leg_entry;

#define SYC_MAX_LEGEND 24

/* Layout and drawing state of one page. */
typedef struct {
    const sy_chart *c;                /* porkchop chart, or NULL       */
    const sy_chart_page *pg;
    cairo_t *cr;
    PangoContext *pc;
    double W, H, m;
    double fs_title, fs_sub, fs_axis, fs_tick, fs_label, fs_leg, fs_foot, fs_mark;
    double lw;                        /* line width scale             */
    double px0, py0, px1, py1;        /* plot rectangle               */
    double xmin, xmax, ymin, ymax;
    syc_ticks xt, yt;
    double xtick_top, xtitle_y, ytitle_x, title_y, sub_y;
    double leg_x, leg_y, leg_w, leg_h, foot_y;
    syc_leg_entry leg[SYC_MAX_LEGEND];
    int nleg;
    double cbar_x, cbar_w;            /* colour bar                   */
    sy_chart_box *boxes;
    int *styles;                      /* line style of each box's line */
    int cur_style;
    size_t nboxes, capboxes;
    int oom;
} syc_ctx;

/* Font sizes, line width and margin for a page of W x H points: they
 * grow with the page, much more slowly than the page. */
SYC_INTERNAL void syc_fonts(syc_ctx *x, double width_in, double height_in);
/* Light grid lines at the given pixel positions inside [x0,x1]x[y0,y1]
 * (porkchop plots and xy panels share the look). */
SYC_INTERNAL void syc_draw_grid(cairo_t *cr, double lw, const double *px, int npx,
                                const double *py, int npy, double x0, double y0,
                                double x1, double y1);

/* A pango context for cr with the renderer's fixed metrics. */
SYC_INTERNAL PangoContext *syc_make_pango(cairo_t *cr);

SYC_INTERNAL PangoLayout *syc_layout(syc_ctx *x, const char *text, double size_pt, int bold,
                                     int italic, double wrap_w, PangoAlignment al);
SYC_INTERNAL void syc_layout_size(PangoLayout *l, double *w, double *h);
SYC_INTERNAL void syc_text_size(syc_ctx *x, const char *t, double fs, int bold, double *w,
                                double *h);
SYC_INTERNAL void syc_draw_layout(syc_ctx *x, PangoLayout *l, double px, double py, double ax,
                                  double ay, double ang, syc_rgb col);
SYC_INTERNAL void syc_draw_text(syc_ctx *x, const char *t, double fs, int bold, double px,
                                double py, double ax, double ay, double ang, syc_rgb col);

/* Tick choice along an axis of `len` points (as on the porkchop axes). */
SYC_INTERNAL void syc_date_ticks(syc_ctx *x, double a, double b, int horizontal, double len,
                                 syc_ticks *t);
SYC_INTERNAL void syc_num_ticks(syc_ctx *x, double a, double b, int horizontal, double len,
                                syc_ticks *t);
/* Every multiple of step in [a, b], labelled with step's decimals. */
SYC_INTERNAL void syc_num_ticks_step(double a, double b, double step, syc_ticks *t);

/* xy series: line weight relative to the iso-line of the same role,
 * and the symbol radius. */
#define SYC_XY_LINE_SCALE 1.35
#define SYC_XY_MARK_R(x) (0.36 * (x)->fs_mark + 0.8)

/* style: 0-2 roles, 3 TOF, 4 boundary */
SYC_INTERNAL void syc_line_style(syc_ctx *x, int style, double scale_w);
/* A symbol with a white halo, filled with `fill`. */
SYC_INTERNAL void syc_symbol(syc_ctx *x, sy_chart_symbol sym, double cx, double cy, double r,
                             syc_rgb fill);

/* Titles at the top (sets title_y, sub_y, returns the y below them) and
 * footer lines at the bottom (sets foot_y, returns the y above them). */
SYC_INTERNAL double syc_layout_head(syc_ctx *x, const char *title, const char *subtitle);
SYC_INTERNAL double syc_layout_foot(syc_ctx *x, const char *const *footer, size_t nfooter);
SYC_INTERNAL void syc_draw_head_foot(syc_ctx *x, const char *title, const char *subtitle,
                                     const char *const *footer, size_t nfooter);
/* Legend of x->leg[0..nleg): flow into avail_w (sets leg_w, leg_h) and
 * draw at leg_x, leg_y. */
SYC_INTERNAL double syc_legend_flow(syc_ctx *x, double avail_w);
SYC_INTERNAL void syc_draw_legend(syc_ctx *x);

SYC_INTERNAL void syc_ctx_free(syc_ctx *x);

/* Draw a validated porkchop chart on a page of W x H points of cr (user
 * space in points).  px_per_pt is the raster resolution for the filled
 * contours. */
SYC_INTERNAL sy_status syc_chart_validate(const sy_chart *c, const sy_chart_page *pg,
                                          sy_error *err);
SYC_INTERNAL sy_status syc_chart_draw(const sy_chart *c, double width_in, double height_in,
                                      cairo_t *cr, double px_per_pt, sy_error *err);

/* One figure to write through the PNG/SVG/PDF back ends. */
typedef struct {
    const sy_chart_page *pg;          /* size, dpi, text chunks       */
    const char *title;                /* used when pg has no "Title"   */
    /* lay out and draw on cr (user space: points) */
    sy_status (*draw)(void *ud, cairo_t *cr, double px_per_pt, sy_error *err);
    /* plain-text account for the SVG <desc>, after draw */
    void (*describe)(void *ud, syc_membuf *m);
    void *ud;
} syc_job;

/* Write job to path in fmt through sy_outfile (temporary + rename). */
SYC_INTERNAL sy_status syc_write_job(const syc_job *job, sy_chart_format fmt, const char *path,
                                     sy_error *err);

/* PDF metadata as the chart back end writes it: title, creator, subject
 * (any may be NULL), and the creation date from SOURCE_DATE_EPOCH or
 * none at all. */
SYC_INTERNAL void syc_pdf_metadata(cairo_surface_t *s, const char *title, const char *creator,
                                   const char *subject);

/* cairo write callback into a FILE, remembering the first errno. */
typedef struct {
    FILE *fp;
    int err;
} syc_file_sink;
SYC_INTERNAL cairo_status_t syc_file_write(void *closure, const unsigned char *data,
                                           unsigned int len);
SYC_INTERNAL sy_status syc_surface_status(cairo_surface_t *s, const char *path, int write_errno,
                                          sy_error *err);

#endif
