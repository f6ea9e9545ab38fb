/*
** Raster stage: SVG bytes -> PNG or PDF (librsvg draws onto a cairo surface),
** and the self-contained web page (SVG inline plus a data table as its text
** alternative). The public calls are declared in unitgram.h; this header holds
** the limits and the unit conversions the page stage and the tests share.
*/
#ifndef UG_RASTER_H
#define UG_RASTER_H

#include "ug.h"

/* CSS: 1 in = 96 px (W3C CSS Values and Units, absolute lengths);
** PDF: 1 in = 72 pt (ISO 32000-1 §8.3.2.1). So 1 px = 0.75 pt. */
#define RASTER_CSS_DPI 96.0
#define RASTER_PT_PER_PX (72.0 / 96.0)

/* A PNG larger than this is refused: 100 megapixels is 400 MB of RGBA in
** memory, far beyond any printed page (A3 at 600 dpi is about 70 MP). */
#define RASTER_MAX_PIXELS 100000000.0
/* cairo image surfaces refuse sides above 32767 pixels. */
#define RASTER_MAX_SIDE 32767.0
/* The largest page PDF readers must accept: 14 400 units (200 in) a side
** (ISO 32000-1, Annex C, table C.1, implementation limits). */
#define RASTER_MAX_PAGE_PT 14400.0

/* Offset of the <svg> element in an SVG document: the XML declaration, a
** doctype and comments before it have no place inside another document
** (a web page, a handout page). */
size_t raster_svg_body(const char *svg, size_t len);

/* The SVG's intrinsic size in CSS px, or an error when it states none. */
ug_status raster_svg_size(const char *svg, size_t len, double *w, double *h,
                          ug_error *err);

/* Icons lifted out of an SVG so each glyph is drawn once (raster_icons.c).
** When *icons is set, *rest is the document without them, for librsvg
** (freed with raster_icons_free_text); when nothing matched our icon
** pattern both stay NULL and the SVG is drawn as it is. */
typedef struct raster_icons raster_icons;
typedef struct _cairo cairo_t;
ug_status raster_icons_lift(const char *svg, size_t len, raster_icons **icons,
                            char **rest, size_t *rest_len, ug_error *err);
/* Paint every lifted icon onto cr, where the document fills the w x h
** viewport at the origin. */
ug_status raster_icons_paint(raster_icons *icons, cairo_t *cr, double w, double h,
                             ug_error *err);
size_t raster_icons_count(const raster_icons *icons);
void raster_icons_free(raster_icons *icons);
void raster_icons_free_text(char *rest);

#endif
