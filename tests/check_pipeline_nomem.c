/*
** Allocation failure: run each pipeline (charts through audit, web page and
** PNG; a handout page; a batch of rows; the glyph sheet) failing the Nth
** allocation, for every N a free run makes — once with every later
** allocation failing too, once with only the Nth failing. Each run must end
** in a clean UG_ENOMEM with a message, or succeed and make exactly what the
** free run made (so no failure is swallowed into a quietly different
** result); under the sanitized pass of `make check` LeakSanitizer proves
** that nothing leaks on any of the paths. (Failing each allocation in turn
** follows Lua's memerr tests and curl's torture mode; common practice, no
** source for the exact scheme.)
*/
#include <check.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "pipeline_run.h"
#include "check_run.h"

/* Each case is a layout named as if it lay in `dir` (relative to tests/, where
** Check binaries run), so its CSV file and glyph paths resolve there. */
typedef struct {
    const char *what, *dir, *text;
} nomem_case;

static const nomem_case cases[] = {
    {"groups, rows, inline counts", "data/good",
     "title: Pantry households (demo data)\n"
     "source: test\n"
     "unit-label: households\n"
     "form: rows\n"
     "icon-value: 10\n"
     "groups: [North, South]\n"
     "categories:\n"
     "  - {label: Adults, glyph: square, counts: [120, 85]}\n"
     "  - {label: Children, glyph: circle, counts: [64, 51.5]}\n"},
    {"wide CSV with groups", "data/good",
     "title: Library visits by ward (demo data)\n"
     "source: test\n"
     "unit-label: visits\n"
     "form: rows\n"
     "icon-value: 10\n"
     "groups: [North, \"River, east\", Hill]\n"
     "data: {file: wide.csv, group-column: ward name}\n"
     "categories:\n"
     "  - label: Adults\n"
     "  - label: Children\n"
     "  - {label: Older people, id: older}\n"},
    {"long CSV, groups from the file", "data/good",
     "title: Library visits by ward (demo data)\n"
     "source: test\n"
     "unit-label: visits\n"
     "form: rows\n"
     "icon-value: 10\n"
     "data: {file: long.csv, group-column: ward, category-column: type, "
     "count-column: n}\n"
     "categories:\n"
     "  - label: Adults\n"
     "  - {label: Children, column: kids}\n"
     "  - {label: Older people, id: older}\n"},
    {"waffle, suppression, written description", "data/good",
     "title: School meals (demo data)\n"
     "source: test\n"
     "unit-label: pupils\n"
     "form: waffle\n"
     "cells: 100\n"
     "description: Pupils by meal, a written description.\n"
     "suppress: {below: 10, label: few}\n"
     "categories:\n"
     "  - {label: Hot meal, count: 412}\n"
     "  - {label: Packed lunch, count: 287}\n"
     "  - {label: Home, count: 7}\n"},
    {"custom glyph files, partial icons", "data/glyphs",
     "title: Custom icons (demo data)\n"
     "source: test\n"
     "unit-label: boxes\n"
     "form: rows\n"
     "icon-value: 5\n"
     "rounding: partial\n"
     "categories:\n"
     "  - {label: Discs, glyph: ./shapes/disc-offset.svg, count: 23}\n"
     "  - {label: Rings, glyph: ./shapes/ring-evenodd.svg, count: 12.5}\n"
     "  - {label: Bars, glyph: ./lib-a/test-bar.svg, count: 9}\n"},
    {"glyph files that sanitizing rewrites", "data/glyphs",
     "title: Rewritten icons (demo data)\n"
     "source: test\n"
     "unit-label: boxes\n"
     "form: rows\n"
     "icon-value: 1\n"
     "categories:\n"
     "  - {label: Styled, glyph: ./hostile/style-attribute.svg, count: 3}\n"
     "  - {label: Scripted, glyph: ./hostile/onload.svg, count: 2}\n"},
    /* the phrase module's paths: catalog messages with slots, plural forms,
    ** placeholders and notes in another language, a mirrored scene */
    {"Arabic waffle with suppression and unit forms", "data/good",
     "lang: ar\n"
     "title: T (demo data)\n"
     "source: test\n"
     "unit-label: {one: \u0623\u0633\u0631\u0629, other: \u0623\u0633\u0631}\n"
     "form: waffle\n"
     "suppress: {below: 10}\n"
     "categories:\n"
     "  - {label: A, count: 1240}\n"
     "  - {label: B, count: 385}\n"
     "  - {label: C, count: 4}\n"},
};

/* What a run made, folded into one number (FNV-1a, 64 bits): a run that
** succeeds while allocations fail must make exactly what a free run makes,
** so that nothing is quietly dropped on the way. */
static uint64_t made;

static void note_made(const void *data, size_t n)
{
    const unsigned char *p = data;
    for (size_t i = 0; p && i < n; i++)
        made = (made ^ p[i]) * 0x100000001b3u;
    made = (made ^ 0xff) * 0x100000001b3u; /* ends each piece */
}

static void note_text(const char *s)
{
    note_made(s, s ? strlen(s) : 0);
}

static ug_status note_warnings(const ug_scene *scene, const ug_chart *chart, ug_error *err)
{
    ug_error *w = NULL;
    size_t n = 0;
    ug_status st = ug_scene_glyph_warnings(scene, chart, &w, &n, err);
    for (size_t i = 0; !st && i < n; i++)
        note_text(w[i].msg);
    free(w);
    return st;
}

/* After the SVG: glyph warnings, the audit, the web page and, when asked, a
** PNG. */
static ug_status outputs(const ug_chart *chart, const ug_allocation *a,
                         const ug_scene *scene, const char *svg, size_t svg_len,
                         const char *desc, bool png, ug_error *err)
{
    ug_findings *f = NULL;
    char *audit = NULL, *html = NULL, *raster = NULL;
    size_t n = 0;
    const ug_allocation *allocs[] = {a};
    note_made(svg, svg_len);
    note_text(desc);
    ug_status st = note_warnings(scene, chart, err);
    if (!st)
        st = ug_chart_audit(chart, &f, err);
    if (!st)
        st = ug_findings_format(f, UG_REPORT_JSON, &audit, NULL, err);
    if (!st)
        st = ug_html_page(NULL, svg, svg_len, desc, allocs, 1, &html, &n, err);
    if (!st)
        note_made(html, n);
    if (!st && png)
        st = ug_render_svg(svg, svg_len, UG_OUT_PNG, 96, 1, &raster, &n, err);
    if (!st && png)
        note_made(raster, n);
    note_text(audit);
    ug_free(raster);
    ug_free(html);
    ug_free(audit);
    ug_findings_free(f);
    return st;
}

static ug_status outputs_svg(const ug_chart *chart, const ug_allocation *a,
                             const ug_scene *scene, const char *svg, size_t svg_len,
                             const char *desc, ug_error *err)
{
    return outputs(chart, a, scene, svg, svg_len, desc, false, err);
}

static ug_status outputs_png(const ug_chart *chart, const ug_allocation *a,
                             const ug_scene *scene, const char *svg, size_t svg_len,
                             const char *desc, ug_error *err)
{
    return outputs(chart, a, scene, svg, svg_len, desc, true, err);
}

/* One run of the whole chain on a chart: the pipeline, then its outputs. */
static ug_status chart_chain(const nomem_case *c, bool png, ug_error *err)
{
    char name[256];
    snprintf(name, sizeof name, "%s/nomem.yaml", c->dir);
    return pipeline_run(c->text, strlen(c->text), name, NULL,
                        png ? outputs_png : outputs_svg, err);
}

/* The same for a one-page handout read from its file: the page as a web
** page (its SVG composed inside), its description and its audit. */
static ug_status page_chain(ug_error *err)
{
    ug_page *page = NULL;
    ug_findings *f = NULL;
    char *svg = NULL, *desc = NULL;
    size_t n = 0;
    memset(err, 0, sizeof *err);
    ug_status st = ug_page_load("data/page/shared.yaml", NULL, &page, err);
    if (!st)
        st = ug_page_draw(page, UG_OUT_HTML, 96, 1, &svg, &n, err);
    if (!st)
        note_made(svg, n);
    if (!st)
        st = ug_page_describe(page, &desc, &n, err);
    if (!st)
        st = ug_page_audit(page, NULL, &f, err);
    note_text(desc);
    for (size_t i = 0; !st && i < ug_findings_count(f); i++)
        note_text(ug_findings_at(f, i)->message);
    ug_findings_free(f);
    ug_free(desc);
    ug_free(svg);
    ug_page_free(page);
    return st;
}

/* One chart per CSV row (the --each-row batch): open, then every row's
** chart packed and written. */
static ug_status batch_chain(ug_error *err)
{
    ug_batch *b = NULL;
    memset(err, 0, sizeof *err);
    ug_status st = ug_batch_open("data/good/fromcsv.yaml", "data/good/wide.csv", NULL, &b,
                                 err);
    for (size_t i = 0; !st && i < ug_batch_count(b); i++) {
        const ug_chart *c = NULL;
        ug_allocation *a = NULL;
        ug_scene *scene = NULL;
        char *svg = NULL, *path = NULL;
        st = ug_batch_chart(b, i, &c, err);
        if (!st)
            st = ug_batch_path(b, i, "out/{group}.svg", &path, err);
        if (!st)
            st = ug_chart_allocate(c, &a, err);
        if (!st)
            st = ug_scene_pack(c, a, &scene, err);
        if (!st)
            st = ug_scene_svg(scene, &svg, NULL, err);
        note_text(path);
        note_text(svg);
        free(path);
        ug_free(svg);
        ug_scene_free(scene);
        ug_allocation_free(a);
    }
    ug_batch_free(b);
    return st;
}

/* The glyph library of a test folder as `unitgram glyphs` shows it: every
** glyph read, sanitized and laid out on a contact sheet. */
static ug_status sheet_chain(ug_error *err)
{
    const char *dirs[] = {"data/glyphs/lib-a"};
    ug_glyph_library *lib = NULL;
    char *svg = NULL;
    memset(err, 0, sizeof *err);
    ug_status st = ug_glyph_library_open(dirs, 1, &lib, err);
    if (!st)
        st = ug_glyph_library_sheet_svg(lib, &svg, NULL, err);
    for (size_t i = 0; !st && i < ug_glyph_library_count(lib); i++)
        note_text(ug_glyph_library_keywords(lib, i));
    note_text(svg);
    ug_free(svg);
    ug_glyph_library_free(lib);
    return st;
}

/* Which loader each file is for (ug_layout_detect): a failed allocation
** must end in UG_ENOMEM, never in a file judged the other kind. */
static ug_status kind_chain(ug_error *err)
{
    static const char *const files[] = {
        "data/kind/page_flow.yaml", "data/kind/page_bom.yaml",
        "data/kind/page_quoted.yaml", "data/kind/chart_comment.yaml",
        "data/kind/chart_title.yaml", "data/good/page.yaml", "data/good/full.yaml"};
    ug_status st = UG_OK;
    memset(err, 0, sizeof *err);
    for (size_t i = 0; !st && i < sizeof files / sizeof files[0]; i++) {
        ug_layout_kind kind = UG_LAYOUT_CHART;
        st = ug_layout_detect(files[i], NULL, &kind, err);
        note_made(&kind, sizeof kind);
    }
    return st;
}

/* Runs `chain` once freely, then once failing each allocation in turn, first
** with every later allocation failing too, then with only that one failing:
** each run fails cleanly with a message or makes exactly what the free run
** made. */
#define FAIL_EACH_ALLOCATION(what, chain)                                                \
    do {                                                                             \
        ug_error err;                                                                \
        ug_mem_fail_after(-1);                                                       \
        made = 0xcbf29ce484222325u;                                                  \
        ug_status first = (chain);                                                   \
        uint64_t want = made;                                                        \
        long total = ug_mem_fail_after(-1);                                          \
        ck_assert_msg(first == UG_OK, "%s: the case itself fails (%s)", what, err.msg); \
        ck_assert_int_gt(total, 10);                                                 \
        fprintf(stderr, "%s: %ld allocations, each failed in turn\n", what, total);  \
        for (int once = 0; once < 2; once++)                                         \
            for (long n = 0; n < total; n++) {                                       \
                (once ? ug_mem_fail_once : ug_mem_fail_after)(n);                    \
                made = 0xcbf29ce484222325u;                                          \
                ug_status st = (chain);                                              \
                ug_mem_fail_after(-1);                                               \
                ck_assert_msg(st == UG_ENOMEM || st == UG_OK,                        \
                              "%s: failing allocation %ld%s gave status %d (%s)",    \
                              what, n, once ? " alone" : "", st, err.msg);           \
                ck_assert_msg(st == UG_OK || err.msg[0], "%s: allocation %ld%s "     \
                              "failed without a message", what, n,                   \
                              once ? " alone" : "");                                 \
                ck_assert_msg(st != UG_OK || made == want, "%s: with allocation "    \
                              "%ld%s failing the run succeeded but made something "  \
                              "else", what, n, once ? " alone" : "");                \
            }                                                                        \
    } while (0)

START_TEST(test_every_allocation_failure_is_clean)
{
    const nomem_case *c = &cases[_i];
    FAIL_EACH_ALLOCATION(c->what, chart_chain(c, _i == 0, &err));
}
END_TEST

START_TEST(test_batch_allocation_failure_is_clean)
{
    FAIL_EACH_ALLOCATION("one chart per CSV row", batch_chain(&err));
}
END_TEST

START_TEST(test_sheet_allocation_failure_is_clean)
{
    FAIL_EACH_ALLOCATION("glyph contact sheet", sheet_chain(&err));
}
END_TEST

START_TEST(test_kind_allocation_failure_is_clean)
{
    FAIL_EACH_ALLOCATION("page or chart", kind_chain(&err));
}
END_TEST

START_TEST(test_page_allocation_failure_is_clean)
{
    FAIL_EACH_ALLOCATION("handout page", page_chain(&err));
}
END_TEST

int main(void)
{
    Suite *s = suite_create("nomem");
    TCase *tc = tcase_create("core");
    tcase_set_timeout(tc, 300);
    tcase_add_loop_test(tc, test_every_allocation_failure_is_clean, 0,
                        (int)(sizeof cases / sizeof cases[0]));
    tcase_add_test(tc, test_page_allocation_failure_is_clean);
    tcase_add_test(tc, test_kind_allocation_failure_is_clean);
    tcase_add_test(tc, test_batch_allocation_failure_is_clean);
    tcase_add_test(tc, test_sheet_allocation_failure_is_clean);
    suite_add_tcase(s, tc);
    return check_run(s);
}
