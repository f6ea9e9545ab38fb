/*
** The scene: every box of one chart placed on the canvas, in SVG user units
** (CSS px), independent of the output format. pack.c builds it from the model
** and the allocation; svg.c (and later the rasterizer and the audit) read it.
** All strings and arrays belong to the scene's arena; glyphs are owned and
** released by ug_scene_free.
*/
#ifndef UG_SCENE_H
#define UG_SCENE_H

#include "glyph.h"
#include "model.h"

typedef enum { SCENE_START, SCENE_MIDDLE, SCENE_END } scene_anchor;

typedef struct {
    unsigned char r, g, b;
} scene_rgb;

/* One line of text. y is the baseline; the box the line occupies is
** [x0, x0 + w] x [y - ascent, y + descent], x0 depending on the anchor. */
typedef struct {
    double x, y, size, w, ascent, descent;
    bool bold;
    scene_anchor anchor;
    const char *text;   /* valid UTF-8, no control characters */
} scene_text;

/* One icon: top-left corner; the size is the scene's icon_size. fraction is 1
** for a whole icon and in (0, 1) for a clipped last icon (rounding: partial). */
typedef struct {
    double x, y, fraction;
    unsigned cat, group;
} scene_icon;

/* A suppressed count: a dashed outline standing for a count too small to
** publish, labelled (for instance) "fewer than 10". The label is a text run
** in the scene's text list; this is only the box. */
typedef struct {
    double x, y, w, h;
    unsigned cat, group;
} scene_placeholder;

/* A plain rectangle: an empty waffle cell (stroke only) or a key swatch frame. */
typedef struct {
    double x, y, w, h;
    scene_rgb stroke;
} scene_rect;

typedef struct {
    const char *id;       /* an XML id, [A-Za-z0-9_-], one per category id */
    const char *title;    /* "Adults: 2,480 households" (suppressed: its label) */
    scene_rgb color;
    size_t glyph;         /* index into glyphs */
} scene_category;

/* A chart's scene drawn inside a handout sheet's: placed with its crop's
** top-left corner at (x, y), showing only crop (in the child's own units, so
** no icon is scaled), every id and reference in it prefixed so two children
** never share one. Borrowed from whoever packed it. */
typedef struct {
    const ug_scene *scene;
    double x, y;
    double crop_x, crop_y, crop_w, crop_h;
    char id_prefix[24];
} scene_child;

/* The markup of a chart's distinct glyphs together (a single glyph file may
** hold 1 MiB): beyond it a chart is refused, not drawn slowly. */
#define SCENE_MAX_GLYPH_BYTES (4u << 20)

struct ug_scene {
    ug_arena arena;
    double width, height, icon_size;
    scene_rgb background, ink;
    const char *font;
    const char *title;   /* accessible name */
    const char *desc;    /* accessible description (ug_chart_describe) */
    const char *lang;    /* BCP 47 tag the chart states (FORMAT.md §6); NULL: none */
    bool rtl;            /* laid out mirrored, for a right-to-left language */

    scene_category *cats;
    size_t ncats;
    ug_glyph **glyphs;   /* distinct glyphs, owned */
    size_t nglyphs;

    scene_icon *icons;   /* grouped by category: all of cat 0, then cat 1, ... */
    size_t nicons;
    scene_icon *swatches; /* one key swatch per category (group unused) */
    size_t nswatches;
    scene_text *texts;
    size_t ntexts;
    scene_placeholder *holders;
    size_t nholders;
    scene_rect *rects;
    size_t nrects;

    /* A handout sheet (page.c): sized in mm (width_mm, height_mm) on the
    ** printed page, named as a document rather than an image, and holding its
    ** charts as children; a chart's scene has none. */
    bool sheet;
    double width_mm, height_mm;
    scene_child *children;
    size_t nchildren;
};

/* The box a text line occupies (for layout checks). */
static inline void scene_text_box(const scene_text *t, double *x0, double *y0,
                                  double *x1, double *y1)
{
    double left = t->anchor == SCENE_START ? t->x
                  : t->anchor == SCENE_END ? t->x - t->w : t->x - t->w / 2;
    *x0 = left;
    *x1 = left + t->w;
    *y0 = t->y - t->ascent;
    *y1 = t->y + t->descent;
}

#endif
