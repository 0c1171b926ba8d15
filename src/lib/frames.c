/* frames.c - rotation between the mean ecliptic of J2000 (the frame of the
 * mean elements) and the J2000 mean equator (EME2000).
 *
 * The J2000 ecliptic of Standish's elements is defined with the IAU 1976
 * obliquity eps0 = 84381.448 arcsec; the rotation is about the x axis
 * (the J2000 equinox): eq = R1(-eps0) ecl. */
#include "config.h"
#include "synodic.h"

#include <math.h>

static void obliquity(double *c, double *s)
{
    const double eps_rad = SY_OBLIQUITY_J2000_ARCSEC / 3600.0 * (M_PI / 180.0);
    *c = cos(eps_rad);
    *s = sin(eps_rad);
}

void sy_ecl_to_eq(const double ecl[3], double eq[3])
{
    double c, s;
    obliquity(&c, &s);
    double x = ecl[0], y = ecl[1], z = ecl[2];
    eq[0] = x;
    eq[1] = c * y - s * z;
    eq[2] = s * y + c * z;
}

void sy_eq_to_ecl(const double eq[3], double ecl[3])
{
    double c, s;
    obliquity(&c, &s);
    double x = eq[0], y = eq[1], z = eq[2];
    ecl[0] = x;
    ecl[1] = c * y + s * z;
    ecl[2] = -s * y + c * z;
}
