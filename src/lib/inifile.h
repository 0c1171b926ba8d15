/* inifile.h - internal INI plumbing shared by the bodies-file reader
 * (catalog.c) and the study-file reader (study.c). Not installed.
 *
 * Debian 12's inih is built without INI_HANDLER_LINENO, so its handler is
 * not told the line number. Both readers therefore hand ini_parse_stream()
 * the line reader below, which counts lines itself (inih calls the handler
 * for a line before it reads the next one), and parse section headers as
 * the reader sees them, where the line number is known. */
#ifndef SY_INIFILE_H
#define SY_INIFILE_H

#include <stddef.h>
#include <stdio.h>

typedef struct {
    FILE *fp;                 /* the file being read (owned by the caller) */
    char *buf;                /* getline() buffer; sy_ini_reader_free() */
    size_t cap;
    int lineno;               /* 1-based number of the last line read */
    const char *kind;         /* for messages: "study file", "bodies file" */
    /* Text appended to "line longer than N characters" (e.g. "; shorten
     * it"), or NULL. */
    const char *long_hint;
    /* Characters of inih's line buffer left out of the N in that message
     * (see sy_ini_read_line()). */
    int long_reserve;
    /* Called with a section header line "[..." (leading blanks and a BOM
     * already removed); may be NULL. */
    void (*on_section)(void *user, const char *line);
    /* Called with the message for a line the reader refuses (a NUL byte,
     * a line too long for inih); the line is then given to inih as an
     * empty line. Required. */
    void (*on_bad_line)(void *user, const char *msg);
    void *user;               /* passed to both callbacks */
} sy_ini_reader;

/* fgets-style reader for ini_parse_stream(reader = this, stream = a
 * sy_ini_reader *). */
char *sy_ini_read_line(char *str, int num, void *stream);

/* Free the line buffer (does not close fp). */
void sy_ini_reader_free(sy_ini_reader *r);

/* Remove leading and trailing white space (isspace()) in place. */
void sy_ini_trim(char *s);

/* The text between '[' and the first ']' of a section header line (line[0]
 * is '['), cut to fit len bytes and not trimmed (the callers trim it their
 * own way). Returns 0, or -1 when the line has no ']' (out is then ""). */
int sy_ini_section_text(const char *line, char *out, size_t len);

/* Strict number: the whole text (trailing white space allowed) is one
 * finite strtod() number that neither overflows nor underflows (ERANGE).
 * Returns 1 and sets *out, or 0 and leaves *out alone. */
int sy_ini_number(const char *text, double *out);

#endif
