/* outfile.c - temporary-file-and-rename output, so that nothing is ever
 * half-written (POSIX rename(2) is atomic within one file system). */
#include "config.h"
#include "synodic.h"
#include "synodic/io.h"

#include <errno.h>
#include <pthread.h>
#include <signal.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

/* Registry of open temporaries so that a signal handler can remove them.
 * Written only from the main thread; a signal handler only reads it. */
#define SY_MAX_OPEN_OUTFILES 64
static sy_outfile *volatile open_files[SY_MAX_OPEN_OUTFILES];

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
    snprintf(of->tmp, sizeof of->tmp, "%s.tmp.XXXXXX", path);
    /* Hold SIGINT/SIGTERM from the creation of the temporary until it is
     * in the registry, so that an interrupt in between cannot leave it
     * behind (the handler removes only registered temporaries). */
    sigset_t block, old;
    sigemptyset(&block);
    sigaddset(&block, SIGINT);
    sigaddset(&block, SIGTERM);
    sigaddset(&block, SIGHUP);
    pthread_sigmask(SIG_BLOCK, &block, &old);
    int fd = mkstemp(of->tmp);
    if (fd < 0) {
        int e = errno;
        of->tmp[0] = '\0';
        pthread_sigmask(SIG_SETMASK, &old, NULL);
        return sy_fail(err, SY_ERR_IO, "cannot create %s: %s (check that the directory exists and is writable)", path, strerror(e));
    }
    registry_add(of);
    pthread_sigmask(SIG_SETMASK, &old, NULL);
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
        unlink(of->tmp);
        registry_remove(of);
        of->tmp[0] = '\0';
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
        unlink(of->tmp);
        registry_remove(of);
        of->tmp[0] = '\0';
        return sy_fail(err, SY_ERR_IO, "writing %s failed: %s", of->path, strerror(e));
    }
    if (rename(of->tmp, of->path) != 0) {
        e = errno;
        unlink(of->tmp);
        registry_remove(of);
        of->tmp[0] = '\0';
        return sy_fail(err, SY_ERR_IO, "cannot move output into %s: %s", of->path, strerror(e));
    }
    registry_remove(of);
    of->tmp[0] = '\0';
    return SY_OK;
}

void sy_outfile_abort(sy_outfile *of)
{
    if (of->fp) { fclose(of->fp); of->fp = NULL; }
    if (of->tmp[0]) { unlink(of->tmp); of->tmp[0] = '\0'; }
    registry_remove(of);
}

void sy_outfile_abort_all(void)
{
    /* Only async-signal-safe calls: unlink(2). */
    for (int i = 0; i < SY_MAX_OPEN_OUTFILES; i++) {
        sy_outfile *of = open_files[i];
        if (of && of->tmp[0]) unlink(of->tmp);
    }
}
