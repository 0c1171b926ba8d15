/* synodic/chart.h - porkchop chart renderer (part of libsynodic).
 *
 * The renderer draws what it is given: a frame (departure epoch along x,
 * arrival epoch or time of flight along y), iso-line layers traced by
 * sy_contour_trace(), shaded masks, markers and text.  It never computes
 * an orbit.  Geometry arrives in fractional grid-index coordinates and is
 * mapped to data with
 *
 *     x_jd = x0_jd + i * dx_days          (departure epoch, JD TDB)
 *     y    = y0    + j * dy               (arrival JD TDB, or TOF days)
 *
 * Output formats: PNG (libpng; pHYs carries the dpi; caller key/value
 * text chunks), SVG and PDF (cairo).  Every file goes through sy_outfile,
 * so a failure never leaves a partial chart behind.  SVG output is
 * byte-for-byte reproducible (cairo's counter-based element ids are
 * renumbered per document); PDF output carries no creation date unless
 * SOURCE_DATE_EPOCH is set, in which case that instant is used.
 *
 * All strings are UTF-8 and are drawn as plain text (no markup).  Every
 * pointer member may be NULL / every count 0 unless stated otherwise.
 */
#ifndef SYNODIC_CHART_H
#define SYNODIC_CHART_H

#include <stddef.h>
#include <stdio.h>

#include "synodic.h"
#include "synodic/contour.h"

#ifdef __cplusplus
extern "C" {
#endif

/* What the y axis shows. */
typedef enum {
    SY_CHART_Y_ARRIVAL = 0, /* y values are arrival epochs, JD TDB     */
    SY_CHART_Y_TOF = 1      /* y values are times of flight in days    */
} sy_chart_yaxis;

/* Style role of an iso-line layer.  Each role has its own colour, dash
 * pattern and weight, chosen to stay apart in grayscale print too. */
typedef enum {
    SY_CHART_PRIMARY = 0,   /* e.g. departure C3, km^2/s^2             */
    SY_CHART_SECONDARY = 1, /* e.g. arrival v-infinity, km/s           */
    SY_CHART_TERTIARY = 2   /* e.g. total delta-v, DLA, entry speed    */
} sy_chart_role;

/* One field's iso-lines: `sets` as returned by sy_contour_trace(), one
 * per level, in grid-index coordinates. */
typedef struct {
    sy_chart_role role;
    const sy_isoline_set *sets;
    size_t nsets;
    const char *legend;   /* legend text, e.g. "Departure C3, km²/s²"  */
    int label_every;      /* label every n-th level (0 or 1: all; <0: none) */
} sy_chart_isolines;

/* Time-of-flight iso-lines: straight lines y = x + tof on arrival-date
 * axes, horizontal lines on TOF axes.  Labelled "<tof> d". */
typedef struct {
    const double *tof_days;
    size_t n;
    const char *legend;   /* e.g. "Time of flight, days"                */
} sy_chart_tof_lines;

/* The Type I / Type II boundary (grid-index polylines).  low_text is
 * written on the side towards smaller y (shorter flights), high_text on
 * the other side; e.g. "Type I" and "Type II". */
typedef struct {
    const sy_polyline *lines;
    size_t nlines;
    const char *low_text;
    const char *high_text;
    const char *legend;   /* e.g. "Type I / Type II boundary"           */
} sy_chart_boundary;

/* A shaded constraint region: mask has nx*ny bytes (row-major like the
 * field), non-zero = the node violates the constraint.  Up to 4 regions,
 * each hatched at its own angle. */
typedef struct {
    const unsigned char *mask;
    const char *legend;   /* e.g. "C3 > 30 km²/s²"                      */
} sy_chart_region;

typedef enum {
    SY_CHART_MARK_CIRCLE = 0,
    SY_CHART_MARK_SQUARE,
    SY_CHART_MARK_DIAMOND,
    SY_CHART_MARK_TRIANGLE,
    SY_CHART_MARK_STAR
} sy_chart_symbol;

/* A marked point (e.g. an optimum).  The label may hold several lines
 * separated by '\n'; it is placed beside the symbol, inside the plot and
 * clear of the other labels.  Markers outside the plotted range are not
 * drawn. */
typedef struct {
    double x_jd;          /* departure epoch, JD TDB                    */
    double y;             /* arrival JD TDB or TOF days (per yaxis)     */
    sy_chart_symbol symbol;
    const char *label;
    const char *legend;   /* optional legend entry                      */
} sy_chart_marker;

/* A highlighted path across the chart, e.g. a launch period: one point
 * per departure day, y the arrival epoch (or TOF) chosen for that day.
 * Drawn as a heavy cased line over the iso-lines with dots at the points
 * (when they are far enough apart to read) and larger dots at both ends;
 * the label is placed beside the path, inside the plot and clear of the
 * other labels.  A non-finite x_jd or y leaves a gap. */
typedef struct {
    const double *x_jd;   /* departure epochs, JD TDB                   */
    const double *y;      /* arrival JD TDB or TOF days (per yaxis)     */
    size_t n;
    const char *label;    /* e.g. "Launch period\n21 days"              */
    const char *legend;   /* optional legend entry                      */
} sy_chart_path;

/* Filled-contour mode: the field is drawn as colour bands between the
 * ascending `levels` (nlevels >= 2), plus open-ended bands below the
 * first and above the last level, with a colour bar. */
typedef struct {
    const float *z;               /* nx*ny values, row-major            */
    const unsigned char *invalid; /* nx*ny, non-zero = no value; or NULL */
    const double *levels;
    size_t nlevels;
    const char *title;            /* colour bar title with unit         */
} sy_chart_fill;

/* Everything drawn.  Fill with sy_chart_init() and then set members. */
typedef struct {
    sy_chart_yaxis yaxis;
    size_t nx, ny;                /* grid nodes, both >= 2              */
    double x0_jd, dx_days;        /* dx_days > 0                        */
    double y0, dy;                /* dy > 0, in JD or days per yaxis    */

    const char *title;
    const char *subtitle;
    const char *xtitle;           /* e.g. "Departure date (TDB)"        */
    const char *ytitle;           /* e.g. "Arrival date (TDB)"          */
    const char *const *footer;    /* footer lines, drawn small, wrapped */
    size_t nfooter;

    const sy_chart_fill *fill;
    const sy_chart_region *regions;
    size_t nregions;
    const unsigned char *nosol_mask; /* nx*ny, non-zero = no solution   */
    const char *nosol_legend;        /* default "No solution"           */
    const sy_chart_isolines *isolines;
    size_t nisolines;
    const sy_chart_tof_lines *tof;
    const sy_chart_boundary *boundary;
    const sy_chart_marker *markers;
    size_t nmarkers;
    const sy_chart_path *paths;   /* drawn above the lines, below markers */
    size_t npaths;
} sy_chart;

typedef enum {
    SY_CHART_FMT_AUTO = 0,        /* from the file name's extension     */
    SY_CHART_FMT_PNG,
    SY_CHART_FMT_SVG,
    SY_CHART_FMT_PDF
} sy_chart_format;

/* A key/value text pair: PNG tEXt (ASCII value) or iTXt (other UTF-8),
 * e.g. {"Title", ...}, {"Software", "synodic 0.1.0"}, {"Comment", ...}.
 * Keys are 1-79 printable ASCII characters.  For SVG and PDF the
 * "Title" and "Software" values become the document title / creator. */
typedef struct {
    const char *key;
    const char *value;
} sy_chart_text;

typedef struct {
    double width_in, height_in;   /* page size, inches                  */
    double dpi;                   /* raster resolution (PNG only)       */
    sy_chart_format format;
    const sy_chart_text *text;
    size_t ntext;
} sy_chart_page;

/* Zero everything (no layers, date-date axes). */
void sy_chart_init(sy_chart *chart);
/* A single report column: 3.5 x 3.0 in at 300 dpi, format from name. */
void sy_chart_page_init(sy_chart_page *page);

/* Render `chart` on `page` into `path` (temporary file + rename).
 * SY_ERR_ARG for inconsistent input (the message names the member),
 * SY_ERR_NOMEM, SY_ERR_IO (the message names the path and the reason). */
sy_status sy_chart_write(const sy_chart *chart, const sy_chart_page *page,
                         const char *path, sy_error *err);

/* Format from a file name extension (.png .svg .pdf, any case), or
 * SY_CHART_FMT_AUTO when unknown. */
sy_chart_format sy_chart_format_from_path(const char *path);

/* Level text as drawn on iso-line labels: `step` is the spacing of the
 * level list (decides the decimals); trailing zeros are dropped, so 12,
 * 7.5, 0.25.  buf should hold 32 bytes. */
void sy_chart_format_level(double value, double step, char *buf,
                           size_t len);

/* Encode a cairo-style premultiplied ARGB32 image (native-endian 32-bit
 * pixels, `stride` bytes per row) as PNG on fp: RGB when fully opaque,
 * otherwise un-premultiplied RGBA; pHYs from dpi; text chunks.  `name`
 * is used in error messages. */
sy_status sy_chart_png_encode(FILE *fp, const unsigned char *argb,
                              int width, int height, int stride, double dpi,
                              const sy_chart_text *text, size_t ntext,
                              const char *name, sy_error *err);

/* Release the font caches pango, cairo and fontconfig keep for the life
 * of the process.  Call once before exit, after the last chart, so that
 * leak checkers see a clean exit; rendering afterwards is still allowed
 * (the caches are rebuilt). */
void sy_chart_release_caches(void);

/* ---- Layout introspection (tests, tools) --------------------------- */

typedef enum {
    SY_CHART_BOX_LEVEL = 0,       /* iso-line level label               */
    SY_CHART_BOX_TOF,             /* time-of-flight line label          */
    SY_CHART_BOX_BOUNDARY,        /* "Type I" / "Type II" text          */
    SY_CHART_BOX_MARKER,          /* marker symbol                      */
    SY_CHART_BOX_MARKER_LABEL,    /* marker text block                  */
    SY_CHART_BOX_PATH,            /* a piece of a path's line (may cross
                                     marker symbols: a path runs through
                                     the points it marks)               */
    SY_CHART_BOX_PATH_LABEL       /* path text block                    */
} sy_chart_box_kind;

/* An oriented rectangle in page points (origin top left, y down):
 * centre, half extents along its own axes, rotation in radians. */
typedef struct {
    double cx, cy, half_w, half_h, angle_rad;
    sy_chart_box_kind kind;
    char text[64];
} sy_chart_box;

/* Run the layout that sy_chart_write() would run for `page` and report
 * the boxes reserved inside the plot (up to max; *nboxes gets the total)
 * and the plot rectangle {left, top, right, bottom} in points. */
sy_status sy_chart_layout_boxes(const sy_chart *chart,
                                const sy_chart_page *page,
                                sy_chart_box *boxes, size_t max,
                                size_t *nboxes, double plot_rect[4],
                                sy_error *err);

/* 1 when two oriented boxes overlap or come closer than gap_pt. */
int sy_chart_boxes_overlap(const sy_chart_box *a, const sy_chart_box *b,
                           double gap_pt);

#ifdef __cplusplus
}
#endif
#endif
