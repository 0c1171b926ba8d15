/* synodic.h - public interface of libsynodic.
 *
 * libsynodic computes preliminary interplanetary transfer figures: planet
 * positions from analytic mean elements, small bodies from osculating
 * elements, Lambert's problem, and the launch/arrival quantities mission
 * analysts chart (C3, v-infinity, DLA/RLA, ...).
 *
 * Conventions used throughout:
 *   - lengths in km, times in s, angles in radians unless the name says
 *     _deg; every quantity carries its unit in its name;
 *   - epochs are Julian dates in the TDB time scale (jd_tdb);
 *   - the native frame is heliocentric, mean ecliptic and equinox of J2000;
 *     sy_ecl_to_eq() rotates to the J2000 mean equator (EME2000);
 *   - every fallible call returns an sy_status; functions that can explain
 *     more also fill an sy_error with a one-line message.
 *
 * Figures are two-body, patched-conic, mean-element values for preliminary
 * design; confirm them with high-fidelity ephemerides and the responsible
 * launch and mission authorities.
 */
#ifndef SYNODIC_H
#define SYNODIC_H

#include <stddef.h>

#ifdef __cplusplus
extern "C" {
#endif

/* ------------------------------------------------------------------ */
/* Status and errors                                                   */

typedef enum {
    SY_OK = 0,
    SY_ERR_ARG,        /* an argument is out of its domain              */
    SY_ERR_RANGE,      /* epoch outside the model's validity            */
    SY_ERR_NOSOL,      /* no solution exists (e.g. tof below N-rev min) */
    SY_ERR_DEGENERATE, /* geometry leaves the problem undefined         */
    SY_ERR_NOCONV,     /* an iteration did not converge                 */
    SY_ERR_PARSE,      /* malformed text input                          */
    SY_ERR_NOBODY,     /* unknown body name                             */
    SY_ERR_NOMEM,      /* out of memory / allocation refused            */
    SY_ERR_IO          /* file could not be read or written             */
} sy_status;

/* A one-line human message, filled by calls that can say more than a code. */
typedef struct {
    char msg[512];
} sy_error;

const char *sy_status_str(sy_status st);
/* printf-style helper: fills err (if non-NULL) and returns st. */
sy_status sy_fail(sy_error *err, sy_status st, const char *fmt, ...)
#if defined(__GNUC__)
    __attribute__((format(printf, 3, 4)))
#endif
    ;

const char *sy_version(void);

/* ------------------------------------------------------------------ */
/* Constants (see share/synodic/constants.txt for sources)             */

#define SY_AU_KM 149597870.700          /* IAU 2012 B2, exact              */
#define SY_GM_SUN_KM3_S2 1.32712440041e11 /* DE440, recalled from memory    */
#define SY_J2000_JD 2451545.0
#define SY_DAY_S 86400.0
#define SY_JULIAN_CENTURY_DAYS 36525.0
#define SY_OBLIQUITY_J2000_ARCSEC 84381.448 /* IAU 1976, J2000 ecliptic   */
/* Shortest flight the patched-conic model is used for (common practice:
 * the flight must be long against the hours spent leaving the departure
 * body); point queries refuse, grids mark such cells. */
#define SY_MIN_FLIGHT_DAYS 1.0

/* ------------------------------------------------------------------ */
/* Time (TDB)                                                          */

/* Julian date of a proleptic Gregorian calendar date (astronomical year
 * numbering: year 0 = 1 BC).  No validation: see sy_date_parse(). */
double sy_jd_from_calendar(int year, int month, int day, int hour, int minute,
                           double second);
/* Inverse of sy_jd_from_calendar(). */
void sy_calendar_from_jd(double jd, int *year, int *month, int *day,
                         int *hour, int *minute, double *second);
/* Parse "YYYY-MM-DD", "YYYY-MM-DDTHH:MM[:SS[.sss]]" or "JD2461234.5".
 * Rejects impossible dates naming the field (month, day, hour, ...). */
sy_status sy_date_parse(const char *text, double *jd_tdb, sy_error *err);
/* Format as "YYYY-MM-DD" (with_time == 0) or "YYYY-MM-DDTHH:MM:SS",
 * rounded to the nearest second.  buf must hold at least 32 bytes. */
void sy_date_format(double jd_tdb, int with_time, char *buf, size_t len);

/* ------------------------------------------------------------------ */
/* Frames                                                              */

/* Rotate a vector from the mean ecliptic of J2000 to the J2000 mean
 * equator (EME2000) by the obliquity 84381.448 arcsec, and back. */
void sy_ecl_to_eq(const double ecl[3], double eq[3]);
void sy_eq_to_ecl(const double eq[3], double ecl[3]);

/* ------------------------------------------------------------------ */
/* Two-body propagation                                                */

/* Propagate a two-body state by dt_s seconds with a universal-variable
 * Kepler solver valid for every eccentricity (elliptic, parabolic,
 * hyperbolic) and for negative dt_s. */
sy_status sy_kepler_propagate(double mu_km3_s2, const double r0_km[3],
                              const double v0_km_s[3], double dt_s,
                              double r_km[3], double v_km_s[3]);

/* ------------------------------------------------------------------ */
/* Bodies and ephemeris                                                */

typedef enum { SY_BODY_PLANET = 0, SY_BODY_SMALL = 1 } sy_body_kind;

typedef struct {
    char name[48];          /* as displayed, e.g. "Mars"                  */
    sy_body_kind kind;
    double gm_km3_s2;       /* 0 when unknown                             */
    double radius_km;       /* 0 when unknown                             */
    double valid_from_jd;   /* validity of the position model             */
    double valid_to_jd;
    /* SY_BODY_PLANET: index 0..8 Mercury..Pluto into the built-in tables */
    int planet;
    /* SY_BODY_SMALL: heliocentric ecliptic J2000 osculating elements,
     * referred to the time of perihelion (valid for every e). */
    double q_km;            /* perihelion distance                        */
    double e;               /* eccentricity                               */
    double i_rad, node_rad, argp_rad;
    double tp_jd_tdb;       /* time of perihelion passage                 */
    double epoch_jd_tdb;    /* epoch the elements were given for          */
    char source[128];       /* file:line where defined, or "built-in"     */
} sy_body;

typedef struct sy_catalog sy_catalog;

/* A catalogue holding the nine built-in bodies. NULL on allocation failure. */
sy_catalog *sy_catalog_new(void);
void sy_catalog_free(sy_catalog *cat);
/* Add the bodies of a bodies file (INI format, see synodic(1)). */
sy_status sy_catalog_load(sy_catalog *cat, const char *path, sy_error *err);
size_t sy_catalog_count(const sy_catalog *cat);
const sy_body *sy_catalog_at(const sy_catalog *cat, size_t index);
/* Case-insensitive lookup; "earth" also answers to "emb"/"em-bary".
 * Fills err with the known names when not found. */
sy_status sy_catalog_find(const sy_catalog *cat, const char *name,
                          const sy_body **body, sy_error *err);

/* Heliocentric state in the mean ecliptic and equinox of J2000. */
sy_status sy_body_state(const sy_body *body, double jd_tdb, double r_km[3],
                        double v_km_s[3]);

/* ------------------------------------------------------------------ */
/* Lambert's problem (Izzo 2015)                                       */

typedef enum { SY_BRANCH_LEFT = 0, SY_BRANCH_RIGHT = 1 } sy_branch;

typedef struct {
    double v1_km_s[3];
    double v2_km_s[3];
    int revs;
    sy_branch branch;   /* meaningful for revs >= 1 */
    int iterations;     /* Householder iterations used */
} sy_lambert_solution;

/* Solve for the conic from r1 to r2 in tof_s around mu.  revs complete
 * revolutions (0, 1, 2, ...); for revs >= 1 branch picks one of the two
 * solutions.  retrograde != 0 asks for the clockwise (as seen from +z)
 * transfer.  Returns SY_ERR_NOSOL when tof_s is below the minimum for
 * revs revolutions, SY_ERR_DEGENERATE for a zero vector or a transfer
 * angle of 0 or 180 deg (the plane is undefined; see lambert.c). */
sy_status sy_lambert(double mu_km3_s2, const double r1_km[3],
                     const double r2_km[3], double tof_s, int revs,
                     sy_branch branch, int retrograde,
                     sy_lambert_solution *sol);

/* ------------------------------------------------------------------ */
/* Transfer figures                                                    */

typedef struct {
    int want_park;   double park_alt_km;
    int want_capture; double capture_peri_km, capture_apo_km;
    int want_entry;  double entry_alt_km;
} sy_transfer_opts;

typedef struct {
    double jd_dep, jd_arr;
    double tof_days;
    double transfer_angle_deg;   /* in the direction of motion, 0..360   */
    int type;                    /* 1: Type I (< 180 deg), 2: Type II    */
    int revs;
    sy_branch branch;
    double v1_km_s[3], v2_km_s[3];       /* heliocentric ecliptic J2000   */
    double vinf_dep_vec_km_s[3];         /* ecliptic J2000                */
    double vinf_dep_km_s, c3_km2_s2;
    double dla_deg, rla_deg;             /* EME2000                       */
    double vinf_arr_vec_km_s[3];
    double vinf_arr_km_s, c3_arr_km2_s2;
    double dap_deg, rap_deg;             /* EME2000                       */
    double min_sun_dist_au;
    /* set when the matching option was asked for (NaN otherwise) */
    double dv_dep_km_s;      /* from circular parking orbit              */
    double dv_cap_km_s;      /* into the capture orbit                   */
    double dv_total_km_s;    /* dv_dep + dv_cap where both exist         */
    double v_entry_km_s;     /* at the entry interface                   */
} sy_transfer;

/* Figures from the Lambert arc r1->r2 and the bodies' velocities. */
sy_status sy_transfer_from_states(const double r1_km[3],
                                  const double vb1_km_s[3],
                                  const double r2_km[3],
                                  const double vb2_km_s[3], double tof_s,
                                  int revs, sy_branch branch,
                                  double gm_from, double radius_from_km,
                                  double gm_to, double radius_to_km,
                                  const sy_transfer_opts *opts,
                                  sy_transfer *out);
/* Figures for a transfer from body `from` at jd_dep to `to` at jd_arr. */
sy_status sy_transfer_compute(const sy_body *from, const sy_body *to,
                              double jd_dep, double jd_arr, int revs,
                              sy_branch branch, const sy_transfer_opts *opts,
                              sy_transfer *out, sy_error *err);

/* Helpers of the trade (common practice formulas). */
double sy_dv_departure(double gm, double r_park_km, double c3_km2_s2);
double sy_dv_capture(double gm, double vinf_km_s, double rp_km, double ra_km);
double sy_entry_speed(double gm, double vinf_km_s, double r_km);
/* Declination and right ascension (deg, RA in [0,360)) of an ecliptic
 * J2000 vector, expressed in EME2000. */
void sy_asymptote_radec(const double vec_ecl[3], double *dec_deg,
                        double *ra_deg);

#ifdef __cplusplus
}
#endif
#endif
