/* inifile.c - INI plumbing shared by the bodies-file and study-file
 * readers (see inifile.h for why it exists). */
#include "config.h"

#include "inifile.h"

#include <ctype.h>
#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* Counts lines, strips a UTF-8 byte-order mark on line 1 and leading
 * blanks (so that inih never treats a line as the continuation of a
 * multi-line value), refuses lines inih would mangle, and reports section
 * headers as they are read. */
char *sy_ini_read_line(char *str, int num, void *stream)
{
    sy_ini_reader *r = stream;
    ssize_t n = getline(&r->buf, &r->cap, r->fp);
    if (n < 0)
        return NULL;
    r->lineno++;
    char *s = r->buf;
    if (r->lineno == 1 && (unsigned char)s[0] == 0xEF &&
        (unsigned char)s[1] == 0xBB && (unsigned char)s[2] == 0xBF)
        s += 3;
    while (*s == ' ' || *s == '\t')
        s++;
    char msg[300];
    /* A NUL would silently cut the line short for inih (and hide the rest
     * of the value); these files are text. */
    if (memchr(r->buf, '\0', (size_t)n)) {
        snprintf(msg, sizeof msg, "NUL byte in the line; a %s is UTF-8 text",
                 r->kind);
        r->on_bad_line(r->user, msg);
        snprintf(str, (size_t)num, "\n");
        return str;
    }
    /* inih's buffer holds num bytes: the line, its '\n' and the NUL. */
    if (strlen(s) + 1 > (size_t)num) {
        snprintf(msg, sizeof msg, "line longer than %d characters%s",
                 num - r->long_reserve, r->long_hint ? r->long_hint : "");
        r->on_bad_line(r->user, msg);
        snprintf(str, (size_t)num, "\n");
        return str;
    }
    if (*s == '[' && r->on_section)
        r->on_section(r->user, s);
    memcpy(str, s, strlen(s) + 1);
    return str;
}

void sy_ini_reader_free(sy_ini_reader *r)
{
    free(r->buf);
    r->buf = NULL;
    r->cap = 0;
}

void sy_ini_trim(char *s)
{
    size_t n = strlen(s);
    while (n && isspace((unsigned char)s[n - 1]))
        s[--n] = '\0';
    size_t k = 0;
    while (isspace((unsigned char)s[k]))
        k++;
    if (k)
        memmove(s, s + k, n - k + 1);
}

int sy_ini_section_text(const char *line, char *out, size_t len)
{
    out[0] = '\0';
    const char *close = strchr(line, ']');
    if (!close)
        return -1;
    size_t k = (size_t)(close - line - 1);
    if (k >= len)
        k = len - 1;
    memcpy(out, line + 1, k);
    out[k] = '\0';
    return 0;
}

int sy_ini_number(const char *text, double *out)
{
    if (!text || !*text)
        return 0;
    char *end;
    errno = 0;
    double x = strtod(text, &end);
    while (isspace((unsigned char)*end))
        end++;
    if (end == text || *end || errno == ERANGE || !isfinite(x))
        return 0;
    *out = x;
    return 1;
}
