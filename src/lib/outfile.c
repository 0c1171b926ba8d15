/* outfile.c - temporary-file-and-rename output, so that nothing is ever
 * half-written (POSIX rename(2) is atomic within one file system). */
#include "config.h"
#include "synodic.h"
#include "synodic/io.h"

#include <errno.h>
#include <pthread.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

/* Registry of open temporaries, so that an interrupt can remove them.
 * Creating a temporary and registering it, renaming it into place and
 * deregistering it, all happen under `lock`; sy_outfile_abort_all() takes
 * the same lock, so it can never run between the creation of a file and
 * its registration, nor between a rename and the bookkeeping after it. */
#define SY_MAX_OPEN_OUTFILES 64
static sy_outfile *open_files[SY_MAX_OPEN_OUTFILES];
static pthread_mutex_t lock = PTHREAD_MUTEX_INITIALIZER;

static void registry_add(sy_outfile *of)
{
    for (int i = 0; i < SY_MAX_OPEN_OUTFILES; i++)
        if (!open_files[i]) { open_files[i] = of; return; }
}

static void registry_remove(sy_outfile *of)
{
    for (int i = 0; i < SY_MAX_OPEN_OUTFILES; i++)
        if (open_files[i] == of) open_files[i] = NULL;
}

int sy_outfile_open(sy_outfile *of, const char *path, void *errp)
{
    sy_error *err = errp;
    memset(of, 0, sizeof *of);
    if (strlen(path) + 16 >= sizeof of->tmp)
        return sy_fail(err, SY_ERR_ARG, "output path too long: %s", path);
    snprintf(of->path, sizeof of->path, "%s", path);
    pthread_mutex_lock(&lock);
    snprintf(of->tmp, sizeof of->tmp, "%s.tmp.XXXXXX", path);
    int fd = mkstemp(of->tmp);
    if (fd < 0) {
        int e = errno;
        of->tmp[0] = '\0';
        pthread_mutex_unlock(&lock);
        return sy_fail(err, SY_ERR_IO, "cannot create %s: %s (check that the directory exists and is writable)", path, strerror(e));
    }
    registry_add(of);
    pthread_mutex_unlock(&lock);
    /* mkstemp creates 0600; a finished chart is an ordinary file, so give
     * it the permissions the user's umask asks for. */
    mode_t mask = umask(0);
    umask(mask);
    if (fchmod(fd, 0666 & ~mask) != 0) {
        /* not fatal: the file is still the user's own */
    }
    of->fp = fdopen(fd, "wb");
    if (!of->fp) {
        int e = errno;
        close(fd);
        sy_outfile_abort(of);
        return sy_fail(err, SY_ERR_IO, "cannot write %s: %s", path, strerror(e));
    }
    return SY_OK;
}

int sy_outfile_commit(sy_outfile *of, void *errp)
{
    sy_error *err = errp;
    if (!of->fp)
        return sy_fail(err, SY_ERR_IO, "%s: output was not open", of->path);
    int bad = ferror(of->fp);
    int e = errno;
    if (fflush(of->fp) != 0) { bad = 1; e = errno; }
    if (fclose(of->fp) != 0 && !bad) { bad = 1; e = errno; }
    of->fp = NULL;
    if (bad) {
        sy_outfile_abort(of);
        return sy_fail(err, SY_ERR_IO, "writing %s failed: %s", of->path, strerror(e));
    }
    pthread_mutex_lock(&lock);
    int moved = rename(of->tmp, of->path) == 0;
    e = errno;
    if (!moved) unlink(of->tmp);
    registry_remove(of);
    of->tmp[0] = '\0';
    pthread_mutex_unlock(&lock);
    if (!moved)
        return sy_fail(err, SY_ERR_IO, "cannot move output into %s: %s", of->path, strerror(e));
    return SY_OK;
}

void sy_outfile_abort(sy_outfile *of)
{
    if (of->fp) { fclose(of->fp); of->fp = NULL; }
    pthread_mutex_lock(&lock);
    if (of->tmp[0]) { unlink(of->tmp); of->tmp[0] = '\0'; }
    registry_remove(of);
    pthread_mutex_unlock(&lock);
}

void sy_outfile_abort_all(void)
{
    /* The lock stays held: the caller is about to end the process, and no
     * output may be created or renamed after the temporaries are gone. */
    pthread_mutex_lock(&lock);
    for (int i = 0; i < SY_MAX_OPEN_OUTFILES; i++) {
        sy_outfile *of = open_files[i];
        if (of && of->tmp[0]) unlink(of->tmp);
    }
}
