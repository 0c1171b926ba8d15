/* synodic/lvcap.h - launch-vehicle capability curves (part of libsynodic).
 *
 * A capability curve gives the mass a launch vehicle injects onto an
 * escape trajectory of a given departure C3.  The figures are the user's
 * own (from the vehicle provider); synodic only reads, checks and
 * interpolates them.
 *
 * CSV format (our own, plain text, UTF-8/ASCII):
 *   - one row per table point: C3 (km^2/s^2), a comma, injected mass (kg);
 *   - blank lines and lines whose first non-blank character is '#' are
 *     ignored, as is anything after a '#' on a data line;
 *   - an optional header line whose first field is not a number, e.g.
 *     "c3_km2_s2,mass_kg", before the first data row;
 *   - at least 2 rows; C3 strictly increasing down the file (no duplicate
 *     C3); every number finite; mass >= 0 and non-increasing with C3;
 *   - C3 within -100..10000 km^2/s^2, successive rows at least 1e-6
 *     km^2/s^2 apart, mass at most 1e7 kg (physical bounds that also keep
 *     the interpolant clear of floating-point overflow).
 * The last rule is required, not advised: a vehicle never lifts more to a
 * higher energy, so a mass that rises with C3 is a typing or column error.
 *
 * Interpolation: GSL's Steffen interpolant (gsl_interp_steffen; M. Steffen,
 * "A simple method for monotonic interpolation in one dimension", Astron.
 * Astrophys. 239, 443-450, 1990), which is monotone between the points of
 * monotone data and passes through every point.  With exactly two rows the
 * curve is the straight line between them (Steffen needs three points; on
 * two it would be that line anyway).  A C3 outside [first, last] row is
 * refused with SY_ERR_RANGE: the curve is never extrapolated.
 */
#ifndef SYNODIC_LVCAP_H
#define SYNODIC_LVCAP_H

#include <stddef.h>

#include "synodic.h"

#ifdef __cplusplus
extern "C" {
#endif

typedef struct sy_lvcap sy_lvcap;

/* Read and check a capability CSV.  Errors name FILE:LINE and what to fix;
 * SY_ERR_IO when the file cannot be read, SY_ERR_PARSE for its content. */
sy_status sy_lvcap_load(const char *path, sy_lvcap **out, sy_error *err);
/* The same from arrays (n rows); `name` is used in messages. */
sy_status sy_lvcap_from_table(const double *c3_km2_s2, const double *mass_kg,
                              size_t n, const char *name, sy_lvcap **out,
                              sy_error *err);
void sy_lvcap_free(sy_lvcap *cap);

/* Injected mass at c3_km2_s2.  SY_ERR_RANGE (mass set to NAN) when the C3
 * lies outside the table, with the table's span in err. Thread-safe. */
sy_status sy_lvcap_mass(const sy_lvcap *cap, double c3_km2_s2,
                        double *mass_kg, sy_error *err);
/* The C3 span of the table. */
void sy_lvcap_range(const sy_lvcap *cap, double *c3_min_km2_s2,
                    double *c3_max_km2_s2);
size_t sy_lvcap_rows(const sy_lvcap *cap);
/* The file (or name) the curve came from. */
const char *sy_lvcap_source(const sy_lvcap *cap);

#ifdef __cplusplus
}
#endif
#endif
