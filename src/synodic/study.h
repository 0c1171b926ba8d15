/* synodic/study.h - porkchop study files (part of libsynodic).
 *
 * A study is an INI file (read with inih) describing one porkchop chart:
 * bodies, date windows, orbits at either end, constraints, what to chart
 * and where to write it.  The accepted sections and keys are documented
 * in synodic(1) and shown by examples/.  Every key may be overridden from
 * the command line with "section.key=value".
 */
#ifndef SYNODIC_STUDY_H
#define SYNODIC_STUDY_H

#include <stddef.h>

#include "synodic.h"

#ifdef __cplusplus
extern "C" {
#endif

/* Fields a study can chart / a grid stores.  Order is the CSV order. */
typedef enum {
    SY_F_C3 = 0,        /* departure C3, km^2/s^2                 */
    SY_F_VINF_DEP,      /* departure v-infinity, km/s            */
    SY_F_DLA,           /* deg, EME2000                           */
    SY_F_RLA,           /* deg, EME2000                           */
    SY_F_VINF_ARR,      /* arrival v-infinity, km/s              */
    SY_F_C3_ARR,        /* arrival C3, km^2/s^2                   */
    SY_F_DAP,           /* deg                                    */
    SY_F_RAP,           /* deg                                    */
    SY_F_TOF,           /* days                                   */
    SY_F_ANGLE,         /* transfer angle, deg                    */
    SY_F_MIN_SUN,       /* minimum Sun distance, AU               */
    SY_F_DV_DEP,        /* km/s (needs parking orbit)             */
    SY_F_DV_CAP,        /* km/s (needs capture orbit)             */
    SY_F_DV_TOTAL,      /* km/s (needs both)                      */
    SY_F_V_ENTRY,       /* km/s (needs entry altitude)            */
    SY_NFIELDS
} sy_field;

/* Short names used in study files, CSV headers and JSON: "c3",
 * "vinf_dep", "dla", "rla", "vinf_arr", "c3_arr", "dap", "rap", "tof",
 * "angle", "min_sun", "dv_dep", "dv_cap", "dv_total", "v_entry". */
const char *sy_field_name(sy_field f);
/* Column / key with unit, e.g. "c3_km2_s2", "dla_deg". */
const char *sy_field_key(sy_field f);
/* Human label with unit, e.g. "C3 (km²/s²)". */
const char *sy_field_label(sy_field f);
/* -1 when unknown. */
int sy_field_from_name(const char *name);
/* A transfer-type restriction as written in a study or on the command
 * line: "I" 1, "II" 2, "either" 0 (any case); -1 otherwise. */
int sy_type_from_name(const char *name);

#define SY_MAX_LEVELS 64
#define SY_MAX_CHART_FIELDS 6

typedef struct {
    sy_field field;
    int auto_levels;                 /* 1: choose nice levels            */
    size_t nlevels;
    double levels[SY_MAX_LEVELS];    /* ascending, when !auto_levels     */
} sy_chart_field;

enum { SY_PERIOD_ARR_FIXED = 1, SY_PERIOD_ARR_FREE = 2 };

enum { SY_FMT_PNG = 1, SY_FMT_SVG = 2, SY_FMT_PDF = 4, SY_FMT_CSV = 8,
       SY_FMT_JSON = 16 };

typedef struct {
    char path[4096];          /* the study file as given               */
    char dir[4096];           /* its directory (for relative paths)    */

    /* [study] */
    char title[256];
    char subtitle[256];
    char bodies_file[4096];   /* resolved against dir; "" if none      */

    /* [transfer] */
    char origin[48];
    char target[48];
    int revs;                 /* default 0                             */
    sy_branch branch;         /* default left                          */

    /* [departure] */
    double dep_start_jd, dep_end_jd, dep_step_days;

    /* [arrival] or [flight]: exactly one of the two */
    int y_is_tof;             /* 0: arrival window; 1: flight-time window */
    double arr_start_jd, arr_end_jd, arr_step_days;   /* y_is_tof == 0 */
    double tof_start_days, tof_end_days, tof_step_days; /* y_is_tof == 1 */

    /* [orbits] */
    sy_transfer_opts orbits;

    /* [limits]: each NAN when absent */
    double c3_max_km2_s2;
    double vinf_arr_max_km_s;
    double dla_max_deg;       /* on |DLA|                              */
    double tof_min_days, tof_max_days;

    /* [chart] */
    size_t nfields;
    sy_chart_field fields[SY_MAX_CHART_FIELDS]; /* first is the primary */
    int tof_lines_auto;       /* 1: choose time-of-flight iso-lines     */
    size_t ntof_lines;
    double tof_lines_days[SY_MAX_LEVELS];
    int filled;               /* 1: filled bands of the primary field   */
    int show_types;           /* draw the Type I / II boundary (def. 1) */
    /* "mass" in [chart] fields: delivered-mass contours, derived from C3
     * through the launch-vehicle capability (not a grid field). */
    int chart_mass;
    int mass_auto_levels;     /* 1 unless [chart] mass_levels is a list  */
    size_t nmass_levels;
    double mass_levels_kg[SY_MAX_LEVELS];

    /* [period] */
    double period_length_days; /* required launch period; NAN if absent */
    unsigned period_arrival;   /* SY_PERIOD_ARR_* bits; default both      */
    int period_type;           /* 1 or 2: every day of that transfer type;
                                * 0 (default): either, day by day         */

    /* [launch_vehicle] */
    char lv_capability[4096]; /* CSV, resolved against dir; "" if none  */
    double spacecraft_mass_kg; /* NAN when absent                       */

    /* [output] */
    unsigned formats;         /* SY_FMT_* bits; default png|svg|pdf|csv|json */
    char out_dir[4096];       /* resolved against the current directory */
    char basename[256];       /* default: study file name without .ini  */
    double width_in, height_in, dpi;   /* default 7.5 x 5.5 in, 200 dpi */
} sy_study;

/* Read a study file, then apply overrides ("section.key=value", in
 * order).  Errors name file, line and key and list the accepted keys,
 * e.g. "mars.ini:12: [limits] unknown key 'c3max'; accepted keys:
 * c3_max_km2_s2, vinf_arr_max_km_s, dla_max_deg, tof_min_days,
 * tof_max_days".  Overrides are reported as "--set limits.c3max=...". */
sy_status sy_study_load(const char *path, const char *const *overrides,
                        size_t noverrides, sy_study *study, sy_error *err);

#ifdef __cplusplus
}
#endif
#endif
