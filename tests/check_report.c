/* Tests for src/report.c: a chart's allocation (one apportionment per group)
** and the report in text, CSV and JSON. Charts are built by hand in their
** arena, as the layout loader would build them.
**
** The numbers come from published apportionment examples (REFERENCES.md §1):
** the report must show their quotas and icons exactly, and shown values and
** differences that follow from them (shown = icons x V, or icons x total /
** cells). The labels are invented (demo data). */
#include <check.h>
#include <stdlib.h>
#include <string.h>

#include "alloc.h"
#include "check_run.h"

/* ---- building a chart by hand -------------------------------------------- */

typedef struct {
    const char *label;
    const char *counts[3]; /* one per group */
} cat_spec;

static ug_dec dec(const char *text)
{
    ug_dec d;
    ck_assert_int_eq(ug_dec_parse(text, strlen(text), &d), UG_DEC_OK);
    return d;
}

static ug_chart *new_chart(const char *const *groups, size_t ngroups,
                           const cat_spec *cats, size_t ncats)
{
    ug_chart *c = ug_calloc(1, sizeof *c);
    ck_assert_ptr_nonnull(c);
    c->path = "pantry.yaml";
    c->form = UG_FORM_ROWS;
    c->limits.max_icons = UG_DEFAULT_MAX_ICONS;
    c->groups.n = ngroups;
    c->groups.items = ug_arena_alloc(&c->arena, (ngroups + 1) * sizeof(ug_text));
    for (size_t g = 0; g < ngroups; g++)
        c->groups.items[g] = (ug_text){groups[g], {"pantry.yaml", 9, (unsigned)g + 10}};
    c->ncats = ncats;
    c->cats = ug_arena_alloc(&c->arena, ncats * sizeof *c->cats);
    for (size_t i = 0; i < ncats; i++) {
        ug_category *k = &c->cats[i];
        k->label.text = cats[i].label;
        k->counts = ug_arena_alloc(&c->arena, 3 * sizeof *k->counts);
        for (size_t g = 0; g < (ngroups ? ngroups : 1); g++)
            k->counts[g] = dec(cats[i].counts[g]);
    }
    return c;
}

static ug_chart *waffle(ug_chart *c, long cells)
{
    c->form = UG_FORM_WAFFLE;
    c->has_cells = true;
    c->cells = cells;
    return c;
}

static ug_chart *valued(ug_chart *c, const char *v)
{
    c->has_icon_value = true;
    c->icon_value = dec(v);
    return c;
}

static void free_chart(ug_chart *c)
{
    ug_arena_free(&c->arena);
    ug_free(c);
}

static char *report(const ug_chart *c, ug_report_format fmt)
{
    ug_allocation *a;
    ug_error err = {0};
    ck_assert_msg(ug_chart_allocate(c, &a, &err) == UG_OK, "%s", err.msg);
    char *out;
    size_t len;
    ck_assert_int_eq(ug_allocation_report(a, fmt, &out, &len, &err), UG_OK);
    ck_assert_uint_eq(len, strlen(out));
    ug_allocation_free(a);
    return out;
}

static void expect_report(ug_chart *c, ug_report_format fmt, const char *want)
{
    char *got = report(c, fmt);
    ck_assert_str_eq(got, want);
    ug_free(got);
    free_chart(c);
}

/* ---- the tests ------------------------------------------------------------ */

static const cat_spec clubs[] = {
    {"Reading club", {"33"}}, {"Chess club", {"33"}}, {"Garden club", {"34"}}};

/* Tannenbaum-style clubs example (REFERENCES.md §1): 3, 3, 4 of 10 cells. */
START_TEST(test_csv_waffle_clubs)
{
    expect_report(waffle(new_chart(NULL, 0, clubs, 3), 10), UG_REPORT_CSV,
                  "group,category,count,quota,icons,shown,difference,status\n"
                  ",Reading club,33,3.3,3,30,-3,exact\n"
                  ",Chess club,33,3.3,3,30,-3,exact\n"
                  ",Garden club,34,3.4,4,40,6,exact\n");
}
END_TEST

/* German Wikipedia, "Hare-Niemeyer-Verfahren": 23, 32, 2, 3 of 60. Quotas
** such as 216 x 60 / 580 = 22.3448275... are printed rounded to six places;
** shown = 23 x 580 / 60 = 222.3333... */
START_TEST(test_csv_repeating_decimals)
{
    static const cat_spec cats[] = {
        {"A", {"216"}}, {"B", {"310"}}, {"C", {"22"}}, {"D", {"32"}}};
    expect_report(waffle(new_chart(NULL, 0, cats, 4), 60), UG_REPORT_CSV,
                  "group,category,count,quota,icons,shown,difference,status\n"
                  ",A,216,22.344828,23,222.333333,6.333333,exact\n"
                  ",B,310,32.068966,32,309.333333,-0.666667,exact\n"
                  ",C,22,2.275862,2,19.333333,-2.666667,exact\n"
                  ",D,32,3.310345,3,29,-3,exact\n");
}
END_TEST

/* Each group is apportioned on its own (FORMAT.md §3): the first group is the
** Hare quota example from Wikipedia, "Largest remainder method" (5, 2, 1, 1,
** 1, 0 of 10), the second the clubs example padded with zeros. Stated icon
** value: 10000 and 10 would differ, so this uses cells. Group and category
** names exercise CSV quoting (RFC 4180: commas, quotes, line breaks). */
START_TEST(test_csv_groups_and_quoting)
{
    static const char *const groups[] = {"North, East", "River \"old\" ward"};
    static const cat_spec cats[] = {
        {"Adults", {"47000", "33"}},        {"Children, under 18", {"16000", "33"}},
        {"Seniors \"65+\"", {"15800", "34"}}, {"Two\nlines", {"12000", "0"}},
        {"Students", {"6100", "0"}},         {"Other", {"3100", "0"}}};
    expect_report(waffle(new_chart(groups, 2, cats, 6), 10), UG_REPORT_CSV,
                  "group,category,count,quota,icons,shown,difference,status\n"
                  "\"North, East\",Adults,47000,4.7,5,50000,3000,exact\n"
                  "\"North, East\",\"Children, under 18\",16000,1.6,2,20000,4000,exact\n"
                  "\"North, East\",\"Seniors \"\"65+\"\"\",15800,1.58,1,10000,-5800,exact\n"
                  "\"North, East\",\"Two\nlines\",12000,1.2,1,10000,-2000,exact\n"
                  "\"North, East\",Students,6100,0.61,1,10000,3900,exact\n"
                  "\"North, East\",Other,3100,0.31,0,0,-3100,exact\n"
                  "\"River \"\"old\"\" ward\",Adults,33,3.3,3,30,-3,exact\n"
                  "\"River \"\"old\"\" ward\",\"Children, under 18\",33,3.3,3,30,-3,exact\n"
                  "\"River \"\"old\"\" ward\",\"Seniors \"\"65+\"\"\",34,3.4,4,40,6,exact\n"
                  "\"River \"\"old\"\" ward\",\"Two\nlines\",0,0,0,0,0,exact\n"
                  "\"River \"\"old\"\" ward\",Students,0,0,0,0,0,exact\n"
                  "\"River \"\"old\"\" ward\",Other,0,0,0,0,0,exact\n");
}
END_TEST

/* JSON strings (RFC 8259 §7): quote and backslash escaped, control characters
** as \u00XX, UTF-8 passed through. staatsrecht.honikel.de example with a
** stated value V = 1200: largest remainder 5, 4, 1. */
START_TEST(test_json_escaping)
{
    static const cat_spec cats[] = {
        {"Say \"hi\"", {"6100"}}, {"back\\slash\ttab", {"5000"}}, {"Café ✓", {"900"}}};
    expect_report(valued(new_chart(NULL, 0, cats, 3), "1200"), UG_REPORT_JSON,
                  "[\n"
                  "  {\"group\": \"\", \"category\": \"Say \\\"hi\\\"\", "
                  "\"status\": \"exact\", \"count\": 6100, \"quota\": 5.083333, \"icons\": 5, "
                  "\"shown\": 6000, \"difference\": -100},\n"
                  "  {\"group\": \"\", \"category\": \"back\\\\slash\\u0009tab\", "
                  "\"status\": \"exact\", \"count\": 5000, \"quota\": 4.166667, \"icons\": 4, "
                  "\"shown\": 4800, \"difference\": -200},\n"
                  "  {\"group\": \"\", \"category\": \"Café ✓\", "
                  "\"status\": \"exact\", \"count\": 900, \"quota\": 0.75, \"icons\": 1, "
                  "\"shown\": 1200, \"difference\": 300}\n"
                  "]\n");
}
END_TEST

/* Divisor methods in the report: wahlrecht.de, "Verfahren" (4160, 3380, 2460
** -> D'Hondt 4, 4, 2; Sainte-Lague 4, 3, 3), at V = 1000. */
START_TEST(test_csv_divisor_methods)
{
    static const cat_spec cats[] = {
        {"A", {"4160"}}, {"B", {"3380"}}, {"C", {"2460"}}};
    ug_chart *c = valued(new_chart(NULL, 0, cats, 3), "1000");
    c->method = UG_METHOD_DHONDT;
    expect_report(c, UG_REPORT_CSV,
                  "group,category,count,quota,icons,shown,difference,status\n"
                  ",A,4160,4.16,4,4000,-160,exact\n"
                  ",B,3380,3.38,4,4000,620,exact\n"
                  ",C,2460,2.46,2,2000,-460,exact\n");
    c = valued(new_chart(NULL, 0, cats, 3), "1000");
    c->method = UG_METHOD_SAINTE_LAGUE;
    expect_report(c, UG_REPORT_CSV,
                  "group,category,count,quota,icons,shown,difference,status\n"
                  ",A,4160,4.16,4,4000,-160,exact\n"
                  ",B,3380,3.38,3,3000,-380,exact\n"
                  ",C,2460,2.46,3,3000,540,exact\n");
}
END_TEST

static const char text_clubs[] =
    "Each icon = 1/10 of the total; method: largest remainder\n"
    "  category                        count        quota    icons        shown   difference    rel %\n"
    "  Reading club                       33          3.3        3           30           -3     -9.1\n"
    "  Chess club                         33          3.3        3           30           -3     -9.1\n"
    "  Garden club                        34          3.4        4           40            6     17.6\n"
    "  total                             100                    10\n";

START_TEST(test_text_waffle_clubs)
{
    expect_report(waffle(new_chart(NULL, 0, clubs, 3), 10), UG_REPORT_TEXT,
                  text_clubs);
}
END_TEST

/* Partial rounding draws every quota exactly: the icons column and its total
** are quotas (4.125 + 0.8 + 2 = 6.925), shown equals the count. */
START_TEST(test_text_partial)
{
    static const cat_spec cats[] = {
        {"Adults", {"41.25"}}, {"Children", {"8"}}, {"Seniors", {"20"}}};
    ug_chart *c = valued(new_chart(NULL, 0, cats, 3), "10");
    c->rounding = UG_ROUND_PARTIAL;
    c->unit_label.text = "households";
    expect_report(c, UG_REPORT_TEXT,
        "Each icon = 10 households; method: largest remainder (partial icons)\n"
        "  category                        count        quota    icons        shown   difference    rel %\n"
        "  Adults                          41.25        4.125    4.125        41.25            0      0.0\n"
        "  Children                            8          0.8      0.8            8            0      0.0\n"
        "  Seniors                            20            2        2           20            0      0.0\n"
        "  total                           69.25                 6.925\n");
}
END_TEST

/* With groups the text report names each group before its table. */
START_TEST(test_text_groups)
{
    static const char *const groups[] = {"North ward", "Hill ward"};
    static const cat_spec cats[] = {
        {"Reading club", {"33", "6"}}, {"Chess club", {"33", "6"}},
        {"Garden club", {"34", "2"}}};
    ug_chart *c = waffle(new_chart(groups, 2, cats, 3), 10);
    char *got = report(c, UG_REPORT_TEXT);
    /* clubs example, then the Alabama paradox at 10 seats (4, 4, 2) */
    ck_assert(strstr(got, "\nNorth ward\n  category") != NULL);
    ck_assert(strstr(got, "\nHill ward\n  category") != NULL);
    ck_assert(strstr(got, "  Garden club                         2     1.428571        2") != NULL);
    ck_assert(strstr(got, "  Reading club                        6     4.285714        4") != NULL);
    ug_free(got);
    free_chart(c);
}
END_TEST

/* method: biproportional on layouts/wards.csv's counts (demo data), worked
** by hand in tests/data/expected/CHECKED.md: both margins, the divisors
** (86/9, 128/13, 54/5 for the age groups, 1 for every ward) and the tie the
** rule decided in the age groups' shares. */
START_TEST(test_text_biproportional)
{
    static const char *const groups[] = {"North ward", "River ward", "Hill ward"};
    static const cat_spec cats[] = {{"Adults", {"124", "85", "43"}},
                                    {"Children", {"64", "51", "8"}},
                                    {"Older people", {"38", "27", "19"}}};
    ug_chart *c = valued(new_chart(groups, 3, cats, 3), "10");
    c->method = UG_METHOD_BIPROPORTIONAL;
    char *got = report(c, UG_REPORT_TEXT);
    static const char *const lines[] = {
        ("method: biproportional (group and category totals each by Sainte-Lague "
         "from one N)\n"),
        "\nAll groups\n",
        "  Adults                            252         25.2       26     9.555556\n",
        "  Children                          123         12.3       12     9.846154\n",
        "  Older people                       84          8.4        8         10.8\n",
        "  total                                                    46\n",
        "  River ward                          1       16 icons\n",
        "\nRiver ward\n  category",
        "  Older people                       27          2.7        2           20",
        "groups' shares no, categories' shares yes, cells 0.\n"};
    for (size_t k = 0; k < sizeof lines / sizeof *lines; k++)
        ck_assert_msg(strstr(got, lines[k]) != NULL, "missing '%s' in\n%s", lines[k], got);
    ug_free(got);
    free_chart(c);
}
END_TEST

/* The automatic icon value is the smallest nice value (1, 2, 2.5, 5 x 10^k;
** unitgram's own choice, common practice, no source) that fits the longest
** line in the columns: 412 on 20 columns -> 25 (16.48 rounds to 16). */
START_TEST(test_auto_value)
{
    static const cat_spec cats[] = {{"Adults", {"300"}}, {"Children", {"112"}}};
    ug_chart *c = new_chart(NULL, 0, cats, 2);
    c->has_icon_value = c->icon_value_auto = true;
    c->unit_label.text = "households";
    char *got = report(c, UG_REPORT_TEXT);
    ck_assert(strncmp(got, "Each icon = 25 households;", 26) == 0);
    ck_assert(strstr(got, "  total                             412                    16\n"));
    ug_free(got);
    /* split lines: the longest single category (300) decides -> 20 */
    c->arrangement = UG_ARRANGE_SPLIT;
    got = report(c, UG_REPORT_TEXT);
    ck_assert(strncmp(got, "Each icon = 20 households;", 26) == 0);
    ug_free(got);
    free_chart(c);
}
END_TEST

/* The largest numbers the format allows: 999 counts of 10^15 + 0.999999 and
** one of 0.5 in a waffle at the icon ceiling. The report forms products of
** about 10^34 here, inside 128 bits (run under UBSan to see no overflow).
** Each large quota is 10010.01001...: 999 x 10010 leaves 10 cells for the
** first 10 listed (equal remainders). Shown values recomputed with exact
** rationals (Python fractions): 10011 x total / 10^7. */
START_TEST(test_csv_largest_numbers)
{
    static cat_spec cats[1000];
    static char labels[1000][16];
    for (int i = 0; i < 1000; i++) {
        snprintf(labels[i], sizeof labels[i], "C%d", i + 1);
        cats[i].label = labels[i];
        cats[i].counts[0] = i < 999 ? "1000000000000000.999999" : "0.5";
    }
    ug_chart *c = waffle(new_chart(NULL, 0, cats, 1000), ALLOC_MAX_ICONS);
    c->limits.max_icons = ALLOC_MAX_ICONS;
    char *got = report(c, UG_REPORT_CSV);
    ck_assert(strstr(got, "\n,C1,1000000000000000.999999,10010.01001,10011,"
                          "1000098900000001.000598,98900000000.000599,exact\n"));
    ck_assert(strstr(got, "\n,C10,1000000000000000.999999,10010.01001,10011,"));
    ck_assert(strstr(got, "\n,C11,1000000000000000.999999,10010.01001,10010,"));
    ck_assert(strstr(got, "\n,C1000,0.5,0,0,0,-0.5,exact\n"));
    ug_free(got);
    got = report(c, UG_REPORT_TEXT);
    ck_assert(strstr(got, "  C1000                             0.5            0        0"
                          "            0         -0.5   -100.0\n"));
    ug_free(got);
    free_chart(c);
}
END_TEST

/* A group beyond the icon limit names that group's place in the layout. */
START_TEST(test_limit_names_group)
{
    static const char *const groups[] = {"North ward", "Hill ward"};
    static const cat_spec cats[] = {{"Adults", {"10", "2000"}}};
    ug_chart *c = valued(new_chart(groups, 2, cats, 1), "1");
    c->limits.max_icons = 1000;
    ug_allocation *a = (ug_allocation *)&a;
    ug_error err = {0};
    ck_assert_int_eq(ug_chart_allocate(c, &a, &err), UG_ELIMIT);
    ck_assert_ptr_null(a);
    char buf[700];
    ck_assert_str_eq(ug_error_format(&err, buf, sizeof buf),
                     "pantry.yaml:9:11: 2000 at 1 each would need more than 1000 "
                     "icons, the limit; state a larger icon value or raise the "
                     "limit (--max-icons)");
    free_chart(c);
}
END_TEST

/* Fail each allocation in turn: every failure is reported, nothing leaks
** (run under valgrind or ASan to see the latter), *out stays NULL. */
START_TEST(test_out_of_memory_each_step)
{
    static const char *const groups[] = {"North", "Hill"};
    static const cat_spec cats[] = {
        {"A", {"1", "2"}}, {"B", {"3", "4"}}, {"C", {"5", "6.5"}}};
    ug_chart *c = waffle(new_chart(groups, 2, cats, 3), 10);
    c->method = (ug_method)_i;
    bool done = false;
    for (long k = 0; !done && k < 100; k++) {
        ug_allocation *a = NULL;
        ug_error err = {0};
        char *out = NULL;
        ug_mem_fail_after(k);
        ug_status st = ug_chart_allocate(c, &a, &err);
        if (st == UG_OK)
            st = ug_allocation_report(a, UG_REPORT_JSON, &out, NULL, &err);
        ug_mem_fail_after(-1);
        if (st == UG_OK) {
            done = true;
            ck_assert(strstr(out, "\"category\": \"C\"") != NULL);
        } else {
            ck_assert_int_eq(st, UG_ENOMEM);
            ck_assert_str_eq(err.msg, "out of memory");
            ck_assert_ptr_null(out);
        }
        ug_free(out);
        ug_allocation_free(a);
    }
    ck_assert(done);
    free_chart(c);
}
END_TEST

/* The published table of a percent chart: the shares as given, a `measure`
** column saying so, and no total rows (no sum of shares is published); a
** table of counts keeps its columns as before. */
static char *table_of(const char *yaml)
{
    ug_chart *c = NULL;
    ug_allocation *a = NULL;
    ug_error err = {0};
    char *out = NULL;
    ck_assert_msg(ug_chart_load_string(yaml, strlen(yaml), "t.yaml", NULL, &c, &err)
                  == UG_OK, "%s", err.msg);
    ck_assert_int_eq(ug_chart_allocate(c, &a, &err), UG_OK);
    const ug_allocation *one[] = {a};
    ck_assert_int_eq(ug_table_csv(one, 1, &out, NULL, &err), UG_OK);
    ug_allocation_free(a);
    ug_chart_free(c);
    return out;
}

/* 62.5 and 37.5 tie at .5: the larger count gets the cell (alloc.c's rule). */
START_TEST(test_table_of_shares)
{
    char *t = table_of("form: waffle\ncounts-are: percent\ngroups: [N, S]\ncategories:\n"
                       "  - {label: Gas, counts: [62.5, 41]}\n"
                       "  - {label: Pump, counts: [37.5, 59]}\n");
    ck_assert_str_eq(t, "group,category,count,icons,status,level,measure\n"
                        "N,Gas,62.5,63,exact,cell,percent\n"
                        "N,Pump,37.5,37,exact,cell,percent\n"
                        "S,Gas,41,41,exact,cell,percent\n"
                        "S,Pump,59,59,exact,cell,percent\n");
    ug_free(t);
    t = table_of("form: waffle\ncategories: [{label: Gas, count: 5}]\n");
    ck_assert_msg(!strncmp(t, "group,category,count,icons,status,level\n", 40), "%s", t);
    ug_free(t);
}
END_TEST

static Suite *report_suite(void)
{
    Suite *s = suite_create("report");
    TCase *tc = tcase_create("core");
    tcase_add_test(tc, test_csv_waffle_clubs);
    tcase_add_test(tc, test_table_of_shares);
    tcase_add_test(tc, test_csv_repeating_decimals);
    tcase_add_test(tc, test_csv_groups_and_quoting);
    tcase_add_test(tc, test_json_escaping);
    tcase_add_test(tc, test_csv_divisor_methods);
    tcase_add_test(tc, test_text_waffle_clubs);
    tcase_add_test(tc, test_text_partial);
    tcase_add_test(tc, test_text_groups);
    tcase_add_test(tc, test_text_biproportional);
    tcase_add_test(tc, test_auto_value);
    tcase_add_test(tc, test_csv_largest_numbers);
    tcase_add_test(tc, test_limit_names_group);
    tcase_add_loop_test(tc, test_out_of_memory_each_step, 0, 3);
    suite_add_tcase(s, tc);
    return s;
}

int main(void)
{
    return check_run(report_suite());
}
