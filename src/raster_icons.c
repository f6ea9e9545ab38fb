/*
** Raster stage, icons: each glyph drawn once per document, not once per icon.
**
** librsvg draws every <use> of a symbol anew, and for each drawn shape it
** asks cairo for the fill extents, which cairo finds by tessellating the
** path: quadratic in its self-intersections. 300 icons of a 4,000-segment
** glyph took a minute, and a PDF held every icon's path again. So before
** librsvg sees the document, the icons are lifted out of it: every <use>
** that places a glyph symbol the way the svg stage (and the page stage around
** it) writes one. The rest of the document is drawn by librsvg as before;
** then each (glyph, colour, size) is drawn once into a cairo recording
** surface and painted at every icon's place. In a PDF cairo writes a
** recording surface painted again and again as one form XObject that each
** icon refers to; in a PNG each paint replays the recorded path, in time
** linear in its size.
**
** Only the pattern our writers produce is lifted, element by element and
** attribute by attribute; anything else (a transform, a style, an opacity,
** an unknown attribute on the way down) leaves its subtree to librsvg, so a
** document from elsewhere is drawn exactly as librsvg would draw it. Icons
** are painted after the rest: in our documents they come last in their
** panel and overlap nothing, so the order of painting changes no pixel.
*/
#include <cairo.h>
#include <libxml/hash.h>
#include <libxml/parser.h>
#include <libxml/tree.h>
#include <librsvg/rsvg.h>
#include <limits.h>
#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "glyph_shape.h"
#include "raster.h"

#define SVG_NS "http://www.w3.org/2000/svg"
#define XLINK_NS "http://www.w3.org/1999/xlink"

typedef struct {
    double x, y, w, h;
    bool on;
} clip_rect;

/* A look drawn at one sub-pixel offset, for an image surface: an icon whose
** device position has the same fractional part is a copy of it. */
typedef struct {
    double fx, fy;
    cairo_surface_t *img;
} icon_stamp;

/* Distinct offsets kept per look: icons on a grid of a whole number of
** pixels share one; at 300 dpi a 23 px pitch comes back after 8 (common
** practice, no source: enough for any regular grid, and bounded). */
#define MAX_STAMPS 64

/* A glyph at one size in one colour: what one recording surface holds. */
typedef struct {
    xmlNode *symbol;
    double w, h;
    unsigned rgb;
    cairo_surface_t *rec;
    icon_stamp stamps[MAX_STAMPS];
    size_t nstamps;
} icon_look;

typedef struct {
    double x, y; /* top-left in document user units */
    clip_rect clip;
    size_t look;
} lifted_icon;

struct raster_icons {
    xmlDoc *doc;
    xmlHashTable *ids; /* id -> element (libxml2 registers no ids without a DTD) */
    icon_look *looks;
    size_t nlooks, looks_cap;
    lifted_icon *icons;
    size_t nicons, icons_cap;
    double view_w, view_h; /* the root's viewBox size */
    bool failed;       /* out of memory while lifting */
};

/* State inherited on the way down the tree. */
typedef struct {
    double tx, ty;
    unsigned rgb;
    bool has_rgb;
    clip_rect clip;
} walk_state;

/* ---- reading attributes --------------------------------------------------- */

static bool named(const xmlNode *n, const char *name)
{
    return n->type == XML_ELEMENT_NODE && n->ns && n->ns->href &&
           !strcmp((const char *)n->ns->href, SVG_NS) && !strcmp((const char *)n->name, name);
}

/* True when every attribute of n is one of the NULL-terminated names (in no
** namespace; href may also be xlink:href). */
static bool only_attributes(const xmlNode *n, const char *const *names)
{
    for (const xmlAttr *a = n->properties; a; a = a->next) {
        bool xlink_href = a->ns && !strcmp((const char *)a->ns->href, XLINK_NS) &&
                          !strcmp((const char *)a->name, "href");
        if (a->ns && !xlink_href)
            return false;
        bool known = false;
        for (const char *const *k = names; *k && !known; k++)
            known = !strcmp((const char *)a->name, *k);
        if (!known)
            return false;
    }
    return true;
}

static const char *attr(const xmlNode *n, const char *name)
{
    for (const xmlAttr *a = n->properties; a; a = a->next)
        if (!strcmp((const char *)a->name, name) && a->children &&
            a->children->type == XML_TEXT_NODE)
            return (const char *)a->children->content;
    return NULL;
}

/* A plain number as the svg stage writes one (no unit). */
static bool number(const char *s, double *v)
{
    if (!s || !*s)
        return false;
    char *end;
    *v = strtod(s, &end);
    return *end == '\0' && isfinite(*v);
}

static bool number_attr(const xmlNode *n, const char *name, double *v)
{
    return number(attr(n, name), v);
}

static bool rgb_attr(const xmlNode *n, unsigned *rgb)
{
    const char *s = attr(n, "fill");
    if (!s || s[0] != '#' || strlen(s) != 7 || strspn(s + 1, "0123456789abcdefABCDEF") != 6)
        return false;
    *rgb = (unsigned)strtoul(s + 1, NULL, 16);
    return true;
}

/* "#id" (or "url(#id)" when wrapped) -> the element with that id. */
static xmlNode *target(xmlHashTable *ids, const char *ref, bool wrapped)
{
    if (!ref)
        return NULL;
    char id[128];
    size_t n = strlen(ref);
    if (wrapped) {
        if (n < 7 || strncmp(ref, "url(#", 5) || ref[n - 1] != ')' || n - 6 >= sizeof id)
            return NULL;
        memcpy(id, ref + 5, n - 6);
        id[n - 6] = '\0';
    } else {
        if (n < 2 || ref[0] != '#' || n >= sizeof id)
            return NULL;
        memcpy(id, ref + 1, n);
    }
    return xmlHashLookup(ids, (const xmlChar *)id);
}

/* ---- recognising our pattern ------------------------------------------------ */

/* <symbol id viewBox="0 0 100 100"> as the svg stage defines each glyph. */
static xmlNode *glyph_symbol(xmlHashTable *ids, const xmlNode *sized)
{
    static const char *const keys[] = {"id", "viewBox", NULL};
    xmlNode *s = target(ids, attr(sized, "href"), false);
    if (!s || !named(s, "symbol") || !only_attributes(s, keys))
        return NULL;
    const char *vb = attr(s, "viewBox");
    return vb && !strcmp(vb, "0 0 100 100") ? s : NULL;
}

/* <use id href="#g-N" width height> inside <defs>: the glyph at icon size. */
static bool sized_use(xmlHashTable *ids, const xmlNode *u, xmlNode **symbol, double *w,
                      double *h)
{
    static const char *const keys[] = {"id", "href", "width", "height", NULL};
    if (!u || !named(u, "use") || !u->parent || !named(u->parent, "defs") ||
        !only_attributes(u, keys) || !number_attr(u, "width", w) ||
        !number_attr(u, "height", h) || !(*w > 0 && *h > 0))
        return false;
    return (*symbol = glyph_symbol(ids, u)) != NULL;
}

/* <clipPath id><rect x y width height/></clipPath>, user space. */
static bool clip_of(xmlHashTable *ids, const xmlNode *g, clip_rect *c)
{
    static const char *const path_keys[] = {"id", NULL};
    static const char *const rect_keys[] = {"x", "y", "width", "height", NULL};
    xmlNode *cp = target(ids, attr(g, "clip-path"), true);
    if (!cp || !named(cp, "clipPath") || !only_attributes(cp, path_keys))
        return false;
    xmlNode *r = NULL;
    for (xmlNode *k = cp->children; k; k = k->next) {
        if (k->type == XML_TEXT_NODE && xmlIsBlankNode(k))
            continue;
        if (r || !named(k, "rect"))
            return false;
        r = k;
    }
    if (!r || !only_attributes(r, rect_keys) || !number_attr(r, "x", &c->x) ||
        !number_attr(r, "y", &c->y) || !number_attr(r, "width", &c->w) ||
        !number_attr(r, "height", &c->h))
        return false;
    c->on = true;
    return true;
}

/* ---- lifting -------------------------------------------------------------- */

static size_t look_for(raster_icons *ri, xmlNode *symbol, double w, double h,
                       unsigned rgb)
{
    for (size_t i = ri->nlooks; i-- > 0;) {
        const icon_look *l = &ri->looks[i];
        if (l->symbol == symbol && l->w == w && l->h == h && l->rgb == rgb)
            return i;
    }
    if (ri->nlooks == ri->looks_cap) {
        size_t cap = ri->looks_cap ? 2 * ri->looks_cap : 8;
        icon_look *m = ug_realloc(ri->looks, cap * sizeof *m);
        if (!m)
            return SIZE_MAX;
        ri->looks = m;
        ri->looks_cap = cap;
    }
    ri->looks[ri->nlooks] = (icon_look){.symbol = symbol, .w = w, .h = h, .rgb = rgb};
    return ri->nlooks++;
}

static bool add_icon(raster_icons *ri, const lifted_icon *icon)
{
    if (ri->nicons == ri->icons_cap) {
        size_t cap = ri->icons_cap ? 2 * ri->icons_cap : 256;
        lifted_icon *m = cap > SIZE_MAX / sizeof *m ? NULL : ug_realloc(ri->icons, cap * sizeof *m);
        if (!m)
            return false;
        ri->icons = m;
        ri->icons_cap = cap;
    }
    ri->icons[ri->nicons++] = *icon;
    return true;
}

/* An icon: <use href="#u-N" x y/> with a known fill; true when lifted. */
static bool lift_icon(raster_icons *ri, xmlNode *u, const walk_state *st)
{
    static const char *const keys[] = {"href", "x", "y", NULL};
    xmlNode *symbol;
    double x, y, w, h;
    if (!st->has_rgb || !only_attributes(u, keys) || !number_attr(u, "x", &x) ||
        !number_attr(u, "y", &y) ||
        !sized_use(ri->ids, target(ri->ids, attr(u, "href"), false), &symbol, &w, &h))
        return false;
    size_t look = look_for(ri, symbol, w, h, st->rgb);
    /* the clip rectangle is in the same user space as the icon's x and y */
    clip_rect clip = st->clip;
    clip.x += st->tx;
    clip.y += st->ty;
    lifted_icon icon = {st->tx + x, st->ty + y, clip, look};
    if (look == SIZE_MAX || !add_icon(ri, &icon)) {
        ri->failed = true;
        return false;
    }
    return true;
}

static const char *const svg_keys[] = {"x", "y", "width", "height", "viewBox", "role",
                                       "aria-labelledby", "aria-describedby",
                                       "font-family", NULL};

/* viewBox="X Y W H" of an <svg> that also states width and height as
** plain numbers equal to W and H (its user units are its parent's). */
static bool unscaled_svg(const xmlNode *n, double vb[4])
{
    double w, h;
    const char *box = attr(n, "viewBox");
    return named(n, "svg") && only_attributes(n, svg_keys) && box &&
           sscanf(box, "%lf %lf %lf %lf", &vb[0], &vb[1], &vb[2], &vb[3]) == 4 &&
           number_attr(n, "width", &w) && number_attr(n, "height", &h) &&
           w == vb[2] && h == vb[3];
}

/* How entering element n changes the state; false when its subtree is left
** to librsvg whole. */
static bool enter(raster_icons *ri, const xmlNode *n, walk_state *st)
{
    static const char *const g_keys[] = {"id", "fill", "clip-path", NULL};
    if (named(n, "g")) {
        if (!only_attributes(n, g_keys) || (attr(n, "clip-path") && st->clip.on))
            return false;
        if (attr(n, "fill")) {
            if (!rgb_attr(n, &st->rgb))
                return false;
            st->has_rgb = true;
        }
        return !attr(n, "clip-path") || clip_of(ri->ids, n, &st->clip);
    }
    /* A page's panel, or the chart inside it: a nested <svg> whose viewBox
    ** is its own size only moves its content (its viewport clip holds whole
    ** icons: the page crops charts to their content). */
    double x = 0, y = 0, vb[4];
    if (!unscaled_svg(n, vb) || (attr(n, "x") && !number_attr(n, "x", &x)) ||
        (attr(n, "y") && !number_attr(n, "y", &y)))
        return false;
    st->tx += x - vb[0];
    st->ty += y - vb[1];
    return true;
}

static void walk(raster_icons *ri, xmlNode *parent, walk_state st)
{
    xmlNode *next;
    for (xmlNode *n = parent->children; n && !ri->failed; n = next) {
        next = n->next;
        if (named(n, "use")) {
            if (lift_icon(ri, n, &st)) {
                xmlUnlinkNode(n);
                xmlFreeNode(n);
            }
            continue;
        }
        walk_state inner = st;
        if (n->type == XML_ELEMENT_NODE && enter(ri, n, &inner))
            walk(ri, n, inner);
    }
}

/* The root: viewBox="0 0 W H", no preserveAspectRatio; its width and
** height may be in any unit (a page's are in mm), the scale to the viewport
** is worked out when painting. */
static bool plain_root(const xmlNode *root, double vb[4])
{
    const char *box = attr(root, "viewBox");
    return named(root, "svg") && only_attributes(root, svg_keys) && !attr(root, "x") &&
           !attr(root, "y") && box &&
           sscanf(box, "%lf %lf %lf %lf", &vb[0], &vb[1], &vb[2], &vb[3]) == 4 &&
           vb[0] == 0 && vb[1] == 0 && vb[2] > 0 && vb[3] > 0 && isfinite(vb[2]) &&
           isfinite(vb[3]);
}

/* Every element with an id, in document order (the first of two wins, as
** librsvg takes the first). */
static bool index_ids(xmlHashTable *ids, xmlNode *n)
{
    for (; n; n = n->next) {
        if (n->type != XML_ELEMENT_NODE)
            continue;
        const char *id = attr(n, "id");
        if (id && !xmlHashLookup(ids, (const xmlChar *)id) &&
            xmlHashAddEntry(ids, (const xmlChar *)id, n) != 0)
            return false;
        if (!index_ids(ids, n->children))
            return false;
    }
    return true;
}

static ug_status lift_failed(raster_icons *ri, ug_error *err)
{
    raster_icons_free(ri);
    return ug_fail(err, UG_ENOMEM, ug_mark_file(NULL), "out of memory");
}

ug_status raster_icons_lift(const char *svg, size_t len, raster_icons **out,
                            char **rest, size_t *rest_len, ug_error *err)
{
    *out = NULL;
    *rest = NULL;
    if (len > INT_MAX)
        return UG_OK; /* librsvg alone, as before */
    raster_icons *ri = ug_calloc(1, sizeof *ri);
    if (!ri)
        return ug_fail(err, UG_ENOMEM, ug_mark_file(NULL), "out of memory");
    /* Already read once by librsvg, so well-formed; huge only for size. */
    ri->doc = xmlReadMemory(svg, (int)len, NULL, NULL,
                            XML_PARSE_NONET | XML_PARSE_NOERROR | XML_PARSE_NOWARNING |
                                XML_PARSE_HUGE);
    xmlNode *root = ri->doc ? xmlDocGetRootElement(ri->doc) : NULL;
    double vb[4];
    if (!root || !plain_root(root, vb)) {
        raster_icons_free(ri);
        return UG_OK;
    }
    if (!(ri->ids = xmlHashCreate(64)) || !index_ids(ri->ids, root))
        return lift_failed(ri, err);
    ri->view_w = vb[2];
    ri->view_h = vb[3];
    walk(ri, root, (walk_state){0});
    if (ri->failed)
        return lift_failed(ri, err);
    if (!ri->nicons) {
        raster_icons_free(ri);
        return UG_OK;
    }
    xmlChar *text = NULL;
    int n = 0;
    xmlDocDumpMemory(ri->doc, &text, &n);
    if (!text)
        return lift_failed(ri, err);
    *rest = (char *)text;
    *rest_len = (size_t)n;
    *out = ri;
    return UG_OK;
}

void raster_icons_free_text(char *rest)
{
    xmlFree(rest);
}

/* ---- painting ------------------------------------------------------------- */

static ug_status recorded(cairo_t *cr, bool ok, GError *gerr, ug_error *err)
{
    cairo_status_t cs = cairo_status(cr);
    cairo_destroy(cr);
    if (ok && !cs)
        return UG_OK;
    ug_fail(err, cs == CAIRO_STATUS_NO_MEMORY ? UG_ENOMEM : UG_ERENDER,
            ug_mark_file(NULL), "a glyph could not be drawn: %s",
            !ok && gerr && gerr->message ? gerr->message : cairo_status_to_string(cs));
    g_clear_error(&gerr);
    return err->status;
}

/* Glyph markup as our sanitizer leaves it is filled by glyph_shape with
** cairo directly (linear in its size); anything else goes through librsvg. */
static bool record_shape(const icon_look *l, const char *body, cairo_t *cr)
{
    glyph_shape *shape = NULL;
    ug_error ignored = {0};
    if (glyph_shape_parse(body, ug_mark_file(NULL), &shape, &ignored))
        return false;
    cairo_scale(cr, l->w / 100, l->h / 100); /* the symbol's viewBox 0 0 100 100 */
    cairo_set_source_rgb(cr, (l->rgb >> 16 & 255) / 255.0, (l->rgb >> 8 & 255) / 255.0,
                         (l->rgb & 255) / 255.0);
    glyph_shape_draw(shape, cr);
    glyph_shape_free(shape);
    return true;
}

static ug_status record_rsvg(icon_look *l, const ug_buf *body, cairo_t *cr, ug_error *err)
{
    ug_buf doc;
    ug_buf_init(&doc);
    ug_buf_printf(&doc, "<svg xmlns=\"%s\" width=\"%.17g\" height=\"%.17g\" "
                        "viewBox=\"0 0 100 100\"><g fill=\"#%06x\">",
                  SVG_NS, l->w, l->h, l->rgb);
    ug_buf_add(&doc, body->data, body->len);
    ug_buf_puts(&doc, "</g></svg>");
    GError *gerr = NULL;
    RsvgHandle *h = doc.failed ? NULL
                               : rsvg_handle_new_from_data((const guint8 *)doc.data,
                                                           doc.len, &gerr);
    bool nomem = doc.failed;
    ug_buf_free(&doc);
    if (!h) {
        cairo_destroy(cr);
        if (nomem)
            return ug_fail(err, UG_ENOMEM, ug_mark_file(NULL), "out of memory");
        ug_fail(err, UG_ERENDER, ug_mark_file(NULL), "a glyph could not be read: %s",
                gerr && gerr->message ? gerr->message : "unknown librsvg error");
        g_clear_error(&gerr);
        return err->status;
    }
    RsvgRectangle vp = {0, 0, l->w, l->h};
    gboolean ok = rsvg_handle_render_document(h, cr, &vp, &gerr);
    g_object_unref(h);
    return recorded(cr, ok, gerr, err);
}

/* The glyph once, at its icon size and in its colour, bounded to the
** symbol's viewport, which clips what it draws. */
static ug_status record(icon_look *l, ug_error *err)
{
    ug_buf body;
    ug_buf_init(&body);
    xmlBuffer *xb = xmlBufferCreate();
    for (xmlNode *k = l->symbol->children; k && xb; k = k->next)
        xmlNodeDump(xb, l->symbol->doc, k, 0, 0);
    if (xb)
        ug_buf_add(&body, (const char *)xmlBufferContent(xb), (size_t)xmlBufferLength(xb));
    ug_buf_add(&body, "", 1);
    if (xb)
        xmlBufferFree(xb);
    if (!xb || body.failed) {
        ug_buf_free(&body);
        return ug_fail(err, UG_ENOMEM, ug_mark_file(NULL), "out of memory");
    }
    body.len--; /* the NUL stays for the parser */
    cairo_rectangle_t box = {0, 0, l->w, l->h};
    l->rec = cairo_recording_surface_create(CAIRO_CONTENT_COLOR_ALPHA, &box);
    cairo_t *cr = cairo_create(l->rec);
    ug_status st = record_shape(l, body.data, cr) ? recorded(cr, true, NULL, err)
                                                  : record_rsvg(l, &body, cr, err);
    ug_buf_free(&body);
    return st;
}

/* The look drawn once at device scale `scale`, shifted by (fx, fy) px. */
static cairo_surface_t *stamp(icon_look *l, double scale, double fx, double fy)
{
    for (size_t i = 0; i < l->nstamps; i++)
        if (l->stamps[i].fx == fx && l->stamps[i].fy == fy)
            return l->stamps[i].img;
    if (l->nstamps == MAX_STAMPS)
        return NULL;
    int w = (int)ceil(l->w * scale) + 1, h = (int)ceil(l->h * scale) + 1;
    cairo_surface_t *img = cairo_image_surface_create(CAIRO_FORMAT_ARGB32, w, h);
    cairo_t *c = cairo_create(img);
    cairo_translate(c, fx, fy);
    cairo_scale(c, scale, scale);
    cairo_set_source_surface(c, l->rec, 0, 0);
    cairo_paint(c);
    cairo_destroy(c);
    l->stamps[l->nstamps++] = (icon_stamp){fx, fy, img};
    return img;
}

/* On an image surface with an unrotated, uniformly scaled user space (what
** fit_view sets up), an icon is a copy of its look's stamp at a whole pixel
** offset; elsewhere (PDF) the recording is painted, and cairo writes it as
** one form XObject. */
static void paint(cairo_t *cr, const lifted_icon *ic, icon_look *l, bool image)
{
    cairo_save(cr);
    if (ic->clip.on) {
        cairo_rectangle(cr, ic->clip.x, ic->clip.y, ic->clip.w, ic->clip.h);
        cairo_clip(cr);
    }
    double dx = ic->x, dy = ic->y, one = 1, zero = 0;
    cairo_user_to_device(cr, &dx, &dy);
    cairo_user_to_device_distance(cr, &one, &zero);
    double ix = floor(dx), iy = floor(dy);
    cairo_surface_t *img = image ? stamp(l, one, dx - ix, dy - iy) : NULL;
    if (img) {
        cairo_identity_matrix(cr);
        cairo_set_source_surface(cr, img, ix, iy);
    } else {
        cairo_set_source_surface(cr, l->rec, ic->x, ic->y);
    }
    cairo_paint(cr);
    cairo_restore(cr);
}

/* The root's viewBox into a w x h viewport as SVG's default
** preserveAspectRatio (xMidYMid meet) places it (SVG 1.1 §7.8). */
static void fit_view(const raster_icons *ri, cairo_t *cr, double w, double h)
{
    double s = fmin(w / ri->view_w, h / ri->view_h);
    cairo_translate(cr, (w - ri->view_w * s) / 2, (h - ri->view_h * s) / 2);
    cairo_scale(cr, s, s);
}

ug_status raster_icons_paint(raster_icons *ri, cairo_t *cr, double w, double h,
                             ug_error *err)
{
    for (size_t i = 0; i < ri->nlooks; i++) {
        ug_status st = record(&ri->looks[i], err);
        if (st)
            return st;
    }
    bool image = cairo_surface_get_type(cairo_get_target(cr)) == CAIRO_SURFACE_TYPE_IMAGE;
    cairo_save(cr);
    fit_view(ri, cr, w, h);
    for (size_t i = 0; i < ri->nicons; i++)
        paint(cr, &ri->icons[i], &ri->looks[ri->icons[i].look], image);
    cairo_restore(cr);
    cairo_status_t cs = cairo_status(cr);
    if (cs)
        return ug_fail(err, cs == CAIRO_STATUS_NO_MEMORY ? UG_ENOMEM : UG_ERENDER,
                       ug_mark_file(NULL), "cairo: %s", cairo_status_to_string(cs));
    return UG_OK;
}

size_t raster_icons_count(const raster_icons *ri)
{
    return ri ? ri->nicons : 0;
}

void raster_icons_free(raster_icons *ri)
{
    if (!ri)
        return;
    for (size_t i = 0; i < ri->nlooks; i++) {
        icon_look *l = &ri->looks[i];
        if (l->rec)
            cairo_surface_destroy(l->rec);
        for (size_t k = 0; k < l->nstamps; k++)
            cairo_surface_destroy(l->stamps[k].img);
    }
    ug_free(ri->looks);
    ug_free(ri->icons);
    if (ri->ids)
        xmlHashFree(ri->ids, NULL);
    if (ri->doc)
        xmlFreeDoc(ri->doc);
    ug_free(ri);
}
