/* status.c - status codes, error messages and the library version. */
#include "config.h"
#include "synodic.h"

#include <stdarg.h>
#include <stdio.h>

const char *sy_status_str(sy_status st)
{
    switch (st) {
    case SY_OK: return "ok";
    case SY_ERR_ARG: return "invalid argument";
    case SY_ERR_RANGE: return "epoch outside the model's validity";
    case SY_ERR_NOSOL: return "no solution exists";
    case SY_ERR_DEGENERATE: return "degenerate geometry";
    case SY_ERR_NOCONV: return "iteration did not converge";
    case SY_ERR_PARSE: return "malformed input";
    case SY_ERR_NOBODY: return "unknown body";
    case SY_ERR_NOMEM: return "out of memory";
    case SY_ERR_IO: return "input/output error";
    }
    return "unknown status";
}

sy_status sy_fail(sy_error *err, sy_status st, const char *fmt, ...)
{
    if (err) {
        va_list ap;
        va_start(ap, fmt);
        vsnprintf(err->msg, sizeof err->msg, fmt, ap);
        va_end(ap);
    }
    return st;
}

const char *sy_version(void)
{
    return PACKAGE_VERSION;
}
