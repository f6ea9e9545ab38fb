/*
** Glyph stage, measuring side: librsvg draws sanitized glyph markup so the
** loader can find a drawing's extent (to fit it into the unit box) and its
** inked area (which the audit compares across a chart's glyphs).
** Only markup the sanitizer produced reaches these functions.
*/
#include <cairo.h>
#include <librsvg/rsvg.h>
#include <string.h>

#include "glyph.h"

#define SVG_NS "http://www.w3.org/2000/svg"

static RsvgHandle *open_doc(ug_buf *doc, ug_mark where, ug_error *err)
{
    if (doc->failed) {
        ug_fail(err, UG_ENOMEM, where, "out of memory");
        return NULL;
    }
    GError *gerr = NULL;
    RsvgHandle *h = rsvg_handle_new_from_data((const guint8 *)doc->data, doc->len, &gerr);
    if (!h) {
        ug_fail(err, UG_ERENDER, where, "librsvg could not read the sanitized glyph: %s",
                gerr ? gerr->message : "unknown error");
        g_clear_error(&gerr);
    }
    return h;
}

/* The drawing's extent in its own user units. The markup is placed in a
** 100 x 100 px document without a viewBox, so user units are pixels and the
** layer geometry is reported in exactly the file's coordinates. */
ug_status glyph_measure(const char *markup, ug_mark where, double box[4],
                        ug_error *err)
{
    ug_buf doc;
    ug_buf_init(&doc);
    ug_buf_printf(&doc, "<svg xmlns=\"%s\" width=\"100\" height=\"100\">"
                        "<g id=\"ug-measure\">%s</g></svg>", SVG_NS, markup);
    RsvgHandle *h = open_doc(&doc, where, err);
    ug_buf_free(&doc);
    if (!h)
        return err->status;
    RsvgRectangle vp = {0, 0, 100, 100}, ink, logical;
    GError *gerr = NULL;
    ug_status st = UG_OK;
    if (!rsvg_handle_get_geometry_for_layer(h, "#ug-measure", &vp, &ink, &logical, &gerr)) {
        st = ug_fail(err, UG_ERENDER, where, "librsvg could not measure the glyph: %s",
                     gerr ? gerr->message : "unknown error");
        g_clear_error(&gerr);
    } else {
        box[0] = logical.x;
        box[1] = logical.y;
        box[2] = logical.width;
        box[3] = logical.height;
    }
    g_object_unref(h);
    return st;
}

/* Draw unit-box markup at size x size pixels; alpha[] receives the coverage
** of each pixel, 0..255, row by row. */
ug_status glyph_rasterize(const char *body, int size, unsigned char *alpha,
                          ug_mark where, ug_error *err)
{
    ug_buf doc;
    ug_buf_init(&doc);
    ug_buf_printf(&doc, "<svg xmlns=\"%s\" viewBox=\"0 0 100 100\" width=\"%d\" "
                        "height=\"%d\">%s</svg>", SVG_NS, size, size, body);
    RsvgHandle *h = open_doc(&doc, where, err);
    ug_buf_free(&doc);
    if (!h)
        return err->status;
    ug_status st = UG_OK;
    cairo_surface_t *s = cairo_image_surface_create(CAIRO_FORMAT_A8, size, size);
    cairo_t *cr = cairo_create(s);
    RsvgRectangle vp = {0, 0, size, size};
    GError *gerr = NULL;
    if (!rsvg_handle_render_document(h, cr, &vp, &gerr)) {
        st = ug_fail(err, UG_ERENDER, where, "librsvg could not draw the glyph: %s",
                     gerr ? gerr->message : "unknown error");
        g_clear_error(&gerr);
    } else {
        cairo_surface_flush(s);
        const unsigned char *px = cairo_image_surface_get_data(s);
        int stride = cairo_image_surface_get_stride(s);
        for (int y = 0; y < size; y++)
            memcpy(alpha + (size_t)y * size, px + (size_t)y * stride, (size_t)size);
    }
    cairo_destroy(cr);
    cairo_surface_destroy(s);
    g_object_unref(h);
    return st;
}

/* Inked area: the summed coverage (alpha / 255) of a 64 x 64 rendering over
** its 4096 pixels, so antialiased edges count by how much they are covered
** instead of flipping at a threshold. */
ug_status glyph_ink(const char *body, ug_mark where, double *ink, ug_error *err)
{
    unsigned char alpha[GLYPH_INK_SIZE * GLYPH_INK_SIZE];
    ug_status st = glyph_rasterize(body, GLYPH_INK_SIZE, alpha, where, err);
    if (st)
        return st;
    unsigned long sum = 0;
    for (size_t i = 0; i < sizeof alpha; i++)
        sum += alpha[i];
    *ink = (double)sum / (255.0 * (double)sizeof alpha);
    return UG_OK;
}
