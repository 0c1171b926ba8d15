/* fuzz_study.c - sy_study_load() on arbitrary study files and overrides.
 *
 * Input: the study file's bytes, optionally followed by a line "%%" and
 * then one --set override per line (at most 8), so that the fuzzer also
 * drives the override path through the same validation.
 *
 * Contract (synodic/study.h): an error is SY_ERR_PARSE / SY_ERR_IO /
 * SY_ERR_NOMEM with a one-line message that names the file or the
 * override; a success leaves a study whose windows, steps, fields and
 * sizes obey the documented rules, and from which a grid spec of at
 * least 2 x 2 nodes (or an error with a message) follows. */
#include "config.h"
#include "synodic.h"
#include "synodic/grid.h"
#include "synodic/study.h"
#include "fuzz.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#define H "study"

static void check_study(const sy_study *st)
{
    if (!(st->dep_end_jd > st->dep_start_jd) || !isfinite(st->dep_end_jd) ||
        !isfinite(st->dep_start_jd))
        sy_fuzz_fail(H, "departure window not ordered or not finite", NULL);
    if (!(st->dep_step_days > 0) ||
        st->dep_step_days > st->dep_end_jd - st->dep_start_jd)
        sy_fuzz_fail(H, "departure step out of its rules", NULL);
    if (st->y_is_tof) {
        if (!(st->tof_start_days > 0) ||
            !(st->tof_end_days > st->tof_start_days) ||
            !(st->tof_step_days > 0) || !isfinite(st->tof_end_days))
            sy_fuzz_fail(H, "flight window out of its rules", NULL);
    } else {
        if (!(st->arr_end_jd > st->arr_start_jd) ||
            !(st->arr_step_days > 0) || !isfinite(st->arr_end_jd) ||
            !(st->arr_end_jd > st->dep_start_jd))
            sy_fuzz_fail(H, "arrival window out of its rules", NULL);
    }
    if (st->revs < 0 || st->revs > 100)
        sy_fuzz_fail(H, "revolutions out of range", NULL);
    if (st->nfields < 1 || st->nfields > SY_MAX_CHART_FIELDS)
        sy_fuzz_fail(H, "field count out of range", NULL);
    for (size_t i = 0; i < st->nfields; i++) {
        if ((unsigned)st->fields[i].field >= SY_NFIELDS)
            sy_fuzz_fail(H, "unknown field stored", NULL);
        if (st->fields[i].nlevels > SY_MAX_LEVELS)
            sy_fuzz_fail(H, "too many levels stored", NULL);
        for (size_t k = 0; k < st->fields[i].nlevels; k++)
            if (!isfinite(st->fields[i].levels[k]) ||
                (k && !(st->fields[i].levels[k] > st->fields[i].levels[k - 1])))
                sy_fuzz_fail(H, "levels not finite and ascending", NULL);
    }
    if (!st->title[0] || !st->basename[0] || strchr(st->basename, '/'))
        sy_fuzz_fail(H, "empty title or bad base name", NULL);
    if (!(st->width_in > 0 && st->width_in <= 100) ||
        !(st->height_in > 0 && st->height_in <= 100) ||
        !(st->dpi >= 50 && st->dpi <= 1200))
        sy_fuzz_fail(H, "chart size out of range", NULL);
    if (!st->formats)
        sy_fuzz_fail(H, "no output format", NULL);

    static sy_catalog *cat;
    if (!cat)
        cat = sy_catalog_new();
    const sy_body *a = sy_catalog_at(cat, 2), *b = sy_catalog_at(cat, 3);
    sy_grid_spec spec;
    sy_error err;
    err.msg[0] = '\0';
    if (sy_grid_spec_from_study(st, a, b, &spec, &err) == SY_OK) {
        if (spec.nx < 2 || spec.ny < 2 || spec.nx > 100001 ||
            spec.ny > 100001)
            sy_fuzz_fail(H, "grid spec with a bad node count", NULL);
        (void)sy_grid_bytes(&spec);
    } else {
        sy_fuzz_check_msg(H, err.msg);
    }
}

int sy_fuzz_study(const uint8_t *data, size_t size)
{
    if (size > 65536)
        return 0;
    /* Split off the overrides. */
    size_t flen = size;
    const char *ovr_text = NULL;
    size_t ovr_len = 0;
    for (size_t i = 0; i + 3 <= size; i++)
        if ((i == 0 || data[i - 1] == '\n') && data[i] == '%' &&
            data[i + 1] == '%' && (i + 2 == size || data[i + 2] == '\n')) {
            flen = i;
            ovr_text = (const char *)data + i + 2;
            ovr_len = size - i - 2;
            break;
        }
    const char *path = sy_fuzz_tmpfile(".ini", data, flen);
    if (!path)
        return 0;
    char *ovbuf = NULL;
    const char *ov[8];
    size_t nov = 0;
    if (ovr_text) {
        ovbuf = malloc(ovr_len + 1);
        if (!ovbuf)
            return 0;
        memcpy(ovbuf, ovr_text, ovr_len);
        ovbuf[ovr_len] = '\0';
        for (char *p = ovbuf, *nl; p && *p && nov < 8; p = nl) {
            nl = strchr(p, '\n');
            if (nl)
                *nl++ = '\0';
            if (*p)
                ov[nov++] = p;
        }
    }
    sy_study *st = malloc(sizeof *st);
    if (!st) {
        free(ovbuf);
        return 0;
    }
    memset(st, 0xA5, sizeof *st); /* untouched on error: never read */
    sy_error err;
    err.msg[0] = '\0';
    sy_status s = sy_study_load(path, ov, nov, st, &err);
    if (s == SY_OK) {
        check_study(st);
    } else {
        if (s != SY_ERR_PARSE && s != SY_ERR_IO && s != SY_ERR_NOMEM)
            sy_fuzz_fail(H, "unexpected status", sy_status_str(s));
        sy_fuzz_check_msg(H, err.msg);
        if (!strstr(err.msg, path) && !strstr(err.msg, "--set "))
            sy_fuzz_fail(H, "message names neither the file nor the "
                         "override", err.msg);
    }
    free(st);
    free(ovbuf);
    return 0;
}

#ifdef SY_FUZZ_ENTRY
int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);
int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    return sy_fuzz_study(data, size);
}
#endif
