/* check_chart.c - tests of the chart renderer (src/lib/chart*.c).
 *
 * The chart drawn here is a demo: invented, paraboloid-shaped fields on a
 * fictional 2033 Earth-to-Mars window of the (fictional) "Kestrel" study.
 * The checks do not judge the numbers; they judge the files, using
 * references outside the project:
 *   - libpng decodes the PNG (size = inches x dpi, pHYs = dpi / 0.0254
 *     pixels per metre per the PNG 1.2 specification section 4.2.4.2,
 *     tEXt/iTXt chunks as given);
 *   - xmllint (libxml2-utils) checks the SVG is well-formed XML;
 *   - pdfinfo (poppler-utils) reads the PDF and its page count.
 */
#include "config.h"
#include "synodic.h"
#include "synodic/chart.h"
#include "synodic/contour.h"
#include "testutil.h"

#include <cairo.h>
#include <dirent.h>
#include <fontconfig/fontconfig.h>
#include <pango/pangocairo.h>
#include <errno.h>
#include <math.h>
#include <png.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <signal.h>
#include <sys/resource.h>
#include <sys/stat.h>
#include <unistd.h>

/* ------------------------------------------------------------------ */
/* Demo chart                                                          */

#define NX 121
#define NY 201
#define JD_2033_03_01 2463657.5 /* 2000-01-01 0h = JD 2451544.5, + 12113 d */

typedef struct {
    float c3[NX * NY], vinf[NX * NY], dv[NX * NY];
    unsigned char nosol[NX * NY], c3_high[NX * NY];
    sy_isoline_set c3_sets[16], vinf_sets[16], dv_sets[8];
    size_t nc3, nvinf, ndv;
    double c3_levels[16];
    sy_polyline boundary;
    double boundary_xy[2 * NX];
    sy_chart_isolines layers[3];
    sy_chart_region region;
    sy_chart_marker markers[2];
    sy_chart_tof_lines tof;
    double tof_days[5];
    sy_chart_boundary bnd;
    sy_chart_fill fill;
    const char *footer[3];
    sy_chart chart;
} demo;

static demo *demo_new(int filled)
{
    demo *d = calloc(1, sizeof *d);
    ck_assert_ptr_nonnull(d);
    for (int j = 0; j < NY; j++)
        for (int i = 0; i < NX; i++) {
            size_t k = (size_t)j * NX + i;
            double u = i - 55.0, v = j - 120.0;
            d->c3[k] = (float)(8.9 + 0.004 * u * u + 0.0018 * v * v + 0.0022 * u * v);
            double a = i - 85.0, b = j - 80.0;
            d->vinf[k] = (float)(2.6 + 0.00028 * a * a + 0.00012 * b * b - 0.0001 * a * b);
            double p = i - 65.0, q = j - 100.0;
            d->dv[k] = (float)(5.6 + 0.0004 * p * p + 0.00025 * q * q);
            /* arrival - departure = 150 + j - i days; none below 90 d */
            d->nosol[k] = (150 + j - i) < 90;
            d->c3_high[k] = d->c3[k] > 30.0f;
        }
    static const double c3_lv[] = {10, 12, 15, 20, 25, 30, 40, 50};
    d->nc3 = sizeof c3_lv / sizeof c3_lv[0];
    for (size_t k = 0; k < d->nc3; k++) {
        d->c3_levels[k] = c3_lv[k];
        ck_assert_int_eq(sy_contour_trace(d->c3, d->nosol, NX, NY, c3_lv[k], &d->c3_sets[k]), SY_OK);
    }
    static const double vi_lv[] = {2.75, 3, 3.25, 3.5, 4, 4.5, 5};
    d->nvinf = sizeof vi_lv / sizeof vi_lv[0];
    for (size_t k = 0; k < d->nvinf; k++)
        ck_assert_int_eq(sy_contour_trace(d->vinf, d->nosol, NX, NY, vi_lv[k], &d->vinf_sets[k]), SY_OK);
    static const double dv_lv[] = {6, 7, 8};
    d->ndv = 3;
    for (size_t k = 0; k < d->ndv; k++)
        ck_assert_int_eq(sy_contour_trace(d->dv, d->nosol, NX, NY, dv_lv[k], &d->dv_sets[k]), SY_OK);

    /* Type I / II boundary: a gently bent line near 200 d of flight */
    for (int i = 0; i < NX; i++) {
        d->boundary_xy[2 * i] = i;
        d->boundary_xy[2 * i + 1] = i + 50.0 + 6.0 * sin(i / 25.0);
    }
    d->boundary.xy = d->boundary_xy;
    d->boundary.n = NX;
    d->boundary.closed = 0;
    d->bnd.lines = &d->boundary;
    d->bnd.nlines = 1;
    d->bnd.low_text = "Type I";
    d->bnd.high_text = "Type II";
    d->bnd.legend = "Type I / II boundary";

    d->layers[0] = (sy_chart_isolines){SY_CHART_PRIMARY, d->c3_sets, d->nc3, "Departure C3, km²/s²", 0};
    d->layers[1] = (sy_chart_isolines){SY_CHART_SECONDARY, d->vinf_sets, d->nvinf, "Arrival v∞, km/s", 0};
    d->layers[2] = (sy_chart_isolines){SY_CHART_TERTIARY, d->dv_sets, d->ndv, "Total Δv, km/s", 0};
    d->region.mask = d->c3_high;
    d->region.legend = "C3 > 30 km²/s²";
    d->markers[0] = (sy_chart_marker){JD_2033_03_01 + 55, JD_2033_03_01 + 150 + 120,
                                      SY_CHART_MARK_CIRCLE,
                                      "min C3 8.9 km²/s²\n2033-04-25 → 2033-11-27", "Minimum C3"};
    d->markers[1] = (sy_chart_marker){JD_2033_03_01 + 85, JD_2033_03_01 + 150 + 80,
                                      SY_CHART_MARK_DIAMOND,
                                      "min v∞ 2.60 km/s\n2033-05-25 → 2033-10-18", "Minimum arrival v∞"};
    d->tof_days[0] = 120; d->tof_days[1] = 180; d->tof_days[2] = 240; d->tof_days[3] = 300;
    d->tof.tof_days = d->tof_days;
    d->tof.n = 4;
    d->tof.legend = "Flight time, days";
    d->footer[0] = "Model: analytic mean-element ephemeris; Lambert solver (Izzo 2015), 0 rev.";
    d->footer[1] = "Preliminary two-body, patched-conic, mean-element figures; confirm with high-fidelity "
                   "ephemerides and the responsible launch and mission authorities.";
    d->footer[2] = "synodic " PACKAGE_VERSION " - demo data, Kestrel study (fictional)";

    sy_chart *c = &d->chart;
    sy_chart_init(c);
    c->yaxis = SY_CHART_Y_ARRIVAL;
    c->nx = NX;
    c->ny = NY;
    c->x0_jd = JD_2033_03_01;
    c->dx_days = 1.0;
    c->y0 = JD_2033_03_01 + 150;
    c->dy = 1.0;
    c->title = "Kestrel: Earth to Mars, 2033";
    c->subtitle = "Departure C3 and arrival v∞, ballistic, 0 rev";
    c->xtitle = "Departure date (TDB)";
    c->ytitle = "Arrival date (TDB)";
    c->footer = d->footer;
    c->nfooter = 3;
    c->isolines = d->layers;
    c->nisolines = 3;
    c->regions = &d->region;
    c->nregions = 1;
    c->nosol_mask = d->nosol;
    c->nosol_legend = "No transfer";
    c->tof = &d->tof;
    c->boundary = &d->bnd;
    c->markers = d->markers;
    c->nmarkers = 2;
    if (filled) {
        d->fill.z = d->c3;
        d->fill.invalid = d->nosol;
        d->fill.levels = d->c3_levels;
        d->fill.nlevels = d->nc3;
        d->fill.title = "Departure C3, km²/s²";
        c->fill = &d->fill;
    }
    return d;
}

static void demo_free(demo *d)
{
    for (size_t k = 0; k < d->nc3; k++) sy_isoline_set_free(&d->c3_sets[k]);
    for (size_t k = 0; k < d->nvinf; k++) sy_isoline_set_free(&d->vinf_sets[k]);
    for (size_t k = 0; k < d->ndv; k++) sy_isoline_set_free(&d->dv_sets[k]);
    free(d);
}

static const sy_chart_text TEXTS[] = {
    {"Title", "Kestrel: Earth to Mars, 2033"},
    {"Software", "synodic " PACKAGE_VERSION},
    {"Comment", "demo fields; departure 2033-03-01..2033-06-29, arrival 150..350 d later"},
    {"Description", "C3 in km²/s² (UTF-8 text goes to iTXt)"},
};

static void page_set(sy_chart_page *pg, double w, double h, double dpi)
{
    sy_chart_page_init(pg);
    pg->width_in = w;
    pg->height_in = h;
    pg->dpi = dpi;
    pg->text = TEXTS;
    pg->ntext = sizeof TEXTS / sizeof TEXTS[0];
}

static char tmpdir[256];

static void make_tmpdir(void)
{
    snprintf(tmpdir, sizeof tmpdir, "/tmp/check_chart.XXXXXX");
    ck_assert_ptr_nonnull(mkdtemp(tmpdir));
}

static void remove_tmpdir(void)
{
    DIR *dir = opendir(tmpdir);
    if (!dir) return;
    struct dirent *e;
    char p[512];
    while ((e = readdir(dir)) != NULL) {
        if (!strcmp(e->d_name, ".") || !strcmp(e->d_name, "..")) continue;
        snprintf(p, sizeof p, "%s/%s", tmpdir, e->d_name);
        unlink(p);
    }
    closedir(dir);
    rmdir(tmpdir);
}

static char *slurp(const char *path, size_t *n)
{
    FILE *fp = fopen(path, "rb");
    if (!fp) return NULL;
    fseek(fp, 0, SEEK_END);
    long len = ftell(fp);
    fseek(fp, 0, SEEK_SET);
    char *buf = malloc((size_t)len + 1);
    if (buf && fread(buf, 1, (size_t)len, fp) != (size_t)len) { free(buf); buf = NULL; }
    fclose(fp);
    if (buf) { buf[len] = '\0'; if (n) *n = (size_t)len; }
    return buf;
}

static const char *find_bytes(const char *hay, size_t n, const char *needle, size_t m)
{
    for (size_t k = 0; k + m <= n; k++)
        if (memcmp(hay + k, needle, m) == 0) return hay + k;
    return NULL;
}

/* ------------------------------------------------------------------ */
/* PNG                                                                 */

typedef struct {
    png_uint_32 w, h, ppm_x, ppm_y;
    int unit;
    int ntext;
    char keys[16][80];
    char vals[16][256];
    unsigned char *rgba;   /* w*h*4 */
} png_info_t;

static int read_png(const char *path, png_info_t *o)
{
    memset(o, 0, sizeof *o);
    FILE *fp = fopen(path, "rb");
    if (!fp) return 0;
    png_structp png = png_create_read_struct(PNG_LIBPNG_VER_STRING, NULL, NULL, NULL);
    png_infop info = png_create_info_struct(png);
    if (setjmp(png_jmpbuf(png))) {
        png_destroy_read_struct(&png, &info, NULL);
        fclose(fp);
        return 0;
    }
    png_init_io(png, fp);
    png_read_info(png, info);
    o->w = png_get_image_width(png, info);
    o->h = png_get_image_height(png, info);
    png_get_pHYs(png, info, &o->ppm_x, &o->ppm_y, &o->unit);
    png_textp t;
    int nt = 0;
    png_get_text(png, info, &t, &nt);
    for (int k = 0; k < nt && k < 16; k++) {
        snprintf(o->keys[k], sizeof o->keys[k], "%s", t[k].key);
        snprintf(o->vals[k], sizeof o->vals[k], "%s", t[k].text);
    }
    o->ntext = nt;
    png_set_expand(png);
    png_set_strip_16(png);
    png_set_filler(png, 0xff, PNG_FILLER_AFTER);
    png_read_update_info(png, info);
    o->rgba = malloc((size_t)o->w * o->h * 4);
    png_bytep *rows = malloc(o->h * sizeof *rows);
    for (png_uint_32 y = 0; y < o->h; y++) rows[y] = o->rgba + (size_t)y * o->w * 4;
    png_read_image(png, rows);
    png_read_end(png, NULL);
    free(rows);
    png_destroy_read_struct(&png, &info, NULL);
    fclose(fp);
    return 1;
}

static void check_png(const char *path, double w_in, double h_in, double dpi)
{
    png_info_t pi;
    ck_assert_msg(read_png(path, &pi), "libpng cannot decode %s", path);
    ck_assert_uint_eq(pi.w, (png_uint_32)lround(w_in * dpi));
    ck_assert_uint_eq(pi.h, (png_uint_32)lround(h_in * dpi));
    ck_assert_int_eq(pi.unit, PNG_RESOLUTION_METER);
    ck_assert_uint_eq(pi.ppm_x, (png_uint_32)lround(dpi / 0.0254));
    ck_assert_uint_eq(pi.ppm_y, (png_uint_32)lround(dpi / 0.0254));
    for (size_t k = 0; k < sizeof TEXTS / sizeof TEXTS[0]; k++) {
        int found = 0;
        for (int q = 0; q < pi.ntext && q < 16; q++)
            if (!strcmp(pi.keys[q], TEXTS[k].key)) {
                ck_assert_str_eq(pi.vals[q], TEXTS[k].value);
                found = 1;
            }
        ck_assert_msg(found, "text chunk %s missing in %s", TEXTS[k].key, path);
    }
    /* not blank: count non-white pixels and distinct colours in the
     * middle half of the image (inside the plot on this layout) */
    size_t nonwhite = 0, total = 0, ndistinct = 0;
    static unsigned char seen[1 << 15];
    memset(seen, 0, sizeof seen);
    for (png_uint_32 y = pi.h / 4; y < 3 * pi.h / 4; y++)
        for (png_uint_32 x = pi.w / 4; x < 3 * pi.w / 4; x++) {
            const unsigned char *p = pi.rgba + ((size_t)y * pi.w + x) * 4;
            total++;
            if (p[0] < 250 || p[1] < 250 || p[2] < 250) nonwhite++;
            unsigned key = (unsigned)(p[0] >> 3) << 10 | (unsigned)(p[1] >> 3) << 5 | (p[2] >> 3);
            if (!seen[key]) { seen[key] = 1; ndistinct++; }
        }
    ck_assert_msg(nonwhite > total / 50, "%s: plot nearly blank (%zu of %zu pixels)", path, nonwhite, total);
    ck_assert_msg(ndistinct > 40, "%s: only %zu distinct colours", path, ndistinct);
    free(pi.rgba);
}

START_TEST(test_png_column_and_page)
{
    make_tmpdir();
    demo *d = demo_new(0);
    sy_chart_page pg;
    sy_error err = {{0}};
    char path[512];
    snprintf(path, sizeof path, "%s/column.png", tmpdir);
    page_set(&pg, 3.5, 3.0, 300);
    ck_assert_msg(sy_chart_write(&d->chart, &pg, path, &err) == SY_OK, "%s", err.msg);
    check_png(path, 3.5, 3.0, 300);
    snprintf(path, sizeof path, "%s/page.png", tmpdir);
    page_set(&pg, 10, 7.5, 150);
    ck_assert_msg(sy_chart_write(&d->chart, &pg, path, &err) == SY_OK, "%s", err.msg);
    check_png(path, 10, 7.5, 150);
    demo_free(d);
    remove_tmpdir();
}
END_TEST

START_TEST(test_png_filled)
{
    make_tmpdir();
    demo *d = demo_new(1);
    sy_chart_page pg;
    sy_error err = {{0}};
    char path[512];
    snprintf(path, sizeof path, "%s/filled.png", tmpdir);
    page_set(&pg, 6.5, 4.5, 200);
    ck_assert_msg(sy_chart_write(&d->chart, &pg, path, &err) == SY_OK, "%s", err.msg);
    check_png(path, 6.5, 4.5, 200);
    demo_free(d);
    remove_tmpdir();
}
END_TEST

/* ------------------------------------------------------------------ */
/* SVG and PDF                                                         */

START_TEST(test_svg)
{
    make_tmpdir();
    demo *d = demo_new(0);
    sy_chart_page pg;
    sy_error err = {{0}};
    char a[512], b[512], cmd[1200];
    snprintf(a, sizeof a, "%s/a.svg", tmpdir);
    snprintf(b, sizeof b, "%s/b.svg", tmpdir);
    page_set(&pg, 3.5, 3.0, 300);
    ck_assert_msg(sy_chart_write(&d->chart, &pg, a, &err) == SY_OK, "%s", err.msg);
    /* a second chart in between moves cairo's process-wide id counters */
    demo *d2 = demo_new(1);
    snprintf(b, sizeof b, "%s/other.svg", tmpdir);
    ck_assert_msg(sy_chart_write(&d2->chart, &pg, b, &err) == SY_OK, "%s", err.msg);
    demo_free(d2);
    snprintf(b, sizeof b, "%s/b.svg", tmpdir);
    ck_assert_msg(sy_chart_write(&d->chart, &pg, b, &err) == SY_OK, "%s", err.msg);

    snprintf(cmd, sizeof cmd, "xmllint --noout '%s' 2>/dev/null", a);
    if (system("command -v xmllint >/dev/null 2>&1") == 0)
        ck_assert_msg(system(cmd) == 0, "xmllint rejects %s", a);
    size_t na, nb;
    char *sa = slurp(a, &na), *sb = slurp(b, &nb);
    ck_assert_ptr_nonnull(sa);
    ck_assert_ptr_nonnull(sb);
    ck_assert_msg(na == nb && memcmp(sa, sb, na) == 0, "SVG differs between two renders");
    ck_assert_ptr_nonnull(strstr(sa, "<title>Kestrel: Earth to Mars, 2033</title>"));
    ck_assert_ptr_nonnull(strstr(sa, "min C3 8.9 km²/s²"));
    ck_assert_ptr_nonnull(strstr(sa, "Legend: Departure C3, km²/s²"));
    ck_assert_ptr_nonnull(strstr(sa, "Boundary side: Type I\n"));
    ck_assert_ptr_nonnull(strstr(sa, "Boundary side: Type II\n"));
    ck_assert_ptr_nonnull(strstr(sa, "Level: 15"));
    ck_assert_ptr_nonnull(strstr(sa, "confirm with high-fidelity ephemerides"));
    /* glyphs are drawn: cairo emits <use> references to glyph symbols */
    ck_assert_ptr_nonnull(strstr(sa, "glyph"));
    free(sa);
    free(sb);
    demo_free(d);
    remove_tmpdir();
}
END_TEST

START_TEST(test_pdf)
{
    make_tmpdir();
    demo *d = demo_new(1);
    sy_chart_page pg;
    sy_error err = {{0}};
    char a[512], b[512], cmd[1200];
    snprintf(a, sizeof a, "%s/a.pdf", tmpdir);
    snprintf(b, sizeof b, "%s/b.pdf", tmpdir);
    page_set(&pg, 10, 7.5, 300);
    unsetenv("SOURCE_DATE_EPOCH");
    ck_assert_msg(sy_chart_write(&d->chart, &pg, a, &err) == SY_OK, "%s", err.msg);
    sleep(1); /* a clock-derived date would now differ */
    ck_assert_msg(sy_chart_write(&d->chart, &pg, b, &err) == SY_OK, "%s", err.msg);
    size_t na, nb;
    char *sa = slurp(a, &na), *sb = slurp(b, &nb);
    ck_assert_ptr_nonnull(sa);
    ck_assert(na > 1000 && memcmp(sa, "%PDF-", 5) == 0);
    ck_assert_msg(na == nb && memcmp(sa, sb, na) == 0, "PDF differs between two renders");
    ck_assert_msg(find_bytes(sa, na, "/CreationDate", 13) == NULL, "PDF carries a creation date");
    /* with SOURCE_DATE_EPOCH the date is that instant: 1700000000 s after
     * 1970-01-01 is 2023-11-14T22:13:20Z (date -u -d @1700000000) */
    setenv("SOURCE_DATE_EPOCH", "1700000000", 1);
    ck_assert_msg(sy_chart_write(&d->chart, &pg, b, &err) == SY_OK, "%s", err.msg);
    unsetenv("SOURCE_DATE_EPOCH");
    free(sb);
    sb = slurp(b, &nb);
    ck_assert_ptr_nonnull(sb);
    /* cairo 1.16 writes the date without the "D:" prefix, later versions with */
    ck_assert(find_bytes(sb, nb, "/CreationDate (D:20231114221320", 31) != NULL ||
              find_bytes(sb, nb, "/CreationDate (20231114221320", 29) != NULL);
    free(sa);
    free(sb);
    if (system("command -v pdfinfo >/dev/null 2>&1") == 0) {
        char out[600];
        snprintf(out, sizeof out, "%s/info.txt", tmpdir);
        snprintf(cmd, sizeof cmd, "pdfinfo '%s' > '%s' 2>&1", a, out);
        ck_assert_int_eq(system(cmd), 0);
        char *info = slurp(out, NULL);
        ck_assert_ptr_nonnull(info);
        char *pages = strstr(info, "Pages:");
        ck_assert_ptr_nonnull(pages);
        ck_assert_int_eq(atoi(pages + 6), 1);
        ck_assert_ptr_nonnull(strstr(info, "Kestrel: Earth to Mars, 2033"));
        ck_assert_ptr_nonnull(strstr(info, "synodic " PACKAGE_VERSION));
        /* 10 x 7.5 in = 720 x 540 pt */
        ck_assert_ptr_nonnull(strstr(info, "720 x 540 pts"));
        free(info);
    }
    demo_free(d);
    remove_tmpdir();
}
END_TEST

START_TEST(test_tof_axis)
{
    /* same demo on time-of-flight axes: y0 = 150 d, dy = 1 d */
    make_tmpdir();
    demo *d = demo_new(0);
    d->chart.yaxis = SY_CHART_Y_TOF;
    d->chart.y0 = 150;
    d->chart.ytitle = "Time of flight, days";
    d->chart.boundary = NULL;
    d->markers[0].y = 270;
    d->markers[1].y = 230;
    sy_chart_page pg;
    sy_error err = {{0}};
    char path[512];
    snprintf(path, sizeof path, "%s/tof.png", tmpdir);
    page_set(&pg, 3.5, 3.0, 300);
    ck_assert_msg(sy_chart_write(&d->chart, &pg, path, &err) == SY_OK, "%s", err.msg);
    check_png(path, 3.5, 3.0, 300);
    demo_free(d);
    remove_tmpdir();
}
END_TEST

/* ------------------------------------------------------------------ */
/* Errors                                                              */

static int count_entries(const char *dir)
{
    DIR *dd = opendir(dir);
    if (!dd) return -1;
    int n = 0;
    struct dirent *e;
    while ((e = readdir(dd)) != NULL)
        if (strcmp(e->d_name, ".") && strcmp(e->d_name, "..")) n++;
    closedir(dd);
    return n;
}

START_TEST(test_missing_directory)
{
    make_tmpdir();
    demo *d = demo_new(0);
    sy_chart_page pg;
    page_set(&pg, 3.5, 3.0, 100);
    static const char *ext[3] = {"png", "svg", "pdf"};
    for (int k = 0; k < 3; k++) {
        sy_error err = {{0}};
        char path[512];
        snprintf(path, sizeof path, "%s/no/such/dir/chart.%s", tmpdir, ext[k]);
        ck_assert_int_eq(sy_chart_write(&d->chart, &pg, path, &err), SY_ERR_IO);
        ck_assert_msg(strstr(err.msg, path) != NULL, "message lacks the path: %s", err.msg);
        ck_assert_int_eq(access(path, F_OK), -1);
    }
    ck_assert_int_eq(count_entries(tmpdir), 0);
    demo_free(d);
    remove_tmpdir();
}
END_TEST

/* A write that fails half-way (here: the file size limit, EFBIG, standing
 * in for a full disk) is reported with the path and the system's reason,
 * and neither the chart nor its temporary is left behind. */
START_TEST(test_write_failure)
{
    make_tmpdir();
    demo *d = demo_new(0);
    sy_chart_page pg;
    page_set(&pg, 3.5, 3.0, 300);
    struct rlimit old, small;
    ck_assert_int_eq(getrlimit(RLIMIT_FSIZE, &old), 0);
    small = old;
    small.rlim_cur = 20000;   /* bytes; every format here is larger */
    signal(SIGXFSZ, SIG_IGN); /* get EFBIG instead of the signal */
    static const char *ext[3] = {"png", "svg", "pdf"};
    for (int k = 0; k < 3; k++) {
        sy_error err = {{0}};
        char path[512];
        snprintf(path, sizeof path, "%s/big.%s", tmpdir, ext[k]);
        ck_assert_int_eq(setrlimit(RLIMIT_FSIZE, &small), 0);
        sy_status st = sy_chart_write(&d->chart, &pg, path, &err);
        ck_assert_int_eq(setrlimit(RLIMIT_FSIZE, &old), 0);
        ck_assert_int_eq(st, SY_ERR_IO);
        ck_assert_msg(strstr(err.msg, path) != NULL, "message lacks the path: %s", err.msg);
        ck_assert_msg(strstr(err.msg, strerror(EFBIG)) != NULL, "message lacks the reason: %s", err.msg);
        ck_assert_int_eq(count_entries(tmpdir), 0);
    }
    signal(SIGXFSZ, SIG_DFL);
    demo_free(d);
    remove_tmpdir();
}
END_TEST

START_TEST(test_bad_arguments)
{
    make_tmpdir();
    demo *d = demo_new(0);
    sy_chart_page pg;
    page_set(&pg, 3.5, 3.0, 100);
    sy_error err = {{0}};
    char path[512];
    snprintf(path, sizeof path, "%s/chart.txt", tmpdir);
    ck_assert_int_eq(sy_chart_write(&d->chart, &pg, path, &err), SY_ERR_ARG);
    ck_assert_ptr_nonnull(strstr(err.msg, ".png"));
    snprintf(path, sizeof path, "%s/chart.png", tmpdir);
    d->chart.dx_days = 0;
    ck_assert_int_eq(sy_chart_write(&d->chart, &pg, path, &err), SY_ERR_ARG);
    ck_assert_ptr_nonnull(strstr(err.msg, "dx_days"));
    d->chart.dx_days = 1;
    sy_chart_text bad = {"", "x"};
    pg.text = &bad;
    pg.ntext = 1;
    ck_assert_int_eq(sy_chart_write(&d->chart, &pg, path, &err), SY_ERR_ARG);
    ck_assert_ptr_nonnull(strstr(err.msg, "key"));
    /* a failed write leaves nothing behind, not even the temporary */
    ck_assert_int_eq(count_entries(tmpdir), 0);
    demo_free(d);
    remove_tmpdir();
}
END_TEST

/* ------------------------------------------------------------------ */
/* Label placement and formatting                                      */

static void check_boxes(const sy_chart *c, double w, double h)
{
    sy_chart_page pg;
    page_set(&pg, w, h, 300);
    sy_error err = {{0}};
    size_t n = 0;
    double rect[4];
    static sy_chart_box boxes[512];
    ck_assert_msg(sy_chart_layout_boxes(c, &pg, boxes, 512, &n, rect, &err) == SY_OK, "%s", err.msg);
    ck_assert_uint_le(n, 512);
    size_t nlevel = 0, nmark = 0, nbound = 0;
    for (size_t a = 0; a < n; a++) {
        if (boxes[a].kind == SY_CHART_BOX_LEVEL) nlevel++;
        if (boxes[a].kind == SY_CHART_BOX_MARKER_LABEL) nmark++;
        if (boxes[a].kind == SY_CHART_BOX_BOUNDARY) nbound++;
        /* upright: rotation within (-90, 90] degrees */
        ck_assert(boxes[a].angle_rad > -M_PI / 2 - 1e-12 && boxes[a].angle_rad <= M_PI / 2 + 1e-12);
        /* inside the plot: every corner */
        double ca = cos(boxes[a].angle_rad), sa = sin(boxes[a].angle_rad);
        for (int q = 0; q < 4; q++) {
            double sx = (q & 1) ? 1 : -1, sy = (q & 2) ? 1 : -1;
            double px = boxes[a].cx + sx * boxes[a].half_w * ca - sy * boxes[a].half_h * sa;
            double py = boxes[a].cy + sx * boxes[a].half_w * sa + sy * boxes[a].half_h * ca;
            if (boxes[a].kind != SY_CHART_BOX_MARKER) {
                ck_assert_msg(px >= rect[0] - 1e-9 && px <= rect[2] + 1e-9 && py >= rect[1] - 1e-9 &&
                                  py <= rect[3] + 1e-9,
                              "box '%s' leaves the plot", boxes[a].text);
            }
        }
        for (size_t b = a + 1; b < n; b++) {
            /* marker symbols of different markers may sit close; every
             * other pair must be apart */
            if (boxes[a].kind == SY_CHART_BOX_MARKER && boxes[b].kind == SY_CHART_BOX_MARKER) continue;
            ck_assert_msg(!sy_chart_boxes_overlap(&boxes[a], &boxes[b], 0.0),
                          "boxes '%s' and '%s' overlap", boxes[a].text, boxes[b].text);
        }
    }
    ck_assert_uint_ge(nlevel, 6);   /* most levels got a label */
    ck_assert_uint_eq(nmark, 2);
    ck_assert_uint_eq(nbound, 2);
}

START_TEST(test_label_boxes_disjoint)
{
    demo *d = demo_new(0);
    check_boxes(&d->chart, 3.5, 3.0);
    check_boxes(&d->chart, 10, 7.5);
    demo_free(d);
}
END_TEST

START_TEST(test_box_overlap_function)
{
    /* the separating-axis test itself, on hand-made cases */
    sy_chart_box a = {0, 0, 2, 1, 0, SY_CHART_BOX_LEVEL, "a"};
    sy_chart_box b = {3.9, 0, 2, 1, 0, SY_CHART_BOX_LEVEL, "b"};
    ck_assert(sy_chart_boxes_overlap(&a, &b, 0));
    b.cx = 4.1;
    ck_assert(!sy_chart_boxes_overlap(&a, &b, 0));
    ck_assert(sy_chart_boxes_overlap(&a, &b, 0.2));
    /* rotated 45 deg: a 2x2 square at distance 2.9 along x with corners
     * reaching sqrt(2) = 1.414 -> 1 + 1.414 < 2.9 -> apart */
    sy_chart_box c = {0, 0, 1, 1, 0, SY_CHART_BOX_LEVEL, "c"};
    sy_chart_box e = {2.5, 0, 1, 1, M_PI / 4, SY_CHART_BOX_LEVEL, "e"};
    ck_assert(!sy_chart_boxes_overlap(&c, &e, 0));
    e.cx = 2.3;
    ck_assert(sy_chart_boxes_overlap(&c, &e, 0));
}
END_TEST

START_TEST(test_level_format)
{
    char b[32];
    sy_chart_format_level(12, 2, b, sizeof b);
    ck_assert_str_eq(b, "12");
    sy_chart_format_level(7.5, 2.5, b, sizeof b);
    ck_assert_str_eq(b, "7.5");
    sy_chart_format_level(10, 2.5, b, sizeof b);
    ck_assert_str_eq(b, "10");
    sy_chart_format_level(0.25, 0.25, b, sizeof b);
    ck_assert_str_eq(b, "0.25");
    sy_chart_format_level(3.25, 0.25, b, sizeof b);
    ck_assert_str_eq(b, "3.25");
    sy_chart_format_level(-0.0000001, 0.5, b, sizeof b);
    ck_assert_str_eq(b, "0");
    sy_chart_format_level(1500, 500, b, sizeof b);
    ck_assert_str_eq(b, "1500");
    ck_assert_int_eq(sy_chart_format_from_path("a/b.PNG"), SY_CHART_FMT_PNG);
    ck_assert_int_eq(sy_chart_format_from_path("x.svg"), SY_CHART_FMT_SVG);
    ck_assert_int_eq(sy_chart_format_from_path("x.pdf"), SY_CHART_FMT_PDF);
    ck_assert_int_eq(sy_chart_format_from_path("x.tiff"), SY_CHART_FMT_AUTO);
}
END_TEST

/* Release the process-wide font caches (pango's default font map, cairo's
 * static data, fontconfig's configuration) after each test, so that
 * LeakSanitizer reports only what the renderer itself might leak. */
static void release_font_caches(void)
{
    sy_chart_release_caches();
}

#ifndef CHECK_CHART_NO_MAIN
static Suite *chart_suite(void)
{
    Suite *s = suite_create("chart");
    TCase *t = tcase_create("render");
    tcase_set_timeout(t, 120);
    tcase_add_checked_fixture(t, NULL, release_font_caches);
    tcase_add_test(t, test_png_column_and_page);
    tcase_add_test(t, test_png_filled);
    tcase_add_test(t, test_svg);
    tcase_add_test(t, test_pdf);
    tcase_add_test(t, test_tof_axis);
    tcase_add_test(t, test_missing_directory);
    tcase_add_test(t, test_write_failure);
    tcase_add_test(t, test_bad_arguments);
    tcase_add_test(t, test_label_boxes_disjoint);
    tcase_add_test(t, test_box_overlap_function);
    tcase_add_test(t, test_level_format);
    suite_add_tcase(s, t);
    return s;
}

int main(void)
{
    return tu_run(chart_suite());
}
#endif
