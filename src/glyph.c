/*
** Glyph stage: a glyph reference -> inert markup in the 0 0 100 100 unit box.
**
** Glyph files are read with libxml2 with the network off and entities left
** unexpanded; a document with a DTD is refused outright, which closes both the
** external-entity and the entity-expansion doors. What survives is rebuilt from
** a short list of drawing elements and geometry attributes whose values are
** checked character by character, so nothing the file says can become script,
** a link, a style or a fetch in our output. Everything dropped is recorded in
** g->removed for the user.
**
** Decisions worth knowing:
**   - Glyphs are filled shapes. Colours, strokes and opacity are removed (the
**     chart colours glyphs through `fill` on <use>). A shape the file left
**     unfilled (fill="none", also inherited) would become a solid blob, so it
**     is dropped and reported; a <line> has no area and is dropped the same
**     way; a <polyline> is filled as if closed, so it becomes a <polygon>.
**   - Lengths must be plain numbers or px: percentages and font units would
**     mean something else inside the chart's <symbol>.
**   - A library glyph (found by name) is trusted to be drawn in the unit box
**     already; only a root viewBox other than 0 0 100 100 is mapped onto it.
**     A user's file (a path) is measured with librsvg and fitted, centred,
**     into the box inside GLYPH_MARGIN, so it sits like a library glyph.
**   - A path may only name a file inside the layout's folder (after resolving
**     symlinks and `..`); names only resolve on the search path.
*/
#define _GNU_SOURCE /* realpath(3), memmem(3) */
#include <errno.h>
#include <fcntl.h>
#include <libxml/parser.h>
#include <libxml/tree.h>
#include <limits.h>
#include <pthread.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#include "context.h"
#include "glyph.h"
#include "svg.h"

#define SVG_NS "http://www.w3.org/2000/svg"

static const char *const primitives[][2] = {
    {"square", "<rect width=\"100\" height=\"100\"/>"},
    {"rounded-square", "<rect width=\"100\" height=\"100\" rx=\"18\"/>"},
    {"circle", "<circle cx=\"50\" cy=\"50\" r=\"50\"/>"},
};

#define NPRIMITIVES (sizeof primitives / sizeof primitives[0])

size_t ug_glyph_primitive_count(void) { return NPRIMITIVES; }

const char *ug_glyph_primitive_name(size_t i) { return i < NPRIMITIVES ? primitives[i][0] : NULL; }

static const char *const kept_elements[] = {
    "g", "path", "circle", "ellipse", "rect", "polyline", "polygon"};

/* Removed without a word: they never draw and carry nothing active. */
static const char *const quiet_elements[] = {"title", "desc", "metadata"};
static const char *const quiet_attributes[] = {"id", "class", "version",
                                               "baseProfile", "preserveAspectRatio"};

typedef enum { V_LENGTH, V_PATH, V_POINTS, V_TRANSFORM, V_RULE } value_kind;

static const struct {
    const char *name;
    value_kind kind;
} kept_attributes[] = {
    {"d", V_PATH},       {"points", V_POINTS}, {"transform", V_TRANSFORM},
    {"fill-rule", V_RULE}, {"clip-rule", V_RULE}, {"cx", V_LENGTH},
    {"cy", V_LENGTH},    {"r", V_LENGTH},      {"rx", V_LENGTH},
    {"ry", V_LENGTH},    {"x", V_LENGTH},      {"y", V_LENGTH},
    {"width", V_LENGTH}, {"height", V_LENGTH},
};

static bool in_list(const char *s, const char *const *list, size_t n)
{
    for (size_t i = 0; i < n; i++)
        if (strcmp(s, list[i]) == 0)
            return true;
    return false;
}

#define IN(s, list) in_list((s), (list), sizeof(list) / sizeof((list)[0]))

/* ---- the glyph object ----------------------------------------------------- */

void glyph_free(ug_glyph *g)
{
    if (!g)
        return;
    for (size_t i = 0; i < g->nremoved; i++)
        ug_free(g->removed[i]);
    ug_free(g->removed);
    ug_free(g->name);
    ug_free(g->body);
    ug_free(g->path);
    glyph_shape_free(g->shape);
    ug_free(g);
}

static ug_glyph *glyph_new(const char *ref)
{
    ug_glyph *g = ug_calloc(1, sizeof *g);
    if (g && !(g->name = ug_strdup(ref))) {
        ug_free(g);
        g = NULL;
    }
    return g;
}

/* One line per distinct removal. Memory running out here is remembered, so
** the load fails instead of quietly dropping the warning. */
static void note_removed(ug_glyph *g, const char *fmt, ...) UG_PRINTF(2, 3);
static void note_removed(ug_glyph *g, const char *fmt, ...)
{
    char line[200];
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(line, sizeof line, fmt, ap);
    va_end(ap);
    for (size_t i = 0; i < g->nremoved; i++)
        if (strcmp(g->removed[i], line) == 0)
            return;
    char **grown = ug_realloc(g->removed, (g->nremoved + 1) * sizeof *grown);
    if (!grown) {
        g->notes_lost = true;
        return;
    }
    g->removed = grown;
    if ((g->removed[g->nremoved] = ug_strdup(line)))
        g->nremoved++;
    else
        g->notes_lost = true;
}

/* "prefix:name" for namespaced nodes, so a warning says xlink:href. */
static const char *qname(const xmlChar *name, const xmlNs *ns, char *buf, size_t size)
{
    if (ns && ns->prefix)
        snprintf(buf, size, "%.40s:%.80s", (const char *)ns->prefix, (const char *)name);
    else
        snprintf(buf, size, "%.120s", (const char *)name);
    return buf;
}

/* ---- attribute values ------------------------------------------------------- */

static bool is_number_char(char c)
{
    return (c >= '0' && c <= '9') || c == '.' || c == '-' || c == '+';
}

static bool is_space(char c)
{
    return c == ' ' || c == '\t' || c == '\n' || c == '\r' || c == ',';
}

/* Each run of letters must be one the kind allows: path commands, transform
** function names, an exponent, or the px unit. */
static bool letters_ok(const char *w, size_t n, value_kind kind)
{
    static const char *const funcs[] = {"matrix", "translate", "scale",
                                        "rotate", "skewX", "skewY"};
    if ((n == 1 && (*w == 'e' || *w == 'E')) || kind == V_PATH)
        return kind != V_PATH || strspn(w, "MmZzLlHhVvCcSsQqTtAaEe") >= n;
    if (kind == V_LENGTH)
        return n == 2 && strncmp(w, "px", 2) == 0;
    for (size_t i = 0; kind == V_TRANSFORM && i < sizeof funcs / sizeof *funcs; i++)
        if (strlen(funcs[i]) == n && strncmp(w, funcs[i], n) == 0)
            return true;
    return false;
}

static bool value_ok(const char *v, value_kind kind)
{
    if (kind == V_RULE)
        return strcmp(v, "nonzero") == 0 || strcmp(v, "evenodd") == 0;
    while (*v) {
        size_t n = 0;
        while ((v[n] >= 'a' && v[n] <= 'z') || (v[n] >= 'A' && v[n] <= 'Z'))
            n++;
        if (n) {
            if (!letters_ok(v, n, kind))
                return false;
            v += n;
        } else if (is_number_char(*v) || is_space(*v) ||
                   (kind == V_TRANSFORM && (*v == '(' || *v == ')'))) {
            v++;
        } else {
            return false;
        }
    }
    return true;
}

static int kept_kind(const char *name)
{
    for (size_t i = 0; i < sizeof kept_attributes / sizeof *kept_attributes; i++)
        if (strcmp(name, kept_attributes[i].name) == 0)
            return (int)kept_attributes[i].kind;
    return -1;
}

/* ---- rebuilding the drawing ----------------------------------------------- */

typedef struct {
    ug_glyph *g;
    ug_buf *b;
    int elements;
    bool too_deep;
} rebuild;

/* Paint state an element sets for itself and its children. */
typedef enum { PAINT_INHERIT, PAINT_NONE, PAINT_SET } paint;

static char *attr_value(xmlNode *n, xmlAttr *a)
{
    xmlChar *v = xmlNodeListGetString(n->doc, a->children, 1);
    return (char *)v;
}

/* fill="none" or style="...fill:none..." (spaces ignored). */
static paint own_fill(xmlNode *n)
{
    paint p = PAINT_INHERIT;
    xmlChar *fill = xmlGetNoNsProp(n, (const xmlChar *)"fill");
    if (fill)
        p = strcmp((char *)fill, "none") == 0 ? PAINT_NONE
            : strcmp((char *)fill, "inherit") == 0 ? PAINT_INHERIT : PAINT_SET;
    xmlFree(fill);
    xmlChar *style = xmlGetNoNsProp(n, (const xmlChar *)"style");
    if (style) {
        char compact[512];
        size_t k = 0;
        for (const xmlChar *s = style; *s && k < sizeof compact - 1; s++)
            if (*s != ' ' && *s != '\t')
                compact[k++] = (char)*s;
        compact[k] = '\0';
        const char *f = strstr(compact, "fill:");
        while (f && f > compact && f[-1] != ';')
            f = strstr(f + 1, "fill:");
        if (f)
            p = strncmp(f + 5, "none", 4) == 0 ? PAINT_NONE : PAINT_SET;
    }
    xmlFree(style);
    return p;
}

static bool is_hidden(xmlNode *n)
{
    xmlChar *d = xmlGetNoNsProp(n, (const xmlChar *)"display");
    bool hidden = d && strcmp((char *)d, "none") == 0;
    xmlFree(d);
    return hidden;
}

static void note_attribute(rebuild *r, xmlAttr *a, const char *value)
{
    char name[160];
    qname(a->name, a->ns, name, sizeof name);
    const char *lname = (const char *)a->name;
    if (!a->ns && IN(lname, quiet_attributes))
        return;
    if (strcmp(lname, "href") == 0 && strstr(value, "javascript:"))
        note_removed(r->g, "attribute '%s' (a javascript: link)", name);
    else if (strstr(value, "url("))
        note_removed(r->g, "attribute '%s' (it referred to url())", name);
    else if (!a->ns && (strncmp(lname, "fill", 4) == 0 || strncmp(lname, "stroke", 6) == 0 ||
                        strcmp(lname, "opacity") == 0 || strcmp(lname, "style") == 0))
        note_removed(r->g, "attribute '%s' (colour and paint come from the chart)", name);
    else if (kept_kind(lname) >= 0 && !a->ns)
        note_removed(r->g, "attribute '%s' (a value other than plain numbers)", name);
    else
        note_removed(r->g, "attribute '%s'", name);
}

static void copy_attributes(rebuild *r, xmlNode *n)
{
    for (xmlAttr *a = n->properties; a; a = a->next) {
        char *value = attr_value(n, a);
        const char *v = value ? value : "";
        int kind = a->ns ? -1 : kept_kind((const char *)a->name);
        if (kind >= 0 && value_ok(v, (value_kind)kind)) {
            ug_buf_printf(r->b, " %s=\"", (const char *)a->name);
            svg_escape(r->b, v);
            ug_buf_puts(r->b, "\"");
        } else {
            note_attribute(r, a, v);
        }
        xmlFree(value);
    }
}

static bool is_svg_element(xmlNode *n)
{
    return !n->ns || strcmp((const char *)n->ns->href, SVG_NS) == 0;
}

/* What a <style> element is reported as: an external fetch is worth naming. */
static void note_style(rebuild *r, xmlNode *n)
{
    xmlChar *css = xmlNodeGetContent(n);
    const char *c = css ? (const char *)css : "";
    if (strstr(c, "@import") || strstr(c, "url("))
        note_removed(r->g, "element '%s' (with @import or url(): an external fetch)",
                     "style");
    else
        note_removed(r->g, "element '%s'", "style");
    xmlFree(css);
}

/* Why an element is not kept, and whether its children still are (<a>). */
static bool drop_element(rebuild *r, xmlNode *n, paint fill)
{
    char name[160];
    const char *local = (const char *)n->name;
    qname(n->name, n->ns, name, sizeof name);
    if (!is_svg_element(n)) {
        note_removed(r->g, "element '%s'", name);
    } else if (strcmp(local, "a") == 0) {
        note_removed(r->g, "link '%s' (its drawing is kept)", name);
        return false;
    } else if (strcmp(local, "style") == 0) {
        note_style(r, n);
    } else if (strcmp(local, "line") == 0) {
        note_removed(r->g, "element '%s' (a line has no area to fill; draw it "
                           "as a thin rect or a closed path)", name);
    } else if (is_hidden(n)) {
        note_removed(r->g, "hidden element '%s' (display=\"none\")", name);
    } else if (fill == PAINT_NONE && IN(local, kept_elements) && strcmp(local, "g")) {
        note_removed(r->g, "unfilled element '%s' (fill=\"none\"; glyphs are "
                           "filled shapes and strokes are not kept)", name);
    } else if (!IN(local, kept_elements) && !IN(local, quiet_elements)) {
        note_removed(r->g, "element '%s'", name);
    }
    return true;
}

static bool kept_here(xmlNode *n, paint fill)
{
    const char *local = (const char *)n->name;
    return is_svg_element(n) && IN(local, kept_elements) && !is_hidden(n) &&
           (fill != PAINT_NONE || strcmp(local, "g") == 0);
}

static void copy_children(rebuild *r, xmlNode *parent, int depth, paint inherited);

static void copy_element(rebuild *r, xmlNode *n, int depth, paint inherited)
{
    paint own = own_fill(n);
    paint fill = own == PAINT_INHERIT ? inherited : own;
    if (!kept_here(n, fill)) {
        if (!drop_element(r, n, fill)) /* <a>: keep what it wraps */
            copy_children(r, n, depth + 1, fill);
        return;
    }
    /* A polyline is filled as if closed: the same area as a polygon. */
    const char *name = strcmp((const char *)n->name, "polyline") == 0
                           ? "polygon" : (const char *)n->name;
    ug_buf_printf(r->b, "<%s", name);
    copy_attributes(r, n);
    if (strcmp(name, "g") == 0) {
        ug_buf_puts(r->b, ">");
        copy_children(r, n, depth + 1, fill);
        ug_buf_puts(r->b, "</g>");
    } else {
        ug_buf_puts(r->b, "/>");
        if (xmlFirstElementChild(n)) /* shapes draw no children */
            note_removed(r->g, "children of '%s'", name);
    }
}

static void copy_children(rebuild *r, xmlNode *parent, int depth, paint inherited)
{
    if (depth > GLYPH_MAX_DEPTH) {
        r->too_deep = true;
        return;
    }
    for (xmlNode *n = parent->children; n && !r->too_deep; n = n->next)
        if (n->type == XML_ELEMENT_NODE && ++r->elements <= GLYPH_MAX_ELEMENTS)
            copy_element(r, n, depth, inherited);
}

/* ---- the root: viewBox and inherited rules -------------------------------- */

/* Numbers read by the one SVG number grammar the outlines use (glyph_shape.c). */
static bool parse_numbers(const char *s, double *v, int n)
{
    const char *end = s + strlen(s);
    for (int i = 0; i < n; i++) {
        while (is_space(*s))
            s++;
        if (!(s = glyph_number(s, end, &v[i])))
            return false;
    }
    while (is_space(*s))
        s++;
    return *s == '\0';
}

static bool plain_length(const char *s, double *v)
{
    const char *end = glyph_number(s, s + strlen(s), v);
    return end && (*end == '\0' || strcmp(end, "px") == 0) && *v > 0;
}

/* The root's coordinate box: viewBox, else 0 0 width height, else the unit box. */
static void root_box(xmlNode *root, double vb[4])
{
    xmlChar *v = xmlGetNoNsProp(root, (const xmlChar *)"viewBox");
    xmlChar *w = xmlGetNoNsProp(root, (const xmlChar *)"width");
    xmlChar *h = xmlGetNoNsProp(root, (const xmlChar *)"height");
    double wh[2];
    vb[0] = vb[1] = 0;
    vb[2] = vb[3] = 100;
    if (v && parse_numbers((char *)v, vb, 4) && vb[2] > 0 && vb[3] > 0) {
        /* kept */
    } else if (w && h && plain_length((char *)w, &wh[0]) && plain_length((char *)h, &wh[1])) {
        vb[0] = vb[1] = 0;
        vb[2] = wh[0];
        vb[3] = wh[1];
    } else {
        vb[0] = vb[1] = 0;
        vb[2] = vb[3] = 100;
    }
    xmlFree(v);
    xmlFree(w);
    xmlFree(h);
}

/* Root attributes: fill-rule and clip-rule carry over (they inherit), the
** geometry ones are read by root_box; anything else is reported. */
static void root_attributes(rebuild *r, xmlNode *root)
{
    static const char *const geometry[] = {"viewBox", "width", "height", "x", "y"};
    for (xmlAttr *a = root->properties; a; a = a->next) {
        const char *name = (const char *)a->name;
        char *value = attr_value(root, a);
        const char *v = value ? value : "";
        if (!a->ns && IN(name, geometry)) {
            /* read by root_box */
        } else if (!a->ns && kept_kind(name) == V_RULE && value_ok(v, V_RULE)) {
            ug_buf_printf(r->b, " %s=\"%s\"", name, v);
        } else {
            note_attribute(r, a, v);
        }
        xmlFree(value);
    }
}

/* ---- fitting into the unit box -------------------------------------------- */

/* Shortest plain decimal with six significant digits: deterministic text. */
static void put_number(ug_buf *b, double v)
{
    char s[64];
    snprintf(s, sizeof s, "%.6g", v);
    if (strchr(s, 'e'))
        snprintf(s, sizeof s, "%.9f", v);
    if (strcmp(s, "-0") == 0)
        strcpy(s, "0");
    ug_buf_puts(b, s);
}

/* Wrap markup in the transform that maps box (x, y, w, h) into the square
** [lo, hi]^2, aspect ratio kept and centred (SVG's xMidYMid meet). */
static ug_status fit(char **markup, const double box[4], double lo, double hi,
                     ug_error *err)
{
    double side = hi - lo;
    double s = side / (box[2] > box[3] ? box[2] : box[3]);
    double tx = (lo + hi) / 2 - s * (box[0] + box[2] / 2);
    double ty = (lo + hi) / 2 - s * (box[1] + box[3] / 2);
    ug_buf b;
    ug_buf_init(&b);
    ug_buf_puts(&b, "<g transform=\"translate(");
    put_number(&b, tx);
    ug_buf_puts(&b, " ");
    put_number(&b, ty);
    ug_buf_puts(&b, ") scale(");
    put_number(&b, s);
    ug_buf_printf(&b, ")\">%s</g>", *markup);
    ug_free(*markup);
    *markup = NULL;
    return ug_buf_take(&b, markup, NULL, err);
}

/* The outlines of markup, refused over GLYPH_MAX_SEGMENTS: every later step
** (bounds, ink, the chart's rasterizer) is linear in them. The parser's
** message is given the file's name. */
static ug_status parse_shape(const ug_glyph *g, const char *markup, ug_mark where,
                             glyph_shape **out, ug_error *err)
{
    const char *file = g->path ? g->path : g->name;
    ug_status st = glyph_shape_parse(markup, where, out, err);
    if (st && st != UG_ENOMEM) {
        char msg[sizeof err->msg];
        snprintf(msg, sizeof msg, "%s", err->msg);
        ug_error_clear(err);
        return ug_fail(err, st, where, "glyph file '%s': %s", file, msg);
    }
    if (!st && glyph_shape_segments(*out) > GLYPH_MAX_SEGMENTS) {
        st = ug_fail(err, UG_ELIMIT, where, "glyph file '%s' has %zu segments (lines and "
                     "curves), more than %d", file, glyph_shape_segments(*out),
                     GLYPH_MAX_SEGMENTS);
        glyph_shape_free(*out);
        *out = NULL;
    }
    return st;
}

static ug_status place(ug_glyph *g, bool library, const double vb[4], ug_mark where,
                       ug_error *err)
{
    if (library) {
        if (vb[0] == 0 && vb[1] == 0 && vb[2] == 100 && vb[3] == 100)
            return UG_OK;
        return fit(&g->body, vb, 0, 100, err);
    }
    double box[4];
    glyph_shape *shape = NULL;
    ug_status st = parse_shape(g, g->body, where, &shape, err);
    if (st)
        return st;
    glyph_shape_bounds(shape, box);
    glyph_shape_free(shape);
    if (!(box[2] > 0 && box[3] > 0))
        return ug_fail(err, UG_ESCHEMA, where,
                       "glyph file '%s' draws nothing with an area (after sanitizing)",
                       g->path);
    return fit(&g->body, box, GLYPH_MARGIN, 100 - GLYPH_MARGIN, err);
}

/* ---- parsing ---------------------------------------------------------------- */

static ug_status xml_error(xmlParserCtxt *ctxt, const char *path, ug_mark where,
                           ug_error *err)
{
    const xmlError *e = xmlCtxtGetLastError(ctxt);
    char msg[200] = "unknown error";
    if (e && e->message) {
        snprintf(msg, sizeof msg, "%s", e->message);
        msg[strcspn(msg, "\n")] = '\0';
    }
    return ug_fail(err, UG_ESYNTAX, where,
                   "glyph file '%s' is not well-formed XML (line %d: %s)", path,
                   e ? e->line : 0, msg);
}

/* The removal that most likely explains an empty result. */
static const char *main_removal(const ug_glyph *g)
{
    for (size_t i = 0; i < g->nremoved; i++)
        if (strncmp(g->removed[i], "unfilled", 8) == 0 || strstr(g->removed[i], "'line'"))
            return g->removed[i];
    return g->removed[0];
}

static ug_status rebuild_root(ug_glyph *g, xmlNode *root, bool library,
                              ug_mark where, ug_error *err)
{
    ug_buf b;
    ug_buf_init(&b);
    rebuild r = {g, &b, 0, false};
    double vb[4];
    root_box(root, vb);
    ug_buf_puts(&b, "<g");
    root_attributes(&r, root);
    ug_buf_puts(&b, ">");
    size_t empty = b.len;
    copy_children(&r, root, 1, own_fill(root));
    bool nothing = b.len == empty;
    ug_buf_puts(&b, "</g>");
    ug_status st = UG_OK;
    if (b.failed)
        st = ug_fail(err, UG_ENOMEM, where, "out of memory");
    else if (r.too_deep)
        st = ug_fail(err, UG_ELIMIT, where, "glyph file '%s' nests elements deeper than %d "
                     "levels", g->path, GLYPH_MAX_DEPTH);
    else if (r.elements > GLYPH_MAX_ELEMENTS)
        st = ug_fail(err, UG_ELIMIT, where, "glyph file '%s' has more than %d elements",
                     g->path, GLYPH_MAX_ELEMENTS);
    else if (nothing)
        st = ug_fail(err, UG_ESCHEMA, where, "glyph file '%s' has no drawing left after "
                     "sanitizing (expected filled path, rect, circle, ellipse or polygon "
                     "elements)%s%s", g->path, g->nremoved ? "; removed: " : "",
                     g->nremoved ? main_removal(g) : "");
    if (!st)
        st = ug_buf_take(&b, &g->body, NULL, err);
    ug_buf_free(&b);
    return st ? st : place(g, library, vb, where, err);
}

static void ignore_xml_message(void *ctx, const char *msg, ...)
{
    (void)ctx;
    (void)msg;
}

/* libxml2 2.9 reports encoding and I/O errors through its generic handler
** whatever XML_PARSE_NOERROR says, and that handler writes to stderr; the
** caller gets the error from the context instead, so the handler is silenced
** for this parse and put back after it. The handler is the calling thread's
** own (xmlGenericError is per-thread state with LIBXML_THREAD_ENABLED, as
** the installed libxml/globals.h defines it), so other threads' parses keep
** theirs. */
static xmlDoc *read_quietly(xmlParserCtxt *ctxt, const char *text, size_t len,
                            const char *path)
{
    xmlGenericErrorFunc saved = xmlGenericError;
    void *saved_ctx = xmlGenericErrorContext;
    xmlSetGenericErrorFunc(NULL, ignore_xml_message);
    xmlDoc *doc = xmlCtxtReadMemory(ctxt, text, (int)len, path, NULL,
                                    XML_PARSE_NONET | XML_PARSE_NOERROR |
                                        XML_PARSE_NOWARNING | XML_PARSE_NOCDATA);
    xmlSetGenericErrorFunc(saved_ctx, saved);
    return doc;
}

static ug_status refuse_dtd(const ug_glyph *g, ug_mark where, ug_error *err)
{
    return ug_fail(err, UG_ESCHEMA, where, "glyph file '%s' has a DTD (<!DOCTYPE>); DTDs "
                   "and entities are not allowed in glyphs", g->path);
}

static ug_status parse_svg(ug_glyph *g, const char *text, size_t len, bool library,
                           ug_mark where, ug_error *err)
{
    /* Refused before libxml2 reads any declaration (UTF-16 text slips past
    ** this and is caught by the intSubset test after parsing). */
    if (memmem(text, len, "<!DOCTYPE", 9))
        return refuse_dtd(g, where, err);
    xmlParserCtxt *ctxt = xmlNewParserCtxt();
    if (!ctxt)
        return ug_fail(err, UG_ENOMEM, where, "out of memory");
    /* No XML_PARSE_NOENT, DTDLOAD or DTDATTR: entities stay unexpanded and no
    ** external subset is read; NONET forbids any network access. */
    xmlDoc *doc = read_quietly(ctxt, text, len, g->path);
    ug_status st = UG_OK;
    xmlNode *root = doc ? xmlDocGetRootElement(doc) : NULL;
    for (xmlNode *n = doc ? doc->children : NULL; n; n = n->next)
        if (n->type == XML_PI_NODE)
            note_removed(g, "processing instruction '%.80s'", (const char *)n->name);
    if (!doc)
        st = xml_error(ctxt, g->path, where, err);
    else if (doc->intSubset || doc->extSubset)
        st = refuse_dtd(g, where, err);
    else if (!root || strcmp((const char *)root->name, "svg") != 0 || !is_svg_element(root))
        st = ug_fail(err, UG_ESCHEMA, where, "glyph file '%s' has no <svg> root element",
                     g->path);
    else
        st = rebuild_root(g, root, library, where, err);
    if (!st && g->notes_lost)
        st = ug_fail(err, UG_ENOMEM, where, "out of memory");
    xmlFreeDoc(doc);
    xmlFreeParserCtxt(ctxt);
    return st;
}

/* ---- reading a file --------------------------------------------------------- */

/* path (resolved, inside the resolved folder root) opened by walking down
** from root without following a symlink: a folder swapped for a link after
** realpath(3) looked at it is refused, not followed out of root. */
static int open_confined(const char *root, const char *path)
{
    size_t n = strlen(root);
    int rootfd = open(root, O_RDONLY | O_DIRECTORY | O_CLOEXEC);
    if (rootfd < 0)
        return -1;
    int fd = ug_open_beneath(rootfd, path + n + (n > 1), O_RDONLY | O_NONBLOCK, false);
    int e = errno;
    close(rootfd);
    errno = e;
    return fd;
}

/* Only regular files, at most GLYPH_MAX_BYTES, and not empty. */
static ug_status read_file(const char *root, const char *path, ug_mark where,
                           char **out, size_t *len, ug_error *err)
{
    int fd = open_confined(root, path);
    struct stat sb;
    if (fd < 0 && (errno == ELOOP || errno == ENOTDIR))
        return ug_fail(err, UG_ESCHEMA, where, "glyph file '%s' is no longer inside '%s' "
                       "(a folder on the way became a symbolic link)", path, root);
    if (fd < 0)
        return ug_fail(err, UG_EIO, where, "cannot open glyph file '%s': %s", path,
                       strerror(errno));
    ug_status st = UG_OK;
    if (fstat(fd, &sb) != 0 || !S_ISREG(sb.st_mode))
        st = ug_fail(err, UG_EIO, where, "glyph file '%s' is not a regular file", path);
    else if (sb.st_size > (off_t)GLYPH_MAX_BYTES)
        st = ug_fail(err, UG_ELIMIT, where, "glyph file '%s' is larger than %u bytes "
                     "(1 MiB)", path, GLYPH_MAX_BYTES);
    else if (sb.st_size == 0)
        st = ug_fail(err, UG_ESYNTAX, where, "glyph file '%s' is empty", path);
    else if (!(*out = ug_malloc((size_t)sb.st_size + 1)))
        st = ug_fail(err, UG_ENOMEM, where, "out of memory");
    else if (read(fd, *out, (size_t)sb.st_size) != (ssize_t)sb.st_size) {
        ug_free(*out);
        *out = NULL;
        st = ug_fail(err, UG_EIO, where, "cannot read glyph file '%s'", path);
    } else {
        (*out)[sb.st_size] = '\0';
        *len = (size_t)sb.st_size;
    }
    close(fd);
    return st;
}

static ug_status load_file(ug_glyph *g, const char *root, bool library, ug_mark where,
                           ug_error *err)
{
    char *text = NULL;
    size_t len = 0;
    ug_status st = read_file(root, g->path, where, &text, &len, err);
    if (!st)
        st = parse_svg(g, text, len, library, where, err);
    ug_free(text);
    return st;
}

/* ---- the search path -------------------------------------------------------- */

#ifndef UG_DATADIR
#define UG_DATADIR "/usr/local/share/unitgram/glyphs"
#endif

static const char *const installed_dirs[] = {UG_DATADIR, NULL};

/* The context's glyph roots, else the installed data folder. The library
** never guesses a folder from the running program: a host (the CLI run from
** its build folder, a test) names its own roots in its context. */
const char *const *glyph_default_dirs(void)
{
    const ug_context *c = ug_ctx();
    return c->glyph_roots ? (const char *const *)c->glyph_roots : installed_dirs;
}

static size_t count_path_list(const char *list)
{
    size_t n = 0;
    for (; list && *list; list += strcspn(list, ":") + (list[strcspn(list, ":")] == ':'))
        n += strcspn(list, ":") > 0;
    return n;
}

ug_status glyph_search_dirs(const glyph_search *search, char ***out, ug_error *err)
{
    const char *env = getenv("UNITGRAM_GLYPH_PATH");
    const char *const *defaults = glyph_default_dirs();
    size_t n = 0, ndirs = search ? search->ndirs : 0;
    while (defaults[n])
        n++;
    size_t total = n + count_path_list(env) + ndirs;
    size_t k = 0;
    char **dirs = ug_calloc(total + 1, sizeof *dirs);
    if (!dirs)
        return ug_fail(err, UG_ENOMEM, ug_mark_file(NULL), "out of memory");
    for (size_t i = 0; i < n; i++)
        dirs[k++] = ug_strdup(defaults[i]);
    for (const char *p = env; p && *p; p += strcspn(p, ":") + (p[strcspn(p, ":")] == ':'))
        if (strcspn(p, ":") > 0)
            dirs[k++] = ug_strndup(p, strcspn(p, ":"));
    for (size_t i = 0; i < ndirs; i++)
        dirs[k++] = ug_strdup(search->dirs[i]);
    for (size_t i = 0; i < k; i++)
        if (!dirs[i]) {
            /* freed one by one: glyph_free_dirs would stop at the gap */
            for (size_t j = 0; j < k; j++)
                ug_free(dirs[j]);
            ug_free(dirs);
            return ug_fail(err, UG_ENOMEM, ug_mark_file(NULL), "out of memory");
        }
    *out = dirs;
    return UG_OK;
}

void glyph_free_dirs(char **dirs)
{
    for (size_t i = 0; dirs && dirs[i]; i++)
        ug_free(dirs[i]);
    ug_free(dirs);
}

bool glyph_is_library_name(const char *ref)
{
    if (!*ref || strlen(ref) > 64 || *ref == '-')
        return false;
    for (const char *p = ref; *p; p++)
        if (!((*p >= 'a' && *p <= 'z') || (*p >= '0' && *p <= '9') || *p == '-'))
            return false;
    return true;
}

/* Is `path` (resolved) inside folder `dir` (resolved)? Compared on a '/'
** boundary, so /a/bc is not inside /a/b. */
static bool inside(const char *path, const char *dir)
{
    size_t n = strlen(dir);
    if (n == 1 && dir[0] == '/')
        return true;
    return strncmp(path, dir, n) == 0 && path[n] == '/';
}

/* The real file NAME.svg in dir into *out, if there is one and it really is
** inside; *out stays NULL when there is none. Running out of memory is an
** error of its own, never "no such glyph". */
static ug_status find_in_dir(const char *dir, const char *name, char **out,
                             char *real_dir, ug_mark where, ug_error *err)
{
    char candidate[PATH_MAX + 80], real[PATH_MAX];
    struct stat sb;
    snprintf(candidate, sizeof candidate, "%s/%s.svg", dir, name);
    if (!realpath(dir, real_dir) || !realpath(candidate, real) || !inside(real, real_dir) ||
        stat(real, &sb) != 0 || !S_ISREG(sb.st_mode))
        return UG_OK;
    if (!(*out = ug_strdup(real)))
        return ug_fail(err, UG_ENOMEM, where, "out of memory");
    return UG_OK;
}

static ug_status find_library(ug_glyph *g, const glyph_search *s, char *root,
                              ug_mark where, ug_error *err)
{
    char **dirs = NULL;
    ug_status st = glyph_search_dirs(s, &dirs, err);
    for (size_t i = 0; !st && dirs[i] && !g->path; i++)
        st = find_in_dir(dirs[i], g->name, &g->path, root, where, err);
    glyph_free_dirs(dirs);
    if (!st && !g->path)
        st = ug_fail(err, UG_ESCHEMA, where,
                     "no glyph named '%s' in the glyph library (see 'unitgram glyphs'; "
                     "a file of your own is written as a path, e.g. ./icons/%s.svg)",
                     g->name, g->name);
    return st;
}

/* A user's file: relative to the layout's folder and confined to it. */
static ug_status find_user_file(ug_glyph *g, const glyph_search *s, char *real_base,
                                ug_mark where, ug_error *err)
{
    const char *base = s && s->layout_dir && *s->layout_dir ? s->layout_dir : ".";
    char candidate[PATH_MAX * 2], real[PATH_MAX];
    if (g->name[0] == '/')
        snprintf(candidate, sizeof candidate, "%s", g->name);
    else
        snprintf(candidate, sizeof candidate, "%s/%s", base, g->name);
    if (!realpath(base, real_base))
        return ug_fail(err, UG_EIO, where, "cannot resolve the layout's folder '%s': %s",
                       base, strerror(errno));
    if (!realpath(candidate, real))
        return ug_fail(err, UG_EIO, where, "cannot find glyph file '%s' (looked for '%s': "
                       "%s)", g->name, candidate, strerror(errno));
    if (!inside(real, real_base))
        return ug_fail(err, UG_ESCHEMA, where,
                       "glyph file '%s' is outside the layout's folder '%s' (it resolves "
                       "to '%s'); glyph files must be in that folder or below it",
                       g->name, real_base, real);
    g->path = ug_strdup(real);
    return g->path ? UG_OK : ug_fail(err, UG_ENOMEM, where, "out of memory");
}

/* ---- loading ---------------------------------------------------------------- */

static ug_status load_primitive(ug_glyph *g, ug_mark where, ug_error *err, bool *found)
{
    *found = false;
    for (size_t i = 0; i < sizeof primitives / sizeof primitives[0]; i++)
        if (strcmp(g->name, primitives[i][0]) == 0) {
            *found = true;
            g->body = ug_strdup(primitives[i][1]);
            return g->body ? UG_OK : ug_fail(err, UG_ENOMEM, where, "out of memory");
        }
    return UG_OK;
}

void (*glyph_resolved_hook)(const char *path);

ug_status glyph_load(const char *ref, const glyph_search *search, ug_mark where,
                     ug_glyph **out, ug_error *err)
{
    *out = NULL;
    ug_init_libraries(); /* before libxml2 parses and librsvg measures */
    ug_glyph *g = glyph_new(ref);
    if (!g)
        return ug_fail(err, UG_ENOMEM, where, "out of memory");
    bool primitive;
    bool library = glyph_is_library_name(ref);
    char root[PATH_MAX]; /* the resolved folder the file must stay inside */
    ug_status st = load_primitive(g, where, err, &primitive);
    if (!st && !primitive)
        st = library ? find_library(g, search, root, where, err)
                     : find_user_file(g, search, root, where, err);
    if (!st && !primitive && glyph_resolved_hook)
        glyph_resolved_hook(g->path);
    if (!st && !primitive)
        st = load_file(g, root, library, where, err);
    /* Parsed again after fitting, so the outlines are exactly what the body says. */
    if (!st)
        st = parse_shape(g, g->body, where, &g->shape, err);
    if (!st) {
        g->segments = glyph_shape_segments(g->shape);
        st = glyph_ink(g->shape, where, &g->ink, err);
    }
    if (st) {
        glyph_free(g);
        return st;
    }
    *out = g;
    return UG_OK;
}
