/* Tests for src/page.c: the panel grid of a handout and whole pages.
** Paper sizes are checked against ISO 216 (A-series, in mm) and the US sizes
** as stated in points (Letter 612 x 792 pt, Legal 612 x 1008 pt; 1 pt =
** 1/72 in, ISO 32000-1 §8.3.2.1; 1 in = 25.4 mm = 96 px, W3C CSS Values). */
#define _POSIX_C_SOURCE 200809L
#include <check.h>
#include <libxml/parser.h>
#include <libxml/xpath.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "alloc.h"

#include "page.h"
#include "xpath_check.h"
#include "check_run.h"

/* ---- whole pages: load a page file, compose it ----------------------------- */

static ug_page *load_page(const char *yaml)
{
    ug_page *p = NULL;
    ug_error err = {0};
    ug_status st = ug_page_load_string(yaml, strlen(yaml), "page.yaml", NULL, &p, &err);
    ck_assert_msg(st == UG_OK, "%s:%u:%u: %s", err.where.file, err.where.line,
                  err.where.column, err.msg);
    return p;
}

/* The page behind the last compose(): a result borrows its page's charts,
** so the page lives until done(). */
static ug_page *composed;

/* Compose; on failure return the status and leave the message in *err. */
static ug_status compose(const char *yaml, page_result *r, ug_error *err)
{
    ug_page_free(composed);
    composed = load_page(yaml);
    return page_compose(composed, NULL, r, err);
}

static void done(page_result *r)
{
    page_result_free(r);
    ug_page_free(composed);
    composed = NULL;
}

static char *page_yaml(const char *size, const char *panels)
{
    static char buf[4096];
    snprintf(buf, sizeof buf,
             "page: {size: %s, columns: 1}\ntitle: A sheet (demo data)\n"
             "panels:\n%s", size, panels);
    return buf;
}

static const char one_text[] = "  - text: Hello from the Alder Lane pantry (demo data)\n";

typedef struct {
    const char *size;
    double w, h;       /* as published */
    double per_inch;   /* the unit: 25.4 for mm, 72 for pt */
    const char *svg_w, *svg_h;
} paper_case;

static const paper_case paper_cases[] = {
    {"A5", 148, 210, 25.4, "148mm", "210mm"},  /* ISO 216 */
    {"A4", 210, 297, 25.4, "210mm", "297mm"},  /* ISO 216 */
    {"A3", 297, 420, 25.4, "297mm", "420mm"},  /* ISO 216 */
    {"letter", 612, 792, 72, "215.9mm", "279.4mm"},  /* US Letter 8.5 x 11 in */
    {"legal", 612, 1008, 72, "215.9mm", "355.6mm"},  /* US Legal 8.5 x 14 in */
};

/* The sheet in the model (px) and in the page's SVG (mm) is the published
** size; the PDF page is checked in points by tests/suite_page.sh. */
START_TEST(test_paper_sizes)
{
    const paper_case *c = &paper_cases[_i];
    ug_page *p = load_page(page_yaml(c->size, one_text));
    ck_assert_double_eq_tol(p->width / 96 * c->per_inch, c->w, 1e-9);
    ck_assert_double_eq_tol(p->height / 96 * c->per_inch, c->h, 1e-9);
    page_result r;
    ug_error err = {0};
    ck_assert_int_eq(page_compose(p, NULL, &r, &err), UG_OK);
    char want[96];
    snprintf(want, sizeof want, "width=\"%s\" height=\"%s\"", c->svg_w, c->svg_h);
    ck_assert_msg(strstr(r.svg, want), "%s not in %.300s", want, r.svg);
    page_result_free(&r);
    ug_page_free(p);
}
END_TEST

/* A4 at 96 px per inch: 210 mm = 793.7 px (CSS: 1 in = 25.4 mm = 96 px). */
START_TEST(test_mm_to_px)
{
    ck_assert_double_eq_tol(210 * PAGE_PX_PER_MM, 793.700787, 1e-6);
    ck_assert_double_eq_tol(25.4 * PAGE_PX_PER_MM, 96, 1e-12);
}
END_TEST

static page_grid grid(long columns, double bottom)
{
    page_grid g = {1000, 1400, 50, 20, columns, 100, bottom};
    return g;
}

START_TEST(test_span_widths_fill_the_content_width)
{
    for (long cols = 1; cols <= 6; cols++) {
        page_grid g = grid(cols, 1350);
        ck_assert_double_eq_tol(page_span_width(&g, cols), 900, 1e-9);
        double sum = 0;
        for (long k = 0; k < cols; k++)
            sum += page_span_width(&g, 1);
        ck_assert_double_eq_tol(sum + (double)(cols - 1) * 20, 900, 1e-9);
    }
}
END_TEST

START_TEST(test_place_rows_and_spans)
{
    page_grid g = grid(2, 1350);
    long spans[] = {1, 1, 2, 1, 2};
    double heights[] = {100, 150, 80, 60, 10};
    page_box b[5];
    double over;
    ck_assert_uint_eq(page_place(&g, spans, heights, 5, b, &over), 5);
    ck_assert_double_eq(over, 0);
    /* columns are 440 px: (1000 - 2 * 50 - 20) / 2 */
    double want[5][4] = {{50, 100, 440, 100},
                         {510, 100, 440, 150},
                         {50, 270, 900, 80},  /* 100 + 150 (tallest) + 20 */
                         {50, 370, 440, 60},
                         {50, 450, 900, 10}}; /* a span 2 cannot share a row */
    for (int i = 0; i < 5; i++) {
        ck_assert_double_eq_tol(b[i].x, want[i][0], 1e-9);
        ck_assert_double_eq_tol(b[i].y, want[i][1], 1e-9);
        ck_assert_double_eq_tol(b[i].w, want[i][2], 1e-9);
        ck_assert_double_eq_tol(b[i].h, want[i][3], 1e-9);
    }
}
END_TEST

START_TEST(test_place_reports_overflow)
{
    page_grid g = grid(2, 400);
    long spans[] = {1, 1, 2, 1, 1};
    double heights[] = {100, 150, 80, 60, 90};
    page_box b[5];
    double over;
    /* panel 3 (0-based) starts at 370 and ends at 430; panel 4 at 460: the
    ** lowest is named, with its overrun, the room the page lacks */
    ck_assert_uint_eq(page_place(&g, spans, heights, 5, b, &over), 4);
    ck_assert_double_eq_tol(over, 60, 1e-9);
    /* exactly touching the bottom fits */
    double exact[] = {100, 150, 80, 30, 30};
    ck_assert_uint_eq(page_place(&g, spans, exact, 5, b, &over), 5);
}
END_TEST


/* ---- shared scale ------------------------------------------------------------ */

static const char shared_page[] =
    "page: {size: A4, columns: 2}\n"
    "title: Two libraries on one scale (demo data)\n"
    "source: Riverside Libraries (demo data)\n"
    "shared-scale: true\n"
    "panels:\n"
    "  - chart:\n"
    "      title: North branch (demo data)\n"
    "      source: Riverside Libraries (demo data)\n"
    "      icon-value: 10\n"
    "      icon: {size: 20, gap: 4}\n"
    "      categories:\n"
    "        - {label: Adults, glyph: square, color: \"#0072B2\", count: 120}\n"
    "  - chart:\n"
    "      title: River branch (demo data)\n"
    "      source: River branch log (demo data)\n"
    "      icon-value: auto\n"
    "      categories:\n"
    "        - {label: Adults, glyph: square, color: \"#D55E00\", count: 45}\n";

static xmlDocPtr parse_svg(const page_result *r)
{
    xmlDocPtr doc = xmlReadMemory(r->svg, (int)r->len, "page.svg", NULL,
                                  XML_PARSE_NONET | XML_PARSE_NOERROR);
    ck_assert_ptr_nonnull(doc);
    return doc;
}

/* Isotype's first rule (Neurath 1936, REFERENCES.md §6): one symbol size
** for the whole picture; on a shared-scale page, for every chart. */
START_TEST(test_shared_scale_one_size_one_value)
{
    page_result r;
    ug_error err = {0};
    ck_assert_int_eq(compose(shared_page, &r, &err), UG_OK);
    ck_assert_uint_eq(r.nallocs, 2);
    char v[48];
    for (size_t i = 0; i < 2; i++) {
        ck_assert_str_eq(ug_dec_format(r.allocs[i]->rule.value, v), "10");
        ck_assert_double_eq(r.charts[i].icon_size, 20);
    }
    ck_assert_int_eq(r.allocs[1]->group_icons[0], 5); /* round-half-up(45 / 10) */
    xmlDocPtr doc = parse_svg(&r);
    char a[64], b[64];
    xpath_string(doc, "string(//*[@id='p1-u-0']/@width)", a, sizeof a);
    xpath_string(doc, "string(//*[@id='p2-u-0']/@width)", b, sizeof b);
    ck_assert_str_eq(a, "20");
    ck_assert_str_eq(b, a);
    xmlFreeDoc(doc);
    done(&r);
}
END_TEST

/* Without a stated value the page takes the largest any chart would choose
** for itself, so every chart still fits its line. */
START_TEST(test_shared_scale_auto_takes_the_largest)
{
    char yaml[2048];
    snprintf(yaml, sizeof yaml, "%s", shared_page);
    char *stated = strstr(yaml, "icon-value: 10");
    memmove(stated + 16, stated + 14, strlen(stated + 14) + 1);
    memcpy(stated, "icon-value: auto", 16);
    page_result r;
    ug_error err = {0};
    ck_assert_int_eq(compose(yaml, &r, &err), UG_OK);
    ug_dec own[2];
    for (size_t i = 0; i < 2; i++) {
        ug_chart probe = r.charts[i];
        probe.icon_value_auto = true;
        alloc_rule rule;
        ck_assert_int_eq(alloc_rule_for_chart(&probe, &rule, &err), UG_OK);
        own[i] = rule.value;
    }
    ug_dec want = own[0].v > own[1].v ? own[0] : own[1];
    ck_assert(own[0].v != own[1].v); /* 120 and 45 choose different values */
    for (size_t i = 0; i < 2; i++)
        ck_assert(r.allocs[i]->rule.value.v == want.v);
    done(&r);
}
END_TEST

START_TEST(test_shared_scale_conflict_names_both_places)
{
    char yaml[2048];
    snprintf(yaml, sizeof yaml, "%s", shared_page);
    char *autov = strstr(yaml, "icon-value: auto");
    memcpy(autov, "icon-value: 20  ", 16);
    ug_page *p = NULL;
    ug_error err = {0};
    ck_assert_int_eq(ug_page_load_string(yaml, strlen(yaml), "page.yaml", NULL, &p,
                                         &err), UG_ESCHEMA);
    ck_assert_uint_eq(err.where.line, 16); /* the second chart's icon-value */
    ck_assert_msg(strstr(err.msg, "20") && strstr(err.msg, "10") &&
                  strstr(err.msg, "page.yaml:9"), "%s", err.msg);
}
END_TEST

START_TEST(test_shared_scale_refuses_cells)
{
    char yaml[2048];
    snprintf(yaml, sizeof yaml, "%s%s", shared_page,
             "  - chart:\n"
             "      title: A waffle (demo data)\n"
             "      form: waffle\n"
             "      cells: 100\n"
             "      categories:\n"
             "        - {label: Adults, color: \"#009E73\", count: 7}\n");
    page_result r;
    ug_error err = {0};
    ck_assert_int_eq(compose(yaml, &r, &err), UG_ESCHEMA);
    ck_assert_uint_eq(err.where.line, 22);
    ck_assert(strstr(err.msg, "state icon-value instead of cells") != NULL);
    done(&r);
}
END_TEST

/* ---- fitting ------------------------------------------------------------------ */

static const char tall_chart[] =
    "  - chart:\n"
    "      title: Every household, one icon each (demo data)\n"
    "      icon-value: 1\n"
    "      columns: 12\n"
    "      icon: {size: 20, gap: 4}\n"
    "      categories:\n"
    "        - {label: Households, glyph: square, color: \"#0072B2\", count: 900}\n";

/* 900 icons, 12 a line at 24 px: nearly two metres of chart on an A5 sheet. */
START_TEST(test_overflow_names_panel_and_amount)
{
    page_result r;
    ug_error err = {0};
    ck_assert_int_eq(compose(page_yaml("A5", tall_chart), &r, &err), UG_ELIMIT);
    ck_assert_uint_eq(err.where.line, 4);
    ck_assert_msg(strstr(err.msg, "panel 1 (inline chart)") &&
                  strstr(err.msg, "mm more") && strstr(err.msg, "even with every panel shrunk"),
                  "%s", err.msg);
    ck_assert_ptr_null(r.svg);
    done(&r);
}
END_TEST

START_TEST(test_taller_sheet_fits)
{
    page_result r;
    ug_error err = {0};
    ck_assert_msg(compose(page_yaml("\"148mm x 2500mm\"", tall_chart), &r, &err) == UG_OK,
                  "%s", err.msg);
    ck_assert_ptr_nonnull(r.svg);
    done(&r);
}
END_TEST

START_TEST(test_too_narrow_column)
{
    char yaml[2048];
    snprintf(yaml, sizeof yaml,
             "page: {size: A5, columns: 6}\ntitle: Narrow (demo data)\npanels:\n"
             "  - chart:\n"
             "      title: A wide waffle (demo data)\n"
             "      form: waffle\n"
             "      columns: 10\n"
             "      icon: {size: 24, gap: 4}\n"
             "      categories:\n"
             "        - {label: Adults, color: \"#009E73\", count: 7}\n");
    page_result r;
    ug_error err = {0};
    ck_assert_int_eq(compose(yaml, &r, &err), UG_ELIMIT);
    ck_assert_msg(strstr(err.msg, "mm of width but its column is"), "%s", err.msg);
    done(&r);
}
END_TEST

/* Two charts of the same thing at the same stated size, each 150 icons at
** 12 a line of 20 px: about 680 px of icons against an A5 sheet's 700 px of
** room, so neither fits at its stated size beside the other. */
static const char two_charts[] =
    "  - chart:\n"
    "      title: North households (demo data)\n"
    "      unit-label: households\n"
    "      icon-value: 1\n"
    "      columns: 12\n"
    "      icon: {size: 20, gap: 4}\n"
    "      categories:\n"
    "        - {label: Households, glyph: square, color: \"#0072B2\", count: 150}\n"
    "  - chart:\n"
    "      title: South households (demo data)\n"
    "      unit-label: households\n"
    "      icon-value: 1\n"
    "      columns: 12\n"
    "      icon: {size: 20, gap: 4}\n"
    "      categories:\n"
    "        - {label: Households, glyph: square, color: \"#D55E00\", count: 150}\n";

/* Shrunk to fit: one factor for both, whole-pixel icons no smaller than the
** floor, text no smaller than 7 pt, the sheet's content inside its room. */
START_TEST(test_shrinks_to_fit_alike)
{
    page_result r;
    ug_error err = {0};
    ck_assert_msg(compose(page_yaml("A5", two_charts), &r, &err) == UG_OK, "%s", err.msg);
    ck_assert(r.fit < 1 && r.fit > 0);
    ck_assert_double_eq(r.charts[0].icon_size, r.charts[1].icon_size);
    ck_assert_double_eq(r.charts[0].icon_size, floor(r.charts[0].icon_size));
    ck_assert(r.charts[0].icon_size < 20 && r.charts[0].icon_size >= 8);
    for (size_t t = 0; t < UG_TYPE_COUNT; t++)
        ck_assert(r.charts[0].style.type[t] >= 7 * 96.0 / 72 - 1e-9);
    done(&r);
}
END_TEST

static double at_least_7pt(double px) { return fmax(px, 7 * 96.0 / 72); }

/* The factor is the first step that fits: at the step before it the same
** sizes, stated and not shrunk, do not fit. */
START_TEST(test_fit_is_the_largest_step)
{
    page_result r;
    ug_error err = {0};
    ck_assert_msg(compose(page_yaml("A5", two_charts), &r, &err) == UG_OK, "%s", err.msg);
    double before = r.fit + 0.05, icon = floor(20 * before), gap = round(4 * icon / 20);
    done(&r);
    char panels[2048], yaml[4096], size[64];
    snprintf(size, sizeof size, "{size: %g, gap: %g}", icon, gap);
    snprintf(panels, sizeof panels, "%s", two_charts);
    for (char *at; (at = strstr(panels, "{size: 20, gap: 4}"));) {
        memmove(at + strlen(size), at + 18, strlen(at + 18) + 1);
        memcpy(at, size, strlen(size));
    }
    /* the text at that step too: a page type scale of the stated sizes times it */
    snprintf(yaml, sizeof yaml,
             "page: {size: A5, columns: 1}\ntitle: A sheet (demo data)\n"
             "fit: {shrink: false}\n"
             "type: {title: %g, panel-title: %g, subtitle: %g, text: %g, label: %g, "
             "note: %g, source: %g}\npanels:\n%s",
             at_least_7pt(26 * before), at_least_7pt(18 * before),
             at_least_7pt(14 * before), at_least_7pt(14 * before),
             at_least_7pt(13 * before), at_least_7pt(11 * before),
             at_least_7pt(11 * before), panels);
    ck_assert_int_eq(compose(yaml, &r, &err), UG_ELIMIT);
    ck_assert_msg(strstr(err.msg, "fitting is off"), "%s", err.msg);
    done(&r);
}
END_TEST

START_TEST(test_no_shrink_says_so)
{
    char yaml[4096];
    snprintf(yaml, sizeof yaml, "page: {size: A5}\ntitle: T (demo data)\n"
                                "fit: {shrink: false}\npanels:\n%s", two_charts);
    page_result r;
    ug_error err = {0};
    ck_assert_int_eq(compose(yaml, &r, &err), UG_ELIMIT);
    ck_assert_msg(strstr(err.msg, "panel 2") && strstr(err.msg, "fitting is off"), "%s",
                  err.msg);
    done(&r);
}
END_TEST

/* A panel's own icon and columns reach its chart; the page's type scale
** reaches charts that state none, and not one that states its own. */
START_TEST(test_panel_overrides_and_type)
{
    const char *yaml =
        "page: {size: A4}\ntitle: T (demo data)\n"
        "type: {title: 24, panel-title: 16, subtitle: 13, text: 13, label: 12, note: 10, "
        "source: 10}\n"
        "panels:\n"
        "  - icon: {size: 9, gap: 1}\n"
        "    columns: 7\n"
        "    chart:\n"
        "      title: A (demo data)\n"
        "      icon-value: 10\n"
        "      icon: {size: 20, gap: 4}\n"
        "      categories:\n"
        "        - {label: Households, color: \"#0072B2\", count: 40}\n"
        "  - chart:\n"
        "      title: B (demo data)\n"
        "      icon-value: 10\n"
        "      style: {type: {title: 20, subtitle: 15, label: 14, note: 12}}\n"
        "      categories:\n"
        "        - {label: Households, color: \"#0072B2\", count: 40}\n";
    page_result r;
    ug_error err = {0};
    ck_assert_msg(compose(yaml, &r, &err) == UG_OK, "%s", err.msg);
    ck_assert(r.fit == 1);
    ck_assert_double_eq(r.charts[0].icon_size, 9);
    ck_assert_double_eq(r.charts[0].icon_gap, 1);
    ck_assert_int_eq(r.charts[0].columns, 7);
    ck_assert_double_eq(r.charts[0].style.type[UG_TYPE_TITLE], 16);
    ck_assert_double_eq(r.charts[0].style.type[UG_TYPE_NOTE], 10);
    ck_assert_double_eq(r.charts[1].style.type[UG_TYPE_TITLE], 20);
    ck_assert(strstr(r.svg, "font-size=\"24\"") != NULL); /* the page title */
    done(&r);
}
END_TEST

static void load_fails(const char *yaml, unsigned line, const char *says)
{
    ug_page *p = NULL;
    ug_error err = {0};
    ck_assert(ug_page_load_string(yaml, strlen(yaml), "page.yaml", NULL, &p, &err));
    ck_assert_msg(err.where.line == line && strstr(err.msg, says), "%u: %s",
                  err.where.line, err.msg);
    ck_assert_ptr_null(p);
}

START_TEST(test_type_scale_and_fit_errors)
{
    load_fails("page: {size: A4}\ntype: {title: 12, panel-title: 18}\npanels:\n"
               "  - text: x\n", 2, "runs from largest to smallest");
    load_fails("page: {size: A4}\ntype: {note: 4pt}\npanels:\n  - text: x\n", 2,
               "legible minimum");
    load_fails("page: {size: A4}\nfit: {min-text: 14}\npanels:\n  - text: x\n", 2,
               "shrinking could only make text larger");
    load_fails("page: {size: A4}\npanels:\n  - text: x\n    icon: {size: 9}\n", 4,
               "this panel holds text");
    load_fails("page: {size: A4}\nfit: {shrnk: false}\npanels:\n  - text: x\n", 2,
               "shrink");
}
END_TEST

/* ---- the page's SVG --------------------------------------------------------------- */

/* Every attribute value in the set (after `skip` characters) is the id of
** exactly one element. */
static void each_once(xmlDocPtr doc, xmlXPathObjectPtr set, int skip)
{
    for (int i = 0; i < set->nodesetval->nodeNr; i++) {
        xmlChar *v = xmlNodeGetContent(set->nodesetval->nodeTab[i]);
        char expr[256];
        snprintf(expr, sizeof expr, "count(//@id[. = '%s'])", (const char *)v + skip);
        ck_assert_msg(xpath_number(doc, expr) == 1, "'%s': not exactly one element",
                      (const char *)v);
        xmlFree(v);
    }
}

/* Two charts with the same glyphs and category ids: every id on the page is
** unique and every local reference finds its target. */
START_TEST(test_ids_unique_and_references_resolve)
{
    page_result r;
    ug_error err = {0};
    ck_assert_int_eq(compose(shared_page, &r, &err), UG_OK);
    xmlDocPtr doc = parse_svg(&r);
    xmlXPathContextPtr ctx = xmlXPathNewContext(doc);
    xmlXPathObjectPtr ids = xmlXPathEvalExpression((const xmlChar *)"//@id", ctx);
    xmlXPathObjectPtr refs = xmlXPathEvalExpression(
        (const xmlChar *)"//@href[starts-with(., '#')]", ctx);
    ck_assert_int_gt(ids->nodesetval->nodeNr, 6);
    ck_assert_int_gt(refs->nodesetval->nodeNr, 0);
    each_once(doc, ids, 0);
    each_once(doc, refs, 1); /* skip the '#' */
    xmlXPathFreeObject(refs);
    xmlXPathFreeObject(ids);
    xmlXPathFreeContext(ctx);
    xmlFreeDoc(doc);
    done(&r);
}
END_TEST

/* Sources: the page's first, then each chart's, each once; not in the charts. */
START_TEST(test_sources_collected_once_at_the_foot)
{
    page_result r;
    ug_error err = {0};
    ck_assert_int_eq(compose(shared_page, &r, &err), UG_OK);
    const char *first = strstr(r.svg, "Source: Riverside Libraries (demo data)");
    const char *second = strstr(r.svg, "Source: River branch log (demo data)");
    ck_assert_ptr_nonnull(first);
    ck_assert_ptr_nonnull(second);
    ck_assert(first < second);
    ck_assert_ptr_null(strstr(first + 9, "Riverside Libraries (demo data)"));
    done(&r);
}
END_TEST

/* A page in another language says "Source:" in it (the catalog's word) and
** states its language on the sheet; its charts' sources join its own. */
START_TEST(test_sources_in_the_page_language)
{
    static const char page_de[] =
        "page: {size: A4}\nlang: de\ntitle: Seite\nsource: Quelle A (demo data)\n"
        "panels:\n  - text: Ein kurzer Text.\n"
        "  - chart: {title: B, unit-label: Personen, icon-value: 1, source: Quelle B,\n"
        "            categories: [{label: A, count: 12}]}\n";
    page_result r;
    ug_error err = {0};
    ck_assert_int_eq(compose(page_de, &r, &err), UG_OK);
    ck_assert_ptr_nonnull(strstr(r.svg, ">Quelle: Quelle A (demo data)<"));
    ck_assert_ptr_nonnull(strstr(r.svg, ">Quelle: Quelle B<"));
    ck_assert_ptr_null(strstr(r.svg, "Source:"));
    ck_assert_ptr_nonnull(strstr(r.svg, "xml:lang=\"de\""));
    done(&r);
}
END_TEST

/* A text block: single line breaks are where the file wrapped; blank lines
** separate paragraphs. */
START_TEST(test_text_block_paragraphs)
{
    const char *panels = "  - text: \"one\\ntwo\\n\\nthree\"\n";
    page_result r;
    ug_error err = {0};
    ck_assert_int_eq(compose(page_yaml("A4", panels), &r, &err), UG_OK);
    ck_assert_ptr_nonnull(strstr(r.svg, ">one two</text>"));
    ck_assert_ptr_nonnull(strstr(r.svg, ">three</text>"));
    done(&r);
}
END_TEST

/* The web page of a handout: one table per chart, rows as allocated. */
START_TEST(test_handout_web_page)
{
    ug_page *p = load_page(shared_page);
    char *html = NULL;
    size_t len;
    ug_error err = {0};
    ck_assert_int_eq(ug_page_draw(p, UG_OUT_HTML, 96, 1, &html, &len, &err), UG_OK);
    ck_assert_int_eq(strstr(html, "<table>") != NULL, 1);
    ck_assert_ptr_nonnull(strstr(strstr(html, "<table>") + 1, "<table>"));
    ck_assert_ptr_nonnull(strstr(html, "<td>120</td><td>12</td><td>120</td>"));
    ck_assert_ptr_nonnull(strstr(html, "<td>45</td><td>5</td><td>50</td>"));
    ck_assert_ptr_null(strstr(html, "<script"));
    ug_free(html);
    ug_page_free(p);
}
END_TEST

/* Counting allocator: every block asked for, so two ways of doing the same
** work can be compared by how much they allocate. */
static size_t blocks_asked;

static void *counting_alloc(void *ud, void *ptr, size_t n)
{
    (void)ud;
    if (n == 0) {
        free(ptr);
        return NULL;
    }
    blocks_asked++;
    return realloc(ptr, n);
}

static char *findings_text(const ug_findings *f)
{
    char *t = NULL;
    size_t n;
    ug_error err = {0};
    ck_assert_int_eq(ug_findings_format(f, UG_REPORT_TEXT, &t, &n, &err), UG_OK);
    return t;
}

/* A page composed once draws and audits exactly as the one-call functions
** do, the audit leaves it as it was (a second draw is byte-identical), and
** drawing and auditing from one composition allocates less than composing
** for each (each panel is allocated and packed once). */
START_TEST(test_composed_once_draws_and_audits_the_same)
{
    const char *roots[] = {"../glyphs"};
    ug_context_options o = {.size = sizeof o, .alloc = counting_alloc,
                            .glyph_roots = roots, .nglyph_roots = 1};
    ug_context *ctx = NULL, *was;
    ug_error err = {0};
    ck_assert_int_eq(ug_context_new(&o, &ctx, &err), UG_OK);
    was = ug_context_use(ctx);
    ug_page *p = load_page(shared_page);
    char *one = NULL, *two = NULL, *again = NULL;
    size_t n1, n2, n3;
    ug_findings *f1 = NULL, *f2 = NULL;
    ug_composed_page *cp = NULL;

    blocks_asked = 0;
    ck_assert_int_eq(ug_page_draw_with(p, NULL, UG_OUT_HTML, 96, 1, &one, &n1, &err), UG_OK);
    ck_assert_int_eq(ug_page_audit(p, NULL, &f1, &err), UG_OK);
    size_t separately = blocks_asked;

    blocks_asked = 0;
    ck_assert_int_eq(ug_page_compose(p, NULL, &cp, &err), UG_OK);
    ck_assert_int_eq(ug_composed_page_draw(cp, UG_OUT_HTML, 96, 1, &two, &n2, &err), UG_OK);
    ck_assert_int_eq(ug_composed_page_audit(cp, &f2, &err), UG_OK);
    size_t once = blocks_asked;
    ck_assert_int_eq(ug_composed_page_draw(cp, UG_OUT_HTML, 96, 1, &again, &n3, &err), UG_OK);

    ck_assert_uint_eq(n1, n2);
    ck_assert_int_eq(memcmp(one, two, n1), 0);
    ck_assert_uint_eq(n2, n3);
    ck_assert_int_eq(memcmp(two, again, n2), 0);
    char *t1 = findings_text(f1), *t2 = findings_text(f2);
    ck_assert_str_eq(t1, t2);
    ck_assert_msg(once < separately, "%zu blocks composed once, %zu composing twice", once,
                  separately);
    ug_free(t1);
    ug_free(t2);
    ug_findings_free(f1);
    ug_findings_free(f2);
    ug_free(one);
    ug_free(two);
    ug_free(again);
    ug_composed_page_free(cp);
    ug_page_free(p);
    ug_context_use(was);
    ug_context_free(ctx);
}
END_TEST

static Suite *page_suite(void)
{
    Suite *s = suite_create("page");
    TCase *tc = tcase_create("geometry");
    tcase_add_test(tc, test_mm_to_px);
    tcase_add_test(tc, test_span_widths_fill_the_content_width);
    tcase_add_test(tc, test_place_rows_and_spans);
    tcase_add_test(tc, test_place_reports_overflow);
    suite_add_tcase(s, tc);
    TCase *tp = tcase_create("pages");
    tcase_set_timeout(tp, 60);
    tcase_add_loop_test(tp, test_paper_sizes, 0,
                        (int)(sizeof paper_cases / sizeof paper_cases[0]));
    tcase_add_test(tp, test_shared_scale_one_size_one_value);
    tcase_add_test(tp, test_shared_scale_auto_takes_the_largest);
    tcase_add_test(tp, test_shared_scale_conflict_names_both_places);
    tcase_add_test(tp, test_shared_scale_refuses_cells);
    tcase_add_test(tp, test_overflow_names_panel_and_amount);
    tcase_add_test(tp, test_taller_sheet_fits);
    tcase_add_test(tp, test_too_narrow_column);
    tcase_add_test(tp, test_shrinks_to_fit_alike);
    tcase_add_test(tp, test_fit_is_the_largest_step);
    tcase_add_test(tp, test_no_shrink_says_so);
    tcase_add_test(tp, test_composed_once_draws_and_audits_the_same);
    tcase_add_test(tp, test_panel_overrides_and_type);
    tcase_add_test(tp, test_type_scale_and_fit_errors);
    tcase_add_test(tp, test_ids_unique_and_references_resolve);
    tcase_add_test(tp, test_sources_collected_once_at_the_foot);
    tcase_add_test(tp, test_sources_in_the_page_language);
    tcase_add_test(tp, test_text_block_paragraphs);
    tcase_add_test(tp, test_handout_web_page);
    suite_add_tcase(s, tp);
    return s;
}

int main(void)
{
    return check_run(page_suite());
}
