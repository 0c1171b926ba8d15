/* check_study.c - study files: the examples, every validation error,
 * overrides and the field names.
 *
 * The reference for these checks is the study-file format documented at
 * the top of src/lib/study.c (our own design): the accepted sections and
 * keys, their defaults and their rules.  Calendar facts are checked
 * against Julian dates worked out by hand from the J2000 epoch
 * (2000-01-01T12:00 TDB = JD 2451545.0, IAU; common practice).
 *
 * Bad study files are written into a private mkdtemp() directory.
 */
#include "config.h"
#include "synodic.h"
#include "synodic/study.h"

#include "testutil.h"

#include <check.h>
#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

/* ------------------------------------------------------------------ */
/* helpers                                                             */

static const char *srcdir(void)
{
    const char *s = getenv("SYNODIC_SRCDIR");
    return s && *s ? s : ".";
}

static void example_path(const char *name, char *buf, size_t len)
{
    snprintf(buf, len, "%s/examples/%s", srcdir(), name);
}

typedef struct {
    char dir[256];
    char path[512];
} tmpfile_t;

static void tmp_make(tmpfile_t *t)
{
    const char *base = getenv("TMPDIR");
    snprintf(t->dir, sizeof t->dir, "%s/check-study-XXXXXX",
             base && *base ? base : "/tmp");
    ck_assert_msg(mkdtemp(t->dir) != NULL, "mkdtemp: %s", strerror(errno));
    t->path[0] = '\0';
}

/* Write `text` to DIR/name and remember the path. */
static const char *tmp_write(tmpfile_t *t, const char *name, const char *text)
{
    snprintf(t->path, sizeof t->path, "%s/%s", t->dir, name);
    FILE *fp = fopen(t->path, "w");
    ck_assert_msg(fp != NULL, "cannot write %s", t->path);
    fputs(text, fp);
    ck_assert_int_eq(fclose(fp), 0);
    return t->path;
}

static void tmp_clean(tmpfile_t *t)
{
    if (t->path[0])
        unlink(t->path);
    rmdir(t->dir);
}

/* A valid study: [study] .. [departure] on lines 1-9 ... */
#define HDR                                                                \
    "[study]\n"                /* 1 */                                     \
    "title = T\n"              /* 2 */                                     \
    "[transfer]\n"             /* 3 */                                     \
    "origin = earth\n"         /* 4 */                                     \
    "target = mars\n"          /* 5 */                                     \
    "[departure]\n"            /* 6 */                                     \
    "start = 2033-02-15\n"     /* 7 */                                     \
    "end = 2033-06-15\n"       /* 8 */                                     \
    "step_days = 1\n"          /* 9 */
/* ... [arrival] on lines 10-13, so a section appended starts at 14. */
#define ARR                                                                \
    "[arrival]\n"              /* 10 */                                    \
    "start = 2033-08-01\n"     /* 11 */                                    \
    "end = 2034-06-30\n"       /* 12 */                                    \
    "step_days = 1\n"          /* 13 */
#define FLIGHT                                                             \
    "[flight]\n"                                                           \
    "tof_min_days = 80\n"                                                  \
    "tof_max_days = 200\n"                                                 \
    "step_days = 1\n"

/* Transfer section variants: lines 3.. */
#define HDR_TRANSFER(extra)                                                \
    "[study]\ntitle = T\n[transfer]\norigin = earth\ntarget = mars\n"      \
    extra "[departure]\nstart = 2033-02-15\nend = 2033-06-15\n"           \
    "step_days = 1\n" ARR

/* Departure section variants: start, end, step on lines 7, 8, 9. */
#define HDR_DEP(start, end, step)                                          \
    "[study]\ntitle = T\n[transfer]\norigin = earth\ntarget = mars\n"      \
    "[departure]\nstart = " start "\nend = " end "\nstep_days = " step     \
    "\n" ARR

/* ------------------------------------------------------------------ */
/* Error cases: each file must fail with `status` and a message holding
 * every needle; file cases must also name the file. */

typedef struct {
    const char *name;
    const char *text;
    const char *needles[5];
} err_case;

static const err_case err_cases[] = {
    /* unknown / structural */
    {"unknown_key", HDR ARR "[limits]\nc3max = 5\n",
     {":15:", "[limits]", "'c3max'",
      "accepted keys: c3_max_km2_s2, vinf_arr_max_km_s, dla_max_deg, "
      "tof_min_days, tof_max_days"}},
    {"unknown_key_chart", HDR ARR "[chart]\nc3_lvls = auto\n",
     {":15:", "[chart]", "'c3_lvls'",
      "accepted keys: fields, tof_lines, filled, types, NAME_levels"}},
    {"unknown_key_output", HDR ARR "[output]\nformat = png\n",
     {":15:", "[output]", "'format'",
      "accepted keys: formats, directory, name, width_in, height_in, "
      "width_px, height_px, dpi"}},
    {"unknown_levels_field", HDR ARR "[chart]\nc4_levels = auto\n",
     {":15:", "[chart]", "'c4_levels'", "accepted keys:"}},
    {"unknown_section", HDR ARR "[limitz]\nc3_max_km2_s2 = 5\n",
     {":14:", "[limitz]", "accepted sections: [study], [transfer]"}},
    {"key_outside_section", "title = T\n" HDR ARR,
     {":1:", "'title'", "outside any section"}},
    {"duplicate_key", HDR ARR "[limits]\ndla_max_deg = 28\ndla_max_deg = 30\n",
     {":16:", "[limits]", "'dla_max_deg'", "first at line 15"}},
    {"duplicate_section", HDR ARR "[limits]\n[limits]\n",
     {":15:", "[limits]", "appears twice", "first at line 14"}},
    {"syntax_error", HDR ARR "just some words\n",
     {":14:", "cannot read this line", "key = value"}},
    {"unclosed_header", HDR ARR "[limits\n",
     {":14:", "closing ']'"}},
    /* required keys and sections */
    {"missing_title", "[study]\nsubtitle = S\n[transfer]\norigin = earth\n"
     "target = mars\n[departure]\nstart = 2033-02-15\nend = 2033-06-15\n"
     "step_days = 1\n" ARR,
     {":1:", "[study]", "missing required key 'title'"}},
    {"missing_study", "[transfer]\norigin = earth\ntarget = mars\n"
     "[departure]\nstart = 2033-02-15\nend = 2033-06-15\nstep_days = 1\n" ARR,
     {":0:", "[study]", "'title'", "no [study] section"}},
    {"missing_departure", "[study]\ntitle = T\n[transfer]\norigin = earth\n"
     "target = mars\n" ARR,
     {":0:", "[departure]", "'start'"}},
    {"missing_step", "[study]\ntitle = T\n[transfer]\norigin = earth\n"
     "target = mars\n[departure]\nstart = 2033-02-15\nend = 2033-06-15\n" ARR,
     {":6:", "[departure]", "missing required key 'step_days'"}},
    {"missing_target", "[study]\ntitle = T\n[transfer]\norigin = earth\n"
     "[departure]\nstart = 2033-02-15\nend = 2033-06-15\nstep_days = 1\n" ARR,
     {":3:", "[transfer]", "'target'"}},
    {"missing_flight_key", HDR "[flight]\ntof_min_days = 80\nstep_days = 1\n",
     {":10:", "[flight]", "'tof_max_days'"}},
    {"both_arrival_flight", HDR ARR FLIGHT,
     {":14:", "[arrival]", "[flight]", "exactly one"}},
    {"neither_arrival_flight", HDR,
     {":0:", "[arrival]", "[flight]", "neither"}},
    {"empty_title", "[study]\ntitle =\n[transfer]\norigin = earth\n"
     "target = mars\n[departure]\nstart = 2033-02-15\nend = 2033-06-15\n"
     "step_days = 1\n" ARR,
     {":2:", "[study]", "'title'", "empty value"}},
    {"bad_utf8_title", "[study]\ntitle = T\xff\xfe\n[transfer]\n"
     "origin = earth\ntarget = mars\n[departure]\nstart = 2033-02-15\n"
     "end = 2033-06-15\nstep_days = 1\n" ARR,
     {":2:", "[study]", "'title'", "UTF-8"}},
    /* [transfer] */
    {"empty_origin", "[study]\ntitle = T\n[transfer]\norigin =\n"
     "target = mars\n[departure]\nstart = 2033-02-15\nend = 2033-06-15\n"
     "step_days = 1\n" ARR,
     {":4:", "[transfer]", "'origin'", "empty value"}},
    {"same_bodies", "[study]\ntitle = T\n[transfer]\norigin = Mars\n"
     "target = mars\n[departure]\nstart = 2033-02-15\nend = 2033-06-15\n"
     "step_days = 1\n" ARR,
     {":5:", "[transfer]", "'target'", "also the origin"}},
    {"revs_too_many", HDR_TRANSFER("revolutions = 101\nbranch = left\n"),
     {":6:", "[transfer]", "'revolutions'", "0 (direct transfer) up to 100"}},
    {"revs_negative", HDR_TRANSFER("revolutions = -1\n"),
     {":6:", "[transfer]", "'revolutions'", "out of range"}},
    {"revs_not_int", HDR_TRANSFER("revolutions = 1.5\nbranch = left\n"),
     {":6:", "[transfer]", "'revolutions'", "not a whole number"}},
    {"revs_no_branch", HDR_TRANSFER("revolutions = 2\n"),
     {":3:", "[transfer]", "'branch'", "left or"}},
    {"bad_branch", HDR_TRANSFER("revolutions = 1\nbranch = middle\n"),
     {":7:", "[transfer]", "'branch'", "'middle' is not left or right"}},
    /* numbers */
    {"number_junk", HDR ARR "[limits]\nc3_max_km2_s2 = 20x\n",
     {":15:", "[limits]", "'c3_max_km2_s2'", "'20x' is not a finite number"}},
    {"number_nan", HDR ARR "[limits]\nc3_max_km2_s2 = nan\n",
     {":15:", "[limits]", "'c3_max_km2_s2'", "not a finite number"}},
    {"number_inf", HDR ARR "[limits]\nvinf_arr_max_km_s = inf\n",
     {":15:", "[limits]", "'vinf_arr_max_km_s'", "not a finite number"}},
    {"number_overflow", HDR ARR "[limits]\ndla_max_deg = 1e999\n",
     {":15:", "[limits]", "'dla_max_deg'", "not a finite number"}},
    {"number_empty", HDR ARR "[orbits]\npark_alt_km =\n",
     {":15:", "[orbits]", "'park_alt_km'", "not a finite number"}},
    /* dates and windows */
    {"bad_date", HDR_DEP("2033-02-30", "2033-06-15", "1"),
     {":7:", "[departure]", "'start'", "day 30 is out of range"}},
    {"bad_date_text", HDR_DEP("2033-02-15", "next june", "1"),
     {":8:", "[departure]", "'end'", "YYYY-MM-DD"}},
    {"end_equals_start", HDR_DEP("2033-02-15", "2033-02-15", "1"),
     {":8:", "[departure]", "'end'", "2033-02-15 is not after start "
      "2033-02-15 (line 7)"}},
    {"end_before_start", HDR_DEP("2033-02-15", "2033-01-15", "1"),
     {":8:", "[departure]", "'end'", "not after start"}},
    {"step_zero", HDR_DEP("2033-02-15", "2033-06-15", "0"),
     {":9:", "[departure]", "'step_days'", "not positive"}},
    {"step_negative", HDR_DEP("2033-02-15", "2033-06-15", "-2"),
     {":9:", "[departure]", "'step_days'", "not positive"}},
    {"step_over_span", HDR_DEP("2033-02-15", "2033-06-15", "200"),
     {":9:", "[departure]", "'step_days'", "window span of 120 days"}},
    {"step_too_fine", HDR_DEP("2033-02-15", "2033-06-15", "0.0001"),
     {":9:", "[departure]", "'step_days'", "steps"}},
    {"window_too_long", HDR_DEP("2033-02-15", "2299-01-01", "10"),
     {":8:", "[departure]", "'end'", "200 years"}},
    {"arrival_before_departure",
     HDR "[arrival]\nstart = 2032-10-01\nend = 2033-01-01\nstep_days = 1\n",
     {":12:", "[arrival]", "'end'", "before it leaves"}},
    {"arrival_step_over_span",
     HDR "[arrival]\nstart = 2033-08-01\nend = 2033-08-11\nstep_days = 11\n",
     {":13:", "[arrival]", "'step_days'", "window span of 10 days"}},
    {"flight_min_zero",
     HDR "[flight]\ntof_min_days = 0\ntof_max_days = 200\nstep_days = 1\n",
     {":11:", "[flight]", "'tof_min_days'", "not positive"}},
    {"flight_max_below_min",
     HDR "[flight]\ntof_min_days = 200\ntof_max_days = 80\nstep_days = 1\n",
     {":12:", "[flight]", "'tof_max_days'", "not larger than tof_min_days"}},
    {"flight_step_over_span",
     HDR "[flight]\ntof_min_days = 80\ntof_max_days = 90\nstep_days = 20\n",
     {":13:", "[flight]", "'step_days'", "window span of 10 days"}},
    {"flight_too_long",
     HDR "[flight]\ntof_min_days = 80\ntof_max_days = 80000\n"
     "step_days = 100\n",
     {":12:", "[flight]", "'tof_max_days'", "200 years"}},
    /* [orbits] */
    {"park_negative", HDR ARR "[orbits]\npark_alt_km = -5\n",
     {":15:", "[orbits]", "'park_alt_km'", "negative"}},
    {"apo_without_peri", HDR ARR "[orbits]\ncapture_apo_km = 1000\n",
     {":15:", "[orbits]", "'capture_apo_km'", "without capture_peri_km"}},
    {"apo_below_peri",
     HDR ARR "[orbits]\ncapture_peri_km = 400\ncapture_apo_km = 300\n",
     {":16:", "[orbits]", "'capture_apo_km'", "below capture_peri_km"}},
    /* [limits] */
    {"c3_max_zero", HDR ARR "[limits]\nc3_max_km2_s2 = 0\n",
     {":15:", "[limits]", "'c3_max_km2_s2'", "out of range"}},
    {"dla_max_95", HDR ARR "[limits]\ndla_max_deg = 95\n",
     {":15:", "[limits]", "'dla_max_deg'", "at most 90"}},
    {"tof_limits_reversed",
     HDR ARR "[limits]\ntof_min_days = 300\ntof_max_days = 200\n",
     {":16:", "[limits]", "'tof_max_days'", "line 15"}},
    /* [chart] */
    {"levels_not_ascending", HDR ARR "[chart]\nc3_levels = 8, 10, 9\n",
     {":15:", "[chart]", "'c3_levels'", "ascending"}},
    {"levels_repeated", HDR ARR "[chart]\nc3_levels = 8, 9, 9\n",
     {":15:", "[chart]", "'c3_levels'", "ascending"}},
    {"levels_bad_number", HDR ARR "[chart]\nc3_levels = 8, x, 10\n",
     {":15:", "[chart]", "'c3_levels'", "item 2 'x'"}},
    {"levels_empty_item", HDR ARR "[chart]\nvinf_arr_levels = 3,,4\n",
     {":15:", "[chart]", "'vinf_arr_levels'", "empty item"}},
    {"levels_empty", HDR ARR "[chart]\nvinf_arr_levels =\n",
     {":15:", "[chart]", "'vinf_arr_levels'", "empty value"}},
    {"levels_uncharted_checked", HDR ARR "[chart]\ndla_levels = 5, 1\n",
     {":15:", "[chart]", "'dla_levels'", "ascending"}},
    {"unknown_field", HDR ARR "[chart]\nfields = c3, foo\n",
     {":15:", "[chart]", "'fields'", "unknown field 'foo'",
      "accepted fields: c3, vinf_dep, dla"}},
    {"too_many_fields",
     HDR ARR "[chart]\nfields = c3, vinf_dep, dla, rla, vinf_arr, tof, angle\n",
     {":15:", "[chart]", "'fields'", "more than 6"}},
    {"duplicate_field", HDR ARR "[chart]\nfields = c3, vinf_arr, c3\n",
     {":15:", "[chart]", "'fields'", "listed twice"}},
    {"empty_fields", HDR ARR "[chart]\nfields =\n",
     {":15:", "[chart]", "'fields'", "empty value"}},
    {"dv_dep_no_park", HDR ARR "[chart]\nfields = c3, dv_dep\n",
     {":15:", "[chart]", "'fields'", "'dv_dep'", "park_alt_km"}},
    {"dv_cap_no_capture", HDR ARR "[chart]\nfields = dv_cap\n",
     {":15:", "[chart]", "'fields'", "'dv_cap'", "capture_peri_km"}},
    {"dv_total_no_capture",
     HDR ARR "[orbits]\npark_alt_km = 185\n[chart]\nfields = dv_total\n",
     {":17:", "[chart]", "'fields'", "'dv_total'", "capture_peri_km"}},
    {"dv_total_no_park",
     HDR ARR "[orbits]\ncapture_peri_km = 400\n[chart]\nfields = dv_total\n",
     {":17:", "[chart]", "'fields'", "'dv_total'", "park_alt_km"}},
    {"v_entry_no_entry", HDR ARR "[chart]\nfields = c3, v_entry\n",
     {":15:", "[chart]", "'fields'", "'v_entry'", "entry_alt_km"}},
    {"tof_lines_negative", HDR ARR "[chart]\ntof_lines = 100, -5\n",
     {":15:", "[chart]", "'tof_lines'", "not positive"}},
    {"tof_lines_word", HDR ARR "[chart]\ntof_lines = some\n",
     {":15:", "[chart]", "'tof_lines'", "'some'"}},
    {"bad_bool", HDR ARR "[chart]\nfilled = maybe\n",
     {":15:", "[chart]", "'filled'", "yes or no"}},
    {"bad_bool_types", HDR ARR "[chart]\ntypes = 2\n",
     {":15:", "[chart]", "'types'", "yes or no"}},
    /* [output] */
    {"unknown_format", HDR ARR "[output]\nformats = png, gif\n",
     {":15:", "[output]", "'formats'", "'gif'", "accepted formats: png, svg"}},
    {"duplicate_format", HDR ARR "[output]\nformats = png, PNG\n",
     {":15:", "[output]", "'formats'", "listed twice"}},
    {"empty_directory", HDR ARR "[output]\ndirectory =\n",
     {":15:", "[output]", "'directory'", "empty value"}},
    {"name_with_slash", HDR ARR "[output]\nname = a/b\n",
     {":15:", "[output]", "'name'", "'/'"}},
    {"dpi_low", HDR ARR "[output]\ndpi = 20\n",
     {":15:", "[output]", "'dpi'", "50 to 1200"}},
    {"dpi_high", HDR ARR "[output]\ndpi = 5000\n",
     {":15:", "[output]", "'dpi'", "50 to 1200"}},
    {"width_zero", HDR ARR "[output]\nwidth_in = 0\n",
     {":15:", "[output]", "'width_in'", "out of range"}},
    {"width_huge", HDR ARR "[output]\nwidth_in = 150\n",
     {":15:", "[output]", "'width_in'", "at most 100"}},
    {"height_negative", HDR ARR "[output]\nheight_in = -2\n",
     {":15:", "[output]", "'height_in'", "out of range"}},
    {"height_px_huge", HDR ARR "[output]\nheight_px = 30000\n",
     {":15:", "[output]", "'height_px'", "out of range"}},
    {"width_in_and_px", HDR ARR "[output]\nwidth_in = 7\nwidth_px = 1400\n",
     {":16:", "[output]", "'width_px'", "width_in (line 15)"}},
    {"width_px_and_in", HDR ARR "[output]\nwidth_px = 1400\nwidth_in = 7\n",
     {":16:", "[output]", "'width_in'", "width_px (line 15)"}},
    {"png_too_many_pixels",
     HDR ARR "[output]\nwidth_in = 40\ndpi = 1200\n",
     {":16:", "[output]", "'dpi'", "32767"}},
};

#define N_ERR_CASES ((int)(sizeof err_cases / sizeof err_cases[0]))

START_TEST(test_error_case)
{
    const err_case *ec = &err_cases[_i];
    tmpfile_t t;
    tmp_make(&t);
    char fname[96];
    snprintf(fname, sizeof fname, "%s.ini", ec->name);
    const char *path = tmp_write(&t, fname, ec->text);
    sy_study *st = malloc(sizeof *st);
    ck_assert_ptr_nonnull(st);
    sy_error err = {{0}};
    sy_status rc = sy_study_load(path, NULL, 0, st, &err);
    ck_assert_msg(rc == SY_ERR_PARSE, "%s: status %d (%s), expected "
                  "SY_ERR_PARSE; message: %s", ec->name, (int)rc,
                  sy_status_str(rc), err.msg);
    if (getenv("CHECK_STUDY_VERBOSE"))
        printf("%s\n", err.msg);
    /* The file, by its name, then the line (needle ":N:"). */
    char named[128];
    snprintf(named, sizeof named, "%s:", fname);
    ck_assert_msg(strstr(err.msg, named) != NULL, "%s: message lacks the "
                  "file name '%s': %s", ec->name, fname, err.msg);
    for (int k = 0; k < 5 && ec->needles[k]; k++)
        ck_assert_msg(strstr(err.msg, ec->needles[k]) != NULL,
                      "%s: message lacks \"%s\": %s", ec->name,
                      ec->needles[k], err.msg);
    free(st);
    tmp_clean(&t);
}
END_TEST

/* ------------------------------------------------------------------ */
/* Line-oriented cases built at run time                               */

START_TEST(test_line_too_long)
{
    tmpfile_t t;
    tmp_make(&t);
    char text[1024];
    char longv[400];
    memset(longv, 'x', sizeof longv - 1);
    longv[sizeof longv - 1] = '\0';
    /* subtitle on line 3 of a file with [study] first */
    snprintf(text, sizeof text,
             "[study]\ntitle = T\nsubtitle = %s\n[transfer]\norigin = earth\n"
             "target = mars\n[departure]\nstart = 2033-02-15\n"
             "end = 2033-06-15\nstep_days = 1\n" ARR, longv);
    const char *path = tmp_write(&t, "long.ini", text);
    sy_study st;
    sy_error err = {{0}};
    ck_assert_int_eq(sy_study_load(path, NULL, 0, &st, &err), SY_ERR_PARSE);
    ck_assert_msg(strstr(err.msg, "long.ini:3:") != NULL, "%s", err.msg);
    ck_assert_msg(strstr(err.msg, "longer than") != NULL, "%s", err.msg);
    tmp_clean(&t);
}
END_TEST

START_TEST(test_bom_and_comments)
{
    tmpfile_t t;
    tmp_make(&t);
    const char *path = tmp_write(
        &t, "bom.ini",
        "\xEF\xBB\xBF[study]\n"
        "title = Wren ; a comment after the value\n"
        "# a comment line\n"
        "   ; an indented comment\n"
        "[transfer]\n"
        "   origin = earth\n" /* indented: not a continuation */
        "target = mars\n"
        "[departure]\nstart = 2033-02-15\nend = 2033-06-15\nstep_days = 1\n"
        ARR);
    sy_study st;
    sy_error err = {{0}};
    ck_assert_msg(sy_study_load(path, NULL, 0, &st, &err) == SY_OK, "%s",
                  err.msg);
    ck_assert_str_eq(st.title, "Wren");
    ck_assert_str_eq(st.origin, "earth");
    ck_assert_str_eq(st.target, "mars");
    tmp_clean(&t);
}
END_TEST

START_TEST(test_crlf)
{
    tmpfile_t t;
    tmp_make(&t);
    const char *path = tmp_write(
        &t, "crlf.ini",
        "[study]\r\ntitle = Wren\r\n[transfer]\r\norigin = earth\r\n"
        "target = mars\r\n[departure]\r\nstart = 2033-02-15\r\n"
        "end = 2033-06-15\r\nstep_days = 1\r\n[flight]\r\n"
        "tof_min_days = 100\r\ntof_max_days = 300\r\nstep_days = 2\r\n"
        "[limits]\r\nc3max = 1\r\n");
    sy_study st;
    sy_error err = {{0}};
    ck_assert_int_eq(sy_study_load(path, NULL, 0, &st, &err), SY_ERR_PARSE);
    ck_assert_msg(strstr(err.msg, "crlf.ini:15: [limits] unknown key "
                         "'c3max'") != NULL, "%s", err.msg);
    tmp_clean(&t);
}
END_TEST

/* ------------------------------------------------------------------ */
/* Defaults                                                            */

START_TEST(test_defaults)
{
    tmpfile_t t;
    tmp_make(&t);
    const char *path = tmp_write(&t, "minimal-study.ini", HDR ARR);
    sy_study st;
    sy_error err = {{0}};
    ck_assert_msg(sy_study_load(path, NULL, 0, &st, &err) == SY_OK, "%s",
                  err.msg);
    ck_assert_str_eq(st.path, path);
    ck_assert_str_eq(st.dir, t.dir);
    ck_assert_str_eq(st.title, "T");
    ck_assert_str_eq(st.subtitle, "");
    ck_assert_str_eq(st.bodies_file, "");
    ck_assert_int_eq(st.revs, 0);
    ck_assert_int_eq(st.branch, SY_BRANCH_LEFT);
    ck_assert_int_eq(st.y_is_tof, 0);
    ck_assert_int_eq(st.orbits.want_park, 0);
    ck_assert_int_eq(st.orbits.want_capture, 0);
    ck_assert_int_eq(st.orbits.want_entry, 0);
    ck_assert(isnan(st.c3_max_km2_s2));
    ck_assert(isnan(st.vinf_arr_max_km_s));
    ck_assert(isnan(st.dla_max_deg));
    ck_assert(isnan(st.tof_min_days));
    ck_assert(isnan(st.tof_max_days));
    ck_assert_uint_eq(st.nfields, 2);
    ck_assert_int_eq(st.fields[0].field, SY_F_C3);
    ck_assert_int_eq(st.fields[1].field, SY_F_VINF_ARR);
    ck_assert_int_eq(st.fields[0].auto_levels, 1);
    ck_assert_int_eq(st.fields[1].auto_levels, 1);
    ck_assert_int_eq(st.tof_lines_auto, 1);
    ck_assert_uint_eq(st.ntof_lines, 0);
    ck_assert_int_eq(st.filled, 0);
    ck_assert_int_eq(st.show_types, 1);
    ck_assert_uint_eq(st.formats, SY_FMT_PNG | SY_FMT_SVG | SY_FMT_PDF |
                                      SY_FMT_CSV | SY_FMT_JSON);
    ck_assert_str_eq(st.out_dir, "out");
    ck_assert_str_eq(st.basename, "minimal-study");
    ck_assert_double_eq(st.width_in, 7.5);
    ck_assert_double_eq(st.height_in, 5.5);
    ck_assert_double_eq(st.dpi, 200);
    tmp_clean(&t);
}
END_TEST

START_TEST(test_pixels_and_misc)
{
    tmpfile_t t;
    tmp_make(&t);
    const char *path = tmp_write(
        &t, "px.ini",
        HDR_TRANSFER("revolutions = 1\nbranch = RIGHT\n")
        "[chart]\nfields = tof, angle, min_sun\ntof_lines = none\n"
        "types = no\nfilled = true\ntof_levels = 100, 200.5, 300\n"
        "[output]\nformats = CSV, json\nwidth_px = 1500\nheight_px = 1000\n"
        "dpi = 250\nname = custom\ndirectory = /tmp/charts\n");
    sy_study st;
    sy_error err = {{0}};
    ck_assert_msg(sy_study_load(path, NULL, 0, &st, &err) == SY_OK, "%s",
                  err.msg);
    ck_assert_int_eq(st.revs, 1);
    ck_assert_int_eq(st.branch, SY_BRANCH_RIGHT);
    ck_assert_uint_eq(st.nfields, 3);
    ck_assert_int_eq(st.fields[0].field, SY_F_TOF);
    ck_assert_int_eq(st.fields[1].field, SY_F_ANGLE);
    ck_assert_int_eq(st.fields[2].field, SY_F_MIN_SUN);
    ck_assert_int_eq(st.fields[0].auto_levels, 0);
    ck_assert_uint_eq(st.fields[0].nlevels, 3);
    ck_assert_double_eq(st.fields[0].levels[1], 200.5);
    ck_assert_int_eq(st.fields[1].auto_levels, 1);
    ck_assert_int_eq(st.tof_lines_auto, 0);
    ck_assert_uint_eq(st.ntof_lines, 0);
    ck_assert_int_eq(st.show_types, 0);
    ck_assert_int_eq(st.filled, 1);
    ck_assert_uint_eq(st.formats, SY_FMT_CSV | SY_FMT_JSON);
    /* 1500 px / 250 dpi = 6 in; 1000 px / 250 dpi = 4 in (exact). */
    ck_assert_double_eq_tol(st.width_in, 6.0, 1e-12);
    ck_assert_double_eq_tol(st.height_in, 4.0, 1e-12);
    ck_assert_double_eq(st.dpi, 250);
    ck_assert_str_eq(st.basename, "custom");
    ck_assert_str_eq(st.out_dir, "/tmp/charts");
    tmp_clean(&t);
}
END_TEST

/* ------------------------------------------------------------------ */
/* The examples                                                        */

static void load_example(const char *name, sy_study *st,
                         const char *const *ovr, size_t novr)
{
    char path[1024];
    example_path(name, path, sizeof path);
    sy_error err = {{0}};
    sy_status rc = sy_study_load(path, ovr, novr, st, &err);
    ck_assert_msg(rc == SY_OK, "%s: %s (%s)", path, sy_status_str(rc),
                  err.msg);
}

START_TEST(test_example_tern)
{
    sy_study *st = malloc(sizeof *st);
    ck_assert_ptr_nonnull(st);
    load_example("tern-mars-2033.ini", st, NULL, 0);
    ck_assert_msg(strstr(st->title, "Tern") != NULL, "%s", st->title);
    ck_assert_msg(strstr(st->subtitle, "fictional") != NULL, "%s",
                  st->subtitle);
    ck_assert_str_eq(st->origin, "earth");
    ck_assert_str_eq(st->target, "mars");
    ck_assert_int_eq(st->revs, 0);
    ck_assert_str_eq(st->bodies_file, "");
    /* 2033-02-15T00:00 is 12099 days after 2000-01-01T00:00 = JD
     * 2451544.5 (33 years with 9 leap days, plus 45 days): JD 2463643.5,
     * worked by hand from the J2000 epoch (common practice). */
    ck_assert_double_eq_tol(st->dep_start_jd, 2463643.5, 1e-9);
    ck_assert_double_eq_tol(st->dep_end_jd - st->dep_start_jd, 120.0, 1e-9);
    ck_assert_double_eq(st->dep_step_days, 1.0);
    ck_assert_int_eq(st->y_is_tof, 0);
    /* 2033-08-01 is 167 days after 2033-02-15; 2034-06-30 333 days later. */
    ck_assert_double_eq_tol(st->arr_start_jd - st->dep_start_jd, 167.0, 1e-9);
    ck_assert_double_eq_tol(st->arr_end_jd - st->arr_start_jd, 333.0, 1e-9);
    ck_assert_double_eq(st->arr_step_days, 1.0);
    ck_assert_int_eq(st->orbits.want_park, 1);
    ck_assert_double_eq(st->orbits.park_alt_km, 185);
    ck_assert_int_eq(st->orbits.want_capture, 1);
    ck_assert_double_eq(st->orbits.capture_peri_km, 400);
    ck_assert_double_eq(st->orbits.capture_apo_km, 33793);
    ck_assert_int_eq(st->orbits.want_entry, 1);
    ck_assert_double_eq(st->orbits.entry_alt_km, 125);
    ck_assert_double_eq(st->c3_max_km2_s2, 20);
    ck_assert_double_eq(st->vinf_arr_max_km_s, 4.5);
    ck_assert_double_eq(st->dla_max_deg, 28.5);
    ck_assert(isnan(st->tof_min_days) && isnan(st->tof_max_days));
    ck_assert_uint_eq(st->nfields, 2);
    ck_assert_int_eq(st->fields[0].field, SY_F_C3);
    ck_assert_int_eq(st->fields[0].auto_levels, 0);
    static const double c3l[] = {8, 9, 10, 11, 12, 14, 16, 18, 20, 25, 30};
    ck_assert_uint_eq(st->fields[0].nlevels, 11);
    for (size_t i = 0; i < 11; i++)
        ck_assert_double_eq(st->fields[0].levels[i], c3l[i]);
    ck_assert_int_eq(st->fields[1].field, SY_F_VINF_ARR);
    ck_assert_int_eq(st->fields[1].auto_levels, 1);
    ck_assert_int_eq(st->tof_lines_auto, 1);
    ck_assert_int_eq(st->filled, 0);
    ck_assert_int_eq(st->show_types, 1);
    ck_assert_uint_eq(st->formats, 31);
    ck_assert_str_eq(st->out_dir, "out");
    ck_assert_str_eq(st->basename, "tern-mars-2033");
    ck_assert_double_eq(st->width_in, 7.5);
    ck_assert_double_eq(st->height_in, 5.5);
    ck_assert_double_eq(st->dpi, 200);
    free(st);
}
END_TEST

START_TEST(test_example_lantern)
{
    sy_study *st = malloc(sizeof *st);
    ck_assert_ptr_nonnull(st);
    load_example("lantern-venus-2031.ini", st, NULL, 0);
    ck_assert_msg(strstr(st->title, "Lantern") != NULL, "%s", st->title);
    ck_assert_str_eq(st->origin, "earth");
    ck_assert_str_eq(st->target, "venus");
    /* 2031-04-01 is 11413 days after 2000-01-01 = JD 2451544.5 (31 years
     * with 8 leap days, plus 90 days): JD 2462957.5, worked by hand. */
    ck_assert_double_eq_tol(st->dep_start_jd, 2462957.5, 1e-9);
    ck_assert_double_eq_tol(st->dep_end_jd - st->dep_start_jd, 121.0, 1e-9);
    ck_assert_int_eq(st->y_is_tof, 1);
    ck_assert_double_eq(st->tof_start_days, 80);
    ck_assert_double_eq(st->tof_end_days, 200);
    ck_assert_double_eq(st->tof_step_days, 1);
    ck_assert(isnan(st->arr_start_jd));
    ck_assert_int_eq(st->filled, 1);
    ck_assert_uint_eq(st->nfields, 2);
    ck_assert_int_eq(st->fields[0].field, SY_F_C3);
    ck_assert_int_eq(st->fields[1].field, SY_F_VINF_ARR);
    ck_assert_uint_eq(st->formats, SY_FMT_PNG | SY_FMT_PDF | SY_FMT_CSV);
    ck_assert_double_eq_tol(st->width_in, 8.0, 1e-12);
    ck_assert_double_eq_tol(st->height_in, 5.5, 1e-12);
    ck_assert_str_eq(st->basename, "lantern-venus-2031");
    ck_assert_int_eq(st->orbits.want_park, 0);
    ck_assert(isnan(st->dla_max_deg));
    free(st);
}
END_TEST

START_TEST(test_example_quillon)
{
    sy_study *st = malloc(sizeof *st);
    ck_assert_ptr_nonnull(st);
    load_example("quillon-ilvani-2030.ini", st, NULL, 0);
    ck_assert_msg(strstr(st->title, "Quillon") != NULL, "%s", st->title);
    ck_assert_str_eq(st->target, "ilvani");
    char want[1100];
    snprintf(want, sizeof want, "%s/examples/bodies.ini", srcdir());
    ck_assert_str_eq(st->bodies_file, want);
    /* The resolved bodies file exists and defines the invented body. */
    FILE *fp = fopen(st->bodies_file, "r");
    ck_assert_msg(fp != NULL, "%s: %s", st->bodies_file, strerror(errno));
    char line[256];
    int found = 0;
    while (fgets(line, sizeof line, fp))
        if (strncmp(line, "[body Ilvani]", 13) == 0)
            found = 1;
    fclose(fp);
    ck_assert_msg(found, "%s has no [body Ilvani]", st->bodies_file);
    ck_assert_int_eq(st->y_is_tof, 0);
    ck_assert_double_eq(st->dep_step_days, 2);
    ck_assert_double_eq(st->arr_step_days, 2);
    ck_assert_uint_eq(st->nfields, 3);
    ck_assert_int_eq(st->fields[2].field, SY_F_DV_DEP);
    ck_assert_int_eq(st->orbits.want_park, 1);
    ck_assert_double_eq(st->orbits.park_alt_km, 300);
    ck_assert_int_eq(st->fields[1].auto_levels, 0);
    ck_assert_uint_eq(st->fields[1].nlevels, 9);
    ck_assert_uint_eq(st->ntof_lines, 5);
    ck_assert_double_eq(st->tof_lines_days[4], 500);
    ck_assert_double_eq(st->tof_max_days, 550);
    ck_assert_str_eq(st->basename, "quillon-ilvani-2030");
    free(st);
}
END_TEST

/* ------------------------------------------------------------------ */
/* Overrides                                                           */

START_TEST(test_override_replaces)
{
    sy_study *st = malloc(sizeof *st);
    ck_assert_ptr_nonnull(st);
    /* The file has c3_max_km2_s2 = 20: an override replaces it without a
     * duplicate-key error; the later of two overrides wins; keys absent
     * from the file are added; spaces around the parts are trimmed. */
    const char *ovr[] = {"limits.c3_max_km2_s2=15",
                         "chart.fields = c3",
                         "limits.c3_max_km2_s2=16.5",
                         "output.name=tern-b",
                         "limits.tof_max_days=400",
                         "study.subtitle="};
    load_example("tern-mars-2033.ini", st, ovr, 6);
    ck_assert_double_eq(st->c3_max_km2_s2, 16.5);
    ck_assert_uint_eq(st->nfields, 1);
    ck_assert_int_eq(st->fields[0].field, SY_F_C3);
    ck_assert_uint_eq(st->fields[0].nlevels, 11);
    ck_assert_str_eq(st->basename, "tern-b");
    ck_assert_double_eq(st->tof_max_days, 400);
    ck_assert_str_eq(st->subtitle, "");
    ck_assert_double_eq(st->vinf_arr_max_km_s, 4.5); /* untouched */
    free(st);
}
END_TEST

START_TEST(test_override_bodies_relative)
{
    sy_study *st = malloc(sizeof *st);
    ck_assert_ptr_nonnull(st);
    const char *ovr[] = {"study.bodies=other.ini"};
    load_example("quillon-ilvani-2030.ini", st, ovr, 1);
    char want[1100];
    snprintf(want, sizeof want, "%s/examples/other.ini", srcdir());
    ck_assert_str_eq(st->bodies_file, want);
    free(st);
}
END_TEST

typedef struct {
    const char *file;     /* example */
    const char *ovr;
    const char *needles[4];
} ovr_case;

static const ovr_case ovr_cases[] = {
    {"tern-mars-2033.ini", "limits.c3_max_km2_s2=abc",
     {"[limits]", "'c3_max_km2_s2'", "not a finite number"}},
    {"tern-mars-2033.ini", "limitsc3=5", {"section.key=value"}},
    {"tern-mars-2033.ini", "limits.c3_max_km2_s2", {"section.key=value"}},
    {"tern-mars-2033.ini", ".c3_max_km2_s2=5", {"empty section or key"}},
    {"tern-mars-2033.ini", "limits.=5", {"empty section or key"}},
    {"tern-mars-2033.ini", "foo.bar=1",
     {"unknown section [foo]", "accepted sections: [study]"}},
    {"tern-mars-2033.ini", "limits.c3max=5",
     {"[limits]", "'c3max'", "accepted keys: c3_max_km2_s2, "
      "vinf_arr_max_km_s, dla_max_deg, tof_min_days, tof_max_days"}},
    {"tern-mars-2033.ini", "departure.end=2033-01-01",
     {"[departure]", "'end'", "not after start"}},
    {"tern-mars-2033.ini", "output.dpi=10", {"[output]", "'dpi'", "50 to"}},
    {"lantern-venus-2031.ini", "chart.fields=c3, dv_total",
     {"[chart]", "'fields'", "'dv_total'"}},
    {"tern-mars-2033.ini", "transfer.revolutions=3",
     {"[transfer]", "'branch'"}},
    {"tern-mars-2033.ini", "departure.step_days=500",
     {"[departure]", "'step_days'", "window span of 120 days"}},
    {"tern-mars-2033.ini", "chart.c3_levels=8, 7",
     {"[chart]", "'c3_levels'", "ascending"}},
    {"lantern-venus-2031.ini", "arrival.start=2031-09-01",
     {"[arrival]", "[flight]", "exactly one"}},
    {"lantern-venus-2031.ini", "output.width_in=5",
     {"[output]", "'width_in'", "width_px (lantern-venus-2031.ini:"}},
    {"tern-mars-2033.ini", "departure.end=2033-01-01",
     {"2033-01-01 is not after start 2033-02-15 (tern-mars-2033.ini:"}},
    {"tern-mars-2033.ini", "study.title=", {"[study]", "'title'", "empty"}},
};

#define N_OVR_CASES ((int)(sizeof ovr_cases / sizeof ovr_cases[0]))

START_TEST(test_override_error)
{
    const ovr_case *oc = &ovr_cases[_i];
    char path[1024];
    example_path(oc->file, path, sizeof path);
    sy_study *st = malloc(sizeof *st);
    ck_assert_ptr_nonnull(st);
    sy_error err = {{0}};
    const char *ovr[] = {oc->ovr};
    sy_status rc = sy_study_load(path, ovr, 1, st, &err);
    ck_assert_msg(rc == SY_ERR_PARSE, "--set %s: status %s, msg %s", oc->ovr,
                  sy_status_str(rc), err.msg);
    if (getenv("CHECK_STUDY_VERBOSE"))
        printf("%s\n", err.msg);
    char head[256];
    snprintf(head, sizeof head, "--set %s: ", oc->ovr);
    ck_assert_msg(strncmp(err.msg, head, strlen(head)) == 0,
                  "message does not start with '%s': %s", head, err.msg);
    for (int k = 0; k < 4 && oc->needles[k]; k++)
        ck_assert_msg(strstr(err.msg, oc->needles[k]) != NULL,
                      "--set %s: message lacks \"%s\": %s", oc->ovr,
                      oc->needles[k], err.msg);
    free(st);
}
END_TEST

/* Errors found in the override itself start with "--set TEXT: ". */
START_TEST(test_override_prefix)
{
    static const char *const texts[] = {
        "limits.c3_max_km2_s2=abc", "limitsc3=5", "foo.bar=1",
        "limits.c3max=5", "departure.end=2033-01-01", "output.dpi=10"};
    char path[1024];
    example_path("tern-mars-2033.ini", path, sizeof path);
    for (size_t i = 0; i < sizeof texts / sizeof texts[0]; i++) {
        sy_study st;
        sy_error err = {{0}};
        const char *ovr[] = {texts[i]};
        ck_assert_int_eq(sy_study_load(path, ovr, 1, &st, &err),
                         SY_ERR_PARSE);
        char head[256];
        snprintf(head, sizeof head, "--set %s: ", texts[i]);
        ck_assert_msg(strncmp(err.msg, head, strlen(head)) == 0,
                      "expected prefix '%s': %s", head, err.msg);
    }
}
END_TEST

/* More levels than SY_MAX_LEVELS (only an override can be that long). */
START_TEST(test_override_too_many_levels)
{
    char ovr_text[1024] = "chart.c3_levels=";
    for (int i = 1; i <= SY_MAX_LEVELS + 1; i++) {
        char num[16];
        snprintf(num, sizeof num, "%s%d", i > 1 ? "," : "", i);
        strcat(ovr_text, num);
    }
    char path[1024];
    example_path("tern-mars-2033.ini", path, sizeof path);
    sy_study st;
    sy_error err = {{0}};
    const char *ovr[] = {ovr_text};
    ck_assert_int_eq(sy_study_load(path, ovr, 1, &st, &err), SY_ERR_PARSE);
    ck_assert_msg(strstr(err.msg, "--set chart.c3_levels=1,2,3") == err.msg,
                  "%s", err.msg);
    ck_assert_msg(strstr(err.msg, "'c3_levels'") != NULL, "%s", err.msg);
    ck_assert_msg(strstr(err.msg, "more than 64") != NULL, "%s", err.msg);

    /* Exactly SY_MAX_LEVELS is accepted. */
    char *last = strrchr(ovr_text, ',');
    *last = '\0';
    ck_assert_msg(sy_study_load(path, ovr, 1, &st, &err) == SY_OK, "%s",
                  err.msg);
    ck_assert_uint_eq(st.fields[0].nlevels, SY_MAX_LEVELS);
    ck_assert_double_eq(st.fields[0].levels[SY_MAX_LEVELS - 1],
                        SY_MAX_LEVELS);
}
END_TEST

/* ------------------------------------------------------------------ */
/* I/O, arguments, all-or-nothing                                      */

START_TEST(test_unreadable)
{
    tmpfile_t t;
    tmp_make(&t);
    char path[600];
    snprintf(path, sizeof path, "%s/no-such-study.ini", t.dir);
    sy_study st;
    sy_error err = {{0}};
    ck_assert_int_eq(sy_study_load(path, NULL, 0, &st, &err), SY_ERR_IO);
    ck_assert_msg(strstr(err.msg, path) != NULL, "%s", err.msg);
    /* A directory opens but cannot be read. */
    ck_assert_int_eq(sy_study_load(t.dir, NULL, 0, &st, &err), SY_ERR_IO);
    ck_assert_msg(strstr(err.msg, t.dir) != NULL, "%s", err.msg);
    tmp_clean(&t);
}
END_TEST

START_TEST(test_arguments)
{
    sy_study st;
    sy_error err = {{0}};
    ck_assert_int_eq(sy_study_load(NULL, NULL, 0, &st, &err), SY_ERR_ARG);
    ck_assert_int_eq(sy_study_load("x.ini", NULL, 0, NULL, &err),
                     SY_ERR_ARG);
    ck_assert_int_eq(sy_study_load("x.ini", NULL, 2, &st, &err), SY_ERR_ARG);
    char path[1024];
    example_path("tern-mars-2033.ini", path, sizeof path);
    const char *ovr[] = {NULL};
    ck_assert_int_eq(sy_study_load(path, ovr, 1, &st, NULL), SY_ERR_PARSE);
}
END_TEST

START_TEST(test_untouched_on_error)
{
    sy_study *st = malloc(sizeof *st), *copy = malloc(sizeof *copy);
    ck_assert_ptr_nonnull(st);
    ck_assert_ptr_nonnull(copy);
    memset(st, 0x5A, sizeof *st);
    memcpy(copy, st, sizeof *st);
    char path[1024];
    example_path("tern-mars-2033.ini", path, sizeof path);
    const char *ovr[] = {"output.dpi=5"};
    sy_error err = {{0}};
    ck_assert_int_eq(sy_study_load(path, ovr, 1, st, &err), SY_ERR_PARSE);
    ck_assert_int_eq(memcmp(st, copy, sizeof *st), 0);
    free(st);
    free(copy);
}
END_TEST

/* ------------------------------------------------------------------ */
/* Field names                                                         */

START_TEST(test_fields)
{
    static const char *const names[SY_NFIELDS] = {
        "c3", "vinf_dep", "dla", "rla", "vinf_arr", "c3_arr", "dap", "rap",
        "tof", "angle", "min_sun", "dv_dep", "dv_cap", "dv_total",
        "v_entry"};
    for (int f = 0; f < SY_NFIELDS; f++) {
        ck_assert_str_eq(sy_field_name((sy_field)f), names[f]);
        ck_assert_int_eq(sy_field_from_name(names[f]), f);
        /* Every key carries its unit (house rule: units in names). */
        const char *key = sy_field_key((sy_field)f);
        ck_assert_msg(strstr(key, "_km2_s2") || strstr(key, "_km_s") ||
                          strstr(key, "_deg") || strstr(key, "_days") ||
                          strstr(key, "_au"),
                      "key '%s' has no unit", key);
        /* Every label carries its unit in parentheses. */
        const char *label = sy_field_label((sy_field)f);
        ck_assert_msg(strchr(label, '(') && label[strlen(label) - 1] == ')',
                      "label '%s' has no unit", label);
    }
    ck_assert_str_eq(sy_field_key(SY_F_C3), "c3_km2_s2");
    ck_assert_str_eq(sy_field_key(SY_F_DLA), "dla_deg");
    ck_assert_str_eq(sy_field_label(SY_F_C3), "C3 (km\xc2\xb2/s\xc2\xb2)");
    ck_assert_str_eq(sy_field_label(SY_F_VINF_ARR),
                     "Arrival v\xe2\x88\x9e (km/s)");
    ck_assert_str_eq(sy_field_label(SY_F_DLA), "DLA (deg)");
    ck_assert_str_eq(sy_field_label(SY_F_TOF), "Time of flight (days)");
    ck_assert_int_eq(sy_field_from_name("VINF_ARR"), SY_F_VINF_ARR);
    ck_assert_int_eq(sy_field_from_name("c4"), -1);
    ck_assert_int_eq(sy_field_from_name(""), -1);
    ck_assert_int_eq(sy_field_from_name(NULL), -1);
    ck_assert_str_eq(sy_field_name(SY_NFIELDS), "unknown");
}
END_TEST

static Suite *study_suite(void)
{
    Suite *s = suite_create("study");
    TCase *tc = tcase_create("files");
    tcase_add_loop_test(tc, test_error_case, 0, N_ERR_CASES);
    tcase_add_test(tc, test_line_too_long);
    tcase_add_test(tc, test_bom_and_comments);
    tcase_add_test(tc, test_crlf);
    tcase_add_test(tc, test_defaults);
    tcase_add_test(tc, test_pixels_and_misc);
    tcase_add_test(tc, test_unreadable);
    tcase_add_test(tc, test_arguments);
    tcase_add_test(tc, test_untouched_on_error);
    suite_add_tcase(s, tc);

    TCase *te = tcase_create("examples");
    tcase_add_test(te, test_example_tern);
    tcase_add_test(te, test_example_lantern);
    tcase_add_test(te, test_example_quillon);
    suite_add_tcase(s, te);

    TCase *to = tcase_create("overrides");
    tcase_add_test(to, test_override_replaces);
    tcase_add_test(to, test_override_bodies_relative);
    tcase_add_loop_test(to, test_override_error, 0, N_OVR_CASES);
    tcase_add_test(to, test_override_prefix);
    tcase_add_test(to, test_override_too_many_levels);
    suite_add_tcase(s, to);

    TCase *tf = tcase_create("fields");
    tcase_add_test(tf, test_fields);
    suite_add_tcase(s, tf);
    return s;
}

int main(void)
{
    return tu_run(study_suite());
}
