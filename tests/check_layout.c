/* Tests for src/layout.c: chart and page files -> the model of model.h.
** Run from tests/, so files are data/good/... */
#define _POSIX_C_SOURCE 200809L
#include <check.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#include "model.h"
#include "check_run.h"

static ug_chart *load_ok(const char *path)
{
    ug_error err = {0};
    ug_chart *c = NULL;
    ug_status st = ug_chart_load(path, NULL, &c, &err);
    char buf[2048];
    ck_assert_msg(st == UG_OK, "%s", ug_error_format(&err, buf, sizeof buf));
    return c;
}

static unsigned long rgb_of(const ug_color *c)
{
    return (unsigned long)c->r << 16 | (unsigned long)c->g << 8 | c->b;
}

static void assert_dec(ug_dec d, const char *want)
{
    char buf[48];
    ck_assert_str_eq(ug_dec_format(d, buf), want);
}

/* ---- good charts, table-driven ------------------------------------------ */

typedef struct {
    const char *file;
    ug_form form;
    size_t ncats, ngroups;
    bool has_icon_value, icon_value_auto;
    const char *icon_value;  /* NULL: not stated */
    bool has_cells;
    long cells, columns, cluster;
    ug_method method;
    ug_rounding rounding;
    const char *first_id, *last_id;
    const char *count_1_1;   /* second category, second group (or only) */
    unsigned count_1_1_line, count_1_1_col;
    const char *count_file_suffix; /* where that count came from */
} chart_case;

static const chart_case charts[] = {
    {"data/good/inline.yaml", UG_FORM_ROWS, 3, 3, true, false, "10", false, 100, 0, 5,
     UG_METHOD_LARGEST_REMAINDER, UG_ROUND_WHOLE, "adults", "older", "51.5", 11, 18,
     "inline.yaml"},
    /* wide.csv: BOM, semicolons, CRLF; "51.5" is record line 3, field 3 */
    {"data/good/fromcsv.yaml", UG_FORM_ROWS, 3, 3, true, false, "10", false, 100, 0,
     5, UG_METHOD_LARGEST_REMAINDER, UG_ROUND_WHOLE, "adults", "older", "51.5", 3, 3,
     "wide.csv"},
    /* long.csv: groups from the file in order; River/kids is line 6, field 3 */
    {"data/good/fromlong.yaml", UG_FORM_ROWS, 3, 3, true, false, "10", false, 100, 0,
     5, UG_METHOD_LARGEST_REMAINDER, UG_ROUND_WHOLE, "adults", "older", "51.5", 6, 3,
     "long.csv"},
    {"data/good/full.yaml", UG_FORM_ROWS, 3, 2, true, true, NULL, false, 100, 25, 0,
     UG_METHOD_SAINTE_LAGUE, UG_ROUND_PARTIAL, "grown-ups", "ninos-y-ninas", "4", 30,
     17, "full.yaml"},
    {"data/good/minimal.yaml", UG_FORM_WAFFLE, 2, 0, false, false, NULL, false, 100, 0,
     0, UG_METHOD_LARGEST_REMAINDER, UG_ROUND_WHOLE, "only", "other", "1", 5, 12,
     "minimal.yaml"},
};

/* One ug_error reused across calls: each call clears it, so the second
** failure's message is the one left, and a success leaves it clear. */
START_TEST(test_error_reused)
{
    ug_error err = {0};
    ug_chart *c = NULL;
    const char *first = "title: [\n";
    const char *second = "title: t\ncolour: red\ncategories: [{label: A, count: 1}]\n";
    const char *good = "title: t\nsource: s\nunit-label: u\nicon-value: 1\n"
                       "categories: [{label: A, count: 1}]\n";
    ck_assert_int_ne(ug_chart_load_string(first, strlen(first), "first.yaml", NULL, &c, &err),
                     UG_OK);
    ck_assert_str_eq(err.where.file, "first.yaml");
    ck_assert_int_ne(ug_chart_load_string(second, strlen(second), "second.yaml", NULL, &c,
                                          &err), UG_OK);
    ck_assert_str_eq(err.where.file, "second.yaml");
    ck_assert_int_eq(err.where.line, 2);
    ck_assert_int_eq(ug_chart_load_string(good, strlen(good), "good.yaml", NULL, &c, &err),
                     UG_OK);
    ck_assert_int_eq(err.status, UG_OK);
    ck_assert_str_eq(err.msg, "");
    ug_chart_free(c);
}
END_TEST

START_TEST(test_good_charts)
{
    const chart_case *t = &charts[_i];
    ug_chart *c = load_ok(t->file);
    ck_assert_int_eq(c->form, t->form);
    ck_assert_uint_eq(c->ncats, t->ncats);
    ck_assert_uint_eq(c->groups.n, t->ngroups);
    ck_assert_int_eq(c->has_icon_value, t->has_icon_value);
    ck_assert_int_eq(c->icon_value_auto, t->icon_value_auto);
    if (t->icon_value)
        assert_dec(c->icon_value, t->icon_value);
    ck_assert_int_eq(c->has_cells, t->has_cells);
    ck_assert_int_eq(c->cells, t->cells);
    ck_assert_int_eq(c->columns, t->columns);
    ck_assert_int_eq(c->cluster, t->cluster);
    ck_assert_int_eq(c->method, t->method);
    ck_assert_int_eq(c->rounding, t->rounding);
    ck_assert_str_eq(c->cats[0].id, t->first_id);
    ck_assert_str_eq(c->cats[t->ncats - 1].id, t->last_id);
    size_t g = t->ngroups > 1 ? 1 : 0;
    assert_dec(c->cats[1].counts[g], t->count_1_1);
    ug_mark m = c->cats[1].count_marks[g];
    ck_assert_uint_eq(m.line, t->count_1_1_line);
    ck_assert_uint_eq(m.column, t->count_1_1_col);
    size_t n = strlen(m.file), k = strlen(t->count_file_suffix);
    ck_assert(n >= k && !strcmp(m.file + n - k, t->count_file_suffix));
    for (size_t i = 0; i < c->ncats; i++)
        ck_assert(c->cats[i].color.set);
    ug_chart_free(c);
}
END_TEST

/* The groups of inline.yaml, of wide.csv (matched to the layout's order) and
** of long.csv (taken from the file) are the same three, in the same order. */
START_TEST(test_groups_agree)
{
    static const char *const files[] = {"data/good/inline.yaml",
                                        "data/good/fromcsv.yaml",
                                        "data/good/fromlong.yaml"};
    static const char *const names[] = {"North", "River, east", "Hill"};
    for (size_t f = 0; f < 3; f++) {
        ug_chart *c = load_ok(files[f]);
        for (size_t g = 0; g < 3; g++)
            ck_assert_str_eq(c->groups.items[g].text, names[g]);
        ug_chart_free(c);
    }
}
END_TEST

/* Every key of full.yaml lands in its field. Lengths: W3C CSS Values and
** Units Level 3, §6.2 absolute lengths: 1in = 96px = 2.54cm, 1pt = 1/72in. */
START_TEST(test_full_chart)
{
    ug_chart *c = load_ok("data/good/full.yaml");
    ck_assert_str_eq(c->title.text, "Full chart");
    ck_assert_uint_eq(c->title.mark.line, 2);
    ck_assert_uint_eq(c->title.mark.column, 8);
    ck_assert_str_eq(c->subtitle.text, "Every key");
    ck_assert_uint_eq(c->source.n, 2);
    ck_assert_str_eq(c->source.items[1].text, "Second source");
    ck_assert_uint_eq(c->notes.n, 2);
    ck_assert_str_eq(c->description.text, "Two lines\nof description.\n");
    ck_assert_str_eq(c->unit_label.text, "people");
    ck_assert(fabs(c->icon_size - 12 * 96 / 25.4) < 1e-9);
    ck_assert(fabs(c->icon_gap - 48) < 1e-9);
    ck_assert(fabs(c->style.width - 960) < 1e-9);
    ck_assert_int_eq(c->arrangement, UG_ARRANGE_SPLIT);
    ck_assert_str_eq(c->cats[0].label.text, "Adults");
    ck_assert_str_eq(c->cats[0].glyph.text, "person");
    ck_assert_str_eq(c->cats[0].note.text, "Over 18");
    ck_assert_str_eq(c->cats[0].column.text, "grown-ups");
    ck_assert(c->cats[0].color_given);
    ck_assert_uint_eq(rgb_of(&c->cats[0].color), 0x0072B2);
    ck_assert_str_eq(c->cats[1].id, "small-children");
    ck_assert_str_eq(c->cats[1].column.text, "kids");
    ck_assert_str_eq(c->cats[1].glyph.text, "./icons/boat.svg");
    /* the one category without a colour takes Tol's muted palette first:
    ** #CC6677 (Paul Tol, "Colour Schemes", SRON/EPS/TN/09-002, 2021) */
    ck_assert(!c->cats[1].color_given);
    ck_assert_uint_eq(rgb_of(&c->cats[1].color), 0xCC6677);
    /* rebeccapurple: CSS Color Module Level 4 §6.1 */
    ck_assert_uint_eq(rgb_of(&c->cats[2].color), 0x663399);
    assert_dec(c->cats[0].counts[0], "10.5");
    ck_assert(c->has_total);
    assert_dec(c->total, "38.5");
    ck_assert(c->has_suppress);
    assert_dec(c->suppress_below, "5");
    ck_assert_str_eq(c->suppress_label.text, "few");
    ck_assert(c->audit.has_tolerance && c->audit.has_small_count);
    assert_dec(c->audit.tolerance_percent, "12.5");
    assert_dec(c->audit.small_count, "7");
    ck_assert_uint_eq(c->audit.ignore.n, 1);
    ck_assert_str_eq(c->audit.ignore.items[0].text, "rounding");
    ck_assert_str_eq(c->style.font, "DejaVu Serif");
    ck_assert_uint_eq(rgb_of(&c->style.background), 0xFFFFFF);
    ck_assert_uint_eq(rgb_of(&c->style.ink), 0x000000);
    ck_assert_int_eq(c->style.palette, UG_PALETTE_TOL_MUTED);
    ck_assert_str_eq(c->dir, "data/good");
    ug_chart_free(c);
}
END_TEST

/* What a layout leaves out. The palette order is Okabe & Ito, "Color
** Universal Design" (2008), black skipped: #E69F00 then #56B4E9. */
START_TEST(test_defaults)
{
    ug_chart *c = load_ok("data/good/minimal.yaml");
    ck_assert_ptr_null(c->title.text);
    ck_assert_uint_eq(c->source.n, 0);
    ck_assert(fabs(c->icon_size - 24) < 1e-9 && fabs(c->icon_gap - 4) < 1e-9);
    ck_assert(c->style.width == 0); /* not given: the packer's 800 px */
    ck_assert_str_eq(c->style.font, "DejaVu Sans");
    ck_assert_uint_eq(rgb_of(&c->style.background), 0xFFFFFF);
    ck_assert_uint_eq(rgb_of(&c->style.ink), 0x222222);
    ck_assert_int_eq(c->fill, UG_FILL_BY_ROW);
    ck_assert_int_eq(c->start, UG_START_TOP_LEFT);
    ck_assert_int_eq(c->arrangement, UG_ARRANGE_INLINE);
    ck_assert(!c->has_total && !c->has_suppress && !c->data.present);
    ck_assert(!c->audit.has_tolerance);
    assert_dec(c->audit.tolerance_percent, "10");
    assert_dec(c->audit.small_count, "10");
    /* Okabe-Ito colours reaching 3:1 on white (WCAG 2.1 SC 1.4.11) come
    ** first: bluish green 3.42:1, then blue 5.19:1; orange (2.25:1) later. */
    ck_assert_uint_eq(rgb_of(&c->cats[0].color), 0x009E73);
    ck_assert_uint_eq(rgb_of(&c->cats[1].color), 0x0072B2);
    ck_assert_uint_eq(c->limits.max_file_bytes, UG_DEFAULT_MAX_FILE);
    ck_assert_uint_eq(c->limits.max_icons, UG_DEFAULT_MAX_ICONS);
    ug_chart_free(c);
}
END_TEST

/* ---- layouts given as strings: marks and messages ----------------------- */

typedef struct {
    const char *text;
    ug_status status;
    unsigned line, column;
    const char *msg; /* a part of the message */
} string_case;

#define ROWS "form: rows\nicon-value: 10\n"
#define CAT "categories:\n  - label: A\n    count: 4\n"

static const string_case strings[] = {
    {ROWS CAT, UG_OK, 0, 0, NULL},
    /* a tab and a non-ASCII character before the error: columns count code
    ** points, as libyaml's marks do */
    {"title: \"é\"\nicon-value: 10\n" CAT "notes: [\"ü\", x, {a: 1}]\n", UG_ESCHEMA,
     6, 17, "not a mapping"},
    {"title: ok\n\xC3\xA9: 1\n", UG_ESCHEMA, 2, 1, "unknown key 'é'"},
    {"title: [a]\n" ROWS CAT, UG_ESCHEMA, 1, 8, "'title' expects a text, not a list"},
    {"title:\n" ROWS CAT, UG_ESCHEMA, 1, 7, "'title' is empty"},
    {ROWS "methd: dhondt\n" CAT, UG_ESCHEMA, 3, 1, "did you mean 'method'?"},
    {ROWS "style: {palete: tol-bright}\n" CAT, UG_ESCHEMA, 3, 9,
     "did you mean 'palette'?"},
    {ROWS "style: {width: 0}\n" CAT, UG_ESCHEMA, 3, 16, "positive length"},
    {ROWS "icon: {size: 10pt, gap: -1}\n" CAT, UG_ESCHEMA, 3, 25, "length"},
    {ROWS "total: 1e3\n" CAT, UG_EDATA, 3, 8, "plain decimal"},
    {ROWS "description: \"a\\tb\"\n" CAT, UG_ESCHEMA, 3, 14, "U+0009"},
    {ROWS "description: \"a\\nb\"\n" CAT, UG_OK, 0, 0, NULL},
    {ROWS "data: {group-column: x}\ncategories: [{label: A}]\n", UG_ESCHEMA, 0, 0, "needs 'file'"},
    {ROWS "? [a]\n: 1\n" CAT, UG_ESCHEMA, 3, 3, "plain name"},
    {"\xEF\xBB\xBF" ROWS "x: 1\n", UG_ESCHEMA, 3, 1, "unknown key 'x'"},
    /* a label with nothing usable for an id is numbered (category-2) */
    {ROWS "categories: [{label: A, count: 1}, {label: \"***\", count: 2}]\n",
     UG_OK, 0, 0, NULL},
    {ROWS "categories: [{label: \"合计\", count: 1}, {label: category-1, count: 2}]\n",
     UG_ESCHEMA, 3, 47, "duplicate category id 'category-1'"},
    /* another kind of file: refused by name, quoting none of it */
    {"password: hunter2\nuser: root\n", UG_ESCHEMA, 0, 0,
     "not a chart layout: none of its top-level keys"},
    {"root:$6$salt$hash:19000:0:99999:7:::\n", UG_ESCHEMA, 0, 0, "not a chart layout"},
    /* a misspelt key still gets its suggestion */
    {"titel: x\n", UG_ESCHEMA, 1, 1, "unknown key 'titel' (did you mean 'title'?)"},
    /* a type scale keeps its order and stays legible */
    {ROWS "style: {type: {title: 20, label: 12pt, note: 9}}\n" CAT, UG_OK, 0, 0, NULL},
    {ROWS "style: {type: {title: 14, subtitle: 16}}\n" CAT, UG_ESCHEMA, 3, 15,
     "'subtitle' (16px) is larger than 'title' (14px)"},
    {ROWS "style: {type: {note: 5pt}}\n" CAT, UG_ESCHEMA, 3, 15, "legible minimum of 6pt"},
    {ROWS "style: {type: {lable: 12}}\n" CAT, UG_ESCHEMA, 3, 16, "did you mean 'label'?"},
    {ROWS "key-place: left\n" CAT, UG_ESCHEMA, 3, 12, "beside"},
    /* direct labels name each category's own line: split rows only */
    {ROWS "direct-labels: true\n" CAT, UG_ESCHEMA, 3, 16, "needs 'arrangement: split'"},
    {ROWS "arrangement: split\ndirect-labels: false\n" CAT, UG_OK, 0, 0, NULL},
    {"form: waffle\ndirect-labels: true\n" CAT, UG_ESCHEMA, 2, 16, "for rows charts"},
    {"form: waffle\ndirect-labels: false\n" CAT, UG_OK, 0, 0, NULL},
};

START_TEST(test_strings)
{
    const string_case *t = &strings[_i];
    ug_error err = {0};
    ug_chart *c = NULL;
    ug_status st = ug_chart_load_string(t->text, strlen(t->text), "mem.yaml", NULL,
                                        &c, &err);
    ck_assert_msg(st == t->status, "case %d: status %d: %s", _i, st, err.msg);
    if (st == UG_OK) {
        ck_assert_ptr_nonnull(c);
        ug_chart_free(c);
        return;
    }
    ck_assert_ptr_null(c);
    ck_assert_str_eq(err.where.file, "mem.yaml");
    if (t->line) {
        ck_assert_uint_eq(err.where.line, t->line);
        ck_assert_uint_eq(err.where.column, t->column);
    }
    ck_assert_msg(strstr(err.msg, t->msg), "case %d: '%s'", _i, err.msg);
    ck_assert_msg(!strstr(err.msg, "hunter2") && !strstr(err.msg, "$6$"),
                  "case %d quotes the file: '%s'", _i, err.msg);
}
END_TEST

/* `audit: small-count` takes a number or an agency preset name (REFERENCES.md
** §7: CMS cell size suppression policy, CDC WONDER, NHS Digital HES). */
START_TEST(test_small_count_preset)
{
    static const char text[] = "title: t\nform: rows\nicon-value: 1\n"
                               "audit: {small-count: cdc-wonder}\n"
                               "categories: [{label: A, count: 3}]\n";
    ug_error err = {0};
    ug_chart *c = NULL;
    ck_assert_int_eq(ug_chart_load_string(text, strlen(text), "mem.yaml", NULL, &c, &err),
                     UG_OK);
    ck_assert_str_eq(c->audit.small_count_preset.text, "cdc-wonder");
    ck_assert_uint_eq(c->audit.small_count_preset.mark.line, 4);
    ug_chart_free(c);
}
END_TEST

/* ---- limits ------------------------------------------------------------- */

START_TEST(test_file_size_limit)
{
    ug_limits lim = {.max_file_bytes = 64};
    ug_error err = {0};
    ug_chart *c = NULL;
    ck_assert_int_eq(ug_chart_load("data/good/full.yaml", &lim, &c, &err), UG_ELIMIT);
    ck_assert_ptr_null(c);
    ck_assert_ptr_nonnull(strstr(err.msg, "limit of 64 bytes"));
    lim.max_file_bytes = 100;
    ug_error_clear(&err);
    ck_assert_int_eq(ug_chart_load_string("x", 101, "big.yaml", &lim, &c, &err),
                     UG_ELIMIT);
}
END_TEST

/* An alias bomb ("billion laughs") must stop at the first alias, not expand. */
START_TEST(test_alias_bomb)
{
    const char *text = "a: &a [x, x, x, x, x, x, x, x, x]\n"
                       "b: &b [*a, *a, *a, *a, *a, *a, *a, *a, *a]\n"
                       "c: &c [*b, *b, *b, *b, *b, *b, *b, *b, *b]\n";
    ug_error err = {0};
    ug_chart *c = NULL;
    ck_assert_int_eq(ug_chart_load_string(text, strlen(text), "bomb.yaml", NULL, &c,
                                          &err),
                     UG_ESCHEMA);
    ck_assert_uint_eq(err.where.line, 2);
    ck_assert_uint_eq(err.where.column, 8);
    ck_assert_str_eq(err.msg, "aliases are not supported (write the value out)");
}
END_TEST

/* ---- pages ---------------------------------------------------------------- */

/* Paper sizes: ISO 216 (A4 210 x 297 mm); US Letter 8.5 x 11 in; 96 px per
** inch and 25.4 mm per inch (W3C CSS Values and Units, absolute lengths). */
START_TEST(test_page)
{
    ug_error err = {0};
    ug_page *p = NULL;
    ck_assert_int_eq(ug_page_load("data/good/page.yaml", NULL, &p, &err), UG_OK);
    ck_assert(fabs(p->width - 11 * 96) < 1e-9);   /* landscape letter */
    ck_assert(fabs(p->height - 8.5 * 96) < 1e-9);
    ck_assert(fabs(p->margin - 48) < 1e-9);
    ck_assert_int_eq(p->orientation, UG_ORIENT_LANDSCAPE);
    ck_assert_int_eq(p->columns, 2);
    ck_assert_str_eq(p->title.text, "Spring update (test data)");
    ck_assert_uint_eq(p->npanels, 3);
    ck_assert_int_eq(p->panels[0].kind, UG_PANEL_CHART);
    ck_assert_str_eq(p->panels[0].chart_file.text, "inline.yaml");
    ck_assert_str_eq(p->panels[0].chart->path, "data/good/inline.yaml");
    ck_assert_uint_eq(p->panels[0].chart->groups.n, 3);
    ck_assert_int_eq(p->panels[1].kind, UG_PANEL_CHART);
    ck_assert_ptr_null(p->panels[1].chart_file.text);
    ck_assert_str_eq(p->panels[1].chart->title.text, "Inline chart");
    ck_assert_uint_eq(p->panels[1].chart->title.mark.line, 7);
    ck_assert_str_eq(p->panels[1].chart->title.mark.file, "data/good/page.yaml");
    ck_assert_int_eq(p->panels[1].span, 2);
    ck_assert_int_eq(p->panels[2].kind, UG_PANEL_TEXT);
    ck_assert_str_eq(p->panels[2].text.text, "Short paragraph\non two lines.\n");
    ck_assert_int_eq(p->panels[2].span, 1);
    ck_assert(p->shared_scale);
    ug_page_free(p);

    ck_assert_int_eq(ug_page_load("data/good/page_custom.yaml", NULL, &p, &err), UG_OK);
    ck_assert(fabs(p->width - 200 * 96 / 25.4) < 1e-9);
    ck_assert(fabs(p->height - 250 * 96 / 25.4) < 1e-9);
    ck_assert(fabs(p->margin - 15 * 96 / 25.4) < 1e-9);
    ck_assert_int_eq(p->columns, 1);
    ug_page_free(p);
}
END_TEST

typedef struct {
    const char *text;
    unsigned line, column;
    const char *msg;
} page_case;

static const page_case bad_pages[] = {
    {"page: {size: A4}\npanels: [{text: a}]\n", 0, 0, NULL},
    {"page: {size: A4}\n", 1, 1, "missing 'panels'"},
    {"page: {size: B4}\npanels: [{text: a}]\n", 1, 14, "'size' expects A3"},
    {"page: {size: A4, columns: 2}\npanels: [{text: a, span: 3}]\n", 2, 10,
     "spans 3 columns"},
    {"page: {size: A4}\npanels: [{text: a, chart: x.yaml}]\n", 0, 0, "x.yaml"},
    {"page: {size: A4}\npanels: [{span: 1}]\n", 2, 10, "either 'chart' or 'text'"},
    {"page: {size: A4, margin: 200mm}\npanels: [{text: a}]\n", 1, 7, "no room"},
    {"page: {size: A4}\npanels: [{chart: {icon-value: 10}}]\n", 2, 18,
     "missing 'categories'"},
    {"page: {size: A4}\npanels: [{text: a}]\nshared-scale: maybe\n", 3, 15,
     "true or false"},
    {"page: {size: A4}\npanels: [{chart: missing.yaml}]\n", 2, 18,
     "cannot read 'missing.yaml'"},
    {"title: chart\n", 1, 1, "this is a chart file, not a page file"},
    {"page: {size: A4}\nnumber-format: words\npanels: [{text: a}]\n", 2, 16,
     "'number-format' expects one of plain | compact | compact-short"},
};

START_TEST(test_bad_pages)
{
    const page_case *t = &bad_pages[_i];
    ug_error err = {0};
    ug_page *p = NULL;
    ug_status st = ug_page_load_string(t->text, strlen(t->text), "p.yaml", NULL, &p,
                                       &err);
    if (!t->msg) {
        ck_assert_int_eq(st, UG_OK);
        ug_page_free(p);
        return;
    }
    ck_assert_int_ne(st, UG_OK);
    ck_assert_ptr_null(p);
    if (t->line) {
        ck_assert_uint_eq(err.where.line, t->line);
        ck_assert_uint_eq(err.where.column, t->column);
    }
    ck_assert_msg(strstr(err.msg, t->msg), "case %d: '%s'", _i, err.msg);
}
END_TEST

/* A page's number-format reaches every panel chart that states none; a
** chart's own wins, and a percent chart's shares stay plain. */
START_TEST(test_page_number_format_reaches_panels)
{
    const char *text =
        "page: {size: A4}\nnumber-format: compact\ntitle: P\npanels:\n"
        "  - chart: {title: A, icon-value: 1, categories: [{label: X, count: 3}]}\n"
        "  - chart: {number-format: plain, title: B, icon-value: 1,\n"
        "            categories: [{label: Y, count: 4}]}\n"
        "  - chart: {title: C, form: waffle, counts-are: percent,\n"
        "            categories: [{label: Z, count: 100}]}\n";
    ug_page *p = NULL;
    ug_error err = {0};
    ck_assert_msg(ug_page_load_string(text, strlen(text), "p.yaml", NULL, &p, &err) == UG_OK,
                  "%s", err.msg);
    ck_assert_int_eq(p->panels[0].chart->number_format, UG_NUMBERS_COMPACT);
    ck_assert_int_eq(p->panels[1].chart->number_format, UG_NUMBERS_PLAIN);
    ck_assert_int_eq(p->panels[2].chart->number_format, UG_NUMBERS_PLAIN);
    ug_page_free(p);
}
END_TEST

/* shared-scale: the inline chart states icon-value 5 where inline.yaml says 10. */
START_TEST(test_shared_scale)
{
    ug_error err = {0};
    ug_page *p = NULL;
    ck_assert_int_eq(ug_page_load("data/bad/page_scale.page", NULL, &p, &err),
                     UG_ESCHEMA);
    ck_assert_str_eq(err.where.file, "data/bad/page_scale.page");
    ck_assert_uint_eq(err.where.line, 6);
    ck_assert_uint_eq(err.where.column, 19);
    ck_assert_str_eq(err.msg, "shared-scale: icon-value 5 differs from 10 stated in "
                              "data/bad/../good/inline.yaml:5");
}
END_TEST

/* ---- which loader a file is for: the parsed top-level keys decide -------- */

typedef struct {
    const char *file;
    ug_layout_kind kind;
} kind_case;

/* Each file was misjudged by a look at its first lines' bytes. */
static const kind_case kind_files[] = {
    {"data/kind/chart_comment.yaml", UG_LAYOUT_CHART}, /* page: in comments */
    {"data/kind/chart_title.yaml", UG_LAYOUT_CHART},   /* page: in quoted titles */
    {"data/kind/page_bom.yaml", UG_LAYOUT_PAGE},       /* UTF-8 byte-order mark */
    {"data/kind/page_flow.yaml", UG_LAYOUT_PAGE},      /* {page: ...} */
    {"data/kind/page_quoted.yaml", UG_LAYOUT_PAGE},    /* "page": */
    {"data/good/page.yaml", UG_LAYOUT_PAGE},
    {"data/good/full.yaml", UG_LAYOUT_CHART},
};

/* The kind detected is the one its loader accepts, and the other loader
** refuses the file for being of that kind. */
START_TEST(test_layout_kind_files)
{
    const kind_case *t = &kind_files[_i];
    ug_error err = {0};
    ug_layout_kind kind = (ug_layout_kind)-1;
    ck_assert_int_eq(ug_layout_detect(t->file, NULL, &kind, &err), UG_OK);
    ck_assert_msg(kind == t->kind, "%s: detected %d", t->file, kind);
    ug_chart *c = NULL;
    ug_page *p = NULL;
    ug_status chart_st = ug_chart_load(t->file, NULL, &c, &err);
    ck_assert_msg(chart_st == (kind == UG_LAYOUT_CHART ? UG_OK : UG_ESCHEMA), "%s: %s",
                  t->file, err.msg);
    ug_error_clear(&err);
    ug_status page_st = ug_page_load(t->file, NULL, &p, &err);
    ck_assert_msg(page_st == (kind == UG_LAYOUT_PAGE ? UG_OK : UG_ESCHEMA), "%s: %s",
                  t->file, err.msg);
    ug_chart_free(c);
    ug_page_free(p);
}
END_TEST

typedef struct {
    const char *text;
    ug_status st;
    ug_layout_kind kind;
} kind_text_case;

static const kind_text_case kind_texts[] = {
    {"page: {size: A4}\npanels: [{text: a}]\n", UG_OK, UG_LAYOUT_PAGE},
    {"\xEF\xBB\xBFpage: {size: A4}\n", UG_OK, UG_LAYOUT_PAGE},
    {"{\"page\": {\"size\": \"A4\"}, \"panels\": []}", UG_OK, UG_LAYOUT_PAGE},
    {"'page': {size: A4}\n", UG_OK, UG_LAYOUT_PAGE},
    {"title: x\npage :\n", UG_OK, UG_LAYOUT_PAGE},
    {"title: x # page: A4\n", UG_OK, UG_LAYOUT_CHART},
    {"title: \"page: A4\"\n", UG_OK, UG_LAYOUT_CHART},
    {"title: |\n  page: A4\n", UG_OK, UG_LAYOUT_CHART},
    {"notes: [{page: A4}]\n", UG_OK, UG_LAYOUT_CHART}, /* not at the top */
    {"pages: 2\n", UG_OK, UG_LAYOUT_CHART},
    {"- page\n", UG_OK, UG_LAYOUT_CHART},                  /* the loader explains */
    {"", UG_OK, UG_LAYOUT_CHART},
    {"page: [\n", UG_ESYNTAX, UG_LAYOUT_CHART},
    {"page: *a\n", UG_ESCHEMA, UG_LAYOUT_CHART},           /* aliases refused */
    {"page: \xC3\n", UG_EDATA, UG_LAYOUT_CHART},           /* not UTF-8 */
};

START_TEST(test_layout_kind_texts)
{
    const kind_text_case *t = &kind_texts[_i];
    ug_error err = {0};
    ug_layout_kind kind = (ug_layout_kind)-1;
    ug_status st = ug_layout_detect_string(t->text, strlen(t->text), "k.yaml", NULL,
                                           &kind, &err);
    ck_assert_msg(st == t->st, "case %d: status %d (%s)", _i, st, err.msg);
    ck_assert_msg(st == UG_OK || err.msg[0], "case %d: no message", _i);
    ck_assert_msg(kind == t->kind, "case %d: detected %d", _i, kind);
}
END_TEST

START_TEST(test_layout_kind_limits)
{
    ug_error err = {0};
    ug_layout_kind kind;
    ug_limits small = {.max_file_bytes = 8};
    const char *text = "page: {size: A4}\n";
    ck_assert_int_eq(ug_layout_detect_string(text, strlen(text), "k.yaml", &small,
                                             &kind, &err), UG_ELIMIT);
    ck_assert_int_eq(kind, UG_LAYOUT_CHART);
    ug_error_clear(&err);
    ck_assert_int_eq(ug_layout_detect("data/kind/missing.yaml", NULL, &kind, &err),
                     UG_EIO);
    ug_error_clear(&err);
    ck_assert_int_eq(ug_layout_detect("data/kind", NULL, &kind, &err), UG_EIO);
    ck_assert_int_eq(kind, UG_LAYOUT_CHART);
    /* a FIFO is refused by the reader, not waited on (Check's timeout would
    ** end a test that blocked) */
    char dir[] = "/tmp/ug-kind-XXXXXX", fifo[64];
    ck_assert_ptr_nonnull(mkdtemp(dir));
    snprintf(fifo, sizeof fifo, "%s/page.yaml", dir);
    ck_assert_int_eq(mkfifo(fifo, 0600), 0);
    ug_error_clear(&err);
    ug_status st = ug_layout_detect(fifo, NULL, &kind, &err);
    unlink(fifo);
    rmdir(dir);
    ck_assert_int_eq(st, UG_EIO);
    ck_assert(strstr(err.msg, "not a regular file") != NULL);
}
END_TEST

/* ---- every allocation failing in turn ----------------------------------- */

static void fail_each(const char *path, bool page)
{
    for (long n = 0;; n++) {
        ug_error err = {0};
        ug_chart *c = NULL;
        ug_page *p = NULL;
        ug_mem_fail_after(n);
        ug_status st = page ? ug_page_load(path, NULL, &p, &err)
                            : ug_chart_load(path, NULL, &c, &err);
        ug_mem_fail_after(-1);
        ug_chart_free(c);
        ug_page_free(p);
        if (st == UG_OK)
            return;
        ck_assert_msg(st == UG_ENOMEM, "%s, allocation %ld: %s", path, n, err.msg);
        ck_assert(n < 100000);
    }
}

START_TEST(test_out_of_memory)
{
    fail_each("data/good/full.yaml", false);
    fail_each("data/good/fromcsv.yaml", false);
    fail_each("data/good/fromlong.yaml", false);
    fail_each("data/good/page.yaml", true);
}
END_TEST

/* The one table of forms: each name a layout may write loads as that form,
** and its line says what the packer and the description use. */
START_TEST(test_form_table)
{
    size_t n = 0;
    while (ug_form_names[n])
        n++;
    ck_assert_uint_eq(n, UG_FORM_COUNT);
    for (size_t f = 0; f < n; f++) {
        char text[160];
        snprintf(text, sizeof text, "form: %s\nicon-value: 1\n"
                 "categories: [{label: A, count: 3}]\n", ug_form_names[f]);
        ug_chart *c = NULL;
        ug_error err;
        ck_assert_msg(ug_chart_load_string(text, strlen(text), "t.yaml", NULL, &c, &err) ==
                      UG_OK, "%s", err.msg);
        ck_assert_int_eq(c->form, (int)f);
        ck_assert_str_eq(ug_form_about(c->form)->name, ug_form_names[f]);
        ck_assert_int_gt(ug_form_about(c->form)->columns, 0);
        ck_assert(!ug_form_about(c->form)->cell == !ug_form_about(c->form)->cells);
        ug_chart_free(c);
    }
    ck_assert_str_eq(ug_form_about(UG_FORM_WAFFLE)->kind, "Waffle chart");
    ck_assert_int_eq(ug_form_about(UG_FORM_ROWS)->columns, 20);
}
END_TEST

/* ---- counts-are: percent ------------------------------------------------- */

/* The shares must add to 100 within half a unit in the last place of each
** share as written (the largest error of rounding to that place, a
** textbook bound); each expected verdict below is that sum worked by hand. */
typedef struct {
    const char *keys;      /* before categories */
    const char *cats;      /* the categories block */
    const char *error;     /* NULL: loads; else file:line:col: message */
} percent_case;

#define PCT_HEAD "title: T\ncounts-are: percent\n"
static const percent_case percent_cases[] = {
    {"form: waffle\n", "  - {label: A, count: 33}\n  - {label: B, count: 33}\n"
     "  - {label: C, count: 33}\n", NULL}, /* 99, allowed 100 +- 1.5 */
    {"form: waffle\n", "  - {label: A, count: 33.3}\n  - {label: B, count: 33.3}\n"
     "  - {label: C, count: 33.3}\n", NULL}, /* 99.9, +- 0.15 */
    {"form: waffle\n", "  - {label: A, count: 50.5}\n  - {label: B, count: 49}\n",
     NULL}, /* 99.5, +- 0.55 */
    {"form: waffle\n", "  - {label: A, count: 50.5}\n  - {label: B, count: 48}\n",
     "p.yaml:5:23: the shares add to 98.5 %, not 100 % (the rounding of the shares "
     "as written allows 100 \u00b1 0.55): add the missing share as a category (such "
     "as 'not stated') or correct the shares"},
    {"form: waffle\n", "  - {label: A, count: 60}\n  - {label: B, count: 50}\n",
     "p.yaml:5:23: the shares add to 110 %, not 100 % (the rounding of the shares "
     "as written allows 100 \u00b1 1): add the missing share as a category (such "
     "as 'not stated') or correct the shares"},
    {"form: waffle\ngroups: [North, South]\n",
     "  - {label: A, counts: [50, 50]}\n  - {label: B, counts: [50, 40]}\n",
     "p.yaml:6:29: group 'South': the shares add to 90 %, not 100 %"},
    {"form: rows\nicon-value: 1\n", "  - {label: A, count: 100}\n",
     "p.yaml:2:13: 'counts-are: percent' is for waffle charts (form: waffle)"},
    {"form: waffle\ntotal: 100\n", "  - {label: A, count: 100}\n",
     "p.yaml:4:8: 'total' is a count, and the shares of a percent chart are of a "
     "total that is not known"},
    {"form: waffle\nsuppress: {below: 10}\n", "  - {label: A, count: 100}\n",
     "p.yaml:4:11: a share of an unknown total cannot be checked for disclosure"},
    {"form: waffle\nprotect: {round-to: 5}\n", "  - {label: A, count: 100}\n",
     "p.yaml:4:10: a share of an unknown total cannot be checked for disclosure"},
    {"form: waffle\nicon-value: 2\n", "  - {label: A, count: 100}\n",
     "p.yaml:4:13: 'icon-value' is a count per icon"},
    {"form: waffle\ngroups: [Q1, Q2]\nchange: previous\n",
     "  - {label: A, counts: [100, 100]}\n", "p.yaml:5:9: 'change' states differences"},
    {"form: waffle\ncurrency: EUR\n", "  - {label: A, count: 100}\n",
     "p.yaml:4:11: 'currency' makes the counts sums of money"},
    {"form: waffle\nnumber-format: compact\n", "  - {label: A, count: 100}\n",
     "p.yaml:4:16: 'number-format' writes large counts in words"},
};

START_TEST(test_percent)
{
    const percent_case *k = &percent_cases[_i];
    char text[1024], got[1024];
    snprintf(text, sizeof text, PCT_HEAD "%scategories:\n%s", k->keys, k->cats);
    ug_chart *c = NULL;
    ug_error err = {0};
    ug_status st = ug_chart_load_string(text, strlen(text), "p.yaml", NULL, &c, &err);
    if (!k->error) {
        ck_assert_msg(st == UG_OK, "%s", err.msg);
        ck_assert_int_eq(c->counts_are, UG_COUNTS_ARE_PERCENT);
        ug_chart_free(c);
        return;
    }
    ck_assert_int_ne(st, UG_OK);
    snprintf(got, sizeof got, "%s:%u:%u: %s", err.where.file, err.where.line,
             err.where.column, err.msg);
    ck_assert_msg(!strncmp(got, k->error, strlen(k->error)), "got  %s\nwant %s", got,
                  k->error);
}
END_TEST

/* `number-format` and `currency` (FORMAT.md §6): the codes ICU lists as ISO
** 4217 codes in use are taken; anything else is refused at its place. */
static const struct {
    const char *keys, *error;
} amount_cases[] = {
    {"number-format: compact\ncurrency: PLN\n", NULL},
    {"number-format: compact-short\n", NULL},
    {"number-format: plain\ncurrency: JPY\n", NULL},
    {"number-format: short\n",
     "m.yaml:2:16: 'number-format' expects one of plain | compact | compact-short "
     "(found 'short')"},
    {"currency: eur\n",
     "m.yaml:2:11: 'currency' expects an ISO 4217 code in capitals, such as EUR, USD or "
     "PLN (found 'eur')"},
    {"currency: EURO\n", "m.yaml:2:11: 'currency' expects an ISO 4217 code"},
    {"currency: ABC\n", "m.yaml:2:11: 'currency' ABC is not an ISO 4217 code in use"},
    /* Deutsche Mark: an ISO 4217 code withdrawn in 2002 (ISO 4217 list three) */
    {"currency: DEM\n", "m.yaml:2:11: 'currency' DEM is not an ISO 4217 code in use"},
};

START_TEST(test_amount_keys)
{
    char text[512], got[1024];
    snprintf(text, sizeof text, "form: rows\n%sicon-value: 10\n"
             "categories: [{label: A, count: 1200}]\n", amount_cases[_i].keys);
    ug_chart *c = NULL;
    ug_error err = {0};
    ug_status st = ug_chart_load_string(text, strlen(text), "m.yaml", NULL, &c, &err);
    const char *want = amount_cases[_i].error;
    if (!want) {
        ck_assert_msg(st == UG_OK, "%s", err.msg);
        ck_assert(c->number_format != UG_NUMBERS_PLAIN || c->currency.text);
        ug_chart_free(c);
        return;
    }
    ck_assert_int_ne(st, UG_OK);
    snprintf(got, sizeof got, "%s:%u:%u: %s", err.where.file, err.where.line,
             err.where.column, err.msg);
    ck_assert_msg(!strncmp(got, want, strlen(want)), "got  %s\nwant %s", got, want);
}
END_TEST

START_TEST(test_counts_are_default)
{
    const char *text = "form: waffle\ncategories: [{label: A, count: 3}]\n";
    ug_chart *c = NULL;
    ug_error err;
    ck_assert(ug_chart_load_string(text, strlen(text), "t.yaml", NULL, &c, &err) == UG_OK);
    ck_assert_int_eq(c->counts_are, UG_COUNTS_ARE_COUNTS);
    ug_chart_free(c);
}
END_TEST

static Suite *suite(void)
{
    Suite *s = suite_create("layout");
    TCase *t = tcase_create("load");
    tcase_set_timeout(t, 60);
    tcase_add_test(t, test_error_reused);
    tcase_add_loop_test(t, test_good_charts, 0, sizeof charts / sizeof charts[0]);
    tcase_add_test(t, test_groups_agree);
    tcase_add_test(t, test_full_chart);
    tcase_add_test(t, test_defaults);
    tcase_add_test(t, test_form_table);
    tcase_add_loop_test(t, test_percent, 0, sizeof percent_cases / sizeof percent_cases[0]);
    tcase_add_test(t, test_counts_are_default);
    tcase_add_loop_test(t, test_amount_keys, 0, sizeof amount_cases / sizeof amount_cases[0]);
    tcase_add_loop_test(t, test_strings, 0, sizeof strings / sizeof strings[0]);
    tcase_add_test(t, test_small_count_preset);
    tcase_add_test(t, test_file_size_limit);
    tcase_add_test(t, test_alias_bomb);
    tcase_add_test(t, test_page);
    tcase_add_loop_test(t, test_bad_pages, 0, sizeof bad_pages / sizeof bad_pages[0]);
    tcase_add_test(t, test_shared_scale);
    tcase_add_test(t, test_page_number_format_reaches_panels);
    tcase_add_loop_test(t, test_layout_kind_files, 0,
                        sizeof kind_files / sizeof kind_files[0]);
    tcase_add_loop_test(t, test_layout_kind_texts, 0,
                        sizeof kind_texts / sizeof kind_texts[0]);
    tcase_add_test(t, test_layout_kind_limits);
    tcase_add_test(t, test_out_of_memory);
    suite_add_tcase(s, t);
    return s;
}

int main(void)
{
    return check_run(suite());
}
