/* Tests for src/text.c: pango measurement against librsvg's own layout of the
** same text, the pt/px relation, wrapping, and cleaning of strings. */
#define _POSIX_C_SOURCE 200809L
#include <check.h>
#include <librsvg/rsvg.h>
#include <pango/pangocairo.h>
#include <stdlib.h>
#include <string.h>

#include "text.h"
#include "check_run.h"

/* librsvg lays out <text> itself; what it draws (the ink box it reports for
** the element, x = 10) must lie inside the width we measured and reserve, and
** fill it up to the side bearings, or wrapped lines would collide or gape in
** the rendered picture. */
START_TEST(test_width_matches_librsvg)
{
    static const char *const samples[] = {"Hamburgefonts", "Families with children",
                                          "412 households \xc2\xb7 49 squares"};
    for (size_t i = 0; i < 3; i++) {
        char svg[512];
        int n = snprintf(svg, sizeof svg,
                         "<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"800\" "
                         "height=\"100\"><text id=\"t\" x=\"10\" y=\"50\" "
                         "font-family=\"DejaVu Sans\" font-size=\"16\">%s</text></svg>",
                         samples[i]);
        GError *e = NULL;
        RsvgHandle *r = rsvg_handle_new_from_data((const guint8 *)svg, (gsize)n, &e);
        ck_assert_ptr_nonnull(r);
        RsvgRectangle vp = {0, 0, 800, 100}, ink, logical;
        ck_assert(rsvg_handle_get_geometry_for_layer(r, "#t", &vp, &ink, &logical, &e));
        text_font f = {"DejaVu Sans", 16, false, {NULL, 0, 0}};
        double w = text_width(&f, samples[i]);
        double left = ink.x - 10, right = ink.x + ink.width - 10;
        (void)logical;
        ck_assert_msg(left >= 0 && right <= w + 0.01 && w - right < 2.0,
                      "'%s': ours 0..%.2f, librsvg draws %.2f..%.2f", samples[i], w,
                      left, right);
        g_object_unref(r);
    }
}
END_TEST

/* CSS Values and Units: 1pt = 4/3 px at 96 px per inch, so "DejaVu Sans 12"
** at 96 dpi is our 16 px. */
START_TEST(test_points_and_pixels)
{
    PangoFontMap *map = pango_cairo_font_map_new();
    PangoContext *ctx = pango_font_map_create_context(map);
    cairo_font_options_t *o = cairo_font_options_create();
    cairo_font_options_set_hint_metrics(o, CAIRO_HINT_METRICS_OFF);
    pango_cairo_context_set_font_options(ctx, o);
    pango_cairo_context_set_resolution(ctx, 96);
    pango_context_set_round_glyph_positions(ctx, FALSE);
    PangoLayout *l = pango_layout_new(ctx);
    PangoFontDescription *d = pango_font_description_from_string("DejaVu Sans 12");
    pango_layout_set_font_description(l, d);
    pango_layout_set_text(l, "Hamburgefonts", -1);
    int w, h;
    pango_layout_get_size(l, &w, &h);
    text_font f = {"DejaVu Sans", 16, false, {NULL, 0, 0}};
    ck_assert_double_eq_tol(text_width(&f, "Hamburgefonts"), (double)w / PANGO_SCALE, 0.01);
    pango_font_description_free(d);
    g_object_unref(l);
    g_object_unref(ctx);
    g_object_unref(map);
    cairo_font_options_destroy(o);
}
END_TEST

START_TEST(test_wrap_keeps_words_and_width)
{
    const char *s = "Who the Alder Lane pantry served in 2025, by type of household";
    text_font f = {"DejaVu Sans", 16, true, {NULL, 0, 0}};
    text_block b;
    ug_error err;
    memset(&err, 0, sizeof err);
    ck_assert_int_eq(text_wrap(&f, s, 200, &b, &err), UG_OK);
    ck_assert_uint_gt(b.n, 2);
    char joined[256] = "";
    for (size_t i = 0; i < b.n; i++) {
        ck_assert(b.widths[i] <= 200.5);
        ck_assert(b.lines[i][0] != ' ' && b.lines[i][strlen(b.lines[i]) - 1] != ' ');
        strcat(joined, i ? " " : "");
        strcat(joined, b.lines[i]);
    }
    ck_assert_str_eq(joined, s);
    ck_assert(b.pitch >= b.ascent + b.descent);
    text_block_free(&b);
    /* a word a little wider than the width sets the block smaller, whole:
    ** the widest size in 5 % steps at which pango measures it within 140 px */
    double room = 0.88 * text_width(&f, "Neighbourhood");
    ck_assert_int_eq(text_wrap(&f, "Neighbourhood watch", room, &b, &err), UG_OK);
    ck_assert_str_eq(b.lines[0], "Neighbourhood");
    ck_assert(b.px < 16 && b.px >= 16 * 0.7 && b.widths[0] <= room + 0.5);
    text_font larger = f;
    larger.size = b.px + 16 * 0.05;
    ck_assert(text_width(&larger, "Neighbourhood") > room + 0.5); /* a step up is too wide */
    text_block_free(&b);
    /* a word too wide even at 70 % is broken between characters, at full size */
    ck_assert_int_eq(text_wrap(&f, "Supercalifragilistic", 60, &b, &err), UG_OK);
    ck_assert_uint_gt(b.n, 1);
    ck_assert(b.px == 16);
    for (size_t i = 0; i < b.n; i++)
        ck_assert(b.widths[i] <= 60.5);
    text_block_free(&b);
    ck_assert_int_eq(text_wrap(&f, "one\ntwo", 0, &b, &err), UG_OK);
    ck_assert_uint_eq(b.n, 2);
    text_block_free(&b);
    /* a width beyond pango's integer units (fuzz_draw found 7e15) is one line,
    ** not undefined behaviour (the sanitized pass runs this with UBSan) */
    ck_assert_int_eq(text_wrap(&f, s, 7e15, &b, &err), UG_OK);
    ck_assert_uint_eq(b.n, 1);
    text_block_free(&b);
}
END_TEST

typedef struct {
    const char *in, *out;
} clean_case;

static const clean_case cleans[] = {
    {"plain", "plain"},
    {"tab\there", "tab here"},
    {"bell\a", "bell "},
    {"line\nbreak", "line\nbreak"},
    {"caf\xc3\xa9", "caf\xc3\xa9"},
    {"bad \xff byte", "bad \xef\xbf\xbd byte"},
    {"cut \xc3", "cut \xef\xbf\xbd"},
    {"\xef\xbf\xbe", "\xef\xbf\xbd"}, /* U+FFFE is not an XML character */
    /* Unicode §23.7 noncharacters (U+FDD0..U+FDEF, U+nFFFE, U+nFFFF): the
    ** HTML Living Standard §13.2.3.5 makes each a parse error. */
    {"a\xef\xbf\xbf" "b", "a\xef\xbf\xbd" "b"},
    {"\xef\xb7\x90\xef\xb7\xaf", "\xef\xbf\xbd\xef\xbf\xbd"},
    {"\xef\xb7\x8f\xef\xb7\xb0", "\xef\xb7\x8f\xef\xb7\xb0"}, /* U+FDCF, U+FDF0 */
    {"\xf0\x9f\xbf\xbe\xf0\x9f\xbf\xbf", "\xef\xbf\xbd\xef\xbf\xbd"},
    {"\xf4\x8f\xbf\xbf", "\xef\xbf\xbd"}, /* U+10FFFF */
    {"\xef\xbf\xbd\xef\xbf\xbc", "\xef\xbf\xbd\xef\xbf\xbc"}, /* U+FFFD, U+FFFC */
    /* XML 1.0 §2.2 discourages DEL and the C1 controls */
    {"del\x7f c1\xc2\x85\xc2\x9f", "del  c1  "},
};

/* The family fontconfig substitutes for `name`, as its own command-line tool
** says (fc-match(1), fontconfig-bin): the outside answer our message must give. */
static void fc_match(const char *name, char *out, size_t size)
{
    char cmd[256];
    snprintf(cmd, sizeof cmd, "fc-match -f '%%{family[0]}' '%s'", name);
    FILE *f = popen(cmd, "r");
    ck_assert_ptr_nonnull(f);
    size_t n = fread(out, 1, size - 1, f);
    out[n] = '\0';
    ck_assert_int_eq(pclose(f), 0);
    ck_assert_uint_gt(n, 0);
}

/* A family that is not installed is an error naming what would be drawn
** instead; a generic family, an installed one, or a list holding one is not. */
START_TEST(test_family_must_be_installed)
{
    static const char absent[] = "Unitgram Absent Family";
    char substitute[128];
    fc_match(absent, substitute, sizeof substitute);
    text_font f = {absent, 16, false, {"layout.yaml", 7, 9}};
    text_block b;
    ug_error err;
    memset(&err, 0, sizeof err);
    ck_assert_int_eq(text_wrap(&f, "Households", 0, &b, &err), UG_ERENDER);
    ck_assert_ptr_nonnull(strstr(err.msg, absent));
    ck_assert_msg(strstr(err.msg, substitute), "fc-match says '%s'; we said: %s",
                  substitute, err.msg);
    ck_assert_uint_eq(err.where.line, 7);
    ck_assert_uint_eq(err.where.column, 9);
    ck_assert_uint_eq(b.n, 0);
    static const char *const fine[] = {"DejaVu Serif", "sans-serif", "Monospace",
                                       "Unitgram Absent Family, DejaVu Sans",
                                       "Unitgram Absent Family, serif"};
    for (size_t i = 0; i < sizeof fine / sizeof *fine; i++) {
        f.family = fine[i];
        ck_assert_msg(text_wrap(&f, "Households", 0, &b, &err) == UG_OK, "%s: %s",
                      fine[i], err.msg);
        ck_assert_uint_eq(b.n, 1);
        text_block_free(&b);
    }
    /* asked again after a good family, the absent one is still refused */
    f.family = absent;
    ck_assert_int_eq(text_wrap(&f, "Households", 0, &b, &err), UG_ERENDER);
}
END_TEST

START_TEST(test_clean)
{
    char *c = text_clean(cleans[_i].in);
    ck_assert_str_eq(c, cleans[_i].out);
    ug_free(c);
}
END_TEST

/* Whether any installed font covers code point cp, as fontconfig itself
** answers (fc-list(1) with a charset pattern, fontconfig-bin). */
static bool some_font_has(unsigned long cp)
{
    char cmd[96], line[512];
    snprintf(cmd, sizeof cmd, "fc-list ':charset=%lx' family", cp);
    FILE *f = popen(cmd, "r");
    ck_assert_ptr_nonnull(f);
    bool any = fgets(line, sizeof line, f) != NULL;
    pclose(f);
    return any;
}

/* text_undrawable agrees with fontconfig character by character: Latin,
** accented Latin, Greek, Cyrillic, Arabic, Hebrew, CJK, an emoji and a
** private-use character, each undrawable exactly when no font covers it. */
START_TEST(test_undrawable_matches_fontconfig)
{
    static const char *const samples[] = {"A", "\xc3\xa9", "\xce\xb2", "\xd0\x96",
                                          "\xd8\xb9", "\xd7\x90", "\xe4\xb8\xad",
                                          "\xf0\x9f\x98\x80", "\xf4\x8f\xbf\xbd"};
    text_font f = {.family = "DejaVu Sans", .size = 16};
    size_t undrawable = 0;
    for (size_t k = 0; k < sizeof samples / sizeof *samples; k++) {
        unsigned long cp, got[2];
        ug_utf8_decode(samples[k], strlen(samples[k]), &cp);
        size_t listed = 0, n = text_undrawable(&f, samples[k], got, 2, &listed);
        bool covered = some_font_has(cp);
        ck_assert_msg((n == 0) == covered, "U+%04lX: %zu undrawable, fontconfig says %s",
                      cp, n, covered ? "covered" : "not covered");
        if (n) {
            ck_assert_uint_eq(listed, 1);
            ck_assert_uint_eq(got[0], cp);
            undrawable++;
        }
    }
    ck_assert_uint_ge(undrawable, 1); /* the private-use U+10FFFD at least */
    /* distinct, in order, spaces not listed */
    unsigned long got[4];
    size_t listed = 0;
    ck_assert_uint_eq(text_undrawable(&f, "a \xf4\x8f\xbf\xbd b \xf4\x8f\xbf\xbd \xe4\xb8\xad",
                                      got, 1, &listed), 1 + !some_font_has(0x4e2d));
    ck_assert_uint_eq(listed, 1);
    ck_assert_uint_eq(got[0], 0x10fffd);
    ck_assert_uint_eq(text_undrawable(&f, "plain text", got, 4, &listed), 0);
}
END_TEST

static Suite *text_suite(void)
{
    Suite *s = suite_create("text");
    TCase *t = tcase_create("text");
    tcase_add_test(t, test_width_matches_librsvg);
    tcase_add_test(t, test_points_and_pixels);
    tcase_add_test(t, test_wrap_keeps_words_and_width);
    tcase_add_test(t, test_family_must_be_installed);
    tcase_add_test(t, test_undrawable_matches_fontconfig);
    tcase_add_loop_test(t, test_clean, 0, sizeof cleans / sizeof cleans[0]);
    suite_add_tcase(s, t);
    return s;
}

int main(void)
{
    return check_run(text_suite());
}
