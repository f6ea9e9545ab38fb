/* Tests for src/color.c: WCAG contrast, CIELAB and CIEDE2000, CVD simulation,
** palettes and the audit's colour helpers. Published sources are named beside
** each check value. */
#define _POSIX_C_SOURCE 200809L
#include <check.h>
#include <math.h>
#include <stdlib.h>

#include "color.h"
#include "check_run.h"

static ug_color hex(unsigned v)
{
    return color_rgb((v >> 16) & 255, (v >> 8) & 255, v & 255);
}

/* ---- WCAG ---------------------------------------------------------------- */

/* W3C WCAG 2.x contrast ratio; check pairs on white from REFERENCES.md §3:
** #000000 21.000 (definition: (1 + 0.05) / (0 + 0.05)); #767676 4.542, the
** lightest grey passing AA on white (widely cited); #777777 4.478 (recomputed
** from the W3C formula). */
typedef struct {
    unsigned fg;
    double ratio;
    bool passes_text;
} contrast_case;

static const contrast_case contrast_cases[] = {
    {0x000000, 21.000, true},
    {0x767676, 4.542, true},
    {0x777777, 4.478, false},
    {0xffffff, 1.000, false},
};

START_TEST(test_wcag_contrast_table)
{
    const contrast_case *c = &contrast_cases[_i];
    double r = color_contrast(hex(c->fg), hex(0xffffff));
    ck_assert_double_eq_tol(r, c->ratio, 0.0005);
    ck_assert_double_eq_tol(color_contrast(hex(0xffffff), hex(c->fg)), r, 1e-12);
    ck_assert(color_contrast_passes(r, COLOR_WCAG_TEXT) == c->passes_text);
}
END_TEST

/* Understanding SC 1.4.11: thresholds are not rounded, 2.999 fails 3. */
START_TEST(test_wcag_threshold_not_rounded)
{
    ck_assert(!color_contrast_passes(2.999, COLOR_WCAG_NON_TEXT));
    ck_assert(color_contrast_passes(3.0, COLOR_WCAG_NON_TEXT));
    ck_assert(!color_contrast_passes(4.4999, COLOR_WCAG_TEXT));
    ck_assert_double_eq(COLOR_WCAG_TEXT, 4.5);
    ck_assert_double_eq(COLOR_WCAG_LARGE_TEXT, 3.0);
}
END_TEST

/* The sRGB curve (IEC 61966-2-1) is invertible on 8-bit values, and its two
** pieces meet at 0.04045 (8-bit 10 and 11 lie on either side). */
START_TEST(test_srgb_round_trip)
{
    for (int c = 0; c < 256; c++)
        ck_assert_int_eq(color_channel_encode(color_channel_linear(c)), c);
    ck_assert_double_eq_tol(color_channel_linear(10), 10 / 255.0 / 12.92, 1e-12);
    ck_assert_double_eq_tol(color_channel_linear(255), 1.0, 1e-12);
    ck_assert_int_eq(color_channel_encode(-0.5), 0);
    ck_assert_int_eq(color_channel_encode(NAN), 0);
    ck_assert_int_eq(color_channel_encode(1.5), 255);
    ck_assert_double_eq_tol(color_luminance(hex(0xffffff)), 1.0, 1e-12);
    ck_assert_double_eq(color_luminance(hex(0x000000)), 0.0);
}
END_TEST

START_TEST(test_format_hex)
{
    char buf[8];
    ck_assert_str_eq(color_format_hex(hex(0x0072b2), buf), "#0072b2");
    ck_assert_str_eq(color_format_hex(hex(0xffffff), buf), "#ffffff");
}
END_TEST

/* ---- CIEDE2000: Sharma, Wu & Dalal (2005), Table 1, all 34 pairs --------- */

typedef struct {
    color_lab a, b;
    double de;
} de_case;

static const de_case sharma[] = {
    {{50.0000, 2.6772, -79.7751}, {50.0000, 0.0000, -82.7485}, 2.0425},
    {{50.0000, 3.1571, -77.2803}, {50.0000, 0.0000, -82.7485}, 2.8615},
    {{50.0000, 2.8361, -74.0200}, {50.0000, 0.0000, -82.7485}, 3.4412},
    {{50.0000, -1.3802, -84.2814}, {50.0000, 0.0000, -82.7485}, 1.0000},
    {{50.0000, -1.1848, -84.8006}, {50.0000, 0.0000, -82.7485}, 1.0000},
    {{50.0000, -0.9009, -85.5211}, {50.0000, 0.0000, -82.7485}, 1.0000},
    {{50.0000, 0.0000, 0.0000}, {50.0000, -1.0000, 2.0000}, 2.3669},
    {{50.0000, -1.0000, 2.0000}, {50.0000, 0.0000, 0.0000}, 2.3669},
    {{50.0000, 2.4900, -0.0010}, {50.0000, -2.4900, 0.0009}, 7.1792},
    {{50.0000, 2.4900, -0.0010}, {50.0000, -2.4900, 0.0010}, 7.1792},
    {{50.0000, 2.4900, -0.0010}, {50.0000, -2.4900, 0.0011}, 7.2195},
    {{50.0000, 2.4900, -0.0010}, {50.0000, -2.4900, 0.0012}, 7.2195},
    {{50.0000, -0.0010, 2.4900}, {50.0000, 0.0009, -2.4900}, 4.8045},
    {{50.0000, -0.0010, 2.4900}, {50.0000, 0.0010, -2.4900}, 4.8045},
    {{50.0000, -0.0010, 2.4900}, {50.0000, 0.0011, -2.4900}, 4.7461},
    {{50.0000, 2.5000, 0.0000}, {50.0000, 0.0000, -2.5000}, 4.3065},
    {{50.0000, 2.5000, 0.0000}, {73.0000, 25.0000, -18.0000}, 27.1492},
    {{50.0000, 2.5000, 0.0000}, {61.0000, -5.0000, 29.0000}, 22.8977},
    {{50.0000, 2.5000, 0.0000}, {56.0000, -27.0000, -3.0000}, 31.9030},
    {{50.0000, 2.5000, 0.0000}, {58.0000, 24.0000, 15.0000}, 19.4535},
    {{50.0000, 2.5000, 0.0000}, {50.0000, 3.1736, 0.5854}, 1.0000},
    {{50.0000, 2.5000, 0.0000}, {50.0000, 3.2972, 0.0000}, 1.0000},
    {{50.0000, 2.5000, 0.0000}, {50.0000, 1.8634, 0.5757}, 1.0000},
    {{50.0000, 2.5000, 0.0000}, {50.0000, 3.2592, 0.3350}, 1.0000},
    {{60.2574, -34.0099, 36.2677}, {60.4626, -34.1751, 39.4387}, 1.2644},
    {{63.0109, -31.0961, -5.8663}, {62.8187, -29.7946, -4.0864}, 1.2630},
    {{61.2901, 3.7196, -5.3901}, {61.4292, 2.2480, -4.9620}, 1.8731},
    {{35.0831, -44.1164, 3.7933}, {35.0232, -40.0716, 1.5901}, 1.8645},
    {{22.7233, 20.0904, -46.6940}, {23.0331, 14.9730, -42.5619}, 2.0373},
    {{36.4612, 47.8580, 18.3852}, {36.2715, 50.5065, 21.2231}, 1.4146},
    {{90.8027, -2.0831, 1.4410}, {91.1528, -1.6435, 0.0447}, 1.4441},
    {{90.9257, -0.5406, -0.9208}, {88.6381, -0.8985, -0.7239}, 1.5381},
    {{6.7747, -0.2908, -2.4247}, {5.8714, -0.0985, -2.2286}, 0.6377},
    {{2.0776, 0.0795, -1.1350}, {0.9033, -0.0636, -0.5514}, 0.9082},
};

_Static_assert(sizeof sharma / sizeof sharma[0] == 34, "all 34 published pairs");

/* The published values have four decimals: agree to half a unit in the last. */
START_TEST(test_ciede2000_sharma)
{
    const de_case *c = &sharma[_i];
    ck_assert_double_eq_tol(color_delta_e00(c->a, c->b), c->de, 5e-5);
    ck_assert_double_eq_tol(color_delta_e00(c->b, c->a), c->de, 5e-5);
}
END_TEST

/* sRGB -> CIELAB (D65). Check values: REFERENCES.md §5 (IEC 61966-2-1 matrix,
** Lindbloom's Lab equations): #FF0000 -> (53.24, 80.09, 67.20), #FFFFFF ->
** L 100. LittleCMS builds sRGB from the primaries' chromaticities rather than
** the rounded 4-digit matrix, which moves red's a* by about 0.03, so the
** tolerance is 0.05 per coordinate; white is exact to 0.01. */
START_TEST(test_lab_check_values)
{
    ug_color in[3] = {hex(0xff0000), hex(0xffffff), hex(0x000000)};
    color_lab lab[3];
    ug_error err = {0};
    ck_assert_int_eq(color_to_lab(in, 3, lab, &err), UG_OK);
    ck_assert_double_eq_tol(lab[0].L, 53.24, 0.05);
    ck_assert_double_eq_tol(lab[0].a, 80.09, 0.05);
    ck_assert_double_eq_tol(lab[0].b, 67.20, 0.05);
    ck_assert_double_eq_tol(lab[1].L, 100.0, 0.01);
    ck_assert_double_eq_tol(lab[1].a, 0.0, 0.01);
    ck_assert_double_eq_tol(lab[1].b, 0.0, 0.01);
    ck_assert_double_eq_tol(lab[2].L, 0.0, 0.01);
}
END_TEST

/* ---- CVD simulation (Machado, Oliveira & Fernandes 2009) ---------------- */

/* Every matrix row sums to 1, so every grey maps to itself. */
START_TEST(test_cvd_greys_unchanged)
{
    for (int v = 0; v < COLOR_VISION_COUNT; v++)
        for (int g = 0; g < 256; g++) {
            ug_color c = color_simulate(color_rgb(g, g, g), (color_vision)v);
            ck_assert_msg(c.r == g && c.g == g && c.b == g, "%s grey %d",
                          color_vision_name((color_vision)v), g);
        }
}
END_TEST

/* Check values from Debian's python3-colorspacious 1.1.2, which implements the
** same published model: cspace_convert(rgb, {"name": "sRGB1+CVD", "cvd_type":
** "protanomaly"|"deuteranomaly"|"tritanomaly", "severity": 100}, "sRGB1"),
** clipped to [0, 1], times 255, rounded. */
typedef struct {
    color_vision v;
    unsigned in, out;
} cvd_case;

static const cvd_case cvd_cases[] = {
    {COLOR_VISION_PROTANOPIA, 0xff0000, 0x6d5f00},   /* 109, 95, 0 */
    {COLOR_VISION_PROTANOPIA, 0x00ff00, 0xffe500},   /* 255, 229, 0 */
    {COLOR_VISION_PROTANOPIA, 0x0000ff, 0x0059ff},   /* 0, 89, 255 */
    {COLOR_VISION_PROTANOPIA, 0xe69f00, 0xb9a200},   /* 185, 162, 0 */
    {COLOR_VISION_DEUTERANOPIA, 0xff0000, 0xa39000}, /* 163, 144, 0 */
    {COLOR_VISION_DEUTERANOPIA, 0x00ff00, 0xefd63a}, /* 239, 214, 58 */
    {COLOR_VISION_DEUTERANOPIA, 0x0000ff, 0x003dfb}, /* 0, 61, 251 */
    {COLOR_VISION_DEUTERANOPIA, 0x0072b2, 0x3b66b1}, /* 59, 103, 177 */
    {COLOR_VISION_TRITANOPIA, 0xff0000, 0xff000f},   /* 255, 0, 15 */
    {COLOR_VISION_TRITANOPIA, 0x00ff00, 0x00f7d9},   /* 0, 247, 217 */
    {COLOR_VISION_TRITANOPIA, 0x0000ff, 0x006b96},   /* 0, 107, 150 */
    {COLOR_VISION_TRITANOPIA, 0xe69f00, 0xfb8c87},   /* 251, 140, 135 */
};

START_TEST(test_cvd_check_values)
{
    const cvd_case *c = &cvd_cases[_i];
    ug_color got = color_simulate(hex(c->in), c->v), want = hex(c->out);
    ck_assert_msg(abs(got.r - want.r) <= 1 && abs(got.g - want.g) <= 1 &&
                      abs(got.b - want.b) <= 1,
                  "%s of #%06x: got %d,%d,%d", color_vision_name(c->v), c->in,
                  got.r, got.g, got.b);
}
END_TEST

START_TEST(test_normal_vision_is_identity)
{
    ug_color c = color_simulate(hex(0x123456), COLOR_VISION_NORMAL);
    ck_assert(color_equal(c, hex(0x123456)));
    ck_assert_str_eq(color_vision_name(COLOR_VISION_TRITANOPIA), "tritanopia");
}
END_TEST

/* ---- palettes (REFERENCES.md §10) ---------------------------------------- */

START_TEST(test_palettes)
{
    ck_assert_uint_eq(color_palette_size(UG_PALETTE_OKABE_ITO), 7);
    ck_assert_uint_eq(color_palette_size(UG_PALETTE_TOL_BRIGHT), 7);
    ck_assert_uint_eq(color_palette_size(UG_PALETTE_TOL_MUTED), 9);
    /* Okabe & Ito: orange first, reddish purple last, black left out (our choice). */
    ck_assert(color_equal(color_palette_at(UG_PALETTE_OKABE_ITO, 0), hex(0xe69f00)));
    ck_assert(color_equal(color_palette_at(UG_PALETTE_OKABE_ITO, 6), hex(0xcc79a7)));
    ck_assert(color_equal(color_palette_at(UG_PALETTE_OKABE_ITO, 7), hex(0xe69f00)));
    /* Tol (2021): bright starts #4477AA, muted #CC6677 and ends #AA4499. */
    ck_assert(color_equal(color_palette_at(UG_PALETTE_TOL_BRIGHT, 0), hex(0x4477aa)));
    ck_assert(color_equal(color_palette_at(UG_PALETTE_TOL_MUTED, 0), hex(0xcc6677)));
    ck_assert(color_equal(color_palette_at(UG_PALETTE_TOL_MUTED, 8), hex(0xaa4499)));
    ck_assert_str_eq(color_palette_name(UG_PALETTE_TOL_MUTED), "tol-muted");
}
END_TEST

/* ---- helpers for the audit ---------------------------------------------- */

typedef struct {
    unsigned fg, bg;
    double threshold;
    bool possible;
} shade_case;

static const shade_case shade_cases[] = {
    {0xe69f00, 0xffffff, COLOR_WCAG_NON_TEXT, true}, /* orange on white: darken */
    {0xf0e442, 0xffffff, COLOR_WCAG_TEXT, true},     /* yellow on white */
    {0x0072b2, 0x000000, COLOR_WCAG_TEXT, true},     /* blue on black: lighten */
    {0x0072b2, 0xffffff, COLOR_WCAG_TEXT, true},     /* already passes */
    {0x777777, 0x777777, 21.0, false},               /* nothing reaches 21 on grey */
};

START_TEST(test_shade_for_contrast)
{
    const shade_case *c = &shade_cases[_i];
    ug_color fg = hex(c->fg), bg = hex(c->bg), out = hex(0x010203);
    bool ok = color_shade_for_contrast(fg, bg, c->threshold, &out);
    ck_assert(ok == c->possible);
    if (!ok) {
        ck_assert(color_equal(out, hex(0x010203)));
        return;
    }
    double r = color_contrast(out, bg);
    ck_assert(color_contrast_passes(r, c->threshold));
    if (color_contrast_passes(color_contrast(fg, bg), c->threshold))
        ck_assert(color_equal(out, fg)); /* nothing to change */
    else
        ck_assert_msg(r < c->threshold * 1.03, "not the nearest: %.3f", r);
    /* Same hue: the channels keep their order. */
    ck_assert((fg.r >= fg.g) == (out.r >= out.g) || fg.r == fg.g);
}
END_TEST

/* The chosen replacement beats every other unused palette colour on the
** smallest difference under all four kinds of vision (brute force). */
START_TEST(test_best_replacement)
{
    ug_color others[2] = {hex(0xe69f00), hex(0xd55e00)};
    color_pick pick;
    ug_error err = {0};
    ck_assert_int_eq(color_best_replacement(UG_PALETTE_OKABE_ITO, others, 2, NULL,
                                            &pick, &err), UG_OK);
    ck_assert(pick.found);
    ck_assert(!color_equal(pick.color, others[0]) &&
              !color_equal(pick.color, others[1]));
    for (size_t i = 0; i < color_palette_size(UG_PALETTE_OKABE_ITO); i++) {
        ug_color c = color_palette_at(UG_PALETTE_OKABE_ITO, i);
        double d;
        ck_assert_int_eq(color_min_difference(c, others, 2, &d, &err), UG_OK);
        if (color_equal(c, pick.color))
            ck_assert_double_eq_tol(d, pick.min_de, 1e-9);
        else if (!color_equal(c, others[0]) && !color_equal(c, others[1]))
            ck_assert(d <= pick.min_de);
    }
}
END_TEST

/* With a background, colours that reach 3:1 win over any that do not. */
START_TEST(test_best_replacement_prefers_contrast)
{
    ug_color others[1] = {hex(0x0072b2)}, bg = hex(0xffffff);
    color_pick pick;
    ug_error err = {0};
    ck_assert_int_eq(color_best_replacement(UG_PALETTE_OKABE_ITO, others, 1, &bg,
                                            &pick, &err), UG_OK);
    ck_assert(pick.found && pick.contrast_ok);
    ck_assert(color_contrast(pick.color, bg) >= 3.0);
}
END_TEST

START_TEST(test_best_replacement_none_left)
{
    ug_color all[9];
    size_t n = color_palette_size(UG_PALETTE_TOL_MUTED);
    for (size_t i = 0; i < n; i++)
        all[i] = color_palette_at(UG_PALETTE_TOL_MUTED, i);
    color_pick pick;
    ug_error err = {0};
    ck_assert_int_eq(color_best_replacement(UG_PALETTE_TOL_MUTED, all, n, NULL,
                                            &pick, &err), UG_OK);
    ck_assert(!pick.found);
}
END_TEST

/* Each allocation failing in turn gives a clean error, never a crash. */
START_TEST(test_replacement_allocation_failures)
{
    ug_color others[2] = {hex(0xe69f00), hex(0xd55e00)};
    for (long n = 0;; n++) {
        color_pick pick;
        ug_error err = {0};
        ug_mem_fail_after(n);
        ug_status st = color_best_replacement(UG_PALETTE_OKABE_ITO, others, 2,
                                              NULL, &pick, &err);
        ug_mem_fail_after(-1);
        if (st == UG_OK)
            break;
        ck_assert_int_eq(st, UG_ENOMEM);
    }
}
END_TEST

static Suite *color_suite(void)
{
    Suite *s = suite_create("color");
    TCase *t = tcase_create("color");
    tcase_add_loop_test(t, test_wcag_contrast_table, 0,
                        sizeof contrast_cases / sizeof contrast_cases[0]);
    tcase_add_test(t, test_wcag_threshold_not_rounded);
    tcase_add_test(t, test_srgb_round_trip);
    tcase_add_test(t, test_format_hex);
    tcase_add_loop_test(t, test_ciede2000_sharma, 0, sizeof sharma / sizeof sharma[0]);
    tcase_add_test(t, test_lab_check_values);
    tcase_add_test(t, test_cvd_greys_unchanged);
    tcase_add_loop_test(t, test_cvd_check_values, 0,
                        sizeof cvd_cases / sizeof cvd_cases[0]);
    tcase_add_test(t, test_normal_vision_is_identity);
    tcase_add_test(t, test_palettes);
    tcase_add_loop_test(t, test_shade_for_contrast, 0,
                        sizeof shade_cases / sizeof shade_cases[0]);
    tcase_add_test(t, test_best_replacement);
    tcase_add_test(t, test_best_replacement_prefers_contrast);
    tcase_add_test(t, test_best_replacement_none_left);
    tcase_add_test(t, test_replacement_allocation_failures);
    suite_add_tcase(s, t);
    return s;
}

int main(void)
{
    return check_run(color_suite());
}
