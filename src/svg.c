/*
** SVG stage: scene -> one SVG document.
**
** Every glyph is defined once (<symbol viewBox="0 0 100 100">) together with
** a pre-scaled <use> of it, so each icon is a <use> with only x and y, inside
** a <g> per category that carries the colour and a <title> naming the
** category and its count. That keeps an icon near 40 bytes and lets a million
** icons be written in well under a second: numbers go through our own
** formatter (fixed two decimals, trimmed), never printf, which also makes the
** output byte-identical from run to run and from locale to locale.
**
** Accessibility follows W3C ACT rule 7d6734 and the SVG Accessibility API
** Mappings (REFERENCES.md §9): role="img" on the root, <title> first, <desc>
** with the generated description, both referenced by aria attributes. All
** text is escaped; the writer emits no script, no event attributes, no
** foreignObject and no reference outside the document.
*/
#include <math.h>
#include <string.h>

#include "svg.h"
#include "text.h"

size_t svg_number(double v, char *out)
{
    char tmp[32];
    size_t n = 0, o = 0;
    if (!isfinite(v) || fabs(v) > 1e15)
        v = 0;
    long long c = llround(v * 100);
    if (c < 0) {
        out[o++] = '-';
        c = -c;
    }
    long long whole = c / 100, frac = c % 100;
    do
        tmp[n++] = (char)('0' + whole % 10);
    while ((whole /= 10) > 0);
    while (n)
        out[o++] = tmp[--n];
    if (frac) {
        out[o++] = '.';
        out[o++] = (char)('0' + frac / 10);
        if (frac % 10)
            out[o++] = (char)('0' + frac % 10);
    }
    if (o == 2 && out[0] == '-' && out[1] == '0')
        o = 0, out[o++] = '0';
    out[o] = '\0';
    return o;
}

void svg_escape(ug_buf *b, const char *s)
{
    const char *run = s;
    for (; *s; s++) {
        const char *rep = *s == '&' ? "&amp;" : *s == '<' ? "&lt;" : *s == '>' ? "&gt;"
                        : *s == '"' ? "&quot;" : *s == '\'' ? "&#39;" : NULL;
        if (!rep)
            continue;
        ug_buf_add(b, run, (size_t)(s - run));
        ug_buf_puts(b, rep);
        run = s + 1;
    }
    ug_buf_add(b, run, (size_t)(s - run));
}

void svg_escape_text(ug_buf *b, const char *s)
{
    char *clean = text_clean(s);
    if (!clean) {
        b->failed = true;
        return;
    }
    svg_escape(b, clean);
    ug_free(clean);
}

static void num(ug_buf *b, double v)
{
    char t[32];
    ug_buf_add(b, t, svg_number(v, t));
}

/* name="value" with a number and its unit */
static void attr_unit(ug_buf *b, const char *name, double v, const char *unit)
{
    ug_buf_printf(b, " %s=\"", name);
    num(b, v);
    ug_buf_printf(b, "%s\"", unit);
}

static void attr(ug_buf *b, const char *name, double v) { attr_unit(b, name, v, ""); }

/* x="" y="" width="" height="" of a box */
static void box_attrs(ug_buf *b, double x, double y, double w, double h)
{
    attr(b, "x", x);
    attr(b, "y", y);
    attr(b, "width", w);
    attr(b, "height", h);
}

static void color(ug_buf *b, const char *name, scene_rgb c)
{
    ug_buf_printf(b, " %s=\"#%02x%02x%02x\"", name, c.r, c.g, c.b);
}

/* The root element's size and names: a chart is an image titled ug-title;
** a handout sheet is a document sized in mm on paper. */
static void root_attributes(ug_buf *b, const ug_scene *s, const char *idp)
{
    if (s->sheet) {
        attr_unit(b, "width", s->width_mm, "mm");
        attr_unit(b, "height", s->height_mm, "mm");
    } else {
        attr(b, "width", s->width);
        attr(b, "height", s->height);
    }
    ug_buf_puts(b, " viewBox=\"0 0 ");
    num(b, s->width);
    ug_buf_puts(b, " ");
    num(b, s->height);
    const char *name = s->sheet ? "page" : "ug";
    ug_buf_printf(b, "\"%s aria-labelledby=\"%s%s-title\" aria-describedby=\"%s%s-desc\""
                     " font-family=\"", s->sheet ? "" : " role=\"img\"", idp, name, idp,
                  name);
    svg_escape(b, s->font);
    if (s->lang) {
        /* the language readers and screen readers use for the text */
        ug_buf_puts(b, "\" xml:lang=\"");
        svg_escape(b, s->lang);
    }
    ug_buf_printf(b, "\">\n<title id=\"%s%s-title\">", idp, name);
    svg_escape(b, s->title);
    ug_buf_printf(b, "</title>\n<desc id=\"%s%s-desc\">", idp, name);
    svg_escape(b, s->desc ? s->desc : "");
    ug_buf_puts(b, "</desc>\n");
}

static void defs(ug_buf *b, const ug_scene *s, const char *idp)
{
    ug_buf_puts(b, "<defs>\n");
    for (size_t k = 0; k < s->nglyphs; k++) {
        ug_buf_printf(b, "<symbol id=\"%sg-%zu\" viewBox=\"0 0 100 100\">%s</symbol>"
                         "<use id=\"%su-%zu\" href=\"#%sg-%zu\"",
                      idp, k, s->glyphs[k]->body, idp, k, idp, k);
        attr(b, "width", s->icon_size);
        attr(b, "height", s->icon_size);
        ug_buf_puts(b, "/>\n");
    }
    size_t clip = 0;
    for (size_t i = 0; i < s->nicons; i++) {
        const scene_icon *ic = &s->icons[i];
        if (ic->fraction >= 1.0)
            continue;
        ug_buf_printf(b, "<clipPath id=\"%sclip-%zu\"><rect", idp, clip++);
        box_attrs(b, ic->x, ic->y, s->icon_size * ic->fraction, s->icon_size);
        ug_buf_puts(b, "/></clipPath>\n");
    }
    ug_buf_puts(b, "</defs>\n");
}

/* In a right-to-left scene each line is written in that direction, where
** text-anchor "start" is the right end (SVG 1.1, "text-anchor"): the anchor
** named is the other one, so the line stays where the packer put it. */
static void text_line(ug_buf *b, const scene_text *t, bool rtl)
{
    static const char *const anchors[] = {"", " text-anchor=\"middle\"",
                                          " text-anchor=\"end\""};
    static const char *const rtl_anchors[] = {" direction=\"rtl\" text-anchor=\"end\"",
                                              " direction=\"rtl\" text-anchor=\"middle\"",
                                              " direction=\"rtl\""};
    ug_buf_puts(b, "<text");
    attr(b, "x", t->x);
    attr(b, "y", t->y);
    attr(b, "font-size", t->size);
    ug_buf_puts(b, t->bold ? " font-weight=\"bold\"" : "");
    ug_buf_puts(b, (rtl ? rtl_anchors : anchors)[t->anchor]);
    ug_buf_puts(b, ">");
    svg_escape(b, t->text);
    ug_buf_puts(b, "</text>\n");
}

static void boxes(ug_buf *b, const ug_scene *s)
{
    if (s->nrects) {
        ug_buf_puts(b, "<g fill=\"none\" stroke=\"#c4c4c4\">\n");
        for (size_t i = 0; i < s->nrects; i++) {
            const scene_rect *r = &s->rects[i];
            ug_buf_puts(b, "<rect");
            box_attrs(b, r->x, r->y, r->w, r->h);
            ug_buf_puts(b, "/>\n");
        }
        ug_buf_puts(b, "</g>\n");
    }
    if (!s->nholders)
        return;
    ug_buf_puts(b, "<g fill=\"none\" stroke-dasharray=\"4 3\"");
    color(b, "stroke", s->ink);
    ug_buf_puts(b, ">\n");
    for (size_t i = 0; i < s->nholders; i++) {
        const scene_placeholder *h = &s->holders[i];
        ug_buf_puts(b, "<rect");
        box_attrs(b, h->x + 0.5, h->y + 0.5, h->w - 1, h->h - 1);
        ug_buf_puts(b, "/>\n");
    }
    ug_buf_puts(b, "</g>\n");
}

/* One icon: `<use href="#u-0" x="12.5" y="40"/>` built in place. */
static void icon(ug_buf *b, const char *ref, size_t reflen, const scene_icon *ic)
{
    char line[128];
    size_t o = reflen;
    memcpy(line, ref, reflen);
    o += svg_number(ic->x, line + o);
    memcpy(line + o, "\" y=\"", 5);
    o += 5;
    o += svg_number(ic->y, line + o);
    memcpy(line + o, "\"/>\n", 4);
    ug_buf_add(b, line, o + 4);
}

static size_t category(ug_buf *b, const ug_scene *s, const char *idp, size_t c,
                       size_t first, size_t *clip)
{
    char ref[64];
    int reflen = snprintf(ref, sizeof ref, "<use href=\"#%su-%zu\" x=\"", idp,
                          s->cats[c].glyph);
    ug_buf_printf(b, "<g id=\"%s", idp);
    svg_escape(b, s->cats[c].id);
    ug_buf_puts(b, "\"");
    color(b, "fill", s->cats[c].color);
    ug_buf_puts(b, "><title>");
    svg_escape(b, s->cats[c].title);
    ug_buf_puts(b, "</title>\n");
    for (size_t i = 0; i < s->nswatches; i++)
        if (s->swatches[i].cat == c)
            icon(b, ref, (size_t)reflen, &s->swatches[i]);
    size_t i = first;
    for (; i < s->nicons && s->icons[i].cat == c && !b->failed; i++) {
        if (s->icons[i].fraction < 1.0) {
            ug_buf_printf(b, "<g clip-path=\"url(#%sclip-%zu)\">", idp, (*clip)++);
            icon(b, ref, (size_t)reflen, &s->icons[i]);
            ug_buf_puts(b, "</g>\n");
        } else {
            icon(b, ref, (size_t)reflen, &s->icons[i]);
        }
    }
    ug_buf_puts(b, "</g>\n");
    return i;
}

static void svg_element(ug_buf *b, const ug_scene *s, const char *idp);

/* A child inside an outer <svg> whose viewBox is its crop. */
static void child(ug_buf *b, const scene_child *c)
{
    ug_buf_puts(b, "<svg");
    box_attrs(b, c->x, c->y, c->crop_w, c->crop_h);
    ug_buf_puts(b, " viewBox=\"");
    num(b, c->crop_x);
    ug_buf_puts(b, " ");
    num(b, c->crop_y);
    ug_buf_puts(b, " ");
    num(b, c->crop_w);
    ug_buf_puts(b, " ");
    num(b, c->crop_h);
    ug_buf_puts(b, "\">\n");
    svg_element(b, c->scene, c->id_prefix);
    ug_buf_puts(b, "</svg>\n");
}

/* The scene's <svg> element, ids prefixed with idp. */
static void svg_element(ug_buf *b, const ug_scene *s, const char *idp)
{
    ug_buf_puts(b, "<svg xmlns=\"http://www.w3.org/2000/svg\"");
    root_attributes(b, s, idp);
    if (!s->sheet)
        defs(b, s, idp);
    ug_buf_puts(b, "<rect");
    attr(b, "width", s->width);
    attr(b, "height", s->height);
    color(b, "fill", s->background);
    ug_buf_puts(b, "/>\n<g");
    color(b, "fill", s->ink);
    ug_buf_puts(b, ">\n");
    for (size_t i = 0; i < s->ntexts; i++)
        text_line(b, &s->texts[i], s->rtl);
    ug_buf_puts(b, "</g>\n");
    boxes(b, s);
    size_t next = 0, clip = 0;
    for (size_t c = 0; c < s->ncats; c++)
        next = category(b, s, idp, c, next, &clip);
    for (size_t i = 0; i < s->nchildren; i++)
        child(b, &s->children[i]);
    ug_buf_puts(b, "</svg>\n");
}

ug_status ug_scene_svg(const ug_scene *s, char **out, size_t *len, ug_error *err)
{
    ug_error_clear(err);
    ug_buf b;
    ug_buf_init(&b);
    ug_buf_puts(&b, "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n");
    svg_element(&b, s, "");
    return ug_buf_take(&b, out, len, err);
}
