/* Tests for src/glyph_shape.c (glyph geometry): the path, shape and transform
** grammar, exact bounds for shapes with known answers, and agreement with
** librsvg (the outside reference: rsvg_handle_get_geometry_for_layer and
** rsvg_handle_render_document, librsvg 2.54 on cairo) over every glyph we ship
** or test with and a few hundred seeded random shapes. */
#define _GNU_SOURCE /* nftw */
#include <check.h>
#include <ftw.h>
#include <librsvg/rsvg.h>
#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "glyph.h"
#include "glyph_shape.h"
#include "check_run.h"

static ug_mark here(void) { return ug_mark_file("test.yaml"); }

static glyph_shape *parse(const char *markup)
{
    glyph_shape *s = NULL;
    ug_error err;
    ug_error_clear(&err);
    ug_status st = glyph_shape_parse(markup, here(), &s, &err);
    ck_assert_msg(st == UG_OK, "%s: %s", markup, err.msg);
    return s;
}

static void assert_box(const char *markup, double x, double y, double w, double h,
                       size_t segments)
{
    glyph_shape *s = parse(markup);
    double b[4];
    glyph_shape_bounds(s, b);
    ck_assert_msg(fabs(b[0] - x) < 1e-9 && fabs(b[1] - y) < 1e-9 && fabs(b[2] - w) < 1e-9 &&
                      fabs(b[3] - h) < 1e-9,
                  "%s: box %.12g %.12g %.12g %.12g, expected %g %g %g %g", markup, b[0],
                  b[1], b[2], b[3], x, y, w, h);
    if (segments != (size_t)-1)
        ck_assert_msg(glyph_shape_segments(s) == segments, "%s: %zu segments, expected %zu",
                      markup, glyph_shape_segments(s), segments);
    glyph_shape_free(s);
}

#define ANY ((size_t)-1)

/* ---- the path grammar (SVG 1.1 §8.3) ------------------------------------------ */

typedef struct {
    const char *d;
    double x, y, w, h;
    size_t segments; /* lines + cubics + closepaths */
} path_case;

/* Expected values by hand:
**  - C0 10 10 10 10 0 from (0,0): y(t) = 30 t (1 - t), largest at t = 1/2: 7.5;
**  - S after it reflects (10,10) about (10,0) to (10,-10): the mirror image, -7.5;
**  - S with no cubic before: first control = current point, so from (0,0) with
**    (10,10), (10,0): y(t) = 30 t^2 (1 - t), largest at t = 2/3: 40/9;
**  - Q5 10 10 0: y(t) = 20 t (1 - t), largest 5; T mirrors it to -5;
**  - A5 5 0 0 1 10 0: half circle about (5,0); sweep 1 turns the positive
**    angle (downward in y-down) from angle pi through 3 pi/2, i.e. (5,-5);
**    sweep 0 goes through (5,5); radii 1 1 are scaled up to 5 (F.6.6). */
static const path_case paths[] = {
    {"M0 0 L10 0 L10 10 Z", 0, 0, 10, 10, 3},
    {"m5 5 l10 0 l0 10 z", 5, 5, 10, 10, 3},
    {"M0 0 H10 V10 H0 Z", 0, 0, 10, 10, 4},
    {"M0 0 h10 v10 h-10 z", 0, 0, 10, 10, 4},
    {"M0 0 10 0 10 10", 0, 0, 10, 10, 2},          /* implicit L after M */
    {"m1 1 10 0 0 10", 1, 1, 10, 10, 2},           /* implicit l after m */
    {"M0 0 L10 0 10 10 0 10 Z", 0, 0, 10, 10, 4},  /* implicit repeats of L */
    {"M0 0 C0 10 10 10 10 0 Z", 0, 0, 10, 7.5, 2},
    {"m0 0 c0 10 10 10 10 0 z", 0, 0, 10, 7.5, 2},
    {"M0 0 C0 10 10 10 10 0 10 -10 20 -10 20 0 Z", 0, -7.5, 20, 15, 3},
    {"M0 0 C0 10 10 10 10 0 S20 -10 20 0 Z", 0, -7.5, 20, 15, 3},
    {"M0 0 c0 10 10 10 10 0 s10 -10 10 0 z", 0, -7.5, 20, 15, 3},
    {"M0 0 S10 10 10 0 Z", 0, 0, 10, 40.0 / 9, 2},
    {"M0 0 Q5 10 10 0 Z", 0, 0, 10, 5, 2},
    {"m0 0 q5 10 10 0 z", 0, 0, 10, 5, 2},
    {"M0 0 Q5 10 10 0 T20 0 Z", 0, -5, 20, 10, 3},
    {"M0 0 q5 10 10 0 t10 0 z", 0, -5, 20, 10, 3},
    {"M0 0 L0 10 T10 0 Z", 0, 0, 10, 10, 3},       /* T alone: a line */
    {"M0 0 A5 5 0 0 1 10 0 Z", 0, -5, 10, 5, 3},
    {"M0 0 a5 5 0 0 1 10 0 z", 0, -5, 10, 5, 3},
    {"M0 0 a5 5 0 00 10 0 z", 0, 0, 10, 5, 3},     /* flags without separators */
    {"M0 0a5 5 0 1010 0z", 0, 0, 10, 5, 3},        /* 1, 0, then 10 */
    {"M0,0A5,5,0,0,1,10,0Z", 0, -5, 10, 5, 3},
    {"M0 0 A1 1 0 0 1 10 0 Z", 0, -5, 10, 5, 3},   /* radii scaled up */
    {"M0 0 L0 10 A0 5 0 0 1 10 10 Z", 0, 0, 10, 10, 3}, /* rx 0: a line */
    {"M0 0 L0 10 A5 5 0 0 1 0 10 Z", 0, 0, 0, 0, 2},    /* same ends: omitted */
    {"M0 0 L10 0 L10 10 Z L-10 0 L0 -10 Z", -10, -10, 20, 20, 6}, /* after Z */
    {"M0,0L1e1,0 10-10z", 0, -10, 10, 10, 3},
    {"M0 0L.5.5 1 0z", 0, 0, 1, 0.5, 3},
    {"M0 0 L10 10 M20 20 L30 20 L30 30 Z", 20, 20, 10, 10, 4}, /* no area: left out */
    {"", 0, 0, 0, 0, 0},
    {" \n\t", 0, 0, 0, 0, 0},
};

START_TEST(test_path_commands)
{
    const path_case *c = &paths[_i];
    char markup[300];
    snprintf(markup, sizeof markup, "<path d=\"%s\"/>", c->d);
    assert_box(markup, c->x, c->y, c->w, c->h, c->segments);
}
END_TEST

static const char *const bad[] = {
    "<path d=\"L0 0 1 1\"/>",              /* no moveto first */
    "<path d=\"M0\"/>",                    /* half a pair */
    "<path d=\"M0 0 L\"/>",
    "<path d=\"M0 0 X1 1\"/>",
    "<path d=\"M0 0 A1 1 0 2 0 1 1\"/>",   /* flag 2 */
    "<path d=\"M0 0 A1 1 0 0 1 1\"/>",
    "<path d=\"M0 0 L1 1,\"/>",            /* a comma with nothing after */
    "<path d=\"M0 0 L1 1,,2 2\"/>",
    "<path d=\"M0 0 L1e 1\"/>",
    "<path d=\"M0 0 L. 1\"/>",
    "<path d=\"M0 0 L1e999 1\"/>",         /* not finite */
    "<polygon points=\"0 0 1\"/>",         /* odd count */
    "<rect width=\"1 2\" height=\"1\"/>",
    "<rect width=\"5%\" height=\"1\"/>",
    "<circle r=\"\"/>",
    "<g transform=\"rotate(1 2)\"/>",      /* a centre needs both coordinates */
    "<g transform=\"scale()\"/>",
    "<g transform=\"shear(1)\"/>",
    "<g transform=\"translate(1 2\"/>",
    "<g fill-rule=\"odd\"/>",
    "<text/>",
    "<g>",
    "</g>",
    "<g></path>",
    "<path d=\"M0 0\">x</path>",
    "<path d='M0 0 L1 &amp; 2'/>",
    "<path style=\"fill:red\" d=\"M0 0\"/>",
    "<rect width=\"1\" height=\"1\"><rect/></rect>",
    "junk",
};

START_TEST(test_bad_data_refused)
{
    glyph_shape *s = NULL;
    ug_error err;
    ug_error_clear(&err);
    ug_status st = glyph_shape_parse(bad[_i], here(), &s, &err);
    ck_assert_msg(st == UG_ESYNTAX, "%s: status %d", bad[_i], st);
    ck_assert_ptr_null(s);
    ck_assert_msg(strstr(err.msg, "malformed at character"), "%s: %s", bad[_i], err.msg);
    ck_assert_str_eq(err.where.file, "test.yaml");
}
END_TEST

/* ---- shapes and transforms ------------------------------------------------------ */

typedef struct {
    const char *markup;
    double x, y, w, h;
    size_t segments;
} shape_case;

/* A rect 10 x 20 turned by 30 degrees: its corners go to (0,0), (10 cos 30,
** 10 sin 30) = (8.660254, 5), (-20 sin 30, 20 cos 30) = (-10, 17.320508) and
** their sum (-1.339746, 22.320508): x from -10 to 8.660254, y from 0 to
** 22.320508. rotate(90 5 5) maps (x, y) to (10 - y, x). skewX(45) adds y to x. */
static const shape_case shapes[] = {
    {"<circle cx=\"50\" cy=\"50\" r=\"10\"/>", 40, 40, 20, 20, 5},
    {"<ellipse cx=\"50\" cy=\"40\" rx=\"10\" ry=\"5\"/>", 40, 35, 20, 10, 5},
    {"<ellipse cx=\"50\" cy=\"40\" rx=\"10\"/>", 40, 30, 20, 20, 5}, /* ry auto = rx */
    {"<rect x=\"1\" y=\"2\" width=\"10\" height=\"20\"/>", 1, 2, 10, 20, 5},
    {"<rect width=\"10px\" height=\"20\" rx=\"3\"/>", 0, 0, 10, 20, 9},
    {"<rect width=\"10\" height=\"20\" ry=\"30\"/>", 0, 0, 10, 20, 9}, /* clamped */
    {"<rect width=\"0\" height=\"20\"/>", 0, 0, 0, 0, 0},
    {"<circle r=\"-1\"/>", 0, 0, 0, 0, 0},
    {"<polygon points=\"0,0 10,0 5,8\"/>", 0, 0, 10, 8, 3},
    {"<polyline points=\"0 0 10 0 5 8\"/>", 0, 0, 10, 8, 3},
    {"<rect width=\"10\" height=\"20\" transform=\"rotate(30)\"/>", -10, 0,
     8.660254037844386 + 10, 22.32050807568877, 5},
    {"<rect width=\"10\" height=\"2\" transform=\"rotate(90 5 5)\"/>", 8, 0, 2, 10, 5},
    {"<rect width=\"10\" height=\"10\" transform=\"skewX(45)\"/>", 0, 0, 20, 10, 5},
    {"<rect width=\"10\" height=\"10\" transform=\"skewY(45)\"/>", 0, 0, 10, 20, 5},
    {"<rect width=\"10\" height=\"10\" transform=\"matrix(1 0 0 1 3 4)\"/>", 3, 4, 10, 10, 5},
    {"<rect width=\"10\" height=\"10\" transform=\"translate(3)\"/>", 3, 0, 10, 10, 5},
    {"<rect width=\"10\" height=\"10\" transform=\"scale(2,3)\"/>", 0, 0, 20, 30, 5},
    {"<g transform=\"translate(10,20)\"><rect width=\"10\" height=\"10\" "
     "transform=\"scale(2)\"/></g>", 10, 20, 20, 20, 5},
    {"<g transform=\"translate(10 0)scale(2)\"><g transform=\" scale(1 , 3) \">"
     "<rect width=\"1\" height=\"1\"/></g></g>", 10, 0, 2, 6, 5},
    {"<g><path d=\"M0 0 L1 0 L0 1Z\"/><circle cx=\"10\" cy=\"10\" r=\"1\"/></g>", 0, 0, 11,
     11, 8},
};

START_TEST(test_shapes_and_transforms)
{
    const shape_case *c = &shapes[_i];
    assert_box(c->markup, c->x, c->y, c->w, c->h, c->segments);
}
END_TEST

/* Coverage of a 100 x 100 markup drawn at 64 x 64. */
static double our_ink(const char *markup)
{
    glyph_shape *s = parse(markup);
    double ink;
    ug_error err;
    ck_assert_int_eq(glyph_ink(s, here(), &ink, &err), UG_OK);
    glyph_shape_free(s);
    return ink;
}

/* Two squares, the inner a hole only under evenodd: 1 - 0.25 of the box. */
START_TEST(test_fill_rule_inherited)
{
    const char *d = "d=\"M0 0H100V100H0Z M25 25H75V75H25Z\"";
    char m[300];
    snprintf(m, sizeof m, "<path %s/>", d);
    ck_assert_double_eq_tol(our_ink(m), 1.0, 1e-9);
    snprintf(m, sizeof m, "<g fill-rule=\"evenodd\"><g><path %s/></g></g>", d);
    ck_assert_double_eq_tol(our_ink(m), 0.75, 1e-9);
    snprintf(m, sizeof m, "<g fill-rule=\"evenodd\"><path fill-rule=\"nonzero\" %s/></g>", d);
    ck_assert_double_eq_tol(our_ink(m), 1.0, 1e-9);
    snprintf(m, sizeof m, "<g fill-rule=\"evenodd\"><path clip-rule=\"nonzero\" %s/></g>", d);
    ck_assert_double_eq_tol(our_ink(m), 0.75, 1e-9);
}
END_TEST

START_TEST(test_copy)
{
    glyph_shape *s = parse("<circle cx=\"5\" cy=\"6\" r=\"2\"/><rect width=\"1\" height=\"1\"/>");
    glyph_shape *c = glyph_shape_copy(s);
    ck_assert_ptr_nonnull(c);
    double a[4], b[4];
    glyph_shape_bounds(s, a);
    glyph_shape_free(s);
    glyph_shape_bounds(c, b);
    ck_assert_mem_eq(a, b, sizeof a);
    ck_assert_uint_eq(glyph_shape_segments(c), 10);
    glyph_shape_free(c);
}
END_TEST

START_TEST(test_allocation_failures)
{
    const char *m = "<g transform=\"scale(2)\"><circle r=\"3\"/><path d=\"M0 0 L1 1 L0 1 "
                    "L3 4 L5 6 L7 1 L9 9 L0 2 L4 4 L1 9 L3 3 L8 8 L2 7 L6 6 L1 1 L0 9 L5 5 "
                    "L9 9 L2 2 L7 7 Z\"/></g>";
    for (long n = 0; n < 100; n++) {
        glyph_shape *s = NULL;
        ug_error err;
        ug_error_clear(&err);
        ug_mem_fail_after(n);
        ug_status st = glyph_shape_parse(m, here(), &s, &err);
        ug_mem_fail_after(-1);
        ck_assert_msg(st == UG_OK || st == UG_ENOMEM, "allocation %ld: %d %s", n, st, err.msg);
        ck_assert(st == UG_OK ? s != NULL : s == NULL);
        glyph_shape_free(s);
        if (st == UG_OK)
            return;
    }
    ck_abort_msg("glyph_shape_parse never succeeded");
}
END_TEST

/* The one number grammar the sanitizer and the outlines share. */
START_TEST(test_numbers)
{
    static const struct {
        const char *text;
        double v;
        size_t used;
    } ok[] = {{"1", 1, 1},      {"-2.5", -2.5, 4}, {"+.5", 0.5, 3}, {"5.", 5, 2},
              {"1e3", 1000, 3}, {"1E-2x", 0.01, 4}, {"1e", 1, 1},   {"1.5.5", 1.5, 3},
              {"0x10", 0, 1}};
    for (size_t i = 0; i < sizeof ok / sizeof *ok; i++) {
        double v;
        const char *t = ok[i].text, *end = glyph_number(t, t + strlen(t), &v);
        ck_assert_msg(end && (size_t)(end - t) == ok[i].used && v == ok[i].v, "%s", t);
    }
    static const char *const no[] = {"", ".", "-", "e5", "1e400", "inf", "nan"};
    for (size_t i = 0; i < sizeof no / sizeof *no; i++) {
        double v;
        ck_assert_ptr_null(glyph_number(no[i], no[i] + strlen(no[i]), &v));
    }
}
END_TEST

/* ---- librsvg, the outside reference --------------------------------------------- */

#define SVG_NS "http://www.w3.org/2000/svg"

/* A document: the svg start tag (given), the markup, its end tag. */
static RsvgHandle *rsvg_doc(const char *svg_tag, const char *markup)
{
    size_t n = strlen(svg_tag) + strlen(markup) + 10;
    char *doc = malloc(n);
    snprintf(doc, n, "%s%s</svg>", svg_tag, markup);
    GError *e = NULL;
    RsvgHandle *h = rsvg_handle_new_from_data((const guint8 *)doc, strlen(doc), &e);
    ck_assert_msg(h, "librsvg: %s", e ? e->message : "?");
    free(doc);
    return h;
}

static RsvgHandle *rsvg_sized(const char *markup, int size, int span)
{
    char tag[200];
    snprintf(tag, sizeof tag, "<svg xmlns=\"%s\" viewBox=\"0 0 %d %d\" width=\"%d\" "
             "height=\"%d\">", SVG_NS, span, span, size, size);
    return rsvg_doc(tag, markup);
}

/* librsvg's logical rectangle of the markup in a 100 x 100 px document with no
** viewBox, so its units are the markup's own (what glyph_measure returned
** before glyph_shape.c). */
static void rsvg_bounds(const char *markup, double box[4])
{
    size_t n = strlen(markup) + 20;
    char *g = malloc(n);
    snprintf(g, n, "<g id=\"m\">%s</g>", markup);
    RsvgHandle *h = rsvg_doc("<svg xmlns=\"" SVG_NS "\" width=\"100\" height=\"100\">", g);
    free(g);
    RsvgRectangle vp = {0, 0, 100, 100}, ink, logical;
    GError *e = NULL;
    ck_assert_msg(rsvg_handle_get_geometry_for_layer(h, "#m", &vp, &ink, &logical, &e),
                  "librsvg: %s", e ? e->message : "?");
    box[0] = logical.x;
    box[1] = logical.y;
    box[2] = logical.width;
    box[3] = logical.height;
    g_object_unref(h);
}

/* librsvg's rendering of unit-box markup: size x size coverages. */
static void rsvg_alpha(const char *markup, int size, unsigned char *alpha)
{
    RsvgHandle *h = rsvg_sized(markup, size, 100);
    cairo_surface_t *s = cairo_image_surface_create(CAIRO_FORMAT_A8, size, size);
    cairo_t *cr = cairo_create(s);
    RsvgRectangle vp = {0, 0, size, size};
    GError *e = NULL;
    ck_assert_msg(rsvg_handle_render_document(h, cr, &vp, &e), "librsvg: %s",
                  e ? e->message : "?");
    glyph_surface_alpha(s, size, alpha);
    cairo_destroy(cr);
    cairo_surface_destroy(s);
    g_object_unref(h);
}

/* Tolerances:
**  - bounds: cairo flattens curves to 0.1 device units by default (cairo
**    documentation, cairo_set_tolerance), the bound on how far librsvg's
**    geometry can stand from the exact curve; librsvg 2.54's logical rectangle
**    comes from cairo's path extents (exact spline bounds rounded out to
**    cairo's 24.8 fixed point, 1/256), so it lies much closer in practice;
**  - ink: the summed coverage of the two 64 x 64 renderings may differ by
**    0.2% of the box (our choice; both are cairo's rasterizer on the same
**    outlines, apart from how each turns arcs into cubics). */
#define BOUNDS_TOL 0.1
#define INK_TOL 0.002

/* librsvg 2.54 maps a transformed element's box through a rotation or skew
** twice (a circle r = 10 under rotate(45) reports 40 x 40), so its logical
** rectangle is a loose box there, and it keeps subpaths that enclose no area.
** Where markup rotates or skews, ours must lie inside librsvg's box, and the
** exact extent is checked against librsvg's rendering instead: drawn at 4 px a
** unit, the first and last rows and columns with coverage. */
static bool axis_aligned(const char *markup)
{
    return !strstr(markup, "rotate") && !strstr(markup, "skew") && !strstr(markup, "matrix");
}

#define FINE 4   /* px per unit */
#define SPAN 300 /* units drawn, from -100 */

static bool rendered_extent(const char *markup, double box[4])
{
    int n = FINE * SPAN;
    char *wrapped = malloc(strlen(markup) + 100);
    sprintf(wrapped, "<g transform=\"translate(100 100)\">%s</g>", markup);
    RsvgHandle *h = rsvg_sized(wrapped, n, SPAN);
    free(wrapped);
    cairo_surface_t *s = cairo_image_surface_create(CAIRO_FORMAT_A8, n, n);
    cairo_t *cr = cairo_create(s);
    RsvgRectangle vp = {0, 0, n, n};
    ck_assert(rsvg_handle_render_document(h, cr, &vp, NULL));
    cairo_surface_flush(s);
    const unsigned char *px = cairo_image_surface_get_data(s);
    int stride = cairo_image_surface_get_stride(s), x0 = n, y0 = n, x1 = -1, y1 = -1;
    for (int y = 0; y < n; y++)
        for (int x = 0; x < n; x++)
            if (px[(size_t)y * stride + x]) {
                x0 = x < x0 ? x : x0;
                x1 = x > x1 ? x : x1;
                y0 = y < y0 ? y : y0;
                y1 = y > y1 ? y : y1;
            }
    cairo_destroy(cr);
    cairo_surface_destroy(s);
    g_object_unref(h);
    if (x1 < 0)
        return false;
    box[0] = x0 / (double)FINE - 100;
    box[1] = y0 / (double)FINE - 100;
    box[2] = (x1 + 1 - x0) / (double)FINE;
    box[3] = (y1 + 1 - y0) / (double)FINE;
    return true;
}

static double worst_bounds, worst_ink;

static void agree_bounds(const char *what, const char *markup)
{
    glyph_shape *s = parse(markup);
    double ours[4], ref[4];
    glyph_shape_bounds(s, ours);
    glyph_shape_free(s);
    rsvg_bounds(markup, ref);
    if (axis_aligned(markup)) {
        for (int i = 0; i < 4; i++) {
            double d = fabs(ours[i] - ref[i]);
            worst_bounds = d > worst_bounds ? d : worst_bounds;
            ck_assert_msg(d <= BOUNDS_TOL, "%s: bounds %g %g %g %g, librsvg %g %g %g %g",
                          what, ours[0], ours[1], ours[2], ours[3], ref[0], ref[1], ref[2],
                          ref[3]);
        }
        return;
    }
    ck_assert_msg(ours[0] >= ref[0] - BOUNDS_TOL && ours[1] >= ref[1] - BOUNDS_TOL &&
                      ours[0] + ours[2] <= ref[0] + ref[2] + BOUNDS_TOL &&
                      ours[1] + ours[3] <= ref[1] + ref[3] + BOUNDS_TOL,
                  "%s: bounds %g %g %g %g outside librsvg's %g %g %g %g", what, ours[0],
                  ours[1], ours[2], ours[3], ref[0], ref[1], ref[2], ref[3]);
    double px[4];
    if (ours[0] < -99 || ours[1] < -99 || ours[0] + ours[2] > 199 ||
        ours[1] + ours[3] > 199 || !rendered_extent(markup, px))
        return; /* off the rendered span, or too thin to cover a pixel */
    /* A coverage pixel holds the edge somewhere inside it: one pixel of slack,
    ** and one more for coverage too faint to reach 1/255. */
    double slack = 2.0 / FINE;
    ck_assert_msg(fabs(ours[0] - px[0]) <= slack && fabs(ours[1] - px[1]) <= slack &&
                      fabs(ours[0] + ours[2] - px[0] - px[2]) <= slack &&
                      fabs(ours[1] + ours[3] - px[1] - px[3]) <= slack,
                  "%s: bounds %g %g %g %g, librsvg's rendering spans %g %g %g %g", what,
                  ours[0], ours[1], ours[2], ours[3], px[0], px[1], px[2], px[3]);
}

static void agree_ink(const char *what, const char *markup, double ours)
{
    unsigned char alpha[64 * 64];
    rsvg_alpha(markup, 64, alpha);
    unsigned long sum = 0;
    for (size_t i = 0; i < sizeof alpha; i++)
        sum += alpha[i];
    double ref = (double)sum / (255.0 * sizeof alpha), d = fabs(ours - ref);
    worst_ink = d > worst_ink ? d : worst_ink;
    ck_assert_msg(d <= INK_TOL, "%s: ink %.5f, librsvg %.5f", what, ours, ref);
}

/* ---- every glyph we ship or test with ------------------------------------------------ */

static size_t glyphs_checked;

static void check_glyph(const char *dir, const char *ref)
{
    glyph_search search = {NULL, 0, dir};
    ug_glyph *g = NULL;
    ug_error err;
    ug_error_clear(&err);
    if (glyph_load(ref, &search, here(), &g, &err))
        return; /* a hostile file refused by the sanitizer: nothing to measure */
    agree_bounds(g->path, g->body);
    agree_ink(g->path, g->body, g->ink);
    glyphs_checked++;
    glyph_free(g);
}

static int visit(const char *path, const struct stat *sb, int type, struct FTW *ftw)
{
    (void)sb;
    size_t n = strlen(path);
    if (type != FTW_F || n < 4 || strcmp(path + n - 4, ".svg") != 0)
        return 0;
    char dir[4096];
    snprintf(dir, sizeof dir, "%.*s", ftw->base, path);
    char ref[4200];
    snprintf(ref, sizeof ref, "./%s", path + ftw->base);
    check_glyph(dir, ref);
    return 0;
}

START_TEST(test_glyphs_agree_with_librsvg)
{
    /* The library by name (trusted, placed as drawn) and as a user's file
    ** (measured and fitted). */
    ck_assert_int_eq(nftw("../glyphs", visit, 8, FTW_PHYS), 0);
    size_t files = glyphs_checked;
    ck_assert_uint_ge(files, 40);
    FILE *ls = popen("ls ../glyphs/*.svg", "r");
    char line[512];
    while (fgets(line, sizeof line, ls)) {
        line[strcspn(line, "\n")] = '\0';
        char *base = strrchr(line, '/') + 1;
        base[strlen(base) - 4] = '\0';
        check_glyph(".", base);
    }
    pclose(ls);
    ck_assert_uint_eq(glyphs_checked, 2 * files);
    ck_assert_int_eq(nftw("data/glyphs", visit, 8, FTW_PHYS), 0);
    ck_assert_uint_ge(glyphs_checked, 2 * files + 20);
    fprintf(stderr, "glyph_shape: %zu glyphs; worst difference from librsvg: bounds %.4f, "
                    "ink %.5f\n", glyphs_checked, worst_bounds, worst_ink);
}
END_TEST

/* ---- seeded random shapes ---------------------------------------------------------------- */

static unsigned long long rng_state;

static double uniform(double lo, double hi)
{
    rng_state ^= rng_state << 13;
    rng_state ^= rng_state >> 7;
    rng_state ^= rng_state << 17;
    return lo + (hi - lo) * (double)(rng_state >> 11) / 9007199254740992.0;
}

static int pick(int n)
{
    int k = (int)uniform(0, n);
    return k < n ? k : n - 1;
}

typedef struct {
    char *p;
    size_t len, cap;
} text;

static void add(text *t, const char *fmt, ...) __attribute__((format(printf, 2, 3)));
static void add(text *t, const char *fmt, ...)
{
    va_list ap;
    va_start(ap, fmt);
    int n = vsnprintf(t->p + t->len, t->cap - t->len, fmt, ap);
    va_end(ap);
    ck_assert(n >= 0 && t->len + (size_t)n < t->cap);
    t->len += (size_t)n;
}

/* Path data that wanders inside 10..90 (relative steps small), every command
** of §8.3 in both cases, closed or not. */
static void random_path(text *t)
{
    add(t, "<path%s d=\"M%.2f %.2f", pick(3) ? "" : " fill-rule=\"evenodd\"",
        uniform(10, 90), uniform(10, 90));
    int n = 3 + pick(6);
    for (int i = 0; i < n; i++) {
        bool rel = pick(2);
        double s = rel ? 0 : 1, lo = rel ? -15 : 10, hi = rel ? 15 : 90;
        (void)s;
#define C() uniform(lo, hi)
        switch (pick(9)) {
        case 0: add(t, " %c%.2f %.2f", rel ? 'l' : 'L', C(), C()); break;
        case 1: add(t, " %c%.2f", rel ? 'h' : 'H', C()); add(t, " %c%.2f", rel ? 'v' : 'V', C()); break;
        case 2: add(t, " %c%.2f %.2f %.2f %.2f %.2f %.2f", rel ? 'c' : 'C', C(), C(), C(), C(), C(), C()); break;
        case 3: add(t, " %c%.2f %.2f %.2f %.2f", rel ? 's' : 'S', C(), C(), C(), C()); break;
        case 4: add(t, " %c%.2f %.2f %.2f %.2f", rel ? 'q' : 'Q', C(), C(), C(), C()); break;
        case 5: add(t, " %c%.2f %.2f", rel ? 't' : 'T', C(), C()); break;
        case 6: case 7:
            add(t, " %c%.2f %.2f %.1f %d%d%.2f %.2f", rel ? 'a' : 'A', uniform(2, 40),
                uniform(2, 40), uniform(0, 360), pick(2), pick(2), C(), C());
            break;
        default: add(t, " %c%.2f %.2f %.2f %.2f", rel ? 'l' : 'L', C(), C(), C(), C()); break;
        }
#undef C
    }
    add(t, "%s\"/>", pick(2) ? " Z" : "");
}

static void random_transform(text *t, bool aligned)
{
    int k = aligned ? pick(3) : 3 + pick(4);
    switch (k) {
    case 0: add(t, " transform=\"translate(%.2f,%.2f)\"", uniform(-20, 20), uniform(-20, 20)); break;
    case 1: add(t, " transform=\"scale(%.3f %.3f)\"", uniform(0.5, 1.2), uniform(0.5, 1.2)); break;
    case 2: add(t, " transform=\"translate(100 0) scale(-1 1)\""); break; /* a mirror */
    case 3: add(t, " transform=\"rotate(%.1f 50 50)\"", uniform(-180, 180)); break;
    case 4: add(t, " transform=\"skewX(%.1f)\"", uniform(-20, 20)); break;
    case 5: add(t, " transform=\"skewY(%.1f)\"", uniform(-20, 20)); break;
    default:
        add(t, " transform=\"matrix(%.3f %.3f %.3f %.3f %.2f %.2f)\"", uniform(0.6, 1),
            uniform(-0.3, 0.3), uniform(-0.3, 0.3), uniform(0.6, 1), uniform(-5, 5),
            uniform(-5, 5));
    }
}

static void random_element(text *t, bool aligned, int depth)
{
    int k = pick(depth < 2 ? 7 : 6);
    bool transformed = !pick(3);
    switch (k) {
    case 0: case 1: random_path(t); return;
    case 2:
        add(t, "<rect x=\"%.2f\" y=\"%.2f\" width=\"%.2f\" height=\"%.2f\"", uniform(5, 60),
            uniform(5, 60), uniform(5, 35), uniform(5, 35));
        if (pick(2))
            add(t, " rx=\"%.2f\"", uniform(0, 10));
        break;
    case 3:
        add(t, "<circle cx=\"%.2f\" cy=\"%.2f\" r=\"%.2f\"", uniform(20, 80), uniform(20, 80),
            uniform(2, 20));
        break;
    case 4:
        add(t, "<ellipse cx=\"%.2f\" cy=\"%.2f\" rx=\"%.2f\" ry=\"%.2f\"", uniform(20, 80),
            uniform(20, 80), uniform(2, 20), uniform(2, 20));
        break;
    case 5:
        add(t, "<polygon points=\"");
        for (int i = 3 + pick(4); i > 0; i--)
            add(t, "%.2f,%.2f ", uniform(10, 90), uniform(10, 90));
        add(t, "\"");
        break;
    default:
        add(t, "<g%s", pick(2) ? " fill-rule=\"evenodd\"" : "");
        if (transformed)
            random_transform(t, aligned);
        add(t, ">");
        for (int i = 1 + pick(3); i > 0; i--)
            random_element(t, aligned, depth + 1);
        add(t, "</g>");
        return;
    }
    if (transformed)
        random_transform(t, aligned);
    add(t, "/>");
}

static void random_markup(text *t, unsigned seed, bool aligned)
{
    rng_state = 0x9E3779B97F4A7C15ull ^ seed;
    t->len = 0;
    t->p[0] = '\0';
    for (int i = 1 + pick(3); i > 0; i--)
        random_element(t, aligned, 0);
}

#define RANDOM_SHAPES 300

START_TEST(test_random_shapes_agree_with_librsvg)
{
    char buf[65536];
    text t = {buf, 0, sizeof buf};
    char what[40];
    for (unsigned i = 0; i < RANDOM_SHAPES; i++) {
        random_markup(&t, i, i % 3 != 2); /* a third rotated or skewed */
        snprintf(what, sizeof what, "random shape %u", i);
        glyph_shape *s = parse(buf);
        double ink;
        ug_error err;
        ck_assert_int_eq(glyph_ink(s, here(), &ink, &err), UG_OK);
        glyph_shape_free(s);
        agree_bounds(what, buf);
        agree_ink(what, buf, ink);
    }
    fprintf(stderr, "glyph_shape: %d random shapes; worst difference from librsvg: bounds "
                    "%.4f, ink %.5f\n", RANDOM_SHAPES, worst_bounds, worst_ink);
}
END_TEST

/* Wrapping markup in translate(tx ty) scale(k) maps its bounds by the same
** map: x' = k x + tx, w' = k w. With k a power of two and tx, ty multiples of
** 1/64 every product is exact, so only the final sums round. */
START_TEST(test_transform_moves_bounds)
{
    char buf[65536], wrapped[66000];
    text t = {buf, 0, sizeof buf};
    for (unsigned i = 0; i < 100; i++) {
        random_markup(&t, 1000 + i, i % 2);
        double k = ldexp(1, pick(7) - 3), tx = pick(12801) / 64.0 - 100,
               ty = pick(12801) / 64.0 - 100;
        snprintf(wrapped, sizeof wrapped, "<g transform=\"translate(%.17g %.17g) "
                 "scale(%.17g)\">%s</g>", tx, ty, k, buf);
        glyph_shape *a = parse(buf), *b = parse(wrapped);
        double ba[4], bb[4];
        glyph_shape_bounds(a, ba);
        glyph_shape_bounds(b, bb);
        double want[4] = {k * ba[0] + tx, k * ba[1] + ty, k * ba[2], k * ba[3]};
        for (int j = 0; j < 4; j++)
            ck_assert_msg(fabs(bb[j] - want[j]) <= 1e-12 * (1 + fabs(want[j])),
                          "shape %u, k %g: %.17g, expected %.17g", i, k, bb[j], want[j]);
        ck_assert_uint_eq(glyph_shape_segments(a), glyph_shape_segments(b));
        glyph_shape_free(a);
        glyph_shape_free(b);
    }
}
END_TEST

static Suite *glyph_shape_suite(void)
{
    Suite *s = suite_create("glyph_shape");
    TCase *t = tcase_create("grammar");
    tcase_add_loop_test(t, test_path_commands, 0, sizeof paths / sizeof *paths);
    tcase_add_loop_test(t, test_bad_data_refused, 0, sizeof bad / sizeof *bad);
    tcase_add_loop_test(t, test_shapes_and_transforms, 0, sizeof shapes / sizeof *shapes);
    tcase_add_test(t, test_fill_rule_inherited);
    tcase_add_test(t, test_copy);
    tcase_add_test(t, test_allocation_failures);
    tcase_add_test(t, test_numbers);
    suite_add_tcase(s, t);
    t = tcase_create("librsvg");
    tcase_set_timeout(t, 120);
    tcase_add_test(t, test_glyphs_agree_with_librsvg);
    tcase_add_test(t, test_random_shapes_agree_with_librsvg);
    tcase_add_test(t, test_transform_moves_bounds);
    suite_add_tcase(s, t);
    return s;
}

int main(void)
{
    return check_run(glyph_shape_suite());
}
