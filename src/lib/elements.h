/* elements.h - built-in mean-element tables of the nine major bodies
 * (internal header, not installed).
 *
 * Source of the elements: E. M. Standish, "Keplerian Elements for
 * Approximate Positions of the Major Planets", JPL Solar System Dynamics
 * (Table 1: 1800 AD - 2050 AD; Table 2a + 2b: 3000 BC - 3000 AD).
 * Elements are referred to the mean ecliptic and equinox of J2000 and the
 * time argument is T = (JD_TDB - 2451545.0) / 36525.
 */
#ifndef SYNODIC_ELEMENTS_H
#define SYNODIC_ELEMENTS_H

#include "synodic.h"

#define SY_NPLANETS 9

/* One row pair of a Standish table: value at J2000 and rate per Julian
 * century, in the table's own units (au, deg). */
typedef struct {
    double a_au, e, i_deg, L_deg, varpi_deg, node_deg;
} sy_elem6;

typedef struct {
    sy_elem6 j2000;      /* value at J2000.0            */
    sy_elem6 rate_cy;    /* rate per Julian century     */
} sy_elem_row;

/* Table 2b: M = L - varpi + b T^2 + c cos(f T) + s sin(f T), f T in deg. */
typedef struct {
    double b_deg, c_deg, s_deg, f_deg;
} sy_elem_2b;

/* A complete element set from which a state can be computed: a row and,
 * for Table 2a rows of Jupiter..Pluto, the 2b terms (NULL otherwise). */
typedef struct {
    const sy_elem_row *row;
    const sy_elem_2b *extra;   /* NULL: no 2b terms */
} sy_elem_set;

typedef struct {
    const char *name;        /* "Mercury" .. "Pluto"; "Earth" is the EMB */
    sy_elem_row table1;
    sy_elem_row table2a;
    int has_2b;
    sy_elem_2b table2b;
    double gm_km3_s2;        /* DE440 (recalled from memory)              */
    double radius_km;        /* IAU WGCCRE 2015 (recalled from memory)    */
} sy_planet_data;

extern const sy_planet_data sy_planet_table[SY_NPLANETS];

/* Validity bounds (Julian dates, TDB, proleptic Gregorian calendar with
 * astronomical year numbering, 00:00 of the day):
 *   Table 1 : [1800-01-01, 2051-01-01)  i.e. through the end of 2050-12-31
 *   Table 2 : [-2999-01-01 (3000 BC), 3001-01-01) i.e. through 3000 AD.
 * Standish states the ranges as years; the few-week difference between the
 * Julian and Gregorian reckoning of 3000 BC is immaterial for elements whose
 * errors are of arc-minutes there. */
#define SY_TABLE1_FROM_JD 2378496.5
#define SY_TABLE1_TO_JD 2470172.5
#define SY_TABLE2_FROM_JD 625697.5
#define SY_TABLE2_TO_JD 2817152.5

/* Element set used by sy_body_state() for planet p (0..8) at jd_tdb:
 * Table 1 inside its range, Table 2a(+2b) elsewhere within the Table 2
 * range.  Returns SY_ERR_RANGE outside 3000 BC .. 3000 AD, SY_ERR_ARG for a
 * bad index. */
sy_status sy_planet_elements_at(int p, double jd_tdb, sy_elem_set *set);

/* Heliocentric ecliptic J2000 state from an explicit element set (used by
 * sy_body_state() and by the tests, which perturb copies of the tables). */
sy_status sy_planet_state_from_set(const sy_elem_set *set, double jd_tdb,
                                   double r_km[3], double v_km_s[3]);

#endif
