/* synodic/contour.h - iso-lines of a gridded field (part of libsynodic).
 *
 * Fields are stored row-major: z[j * nx + i], i along x (departure epoch),
 * j along y (arrival epoch or time of flight).  Contour coordinates are
 * returned in fractional grid-index units (x = i + fraction, y = j +
 * fraction); the caller maps them to dates.  A cell is the square between
 * nodes (i, j) and (i+1, j+1); a node whose mask byte is non-zero (no
 * solution, degenerate geometry) makes every cell touching it a gap.
 */
#ifndef SYNODIC_CONTOUR_H
#define SYNODIC_CONTOUR_H

#include <stddef.h>

#ifdef __cplusplus
extern "C" {
#endif

typedef struct {
    double *xy;     /* 2 * n doubles: x0, y0, x1, y1, ...            */
    size_t n;       /* number of points                              */
    int closed;     /* 1 when the last point joins the first          */
} sy_polyline;

typedef struct {
    double level;
    sy_polyline *lines;
    size_t nlines;
} sy_isoline_set;

/* Marching squares at one level.  mask may be NULL.  Non-finite z values
 * are treated as masked.  Returns SY_OK, SY_ERR_ARG or SY_ERR_NOMEM
 * (as int so that this header stands alone; values are sy_status).
 *
 * Guarantees of the result (see contour.c for the method):
 *   - a node with z >= level counts as "above"; a level equal to node
 *     values therefore traces the boundary of the below-level nodes, and
 *     no zero-length segment or repeated consecutive point is emitted
 *     (collapsed lines of fewer than 2 distinct points, or closed loops of
 *     fewer than 3, are dropped);
 *   - every point lies on a grid edge between two unmasked nodes;
 *   - lines are oriented with the above-level side on the left in the
 *     (x right, y up) index frame, so a closed loop around a minimum runs
 *     clockwise and one around a maximum counter-clockwise;
 *   - closed loops have closed = 1 and do not repeat the first point;
 *     open lines end at the grid border or at a masked gap;
 *   - order is deterministic: open lines first, then closed loops, each
 *     in row-major order of the cell holding its first segment.
 * *out is emptied on entry; release it with sy_isoline_set_free(). */
int sy_contour_trace(const float *z, const unsigned char *mask, size_t nx,
                     size_t ny, double level, sy_isoline_set *out);
/* Frees the lines and leaves an empty set; safe on NULL and repeated calls. */
void sy_isoline_set_free(sy_isoline_set *set);

/* Length of a polyline in its own coordinate units, including the closing
 * segment of a closed loop.  0 for NULL or fewer than 2 points. */
double sy_polyline_length(const sy_polyline *pl);

/* Map every point of a set from grid-index to data coordinates in place:
 * x_data = x0 + dx * x_index, y_data = y0 + dy * y_index (e.g. x0 = first
 * departure jd_tdb, dx = grid step in days). */
void sy_isoline_set_to_data(sy_isoline_set *set, double x0, double dx,
                            double y0, double dy);

/* "Nice" levels a person would pick (1-2-5 steps x 10^k) covering
 * [zmin, zmax] with about `target` levels.  Writes at most `max` levels,
 * returns the count.  Every level is an integer multiple of the step,
 * rounded to the step's decimal places (0.3, never 0.30000000000000004),
 * and lies in [zmin, zmax].  Returns 0 when zmin == zmax (a flat field has
 * no iso-lines), when zmin > zmax, when either is non-finite, or when
 * target, max or levels is 0/NULL. */
size_t sy_nice_levels(double zmin, double zmax, size_t target,
                      double *levels, size_t max);

#ifdef __cplusplus
}
#endif
#endif
