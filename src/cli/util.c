/* util.c - argument parsing and printing helpers shared by subcommands. */
#include "config.h"
#include "cli.h"

#include "synodic/io.h"
#include "synodic/study.h"

#include <errno.h>
#include <math.h>
#include <pthread.h>
#include <signal.h>
#include <stdarg.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

int cli_error(int code, const char *fmt, ...)
{
    va_list ap;
    va_start(ap, fmt);
    fputs("synodic: error: ", stderr);
    vfprintf(stderr, fmt, ap);
    fputc('\n', stderr);
    va_end(ap);
    return code;
}

int cli_exit_for(sy_status st)
{
    switch (st) {
    case SY_OK: return CLI_EXIT_OK;
    case SY_ERR_ARG:
    case SY_ERR_RANGE:
    case SY_ERR_PARSE:
    case SY_ERR_NOBODY:
    case SY_ERR_DEGENERATE: return CLI_EXIT_INPUT;
    case SY_ERR_NOSOL:
    case SY_ERR_NOCONV: return CLI_EXIT_NOSOL;
    case SY_ERR_IO: return CLI_EXIT_IO;
    case SY_ERR_NOMEM: return CLI_EXIT_INTERNAL;
    }
    return CLI_EXIT_INTERNAL;
}

int cli_bad_option(const char *cmd, int opt, const char *arg)
{
    if (opt == ':')
        return cli_error(CLI_EXIT_USAGE, "%s: option '%s' needs a value; see 'synodic %s --help'", cmd, arg, cmd);
    return cli_error(CLI_EXIT_USAGE, "%s: unknown option '%s'; see 'synodic %s --help'", cmd, arg, cmd);
}

int cli_parse_double(const char *what, const char *text, double *out)
{
    char *end;
    errno = 0;
    double v = strtod(text, &end);
    if (end == text || *end != '\0')
        return cli_error(CLI_EXIT_INPUT, "%s: '%s' is not a number", what, text);
    if (errno == ERANGE || !isfinite(v))
        return cli_error(CLI_EXIT_INPUT, "%s: '%s' is out of range (give a finite number)", what, text);
    *out = v;
    return 0;
}

int cli_parse_int(const char *what, const char *text, int lo, int hi, int *out)
{
    char *end;
    errno = 0;
    long v = strtol(text, &end, 10);
    if (end == text || *end != '\0')
        return cli_error(CLI_EXIT_INPUT, "%s: '%s' is not a whole number", what, text);
    if (errno == ERANGE || v < lo || v > hi)
        return cli_error(CLI_EXIT_INPUT, "%s: %s is out of range (%d to %d)", what, text, lo, hi);
    *out = (int)v;
    return 0;
}

int cli_parse_vec3(const char *what, const char *text, double v[3])
{
    const char *p = text;
    for (int k = 0; k < 3; k++) {
        char *end;
        errno = 0;
        v[k] = strtod(p, &end);
        if (end == p || errno == ERANGE || !isfinite(v[k]))
            return cli_error(CLI_EXIT_INPUT, "%s: '%s' is not a vector X,Y,Z of three finite numbers (km)", what, text);
        p = end;
        if (k < 2) {
            if (*p != ',')
                return cli_error(CLI_EXIT_INPUT, "%s: '%s' is not a vector X,Y,Z of three finite numbers (km)", what, text);
            p++;
        }
    }
    if (*p != '\0')
        return cli_error(CLI_EXIT_INPUT, "%s: '%s' is not a vector X,Y,Z of three finite numbers (km)", what, text);
    return 0;
}

int cli_parse_date(const char *what, const char *text, double *jd)
{
    sy_error err;
    if (sy_date_parse(text, jd, &err) != SY_OK)
        return cli_error(CLI_EXIT_INPUT, "%s: %s", what, err.msg);
    return 0;
}

int cli_parse_branch(const char *text, sy_branch *b)
{
    if (strcmp(text, "left") == 0) { *b = SY_BRANCH_LEFT; return 0; }
    if (strcmp(text, "right") == 0) { *b = SY_BRANCH_RIGHT; return 0; }
    return cli_error(CLI_EXIT_INPUT, "--branch: '%s' is not a branch; use left or right", text);
}

int cli_catalog(const char *bodies_path, sy_catalog **out)
{
    sy_catalog *cat = sy_catalog_new();
    if (!cat) return cli_error(CLI_EXIT_INTERNAL, "out of memory");
    if (bodies_path) {
        sy_error err;
        sy_status st = sy_catalog_load(cat, bodies_path, &err);
        if (st != SY_OK) {
            sy_catalog_free(cat);
            return cli_error(cli_exit_for(st), "%s", err.msg);
        }
    }
    *out = cat;
    return 0;
}

int cli_find_body(const sy_catalog *cat, const char *name, const sy_body **b)
{
    sy_error err;
    sy_status st = sy_catalog_find(cat, name, b, &err);
    if (st != SY_OK) return cli_error(CLI_EXIT_INPUT, "%s", err.msg);
    return 0;
}

json_t *cli_json_vec3(const double v[3])
{
    json_t *a = json_array();
    for (int k = 0; k < 3; k++) json_array_append_new(a, json_real(v[k]));
    return a;
}

int cli_print_json(json_t *root)
{
    if (!root) return cli_error(CLI_EXIT_INTERNAL, "out of memory building JSON");
    char *s = json_dumps(root, JSON_PRESERVE_ORDER | JSON_REAL_PRECISION(15));
    json_decref(root);
    if (!s) return cli_error(CLI_EXIT_INTERNAL, "out of memory writing JSON");
    int ok = fputs(s, stdout) >= 0 && fputc('\n', stdout) != EOF;
    free(s);
    if (!ok || fflush(stdout) != 0)
        return cli_error(CLI_EXIT_IO, "cannot write to standard output");
    return CLI_EXIT_OK;
}

static sigset_t interrupt_set(void)
{
    sigset_t set;
    sigemptyset(&set);
    sigaddset(&set, SIGINT);
    sigaddset(&set, SIGTERM);
    sigaddset(&set, SIGHUP);
    return set;
}

/* The one thread that receives the interrupts.  It runs as an ordinary
 * thread (sigwait, not a handler), so it may take sy_outfile's lock: the
 * temporaries are then removed while no output is being created or
 * renamed, and the process ends before any other output can start. */
static void *interrupt_thread(void *arg)
{
    (void)arg;
    sigset_t set = interrupt_set();
    int sig = 0;
    while (sigwait(&set, &sig) != 0) {
    }
    sy_outfile_abort_all();
    static const char msg[] = "synodic: error: interrupted; no output was left half-written\n";
    ssize_t w = write(STDERR_FILENO, msg, sizeof msg - 1);
    (void)w;
    _exit(CLI_EXIT_SIGNAL);
    return NULL;
}

void cli_catch_signals(void)
{
    signal(SIGXFSZ, SIG_IGN);
    sigset_t set = interrupt_set();
    if (pthread_sigmask(SIG_BLOCK, &set, NULL) != 0) return;
    pthread_t t;
    pthread_attr_t attr;
    pthread_attr_init(&attr);
    pthread_attr_setdetachstate(&attr, PTHREAD_CREATE_DETACHED);
    if (pthread_create(&t, &attr, interrupt_thread, NULL) != 0)
        pthread_sigmask(SIG_UNBLOCK, &set, NULL); /* default action then */
    pthread_attr_destroy(&attr);
}

int cli_ensure_dir(const char *dir)
{
    struct stat sb;
    if (stat(dir, &sb) == 0) {
        if (!S_ISDIR(sb.st_mode))
            return cli_error(CLI_EXIT_IO, "output directory %s is not a directory; choose another with -o", dir);
        if (access(dir, W_OK) != 0)
            return cli_error(CLI_EXIT_IO, "output directory %s is not writable; choose another with -o", dir);
        return 0;
    }
    if (mkdir(dir, 0777) != 0)
        return cli_error(CLI_EXIT_IO, "cannot create output directory %s: %s; create its parent or choose another with -o", dir, strerror(errno));
    return 0;
}

int cli_parse_formats(const char *text, unsigned *out)
{
    unsigned f = 0;
    char buf[256];
    snprintf(buf, sizeof buf, "%s", text);
    for (char *tok = strtok(buf, ", "); tok; tok = strtok(NULL, ", ")) {
        if (strcmp(tok, "png") == 0) f |= SY_FMT_PNG;
        else if (strcmp(tok, "svg") == 0) f |= SY_FMT_SVG;
        else if (strcmp(tok, "pdf") == 0) f |= SY_FMT_PDF;
        else if (strcmp(tok, "csv") == 0) f |= SY_FMT_CSV;
        else if (strcmp(tok, "json") == 0) f |= SY_FMT_JSON;
        else return cli_error(CLI_EXIT_INPUT, "--format: unknown format '%s'; use a comma list of png, svg, pdf, csv, json", tok);
    }
    if (!f) return cli_error(CLI_EXIT_INPUT, "--format: no format given; use a comma list of png, svg, pdf, csv, json");
    *out = f;
    return 0;
}

int cli_progress_bar(double frac, void *user)
{
    int *last = user;
    int pct = (int)(frac * 100.0);
    if (pct == *last) return 0;
    *last = pct;
    char bar[41];
    int n = pct * 40 / 100;
    for (int k = 0; k < 40; k++) bar[k] = k < n ? '#' : '.';
    bar[40] = '\0';
    fprintf(stderr, "\r  grid [%s] %3d%%", bar, pct);
    if (pct >= 100) fputc('\n', stderr);
    return 0;
}

int cli_study_bodies(const sy_study *st, sy_catalog **cat, const sy_body **from,
                     const sy_body **to)
{
    *cat = NULL;
    int rc = cli_catalog(st->bodies_file[0] ? st->bodies_file : NULL, cat);
    if (rc) return rc;
    /* Name the study file and key: the body came from there. */
    for (int k = 0; k < 2; k++) {
        const char *name = k ? st->target : st->origin;
        sy_error ferr;
        sy_status s = sy_catalog_find(*cat, name, k ? to : from, &ferr);
        if (s != SY_OK)
            return cli_error(cli_exit_for(s), "%s: [transfer] key '%s': %s", st->path,
                             k ? "target" : "origin", ferr.msg);
    }
    if (*from == *to)
        return cli_error(CLI_EXIT_INPUT, "%s: origin and target are both %s; choose two different bodies", st->path, (*from)->name);
    return 0;
}

int cli_load_study(const char *path, const char **sets, size_t nsets,
                   const char *outdir, sy_study **out)
{
    *out = NULL;
    sy_study *st = calloc(1, sizeof *st);
    if (!st) return cli_error(CLI_EXIT_INTERNAL, "out of memory");
    sy_error err;
    sy_status s = sy_study_load(path, sets, nsets, st, &err);
    if (s != SY_OK) {
        free(st);
        return cli_error(cli_exit_for(s), "%s", err.msg);
    }
    if (outdir) snprintf(st->out_dir, sizeof st->out_dir, "%s", outdir);
    *out = st;
    return 0;
}
