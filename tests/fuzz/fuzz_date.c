/* fuzz_date.c - sy_date_parse() on arbitrary text.
 *
 * Contract (synodic.h): either SY_ERR_PARSE with a one-line message, or
 * SY_OK with a finite Julian date; a parsed date formats and parses back
 * to within half a second (sy_date_format rounds to the second). */
#include "config.h"
#include "synodic.h"
#include "fuzz.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

int sy_fuzz_date(const uint8_t *data, size_t size)
{
    if (size > 4096)
        return 0;
    char *text = malloc(size + 1);
    if (!text)
        return 0;
    memcpy(text, data, size);
    text[size] = '\0';
    sy_error err;
    err.msg[0] = '\0';
    double jd = -1;
    sy_status st = sy_date_parse(text, &jd, &err);
    if (st != SY_OK) {
        if (st != SY_ERR_PARSE)
            sy_fuzz_fail("date", "status other than SY_ERR_PARSE", err.msg);
        sy_fuzz_check_msg("date", err.msg);
    } else {
        if (!isfinite(jd) || jd < 0 || jd > 1e8)
            sy_fuzz_fail("date", "accepted date with a non-finite or "
                         "out-of-range Julian date", text);
        char buf[64];
        sy_date_format(jd, 1, buf, sizeof buf);
        double back;
        sy_error e2;
        if (sy_date_parse(buf, &back, &e2) == SY_OK &&
            !(fabs(back - jd) * SY_DAY_S <= 0.5 + 1e-3 * (1 + fabs(jd) * 1e-6)))
            sy_fuzz_fail("date", "format/parse round trip moved the date",
                         buf);
    }
    free(text);
    return 0;
}

#ifdef SY_FUZZ_ENTRY
int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);
int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    return sy_fuzz_date(data, size);
}
#endif
