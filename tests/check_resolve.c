/* Tests for src/resolve.c: the defaults a chart starts with, and the
** palette's colours for categories without one (contrast first). */
#include <check.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "color.h"
#include "resolve.h"
#include "check_run.h"

static ug_chart *bare_chart(size_t ncats)
{
    ug_chart *c = ug_calloc(1, sizeof *c);
    c->path = "test.yaml";
    resolve_defaults(c);
    c->ncats = ncats;
    c->cats = ug_arena_alloc(&c->arena, ncats * sizeof *c->cats);
    return c;
}

static void chart_done(ug_chart *c)
{
    ug_arena_free(&c->arena);
    ug_free(c);
}

START_TEST(test_defaults)
{
    ug_chart *c = bare_chart(1);
    ck_assert_str_eq(c->style.font, RESOLVE_FONT);
    ck_assert_str_eq(c->style.font_mark.file, "test.yaml");
    ck_assert_int_eq(c->icon_size, RESOLVE_ICON_PX);
    ck_assert_int_eq(c->icon_gap, RESOLVE_GAP_PX);
    ck_assert_int_eq(c->cells, RESOLVE_CELLS);
    ck_assert_int_eq(c->cluster, -1);
    ck_assert(c->style.background.set && c->style.ink.set);
    ck_assert_uint_eq((unsigned)c->style.background.r << 16 | c->style.background.g << 8 |
                          c->style.background.b, RESOLVE_BACKGROUND);
    ck_assert_uint_eq((unsigned)c->style.ink.r << 16 | c->style.ink.g << 8 | c->style.ink.b,
                      RESOLVE_INK);
    ck_assert_int_eq(c->audit.tolerance_percent.v, 10 * UG_DEC_SCALE);
    ck_assert_int_eq(c->audit.small_count.v, 10 * UG_DEC_SCALE);
    chart_done(c);
}
END_TEST

/* Lab of c under vision v, through LittleCMS (color.c, checked against
** published sRGB -> CIELAB values in check_color). */
static color_lab lab_of(ug_color c, color_vision v)
{
    ug_color sim = color_simulate(c, v);
    color_lab out;
    ck_assert_int_eq(color_to_lab(&sim, 1, &out, NULL), UG_OK);
    return out;
}

static double min_delta_e(ug_color a, ug_color b)
{
    double d = INFINITY;
    for (int v = 0; v < COLOR_VISION_COUNT; v++)
        d = fmin(d, color_delta_e00(lab_of(a, (color_vision)v), lab_of(b, (color_vision)v)));
    return d;
}

/* On any background every colour handed out reaches WCAG 2.1 SC 1.4.11's 3:1
** against it (a palette colour that does not is shaded until it does), the
** ones reaching it unshaded come first, and the leading colours are pairwise
** apart by COLOR_MIN_DELTA_E (CIEDE2000) under normal vision and the three
** simulated deficiencies, as the audit's confusable-colors rule asks; a
** category's own colour is kept and takes no palette slot. */
static void check_order(unsigned bg, ug_palette pal)
{
    size_t n = color_palette_size(pal);
    ug_chart *c = bare_chart(n + 1);
    c->style.background = color_rgb((bg >> 16) & 255, (bg >> 8) & 255, bg & 255);
    c->style.palette = pal;
    c->cats[0].color_given = true;
    c->cats[0].color = color_rgb(1, 2, 3);
    ck_assert_int_eq(resolve_chart(c, NULL), UG_OK);
    ck_assert(c->cats[0].color.r == 1 && c->cats[0].color.b == 3);
    size_t passing = 0, apart = 1;
    for (size_t k = 0; k < n; k++)
        passing += color_contrast_passes(
            color_contrast(color_palette_at(pal, k), c->style.background),
            COLOR_WCAG_NON_TEXT);
    for (size_t i = 1; i <= n; i++) {
        const ug_color *col = &c->cats[i].color;
        ck_assert_msg(color_contrast_passes(color_contrast(*col, c->style.background),
                                            COLOR_WCAG_NON_TEXT),
                      "category %zu on #%06x fails 3:1", i, bg);
        bool unshaded = false;
        for (size_t k = 0; k < n; k++)
            unshaded = unshaded || color_equal(*col, color_palette_at(pal, k));
        if (i <= passing)
            ck_assert_msg(unshaded, "category %zu on #%06x: a passing colour was shaded", i, bg);
        bool all_apart = true;
        for (size_t j = 1; j < i; j++)
            all_apart = all_apart && min_delta_e(*col, c->cats[j].color) >= COLOR_MIN_DELTA_E;
        if (all_apart && apart == i - 1)
            apart = i;
    }
    ck_assert_msg(apart >= 3, "only %zu colours apart on #%06x", apart, bg);
    chart_done(c);
}

START_TEST(test_palette_safe_order)
{
    const unsigned backgrounds[] = {0xffffff, 0x000000, 0x1e2a38, 0xf5e6c8};
    for (size_t b = 0; b < 4; b++)
        for (int p = UG_PALETTE_OKABE_ITO; p <= UG_PALETTE_TOL_MUTED; p++)
            check_order(backgrounds[b], (ug_palette)p);
}
END_TEST

/* Okabe-Ito on white hands out green, blue, vermillion and purple apart from
** one another, and no colour under 3:1 (the fifth colour of the palette as
** published, #E69F00, is 2.25:1 on white by the WCAG formula). */
START_TEST(test_okabe_ito_on_white)
{
    ug_chart *c = bare_chart(5);
    ck_assert_int_eq(resolve_chart(c, NULL), UG_OK);
    for (size_t i = 0; i < 4; i++)
        for (size_t j = 0; j < i; j++)
            ck_assert(min_delta_e(c->cats[i].color, c->cats[j].color) >= COLOR_MIN_DELTA_E);
    ck_assert(color_contrast(c->cats[4].color, c->style.background) >= 3.0);
    chart_done(c);
}
END_TEST

/* Category i drawn as glyph names[i]: each its own, or all squares. */
static const char *const glyph_names[] = {"person", "family", "house", "bus",
    "bicycle", "car", "school", "tree", "heart", "book", "tap", "bed",
    "phone", "bag", "cup", "star"};

static void own_glyphs(ug_chart *c)
{
    for (size_t i = 0; i < c->ncats; i++)
        c->cats[i].glyph.text = glyph_names[i];
}

/* More categories than colours wrap around the same order when each has its
** own glyph, a second cue besides colour (WCAG 2.1 SC 1.4.1). */
START_TEST(test_palette_wraps)
{
    size_t n = color_palette_size(UG_PALETTE_OKABE_ITO);
    ug_chart *c = bare_chart(2 * n);
    own_glyphs(c);
    ck_assert_int_eq(resolve_chart(c, NULL), UG_OK);
    for (size_t i = 0; i < n; i++)
        ck_assert(memcmp(&c->cats[i].color, &c->cats[i + n].color, 3) == 0);
    ck_assert_uint_eq(c->cats[n].color.mark.line, c->cats[n].mark.line);
    chart_done(c);
}
END_TEST

/* Text with no ink of its own follows the background: dark on light, light
** on dark (whichever contrasts more, by the WCAG 2.1 formula of color.c); a
** layout's own ink is kept even when it contrasts badly (the audit says so). */
START_TEST(test_ink_follows_background)
{
    const unsigned backgrounds[] = {0xffffff, 0x1b2433, 0x000000, 0x767676, 0xf5e6c8};
    for (size_t b = 0; b < 5; b++) {
        ug_chart *c = bare_chart(1);
        unsigned bg = backgrounds[b];
        c->style.background = color_rgb((bg >> 16) & 255, (bg >> 8) & 255, bg & 255);
        ck_assert_int_eq(resolve_chart(c, NULL), UG_OK);
        ug_color dark = color_rgb(0x22, 0x22, 0x22), light = color_rgb(0xf2, 0xf2, 0xf2);
        double want = fmax(color_contrast(dark, c->style.background),
                           color_contrast(light, c->style.background));
        ck_assert_double_eq_tol(color_contrast(c->style.ink, c->style.background), want, 1e-12);
        chart_done(c);
    }
    ug_chart *c = bare_chart(1);
    c->style.background = color_rgb(0, 0, 0);
    c->style.ink = color_rgb(0x11, 0x11, 0x11);
    c->style.ink.mark = (ug_mark){"test.yaml", 4, 8};
    ck_assert_int_eq(resolve_chart(c, NULL), UG_OK);
    ck_assert_int_eq(c->style.ink.r, 0x11);
    chart_done(c);
}
END_TEST

/* Okabe and Ito's palette (Color Universal Design, 2008) has eight colours,
** black among them, which unitgram leaves to text: seven to hand out, all
** safe on white once shaded to 3:1. An eighth category to colour
** is refused at `categories:` with both numbers, unless shape tells every
** category apart; a colour the layout gives takes no palette colour. */
START_TEST(test_more_categories_than_colours)
{
    ck_assert_uint_eq(color_palette_size(UG_PALETTE_OKABE_ITO), 7);
    ug_chart *c = bare_chart(8);
    c->categories_mark = (ug_mark){"test.yaml", 7, 1};
    ug_error err = {0};
    ck_assert_int_eq(resolve_chart(c, &err), UG_ESCHEMA);
    ck_assert_uint_eq(err.where.line, 7);
    ck_assert_msg(strstr(err.msg, "8 categories take their colour from the palette, but "
                                  "it has only 7 safe colours") &&
                  strstr(err.msg, "'Other'") && strstr(err.msg, "1.4.1"), "%s", err.msg);
    own_glyphs(c);
    c->cats[7].glyph.text = c->cats[0].glyph.text; /* two alike: colour alone again */
    ck_assert_int_eq(resolve_chart(c, &err), UG_ESCHEMA);
    c->cats[7].glyph.text = glyph_names[7];
    ck_assert_int_eq(resolve_chart(c, &err), UG_OK);
    chart_done(c);
    c = bare_chart(8);
    c->cats[3].color_given = true;
    ck_assert_int_eq(resolve_chart(c, NULL), UG_OK);
    chart_done(c);
}
END_TEST

/* The default family list follows the chart's language; Chinese takes the
** Han forms of its script (RFC 5646's script subtag, or the region's by
** CLDR likelySubtags); a layout's own style.font is kept whatever the
** language. */
START_TEST(test_font_follows_language)
{
    static const struct { const char *lang, *font; } cases[] = {
        {NULL, RESOLVE_FONT},          {"en", RESOLVE_FONT},
        {"ar", RESOLVE_FONT},          {"pt-PT", RESOLVE_FONT},
        {"zh-Hans", RESOLVE_FONT_HANS}, {"zh", RESOLVE_FONT_HANS},
        {"ZH-hans-CN", RESOLVE_FONT_HANS}, {"zh-SG", RESOLVE_FONT_HANS},
        {"zh-Hant", RESOLVE_FONT_HANT}, {"zh-TW", RESOLVE_FONT_HANT},
        {"zh-hk", RESOLVE_FONT_HANT},  {"zhx", RESOLVE_FONT},
    };
    for (size_t i = 0; i < sizeof cases / sizeof *cases; i++) {
        ug_chart *c = bare_chart(1);
        c->lang.text = cases[i].lang;
        ck_assert_msg(!strcmp(resolve_font(c), cases[i].font), "%s: %s",
                      cases[i].lang ? cases[i].lang : "(none)", resolve_font(c));
        c->style.font = "DejaVu Serif";
        c->style.font_mark = (ug_mark){"test.yaml", 4, 9};
        ck_assert_str_eq(resolve_font(c), "DejaVu Serif");
        chart_done(c);
    }
}
END_TEST

static Suite *resolve_suite(void)
{
    Suite *s = suite_create("resolve");
    TCase *t = tcase_create("resolve");
    tcase_add_test(t, test_defaults);
    tcase_add_test(t, test_font_follows_language);
    tcase_add_test(t, test_palette_safe_order);
    tcase_add_test(t, test_okabe_ito_on_white);
    tcase_add_test(t, test_palette_wraps);
    tcase_add_test(t, test_more_categories_than_colours);
    tcase_add_test(t, test_ink_follows_background);
    suite_add_tcase(s, t);
    return s;
}

int main(void) { return check_run(resolve_suite()); }
