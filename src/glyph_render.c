/*
** Glyph stage, measuring side: a drawing's extent (to fit it into the unit
** box) and its inked area (which the audit compares across a chart's glyphs),
** both from the outlines glyph_shape.c reads. Filling is cairo's alone: no
** librsvg here, so no fill-extents tessellation, whose cost grows with the
** square of a path's self-crossings (issue #15). tests/check_glyph_shape.c
** holds both results to librsvg's.
** Only markup the sanitizer produced reaches these functions.
*/
#include <cairo.h>
#include <string.h>

#include "glyph.h"

ug_status glyph_measure(const char *markup, ug_mark where, double box[4],
                        ug_error *err)
{
    glyph_shape *s = NULL;
    ug_status st = glyph_shape_parse(markup, where, &s, err);
    if (st)
        return st;
    glyph_shape_bounds(s, box);
    glyph_shape_free(s);
    return UG_OK;
}

void glyph_surface_alpha(cairo_surface_t *s, int size, unsigned char *alpha)
{
    cairo_surface_flush(s);
    const unsigned char *px = cairo_image_surface_get_data(s);
    int stride = cairo_image_surface_get_stride(s);
    for (int y = 0; y < size; y++)
        memcpy(alpha + (size_t)y * size, px + (size_t)y * stride, (size_t)size);
}

/* The unit box (0 0 100 100) scaled onto size x size pixels, filled opaque
** with cairo's defaults (antialiasing on, tolerance 0.1 px). */
ug_status glyph_rasterize(const glyph_shape *shape, int size, unsigned char *alpha,
                          ug_mark where, ug_error *err)
{
    cairo_surface_t *s = cairo_image_surface_create(CAIRO_FORMAT_A8, size, size);
    cairo_t *cr = cairo_create(s);
    ug_status st = UG_OK;
    if (cairo_status(cr) != CAIRO_STATUS_SUCCESS) {
        st = ug_fail(err, UG_ENOMEM, where, "out of memory");
    } else {
        cairo_scale(cr, size / 100.0, size / 100.0);
        glyph_shape_draw(shape, cr);
        if (cairo_status(cr) != CAIRO_STATUS_SUCCESS) {
            st = cairo_status(cr) == CAIRO_STATUS_NO_MEMORY
                     ? ug_fail(err, UG_ENOMEM, where, "out of memory")
                     : ug_fail(err, UG_ERENDER, where, "cairo could not fill the glyph: %s",
                               cairo_status_to_string(cairo_status(cr)));
        } else {
            glyph_surface_alpha(s, size, alpha);
        }
    }
    cairo_destroy(cr);
    cairo_surface_destroy(s);
    return st;
}

/* Inked area: the summed coverage (alpha / 255) of a 64 x 64 rendering over
** its 4096 pixels, so antialiased edges count by how much they are covered
** instead of flipping at a threshold. */
ug_status glyph_ink(const glyph_shape *shape, ug_mark where, double *ink, ug_error *err)
{
    unsigned char alpha[GLYPH_INK_SIZE * GLYPH_INK_SIZE];
    ug_status st = glyph_rasterize(shape, GLYPH_INK_SIZE, alpha, where, err);
    if (st)
        return st;
    unsigned long sum = 0;
    for (size_t i = 0; i < sizeof alpha; i++)
        sum += alpha[i];
    *ink = (double)sum / (255.0 * (double)sizeof alpha);
    return UG_OK;
}
