/* contour.c - iso-lines of a gridded field by marching squares.
 *
 * Method.  Each cell (the square between nodes (i, j) and (i+1, j+1)) is
 * classified by which of its four corners are "above" the level, giving
 * one of 16 cases; each case fixes which cell edges the iso-line crosses
 * and how the crossings pair up.  This is the 2-D form of the cell-case
 * idea of W. E. Lorensen & H. E. Cline, "Marching cubes: a high
 * resolution 3D surface construction algorithm", Computer Graphics 21(4),
 * 1987 (SIGGRAPH '87).  The crossing point on an edge is found by linear
 * interpolation between the two node values.
 *
 * Ties.  A node counts as above when z >= level (and below when
 * z < level).  An edge is crossed only when its ends differ, so the
 * interpolation divides by a non-zero difference and the fraction lies in
 * (0, 1].  A fraction of exactly 1 puts the point on a node; two edges of
 * one cell can then give the same point (e.g. a corner exactly at the
 * level), which would be a zero-length segment.  Those are collapsed when
 * the polyline is assembled: consecutive equal points (compared exactly;
 * the same node always yields bit-identical coordinates, see edge_point)
 * are merged, so no zero-length segment or repeated point is output.
 *
 * Saddles.  Cases 5 and 10 (diagonally opposite corners above) are
 * ambiguous.  We decide with the cell-centre value, the mean of the four
 * corners (which is the bilinear interpolant's value at the centre): if
 * the centre is above, the two above corners are joined through the
 * centre and the lines cut off the two below corners; otherwise they cut
 * off the two above corners.  The same test is used for both cases, so
 * the choice is consistent between neighbouring cells (each cell decides
 * only its own interior; the edge crossings are shared).  The more
 * elaborate "asymptotic decider" (G. M. Nielson & B. Hamann, IEEE
 * Visualization '91) compares with the bilinear saddle value instead; the
 * centre mean is the common simpler choice and agrees with it whenever the
 * saddle lies at the cell centre.
 *
 * Gaps.  A node is invalid when its mask byte is non-zero or its z is not
 * finite; a cell with any invalid corner emits nothing, so lines end at the
 * gap and no NaN ever reaches the arithmetic.
 *
 * Joining.  Every segment is directed so that the above side lies on its
 * left: in the counter-clockwise corner order c0 (i,j), c1 (i+1,j),
 * c2 (i+1,j+1), c3 (i,j+1) it starts on an edge running above->below and
 * ends on an edge running below->above.  The two cells sharing an edge
 * walk it in opposite directions, so each crossed edge is the start of at
 * most one segment and the end of at most one.  Crossing points are
 * identified by their grid edge index, not by coordinates, and an
 * open-addressing hash keyed by edge index maps a start edge to its
 * segment; following "the segment starting where this one ends" chains
 * segments into polylines in O(number of segments) time and memory.  A
 * chain without a predecessor is an open line (it begins and ends at the
 * border or a gap); what remains are closed loops.
 */
#include "config.h"
#include "synodic.h"
#include "synodic/contour.h"

#include <math.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

#define NO_SEG SIZE_MAX

typedef struct {
    size_t from_edge; /* crossing where the segment begins */
    size_t to_edge;   /* crossing where it ends            */
} segment;

typedef struct {
    const float *z;
    const unsigned char *mask;
    size_t nx, ny;
    size_t nh; /* number of horizontal edges; vertical ones follow */
    double level;
} tracer;

/* 0 below, 1 above, 2 invalid (masked or non-finite). */
static inline int node_state(const tracer *t, size_t k)
{
    if (t->mask && t->mask[k])
        return 2;
    double v = t->z[k];
    if (!isfinite(v))
        return 2;
    return v >= t->level;
}

/* Edge numbering: horizontal edge (i,j)-(i+1,j) is j*(nx-1)+i; vertical
 * edge (i,j)-(i,j+1) is nh + j*nx + i. */
static inline size_t hedge(const tracer *t, size_t i, size_t j)
{
    return j * (t->nx - 1) + i;
}

static inline size_t vedge(const tracer *t, size_t i, size_t j)
{
    return t->nh + j * t->nx + i;
}

/* Crossing point of a crossed edge in index coordinates.  The fraction f
 * is measured from the below node, so f == 1 lands exactly on the above
 * node and every edge touching that node gives the same bits. */
static void edge_point(const tracer *t, size_t e, double *x, double *y)
{
    size_t i, j, ka, kb;
    int horizontal = e < t->nh;
    if (horizontal) {
        j = e / (t->nx - 1);
        i = e % (t->nx - 1);
        ka = j * t->nx + i;
        kb = ka + 1;
    } else {
        size_t v = e - t->nh;
        j = v / t->nx;
        i = v % t->nx;
        ka = j * t->nx + i;
        kb = ka + t->nx;
    }
    double za = t->z[ka], zb = t->z[kb];
    int a_below = za < t->level;
    double f = a_below ? (t->level - za) / (zb - za)
                       : (t->level - zb) / (za - zb);
    double pos = a_below ? (double)(horizontal ? i : j) + f
                         : (double)(horizontal ? i : j) + 1.0 - f;
    if (horizontal) {
        *x = pos;
        *y = (double)j;
    } else {
        *x = (double)i;
        *y = pos;
    }
}

static int push_segment(segment **segs, size_t *n, size_t *cap, size_t a,
                        size_t b)
{
    if (*n == *cap) {
        size_t nc = *cap ? *cap * 2 : 1024;
        if (nc > SIZE_MAX / sizeof(segment))
            return 0;
        segment *ns = realloc(*segs, nc * sizeof *ns);
        if (!ns)
            return 0;
        *segs = ns;
        *cap = nc;
    }
    (*segs)[*n].from_edge = a;
    (*segs)[*n].to_edge = b;
    (*n)++;
    return 1;
}

/* Fibonacci hashing (Knuth, TAOCP vol. 3, 6.4): the top `bits` bits of
 * key * 2^64/phi spread consecutive edge indices across the table. */
static inline size_t hash_slot(size_t key, unsigned bits)
{
    return (size_t)(((uint64_t)key * UINT64_C(0x9E3779B97F4A7C15)) >>
                    (64u - bits));
}

static size_t hash_find(const size_t *table, size_t mask_slots,
                        unsigned bits, const segment *segs, size_t key)
{
    size_t s = hash_slot(key, bits);
    for (;;) {
        size_t v = table[s];
        if (v == NO_SEG || segs[v].from_edge == key)
            return v;
        s = (s + 1) & mask_slots;
    }
}

static int append_line(sy_isoline_set *out, size_t *cap, double *xy,
                       size_t n, int closed)
{
    if (out->nlines == *cap) {
        size_t nc = *cap ? *cap * 2 : 16;
        if (nc > SIZE_MAX / sizeof(sy_polyline))
            return 0;
        sy_polyline *nl = realloc(out->lines, nc * sizeof *nl);
        if (!nl)
            return 0;
        out->lines = nl;
        *cap = nc;
    }
    out->lines[out->nlines].xy = xy;
    out->lines[out->nlines].n = n;
    out->lines[out->nlines].closed = closed;
    out->nlines++;
    return 1;
}

/* Append a point unless it equals the previous one (zero-length segment). */
static inline void put_point(double *xy, size_t *n, double x, double y)
{
    if (*n > 0 && xy[2 * *n - 2] == x && xy[2 * *n - 1] == y)
        return;
    xy[2 * *n] = x;
    xy[2 * *n + 1] = y;
    (*n)++;
}

/* Build one polyline from the chain starting at segment s0 and add it to
 * out (unless it collapses).  Marks the chain's segments visited. */
static int emit_chain(const tracer *t, const segment *segs,
                      const size_t *next, unsigned char *visited, size_t s0,
                      int closed, sy_isoline_set *out, size_t *cap)
{
    size_t len = 0;
    size_t s = s0;
    do {
        len++;
        s = next[s];
    } while (s != NO_SEG && s != s0);

    size_t npts = closed ? len : len + 1;
    if (npts > SIZE_MAX / (2 * sizeof(double)))
        return 0;
    double *xy = malloc(npts * 2 * sizeof *xy);
    if (!xy)
        return 0;

    size_t n = 0;
    double x, y;
    s = s0;
    for (size_t k = 0; k < len; k++) {
        visited[s] = 1;
        edge_point(t, segs[s].from_edge, &x, &y);
        put_point(xy, &n, x, y);
        if (!closed && next[s] == NO_SEG) {
            edge_point(t, segs[s].to_edge, &x, &y);
            put_point(xy, &n, x, y);
        }
        s = next[s];
    }
    if (closed)
        while (n > 1 && xy[2 * n - 2] == xy[0] && xy[2 * n - 1] == xy[1])
            n--;

    if ((closed && n < 3) || (!closed && n < 2)) {
        /* Degenerate: the line shrank onto a node lying exactly at the
         * level (e.g. an isolated maximum equal to it). */
        free(xy);
        return 1;
    }
    if (!append_line(out, cap, xy, n, closed)) {
        free(xy);
        return 0;
    }
    return 1;
}

int sy_contour_trace(const float *z, const unsigned char *mask, size_t nx,
                     size_t ny, double level, sy_isoline_set *out)
{
    if (!out)
        return SY_ERR_ARG;
    out->level = level;
    out->lines = NULL;
    out->nlines = 0;
    if (!z || nx < 2 || ny < 2 || !isfinite(level))
        return SY_ERR_ARG;
    if (nx > SIZE_MAX / 2 / ny)
        return SY_ERR_ARG; /* edge indices would overflow size_t */

    tracer t = {z, mask, nx, ny, (nx - 1) * ny, level};

    /* Pass over the cells, row-major, collecting directed segments. */
    segment *segs = NULL;
    size_t nseg = 0, segcap = 0;
    int st = SY_OK;
    for (size_t j = 0; j + 1 < ny && st == SY_OK; j++) {
        for (size_t i = 0; i + 1 < nx; i++) {
            size_t k0 = j * nx + i, k1 = k0 + 1, k3 = k0 + nx, k2 = k3 + 1;
            int s0 = node_state(&t, k0), s1 = node_state(&t, k1),
                s2 = node_state(&t, k2), s3 = node_state(&t, k3);
            if ((s0 | s1 | s2 | s3) & 2)
                continue; /* gap */
            unsigned code = (unsigned)(s0 | (s1 << 1) | (s2 << 2) | (s3 << 3));
            if (code == 0 || code == 15)
                continue;
            /* e[k] joins corner k to corner k+1 (counter-clockwise). */
            size_t e[4] = {hedge(&t, i, j), vedge(&t, i + 1, j),
                           hedge(&t, i, j + 1), vedge(&t, i, j)};
            if (code == 5 || code == 10) {
                double centre = 0.25 * ((double)z[k0] + (double)z[k1] +
                                        (double)z[k2] + (double)z[k3]);
                unsigned centre_above = centre >= level;
                for (unsigned c = 0; c < 4; c++) {
                    unsigned above = (code >> c) & 1u;
                    if (above == centre_above)
                        continue; /* joined to the centre, not cut off */
                    /* Corner c is cut off by a segment between its edges
                     * e[c-1] and e[c], directed with above on the left. */
                    size_t ea = e[(c + 3) & 3], eb = e[c];
                    int ok = above ? push_segment(&segs, &nseg, &segcap, eb, ea)
                                   : push_segment(&segs, &nseg, &segcap, ea, eb);
                    if (!ok) {
                        st = SY_ERR_NOMEM;
                        break;
                    }
                }
                if (st != SY_OK)
                    break;
            } else {
                /* The above corners form one contiguous arc: exactly one
                 * edge runs above->below (start) and one below->above. */
                size_t from = 0, to = 0;
                for (unsigned k = 0; k < 4; k++) {
                    unsigned here = (code >> k) & 1u;
                    unsigned nxt = (code >> ((k + 1) & 3)) & 1u;
                    if (here && !nxt)
                        from = e[k];
                    else if (!here && nxt)
                        to = e[k];
                }
                if (!push_segment(&segs, &nseg, &segcap, from, to)) {
                    st = SY_ERR_NOMEM;
                    break;
                }
            }
        }
    }
    if (st != SY_OK || nseg == 0) {
        free(segs);
        return st;
    }

    /* Edge-keyed hash: start edge -> segment, load factor <= 1/2. */
    unsigned bits = 1;
    while (bits < 63 && ((size_t)1 << bits) < 2 * nseg)
        bits++;
    size_t nslots = (size_t)1 << bits;
    size_t *table = malloc(nslots * sizeof *table);
    size_t *next = malloc(nseg * sizeof *next);
    unsigned char *has_prev = calloc(nseg, 1);
    unsigned char *visited = calloc(nseg, 1);
    if (!table || !next || !has_prev || !visited) {
        st = SY_ERR_NOMEM;
        goto done;
    }
    for (size_t s = 0; s < nslots; s++)
        table[s] = NO_SEG;
    for (size_t s = 0; s < nseg; s++) {
        size_t slot = hash_slot(segs[s].from_edge, bits);
        while (table[slot] != NO_SEG)
            slot = (slot + 1) & (nslots - 1);
        table[slot] = s;
    }
    for (size_t s = 0; s < nseg; s++) {
        next[s] = hash_find(table, nslots - 1, bits, segs, segs[s].to_edge);
        if (next[s] != NO_SEG)
            has_prev[next[s]] = 1;
    }

    size_t linecap = 0;
    for (size_t s = 0; s < nseg && st == SY_OK; s++)
        if (!has_prev[s] &&
            !emit_chain(&t, segs, next, visited, s, 0, out, &linecap))
            st = SY_ERR_NOMEM;
    for (size_t s = 0; s < nseg && st == SY_OK; s++)
        if (!visited[s] &&
            !emit_chain(&t, segs, next, visited, s, 1, out, &linecap))
            st = SY_ERR_NOMEM;

done:
    free(table);
    free(next);
    free(has_prev);
    free(visited);
    free(segs);
    if (st != SY_OK) {
        sy_isoline_set_free(out);
        out->level = level;
    }
    return st;
}

void sy_isoline_set_free(sy_isoline_set *set)
{
    if (!set)
        return;
    for (size_t k = 0; k < set->nlines; k++)
        free(set->lines[k].xy);
    free(set->lines);
    set->lines = NULL;
    set->nlines = 0;
}

double sy_polyline_length(const sy_polyline *pl)
{
    if (!pl || !pl->xy || pl->n < 2)
        return 0.0;
    double len = 0.0;
    for (size_t k = 1; k < pl->n; k++)
        len += hypot(pl->xy[2 * k] - pl->xy[2 * k - 2],
                     pl->xy[2 * k + 1] - pl->xy[2 * k - 1]);
    if (pl->closed)
        len += hypot(pl->xy[0] - pl->xy[2 * pl->n - 2],
                     pl->xy[1] - pl->xy[2 * pl->n - 1]);
    return len;
}

void sy_isoline_set_to_data(sy_isoline_set *set, double x0, double dx,
                            double y0, double dy)
{
    if (!set)
        return;
    for (size_t k = 0; k < set->nlines; k++) {
        sy_polyline *pl = &set->lines[k];
        for (size_t p = 0; p < pl->n; p++) {
            pl->xy[2 * p] = x0 + dx * pl->xy[2 * p];
            pl->xy[2 * p + 1] = y0 + dy * pl->xy[2 * p + 1];
        }
    }
}

/* ------------------------------------------------------------------ */
/* Nice levels                                                          */

/* 10^d for d >= 0; exact up to 10^22 (all such powers are doubles). */
static double pow10_int(int d)
{
    double p = 1.0;
    for (int k = 0; k < d; k++)
        p *= 10.0;
    return p;
}

/* Level n * m * 10^e, formed so that the result is the double nearest the
 * decimal value: for e < 0 the integer n*m is divided by the exact power
 * 10^-e in one correctly rounded operation (3 * 1 / 10 gives 0.3, whereas
 * 3 * 0.1 gives 0.30000000000000004). */
static double level_value(double n, int m, int e)
{
    double nm = n * (double)m;
    return e >= 0 ? nm * pow10_int(e) : nm / pow10_int(-e);
}

/* Integer range [*nlo, *nhi] of multiples of step m*10^e inside
 * [zmin, zmax], judged on the rounded level values themselves. */
static double count_multiples(double zmin, double zmax, int m, int e,
                              double *nlo, double *nhi)
{
    double step = level_value(1.0, m, e);
    if (!(step > 0.0) || !isfinite(step))
        return 0.0;
    double lo = ceil(zmin / step), hi = floor(zmax / step);
    if (!isfinite(lo) || !isfinite(hi) || fabs(lo) > 9e15 || fabs(hi) > 9e15)
        return 0.0;
    /* zmin/step is itself rounded: settle the ends on the level values. */
    while (level_value(lo - 1.0, m, e) >= zmin)
        lo -= 1.0;
    while (level_value(lo, m, e) < zmin)
        lo += 1.0;
    while (level_value(hi + 1.0, m, e) <= zmax)
        hi += 1.0;
    while (level_value(hi, m, e) > zmax)
        hi -= 1.0;
    *nlo = lo;
    *nhi = hi;
    return hi >= lo ? hi - lo + 1.0 : 0.0;
}

size_t sy_nice_levels(double zmin, double zmax, size_t target,
                      double *levels, size_t max)
{
    if (!levels || max == 0 || target == 0 || !isfinite(zmin) ||
        !isfinite(zmax) || !(zmin < zmax))
        return 0;
    double range = zmax - zmin;
    if (!isfinite(range) || !(range > 0.0))
        return 0;

    /* Candidate steps m * 10^e, m in {1, 2, 5} (the 1-2-5 series of
     * P. S. Heckbert, "Nice numbers for graph labels", Graphics Gems,
     * 1990), from a tenth of range/target up to just above the range.
     * Pick the one whose level count is closest to target without
     * exceeding max; ties go to the larger step (fewer lines). */
    static const int mant[3] = {1, 2, 5};
    int e_lo = (int)floor(log10(range / (double)target)) - 1;
    int e_hi = (int)floor(log10(range)) + 1;
    double best_count = 0.0, best_lo = 0.0;
    int best_m = 0, best_e = 0;
    double fallback_count = 0.0, fallback_lo = 0.0;
    int fallback_m = 0, fallback_e = 0;
    for (int e = e_lo; e <= e_hi; e++) {
        for (int q = 0; q < 3; q++) {
            double lo = 0.0, hi = 0.0;
            double c = count_multiples(zmin, zmax, mant[q], e, &lo, &hi);
            if (c < 1.0)
                continue;
            if (c <= (double)max) {
                if (best_m == 0 || fabs(c - (double)target) <=
                                       fabs(best_count - (double)target)) {
                    best_count = c;
                    best_lo = lo;
                    best_m = mant[q];
                    best_e = e;
                }
            } else if (fallback_m == 0 || c <= fallback_count) {
                fallback_count = c;
                fallback_lo = lo;
                fallback_m = mant[q];
                fallback_e = e;
            }
        }
    }
    if (best_m == 0) {
        if (fallback_m == 0)
            return 0;
        best_count = (double)max; /* truncate the coarsest over-full set */
        best_lo = fallback_lo;
        best_m = fallback_m;
        best_e = fallback_e;
    }
    size_t n = (size_t)best_count;
    for (size_t k = 0; k < n; k++) {
        double v = level_value(best_lo + (double)k, best_m, best_e);
        /* A zero level written as +0, never -0. */
        levels[k] = v == 0.0 ? 0.0 : v;
    }
    return n;
}
