/* fuzz_common.c - helpers of the fuzz harnesses (see fuzz.h). */
#include "config.h"
#include "fuzz.h"

#include <fcntl.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

void sy_fuzz_fail(const char *harness, const char *what, const char *detail)
{
    fprintf(stderr, "fuzz %s: contract broken: %s%s%s\n", harness, what,
            detail ? ": " : "", detail ? detail : "");
    abort();
}

void sy_fuzz_check_msg(const char *harness, const char *msg)
{
    if (!msg[0])
        sy_fuzz_fail(harness, "error without a message", NULL);
    if (strchr(msg, '\n'))
        sy_fuzz_fail(harness, "message is more than one line", msg);
}

const char *sy_fuzz_tmpfile(const char *suffix, const uint8_t *data,
                            size_t size)
{
    /* /dev/shm when present: the harness writes one file per execution. */
    static char path[256];
    const char *dir = access("/dev/shm", W_OK) == 0 ? "/dev/shm" : "/tmp";
    snprintf(path, sizeof path, "%s/synodic-fuzz-%ld%s", dir, (long)getpid(),
             suffix);
    int fd = open(path, O_WRONLY | O_CREAT | O_TRUNC, 0600);
    if (fd < 0)
        return NULL;
    size_t done = 0;
    while (done < size) {
        ssize_t w = write(fd, data + done, size - done);
        if (w <= 0) {
            close(fd);
            return NULL;
        }
        done += (size_t)w;
    }
    close(fd);
    return path;
}
