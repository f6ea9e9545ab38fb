/*
** Raster stage: SVG bytes -> PNG or PDF bytes.
**
** librsvg parses the SVG the svg stage wrote and draws it onto a cairo
** surface: an image surface for PNG, a PDF surface for PDF. The SVG's size is
** in CSS px (96 per inch); a PNG gets px * dpi/96 * scale pixels a side, a
** PDF page gets px * 0.75 * scale points a side (72 pt per inch), so a chart
** 800 px wide prints 8 1/3 inches wide at scale 1 whatever the dpi.
**
** Both writers stream into a ug_buf; nothing here touches a file except
** ug_render_svg_file, which renders completely first and only then writes
** through ug_write_file_atomic, so a failed render leaves the old file alone.
** Output is deterministic: cairo's PNG writer adds no time stamp, and the
** PDF's creation date, the only varying bytes, is dropped.
*/
#include <assert.h>
#include <limits.h>
#include <stdio.h>
#include <cairo-pdf.h>
#include <cairo.h>
#include <librsvg/rsvg.h>
#include <math.h>
#include <png.h>
#include <stdint.h>
#include <string.h>
#include <strings.h>

#include "raster.h"

/* LeakSanitizer builds only (gcc defines __SANITIZE_ADDRESS__, clang answers
** __has_feature). */
#if defined(__SANITIZE_ADDRESS__)
#define RASTER_LSAN 1
#elif defined(__has_feature)
#if __has_feature(address_sanitizer)
#define RASTER_LSAN 1
#endif
#endif
#ifdef RASTER_LSAN
#include <sanitizer/lsan_interface.h>
#endif

/* ---- formats ------------------------------------------------------------- */

static const char *const format_names[] = {"svg", "png", "pdf", "html", "csv"};
#define NFORMATS (sizeof format_names / sizeof *format_names)

const char *ug_output_format_name(ug_output_format f)
{
    return (unsigned)f < NFORMATS ? format_names[f] : "svg";
}

int ug_output_format_parse(const char *name, ug_output_format *out)
{
    for (unsigned i = 0; i < NFORMATS; i++)
        if (strcasecmp(name, format_names[i]) == 0) {
            *out = (ug_output_format)i;
            return 0;
        }
    if (strcasecmp(name, "htm") == 0) {
        *out = UG_OUT_HTML;
        return 0;
    }
    return -1;
}

ug_output_format ug_output_format_from_path(const char *path)
{
    const char *dot = strrchr(path, '.');
    const char *slash = strrchr(path, '/');
    ug_output_format f = UG_OUT_SVG;
    if (dot && (!slash || dot > slash))
        ug_output_format_parse(dot + 1, &f);
    return f;
}

/* ---- the <svg> element of a document --------------------------------------- */

static size_t skip_space(const char *s, size_t i, size_t n)
{
    while (i < n && (s[i] == ' ' || s[i] == '\t' || s[i] == '\r' || s[i] == '\n'))
        i++;
    return i;
}

/* Index just past `end` at or after i, or n when it is missing. */
static size_t past(const char *s, size_t i, size_t n, const char *end)
{
    size_t k = strlen(end);
    for (; i + k <= n; i++)
        if (memcmp(s + i, end, k) == 0)
            return i + k;
    return n;
}

size_t raster_svg_body(const char *s, size_t n)
{
    size_t i = skip_space(s, 0, n);
    for (;;) {
        if (n - i >= 5 && memcmp(s + i, "<?xml", 5) == 0)
            i = past(s, i, n, "?>");
        else if (n - i >= 4 && memcmp(s + i, "<!--", 4) == 0)
            i = past(s, i, n, "-->");
        else if (n - i >= 9 && strncasecmp(s + i, "<!DOCTYPE", 9) == 0)
            i = past(s, i, n, memchr(s + i, '[', n - i) ? "]>" : ">");
        else
            return i;
        i = skip_space(s, i, n);
    }
}

/* ---- reading the SVG ------------------------------------------------------ */

static ug_status svg_error(ug_error *err, GError *gerr, const char *what)
{
    ug_fail(err, UG_ERENDER, ug_mark_file(NULL), "%s: %s", what,
            gerr && gerr->message ? gerr->message : "unknown librsvg error");
    if (gerr)
        g_error_free(gerr);
    return UG_ERENDER;
}

/* Lengths in the SVG are read at 96 dpi whatever the output resolution:
** the output size is chosen by the viewport, not by librsvg's dpi. */
static ug_status open_svg(const char *svg, size_t len, RsvgHandle **out,
                          ug_error *err)
{
    GError *gerr = NULL;
    ug_init_libraries(); /* librsvg reads the SVG with libxml2 */
    *out = rsvg_handle_new_from_data((const guint8 *)svg, len, &gerr);
    if (!*out)
        return svg_error(err, gerr, "the SVG could not be read");
    rsvg_handle_set_dpi(*out, RASTER_CSS_DPI);
    return UG_OK;
}

static ug_status handle_size(RsvgHandle *h, double *w, double *h_out,
                             ug_error *err)
{
    gboolean has_w, has_h, has_vb;
    RsvgLength lw, lh;
    RsvgRectangle vb;
    if (!rsvg_handle_get_intrinsic_size_in_pixels(h, w, h_out)) {
        /* No absolute width/height: fall back on the viewBox, in px. */
        rsvg_handle_get_intrinsic_dimensions(h, &has_w, &lw, &has_h, &lh,
                                             &has_vb, &vb);
        if (!has_vb)
            return ug_fail(err, UG_ERENDER, ug_mark_file(NULL),
                           "the SVG states no size (no width, height or viewBox)");
        *w = vb.width;
        *h_out = vb.height;
    }
    if (!(*w > 0 && *h_out > 0 && isfinite(*w) && isfinite(*h_out)))
        return ug_fail(err, UG_ERENDER, ug_mark_file(NULL),
                       "the SVG's size is empty (%g x %g px)", *w, *h_out);
    return UG_OK;
}

ug_status raster_svg_size(const char *svg, size_t len, double *w, double *h,
                          ug_error *err)
{
    RsvgHandle *handle;
    ug_status st = open_svg(svg, len, &handle, err);
    if (st)
        return st;
    st = handle_size(handle, w, h, err);
    g_object_unref(handle);
    return st;
}

/* ---- output sizes -------------------------------------------------------- */

static ug_status check_factors(double dpi, double scale, ug_error *err)
{
    if (!(isfinite(dpi) && dpi > 0))
        return ug_fail(err, UG_ESCHEMA, ug_mark_file(NULL),
                       "dpi must be a positive number (got %g)", dpi);
    if (!(isfinite(scale) && scale > 0))
        return ug_fail(err, UG_ESCHEMA, ug_mark_file(NULL),
                       "scale must be a positive number (got %g)", scale);
    return UG_OK;
}

/* Whole pixels covering the picture; the small slack keeps 312.5000000001
** (float noise on an exact product) from growing a pixel. */
static double pixels(double px, double factor)
{
    return ceil(px * factor - 1e-6);
}

static ug_status png_size(double w, double h, double dpi, double scale,
                          int *pw, int *ph, ug_error *err)
{
    double f = dpi / RASTER_CSS_DPI * scale;
    double x = pixels(w, f), y = pixels(h, f);
    if (x < 1)
        x = 1;
    if (y < 1)
        y = 1;
    if (x > RASTER_MAX_SIDE || y > RASTER_MAX_SIDE || x * y > RASTER_MAX_PIXELS)
        return ug_fail(err, UG_ELIMIT, ug_mark_file(NULL),
                       "a %.0f x %.0f pixel PNG (%.1f megapixels) is over the "
                       "limit of %.0f megapixels and %.0f pixels a side; lower "
                       "--dpi or --scale",
                       x, y, x * y / 1e6, RASTER_MAX_PIXELS / 1e6, RASTER_MAX_SIDE);
    *pw = (int)x;
    *ph = (int)y;
    return UG_OK;
}

static ug_status pdf_size(double w, double h, double scale, double *pw,
                          double *ph, ug_error *err)
{
    *pw = w * RASTER_PT_PER_PX * scale;
    *ph = h * RASTER_PT_PER_PX * scale;
    if (*pw > RASTER_MAX_PAGE_PT || *ph > RASTER_MAX_PAGE_PT)
        return ug_fail(err, UG_ELIMIT, ug_mark_file(NULL),
                       "a %.0f x %.0f pt PDF page is larger than the %.0f pt a "
                       "side PDF readers must accept; lower --scale",
                       *pw, *ph, RASTER_MAX_PAGE_PT);
    return UG_OK;
}

/* ---- drawing ------------------------------------------------------------- */

/*
** cairo 1.16 (Debian 12) loses 768 bytes each time it embeds a subset of a
** CID-keyed CFF font in a PDF (Noto Sans CJK, which Chinese and Japanese
** text uses): a cairo_array grown while the surface is finished is never
** freed. Seven lines of pango and cairo, none of ours, show it under ASan.
** The lost memory is cairo's own, but LeakSanitizer cannot say so: cairo
** has no frame pointers, so the stack it records stops inside libcairo, and
** a rule naming libcairo would hide every cairo object we forget to
** destroy. So in sanitizer builds LeakSanitizer is told to ignore what is
** allocated while a PDF surface is finished, except inside to_buf, where
** our own buffer grows. The flag is per thread, as LeakSanitizer's
** __lsan_disable is.
*/
#ifdef RASTER_LSAN
static _Thread_local bool finishing_pdf;
#endif

static void finish_pdf(cairo_surface_t *s)
{
#ifdef RASTER_LSAN
    finishing_pdf = true;
    __lsan_disable();
#endif
    cairo_surface_finish(s);
#ifdef RASTER_LSAN
    __lsan_enable();
    finishing_pdf = false;
#endif
}

static cairo_status_t to_buf(void *closure, const unsigned char *data,
                             unsigned int length)
{
#ifdef RASTER_LSAN
    if (finishing_pdf)
        __lsan_enable();
#endif
    ug_buf *b = closure;
    ug_buf_add(b, (const char *)data, length);
#ifdef RASTER_LSAN
    if (finishing_pdf)
        __lsan_disable();
#endif
    return b->failed ? CAIRO_STATUS_NO_MEMORY : CAIRO_STATUS_SUCCESS;
}

/* A document to draw: librsvg's handle of it and, when its icons were
** lifted out, the icons, painted after it. w, h: its size in CSS px. */
typedef struct {
    RsvgHandle *handle;
    raster_icons *icons;
    double w, h;
} drawing;

/* Draw the whole document scaled into a w x h viewport on the surface. */
static ug_status draw(const drawing *d, cairo_surface_t *s, double w, double h,
                      ug_error *err)
{
    GError *gerr = NULL;
    RsvgRectangle viewport = {0, 0, w, h};
    cairo_t *cr = cairo_create(s);
    gboolean ok = rsvg_handle_render_document(d->handle, cr, &viewport, &gerr);
    ug_status st = UG_OK;
    if (ok && d->icons)
        st = raster_icons_paint(d->icons, cr, w, h, err);
    cairo_status_t cs = cairo_status(cr);
    cairo_destroy(cr);
    if (!ok)
        return svg_error(err, gerr, "the SVG could not be drawn");
    if (st)
        return st;
    if (cs)
        return ug_fail(err, cs == CAIRO_STATUS_NO_MEMORY ? UG_ENOMEM : UG_ERENDER,
                       ug_mark_file(NULL), "cairo: %s", cairo_status_to_string(cs));
    return UG_OK;
}

static ug_status surface_done(cairo_surface_t *s, const ug_buf *b, ug_error *err)
{
    cairo_status_t cs = cairo_surface_status(s);
    if (b->failed || cs == CAIRO_STATUS_NO_MEMORY)
        return ug_fail(err, UG_ENOMEM, ug_mark_file(NULL), "out of memory");
    if (cs)
        return ug_fail(err, UG_ERENDER, ug_mark_file(NULL), "cairo: %s",
                       cairo_status_to_string(cs));
    return UG_OK;
}

/* cairo's pixels (premultiplied ARGB in a native-endian word) as straight
** RGBA bytes, as cairo's own PNG writer unpremultiplies them; *opaque says
** whether every pixel is, so the file can drop its alpha channel. */
static void straight_rgba(cairo_surface_t *s, unsigned char *out, bool *opaque)
{
    const unsigned char *px = cairo_image_surface_get_data(s);
    int w = cairo_image_surface_get_width(s), h = cairo_image_surface_get_height(s);
    int stride = cairo_image_surface_get_stride(s);
    *opaque = true;
    for (int y = 0; y < h; y++) {
        const uint32_t *row = (const uint32_t *)(const void *)(px + (size_t)y * stride);
        for (int x = 0; x < w; x++, out += 4) {
            uint32_t v = row[x];
            unsigned a = v >> 24, c[3] = {(v >> 16) & 255, (v >> 8) & 255, v & 255};
            for (int k = 0; k < 3; k++)
                out[k] = (unsigned char)(a == 0 ? 0 : a == 255 ? c[k]
                                                     : (c[k] * 255 + a / 2) / a);
            out[3] = (unsigned char)a;
            *opaque = *opaque && a == 255;
        }
    }
}

static void png_to_buf(png_structp png, png_bytep data, size_t n)
{
    ug_buf *b = png_get_io_ptr(png);
    ug_buf_add(b, (const char *)data, n);
    if (b->failed)
        png_error(png, "out of memory");
}

static void png_flush_none(png_structp png) { (void)png; }

/* libpng's default handlers print to stderr; the caller reports instead. */
static void png_quiet_error(png_structp png, png_const_charp msg)
{
    (void)msg;
    png_longjmp(png, 1);
}

static void png_quiet_warning(png_structp png, png_const_charp msg)
{
    (void)png;
    (void)msg;
}

/* rows (w x h pixels of `channels` bytes) through libpng into b. Rows are
** written unfiltered at zlib level 3: a chart's flat colours compress about
** as well as with libpng's default (every filter tried on every row, zlib
** level 6, which was most of a small chart's PNG time) for a third of the
** work (measured on the pantry example: 71 KB in 5.5 ms against 65 KB in
** 14.5 ms). The file says its pixels are sRGB (PNG spec. 11.3.3.5). */
static bool write_png_rows(ug_buf *b, unsigned char *rows, int w, int h, int channels)
{
    png_structp png = png_create_write_struct(PNG_LIBPNG_VER_STRING, NULL, png_quiet_error,
                                              png_quiet_warning);
    png_infop info = png ? png_create_info_struct(png) : NULL;
    volatile bool ok = false;
    if (info && !setjmp(png_jmpbuf(png))) {
        png_set_write_fn(png, b, png_to_buf, png_flush_none);
        png_set_IHDR(png, info, (png_uint_32)w, (png_uint_32)h, 8,
                     channels == 3 ? PNG_COLOR_TYPE_RGB : PNG_COLOR_TYPE_RGB_ALPHA,
                     PNG_INTERLACE_NONE, PNG_COMPRESSION_TYPE_DEFAULT,
                     PNG_FILTER_TYPE_DEFAULT);
        png_set_sRGB_gAMA_and_cHRM(png, info, PNG_sRGB_INTENT_PERCEPTUAL);
        png_set_filter(png, PNG_FILTER_TYPE_BASE, PNG_FILTER_NONE);
        png_set_compression_level(png, 3);
        png_write_info(png, info);
        for (int y = 0; y < h; y++)
            png_write_row(png, rows + (size_t)y * (size_t)w * (size_t)channels);
        png_write_end(png, info);
        ok = true;
    }
    png_destroy_write_struct(png ? &png : NULL, info ? &info : NULL);
    return ok;
}

/* Opaque pixels (a chart's background is) are written as RGB. */
static ug_status encode_png(cairo_surface_t *s, ug_buf *b, ug_error *err)
{
    int w = cairo_image_surface_get_width(s), h = cairo_image_surface_get_height(s);
    unsigned char *rgba = ug_malloc((size_t)w * (size_t)h * 4);
    if (!rgba)
        return ug_fail(err, UG_ENOMEM, ug_mark_file(NULL), "out of memory");
    bool opaque;
    straight_rgba(s, rgba, &opaque);
    if (opaque) /* RGBA -> RGB in place */
        for (size_t i = 0, n = (size_t)w * (size_t)h; i < n; i++)
            memmove(rgba + 3 * i, rgba + 4 * i, 3);
    ug_status st = UG_OK;
    if (!write_png_rows(b, rgba, w, h, opaque ? 3 : 4))
        st = b->failed ? ug_fail(err, UG_ENOMEM, ug_mark_file(NULL), "out of memory")
                       : ug_fail(err, UG_ERENDER, ug_mark_file(NULL),
                                 "PNG: libpng could not write the image");
    ug_free(rgba);
    return st;
}

static ug_status render_png(const drawing *d, double dpi, double scale, ug_buf *b,
                            ug_error *err)
{
    double w = d->w, h = d->h;
    int pw = 0, ph = 0;
    ug_status st = png_size(w, h, dpi, scale, &pw, &ph, err);
    if (st)
        return st;
    cairo_surface_t *s = cairo_image_surface_create(CAIRO_FORMAT_ARGB32, pw, ph);
    if ((st = surface_done(s, b, err)))
        goto out;
    double f = dpi / RASTER_CSS_DPI * scale;
    if ((st = draw(d, s, w * f, h * f, err)))
        goto out;
    cairo_surface_flush(s);
    if (!(st = surface_done(s, b, err)))
        st = encode_png(s, b, err);
out:
    cairo_surface_destroy(s);
    return st;
}

/* The handle librsvg draws: of the document without its icons when they
** could be lifted out (d->icons set), else of the document itself. */
static ug_status open_drawing(const char *svg, size_t len, RsvgHandle *whole,
                              drawing *d, ug_error *err)
{
    char *rest;
    size_t rest_len;
    d->handle = whole;
    d->icons = NULL;
    ug_status st = raster_icons_lift(svg, len, &d->icons, &rest, &rest_len, err);
    if (st || !d->icons)
        return st;
    st = open_svg(rest, rest_len, &d->handle, err);
    raster_icons_free_text(rest);
    if (st) {
        raster_icons_free(d->icons);
        d->icons = NULL;
        d->handle = whole;
    }
    return st;
}

/* The document's surface made at its first page's size, or the next page
** sized. The creation date is the only byte that changes run to run. */
static ug_status pdf_surface(cairo_surface_t **s, ug_buf *b, double pw, double ph,
                             ug_error *err)
{
    if (*s) {
        cairo_pdf_surface_set_size(*s, pw, ph);
        return UG_OK;
    }
    *s = cairo_pdf_surface_create_for_stream(to_buf, b, pw, ph);
    cairo_pdf_surface_set_metadata(*s, CAIRO_PDF_METADATA_CREATE_DATE, "");
    return surface_done(*s, b, err);
}

/* Draw one SVG as the next page of a PDF document, the page sized to it;
** `title`, when given, is the page's entry in the document outline (the
** reader's bookmarks). */
static ug_status pdf_page(cairo_surface_t **sp, ug_buf *b, const char *svg,
                          size_t len, const char *title, int page, double scale,
                          ug_error *err)
{
    RsvgHandle *whole;
    ug_status st = open_svg(svg, len, &whole, err);
    if (st)
        return st;
    drawing d = {.handle = whole};
    double pw = 0, ph = 0;
    if (!(st = handle_size(whole, &d.w, &d.h, err)) &&
        !(st = pdf_size(d.w, d.h, scale, &pw, &ph, err)) &&
        !(st = open_drawing(svg, len, whole, &d, err)) &&
        !(st = pdf_surface(sp, b, pw, ph, err))) {
        cairo_surface_t *s = *sp;
        if (title && *title) {
            char link[32];
            snprintf(link, sizeof link, "page=%d", page);
            cairo_pdf_surface_add_outline(s, CAIRO_PDF_OUTLINE_ROOT, title, link, 0);
        }
        if (!(st = draw(&d, s, pw, ph, err)))
            cairo_surface_show_page(s);
    }
    if (d.handle != whole)
        g_object_unref(d.handle);
    raster_icons_free(d.icons);
    g_object_unref(whole);
    return st;
}

ug_status ug_render_pdf_pages(const char *const *svgs, const size_t *lens,
                              const char *const *titles, size_t n, double scale,
                              char **out, size_t *out_len, ug_error *err)
{
    ug_error_clear(err);
    *out = NULL;
    if (out_len)
        *out_len = 0;
    ug_status st = check_factors(RASTER_CSS_DPI, scale, err);
    if (st)
        return st;
    if (n == 0 || n > INT_MAX)
        return ug_fail(err, UG_ELIMIT, ug_mark_file(NULL),
                       "a PDF needs from 1 to %d pages (asked for %zu)", INT_MAX, n);
    ug_buf b;
    ug_buf_init(&b);
    cairo_surface_t *s = NULL;
    for (size_t i = 0; i < n && !st; i++)
        st = pdf_page(&s, &b, svgs[i], lens[i], titles ? titles[i] : NULL, (int)i + 1,
                      scale, err);
    if (s) {
        finish_pdf(s);
        if (!st)
            st = surface_done(s, &b, err);
        cairo_surface_destroy(s);
    }
    if (!st)
        st = ug_buf_take(&b, out, out_len, err);
    ug_buf_free(&b);
    return st;
}

static ug_status render(RsvgHandle *whole, const char *svg, size_t len, double dpi,
                        double scale, ug_buf *b, ug_error *err)
{
    drawing d = {.handle = whole};
    int pw, ph;
    ug_status st = handle_size(whole, &d.w, &d.h, err);
    /* Sizes are refused before the icons are lifted, which costs memory. */
    if (!st)
        st = png_size(d.w, d.h, dpi, scale, &pw, &ph, err);
    if (!st)
        st = open_drawing(svg, len, whole, &d, err);
    if (st)
        return st;
    st = render_png(&d, dpi, scale, b, err);
    if (d.handle != whole)
        g_object_unref(d.handle);
    raster_icons_free(d.icons);
    return st;
}

ug_status ug_render_svg(const char *svg, size_t len, ug_output_format fmt,
                        double dpi, double scale, char **out, size_t *out_len,
                        ug_error *err)
{
    ug_error_clear(err);
    *out = NULL;
    if (out_len)
        *out_len = 0;
    assert(fmt == UG_OUT_SVG || fmt == UG_OUT_PNG || fmt == UG_OUT_PDF);
    ug_status st = check_factors(dpi, scale, err);
    if (st)
        return st;
    if (fmt == UG_OUT_PDF)
        return ug_render_pdf_pages(&svg, &len, NULL, 1, scale, out, out_len, err);
    RsvgHandle *handle;
    double w, h;
    if ((st = open_svg(svg, len, &handle, err)))
        return st;
    ug_buf b;
    ug_buf_init(&b);
    if ((st = handle_size(handle, &w, &h, err)))
        goto out;
    if (fmt == UG_OUT_SVG)
        ug_buf_add(&b, svg, len); /* read above, so known to be a valid SVG */
    else
        st = render(handle, svg, len, dpi, scale, &b, err);
    if (!st)
        st = ug_buf_take(&b, out, out_len, err);
out:
    ug_buf_free(&b);
    g_object_unref(handle);
    return st;
}

ug_status ug_render_svg_file(const char *svg, size_t len, ug_output_format fmt,
                             double dpi, double scale, const char *path,
                             ug_error *err)
{
    ug_error_clear(err);
    char *bytes;
    size_t n;
    ug_status st = ug_render_svg(svg, len, fmt, dpi, scale, &bytes, &n, err);
    if (st)
        return st;
    st = ug_write_file_atomic(path, bytes, n, err);
    ug_free(bytes);
    return st;
}
