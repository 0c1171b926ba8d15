/* check_contour.c - marching-squares iso-lines and nice contour levels.
 *
 * The references here are exact mathematics: fields whose iso-lines are
 * known in closed form (circles, hyperbolas, straight lines), the error
 * bound of linear interpolation, elementary plane geometry (shoelace area,
 * winding number, segment crossing) and combinatorial counts derived from
 * the definition of the method.  Grid spacing is h = 1 in index units.
 */
#include "config.h"
#include "synodic.h"
#include "synodic/contour.h"

#include "testutil.h"

#include <float.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#ifndef M_PI /* not in strict ISO C */
#define M_PI 3.14159265358979323846
#endif

/* Relative rounding of a double to float (round to nearest): 2^-24. */
#define FLOAT_REL 5.9604644775390625e-8

/* ------------------------------------------------------------------ */
/* helpers                                                             */

static float *grid_alloc(size_t nx, size_t ny)
{
    float *z = malloc(nx * ny * sizeof *z);
    ck_assert_ptr_nonnull(z);
    return z;
}

static int node_valid(const float *z, const unsigned char *mask, size_t k)
{
    return (!mask || !mask[k]) && isfinite((double)z[k]);
}

static int cell_valid(const float *z, const unsigned char *mask, size_t nx,
                      size_t ny, long i, long j)
{
    if (i < 0 || j < 0 || (size_t)i + 1 >= nx || (size_t)j + 1 >= ny)
        return 0;
    size_t k = (size_t)j * nx + (size_t)i;
    return node_valid(z, mask, k) && node_valid(z, mask, k + 1) &&
           node_valid(z, mask, k + nx) && node_valid(z, mask, k + nx + 1);
}

/* Number of crossing points the method must produce, counted straight from
 * its definition: an edge whose two (valid) ends lie on opposite sides of
 * the level (z >= level is above) and that borders at least one fully
 * valid cell.  Each such edge yields exactly one output point provided no
 * node equals the level (then no points merge). */
static size_t expected_crossings(const float *z, const unsigned char *mask,
                                 size_t nx, size_t ny, double level)
{
    size_t count = 0;
    for (size_t j = 0; j < ny; j++)
        for (size_t i = 0; i < nx; i++) {
            size_t k = j * nx + i;
            if (!node_valid(z, mask, k))
                continue;
            int a = (double)z[k] >= level;
            if (i + 1 < nx && node_valid(z, mask, k + 1) &&
                a != ((double)z[k + 1] >= level) &&
                (cell_valid(z, mask, nx, ny, (long)i, (long)j - 1) ||
                 cell_valid(z, mask, nx, ny, (long)i, (long)j)))
                count++;
            if (j + 1 < ny && node_valid(z, mask, k + nx) &&
                a != ((double)z[k + nx] >= level) &&
                (cell_valid(z, mask, nx, ny, (long)i - 1, (long)j) ||
                 cell_valid(z, mask, nx, ny, (long)i, (long)j)))
                count++;
        }
    return count;
}

static size_t total_points(const sy_isoline_set *s)
{
    size_t n = 0;
    for (size_t k = 0; k < s->nlines; k++)
        n += s->lines[k].n;
    return n;
}

/* Structural invariants every result must satisfy. */
static void check_basic(const sy_isoline_set *s, size_t nx, size_t ny)
{
    for (size_t k = 0; k < s->nlines; k++) {
        const sy_polyline *pl = &s->lines[k];
        ck_assert_ptr_nonnull(pl->xy);
        ck_assert(pl->closed == 0 || pl->closed == 1);
        ck_assert_uint_ge(pl->n, pl->closed ? 3 : 2);
        for (size_t p = 0; p < pl->n; p++) {
            double x = pl->xy[2 * p], y = pl->xy[2 * p + 1];
            ck_assert(isfinite(x) && isfinite(y));
            ck_assert(x >= 0.0 && x <= (double)(nx - 1));
            ck_assert(y >= 0.0 && y <= (double)(ny - 1));
            /* every crossing lies on a grid edge */
            ck_assert(x == floor(x) || y == floor(y));
            size_t q = p + 1 < pl->n ? p + 1 : 0;
            if (q == 0 && !pl->closed)
                continue;
            double dx = pl->xy[2 * q] - x, dy = pl->xy[2 * q + 1] - y;
            /* no zero-length segment, and each segment stays in one cell */
            ck_assert(dx != 0.0 || dy != 0.0);
            ck_assert(fabs(dx) <= 1.0 && fabs(dy) <= 1.0);
        }
    }
}

/* An open line must end on an edge whose other neighbouring cell is
 * missing (grid border) or a gap: the definition of an end. */
static int ends_at_gap_or_border(const float *z, const unsigned char *mask,
                                 size_t nx, size_t ny, double x, double y)
{
    if (y == floor(y)) {
        long i = (long)floor(x), j = (long)y;
        return !cell_valid(z, mask, nx, ny, i, j - 1) ||
               !cell_valid(z, mask, nx, ny, i, j);
    }
    long i = (long)x, j = (long)floor(y);
    return !cell_valid(z, mask, nx, ny, i - 1, j) ||
           !cell_valid(z, mask, nx, ny, i, j);
}

static int on_border(double x, double y, size_t nx, size_t ny)
{
    return x == 0.0 || y == 0.0 || x == (double)(nx - 1) ||
           y == (double)(ny - 1);
}

static double orient(const double *a, const double *b, const double *c)
{
    return (b[0] - a[0]) * (c[1] - a[1]) - (b[1] - a[1]) * (c[0] - a[0]);
}

/* Proper crossing of segments ab and cd (plane geometry). */
static int segments_cross(const double *a, const double *b, const double *c,
                          const double *d)
{
    double o1 = orient(a, b, c), o2 = orient(a, b, d);
    double o3 = orient(c, d, a), o4 = orient(c, d, b);
    return ((o1 > 0 && o2 < 0) || (o1 < 0 && o2 > 0)) &&
           ((o3 > 0 && o4 < 0) || (o3 < 0 && o4 > 0));
}

/* Count proper crossings between any two segments of the set. */
static size_t count_crossings(const sy_isoline_set *s)
{
    size_t nseg = 0;
    for (size_t k = 0; k < s->nlines; k++)
        nseg += s->lines[k].closed ? s->lines[k].n : s->lines[k].n - 1;
    const double **pa = malloc(nseg * sizeof *pa);
    const double **pb = malloc(nseg * sizeof *pb);
    ck_assert(pa && pb);
    size_t m = 0;
    for (size_t k = 0; k < s->nlines; k++) {
        const sy_polyline *pl = &s->lines[k];
        size_t ns = pl->closed ? pl->n : pl->n - 1;
        for (size_t p = 0; p < ns; p++) {
            pa[m] = &pl->xy[2 * p];
            pb[m] = &pl->xy[2 * ((p + 1) % pl->n)];
            m++;
        }
    }
    size_t crossings = 0;
    for (size_t u = 0; u < m; u++)
        for (size_t v = u + 1; v < m; v++)
            crossings += (size_t)segments_cross(pa[u], pb[u], pa[v], pb[v]);
    free(pa);
    free(pb);
    return crossings;
}

static double shoelace(const sy_polyline *pl)
{
    double a = 0.0;
    for (size_t p = 0; p < pl->n; p++) {
        size_t q = (p + 1) % pl->n;
        a += pl->xy[2 * p] * pl->xy[2 * q + 1] - pl->xy[2 * q] * pl->xy[2 * p + 1];
    }
    return 0.5 * a;
}

/* Winding number of a closed polyline about (cx, cy). */
static long winding(const sy_polyline *pl, double cx, double cy)
{
    double total = 0.0;
    for (size_t p = 0; p < pl->n; p++) {
        size_t q = (p + 1) % pl->n;
        double a0 = atan2(pl->xy[2 * p + 1] - cy, pl->xy[2 * p] - cx);
        double a1 = atan2(pl->xy[2 * q + 1] - cy, pl->xy[2 * q] - cx);
        double d = a1 - a0;
        while (d > M_PI)
            d -= 2.0 * M_PI;
        while (d < -M_PI)
            d += 2.0 * M_PI;
        total += d;
    }
    return lround(total / (2.0 * M_PI));
}

static int sets_identical(const sy_isoline_set *a, const sy_isoline_set *b)
{
    if (a->nlines != b->nlines)
        return 0;
    for (size_t k = 0; k < a->nlines; k++) {
        const sy_polyline *p = &a->lines[k], *q = &b->lines[k];
        if (p->n != q->n || p->closed != q->closed ||
            memcmp(p->xy, q->xy, 2 * p->n * sizeof(double)) != 0)
            return 0;
    }
    return 1;
}

/* ------------------------------------------------------------------ */
/* paraboloid: circles                                                 */

enum { PNX = 101, PNY = 81 };
static const double PCX = 50.3, PCY = 40.1;

static float *paraboloid(double sign)
{
    float *z = grid_alloc(PNX, PNY);
    for (size_t j = 0; j < PNY; j++)
        for (size_t i = 0; i < PNX; i++) {
            double dx = (double)i - PCX, dy = (double)j - PCY;
            z[j * PNX + i] = (float)(sign * (dx * dx + dy * dy));
        }
    return z;
}

/* Exact mathematics: along a horizontal edge z(x) = (x-cx)^2 + const has
 * z'' = 2, and the chord L through the end values exceeds z by
 * (x-xa)(xb-x) in [0, h^2/4].  The traced point is where L = R^2, so
 * z(p) = |p-c|^2 lies in [R^2 - h^2/4, R^2]; likewise on vertical edges.
 * Storing z as float perturbs each node by <= 2^-24 z, which shifts L (a
 * convex combination) by at most that much.  Hence with
 *   fe = 2^-24 (R + 1)^2   (nodes next to a crossing are within R + 1)
 *   -h^2/4 - fe <= |p-c|^2 - R^2 <= fe,
 * and radially R - |p-c| <= (h^2/4 + fe) / (R + sqrt(R^2 - h^2/4 - fe)),
 * about h^2/(8R). */
static void check_circle_point(double x, double y, double R, double *dr_max)
{
    double fe = FLOAT_REL * (R + 1.0) * (R + 1.0) + 1e-9;
    double q = (x - PCX) * (x - PCX) + (y - PCY) * (y - PCY) - R * R;
    ck_assert_msg(q >= -0.25 - fe && q <= fe,
                  "point (%g, %g): |p-c|^2 - R^2 = %g outside [-1/4, 0]", x,
                  y, q);
    double dr_bound = (0.25 + fe) / (R + sqrt(R * R - 0.25 - fe));
    double r = hypot(x - PCX, y - PCY);
    ck_assert_msg(r - R <= fe / R && R - r <= dr_bound,
                  "point radius %.9g vs R %.9g, bound %.3g", r, R, dr_bound);
    if (dr_max && R - r > *dr_max)
        *dr_max = R - r;
}

START_TEST(test_paraboloid_circles)
{
    static const double radii[] = {3.7, 5.0, 12.5, 20.0, 33.0};
    float *z = paraboloid(1.0);
    for (size_t k = 0; k < sizeof radii / sizeof radii[0]; k++) {
        double R = radii[k], level = R * R;
        sy_isoline_set s;
        ck_assert_int_eq(sy_contour_trace(z, NULL, PNX, PNY, level, &s), SY_OK);
        ck_assert_double_eq(s.level, level);
        check_basic(&s, PNX, PNY);
        /* exact topology: one closed loop per level */
        ck_assert_uint_eq(s.nlines, 1);
        ck_assert_int_eq(s.lines[0].closed, 1);
        ck_assert_uint_eq(total_points(&s),
                          expected_crossings(z, NULL, PNX, PNY, level));
        double dr = 0.0;
        for (size_t p = 0; p < s.lines[0].n; p++)
            check_circle_point(s.lines[0].xy[2 * p], s.lines[0].xy[2 * p + 1],
                               R, &dr);
        /* Orientation promised by contour.h: above on the left, so the
         * loop around this minimum is clockwise (winding -1). */
        ck_assert_int_eq(winding(&s.lines[0], PCX, PCY), -1);
        ck_assert_uint_eq(count_crossings(&s), 0);
        /* Area, exact geometry: all vertices lie in the closed disc, so the
         * simple loop (no crossings, winding 1) lies inside it: |A| <=
         * pi R^2.  Each edge lies in one cell (length c <= sqrt 2) with
         * ends at radius >= R - dr, so its distance from the centre is >=
         * sqrt((R-dr)^2 - c^2/4); the loop thus encloses the disc of that
         * radius: pi R^2 - |A| <= pi (2 R dr + 1/2). */
        double A = shoelace(&s.lines[0]);
        double disc = M_PI * R * R;
        ck_assert_msg(A < 0.0, "loop around a minimum must be clockwise");
        ck_assert_msg(-A <= disc * (1.0 + 1e-12),
                      "area %.9g exceeds pi R^2 %.9g", -A, disc);
        ck_assert_msg(disc + A <= M_PI * (2.0 * R * dr + 0.5),
                      "area %.9g short of pi R^2 %.9g by more than the bound",
                      -A, disc);
        /* a closed curve enclosing the disc of radius
         * rho = sqrt((R-dr)^2 - 1/2) (see above) is at least 2 pi rho long */
        double len = sy_polyline_length(&s.lines[0]);
        ck_assert(len >= 2.0 * M_PI * sqrt((R - dr) * (R - dr) - 0.5));
        sy_isoline_set_free(&s);
        ck_assert_ptr_null(s.lines);
        ck_assert_uint_eq(s.nlines, 0);
    }
    free(z);

    /* Inverted: loops around a maximum run counter-clockwise. */
    z = paraboloid(-1.0);
    sy_isoline_set s;
    ck_assert_int_eq(sy_contour_trace(z, NULL, PNX, PNY, -144.0, &s), SY_OK);
    ck_assert_uint_eq(s.nlines, 1);
    ck_assert_int_eq(s.lines[0].closed, 1);
    ck_assert_int_eq(winding(&s.lines[0], PCX, PCY), 1);
    ck_assert(shoelace(&s.lines[0]) > 0.0);
    sy_isoline_set_free(&s);
    free(z);
}
END_TEST

/* ------------------------------------------------------------------ */
/* saddles                                                              */

/* z = x*y with x = i - 50.5, y = j - 40.5: the saddle sits at a cell
 * centre and every node value is an exact quarter-integer in float. */
static float *saddle_xy(void)
{
    float *z = grid_alloc(PNX, PNY);
    for (size_t j = 0; j < PNY; j++)
        for (size_t i = 0; i < PNX; i++)
            z[j * PNX + i] = (float)(((double)i - 50.5) * ((double)j - 40.5));
    return z;
}

/* 1 when every point has (x - ox) * sx >= 0 and (y - oy) * sy >= 0
 * (strictly > 0 when strict). */
static int all_in_quadrant(const sy_polyline *pl, double ox, double oy,
                           int sx, int sy, int strict)
{
    for (size_t p = 0; p < pl->n; p++) {
        double x = (pl->xy[2 * p] - ox) * sx, y = (pl->xy[2 * p + 1] - oy) * sy;
        if (strict ? (x <= 0.0 || y <= 0.0) : (x < 0.0 || y < 0.0))
            return 0;
    }
    return 1;
}

START_TEST(test_saddle_xy)
{
    /* levels through (0), just off (+-0.1: the saddle cell is case 5/10 and
     * is resolved by its centre value 0) and away from the saddle point. */
    static const double levels[] = {0.0, 0.1, -0.1, 5.0, -5.0, 30.0, -30.0};
    float *z = saddle_xy();
    for (size_t k = 0; k < sizeof levels / sizeof levels[0]; k++) {
        double c = levels[k];
        sy_isoline_set s;
        ck_assert_int_eq(sy_contour_trace(z, NULL, PNX, PNY, c, &s), SY_OK);
        check_basic(&s, PNX, PNY);
        /* Exact mathematics: x*y = c is a hyperbola with one branch in each
         * of quadrants I and III (c > 0) or II and IV (c < 0).  For c = 0
         * the exact set is the two axes; with z >= level counted as above,
         * quadrants I and III are joined and II, IV are cut off (the limit
         * of c -> 0-). */
        ck_assert_uint_eq(s.nlines, 2);
        ck_assert_uint_eq(total_points(&s),
                          expected_crossings(z, NULL, PNX, PNY, c));
        int sgn = c > 0.0 ? 1 : -1;
        int strict = c != 0.0;
        int found_a = 0, found_b = 0;
        for (size_t l = 0; l < 2; l++) {
            const sy_polyline *pl = &s.lines[l];
            ck_assert_int_eq(pl->closed, 0);
            ck_assert(on_border(pl->xy[0], pl->xy[1], PNX, PNY));
            ck_assert(on_border(pl->xy[2 * pl->n - 2], pl->xy[2 * pl->n - 1],
                                PNX, PNY));
            /* z is bilinear, hence linear along every grid edge: linear
             * interpolation is exact, points lie on the hyperbola to
             * rounding (exact mathematics). */
            for (size_t p = 0; p < pl->n; p++) {
                double x = pl->xy[2 * p] - 50.5, y = pl->xy[2 * p + 1] - 40.5;
                /* rounding: a few ulps of the largest |z| = 50.5 * 40.5 */
                ck_assert_msg(fabs(x * y - c) <= 64.0 * DBL_EPSILON * 2046.0,
                              "level %g: x*y = %.17g", c, x * y);
            }
            if (all_in_quadrant(pl, 50.5, 40.5, 1, sgn, strict))
                found_a++;
            else if (all_in_quadrant(pl, 50.5, 40.5, -1, -sgn, strict))
                found_b++;
        }
        ck_assert_msg(found_a == 1 && found_b == 1,
                      "level %g: branches not in the expected quadrants", c);
        ck_assert_uint_eq(count_crossings(&s), 0);
        sy_isoline_set_free(&s);
    }
    free(z);
}
END_TEST

START_TEST(test_saddle_x2_minus_y2)
{
    const double cx = 50.3, cy = 40.6; /* saddle inside cell (50, 40) */
    float *z = grid_alloc(PNX, PNY);
    double zmax = 0.0;
    for (size_t j = 0; j < PNY; j++)
        for (size_t i = 0; i < PNX; i++) {
            double x = (double)i - cx, y = (double)j - cy;
            z[j * PNX + i] = (float)(x * x - y * y);
            if (fabs(x * x - y * y) > zmax)
                zmax = fabs(x * x - y * y);
        }
    double fe = FLOAT_REL * zmax + 1e-9;
    static const double levels[] = {0.0, 0.05, -0.05, 3.0, -3.0, 20.0, -20.0};
    for (size_t k = 0; k < sizeof levels / sizeof levels[0]; k++) {
        double c = levels[k];
        sy_isoline_set s;
        ck_assert_int_eq(sy_contour_trace(z, NULL, PNX, PNY, c, &s), SY_OK);
        check_basic(&s, PNX, PNY);
        /* exact topology: two hyperbola branches (two non-crossing lines
         * when c = 0), each running border to border */
        ck_assert_uint_eq(s.nlines, 2);
        ck_assert_uint_eq(count_crossings(&s), 0);
        ck_assert_uint_eq(total_points(&s),
                          expected_crossings(z, NULL, PNX, PNY, c));
        int side_neg = 0, side_pos = 0;
        for (size_t l = 0; l < 2; l++) {
            const sy_polyline *pl = &s.lines[l];
            ck_assert_int_eq(pl->closed, 0);
            ck_assert(on_border(pl->xy[0], pl->xy[1], PNX, PNY));
            ck_assert(on_border(pl->xy[2 * pl->n - 2], pl->xy[2 * pl->n - 1],
                                PNX, PNY));
            int neg = 1, pos = 1;
            for (size_t p = 0; p < pl->n; p++) {
                double xi = pl->xy[2 * p], yi = pl->xy[2 * p + 1];
                double x = xi - cx, y = yi - cy;
                double q = x * x - y * y - c;
                /* Exact mathematics (linear interpolation error): on a
                 * horizontal edge z'' = +2 so the chord lies above z and
                 * z(p) in [c - h^2/4, c]; on a vertical edge z'' = -2 and
                 * z(p) in [c, c + h^2/4]; fe covers float storage. */
                if (yi == floor(yi))
                    ck_assert_msg(q >= -0.25 - fe && q <= fe,
                                  "level %g: residual %g on a row edge", c, q);
                else
                    ck_assert_msg(q >= -fe && q <= 0.25 + fe,
                                  "level %g: residual %g on a column edge", c,
                                  q);
                double side = c > 0.0 ? x : y;
                if (side >= 0.0)
                    neg = 0;
                if (side <= 0.0)
                    pos = 0;
            }
            side_neg += neg;
            side_pos += pos;
        }
        /* For |c| >= 3 the branches x = +-sqrt(c + y^2) (c > 0) or
         * y = +-sqrt(y^2 - c) (c < 0) stay >= sqrt(3 - 1/4) from the axis
         * through the saddle, beyond the interpolation error. */
        if (fabs(c) >= 3.0)
            ck_assert_msg(side_neg == 1 && side_pos == 1,
                          "level %g: branches not separated", c);
        sy_isoline_set_free(&s);
    }
    free(z);
}
END_TEST

/* A single cell exercising both saddle cases and both centre decisions. */
static int has_segment(const sy_isoline_set *s, double x0, double y0,
                       double x1, double y1)
{
    for (size_t k = 0; k < s->nlines; k++) {
        const sy_polyline *pl = &s->lines[k];
        if (pl->n == 2 && !pl->closed && fabs(pl->xy[0] - x0) < 1e-12 &&
            fabs(pl->xy[1] - y0) < 1e-12 && fabs(pl->xy[2] - x1) < 1e-12 &&
            fabs(pl->xy[3] - y1) < 1e-12)
            return 1;
    }
    return 0;
}

START_TEST(test_saddle_single_cell)
{
    /* Row-major 2x2: z[0] = (0,0), z[1] = (1,0), z[2] = (0,1), z[3] = (1,1).
     * Diagonal (0,0),(1,1) = 1, the other diagonal 0: bilinear interpolant
     * z = 1 - x - y + 2xy, saddle value 1/2 at the centre (exact
     * mathematics).  Level 0.4 < 1/2: the high diagonal is connected, the
     * low corners are cut off; level 0.6 > 1/2: the high corners are cut
     * off.  Directions follow the "above on the left" rule. */
    const float z5[4] = {1.0f, 0.0f, 0.0f, 1.0f};
    sy_isoline_set s;
    ck_assert_int_eq(sy_contour_trace(z5, NULL, 2, 2, 0.4, &s), SY_OK);
    ck_assert_uint_eq(s.nlines, 2);
    ck_assert(has_segment(&s, 0.6, 0.0, 1.0, 0.4)); /* around (1,0) */
    ck_assert(has_segment(&s, 0.4, 1.0, 0.0, 0.6)); /* around (0,1) */
    sy_isoline_set_free(&s);
    ck_assert_int_eq(sy_contour_trace(z5, NULL, 2, 2, 0.6, &s), SY_OK);
    ck_assert_uint_eq(s.nlines, 2);
    ck_assert(has_segment(&s, 0.4, 0.0, 0.0, 0.4)); /* around (0,0) */
    ck_assert(has_segment(&s, 0.6, 1.0, 1.0, 0.6)); /* around (1,1) */
    sy_isoline_set_free(&s);
    /* Level exactly the centre value counts as above: same as 0.4. */
    ck_assert_int_eq(sy_contour_trace(z5, NULL, 2, 2, 0.5, &s), SY_OK);
    ck_assert_uint_eq(s.nlines, 2);
    ck_assert(has_segment(&s, 0.5, 0.0, 1.0, 0.5));
    ck_assert(has_segment(&s, 0.5, 1.0, 0.0, 0.5));
    sy_isoline_set_free(&s);

    /* Case 10: the other diagonal high. */
    const float z10[4] = {0.0f, 1.0f, 1.0f, 0.0f};
    ck_assert_int_eq(sy_contour_trace(z10, NULL, 2, 2, 0.4, &s), SY_OK);
    ck_assert_uint_eq(s.nlines, 2);
    ck_assert(has_segment(&s, 0.0, 0.4, 0.4, 0.0)); /* around (0,0) */
    ck_assert(has_segment(&s, 1.0, 0.6, 0.6, 1.0)); /* around (1,1) */
    sy_isoline_set_free(&s);
    ck_assert_int_eq(sy_contour_trace(z10, NULL, 2, 2, 0.6, &s), SY_OK);
    ck_assert_uint_eq(s.nlines, 2);
    ck_assert(has_segment(&s, 1.0, 0.4, 0.6, 0.0)); /* around (1,0) */
    ck_assert(has_segment(&s, 0.0, 0.6, 0.4, 1.0)); /* around (0,1) */
    sy_isoline_set_free(&s);
}
END_TEST

/* ------------------------------------------------------------------ */
/* gaps                                                                 */

START_TEST(test_masked_band)
{
    const double R = 20.0;
    float *z = paraboloid(1.0);
    unsigned char *mask = calloc(PNX * PNY, 1);
    ck_assert_ptr_nonnull(mask);
    for (size_t j = 38; j <= 42; j++)
        memset(mask + j * PNX, 1, PNX);

    sy_isoline_set sm;
    ck_assert_int_eq(sy_contour_trace(z, mask, PNX, PNY, R * R, &sm), SY_OK);
    check_basic(&sm, PNX, PNY);
    /* Masked nodes in rows 38..42 make cell rows 37..42 gaps, i.e. the open
     * strip 37 < y < 43.  The circle (which spans 20.1 <= y <= 60.1) is cut
     * into a lower and an upper arc, each ending on the gap's edge. */
    ck_assert_uint_eq(sm.nlines, 2);
    ck_assert_uint_eq(total_points(&sm),
                      expected_crossings(z, mask, PNX, PNY, R * R));
    int lower = 0, upper = 0;
    for (size_t l = 0; l < 2; l++) {
        const sy_polyline *pl = &sm.lines[l];
        ck_assert_int_eq(pl->closed, 0);
        int is_upper = pl->xy[1] > 40.0;
        double edge = is_upper ? 43.0 : 37.0;
        ck_assert_double_eq(pl->xy[1], edge);
        ck_assert_double_eq(pl->xy[2 * pl->n - 1], edge);
        ck_assert(ends_at_gap_or_border(z, mask, PNX, PNY, pl->xy[0],
                                        pl->xy[1]));
        ck_assert(ends_at_gap_or_border(z, mask, PNX, PNY,
                                        pl->xy[2 * pl->n - 2],
                                        pl->xy[2 * pl->n - 1]));
        for (size_t p = 0; p < pl->n; p++) {
            double y = pl->xy[2 * p + 1];
            ck_assert_msg(!(y > 37.0 && y < 43.0), "point inside the gap y=%g",
                          y);
            ck_assert(is_upper ? y >= 43.0 : y <= 37.0);
            check_circle_point(pl->xy[2 * p], y, R, NULL);
        }
        upper += is_upper;
        lower += !is_upper;
    }
    ck_assert_int_eq(upper, 1);
    ck_assert_int_eq(lower, 1);

    /* Non-finite z is masked: NaN rows (and +-inf rows) give the same
     * bytes as the mask. */
    float *zn = paraboloid(1.0);
    for (size_t j = 38; j <= 42; j++)
        for (size_t i = 0; i < PNX; i++)
            zn[j * PNX + i] = j == 40 ? INFINITY : (j == 41 ? -INFINITY : NAN);
    sy_isoline_set sn;
    ck_assert_int_eq(sy_contour_trace(zn, NULL, PNX, PNY, R * R, &sn), SY_OK);
    ck_assert(sets_identical(&sm, &sn));
    sy_isoline_set_free(&sn);

    /* Everything masked: nothing to trace, still SY_OK. */
    memset(mask, 1, PNX * PNY);
    ck_assert_int_eq(sy_contour_trace(z, mask, PNX, PNY, R * R, &sn), SY_OK);
    ck_assert_uint_eq(sn.nlines, 0);
    sy_isoline_set_free(&sn);

    sy_isoline_set_free(&sm);
    free(zn);
    free(mask);
    free(z);
}
END_TEST

/* ------------------------------------------------------------------ */
/* planes: straight lines and levels on node values                    */

START_TEST(test_plane_lines)
{
    const size_t nx = 101, ny = 81;
    float *z = grid_alloc(nx, ny);
    for (size_t j = 0; j < ny; j++)
        for (size_t i = 0; i < nx; i++)
            z[j * nx + i] = (float)i; /* z = x */

    /* Exact mathematics: z = x is linear, so x = level exactly; the line
     * crosses every row once.  Above (x >= level) on the left means the
     * line runs downward (decreasing y). */
    static const double levels[] = {37.25, 37.0, 100.0};
    for (size_t k = 0; k < 3; k++) {
        double c = levels[k];
        sy_isoline_set s;
        ck_assert_int_eq(sy_contour_trace(z, NULL, nx, ny, c, &s), SY_OK);
        check_basic(&s, nx, ny);
        ck_assert_uint_eq(s.nlines, 1);
        const sy_polyline *pl = &s.lines[0];
        ck_assert_int_eq(pl->closed, 0);
        ck_assert_uint_eq(pl->n, ny); /* no duplicated point */
        for (size_t p = 0; p < pl->n; p++) {
            ck_assert_double_eq(pl->xy[2 * p], c);
            ck_assert_double_eq(pl->xy[2 * p + 1], (double)(ny - 1 - p));
        }
        ck_assert_double_eq(sy_polyline_length(pl), (double)(ny - 1));
        if (k == 0) {
            /* index -> data mapping, e.g. jd_tdb along x, days along y */
            sy_isoline_set_to_data(&s, 2461000.5, 2.0, 100.0, 0.5);
            ck_assert_double_eq_tol(pl->xy[0], 2461000.5 + 74.5, 1e-9);
            ck_assert_double_eq_tol(pl->xy[1], 100.0 + 40.0, 1e-12);
            ck_assert_double_eq_tol(pl->xy[2 * ny - 1], 100.0, 1e-12);
        }
        sy_isoline_set_free(&s);
    }
    /* Level equal to the minimum: every node is "above" (z >= level), no
     * line; levels outside the data give none either. */
    static const double none[] = {0.0, -1.0, 100.5};
    for (size_t k = 0; k < 3; k++) {
        sy_isoline_set s;
        ck_assert_int_eq(sy_contour_trace(z, NULL, nx, ny, none[k], &s), SY_OK);
        ck_assert_uint_eq(s.nlines, 0);
        sy_isoline_set_free(&s);
    }

    /* z = x + y at level 50 runs exactly through the 51 nodes with
     * i + j = 50 (0 <= j <= 50).  Cells with i + j = 48 have only their far
     * corner at the level and would give zero-length segments; none may be
     * output and no node may repeat. */
    for (size_t j = 0; j < ny; j++)
        for (size_t i = 0; i < nx; i++)
            z[j * nx + i] = (float)(i + j);
    sy_isoline_set s;
    ck_assert_int_eq(sy_contour_trace(z, NULL, nx, ny, 50.0, &s), SY_OK);
    check_basic(&s, nx, ny);
    ck_assert_uint_eq(s.nlines, 1);
    const sy_polyline *pl = &s.lines[0];
    ck_assert_int_eq(pl->closed, 0);
    ck_assert_uint_eq(pl->n, 51);
    for (size_t p = 0; p < pl->n; p++) {
        double x = pl->xy[2 * p], y = pl->xy[2 * p + 1];
        ck_assert_double_eq(x + y, 50.0);
        ck_assert_double_eq(x, floor(x));
        if (p > 0)
            ck_assert_double_eq(fabs(x - pl->xy[2 * p - 2]), 1.0);
        if (p > 1) /* strictly monotone: no node visited twice */
            ck_assert((x - pl->xy[2 * p - 2]) * (pl->xy[2 * p - 2] - pl->xy[2 * p - 4]) > 0);
    }
    ck_assert_double_eq_tol(sy_polyline_length(pl), 50.0 * sqrt(2.0), 1e-12);
    sy_isoline_set_free(&s);

    /* An isolated maximum exactly at the level shrinks to a point: no
     * output at all. */
    for (size_t k = 0; k < nx * ny; k++)
        z[k] = 0.0f;
    z[40 * nx + 50] = 1.0f;
    ck_assert_int_eq(sy_contour_trace(z, NULL, nx, ny, 1.0, &s), SY_OK);
    ck_assert_uint_eq(s.nlines, 0);
    sy_isoline_set_free(&s);
    ck_assert_int_eq(sy_contour_trace(z, NULL, nx, ny, 0.5, &s), SY_OK);
    ck_assert_uint_eq(s.nlines, 1); /* a diamond of 4 edge midpoints */
    ck_assert_int_eq(s.lines[0].closed, 1);
    ck_assert_uint_eq(s.lines[0].n, 4);
    ck_assert_double_eq_tol(shoelace(&s.lines[0]), 0.5, 1e-15);
    sy_isoline_set_free(&s);
    free(z);
}
END_TEST

/* ------------------------------------------------------------------ */
/* arguments                                                            */

START_TEST(test_arguments)
{
    const float z[4] = {0.0f, 1.0f, 2.0f, 3.0f};
    sy_isoline_set s;
    ck_assert_int_eq(sy_contour_trace(z, NULL, 2, 2, 1.5, NULL), SY_ERR_ARG);
    ck_assert_int_eq(sy_contour_trace(NULL, NULL, 2, 2, 1.5, &s), SY_ERR_ARG);
    ck_assert_ptr_null(s.lines);
    ck_assert_uint_eq(s.nlines, 0);
    ck_assert_int_eq(sy_contour_trace(z, NULL, 1, 4, 1.5, &s), SY_ERR_ARG);
    ck_assert_int_eq(sy_contour_trace(z, NULL, 4, 1, 1.5, &s), SY_ERR_ARG);
    ck_assert_int_eq(sy_contour_trace(z, NULL, 2, 2, NAN, &s), SY_ERR_ARG);
    ck_assert_int_eq(sy_contour_trace(z, NULL, 2, 2, INFINITY, &s), SY_ERR_ARG);
    ck_assert_int_eq(sy_contour_trace(z, NULL, (size_t)1 << 40,
                                      (size_t)1 << 40, 1.5, &s), SY_ERR_ARG);
    ck_assert_uint_eq(s.nlines, 0);
    sy_isoline_set_free(&s);
    sy_isoline_set_free(&s); /* twice is harmless */
    sy_isoline_set_free(NULL);
    ck_assert_double_eq(sy_polyline_length(NULL), 0.0);
}
END_TEST

/* ------------------------------------------------------------------ */
/* nice levels                                                          */

static void check_levels_eq(const double *got, size_t n, const double *want,
                            size_t nwant)
{
    ck_assert_uint_eq(n, nwant);
    for (size_t k = 0; k < n; k++)
        ck_assert_msg(got[k] == want[k], "level %zu: %.17g, want %.17g", k,
                      got[k], want[k]);
}

START_TEST(test_nice_levels_examples)
{
    double lv[64];
    /* 1-2-5 series (common practice).  Expected values are compared with
     * == against decimal literals: each level must be the double nearest
     * its decimal value. */
    static const double a[] = {0, 10, 20, 30, 40, 50, 60, 70, 80, 90};
    check_levels_eq(lv, sy_nice_levels(0.0, 97.0, 10, lv, 64), a, 10);
    static const double b[] = {5, 10, 15, 20, 25, 30, 35, 40, 45};
    check_levels_eq(lv, sy_nice_levels(3.2, 47.0, 8, lv, 64), b, 9);
    static const double c[] = {0.02, 0.04, 0.06, 0.08};
    check_levels_eq(lv, sy_nice_levels(0.013, 0.087, 5, lv, 64), c, 4);
    static const double d[] = {0.0, 0.1, 0.2, 0.3, 0.4, 0.5,
                               0.6, 0.7, 0.8, 0.9, 1.0};
    check_levels_eq(lv, sy_nice_levels(0.0, 1.0, 10, lv, 64), d, 11);
    ck_assert(lv[3] == 0.3); /* not 0.30000000000000004 */
    static const double e[] = {-250, -200, -150, -100, -50, 0};
    check_levels_eq(lv, sy_nice_levels(-250.0, 30.0, 6, lv, 64), e, 6);
    ck_assert(!signbit(lv[5])); /* +0, not -0 */
    static const double f[] = {1.5e-7, 1.6e-7, 1.7e-7, 1.8e-7, 1.9e-7, 2e-7};
    check_levels_eq(lv, sy_nice_levels(1.47e-7, 2.03e-7, 6, lv, 64), f, 6);
    /* C3 in km^2/s^2, a typical porkchop range */
    static const double g[] = {10, 20, 30, 40, 50, 60, 70, 80, 90, 100};
    check_levels_eq(lv, sy_nice_levels(8.6, 104.2, 10, lv, 64), g, 10);
    /* max limits the count: steps of 20 would need 5 slots, so 50 */
    static const double h[] = {0, 50};
    check_levels_eq(lv, sy_nice_levels(0.0, 97.0, 10, lv, 4), h, 2);
}
END_TEST

START_TEST(test_nice_levels_degenerate)
{
    double lv[16];
    ck_assert_uint_eq(sy_nice_levels(5.0, 5.0, 10, lv, 16), 0);
    ck_assert_uint_eq(sy_nice_levels(10.0, 1.0, 10, lv, 16), 0);
    ck_assert_uint_eq(sy_nice_levels(NAN, 1.0, 10, lv, 16), 0);
    ck_assert_uint_eq(sy_nice_levels(0.0, NAN, 10, lv, 16), 0);
    ck_assert_uint_eq(sy_nice_levels(-INFINITY, 1.0, 10, lv, 16), 0);
    ck_assert_uint_eq(sy_nice_levels(0.0, INFINITY, 10, lv, 16), 0);
    ck_assert_uint_eq(sy_nice_levels(-DBL_MAX, DBL_MAX, 10, lv, 16), 0);
    ck_assert_uint_eq(sy_nice_levels(0.0, 1.0, 0, lv, 16), 0);
    ck_assert_uint_eq(sy_nice_levels(0.0, 1.0, 10, NULL, 16), 0);
    ck_assert_uint_eq(sy_nice_levels(0.0, 1.0, 10, lv, 0), 0);
}
END_TEST

/* Properties over many ranges (deterministic LCG): levels ascending,
 * inside the range, evenly spaced by s = m 10^e with m in {1, 2, 5}, each
 * an integer multiple of s, printed with the step's decimals and read back
 * unchanged (rounded to the step's decimal places), covering the range
 * (no whole step left free at either end), and about target in number. */
START_TEST(test_nice_levels_properties)
{
    unsigned long long st = 12345;
    double lv[200];
    for (int trial = 0; trial < 2000; trial++) {
        st = st * 6364136223846793005ULL + 1442695040888963407ULL;
        double u1 = (double)(st >> 11) / 9007199254740992.0;
        st = st * 6364136223846793005ULL + 1442695040888963407ULL;
        double u2 = (double)(st >> 11) / 9007199254740992.0;
        st = st * 6364136223846793005ULL + 1442695040888963407ULL;
        size_t target = 2 + (size_t)((st >> 33) % 20);
        double scale = pow(10.0, floor(u1 * 12.0) - 6.0);
        double zmin = (u1 * 20.0 - 10.0) * scale;
        double zmax = zmin + (0.01 + u2 * 10.0) * scale;
        size_t n = sy_nice_levels(zmin, zmax, target, lv, 200);
        ck_assert_uint_ge(n, 1);
        double step = n > 1 ? lv[1] - lv[0] : 0.0;
        int e = n > 1 ? (int)floor(log10(step) + 1e-9) : 0;
        double m = n > 1 ? step / pow(10.0, e) : 1.0;
        if (n > 1) {
            ck_assert_msg(fabs(m - 1.0) < 1e-6 || fabs(m - 2.0) < 1e-6 ||
                              fabs(m - 5.0) < 1e-6,
                          "step %.17g is not 1-2-5", step);
            ck_assert_msg(fabs((double)n - (double)target) <=
                              (double)target * 0.75 + 1.0,
                          "%zu levels for target %zu", n, target);
            ck_assert(lv[0] - zmin < step);
            ck_assert(zmax - lv[n - 1] < step);
        }
        double s_exact = fabs(m - 1.0) < 1e-6 ? 1.0 : (fabs(m - 2.0) < 1e-6 ? 2.0 : 5.0);
        for (size_t k = 0; k < n; k++) {
            ck_assert(lv[k] >= zmin && lv[k] <= zmax);
            if (k > 0) {
                ck_assert(lv[k] > lv[k - 1]);
                ck_assert(fabs((lv[k] - lv[k - 1]) - step) <= 1e-9 * fabs(step) +
                          4.0 * DBL_EPSILON * fabs(lv[k]));
            }
            if (n > 1) {
                double mult = lv[k] / (s_exact * pow(10.0, e));
                ck_assert(fabs(mult - nearbyint(mult)) < 1e-6);
                char buf[64];
                int dec = e < 0 ? -e : 0;
                snprintf(buf, sizeof buf, "%.*f", dec, lv[k]);
                ck_assert_msg(strtod(buf, NULL) == lv[k],
                              "level %.17g is not rounded to %d decimals",
                              lv[k], dec);
            }
        }
    }
}
END_TEST

/* ------------------------------------------------------------------ */
/* determinism and size                                                 */

START_TEST(test_large_deterministic)
{
    const size_t nx = 2000, ny = 2000;
    float *z = grid_alloc(nx, ny);
    unsigned char *mask = calloc(nx * ny, 1);
    ck_assert_ptr_nonnull(mask);
    for (size_t j = 0; j < ny; j++)
        for (size_t i = 0; i < nx; i++) {
            double x = (double)i, y = (double)j;
            size_t k = j * nx + i;
            z[k] = (float)(sin(x / 37.0) * cos(y / 53.0) +
                           0.3 * sin((x + y) / 11.0));
            if ((x - 700) * (x - 700) + (y - 1300) * (y - 1300) < 100.0 * 100.0)
                mask[k] = 1;
            if ((i * 7 + j * 13) % 9973 == 0)
                z[k] = NAN;
        }
    const double level = 0.1; /* no float node can equal it exactly */
    sy_isoline_set a, b;
    ck_assert_int_eq(sy_contour_trace(z, mask, nx, ny, level, &a), SY_OK);
    ck_assert_int_eq(sy_contour_trace(z, mask, nx, ny, level, &b), SY_OK);
    ck_assert_uint_gt(a.nlines, 0);
    ck_assert(sets_identical(&a, &b));
    check_basic(&a, nx, ny);
    /* every crossing appears exactly once (count from the definition) */
    ck_assert_uint_eq(total_points(&a),
                      expected_crossings(z, mask, nx, ny, level));
    /* open lines first, then closed loops (documented order); open lines
     * end on the border or next to an invalid node */
    int seen_closed = 0;
    for (size_t k = 0; k < a.nlines; k++) {
        const sy_polyline *pl = &a.lines[k];
        if (pl->closed) {
            seen_closed = 1;
        } else {
            ck_assert_msg(!seen_closed, "open line after a closed loop");
            ck_assert(ends_at_gap_or_border(z, mask, nx, ny, pl->xy[0],
                                            pl->xy[1]));
            ck_assert(ends_at_gap_or_border(z, mask, nx, ny,
                                            pl->xy[2 * pl->n - 2],
                                            pl->xy[2 * pl->n - 1]));
        }
    }
    ck_assert_int_eq(seen_closed, 1);
    sy_isoline_set_free(&a);
    sy_isoline_set_free(&b);
    free(mask);
    free(z);
}
END_TEST

static Suite *contour_suite(void)
{
    Suite *s = suite_create("contour");
    TCase *tc = tcase_create("trace");
    tcase_set_timeout(tc, 120);
    tcase_add_test(tc, test_paraboloid_circles);
    tcase_add_test(tc, test_saddle_xy);
    tcase_add_test(tc, test_saddle_x2_minus_y2);
    tcase_add_test(tc, test_saddle_single_cell);
    tcase_add_test(tc, test_masked_band);
    tcase_add_test(tc, test_plane_lines);
    tcase_add_test(tc, test_arguments);
    tcase_add_test(tc, test_large_deterministic);
    suite_add_tcase(s, tc);
    TCase *tl = tcase_create("levels");
    tcase_add_test(tl, test_nice_levels_examples);
    tcase_add_test(tl, test_nice_levels_degenerate);
    tcase_add_test(tl, test_nice_levels_properties);
    suite_add_tcase(s, tl);
    return s;
}

int main(void)
{
    return tu_run(contour_suite());
}
