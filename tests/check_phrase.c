/* Tests for src/phrase.c and the words it gives the description, the key
** and the web page (FORMAT.md §6). The expected sentences are written out by
** hand for each shipped language: the catalog's wording (src/phrase_catalog.c)
** with numbers as CLDR writes them (REFERENCES.md §14: the decimal sign and
** grouping of each language, Spanish and Polish leaving four-digit numbers
** ungrouped, Arabic-Indic digits for ar) and CLDR plural rules (Polish 124
** and 22 are "few", 10 is "many"; Arabic 124 is "many", 2 is "two").
**
** The chart: icon-value 10, A = 1234.5, B = 22, total 1256.5 -> 126 icons
** (round half up of 125.65); quotas 123.45 and 2.2, whole parts 123 + 2, the
** leftover icon to the larger remainder (.45): A 124 icons, B 2. */
#define _POSIX_C_SOURCE 200809L
#include <check.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "model.h"
#include "scene.h"
#include "phrase.h"
#include "phrase_int.h"
#include "check_run.h"

typedef struct {
    const char *lang, *unit, *desc, *key, *html;
    const char *detail; /* category A's key entry */
} lang_case;

static const lang_case cases[] = {
    {"en", "{one: person, other: people}",
     "Pictogram chart: T. Each icon is 10 people. A: 1,234.5 people (124 icons). "
     "B: 22 people (2 icons).",
     "Each icon = 10 people", "<html lang=\"en\" dir=\"ltr\">",
     "1,234.5 people \u00b7 124 icons"},
    {"es", "personas",
     "Gráfico de pictogramas: T. Cada icono equivale a 10 personas. "
     "A: 1234,5 personas (124 iconos). B: 22 personas (2 iconos).",
     "Cada icono = 10 personas", "<html lang=\"es\" dir=\"ltr\">",
     "1234,5 personas \u00b7 124 iconos"},
    {"fr", "personnes",
     "Graphique à pictogrammes\u00a0: T. Chaque icône représente 10 personnes. "
     "A\u00a0: 1\u202f234,5 personnes (124 icônes). B\u00a0: 22 personnes (2 icônes).",
     "Chaque icône = 10 personnes", "<html lang=\"fr\" dir=\"ltr\">",
     "1\u202f234,5 personnes \u00b7 124 icônes"},
    {"de", "Personen",
     "Piktogrammdiagramm: T. Jedes Symbol steht für 10 Personen. "
     "A: 1.234,5 Personen (124 Symbole). B: 22 Personen (2 Symbole).",
     "Jedes Symbol = 10 Personen", "<html lang=\"de\" dir=\"ltr\">",
     "1.234,5 Personen \u00b7 124 Symbole"},
    {"pt-BR", "pessoas",
     "Gráfico de pictogramas: T. Cada ícone equivale a 10 pessoas. "
     "A: 1.234,5 pessoas (124 ícones). B: 22 pessoas (2 ícones).",
     "Cada ícone = 10 pessoas", "<html lang=\"pt-BR\" dir=\"ltr\">",
     "1.234,5 pessoas \u00b7 124 ícones"},
    {"pl", "{one: osoba, few: osoby, many: osób, other: osoby}",
     "Wykres piktogramowy: T. Każda ikona oznacza 10 osób. "
     "A: 1234,5 osoby (124 ikony). B: 22 osoby (2 ikony).",
     "Każda ikona = 10 osób", "<html lang=\"pl\" dir=\"ltr\">",
     "1234,5 osoby \u00b7 124 ikony"},
    {"ar", "شخص",
     "مخطط بالرموز: T. كل رمز يمثل ١٠ شخص. A: ١٬٢٣٤٫٥ شخص (١٢٤ رمزًا). "
     "B: ٢٢ شخص (رمزان).",
     "كل رمز = ١٠ شخص", "<html lang=\"ar\" dir=\"rtl\">",
     "١٬٢٣٤٫٥ شخص\u060c ١٢٤ رمزًا"},
    {"zh-Hans", "人",
     "象形图：T。每个图标代表 10 人。A：1,234.5 人（124 个图标）。B：22 人（2 个图标）。",
     "每个图标 = 10 人", "<html lang=\"zh-Hans\" dir=\"ltr\">",
     "1,234.5 人 \u00b7 124 个图标"},
};

static ug_chart *load_with(const char *lang, const char *unit, const char *more)
{
    char text[512];
    snprintf(text, sizeof text,
             "lang: %s\ntitle: T\nunit-label: %s\nicon-value: 10\n%scategories:\n"
             "  - {label: A, glyph: person, count: 1234.5}\n"
             "  - {label: B, glyph: person, count: 22}\n", lang, unit, more);
    ug_chart *c = NULL;
    ug_error err;
    ck_assert_msg(ug_chart_load_string(text, strlen(text), "t.yaml", NULL, &c, &err) == UG_OK,
                  "%s", err.msg);
    return c;
}

static ug_chart *load(const char *lang, const char *unit)
{
    return load_with(lang, unit, "");
}

START_TEST(test_description_key_and_page)
{
    const lang_case *k = &cases[_i];
    ug_chart *c = load(k->lang, k->unit);
    ug_allocation *a = NULL;
    ug_scene *s = NULL;
    ug_error err;
    char *desc = NULL, *svg = NULL, *html = NULL;
    size_t svg_len = 0;
    ck_assert_int_eq(ug_chart_allocate(c, &a, &err), UG_OK);
    ck_assert_int_eq(ug_chart_describe(c, a, &desc, NULL, &err), UG_OK);
    ck_assert_str_eq(desc, k->desc);
    ck_assert_int_eq(ug_scene_pack(c, a, &s, &err), UG_OK);
    ck_assert_int_eq(ug_scene_svg(s, &svg, &svg_len, &err), UG_OK);
    ck_assert_msg(strstr(svg, k->key), "%s: no key '%s' in the SVG", k->lang, k->key);
    ck_assert_msg(strstr(svg, k->detail), "%s: no '%s' in the SVG", k->lang, k->detail);
    char xml_lang[64];
    snprintf(xml_lang, sizeof xml_lang, "xml:lang=\"%s\"", k->lang);
    ck_assert_msg(strstr(svg, xml_lang), "%s: no %s", k->lang, xml_lang);
    const ug_allocation *allocs[] = {a};
    ck_assert_int_eq(ug_html_page(NULL, svg, svg_len, desc, allocs, 1, &html, NULL, &err),
                     UG_OK);
    ck_assert_msg(strstr(html, k->html), "%s: %.80s", k->lang, html);
    if (!strcmp(k->lang, "de"))
        ck_assert_msg(strstr(html, "<caption>T (jedes Symbol = 10 Personen)</caption>\n"
                                   "<thead><tr><th scope=\"col\">Kategorie</th><th scope=\"col\">"
                                   "Anzahl</th><th scope=\"col\">Symbole</th>"), "%s", html);
    ug_free(html);
    ug_free(svg);
    ug_free(desc);
    ug_scene_free(s);
    ug_allocation_free(a);
    ug_chart_free(c);
}
END_TEST

/* English picks the form too: "1 person", never "1 people". */
START_TEST(test_english_one_person)
{
    const char *text = "title: T\nunit-label: {one: person, other: people}\n"
                       "icon-value: 1\ncategories:\n  - {label: A, count: 1}\n";
    ug_chart *c = NULL;
    ug_allocation *a = NULL;
    ug_error err;
    char *d = NULL;
    ck_assert_int_eq(ug_chart_load_string(text, strlen(text), "t.yaml", NULL, &c, &err),
                     UG_OK);
    ck_assert_int_eq(ug_chart_allocate(c, &a, &err), UG_OK);
    ck_assert_int_eq(ug_chart_describe(c, a, &d, NULL, &err), UG_OK);
    ck_assert_str_eq(d, "Pictogram chart: T. Each icon is 1 person. A: 1 person (1 icon).");
    ug_free(d);
    ug_allocation_free(a);
    ug_chart_free(c);
}
END_TEST

/* A page's lang reaches the panels that state none, and only those. */
START_TEST(test_page_lang_reaches_panels)
{
    const char *text =
        "page: {size: A4}\nlang: de\ntitle: P\npanels:\n"
        "  - chart: {title: A, icon-value: 1, categories: [{label: X, count: 3}]}\n"
        "  - chart: {lang: fr, title: B, icon-value: 1, categories: [{label: Y, count: 4}]}\n";
    ug_page *p = NULL;
    ug_error err;
    ck_assert_msg(ug_page_load_string(text, strlen(text), "p.yaml", NULL, &p, &err) == UG_OK,
                  "%s", err.msg);
    ck_assert_str_eq(p->panels[0].chart->lang.text, "de");
    ck_assert_str_eq(p->panels[1].chart->lang.text, "fr");
    ug_page_free(p);
}
END_TEST

/* A page's tag is checked where it is written, as a chart's is. */
START_TEST(test_page_lang_error_at_its_place)
{
    const char *text = "page: {size: A4}\ntitle: P\nlang: zh-TW\npanels:\n"
                       "  - text: hello\n";
    ug_page *p = NULL;
    ug_error err;
    ck_assert_int_eq(ug_page_load_string(text, strlen(text), "p.yaml", NULL, &p, &err),
                     UG_ESCHEMA);
    ck_assert_uint_eq(err.where.line, 3);
    ck_assert_uint_eq(err.where.column, 7);
    ck_assert_msg(strstr(err.msg, "zh-TW has no translation yet"), "%s", err.msg);
}
END_TEST

/* The catalog's plural forms: the form ICU names, else `other`. */
START_TEST(test_pick_form)
{
    ug_buf b;
    ug_buf_init(&b);
    phrase_pick_form("one=a|few=b|other=c", "few", &b);
    phrase_pick_form("one=a|few=b|other=c", "many", &b);
    phrase_pick_form("{each} = x", "one", &b);
    ug_buf_add(&b, "", 1);
    ck_assert_str_eq(b.data, "bc{each} = x");
    ug_buf_free(&b);
}
END_TEST

/* Placeholders and the disclosure notes in Polish (the catalog's words,
** CLDR's number: 1000 ungrouped, minimum grouping 2). */
START_TEST(test_placeholder_words)
{
    const char *text = "lang: pl\ntitle: T\nicon-value: 1\nsuppress: {below: 1000}\n"
                       "categories:\n  - {label: A, count: 5}\n  - {label: B, count: 2000}\n";
    ug_chart *c = NULL;
    ug_allocation *a = NULL;
    ug_error err;
    char *d = NULL;
    ck_assert_int_eq(ug_chart_load_string(text, strlen(text), "t.yaml", NULL, &c, &err),
                     UG_OK);
    ck_assert_int_eq(ug_chart_allocate(c, &a, &err), UG_OK);
    ck_assert_int_eq(ug_chart_describe(c, a, &d, NULL, &err), UG_OK);
    /* B is hidden too, or the total would give A away */
    ck_assert_msg(strstr(d, "A: mniej niż 1000. B: nie pokazano."), "%s", d);
    ck_assert_msg(strstr(d, "Liczby od 1 do 999 nie są pokazane (\u201emniej niż 1000\u201d). "
                            "Niektóre większe liczby również nie są pokazane "
                            "(\u201enie pokazano\u201d), aby małych nie dało się wyliczyć "
                            "z sum."), "%s", d);
    ug_free(d);
    ug_allocation_free(a);
    ug_chart_free(c);
}
END_TEST

/* Whether the English scene has an icon of the same category at icon's
** place seen in a mirror of a canvas width wide. */
static bool has_mirror(const ug_scene *en, const scene_icon *icon, double width)
{
    for (size_t k = 0; k < en->nicons; k++)
        if (en->icons[k].cat == icon->cat && en->icons[k].y == icon->y
            && fabs(width - en->icons[k].x - en->icon_size - icon->x) < 1e-9)
            return true;
    return false;
}

/* Right to left (FORMAT.md §6): the Arabic chart is the English one in a
** mirror. Icons flow from the right (the first icon is the rightmost of its
** line), every text keeps its width but sits mirrored, and the SVG writes
** each line in that direction, where "start" is the right end (SVG 1.1,
** text-anchor), so the text the packer anchored on its right reads "start". */
START_TEST(test_arabic_is_mirrored)
{
    /* ten columns: lines short enough for either language's total beside them,
    ** so both wrap alike and only the mirror differs */
    ug_chart *en = load_with("en", "people", "columns: 10\n");
    ug_chart *ar = load_with("ar", "شخص", "columns: 10\n");
    ug_allocation *ae = NULL, *aa = NULL;
    ug_scene *se = NULL, *sa = NULL;
    ug_error err;
    char *svg = NULL;
    ck_assert_int_eq(ug_chart_allocate(en, &ae, &err), UG_OK);
    ck_assert_int_eq(ug_chart_allocate(ar, &aa, &err), UG_OK);
    ck_assert_int_eq(ug_scene_pack(en, ae, &se, &err), UG_OK);
    ck_assert_int_eq(ug_scene_pack(ar, aa, &sa, &err), UG_OK);
    ck_assert(sa->rtl && !se->rtl);
    ck_assert_uint_eq(sa->nicons, se->nicons);
    ck_assert(sa->icons[0].x > sa->icons[1].x);
    for (size_t i = 0; i < sa->nicons; i++)
        ck_assert_msg(has_mirror(se, &sa->icons[i], sa->width), "icon %zu at %g,%g cat %u", i, sa->icons[i].x, sa->icons[i].y, sa->icons[i].cat);
    /* the title: anchored at the left margin in English, the right in Arabic */
    ck_assert_int_eq(se->texts[0].anchor, SCENE_START);
    ck_assert_int_eq(sa->texts[0].anchor, SCENE_END);
    ck_assert_double_eq_tol(sa->texts[0].x, sa->width - se->texts[0].x, 1e-9);
    ck_assert_int_eq(ug_scene_svg(sa, &svg, NULL, &err), UG_OK);
    ck_assert_msg(strstr(svg, "font-weight=\"bold\" direction=\"rtl\">T</text>"), "%s", svg);
    ug_free(svg);
    ug_scene_free(se);
    ug_scene_free(sa);
    ug_allocation_free(ae);
    ug_allocation_free(aa);
    ug_chart_free(en);
    ug_chart_free(ar);
}
END_TEST

static char *describe_text(const char *text)
{
    ug_chart *c = NULL;
    ug_allocation *a = NULL;
    ug_error err;
    char *d = NULL;
    ck_assert_msg(ug_chart_load_string(text, strlen(text), "t.yaml", NULL, &c, &err) == UG_OK,
                  "%s", err.msg);
    ck_assert_int_eq(ug_chart_allocate(c, &a, &err), UG_OK);
    ck_assert_int_eq(ug_chart_describe(c, a, &d, NULL, &err), UG_OK);
    ug_allocation_free(a);
    ug_chart_free(c);
    return d;
}

/* Change between periods in German: 1000 -> 1250 is +250, +25 %, the
** percent as CLDR writes it (de.xml "#,##0 %", the space U+00A0). */
START_TEST(test_change_in_german)
{
    char *d = describe_text("lang: de\ntitle: T\nicon-value: 1\nchange: previous\n"
                            "groups: [Q1, Q2]\nunit-label: Haushalte\ncategories:\n"
                            "  - {label: A, counts: [1000, 1250]}\n");
    ck_assert_msg(strstr(d, " Q2, insgesamt 1.250 Haushalte (+250, +25\u00a0%): A 1.250 "
                            "Haushalte (1.250 Symbole). Von Q1 bis Q2: A 1.000 \u2192 1.250 "
                            "Haushalte (+250, +25\u00a0%)."), "%s", d);
    ug_free(d);
}
END_TEST

/* The biproportional note in French: 200 + 100 = 300 households, 30 icons. */
START_TEST(test_totals_note_in_french)
{
    char *d = describe_text("lang: fr\ntitle: T\nmethod: biproportional\nicon-value: 10\n"
                            "groups: [N, S]\nunit-label: ménages\ncategories:\n"
                            "  - {label: A, counts: [120, 80]}\n"
                            "  - {label: B, counts: [40, 60]}\n");
    ck_assert_msg(strstr(d, "Les deux totaux concordent\u00a0: les icônes de chaque groupe "
                            "comme de chaque catégorie forment leur propre part du total de "
                            "30 icônes."), "%s", d);
    ug_free(d);
}
END_TEST

/* ---- amounts ----------------------------------------------------------------- */

static ug_dec dec_of(const char *s)
{
    ug_dec d;
    ck_assert_int_eq(ug_dec_parse(s, strlen(s), &d), UG_DEC_OK);
    return d;
}

/* Plural categories of compact numbers take CLDR's exponent operand e
** (plurals.xml, CLDR 38 and later): French "1,2 million" is `many`, "1,2
** millier" is `other` for 3000 (e = 3 is in 0..5); Polish "1,2 tys." is
** `many` (its operands are those of 1200: i = 1200, v = 0, i % 10 = 0);
** plain amounts are as phrase_number writes them. */
START_TEST(test_amount_plural_and_plain)
{
    const phrase_numbers long_words = {.compact = true};
    char buf[PHRASE_NUMBER_MAX], plain[PHRASE_NUMBER_MAX];
    const char *cat = NULL;
    ck_assert_str_eq(phrase_amount("fr", &long_words, dec_of("1200000"), PHRASE_NEAREST,
                                   buf, &cat), "1,2 million");
    ck_assert_str_eq(cat, "many");
    phrase_amount("fr", &long_words, dec_of("3000"), PHRASE_NEAREST, buf, &cat);
    ck_assert_str_eq(cat, "other");
    ck_assert_str_eq(phrase_amount("pl", &(phrase_numbers){.compact = true, .short_words = true},
                                   dec_of("1200"), PHRASE_NEAREST, buf, &cat), "1,2\u00a0tys.");
    ck_assert_str_eq(cat, "many");
    /* NULL and a plain format are phrase_number's text and plural */
    ck_assert_str_eq(phrase_amount("de", NULL, dec_of("1234567.25"), PHRASE_NEAREST, buf,
                                   &cat), phrase_number("de", dec_of("1234567.25"), 0, plain));
    ck_assert_str_eq(cat, "other");
    phrase_amount("en", &(phrase_numbers){0}, dec_of("1"), PHRASE_UP, buf, &cat);
    ck_assert_str_eq(cat, "one");
    /* money: ISO 4217 minor units (JPY has none, EUR two) */
    const phrase_numbers yen = {.currency = "JPY"}, euro = {.currency = "EUR"};
    ck_assert_str_eq(phrase_amount("en", &yen, dec_of("1234.5"), PHRASE_NEAREST, buf, NULL),
                     "\u00a51,235");
    ck_assert_str_eq(phrase_amount("de", &euro, dec_of("1234.5"), PHRASE_NEAREST, buf, NULL),
                     "1.234,50\u00a0\u20ac");
    ck_assert_str_eq(phrase_amount("de", &euro, dec_of("1234"), PHRASE_NEAREST, buf, NULL),
                     "1.234\u00a0\u20ac");
}
END_TEST

/* "412.5 thousand" read back as an exact integer (English long words). */
static long long read_back(const char *text)
{
    static const struct { const char *word; long long times; } words[] = {
        {" thousand", 1000LL}, {" million", 1000000LL}, {" billion", 1000000000LL},
        {" trillion", 1000000000000LL}};
    long long mant = 0, scale = 1, times = 1;
    bool point = false;
    const char *p = text;
    for (; (*p >= '0' && *p <= '9') || *p == '.'; p++)
        if (*p == '.')
            point = true;
        else
            mant = mant * 10 + (*p - '0'), scale *= point ? 10 : 1;
    for (size_t k = 0; k < sizeof words / sizeof words[0]; k++)
        if (!strcmp(p, words[k].word))
            times = words[k].times;
    ck_assert_msg(*p == '\0' || times > 1, "cannot read back '%s'", text);
    return mant * times / scale;
}

/* A property over 3,000 amounts from 1 to 10^14: rounded down the amount
** is never more than the count, rounded up never less, the two a step of
** the last shown digit apart at most, and the nearest within half of it; so
** "more than" and "fewer than" stay true. */
START_TEST(test_amount_rounding_directions)
{
    const phrase_numbers how = {.compact = true};
    unsigned long long x = 88172645463325252ULL;
    for (int k = 0; k < 3000; k++) {
        x ^= x << 13, x ^= x >> 7, x ^= x << 17; /* xorshift64 */
        long long n = (long long)(x % 100000000000000ULL >> (x % 44)) + 1;
        char raw[32], down[PHRASE_NUMBER_MAX], up[PHRASE_NUMBER_MAX], near[PHRASE_NUMBER_MAX];
        snprintf(raw, sizeof raw, "%lld", n);
        ug_dec d = dec_of(raw);
        long long lo = read_back(phrase_amount("en", &how, d, PHRASE_DOWN, down, NULL));
        long long hi = read_back(phrase_amount("en", &how, d, PHRASE_UP, up, NULL));
        long long mid = read_back(phrase_amount("en", &how, d, PHRASE_NEAREST, near, NULL));
        ck_assert_msg(lo <= n && n <= hi, "%lld: down %s, up %s", n, down, up);
        long long step = 0; /* a tenth of the largest power of 1000 up to n */
        for (long long m = 1000; m <= n; m *= 1000)
            step = m / 10;
        ck_assert_msg(mid >= lo && mid <= hi && hi - lo <= step,
                      "%lld: %s .. %s .. %s", n, down, near, up);
        ck_assert_msg(2 * (mid > n ? mid - n : n - mid) <= hi - lo, "%lld: nearest %s", n, near);
    }
}
END_TEST

/* ICU's ISO 4217 list (ucurr_openISOCurrencies): codes in use pass. */
START_TEST(test_currency_codes)
{
    char why[200];
    const char *good[] = {"EUR", "USD", "PLN", "CNY", "MAD", "BRL"};
    for (size_t k = 0; k < sizeof good / sizeof *good; k++)
        ck_assert_msg(phrase_check_currency(good[k], why, sizeof why) == UG_OK, "%s", why);
    ck_assert_int_eq(phrase_check_currency("XYZ", why, sizeof why), UG_ESCHEMA);
    ck_assert_int_eq(phrase_check_currency("usd", why, sizeof why), UG_ESCHEMA);
    ck_assert_int_eq(phrase_check_currency("", why, sizeof why), UG_ESCHEMA);
}
END_TEST

/* Every shipped catalog gives every message: a missing one would put the
** English words into a French chart without a word of warning. */
START_TEST(test_catalogs_complete)
{
    for (const phrase_catalog *c = phrase_catalogs; c->lang; c++)
        for (int id = 0; id < PH_COUNT_OF_IDS; id++)
            ck_assert_msg(c->text[id] != NULL, "catalog %s lacks message %d", c->lang, id);
}
END_TEST

static Suite *phrase_suite(void)
{
    Suite *s = suite_create("phrase");
    TCase *t = tcase_create("core");
    tcase_add_loop_test(t, test_description_key_and_page, 0, sizeof cases / sizeof cases[0]);
    tcase_add_test(t, test_english_one_person);
    tcase_add_test(t, test_catalogs_complete);
    tcase_add_test(t, test_page_lang_reaches_panels);
    tcase_add_test(t, test_page_lang_error_at_its_place);
    tcase_add_test(t, test_pick_form);
    tcase_add_test(t, test_change_in_german);
    tcase_add_test(t, test_totals_note_in_french);
    tcase_add_test(t, test_arabic_is_mirrored);
    tcase_add_test(t, test_placeholder_words);
    tcase_add_test(t, test_amount_plural_and_plain);
    tcase_add_test(t, test_amount_rounding_directions);
    tcase_add_test(t, test_currency_codes);
    suite_add_tcase(s, t);
    return s;
}

int main(void) { return check_run(phrase_suite()); }
