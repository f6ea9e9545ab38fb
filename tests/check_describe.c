/* Tests for src/describe.c: the plain-language description and the phrases
** the key shares with it. Expected icon counts are worked by hand with the
** largest-remainder rule (REFERENCES.md §1) in the comments. */
#define _POSIX_C_SOURCE 200809L
#include <check.h>
#include <stdlib.h>
#include <string.h>

#include "data/draw/fixture.h"
#include "pack.h"
#include "check_run.h"

static char *describe(ug_chart *c)
{
    ug_error err;
    memset(&err, 0, sizeof err);
    ug_allocation *a;
    char *out;
    ck_assert_int_eq(ug_chart_allocate(c, &a, &err), UG_OK);
    ck_assert_int_eq(ug_chart_describe(c, a, &out, NULL, &err), UG_OK);
    ug_allocation_free(a);
    return out;
}

/* 412, 300, 123 of 835 in 100 cells: quotas 49.34, 35.93, 14.73; whole parts
** 49 + 35 + 14 = 98, the two leftovers go to .93 and .73: 49, 36, 15. */
START_TEST(test_waffle_sentences)
{
    const fx_cat cats[] = {{"Families with children", "square", 0x0072B2, {"412"}, NULL},
                           {"Single adults", "square", 0xE69F00, {"300"}, NULL},
                           {"Older people", "square", 0x009E73, {"123"}, NULL}};
    ug_chart *c = fx_chart(UG_FORM_WAFFLE, "Who the pantry served", NULL, 0, cats, 3);
    ug_text src = {"Pantry intake log (demo data)", {0}};
    c->source.items = &src;
    c->source.n = 1;
    char *d = describe(c);
    ck_assert_str_eq(d, "Waffle chart: Who the pantry served. Each square is 1% of the "
                        "835 households. Families with children: 412 households "
                        "(49 squares). Single adults: 300 households (36 squares). "
                        "Older people: 123 households (15 squares). Source: Pantry "
                        "intake log (demo data).");
    ug_free(d);
    fx_free(c);
}
END_TEST

/* The cell noun follows the glyph: a waffle of person glyphs has icons, not
** squares; one square among them is not enough to call them squares. */
START_TEST(test_waffle_of_glyphs_says_icons)
{
    const fx_cat cats[] = {{"Families", "family", 0x0072B2, {"412"}, NULL},
                           {"Adults", "square", 0xE69F00, {"300"}, NULL}};
    ug_chart *c = fx_chart(UG_FORM_WAFFLE, "t", NULL, 0, cats, 2);
    char *d = describe(c);
    ck_assert_msg(strstr(d, "Each icon is 1% of the 712 households.") &&
                      !strstr(d, "square"), "%s", d);
    ug_free(d);
    fx_free(c);
}
END_TEST

/* A waffle of groups says what a group is when the layout names it. */
START_TEST(test_group_label_names_the_share)
{
    const char *groups[] = {"Oakfield", "Millbrook"};
    const fx_cat cats[] = {{"Walk", "square", 0x009E73, {"212", "148"}, NULL},
                           {"Bus", "square", 0x0072B2, {"87", "119"}, NULL}};
    ug_chart *c = fx_chart(UG_FORM_WAFFLE, "t", groups, 2, cats, 2);
    c->unit_label.text = "pupils";
    char *d = describe(c);
    ck_assert_msg(strstr(d, "Each square is 1% of each group's pupils."), "%s", d);
    ug_free(d);
    c->group_label.text = "school";
    d = describe(c);
    ck_assert_msg(strstr(d, "Each square is 1% of each school's pupils."), "%s", d);
    ug_free(d);
    fx_free(c);
}
END_TEST

/* FORMAT.md §7: the description says both totals agree, and its per-cell
** icons are the biproportional ones (layouts/wards.csv's counts, demo
** data, worked by hand in tests/data/expected/CHECKED.md: River ward's
** adults get 9, its older people 2, 46 icons in all). */
START_TEST(test_biproportional_says_totals_agree)
{
    const char *groups[] = {"North ward", "River ward", "Hill ward"};
    const fx_cat cats[] = {{"Adults", "person", 0x0072B2, {"124", "85", "43"}, NULL},
                           {"Children", "child", 0xE69F00, {"64", "51", "8"}, NULL},
                           {"Older people", "person", 0x009E73, {"38", "27", "19"}, NULL}};
    ug_chart *c = fx_chart(UG_FORM_ROWS, "t", groups, 3, cats, 3);
    c->method = UG_METHOD_BIPROPORTIONAL;
    c->group_label.text = "ward";
    char *d = describe(c);
    ck_assert_msg(strstr(d, "Each icon is 10 households. Both totals agree: each "
                            "ward's icons and each category's icons add up to its own "
                            "share of all 46 icons."), "%s", d);
    ck_assert_msg(strstr(d, "River ward, 163 households in all: Adults 85 households "
                            "(9 icons), Children 51 households (5 icons), Older people "
                            "27 households (2 icons)."), "%s", d);
    ug_free(d);
    c->method = UG_METHOD_LARGEST_REMAINDER;
    d = describe(c);
    ck_assert_ptr_null(strstr(d, "Both totals agree"));
    ug_free(d);
    fx_free(c);
}
END_TEST

/* 1/200 of the whole is 0.5%. */
START_TEST(test_half_percent_cells)
{
    const fx_cat cats[] = {{"A", "square", 0x0072B2, {"10"}, NULL}};
    ug_chart *c = fx_chart(UG_FORM_WAFFLE, "t", NULL, 0, cats, 1);
    c->cells = 200;
    c->has_cells = true;
    char *d = describe(c);
    ck_assert_ptr_nonnull(strstr(d, "Each square is 0.5% of the 10 households."));
    ug_free(d);
    fx_free(c);
}
END_TEST

/* One sentence per group; the hidden count appears only as its label and no
** total lets a reader subtract their way to it. */
START_TEST(test_groups_and_suppression)
{
    const char *groups[] = {"North ward", "River ward"};
    const fx_cat cats[] = {{"Adults", "person", 0x0072B2, {"1200", "640"}, NULL},
                           {"Children", "child", 0xE69F00, {"7", "512"}, NULL}};
    ug_chart *c = fx_chart(UG_FORM_ROWS, "Pantry visits", groups, 2, cats, 2);
    fx_suppress(c, "10");
    c->suppress_margins = UG_MARGINS_HIDDEN; /* no totals published elsewhere */
    char *d = describe(c);
    ck_assert_str_eq(d, "Pictogram chart: Pantry visits. Each icon is 10 households. "
                        "North ward, more than 1,200 households in all: Adults 1,200 "
                        "households (120 icons), Children fewer than 10. River ward, "
                        "1,152 households in all: Adults 640 households (64 icons), "
                        "Children 512 households (51 icons). Counts of 1 to 9 "
                        "households are not shown (\u201cfewer than 10\u201d).");
    ck_assert_ptr_null(strstr(d, "1,207"));
    ck_assert_ptr_null(strstr(d, "519"));
    ug_free(d);
    fx_free(c);
}
END_TEST

/* `change: previous`: the description, the key and the group labels state
** each change from the period before, from published values only.
** By hand: Adults 412 -> 446 is +34, 34/412 = 8.25 % -> +8 %; Children
** 150 -> 160 is +10, 6.67 % -> +7 %; totals 562 -> 606, +44, 7.83 % -> +8 %.
** Written as CLDR's English percent pattern writes them ("#,##0%", en.xml). */
START_TEST(test_change_between_periods)
{
    const char *groups[] = {"Q2 2026", "Q3 2026"};
    const fx_cat cats[] = {{"Adults", "person", 0x0072B2, {"412", "446"}, NULL},
                           {"Children", "child", 0xE69F00, {"150", "160"}, NULL}};
    ug_chart *c = fx_chart(UG_FORM_ROWS, "Pantry visits", groups, 2, cats, 2);
    c->change = UG_CHANGE_PREVIOUS;
    char *d = describe(c);
    ck_assert_msg(strstr(d, "Q3 2026, 606 households in all (+44, +8%):"), "%s", d);
    ck_assert_msg(strstr(d, "From Q2 2026 to Q3 2026: Adults 412 \u2192 446 households "
                            "(+34, +8%); Children 150 \u2192 160 households (+10, +7%)."),
                  "%s", d);
    ug_free(d);
    /* the key shows the latest period and its change, never the sum (1,168) */
    ug_error err = {0};
    ug_allocation *a;
    ck_assert_int_eq(ug_chart_allocate(c, &a, &err), UG_OK);
    ug_buf b;
    ug_buf_init(&b);
    pack_category_phrase(a, 0, &b);
    ug_buf_add(&b, "", 1);
    ck_assert_str_eq(b.data, "412 \u2192 446 households (+34, +8%)");
    ug_buf_free(&b);
    ug_allocation_free(a);
    /* a hidden count's change is hidden too; a fall is signed */
    c->cats[1].counts[1] = fx_dec("7");
    c->cats[0].counts[1] = fx_dec("400");
    fx_suppress(c, "10");
    c->suppress_margins = UG_MARGINS_HIDDEN;
    d = describe(c);
    ck_assert_msg(strstr(d, "Adults 412 \u2192 400 households (-12, -3%)"), "%s", d);
    ck_assert_msg(strstr(d, "Children 150 \u2192 fewer than 10 (change not shown)"), "%s", d);
    ck_assert_ptr_null(strstr(d, "143"));
    ug_free(d);
    fx_free(c);
}
END_TEST

/* The change in French, Chinese and Arabic (German: check_phrase): signs, percent
** and separator are CLDR's (fr.xml percentFormat "#,##0 %", the space U+00A0; zh.xml
** "#,##0%"; python3-babel's format_percent agrees) and the catalog's list
** separator (zh "，"). */
START_TEST(test_change_in_other_languages)
{
    static const struct { const char *lang, *want; } cases[] = {
        {"fr", "(+34, +8\u00a0%)"},
        {"zh-Hans", "(+34\uff0c+8%)"},
        /* the arrow points the way Arabic reads: 412 then 446, leftwards */
        {"ar", "\u0664\u0661\u0662 \u2190 \u0664\u0664\u0666"},
    };
    const char *groups[] = {"Q2", "Q3"};
    const fx_cat cats[] = {{"A", "person", 0x0072B2, {"412", "446"}, NULL}};
    for (size_t k = 0; k < sizeof cases / sizeof cases[0]; k++) {
        ug_chart *c = fx_chart(UG_FORM_ROWS, "T", groups, 2, cats, 1);
        c->change = UG_CHANGE_PREVIOUS;
        c->lang.text = cases[k].lang;
        char *d = describe(c);
        ck_assert_msg(strstr(d, cases[k].want), "%s: %s", cases[k].lang, d);
        ug_free(d);
        fx_free(c);
    }
}
END_TEST

START_TEST(test_layout_description_wins)
{
    const fx_cat cats[] = {{"A", "square", 0x0072B2, {"10"}, NULL}};
    ug_chart *c = fx_chart(UG_FORM_ROWS, "t", NULL, 0, cats, 1);
    c->description.text = "Ten households, one icon.";
    char *d = describe(c);
    ck_assert_str_eq(d, "Ten households, one icon.");
    ug_free(d);
    fx_free(c);
}
END_TEST

typedef struct {
    const char *in, *out;
} number_case;

static const number_case numbers[] = {
    {"0", "0"}, {"412", "412"}, {"1200", "1,200"}, {"1234567.5", "1,234,567.5"},
    {"100000", "100,000"}, {"0.25", "0.25"},
};

START_TEST(test_number_grouping)
{
    char buf[64];
    ck_assert_str_eq(ug_dec_format_grouped(fx_dec(numbers[_i].in), buf), numbers[_i].out);
}
END_TEST

/* ---- counts-are: percent --------------------------------------------------- */

static ug_chart *load_text(const char *text)
{
    ug_chart *c = NULL;
    ug_error err = {0};
    ck_assert_msg(ug_chart_load_string(text, strlen(text), "p.yaml", NULL, &c, &err)
                  == UG_OK, "%s", err.msg);
    return c;
}

static char *describe_text(const char *text)
{
    ug_chart *c = load_text(text);
    char *d = describe(c);
    ug_chart_free(c);
    return d;
}

#define HEATING_CATS "categories:\n  - {label: Gas, count: 41.6}\n" \
    "  - {label: Heat pump, count: 23.2}\n  - {label: District, count: 17.9}\n" \
    "  - {label: Electric, count: 11.1}\n  - {label: Other, count: 6.2}\n"

/* Shares adding to 100 in 100 cells: quotas are the shares; whole parts
** 41 + 23 + 17 + 11 + 6 = 98, the two left go to .9 and .6: 42, 23, 18, 11, 6.
** The sentence states shares of residents, no total and no sum of shares. */
START_TEST(test_percent_sentences)
{
    char *d = describe_text("title: Heating\nform: waffle\ncounts-are: percent\n"
                            "unit-label: residents\n" HEATING_CATS);
    ck_assert_str_eq(d, "Waffle chart: Heating. Each square is 1% of residents. The "
                        "figures are shares in percent; the total they are shares of "
                        "is not stated. Gas: 41.6% (42 squares). Heat pump: 23.2% (23 "
                        "squares). District: 17.9% (18 squares). Electric: 11.1% (11 "
                        "squares). Other: 6.2% (6 squares).");
    ug_free(d);
    d = describe_text("title: Heating\nform: waffle\ncounts-are: percent\n" HEATING_CATS);
    ck_assert_msg(strstr(d, "Each square is 1% of the whole."), "%s", d);
    ug_free(d);
}
END_TEST

/* German percent: CLDR's de pattern is "#,##0 %" with U+00A0 before the sign
** and the decimal comma (python3-babel 2.10: Locale('de').percent_formats). */
START_TEST(test_percent_german)
{
    char *d = describe_text("lang: de\ntitle: Heizung\nform: waffle\ncounts-are: percent\n"
                            "unit-label: Befragten\n" HEATING_CATS);
    ck_assert_msg(strstr(d, "1\u00a0% der Befragten") && strstr(d, "Gas: 41,6\u00a0% "
                  "(42 Quadrate)"), "%s", d);
    ug_free(d);
}
END_TEST

/* With groups each group's column is its own: no "in all", no 100 %, and the
** key gives each group's share of a category instead of a sum of them. */
START_TEST(test_percent_groups)
{
    ug_chart *c = load_text("title: T\nform: waffle\ncounts-are: percent\n"
                            "groups: [North, South]\ncategories:\n"
                            "  - {label: Gas, counts: [33, 41]}\n"
                            "  - {label: Pump, counts: [33, 30]}\n"
                            "  - {label: Other, counts: [33, 29]}\n");
    ug_error err = {0};
    ug_allocation *a;
    ck_assert_int_eq(ug_chart_allocate(c, &a, &err), UG_OK);
    char *d;
    ck_assert_int_eq(ug_chart_describe(c, a, &d, NULL, &err), UG_OK);
    ck_assert_msg(strstr(d, " North: Gas 33% (34 squares), Pump 33% (33 squares), "
                            "Other 33% (33 squares). South: Gas 41% (41 squares)")
                  && !strstr(d, "in all") && !strstr(d, "100"), "%s", d);
    ug_buf b;
    ug_buf_init(&b);
    pack_category_phrase(a, 0, &b);
    ug_buf_add(&b, "", 1);
    ck_assert_str_eq(b.data, "North 33%, South 41%"); /* not 74% */
    ug_buf_free(&b);
    ug_free(d);
    ug_allocation_free(a);
    ug_chart_free(c);
}
END_TEST


/* ---- number-format and currency (FORMAT.md §6) ------------------------------ */

#define BUDGET "title: Budget\nform: rows\nicon-value: 10000000\n" \
    "categories:\n  - {label: Schools, count: 412487000}\n" \
    "  - {label: Roads, count: 96250000}\n  - {label: Parks, count: 12500000}\n"

/* Compact words and money through ICU; the words are CLDR's own (en.xml
** decimalFormats-long "0 million", currencyFormats short "¤0M"; Debian
** unicode-cldr-core, common/main/en.xml). 412,487,000 to one decimal of a
** million is 412.5 (half up); quotas 41.25, 9.63, 1.25 give 41, 10, 1. */
START_TEST(test_compact_money_sentences)
{
    char *d = describe_text("number-format: compact\nunit-label: euros\n" BUDGET);
    ck_assert_str_eq(d, "Pictogram chart: Budget. Each icon is 10 million euros. Schools: "
                        "412.5 million euros (41 icons). Roads: 96.3 million euros (10 "
                        "icons). Parks: 12.5 million euros (1 icon).");
    ug_free(d);
    d = describe_text("currency: EUR\nnumber-format: compact\n" BUDGET);
    ck_assert_str_eq(d, "Pictogram chart: Budget. Each icon is \u20ac10M. Schools: "
                        "\u20ac412.5M (41 icons). Roads: \u20ac96.3M (10 icons). Parks: "
                        "\u20ac12.5M (1 icon).");
    ug_free(d);
    /* money in full: whole amounts stay whole, grouped as CLDR says */
    d = describe_text("currency: USD\n" BUDGET);
    ck_assert_msg(strstr(d, "Schools: $412,487,000 (41 icons)."), "%s", d);
    ug_free(d);
    d = describe_text("number-format: compact-short\nunit-label: euros\n" BUDGET);
    ck_assert_msg(strstr(d, "Schools: 412.5M euros (41 icons)."), "%s", d);
    ug_free(d);
}
END_TEST

/* One chart in six languages. Expected words from CLDR 42's long compact
** patterns and plural rules (unicode-cldr-core common/main/LANG.xml,
** decimalFormats-long; common/supplemental/plurals.xml): French and Spanish
** put "de" before the unit when the number is `many` (1.2 million has
** exponent 6: CLDR's operand e), and French elides it before a vowel. */
static const struct {
    const char *lang, *unit, *want;
} compact_langs[] = {
    {"de", "Menschen", "A: 1,2 Millionen Menschen (12 Symbole). B: 412,5 Tausend Menschen"},
    {"fr", "habitants", "A\u00a0: 1,2 million d\u2019habitants (12 ic\u00f4nes). "
                        "B\u00a0: 412,5 mille habitants"},
    {"fr", "personnes", "A\u00a0: 1,2 million de personnes"},
    {"es", "personas", "A: 1,2 millones de personas (12 iconos). B: 412,5 mil personas"},
    {"pt", "pessoas", "A: 1,2 milh\u00e3o de pessoas (12 \u00edcones). B: 412,5 mil pessoas"},
    {"pl", "os\u00f3b", "A: 1,2 miliona os\u00f3b (12 ikon). B: 412,5 tysi\u0105ca os\u00f3b"},
    {"zh-Hans", "\u4eba", "A\uff1a120\u4e07 \u4eba\uff0812 \u4e2a\u56fe\u6807\uff09\u3002"
                          "B\uff1a41.2\u4e07 \u4eba"},
};

START_TEST(test_compact_languages)
{
    char text[512];
    snprintf(text, sizeof text, "title: T\nform: rows\nicon-value: 100000\nlang: %s\n"
             "unit-label: %s\nnumber-format: compact\ncategories:\n"
             "  - {label: A, count: 1200000}\n  - {label: B, count: 412487}\n",
             compact_langs[_i].lang, compact_langs[_i].unit);
    char *d = describe_text(text);
    ck_assert_msg(strstr(d, compact_langs[_i].want), "%s\nwant %s", d, compact_langs[_i].want);
    ug_free(d);
}
END_TEST

/* A bound says what is true of the exact count: the published part of North
** is 1,299,999, so "more than 1.2 million" (rounded down; half up would say
** 1.3 million, which is more than there are), and a hidden count under 10
** stays "fewer than 10". */
START_TEST(test_compact_bounds_stay_true)
{
    char *d = describe_text("title: T\nform: rows\nicon-value: 100000\n"
                            "unit-label: households\nnumber-format: compact\n"
                            "suppress: {below: 10, margins: hidden}\n"
                            "groups: [North, South]\ncategories:\n"
                            "  - {label: A, counts: [1299999, 2500000]}\n"
                            "  - {label: B, counts: [3, 1000000]}\n");
    ck_assert_msg(strstr(d, "North, more than 1.2 million households in all: A 1.3 "
                            "million households (13 icons), B fewer than 10."), "%s", d);
    ck_assert_msg(strstr(d, "South, 3.5 million households in all"), "%s", d);
    ug_free(d);
    d = describe_text("title: T\nform: rows\nicon-value: 100000\ncurrency: USD\n"
                      "suppress: {below: 10, margins: hidden}\n"
                      "groups: [North, South]\ncategories:\n"
                      "  - {label: A, counts: [1299999, 2500000]}\n"
                      "  - {label: B, counts: [3, 1000000]}\n");
    ck_assert_msg(strstr(d, "North, more than $1,299,999 in all"), "%s", d);
    ck_assert_msg(strstr(d, "B less than $10."), "%s", d);
    ck_assert_msg(strstr(d, "Amounts below $10 are not shown (\u201cless than $10\u201d)."),
                  "%s", d);
    ug_free(d);
    /* the same in German: the catalog's words, CLDR's money format (de.xml
    ** currencyFormats standard "#,##0.00 ¤", whole amounts without cents) */
    d = describe_text("title: T\nform: rows\nicon-value: 100000\ncurrency: EUR\nlang: de\n"
                      "suppress: {below: 10, margins: hidden}\n"
                      "groups: [North, South]\ncategories:\n"
                      "  - {label: A, counts: [1299999, 2500000]}\n"
                      "  - {label: B, counts: [3, 1000000]}\n");
    ck_assert_msg(strstr(d, "B weniger als 10\u00a0\u20ac."), "%s", d);
    ck_assert_msg(strstr(d, "Betr\u00e4ge unter 10\u00a0\u20ac werden nicht angezeigt"), "%s", d);
    ug_free(d);
}
END_TEST

static Suite *describe_suite(void)
{
    Suite *s = suite_create("describe");
    TCase *t = tcase_create("describe");
    tcase_add_test(t, test_waffle_sentences);
    tcase_add_test(t, test_percent_sentences);
    tcase_add_test(t, test_percent_german);
    tcase_add_test(t, test_compact_money_sentences);
    tcase_add_loop_test(t, test_compact_languages, 0,
                        sizeof compact_langs / sizeof compact_langs[0]);
    tcase_add_test(t, test_compact_bounds_stay_true);
    tcase_add_test(t, test_percent_groups);
    tcase_add_test(t, test_half_percent_cells);
    tcase_add_test(t, test_biproportional_says_totals_agree);
    tcase_add_test(t, test_groups_and_suppression);
    tcase_add_test(t, test_change_between_periods);
    tcase_add_test(t, test_change_in_other_languages);
    tcase_add_test(t, test_waffle_of_glyphs_says_icons);
    tcase_add_test(t, test_group_label_names_the_share);
    tcase_add_test(t, test_layout_description_wins);
    tcase_add_loop_test(t, test_number_grouping, 0, sizeof numbers / sizeof numbers[0]);
    suite_add_tcase(s, t);
    return s;
}

int main(void)
{
    return check_run(describe_suite());
}
