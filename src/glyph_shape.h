/*
** Glyph geometry: sanitized glyph markup -> the filled outlines it draws.
**
** The sanitizer (src/glyph.c) leaves only g, path, circle, ellipse, rect and
** polygon elements with geometry attributes, transforms and fill rules; this
** module reads exactly that in one linear pass, in absolute, transformed
** coordinates (lines and cubic Béziers), so the loader can measure a drawing's
** extent exactly and fill it with cairo without librsvg's fill-extents
** tessellation, whose cost grows with the square of a path's self-crossings.
*/
#ifndef UG_GLYPH_SHAPE_H
#define UG_GLYPH_SHAPE_H

#include <cairo.h>

#include "ug.h"

typedef struct glyph_shape glyph_shape; /* the filled outlines of sanitized glyph markup */

/* Parse sanitized markup (only g, path, circle, ellipse, rect, polygon with
** transform, fill-rule, clip-rule and plain-number lengths survive the
** sanitizer in src/glyph.c) in time linear in its size. Malformed data is
** refused (UG_ESYNTAX) with the attribute and the character it failed at. */
ug_status glyph_shape_parse(const char *markup, ug_mark where, glyph_shape **out,
                            ug_error *err);
size_t glyph_shape_segments(const glyph_shape *s); /* lines + curves after parsing */
/* x, y, w, h: tight extent of the filled area; all zero when nothing fills. */
void glyph_shape_bounds(const glyph_shape *s, double box[4]);
/* Fill every element with its own fill rule in the current source. */
void glyph_shape_draw(const glyph_shape *s, cairo_t *cr);
glyph_shape *glyph_shape_copy(const glyph_shape *s); /* NULL when memory runs out */
void glyph_shape_free(glyph_shape *s);

/* One number of SVG's grammar (SVG 1.1 §8.3.9 "number": sign, digits, an
** optional fraction and exponent) at [p, end): its value in *v and the
** character after it, or NULL when there is none, it is longer than 400
** characters, or it is not finite. Independent of the locale's decimal point
** only in that a mismatch is refused, never misread. */
const char *glyph_number(const char *p, const char *end, double *v);

#endif
