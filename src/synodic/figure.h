/* synodic/figure.h - a study's porkchop figure from its grid (libsynodic).
 *
 * This is the step fields -> contours -> chart: it picks levels, traces
 * iso-lines, builds the constraint masks and marker texts and hands them
 * to the renderer.  It computes no orbit (the optima come from the grid
 * module) and draws nothing itself.
 */
#ifndef SYNODIC_FIGURE_H
#define SYNODIC_FIGURE_H

#include "synodic.h"
#include "synodic/chart.h"
#include "synodic/grid.h"
#include "synodic/lvcap.h"
#include "synodic/study.h"

#ifdef __cplusplus
extern "C" {
#endif

/* Levels for one charted field: the study's list, or nice automatic
 * levels over the range an analyst looks at (from the minimum up to the
 * study's limit for that field when it has one, else up to a quantile of
 * the solved cells).  Returns the count (<= max). */
size_t sy_figure_levels(const sy_grid *g, const sy_study *st,
                        const sy_chart_field *cf, double *levels, size_t max);

/* The one porkchop chart assembly: the sy_chart description of a grid
 * and its study (levels, iso-lines with ridge gaps, filled bands,
 * time-of-flight lines, Type I/II boundary, constraint regions, optima
 * markers, titles, footer) together with the buffers it points into.
 * The chart also points into the grid, the study and the caller's paths,
 * which must outlive the figure. */
typedef struct sy_figure sy_figure;

/* What a caller may set beyond the study; a zeroed struct (or NULL)
 * charts the study as `synodic chart` does. */
typedef struct {
    /* Chart these fields instead of the study's [chart] fields (which
     * then include no delivered mass either); levels as in
     * sy_chart_field, e.g. a common list for a series of charts. */
    const sy_chart_field *fields;
    size_t nfields;                     /* <= SY_MAX_CHART_FIELDS        */
    int label_every[SY_MAX_CHART_FIELDS]; /* per field; 0: every level   */
    /* Time-of-flight lines instead of the study's (when non-NULL). */
    const double *tof_days;
    size_t ntof;
    int force_filled;                   /* bands of the primary field    */
    const char *title, *subtitle;       /* NULL: the study's (copied)    */
    const char *footer_extra;           /* one more footer line (copied) */
    /* Markers after the optima's (labels copied; 8 in all at most). */
    const sy_chart_marker *markers;
    size_t nmarkers;
    const sy_chart_path *paths;         /* drawn on top (not copied)     */
    size_t npaths;
} sy_figure_opts;

sy_status sy_figure_build(const sy_grid *g, const sy_study *st,
                          const sy_optimum *opt, size_t nopt,
                          const sy_figure_opts *o, sy_figure **out,
                          sy_error *err);
const sy_chart *sy_figure_chart(const sy_figure *f);
/* The study's page (size, dpi, automatic format) with text chunks that
 * point into the figure (title, software, model, a comment describing
 * the study and grid). */
void sy_figure_page(const sy_figure *f, sy_chart_page *page);
void sy_figure_free(sy_figure *f);

/* Render the study's chart to `path` (format from its extension).  When
 * the study charts "mass", the capability curve of [launch_vehicle] is
 * read and the injected mass at each cell's C3 is contoured (cells whose
 * C3 lies outside the table are left blank, never extrapolated). */
sy_status sy_figure_write(const sy_grid *g, const sy_study *st,
                          const sy_optimum *opt, size_t nopt,
                          const char *path, sy_error *err);
/* The same with highlighted paths (e.g. launch periods) drawn on top. */
sy_status sy_figure_write_paths(const sy_grid *g, const sy_study *st,
                                const sy_optimum *opt, size_t nopt,
                                const sy_chart_path *paths, size_t npaths,
                                const char *path, sy_error *err);
/* Injected mass (kg, float, row-major like the grid) at each cell's C3
 * from a capability curve; *invalid (nx*ny bytes) is 1 where the cell has
 * no transfer or its C3 lies outside the table.  Both malloc'd. */
sy_status sy_figure_mass_field(const sy_grid *g, const sy_lvcap *cap,
                               float **mass_kg, unsigned char **invalid,
                               sy_error *err);

#ifdef __cplusplus
}
#endif
#endif
