/* Tests for src/raster.c and src/html.c: SVG -> PNG / PDF / web page.
**
** The check values come from the unit definitions, not from our code:
** CSS px are 1/96 in (W3C CSS Values and Units Level 3, §5.2 absolute
** lengths) and PDF points are 1/72 in (ISO 32000-1 §8.3.2.1), so an SVG
** 288 x 192 px is 3 x 2 in: 900 x 600 pixels at 300 dpi and a 216 x 144 pt
** page. Apportionment rows are checked against published worked examples.
**
** `check_raster --write DIR` writes the test picture as PNG and PDF into DIR
** for tests/suite_raster.sh, which checks them with poppler-utils. */
#define _POSIX_C_SOURCE 200809L
#include <cairo.h>
#include <librsvg/rsvg.h>
#include <check.h>
#include <libxml/HTMLparser.h>
#include <libxml/parser.h>
#include <libxml/xpath.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#include "alloc.h"
#include "raster.h"
#include "xpath_check.h"
#include "check_run.h"

/* Three squares of pure colours on white, every edge on a multiple of 8 px
** so that at 72, 96 and 300 dpi (factors 0.75, 1, 3.125) they cover whole
** pixels exactly; the text is black and grey, never one of the colours. */
static const char test_svg[] =
    "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n"
    "<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"288\" height=\"192\" "
    "viewBox=\"0 0 288 192\" role=\"img\" aria-labelledby=\"t\">\n"
    "<title id=\"t\">Three squares (demo data)</title>\n"
    "<rect width=\"288\" height=\"192\" fill=\"#ffffff\"/>\n"
    "<rect x=\"16\" y=\"16\" width=\"64\" height=\"40\" fill=\"#ff0000\"/>\n"
    "<rect x=\"96\" y=\"16\" width=\"48\" height=\"80\" fill=\"#0000ff\"/>\n"
    "<rect x=\"160\" y=\"16\" width=\"112\" height=\"32\" fill=\"#00ff00\"/>\n"
    "<text x=\"16\" y=\"160\" font-family=\"DejaVu Sans\" font-size=\"16\" "
    "fill=\"#000000\">Alder Lane pantry, 2025</text>\n"
    "</svg>\n";

typedef struct {
    unsigned rgb;
    double area_px; /* at 96 dpi, from the rectangles above */
} colour_area;

static const colour_area areas[] = {
    {0xff0000, 64 * 40}, {0x0000ff, 48 * 80}, {0x00ff00, 112 * 32}};

static char *render(const char *svg, ug_output_format fmt, double dpi,
                    double scale, size_t *len)
{
    char *out;
    ug_error err = {0};
    ug_status st = ug_render_svg(svg, strlen(svg), fmt, dpi, scale, &out, len, &err);
    ck_assert_msg(st == UG_OK, "render failed: %s", err.msg);
    return out;
}

typedef struct {
    const char *data;
    size_t len, at;
} reader;

static cairo_status_t read_png(void *closure, unsigned char *data, unsigned int n)
{
    reader *r = closure;
    if (r->len - r->at < n)
        return CAIRO_STATUS_READ_ERROR;
    memcpy(data, r->data + r->at, n);
    r->at += n;
    return CAIRO_STATUS_SUCCESS;
}

static cairo_surface_t *decode_png(const char *png, size_t len)
{
    reader r = {png, len, 0};
    cairo_surface_t *s = cairo_image_surface_create_from_png_stream(read_png, &r);
    ck_assert_int_eq(cairo_surface_status(s), CAIRO_STATUS_SUCCESS);
    return s;
}

/* Pixels exactly of colour rgb and fully opaque. */
static long count_colour(cairo_surface_t *s, unsigned rgb)
{
    int w = cairo_image_surface_get_width(s), h = cairo_image_surface_get_height(s);
    int stride = cairo_image_surface_get_stride(s);
    const unsigned char *d = cairo_image_surface_get_data(s);
    long n = 0;
    for (int y = 0; y < h; y++)
        for (int x = 0; x < w; x++) {
            uint32_t p;
            memcpy(&p, d + (size_t)y * (size_t)stride + (size_t)x * 4, 4);
            n += p == (0xff000000u | rgb);
        }
    return n;
}

/* ---- PNG sizes and areas --------------------------------------------------- */

typedef struct {
    double dpi, scale;
    int w, h;          /* 288 x 192 px * dpi/96 * scale, rounded up */
    bool exact_edges;  /* every rectangle edge falls on a pixel edge */
} png_case;

static const png_case png_cases[] = {
    {96, 1, 288, 192, true},   /* 3 x 2 in at 96 dpi */
    {300, 1, 900, 600, true},  /* 3 x 2 in at 300 dpi */
    {72, 1, 216, 144, true},
    {96, 2, 576, 384, true},
    {150, 1, 450, 300, false},
    {100, 1, 300, 200, false},
    {96, 0.5, 144, 96, false},
    {97, 1, 291, 194, false},  /* 290.99.. and 194.0 -> whole pixels covering */
};

START_TEST(test_png_size_and_colour_areas)
{
    const png_case *c = &png_cases[_i];
    size_t len;
    char *png = render(test_svg, UG_OUT_PNG, c->dpi, c->scale, &len);
    ck_assert(len > 8 && memcmp(png, "\x89PNG\r\n\x1a\n", 8) == 0);
    cairo_surface_t *s = decode_png(png, len);
    ck_assert_int_eq(cairo_image_surface_get_width(s), c->w);
    ck_assert_int_eq(cairo_image_surface_get_height(s), c->h);
    double f = c->dpi / 96.0 * c->scale;
    for (size_t k = 0; c->exact_edges && k < sizeof areas / sizeof areas[0]; k++)
        ck_assert_int_eq(count_colour(s, areas[k].rgb),
                         (long)(areas[k].area_px * f * f));
    cairo_surface_destroy(s);
    ug_free(png);
}
END_TEST

static cairo_status_t to_mem(void *closure, const unsigned char *data, unsigned int n)
{
    reader *w = closure; /* data, len: a malloc'd buffer and its length */
    char *grown = realloc((char *)w->data, w->len + n);
    if (!grown)
        return CAIRO_STATUS_NO_MEMORY;
    memcpy(grown + w->len, data, n);
    w->data = grown;
    w->len += n;
    return CAIRO_STATUS_SUCCESS;
}

/* The pixels cairo's own PNG writer would have written for the SVG drawn by
** librsvg at 96 dpi, decoded again. */
static cairo_surface_t *cairo_written(const char *svg, int w, int h)
{
    RsvgHandle *rh = rsvg_handle_new_from_data((const guint8 *)svg, strlen(svg), NULL);
    ck_assert_ptr_nonnull(rh);
    cairo_surface_t *s = cairo_image_surface_create(CAIRO_FORMAT_ARGB32, w, h);
    cairo_t *cr = cairo_create(s);
    RsvgRectangle vp = {0, 0, w, h};
    ck_assert(rsvg_handle_render_document(rh, cr, &vp, NULL));
    cairo_destroy(cr);
    reader out = {NULL, 0, 0};
    ck_assert_int_eq(cairo_surface_write_to_png_stream(s, to_mem, &out),
                     CAIRO_STATUS_SUCCESS);
    cairo_surface_destroy(s);
    g_object_unref(rh);
    cairo_surface_t *back = decode_png(out.data, out.len);
    free((char *)out.data);
    return back;
}

static void assert_same_pixels(cairo_surface_t *a, cairo_surface_t *b)
{
    int w = cairo_image_surface_get_width(a), h = cairo_image_surface_get_height(a);
    ck_assert_int_eq(cairo_image_surface_get_width(b), w);
    ck_assert_int_eq(cairo_image_surface_get_height(b), h);
    for (int y = 0; y < h; y++)
        ck_assert_msg(memcmp(cairo_image_surface_get_data(a) +
                                 (size_t)y * cairo_image_surface_get_stride(a),
                             cairo_image_surface_get_data(b) +
                                 (size_t)y * cairo_image_surface_get_stride(b),
                             (size_t)w * 4) == 0,
                      "row %d differs", y);
}

/* Our PNG writer (libpng, unfiltered rows) against cairo's: the same pixels
** once decoded, for an opaque picture (written as RGB) and one with
** transparent and half-transparent parts (RGBA, unpremultiplied). */
START_TEST(test_png_writer_keeps_pixels)
{
    static const char half[] =
        "<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"64\" height=\"48\">"
        "<rect x=\"8\" y=\"8\" width=\"40\" height=\"24\" fill=\"#0072b2\" "
        "fill-opacity=\"0.5\"/><circle cx=\"40\" cy=\"30\" r=\"12\" fill=\"#d55e00\"/>"
        "</svg>";
    const char *svgs[] = {test_svg, half};
    const int size[][2] = {{288, 192}, {64, 48}};
    for (size_t k = 0; k < 2; k++) {
        size_t len;
        char *png = render(svgs[k], UG_OUT_PNG, 96, 1, &len);
        cairo_surface_t *ours = decode_png(png, len);
        cairo_surface_t *theirs = cairo_written(svgs[k], size[k][0], size[k][1]);
        assert_same_pixels(ours, theirs);
        /* colour type (byte 25 of the file): 2 RGB when opaque, 6 RGBA */
        ck_assert_int_eq(png[25], k == 0 ? 2 : 6);
        cairo_surface_destroy(ours);
        cairo_surface_destroy(theirs);
        ug_free(png);
    }
}
END_TEST

START_TEST(test_renders_are_byte_identical)
{
    ug_output_format fmts[] = {UG_OUT_PNG, UG_OUT_PDF};
    for (int k = 0; k < 2; k++) {
        size_t n1, n2;
        char *a = render(test_svg, fmts[k], 300, 1, &n1);
        char *b = render(test_svg, fmts[k], 300, 1, &n2);
        ck_assert_uint_eq(n1, n2);
        ck_assert(memcmp(a, b, n1) == 0);
        ug_free(a);
        ug_free(b);
    }
}
END_TEST

static bool contains(const char *hay, size_t n, const char *needle)
{
    size_t k = strlen(needle);
    for (size_t i = 0; i + k <= n; i++)
        if (memcmp(hay + i, needle, k) == 0)
            return true;
    return false;
}

/* 288 x 192 px = 3 x 2 in = 216 x 144 pt; dpi does not change a PDF page. */
START_TEST(test_pdf_page_in_points)
{
    size_t len;
    char *pdf = render(test_svg, UG_OUT_PDF, 300, 1, &len);
    ck_assert(len > 5 && memcmp(pdf, "%PDF-", 5) == 0);
    ck_assert(contains(pdf, len, "/MediaBox [ 0 0 216 144 ]"));
    ck_assert(!contains(pdf, len, "/CreationDate"));
    ck_assert(contains(pdf, len, "/FontFile")); /* the text's font is embedded */
    ug_free(pdf);
    pdf = render(test_svg, UG_OUT_PDF, 96, 2, &len);
    ck_assert(contains(pdf, len, "/MediaBox [ 0 0 432 288 ]"));
    ug_free(pdf);
}
END_TEST

/* Pages of one PDF: each sized to its SVG (ISO 32000-1 §14.11.2: MediaBox),
** named in the outline (§12.3.3: /Title), in order; pdfinfo(1) of
** poppler-utils, a reader we did not write, counts them. */
START_TEST(test_pdf_pages)
{
    static const char *const sizes[] = {"288\" height=\"192", "96\" height=\"96",
                                        "400\" height=\"100"};
    char svgs[3][256];
    const char *docs[3];
    size_t lens[3];
    for (int i = 0; i < 3; i++) {
        snprintf(svgs[i], sizeof svgs[i],
                 "<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"%s\">"
                 "<rect width=\"50\" height=\"50\" fill=\"#c00\"/></svg>", sizes[i]);
        docs[i] = svgs[i];
        lens[i] = strlen(svgs[i]);
    }
    const char *titles[3] = {"First row", NULL, "Th\xc3\xa9 third"};
    char *pdf = NULL;
    size_t len = 0;
    ug_error err = {0};
    ck_assert_int_eq(ug_render_pdf_pages(docs, lens, titles, 3, 1, &pdf, &len, &err), UG_OK);
    ck_assert(contains(pdf, len, "/MediaBox [ 0 0 216 144 ]"));
    ck_assert(contains(pdf, len, "/MediaBox [ 0 0 72 72 ]"));
    ck_assert(contains(pdf, len, "/MediaBox [ 0 0 300 75 ]"));
    ck_assert(contains(pdf, len, "/Title (First row)"));
    ck_assert(!contains(pdf, len, "/CreationDate"));
    char path[] = "/tmp/check-raster-XXXXXX";
    int fd = mkstemp(path);
    ck_assert_int_ge(fd, 0);
    ck_assert_int_eq(write(fd, pdf, len), (ssize_t)len);
    close(fd);
    char cmd[128];
    snprintf(cmd, sizeof cmd, "pdfinfo %s | sed -n 's/^Pages: *//p'", path);
    FILE *f = popen(cmd, "r");
    ck_assert_ptr_nonnull(f);
    int pages = 0;
    ck_assert_int_eq(fscanf(f, "%d", &pages), 1);
    ck_assert_int_eq(pclose(f), 0);
    ck_assert_int_eq(pages, 3);
    unlink(path);
    /* one page is the very PDF ug_render_svg writes */
    char *one = NULL;
    size_t one_len = 0;
    ck_assert_int_eq(ug_render_svg(docs[0], lens[0], UG_OUT_PDF, 96, 1, &one, &one_len,
                                   &err), UG_OK);
    ug_free(pdf);
    ck_assert_int_eq(ug_render_pdf_pages(docs, lens, NULL, 1, 1, &pdf, &len, &err), UG_OK);
    ck_assert(len == one_len && memcmp(pdf, one, len) == 0);
    ug_free(pdf);
    ug_free(one);
    /* a page that cannot be read: an error, and no document */
    docs[1] = "<svg";
    lens[1] = 4;
    pdf = (char *)1;
    ck_assert_int_eq(ug_render_pdf_pages(docs, lens, titles, 3, 1, &pdf, &len, &err),
                     UG_ERENDER);
    ck_assert_ptr_null(pdf);
    ck_assert_int_eq(ug_render_pdf_pages(docs, lens, NULL, 0, 1, &pdf, &len, &err),
                     UG_ELIMIT);
}
END_TEST

START_TEST(test_svg_passes_through)
{
    size_t len;
    char *svg = render(test_svg, UG_OUT_SVG, 96, 1, &len);
    ck_assert_uint_eq(len, strlen(test_svg));
    ck_assert_str_eq(svg, test_svg);
    ug_free(svg);
}
END_TEST

/* ---- sizes from the SVG ---------------------------------------------------- */

typedef struct {
    const char *svg;
    ug_status st;
    double w, h;
} size_case;

static const size_case size_cases[] = {
    {"<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"3in\" height=\"2in\"/>",
     UG_OK, 288, 192}, /* 1 in = 96 px (CSS Values) */
    {"<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"210mm\" height=\"297mm\"/>",
     UG_OK, 210 * 96 / 25.4, 297 * 96 / 25.4}, /* A4, ISO 216; 1 in = 25.4 mm */
    {"<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"72pt\" height=\"36pt\"/>",
     UG_OK, 96, 48}, /* 1 pt = 1/72 in */
    {"<svg xmlns=\"http://www.w3.org/2000/svg\" viewBox=\"0 0 120 80\"/>",
     UG_OK, 120, 80},
    {"<svg xmlns=\"http://www.w3.org/2000/svg\"/>", UG_ERENDER, 0, 0},
    {"<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"0\" height=\"10\"/>",
     UG_ERENDER, 0, 0},
    {"<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"10\" height=\"10\">",
     UG_ERENDER, 0, 0}, /* not well-formed */
    {"not an svg at all", UG_ERENDER, 0, 0},
};

START_TEST(test_svg_size_table)
{
    const size_case *c = &size_cases[_i];
    double w = 0, h = 0;
    ug_error err = {0};
    ck_assert_int_eq(raster_svg_size(c->svg, strlen(c->svg), &w, &h, &err), c->st);
    if (c->st == UG_OK) {
        ck_assert_double_eq_tol(w, c->w, 1e-9);
        ck_assert_double_eq_tol(h, c->h, 1e-9);
    } else {
        ck_assert(err.msg[0] != '\0');
    }
}
END_TEST

/* ---- limits and errors ---------------------------------------------------- */

START_TEST(test_pixel_cap)
{
    const char *big = "<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"20000\" "
                      "height=\"20000\"/>";
    char *out = (char *)1;
    ug_error err = {0};
    ck_assert_int_eq(ug_render_svg(big, strlen(big), UG_OUT_PNG, 96, 1, &out, NULL,
                                   &err), UG_ELIMIT);
    ck_assert_ptr_null(out);
    ck_assert_msg(strstr(err.msg, "400.0 megapixels") && strstr(err.msg, "--dpi"),
                  "%s", err.msg);
    /* a small picture at 4800 dpi: 14400 x 9600 = 138.2 MP */
    ug_error_clear(&err);
    ck_assert_int_eq(ug_render_svg(test_svg, strlen(test_svg), UG_OUT_PNG, 96 * 50,
                                   1, &out, NULL, &err), UG_ELIMIT);
    ck_assert_msg(strstr(err.msg, "14400 x 9600") != NULL, "%s", err.msg);
    /* PDF: 20000 px = 15000 pt, over the 14400 pt of ISO 32000-1 Annex C */
    ug_error_clear(&err);
    ck_assert_int_eq(ug_render_svg(big, strlen(big), UG_OUT_PDF, 96, 1, &out, NULL,
                                   &err), UG_ELIMIT);
    ck_assert(strstr(err.msg, "15000 x 15000 pt") != NULL);
}
END_TEST

typedef struct {
    double dpi, scale;
} factor_case;

static const factor_case bad_factors[] = {{0, 1}, {-96, 1}, {96, 0}, {96, -1},
                                          {1.0 / 0.0, 1}, {96, 0.0 / 0.0}};

START_TEST(test_bad_dpi_or_scale)
{
    char *out;
    ug_error err = {0};
    ck_assert_int_eq(ug_render_svg(test_svg, strlen(test_svg), UG_OUT_PNG,
                                   bad_factors[_i].dpi, bad_factors[_i].scale, &out,
                                   NULL, &err), UG_ESCHEMA);
    ck_assert(strstr(err.msg, "positive number") != NULL);
}
END_TEST

static char *read_all(const char *path, size_t *len)
{
    FILE *f = fopen(path, "rb");
    ck_assert_ptr_nonnull(f);
    static char buf[1 << 16];
    *len = fread(buf, 1, sizeof buf, f);
    fclose(f);
    return buf;
}

START_TEST(test_failed_render_keeps_old_file)
{
    char dir[] = "/tmp/ugrasterXXXXXX";
    ck_assert_ptr_nonnull(mkdtemp(dir));
    char path[64];
    snprintf(path, sizeof path, "%s/chart.png", dir);
    ug_error err = {0};
    ck_assert_int_eq(ug_write_file_atomic(path, "previous", 8, &err), UG_OK);
    const char *bad = "<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"5\"";
    ck_assert_int_eq(ug_render_svg_file(bad, strlen(bad), UG_OUT_PNG, 96, 1, path,
                                        &err), UG_ERENDER);
    size_t len;
    char *got = read_all(path, &len);
    ck_assert_uint_eq(len, 8);
    ck_assert(memcmp(got, "previous", 8) == 0);
    ug_error_clear(&err);
    ck_assert_int_eq(ug_render_svg_file(test_svg, strlen(test_svg), UG_OUT_PNG, 96,
                                        1, path, &err), UG_OK);
    got = read_all(path, &len);
    ck_assert(len > 8 && memcmp(got, "\x89PNG", 4) == 0);
    unlink(path);
    rmdir(dir);
}
END_TEST

/* Every allocation our code makes may fail; each failure is reported as
** out of memory and nothing is returned. */
START_TEST(test_each_allocation_may_fail)
{
    ug_output_format fmt = _i ? UG_OUT_PDF : UG_OUT_PNG;
    bool finished = false;
    for (long n = 0; n < 200 && !finished; n++) {
        char *out = (char *)1;
        ug_error err = {0};
        ug_mem_fail_after(n);
        ug_status st = ug_render_svg(test_svg, strlen(test_svg), fmt, 96, 1, &out,
                                     NULL, &err);
        ug_mem_fail_after(-1);
        if (st == UG_OK) {
            finished = true;
            ug_free(out);
        } else {
            ck_assert_int_eq(st, UG_ENOMEM);
            ck_assert_ptr_null(out);
        }
    }
    ck_assert(finished);
}
END_TEST

/* ---- formats ------------------------------------------------------------- */

typedef struct {
    const char *path;
    ug_output_format fmt;
} path_case;

static const path_case path_cases[] = {
    {"out/chart.png", UG_OUT_PNG},    {"chart.PDF", UG_OUT_PDF},
    {"a.b/chart.html", UG_OUT_HTML},  {"chart.htm", UG_OUT_HTML},
    {"chart.svg", UG_OUT_SVG},        {"chart", UG_OUT_SVG},
    {"-", UG_OUT_SVG},                {"v1.png/chart", UG_OUT_SVG},
    {"chart.jpeg", UG_OUT_SVG},
};

START_TEST(test_format_from_path)
{
    ck_assert_int_eq(ug_output_format_from_path(path_cases[_i].path),
                     path_cases[_i].fmt);
}
END_TEST

START_TEST(test_format_names)
{
    ug_output_format f;
    for (int k = UG_OUT_SVG; k <= UG_OUT_HTML; k++) {
        ck_assert_int_eq(ug_output_format_parse(ug_output_format_name(k), &f), 0);
        ck_assert_int_eq(f, k);
    }
    ck_assert_int_eq(ug_output_format_parse("jpeg", &f), -1);
}
END_TEST

/* ---- the web page --------------------------------------------------------- */

/* Wikipedia, "Largest remainder method" (Hare quota example): 10 seats. */
static ug_dec wiki_counts[6] = {{47000000000}, {16000000000}, {15800000000},
                                {12000000000}, {6100000000}, {3100000000}};
static const long wiki_seats[6] = {5, 2, 1, 1, 1, 0};
/* Grouped: "clubs" 33, 33, 34 -> 3, 3, 4 (Tannenbaum-style course notes);
** 6100, 5000, 900 -> 5, 4, 1 (staatsrecht.honikel.de). Ten cells each. */
static ug_dec club_counts[3][2] = {{{33000000}, {6100000000}},
                                   {{33000000}, {5000000000}},
                                   {{34000000}, {900000000}}};
static const long club_seats[2][3] = {{3, 3, 4}, {5, 4, 1}};

static ug_category cats6[6], cats3[3];
static ug_text groups2[2] = {{"Spring term", {0}}, {"Autumn term", {0}}};
static const char *const labels6[6] = {"Adults", "Children", "Seniors",
                                       "Students", "Visitors <new>", "Staff & volunteers"};
static const char *const labels3[3] = {"Red", "Green", "Blue"};

static void waffle_chart(ug_chart *c, const char *title, ug_category *cats,
                         size_t n)
{
    memset(c, 0, sizeof *c);
    c->path = "test.yaml";
    c->title.text = title;
    c->unit_label.text = "households";
    c->form = UG_FORM_WAFFLE;
    c->has_cells = true;
    c->cells = 10;
    c->cats = cats;
    c->ncats = n;
    c->limits.max_icons = 100000;
}

static void make_charts(ug_chart *a, ug_chart *b)
{
    for (size_t i = 0; i < 6; i++) {
        memset(&cats6[i], 0, sizeof cats6[i]);
        cats6[i].label.text = labels6[i];
        cats6[i].counts = &wiki_counts[i];
    }
    for (size_t i = 0; i < 3; i++) {
        memset(&cats3[i], 0, sizeof cats3[i]);
        cats3[i].label.text = labels3[i];
        cats3[i].counts = club_counts[i];
    }
    waffle_chart(a, "Who the pantry served (demo data)", cats6, 6);
    a->description.text = "Ten squares; adults are half of them.";
    waffle_chart(b, "Club members by term (demo data)", cats3, 3);
    b->groups.items = groups2;
    b->groups.n = 2;
}

static int html_errors;

static void count_error(void *ctx, xmlError *e)
{
    (void)ctx;
    /* HTML 4 parsers do not know the SVG elements; everything else counts. */
    if (e->code != XML_HTML_UNKNOWN_TAG)
        html_errors++;
}

static char *xpath_text(xmlDocPtr doc, const char *expr)
{
    static char buf[512];
    return xpath_string(doc, expr, buf, sizeof buf);
}

static char *make_page(ug_allocation **allocs, size_t n, size_t *len)
{
    char *page;
    ug_error err = {0};
    ug_status st = ug_html_page(NULL, test_svg, strlen(test_svg), NULL,
                                (const ug_allocation *const *)allocs, n, &page, len,
                                &err);
    ck_assert_msg(st == UG_OK, "%s", err.msg);
    return page;
}

static void check_rows(xmlDocPtr doc, const ug_allocation *a, int table)
{
    char expr[160];
    snprintf(expr, sizeof expr, "count(//table[%d]/tbody/tr)", table);
    ck_assert_int_eq((int)xpath_number(doc, expr), (int)(a->ngroups * a->ncats));
    int col = a->chart->groups.n ? 2 : 1; /* the td holding the icons */
    for (size_t g = 0; g < a->ngroups; g++)
        for (size_t i = 0; i < a->ncats; i++) {
            int row = (int)(g * a->ncats + i) + 1;
            snprintf(expr, sizeof expr, "//table[%d]/tbody/tr[%d]/th", table, row);
            ck_assert_str_eq(xpath_text(doc, expr), a->chart->cats[i].label.text);
            snprintf(expr, sizeof expr, "number(//table[%d]/tbody/tr[%d]/td[%d])",
                     table, row, col + 1);
            ck_assert_int_eq((long)xpath_number(doc, expr), alloc_at(a, g, i)->icons);
            snprintf(expr, sizeof expr, "number(//table[%d]/tbody/tr[%d]/td[%d])",
                     table, row, col);
            ck_assert_double_eq(xpath_number(doc, expr),
                                ug_dec_to_double(alloc_at(a, g, i)->count));
        }
}

START_TEST(test_html_page)
{
    ug_chart ca, cb;
    make_charts(&ca, &cb);
    ug_allocation *allocs[2];
    ug_error err = {0};
    ck_assert_int_eq(ug_chart_allocate(&ca, &allocs[0], &err), UG_OK);
    ck_assert_int_eq(ug_chart_allocate(&cb, &allocs[1], &err), UG_OK);
    for (int i = 0; i < 6; i++)
        ck_assert_int_eq(alloc_at(allocs[0], 0, (size_t)i)->icons, wiki_seats[i]);
    for (int g = 0; g < 2; g++)
        for (int i = 0; i < 3; i++)
            ck_assert_int_eq(alloc_at(allocs[1], (size_t)g, (size_t)i)->icons,
                             club_seats[g][i]);
    size_t len;
    char *page = make_page(allocs, 2, &len);
    ck_assert(strncmp(page, "<!DOCTYPE html>", 15) == 0);
    ck_assert(strstr(page, "<?xml") == NULL); /* declaration stripped */

    /* well-formed: strictly as XML, and as HTML with no error but SVG tags */
    xmlDocPtr xml = xmlReadMemory(page, (int)len, "page.html", NULL,
                                  XML_PARSE_NONET | XML_PARSE_NOERROR);
    ck_assert_ptr_nonnull(xml);
    xmlFreeDoc(xml);
    html_errors = 0;
    xmlSetStructuredErrorFunc(NULL, count_error);
    htmlDocPtr doc = htmlReadMemory(page, (int)len, "page.html", "utf-8",
                                    HTML_PARSE_NONET);
    xmlSetStructuredErrorFunc(NULL, NULL);
    ck_assert_ptr_nonnull(doc);
    ck_assert_int_eq(html_errors, 0);

    ck_assert_str_eq(xpath_text(doc, "string(/html/@lang)"), "en");
    ck_assert_str_eq(xpath_text(doc, "//head/title"), ca.title.text);
    ck_assert_str_eq(xpath_text(doc, "//main/p"), ca.description.text);
    ck_assert_int_eq((int)xpath_number(doc, "count(//script)"), 0);
    ck_assert_int_eq((int)xpath_number(doc, "count(//*[@src])"), 0);
    ck_assert_int_eq((int)xpath_number(doc, "count(//link)"), 0);
    ck_assert_int_eq((int)xpath_number(doc, "count(//figure/svg)"), 1);
    ck_assert_int_eq((int)xpath_number(doc, "count(//table)"), 2);
    ck_assert_int_eq((int)xpath_number(doc, "count(//table/caption)"), 2);
    ck_assert_int_eq((int)xpath_number(doc, "count(//table[1]/thead//th[@scope='col'])"), 4);
    ck_assert_int_eq((int)xpath_number(doc, "count(//table[2]/thead//th[@scope='col'])"), 5);
    ck_assert(strstr(xpath_text(doc, "//table[1]/caption"),
                     "each square = 1/10 of the total households"));
    check_rows(doc, allocs[0], 1);
    check_rows(doc, allocs[1], 2);
    ck_assert_str_eq(xpath_text(doc, "//table[2]/tbody/tr[4]/td[1]"), "Autumn term");
    /* shown value of a waffle square: 1/10 of the group's total (12000) */
    ck_assert_str_eq(xpath_text(doc, "//table[2]/tbody/tr[4]/td[4]"), "6000");
    xmlFreeDoc(doc);
    ug_free(page);
    ug_allocation_free(allocs[0]);
    ug_allocation_free(allocs[1]);
}
END_TEST

/* Money in the table: the figures stay exact and the caption names the
** currency by its ISO 4217 code, which the figures alone would not say. */
START_TEST(test_html_table_names_the_currency)
{
    ug_chart ca, cb;
    make_charts(&ca, &cb);
    ca.currency.text = "EUR";
    ug_allocation *allocs[1];
    ug_error err = {0};
    ck_assert_int_eq(ug_chart_allocate(&ca, &allocs[0], &err), UG_OK);
    size_t len;
    char *page = make_page(allocs, 1, &len);
    htmlDocPtr doc = htmlReadMemory(page, (int)len, "page.html", "utf-8",
                                    HTML_PARSE_NONET | HTML_PARSE_NOERROR);
    ck_assert_ptr_nonnull(doc);
    const char *cap = xpath_text(doc, "//table[1]/caption");
    ck_assert_msg(strstr(cap, " EUR") != NULL, "%s", cap);
    check_rows(doc, allocs[0], 1);
    xmlFreeDoc(doc);
    ug_free(page);
    ug_allocation_free(allocs[0]);
}
END_TEST

START_TEST(test_html_refuses_scripts_and_non_svg)
{
    const char *bad[] = {
        "<svg xmlns=\"http://www.w3.org/2000/svg\"><script>alert(1)</script></svg>",
        "<html><svg/></html>", ""};
    for (int k = 0; k < 3; k++) {
        char *page = (char *)1;
        ug_error err = {0};
        ck_assert_int_eq(ug_html_page("t", bad[k], strlen(bad[k]), NULL, NULL, 0,
                                      &page, NULL, &err), UG_ERENDER);
        ck_assert_ptr_null(page);
    }
}
END_TEST

/* ---- files for tests/suite_raster.sh ---------------------------------------- */

/* The web page around the same picture, with the Wikipedia example's table. */
static int write_page(const char *dir)
{
    ug_chart ca, cb;
    ug_allocation *a = NULL;
    char path[4096], *page = NULL;
    size_t len;
    ug_error err = {0};
    make_charts(&ca, &cb);
    snprintf(path, sizeof path, "%s/squares.html", dir);
    if (ug_chart_allocate(&ca, &a, &err) ||
        ug_html_page(NULL, test_svg, strlen(test_svg), NULL,
                     (const ug_allocation *const *)&a, 1, &page, &len, &err) ||
        ug_write_file_atomic(path, page, len, &err))
        fprintf(stderr, "%s: %s\n", path, err.msg);
    ug_free(page);
    ug_allocation_free(a);
    return err.status ? EXIT_FAILURE : EXIT_SUCCESS;
}

static int write_files(const char *dir)
{
    static const struct {
        const char *name;
        ug_output_format fmt;
        double dpi;
    } files[] = {{"squares.png", UG_OUT_PNG, 96},
                 {"squares-300.png", UG_OUT_PNG, 300},
                 {"squares-288.png", UG_OUT_PNG, 288}, /* 3 x 96: suite_browser */
                 {"squares.pdf", UG_OUT_PDF, 96},
                 {"squares.svg", UG_OUT_SVG, 96}};
    for (size_t k = 0; k < sizeof files / sizeof files[0]; k++) {
        char path[4096];
        ug_error err = {0};
        snprintf(path, sizeof path, "%s/%s", dir, files[k].name);
        if (ug_render_svg_file(test_svg, strlen(test_svg), files[k].fmt,
                               files[k].dpi, 1, path, &err)) {
            fprintf(stderr, "%s: %s\n", path, err.msg);
            return EXIT_FAILURE;
        }
    }
    return write_page(dir);
}

static Suite *raster_suite(void)
{
    Suite *s = suite_create("raster");
    TCase *tc = tcase_create("core");
    tcase_set_timeout(tc, 60);
    tcase_add_loop_test(tc, test_png_size_and_colour_areas, 0,
                        (int)(sizeof png_cases / sizeof png_cases[0]));
    tcase_add_test(tc, test_renders_are_byte_identical);
    tcase_add_test(tc, test_png_writer_keeps_pixels);
    tcase_add_test(tc, test_pdf_page_in_points);
    tcase_add_test(tc, test_pdf_pages);
    tcase_add_test(tc, test_svg_passes_through);
    tcase_add_loop_test(tc, test_svg_size_table, 0,
                        (int)(sizeof size_cases / sizeof size_cases[0]));
    tcase_add_test(tc, test_pixel_cap);
    tcase_add_loop_test(tc, test_bad_dpi_or_scale, 0,
                        (int)(sizeof bad_factors / sizeof bad_factors[0]));
    tcase_add_test(tc, test_failed_render_keeps_old_file);
    tcase_add_loop_test(tc, test_each_allocation_may_fail, 0, 2);
    tcase_add_loop_test(tc, test_format_from_path, 0,
                        (int)(sizeof path_cases / sizeof path_cases[0]));
    tcase_add_test(tc, test_format_names);
    tcase_add_test(tc, test_html_page);
    tcase_add_test(tc, test_html_table_names_the_currency);
    tcase_add_test(tc, test_html_refuses_scripts_and_non_svg);
    suite_add_tcase(s, tc);
    return s;
}

int main(int argc, char **argv)
{
    if (argc == 3 && strcmp(argv[1], "--write") == 0)
        return write_files(argv[2]);
    return check_run(raster_suite());
}
