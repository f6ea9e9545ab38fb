/* Tests for src/pack.c: geometry of rows and waffles on hand-made charts and
** on random layouts (fixed seed), checked by tests/data/draw/invariants.h. */
#define _POSIX_C_SOURCE 200809L
#include <check.h>
#include <glob.h>
#include <libxml/tree.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "data/draw/fixture.h"
#include "data/draw/invariants.h"
#include "check_run.h"

static const fx_cat pantry[] = {
    {"Families with children", "square", 0x0072B2, {"412"}, "Under 18 on the day"},
    {"Single adults", "circle", 0xE69F00, {"300"}, NULL},
    {"Older people", "rounded-square", 0x009E73, {"123"}, NULL},
};

static ug_scene *pack_ok(const ug_chart *c, ug_allocation **a)
{
    ug_error err;
    memset(&err, 0, sizeof err);
    ug_scene *s = NULL;
    ck_assert_int_eq(ug_chart_allocate(c, a, &err), UG_OK);
    ug_status st = ug_scene_pack(c, *a, &s, &err);
    ck_assert_msg(st == UG_OK, "pack: %s", err.msg);
    return s;
}

static void check_and_free(ug_chart *c)
{
    ug_allocation *a = NULL;
    ug_scene *s = pack_ok(c, &a);
    const char *bad = inv_check(c, a, s);
    ck_assert_msg(bad == NULL, "%s", bad ? bad : "");
    ug_scene_free(s);
    ug_allocation_free(a);
    fx_free(c);
}

START_TEST(test_pantry_waffle_invariants)
{
    check_and_free(fx_chart(UG_FORM_WAFFLE, "Who the pantry served", NULL, 0, pantry, 3));
}
END_TEST

/* The right edge of the plot's icons and the left of the key's swatches. */
static void key_and_plot(const ug_scene *s, double *plot_right, double *key_left,
                         double *plot_bottom, double *key_top)
{
    *plot_right = *plot_bottom = 0;
    *key_left = *key_top = 1e9;
    for (size_t i = 0; i < s->nicons; i++) {
        *plot_right = fmax(*plot_right, s->icons[i].x + s->icon_size);
        *plot_bottom = fmax(*plot_bottom, s->icons[i].y + s->icon_size);
    }
    for (size_t i = 0; i < s->nswatches; i++) {
        *key_left = fmin(*key_left, s->swatches[i].x);
        *key_top = fmin(*key_top, s->swatches[i].y);
    }
}

/* A 10 x 10 waffle leaves most of an 800 px canvas free: the key goes
** beside it, top to top, and is no shorter for it (every entry drawn);
** `key-place: below` puts it under the grid. Both pass the invariants. */
START_TEST(test_key_beside_or_below)
{
    for (int below = 0; below < 2; below++) {
        ug_chart *c = fx_chart(UG_FORM_WAFFLE, "Who the pantry served", NULL, 0, pantry, 3);
        c->key_place = below ? UG_KEY_BELOW : UG_KEY_AUTO;
        ug_allocation *a = NULL;
        ug_scene *s = pack_ok(c, &a);
        double pr, kl, pb, kt;
        key_and_plot(s, &pr, &kl, &pb, &kt);
        ck_assert_uint_eq(s->nswatches, 3);
        if (below)
            ck_assert_msg(kt >= pb, "key top %g above the grid's bottom %g", kt, pb);
        else
            ck_assert_msg(kl > pr && kt < pb, "key at %g,%g; grid to %g,%g", kl, kt, pr, pb);
        const char *bad = inv_check(c, a, s);
        ck_assert_msg(bad == NULL, "%s", bad ? bad : "");
        ug_scene_free(s);
        ug_allocation_free(a);
        fx_free(c);
    }
}
END_TEST

/* Neurath's first rule (International Picture Language, 1936; REFERENCES.md
** §6): a hundred times the count is a hundred times the icons, same size. */
START_TEST(test_more_means_more_icons_not_bigger)
{
    const fx_cat small[] = {{"A", "square", 0x0072B2, {"20"}, NULL}};
    const fx_cat large[] = {{"A", "square", 0x0072B2, {"2000"}, NULL}};
    ug_chart *c1 = fx_chart(UG_FORM_ROWS, "t", NULL, 0, small, 1);
    ug_chart *c2 = fx_chart(UG_FORM_ROWS, "t", NULL, 0, large, 1);
    ug_allocation *a1, *a2;
    ug_scene *s1 = pack_ok(c1, &a1), *s2 = pack_ok(c2, &a2);
    ck_assert_double_eq(s1->icon_size, s2->icon_size);
    ck_assert_uint_eq(s1->nicons, 2);
    ck_assert_uint_eq(s2->nicons, 200);
    ck_assert_ptr_null(inv_check(c2, a2, s2));
    ug_scene_free(s1);
    ug_scene_free(s2);
    ug_allocation_free(a1);
    ug_allocation_free(a2);
    fx_free(c1);
    fx_free(c2);
}
END_TEST

/* Fill orders: where cells 0, 1 and `columns` land, relative to the grid. */
typedef struct {
    ug_fill fill;
    ug_start start;
    long col[3], row[3]; /* cells 0, 1, 10 */
} fill_case;

static const fill_case fills[] = {
    {UG_FILL_BY_ROW, UG_START_TOP_LEFT, {0, 1, 0}, {0, 0, 1}},
    {UG_FILL_BY_ROW, UG_START_BOTTOM_LEFT, {0, 1, 0}, {9, 9, 8}},
    {UG_FILL_BY_COLUMN, UG_START_TOP_LEFT, {0, 0, 1}, {0, 1, 0}},
    {UG_FILL_SNAKE, UG_START_TOP_LEFT, {0, 1, 9}, {0, 0, 1}},
    {UG_FILL_SNAKE, UG_START_BOTTOM_LEFT, {0, 1, 9}, {9, 9, 8}},
};

START_TEST(test_waffle_fill_orders)
{
    const fill_case *fc = &fills[_i];
    const fx_cat one[] = {{"All", "square", 0x0072B2, {"7"}, NULL}};
    ug_chart *c = fx_chart(UG_FORM_WAFFLE, "t", NULL, 0, one, 1);
    c->fill = fc->fill;
    c->start = fc->start;
    ug_allocation *a;
    ug_scene *s = pack_ok(c, &a);
    ck_assert_uint_eq(s->nicons, 100);
    double x0 = s->icons[0].x, y0 = 1e9, pitch = 28;
    for (size_t i = 0; i < s->nicons; i++)
        y0 = s->icons[i].y < y0 ? s->icons[i].y : y0;
    const long cell[3] = {0, 1, 10};
    for (int k = 0; k < 3; k++) {
        const scene_icon *ic = &s->icons[cell[k]];
        double base_x = x0 - (double)fc->col[0] * pitch;
        ck_assert_double_eq_tol((ic->x - base_x) / pitch, (double)fc->col[k], 1e-9);
        ck_assert_double_eq_tol((ic->y - y0) / pitch, (double)fc->row[k], 1e-9);
    }
    ug_scene_free(s);
    ug_allocation_free(a);
    fx_free(c);
}
END_TEST

/* Small multiples share one grid: every panel's first cell is on one line,
** and panels differ by a whole panel-plus-gap step. */
START_TEST(test_small_multiples_align)
{
    const char *groups[] = {"North school", "River school", "Hill school"};
    const fx_cat cats[] = {
        {"Walk", "square", 0x0072B2, {"120", "80", "45"}, NULL},
        {"Bus", "square", 0xE69F00, {"60", "150", "30"}, NULL},
    };
    ug_chart *c = fx_chart(UG_FORM_WAFFLE, "How pupils get to school", groups, 3, cats, 2);
    ug_allocation *a;
    ug_scene *s = pack_ok(c, &a);
    ck_assert_ptr_null(inv_check(c, a, s));
    double minx[3] = {1e9, 1e9, 1e9}, miny[3] = {1e9, 1e9, 1e9};
    for (size_t i = 0; i < s->nicons; i++) {
        unsigned g = s->icons[i].group;
        minx[g] = s->icons[i].x < minx[g] ? s->icons[i].x : minx[g];
        miny[g] = s->icons[i].y < miny[g] ? s->icons[i].y : miny[g];
    }
    /* panels are 10 x 28 - 4 = 276 px with 48 px between: two fit in 720 */
    ck_assert_double_eq(miny[0], miny[1]);
    ck_assert(miny[2] > miny[0]);
    ck_assert_double_eq(minx[2], minx[0]);
    ck_assert_double_eq(minx[1] - minx[0], 276 + 48);
    ug_scene_free(s);
    ug_allocation_free(a);
    fx_free(c);
}
END_TEST

/* Suppression: no icons, one placeholder, and the hidden count in no text. */
START_TEST(test_suppressed_count_is_a_placeholder)
{
    const fx_cat cats[] = {
        {"Adults", "square", 0x0072B2, {"1200"}, NULL},
        {"Visitors from abroad", "square", 0xE69F00, {"7"}, NULL},
    };
    ug_chart *c = fx_chart(UG_FORM_ROWS, "Library visits", NULL, 0, cats, 2);
    c->icon_value = fx_dec("1");
    c->columns = 50;
    fx_suppress(c, "10");
    c->suppress_margins = UG_MARGINS_HIDDEN; /* one placeholder, no complement */
    ug_allocation *a;
    ug_scene *s = pack_ok(c, &a);
    ck_assert_ptr_null(inv_check(c, a, s));
    ck_assert_uint_eq(s->nholders, 1);
    ck_assert_uint_eq(s->holders[0].cat, 1);
    bool labelled = false;
    for (size_t i = 0; i < s->ntexts; i++) {
        ck_assert_ptr_null(strstr(s->texts[i].text, "7"));
        ck_assert_ptr_null(strstr(s->texts[i].text, "1,207"));
        labelled = labelled || strcmp(s->texts[i].text, "fewer than 10") == 0;
    }
    ck_assert(labelled);
    ck_assert_ptr_null(strstr(s->desc, "7"));
    ck_assert_ptr_null(strstr(s->cats[1].title, "7"));
    ug_scene_free(s);
    ug_allocation_free(a);
    fx_free(c);
}
END_TEST

/* Partial rounding: 12.5 households at 10 each is one icon and a half. */
START_TEST(test_partial_icon_fraction)
{
    const fx_cat cats[] = {{"A", "square", 0x0072B2, {"12.5"}, NULL}};
    ug_chart *c = fx_chart(UG_FORM_ROWS, "t", NULL, 0, cats, 1);
    c->rounding = UG_ROUND_PARTIAL;
    ug_allocation *a;
    ug_scene *s = pack_ok(c, &a);
    ck_assert_uint_eq(s->nicons, 2);
    ck_assert_double_eq(s->icons[0].fraction, 1.0);
    ck_assert_double_eq(s->icons[1].fraction, 0.25);
    ug_scene_free(s);
    ug_allocation_free(a);
    fx_free(c);
}
END_TEST

/* Counting aid: after every `cluster` icons the step is wider. */
START_TEST(test_cluster_gap)
{
    const fx_cat cats[] = {{"A", "square", 0x0072B2, {"100"}, NULL}};
    ug_chart *c = fx_chart(UG_FORM_ROWS, "t", NULL, 0, cats, 1);
    ug_allocation *a;
    ug_scene *s = pack_ok(c, &a);
    double step = s->icons[1].x - s->icons[0].x;
    double across = s->icons[5].x - s->icons[4].x;
    ck_assert_double_eq(step, 28);
    ck_assert(across > step);
    ug_scene_free(s);
    ug_allocation_free(a);
    fx_free(c);
}
END_TEST

/* Split rows: a category's wrapped line sits nearer its own first line than
** the next category's line, so the eye groups it with its own label
** (proximity; common practice, no source). With no wrapped category the
** lines keep their plain spacing. */
/* The tops of category cat's first two lines of icons (second < 0: one line). */
static void category_lines(const ug_scene *s, unsigned cat, double *first, double *second)
{
    *first = *second = -1;
    for (size_t k = 0; k < s->nicons; k++) {
        double y = s->icons[k].y;
        if (s->icons[k].cat != cat)
            continue;
        if (*first < 0)
            *first = y;
        else if (y != *first && *second < 0)
            *second = y;
    }
}

START_TEST(test_split_wrapped_line_stays_with_its_category)
{
    const fx_cat cats[] = {{"A", "square", 0x0072B2, {"30"}, NULL},
                           {"B", "square", 0xD55E00, {"8"}, NULL},
                           {"C", "square", 0x009E73, {"5"}, NULL}};
    for (int wraps = 0; wraps < 2; wraps++) {
        ug_chart *c = fx_chart(UG_FORM_ROWS, "t", NULL, 0, cats, 3);
        c->icon_value = fx_dec("1");
        c->arrangement = UG_ARRANGE_SPLIT;
        c->columns = wraps ? 20 : 40;
        ug_allocation *a;
        ug_scene *s = pack_ok(c, &a);
        double a1, a2, b1, b2, c1, c2;
        category_lines(s, 0, &a1, &a2);
        category_lines(s, 1, &b1, &b2);
        category_lines(s, 2, &c1, &c2);
        ck_assert_msg((a2 >= 0) == wraps && b2 < 0 && c2 < 0, "lines: %g %g %g", a2, b2, c2);
        if (wraps)
            ck_assert_msg(a2 - a1 < b1 - a2, "wrapped line %.1f below its first, the next "
                          "category %.1f below it", a2 - a1, b1 - a2);
        else
            ck_assert_msg(fabs((b1 - a1) - (c1 - b1)) < 1e-9, "%g, %g", b1 - a1, c1 - b1);
        ug_scene_free(s);
        ug_allocation_free(a);
        fx_free(c);
    }
}
END_TEST

/* Split rows with groups: the group's name is on the left of its first
** line only, so each line names its category beside its count ("B: fewer
** than 10"), and a placeholder says what it stands for without colour;
** `direct-labels: false` leaves the bare counts. */
static bool has_text(const ug_scene *s, const char *t)
{
    for (size_t k = 0; k < s->ntexts; k++)
        if (!strcmp(s->texts[k].text, t))
            return true;
    return false;
}

START_TEST(test_split_groups_label_each_line)
{
    const char *groups[] = {"North", "South"};
    const fx_cat cats[] = {{"Adults", "person", 0x0072B2, {"40", "30"}, NULL},
                           {"Children", "child", 0xD55E00, {"3", "20"}, NULL}};
    for (int off = 0; off < 2; off++) {
        ug_chart *c = fx_chart(UG_FORM_ROWS, "t", groups, 2, cats, 2);
        c->arrangement = UG_ARRANGE_SPLIT;
        fx_suppress(c, "10");
        c->suppress_margins = UG_MARGINS_HIDDEN; /* no complement needed */
        if (off) {
            c->direct_labels = false;
            c->direct_labels_mark = (ug_mark){"t.yaml", 3, 16};
        }
        ug_allocation *a;
        ug_scene *s = pack_ok(c, &a);
        ck_assert_int_eq(has_text(s, "Adults: 40"), !off);
        ck_assert_int_eq(has_text(s, "Children: fewer than 10"), !off);
        ck_assert_int_eq(has_text(s, "fewer than 10"), 1); /* the box's own */
        ck_assert_int_eq(has_text(s, "40"), off);
        ug_scene_free(s);
        ug_allocation_free(a);
        fx_free(c);
    }
}
END_TEST

/* A long title and labels wrap inside the canvas; a narrow canvas wraps lines
** of icons early instead of shrinking them. */
START_TEST(test_long_text_wraps_inside)
{
    const char *groups[] = {"A ward with a rather long name that will need wrapping "
                            "in the label column", "B"};
    const fx_cat cats[] = {
        {"A category whose label is long enough to wrap in the key column for sure",
         "square", 0x0072B2, {"300", "40"}, "A note that is also long, long enough to "
         "run past the width of the canvas when the canvas is narrow"},
        {"Short", "circle", 0xE69F00, {"20", "55"}, NULL},
    };
    ug_chart *c = fx_chart(UG_FORM_ROWS, "A title that goes on and on about the "
                           "pantry, the library and the school district until it wraps",
                           groups, 2, cats, 2);
    c->style.width = 420;
    c->columns = 0; /* the default line length wraps to the width; a given one would be refused */
    ug_allocation *a;
    ug_scene *s = pack_ok(c, &a);
    const char *bad = inv_check(c, a, s);
    ck_assert_msg(bad == NULL, "%s", bad ? bad : "");
    ck_assert_double_eq(s->width, 420);
    ug_scene_free(s);
    ug_allocation_free(a);
    fx_free(c);
}
END_TEST

/* ---- random layouts ---------------------------------------------------------- */

static unsigned long long rng = 20260412;

static unsigned rnd(unsigned n)
{
    rng = rng * 6364136223846793005ULL + 1442695040888963407ULL;
    return (unsigned)((rng >> 33) % n);
}

static ug_chart *random_chart(void)
{
    static const char *const glyphs[] = {"square", "circle", "rounded-square"};
    static const char *const words[] = {"Adults", "Children under five", "Older people",
                                        "Visitors", "Families with two or more children"};
    static const char *const groups[] = {"North", "River ward", "Hill", "East end"};
    static char counts[6][4][16];
    fx_cat cats[6];
    size_t ncats = 1 + rnd(5), ngroups = rnd(4);
    for (size_t i = 0; i < ncats; i++) {
        cats[i] = (fx_cat){words[rnd(5)], glyphs[rnd(3)], 0x102030u * (unsigned)(i + 1),
                           {NULL}, rnd(3) ? NULL : "a note"};
        for (size_t g = 0; g < 4; g++) {
            unsigned v = rnd(4) ? rnd(400) : rnd(12);
            snprintf(counts[i][g], 16, "%u%s", v, rnd(5) ? "" : ".5");
            cats[i].counts[g] = counts[i][g];
        }
    }
    bool waffle = rnd(2);
    ug_chart *c = fx_chart(waffle ? UG_FORM_WAFFLE : UG_FORM_ROWS,
                           rnd(4) ? "Random chart title" : NULL, groups, ngroups, cats, ncats);
    c->icon_size = 8 + rnd(30);
    c->icon_gap = rnd(8);
    c->columns = rnd(3) ? 5 + rnd(30) : 0;
    c->style.width = 300 + rnd(900);
    c->fill = (ug_fill)rnd(3);
    c->start = (ug_start)rnd(2);
    c->arrangement = (ug_arrangement)rnd(2);
    c->cluster = rnd(3) ? 0 : 1 + rnd(10);
    if (rnd(3) == 0) {
        fx_suppress(c, "10");
        c->suppress_margins = UG_MARGINS_HIDDEN; /* geometry, not protection */
    }
    if (waffle && rnd(3) == 0) {
        c->has_icon_value = true;
        c->icon_value = fx_dec("25");
    } else if (waffle) {
        c->cells = 20 + rnd(200);
    }
    if (!waffle && rnd(4) == 0)
        c->rounding = UG_ROUND_PARTIAL;
    return c;
}

START_TEST(test_random_layouts)
{
    for (int k = 0; k < 150; k++) {
        unsigned long long seed = rng;
        ug_chart *c = random_chart();
        ug_allocation *a;
        ug_error err = {0};
        ug_scene *s = NULL;
        ck_assert_int_eq(ug_chart_allocate(c, &a, &err), UG_OK);
        if (ug_scene_pack(c, a, &s, &err) != UG_OK) {
            /* only a `columns` that cannot fit the fixed width is refused;
            ** without the fixed width the same chart widens and packs */
            ck_assert_msg(err.status == UG_ELIMIT && c->columns > 0 && c->style.width > 0,
                          "layout %d (seed %llu): %s", k, seed, err.msg);
            ck_assert_ptr_nonnull(strstr(err.msg, "give at most 'columns:"));
            c->style.width = 0;
            ck_assert_msg(ug_scene_pack(c, a, &s, &err) == UG_OK, "%s", err.msg);
        }
        const char *bad = inv_check(c, a, s);
        ck_assert_msg(bad == NULL, "layout %d (seed %llu): %s", k, seed, bad ? bad : "");
        ug_scene_free(s);
        ug_allocation_free(a);
        fx_free(c);
    }
}
END_TEST

/* `columns` is a promise about line length: 100 icons at 40 a line are
** lines of 40, 40 and 20 whatever the default width (the canvas widens);
** with a width too narrow for them the chart is refused, not wrapped. */
START_TEST(test_columns_honoured)
{
    const fx_cat one[] = {{"A", "square", 0x0072B2, {"100"}, NULL}};
    ug_chart *c = fx_chart(UG_FORM_ROWS, "t", NULL, 0, one, 1);
    c->columns = 40;
    c->icon_value = fx_dec("1");
    ug_allocation *a;
    ug_scene *s = pack_ok(c, &a);
    size_t on_first_line = 0;
    for (size_t i = 0; i < s->nicons; i++)
        on_first_line += s->icons[i].y == s->icons[0].y;
    ck_assert_uint_eq(s->nicons, 100);
    ck_assert_uint_eq(on_first_line, 40);
    ck_assert_double_gt(s->width, 800);
    ug_scene_free(s);
    c->style.width = 500;
    ug_error err = {0};
    ck_assert_int_eq(ug_scene_pack(c, a, &s, &err), UG_ELIMIT);
    ck_assert_ptr_null(s);
    ck_assert_ptr_nonnull(strstr(err.msg, "lines of 40 icons"));
    ug_allocation_free(a);
    fx_free(c);
}
END_TEST

/* Every allocation made while packing fails in turn: the packer reports it
** and leaks nothing (the sanitized pass checks the leaks). */
START_TEST(test_each_allocation_fails_cleanly)
{
    ug_chart *c = fx_chart(UG_FORM_WAFFLE, "t", NULL, 0, pantry, 3);
    ug_allocation *a;
    ug_error err;
    memset(&err, 0, sizeof err);
    ck_assert_int_eq(ug_chart_allocate(c, &a, &err), UG_OK);
    ug_scene *s = NULL;
    ug_mem_fail_after(-1);
    ck_assert_int_eq(ug_scene_pack(c, a, &s, &err), UG_OK);
    long total = ug_mem_fail_after(-1);
    ug_scene_free(s);
    for (long n = 0; n < total; n++) {
        memset(&err, 0, sizeof err);
        ug_mem_fail_after(n);
        ug_status st = ug_scene_pack(c, a, &s, &err);
        ug_mem_fail_after(-1);
        if (st == UG_OK)
            ug_scene_free(s);
        else
            ck_assert_ptr_null(s);
    }
    ug_allocation_free(a);
    fx_free(c);
}
END_TEST

/* Category ids that differ only in punctuation, case, accents or
** normalization each get an XML id of their own, and every one is a valid
** NCName (Namespaces in XML 1.0, production [4]), so href="#..." and
** aria references can name it. */
static const char *const clashing_ids[] = {
    "a b", "a-b", "a.b", "a_b", "a_20b", "A-B", "\u00fc", "\u00f6", "u",
    "\u00e9cole", "e\u0301cole", "ecole", "",
};
#define NCLASH (sizeof clashing_ids / sizeof clashing_ids[0])

START_TEST(test_xml_ids_one_per_category)
{
    fx_cat cats[NCLASH];
    for (size_t i = 0; i < NCLASH; i++)
        cats[i] = (fx_cat){"x", "square", 0x0072B2, {"10"}, NULL};
    ug_chart *c = fx_chart(UG_FORM_ROWS, "ids", NULL, 0, cats, NCLASH);
    for (size_t i = 0; i < NCLASH; i++)
        c->cats[i].id = clashing_ids[i];
    ug_allocation *a = NULL;
    ug_scene *s = pack_ok(c, &a);
    for (size_t i = 0; i < NCLASH; i++) {
        const char *id = s->cats[i].id;
        ck_assert_msg(xmlValidateNCName((const xmlChar *)id, 0) == 0, "not an NCName: %s", id);
        for (size_t j = 0; j < i; j++)
            ck_assert_msg(strcmp(id, s->cats[j].id) != 0, "'%s' and '%s' share %s",
                          clashing_ids[j], clashing_ids[i], id);
    }
    ck_assert_str_eq(s->cats[0].id, "cat-a_20b");
    ck_assert_str_eq(s->cats[1].id, "cat-a-b");
    ck_assert_str_eq(s->cats[6].id, "cat-_c3_bc");
    ug_scene_free(s);
    ug_allocation_free(a);
    fx_free(c);
}
END_TEST

/* Every example and test chart layout, as the loader reads it: no box
** leaves the canvas, none overlaps another (text included), icons share one
** size and match the allocation (data/draw/invariants.h). */
START_TEST(test_example_layouts_invariants)
{
    glob_t g;
    ck_assert_int_eq(glob("../layouts/*.yaml", 0, NULL, &g), 0);
    glob("data/good/*.yaml", GLOB_APPEND, NULL, &g);
    glob("data/draw/*.yaml", GLOB_APPEND, NULL, &g);
    glob("data/audit/*.yaml", GLOB_APPEND, NULL, &g);
    size_t checked = 0;
    for (size_t k = 0; k < g.gl_pathc; k++) {
        ug_error err = {0};
        ug_chart *c = NULL;
        if (ug_chart_load(g.gl_pathv[k], NULL, &c, &err) != UG_OK)
            continue; /* a page file, or a layout meant to fail */
        ug_allocation *a = NULL;
        ug_scene *sc = NULL;
        if (ug_chart_allocate(c, &a, &err) == UG_OK &&
            ug_scene_pack(c, a, &sc, &err) == UG_OK) {
            const char *bad = inv_check(c, a, sc);
            ck_assert_msg(bad == NULL, "%s: %s", g.gl_pathv[k], bad);
            checked++;
        }
        ug_scene_free(sc);
        ug_allocation_free(a);
        ug_chart_free(c);
    }
    globfree(&g);
    ck_assert_uint_ge(checked, 30);
}
END_TEST

/* Whether word is a whole space-separated token of one of the scene's lines. */
static bool word_whole(const ug_scene *sc, const char *word, size_t n)
{
    for (size_t t = 0; t < sc->ntexts; t++)
        for (const char *p = sc->texts[t].text; (p = strstr(p, word)); p++) {
            bool starts = p == sc->texts[t].text || p[-1] == ' ';
            if (starts && (p[n] == ' ' || p[n] == '\0' || p[n] == ',' || p[n] == '.'))
                return true;
        }
    return false;
}

/* Wrapping breaks lines at spaces only: every word of the title, subtitle and
** category labels of every example stands whole on some line of its scene. */
START_TEST(test_examples_break_no_word)
{
    glob_t g;
    ck_assert_int_eq(glob("../layouts/*.yaml", 0, NULL, &g), 0);
    size_t words = 0;
    for (size_t k = 0; k < g.gl_pathc; k++) {
        ug_error err = {0};
        ug_chart *c = NULL;
        if (ug_chart_load(g.gl_pathv[k], NULL, &c, &err) != UG_OK)
            continue;
        ug_allocation *a = NULL;
        ug_scene *sc = NULL;
        ck_assert(ug_chart_allocate(c, &a, &err) == UG_OK);
        ck_assert_msg(ug_scene_pack(c, a, &sc, &err) == UG_OK, "%s", err.msg);
        const char *texts[3 + 64] = {c->title.text, c->subtitle.text};
        size_t nt = 2;
        for (size_t i = 0; i < c->ncats && nt < 66; i++)
            texts[nt++] = c->cats[i].label.text;
        for (size_t t = 0; t < nt; t++)
            for (const char *w = texts[t]; w && *w;) {
                size_t n = strcspn(w, " ");
                char word[128];
                if (n > 0 && n < sizeof word) {
                    snprintf(word, sizeof word, "%.*s", (int)n, w);
                    ck_assert_msg(word_whole(sc, word, n), "%s: '%s' broken across lines",
                                  g.gl_pathv[k], word);
                    words++;
                }
                w += n + (w[n] == ' ');
            }
        ug_scene_free(sc);
        ug_allocation_free(a);
        ug_chart_free(c);
    }
    globfree(&g);
    ck_assert_uint_ge(words, 40);
}
END_TEST

static Suite *pack_suite(void)
{
    Suite *s = suite_create("pack");
    TCase *t = tcase_create("geometry");
    tcase_set_timeout(t, 120);
    tcase_add_test(t, test_pantry_waffle_invariants);
    tcase_add_test(t, test_key_beside_or_below);
    tcase_add_test(t, test_more_means_more_icons_not_bigger);
    tcase_add_loop_test(t, test_waffle_fill_orders, 0, sizeof fills / sizeof fills[0]);
    tcase_add_test(t, test_small_multiples_align);
    tcase_add_test(t, test_suppressed_count_is_a_placeholder);
    tcase_add_test(t, test_partial_icon_fraction);
    tcase_add_test(t, test_cluster_gap);
    tcase_add_test(t, test_split_wrapped_line_stays_with_its_category);
    tcase_add_test(t, test_split_groups_label_each_line);
    tcase_add_test(t, test_long_text_wraps_inside);
    tcase_add_test(t, test_random_layouts);
    tcase_add_test(t, test_example_layouts_invariants);
    tcase_add_test(t, test_examples_break_no_word);
    tcase_add_test(t, test_columns_honoured);
    tcase_add_test(t, test_each_allocation_fails_cleanly);
    tcase_add_test(t, test_xml_ids_one_per_category);
    suite_add_tcase(s, t);
    return s;
}

int main(void)
{
    return check_run(pack_suite());
}
