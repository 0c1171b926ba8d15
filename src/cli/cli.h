/* cli.h - shared pieces of the synodic command-line front end.  The front
 * end only parses arguments, calls libsynodic and prints; all physics
 * lives in the library. */
#ifndef SYNODIC_CLI_H
#define SYNODIC_CLI_H

#include <jansson.h>
#include <stdio.h>

#include "synodic.h"
#include "synodic/study.h"

/* Exit codes (documented in synodic(1)). */
enum {
    CLI_EXIT_OK = 0,
    CLI_EXIT_INTERNAL = 1, /* unexpected failure inside synodic          */
    CLI_EXIT_USAGE = 2,    /* unknown command/option, missing argument    */
    CLI_EXIT_INPUT = 3,    /* bad value: date, body, number, file content */
    CLI_EXIT_NOSOL = 4,    /* the problem has no solution                 */
    CLI_EXIT_IO = 5,       /* a file could not be read or written         */
    CLI_EXIT_SIGNAL = 6    /* interrupted; no output was left half-written */
};

typedef struct {
    const char *name;
    const char *summary;
    int (*run)(int argc, char **argv);
    void (*usage)(FILE *out);
} cli_command;

int cmd_bodies(int argc, char **argv);
int cmd_state(int argc, char **argv);
int cmd_lambert(int argc, char **argv);
int cmd_transfer(int argc, char **argv);
int cmd_chart(int argc, char **argv);
int cmd_period(int argc, char **argv);
int cmd_windows(int argc, char **argv);
void usage_bodies(FILE *out);
void usage_state(FILE *out);
void usage_lambert(FILE *out);
void usage_transfer(FILE *out);
void usage_chart(FILE *out);
void usage_period(FILE *out);
void usage_windows(FILE *out);

/* Print "synodic: error: ..." on stderr and return code. */
int cli_error(int code, const char *fmt, ...)
#if defined(__GNUC__)
    __attribute__((format(printf, 2, 3)))
#endif
    ;
/* Exit code for a library status. */
int cli_exit_for(sy_status st);
/* Report an unknown option / missing argument the way every command does. */
int cli_bad_option(const char *cmd, int optopt_char, const char *arg);

/* Number parsing with full consumption; errors name the option. */
int cli_parse_double(const char *what, const char *text, double *out);
int cli_parse_int(const char *what, const char *text, int lo, int hi, int *out);
int cli_parse_vec3(const char *what, const char *text, double v[3]);
int cli_parse_date(const char *what, const char *text, double *jd);
int cli_parse_branch(const char *text, sy_branch *b);

/* Catalogue with the built-ins and, when path != NULL, a bodies file. */
int cli_catalog(const char *bodies_path, sy_catalog **cat);
int cli_find_body(const sy_catalog *cat, const char *name, const sy_body **b);

/* Install the interrupt handling every command shares: SIGINT, SIGTERM
 * and SIGHUP are blocked in every thread and taken by one waiting thread,
 * which removes the temporary outputs (sy_outfile_abort_all) and exits
 * with CLI_EXIT_SIGNAL; finished outputs stay intact.  Call first thing
 * in main(), before any other thread exists, so they all inherit the
 * blocked mask.  SIGXFSZ is ignored so a full file-size limit shows up as
 * a write error. */
void cli_catch_signals(void);
/* The study's catalogue (built-ins + its bodies file) and its origin and
 * target bodies; errors name the study file and the [transfer] key. */
int cli_study_bodies(const sy_study *st, sy_catalog **cat,
                     const sy_body **from, const sy_body **to);
/* Load a study with its --set overrides; -o DIR (outdir, may be NULL)
 * replaces its output directory.  Caller frees *out. */
int cli_load_study(const char *path, const char **sets, size_t nsets,
                   const char *outdir, sy_study **out);
/* The output directory must exist, or be creatable in an existing one. */
int cli_ensure_dir(const char *dir);
/* A comma list of png, svg, pdf, csv, json as SY_FMT_* bits. */
int cli_parse_formats(const char *text, unsigned *out);
/* sy_progress_fn drawing a bar on stderr; user points to an int set to -1. */
int cli_progress_bar(double fraction, void *user);

json_t *cli_json_vec3(const double v[3]);
/* Print JSON on stdout followed by a newline; steals the reference. */
int cli_print_json(json_t *root);

#endif
