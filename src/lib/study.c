/* study.c - porkchop study files: reading, overrides and validation.
 *
 * Study file format (INI, read with inih; our own design).  Comments start
 * with ';' or '#' at the beginning of a line, or with ' ;' after a value.
 * Section and key names are lower case.  Each section may appear once and
 * each key once per section.  Lines are limited to 197 characters (the
 * line buffer of Debian's inih).
 *
 *   [study]
 *     title       required; the chart title (UTF-8)
 *     subtitle    optional second title line (UTF-8)
 *     bodies      optional bodies file defining small bodies (see
 *                 synodic(1)); a relative path is taken relative to the
 *                 directory of the study file
 *
 *   [transfer]
 *     origin      required; departure body name (looked up by the caller)
 *     target      required; arrival body name; must differ from origin
 *     revolutions complete revolutions of the transfer, integer 0..100
 *                 (default 0)
 *     branch      left | right: which multi-revolution Lambert solution;
 *                 required when revolutions >= 1, ignored for 0
 *
 *   [departure]   (required)
 *     start, end  window of departure dates (TDB): YYYY-MM-DD,
 *                 YYYY-MM-DDTHH:MM[:SS] or JD2461234.5; end after start,
 *                 at most 200 years apart
 *     step_days   grid step in days; > 0, at most the window span and at
 *                 most 100000 steps per window
 *
 *   [arrival]     arrival-date window (the chart's y axis is the arrival
 *     start, end, step_days    date); same rules as [departure], and the
 *                 arrival window must end after the departure window starts
 *   -- or --
 *   [flight]      time-of-flight window (the y axis is the flight time)
 *     tof_min_days >= 1 (patched conics need at least a day),
 *     tof_max_days > tof_min_days (at most 200 years),
 *     step_days    > 0, at most tof_max_days - tof_min_days
 *   Exactly one of [arrival] and [flight] must be present.
 *
 *   [orbits]      (all optional; each key turns on the matching figure)
 *     park_alt_km      circular parking-orbit altitude at the origin, >= 0
 *                      (departure delta-v, field dv_dep)
 *     capture_peri_km  capture-orbit periapsis altitude at the target, >= 0
 *                      (capture delta-v, field dv_cap)
 *     capture_apo_km   capture-orbit apoapsis altitude, >= capture_peri_km
 *                      (default: capture_peri_km, a circular orbit); needs
 *                      capture_peri_km
 *     entry_alt_km     entry-interface altitude at the target, >= 0
 *                      (entry speed, field v_entry)
 *
 *   [limits]      (all optional; absent = no limit)
 *     c3_max_km2_s2      largest acceptable departure C3, > 0
 *     vinf_arr_max_km_s  largest acceptable arrival v-infinity, > 0
 *     dla_max_deg        largest acceptable |DLA|, in (0, 90]
 *     tof_min_days       shortest acceptable time of flight, 0..73050
 *     tof_max_days       longest acceptable time of flight, > 0, at most
 *                        73050 days (200 years) and > tof_min_days
 *
 *   [chart]
 *     fields      comma list of up to 6 field names; the first is the
 *                 primary field (default "c3, vinf_arr").  Names: c3,
 *                 vinf_dep, dla, rla, vinf_arr, c3_arr, dap, rap, tof,
 *                 angle, min_sun, dv_dep, dv_cap, dv_total, v_entry.
 *                 dv_dep needs [orbits] park_alt_km, dv_cap needs
 *                 capture_peri_km, dv_total needs both, v_entry needs
 *                 entry_alt_km.
 *     NAME_levels iso-line levels of field NAME: "auto" (default) or a
 *                 strictly ascending comma list of at most 64 numbers,
 *                 e.g. c3_levels = 8, 9, 10, 12, 15, 20.  Accepted (and
 *                 checked) for every field name; used for charted fields.
 *     tof_lines   time-of-flight iso-lines: auto (default) | none | a
 *                 strictly ascending comma list of at most 64 positive
 *                 day counts
 *     filled      yes | no (default no): colour bands for the primary field
 *     types       yes | no (default yes): draw the Type I / II boundary
 *               "mass" may also be listed (it does not count as a
 *                 primary field): contours of the injected mass the launch
 *                 vehicle delivers at each cell's C3; needs
 *                 [launch_vehicle] capability.
 *     mass_levels  iso-lines of "mass" in kg: auto (default) or a strictly
 *                 ascending comma list, e.g. mass_levels = 1000, 1200, 1400
 *   The y axis (arrival date or flight time) follows from [arrival] or
 *   [flight].
 *
 *   [period]      launch-period design (synodic period; all optional)
 *     length_days  required launch period in days, whole number >= 1
 *     arrival      fixed | free | both (default both): one arrival date
 *                 for the whole period, a free arrival per day, or both
 *     type         I | II | either (default either): fly every day of
 *                 the period on that transfer type (one spacecraft and
 *                 cruise design), or take the better type day by day
 *
 *   [launch_vehicle]
 *     capability  CSV of injected mass against C3 (format in
 *                 synodic/lvcap.h and synodic(1)); a relative path is
 *                 taken relative to the study file's directory; read and
 *                 checked when the study is loaded
 *     spacecraft_mass_kg  spacecraft launch mass, > 0: mass margins are
 *                 capability minus this; needs capability
 *
 *   [output]
 *     formats     comma list of png, svg, pdf, csv, json (default: all)
 *     directory   output directory (default "out"), relative to the
 *                 current directory, not to the study file
 *     name        base name of the output files, without '/' (default:
 *                 the study file's name without ".ini")
 *     width_in, height_in   chart size in inches (default 7.5 x 5.5),
 *                 > 0 and <= 100
 *     width_px, height_px   chart size in pixels instead, converted to
 *                 inches with dpi; give either width_in or width_px (and
 *                 either height_in or height_px), not both
 *     dpi         resolution of raster output, 50..1200 (default 200); a
 *                 PNG may not exceed 32767 pixels on a side
 *
 * Yes/no values also accept true/false; list items, yes/no, auto/none,
 * left/right and format names are case-insensitive.  Numbers must be
 * finite decimal numbers; nan, inf and out-of-range values (1e999) are
 * refused.
 *
 * Overrides "section.key=value" (synodic's --set) are applied after the
 * file, in order, as if the key had been written in the file: an override
 * replaces the file's value of the same key (no duplicate-key error), a
 * later override replaces an earlier one, and an override of a key of
 * [arrival] or [flight] makes that section present.  Errors in an
 * override are reported as "--set section.key=value: ...".
 *
 * Design: the file is first read into a small table of (section, key,
 * value, line) entries, rejecting unknown sections and keys and
 * duplicates; overrides then edit the table; finally the table is
 * interpreted section by section.  Interpreting from one table is what
 * lets an override go through exactly the validation of a file value.
 * The study is filled all-or-nothing: on error *study is not modified.
 */
#include "config.h"
#include "synodic.h"
#include "synodic/lvcap.h"
#include "synodic/study.h"

#include "inifile.h"

#include <ctype.h>
#include <errno.h>
#include <ini.h>
#include <limits.h>
#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>

/* ------------------------------------------------------------------ */
/* Fields                                                              */

static const struct {
    const char *name, *key, *label;
} field_info[SY_NFIELDS] = {
    [SY_F_C3] = {"c3", "c3_km2_s2", "C3 (km²/s²)"},
    [SY_F_VINF_DEP] = {"vinf_dep", "vinf_dep_km_s", "Departure v∞ (km/s)"},
    [SY_F_DLA] = {"dla", "dla_deg", "DLA (deg)"},
    [SY_F_RLA] = {"rla", "rla_deg", "RLA (deg)"},
    [SY_F_VINF_ARR] = {"vinf_arr", "vinf_arr_km_s", "Arrival v∞ (km/s)"},
    [SY_F_C3_ARR] = {"c3_arr", "c3_arr_km2_s2", "Arrival C3 (km²/s²)"},
    [SY_F_DAP] = {"dap", "dap_deg", "DAP (deg)"},
    [SY_F_RAP] = {"rap", "rap_deg", "RAP (deg)"},
    [SY_F_TOF] = {"tof", "tof_days", "Time of flight (days)"},
    [SY_F_ANGLE] = {"angle", "transfer_angle_deg", "Transfer angle (deg)"},
    [SY_F_MIN_SUN] = {"min_sun", "min_sun_dist_au",
                      "Minimum Sun distance (au)"},
    [SY_F_DV_DEP] = {"dv_dep", "dv_dep_km_s", "Departure Δv (km/s)"},
    [SY_F_DV_CAP] = {"dv_cap", "dv_cap_km_s", "Capture Δv (km/s)"},
    [SY_F_DV_TOTAL] = {"dv_total", "dv_total_km_s", "Total Δv (km/s)"},
    [SY_F_V_ENTRY] = {"v_entry", "v_entry_km_s", "Entry speed (km/s)"},
};

#define FIELD_NAMES                                                        \
    "c3, vinf_dep, dla, rla, vinf_arr, c3_arr, dap, rap, tof, angle, "     \
    "min_sun, dv_dep, dv_cap, dv_total, v_entry"

const char *sy_field_name(sy_field f)
{
    return (unsigned)f < SY_NFIELDS ? field_info[f].name : "unknown";
}

const char *sy_field_key(sy_field f)
{
    return (unsigned)f < SY_NFIELDS ? field_info[f].key : "unknown";
}

const char *sy_field_label(sy_field f)
{
    return (unsigned)f < SY_NFIELDS ? field_info[f].label : "unknown";
}

int sy_field_from_name(const char *name)
{
    if (!name)
        return -1;
    for (int f = 0; f < SY_NFIELDS; f++)
        if (strcasecmp(name, field_info[f].name) == 0)
            return f;
    return -1;
}

int sy_type_from_name(const char *name)
{
    static const char *const names[3] = {"either", "I", "II"};
    for (int t = 0; name && t < 3; t++)
        if (strcasecmp(name, names[t]) == 0)
            return t;
    return -1;
}

/* ------------------------------------------------------------------ */
/* Sections and keys                                                   */

enum { S_STUDY, S_TRANSFER, S_DEPARTURE, S_ARRIVAL, S_FLIGHT, S_ORBITS,
       S_LIMITS, S_CHART, S_OUTPUT, S_PERIOD, S_LV, S_COUNT };

static const char *const sect_names[S_COUNT] = {
    "study", "transfer", "departure", "arrival", "flight",
    "orbits", "limits", "chart", "output", "period", "launch_vehicle"};

#define ACCEPTED_SECTIONS                                                  \
    "accepted sections: [study], [transfer], [departure], [arrival], "     \
    "[flight], [orbits], [limits], [chart], [output], [period], "         \
    "[launch_vehicle]"

static const char *const keys_study[] = {"title", "subtitle", "bodies", NULL};
static const char *const keys_transfer[] = {"origin", "target", "revolutions",
                                            "branch", NULL};
static const char *const keys_window[] = {"start", "end", "step_days", NULL};
static const char *const keys_flight[] = {"tof_min_days", "tof_max_days",
                                          "step_days", NULL};
static const char *const keys_orbits[] = {"park_alt_km", "capture_peri_km",
                                          "capture_apo_km", "entry_alt_km",
                                          NULL};
static const char *const keys_limits[] = {"c3_max_km2_s2", "vinf_arr_max_km_s",
                                          "dla_max_deg", "tof_min_days",
                                          "tof_max_days", NULL};
/* Plus NAME_levels for every field name (see levels_key_field()). */
static const char *const keys_chart[] = {"fields", "tof_lines", "filled",
                                         "types", NULL};
static const char *const keys_output[] = {"formats", "directory", "name",
                                          "width_in", "height_in", "width_px",
                                          "height_px", "dpi", NULL};

static const char *const keys_period[] = {"length_days", "arrival", "type", NULL};
static const char *const keys_lv[] = {"capability", "spacecraft_mass_kg",
                                      NULL};

static const char *const *const sect_keys[S_COUNT] = {
    keys_study, keys_transfer, keys_window, keys_window, keys_flight,
    keys_orbits, keys_limits, keys_chart, keys_output, keys_period, keys_lv};

static int sect_from_name(const char *name)
{
    for (int s = 0; s < S_COUNT; s++)
        if (strcmp(name, sect_names[s]) == 0)
            return s;
    return -1;
}

/* Field of a "NAME_levels" key, or -1. */
static int levels_key_field(const char *key)
{
    static const char suffix[] = "_levels";
    size_t n = strlen(key), ns = sizeof suffix - 1;
    if (n <= ns || strcmp(key + n - ns, suffix) != 0)
        return -1;
    char name[48];
    if (n - ns >= sizeof name)
        return -1;
    memcpy(name, key, n - ns);
    name[n - ns] = '\0';
    for (int f = 0; f < SY_NFIELDS; f++)
        if (strcmp(name, field_info[f].name) == 0)
            return f;
    return -1;
}

static int key_known(int s, const char *key)
{
    for (const char *const *k = sect_keys[s]; *k; k++)
        if (strcmp(*k, key) == 0)
            return 1;
    /* mass_levels: NAME_levels of the derived field "mass" */
    return s == S_CHART &&
           (levels_key_field(key) >= 0 || strcmp(key, "mass_levels") == 0);
}

/* "accepted keys: a, b, c" for section s. */
static void accepted_keys(int s, char *buf, size_t len)
{
    size_t used = (size_t)snprintf(buf, len, "accepted keys:");
    const char *sep = " ";
    for (const char *const *k = sect_keys[s]; *k && used < len; k++) {
        used += (size_t)snprintf(buf + used, len - used, "%s%s", sep, *k);
        sep = ", ";
    }
    if (s == S_CHART && used < len)
        snprintf(buf + used, len - used,
                 ", NAME_levels for NAME one of " FIELD_NAMES ", mass");
}

/* ------------------------------------------------------------------ */
/* Reading context                                                     */

/* Every key of every section, counted: 3+4+3+3+3+4+5+(5+15)+8+2+2 = 57.
 * As duplicates are refused, the table can never hold more (room is left
 * for keys to come). */
#define MAX_ENTRIES 96

typedef struct {
    int sect;
    char key[48];
    char *value;          /* malloc'd */
    int line;             /* file line; 0 for an override */
    const char *ovr;      /* the override text, or NULL for a file value */
    size_t ovr_index;     /* position of that override in the list */
} entry;

/* Locations are at most this many characters of the path / override, so
 * that the rest of a message fits sy_error. */
#define LOC_MAX 160

typedef struct {
    const char *path;
    sy_ini_reader rd;         /* file, line buffer, line number */
    int cur_sect;             /* -1: before any section; -2: bad header */
    int sect_line[S_COUNT];   /* header line in the file, 0 if absent */
    int sect_ovr[S_COUNT];    /* some override set a key of it */
    entry ent[MAX_ENTRIES];
    size_t nent;
    sy_status st;             /* first error */
    int err_line;             /* file line of the first error, or 0 */
    sy_error *err;
} ctx;

static void vfail(ctx *c, sy_status st, int line, const char *loc,
                  const char *fmt, va_list ap)
{
    if (c->st != SY_OK)
        return;
    c->st = st;
    c->err_line = line;
    if (!c->err)
        return;
    char what[480];
    vsnprintf(what, sizeof what, fmt, ap);
    sy_fail(c->err, st, "%s: %s", loc, what);
}

/* An error at a line of the file (line 0: the file as a whole). */
#if defined(__GNUC__)
__attribute__((format(printf, 4, 5)))
#endif
static void fail_line(ctx *c, sy_status st, int line, const char *fmt, ...)
{
    char loc[LOC_MAX + 24];
    snprintf(loc, sizeof loc, "%.160s:%d", c->path, line);
    va_list ap;
    va_start(ap, fmt);
    vfail(c, st, line, loc, fmt, ap);
    va_end(ap);
}

/* An error about an entry, wherever it came from; the message is prefixed
 * by "[section] key 'KEY': ". */
#if defined(__GNUC__)
__attribute__((format(printf, 3, 4)))
#endif
static void fail_key(ctx *c, const entry *e, const char *fmt, ...)
{
    char loc[LOC_MAX + 24];
    if (e->ovr)
        snprintf(loc, sizeof loc, "--set %.160s", e->ovr);
    else
        snprintf(loc, sizeof loc, "%.160s:%d", c->path, e->line);
    char what[400];
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(what, sizeof what, fmt, ap);
    va_end(ap);
    if (c->st != SY_OK)
        return;
    c->st = SY_ERR_PARSE;
    c->err_line = e->line;
    if (c->err)
        sy_fail(c->err, SY_ERR_PARSE, "%s: [%s] key '%s': %s", loc,
                sect_names[e->sect], e->key, what);
}

/* Where entry e came from, for a message about entry `at` that mentions
 * e: "line N" in the same file, "FILE:N" when `at` is an override, or
 * "--set TEXT". */
static void entry_where(const ctx *c, const entry *e, const entry *at,
                        char *buf, size_t len)
{
    if (e->ovr) {
        snprintf(buf, len, "--set %.60s", e->ovr);
    } else if (at && at->ovr) {
        const char *slash = strrchr(c->path, '/');
        snprintf(buf, len, "%.60s:%d", slash ? slash + 1 : c->path, e->line);
    } else {
        snprintf(buf, len, "line %d", e->line);
    }
}

/* Midnight dates print without the time. */
static void fmt_date(double jd, char *buf, size_t len)
{
    double frac = jd + 0.5 - floor(jd + 0.5);
    int midnight = fabs(frac) < 0.5 / SY_DAY_S || fabs(frac - 1) < 0.5 / SY_DAY_S;
    sy_date_format(jd, !midnight, buf, len);
}

/* The first override that set a key of section s, or NULL. */
static const entry *first_override(const ctx *c, int s)
{
    const entry *best = NULL;
    for (size_t i = 0; i < c->nent; i++)
        if (c->ent[i].sect == s && c->ent[i].ovr &&
            (!best || c->ent[i].ovr_index < best->ovr_index))
            best = &c->ent[i];
    return best;
}

static entry *find_entry(ctx *c, int s, const char *key)
{
    for (size_t i = 0; i < c->nent; i++)
        if (c->ent[i].sect == s && strcmp(c->ent[i].key, key) == 0)
            return &c->ent[i];
    return NULL;
}

static entry *add_entry(ctx *c, int s, const char *key, const char *value,
                        int line, const char *ovr, size_t ovr_index)
{
    if (c->nent >= MAX_ENTRIES || strlen(key) >= sizeof c->ent[0].key)
        return NULL; /* cannot happen: keys are known and unique */
    char *v = strdup(value ? value : "");
    if (!v)
        return NULL;
    entry *e = &c->ent[c->nent++];
    e->sect = s;
    snprintf(e->key, sizeof e->key, "%s", key);
    e->value = v;
    e->line = line;
    e->ovr = ovr;
    e->ovr_index = ovr_index;
    return e;
}

/* A section header line "[...]" (already left-trimmed). inih parses the
 * line again but its section name is not used: ours is tracked here, where
 * the line number is known. */
static void section_begin(ctx *c, const char *line)
{
    c->cur_sect = -2;
    char name[64];
    if (sy_ini_section_text(line, name, sizeof name) != 0) {
        fail_line(c, SY_ERR_PARSE, c->rd.lineno,
                  "section header without closing ']'; write e.g. [study]");
        return;
    }
    sy_ini_trim(name);
    int s = sect_from_name(name);
    if (s < 0) {
        fail_line(c, SY_ERR_PARSE, c->rd.lineno,
                  "unknown section [%.40s]; " ACCEPTED_SECTIONS, name);
        return;
    }
    if (c->sect_line[s]) {
        fail_line(c, SY_ERR_PARSE, c->rd.lineno,
                  "section [%s] appears twice (first at line %d); put all "
                  "its keys under one [%s] header",
                  name, c->sect_line[s], name);
        return;
    }
    c->sect_line[s] = c->rd.lineno;
    c->cur_sect = s;
}

static void on_section(void *user, const char *line)
{
    section_begin(user, line);
}

static void on_bad_line(void *user, const char *msg)
{
    ctx *c = user;
    fail_line(c, SY_ERR_PARSE, c->rd.lineno, "%s", msg);
}

static int handler(void *user, const char *sect, const char *name,
                   const char *value)
{
    (void)sect;
    ctx *c = user;
    if (c->st != SY_OK)
        return 1;
    if (c->cur_sect == -1) {
        fail_line(c, SY_ERR_PARSE, c->rd.lineno,
                  "key '%.40s' outside any section; put it under a section "
                  "header such as [study]; " ACCEPTED_SECTIONS, name);
        return 0;
    }
    if (c->cur_sect < 0)
        return 1; /* the bad header is already reported */
    int s = c->cur_sect;
    char acc[400];
    if (!key_known(s, name)) {
        accepted_keys(s, acc, sizeof acc);
        fail_line(c, SY_ERR_PARSE, c->rd.lineno, "[%s] unknown key '%.40s'; %s",
                  sect_names[s], name, acc);
        return 0;
    }
    const entry *prev = find_entry(c, s, name);
    if (prev) {
        fail_line(c, SY_ERR_PARSE, c->rd.lineno,
                  "[%s] key '%s' given twice (first at line %d); keep one "
                  "of them", sect_names[s], name, prev->line);
        return 0;
    }
    if (!add_entry(c, s, name, value, c->rd.lineno, NULL, 0)) {
        fail_line(c, SY_ERR_NOMEM, c->rd.lineno, "out of memory");
        return 0;
    }
    return 1;
}

/* Apply one "section.key=value" override. */
static void apply_override(ctx *c, const char *text, size_t index)
{
    char loc[LOC_MAX + 24];
    snprintf(loc, sizeof loc, "--set %.160s", text ? text : "(null)");
#define OVR_FAIL(...)                                                      \
    do {                                                                   \
        if (c->st == SY_OK) {                                              \
            c->st = SY_ERR_PARSE;                                          \
            char what_[440];                                               \
            snprintf(what_, sizeof what_, __VA_ARGS__);                    \
            sy_fail(c->err, SY_ERR_PARSE, "%s: %s", loc, what_);           \
        }                                                                  \
        return;                                                            \
    } while (0)
    if (!text)
        OVR_FAIL("missing override; write section.key=value");
    const char *eq = strchr(text, '=');
    const char *dot = strchr(text, '.');
    if (!eq || !dot || dot > eq)
        OVR_FAIL("expected section.key=value, e.g. "
                 "limits.c3_max_km2_s2=20");
    char sname[64], key[64];
    size_t ns = (size_t)(dot - text), nk = (size_t)(eq - dot - 1);
    if (ns >= sizeof sname || nk >= sizeof key)
        OVR_FAIL("section or key name too long; expected section.key=value");
    memcpy(sname, text, ns);
    sname[ns] = '\0';
    memcpy(key, dot + 1, nk);
    key[nk] = '\0';
    sy_ini_trim(sname);
    sy_ini_trim(key);
    if (!sname[0] || !key[0])
        OVR_FAIL("empty section or key; expected section.key=value, e.g. "
                 "limits.c3_max_km2_s2=20");
    int s = sect_from_name(sname);
    if (s < 0)
        OVR_FAIL("unknown section [%.40s]; " ACCEPTED_SECTIONS, sname);
    if (!key_known(s, key)) {
        char acc[400];
        accepted_keys(s, acc, sizeof acc);
        OVR_FAIL("[%s] unknown key '%.40s'; %.300s", sect_names[s], key,
                 acc);
    }
    char *value = strdup(eq + 1);
    if (!value) {
        c->st = SY_ERR_NOMEM;
        sy_fail(c->err, SY_ERR_NOMEM, "%s: out of memory", loc);
        return;
    }
    sy_ini_trim(value);
    entry *e = find_entry(c, s, key);
    if (e) {
        free(e->value);
        e->value = value;
        e->line = 0;
        e->ovr = text;
        e->ovr_index = index;
    } else {
        e = add_entry(c, s, key, value, 0, text, index);
        free(value);
        if (!e) {
            c->st = SY_ERR_NOMEM;
            sy_fail(c->err, SY_ERR_NOMEM, "%s: out of memory", loc);
            return;
        }
    }
    c->sect_ovr[s] = 1;
#undef OVR_FAIL
}

/* ------------------------------------------------------------------ */
/* Values                                                              */

/* Largest window span and flight time: 200 Julian years. */
#define MAX_SPAN_DAYS (200.0 * 365.25)
/* Most grid steps along one axis. */
#define MAX_AXIS_STEPS 100000.0
/* Shortest flight of a [flight] window (see do_flight()). */
#define MIN_FLIGHT_DAYS 1.0
#define MAX_SIZE_IN 100.0
/* Largest side of a cairo image surface (32767 px, from memory of the
 * cairo documentation). */
#define MAX_PNG_PX 32767.0

/* Number of an entry; reports the error. */
static int get_number(ctx *c, const entry *e, const char *example,
                      double *out)
{
    if (!sy_ini_number(e->value, out)) {
        fail_key(c, e, "'%.40s' is not a finite number; write e.g. %s %s",
                 e->value, e->key, example);
        return 0;
    }
    return 1;
}

/* Optional number: returns 1 when present and valid, 0 when absent, -1 on
 * error. */
static int opt_number(ctx *c, int s, const char *key, const char *example,
                      double *out, const entry **pe)
{
    const entry *e = find_entry(c, s, key);
    if (pe)
        *pe = e;
    if (!e)
        return 0;
    return get_number(c, e, example, out) ? 1 : -1;
}

/* The entry of a required key; when missing, reports it at the section's
 * header line (0 when the section is absent or came from overrides). */
static const entry *require(ctx *c, int s, const char *key,
                            const char *example)
{
    const entry *e = find_entry(c, s, key);
    if (e)
        return e;
    if (c->sect_line[s] || c->sect_ovr[s])
        fail_line(c, SY_ERR_PARSE, c->sect_line[s],
                  "[%s] missing required key '%s'; add a line %s %s",
                  sect_names[s], key, key, example);
    else
        fail_line(c, SY_ERR_PARSE, 0,
                  "[%s] missing required key '%s' (there is no [%s] "
                  "section); add a section [%s] with a line %s %s",
                  sect_names[s], key, sect_names[s], sect_names[s], key,
                  example);
    return NULL;
}

static int get_date(ctx *c, const entry *e, double *jd)
{
    sy_error derr;
    derr.msg[0] = '\0';
    if (sy_date_parse(e->value, jd, &derr) != SY_OK) {
        fail_key(c, e, "%.300s", derr.msg);
        return 0;
    }
    return 1;
}

static int get_bool(ctx *c, const entry *e, int *out)
{
    const char *v = e->value;
    if (!strcasecmp(v, "yes") || !strcasecmp(v, "true")) {
        *out = 1;
        return 1;
    }
    if (!strcasecmp(v, "no") || !strcasecmp(v, "false")) {
        *out = 0;
        return 1;
    }
    fail_key(c, e, "'%.40s' is not yes or no; write %s = yes or %s = no",
             v, e->key, e->key);
    return 0;
}

/* Copy a string value into a fixed buffer; refuses empty when !allow_empty
 * and values that do not fit. */
static int get_string(ctx *c, const entry *e, char *dst, size_t len,
                      int allow_empty, const char *what)
{
    if (!allow_empty && !e->value[0]) {
        fail_key(c, e, "empty value; give %s", what);
        return 0;
    }
    size_t n = strlen(e->value);
    if (n >= len) {
        fail_key(c, e, "value is %zu bytes long, more than the %zu allowed; "
                 "shorten it", n, len - 1);
        return 0;
    }
    memcpy(dst, e->value, n + 1);
    return 1;
}

/* Well-formed UTF-8 (RFC 3629: no overlongs, surrogates or > U+10FFFF). */
static int utf8_valid(const char *s)
{
    const unsigned char *p = (const unsigned char *)s;
    while (*p) {
        unsigned c = *p;
        int n;
        unsigned min;
        if (c < 0x80) { p++; continue; }
        else if ((c & 0xE0) == 0xC0) { n = 1; min = 0x80; c &= 0x1F; }
        else if ((c & 0xF0) == 0xE0) { n = 2; min = 0x800; c &= 0x0F; }
        else if ((c & 0xF8) == 0xF0) { n = 3; min = 0x10000; c &= 0x07; }
        else return 0;
        p++;
        for (int i = 0; i < n; i++, p++) {
            if ((*p & 0xC0) != 0x80)
                return 0;
            c = (c << 6) | (*p & 0x3F);
        }
        if (c < min || c > 0x10FFFF || (c >= 0xD800 && c <= 0xDFFF))
            return 0;
    }
    return 1;
}

/* Split a comma list in place into trimmed items (pointers into buf); the
 * first `max` are stored, all are counted.  Returns the count, or -1 with
 * *why set when an item is empty. */
static int split_list(char *buf, char **items, int max, const char **why)
{
    int n = 0;
    char *p = buf;
    for (;;) {
        char *comma = strchr(p, ',');
        if (comma)
            *comma = '\0';
        sy_ini_trim(p);
        if (!*p) {
            *why = "empty item in the list (two commas in a row, or a "
                   "comma at an end)";
            return -1;
        }
        if (n < max)
            items[n] = p;
        n++;
        if (!comma)
            break;
        p = comma + 1;
    }
    return n;
}

/* A strictly ascending list of at most SY_MAX_LEVELS numbers (each > 0
 * when positive != 0). */
static int get_levels(ctx *c, const entry *e, int positive, double *out,
                      size_t *nout)
{
    char *buf = strdup(e->value);
    if (!buf) {
        c->st = SY_ERR_NOMEM;
        sy_fail(c->err, SY_ERR_NOMEM, "out of memory");
        return 0;
    }
    char *items[SY_MAX_LEVELS + 1];
    const char *why = NULL;
    int n = e->value[0] ? split_list(buf, items, SY_MAX_LEVELS + 1, &why)
                        : (why = "empty value", -1);
    int ok = 0;
    if (n < 0) {
        fail_key(c, e, "%s; write auto or numbers separated by commas, "
                 "e.g. 8, 9, 10, 12", why);
    } else if (n > SY_MAX_LEVELS) {
        fail_key(c, e, "more than %d values; give at most %d",
                 SY_MAX_LEVELS, SY_MAX_LEVELS);
    } else {
        ok = 1;
        for (int i = 0; i < n && ok; i++) {
            double x;
            if (!sy_ini_number(items[i], &x)) {
                fail_key(c, e, "item %d '%.40s' is not a finite number; "
                         "write numbers separated by commas, e.g. 8, 9, 10",
                         i + 1, items[i]);
                ok = 0;
            } else if (positive && !(x > 0)) {
                fail_key(c, e, "item %d (%g) is not positive; flight times "
                         "are positive day counts", i + 1, x);
                ok = 0;
            } else if (i > 0 && !(x > out[i - 1])) {
                fail_key(c, e, "values are not in ascending order (%g "
                         "after %g); list each value once, smallest first",
                         x, out[i - 1]);
                ok = 0;
            } else {
                out[i] = x;
            }
        }
        if (ok)
            *nout = (size_t)n;
    }
    free(buf);
    return ok;
}

/* ------------------------------------------------------------------ */
/* Sections                                                            */

static int do_study(ctx *c, sy_study *st)
{
    const entry *e = require(c, S_STUDY, "title", "= Mars orbiter 2033");
    if (!e || !get_string(c, e, st->title, sizeof st->title, 0, "a title"))
        return 0;
    if (!utf8_valid(st->title)) {
        fail_key(c, e, "not valid UTF-8; save the file as UTF-8");
        return 0;
    }
    if ((e = find_entry(c, S_STUDY, "subtitle"))) {
        if (!get_string(c, e, st->subtitle, sizeof st->subtitle, 1, ""))
            return 0;
        if (!utf8_valid(st->subtitle)) {
            fail_key(c, e, "not valid UTF-8; save the file as UTF-8");
            return 0;
        }
    }
    if ((e = find_entry(c, S_STUDY, "bodies"))) {
        if (!e->value[0]) {
            fail_key(c, e, "empty path; give a bodies file, e.g. bodies = "
                     "bodies.ini, or remove the key");
            return 0;
        }
        int n;
        if (e->value[0] == '/' || strcmp(st->dir, ".") == 0)
            n = snprintf(st->bodies_file, sizeof st->bodies_file, "%s",
                         e->value);
        else
            n = snprintf(st->bodies_file, sizeof st->bodies_file, "%s/%s",
                         st->dir, e->value);
        if (n < 0 || (size_t)n >= sizeof st->bodies_file) {
            fail_key(c, e, "path too long (%d bytes with the study's "
                     "directory); use a shorter path", n);
            return 0;
        }
    }
    return 1;
}

static int do_transfer(ctx *c, sy_study *st)
{
    const entry *eo = require(c, S_TRANSFER, "origin", "= earth");
    if (!eo || !get_string(c, eo, st->origin, sizeof st->origin, 0,
                           "a body name, e.g. origin = earth"))
        return 0;
    const entry *et = require(c, S_TRANSFER, "target", "= mars");
    if (!et || !get_string(c, et, st->target, sizeof st->target, 0,
                           "a body name, e.g. target = mars"))
        return 0;
    if (strcasecmp(st->origin, st->target) == 0) {
        fail_key(c, et, "'%s' is also the origin; a transfer needs two "
                 "different bodies", st->target);
        return 0;
    }
    st->revs = 0;
    const entry *e = find_entry(c, S_TRANSFER, "revolutions");
    if (e) {
        char *end;
        errno = 0;
        long r = strtol(e->value, &end, 10);
        while (isspace((unsigned char)*end))
            end++;
        if (!e->value[0] || *end || errno == ERANGE) {
            fail_key(c, e, "'%.40s' is not a whole number; write e.g. "
                     "revolutions = 0", e->value);
            return 0;
        }
        if (r < 0 || r > 100) {
            fail_key(c, e, "%ld is out of range; give 0 (direct transfer) "
                     "up to 100 complete revolutions", r);
            return 0;
        }
        st->revs = (int)r;
    }
    st->branch = SY_BRANCH_LEFT;
    e = find_entry(c, S_TRANSFER, "branch");
    if (e) {
        if (!strcasecmp(e->value, "left"))
            st->branch = SY_BRANCH_LEFT;
        else if (!strcasecmp(e->value, "right"))
            st->branch = SY_BRANCH_RIGHT;
        else {
            fail_key(c, e, "'%.40s' is not left or right; write branch = "
                     "left or branch = right", e->value);
            return 0;
        }
    } else if (st->revs >= 1) {
        const entry *er = find_entry(c, S_TRANSFER, "revolutions");
        if (er->ovr)
            fail_key(c, er, "%d revolutions need [transfer] branch (missing "
                     "required key 'branch'): there are two Lambert "
                     "solutions; add --set transfer.branch=left or =right",
                     st->revs);
        else
            fail_line(c, SY_ERR_PARSE, c->sect_line[S_TRANSFER],
                      "[transfer] missing required key 'branch': "
                      "revolutions = %d has two Lambert solutions; add "
                      "branch = left or branch = right", st->revs);
        return 0;
    }
    return 1;
}

/* step_days of a window of `span` days. */
static int check_step(ctx *c, const entry *e, double step, double span)
{
    if (!(step > 0)) {
        fail_key(c, e, "%g is not positive; give a step of more than 0 "
                 "days, e.g. step_days = 1", step);
        return 0;
    }
    if (step > span) {
        fail_key(c, e, "%g days is larger than the window span of %g days; "
                 "give at most %g", step, span, span);
        return 0;
    }
    if (span / step > MAX_AXIS_STEPS) {
        fail_key(c, e, "%g days makes %.0f steps over %g days, more than "
                 "the %.0f allowed; use a larger step", step, span / step,
                 span, MAX_AXIS_STEPS);
        return 0;
    }
    return 1;
}

/* [departure] or [arrival]. */
static int do_window(ctx *c, int s, double *start, double *end,
                     double *step)
{
    const entry *es = require(c, s, "start", "= 2033-02-15");
    if (!es || !get_date(c, es, start))
        return 0;
    const entry *ee = require(c, s, "end", "= 2033-06-15");
    if (!ee || !get_date(c, ee, end))
        return 0;
    const entry *ep = require(c, s, "step_days", "= 1");
    if (!ep || !get_number(c, ep, "= 1", step))
        return 0;
    char a[32], b[32], w[80];
    if (!(*end > *start)) {
        fmt_date(*start, a, sizeof a);
        fmt_date(*end, b, sizeof b);
        entry_where(c, es, ee, w, sizeof w);
        fail_key(c, ee, "%s is not after start %s (%s); the window must "
                 "end after it starts", b, a, w);
        return 0;
    }
    double span = *end - *start;
    if (span > MAX_SPAN_DAYS) {
        fail_key(c, ee, "the window is %.0f days (%.0f years) long, more "
                 "than the %.0f days (200 years) allowed; shorten it",
                 span, span / 365.25, MAX_SPAN_DAYS);
        return 0;
    }
    return check_step(c, ep, *step, span);
}

static int do_flight(ctx *c, sy_study *st)
{
    const entry *e0 = require(c, S_FLIGHT, "tof_min_days", "= 80");
    if (!e0 || !get_number(c, e0, "= 80", &st->tof_start_days))
        return 0;
    const entry *e1 = require(c, S_FLIGHT, "tof_max_days", "= 200");
    if (!e1 || !get_number(c, e1, "= 200", &st->tof_end_days))
        return 0;
    const entry *ep = require(c, S_FLIGHT, "step_days", "= 1");
    if (!ep || !get_number(c, ep, "= 1", &st->tof_step_days))
        return 0;
    if (!(st->tof_start_days > 0)) {
        fail_key(c, e0, "%g is not positive; a flight takes more than 0 "
                 "days", st->tof_start_days);
        return 0;
    }
    /* Patched conics assume the flight is long compared with the hours
     * spent leaving the departure body's sphere of influence (common
     * practice); below a day the figures would be numbers without meaning
     * (a one-second Earth-Mars flight is faster than light). */
    if (st->tof_start_days < MIN_FLIGHT_DAYS) {
        fail_key(c, e0, "%g days is shorter than the %g day minimum "
                 "flight time of the patched-conic model; give "
                 "tof_min_days >= %g", st->tof_start_days, MIN_FLIGHT_DAYS,
                 MIN_FLIGHT_DAYS);
        return 0;
    }
    if (!(st->tof_end_days > st->tof_start_days)) {
        char w[80];
        entry_where(c, e0, e1, w, sizeof w);
        fail_key(c, e1, "%g is not larger than tof_min_days = %g (%s); "
                 "give a maximum above the minimum", st->tof_end_days,
                 st->tof_start_days, w);
        return 0;
    }
    if (st->tof_end_days > MAX_SPAN_DAYS) {
        fail_key(c, e1, "%g days is more than the %.0f days (200 years) "
                 "allowed", st->tof_end_days, MAX_SPAN_DAYS);
        return 0;
    }
    return check_step(c, ep, st->tof_step_days,
                      st->tof_end_days - st->tof_start_days);
}

/* An optional altitude >= 0. */
static int opt_alt(ctx *c, const char *key, int *want, double *alt_km)
{
    const entry *e;
    double x;
    int r = opt_number(c, S_ORBITS, key, "= 400", &x, &e);
    if (r < 0)
        return 0;
    if (r == 0)
        return 1;
    if (!(x >= 0)) {
        fail_key(c, e, "%g km is negative; an altitude above the surface "
                 "is zero or positive", x);
        return 0;
    }
    *want = 1;
    *alt_km = x;
    return 1;
}

static int do_orbits(ctx *c, sy_study *st)
{
    sy_transfer_opts *o = &st->orbits;
    memset(o, 0, sizeof *o);
    if (!opt_alt(c, "park_alt_km", &o->want_park, &o->park_alt_km) ||
        !opt_alt(c, "capture_peri_km", &o->want_capture,
                 &o->capture_peri_km) ||
        !opt_alt(c, "entry_alt_km", &o->want_entry, &o->entry_alt_km))
        return 0;
    o->capture_apo_km = o->capture_peri_km;
    const entry *e;
    double apo;
    int r = opt_number(c, S_ORBITS, "capture_apo_km", "= 33793", &apo, &e);
    if (r < 0)
        return 0;
    if (r > 0) {
        if (!o->want_capture) {
            fail_key(c, e, "given without capture_peri_km; add "
                     "capture_peri_km (the periapsis altitude) to [orbits]");
            return 0;
        }
        if (!(apo >= o->capture_peri_km)) {
            fail_key(c, e, "%g km is below capture_peri_km = %g km; the "
                     "apoapsis is at least as high as the periapsis", apo,
                     o->capture_peri_km);
            return 0;
        }
        o->capture_apo_km = apo;
    }
    return 1;
}

static int do_limits(ctx *c, sy_study *st)
{
    static const struct {
        const char *key, *example, *rule;
        double lo, hi;     /* lo < x <= hi (lo_incl: lo <= x) */
        int lo_incl;
        size_t off;
    } lim[] = {
        {"c3_max_km2_s2", "= 20", "more than 0", 0, INFINITY, 0,
         offsetof(sy_study, c3_max_km2_s2)},
        {"vinf_arr_max_km_s", "= 4.5", "more than 0", 0, INFINITY, 0,
         offsetof(sy_study, vinf_arr_max_km_s)},
        {"dla_max_deg", "= 28.5", "more than 0 and at most 90", 0, 90, 0,
         offsetof(sy_study, dla_max_deg)},
        {"tof_min_days", "= 100", "0 to 73050 days (200 years)", 0,
         MAX_SPAN_DAYS, 1,
         offsetof(sy_study, tof_min_days)},
        {"tof_max_days", "= 300",
         "more than 0 and at most 73050 days (200 years)", 0, MAX_SPAN_DAYS,
         0,
         offsetof(sy_study, tof_max_days)},
    };
    const entry *emin = NULL, *emax = NULL;
    for (size_t i = 0; i < sizeof lim / sizeof lim[0]; i++) {
        double *dst = (double *)((char *)st + lim[i].off);
        const entry *e;
        double x;
        *dst = NAN;
        int r = opt_number(c, S_LIMITS, lim[i].key, lim[i].example, &x, &e);
        if (r < 0)
            return 0;
        if (r == 0)
            continue;
        int ok = (lim[i].lo_incl ? x >= lim[i].lo : x > lim[i].lo) &&
                 x <= lim[i].hi;
        if (!ok) {
            fail_key(c, e, "%g is out of range; give %s", x, lim[i].rule);
            return 0;
        }
        *dst = x;
        if (i == 3) emin = e;
        if (i == 4) emax = e;
    }
    if (emin && emax && !(st->tof_max_days > st->tof_min_days)) {
        char w[80];
        entry_where(c, emin, emax, w, sizeof w);
        fail_key(c, emax, "%g is not larger than tof_min_days = %g (%s); "
                 "give a maximum above the minimum", st->tof_max_days,
                 st->tof_min_days, w);
        return 0;
    }
    return 1;
}

static int do_period(ctx *c, sy_study *st)
{
    st->period_length_days = NAN;
    st->period_arrival = SY_PERIOD_ARR_FIXED | SY_PERIOD_ARR_FREE;
    const entry *e;
    double x;
    int r = opt_number(c, S_PERIOD, "length_days", "= 20", &x, &e);
    if (r < 0)
        return 0;
    if (r > 0) {
        if (!(x >= 1 && x <= MAX_SPAN_DAYS) || x != floor(x)) {
            fail_key(c, e, "%g is not a whole number of days from 1 to %.0f; "
                     "launch periods are counted in daily opportunities, "
                     "e.g. length_days = 20", x, MAX_SPAN_DAYS);
            return 0;
        }
        st->period_length_days = x;
    }
    if ((e = find_entry(c, S_PERIOD, "arrival"))) {
        if (!strcasecmp(e->value, "fixed"))
            st->period_arrival = SY_PERIOD_ARR_FIXED;
        else if (!strcasecmp(e->value, "free"))
            st->period_arrival = SY_PERIOD_ARR_FREE;
        else if (strcasecmp(e->value, "both")) {
            fail_key(c, e, "'%.40s' is not fixed, free or both; write e.g. "
                     "arrival = fixed", e->value);
            return 0;
        }
    }
    st->period_type = 0;
    if ((e = find_entry(c, S_PERIOD, "type"))) {
        st->period_type = sy_type_from_name(e->value);
        if (st->period_type < 0) {
            fail_key(c, e, "'%.40s' is not I, II or either; write e.g. type = II "
                     "(every day of the period a Type II transfer)", e->value);
            return 0;
        }
    }
    return 1;
}

static int do_launch_vehicle(ctx *c, sy_study *st)
{
    st->lv_capability[0] = '\0';
    st->spacecraft_mass_kg = NAN;
    const entry *e = find_entry(c, S_LV, "capability");
    if (e) {
        if (!e->value[0]) {
            fail_key(c, e, "empty path; give a CSV of injected mass against "
                     "C3, e.g. capability = launch-vehicle.csv");
            return 0;
        }
        int n;
        if (e->value[0] == '/' || strcmp(st->dir, ".") == 0)
            n = snprintf(st->lv_capability, sizeof st->lv_capability, "%s",
                         e->value);
        else
            n = snprintf(st->lv_capability, sizeof st->lv_capability,
                         "%s/%s", st->dir, e->value);
        if (n < 0 || (size_t)n >= sizeof st->lv_capability) {
            fail_key(c, e, "path too long (%d bytes with the study's "
                     "directory); use a shorter path", n);
            return 0;
        }
        /* Read it now so that a bad table is reported before any grid is
         * computed. */
        sy_lvcap *cap = NULL;
        sy_error lerr;
        lerr.msg[0] = '\0';
        sy_status ls = sy_lvcap_load(st->lv_capability, &cap, &lerr);
        if (ls != SY_OK) {
            fail_key(c, e, "%.330s", lerr.msg);
            /* a file that cannot be read is an I/O error (exit 5), like a
             * missing bodies file, not bad content */
            if (ls == SY_ERR_IO || ls == SY_ERR_NOMEM)
                c->st = ls;
            return 0;
        }
        sy_lvcap_free(cap);
    }
    double x;
    int r = opt_number(c, S_LV, "spacecraft_mass_kg", "= 1250", &x, &e);
    if (r < 0)
        return 0;
    if (r > 0) {
        if (!(x > 0)) {
            fail_key(c, e, "%g kg is not positive; give the spacecraft's "
                     "launch mass in kg", x);
            return 0;
        }
        if (!st->lv_capability[0]) {
            fail_key(c, e, "given without capability; add [launch_vehicle] "
                     "capability = FILE.csv (the margin is capability minus "
                     "spacecraft mass)");
            return 0;
        }
        st->spacecraft_mass_kg = x;
    }
    return 1;
}

static int do_chart(ctx *c, sy_study *st)
{
    /* fields */
    const entry *ef = find_entry(c, S_CHART, "fields");
    if (ef) {
        char *buf = strdup(ef->value);
        if (!buf) {
            c->st = SY_ERR_NOMEM;
            sy_fail(c->err, SY_ERR_NOMEM, "out of memory");
            return 0;
        }
        char *items[SY_MAX_CHART_FIELDS + 1];
        const char *why = NULL;
        int n = ef->value[0]
                    ? split_list(buf, items, SY_MAX_CHART_FIELDS + 1, &why)
                    : (why = "empty value", -1);
        int ok = 1;
        if (n < 0) {
            fail_key(c, ef, "%s; write field names separated by commas, "
                     "e.g. fields = c3, vinf_arr", why);
            ok = 0;
        } else if (n > SY_MAX_CHART_FIELDS) {
            fail_key(c, ef, "more than %d fields; chart at most %d",
                     SY_MAX_CHART_FIELDS, SY_MAX_CHART_FIELDS);
            ok = 0;
        }
        int nf = 0;
        for (int i = 0; ok && i < n; i++) {
            if (!strcasecmp(items[i], "mass")) {
                /* Derived from C3 after the grid: not a grid field. */
                if (st->chart_mass) {
                    fail_key(c, ef, "field 'mass' is listed twice; list "
                             "each field once");
                    ok = 0;
                } else if (!st->lv_capability[0]) {
                    fail_key(c, ef, "field 'mass' needs [launch_vehicle] "
                             "capability (a CSV of injected mass against "
                             "C3); add it or remove the field");
                    ok = 0;
                }
                st->chart_mass = 1;
                continue;
            }
            int f = sy_field_from_name(items[i]);
            if (f < 0) {
                fail_key(c, ef, "unknown field '%.40s'; accepted fields: "
                         FIELD_NAMES ", mass", items[i]);
                ok = 0;
                break;
            }
            for (int j = 0; j < nf; j++)
                if ((int)st->fields[j].field == f) {
                    fail_key(c, ef, "field '%s' is listed twice; list each "
                             "field once", field_info[f].name);
                    ok = 0;
                    break;
                }
            st->fields[nf++].field = (sy_field)f;
        }
        free(buf);
        if (!ok)
            return 0;
        st->nfields = (size_t)nf;
    } else {
        st->nfields = 2;
        st->fields[0].field = SY_F_C3;
        st->fields[1].field = SY_F_VINF_ARR;
    }

    /* Fields that need orbits: only an explicit list can name them. */
    const sy_transfer_opts *o = &st->orbits;
    for (size_t i = 0; i < st->nfields; i++) {
        sy_field f = st->fields[i].field;
        const char *need = NULL;
        if ((f == SY_F_DV_DEP || f == SY_F_DV_TOTAL) && !o->want_park)
            need = "park_alt_km (the parking-orbit altitude)";
        else if ((f == SY_F_DV_CAP || f == SY_F_DV_TOTAL) && !o->want_capture)
            need = "capture_peri_km (and capture_apo_km) for the capture "
                   "orbit";
        else if (f == SY_F_V_ENTRY && !o->want_entry)
            need = "entry_alt_km (the entry-interface altitude)";
        if (need) {
            fail_key(c, ef, "field '%s' needs [orbits] %s; add it to "
                     "[orbits] or remove the field", field_info[f].name,
                     need);
            return 0;
        }
    }

    /* NAME_levels: check every one given, keep those of charted fields. */
    for (size_t i = 0; i < st->nfields; i++) {
        st->fields[i].auto_levels = 1;
        st->fields[i].nlevels = 0;
    }
    for (size_t k = 0; k < c->nent; k++) {
        const entry *e = &c->ent[k];
        int f;
        if (e->sect != S_CHART || (f = levels_key_field(e->key)) < 0)
            continue;
        int is_auto = !strcasecmp(e->value, "auto");
        double lv[SY_MAX_LEVELS];
        size_t nlv = 0;
        if (!is_auto && !get_levels(c, e, 0, lv, &nlv))
            return 0;
        for (size_t i = 0; i < st->nfields; i++)
            if ((int)st->fields[i].field == f) {
                st->fields[i].auto_levels = is_auto;
                st->fields[i].nlevels = nlv;
                memcpy(st->fields[i].levels, lv, nlv * sizeof lv[0]);
            }
    }

    /* mass_levels (checked whether or not "mass" is charted) */
    st->mass_auto_levels = 1;
    st->nmass_levels = 0;
    const entry *em = find_entry(c, S_CHART, "mass_levels");
    if (em && strcasecmp(em->value, "auto")) {
        st->mass_auto_levels = 0;
        if (!get_levels(c, em, 0, st->mass_levels_kg, &st->nmass_levels))
            return 0;
    }

    /* tof_lines */
    st->tof_lines_auto = 1;
    st->ntof_lines = 0;
    const entry *e = find_entry(c, S_CHART, "tof_lines");
    if (e) {
        if (!strcasecmp(e->value, "auto")) {
            st->tof_lines_auto = 1;
        } else if (!strcasecmp(e->value, "none")) {
            st->tof_lines_auto = 0;
        } else {
            st->tof_lines_auto = 0;
            if (!get_levels(c, e, 1, st->tof_lines_days, &st->ntof_lines))
                return 0;
        }
    }

    st->filled = 0;
    if ((e = find_entry(c, S_CHART, "filled")) && !get_bool(c, e, &st->filled))
        return 0;
    st->show_types = 1;
    if ((e = find_entry(c, S_CHART, "types")) &&
        !get_bool(c, e, &st->show_types))
        return 0;
    return 1;
}

/* Chart size along one axis from NAME_in or NAME_px. */
static int do_size(ctx *c, const char *in_key, const char *px_key,
                   double dpi, double *out_in)
{
    const entry *ei, *ep;
    double in, px;
    int ri = opt_number(c, S_OUTPUT, in_key, "= 7.5", &in, &ei);
    if (ri < 0)
        return 0;
    int rp = opt_number(c, S_OUTPUT, px_key, "= 1500", &px, &ep);
    if (rp < 0)
        return 0;
    if (ri > 0 && rp > 0) {
        /* Report at the override if there is one (it caused the clash),
         * else at the later line. */
        const entry *at = ep, *other = ei;
        if (ei->ovr && (!ep->ovr || ei->ovr_index > ep->ovr_index))
            at = ei, other = ep;
        else if (!ep->ovr && !ei->ovr && ei->line > ep->line)
            at = ei, other = ep;
        char w[80];
        entry_where(c, other, at, w, sizeof w);
        fail_key(c, at, "given together with %s (%s); give the size either "
                 "in inches or in pixels, not both", other->key, w);
        return 0;
    }
    if (ri > 0) {
        if (!(in > 0) || in > MAX_SIZE_IN) {
            fail_key(c, ei, "%g in is out of range; give more than 0 and "
                     "at most %.0f inches", in, MAX_SIZE_IN);
            return 0;
        }
        *out_in = in;
    } else if (rp > 0) {
        if (!(px > 0) || px / dpi > MAX_SIZE_IN) {
            fail_key(c, ep, "%g px at %g dpi is out of range; give more "
                     "than 0 and at most %.0f pixels (%.0f inches)", px,
                     dpi, MAX_SIZE_IN * dpi, MAX_SIZE_IN);
            return 0;
        }
        *out_in = px / dpi;
    }
    return 1;
}

static int do_output(ctx *c, sy_study *st)
{
    static const struct { const char *name; unsigned bit; } fmts[] = {
        {"png", SY_FMT_PNG}, {"svg", SY_FMT_SVG}, {"pdf", SY_FMT_PDF},
        {"csv", SY_FMT_CSV}, {"json", SY_FMT_JSON}};
    st->formats = SY_FMT_PNG | SY_FMT_SVG | SY_FMT_PDF | SY_FMT_CSV |
                  SY_FMT_JSON;
    const entry *e = find_entry(c, S_OUTPUT, "formats");
    if (e) {
        char *buf = strdup(e->value);
        if (!buf) {
            c->st = SY_ERR_NOMEM;
            sy_fail(c->err, SY_ERR_NOMEM, "out of memory");
            return 0;
        }
        char *items[6];
        const char *why = NULL;
        int n = e->value[0] ? split_list(buf, items, 6, &why)
                            : (why = "empty value", -1);
        int ok = 1;
        unsigned bits = 0;
        if (n < 0) {
            fail_key(c, e, "%s; write formats separated by commas from png, "
                     "svg, pdf, csv, json", why);
            ok = 0;
        }
        for (int i = 0; ok && i < n; i++) {
            size_t k;
            for (k = 0; k < sizeof fmts / sizeof fmts[0]; k++)
                if (!strcasecmp(items[i], fmts[k].name))
                    break;
            if (k == sizeof fmts / sizeof fmts[0]) {
                fail_key(c, e, "unknown format '%.40s'; accepted formats: "
                         "png, svg, pdf, csv, json", items[i]);
                ok = 0;
            } else if (bits & fmts[k].bit) {
                fail_key(c, e, "format '%s' is listed twice; list each "
                         "format once", fmts[k].name);
                ok = 0;
            }
            if (ok)
                bits |= fmts[k].bit;
        }
        free(buf);
        if (!ok)
            return 0;
        st->formats = bits;
    }

    snprintf(st->out_dir, sizeof st->out_dir, "out");
    if ((e = find_entry(c, S_OUTPUT, "directory")) &&
        !get_string(c, e, st->out_dir, sizeof st->out_dir, 0,
                    "a directory, e.g. directory = out"))
        return 0;

    if ((e = find_entry(c, S_OUTPUT, "name"))) {
        if (!get_string(c, e, st->basename, sizeof st->basename, 0,
                        "a base name, e.g. name = mars-2033"))
            return 0;
        if (strchr(st->basename, '/')) {
            fail_key(c, e, "'%.60s' contains '/'; give a plain file name "
                     "and put the directory in [output] directory",
                     st->basename);
            return 0;
        }
        if (!strcmp(st->basename, ".") || !strcmp(st->basename, "..")) {
            fail_key(c, e, "'%s' is not a file name; give e.g. name = "
                     "mars-2033", st->basename);
            return 0;
        }
    } else {
        const char *slash = strrchr(st->path, '/');
        const char *base = slash ? slash + 1 : st->path;
        size_t n = strlen(base);
        if (n > 4 && !strcasecmp(base + n - 4, ".ini"))
            n -= 4;
        if (n == 0 || n >= sizeof st->basename) {
            fail_line(c, SY_ERR_PARSE, c->sect_line[S_OUTPUT],
                      "[output] key 'name': cannot derive an output name "
                      "from the study file name; add name = NAME to "
                      "[output]");
            return 0;
        }
        memcpy(st->basename, base, n);
        st->basename[n] = '\0';
    }

    st->dpi = 200;
    double x;
    int r = opt_number(c, S_OUTPUT, "dpi", "= 200", &x, &e);
    if (r < 0)
        return 0;
    if (r > 0) {
        if (!(x >= 50 && x <= 1200)) {
            fail_key(c, e, "%g is out of range; give 50 to 1200 dots per "
                     "inch", x);
            return 0;
        }
        st->dpi = x;
    }
    st->width_in = 7.5;
    st->height_in = 5.5;
    if (!do_size(c, "width_in", "width_px", st->dpi, &st->width_in) ||
        !do_size(c, "height_in", "height_px", st->dpi, &st->height_in))
        return 0;
    if ((st->formats & SY_FMT_PNG) &&
        (st->width_in * st->dpi > MAX_PNG_PX ||
         st->height_in * st->dpi > MAX_PNG_PX)) {
        e = find_entry(c, S_OUTPUT, "dpi");
        fail_line(c, SY_ERR_PARSE, e && !e->ovr ? e->line
                                                : c->sect_line[S_OUTPUT],
                  "[output] key 'dpi': a %.1f x %.1f in PNG at %g dpi is "
                  "%.0f x %.0f pixels, more than %.0f on a side; lower dpi "
                  "or the size", st->width_in, st->height_in, st->dpi,
                  st->width_in * st->dpi, st->height_in * st->dpi,
                  MAX_PNG_PX);
        return 0;
    }
    return 1;
}

/* [arrival] / [flight]: exactly one. */
static int do_yaxis(ctx *c, sy_study *st)
{
    int has_arr = c->sect_line[S_ARRIVAL] || c->sect_ovr[S_ARRIVAL];
    int has_fl = c->sect_line[S_FLIGHT] || c->sect_ovr[S_FLIGHT];
    if (has_arr && has_fl) {
        static const char what[] =
            "both [arrival] and [flight] are present; keep exactly one: "
            "[arrival] for a window of arrival dates or [flight] for a "
            "window of flight times";
        /* A section that only an override brought in is the culprit. */
        const entry *eo = !c->sect_line[S_ARRIVAL]
                              ? first_override(c, S_ARRIVAL)
                          : !c->sect_line[S_FLIGHT]
                              ? first_override(c, S_FLIGHT) : NULL;
        if (eo) {
            c->st = SY_ERR_PARSE;
            sy_fail(c->err, SY_ERR_PARSE, "--set %.160s: %s", eo->ovr, what);
        } else {
            int line = c->sect_line[S_ARRIVAL] > c->sect_line[S_FLIGHT]
                           ? c->sect_line[S_ARRIVAL]
                           : c->sect_line[S_FLIGHT];
            fail_line(c, SY_ERR_PARSE, line, "%s", what);
        }
        return 0;
    }
    if (!has_arr && !has_fl) {
        fail_line(c, SY_ERR_PARSE, 0,
                  "neither [arrival] nor [flight] is present; add [arrival] "
                  "(start, end, step_days) for a window of arrival dates or "
                  "[flight] (tof_min_days, tof_max_days, step_days) for a "
                  "window of flight times");
        return 0;
    }
    st->y_is_tof = has_fl;
    st->arr_start_jd = st->arr_end_jd = st->arr_step_days = NAN;
    st->tof_start_days = st->tof_end_days = st->tof_step_days = NAN;
    if (has_fl)
        return do_flight(c, st);
    if (!do_window(c, S_ARRIVAL, &st->arr_start_jd, &st->arr_end_jd,
                   &st->arr_step_days))
        return 0;
    if (!(st->arr_end_jd > st->dep_start_jd)) {
        char a[32], b[32];
        fmt_date(st->arr_end_jd, a, sizeof a);
        fmt_date(st->dep_start_jd, b, sizeof b);
        fail_key(c, find_entry(c, S_ARRIVAL, "end"),
                 "%s is not after the departure start %s; every transfer "
                 "would arrive before it leaves; move the arrival window "
                 "later", a, b);
        return 0;
    }
    return 1;
}

/* ------------------------------------------------------------------ */

sy_status sy_study_load(const char *path, const char *const *overrides,
                        size_t noverrides, sy_study *study, sy_error *err)
{
    if (!path || !study || (noverrides && !overrides))
        return sy_fail(err, SY_ERR_ARG, "sy_study_load: NULL argument");
    if (!*path)
        return sy_fail(err, SY_ERR_ARG, "sy_study_load: empty path");
    if (strlen(path) >= sizeof study->path)
        return sy_fail(err, SY_ERR_ARG, "%.160s...: study file path too long",
                       path);

    ctx *c = calloc(1, sizeof *c);
    sy_study *st = calloc(1, sizeof *st);
    if (!c || !st) {
        free(c);
        free(st);
        return sy_fail(err, SY_ERR_NOMEM, "out of memory reading %.160s",
                       path);
    }
    c->path = path;
    c->err = err;
    c->cur_sect = -1;
    c->st = SY_OK;

    c->rd.fp = fopen(path, "r");
    if (!c->rd.fp) {
        sy_status r = sy_fail(err, SY_ERR_IO,
                              "%.200s: cannot open study file: %s", path,
                              strerror(errno));
        free(c);
        free(st);
        return r;
    }
    c->rd.kind = "study file";
    c->rd.long_hint = "; shorten it (for a long path, use --set or a "
                      "shorter relative path)";
    /* The limit stated for study files has always been one less than the
     * one for bodies files (catalog.c); kept so that the message stays as
     * it was. */
    c->rd.long_reserve = 3;
    c->rd.on_section = on_section;
    c->rd.on_bad_line = on_bad_line;
    c->rd.user = c;
    int rc = ini_parse_stream(sy_ini_read_line, &c->rd, handler, c);
    if (ferror(c->rd.fp)) {
        int e = errno;
        c->st = SY_OK; /* a read error explains everything else */
        sy_fail(err, SY_ERR_IO, "%.200s: cannot read study file: %s", path,
                strerror(e));
        c->st = SY_ERR_IO;
    }
    fclose(c->rd.fp);
    sy_ini_reader_free(&c->rd);
    /* inih reports the first line it could not parse (or whose handler
     * failed); report it if it comes before our own first error. */
    if (rc > 0 && c->st != SY_ERR_IO && (c->st == SY_OK || rc < c->err_line)) {
        c->st = SY_OK;
        fail_line(c, SY_ERR_PARSE, rc,
                  "cannot read this line; expected 'key = value', a comment "
                  "(';' or '#') or a section header such as [study]");
    }
    if (rc == -2 && c->st == SY_OK)
        fail_line(c, SY_ERR_NOMEM, 0, "out of memory");

    for (size_t i = 0; c->st == SY_OK && i < noverrides; i++)
        apply_override(c, overrides[i], i);

    if (c->st == SY_OK) {
        snprintf(st->path, sizeof st->path, "%s", path);
        const char *slash = strrchr(path, '/');
        if (!slash)
            snprintf(st->dir, sizeof st->dir, ".");
        else if (slash == path)
            snprintf(st->dir, sizeof st->dir, "/");
        else
            snprintf(st->dir, sizeof st->dir, "%.*s", (int)(slash - path),
                     path);
        /* Order matters: [arrival] checks against the departure window,
         * [chart] against [orbits] and [launch_vehicle], pixel sizes
         * need dpi. */
        (void)(do_study(c, st) && do_transfer(c, st) &&
               do_window(c, S_DEPARTURE, &st->dep_start_jd, &st->dep_end_jd,
                         &st->dep_step_days) &&
               do_yaxis(c, st) && do_orbits(c, st) && do_limits(c, st) &&
               do_period(c, st) && do_launch_vehicle(c, st) &&
               do_chart(c, st) && do_output(c, st));
    }

    sy_status r = c->st;
    if (r == SY_OK)
        *study = *st;
    for (size_t i = 0; i < c->nent; i++)
        free(c->ent[i].value);
    free(c);
    free(st);
    return r;
}
