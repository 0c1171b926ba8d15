/* synodic/atlas.h - multi-page documents and comparison figures
 * (part of libsynodic's renderer; computes no orbits).
 *
 *  - sy_chart_path: a marked segment on a porkchop chart (e.g. a launch
 *    period: one point per departure day), added to sy_chart;
 *  - sy_xy_chart: a comparison figure of stacked panels sharing an x axis
 *    (e.g. minimum C3 and arrival v-infinity per opportunity against the
 *    year), written alone with sy_xy_write() or as a document page;
 *  - sy_table_page: a page with a title, a table and notes;
 *  - sy_doc: a multi-page PDF (an "atlas") built page by page and written
 *    through a temporary file, renamed into place by sy_doc_close().
 */
#ifndef SYNODIC_ATLAS_H
#define SYNODIC_ATLAS_H

#include <stddef.h>

#include "synodic.h"
#include "synodic/chart.h"

#ifdef __cplusplus
extern "C" {
#endif

/* One series of an xy panel. */
typedef struct {
    const double *x;          /* JD (TDB) when the chart's x_is_date     */
    const double *y;
    size_t n;                 /* NAN y values leave a gap                */
    sy_chart_symbol symbol;
    sy_chart_role role;       /* colour/dash family, as for iso-lines    */
    int connect;              /* 1: join the points with a line          */
    const char *legend;       /* e.g. "Type I"                           */
} sy_xy_series;

#define SY_XY_MAX_PANELS 3
typedef struct {
    const char *ytitle;       /* e.g. "Minimum C3 (km²/s²)"              */
    const sy_xy_series *series;
    size_t nseries;
} sy_xy_panel;

typedef struct {
    const char *title, *subtitle;
    const char *xtitle;       /* e.g. "Departure date (TDB)"             */
    int x_is_date;            /* 1: x values are JD; date ticks          */
    sy_xy_panel panels[SY_XY_MAX_PANELS]; /* drawn top to bottom        */
    size_t npanels;
    const char *const *footer;
    size_t nfooter;
} sy_xy_chart;

/* Write one comparison figure (PNG, SVG or PDF by extension). */
sy_status sy_xy_write(const sy_xy_chart *xy, const sy_chart_page *page,
                      const char *path, sy_error *err);

/* A page with a table: header[ncols], cells[nrows * ncols] row-major,
 * columns whose first data cell parses as a number are right-aligned.
 * Long tables continue on further pages (sy_doc_add_table counts them). */
typedef struct {
    const char *title, *subtitle;
    const char *const *header;
    size_t ncols;
    const char *const *cells;
    size_t nrows;
    const char *const *notes; /* paragraphs under the table             */
    size_t nnotes;
    const char *const *footer;
    size_t nfooter;
} sy_table_page;

typedef struct sy_doc sy_doc;

/* Start a PDF of width_in x height_in pages.  title/creator go into the
 * PDF metadata; no creation date is written (reproducible output). */
sy_status sy_doc_open(sy_doc **doc, const char *path, double width_in,
                      double height_in, const char *title,
                      const char *creator, sy_error *err);
sy_status sy_doc_add_chart(sy_doc *doc, const sy_chart *chart, sy_error *err);
sy_status sy_doc_add_xy(sy_doc *doc, const sy_xy_chart *xy, sy_error *err);
/* Adds as many pages as the table needs; *npages (may be NULL) gets them. */
sy_status sy_doc_add_table(sy_doc *doc, const sy_table_page *t,
                           size_t *npages, sy_error *err);
size_t sy_doc_page_count(const sy_doc *doc);
/* Finish and rename into place; frees doc. */
sy_status sy_doc_close(sy_doc *doc, sy_error *err);
/* Discard (removes the temporary file); frees doc; NULL is fine. */
void sy_doc_abort(sy_doc *doc);

#ifdef __cplusplus
}
#endif
#endif
