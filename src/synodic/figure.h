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
