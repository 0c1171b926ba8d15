/* synodic/windows.h - launch opportunities across the years (libsynodic).
 *
 * A scan sweeps a multi-year departure span against a window of flight
 * times on a coarse grid, finds each launch opportunity (they recur near
 * the synodic period of the two bodies) separately for Type I and Type II
 * transfers, refines each one on a 1-day grid and with the grid module's
 * simplex refinement, and, when the study has limits, finds the first and
 * last feasible departure day of the opportunity.
 *
 * Words used here:
 *   - a window is one transfer type's optimum within one opportunity
 *     (one row of the table);
 *   - an opportunity (launch season) groups the Type I and Type II
 *     windows that recur together; each gets one porkchop chart.
 *
 * Results do not depend on the thread count.
 */
#ifndef SYNODIC_WINDOWS_H
#define SYNODIC_WINDOWS_H

#include <stddef.h>
#include <stdio.h>

#include "synodic.h"
#include "synodic/grid.h"
#include "synodic/study.h"

#ifdef __cplusplus
extern "C" {
#endif

/* Mean motion (deg/day) of a body: the mean-longitude rate of the
 * built-in table for a planet, sqrt(GM_sun / a^3) for a small body on an
 * elliptic orbit; NAN when the orbit is not bound. */
double sy_mean_motion_deg_day(const sy_body *b);
/* Mean semi-major axis (km): the table's J2000 value for a planet,
 * q / (1 - e) for a small body; NAN when the orbit is not bound. */
double sy_mean_sma_km(const sy_body *b);
/* Synodic period 360 / |n1 - n2| (days) from the mean motions, i.e.
 * 1 / |1/T1 - 1/T2|; NAN when undefined (equal or unbound motions). */
double sy_synodic_period_days(const sy_body *a, const sy_body *b);
/* Half the period of the ellipse tangent to both mean orbits (days). */
double sy_hohmann_tof_days(const sy_body *a, const sy_body *b);

typedef struct {
    const sy_body *from, *to;
    double dep_start_jd, dep_end_jd;   /* departure span                 */
    double tof_min_days, tof_max_days; /* flight-time window             */
    double coarse_dep_days;  /* departure step of the scan (e.g. 4)      */
    double coarse_tof_days;  /* flight-time step of the scan (e.g. 4)    */
    int revs;
    sy_branch branch;
    sy_transfer_opts opts;
    int threads;             /* 0: all cores                             */
} sy_windows_spec;

/* A study's scan: [departure] start/end/step_days and [flight]
 * tof_min_days/tof_max_days/step_days (the steps are the coarse steps);
 * a study with an [arrival] window is refused. */
sy_status sy_windows_spec_from_study(const sy_study *st, const sy_body *from,
                                     const sy_body *to, sy_windows_spec *spec,
                                     sy_error *err);

typedef struct {
    size_t season;        /* index of its opportunity                      */
    int type;             /* 1 (Type I) or 2 (Type II)                      */
    int within_limits;    /* 1: the optimum meets every limit (1 when the
                             study has none); 0: no departure of this type
                             in the opportunity meets them and the figures
                             are the unconstrained minimum                 */
    sy_transfer best;     /* every figure at the minimum-C3 transfer       */
    double open_jd;       /* first and last departure day (TDB, on the
                             1-day lattice of the scan) of the contiguous
                             run around the optimum on which some arrival
                             of this type meets every limit; NAN when the
                             study has no limits or none is met            */
    double close_jd;
    int open_at_edge;     /* 1: the run reaches the searched span's edge,
                             so the true date may lie beyond it            */
    int close_at_edge;
    int tof_at_edge;      /* 1: the optimum's flight time is within a day
                             of the flight-time window's end: a longer or
                             shorter flight may do better                  */
} sy_window;

typedef struct {
    double dep_lo_jd, dep_hi_jd; /* departures searched (1-day grid)      */
    int window[2];               /* index into windows[] of the Type I and
                                    Type II window, -1 when absent         */
} sy_season;

typedef struct {
    sy_windows_spec spec;
    double synodic_days;    /* from the mean motions                      */
    int has_limits;         /* the study had a limit                      */
    size_t nwindows;
    sy_window *windows;     /* by departure date of the optimum           */
    size_t nseasons;
    sy_season *seasons;
    size_t coarse_nx, coarse_ny;
    double seconds;         /* wall time of the scan                      */
} sy_windows;

/* Scan.  `limits` (may be NULL) supplies the [limits] of a study; only
 * those members are read. */
sy_status sy_windows_scan(const sy_windows_spec *spec, const sy_study *limits,
                          sy_progress_fn progress, void *user,
                          sy_windows **out, sy_error *err);
void sy_windows_free(sy_windows *w);

/* ---- Outputs (deterministic; files through temporary + rename) ------ */

/* Aligned text table (what `synodic windows` prints). */
void sy_windows_print(const sy_windows *w, FILE *out);
sy_status sy_windows_write_csv(const sy_windows *w, const char *path,
                               sy_error *err);
sy_status sy_windows_write_json(const sy_windows *w, const sy_study *st,
                                const char *path, sy_error *err);
sy_status sy_windows_write_markdown(const sy_windows *w, const sy_study *st,
                                    const char *path, sy_error *err);
/* Comparison figure: minimum C3 and arrival v-infinity of each window
 * against its departure date, Type I and Type II as separate series.
 * PNG, SVG or PDF by extension. */
sy_status sy_windows_write_comparison(const sy_windows *w, const sy_study *st,
                                      const char *path, sy_error *err);

/* Porkchop charts of every opportunity on one common colour scale and
 * contour set, as files dir/base-NN.png (NN = opportunity number from 1)
 * when write_png, and the atlas PDF atlas_path (cover with the table,
 * then one page per opportunity) when atlas_path != NULL.  *npages gets
 * the atlas page count (may be NULL). */
sy_status sy_windows_write_charts(const sy_windows *w, const sy_study *st,
                                  const char *dir, const char *base,
                                  int write_png, const char *atlas_path,
                                  size_t *npages, sy_error *err);

#ifdef __cplusplus
}
#endif
#endif
