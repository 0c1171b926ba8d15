/* check_catalogue.c - the catalogue of bad inputs (issue 6), each through
 * the real program ($SYNODIC_BIN, run with the source tree as current
 * directory, $SYNODIC_SRCDIR) as an analyst would meet it.
 *
 * Every bad input must give:
 *   - the exit status documented in synodic(1) (EXIT STATUS; the values
 *     of src/cli/cli.h): 2 usage, 3 bad input, 4 no solution, 5 a file
 *     could not be read or written, 6 interrupted;
 *   - exactly one line on standard error, "synodic: error: ...", naming
 *     the file and line and the key, or the option, that is wrong (the
 *     needles of each case);
 *   - nothing at all on standard output;
 *   - no file left in the output directory and no temporary file beside
 *     the input;
 *   - an exit, never death by a signal, within a bounded time.
 * Some inputs of the list are valid (an eccentricity of exactly 1
 * or of 40 in a bodies file, -0, an empty bodies file): for them the
 * program must work and print finite figures, which is checked instead.
 *
 * The study files, bodies files and dates used here are invented test
 * data; the expectations come from the file formats of our own design
 * documented in src/lib/study.c, src/lib/catalog.c and synodic(1).
 */
#include "config.h"
#include "synodic.h"
#include "testutil.h"

#include <dirent.h>
#include <errno.h>
#include <fcntl.h>
#include <jansson.h>
#include <signal.h>
#include <stdio.h>
#include <string.h>
#include <sys/mount.h>
#include <sys/resource.h>
#include <sys/stat.h>
#include <sys/wait.h>
#include <time.h>
#include <unistd.h>

/* ------------------------------------------------------------------ */
/* running the program                                                 */

static const char *bin(void)
{
    const char *b = getenv("SYNODIC_BIN");
    return b && *b ? b : "./synodic";
}

static const char *srcdir(void)
{
    const char *s = getenv("SYNODIC_SRCDIR");
    return s && *s ? s : ".";
}

typedef struct {
    int code;        /* exit status, or -1 when killed by a signal */
    int sig;         /* the signal, or 0 */
    char *out, *err; /* captured standard output / error (NUL-terminated) */
    size_t outlen;
} run_result;

static char *slurp_n(const char *path, size_t *len)
{
    FILE *f = fopen(path, "rb");
    if (!f) {
        if (len) *len = 0;
        return strdup("");
    }
    fseek(f, 0, SEEK_END);
    long n = ftell(f);
    fseek(f, 0, SEEK_SET);
    char *s = malloc((size_t)n + 1);
    size_t got = fread(s, 1, (size_t)n, f);
    s[got] = '\0';
    fclose(f);
    if (len) *len = got;
    return s;
}

typedef struct {
    rlim_t fsize;          /* RLIMIT_FSIZE for the child, 0: unchanged */
    const char *stdout_to; /* e.g. "/dev/full"; NULL: captured */
    double kill_after_s;   /* send kill_sig after this long (0: never) */
    int kill_sig;
    const char *kill_when_tmp_in; /* or: as soon as a *.tmp.* appears here */
} run_opts;

static int has_tmp_file(const char *dir)
{
    DIR *d = opendir(dir);
    if (!d) return 0;
    struct dirent *de;
    int found = 0;
    while ((de = readdir(d)))
        if (strstr(de->d_name, ".tmp.")) found = 1;
    closedir(d);
    return found;
}

static double now_s(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return ts.tv_sec + 1e-9 * ts.tv_nsec;
}

/* Run synodic with argv (argv[0] is ignored).  Bounded: a run still going
 * after 300 s is killed and reported as a failure. */
static run_result run_argv(const char *const *argv, const run_opts *o)
{
    char out[] = "/tmp/sy_cat_outXXXXXX", err[] = "/tmp/sy_cat_errXXXXXX";
    int fo = mkstemp(out), fe = mkstemp(err);
    ck_assert(fo >= 0 && fe >= 0);
    size_t n = 0;
    while (argv[n]) n++;
    char **av = calloc(n + 1, sizeof *av);
    av[0] = (char *)bin();
    for (size_t i = 1; i < n; i++) av[i] = (char *)argv[i];
    pid_t pid = fork();
    ck_assert(pid >= 0);
    if (pid == 0) {
        if (chdir(srcdir()) != 0) _exit(126);
        int in = open("/dev/null", O_RDONLY);
        dup2(in, 0);
        if (o && o->stdout_to) {
            int so = open(o->stdout_to, O_WRONLY);
            dup2(so, 1);
        } else {
            dup2(fo, 1);
        }
        dup2(fe, 2);
        if (o && o->fsize) {
            struct rlimit rl;
            getrlimit(RLIMIT_FSIZE, &rl);
            rl.rlim_cur = o->fsize;
            setrlimit(RLIMIT_FSIZE, &rl);
        }
        /* the default dispositions, whatever the test runner set */
        signal(SIGXFSZ, SIG_DFL);
        signal(SIGINT, SIG_DFL);
        signal(SIGTERM, SIG_DFL);
        execv(av[0], av);
        _exit(127);
    }
    close(fo);
    close(fe);
    free(av);
    double t0 = now_s();
    int st = 0, sent = 0;
    for (;;) {
        pid_t w = waitpid(pid, &st, WNOHANG);
        if (w == pid) break;
        double t = now_s() - t0;
        if (o && o->kill_sig && !sent &&
            ((o->kill_after_s > 0 && t >= o->kill_after_s) ||
             (o->kill_when_tmp_in && has_tmp_file(o->kill_when_tmp_in)))) {
            kill(pid, o->kill_sig);
            sent = 1;
        }
        if (t > 300) {
            kill(pid, SIGKILL);
            waitpid(pid, &st, 0);
            ck_abort_msg("%s %s: still running after 300 s", bin(), argv[1]);
        }
        usleep(2000);
    }
    run_result r;
    r.code = WIFEXITED(st) ? WEXITSTATUS(st) : -1;
    r.sig = WIFSIGNALED(st) ? WTERMSIG(st) : 0;
    r.out = slurp_n(out, &r.outlen);
    r.err = slurp_n(err, NULL);
    unlink(out);
    unlink(err);
    return r;
}

static void run_free(run_result *r)
{
    free(r->out);
    free(r->err);
}

/* ------------------------------------------------------------------ */
/* scratch directories                                                 */

static void make_dir(char *buf, size_t len, const char *tag)
{
    snprintf(buf, len, "/tmp/sy_cat_%s_XXXXXX", tag);
    ck_assert_msg(mkdtemp(buf) != NULL, "mkdtemp: %s", strerror(errno));
}

static void rm_rf(const char *dir)
{
    char cmd[1200];
    snprintf(cmd, sizeof cmd, "rm -rf '%s'", dir);
    ck_assert_int_eq(system(cmd), 0);
}

static void write_bytes(const char *path, const char *data, size_t len)
{
    FILE *f = fopen(path, "wb");
    ck_assert_msg(f != NULL, "cannot write %s", path);
    ck_assert_int_eq(fwrite(data, 1, len, f), len);
    ck_assert_int_eq(fclose(f), 0);
}

/* Entries of dir (not . and ..), names joined by spaces into buf. */
static int list_dir(const char *dir, char *buf, size_t len)
{
    DIR *d = opendir(dir);
    buf[0] = '\0';
    if (!d) return -1;
    int n = 0;
    struct dirent *de;
    while ((de = readdir(d))) {
        if (!strcmp(de->d_name, ".") || !strcmp(de->d_name, "..")) continue;
        size_t u = strlen(buf);
        snprintf(buf + u, len - u, "%s%s", n ? " " : "", de->d_name);
        n++;
    }
    closedir(d);
    return n;
}

/* ------------------------------------------------------------------ */
/* the catalogue                                                       */

/* A valid study, line by line (the line numbers matter). */
#define S_HEAD                                                             \
    "[study]\n"               /* 1 */                                      \
    "title = Catalogue\n"     /* 2 */                                      \
    "[transfer]\n"            /* 3 */                                      \
    "origin = earth\n"        /* 4 */                                      \
    "target = mars\n"         /* 5 */
#define S_DEP                                                              \
    "[departure]\n"           /* 6 */                                      \
    "start = 2033-02-15\n"    /* 7 */                                      \
    "end = 2033-06-15\n"      /* 8 */                                      \
    "step_days = 20\n"        /* 9 */
#define S_ARR                                                              \
    "[arrival]\n"             /* 10 */                                     \
    "start = 2033-08-01\n"    /* 11 */                                     \
    "end = 2034-06-30\n"      /* 12 */                                     \
    "step_days = 20\n"        /* 13 */
#define S_OUT                                                              \
    "[output]\n"              /* 14 */                                     \
    "formats = csv, json\n"   /* 15 */
#define S_OK S_HEAD S_DEP S_ARR S_OUT

/* A valid bodies file body, lines 1-8 (invented elements). */
#define B_OK                                                               \
    "[body Cobble]\n"             /* 1 */                                  \
    "epoch = 2030-01-01\n"        /* 2 */                                  \
    "a_au = 1.4\n"                /* 3 */                                  \
    "e = 0.2\n"                   /* 4 */                                  \
    "i_deg = 3\n"                 /* 5 */                                  \
    "node_deg = 40\n"             /* 6 */                                  \
    "argp_deg = 50\n"             /* 7 */                                  \
    "mean_anomaly_deg = 10\n"     /* 8 */

enum { IN_NONE, IN_STUDY, IN_BODIES, IN_LVCAP };
enum { GEN_TEXT, GEN_EMPTY, GEN_BINARY, GEN_LONGLINE, GEN_NUL };

typedef struct {
    const char *what;       /* what the case checks                        */
    int input;              /* which file %F is                            */
    int gen;                /* how its content is made                     */
    const char *text;       /* GEN_TEXT content (or the valid part)        */
    const char *argv[12];   /* %F: the input, %O: an empty output dir      */
    int code;               /* expected exit status; 0: valid input        */
    const char *needle[4];  /* in stderr (or stdout when valid); %F        */
} bad_case;

#define CHART(...) {"synodic", "chart", "%F", "-o", "%O", "--quiet", __VA_ARGS__}
#define BODIES {"synodic", "bodies", "--bodies", "%F"}

static const bad_case cases[] = {
    /* ---- study files ------------------------------------------------ */
    {"empty study file", IN_STUDY, GEN_EMPTY, "", CHART(NULL), 3,
     {"%F", "[study]", "title"}},
    {"binary garbage as a study file", IN_STUDY, GEN_BINARY, "", CHART(NULL),
     3, {"%F:1:"}},
    {"a study line of 100 000 characters", IN_STUDY, GEN_LONGLINE,
     S_HEAD S_DEP S_ARR "[output]\nname = ", CHART(NULL), 3,
     {"%F:15:", "longer than"}},
    {"a NUL byte inside a study line", IN_STUDY, GEN_NUL,
     S_HEAD S_DEP S_ARR "[output]\nformats = csv", CHART(NULL), 3,
     {"%F:15:", "NUL"}},
    {"a key given twice", IN_STUDY, GEN_TEXT,
     S_HEAD "target = venus\n" S_DEP S_ARR S_OUT, CHART(NULL), 3,
     {"%F:6:", "'target'", "twice", "line 5"}},
    {"a section given twice", IN_STUDY, GEN_TEXT,
     S_OK "[output]\nname = x\n", CHART(NULL), 3,
     {"%F:16:", "[output]", "twice"}},
    {"a limit of 1e999", IN_STUDY, GEN_TEXT,
     S_OK "[limits]\nc3_max_km2_s2 = 1e999\n", CHART(NULL), 3,
     {"%F:17:", "c3_max_km2_s2", "not a finite number"}},
    {"a step of nan", IN_STUDY, GEN_TEXT,
     S_HEAD "[departure]\nstart = 2033-02-15\nend = 2033-06-15\n"
     "step_days = nan\n" S_ARR S_OUT, CHART(NULL), 3,
     {"%F:9:", "step_days", "not a finite number"}},
    {"a limit of -0", IN_STUDY, GEN_TEXT,
     S_OK "[limits]\nc3_max_km2_s2 = -0\n", CHART(NULL), 3,
     {"%F:17:", "c3_max_km2_s2", "out of range"}},
    {"a grid step of zero", IN_STUDY, GEN_TEXT,
     S_HEAD "[departure]\nstart = 2033-02-15\nend = 2033-06-15\n"
     "step_days = 0\n" S_ARR S_OUT, CHART(NULL), 3,
     {"%F:9:", "step_days", "not positive"}},
    {"a grid step larger than the window", IN_STUDY, GEN_TEXT,
     S_HEAD S_DEP "[arrival]\nstart = 2033-08-01\nend = 2034-06-30\n"
     "step_days = 400\n" S_OUT, CHART(NULL), 3,
     {"%F:13:", "step_days", "larger than the window"}},
    /* 97 400 x 97 400 cells: hundreds of GB, refused before allocating */
    {"a grid too large for this machine's memory", IN_STUDY, GEN_TEXT,
     S_HEAD "[departure]\nstart = 2033-02-15\nend = 2041-02-15\n"
     "step_days = 0.03\n[arrival]\nstart = 2033-08-01\nend = 2041-08-01\n"
     "step_days = 0.03\n" S_OUT, CHART(NULL), 3,
     {"%F", "97401 x 97401", "needs", "step_days"}},
    {"a window of 10 000 years", IN_STUDY, GEN_TEXT,
     S_HEAD "[departure]\nstart = 2033-02-15\nend = 12033-02-15\n"
     "step_days = 100\n" S_ARR S_OUT, CHART(NULL), 3,
     {"%F:8:", "'end'", "200 years"}},
    {"a flight time of one second (a window of 1 to 2 s)", IN_STUDY,
     GEN_TEXT,
     S_HEAD S_DEP "[flight]\ntof_min_days = 0.0000115741\n"
     "tof_max_days = 0.0000231482\nstep_days = 0.0000115741\n" S_OUT,
     CHART(NULL), 3, {"%F:11:", "tof_min_days", "1 day minimum"}},
    {"an unknown section", IN_STUDY, GEN_TEXT, S_OK "[limit]\n",
     CHART(NULL), 3, {"%F:16:", "[limit]", "accepted sections"}},
    {"an unknown key", IN_STUDY, GEN_TEXT, S_OK "[limits]\nc3max = 20\n",
     CHART(NULL), 3, {"%F:17:", "c3max", "accepted keys"}},
    {"a key outside any section", IN_STUDY, GEN_TEXT, "title = x\n" S_OK,
     CHART(NULL), 3, {"%F:1:", "'title'", "outside"}},
    {"an impossible date", IN_STUDY, GEN_TEXT,
     S_HEAD "[departure]\nstart = 2033-02-29\nend = 2033-06-15\n"
     "step_days = 20\n" S_ARR S_OUT, CHART(NULL), 3,
     {"%F:7:", "'start'", "day 29"}},
    {"a window that ends before it starts", IN_STUDY, GEN_TEXT,
     S_HEAD "[departure]\nstart = 2033-06-15\nend = 2033-02-15\n"
     "step_days = 20\n" S_ARR S_OUT, CHART(NULL), 3,
     {"%F:8:", "'end'", "not after start"}},
    {"both [arrival] and [flight]", IN_STUDY, GEN_TEXT,
     S_OK "[flight]\ntof_min_days = 100\ntof_max_days = 300\n"
     "step_days = 10\n", CHART(NULL), 3, {"%F:16:", "[flight]", "exactly one"}},
    {"101 revolutions", IN_STUDY, GEN_TEXT,
     S_HEAD "revolutions = 101\nbranch = left\n" S_DEP S_ARR S_OUT,
     CHART(NULL), 3, {"%F:6:", "revolutions", "out of range"}},
    {"revolutions without a branch", IN_STUDY, GEN_TEXT,
     S_HEAD "revolutions = 2\n" S_DEP S_ARR S_OUT, CHART(NULL), 3,
     {"%F:3:", "branch"}},
    {"a declination limit of 91 deg", IN_STUDY, GEN_TEXT,
     S_OK "[limits]\ndla_max_deg = 91\n", CHART(NULL), 3,
     {"%F:17:", "dla_max_deg", "out of range"}},
    {"an unknown chart field", IN_STUDY, GEN_TEXT,
     S_OK "[chart]\nfields = c3, delta\n", CHART(NULL), 3,
     {"%F:17:", "fields", "delta"}},
    {"levels out of order", IN_STUDY, GEN_TEXT,
     S_OK "[chart]\nc3_levels = 10, 8\n", CHART(NULL), 3,
     {"%F:17:", "c3_levels", "ascending"}},
    {"an output name with '/'", IN_STUDY, GEN_TEXT, S_OK "name = a/b\n",
     CHART(NULL), 3, {"%F:16:", "'name'", "'/'"}},
    {"a title that is not UTF-8", IN_STUDY, GEN_TEXT,
     "[study]\ntitle = caf\xe9\n[transfer]\norigin = earth\n"
     "target = mars\n" S_DEP S_ARR S_OUT, CHART(NULL), 3,
     {"%F:2:", "'title'", "UTF-8"}},
    {"an unknown target body", IN_STUDY, GEN_TEXT,
     "[study]\ntitle = T\n[transfer]\norigin = earth\ntarget = vulcan\n"
     S_DEP S_ARR S_OUT, CHART(NULL), 3, {"%F", "target", "vulcan"}},
    {"a bodies file that does not exist", IN_STUDY, GEN_TEXT,
     "[study]\ntitle = T\nbodies = no-such-bodies.ini\n[transfer]\n"
     "origin = earth\ntarget = mars\n" S_DEP S_ARR S_OUT, CHART(NULL), 5,
     {"no-such-bodies.ini", "cannot open"}},
    {"an override without '='", IN_STUDY, GEN_TEXT, S_OK,
     CHART("--set", "limits.c3_max_km2_s2"), 3,
     {"--set limits.c3_max_km2_s2", "section.key=value"}},
    {"an override of an unknown key", IN_STUDY, GEN_TEXT, S_OK,
     CHART("--set", "departure.step=3"), 3,
     {"--set departure.step=3", "'step'", "accepted keys"}},
    {"an override of 1e999", IN_STUDY, GEN_TEXT, S_OK,
     CHART("--set", "arrival.step_days=1e999"), 3,
     {"--set arrival.step_days=1e999", "step_days", "finite"}},
    {"an output directory whose parent does not exist", IN_STUDY, GEN_TEXT,
     S_OK, {"synodic", "chart", "%F", "-o", "%O/no/such/dir", "--quiet"}, 5,
     {"%O/no/such/dir", "-o"}},
    {"an output directory under a regular file", IN_STUDY, GEN_TEXT, S_OK,
     {"synodic", "chart", "%F", "-o", "%F/out", "--quiet"}, 5,
     {"%F/out", "-o"}},
    {"an output directory that is a regular file", IN_STUDY, GEN_TEXT, S_OK,
     {"synodic", "chart", "%F", "-o", "%F", "--quiet"}, 5,
     {"%F", "not a directory", "-o"}},
    {"an output directory that cannot be written (/proc, even as root)",
     IN_STUDY, GEN_TEXT, S_OK,
     {"synodic", "chart", "%F", "-o", "/proc", "--quiet"}, 5,
     {"/proc", "writable"}},
    {"two study files", IN_STUDY, GEN_TEXT, S_OK,
     CHART("%F"), 2, {"chart", "one STUDY"}},
    {"--threads that is not a number", IN_STUDY, GEN_TEXT, S_OK,
     CHART("--threads", "abc"), 3, {"--threads", "abc"}},
    {"an empty --format", IN_STUDY, GEN_TEXT, S_OK, CHART("--format", ""),
     3, {"--format"}},
    {"an option without its value", IN_STUDY, GEN_TEXT, S_OK,
     CHART("--set"), 2, {"--set", "needs a value"}},

    /* ---- bodies files ----------------------------------------------- */
    {"empty bodies file: valid, only the built-ins", IN_BODIES, GEN_EMPTY,
     "", BODIES, 0, {"Pluto"}},
    {"binary garbage as a bodies file", IN_BODIES, GEN_BINARY, "", BODIES, 3,
     {"%F:1:"}},
    {"a bodies line of 100 000 characters", IN_BODIES, GEN_LONGLINE,
     B_OK "radius_km = ", BODIES, 3, {"%F:9:", "longer than"}},
    {"a NUL byte inside a bodies line", IN_BODIES, GEN_NUL,
     B_OK "radius_km = 1", BODIES, 3, {"%F:9:", "NUL"}},
    {"a bodies key given twice", IN_BODIES, GEN_TEXT, B_OK "e = 0.3\n",
     BODIES, 3, {"%F:9:", "'e'", "twice"}},
    {"a body defined twice", IN_BODIES, GEN_TEXT, B_OK B_OK, BODIES, 3,
     {"%F:9:", "Cobble", "duplicate"}},
    {"an eccentricity of 1e999", IN_BODIES, GEN_TEXT,
     "[body Cobble]\nepoch = 2030-01-01\na_au = 1.4\ne = 1e999\n", BODIES, 3,
     {"%F:4:", "'e'", "not a finite number"}},
    {"an inclination of nan", IN_BODIES, GEN_TEXT,
     "[body Cobble]\nepoch = 2030-01-01\na_au = 1.4\ne = 0.1\ni_deg = nan\n",
     BODIES, 3, {"%F:5:", "'i_deg'", "not a finite number"}},
    {"an eccentricity of -0.1", IN_BODIES, GEN_TEXT,
     "[body Cobble]\nepoch = 2030-01-01\na_au = 1.4\ne = -0.1\ni_deg = 3\n"
     "node_deg = 40\nargp_deg = 50\nmean_anomaly_deg = 10\n", BODIES, 3,
     {"%F:4:", "'e'", "negative"}},
    {"a parabola (e = 1) given a semi-major axis", IN_BODIES, GEN_TEXT,
     "[body Cobble]\nepoch = 2030-01-01\na_au = 1.4\ne = 1\ni_deg = 3\n"
     "node_deg = 40\nargp_deg = 50\nperihelion = 2030-02-01\n", BODIES, 3,
     {"%F:3:", "'a_au'", "parabola"}},
    {"an ellipse with a negative semi-major axis", IN_BODIES, GEN_TEXT,
     "[body Cobble]\nepoch = 2030-01-01\na_au = -1.4\ne = 0.5\ni_deg = 3\n"
     "node_deg = 40\nargp_deg = 50\nmean_anomaly_deg = 10\n", BODIES, 3,
     {"%F:3:", "'a_au'", "> 0"}},
    {"an inclination of 181 deg", IN_BODIES, GEN_TEXT,
     "[body Cobble]\nepoch = 2030-01-01\na_au = 1.4\ne = 0.2\ni_deg = 181\n"
     "node_deg = 40\nargp_deg = 50\nmean_anomaly_deg = 10\n", BODIES, 3,
     {"%F:5:", "'i_deg'", "0..180"}},
    {"a body without its eccentricity", IN_BODIES, GEN_TEXT,
     "[body Cobble]\nepoch = 2030-01-01\na_au = 1.4\ni_deg = 3\n"
     "node_deg = 40\nargp_deg = 50\nmean_anomaly_deg = 10\n", BODIES, 3,
     {"%F:1:", "missing key 'e'"}},
    {"a body named like a planet", IN_BODIES, GEN_TEXT,
     "[body mars]\nepoch = 2030-01-01\n", BODIES, 3,
     {"%F:1:", "mars", "clashes"}},
    {"an epoch in 5000 AD", IN_BODIES, GEN_TEXT,
     "[body Cobble]\nepoch = 5000-01-01\na_au = 1.4\ne = 0.2\ni_deg = 3\n"
     "node_deg = 40\nargp_deg = 50\nmean_anomaly_deg = 10\n", BODIES, 3,
     {"%F:2:", "'epoch'", "3000 AD"}},
    {"a bodies file that does not exist", IN_NONE, GEN_TEXT, "",
     {"synodic", "bodies", "--bodies", "%O/none.ini"}, 5,
     {"%O/none.ini", "cannot open"}},

    /* ---- launch-vehicle capability tables (through a study) --------- */
#define LVRUN {"synodic", "chart", "%S", "-o", "%O", "--quiet"}
#define LV_OK "c3_km2_s2,mass_kg\n0,2600\n10,2030\n20,1525\n"
    {"empty launch-vehicle table", IN_LVCAP, GEN_EMPTY, "", LVRUN, 3,
     {"%S:17:", "capability", "%F", "0 data rows"}},
    {"binary garbage as a launch-vehicle table", IN_LVCAP, GEN_BINARY, "",
     LVRUN, 3, {"%S:17:", "capability", "%F:"}},
    {"a launch-vehicle line of 100 000 characters", IN_LVCAP, GEN_LONGLINE,
     LV_OK "30,", LVRUN, 3, {"%S:17:", "%F:5:", "mass"}},
    {"a NUL byte in a launch-vehicle table", IN_LVCAP, GEN_NUL, LV_OK "30,1",
     LVRUN, 3, {"%S:17:", "%F:5:", "NUL"}},
    {"a C3 given twice in a launch-vehicle table", IN_LVCAP, GEN_TEXT,
     LV_OK "20,1500\n", LVRUN, 3, {"%S:17:", "%F:5:", "repeats"}},
    {"a mass of 1e999", IN_LVCAP, GEN_TEXT, LV_OK "30,1e999\n", LVRUN, 3,
     {"%S:17:", "%F:5:", "not a finite number"}},
    {"a C3 of nan", IN_LVCAP, GEN_TEXT, LV_OK "nan,100\n", LVRUN, 3,
     {"%S:17:", "%F:5:", "not a finite number"}},
    {"a mass that rises with C3", IN_LVCAP, GEN_TEXT, LV_OK "30,1600\n",
     LVRUN, 3, {"%S:17:", "%F:5:", "rise"}},
    {"a launch-vehicle table of one row", IN_LVCAP, GEN_TEXT,
     "c3_km2_s2,mass_kg\n10,2000\n", LVRUN, 3, {"%S:17:", "%F", "1 data row"}},
    {"three columns in a launch-vehicle table", IN_LVCAP, GEN_TEXT,
     LV_OK "30,1000,5\n", LVRUN, 3, {"%S:17:", "%F:5:", "two comma"}},
    {"a launch-vehicle table that does not exist", IN_STUDY, GEN_TEXT,
     S_OK "[launch_vehicle]\ncapability = none.csv\n", CHART(NULL), 5,
     {"%F:17:", "capability", "none.csv", "cannot open"}},

    /* ---- dates and options ------------------------------------------ */
    {"February 29 of a common year", IN_NONE, GEN_TEXT, "",
     {"synodic", "state", "mars", "2033-02-29"}, 3, {"DATE", "day 29"}},
    {"a Julian date of 1e999", IN_NONE, GEN_TEXT, "",
     {"synodic", "state", "mars", "JD1e999"}, 3, {"DATE", "JD1e999"}},
    {"a Julian date of nan", IN_NONE, GEN_TEXT, "",
     {"synodic", "state", "mars", "JDnan"}, 3, {"DATE", "JDnan"}},
    {"hour 24", IN_NONE, GEN_TEXT, "",
     {"synodic", "state", "mars", "2033-04-10T24:00"}, 3, {"DATE", "hour 24"}},
    {"an empty date", IN_NONE, GEN_TEXT, "",
     {"synodic", "state", "mars", ""}, 3, {"DATE", "empty date"}},
    {"a date with a newline inside (one-line message)", IN_NONE, GEN_TEXT,
     "", {"synodic", "state", "mars", "2033-04\n-10"}, 3,
     {"DATE", "2033-04\\x0A-10"}},
    {"a date outside the planet tables (3001 AD)", IN_NONE, GEN_TEXT, "",
     {"synodic", "state", "mars", "3001-06-01"}, 3, {"outside the validity"}},
    {"a time of flight of 1e999 s", IN_NONE, GEN_TEXT, "",
     {"synodic", "lambert", "--r1", "1e8,0,0", "--r2", "0,1e8,0", "--tof",
      "1e999"}, 3, {"--tof"}},
    {"a time of flight of nan", IN_NONE, GEN_TEXT, "",
     {"synodic", "lambert", "--r1", "1e8,0,0", "--r2", "0,1e8,0", "--tof",
      "nan"}, 3, {"--tof"}},
    {"a position of -0,-0,-0", IN_NONE, GEN_TEXT, "",
     {"synodic", "lambert", "--r1", "-0,-0,-0", "--r2", "0,1e8,0", "--tof",
      "1e6"}, 3, {"--r1"}},
    {"50 revolutions asked for a short flight", IN_NONE, GEN_TEXT, "",
     {"synodic", "lambert", "--r1", "1.5e8,0,0", "--r2", "0,1.5e8,0",
      "--tof", "3e7", "--revs", "50", "--branch", "left"}, 4, {"minimum"}},
    {"a transfer of one second", IN_NONE, GEN_TEXT, "",
     {"synodic", "transfer", "earth", "mars", "2033-04-20T00:00:00",
      "2033-04-20T00:00:01"}, 3, {"flight of 1 s", "1 day minimum"}},
    {"an unknown option", IN_NONE, GEN_TEXT, "",
     {"synodic", "bodies", "--colour"}, 2, {"--colour"}},
};

/* Valid bodies of the list, each checked to give finite states. */
static const struct {
    const char *what, *text, *body, *date;
} good_bodies[] = {
    {"a parabola, e = 1 exactly (q_au and perihelion)",
     "[body Para]\nepoch = 2030-01-01\nq_au = 0.9\ne = 1\ni_deg = 120\n"
     "node_deg = 10\nargp_deg = 20\nperihelion = 2030-03-01T12:00\n",
     "Para", "2030-09-01"},
    {"a hyperbola with e = 40 (q_au)",
     "[body Forty]\nepoch = 2030-01-01\nq_au = 1.1\ne = 40\ni_deg = 5\n"
     "node_deg = 10\nargp_deg = 20\nperihelion = 2030-03-01\n",
     "Forty", "2031-03-01"},
    {"a hyperbola with e = 40 (a_au < 0 and a mean anomaly)",
     "[body Forty]\nepoch = 2030-01-01\na_au = -0.02\ne = 40\ni_deg = 5\n"
     "node_deg = 10\nargp_deg = 20\nmean_anomaly_deg = 1000\n",
     "Forty", "2030-01-01"},
    {"an inclination of -0 deg (same as 0)",
     "[body Flat]\nepoch = 2030-01-01\na_au = 1.2\ne = 0.1\ni_deg = -0\n"
     "node_deg = 0\nargp_deg = 0\nmean_anomaly_deg = 0\n",
     "Flat", "2030-06-01"},
    {"a near-parabolic ellipse, e = 0.99999999",
     "[body Nearly]\nepoch = 2030-01-01\nq_au = 0.5\ne = 0.99999999\n"
     "i_deg = 10\nnode_deg = 0\nargp_deg = 0\nperihelion = 2030-02-01\n",
     "Nearly", "2030-12-01"},
};

/* The study that reads a launch-vehicle table (IN_LVCAP): lines 1-17. */
static char lv_study[320];

/* Replace %F, %O and %S (the study of an IN_LVCAP case) in s. */
static void subst(const char *s, const char *file, const char *outdir,
                  char *buf, size_t len)
{
    size_t o = 0;
    for (const char *p = s; *p && o + 1 < len; p++) {
        if (p[0] == '%' && (p[1] == 'F' || p[1] == 'O' || p[1] == 'S')) {
            o += (size_t)snprintf(buf + o, len - o, "%s",
                                  p[1] == 'F' ? file
                                  : p[1] == 'O' ? outdir : lv_study);
            p++;
        } else {
            buf[o++] = *p;
        }
    }
    buf[o < len ? o : len - 1] = '\0';
}

static void make_input(const bad_case *c, const char *path)
{
    size_t n = strlen(c->text);
    switch (c->gen) {
    case GEN_EMPTY:
        write_bytes(path, "", 0);
        break;
    case GEN_TEXT:
        write_bytes(path, c->text, n);
        break;
    case GEN_BINARY: {
        /* deterministic noise: bytes of a linear congruential generator */
        char b[4096];
        unsigned x = 12345;
        for (size_t i = 0; i < sizeof b; i++) {
            x = x * 1103515245u + 12345u;
            b[i] = (char)(x >> 16);
        }
        b[0] = (char)0xff; /* never a '[' or a comment first */
        write_bytes(path, b, sizeof b);
        break;
    }
    case GEN_LONGLINE: {
        size_t L = 100000;
        char *b = malloc(n + L + 2);
        memcpy(b, c->text, n);
        memset(b + n, 'x', L);
        b[n + L] = '\n';
        write_bytes(path, b, n + L + 1);
        free(b);
        break;
    }
    case GEN_NUL: {
        char *b = malloc(n + 8);
        memcpy(b, c->text, n);
        memcpy(b + n, "\0png\n", 5);
        write_bytes(path, b, n + 5);
        free(b);
        break;
    }
    }
}

/* Run catalogue case k and check every promise. */
static void check_case(size_t k)
{
    const bad_case *c = &cases[k];
    char dir[256], outdir[300], file[320];
    make_dir(dir, sizeof dir, "case");
    snprintf(outdir, sizeof outdir, "%s/out", dir);
    ck_assert_int_eq(mkdir(outdir, 0755), 0);
    snprintf(file, sizeof file, "%s/%s", dir,
             c->input == IN_BODIES ? "bodies.ini"
             : c->input == IN_LVCAP ? "vehicle.csv" : "study.ini");
    if (c->input != IN_NONE) make_input(c, file);
    if (c->input == IN_LVCAP) {
        snprintf(lv_study, sizeof lv_study, "%s/study.ini", dir);
        static const char text[] =
            S_OK "[launch_vehicle]\ncapability = vehicle.csv\n";
        write_bytes(lv_study, text, sizeof text - 1);
    }

    char args[12][1024];
    const char *argv[13];
    size_t n = 0;
    for (; n < 12 && c->argv[n]; n++) {
        subst(c->argv[n], file, outdir, args[n], sizeof args[n]);
        argv[n] = args[n];
    }
    argv[n] = NULL;
    run_result r = run_argv(argv, NULL);

    const char *w = c->what;
    ck_assert_msg(r.sig == 0, "[%zu] %s: killed by signal %d; stderr: %s", k,
                  w, r.sig, r.err);
    ck_assert_msg(r.code == c->code, "[%zu] %s: exit %d, want %d; stderr: %s",
                  k, w, r.code, c->code, r.err);
    const char *where = c->code == 0 ? r.out : r.err;
    if (c->code != 0) {
        ck_assert_msg(r.outlen == 0, "[%zu] %s: stdout not empty: %s", k, w,
                      r.out);
        ck_assert_msg(strncmp(r.err, "synodic: error: ", 16) == 0,
                      "[%zu] %s: stderr '%s'", k, w, r.err);
        char *nl = strchr(r.err, '\n');
        ck_assert_msg(nl && nl[1] == '\0', "[%zu] %s: not one line: %s", k,
                      w, r.err);
    } else {
        ck_assert_msg(r.err[0] == '\0', "[%zu] %s: stderr: %s", k, w, r.err);
    }
    for (int i = 0; i < 4 && c->needle[i]; i++) {
        char nd[1024];
        subst(c->needle[i], file, outdir, nd, sizeof nd);
        ck_assert_msg(strstr(where, nd) != NULL, "[%zu] %s: '%s' lacks '%s'",
                      k, w, where, nd);
    }
    /* nothing left behind: the output directory is empty and beside the
     * input there is only the input */
    char list[2048];
    ck_assert_msg(list_dir(outdir, list, sizeof list) == 0,
                  "[%zu] %s: left in the output directory: %s", k, w, list);
    int nin = list_dir(dir, list, sizeof list);
    ck_assert_msg(nin == (c->input == IN_LVCAP ? 3 : c->input != IN_NONE ? 2 : 1),
                  "[%zu] %s: left beside the input: %s", k, w, list);
    run_free(&r);
    rm_rf(dir);
}

START_TEST(test_catalogue)
{
    check_case((size_t)_i);
}
END_TEST

/* The valid extremes of bodies files give finite states. */
START_TEST(test_valid_extremes)
{
    const size_t k = (size_t)_i;
    char dir[256], file[320];
    make_dir(dir, sizeof dir, "good");
    snprintf(file, sizeof file, "%s/bodies.ini", dir);
    write_bytes(file, good_bodies[k].text, strlen(good_bodies[k].text));
    const char *argv[] = {"synodic", "state", good_bodies[k].body,
                          good_bodies[k].date, "--bodies", file, "--json",
                          NULL};
    run_result r = run_argv(argv, NULL);
    ck_assert_msg(r.sig == 0 && r.code == 0, "%s: exit %d signal %d: %s",
                  good_bodies[k].what, r.code, r.sig, r.err);
    json_error_t je;
    json_t *j = json_loads(r.out, 0, &je);
    ck_assert_msg(j != NULL, "%s: not JSON: %s", good_bodies[k].what, r.out);
    const char *keys[2] = {"r_km", "v_km_s"};
    for (int q = 0; q < 2; q++) {
        json_t *a = json_object_get(j, keys[q]);
        ck_assert(json_is_array(a) && json_array_size(a) == 3);
        double norm = 0;
        for (size_t i = 0; i < 3; i++) {
            json_t *v = json_array_get(a, i);
            ck_assert_msg(json_is_number(v), "%s: %s[%zu] not a number",
                          good_bodies[k].what, keys[q], i);
            norm += json_number_value(v) * json_number_value(v);
        }
        ck_assert_msg(isfinite(norm) && norm > 0, "%s: |%s| = %g",
                      good_bodies[k].what, keys[q], sqrt(norm));
    }
    json_decref(j);
    run_free(&r);
    rm_rf(dir);
}
END_TEST

/* ------------------------------------------------------------------ */
/* faults                                                              */

static void write_study(const char *path, const char *extra)
{
    char text[4096];
    snprintf(text, sizeof text, "%s%s", S_OK, extra ? extra : "");
    write_bytes(path, text, strlen(text));
}

/* A write that fails (the file size limit stands in for a full disk:
 * EFBIG, like ENOSPC, arrives from write(2) half-way through a file) is
 * reported with the file and the reason; the program is not killed by
 * SIGXFSZ; no temporary or partial file is left. */
START_TEST(test_disk_full_fsize)
{
    char dir[256], out[300], study[320];
    make_dir(dir, sizeof dir, "fsize");
    snprintf(out, sizeof out, "%s/out", dir);
    snprintf(study, sizeof study, "%s/s.ini", dir);
    write_study(study, NULL);
    const char *argv[] = {"synodic", "chart", study, "-o", out, "--quiet",
                          "--set", "departure.step_days=2", "--set",
                          "arrival.step_days=2", NULL};
    run_opts o = {0};
    o.fsize = 50000; /* the CSV of this grid is several hundred kB */
    run_result r = run_argv(argv, &o);
    ck_assert_msg(r.sig == 0, "killed by signal %d", r.sig);
    ck_assert_msg(r.code == 5, "exit %d: %s", r.code, r.err);
    ck_assert_str_eq(r.out, "");
    ck_assert_msg(strstr(r.err, "s.csv") && strstr(r.err, strerror(EFBIG)),
                  "message lacks the file or the reason: %s", r.err);
    char list[2048];
    list_dir(out, list, sizeof list);
    ck_assert_msg(!strstr(list, ".tmp.") && !strstr(list, "s.csv"),
                  "left behind: %s", list);
    run_free(&r);
    rm_rf(dir);
}
END_TEST

/* A really full file system: a 64 KiB tmpfs mounted inside the test.
 * Needs root and the right to mount (CAP_SYS_ADMIN); skipped with a
 * message otherwise (test_disk_full_fsize covers the same path). */
START_TEST(test_disk_full_tmpfs)
{
    char dir[256], mnt[300], study[320];
    make_dir(dir, sizeof dir, "tmpfs");
    snprintf(mnt, sizeof mnt, "%s/small", dir);
    snprintf(study, sizeof study, "%s/s.ini", dir);
    ck_assert_int_eq(mkdir(mnt, 0755), 0);
    write_study(study, NULL);
    if (geteuid() != 0 || mount("tmpfs", mnt, "tmpfs", 0, "size=64k") != 0) {
        fprintf(stderr, "check_catalogue: SKIP full-disk test on a tmpfs: "
                "cannot mount one here (%s); the RLIMIT_FSIZE test stands "
                "in for it\n", geteuid() ? "not root" : strerror(errno));
        rm_rf(dir);
        return;
    }
    const char *argv[] = {"synodic", "chart", study, "-o", mnt, "--quiet",
                          "--set", "departure.step_days=1", "--set",
                          "arrival.step_days=1", NULL};
    run_result r = run_argv(argv, NULL);
    char list[2048];
    list_dir(mnt, list, sizeof list);
    ck_assert_int_eq(umount(mnt), 0);
    ck_assert_msg(r.sig == 0, "killed by signal %d", r.sig);
    ck_assert_msg(r.code == 5, "exit %d: %s", r.code, r.err);
    ck_assert_str_eq(r.out, "");
    ck_assert_msg(strstr(r.err, strerror(ENOSPC)), "no reason: %s", r.err);
    ck_assert_msg(!strstr(list, ".tmp."), "temporary left: %s", list);
    run_free(&r);
    rm_rf(dir);
}
END_TEST

/* Standard output that cannot be written (/dev/full) is an I/O error,
 * not a silent success. */
START_TEST(test_stdout_full)
{
    const char *argv[] = {"synodic", "state", "mars", "2033-04-10", NULL};
    run_opts o = {0};
    o.stdout_to = "/dev/full";
    run_result r = run_argv(argv, &o);
    ck_assert_msg(r.sig == 0, "killed by signal %d", r.sig);
    ck_assert_msg(r.code == 5, "exit %d: %s", r.code, r.err);
    ck_assert_ptr_nonnull(strstr(r.err, "standard output"));
    run_free(&r);
}
END_TEST

/* Under valgrind (make check-valgrind VALGRIND_CLI=1) the program starts
 * many times slower; SYNODIC_SLOW_FACTOR stretches the 0.5 s wait so the
 * signal still arrives while the grid is computed. */
static double slow_factor(void)
{
    const char *s = getenv("SYNODIC_SLOW_FACTOR");
    double f = s ? atof(s) : 1.0;
    return f >= 1.0 ? f : 1.0;
}

static int same_bytes(const char *a, size_t na, const char *b, size_t nb)
{
    return na == nb && memcmp(a, b, na) == 0;
}

/* SIGINT / SIGTERM during a long chart: exit 6, one line, the outputs of
 * the previous run byte for byte intact, no temporary file.  Once while
 * the grid is computed (after 0.5 s), once while the outputs are being
 * written (as soon as a temporary file appears). */
static void interrupt_case(int sig, int during_write)
{
    char dir[256], out[300], study[320];
    make_dir(dir, sizeof dir, "sig");
    snprintf(out, sizeof out, "%s/out", dir);
    snprintf(study, sizeof study, "%s/s.ini", dir);
    write_study(study, NULL);
    const char *small[] = {"synodic", "chart", study, "-o", out, "--quiet",
                           "--format", "csv,json,svg", NULL};
    run_result r = run_argv(small, NULL);
    ck_assert_msg(r.code == 0, "first run: exit %d: %s", r.code, r.err);
    run_free(&r);
    static const char *ext[3] = {"csv", "json", "svg"};
    char *before[3];
    size_t nbefore[3];
    for (int k = 0; k < 3; k++) {
        char p[400];
        snprintf(p, sizeof p, "%s/s.%s", out, ext[k]);
        before[k] = slurp_n(p, &nbefore[k]);
        ck_assert_msg(nbefore[k] > 0, "first run wrote no %s", p);
    }
    /* 2001 x 2001 cells while computing; 601 x 1001 while writing (so
     * that the grid is done quickly and the writing takes a while). */
    const char *big[] = {"synodic", "chart", study, "-o", out, "--quiet",
                         "--format", "csv,json,svg", "--set", during_write ? "departure.step_days=0.2"
                                               : "departure.step_days=0.06",
                         "--set", during_write ? "arrival.step_days=0.333"
                                               : "arrival.step_days=0.1665",
                         NULL};
    run_opts o = {0};
    o.kill_sig = sig;
    if (during_write) o.kill_when_tmp_in = out;
    else o.kill_after_s = 0.5 * slow_factor();
    r = run_argv(big, &o);
    ck_assert_msg(r.sig == 0, "killed by signal %d (the handler did not run)",
                  r.sig);
    ck_assert_msg(r.code == 6, "exit %d (want 6): %s", r.code, r.err);
    ck_assert_msg(strncmp(r.err, "synodic: error: ", 16) == 0 &&
                  strstr(r.err, "interrupted"), "stderr: %s", r.err);
    ck_assert_str_eq(r.out, "");
    for (int k = 0; k < 3; k++) {
        char p[400];
        snprintf(p, sizeof p, "%s/s.%s", out, ext[k]);
        size_t n;
        char *now = slurp_n(p, &n);
        ck_assert_msg(same_bytes(before[k], nbefore[k], now, n),
                      "%s changed by the interrupted run", p);
        free(now);
        free(before[k]);
    }
    char list[2048];
    list_dir(out, list, sizeof list);
    ck_assert_msg(!strstr(list, ".tmp."), "temporary left: %s", list);
    run_free(&r);
    rm_rf(dir);
}

START_TEST(test_sigint_computing) { interrupt_case(SIGINT, 0); }
END_TEST
START_TEST(test_sigterm_writing) { interrupt_case(SIGTERM, 1); }
END_TEST

int main(void)
{
    Suite *s = suite_create("catalogue of bad inputs");
    TCase *tc = tcase_create("catalogue");
    tcase_set_timeout(tc, 300);
    size_t ncases = sizeof cases / sizeof cases[0];
    fprintf(stderr, "check_catalogue: %zu bad inputs, %zu valid extremes\n",
            ncases, sizeof good_bodies / sizeof good_bodies[0]);
    tcase_add_loop_test(tc, test_catalogue, 0, (int)ncases);
    tcase_add_loop_test(tc, test_valid_extremes, 0,
                        (int)(sizeof good_bodies / sizeof good_bodies[0]));
    suite_add_tcase(s, tc);
    TCase *tf = tcase_create("faults");
    tcase_set_timeout(tf, 600);
    tcase_add_test(tf, test_disk_full_fsize);
    tcase_add_test(tf, test_disk_full_tmpfs);
    tcase_add_test(tf, test_stdout_full);
    tcase_add_test(tf, test_sigint_computing);
    tcase_add_test(tf, test_sigterm_writing);
    suite_add_tcase(s, tf);
    return tu_run(s);
}
