/* Tests for src/colorparse.c: colour strings -> sRGB.
**
** Named colour values are those of W3C CSS Color Module Level 4, §6.1 "Named
** Colors" (148 names; the table there lists each keyword with its hex value).
** The whole table was also compared once, name by name, with the npm package
** color-name 2.1.1 (148 entries, 0 differences). Hex shorthand follows CSS
** Color 4 §5.2: "#abc" is "#aabbcc". */
#include <check.h>
#include <stdlib.h>
#include <string.h>

#include "colorparse.h"
#include "check_run.h"

typedef struct {
    const char *text;
    bool ok;
    unsigned long rgb; /* 0xRRGGBB when ok */
} color_case;

static const color_case cases[] = {
    /* CSS Color 4 §6.1 named colours (value from the standard's table) */
    {"rebeccapurple", true, 0x663399},
    {"aliceblue", true, 0xF0F8FF},
    {"darkgoldenrod", true, 0xB8860B},
    {"lightgoldenrodyellow", true, 0xFAFAD2},
    {"mediumslateblue", true, 0x7B68EE},
    {"yellowgreen", true, 0x9ACD32},
    {"navajowhite", true, 0xFFDEAD},
    {"gray", true, 0x808080},
    {"grey", true, 0x808080},
    {"darkslategrey", true, 0x2F4F4F},
    {"aqua", true, 0x00FFFF},
    {"cyan", true, 0x00FFFF},
    {"fuchsia", true, 0xFF00FF},
    {"magenta", true, 0xFF00FF},
    {"black", true, 0x000000},
    {"white", true, 0xFFFFFF},
    {"RebeccaPurple", true, 0x663399}, /* keywords are ASCII case-insensitive */
    {"WHITE", true, 0xFFFFFF},
    /* hex: CSS Color 4 §5.2 */
    {"#0072B2", true, 0x0072B2},
    {"#0072b2", true, 0x0072B2},
    {"#abc", true, 0xAABBCC},
    {"#FFF", true, 0xFFFFFF},
    {"rgb(0, 114, 178)", true, 0x0072B2},
    {"rgb(255,255,255)", true, 0xFFFFFF},
    {"RGB( 1 , 2 , 3 )", true, 0x010203},
    /* refused */
    {"transparent", false, 0},
    {"currentcolor", false, 0},
    {"currentColor", false, 0},
    {"#12345", false, 0},
    {"#1234567", false, 0},
    {"#ggg", false, 0},
    {"#", false, 0},
    {"", false, 0},
    {"blue ", false, 0},
    {"bluish", false, 0},
    {"rgb(256, 0, 0)", false, 0},
    {"rgb(1, 2)", false, 0},
    {"rgb(1, 2, 3) ", false, 0},
    {"rgb(1.5, 2, 3)", false, 0},
    {"rgb(-1, 2, 3)", false, 0},
    {"rgb(1, 2, 3", false, 0},
};

START_TEST(test_color_table)
{
    const color_case *c = &cases[_i];
    colorparse_rgb rgb;
    const char *why = NULL;
    bool ok = colorparse(c->text, strlen(c->text), &rgb, &why);
    ck_assert_msg(ok == c->ok, "'%s'", c->text);
    if (ok) {
        unsigned long got = (unsigned long)rgb.r << 16 | rgb.g << 8 | rgb.b;
        ck_assert_msg(got == c->rgb, "'%s' gave %06lX", c->text, got);
    } else {
        ck_assert_ptr_nonnull(why);
    }
}
END_TEST

/* CSS Color 4 §6.1 has 148 named colours ("transparent" and "currentcolor"
** are separate keywords). */
START_TEST(test_named_count)
{
    ck_assert_uint_eq(colorparse_named_count(), 148);
}
END_TEST

/* Lookup bisects, so the table must be sorted; and every entry must be found
** through the parser with its own value. */
START_TEST(test_named_sorted_and_found)
{
    unsigned long prev_rgb, rgb;
    const char *prev = colorparse_named_at(0, &prev_rgb);
    for (size_t i = 0; i < colorparse_named_count(); i++) {
        const char *name = colorparse_named_at(i, &rgb);
        if (i)
            ck_assert_msg(strcmp(prev, name) < 0, "%s before %s", prev, name);
        colorparse_rgb got;
        const char *why;
        ck_assert_msg(colorparse(name, strlen(name), &got, &why), "%s", name);
        ck_assert_uint_eq((unsigned long)got.r << 16 | got.g << 8 | got.b, rgb);
        prev = name;
    }
    ck_assert_ptr_null(colorparse_named_at(colorparse_named_count(), &rgb));
}
END_TEST

START_TEST(test_transparent_message)
{
    colorparse_rgb rgb;
    const char *why = NULL;
    ck_assert(!colorparse("transparent", 11, &rgb, &why));
    ck_assert_ptr_nonnull(strstr(why, "no colour of its own"));
}
END_TEST

/* Only n bytes are read: a name followed by more text in the buffer. */
START_TEST(test_length_bounded)
{
    colorparse_rgb rgb;
    const char *why;
    ck_assert(colorparse("redXYZ", 3, &rgb, &why));
    ck_assert_uint_eq(rgb.r, 255);
    ck_assert(!colorparse("red", 2, &rgb, &why));
}
END_TEST

static Suite *suite(void)
{
    Suite *s = suite_create("colorparse");
    TCase *t = tcase_create("parse");
    tcase_add_loop_test(t, test_color_table, 0, sizeof cases / sizeof cases[0]);
    tcase_add_test(t, test_named_count);
    tcase_add_test(t, test_named_sorted_and_found);
    tcase_add_test(t, test_transparent_message);
    tcase_add_test(t, test_length_bounded);
    suite_add_tcase(s, t);
    return s;
}

int main(void)
{
    return check_run(suite());
}
