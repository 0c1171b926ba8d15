/* fuzz_bodies.c - sy_catalog_load() on arbitrary bodies files.
 *
 * Contract (synodic.h, catalog.c): an error leaves the catalogue as it
 * was (all-or-nothing) and carries a one-line message naming the file; a
 * success adds bodies with finite elements whose state at the epoch, at
 * perihelion and at both ends of the validity window is either computed
 * with finite values or refused with a status, never a silent NaN. */
#include "config.h"
#include "synodic.h"
#include "fuzz.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#define H "bodies"

static void check_state(const sy_body *b, double jd)
{
    double r[3], v[3];
    if (!isfinite(jd))
        return;
    sy_status s = sy_body_state(b, jd, r, v);
    if (s != SY_OK)
        return;
    for (int k = 0; k < 3; k++)
        if (!isfinite(r[k]) || !isfinite(v[k]))
            sy_fuzz_fail(H, "SY_OK with a non-finite state", b->name);
}

int sy_fuzz_bodies(const uint8_t *data, size_t size)
{
    if (size > 65536)
        return 0;
    const char *path = sy_fuzz_tmpfile("-bodies.ini", data, size);
    if (!path)
        return 0;
    sy_catalog *cat = sy_catalog_new();
    if (!cat)
        return 0;
    size_t n0 = sy_catalog_count(cat);
    sy_error err;
    err.msg[0] = '\0';
    sy_status s = sy_catalog_load(cat, path, &err);
    if (s != SY_OK) {
        if (sy_catalog_count(cat) != n0)
            sy_fuzz_fail(H, "failed load changed the catalogue", err.msg);
        sy_fuzz_check_msg(H, err.msg);
        if (!strstr(err.msg, path))
            sy_fuzz_fail(H, "message does not name the file", err.msg);
    } else {
        for (size_t i = n0; i < sy_catalog_count(cat); i++) {
            const sy_body *b = sy_catalog_at(cat, i);
            if (!b->name[0] || !(b->q_km > 0) || !(b->e >= 0) ||
                !isfinite(b->e) || !isfinite(b->tp_jd_tdb) ||
                !isfinite(b->i_rad) || !isfinite(b->node_rad) ||
                !isfinite(b->argp_rad) ||
                !(b->valid_from_jd < b->valid_to_jd))
                sy_fuzz_fail(H, "accepted body with bad elements", b->name);
            check_state(b, b->epoch_jd_tdb);
            check_state(b, b->tp_jd_tdb);
            check_state(b, b->valid_from_jd);
            check_state(b, b->valid_to_jd);
            const sy_body *found;
            if (sy_catalog_find(cat, b->name, &found, &err) != SY_OK)
                sy_fuzz_fail(H, "loaded body cannot be found", b->name);
        }
    }
    sy_catalog_free(cat);
    return 0;
}

#ifdef SY_FUZZ_ENTRY
int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);
int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    return sy_fuzz_bodies(data, size);
}
#endif
