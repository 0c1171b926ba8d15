/* synodic/io.h - all-or-nothing output files (part of libsynodic).
 *
 * Every output goes to a temporary file beside its destination and is
 * renamed into place only when complete, so a failure or an interrupt
 * never leaves a half-written chart or table behind.
 */
#ifndef SYNODIC_IO_H
#define SYNODIC_IO_H

#include <stdio.h>

#ifdef __cplusplus
extern "C" {
#endif

typedef struct {
    FILE *fp;            /* write here                                 */
    char path[4096];     /* final destination                          */
    char tmp[4096];      /* temporary file in the same directory       */
} sy_outfile;

/* Create the temporary file for `path`.  Returns an sy_status as int. */
int sy_outfile_open(sy_outfile *of, const char *path, void *err /* sy_error* */);
/* Flush, fsync-free close and rename into place; on any write error the
 * temporary is removed and SY_ERR_IO returned with the reason. */
int sy_outfile_commit(sy_outfile *of, void *err /* sy_error* */);
/* Close and remove the temporary (safe to call twice or after commit). */
void sy_outfile_abort(sy_outfile *of);
/* Remove every temporary still open, and block every later open, commit
 * or abort: for the moment before the process exits on an interrupt.
 * Not async-signal-safe (it takes a mutex): call it from an ordinary
 * thread, e.g. one that waits for signals with sigwait(). */
void sy_outfile_abort_all(void);

#ifdef __cplusplus
}
#endif
#endif
