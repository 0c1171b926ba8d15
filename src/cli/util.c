/* util.c - argument parsing and printing helpers shared by subcommands. */
#include "config.h"
#include "cli.h"

#include <errno.h>
#include <math.h>
#include <stdarg.h>
#include <stdlib.h>
#include <string.h>

int cli_error(int code, const char *fmt, ...)
{
    va_list ap;
    va_start(ap, fmt);
    fputs("synodic: error: ", stderr);
    vfprintf(stderr, fmt, ap);
    fputc('\n', stderr);
    va_end(ap);
    return code;
}

int cli_exit_for(sy_status st)
{
    switch (st) {
    case SY_OK: return CLI_EXIT_OK;
    case SY_ERR_ARG:
    case SY_ERR_RANGE:
    case SY_ERR_PARSE:
    case SY_ERR_NOBODY:
    case SY_ERR_DEGENERATE: return CLI_EXIT_INPUT;
    case SY_ERR_NOSOL:
    case SY_ERR_NOCONV: return CLI_EXIT_NOSOL;
    case SY_ERR_IO: return CLI_EXIT_IO;
    case SY_ERR_NOMEM: return CLI_EXIT_INTERNAL;
    }
    return CLI_EXIT_INTERNAL;
}

int cli_bad_option(const char *cmd, int opt, const char *arg)
{
    if (opt == ':')
        return cli_error(CLI_EXIT_USAGE, "%s: option '%s' needs a value; see 'synodic %s --help'", cmd, arg, cmd);
    return cli_error(CLI_EXIT_USAGE, "%s: unknown option '%s'; see 'synodic %s --help'", cmd, arg, cmd);
}

int cli_parse_double(const char *what, const char *text, double *out)
{
    char *end;
    errno = 0;
    double v = strtod(text, &end);
    if (end == text || *end != '\0')
        return cli_error(CLI_EXIT_INPUT, "%s: '%s' is not a number", what, text);
    if (errno == ERANGE || !isfinite(v))
        return cli_error(CLI_EXIT_INPUT, "%s: '%s' is out of range (give a finite number)", what, text);
    *out = v;
    return 0;
}

int cli_parse_int(const char *what, const char *text, int lo, int hi, int *out)
{
    char *end;
    errno = 0;
    long v = strtol(text, &end, 10);
    if (end == text || *end != '\0')
        return cli_error(CLI_EXIT_INPUT, "%s: '%s' is not a whole number", what, text);
    if (errno == ERANGE || v < lo || v > hi)
        return cli_error(CLI_EXIT_INPUT, "%s: %s is out of range (%d to %d)", what, text, lo, hi);
    *out = (int)v;
    return 0;
}

int cli_parse_vec3(const char *what, const char *text, double v[3])
{
    const char *p = text;
    for (int k = 0; k < 3; k++) {
        char *end;
        errno = 0;
        v[k] = strtod(p, &end);
        if (end == p || errno == ERANGE || !isfinite(v[k]))
            return cli_error(CLI_EXIT_INPUT, "%s: '%s' is not a vector X,Y,Z of three finite numbers (km)", what, text);
        p = end;
        if (k < 2) {
            if (*p != ',')
                return cli_error(CLI_EXIT_INPUT, "%s: '%s' is not a vector X,Y,Z of three finite numbers (km)", what, text);
            p++;
        }
    }
    if (*p != '\0')
        return cli_error(CLI_EXIT_INPUT, "%s: '%s' is not a vector X,Y,Z of three finite numbers (km)", what, text);
    return 0;
}

int cli_parse_date(const char *what, const char *text, double *jd)
{
    sy_error err;
    if (sy_date_parse(text, jd, &err) != SY_OK)
        return cli_error(CLI_EXIT_INPUT, "%s: %s", what, err.msg);
    return 0;
}

int cli_parse_branch(const char *text, sy_branch *b)
{
    if (strcmp(text, "left") == 0) { *b = SY_BRANCH_LEFT; return 0; }
    if (strcmp(text, "right") == 0) { *b = SY_BRANCH_RIGHT; return 0; }
    return cli_error(CLI_EXIT_INPUT, "--branch: '%s' is not a branch; use left or right", text);
}

int cli_catalog(const char *bodies_path, sy_catalog **out)
{
    sy_catalog *cat = sy_catalog_new();
    if (!cat) return cli_error(CLI_EXIT_INTERNAL, "out of memory");
    if (bodies_path) {
        sy_error err;
        sy_status st = sy_catalog_load(cat, bodies_path, &err);
        if (st != SY_OK) {
            sy_catalog_free(cat);
            return cli_error(cli_exit_for(st), "%s", err.msg);
        }
    }
    *out = cat;
    return 0;
}

int cli_find_body(const sy_catalog *cat, const char *name, const sy_body **b)
{
    sy_error err;
    sy_status st = sy_catalog_find(cat, name, b, &err);
    if (st != SY_OK) return cli_error(CLI_EXIT_INPUT, "%s", err.msg);
    return 0;
}

json_t *cli_json_vec3(const double v[3])
{
    json_t *a = json_array();
    for (int k = 0; k < 3; k++) json_array_append_new(a, json_real(v[k]));
    return a;
}

int cli_print_json(json_t *root)
{
    if (!root) return cli_error(CLI_EXIT_INTERNAL, "out of memory building JSON");
    char *s = json_dumps(root, JSON_PRESERVE_ORDER | JSON_REAL_PRECISION(15));
    json_decref(root);
    if (!s) return cli_error(CLI_EXIT_INTERNAL, "out of memory writing JSON");
    int ok = fputs(s, stdout) >= 0 && fputc('\n', stdout) != EOF;
    free(s);
    if (!ok || fflush(stdout) != 0)
        return cli_error(CLI_EXIT_IO, "cannot write to standard output");
    return CLI_EXIT_OK;
}
