/* check_atlas.c - tests of the path layer of porkchop charts, of the
 * comparison figures, table pages and multi-page documents
 * (src/lib/atlas.c, src/lib/chart.c).
 *
 * All data here are demo values of the fictional "Kestrel" study (the
 * porkchop demo of check_chart.c, reused by inclusion; an invented
 * sequence of Earth-to-Mars opportunities).  As in check_chart.c the
 * checks judge the files with references from outside the project:
 *   - libpng decodes the PNG (size, pHYs per PNG 1.2 section 4.2.4.2);
 *   - xmllint (libxml2-utils) checks the SVG is well-formed XML;
 *   - pdfinfo (poppler-utils) reads the PDF, its page count and size;
 *   - pdftotext (poppler-utils) extracts the text of the table pages.
 *
 * With ATLAS_SAMPLES=DIR set, the files are also copied to DIR for
 * viewing.
 */
#define CHECK_CHART_NO_MAIN 1
#if defined(__GNUC__)
#pragma GCC diagnostic push
#pragma GCC diagnostic ignored "-Wunused-function"
#pragma GCC diagnostic ignored "-Wunused-variable"
#endif
#include "check_chart.c"
#if defined(__GNUC__)
#pragma GCC diagnostic pop
#endif

#include "synodic/atlas.h"

/* ------------------------------------------------------------------ */
/* Helpers                                                             */

static void keep_sample(const char *path, const char *name)
{
    const char *dir = getenv("ATLAS_SAMPLES");
    if (!dir || !*dir) return;
    size_t n;
    char *buf = slurp(path, &n);
    if (!buf) return;
    char out[700];
    snprintf(out, sizeof out, "%s/%s", dir, name);
    FILE *fp = fopen(out, "wb");
    if (fp) {
        fwrite(buf, 1, n, fp);
        fclose(fp);
    }
    free(buf);
}

static int have_tool(const char *name)
{
    char cmd[200];
    snprintf(cmd, sizeof cmd, "command -v %s >/dev/null 2>&1", name);
    return system(cmd) == 0;
}

/* pdfinfo's "Pages:" value, or -1. */
static int pdf_pages(const char *pdf, char *info_out, size_t info_len)
{
    char out[600], cmd[1400];
    snprintf(out, sizeof out, "%s.info", pdf);
    snprintf(cmd, sizeof cmd, "pdfinfo '%s' > '%s' 2>&1", pdf, out);
    int rc = system(cmd);
    char *info = slurp(out, NULL);
    unlink(out);
    if (rc != 0 || !info) { free(info); return -1; }
    if (info_out) snprintf(info_out, info_len, "%s", info);
    char *p = strstr(info, "Pages:");
    int n = p ? atoi(p + 6) : -1;
    free(info);
    return n;
}

/* ------------------------------------------------------------------ */
/* Demo: a launch period on the porkchop demo                          */

#define NPER 41
typedef struct {
    double x[NPER], y[NPER];
    sy_chart_path path;
} period_demo;

/* One point per departure day over 41 days centred on the demo's C3
 * optimum (grid i = 55, j = 120), each at the arrival day of least C3
 * for that departure: for c3 = a u^2 + b v^2 + c u v the minimum over v
 * lies at v = -c u / (2 b) = -0.6111 u (demo field of check_chart.c). */
static void period_fill(period_demo *p)
{
    for (int k = 0; k < NPER; k++) {
        double u = (double)(k - NPER / 2);
        p->x[k] = JD_2033_03_01 + 55 + u;
        p->y[k] = JD_2033_03_01 + 150 + 120 - 0.0022 / (2 * 0.0018) * u;
    }
    p->path.x_jd = p->x;
    p->path.y = p->y;
    p->path.n = NPER;
    p->path.label = "Launch period\n41 days, C3 ≤ 10.4 km²/s²";
    p->path.legend = "Launch period (daily arrival of least C3)";
}

START_TEST(test_path_layer)
{
    make_tmpdir();
    demo *d = demo_new(0);
    period_demo pd;
    period_fill(&pd);
    d->chart.paths = &pd.path;
    d->chart.npaths = 1;
    sy_chart_page pg;
    sy_error err = {{0}};
    char svg[512], svg2[512], png[512];

    /* SVG: the <desc> names the path and its legend entry */
    snprintf(svg, sizeof svg, "%s/path.svg", tmpdir);
    snprintf(svg2, sizeof svg2, "%s/path2.svg", tmpdir);
    page_set(&pg, 3.5, 3.0, 300);
    ck_assert_msg(sy_chart_write(&d->chart, &pg, svg, &err) == SY_OK, "%s", err.msg);
    ck_assert_msg(sy_chart_write(&d->chart, &pg, svg2, &err) == SY_OK, "%s", err.msg);
    ck_assert_msg(tu_files_equal(svg, svg2), "SVG with a path differs between two renders");
    char *s = slurp(svg, NULL);
    ck_assert_ptr_nonnull(s);
    ck_assert_ptr_nonnull(strstr(s, "Path: Launch period\n41 days, C3 ≤ 10.4 km²/s²"));
    ck_assert_ptr_nonnull(strstr(s, "Legend: Launch period (daily arrival of least C3)"));
    free(s);
    if (have_tool("xmllint")) {
        char cmd[700];
        snprintf(cmd, sizeof cmd, "xmllint --noout '%s' 2>/dev/null", svg);
        ck_assert_msg(system(cmd) == 0, "xmllint rejects %s", svg);
    }

    /* layout: one path label, inside the plot, clear of every other
     * text; path pieces clear of every text but may cross symbols */
    for (int size = 0; size < 2; size++) {
        double w = size ? 10 : 3.5, h = size ? 7.5 : 3.0;
        page_set(&pg, w, h, 300);
        static sy_chart_box boxes[1024];
        size_t n = 0;
        double rect[4];
        ck_assert_msg(sy_chart_layout_boxes(&d->chart, &pg, boxes, 1024, &n, rect, &err) == SY_OK,
                      "%s", err.msg);
        ck_assert_uint_le(n, 1024);
        size_t nlab = 0, nseg = 0;
        for (size_t a = 0; a < n; a++) {
            if (boxes[a].kind == SY_CHART_BOX_PATH_LABEL) {
                nlab++;
                ck_assert(boxes[a].cx - boxes[a].half_w >= rect[0] - 1e-9);
                ck_assert(boxes[a].cx + boxes[a].half_w <= rect[2] + 1e-9);
                ck_assert(boxes[a].cy - boxes[a].half_h >= rect[1] - 1e-9);
                ck_assert(boxes[a].cy + boxes[a].half_h <= rect[3] + 1e-9);
            }
            if (boxes[a].kind == SY_CHART_BOX_PATH) nseg++;
            for (size_t b = a + 1; b < n; b++) {
                int ka = boxes[a].kind, kb = boxes[b].kind;
                if (ka == SY_CHART_BOX_MARKER && kb == SY_CHART_BOX_MARKER) continue;
                if ((ka == SY_CHART_BOX_PATH) + (kb == SY_CHART_BOX_PATH) +
                        (ka == SY_CHART_BOX_MARKER) + (kb == SY_CHART_BOX_MARKER) >= 2 &&
                    (ka == SY_CHART_BOX_PATH || kb == SY_CHART_BOX_PATH))
                    continue;   /* path pieces meet each other and symbols */
                ck_assert_msg(!sy_chart_boxes_overlap(&boxes[a], &boxes[b], 0.0),
                              "%.1f in: boxes '%s' (kind %d) and '%s' (kind %d) overlap", w,
                              boxes[a].text, ka, boxes[b].text, kb);
            }
        }
        ck_assert_uint_eq(nlab, 1);
        ck_assert_uint_ge(nseg, NPER / 2);   /* most of the line is reserved */

        /* PNG: the gold core of the path is where the data say it is.
         * Map a path point through the plot rectangle (x: departure
         * 2033-03-01..+120 d, y: arrival +150..+350 d), look at the
         * pixel, and count how many points show the core colour
         * #F2B600 (within 40 per channel; markers and end dots sit on
         * some). */
        snprintf(png, sizeof png, "%s/path%d.png", tmpdir, size);
        page_set(&pg, w, h, 200);
        ck_assert_msg(sy_chart_write(&d->chart, &pg, png, &err) == SY_OK, "%s", err.msg);
        check_png(png, w, h, 200);
        keep_sample(png, size ? "porkchop-path-10in.png" : "porkchop-path-3.5in.png");
        png_info_t pi;
        ck_assert(read_png(png, &pi));
        int gold = 0;
        for (int k = 0; k + 1 < NPER; k++) {
            /* half-way between two days: the dots sit on the days */
            double xm = 0.5 * (pd.x[k] + pd.x[k + 1]), ym = 0.5 * (pd.y[k] + pd.y[k + 1]);
            double X = rect[0] + (xm - JD_2033_03_01) / 120.0 * (rect[2] - rect[0]);
            double Y = rect[3] - (ym - (JD_2033_03_01 + 150)) / 200.0 * (rect[3] - rect[1]);
            long px = lround(X * 200 / 72.0), py = lround(Y * 200 / 72.0);
            const unsigned char *q = pi.rgba + ((size_t)py * pi.w + (size_t)px) * 4;
            if (abs(q[0] - 0xF2) < 40 && abs(q[1] - 0xB6) < 40 && q[2] < 40) gold++;
        }
        ck_assert_msg(gold >= (NPER - 1) * 3 / 4,
                      "%.1f in: only %d of %d path points show the path colour", w, gold, NPER - 1);
        free(pi.rgba);
    }
    demo_free(d);
    remove_tmpdir();
}
END_TEST

START_TEST(test_path_arguments)
{
    demo *d = demo_new(0);
    sy_chart_path bad = {NULL, NULL, 3, "x", NULL};
    d->chart.paths = &bad;
    d->chart.npaths = 1;
    sy_chart_page pg;
    page_set(&pg, 3.5, 3.0, 100);
    sy_error err = {{0}};
    ck_assert_int_eq(sy_chart_layout_boxes(&d->chart, &pg, NULL, 0, NULL, NULL, &err), SY_ERR_ARG);
    ck_assert_msg(strstr(err.msg, "paths[0]") != NULL, "%s", err.msg);
    d->chart.paths = NULL;
    ck_assert_int_eq(sy_chart_layout_boxes(&d->chart, &pg, NULL, 0, NULL, NULL, &err), SY_ERR_ARG);
    ck_assert_msg(strstr(err.msg, "npaths") != NULL, "%s", err.msg);
    /* gaps (NAN) and an empty path are fine */
    double xs[3] = {JD_2033_03_01 + 10, NAN, JD_2033_03_01 + 30};
    double ys[3] = {JD_2033_03_01 + 200, JD_2033_03_01 + 210, JD_2033_03_01 + 220};
    sy_chart_path ok[2] = {{xs, ys, 3, "gappy", "gappy"}, {NULL, NULL, 0, NULL, NULL}};
    d->chart.paths = ok;
    d->chart.npaths = 2;
    ck_assert_msg(sy_chart_layout_boxes(&d->chart, &pg, NULL, 0, NULL, NULL, &err) == SY_OK, "%s",
                  err.msg);
    demo_free(d);
}
END_TEST

/* ------------------------------------------------------------------ */
/* Demo: a comparison figure                                           */

#define NOPP 9
typedef struct {
    double jd[NOPP], c3_1[NOPP], c3_2[NOPP], v_1[NOPP], v_2[NOPP], dv[NOPP];
    sy_xy_series s0[2], s1[2], s2[1];
    const char *footer[3];
    sy_xy_chart xy;
} xy_demo;

/* Invented opportunities, one per ~780 d (about the Earth-Mars synodic
 * period, common practice) from 2028-11-10; the values are made up. */
static void xy_fill(xy_demo *d, size_t npanels)
{
    static const double c3a[NOPP] = {10.9, 8.6, 14.1, 17.8, 15.3, 9.4, 8.9, 12.6, 16.9};
    static const double c3b[NOPP] = {12.2, 9.8, 11.7, 14.9, 18.8, 13.1, 10.2, 10.9, 15.6};
    static const double va[NOPP] = {3.1, 2.7, 3.6, 4.9, 4.4, 2.9, 2.6, 3.3, 4.6};
    static const double vb[NOPP] = {2.6, 2.5, 2.9, 3.4, 3.8, 3.0, 2.7, 2.6, 3.2};
    memset(d, 0, sizeof *d);
    for (int k = 0; k < NOPP; k++) {
        d->jd[k] = 2462085.5 + 780.0 * k;  /* 2028-11-10 = JD 2462085.5 */
        d->c3_1[k] = c3a[k];
        d->c3_2[k] = c3b[k];
        d->v_1[k] = va[k];
        d->v_2[k] = vb[k];
        d->dv[k] = 0.35 * sqrt(c3a[k]) + va[k] + 0.2 * k;
    }
    d->c3_2[4] = NAN;   /* a gap: no Type II solution that time */
    d->s0[0] = (sy_xy_series){d->jd, d->c3_1, NOPP, SY_CHART_MARK_CIRCLE, SY_CHART_PRIMARY, 1, "Type I"};
    d->s0[1] = (sy_xy_series){d->jd, d->c3_2, NOPP, SY_CHART_MARK_SQUARE, SY_CHART_SECONDARY, 1, "Type II"};
    d->s1[0] = (sy_xy_series){d->jd, d->v_1, NOPP, SY_CHART_MARK_CIRCLE, SY_CHART_PRIMARY, 1, "Type I"};
    d->s1[1] = (sy_xy_series){d->jd, d->v_2, NOPP, SY_CHART_MARK_SQUARE, SY_CHART_SECONDARY, 1, "Type II"};
    d->s2[0] = (sy_xy_series){d->jd, d->dv, NOPP, SY_CHART_MARK_DIAMOND, SY_CHART_TERTIARY, 0,
                              "Total Δv, best type"};
    d->footer[0] = "Model: analytic mean-element ephemeris; Lambert solver, 0 rev; demo values.";
    d->footer[1] = "Preliminary two-body, patched-conic, mean-element figures; confirm with "
                   "high-fidelity ephemerides and the responsible launch and mission authorities.";
    d->footer[2] = "synodic " PACKAGE_VERSION " - Kestrel study (fictional)";
    sy_xy_chart *xy = &d->xy;
    xy->title = "Kestrel: Earth to Mars opportunities 2028-2046";
    xy->subtitle = "Best transfer of each opportunity, ballistic";
    xy->xtitle = "Departure date (TDB)";
    xy->x_is_date = 1;
    xy->panels[0] = (sy_xy_panel){"Minimum C3 (km²/s²)", d->s0, 2};
    xy->panels[1] = (sy_xy_panel){"Arrival v∞ (km/s)", d->s1, 2};
    xy->panels[2] = (sy_xy_panel){"Total Δv (km/s)", d->s2, 1};
    xy->npanels = npanels;
    xy->footer = d->footer;
    xy->nfooter = 3;
}

/* Count pixels within 30 per channel of a colour. */
static size_t count_colour(const png_info_t *pi, unsigned hex)
{
    int r = (int)(hex >> 16 & 0xff), g = (int)(hex >> 8 & 0xff), b = (int)(hex & 0xff);
    size_t n = 0;
    for (size_t k = 0; k < (size_t)pi->w * pi->h; k++) {
        const unsigned char *q = pi->rgba + 4 * k;
        if (abs(q[0] - r) < 30 && abs(q[1] - g) < 30 && abs(q[2] - b) < 30) n++;
    }
    return n;
}

START_TEST(test_xy_png)
{
    make_tmpdir();
    static xy_demo d;
    sy_chart_page pg;
    sy_error err = {{0}};
    char path[512];
    static const struct { double w, h, dpi; size_t np; const char *name; } cases[] = {
        {3.5, 3.4, 300, 2, "xy-3.5in.png"},
        {3.5, 4.2, 300, 3, "xy-3.5in-3panels.png"},
        {7.5, 6.0, 150, 3, "xy-7.5in.png"},
    };
    for (size_t c = 0; c < sizeof cases / sizeof cases[0]; c++) {
        xy_fill(&d, cases[c].np);
        page_set(&pg, cases[c].w, cases[c].h, cases[c].dpi);
        snprintf(path, sizeof path, "%s/%s", tmpdir, cases[c].name);
        ck_assert_msg(sy_xy_write(&d.xy, &pg, path, &err) == SY_OK, "%s", err.msg);
        check_png(path, cases[c].w, cases[c].h, cases[c].dpi);
        keep_sample(path, cases[c].name);
        /* the series are drawn in their role colours: primary #1F4A99,
         * secondary #D35F0D (chart.c palette) */
        png_info_t pi;
        ck_assert(read_png(path, &pi));
        size_t area = (size_t)pi.w * pi.h;
        ck_assert_msg(count_colour(&pi, 0x1F4A99) > area / 2000, "%s: no primary-colour series", path);
        ck_assert_msg(count_colour(&pi, 0xD35F0D) > area / 2000, "%s: no secondary-colour series", path);
        if (cases[c].np == 3)
            ck_assert_msg(count_colour(&pi, 0x993333) > area / 4000, "%s: no tertiary series", path);
        free(pi.rgba);
    }
    remove_tmpdir();
}
END_TEST

START_TEST(test_xy_svg_pdf)
{
    make_tmpdir();
    static xy_demo d;
    xy_fill(&d, 3);
    sy_chart_page pg;
    page_set(&pg, 7.5, 6.0, 150);
    pg.text = NULL;   /* the title then comes from the figure */
    pg.ntext = 0;
    sy_error err = {{0}};
    char a[512], b[512], other[512];
    snprintf(a, sizeof a, "%s/a.svg", tmpdir);
    snprintf(b, sizeof b, "%s/b.svg", tmpdir);
    snprintf(other, sizeof other, "%s/other.svg", tmpdir);
    ck_assert_msg(sy_xy_write(&d.xy, &pg, a, &err) == SY_OK, "%s", err.msg);
    /* a porkchop in between moves cairo's process-wide id counters */
    demo *pk = demo_new(1);
    ck_assert_msg(sy_chart_write(&pk->chart, &pg, other, &err) == SY_OK, "%s", err.msg);
    demo_free(pk);
    ck_assert_msg(sy_xy_write(&d.xy, &pg, b, &err) == SY_OK, "%s", err.msg);
    ck_assert_msg(tu_files_equal(a, b), "xy SVG differs between two renders");
    if (have_tool("xmllint")) {
        char cmd[700];
        snprintf(cmd, sizeof cmd, "xmllint --noout '%s' 2>/dev/null", a);
        ck_assert_msg(system(cmd) == 0, "xmllint rejects %s", a);
    }
    char *s = slurp(a, NULL);
    ck_assert_ptr_nonnull(s);
    ck_assert_ptr_nonnull(strstr(s, "<title>Kestrel: Earth to Mars opportunities 2028-2046</title>"));
    ck_assert_ptr_nonnull(strstr(s, "Panel 1: Minimum C3 (km²/s²)"));
    ck_assert_ptr_nonnull(strstr(s, "Panel 3: Total Δv (km/s)"));
    ck_assert_ptr_nonnull(strstr(s, "Legend: Type I\n"));
    ck_assert_ptr_nonnull(strstr(s, "Legend: Type II\n"));
    /* Type I / Type II appear in two panels but once in the legend */
    ck_assert_ptr_null(strstr(strstr(s, "Legend: Type I\n") + 1, "Legend: Type I\n"));
    ck_assert_ptr_nonnull(strstr(s, "confirm with high-fidelity ephemerides"));
    free(s);

    /* PDF: one page of 540 x 432 pt, no creation date, same bytes twice */
    snprintf(a, sizeof a, "%s/a.pdf", tmpdir);
    snprintf(b, sizeof b, "%s/b.pdf", tmpdir);
    unsetenv("SOURCE_DATE_EPOCH");
    ck_assert_msg(sy_xy_write(&d.xy, &pg, a, &err) == SY_OK, "%s", err.msg);
    sleep(1);
    ck_assert_msg(sy_xy_write(&d.xy, &pg, b, &err) == SY_OK, "%s", err.msg);
    ck_assert_msg(tu_files_equal(a, b), "xy PDF differs between two renders");
    size_t n;
    char *pdf = slurp(a, &n);
    ck_assert_ptr_nonnull(pdf);
    ck_assert_ptr_null(find_bytes(pdf, n, "/CreationDate", 13));
    free(pdf);
    if (have_tool("pdfinfo")) {
        char info[4096];
        ck_assert_int_eq(pdf_pages(a, info, sizeof info), 1);
        ck_assert_ptr_nonnull(strstr(info, "540 x 432 pts"));
    }
    remove_tmpdir();
}
END_TEST

START_TEST(test_xy_arguments)
{
    make_tmpdir();
    static xy_demo d;
    sy_chart_page pg;
    page_set(&pg, 3.5, 3.0, 100);
    sy_error err = {{0}};
    char path[512];
    snprintf(path, sizeof path, "%s/bad.png", tmpdir);
    xy_fill(&d, 0);
    ck_assert_int_eq(sy_xy_write(&d.xy, &pg, path, &err), SY_ERR_ARG);
    ck_assert_msg(strstr(err.msg, "npanels") != NULL, "%s", err.msg);
    xy_fill(&d, 2);
    d.s1[1].x = NULL;
    ck_assert_int_eq(sy_xy_write(&d.xy, &pg, path, &err), SY_ERR_ARG);
    ck_assert_msg(strstr(err.msg, "panels[1].series[1]") != NULL && strstr(err.msg, " x ") != NULL,
                  "%s", err.msg);
    xy_fill(&d, 2);
    d.s0[0].role = (sy_chart_role)7;
    ck_assert_int_eq(sy_xy_write(&d.xy, &pg, path, &err), SY_ERR_ARG);
    ck_assert_msg(strstr(err.msg, "panels[0].series[0].role") != NULL, "%s", err.msg);
    /* missing directory: SY_ERR_IO naming the path, nothing left */
    xy_fill(&d, 2);
    snprintf(path, sizeof path, "%s/no/such/dir/xy.svg", tmpdir);
    ck_assert_int_eq(sy_xy_write(&d.xy, &pg, path, &err), SY_ERR_IO);
    ck_assert_msg(strstr(err.msg, path) != NULL, "message lacks the path: %s", err.msg);
    ck_assert_int_eq(count_entries(tmpdir), 0);
    /* a panel without data is drawn (empty, "No data") rather than refused */
    xy_fill(&d, 2);
    d.xy.panels[1].nseries = 0;
    snprintf(path, sizeof path, "%s/empty-panel.png", tmpdir);
    ck_assert_msg(sy_xy_write(&d.xy, &pg, path, &err) == SY_OK, "%s", err.msg);
    remove_tmpdir();
}
END_TEST

/* ------------------------------------------------------------------ */
/* Tables and documents                                                */

#define TAB_COLS 6
typedef struct {
    char text[400][TAB_COLS][40];
    const char *cells[400 * TAB_COLS];
    const char *header[TAB_COLS];
    const char *notes[2];
    sy_table_page t;
} tab_demo;

/* Invented launch-period rows: date, C3, DLA, arrival, v-inf, margin. */
static void tab_fill(tab_demo *d, size_t nrows)
{
    ck_assert_uint_le(nrows, 400);
    memset(d, 0, sizeof *d);
    for (size_t r = 0; r < nrows; r++) {
        double jd = JD_2033_03_01 + 35 + (double)r;
        char date[32];
        sy_date_format(jd, 0, date, sizeof date);
        snprintf(d->text[r][0], 40, "%s", date);
        snprintf(d->text[r][1], 40, "%.2f", 8.9 + 0.0004 * (double)((r % 41) * (r % 41)));
        snprintf(d->text[r][2], 40, "%.1f", -12.0 + 0.7 * (double)(r % 37));
        sy_date_format(jd + 235 - 0.6 * (double)r, 0, date, sizeof date);
        snprintf(d->text[r][3], 40, "%s", date);
        snprintf(d->text[r][4], 40, "%.3f", 2.61 + 0.002 * (double)(r % 23));
        snprintf(d->text[r][5], 40, "row %zu", r + 1);
        for (int c = 0; c < TAB_COLS; c++) d->cells[r * TAB_COLS + c] = d->text[r][c];
    }
    static const char *hdr[TAB_COLS] = {"Departure (TDB)", "C3 (km²/s²)", "DLA (deg)",
                                        "Arrival (TDB)", "Arrival v∞ (km/s)", "Remark"};
    for (int c = 0; c < TAB_COLS; c++) d->header[c] = hdr[c];
    d->notes[0] = "Each row is one departure day of the launch period; the arrival date is the one of "
                  "least departure C3 for that day.  Demo values (Kestrel study, fictional).";
    d->notes[1] = "Preliminary two-body, patched-conic, mean-element figures; confirm with high-fidelity "
                  "ephemerides and the responsible launch and mission authorities.";
    d->t.title = "Kestrel launch period, Earth departure 2033";
    d->t.subtitle = "Daily targets, ballistic Type I transfer";
    d->t.header = d->header;
    d->t.ncols = TAB_COLS;
    d->t.cells = d->cells;
    d->t.nrows = nrows;
    d->t.notes = d->notes;
    d->t.nnotes = 2;
}

static const char *DOC_FOOTER[] = {
    "Preliminary two-body, patched-conic, mean-element figures; confirm with high-fidelity "
    "ephemerides and the responsible launch and mission authorities.",
    "synodic " PACKAGE_VERSION " - Kestrel study (fictional)"};

/* The document of the brief: a 40-row table, three porkchop pages (line,
 * filled, with a launch period) and one comparison figure. */
static void write_doc(const char *path, size_t *table_pages)
{
    static tab_demo td;
    static xy_demo xd;
    tab_fill(&td, 40);
    td.t.footer = DOC_FOOTER;
    td.t.nfooter = 2;
    xy_fill(&xd, 3);
    demo *d0 = demo_new(0), *d1 = demo_new(1), *d2 = demo_new(0);
    period_demo pd;
    period_fill(&pd);
    d2->chart.paths = &pd.path;
    d2->chart.npaths = 1;
    d2->chart.title = "Kestrel: launch period on the C3 chart";
    sy_doc *doc = NULL;
    sy_error err = {{0}};
    ck_assert_msg(sy_doc_open(&doc, path, 8.5, 11.0, "Kestrel atlas (demo)", "synodic " PACKAGE_VERSION,
                              &err) == SY_OK, "%s", err.msg);
    ck_assert_uint_eq(sy_doc_page_count(doc), 0);
    ck_assert_msg(sy_doc_add_table(doc, &td.t, table_pages, &err) == SY_OK, "%s", err.msg);
    ck_assert_uint_eq(sy_doc_page_count(doc), *table_pages);
    ck_assert_msg(sy_doc_add_chart(doc, &d0->chart, &err) == SY_OK, "%s", err.msg);
    ck_assert_msg(sy_doc_add_chart(doc, &d1->chart, &err) == SY_OK, "%s", err.msg);
    ck_assert_msg(sy_doc_add_chart(doc, &d2->chart, &err) == SY_OK, "%s", err.msg);
    ck_assert_msg(sy_doc_add_xy(doc, &xd.xy, &err) == SY_OK, "%s", err.msg);
    ck_assert_uint_eq(sy_doc_page_count(doc), *table_pages + 4);
    ck_assert_msg(sy_doc_close(doc, &err) == SY_OK, "%s", err.msg);
    demo_free(d0);
    demo_free(d1);
    demo_free(d2);
}

START_TEST(test_doc_pages)
{
    make_tmpdir();
    char a[512], b[512];
    snprintf(a, sizeof a, "%s/atlas-a.pdf", tmpdir);
    snprintf(b, sizeof b, "%s/atlas-b.pdf", tmpdir);
    unsetenv("SOURCE_DATE_EPOCH");
    size_t ta = 0, tb = 0;
    write_doc(a, &ta);
    sleep(1); /* a clock-derived date or id would now differ */
    write_doc(b, &tb);
    /* 40 one-line rows of 9 pt text fit on one 11 in high page */
    ck_assert_uint_eq(ta, 1);
    ck_assert_uint_eq(tb, 1);
    ck_assert_msg(tu_files_equal(a, b), "the document differs between two runs");
    size_t n;
    char *pdf = slurp(a, &n);
    ck_assert_ptr_nonnull(pdf);
    ck_assert(n > 1000 && memcmp(pdf, "%PDF-", 5) == 0);
    ck_assert_ptr_null(find_bytes(pdf, n, "/CreationDate", 13));
    free(pdf);
    if (have_tool("pdfinfo")) {
        char info[4096];
        ck_assert_int_eq(pdf_pages(a, info, sizeof info), 5);
        ck_assert_ptr_nonnull(strstr(info, "Kestrel atlas (demo)"));
        ck_assert_ptr_nonnull(strstr(info, "synodic " PACKAGE_VERSION));
        ck_assert_ptr_nonnull(strstr(info, "612 x 792 pts"));
    }
    keep_sample(a, "atlas.pdf");
    /* SOURCE_DATE_EPOCH gives the document that date: 1700000000 s is
     * 2023-11-14T22:13:20Z (date -u -d @1700000000) */
    setenv("SOURCE_DATE_EPOCH", "1700000000", 1);
    write_doc(b, &tb);
    unsetenv("SOURCE_DATE_EPOCH");
    pdf = slurp(b, &n);
    ck_assert_ptr_nonnull(pdf);
    ck_assert(find_bytes(pdf, n, "/CreationDate (D:20231114221320", 31) != NULL ||
              find_bytes(pdf, n, "/CreationDate (20231114221320", 29) != NULL);
    free(pdf);
    remove_tmpdir();
}
END_TEST

START_TEST(test_table_paginates)
{
    make_tmpdir();
    static tab_demo td;
    tab_fill(&td, 200);
    td.t.footer = DOC_FOOTER;
    td.t.nfooter = 2;
    char path[512];
    snprintf(path, sizeof path, "%s/table.pdf", tmpdir);
    sy_doc *doc = NULL;
    sy_error err = {{0}};
    ck_assert_msg(sy_doc_open(&doc, path, 8.5, 11.0, "Kestrel table", NULL, &err) == SY_OK, "%s",
                  err.msg);
    size_t np = 0;
    ck_assert_msg(sy_doc_add_table(doc, &td.t, &np, &err) == SY_OK, "%s", err.msg);
    /* 200 rows cannot fit on one 11 in page at a legible size, nor need
     * more than one page per 20 rows */
    ck_assert_uint_ge(np, 2);
    ck_assert_uint_le(np, 10);
    ck_assert_uint_eq(sy_doc_page_count(doc), np);
    ck_assert_msg(sy_doc_close(doc, &err) == SY_OK, "%s", err.msg);
    keep_sample(path, "table-200.pdf");
    if (have_tool("pdfinfo")) ck_assert_int_eq(pdf_pages(path, NULL, 0), (int)np);
    if (have_tool("pdftotext")) {
        /* every row is on some page exactly once, in order; every page
         * carries the header and its page number */
        char txt[600], cmd[1400];
        snprintf(txt, sizeof txt, "%s/table.txt", tmpdir);
        snprintf(cmd, sizeof cmd, "pdftotext -layout '%s' '%s'", path, txt);
        ck_assert_int_eq(system(cmd), 0);
        char *s = slurp(txt, NULL);
        ck_assert_ptr_nonnull(s);
        const char *pos = s;
        for (size_t r = 0; r < 200; r++) {
            char key[32];
            snprintf(key, sizeof key, "row %zu\n", r + 1);
            const char *hit = strstr(pos, key);
            ck_assert_msg(hit != NULL, "row %zu missing or out of order", r + 1);
            ck_assert_msg(strstr(hit + 1, key) == NULL, "row %zu printed twice", r + 1);
            pos = hit;
        }
        size_t nhdr = 0;
        /* (the header cell may wrap; "Departure" is capitalised only there) */
        for (const char *q = s; (q = strstr(q, "Departure")) != NULL; q++) nhdr++;
        ck_assert_uint_eq(nhdr, np);
        char last[64];
        snprintf(last, sizeof last, "Page %zu of %zu", np, np);
        ck_assert_ptr_nonnull(strstr(s, last));
        ck_assert_ptr_nonnull(strstr(s, "responsible launch and mission authorities"));
        free(s);
        unlink(txt);
    }
    remove_tmpdir();
}
END_TEST

START_TEST(test_doc_abort_and_errors)
{
    make_tmpdir();
    char path[512];
    sy_error err = {{0}};
    sy_doc *doc = NULL;

    /* abort: nothing left, not even the temporary */
    snprintf(path, sizeof path, "%s/aborted.pdf", tmpdir);
    ck_assert_msg(sy_doc_open(&doc, path, 8.5, 11, "x", NULL, &err) == SY_OK, "%s", err.msg);
    demo *d = demo_new(0);
    ck_assert_msg(sy_doc_add_chart(doc, &d->chart, &err) == SY_OK, "%s", err.msg);
    ck_assert_int_eq(count_entries(tmpdir), 1);   /* the temporary */
    sy_doc_abort(doc);
    sy_doc_abort(NULL);
    ck_assert_int_eq(count_entries(tmpdir), 0);

    /* a missing directory: SY_ERR_IO naming the path */
    snprintf(path, sizeof path, "%s/no/such/dir/atlas.pdf", tmpdir);
    doc = (sy_doc *)&err;   /* must be reset to NULL on failure */
    ck_assert_int_eq(sy_doc_open(&doc, path, 8.5, 11, "x", NULL, &err), SY_ERR_IO);
    ck_assert_ptr_null(doc);
    ck_assert_msg(strstr(err.msg, path) != NULL, "message lacks the path: %s", err.msg);

    /* bad page size, bad pages: refused with the member named, no page
     * added, the document still closes */
    snprintf(path, sizeof path, "%s/partial.pdf", tmpdir);
    ck_assert_int_eq(sy_doc_open(&doc, path, 0.5, 11, "x", NULL, &err), SY_ERR_ARG);
    ck_assert_int_eq(count_entries(tmpdir), 0);
    ck_assert_msg(sy_doc_open(&doc, path, 8.5, 11, "x", NULL, &err) == SY_OK, "%s", err.msg);
    d->chart.dx_days = -1;
    ck_assert_int_eq(sy_doc_add_chart(doc, &d->chart, &err), SY_ERR_ARG);
    ck_assert_ptr_nonnull(strstr(err.msg, "dx_days"));
    d->chart.dx_days = 1;
    static xy_demo xd;
    xy_fill(&xd, 1);
    xd.s0[1].y = NULL;
    ck_assert_int_eq(sy_doc_add_xy(doc, &xd.xy, &err), SY_ERR_ARG);
    ck_assert_msg(strstr(err.msg, "panels[0].series[1]") != NULL, "%s", err.msg);
    static tab_demo td;
    tab_fill(&td, 3);
    td.t.cells = NULL;
    size_t np = 99;
    ck_assert_int_eq(sy_doc_add_table(doc, &td.t, &np, &err), SY_ERR_ARG);
    ck_assert_msg(strstr(err.msg, "cells") != NULL, "%s", err.msg);
    ck_assert_uint_eq(np, 0);
    ck_assert_uint_eq(sy_doc_page_count(doc), 0);
    /* closing an empty document is refused and leaves nothing */
    ck_assert_int_eq(sy_doc_close(doc, &err), SY_ERR_ARG);
    ck_assert_msg(strstr(err.msg, "no pages") != NULL, "%s", err.msg);
    ck_assert_int_eq(count_entries(tmpdir), 0);

    /* an empty table still makes a page */
    ck_assert_msg(sy_doc_open(&doc, path, 8.5, 11, "x", NULL, &err) == SY_OK, "%s", err.msg);
    tab_fill(&td, 0);
    ck_assert_msg(sy_doc_add_table(doc, &td.t, &np, &err) == SY_OK, "%s", err.msg);
    ck_assert_uint_eq(np, 1);
    ck_assert_msg(sy_doc_close(doc, &err) == SY_OK, "%s", err.msg);
    if (have_tool("pdfinfo")) ck_assert_int_eq(pdf_pages(path, NULL, 0), 1);
    demo_free(d);
    remove_tmpdir();
}
END_TEST

static Suite *atlas_suite(void)
{
    Suite *s = suite_create("atlas");
    TCase *t = tcase_create("render");
    tcase_set_timeout(t, 300);
    tcase_add_checked_fixture(t, NULL, release_font_caches);
    tcase_add_test(t, test_path_layer);
    tcase_add_test(t, test_path_arguments);
    tcase_add_test(t, test_xy_png);
    tcase_add_test(t, test_xy_svg_pdf);
    tcase_add_test(t, test_xy_arguments);
    tcase_add_test(t, test_doc_pages);
    tcase_add_test(t, test_table_paginates);
    tcase_add_test(t, test_doc_abort_and_errors);
    suite_add_tcase(s, t);
    return s;
}

int main(void)
{
    return tu_run(atlas_suite());
}
