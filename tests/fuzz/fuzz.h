/* fuzz.h - entry points shared by the libFuzzer harnesses (make fuzz) and
 * the regression replay test (tests/check_fuzz_regress.c, make check).
 *
 * Each sy_fuzz_NAME() feeds one input to one reader and checks the
 * contract the reader promises, aborting (so that libFuzzer, ASan or the
 * Check test sees it) when it is broken:
 *   - a failing call returns a non-OK status with a non-empty, one-line
 *     message (no newline; at most sy_error's 511 characters);
 *   - a succeeding call leaves only finite, in-range values behind.
 * Returns 0 (libFuzzer's convention). */
#ifndef SYNODIC_FUZZ_H
#define SYNODIC_FUZZ_H

#include <stddef.h>
#include <stdint.h>

int sy_fuzz_study(const uint8_t *data, size_t size);
int sy_fuzz_bodies(const uint8_t *data, size_t size);
int sy_fuzz_date(const uint8_t *data, size_t size);
int sy_fuzz_lvcap(const uint8_t *data, size_t size);

/* Write data to a private temporary file (one per process, reused);
 * returns its path or NULL. */
const char *sy_fuzz_tmpfile(const char *suffix, const uint8_t *data,
                            size_t size);
/* abort() with a message on stderr. */
void sy_fuzz_fail(const char *harness, const char *what, const char *detail);
/* Abort unless msg is a non-empty single line. */
void sy_fuzz_check_msg(const char *harness, const char *msg);

#endif
