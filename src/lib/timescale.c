/* timescale.c - calendar dates and Julian dates in the TDB time scale.
 *
 * All epochs in synodic are Julian dates in Barycentric Dynamical Time
 * (TDB), the argument of the mean-element tables.  Dates typed by a user
 * are read as TDB too.  UTC differs from TDB by about 69 s in this era
 * (TT - UTC = 32.184 s + leap seconds; TDB - TT < 2 ms), which moves a
 * planet by well under its model error and is irrelevant at the day
 * resolution of launch-window studies; we do not apply it.
 *
 * The calendar is the proleptic Gregorian calendar with astronomical year
 * numbering (year 0 = 1 BC, -1 = 2 BC), used for every epoch including
 * those before 1582.  Conversions use the integer algorithm of Fliegel &
 * Van Flandern, Communications of the ACM 11 (1968) 657, valid for years
 * after -4800. */
#include "config.h"
#include "synodic.h"

#include <ctype.h>
#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>

static long jdn_from_ymd(long y, long m, long d)
{
    long a = (m - 14) / 12; /* C division truncates; m - 14 < 0 always */
    return (1461 * (y + 4800 + a)) / 4 + (367 * (m - 2 - 12 * a)) / 12 -
           (3 * ((y + 4900 + a) / 100)) / 4 + d - 32075;
}

static void ymd_from_jdn(long jdn, int *y, int *m, int *d)
{
    long l = jdn + 68569;
    long n = 4 * l / 146097;
    l = l - (146097 * n + 3) / 4;
    long i = 4000 * (l + 1) / 1461001;
    l = l - 1461 * i / 4 + 31;
    long j = 80 * l / 2447;
    *d = (int)(l - 2447 * j / 80);
    l = j / 11;
    *m = (int)(j + 2 - 12 * l);
    *y = (int)(100 * (n - 49) + i + l);
}

double sy_jd_from_calendar(int year, int month, int day, int hour, int minute,
                           double second)
{
    long jdn = jdn_from_ymd(year, month, day);
    return (double)jdn - 0.5 +
           (hour * 3600.0 + minute * 60.0 + second) / SY_DAY_S;
}

void sy_calendar_from_jd(double jd, int *year, int *month, int *day,
                         int *hour, int *minute, double *second)
{
    double jdn_f = floor(jd + 0.5);
    double sod = (jd + 0.5 - jdn_f) * SY_DAY_S;
    long jdn = (long)jdn_f;
    if (sod < 0) sod = 0;
    if (sod >= SY_DAY_S) { sod -= SY_DAY_S; jdn++; }
    ymd_from_jdn(jdn, year, month, day);
    int h = (int)(sod / 3600.0);
    if (h > 23) h = 23;
    sod -= h * 3600.0;
    int mi = (int)(sod / 60.0);
    if (mi > 59) mi = 59;
    sod -= mi * 60.0;
    *hour = h;
    *minute = mi;
    *second = sod;
}

void sy_date_format(double jd_tdb, int with_time, char *buf, size_t len)
{
    if (!isfinite(jd_tdb)) {
        snprintf(buf, len, "invalid");
        return;
    }
    /* Round to the nearest second (or day boundary) before splitting so
     * that 23:59:59.9997 prints as the next day's 00:00:00. */
    double jdn_f = floor(jd_tdb + 0.5);
    double sod = nearbyint((jd_tdb + 0.5 - jdn_f) * SY_DAY_S);
    long jdn = (long)jdn_f;
    if (sod >= SY_DAY_S) { sod -= SY_DAY_S; jdn++; }
    int y, m, d;
    ymd_from_jdn(jdn, &y, &m, &d);
    long s = (long)sod;
    /* Negative (astronomical) years keep four digits after the sign. */
    const char *sign = y < 0 ? "-" : "";
    int ay = y < 0 ? -y : y;
    if (with_time)
        snprintf(buf, len, "%s%04d-%02d-%02dT%02ld:%02ld:%02ld", sign, ay, m,
                 d, s / 3600, (s / 60) % 60, s % 60);
    else
        snprintf(buf, len, "%s%04d-%02d-%02d", sign, ay, m, d);
}

static int is_leap(long y)
{
    return (y % 4 == 0 && y % 100 != 0) || y % 400 == 0;
}

static int days_in_month(long y, int m)
{
    static const int dm[12] = {31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31};
    return m == 2 && is_leap(y) ? 29 : dm[m - 1];
}

/* Read exactly `ndig` digits (or at least ndig when ndig < 0) into *v. */
static const char *read_digits(const char *p, int min, int max, long *v)
{
    int n = 0;
    long x = 0;
    while (isdigit((unsigned char)p[n]) && n < max) {
        x = x * 10 + (p[n] - '0');
        n++;
    }
    if (n < min) return NULL;
    *v = x;
    return p + n;
}

/* The user's text as it may appear inside a one-line message: control
 * bytes (newline, NUL-adjacent garbage, escape sequences) become \xNN and
 * long text is cut to fit, so that an error is always one short line. */
static void show_text(const char *in, char *out, size_t len)
{
    size_t o = 0;
    for (const unsigned char *q = (const unsigned char *)in; *q; q++) {
        if (o + 8 >= len) {
            snprintf(out + o, len - o, "...");
            return;
        }
        if (*q < 0x20 || *q == 0x7f)
            o += (size_t)snprintf(out + o, len - o, "\\x%02X", *q);
        else
            out[o++] = (char)*q;
    }
    out[o] = '\0';
}

#define DATE_FORMS "use YYYY-MM-DD, YYYY-MM-DDTHH:MM[:SS[.fff]] or JD2461234.5"

sy_status sy_date_parse(const char *text, double *jd_tdb, sy_error *err)
{
    if (!text || !*text)
        return sy_fail(err, SY_ERR_PARSE, "empty date; " DATE_FORMS);
    char shown[80];
    show_text(text, shown, sizeof shown);
    const char *s = text;
    while (isspace((unsigned char)*s)) s++;

    if (strncasecmp(s, "JD", 2) == 0) {
        const char *num = s + 2;
        while (*num == ' ') num++;
        char *end;
        errno = 0;
        double jd = strtod(num, &end);
        while (isspace((unsigned char)*end)) end++;
        /* decimal only: strtod also reads hex forms (JD0x1p21) */
        if (end == num || *end || errno == ERANGE || !isfinite(jd) || strpbrk(num, "xX"))
            return sy_fail(err, SY_ERR_PARSE,
                           "invalid Julian date '%s'; " DATE_FORMS, shown);
        if (jd < 0 || jd > 1e8)
            return sy_fail(err, SY_ERR_PARSE,
                           "Julian date '%s' is out of range (0 to 1e8)", shown);
        *jd_tdb = jd;
        return SY_OK;
    }

    int neg = 0;
    const char *p = s;
    if (*p == '-' || *p == '+') { neg = (*p == '-'); p++; }
    long y, m, d, hh = 0, mm = 0;
    double ss = 0;
    p = read_digits(p, 4, 6, &y);
    if (!p || *p != '-')
        return sy_fail(err, SY_ERR_PARSE, "invalid date '%s': year must be 4 digits followed by '-'; " DATE_FORMS, shown);
    p = read_digits(p + 1, 1, 2, &m);
    if (!p || *p != '-')
        return sy_fail(err, SY_ERR_PARSE, "invalid date '%s': month must be 2 digits followed by '-'; " DATE_FORMS, shown);
    p = read_digits(p + 1, 1, 2, &d);
    if (!p)
        return sy_fail(err, SY_ERR_PARSE, "invalid date '%s': day must be 2 digits; " DATE_FORMS, shown);
    if (neg) y = -y;
    if (*p == 'T' || *p == 't' || (*p == ' ' && isdigit((unsigned char)p[1]))) {
        p = read_digits(p + 1, 1, 2, &hh);
        if (!p || *p != ':')
            return sy_fail(err, SY_ERR_PARSE, "invalid time in '%s': expected HH:MM; " DATE_FORMS, shown);
        p = read_digits(p + 1, 2, 2, &mm);
        if (!p)
            return sy_fail(err, SY_ERR_PARSE, "invalid time in '%s': minutes must be 2 digits; " DATE_FORMS, shown);
        if (*p == ':') {
            /* SS or SS.fff: two digits, an optional fraction of digits;
             * strtod alone would also take exponents and hex forms */
            const char *q = p + 1, *e = q;
            while (isdigit((unsigned char)*e)) e++;
            if (e - q != 2)
                return sy_fail(err, SY_ERR_PARSE, "invalid time in '%s': seconds must be 2 digits (SS or SS.fff)", shown);
            if (*e == '.') {
                const char *f = ++e;
                while (isdigit((unsigned char)*e)) e++;
                if (e == f || e - q > 40)
                    return sy_fail(err, SY_ERR_PARSE, "invalid time in '%s': seconds must be SS or SS.fff", shown);
            }
            char num[48];
            memcpy(num, q, (size_t)(e - q));
            num[e - q] = '\0';
            ss = strtod(num, NULL);
            p = e;
        }
        if (*p == 'Z' || *p == 'z') p++;
    }
    while (isspace((unsigned char)*p)) p++;
    if (*p) {
        char rest[80];
        show_text(p, rest, sizeof rest);
        return sy_fail(err, SY_ERR_PARSE, "invalid date '%s': unexpected text '%s'; " DATE_FORMS, shown, rest);
    }

    if (m < 1 || m > 12)
        return sy_fail(err, SY_ERR_PARSE, "invalid date '%s': month %ld is out of range (1-12)", shown, m);
    int dim = days_in_month(y, (int)m);
    if (d < 1 || d > dim)
        return sy_fail(err, SY_ERR_PARSE, "invalid date '%s': day %ld is out of range for %04ld-%02ld (1-%d)", shown, d, y, m, dim);
    if (hh > 23)
        return sy_fail(err, SY_ERR_PARSE, "invalid date '%s': hour %ld is out of range (0-23)", shown, hh);
    if (mm > 59)
        return sy_fail(err, SY_ERR_PARSE, "invalid date '%s': minute %ld is out of range (0-59)", shown, mm);
    if (!(ss >= 0 && ss < 60))
        return sy_fail(err, SY_ERR_PARSE, "invalid date '%s': second %g is out of range (0-59.999)", shown, ss);
    if (y < -4700 || y > 99999)
        return sy_fail(err, SY_ERR_PARSE, "invalid date '%s': year %ld is out of range", shown, y);
    *jd_tdb = sy_jd_from_calendar((int)y, (int)m, (int)d, (int)hh, (int)mm, ss);
    return SY_OK;
}
