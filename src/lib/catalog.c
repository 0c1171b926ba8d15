/* catalog.c - the catalogue of bodies: the nine built-in planets and the
 * small bodies read from bodies files.
 *
 * Bodies file format (INI, read with inih; our own design):
 *
 *   ; comment            # comment
 *   [body NAME]
 *   epoch            = 2029-06-01          ; date the elements are given for
 *   a_au             = 1.31                ; semi-major axis, or ...
 *   q_au             = 0.98                ; ... perihelion distance (one of)
 *   e                = 0.25
 *   i_deg            = 4.1                 ; ecliptic J2000 angles
 *   node_deg         = 211.0
 *   argp_deg         = 67.0
 *   mean_anomaly_deg = 123.4               ; at epoch, or ...
 *   perihelion       = 2029-11-30T06:00    ; ... time of perihelion (one of)
 *   gm_km3_s2        = 0.0                 ; optional
 *   radius_km        = 0.2                 ; optional
 *
 * Rules (each violation is an SY_ERR_PARSE with "FILE:LINE: ..."):
 *   - exactly one of a_au / q_au, exactly one of mean_anomaly_deg /
 *     perihelion; epoch, e, i_deg, node_deg, argp_deg are required;
 *   - e >= 0; q_au > 0; a_au > 0 for an ellipse (e < 1), a_au < 0 for a
 *     hyperbola (e > 1, the usual sign convention, q = a (1 - e) > 0) and
 *     a_au is refused for the parabola (e == 1: give q_au);
 *   - mean_anomaly_deg is refused for e == 1 (no finite mean motion is
 *     defined by a alone: give the perihelion date); for e > 1 it is the
 *     hyperbolic mean anomaly e sinh H - H in degrees;
 *   - 0 <= i_deg <= 180; angles finite; gm_km3_s2, radius_km >= 0;
 *   - body names are unique (case-insensitive) among the built-ins, their
 *     aliases, previously loaded files and this file.
 * A file is loaded all-or-nothing: on any error no body of it is added.
 * A UTF-8 byte-order mark before the first line is ignored, as in study
 * files (the line reader is shared: inifile.c).
 *
 * Validity of a small body's conic: epoch +/- 200 Julian years (clipped
 * to 3000 BC .. 3000 AD, the range of the planet tables).  Two-body motion
 * about the Sun alone drifts from the true orbit of an asteroid by planet
 * perturbations within decades; the bound only rejects epochs at which the
 * elements are clearly meaningless, it does not certify accuracy.
 */
#include "config.h"
#include "synodic.h"

#include "elements.h"
#include "inifile.h"

#include <errno.h>
#include <ini.h>
#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#ifndef M_PI
#define M_PI 3.14159265358979323846
#endif
#define DEG (M_PI / 180.0)

/* Validity half-width of small-body elements (200 Julian years). */
#define SMALL_VALID_HALF_DAYS (200.0 * 365.25)

struct sy_catalog {
    sy_body *bodies;
    size_t n, cap;
};

static int ascii_lower(int c)
{
    return (c >= 'A' && c <= 'Z') ? c - 'A' + 'a' : c;
}

static int name_eq(const char *a, const char *b)
{
    for (; *a && *b; a++, b++)
        if (ascii_lower((unsigned char)*a) != ascii_lower((unsigned char)*b))
            return 0;
    return *a == *b;
}

/* Other names of the built-in Earth (the Earth-Moon barycentre). */
static const char *const earth_aliases[] = {
    "EMB", "EM-bary", "Earth-Moon barycentre", "Earth-Moon barycenter",
};
#define N_EARTH_ALIASES (sizeof earth_aliases / sizeof earth_aliases[0])

static int catalog_push(sy_catalog *cat, const sy_body *b)
{
    if (cat->n == cat->cap) {
        size_t nc = cat->cap ? 2 * cat->cap : 16;
        sy_body *nb = realloc(cat->bodies, nc * sizeof *nb);
        if (!nb)
            return -1;
        cat->bodies = nb;
        cat->cap = nc;
    }
    cat->bodies[cat->n++] = *b;
    return 0;
}

sy_catalog *sy_catalog_new(void)
{
    sy_catalog *cat = calloc(1, sizeof *cat);
    if (!cat)
        return NULL;
    for (int p = 0; p < SY_NPLANETS; p++) {
        sy_body b;
        memset(&b, 0, sizeof b);
        snprintf(b.name, sizeof b.name, "%s", sy_planet_table[p].name);
        b.kind = SY_BODY_PLANET;
        b.gm_km3_s2 = sy_planet_table[p].gm_km3_s2;
        b.radius_km = sy_planet_table[p].radius_km;
        b.valid_from_jd = SY_TABLE2_FROM_JD;
        b.valid_to_jd = SY_TABLE2_TO_JD;
        b.planet = p;
        snprintf(b.source, sizeof b.source, "built-in");
        if (catalog_push(cat, &b) != 0) {
            sy_catalog_free(cat);
            return NULL;
        }
    }
    return cat;
}

void sy_catalog_free(sy_catalog *cat)
{
    if (!cat)
        return;
    free(cat->bodies);
    free(cat);
}

size_t sy_catalog_count(const sy_catalog *cat)
{
    return cat ? cat->n : 0;
}

const sy_body *sy_catalog_at(const sy_catalog *cat, size_t index)
{
    if (!cat || index >= cat->n)
        return NULL;
    return &cat->bodies[index];
}

static const sy_body *lookup(const sy_catalog *cat, const char *name)
{
    for (size_t i = 0; i < cat->n; i++)
        if (name_eq(cat->bodies[i].name, name))
            return &cat->bodies[i];
    for (size_t j = 0; j < N_EARTH_ALIASES; j++)
        if (name_eq(earth_aliases[j], name))
            for (size_t i = 0; i < cat->n; i++)
                if (cat->bodies[i].kind == SY_BODY_PLANET &&
                    cat->bodies[i].planet == 2)
                    return &cat->bodies[i];
    return NULL;
}

sy_status sy_catalog_find(const sy_catalog *cat, const char *name,
                          const sy_body **body, sy_error *err)
{
    if (!cat || !name || !body)
        return sy_fail(err, SY_ERR_ARG, "sy_catalog_find: NULL argument");
    const sy_body *b = lookup(cat, name);
    if (b) {
        *body = b;
        return SY_OK;
    }
    char list[400];
    size_t len = 0;
    list[0] = '\0';
    for (size_t i = 0; i < cat->n; i++) {
        const char *nm = cat->bodies[i].name;
        size_t need = strlen(nm) + 2;
        if (len + need + 4 >= sizeof list) {
            snprintf(list + len, sizeof list - len, "%s...", len ? ", " : "");
            break;
        }
        len += (size_t)snprintf(list + len, sizeof list - len, "%s%s",
                                len ? ", " : "", nm);
    }
    return sy_fail(err, SY_ERR_NOBODY,
                   "unknown body '%.60s'; known bodies: %s (add small bodies "
                   "with --bodies FILE)", name, list);
}

/* ------------------------------------------------------------------ */
/* Bodies file                                                         */

enum {
    K_EPOCH, K_A, K_Q, K_E, K_I, K_NODE, K_ARGP, K_M, K_PERI, K_GM, K_RADIUS,
    K_COUNT
};
static const char *const key_names[K_COUNT] = {
    "epoch", "a_au", "q_au", "e", "i_deg", "node_deg", "argp_deg",
    "mean_anomaly_deg", "perihelion", "gm_km3_s2", "radius_km",
};
#define ACCEPTED_KEYS                                                       \
    "accepted keys: epoch, a_au | q_au, e, i_deg, node_deg, argp_deg, "    \
    "mean_anomaly_deg | perihelion, gm_km3_s2, radius_km"

typedef struct {
    int open;                 /* a [body NAME] section is being read */
    char name[48];
    int line;
    int key_line[K_COUNT];    /* 0: not given */
    double val[K_COUNT];      /* numbers; dates as JD TDB */
} section;

typedef struct {
    const char *path;
    sy_ini_reader rd;         /* file, line buffer, line number */
    sy_error *err;
    sy_status st;             /* first error */
    const sy_catalog *cat;
    section cur;
    sy_body *pend;
    size_t npend, cappend;
} load_ctx;

/* Record the first error only (later ones are usually consequences). */
#if defined(__GNUC__)
__attribute__((format(printf, 4, 5)))
#endif
static void ctx_fail(load_ctx *c, sy_status st, int line, const char *fmt, ...)
{
    if (c->st != SY_OK)
        return;
    c->st = st;
    if (!c->err)
        return;
    char what[400];
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(what, sizeof what, fmt, ap);
    va_end(ap);
    sy_fail(c->err, st, "%.100s:%d: %s", c->path, line, what);
}

static const sy_body *pending_named(const load_ctx *c, const char *name)
{
    for (size_t i = 0; i < c->npend; i++)
        if (name_eq(c->pend[i].name, name))
            return &c->pend[i];
    return NULL;
}

/* Validate the finished section and turn it into a pending body. */
static void section_finish(load_ctx *c)
{
    section *s = &c->cur;
    if (!s->open)
        return;
    s->open = 0;
    if (c->st != SY_OK)
        return;
    const int *kl = s->key_line;
    const double *v = s->val;
    static const int required[] = {K_EPOCH, K_E, K_I, K_NODE, K_ARGP};
    for (size_t i = 0; i < sizeof required / sizeof required[0]; i++)
        if (!kl[required[i]]) {
            ctx_fail(c, SY_ERR_PARSE, s->line,
                     "[body %s]: missing key '%s'; " ACCEPTED_KEYS, s->name,
                     key_names[required[i]]);
            return;
        }
    if (kl[K_A] && kl[K_Q]) {
        ctx_fail(c, SY_ERR_PARSE, kl[K_Q],
                 "[body %s] key 'q_au': both a_au (line %d) and q_au given; "
                 "give exactly one; " ACCEPTED_KEYS, s->name, kl[K_A]);
        return;
    }
    if (!kl[K_A] && !kl[K_Q]) {
        ctx_fail(c, SY_ERR_PARSE, s->line,
                 "[body %s]: missing key 'a_au' or 'q_au' (give exactly "
                 "one); " ACCEPTED_KEYS, s->name);
        return;
    }
    if (kl[K_M] && kl[K_PERI]) {
        ctx_fail(c, SY_ERR_PARSE, kl[K_PERI],
                 "[body %s] key 'perihelion': both mean_anomaly_deg (line %d) "
                 "and perihelion given; give exactly one; " ACCEPTED_KEYS,
                 s->name, kl[K_M]);
        return;
    }
    if (!kl[K_M] && !kl[K_PERI]) {
        ctx_fail(c, SY_ERR_PARSE, s->line,
                 "[body %s]: missing key 'mean_anomaly_deg' or 'perihelion' "
                 "(give exactly one); " ACCEPTED_KEYS, s->name);
        return;
    }
    double e = v[K_E];
    if (!(e >= 0.0)) {
        ctx_fail(c, SY_ERR_PARSE, kl[K_E],
                 "[body %s] key 'e': eccentricity %g is negative; it must be "
                 ">= 0; " ACCEPTED_KEYS, s->name, e);
        return;
    }
    double a_km = 0.0, q_km;
    if (kl[K_A]) {
        double a = v[K_A];
        if (e == 1.0) {
            ctx_fail(c, SY_ERR_PARSE, kl[K_A],
                     "[body %s] key 'a_au': a parabola (e = 1) has no finite "
                     "semi-major axis; give q_au instead; " ACCEPTED_KEYS,
                     s->name);
            return;
        }
        if (e < 1.0 && !(a > 0.0)) {
            ctx_fail(c, SY_ERR_PARSE, kl[K_A],
                     "[body %s] key 'a_au': %g must be > 0 for an ellipse "
                     "(e < 1); " ACCEPTED_KEYS, s->name, a);
            return;
        }
        if (e > 1.0 && !(a < 0.0)) {
            ctx_fail(c, SY_ERR_PARSE, kl[K_A],
                     "[body %s] key 'a_au': %g must be < 0 for a hyperbola "
                     "(e > 1), or give q_au instead; " ACCEPTED_KEYS,
                     s->name, a);
            return;
        }
        a_km = a * SY_AU_KM;
        q_km = a_km * (1.0 - e);
    } else {
        if (!(v[K_Q] > 0.0)) {
            ctx_fail(c, SY_ERR_PARSE, kl[K_Q],
                     "[body %s] key 'q_au': perihelion distance %g must be "
                     "> 0; " ACCEPTED_KEYS, s->name, v[K_Q]);
            return;
        }
        q_km = v[K_Q] * SY_AU_KM;
        if (e != 1.0)
            a_km = q_km / (1.0 - e);
    }
    if (!(v[K_I] >= 0.0 && v[K_I] <= 180.0)) {
        ctx_fail(c, SY_ERR_PARSE, kl[K_I],
                 "[body %s] key 'i_deg': inclination %g must be within 0..180;"
                 " " ACCEPTED_KEYS, s->name, v[K_I]);
        return;
    }
    if (kl[K_M] && e == 1.0) {
        ctx_fail(c, SY_ERR_PARSE, kl[K_M],
                 "[body %s] key 'mean_anomaly_deg': not defined for a "
                 "parabola (e = 1); give the perihelion date instead; "
                 ACCEPTED_KEYS, s->name);
        return;
    }
    for (int k = K_GM; k <= K_RADIUS; k++)
        if (kl[k] && !(v[k] >= 0.0)) {
            ctx_fail(c, SY_ERR_PARSE, kl[k],
                     "[body %s] key '%s': %g must be >= 0; " ACCEPTED_KEYS,
                     s->name, key_names[k], v[k]);
            return;
        }

    sy_body b;
    memset(&b, 0, sizeof b);
    snprintf(b.name, sizeof b.name, "%s", s->name);
    b.kind = SY_BODY_SMALL;
    b.planet = -1;
    b.gm_km3_s2 = kl[K_GM] ? v[K_GM] : 0.0;
    b.radius_km = kl[K_RADIUS] ? v[K_RADIUS] : 0.0;
    b.q_km = q_km;
    b.e = e;
    b.i_rad = v[K_I] * DEG;
    b.node_rad = v[K_NODE] * DEG;
    b.argp_rad = v[K_ARGP] * DEG;
    b.epoch_jd_tdb = v[K_EPOCH];
    if (kl[K_PERI]) {
        b.tp_jd_tdb = v[K_PERI];
    } else {
        /* M = n (t - tp), n = sqrt(mu / |a|^3), for the ellipse and (with
         * the hyperbolic mean anomaly) for the hyperbola. */
        double aa = fabs(a_km);
        double n_rad_s = sqrt(SY_GM_SUN_KM3_S2 / (aa * aa * aa));
        b.tp_jd_tdb = b.epoch_jd_tdb - v[K_M] * DEG / n_rad_s / SY_DAY_S;
    }
    if (!isfinite(b.tp_jd_tdb)) {
        ctx_fail(c, SY_ERR_PARSE, kl[K_PERI] ? kl[K_PERI] : kl[K_M],
                 "[body %s]: the time of perihelion is not finite; check the "
                 "elements; " ACCEPTED_KEYS, s->name);
        return;
    }
    b.valid_from_jd = fmax(b.epoch_jd_tdb - SMALL_VALID_HALF_DAYS,
                           SY_TABLE2_FROM_JD);
    b.valid_to_jd = fmin(b.epoch_jd_tdb + SMALL_VALID_HALF_DAYS,
                         SY_TABLE2_TO_JD);
    if (!(b.valid_from_jd < b.valid_to_jd)) {
        ctx_fail(c, SY_ERR_PARSE, kl[K_EPOCH],
                 "[body %s] key 'epoch': epoch must lie within 3000 BC .. "
                 "3000 AD (the range of the planet tables); " ACCEPTED_KEYS,
                 s->name);
        return;
    }
    snprintf(b.source, sizeof b.source, "%.100s:%d", c->path, s->line);

    if (c->npend == c->cappend) {
        size_t nc = c->cappend ? 2 * c->cappend : 8;
        sy_body *nb = realloc(c->pend, nc * sizeof *nb);
        if (!nb) {
            ctx_fail(c, SY_ERR_NOMEM, s->line, "out of memory");
            return;
        }
        c->pend = nb;
        c->cappend = nc;
    }
    c->pend[c->npend++] = b;
}

/* Section headers of bodies files have always been trimmed of blanks and
 * line ends only; sy_ini_trim() (study files) also trims '\v', '\f' and a
 * leading '\r', which would accept e.g. "[\vbody X]" that is refused now.
 * Kept so that moving the shared reader to inifile.c changes nothing. */
static void trim_blanks(char *s)
{
    size_t n = strlen(s);
    while (n && (s[n - 1] == ' ' || s[n - 1] == '\t' || s[n - 1] == '\r' ||
                 s[n - 1] == '\n'))
        s[--n] = '\0';
    size_t k = 0;
    while (s[k] == ' ' || s[k] == '\t')
        k++;
    if (k)
        memmove(s, s + k, n - k + 1);
}

/* A section header line "[...]" (already left-trimmed). */
static void section_begin(load_ctx *c, const char *line)
{
    section_finish(c);
    memset(&c->cur, 0, sizeof c->cur);
    char inner[256];
    if (sy_ini_section_text(line, inner, sizeof inner) != 0) {
        ctx_fail(c, SY_ERR_PARSE, c->rd.lineno,
                 "section header without closing ']'; write [body NAME]");
        return;
    }
    trim_blanks(inner);
    if (strncmp(inner, "body", 4) != 0 ||
        (inner[4] != ' ' && inner[4] != '\t' && inner[4] != '\0')) {
        ctx_fail(c, SY_ERR_PARSE, c->rd.lineno,
                 "unknown section [%.60s]; each body is a section "
                 "[body NAME]", inner);
        return;
    }
    char name[256];
    snprintf(name, sizeof name, "%s", inner + 4);
    trim_blanks(name);
    if (!name[0]) {
        ctx_fail(c, SY_ERR_PARSE, c->rd.lineno,
                 "section [body] without a name; write [body NAME]");
        return;
    }
    if (strlen(name) >= sizeof c->cur.name) {
        ctx_fail(c, SY_ERR_PARSE, c->rd.lineno,
                 "[body %.60s...]: name longer than %zu characters",
                 name, sizeof c->cur.name - 1);
        return;
    }
    const sy_body *clash = lookup(c->cat, name);
    if (clash) {
        ctx_fail(c, SY_ERR_PARSE, c->rd.lineno,
                 "[body %s]: name clashes with the existing body '%s' (%s); "
                 "choose another name", name, clash->name, clash->source);
        return;
    }
    clash = pending_named(c, name);
    if (clash) {
        ctx_fail(c, SY_ERR_PARSE, c->rd.lineno,
                 "[body %s]: duplicate body name, already defined at %s; "
                 "choose another name", name, clash->source);
        return;
    }
    memcpy(c->cur.name, name, strlen(name) + 1); /* length checked above */
    c->cur.line = c->rd.lineno;
    c->cur.open = 1;
}

static void on_section(void *user, const char *line)
{
    section_begin(user, line);
}

static void on_bad_line(void *user, const char *msg)
{
    load_ctx *c = user;
    ctx_fail(c, SY_ERR_PARSE, c->rd.lineno, "%s", msg);
}

static int handler(void *user, const char *sect, const char *name,
                   const char *value)
{
    (void)sect;
    load_ctx *c = user;
    if (c->st != SY_OK)
        return 1;
    if (!c->cur.open) {
        /* Errors in a section header are already recorded (st != OK), so
         * this is a key before the first section. */
        ctx_fail(c, SY_ERR_PARSE, c->rd.lineno,
                 "key '%.40s' outside any [body NAME] section; start each "
                 "body with a line [body NAME]", name);
        return 0;
    }
    section *s = &c->cur;
    int k;
    for (k = 0; k < K_COUNT; k++)
        if (strcmp(name, key_names[k]) == 0)
            break;
    if (k == K_COUNT) {
        ctx_fail(c, SY_ERR_PARSE, c->rd.lineno,
                 "[body %s] key '%.40s': unknown key; " ACCEPTED_KEYS,
                 s->name, name);
        return 0;
    }
    if (s->key_line[k]) {
        ctx_fail(c, SY_ERR_PARSE, c->rd.lineno,
                 "[body %s] key '%s': given twice (first at line %d); "
                 ACCEPTED_KEYS, s->name, name, s->key_line[k]);
        return 0;
    }
    if (k == K_EPOCH || k == K_PERI) {
        sy_error derr;
        derr.msg[0] = '\0';
        if (sy_date_parse(value, &s->val[k], &derr) != SY_OK) {
            ctx_fail(c, SY_ERR_PARSE, c->rd.lineno,
                     "[body %s] key '%s': %.200s; " ACCEPTED_KEYS, s->name,
                     name, derr.msg);
            return 0;
        }
    } else if (!sy_ini_number(value, &s->val[k])) {
        ctx_fail(c, SY_ERR_PARSE, c->rd.lineno,
                 "[body %s] key '%s': '%.40s' is not a finite number; "
                 ACCEPTED_KEYS, s->name, name, value);
        return 0;
    }
    s->key_line[k] = c->rd.lineno;
    return 1;
}

sy_status sy_catalog_load(sy_catalog *cat, const char *path, sy_error *err)
{
    if (!cat || !path)
        return sy_fail(err, SY_ERR_ARG, "sy_catalog_load: NULL argument");
    FILE *fp = fopen(path, "r");
    if (!fp)
        return sy_fail(err, SY_ERR_IO, "%.200s: cannot open bodies file: %s",
                       path, strerror(errno));
    load_ctx c;
    memset(&c, 0, sizeof c);
    c.path = path;
    c.rd.fp = fp;
    c.rd.kind = "bodies file";
    /* '\n' and the NUL; study files state one less (study.c). */
    c.rd.long_reserve = 2;
    c.rd.on_section = on_section;
    c.rd.on_bad_line = on_bad_line;
    c.rd.user = &c;
    c.err = err;
    c.st = SY_OK;
    c.cat = cat;
    int rc = ini_parse_stream(sy_ini_read_line, &c.rd, handler, &c);
    section_finish(&c);
    if (ferror(fp) && c.st == SY_OK)
        ctx_fail(&c, SY_ERR_IO, c.rd.lineno, "read error");
    fclose(fp);
    sy_ini_reader_free(&c.rd);
    if (c.st == SY_OK && rc > 0)
        ctx_fail(&c, SY_ERR_PARSE, rc,
                 "cannot read this line: expected 'key = value', a comment "
                 "(';' or '#') or a section header [body NAME]");
    if (c.st == SY_OK && rc == -2)
        ctx_fail(&c, SY_ERR_NOMEM, 0, "out of memory");
    if (c.st == SY_OK) {
        for (size_t i = 0; i < c.npend; i++)
            if (catalog_push(cat, &c.pend[i]) != 0) {
                cat->n -= i; /* all-or-nothing */
                ctx_fail(&c, SY_ERR_NOMEM, 0, "out of memory");
                break;
            }
    }
    free(c.pend);
    return c.st;
}
