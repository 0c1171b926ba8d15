/* synodic/period.h - launch-period design on a computed grid (libsynodic).
 *
 * A launch period is a run of consecutive daily launch opportunities; each
 * day flies its own transfer (departure node i, arrival node j).  Two
 * arrival strategies:
 *   - fixed arrival: every day of the period arrives on the same date (one
 *     arrival node j), the usual choice for arrival operations;
 *   - free arrival: each day picks the arrival that minimises its C3.
 * Two questions:
 *   - longest period: the longest run of days on which a transfer meets
 *     every limit of the study ([limits]; the C3 limit is required);
 *   - minimax period: for a required length of L days, the period and
 *     arrival choice that minimise the largest C3 over the L days (the C3
 *     the launch vehicle must deliver), under the study's other limits
 *     (arrival v-infinity, |DLA|, flight time; the C3 limit is only
 *     compared with the answer).
 * With the study's [period] type = I or II (sy_study.period_type) every
 * day of a period is of that transfer type, for both questions and both
 * strategies: one cruise and arrival design for the whole period.  By
 * default either type may fly on any day (a period may then mix them).
 * Everything is exact on the grid nodes: the departure axis must step 1
 * day (launch periods are daily) and nothing is refined off the grid.  The
 * fixed-arrival strategy needs an arrival-date y axis ([arrival]).
 */
#ifndef SYNODIC_PERIOD_H
#define SYNODIC_PERIOD_H

#include <stddef.h>

#include "synodic.h"
#include "synodic/grid.h"
#include "synodic/lvcap.h"
#include "synodic/study.h"

#ifdef __cplusplus
extern "C" {
#endif

typedef enum { SY_PERIOD_FIXED = 0, SY_PERIOD_FREE = 1 } sy_period_arrival;

/* One launch day of a period. */
typedef struct {
    size_t i, j;               /* grid nodes                              */
    double jd_dep, jd_arr;     /* JD TDB                                  */
    double c3_km2_s2, dla_deg, rla_deg, vinf_arr_km_s, tof_days;
    int type;                  /* 1 or 2                                  */
    double mass_kg;            /* injected mass at this C3; NAN w/o curve */
} sy_period_day;

typedef struct {
    sy_period_arrival arrival;
    int minimax;               /* 1: minimax of a given length; 0: longest */
    size_t ndays;              /* 0: no period exists                     */
    sy_period_day *days;       /* ndays entries, malloc'd                 */
    double c3_max_km2_s2;      /* largest C3 over the period              */
    size_t worst_day;          /* index into days of that C3              */
    double jd_arr_fixed;       /* fixed: the common arrival; else NAN     */
    /* From sy_period_apply_capability(); NAN otherwise. */
    double mass_kg;            /* injected mass at c3_max_km2_s2          */
    double margin_kg;          /* mass_kg - spacecraft mass               */
} sy_period;

/* The longest launch period under every limit of the study.  Ties go to
 * the smaller largest C3, then to the earlier start.  SY_ERR_ARG when the
 * study has no C3 limit or the grid does not suit (see above); ndays = 0
 * when no day is feasible. */
sy_status sy_period_longest(const sy_grid *g, const sy_study *st,
                            sy_period_arrival arrival, sy_period *out,
                            sy_error *err);

/* The L-day period minimising the largest C3.  Ties go to the earlier
 * start, then (fixed) the earlier arrival.  SY_ERR_ARG when L is 0 or
 * longer than the departure window; SY_ERR_NOSOL (ndays = 0) when no L
 * consecutive days have a transfer within the other limits. */
sy_status sy_period_minimax(const sy_grid *g, const sy_study *st,
                            sy_period_arrival arrival, size_t length_days,
                            sy_period *out, sy_error *err);

/* Fill mass_kg per day and the period's mass and margin (spacecraft_kg may
 * be NAN: no margin).  SY_ERR_RANGE when a C3 of the period lies outside
 * the table (nothing is extrapolated). */
sy_status sy_period_apply_capability(sy_period *p, const sy_lvcap *cap,
                                     double spacecraft_kg, sy_error *err);

void sy_period_free(sy_period *p);

/* Sliding-window maximum: out[s] = max(z[s..s+L-1]) for s = 0..n-L, in
 * O(n) with the block prefix/suffix maxima of M. van Herk, Pattern
 * Recognition Letters 13 (1992) 517-521, and J. Gil and M. Werman, IEEE
 * Trans. PAMI 15 (1993) 504-507.  z must hold no NAN (use INFINITY for
 * "impossible").  Returns 0 on bad input (L == 0 or L > n) or no memory.
 * Exposed for tests. */
int sy_sliding_max(const double *z, size_t n, size_t L, double *out);

#ifdef __cplusplus
}
#endif
#endif
