/* Tests for src/audit.c on hand-built charts: each rule has a chart that
** triggers it and a near-identical one that does not. Contrast check values
** are WCAG 2.x pairs from REFERENCES.md §3 (W3C relative luminance and
** contrast ratio); the agency thresholds are REFERENCES.md §7. */
#define _POSIX_C_SOURCE 200809L
#include <check.h>
#include <glob.h>
#include <stdlib.h>
#include <string.h>

#include "audit.h"
#include "resolve.h"
#include "color.h"
#include "check_run.h"

#define MAXC 10

typedef struct {
    const char *label;
    unsigned color;              /* 0xRRGGBB; 0x1000000 = from the palette */
    const char *counts[3];
} cat_spec;

#define PALETTE 0x1000000u

static ug_color hex(unsigned v)
{
    return color_rgb((v >> 16) & 255, (v >> 8) & 255, v & 255);
}

static ug_dec dec(const char *s)
{
    ug_dec d;
    ck_assert_int_eq(ug_dec_parse(s, strlen(s), &d), UG_DEC_OK);
    return d;
}

/* A rows chart, fully labelled, `value` per icon, white background, ink
** #222222; category i's count in group g is at test.yaml:(10 + 3i + g):12. */
static ug_chart *chart_new(const cat_spec *cats, size_t n, size_t ngroups,
                           const char *value)
{
    static const char *group_names[] = {"North ward", "River ward", "Hill ward"};
    ug_chart *c = ug_calloc(1, sizeof *c);
    c->path = "test.yaml";
    resolve_defaults(c); /* as the loader does */
    c->title = (ug_text){"Households served (demo data)", {"test.yaml", 1, 8}};
    c->unit_label = (ug_text){"households", {"test.yaml", 3, 13}};
    /* both English forms, so "Each icon = 1 household" (unit-plural) */
    c->unit_forms[UG_PLURAL_ONE] = (ug_text){"household", {"test.yaml", 3, 20}};
    c->unit_forms[UG_PLURAL_OTHER] = c->unit_label;
    c->has_unit_forms = true;
    c->source.items = ug_arena_alloc(&c->arena, sizeof(ug_text));
    c->source.items[0] = (ug_text){"Alder Lane Pantry log (demo data)", {"test.yaml", 2, 9}};
    c->source.n = 1;
    c->form = UG_FORM_ROWS;
    c->has_icon_value = true;
    c->icon_value = dec(value);
    c->style.background = hex(0xffffff);
    c->style.ink = hex(0x222222);
    c->style.palette = UG_PALETTE_OKABE_ITO;
    c->categories_mark = (ug_mark){"test.yaml", 9, 1};
    if (ngroups) {
        c->groups.items = ug_arena_alloc(&c->arena, ngroups * sizeof(ug_text));
        for (size_t g = 0; g < ngroups; g++)
            c->groups.items[g] = (ug_text){group_names[g], {"test.yaml", 5, 10 + 12 * (unsigned)g}};
        c->groups.n = ngroups;
    }
    size_t ng = chart_ngroups(c);
    c->cats = ug_arena_alloc(&c->arena, n * sizeof *c->cats);
    c->ncats = n;
    for (size_t i = 0; i < n; i++) {
        ug_category *k = &c->cats[i];
        k->id = cats[i].label;
        k->label = (ug_text){cats[i].label, {"test.yaml", 10 + 3 * (unsigned)i, 5}};
        k->mark = (ug_mark){"test.yaml", 10 + 3 * (unsigned)i, 3};
        k->color_given = cats[i].color != PALETTE;
        k->color = k->color_given ? hex(cats[i].color) : color_palette_at(UG_PALETTE_OKABE_ITO, i);
        k->color.mark = (ug_mark){"test.yaml", 11 + 3 * (unsigned)i, 12};
        k->counts = ug_arena_alloc(&c->arena, ng * sizeof *k->counts);
        k->count_marks = ug_arena_alloc(&c->arena, ng * sizeof *k->count_marks);
        for (size_t g = 0; g < ng; g++) {
            k->counts[g] = dec(cats[i].counts[g]);
            k->count_marks[g] = (ug_mark){"test.yaml", 12 + 3 * (unsigned)i, 13 + 6 * (unsigned)g};
        }
    }
    return c;
}

static void chart_done(ug_chart *c)
{
    ug_arena_free(&c->arena);
    ug_free(c);
}

static void set_ignore(ug_chart *c, const char *rule)
{
    c->audit.ignore.items = ug_arena_alloc(&c->arena, sizeof(ug_text));
    c->audit.ignore.items[0] = (ug_text){rule, {"test.yaml", 40, 12}};
    c->audit.ignore.n = 1;
}

static ug_findings *audit(const ug_chart *c)
{
    ug_findings *f = NULL;
    ug_error err = {0};
    ug_status st = ug_chart_audit(c, &f, &err);
    ck_assert_msg(st == UG_OK, "audit failed: %s", err.msg);
    return f;
}

/* The first finding of `rule`, or NULL. */
static const ug_finding *find(const ug_findings *f, const char *rule)
{
    for (size_t i = 0; i < ug_findings_count(f); i++)
        if (!strcmp(ug_findings_at(f, i)->rule, rule))
            return ug_findings_at(f, i);
    return NULL;
}

/* Audit c; it must produce `rule` at line:col with the given fix prefix.
** fix and msg (512 bytes), when given, get copies of the finding's texts.
** Frees the chart and the findings. */
static void expect_full(ug_chart *c, const char *rule, ug_severity sev, unsigned line,
                        unsigned col, const char *fix_prefix, char *fix, char *msg)
{
    ug_findings *f = audit(c);
    const ug_finding *it = find(f, rule);
    ck_assert_msg(it != NULL, "no %s finding", rule);
    ck_assert_int_eq(it->severity, sev);
    ck_assert_msg(it->source && it->source[0], "%s finding names no source", rule);
    ck_assert_str_eq(it->where.file, "test.yaml");
    ck_assert_uint_eq(it->where.line, line);
    ck_assert_uint_eq(it->where.column, col);
    if (fix_prefix) {
        ck_assert_ptr_nonnull(it->fix);
        ck_assert_msg(!strncmp(it->fix, fix_prefix, strlen(fix_prefix)),
                      "fix '%s' does not start with '%s'", it->fix, fix_prefix);
    }
    if (fix)
        snprintf(fix, 512, "%s", it->fix ? it->fix : "");
    if (msg)
        snprintf(msg, 512, "%s", it->message);
    ug_findings_free(f);
    chart_done(c);
}

static void expect(ug_chart *c, const char *rule, ug_severity sev, unsigned line,
                   unsigned col, const char *fix_prefix)
{
    expect_full(c, rule, sev, line, col, fix_prefix, NULL, NULL);
}

/* The colour in a fix of the form color: "#rrggbb" ... */
static ug_color fix_color(const char *fix)
{
    unsigned v;
    ck_assert_int_eq(sscanf(fix, "color: \"#%6x\"", &v), 1);
    return hex(v);
}

static void expect_none(ug_chart *c, const char *rule)
{
    ug_findings *f = audit(c);
    ck_assert_msg(!find(f, rule), "unexpected %s: %s", rule,
                  find(f, rule) ? find(f, rule)->message : "");
    ug_findings_free(f);
    chart_done(c);
}

/* ---- honesty ------------------------------------------------------------- */

/* 95 and 4 at 10 each: N = 10, quotas 9.5 and 0.4, the leftover icon goes to
** 9.5, so 4 households get no icon. At 2 each every category shows within
** 10 % (96 and 4), at 2.5 the 4 shows as 5 (25 %): 2 is the fix. */
static const cat_spec vanish[] = {{"Adults", 0x0072b2, {"95"}}, {"Infants", 0x000000, {"4"}}};

START_TEST(test_vanished_category)
{
    char msg[512];
    expect_full(chart_new(vanish, 2, 0, "10"), "vanished-category", UG_SEVERITY_ERROR,
                15, 13, "icon-value: 2 keeps every category visible", NULL, msg);
    ck_assert_str_eq(msg, "'Infants' has 4 households but gets no icon, so it "
                          "disappears from the picture");
    ug_chart *ok = chart_new(vanish, 2, 0, "10");
    ok->rounding = UG_ROUND_PARTIAL; /* a clipped icon shows the 0.4 */
    expect_none(ok, "vanished-category");
    expect_none(chart_new(vanish, 2, 0, "2"), "vanished-category");
}
END_TEST

/* 94 and 6 at 10 each: 9.4 and 0.6 give 9 and 1, so 6 shows as 10 (67 %). */
static const cat_spec rounded[] = {{"Adults", 0x0072b2, {"94"}}, {"Children", 0x000000, {"6"}}};

START_TEST(test_rounding_difference)
{
    expect(chart_new(rounded, 2, 0, "10"), "rounding-difference", UG_SEVERITY_WARNING,
           15, 13, "icon-value: 2 keeps");
    /* With groups the message names the group. */
    static const cat_spec grouped[] = {{"Adults", 0x0072b2, {"94", "50"}},
                                       {"Children", 0x000000, {"6", "50"}}};
    char msg[512];
    expect_full(chart_new(grouped, 2, 2, "10"), "rounding-difference",
                UG_SEVERITY_WARNING, 15, 13, NULL, NULL, msg);
    ck_assert_str_eq(msg, "'Children' in North ward has 6 households but its icons "
                          "show 10.00, more than 10 % off");
    ug_chart *ok = chart_new(rounded, 2, 0, "10");
    ok->audit.has_tolerance = true;
    ok->audit.tolerance_percent = dec("70");
    expect_none(ok, "rounding-difference");
    ug_chart *edge = chart_new(rounded, 2, 0, "10");
    edge->audit.has_tolerance = true;
    edge->audit.tolerance_percent = dec("66.666666"); /* 4/6 is 66.666...7 % */
    expect(edge, "rounding-difference", UG_SEVERITY_WARNING, 15, 13, NULL);
}
END_TEST

/* The rounding rules judge the icons drawn. layouts/wards.csv's counts
** (demo data) at 10 each: per ward, largest remainder gives River ward's 27
** older people 3 icons (30, 11 % off); the biproportional table (FORMAT.md
** §7) gives them 2 (20, 26 % off) so that the older people's icons over all
** wards are their own share, 8 of 46. Hill ward's 8 children show as 10 in
** both. */
START_TEST(test_rounding_uses_biproportional_icons)
{
    static const cat_spec wards[] = {{"Adults", 0x0072b2, {"124", "85", "43"}},
                                     {"Children", 0xd55e00, {"64", "51", "8"}},
                                     {"Older people", 0x009e73, {"38", "27", "19"}}};
    char msg[512];
    ug_chart *bp = chart_new(wards, 3, 3, "10");
    bp->method = UG_METHOD_BIPROPORTIONAL;
    bp->audit.has_tolerance = true;
    bp->audit.tolerance_percent = dec("20");
    expect_full(bp, "rounding-difference", UG_SEVERITY_WARNING, 18, 19, NULL, NULL, msg);
    ck_assert_str_eq(msg, "'Older people' in River ward has 27 households but its "
                          "icons show 20.00, more than 20 % off");
    ug_chart *lr = chart_new(wards, 3, 3, "10");
    lr->audit.has_tolerance = true;
    lr->audit.tolerance_percent = dec("20");
    expect_full(lr, "rounding-difference", UG_SEVERITY_WARNING, 15, 25, NULL, NULL, msg);
    ck_assert_str_eq(msg, "'Children' in Hill ward has 8 households but its icons "
                          "show 10.00, more than 20 % off");
}
END_TEST

/* With no nice value working (1 and 1000000 can't both show within 10 % at
** or under the icon limit with rows), the fix is partial rounding. */
START_TEST(test_rounding_fix_partial)
{
    static const cat_spec wide[] = {{"Many", 0x0072b2, {"1000000000"}},
                                    {"One", 0x000000, {"1"}}};
    expect(chart_new(wide, 2, 0, "1000000"), "vanished-category", UG_SEVERITY_ERROR,
           15, 13, "rounding: partial");
}
END_TEST

static const cat_spec totalled[] = {{"Adults", 0x0072b2, {"60"}}, {"Children", 0x000000, {"41"}}};

START_TEST(test_total_mismatch)
{
    ug_chart *c = chart_new(totalled, 2, 0, "1");
    c->has_total = true;
    c->total = dec("100");
    c->total_mark = (ug_mark){"test.yaml", 30, 8};
    expect(c, "total-mismatch", UG_SEVERITY_ERROR, 30, 8, "total: 101");
    ug_chart *ok = chart_new(totalled, 2, 0, "1");
    ok->has_total = true;
    ok->total = dec("101");
    expect_none(ok, "total-mismatch");
}
END_TEST

/* ---- privacy ------------------------------------------------------------- */

static const cat_spec smalls[] = {{"Adults", 0x0072b2, {"120"}}, {"Veterans", 0x000000, {"9"}}};
static const cat_spec smalls_ok[] = {{"Adults", 0x0072b2, {"120"}}, {"Veterans", 0x000000, {"10"}}};

START_TEST(test_small_count_default)
{
    expect(chart_new(smalls, 2, 0, "1"), "small-count", UG_SEVERITY_WARNING, 15, 13,
           "suppress: {below: 10}");
    expect_none(chart_new(smalls_ok, 2, 0, "1"), "small-count");
    ug_chart *s = chart_new(smalls, 2, 0, "1"); /* drawn as a placeholder */
    s->has_suppress = true;
    s->suppress_below = dec("10");
    expect_none(s, "small-count");
}
END_TEST

/* Shares of 91 % and 9 %: as counts the 9 is flagged, as shares of an unknown
** total (counts-are: percent) it is not, and nothing in the findings speaks
** of households. */
static ug_chart *share_waffle(bool percent)
{
    static const cat_spec shares[] = {{"Adults", 0x0072b2, {"91"}},
                                      {"Veterans", 0x000000, {"9"}}};
    ug_chart *c = chart_new(shares, 2, 0, "1");
    c->form = UG_FORM_WAFFLE;
    c->has_icon_value = false;
    c->counts_are = percent ? UG_COUNTS_ARE_PERCENT : UG_COUNTS_ARE_COUNTS;
    return c;
}

START_TEST(test_small_count_not_on_shares)
{
    expect(share_waffle(false), "small-count", UG_SEVERITY_WARNING, 15, 13,
           "suppress: {below: 10}");
    expect_none(share_waffle(true), "small-count");
}
END_TEST

/* REFERENCES.md §7: CMS hides 1-10, NHS HES 1-7, CDC WONDER 0-9. */
typedef struct {
    const char *preset, *count;
    bool flagged;
} preset_case;

static const preset_case preset_cases[] = {
    {"cms", "10", true}, {"cms", "11", false},
    {"nhs-hes", "7", true}, {"nhs-hes", "8", false},
    {"cdc-wonder", "9", true}, {"cdc-wonder", "10", false},
    {"cdc-wonder", "0", true}, {"cms", "0", false},
};

START_TEST(test_small_count_presets)
{
    const preset_case *p = &preset_cases[_i];
    cat_spec cats[2] = {{"Adults", 0x0072b2, {"120"}}, {"Veterans", 0x000000, {p->count}}};
    ug_chart *c = chart_new(cats, 2, 0, "1");
    c->audit.small_count_preset.text = p->preset;
    ck_assert_ptr_nonnull(resolve_small_count_preset(p->preset));
    if (p->flagged)
        expect(c, "small-count", UG_SEVERITY_WARNING, 15, 13, NULL);
    else
        expect_none(c, "small-count");
}
END_TEST

START_TEST(test_small_count_threshold_setting)
{
    ug_chart *c = chart_new(smalls_ok, 2, 0, "1");
    c->audit.has_small_count = true;
    c->audit.small_count = dec("11");
    expect(c, "small-count", UG_SEVERITY_WARNING, 15, 13, "suppress: {below: 11}");
    ck_assert_ptr_null(resolve_small_count_preset("gdpr"));
}
END_TEST

/* North ward: 5 is suppressed, and North's total is shown on its line, so
** total - 120 - 40 = 5. Hiding 7 as well (the near miss) protects both. */
static const cat_spec derivable[] = {
    {"Adults", 0x0072b2, {"120", "98"}},
    {"Children", 0x000000, {"40", "35"}},
    {"Veterans", 0x009e73, {"5", "22"}},
};
static const cat_spec derivable_ok[] = {
    {"Adults", 0x0072b2, {"120", "98"}},
    {"Children", 0x000000, {"7", "35"}},
    {"Veterans", 0x009e73, {"5", "22"}},
};

/* With the totals published elsewhere (margins: published, the default) and no
** complementary cells, Veterans in North ward is its group's total minus 160:
** the attacker's linear programs pin it to exactly 5. Worked by hand. */
START_TEST(test_derivable_suppression)
{
    ug_chart *c = chart_new(derivable, 3, 2, "1");
    c->has_suppress = true;
    c->suppress_below = dec("10");
    c->suppress_complement = UG_COMPLEMENT_NONE;
    char msg[512];
    expect_full(c, "derivable-suppression", UG_SEVERITY_ERROR, 18, 13,
                "suppress: {below: 10}", NULL, msg);
    ck_assert_ptr_nonnull(strstr(msg, "narrow it to 5 to 5"));
    /* two small cells in one row still fall to their columns' totals */
    ug_chart *two = chart_new(derivable_ok, 3, 2, "1");
    two->has_suppress = true;
    two->suppress_below = dec("10");
    two->suppress_complement = UG_COMPLEMENT_NONE;
    expect(two, "derivable-suppression", UG_SEVERITY_ERROR, 15, 13,
           "suppress: {below: 10}");
    /* no totals published anywhere: nothing to work it out from */
    ug_chart *hidden = chart_new(derivable, 3, 2, "1");
    hidden->has_suppress = true;
    hidden->suppress_below = dec("10");
    hidden->suppress_complement = UG_COMPLEMENT_NONE;
    hidden->suppress_margins = UG_MARGINS_HIDDEN;
    expect_none(hidden, "derivable-suppression");
}
END_TEST

/* The fix the audit suggests, applied as it says, clears the finding: with
** complementary cells chosen (the default) the same table passes. */
START_TEST(test_derivable_fix_clears_it)
{
    ug_chart *c = chart_new(derivable, 3, 2, "1");
    c->has_suppress = true;
    c->suppress_below = dec("10");
    expect_none(c, "derivable-suppression");
}
END_TEST

/* Without groups the only total is the grand total, assumed published. */
START_TEST(test_derivable_without_groups)
{
    static const cat_spec one[] = {{"Adults", 0x0072b2, {"120"}},
                                   {"Veterans", 0x000000, {"5"}}};
    ug_chart *c = chart_new(one, 2, 0, "1");
    c->has_suppress = true;
    c->suppress_below = dec("10");
    c->suppress_complement = UG_COMPLEMENT_NONE;
    expect(c, "derivable-suppression", UG_SEVERITY_ERROR, 15, 13, "suppress: {below: 10}");
    c = chart_new(one, 2, 0, "1");
    c->has_suppress = true;
    c->suppress_below = dec("10");
    c->suppress_complement = UG_COMPLEMENT_NONE;
    c->suppress_margins = UG_MARGINS_HIDDEN;
    expect_none(c, "derivable-suppression");
}
END_TEST

/* ---- accessibility --------------------------------------------------------- */

/* Okabe-Ito orange #E69F00 on white is 2.25:1 (WCAG 2.x formula), under
** SC 1.4.11's 3:1; blue #0072B2 is 5.19:1. */
static const cat_spec orange[] = {{"Adults", 0xe69f00, {"60"}}, {"Children", 0x000000, {"40"}}};
static const cat_spec blue[] = {{"Adults", 0x0072b2, {"60"}}, {"Children", 0x000000, {"40"}}};

START_TEST(test_low_contrast_icon)
{
    char fix[512];
    expect_full(chart_new(orange, 2, 0, "1"), "low-contrast-icon", UG_SEVERITY_WARNING,
                11, 12, NULL, fix, NULL);
    /* The fix is the nearest shade that passes. */
    double r = color_contrast(fix_color(fix), hex(0xffffff));
    ck_assert(r >= 3.0 && r < 3.1);
    expect_none(chart_new(blue, 2, 0, "1"), "low-contrast-icon");
}
END_TEST

/* REFERENCES.md §3 (WCAG 2.x): #777777 on white is 4.478:1 and fails AA text;
** #767676 is 4.542:1 and passes. */
START_TEST(test_low_contrast_text)
{
    ug_chart *c = chart_new(blue, 2, 0, "1");
    c->style.ink = hex(0x777777);
    c->style.ink.mark = (ug_mark){"test.yaml", 35, 8};
    /* the fix names the key the finding points at, so it can be written there */
    expect(c, "low-contrast-text", UG_SEVERITY_WARNING, 35, 8, "ink: \"#767676\"");
    ug_chart *ok = chart_new(blue, 2, 0, "1");
    ok->style.ink = hex(0x767676);
    expect_none(ok, "low-contrast-text");
}
END_TEST

/* The default ink (#222222) on a dark background: no ink key to point at, so
** the fix gives the whole style entry. */
START_TEST(test_low_contrast_default_ink)
{
    ug_chart *c = chart_new(blue, 2, 0, "1");
    c->style.background = hex(0x333333);
    c->style.ink = (ug_color){0}; /* not given: the default ink */
    expect(c, "low-contrast-text", UG_SEVERITY_WARNING, 1, 1, "style: {ink: \"#");
}
END_TEST

/* #CC3311 and #558800 differ by about 57 for normal vision but under 2 under
** deuteranopia (Machado et al. 2009 simulation); #0072B2 stays apart. */
static const cat_spec redgreen[] = {{"Adults", 0xcc3311, {"60"}}, {"Children", 0x558800, {"40"}}};
static const cat_spec redblue[] = {{"Adults", 0xcc3311, {"60"}}, {"Children", 0x0072b2, {"40"}}};

START_TEST(test_confusable_colors)
{
    char fix[512], msg[512];
    /* The place is the second category's colour. */
    expect_full(chart_new(redgreen, 2, 0, "1"), "confusable-colors", UG_SEVERITY_WARNING,
                14, 12, NULL, fix, msg);
    ck_assert_ptr_nonnull(strstr(msg, "deuteranopia"));
    ug_color others[1] = {hex(0xcc3311)};
    double d;
    ug_error err = {0};
    ck_assert_int_eq(color_min_difference(fix_color(fix), others, 1, &d, &err), UG_OK);
    ck_assert(d >= AUDIT_MIN_DELTA_E);
    expect_none(chart_new(redblue, 2, 0, "1"), "confusable-colors");
}
END_TEST

/* The three published palettes pass the threshold in full (unitgram chose 8
** so that they would). */
START_TEST(test_palettes_not_confusable)
{
    ug_palette p = (ug_palette)_i;
    cat_spec cats[MAXC] = {{0}};
    size_t n = color_palette_size(p);
    for (size_t i = 0; i < n; i++)
        cats[i] = (cat_spec){"Category", PALETTE, {"100"}};
    ug_chart *c = chart_new(cats, n, 0, "10");
    c->style.palette = p;
    for (size_t i = 0; i < n; i++)
        c->cats[i].color = color_palette_at(p, i);
    expect_none(c, "confusable-colors");
}
END_TEST

START_TEST(test_too_many_categories)
{
    cat_spec cats[8] = {{0}};
    for (size_t i = 0; i < 8; i++)
        cats[i] = (cat_spec){"Category", PALETTE, {"100"}};
    expect(chart_new(cats, 8, 0, "10"), "too-many-categories", UG_SEVERITY_WARNING, 9, 1,
           "combine");
    expect_none(chart_new(cats, 7, 0, "10"), "too-many-categories");
}
END_TEST

/* A long chart whose palette repeats gives one finding per repeated colour,
** not one per pair. */
START_TEST(test_confusable_bounded)
{
    enum { N = 300 };
    static cat_spec cats[N];
    for (size_t i = 0; i < N; i++)
        cats[i] = (cat_spec){"Category", PALETTE, {"100"}};
    ug_chart *c = chart_new(cats, N, 0, "100");
    ug_findings *f = audit(c);
    size_t n = 0;
    for (size_t i = 0; i < ug_findings_count(f); i++)
        n += !strcmp(ug_findings_at(f, i)->rule, "confusable-colors");
    ck_assert_uint_eq(n, N - color_palette_size(UG_PALETTE_OKABE_ITO));
    ug_findings_free(f);
    chart_done(c);
}
END_TEST

START_TEST(test_missing_labels)
{
    ug_chart *c = chart_new(blue, 2, 0, "1");
    c->title.text = NULL;
    c->source.n = 0;
    c->unit_label.text = NULL;
    ug_findings *f = audit(c);
    ck_assert_ptr_nonnull(find(f, "missing-title"));
    ck_assert_ptr_nonnull(find(f, "missing-source"));
    ck_assert_ptr_nonnull(find(f, "missing-unit-label"));
    ck_assert_uint_eq(find(f, "missing-title")->where.line, 1);
    ug_findings_free(f);
    chart_done(c);
    f = audit(c = chart_new(blue, 2, 0, "1"));
    ck_assert_uint_eq(ug_findings_count(f), 0); /* the clean chart is clean */
    ug_findings_free(f);
    chart_done(c);
}
END_TEST

/* The plural categories are CLDR's (Unicode TR35 Part 3, Language Plural
** Rules; the CLDR charts' plural table): English 1 is `one`, 2 and 10
** `other`; Polish 2 is `few`, 5 `many`; Chinese has `other` only. */
typedef struct {
    const char *lang, *value;
    bool warns;
    const char *category;
} plural_case;

static const plural_case plural_cases[] = {
    {"en", "1", true, "one"},   {"en", "2", false, NULL}, {"en", "10", false, NULL},
    {"pl", "2", true, "few"},   {"pl", "5", true, "many"}, {"pl", "1", true, "one"},
    {"zh-Hans", "1", false, NULL}, {"fr", "1", true, "one"}, {"de", "5", false, NULL},
};

START_TEST(test_unit_plural)
{
    const plural_case *t = &plural_cases[_i];
    ug_chart *c = chart_new(blue, 2, 0, t->value);
    c->lang.text = t->lang;
    c->has_unit_forms = false; /* one form for every number */
    ug_findings *f = audit(c);
    const ug_finding *it = find(f, "unit-plural");
    ck_assert_msg(!it == !t->warns, "%s %s: %s", t->lang, t->value, it ? it->message : "none");
    if (it) {
        char want[64];
        snprintf(want, sizeof want, "{%s: ", t->category);
        ck_assert_msg(strstr(it->fix, want) && strstr(it->fix, "other: households"), "%s",
                      it->fix);
        ck_assert_uint_eq(it->where.line, 3); /* at unit-label */
    }
    ug_findings_free(f);
    /* giving the forms answers it */
    c->has_unit_forms = true;
    f = audit(c);
    ck_assert_ptr_null(find(f, "unit-plural"));
    ug_findings_free(f);
    chart_done(c);
}
END_TEST

/* ---- ignore, output, failures ------------------------------------------- */

START_TEST(test_ignore)
{
    ug_chart *c = chart_new(smalls, 2, 0, "1");
    set_ignore(c, "small-count");
    expect_none(c, "small-count");
    c = chart_new(smalls, 2, 0, "1");
    set_ignore(c, "smal-count");
    ug_findings *f = (ug_findings *)1;
    ug_error err = {0};
    ck_assert_int_eq(ug_chart_audit(c, &f, &err), UG_ESCHEMA);
    ck_assert_ptr_null(f);
    ck_assert_uint_eq(err.where.line, 40);
    ck_assert_ptr_nonnull(strstr(err.msg, "'smal-count'"));
    chart_done(c);
}
END_TEST

START_TEST(test_format_text_and_json)
{
    ug_chart *c = chart_new(smalls, 2, 0, "1");
    ug_findings *f = audit(c);
    chart_done(c); /* findings own their text */
    char *out;
    size_t len;
    ug_error err = {0};
    ck_assert_int_eq(ug_findings_format(f, UG_REPORT_TEXT, &out, &len, &err), UG_OK);
    ck_assert_str_eq(out,
        "test.yaml:15:13: warning: 'Veterans' is 9 households, under 10: so few "
        "can identify people [small-count]\n"
        "    fix: suppress: {below: 10}\n"
        "0 errors, 1 warning, 0 notes\n");
    ug_free(out);
    ck_assert_int_eq(ug_findings_format(f, UG_REPORT_JSON, &out, &len, &err), UG_OK);
    ck_assert_ptr_nonnull(strstr(out, "{\"rule\": \"small-count\", \"severity\": "
                                      "\"warning\", \"file\": \"test.yaml\", \"line\": 15, "
                                      "\"column\": 13"));
    ck_assert_ptr_nonnull(strstr(out, "\"fix\": \"suppress: {below: 10}\""));
    ck_assert_ptr_nonnull(strstr(out, "\"errors\": 0, \"warnings\": 1, \"notes\": 0"));
    ug_free(out);
    ck_assert_int_eq(ug_findings_format(f, UG_REPORT_CSV, &out, &len, &err), UG_ESCHEMA);
    ck_assert_uint_eq(ug_findings_count_severity(f, UG_SEVERITY_WARNING), 1);
    ck_assert_uint_eq(ug_findings_count_severity(f, UG_SEVERITY_ERROR), 0);
    ck_assert_ptr_null(ug_findings_at(f, 1));
    ug_findings_free(f);
    ug_findings_free(NULL);
}
END_TEST

START_TEST(test_rule_names)
{
    ck_assert(audit_rule_known("vanished-category"));
    ck_assert(audit_rule_known("confusable-colors"));
    ck_assert(!audit_rule_known("Vanished-Category"));
    ck_assert(!audit_rule_known(NULL));
    ck_assert_str_eq(ug_severity_name(UG_SEVERITY_NOTE), "note");
}
END_TEST

/* The one table of rules: every rule has a source, and the README's table of
** audit rules names each one (the docs cannot fall out of step unseen). */
START_TEST(test_rules_documented)
{
    FILE *f = fopen("../README.md", "r");
    ck_assert_ptr_nonnull(f);
    static char readme[1 << 18];
    size_t n = fread(readme, 1, sizeof readme - 1, f);
    readme[n] = '\0';
    fclose(f);
    ck_assert_uint_ge(audit_rule_count(), 14);
    for (size_t i = 0; i < audit_rule_count(); i++) {
        char quoted[80];
        snprintf(quoted, sizeof quoted, "`%s`", audit_rule_name(i));
        ck_assert_msg(strstr(readme, quoted), "README.md does not list %s", quoted);
        ck_assert_msg(audit_rule_source(i) && audit_rule_source(i)[0], "%s has no source",
                      audit_rule_name(i));
        ck_assert(audit_rule_known(audit_rule_name(i)));
    }
    ck_assert_ptr_null(audit_rule_name(audit_rule_count()));
}
END_TEST

static char *findings_json(ug_status st, ug_findings *f, const ug_error *err)
{
    ck_assert_msg(st == UG_OK, "%s", err->msg);
    char *out = NULL;
    ug_error e = {0};
    ck_assert_int_eq(ug_findings_format(f, UG_REPORT_JSON, &out, NULL, &e), UG_OK);
    ug_findings_free(f);
    return out;
}

/* Auditing what was drawn (its allocation, its scene's glyphs) finds exactly
** what a fresh audit finds, on every example and every audit test layout. */
START_TEST(test_drawn_equals_fresh)
{
    glob_t g;
    ck_assert_int_eq(glob("data/audit/*.yaml", 0, NULL, &g), 0);
    ck_assert_int_eq(glob("../layouts/*.yaml", GLOB_APPEND, NULL, &g), 0);
    size_t charts = 0, with_findings = 0;
    for (size_t i = 0; i < g.gl_pathc; i++) {
        ug_error err = {0};
        ug_chart *c = NULL;
        if (ug_chart_load(g.gl_pathv[i], NULL, &c, &err) != UG_OK)
            continue; /* a page file */
        ug_allocation *a = NULL;
        ug_scene *s = NULL;
        ug_findings *fresh = NULL, *drawn = NULL;
        ck_assert_int_eq(ug_chart_allocate(c, &a, &err), UG_OK);
        ck_assert_msg(ug_scene_pack(c, a, &s, &err) == UG_OK, "%s", err.msg);
        ug_status st = ug_chart_audit(c, &fresh, &err);
        char *x = findings_json(st, fresh, &err);
        st = ug_chart_audit_drawn(c, a, s, &drawn, &err);
        char *y = findings_json(st, drawn, &err);
        ck_assert_msg(strcmp(x, y) == 0, "%s: %s\nagainst\n%s", g.gl_pathv[i], x, y);
        with_findings += strstr(x, "\"rule\"") != NULL;
        charts++;
        ug_free(x);
        ug_free(y);
        ug_scene_free(s);
        ug_allocation_free(a);
        ug_chart_free(c);
    }
    globfree(&g);
    ck_assert_uint_ge(charts, 25);
    ck_assert_uint_ge(with_findings, 10);
}
END_TEST

/* Each allocation failing in turn: a clean UG_ENOMEM, nothing leaked. */
START_TEST(test_allocation_failures)
{
    ug_chart *c = chart_new(derivable, 3, 2, "10");
    c->has_suppress = true;
    c->suppress_below = dec("10");
    c->suppress_complement = UG_COMPLEMENT_NONE;
    c->title.text = NULL;
    for (long n = 0;; n++) {
        ug_findings *f = NULL;
        ug_error err = {0};
        ug_mem_fail_after(n);
        ug_status st = ug_chart_audit(c, &f, &err);
        ug_mem_fail_after(-1);
        if (st == UG_OK) {
            ck_assert_uint_ge(ug_findings_count(f), 3);
            ug_findings_free(f);
            break;
        }
        ck_assert_int_eq(st, UG_ENOMEM);
        ck_assert_ptr_null(f);
    }
    chart_done(c);
}
END_TEST

static Suite *audit_suite(void)
{
    Suite *s = suite_create("audit");
    TCase *t = tcase_create("audit");
    tcase_set_timeout(t, 30);
    tcase_add_test(t, test_vanished_category);
    tcase_add_loop_test(t, test_unit_plural, 0, sizeof plural_cases / sizeof plural_cases[0]);
    tcase_add_test(t, test_rounding_difference);
    tcase_add_test(t, test_rounding_fix_partial);
    tcase_add_test(t, test_rounding_uses_biproportional_icons);
    tcase_add_test(t, test_total_mismatch);
    tcase_add_test(t, test_small_count_default);
    tcase_add_test(t, test_small_count_not_on_shares);
    tcase_add_loop_test(t, test_small_count_presets, 0,
                        sizeof preset_cases / sizeof preset_cases[0]);
    tcase_add_test(t, test_small_count_threshold_setting);
    tcase_add_test(t, test_derivable_suppression);
    tcase_add_test(t, test_derivable_fix_clears_it);
    tcase_add_test(t, test_derivable_without_groups);
    tcase_add_test(t, test_low_contrast_icon);
    tcase_add_test(t, test_low_contrast_text);
    tcase_add_test(t, test_low_contrast_default_ink);
    tcase_add_test(t, test_confusable_colors);
    tcase_add_loop_test(t, test_palettes_not_confusable, UG_PALETTE_OKABE_ITO,
                        UG_PALETTE_TOL_MUTED + 1);
    tcase_add_test(t, test_confusable_bounded);
    tcase_add_test(t, test_too_many_categories);
    tcase_add_test(t, test_missing_labels);
    tcase_add_test(t, test_ignore);
    tcase_add_test(t, test_format_text_and_json);
    tcase_add_test(t, test_rule_names);
    tcase_add_test(t, test_rules_documented);
    tcase_add_test(t, test_drawn_equals_fresh);
    tcase_add_test(t, test_allocation_failures);
    suite_add_tcase(s, t);
    return s;
}

int main(void)
{
    return check_run(audit_suite());
}
