/* Tests for src/text.c: pango measurement against librsvg's own layout of the
** same text, the pt/px relation, wrapping, and cleaning of strings. */
#define _POSIX_C_SOURCE 200809L
#include <check.h>
#include <librsvg/rsvg.h>
#include <pango/pangocairo.h>
#include <stdlib.h>
#include <string.h>

#include "resolve.h"
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
** instead, alone or anywhere in a fallback list; a generic family, an
** installed one, or a list of installed and generic ones is not. */
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
                                       "DejaVu Sans, serif", "DejaVu Sans,DejaVu Serif"};
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
    /* a misspelt fallback is refused too, named alone, first or last */
    static const char *const lists[] = {"DejaVu Sans, Unitgram Absent Family",
                                        " Unitgram Absent Family ,DejaVu Sans",
                                        "sans-serif, DejaVu Serif, Unitgram Absent Family"};
    for (size_t i = 0; i < sizeof lists / sizeof *lists; i++) {
        f.family = lists[i];
        memset(&err, 0, sizeof err);
        ck_assert_int_eq(text_wrap(&f, "Households", 0, &b, &err), UG_ERENDER);
        ck_assert_msg(strstr(err.msg, "font 'Unitgram Absent Family' is not installed"),
                      "%s: %s", lists[i], err.msg);
        ck_assert_msg(strstr(err.msg, substitute), "fc-match says '%s'; we said: %s",
                      substitute, err.msg);
        ck_assert_uint_eq(err.where.line, 7);
    }
}
END_TEST

START_TEST(test_clean)
{
    char *c = text_clean(cleans[_i].in);
    ck_assert_str_eq(c, cleans[_i].out);
    ug_free(c);
}
END_TEST

/* Whether fontconfig lists any font matching pattern (fc-list(1),
** fontconfig-bin). */
static bool fc_lists(const char *pattern)
{
    char cmd[192], line[512];
    snprintf(cmd, sizeof cmd, "fc-list '%s' family", pattern);
    FILE *f = popen(cmd, "r");
    ck_assert_ptr_nonnull(f);
    bool any = fgets(line, sizeof line, f) != NULL;
    pclose(f);
    return any;
}

/* Whether any installed font covers code point cp, as fontconfig answers. */
static bool some_font_has(unsigned long cp)
{
    char pattern[32];
    snprintf(pattern, sizeof pattern, ":charset=%lx", cp);
    return fc_lists(pattern);
}

/* Whether fontconfig lists a font of this family. */
static bool some_family(const char *family)
{
    char pattern[160];
    snprintf(pattern, sizeof pattern, ":family=%s", family);
    return fc_lists(pattern);
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

/* The family pango draws each character of s with, in the family list
** `family`: the fonts of its runs as pango itemizes them, with a font map
** of its own set up as src/text.c's is. librsvg lays the SVG's text out
** with pango too, so this is the face a PNG or PDF shows. Returns how
** many runs; their families (owned) into fams. */
static size_t run_families(const char *family, const char *s, char **fams, size_t max)
{
    PangoFontMap *map = pango_cairo_font_map_new();
    PangoContext *ctx = pango_font_map_create_context(map);
    PangoLayout *l = pango_layout_new(ctx);
    PangoFontDescription *d = pango_font_description_from_string(family);
    pango_font_description_set_absolute_size(d, 16 * PANGO_SCALE);
    pango_layout_set_font_description(l, d);
    pango_font_description_free(d);
    pango_layout_set_text(l, s, -1);
    size_t n = 0;
    PangoLayoutIter *it = pango_layout_get_iter(l);
    do {
        PangoLayoutRun *run = pango_layout_iter_get_run_readonly(it);
        if (!run || n == max)
            continue;
        PangoFontDescription *got = pango_font_describe(run->item->analysis.font);
        fams[n++] = strdup(pango_font_description_get_family(got));
        pango_font_description_free(got);
    } while (pango_layout_iter_next_run(it));
    pango_layout_iter_free(it);
    g_object_unref(l);
    g_object_unref(ctx);
    g_object_unref(map);
    return n;
}

/* make deps installs fonts-noto-cjk (Makefile, DEBIAN_PACKAGES): without it
** Chinese prints as boxes, so its absence fails here rather than skipping.
** The family name is the package's (fontconfig's fc-list on the files of
** Debian 12's fonts-noto-cjk 1:20220127+repack1-1). */
START_TEST(test_simplified_chinese_draws)
{
    ck_assert_msg(some_family("Noto Sans CJK SC"),
                  "no 'Noto Sans CJK SC' in fc-list: install Debian's fonts-noto-cjk "
                  "(make deps)");
    /* "community clinic visits", as zh-clinic.yaml writes them */
    static const char hans[] = "\xe7\xa4\xbe\xe5\x8c\xba\xe8\xaf\x8a\xe6\x89\x80"
                               "\xe5\xb0\xb1\xe8\xaf\x8a\xe4\xba\xba\xe6\xac\xa1";
    text_font f = {.family = RESOLVE_FONT_HANS, .size = 16};
    unsigned long got[4];
    size_t listed = 0;
    ck_assert_uint_eq(text_undrawable(&f, hans, got, 4, &listed), 0);
    text_block b;
    ug_error err;
    memset(&err, 0, sizeof err);
    ck_assert_msg(text_wrap(&f, hans, 0, &b, &err) == UG_OK, "%s", err.msg);
    ck_assert_double_gt(b.width, 0);
    text_block_free(&b);
    /* Han characters in the SC face, Latin and digits in DejaVu's */
    char *fams[8];
    size_t n = run_families(RESOLVE_FONT_HANS, hans, fams, 8);
    ck_assert_uint_ge(n, 1);
    for (size_t i = 0; i < n; i++) {
        ck_assert_msg(!strcmp(fams[i], "Noto Sans CJK SC"), "run %zu in '%s'", i, fams[i]);
        free(fams[i]);
    }
    n = run_families(RESOLVE_FONT_HANS, "2025 \xe5\xb9\xb4", fams, 8);
    ck_assert_uint_eq(n, 2);
    ck_assert_str_eq(fams[0], "DejaVu Sans");
    ck_assert_str_eq(fams[1], "Noto Sans CJK SC");
    free(fams[0]);
    free(fams[1]);
}
END_TEST

/* Characters no installed font has stay undrawable with the Chinese list
** too: a private-use one (U+E000) and an emoji newer than the fonts
** (U+1F9EA, test tube, Unicode 11). Each is first shown uncovered by
** fontconfig itself, so the test means something on this machine. */
START_TEST(test_undrawable_beyond_fallbacks)
{
    static const struct { const char *s; unsigned long cp; } none[] = {
        {"\xee\x80\x80", 0xe000}, {"\xf0\x9f\xa7\xaa", 0x1f9ea}};
    text_font f = {.family = RESOLVE_FONT_HANS, .size = 16};
    for (size_t i = 0; i < sizeof none / sizeof *none; i++) {
        ck_assert_msg(!some_font_has(none[i].cp), "U+%04lX: a font here has it", none[i].cp);
        unsigned long got[2];
        size_t listed = 0;
        char s[32];
        snprintf(s, sizeof s, "\xe8\xaf\x8a%s", none[i].s); /* after a Han character */
        ck_assert_uint_eq(text_undrawable(&f, s, got, 2, &listed), 1);
        ck_assert_uint_eq(got[0], none[i].cp);
    }
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
    tcase_add_test(t, test_simplified_chinese_draws);
    tcase_add_test(t, test_undrawable_beyond_fallbacks);
    tcase_add_loop_test(t, test_clean, 0, sizeof cleans / sizeof cleans[0]);
    suite_add_tcase(s, t);
    return s;
}

int main(void)
{
    return check_run(text_suite());
}
