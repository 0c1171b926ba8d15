/* chart_png.c - PNG encoding of a rendered chart with libpng.
 *
 * cairo's CAIRO_FORMAT_ARGB32 stores each pixel as one native-endian
 * 32-bit word with alpha premultiplied into the colour channels (cairo
 * manual, "Image Surfaces").  PNG wants straight (non-premultiplied)
 * RGBA bytes (PNG 1.2 spec, section 2.7), so colours are divided back by
 * alpha with rounding.  A chart on a white page is fully opaque, in which
 * case the smaller RGB colour type is written.
 *
 * The pHYs chunk states pixels per metre (PNG spec 4.2.4.2), so that a
 * word processor places the image at its intended physical size:
 * ppm = dpi / 0.0254, rounded.
 */
#include "config.h"
#include "synodic.h"
#include "synodic/chart.h"

#include <errno.h>
#include <math.h>
#include <png.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

typedef struct {
    char msg[256];
} png_errctx;

static void png_err_cb(png_structp png, png_const_charp msg)
{
    png_errctx *ec = png_get_error_ptr(png);
    snprintf(ec->msg, sizeof ec->msg, "%s", msg);
    png_longjmp(png, 1);
}

static void png_warn_cb(png_structp png, png_const_charp msg)
{
    (void)png;
    (void)msg; /* warnings (e.g. about text chunks) are not fatal */
}

typedef struct {
    png_structp png;
    png_infop info;
    FILE *fp;
    const unsigned char *argb;
    int width, height, stride, opaque;
    double dpi;
    png_textp chunks;
    size_t ntext;
    unsigned char *buf;
} png_job;

/* The only function with setjmp(): it changes no local after the call,
 * so nothing is left indeterminate by a longjmp() (C11 7.13.2.1). */
static int png_run(png_job *job)
{
    png_job *volatile j = job;
    if (setjmp(png_jmpbuf(j->png))) return 0;
    png_init_io(j->png, j->fp);
    png_set_IHDR(j->png, j->info, (png_uint_32)j->width, (png_uint_32)j->height, 8,
                 j->opaque ? PNG_COLOR_TYPE_RGB : PNG_COLOR_TYPE_RGB_ALPHA,
                 PNG_INTERLACE_NONE, PNG_COMPRESSION_TYPE_DEFAULT,
                 PNG_FILTER_TYPE_DEFAULT);
    png_uint_32 ppm = (png_uint_32)lround(j->dpi / 0.0254);
    png_set_pHYs(j->png, j->info, ppm, ppm, PNG_RESOLUTION_METER);
    if (j->ntext) png_set_text(j->png, j->info, j->chunks, (int)j->ntext);
    png_write_info(j->png, j->info);
    for (int y = 0; y < j->height; y++) {
        const uint32_t *row = (const uint32_t *)(const void *)(j->argb + (size_t)y * j->stride);
        unsigned char *o = j->buf;
        for (int x = 0; x < j->width; x++) {
            uint32_t p = row[x];
            unsigned a = p >> 24, r = (p >> 16) & 0xff, g = (p >> 8) & 0xff,
                     b = p & 0xff;
            if (!j->opaque) {
                if (a == 0) {
                    r = g = b = 0;
                } else if (a < 255) {
                    r = (r * 255 + a / 2) / a;
                    g = (g * 255 + a / 2) / a;
                    b = (b * 255 + a / 2) / a;
                    if (r > 255) r = 255;
                    if (g > 255) g = 255;
                    if (b > 255) b = 255;
                }
            }
            *o++ = (unsigned char)r;
            *o++ = (unsigned char)g;
            *o++ = (unsigned char)b;
            if (!j->opaque) *o++ = (unsigned char)a;
        }
        png_write_row(j->png, j->buf);
    }
    png_write_end(j->png, j->info);
    return 1;
}

static int is_ascii(const char *s)
{
    for (; *s; s++)
        if ((unsigned char)*s > 126 || ((unsigned char)*s < 32 && *s != '\n'))
            return 0;
    return 1;
}

static int key_ok(const char *k)
{
    size_t n = strlen(k);
    if (n < 1 || n > 79 || k[0] == ' ' || k[n - 1] == ' ') return 0;
    for (size_t i = 0; i < n; i++)
        if ((unsigned char)k[i] < 32 || (unsigned char)k[i] > 126) return 0;
    return 1;
}

sy_status sy_chart_png_encode(FILE *fp, const unsigned char *argb,
                              int width, int height, int stride, double dpi,
                              const sy_chart_text *text, size_t ntext,
                              const char *name, sy_error *err)
{
    if (!name) name = "PNG output";
    if (!fp || !argb || width <= 0 || height <= 0 || stride < 4 * width)
        return sy_fail(err, SY_ERR_ARG, "%s: bad image buffer", name);
    if (!(dpi > 0) || !isfinite(dpi))
        return sy_fail(err, SY_ERR_ARG, "%s: dpi must be positive", name);
    for (size_t k = 0; k < ntext; k++) {
        if (!text[k].key || !key_ok(text[k].key))
            return sy_fail(err, SY_ERR_ARG,
                           "%s: PNG text key %zu is not 1-79 printable ASCII characters",
                           name, k + 1);
        if (!text[k].value)
            return sy_fail(err, SY_ERR_ARG, "%s: PNG text \"%s\" has no value",
                           name, text[k].key);
    }

    /* Opaque? */
    int opaque = 1;
    for (int y = 0; y < height && opaque; y++) {
        const uint32_t *row = (const uint32_t *)(const void *)(argb + (size_t)y * stride);
        for (int x = 0; x < width; x++)
            if ((row[x] >> 24) != 0xff) { opaque = 0; break; }
    }
    int channels = opaque ? 3 : 4;
    unsigned char *buf = malloc((size_t)width * channels);
    png_textp chunks = ntext ? calloc(ntext, sizeof *chunks) : NULL;
    if (!buf || (ntext && !chunks)) {
        free(buf);
        free(chunks);
        return sy_fail(err, SY_ERR_NOMEM, "%s: out of memory for PNG rows", name);
    }
    for (size_t k = 0; k < ntext; k++) {
        chunks[k].key = (png_charp)text[k].key;
        chunks[k].text = (png_charp)text[k].value;
        chunks[k].text_length = strlen(text[k].value);
        if (is_ascii(text[k].value)) {
            chunks[k].compression = PNG_TEXT_COMPRESSION_NONE;   /* tEXt */
        } else {
            chunks[k].compression = PNG_ITXT_COMPRESSION_NONE;   /* iTXt, UTF-8 */
            chunks[k].itxt_length = chunks[k].text_length;
            chunks[k].lang = (png_charp)"";
            chunks[k].lang_key = (png_charp)"";
        }
    }

    png_errctx *ec = calloc(1, sizeof *ec);
    if (!ec) {
        free(buf);
        free(chunks);
        return sy_fail(err, SY_ERR_NOMEM, "%s: out of memory", name);
    }
    png_structp png = png_create_write_struct(PNG_LIBPNG_VER_STRING, ec,
                                              png_err_cb, png_warn_cb);
    png_infop info = png ? png_create_info_struct(png) : NULL;
    if (!png || !info) {
        png_destroy_write_struct(&png, NULL);
        free(ec);
        free(buf);
        free(chunks);
        return sy_fail(err, SY_ERR_NOMEM, "%s: cannot start libpng", name);
    }
    png_job job = {png, info, fp, argb, width, height, stride, opaque, dpi, chunks, ntext, buf};
    errno = 0;
    int ok = png_run(&job);
    int e = errno;
    png_destroy_write_struct(&png, &info);
    sy_status st = SY_OK;
    if (!ok && ferror(fp) && e)
        st = sy_fail(err, SY_ERR_IO, "cannot write %s: %s", name, strerror(e));
    else if (!ok)
        st = sy_fail(err, SY_ERR_IO, "cannot write %s: %s", name, ec->msg);
    else if (ferror(fp))
        st = sy_fail(err, SY_ERR_IO, "cannot write %s: %s", name, strerror(e ? e : EIO));
    free(ec);
    free(buf);
    free(chunks);
    return st;
}
