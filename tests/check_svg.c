/* Tests for src/svg.c: numbers, well-formedness (libxml2), accessibility
** markup, escaping, determinism, size per icon, and pixels rendered by
** librsvg (an outside renderer) in proportion to the icon counts. */
#define _POSIX_C_SOURCE 200809L
#include <check.h>
#include <librsvg/rsvg.h>
#include <libxml/parser.h>
#include <libxml/tree.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include "data/draw/fixture.h"
#include "pack.h"
#include "svg.h"
#include "check_run.h"

typedef struct {
    double v;
    const char *text;
} num_case;

static const num_case nums[] = {
    {0, "0"}, {12, "12"}, {12.5, "12.5"}, {12.25, "12.25"}, {12.255, "12.26"},
    {0.07, "0.07"}, {-3, "-3"}, {-0.001, "0"}, {1234567.891, "1234567.89"},
    {799.999, "800"}, {0.1 + 0.2, "0.3"},
};

START_TEST(test_number_format)
{
    char buf[32];
    size_t n = svg_number(nums[_i].v, buf);
    ck_assert_str_eq(buf, nums[_i].text);
    ck_assert_uint_eq(n, strlen(nums[_i].text));
}
END_TEST

static char *draw(ug_chart *c, size_t *len)
{
    ug_error err;
    memset(&err, 0, sizeof err);
    ug_allocation *a = NULL;
    ug_scene *s = NULL;
    char *out = NULL;
    ck_assert_int_eq(ug_chart_allocate(c, &a, &err), UG_OK);
    ck_assert_msg(ug_scene_pack(c, a, &s, &err) == UG_OK, "%s", err.msg);
    ck_assert_int_eq(ug_scene_svg(s, &out, len, &err), UG_OK);
    ug_scene_free(s);
    ug_allocation_free(a);
    return out;
}

static const fx_cat pantry[] = {
    {"Families with children", "square", 0x0072B2, {"412"}, NULL},
    {"Single adults", "circle", 0xE69F00, {"300"}, NULL},
    {"Older people", "square", 0x009E73, {"123"}, NULL},
};

static xmlDoc *parse(const char *svg, size_t len)
{
    xmlDoc *d = xmlReadMemory(svg, (int)len, "chart.svg", NULL, XML_PARSE_NONET);
    ck_assert_msg(d != NULL, "SVG is not well-formed XML");
    return d;
}

static xmlNode *first_element(xmlNode *n)
{
    for (n = n->children; n && n->type != XML_ELEMENT_NODE; n = n->next)
        ;
    return n;
}

static bool has_id(xmlNode *n, const char *id)
{
    if (n->type == XML_ELEMENT_NODE) {
        xmlChar *v = xmlGetProp(n, (const xmlChar *)"id");
        bool ok = v && strcmp((char *)v, id) == 0;
        xmlFree(v);
        if (ok)
            return true;
    }
    for (xmlNode *k = n->children; k; k = k->next)
        if (has_id(k, id))
            return true;
    return false;
}

static char *prop(xmlNode *n, const char *name)
{
    return (char *)xmlGetProp(n, (const xmlChar *)name);
}

/* W3C ACT rule 7d6734 ("svg element with explicit role has non-empty
** accessible name") and SVG-AAM §8.1: role="img", a <title> first child, and
** aria-labelledby / aria-describedby naming elements that exist. */
START_TEST(test_accessible_root)
{
    size_t len;
    ug_chart *c = fx_chart(UG_FORM_WAFFLE, "Who the pantry served", NULL, 0, pantry, 3);
    char *svg = draw(c, &len);
    xmlDoc *d = parse(svg, len);
    xmlNode *root = xmlDocGetRootElement(d);
    char *role = prop(root, "role"), *lab = prop(root, "aria-labelledby"),
         *des = prop(root, "aria-describedby");
    ck_assert_str_eq(role, "img");
    xmlNode *t = first_element(root);
    ck_assert_str_eq((char *)t->name, "title");
    xmlChar *name = xmlNodeGetContent(t);
    ck_assert_str_eq((char *)name, "Who the pantry served");
    ck_assert(has_id(root, lab) && has_id(root, des));
    ck_assert(strstr(svg, "<desc id=\"ug-desc\">Waffle chart: Who the pantry served.") != NULL);
    ck_assert(has_id(root, "cat-c0"));
    ck_assert(strstr(svg, "<title>Families with children: 412 households</title>") != NULL);
    xmlFree(name);
    xmlFree(role);
    xmlFree(lab);
    xmlFree(des);
    xmlFreeDoc(d);
    ug_free(svg);
    fx_free(c);
}
END_TEST

static bool has_element(xmlNode *n, const char *name)
{
    if (n->type == XML_ELEMENT_NODE && strcmp((const char *)n->name, name) == 0)
        return true;
    for (xmlNode *k = n->children; k; k = k->next)
        if (has_element(k, name))
            return true;
    return false;
}

static bool has_text(xmlNode *n, const char *s)
{
    if (n->type == XML_ELEMENT_NODE && !strcmp((const char *)n->name, "text")) {
        xmlChar *v = xmlNodeGetContent(n);
        bool ok = strcmp((char *)v, s) == 0;
        xmlFree(v);
        if (ok)
            return true;
    }
    for (xmlNode *k = n->children; k; k = k->next)
        if (has_text(k, s))
            return true;
    return false;
}

START_TEST(test_hostile_text_is_inert)
{
    const char *evil = "A <b> & \"q\" 'r' ]]> </text><script>alert(1)</script>";
    const fx_cat cats[] = {{evil, "square", 0x0072B2, {"40"}, evil}};
    const char *groups[] = {"x</text><script>y"};
    ug_chart *c = fx_chart(UG_FORM_ROWS, evil, groups, 1, cats, 1);
    c->style.width = 2000; /* keep each string on one line */
    size_t len;
    char *svg = draw(c, &len);
    xmlDoc *d = parse(svg, len);
    xmlNode *root = xmlDocGetRootElement(d);
    ck_assert(!has_element(root, "script"));
    ck_assert(!has_element(root, "foreignObject"));
    ck_assert(has_text(root, evil));
    ck_assert(has_text(root, "x</text><script>y"));
    xmlChar *title = xmlNodeGetContent(first_element(root));
    ck_assert_str_eq((char *)title, evil);
    ck_assert_ptr_null(strstr(svg, " on"));
    ck_assert_ptr_null(strstr(svg, "http://www.w3.org/1999/xlink"));
    xmlFree(title);
    xmlFreeDoc(d);
    ug_free(svg);
    fx_free(c);
}
END_TEST

START_TEST(test_two_runs_identical)
{
    const char *groups[] = {"North", "River"};
    const fx_cat cats[] = {{"A", "square", 0x0072B2, {"412", "7"}, NULL},
                           {"B", "circle", 0xE69F00, {"35.5", "120"}, "note"}};
    ug_chart *c = fx_chart(UG_FORM_ROWS, "t", groups, 2, cats, 2);
    c->rounding = UG_ROUND_PARTIAL;
    fx_suppress(c, "10");
    size_t n1, n2;
    char *a = draw(c, &n1), *b = draw(c, &n2);
    ck_assert_uint_eq(n1, n2);
    ck_assert(memcmp(a, b, n1) == 0);
    ug_free(a);
    ug_free(b);
    fx_free(c);
}
END_TEST

/* ---- pixels through librsvg ---------------------------------------------------- */

static unsigned char *render(const char *svg, size_t len, int *w, int *h, int *stride)
{
    GError *e = NULL;
    RsvgHandle *r = rsvg_handle_new_from_data((const guint8 *)svg, len, &e);
    ck_assert_msg(r != NULL, "librsvg refused the SVG");
    gdouble dw, dh;
    ck_assert(rsvg_handle_get_intrinsic_size_in_pixels(r, &dw, &dh));
    *w = (int)dw;
    *h = (int)dh;
    cairo_surface_t *surf = cairo_image_surface_create(CAIRO_FORMAT_ARGB32, *w, *h);
    cairo_t *cr = cairo_create(surf);
    RsvgRectangle vp = {0, 0, dw, dh};
    ck_assert(rsvg_handle_render_document(r, cr, &vp, &e));
    cairo_surface_flush(surf);
    *stride = cairo_image_surface_get_stride(surf);
    unsigned char *px = malloc((size_t)*stride * (size_t)*h);
    memcpy(px, cairo_image_surface_get_data(surf), (size_t)*stride * (size_t)*h);
    cairo_destroy(cr);
    cairo_surface_destroy(surf);
    g_object_unref(r);
    return px;
}

static long count_color(const unsigned char *px, int w, int h, int stride, unsigned rgb)
{
    long n = 0;
    for (int y = 0; y < h; y++)
        for (int x = 0; x < w; x++) {
            const unsigned char *p = px + (size_t)y * (size_t)stride + (size_t)x * 4;
            unsigned v = (unsigned)p[2] << 16 | (unsigned)p[1] << 8 | p[0]; /* BGRA */
            n += v == rgb;
        }
    return n;
}

/* Square glyphs at whole-pixel positions: each icon (and each key swatch) is
** 24 x 24 pixels of its colour, antialiasing aside. */
START_TEST(test_rendered_pixels_match_counts)
{
    const fx_cat cats[] = {{"Red", "square", 0xD00000, {"412"}, NULL},
                           {"Blue", "square", 0x0000D0, {"300"}, NULL},
                           {"Green", "square", 0x00A000, {"123"}, NULL}};
    ug_chart *c = fx_chart(UG_FORM_WAFFLE, "Pixels", NULL, 0, cats, 3);
    ug_error err;
    memset(&err, 0, sizeof err);
    ug_allocation *a;
    ck_assert_int_eq(ug_chart_allocate(c, &a, &err), UG_OK);
    size_t len;
    char *svg = draw(c, &len);
    int w, h, stride;
    unsigned char *px = render(svg, len, &w, &h, &stride);
    for (size_t i = 0; i < 3; i++) {
        long want = (alloc_at(a, 0, i)->icons + 1) * 24 * 24;
        long got = count_color(px, w, h, stride, cats[i].rgb);
        ck_assert_msg(labs(got - want) <= want / 50, "%s: %ld pixels, expected %ld",
                      cats[i].label, got, want);
    }
    free(px);
    ug_free(svg);
    ug_allocation_free(a);
    fx_free(c);
}
END_TEST

/* A clipped last icon (rounding: partial) shows its fraction of the pixels. */
START_TEST(test_partial_icon_renders_clipped)
{
    const fx_cat cats[] = {{"Red", "square", 0xD00000, {"15"}, NULL}};
    ug_chart *c = fx_chart(UG_FORM_ROWS, "Half", NULL, 0, cats, 1);
    c->rounding = UG_ROUND_PARTIAL;
    size_t len;
    char *svg = draw(c, &len);
    int w, h, stride;
    unsigned char *px = render(svg, len, &w, &h, &stride);
    long got = count_color(px, w, h, stride, 0xD00000);
    ck_assert_int_eq(got, (1 + 1) * 576 + 288); /* one icon, the swatch, half */
    free(px);
    ug_free(svg);
    fx_free(c);
}
END_TEST

/* ---- a sheet holding charts' scenes -------------------------------------------- */

static void collect_ids(xmlNode *n, char ids[][64], size_t *nids)
{
    if (n->type == XML_ELEMENT_NODE) {
        xmlChar *v = xmlGetProp(n, (const xmlChar *)"id");
        if (v && *nids < 256)
            snprintf(ids[(*nids)++], 64, "%s", (char *)v);
        xmlFree(v);
    }
    for (xmlNode *k = n->children; k; k = k->next)
        collect_ids(k, ids, nids);
}

/* Every "#name" an href, url() or aria attribute refers to. */
static size_t count_dangling(xmlNode *n, char ids[][64], size_t nids, size_t *refs)
{
    static const char *const attrs[] = {"href", "clip-path", "aria-labelledby",
                                        "aria-describedby"};
    size_t bad = 0;
    for (size_t a = 0; n->type == XML_ELEMENT_NODE && a < 4; a++) {
        xmlChar *v = xmlGetProp(n, (const xmlChar *)attrs[a]);
        if (v) {
            char name[64];
            const char *at = (char *)v;
            at += strncmp(at, "url(#", 5) == 0 ? 5 : *at == '#';
            snprintf(name, sizeof name, "%.*s", (int)strcspn(at, ")"), at);
            bool found = false;
            for (size_t i = 0; i < nids && !found; i++)
                found = strcmp(ids[i], name) == 0;
            bad += !found;
            ++*refs;
        }
        xmlFree(v);
    }
    for (xmlNode *k = n->children; k; k = k->next)
        bad += count_dangling(k, ids, nids, refs);
    return bad;
}

/* A sheet with two children of one chart scene (a clipped icon among them):
** every id in the document is unique, every reference names one of them, and
** each child is an <svg> whose viewBox is its crop. */
START_TEST(test_children_ids_prefixed)
{
    const fx_cat cats[] = {{"Red", "square", 0xD00000, {"15"}, NULL}};
    ug_chart *c = fx_chart(UG_FORM_ROWS, "Half", NULL, 0, cats, 1);
    c->rounding = UG_ROUND_PARTIAL;
    ug_error err = {0};
    ug_allocation *a = NULL;
    ug_scene *chart = NULL;
    ck_assert_int_eq(ug_chart_allocate(c, &a, &err), UG_OK);
    ck_assert_int_eq(ug_scene_pack(c, a, &chart, &err), UG_OK);
    scene_child kids[2] = {{chart, 10, 20, 5, 6, 100, 50, "p1-"},
                           {chart, 10, 90, 0, 0, 120, 60, "p2-"}};
    ug_scene sheet;
    memset(&sheet, 0, sizeof sheet);
    sheet.sheet = true;
    sheet.width = 300, sheet.height = 200, sheet.width_mm = 79.38, sheet.height_mm = 52.92;
    sheet.font = "DejaVu Sans", sheet.title = "Sheet", sheet.desc = "Two charts";
    sheet.children = kids, sheet.nchildren = 2;
    char *svg = NULL;
    size_t len = 0;
    ck_assert_int_eq(ug_scene_svg(&sheet, &svg, &len, &err), UG_OK);
    xmlDoc *d = parse(svg, len);
    xmlNode *root = xmlDocGetRootElement(d);
    static char ids[256][64];
    size_t nids = 0, refs = 0;
    collect_ids(root, ids, &nids);
    for (size_t i = 0; i < nids; i++)
        for (size_t j = i + 1; j < nids; j++)
            ck_assert_msg(strcmp(ids[i], ids[j]) != 0, "id '%s' twice", ids[i]);
    ck_assert_uint_eq(count_dangling(root, ids, nids, &refs), 0);
    ck_assert_uint_gt(refs, 8); /* the titles, glyph uses and the clip path, twice */
    ck_assert(strstr(svg, "<svg x=\"10\" y=\"20\" width=\"100\" height=\"50\" "
                          "viewBox=\"5 6 100 50\">") != NULL);
    ck_assert(strstr(svg, "url(#p2-clip-0)") != NULL);
    ck_assert(strstr(svg, " width=\"79.38mm\" height=\"52.92mm\"") != NULL);
    ck_assert(strstr(svg, "role=\"img\" aria-labelledby=\"p1-ug-title\"") != NULL);
    xmlFreeDoc(d);
    ug_free(svg);
    ug_scene_free(chart);
    ug_allocation_free(a);
    fx_free(c);
}
END_TEST

/* ---- size and speed: a million icons in a hand-made scene ---------------------- */

START_TEST(test_million_icons_small_and_fast)
{
    ug_scene *s = ug_calloc(1, sizeof *s);
    ug_error err;
    memset(&err, 0, sizeof err);
    s->width = 8000;
    s->height = 4000;
    s->icon_size = 6;
    s->font = "DejaVu Sans";
    s->title = "many";
    s->desc = "many icons";
    scene_category cats[2] = {{"cat-a", "A", {200, 0, 0}, 0}, {"cat-b", "B", {0, 0, 200}, 0}};
    s->cats = cats;
    s->ncats = 2;
    ug_glyph g;
    memset(&g, 0, sizeof g);
    g.name = "square";
    g.body = "<rect width=\"100\" height=\"100\"/>";
    ug_glyph *gp = &g;
    s->glyphs = &gp;
    s->nglyphs = 1;
    s->nicons = 1000000;
    s->icons = ug_malloc(s->nicons * sizeof *s->icons);
    for (size_t i = 0; i < s->nicons; i++)
        s->icons[i] = (scene_icon){(double)(i % 1000) * 7.5 + 40.25,
                                   (double)(i / 1000) * 3.5 + 120.75, 1.0,
                                   i < 600000 ? 0u : 1u, 0};
    struct timespec t0, t1;
    clock_gettime(CLOCK_MONOTONIC, &t0);
    char *out;
    size_t len;
    ck_assert_int_eq(ug_scene_svg(s, &out, &len, &err), UG_OK);
    clock_gettime(CLOCK_MONOTONIC, &t1);
    double secs = (double)(t1.tv_sec - t0.tv_sec) + (double)(t1.tv_nsec - t0.tv_nsec) / 1e9;
    ck_assert_msg(len / s->nicons <= 60, "%zu bytes per icon", len / s->nicons);
#if defined(__has_feature)
#if __has_feature(address_sanitizer)
#define UNDER_ASAN 1
#endif
#endif
#if defined(__OPTIMIZE__) && !defined(__SANITIZE_ADDRESS__) && !defined(UNDER_ASAN)
    ck_assert_msg(secs <= 1.0, "%.2f s for a million icons", secs);
#endif
    (void)secs;
    ug_free(out);
    ug_free(s->icons);
    ug_free(s);
}
END_TEST

static Suite *svg_suite(void)
{
    Suite *s = suite_create("svg");
    TCase *t = tcase_create("svg");
    tcase_set_timeout(t, 120);
    tcase_add_loop_test(t, test_number_format, 0, sizeof nums / sizeof nums[0]);
    tcase_add_test(t, test_accessible_root);
    tcase_add_test(t, test_hostile_text_is_inert);
    tcase_add_test(t, test_two_runs_identical);
    tcase_add_test(t, test_rendered_pixels_match_counts);
    tcase_add_test(t, test_partial_icon_renders_clipped);
    tcase_add_test(t, test_children_ids_prefixed);
    tcase_add_test(t, test_million_icons_small_and_fast);
    suite_add_tcase(s, t);
    return s;
}

int main(void)
{
    return check_run(svg_suite());
}
