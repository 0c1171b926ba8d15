/* testutil_cli.h - running the built `synodic` from the Check programs:
 * the path of the program in $SYNODIC_BIN, the source tree (where the
 * examples are) in $SYNODIC_SRCDIR, stdout / stderr / exit status captured
 * through temporary files; and checks of the --json output (jansson). */
#ifndef SYNODIC_TESTUTIL_CLI_H
#define SYNODIC_TESTUTIL_CLI_H

#include "testutil.h"

#include <jansson.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/wait.h>
#include <unistd.h>

typedef struct {
    int status;      /* exit code, or 128+signal */
    char *out, *err; /* captured stdout / stderr, NUL-terminated */
} tu_run_result;

/* The whole file as a string; "" when it cannot be opened (a missing
 * output then fails the caller's check on its contents). */
static inline char *tu_slurp(const char *path)
{
    FILE *f = fopen(path, "rb");
    if (!f) return strdup("");
    fseek(f, 0, SEEK_END);
    long n = ftell(f);
    fseek(f, 0, SEEK_SET);
    if (n < 0) n = 0;
    char *s = malloc((size_t)n + 1);
    if (!s) {
        fclose(f);
        return strdup("");
    }
    size_t got = fread(s, 1, (size_t)n, f);
    s[got] = '\0';
    fclose(f);
    return s;
}

static inline const char *tu_bin(void)
{
    const char *b = getenv("SYNODIC_BIN");
    return b ? b : "./synodic";
}

static inline const char *tu_srcdir(void)
{
    const char *s = getenv("SYNODIC_SRCDIR");
    return s ? s : ".";
}

/* Run the shell text CMDLINE in the source tree, stdin from /dev/null,
 * and capture everything. */
static inline tu_run_result tu_run_shell(const char *cmdline)
{
    char out[] = "/tmp/sy_tu_outXXXXXX", err[] = "/tmp/sy_tu_errXXXXXX";
    int fo = mkstemp(out), fe = mkstemp(err);
    close(fo);
    close(fe);
    char cmd[8192];
    snprintf(cmd, sizeof cmd, "cd '%s' && ( %s ) >'%s' 2>'%s' </dev/null", tu_srcdir(), cmdline,
             out, err);
    int st = system(cmd);
    tu_run_result r;
    r.status = WIFEXITED(st) ? WEXITSTATUS(st) : 128 + (WIFSIGNALED(st) ? WTERMSIG(st) : 0);
    r.out = tu_slurp(out);
    r.err = tu_slurp(err);
    unlink(out);
    unlink(err);
    return r;
}

/* Run "synodic ARGS" (ARGS is shell text). */
static inline tu_run_result tu_run_synodic(const char *args)
{
    char cmd[4096];
    snprintf(cmd, sizeof cmd, "'%s' %s", tu_bin(), args);
    return tu_run_shell(cmd);
}

static inline void tu_run_free(tu_run_result *r)
{
    free(r->out);
    free(r->err);
}

static inline json_t *tu_parse_json(const char *text)
{
    json_error_t je;
    json_t *j = json_loads(text, 0, &je);
    ck_assert_msg(j != NULL, "not JSON (%s): %s", je.text, text);
    return j;
}

static inline void tu_expect_number(json_t *o, const char *key)
{
    json_t *v = json_object_get(o, key);
    ck_assert_msg(v && json_is_number(v), "key '%s' missing or not a number", key);
    ck_assert_msg(isfinite(json_number_value(v)), "key '%s' not finite", key);
}

static inline void tu_expect_vec3(json_t *o, const char *key)
{
    json_t *a = json_object_get(o, key);
    ck_assert_msg(a && json_is_array(a) && json_array_size(a) == 3, "key '%s' is not a 3-array", key);
    for (size_t i = 0; i < 3; i++) ck_assert(json_is_number(json_array_get(a, i)));
}

/* The string at KEY, and equal to VALUE unless VALUE is NULL. */
static inline void tu_expect_string(json_t *o, const char *key, const char *value)
{
    json_t *v = json_object_get(o, key);
    ck_assert_msg(v && json_is_string(v), "key '%s' missing or not a string", key);
    if (value) ck_assert_str_eq(json_string_value(v), value);
}

#endif
