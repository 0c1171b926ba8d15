/* fuzz_lvcap.c - sy_lvcap_load() on arbitrary launch-vehicle tables.
 *
 * Contract (synodic/lvcap.h): an error is SY_ERR_PARSE / SY_ERR_IO /
 * SY_ERR_NOMEM with a one-line message naming the file; a success gives
 * at least 2 rows over a finite, increasing C3 span, and the mass at any
 * C3 inside the span is finite, >= 0 and non-increasing in C3 (the
 * Steffen interpolant of monotone data is monotone), while a C3 outside
 * is SY_ERR_RANGE with NAN, never an extrapolated number. */
#include "config.h"
#include "synodic.h"
#include "synodic/lvcap.h"
#include "fuzz.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#define H "lvcap"

int sy_fuzz_lvcap(const uint8_t *data, size_t size)
{
    if (size > 65536)
        return 0;
    const char *path = sy_fuzz_tmpfile("-lv.csv", data, size);
    if (!path)
        return 0;
    sy_lvcap *cap = NULL;
    sy_error err;
    err.msg[0] = '\0';
    sy_status s = sy_lvcap_load(path, &cap, &err);
    if (s != SY_OK) {
        if (s != SY_ERR_PARSE && s != SY_ERR_IO && s != SY_ERR_NOMEM)
            sy_fuzz_fail(H, "unexpected status", sy_status_str(s));
        sy_fuzz_check_msg(H, err.msg);
        if (!strstr(err.msg, path))
            sy_fuzz_fail(H, "message does not name the file", err.msg);
        return 0;
    }
    if (!cap)
        sy_fuzz_fail(H, "SY_OK without a table", NULL);
    double lo, hi;
    sy_lvcap_range(cap, &lo, &hi);
    if (sy_lvcap_rows(cap) < 2 || !isfinite(lo) || !isfinite(hi) || !(hi > lo))
        sy_fuzz_fail(H, "accepted table with a bad span", NULL);
    double prev = INFINITY;
    for (int k = 0; k <= 64; k++) {
        double c3 = lo + (hi - lo) * k / 64.0;
        if (k == 64)
            c3 = hi;
        double m = -1;
        sy_status ms = sy_lvcap_mass(cap, c3, &m, &err);
        if (ms != SY_OK)
            sy_fuzz_fail(H, "mass refused inside the table's span", err.msg);
        if (!isfinite(m) || m < 0)
            sy_fuzz_fail(H, "mass not finite or negative", NULL);
        /* monotone up to rounding of the interpolant */
        if (m > prev * (1 + 1e-9) + 1e-9)
            sy_fuzz_fail(H, "mass rises with C3", NULL);
        prev = m;
    }
    double m = 0;
    double out[2] = {lo - fmax(1.0, fabs(lo)), hi + fmax(1.0, fabs(hi))};
    for (int k = 0; k < 2; k++) {
        if (!isfinite(out[k]))
            continue;
        if (sy_lvcap_mass(cap, out[k], &m, &err) != SY_ERR_RANGE || !isnan(m))
            sy_fuzz_fail(H, "extrapolated outside the table", NULL);
        sy_fuzz_check_msg(H, err.msg);
    }
    sy_lvcap_free(cap);
    return 0;
}

#ifdef SY_FUZZ_ENTRY
int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);
int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    return sy_fuzz_lvcap(data, size);
}
#endif
