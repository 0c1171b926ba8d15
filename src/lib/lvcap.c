/* lvcap.c - launch-vehicle capability curves: CSV reading, checks and
 * monotone interpolation with GSL.  See synodic/lvcap.h for the format. */
#include "config.h"
#include "synodic.h"
#include "synodic/lvcap.h"

#include <ctype.h>
#include <errno.h>
#include <gsl/gsl_errno.h>
#include <gsl/gsl_interp.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

struct sy_lvcap {
    size_t n;
    double *c3, *mass;
    gsl_interp *interp;   /* Steffen (n >= 3) or linear (n == 2) */
    char source[512];
};

void sy_lvcap_free(sy_lvcap *cap)
{
    if (!cap) return;
    if (cap->interp) gsl_interp_free(cap->interp);
    free(cap->c3);
    free(cap->mass);
    free(cap);
}

/* Bounds of a capability table (see synodic/lvcap.h): C3 from -100
 * (bound orbits) to 10000 km2/s2 (v-infinity 100 km/s, far beyond any
 * launch vehicle), rows at least 1e-6 km2/s2 apart, at most 1e7 kg. */
#define LV_C3_MIN (-100.0)
#define LV_C3_MAX 10000.0
#define LV_C3_MIN_STEP 1e-6
#define LV_MASS_MAX 1e7

/* Where row k came from: "FILE:LINE" or "NAME row K". */
static void where(char *buf, size_t len, const char *name, const int *lines,
                  size_t k)
{
    if (lines) snprintf(buf, len, "%.400s:%d", name, lines[k]);
    else snprintf(buf, len, "%.400s row %zu", name, k + 1);
}

static sy_status build(const double *c3, const double *mass, size_t n,
                       const char *name, const int *lines, sy_lvcap **out,
                       sy_error *err)
{
    char w[440], w0[440];
    if (n < 2)
        return sy_fail(err, SY_ERR_PARSE, "%.400s: %zu data row%s; a capability "
                       "curve needs at least 2 rows of C3 (km2/s2), mass (kg)",
                       name, n, n == 1 ? "" : "s");
    for (size_t k = 0; k < n; k++) {
        where(w, sizeof w, name, lines, k);
        if (!isfinite(c3[k]) || !isfinite(mass[k]))
            return sy_fail(err, SY_ERR_PARSE, "%s: C3 and mass must be finite "
                           "numbers", w);
        if (mass[k] < 0)
            return sy_fail(err, SY_ERR_PARSE, "%s: mass %g kg is negative; an "
                           "injected mass is zero or positive", w, mass[k]);
        /* Physical bounds, which also keep the cubic coefficients of the
         * interpolant (slope ~ mass / spacing, h^3) far from overflow:
         * a table with a row at C3 6e123 made GSL's Steffen curve rise
         * again inside its last interval (tests/fuzz/fuzz_lvcap.c). */
        if (c3[k] < LV_C3_MIN || c3[k] > LV_C3_MAX)
            return sy_fail(err, SY_ERR_PARSE, "%s: C3 %g km2/s2 is outside "
                           "%g..%g km2/s2 (v-infinity up to 100 km/s); check "
                           "that the first column is C3 in km2/s2", w, c3[k],
                           LV_C3_MIN, LV_C3_MAX);
        if (mass[k] > LV_MASS_MAX)
            return sy_fail(err, SY_ERR_PARSE, "%s: mass %g kg is more than "
                           "%g kg; check that the second column is the mass "
                           "in kg", w, mass[k], LV_MASS_MAX);
        if (k == 0) continue;
        where(w0, sizeof w0, name, lines, k - 1);
        if (c3[k] == c3[k - 1])
            return sy_fail(err, SY_ERR_PARSE, "%s: C3 %g km2/s2 repeats the "
                           "row at %s; give each C3 once", w, c3[k], w0);
        if (c3[k] < c3[k - 1])
            return sy_fail(err, SY_ERR_PARSE, "%s: C3 %g km2/s2 is below the "
                           "%g of the row before (%s); sort the rows by "
                           "increasing C3", w, c3[k], c3[k - 1], w0);
        if (c3[k] - c3[k - 1] < LV_C3_MIN_STEP)
            return sy_fail(err, SY_ERR_PARSE, "%s: C3 %.9g km2/s2 is within "
                           "%g km2/s2 of the row before (%s); merge the two "
                           "rows", w, c3[k], LV_C3_MIN_STEP, w0);
        if (mass[k] > mass[k - 1])
            return sy_fail(err, SY_ERR_PARSE, "%s: mass %g kg exceeds the %g kg "
                           "at the lower C3 %g (%s); injected mass cannot rise "
                           "with C3 - check the columns are C3, mass", w,
                           mass[k], mass[k - 1], c3[k - 1], w0);
    }
    sy_lvcap *cap = calloc(1, sizeof *cap);
    if (!cap) return sy_fail(err, SY_ERR_NOMEM, "out of memory");
    cap->n = n;
    cap->c3 = malloc(n * sizeof *cap->c3);
    cap->mass = malloc(n * sizeof *cap->mass);
    cap->interp = gsl_interp_alloc(n >= 3 ? gsl_interp_steffen : gsl_interp_linear, n);
    if (!cap->c3 || !cap->mass || !cap->interp) {
        sy_lvcap_free(cap);
        return sy_fail(err, SY_ERR_NOMEM, "out of memory");
    }
    memcpy(cap->c3, c3, n * sizeof *c3);
    memcpy(cap->mass, mass, n * sizeof *mass);
    snprintf(cap->source, sizeof cap->source, "%s", name);
    gsl_error_handler_t *old = gsl_set_error_handler_off();
    int rc = gsl_interp_init(cap->interp, cap->c3, cap->mass, n);
    gsl_set_error_handler(old);
    if (rc != GSL_SUCCESS) {
        sy_lvcap_free(cap);
        return sy_fail(err, SY_ERR_PARSE, "%.400s: GSL refused the table (%s)",
                       name, gsl_strerror(rc));
    }
    *out = cap;
    return SY_OK;
}

sy_status sy_lvcap_from_table(const double *c3_km2_s2, const double *mass_kg,
                              size_t n, const char *name, sy_lvcap **out,
                              sy_error *err)
{
    if (!out || (n && (!c3_km2_s2 || !mass_kg)))
        return sy_fail(err, SY_ERR_ARG, "sy_lvcap_from_table: NULL argument");
    *out = NULL;
    return build(c3_km2_s2, mass_kg, n, name ? name : "capability table",
                 NULL, out, err);
}

static char *trim(char *s)
{
    while (isspace((unsigned char)*s)) s++;
    size_t n = strlen(s);
    while (n && isspace((unsigned char)s[n - 1])) s[--n] = '\0';
    return s;
}

/* A whole field as a finite number. */
static int parse_num(const char *s, double *x)
{
    if (!*s) return 0;
    char *end;
    errno = 0;
    *x = strtod(s, &end);
    return *end == '\0' && errno != ERANGE && isfinite(*x);
}

sy_status sy_lvcap_load(const char *path, sy_lvcap **out, sy_error *err)
{
    if (!path || !out) return sy_fail(err, SY_ERR_ARG, "sy_lvcap_load: NULL argument");
    *out = NULL;
    FILE *f = fopen(path, "r");
    if (!f)
        return sy_fail(err, SY_ERR_IO, "%.400s: cannot open capability file: %s",
                       path, strerror(errno));
    size_t cap_rows = 0, n = 0;
    double *c3 = NULL, *mass = NULL;
    int *lines = NULL;
    char *buf = NULL;
    size_t bufcap = 0;
    int lineno = 0, seen_content = 0;
    sy_status st = SY_OK;
    ssize_t len;
    while ((len = getline(&buf, &bufcap, f)) >= 0) {
        lineno++;
        if (memchr(buf, '\0', (size_t)len)) {
            st = sy_fail(err, SY_ERR_PARSE, "%.400s:%d: NUL byte; a capability "
                         "file is plain text", path, lineno);
            break;
        }
        char *hash = strchr(buf, '#');
        if (hash) *hash = '\0';
        char *s = trim(buf);
        if (lineno == 1 && (unsigned char)s[0] == 0xEF && (unsigned char)s[1] == 0xBB &&
            (unsigned char)s[2] == 0xBF)
            s = trim(s + 3);
        if (!*s) continue;
        char *comma = strchr(s, ',');
        char *a = s, *b = comma ? comma + 1 : NULL;
        if (comma) *comma = '\0';
        a = trim(a);
        double x, y;
        if (!seen_content && !parse_num(a, &x)) {
            seen_content = 1; /* a header line, e.g. c3_km2_s2,mass_kg */
            continue;
        }
        seen_content = 1;
        if (!b || strchr(b, ',')) {
            st = sy_fail(err, SY_ERR_PARSE, "%.400s:%d: expected two comma-"
                         "separated numbers 'C3_km2_s2, mass_kg', e.g. 10.0, "
                         "1520", path, lineno);
            break;
        }
        b = trim(b);
        if (!parse_num(a, &x)) {
            st = sy_fail(err, SY_ERR_PARSE, "%.400s:%d: C3 '%.40s' is not a "
                         "finite number (km2/s2)", path, lineno, a);
            break;
        }
        if (!parse_num(b, &y)) {
            st = sy_fail(err, SY_ERR_PARSE, "%.400s:%d: mass '%.40s' is not a "
                         "finite number (kg)", path, lineno, b);
            break;
        }
        if (n == cap_rows) {
            size_t nc = cap_rows ? 2 * cap_rows : 32;
            double *c = realloc(c3, nc * sizeof *c), *m;
            if (c) c3 = c;
            m = c ? realloc(mass, nc * sizeof *m) : NULL;
            if (m) mass = m;
            int *l = m ? realloc(lines, nc * sizeof *l) : NULL;
            if (l) lines = l;
            if (!l) { st = sy_fail(err, SY_ERR_NOMEM, "out of memory reading %.400s", path); break; }
            cap_rows = nc;
        }
        c3[n] = x;
        mass[n] = y;
        lines[n] = lineno;
        n++;
    }
    if (st == SY_OK && ferror(f))
        st = sy_fail(err, SY_ERR_IO, "%.400s: cannot read capability file: %s",
                     path, strerror(errno));
    fclose(f);
    free(buf);
    if (st == SY_OK) st = build(c3, mass, n, path, lines, out, err);
    free(c3);
    free(mass);
    free(lines);
    return st;
}

sy_status sy_lvcap_mass(const sy_lvcap *cap, double c3_km2_s2, double *mass_kg,
                        sy_error *err)
{
    *mass_kg = NAN;
    if (!cap) return sy_fail(err, SY_ERR_ARG, "sy_lvcap_mass: NULL curve");
    double lo = cap->c3[0], hi = cap->c3[cap->n - 1];
    if (!(c3_km2_s2 >= lo && c3_km2_s2 <= hi))
        return sy_fail(err, SY_ERR_RANGE, "C3 %g km2/s2 is outside the "
                       "capability table %.300s (C3 %g to %g km2/s2); extend "
                       "the table - synodic does not extrapolate",
                       c3_km2_s2, cap->source, lo, hi);
    /* No accelerator: gsl_interp_eval with acc == NULL only reads the
     * interpolant, so concurrent calls are safe. */
    double m;
    if (gsl_interp_eval_e(cap->interp, cap->c3, cap->mass, c3_km2_s2, NULL, &m) != GSL_SUCCESS)
        return sy_fail(err, SY_ERR_RANGE, "C3 %g km2/s2 could not be interpolated in %.300s",
                       c3_km2_s2, cap->source);
    /* Steffen's interpolant stays between the two bracketing rows of
     * monotone data, but GSL's evaluation rounds: a row of 0 kg came back
     * as -3.4e-13 kg (found by tests/fuzz/fuzz_lvcap.c).  Clamp to the
     * bracket so the curve is exact at the rows, never negative and
     * monotone to the last bit. */
    size_t i = gsl_interp_bsearch(cap->c3, c3_km2_s2, 0, cap->n - 1);
    double m_hi = cap->mass[i], m_lo = cap->mass[i + 1 < cap->n ? i + 1 : i];
    if (m > m_hi) m = m_hi;
    if (m < m_lo) m = m_lo;
    *mass_kg = m;
    return SY_OK;
}

void sy_lvcap_range(const sy_lvcap *cap, double *c3_min_km2_s2, double *c3_max_km2_s2)
{
    if (c3_min_km2_s2) *c3_min_km2_s2 = cap->c3[0];
    if (c3_max_km2_s2) *c3_max_km2_s2 = cap->c3[cap->n - 1];
}

size_t sy_lvcap_rows(const sy_lvcap *cap)
{
    return cap->n;
}

const char *sy_lvcap_source(const sy_lvcap *cap)
{
    return cap->source;
}
