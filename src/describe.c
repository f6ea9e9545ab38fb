/*
** Description: model + allocation -> plain sentences (the SVG's <desc>, the
** output of `unitgram describe`, the alt text of a report). Also the phrases
** the key shares with it, so picture and description say the same thing.
**
** Hidden counts (`suppress`) appear only as their label; any sum that would
** let a reader subtract their way to a hidden count is written as "more than
** <the visible part>" instead.
*/
#include <stdint.h>
#include <stdio.h>
#include <string.h>

#include "pack.h"
#include "phrase.h"

const char *pack_lang(const ug_chart *c)
{
    return c->lang.text ? c->lang.text : PHRASE_DEFAULT_LANG;
}

const char *pack_other_label(const ug_allocation *a)
{
    return phrase_text(pack_lang(a->chart), PH_NOT_SHOWN);
}

/* The chart's `number-format` and `currency` as phrase.c takes them. */
static phrase_numbers chart_numbers(const ug_chart *c)
{
    return (phrase_numbers){.compact = c->number_format != UG_NUMBERS_PLAIN,
                            .short_words = c->number_format == UG_NUMBERS_COMPACT_SHORT,
                            .currency = c->currency.text};
}

char *pack_amount(const ug_chart *c, ug_dec d, phrase_rounding r, char *buf)
{
    phrase_numbers how = chart_numbers(c);
    return phrase_amount(pack_lang(c), &how, d, r, buf, NULL);
}

/* "fewer than" counts, "less than" money. */
static phrase_id fewer_id(const ug_chart *c)
{
    return c->currency.text ? PH_LESS : PH_FEWER;
}

/* A hidden cell's text: the layout's own `suppress: label`, else the
** catalog's "fewer than {n}" or "not shown" in the chart's language. */
void pack_placeholder(const ug_allocation *a, pub_status s, ug_buf *b)
{
    const ug_chart *c = a->chart;
    char n[PHRASE_NUMBER_MAX];
    if (s == PUB_SMALL && c->suppress_label.text) {
        ug_buf_puts(b, pub_placeholder(a->pub, s));
    } else if (s == PUB_SMALL && c->has_suppress && c->suppress_below.v > 0) {
        pack_amount(c, c->suppress_below, PHRASE_UP, n);
        phrase_say(b, pack_lang(c), fewer_id(c), (phrase_slot[]){{"n", n}, {NULL, NULL}});
    } else {
        ug_buf_puts(b, pack_other_label(a));
    }
}

/* The unit's form for a count of CLDR plural category cat: the layout's
** form for it, else its `other` form, else the one text it gave. */
static const char *unit_form(const ug_chart *c, const char *cat)
{
    static const char *const names[] = {"zero", "one", "two", "few", "many", "other"};
    if (!c->has_unit_forms)
        return c->unit_label.text;
    for (size_t k = 0; k < UG_PLURAL_COUNT; k++)
        if (!strcmp(names[k], cat) && c->unit_forms[k].text)
            return c->unit_forms[k].text;
    return c->unit_label.text;
}

/* Does the language elide before this unit ("d’habitants", not "de
** habitants")? Its catalog lists the letters that ask for it. */
static bool elides_before(const char *lang, const char *unit)
{
    const char *letters = phrase_text(lang, PH_ELIDE_BEFORE);
    unsigned long first, cp;
    if (!ug_utf8_decode(unit, strlen(unit), &first))
        return false;
    for (size_t k = 0, n; letters[k]; k += n)
        if (!(n = ug_utf8_decode(letters + k, strlen(letters + k), &cp)) || cp == first)
            return n != 0;
    return false;
}

/* A count as the chart writes it, its last digit rounded as r says; money
** names no unit ("€412.5M", not "€412.5M dollars"). */
static void count_phrase(const ug_chart *c, ug_dec count, phrase_rounding r, ug_buf *b)
{
    char n[PHRASE_NUMBER_MAX];
    const char *lang = pack_lang(c), *cat = "other";
    if (chart_is_percent(c)) { /* a share says what it is: "41.5 %" */
        ug_buf_puts(b, phrase_percent(lang, count, n));
        return;
    }
    phrase_numbers how = chart_numbers(c);
    phrase_amount(lang, &how, count, r, n, &cat);
    if (!c->unit_label.text || c->currency.text) {
        ug_buf_puts(b, n);
        return;
    }
    const char *unit = unit_form(c, cat);
    phrase_say(b, lang, elides_before(lang, unit) ? PH_COUNT_ELIDED : PH_COUNT,
               (phrase_slot[]){{"n", n}, {"unit", unit}, {"plural", cat}, {NULL, NULL}});
}

void pack_count_phrase(const ug_chart *c, ug_dec count, ug_buf *b)
{
    count_phrase(c, count, PHRASE_NEAREST, b);
}

/* Message id with its one slot `name` holding the text built in t, which
** this frees. */
static void say_built(const ug_chart *c, phrase_id id, const char *name, ug_buf *t,
                      ug_buf *b)
{
    ug_buf_add(t, "", 1);
    if (!t->failed)
        phrase_say(b, pack_lang(c), id, (phrase_slot[]){{name, t->data}, {NULL, NULL}});
    b->failed = b->failed || t->failed;
    ug_buf_free(t);
}

/* Message id with one slot {n} holding a count phrase ("more than {n}"). A
** bound stays true when its number is shortened: "fewer than" rounds up,
** "more than" and "at least" round down. */
static void say_count(const ug_chart *c, phrase_id id, ug_dec count, ug_buf *b)
{
    ug_buf t;
    ug_buf_init(&t);
    count_phrase(c, count, id == PH_FEWER || id == PH_LESS ? PHRASE_UP : PHRASE_DOWN, &t);
    say_built(c, id, "n", &t, b);
}

/* What is published of one line of the table (a group, a category or the
** whole chart): its total when every cell in it is published; otherwise the
** sum of the published cells as a lower bound, so no subtraction can reach a
** hidden count. */
typedef struct {
    ug_dec visible;
    size_t nhidden, nsmall;
    bool maybe_zero; /* a hidden cell may be 0 (zeros hidden, withheld, ...) */
} line_sum;

static void add_cell(const ug_allocation *a, size_t g, size_t i, line_sum *s)
{
    const pub_cell *cell = pub_at(a->pub, g, i);
    if (!pub_hidden(cell->status)) {
        s->visible.v += cell->value.v;
        return;
    }
    s->nhidden++;
    s->nsmall += cell->status == PUB_SMALL;
    /* a complementary cell is never small, so never 0 */
    s->maybe_zero = s->maybe_zero || cell->status == PUB_REQUESTED
                    || cell->status == PUB_WITHHELD
                    || (cell->status == PUB_SMALL && a->pub->zeros_hidden);
}

static bool any_status(const pub_table *t, pub_status st)
{
    for (size_t k = 0; k < t->ngroups * t->ncats; k++)
        if (t->cells[k].status == st)
            return true;
    return false;
}

/* What was done to protect people, in the words the key and the description
** share; empty when every count is published as counted. */
/* One note of the disclosure list, followed by the language's space. */
static void note(ug_buf *b, const char *lang, phrase_id id, const phrase_slot *slots)
{
    phrase_say(b, lang, id, slots);
    ug_buf_puts(b, phrase_text(lang, PH_SPACE));
}

/* "Counts of 1 to 9 households are not shown ("fewer than 10")."; money,
** which has cents between its whole amounts, "Amounts below $10 ...". */
static void small_note(const ug_allocation *a, ug_buf *b)
{
    const pub_table *t = a->pub;
    const char *lang = pack_lang(a->chart);
    bool money = a->chart->currency.text != NULL;
    char from[PHRASE_NUMBER_MAX];
    ug_buf to, label;
    ug_buf_init(&to);
    ug_buf_init(&label);
    pack_amount(a->chart, money ? t->below : (ug_dec){t->zeros_hidden ? 0 : UG_DEC_SCALE},
                money ? PHRASE_UP : PHRASE_NEAREST, from);
    count_phrase(a->chart, (ug_dec){t->below.v - UG_DEC_SCALE}, PHRASE_UP, &to);
    pack_placeholder(a, PUB_SMALL, &label);
    ug_buf_add(&to, "", 1);
    ug_buf_add(&label, "", 1);
    if (!to.failed && !label.failed && money)
        note(b, lang, PH_NOTE_SMALL_MONEY,
             (phrase_slot[]){{"n", from}, {"label", label.data}, {NULL, NULL}});
    else if (!to.failed && !label.failed)
        note(b, lang, PH_NOTE_SMALL, (phrase_slot[]){{"from", from}, {"to", to.data},
                                                     {"label", label.data}, {NULL, NULL}});
    b->failed = b->failed || to.failed || label.failed;
    ug_buf_free(&to);
    ug_buf_free(&label);
}

static bool shows_zero(const pub_table *t)
{
    for (size_t k = 0; k < t->ngroups * t->ncats; k++)
        if (!pub_hidden(t->cells[k].status) && t->cells[k].value.v == 0)
            return true;
    return false;
}

void pack_disclosure_notes(const ug_allocation *a, ug_buf *b)
{
    const pub_table *t = a->pub;
    const char *lang = pack_lang(a->chart);
    const phrase_slot other[] = {{"label", pack_other_label(a)}, {NULL, NULL}};
    char n[PHRASE_NUMBER_MAX];
    if (t->rounded)
        note(b, lang, PH_NOTE_ROUNDED, (phrase_slot[]){
            {"n", pack_amount(a->chart, t->round_to, PHRASE_NEAREST, n)}, {NULL, NULL}});
    if (any_status(t, PUB_SMALL) && t->below.v > 0)
        small_note(a, b);
    if (any_status(t, PUB_COMPLEMENT))
        note(b, lang, PH_NOTE_COMPLEMENT, other);
    if (any_status(t, PUB_REQUESTED))
        note(b, lang, PH_NOTE_REQUESTED, other);
    if (any_status(t, PUB_WITHHELD))
        note(b, lang, PH_NOTE_WITHHELD, other);
    if (t->nhidden && a->rule.by_cells)
        note(b, lang, PH_NOTE_SHARES, NULL);
    if (shows_zero(t) && t->nsmall)
        note(b, lang, PH_NOTE_ZEROS, (phrase_slot[]){
            {"zero", phrase_number(lang, (ug_dec){0}, 0, n)}, {NULL, NULL}});
    if (b->len && b->data[b->len - 1] == ' ')
        b->len--;
}

static void partial_phrase(const ug_allocation *a, const line_sum *s, ug_buf *b)
{
    const ug_chart *c = a->chart;
    if (s->visible.v == 0 && s->nsmall == s->nhidden && a->pub->below.v > 0)
        say_count(c, fewer_id(c), (ug_dec){a->pub->below.v * (ug_i128)s->nhidden}, b);
    else if (s->visible.v == 0)
        ug_buf_puts(b, pack_other_label(a));
    else
        say_count(c, a->pub->rounded ? PH_ABOUT_MORE : s->maybe_zero ? PH_AT_LEAST
                                                                      : PH_MORE,
                  s->visible, b);
}

static void margin_phrase(const ug_allocation *a, const pub_cell *m, const line_sum *s,
                          ug_buf *b)
{
    if (pub_hidden(m->status))
        partial_phrase(a, s, b);
    else
        pack_count_phrase(a->chart, m->value, b);
}

/* ---- change between periods (`change:`) ----------------------------------- */

/* The period group g is compared with; SIZE_MAX for none (the first, or no
** `change:`). */
size_t pack_change_ref(const ug_allocation *a, size_t g)
{
    const ug_chart *c = a->chart;
    if (c->change == UG_CHANGE_NONE || a->ngroups < 2 || g == 0 || g >= a->ngroups)
        return SIZE_MAX;
    return c->change == UG_CHANGE_FIRST ? 0 : g - 1;
}

/* "+34, +8%": from the published values only, with the language's signs,
** percent and list separator (CLDR, through ICU); the percentage rounded
** half away from zero, left out when the earlier value is 0; no change is
** "\u00b10". */
static void change_amount(const ug_chart *c, ug_dec from, ug_dec to, ug_buf *b)
{
    const char *lang = pack_lang(c);
    char n[PHRASE_NUMBER_MAX];
    ug_dec d = {to.v - from.v};
    phrase_numbers how = chart_numbers(c);
    how.sign = true;
    ug_buf_printf(b, "%s%s", d.v ? "" : "\u00b1",
                  phrase_amount(lang, &how, d, PHRASE_NEAREST, n, NULL));
    if (from.v <= 0)
        return;
    ug_i128 mag = d.v < 0 ? -d.v : d.v, num = mag * 100, q = num / from.v;
    if ((num % from.v) * 2 >= from.v)
        q++;
    ug_buf_printf(b, "%s%s%s", phrase_text(lang, PH_LIST_SEP), q ? "" : "\u00b1",
                  phrase_percent_change(lang, (ug_dec){(d.v < 0 ? -q : q) * UG_DEC_SCALE},
                                        n));
}

/* " (+34, +8 %)" when both cells are published; " (change not shown)" when
** either is hidden, so a hidden count's change is hidden too. */
static void change_note(const ug_chart *c, const pub_cell *from, const pub_cell *to,
                        ug_buf *b)
{
    if (pub_hidden(from->status) || pub_hidden(to->status)) {
        ug_buf_puts(b, phrase_text(pack_lang(c), PH_CHANGE_HIDDEN));
        return;
    }
    ug_buf_puts(b, " (");
    change_amount(c, from->value, to->value, b);
    ug_buf_puts(b, ")");
}

/* The key's entry for category i under `change:`: the latest period against
** its reference, "412 \u2192 446 households (+34, +8 %)", never a sum of periods. */
static void category_change_phrase(const ug_allocation *a, size_t i, ug_buf *b)
{
    size_t last = a->ngroups - 1, ref = pack_change_ref(a, last);
    const pub_cell *from = pub_at(a->pub, ref, i), *to = pub_at(a->pub, last, i);
    char n[PHRASE_NUMBER_MAX];
    if (pub_hidden(from->status))
        pack_placeholder(a, from->status, b);
    else
        ug_buf_puts(b, pack_amount(a->chart, from->value, PHRASE_NEAREST, n));
    ug_buf_puts(b, phrase_text(pack_lang(a->chart), PH_CHANGE_ARROW));
    if (pub_hidden(to->status))
        pack_placeholder(a, to->status, b);
    else
        pack_count_phrase(a->chart, to->value, b);
    change_note(a->chart, from, to, b);
}

static void group_total_phrase(const ug_allocation *a, size_t g, ug_buf *b)
{
    line_sum s = {0};
    for (size_t gi = 0; gi < a->ngroups; gi++)
        if (g == SIZE_MAX || gi == g)
            for (size_t i = 0; i < a->ncats; i++)
                add_cell(a, gi, i, &s);
    margin_phrase(a, g == SIZE_MAX ? &a->pub->grand : &a->pub->group_totals[g], &s, b);
}

static void group_change_note(const ug_allocation *a, size_t g, ug_buf *b)
{
    size_t ref = g == SIZE_MAX ? SIZE_MAX : pack_change_ref(a, g);
    if (ref != SIZE_MAX)
        change_note(a->chart, &a->pub->group_totals[ref],
                    &a->pub->group_totals[g], b);
}

void pack_group_phrase(const ug_allocation *a, size_t g, ug_buf *b)
{
    if (chart_is_percent(a->chart))
        return; /* a group's shares add to 100 %; no count is known */
    group_total_phrase(a, g, b);
    group_change_note(a, g, b);
}

/* "North 41.5 %, South 38 %": a category's shares, one per group, never
** added (a sum of shares of different totals is no share of anything). */
static void category_shares(const ug_allocation *a, size_t i, ug_buf *b)
{
    const ug_chart *c = a->chart;
    for (size_t g = 0; g < a->ngroups; g++) {
        if (g)
            ug_buf_puts(b, phrase_text(pack_lang(c), PH_LIST_SEP));
        ug_buf_printf(b, "%s%s", c->groups.items[g].text,
                      phrase_text(pack_lang(c), PH_SPACE));
        pack_count_phrase(c, alloc_at(a, g, i)->count, b);
    }
}

void pack_category_phrase(const ug_allocation *a, size_t i, ug_buf *b)
{
    if (chart_is_percent(a->chart) && a->ngroups > 1) {
        category_shares(a, i, b);
        return;
    }
    if (pack_change_ref(a, a->ngroups - 1) != SIZE_MAX) {
        category_change_phrase(a, i, b);
        return;
    }
    line_sum s = {0};
    for (size_t g = 0; g < a->ngroups; g++)
        add_cell(a, g, i, &s);
    const pub_cell *only = pub_at(a->pub, 0, i);
    if (a->ngroups == 1 && pub_hidden(only->status)) {
        pack_placeholder(a, only->status, b);
        return;
    }
    margin_phrase(a, &a->pub->cat_totals[i], &s, b);
}

void pack_category_cell(const ug_allocation *a, size_t g, size_t i, ug_buf *b)
{
    const pub_cell *cell = pub_at(a->pub, g, i);
    if (pub_hidden(cell->status)) {
        pack_placeholder(a, cell->status, b);
    } else {
        char n[PHRASE_NUMBER_MAX];
        ug_buf_puts(b, pack_amount(a->chart, cell->value, PHRASE_NEAREST, n));
    }
    size_t ref = pack_change_ref(a, g);
    if (ref != SIZE_MAX)
        change_note(a->chart, pub_at(a->pub, ref, i), cell, b);
}

/* 100 / cells as a percentage in the chart's language, at most two
** decimals: 1/200 -> "0.5%" ("0,5 %" in French). */
static void percent_text(const ug_chart *c, long cells, char *buf)
{
    char raw[64];
    ug_dec d;
    ug_ratio_format(100, cells > 0 ? cells : 1, 2, raw);
    if (ug_dec_parse(raw, strlen(raw), &d) != UG_DEC_OK)
        d.v = 0;
    phrase_percent(pack_lang(c), d, buf);
}

static void share_of_whole(const ug_allocation *a, const char *pct, ug_buf *b)
{
    const ug_chart *c = a->chart;
    const char *lang = pack_lang(c), *unit = c->unit_label.text;
    const char *shown = a->pub->nhidden ? phrase_text(lang, PH_SHOWN) : "";
    char n[PHRASE_NUMBER_MAX];
    if (chart_is_percent(c) && !c->groups.n) { /* "1 % of pupils": no total known */
        phrase_say(b, lang, unit ? PH_SHARE_PCT : PH_SHARE_PCT_WHOLE,
                   (phrase_slot[]){{"pct", pct}, {"unit", unit}, {NULL, NULL}});
        return;
    }
    if (c->groups.n) {
        /* "1% of each school's pupils": the layout names what a group is
        ** ("each", not "a", which would need "an" before some names) */
        const char *group = c->group_label.text ? c->group_label.text
                                                : phrase_text(lang, PH_GROUP_WORD);
        phrase_say(b, lang, PH_SHARE_EACH, (phrase_slot[]){{"pct", pct}, {"group", group},
                   {"unit", unit ? unit : phrase_text(lang, PH_TOTAL_WORD)},
                   {"shown", shown}, {NULL, NULL}});
        return;
    }
    ug_buf t;
    ug_buf_init(&t);
    if (unit)
        pack_count_phrase(c, (ug_dec){a->group_totals[0].v}, &t);
    else
        ug_buf_puts(&t, pack_amount(c, a->group_totals[0], PHRASE_NEAREST, n));
    ug_buf_add(&t, "", 1);
    if (!t.failed)
        phrase_say(b, lang, unit ? PH_SHARE_OF : PH_SHARE_TOTAL,
                   (phrase_slot[]){{"pct", pct}, {"count", t.data}, {"n", t.data},
                                   {"shown", shown}, {NULL, NULL}});
    b->failed = b->failed || t.failed;
    ug_buf_free(&t);
}

/* What one icon stands for: a count, or a share of the whole. */
static void icon_value_text(const ug_chart *c, const ug_allocation *a, ug_buf *b)
{
    if (a->rule.by_cells) {
        char pct[PHRASE_NUMBER_MAX];
        percent_text(c, a->rule.cells, pct);
        share_of_whole(a, pct, b);
        return;
    }
    pack_count_phrase(c, a->rule.value, b);
    if (a->rule.partial)
        ug_buf_puts(b, phrase_text(pack_lang(c), PH_CLIPPED));
}

void pack_value_statement(const ug_chart *c, const ug_allocation *a, bool key,
                          ug_buf *b)
{
    const char *lang = pack_lang(c);
    ug_buf t;
    ug_buf_init(&t);
    icon_value_text(c, a, &t);
    ug_buf_add(&t, "", 1);
    if (!t.failed)
        phrase_say(b, lang, key ? PH_KEY : PH_IS, (phrase_slot[]){
            {"each", phrase_text(lang, pack_icon_is_square(c) ? PH_EACH_SQUARE
                                                               : PH_EACH_ICON)},
            {"count", t.data}, {NULL, NULL}});
    b->failed = b->failed || t.failed;
    ug_buf_free(&t);
}

void pack_totals_note(const ug_allocation *a, ug_buf *b)
{
    const ug_chart *c = a->chart;
    const char *lang = pack_lang(c);
    if (!a->cat_icons)
        return;
    long n = 0;
    for (size_t g = 0; g < a->ngroups; g++)
        n += a->group_icons[g];
    const char *group = c->group_label.text ? c->group_label.text
                                            : phrase_text(lang, PH_GROUP_WORD);
    ug_buf all;
    ug_buf_init(&all);
    pack_icon_count(c, (ug_dec){(ug_i128)n * UG_DEC_SCALE}, 0, &all);
    ug_buf_add(&all, "", 1);
    if (!all.failed)
        phrase_say(b, lang, PH_BOTH_TOTALS, (phrase_slot[]){
            {"group", group}, {"all", all.data},
            {"icons", phrase_text(lang, pack_icon_is_square(c) ? PH_SQUARES_WORD
                                                              : PH_ICONS_WORD)},
            {NULL, NULL}});
    b->failed = b->failed || all.failed;
    ug_buf_free(&all);
}

char *pack_icons_text(const alloc_share *s, char *buf)
{
    if (!s->partial) {
        snprintf(buf, 64, "%ld", s->icons);
        return buf;
    }
    ug_ratio_format(s->quota_num, s->quota_den, 2, buf);
    return buf;
}

/* The noun follows what is drawn: "square" only when every category is
** drawn as a square (the default glyph), so a waffle of person glyphs says
** "icons", never "41 squares". */
static bool all_squares(const ug_chart *c)
{
    for (size_t i = 0; i < c->ncats; i++)
        if (c->cats[i].glyph.text && strcmp(c->cats[i].glyph.text, "square"))
            return false;
    return true;
}

bool pack_icon_is_square(const ug_chart *c)
{
    return ug_form_about(c->form)->cell && all_squares(c);
}

const char *pack_icon_word(const ug_chart *c, bool plural)
{
    const ug_form_info *f = ug_form_about(c->form);
    if (pack_icon_is_square(c))
        return plural ? f->cells : f->cell;
    return plural ? "icons" : "icon";
}

/* ---- the sentences -------------------------------------------------------- */

/* Whether text already ends a sentence, in any shipped language's stop. */
static bool ends_sentence(const char *text, size_t n)
{
    static const char *const stops[] = {".", "!", "?", "\u3002", "\uff01", "\uff1f",
                                        "\u061f"};
    for (size_t k = 0; k < sizeof stops / sizeof stops[0]; k++) {
        size_t sl = strlen(stops[k]);
        if (n >= sl && !memcmp(text + n - sl, stops[k], sl))
            return true;
    }
    return false;
}

static void sentence(ug_buf *b, const char *lang, const char *text)
{
    size_t n = strlen(text);
    if (b->len)
        ug_buf_puts(b, phrase_text(lang, PH_SPACE));
    ug_buf_puts(b, text);
    if (n && !ends_sentence(text, n))
        ug_buf_puts(b, phrase_text(lang, PH_STOP));
}

void pack_icon_count(const ug_chart *c, ug_dec d, int places, ug_buf *b)
{
    const char *lang = pack_lang(c);
    char n[PHRASE_NUMBER_MAX];
    phrase_number(lang, d, places, n);
    phrase_say(b, lang, pack_icon_is_square(c) ? PH_SQUARES : PH_ICONS,
               (phrase_slot[]){{"n", n}, {"plural", phrase_plural(lang, d, places)},
                               {NULL, NULL}});
}

void pack_share_icons(const ug_chart *c, const alloc_share *s, ug_buf *b)
{
    char raw[64];
    ug_dec d = {(ug_i128)s->icons * UG_DEC_SCALE};
    if (s->partial) {
        pack_icons_text(s, raw);
        if (ug_dec_parse(raw, strlen(raw), &d) != UG_DEC_OK)
            d.v = 0;
    }
    pack_icon_count(c, d, s->partial ? 2 : 0, b);
}

/* "(120 icons)" */
static void icons_phrase(const ug_chart *c, const alloc_share *s, ug_buf *b)
{
    ug_buf t;
    ug_buf_init(&t);
    pack_share_icons(c, s, &t);
    say_built(c, PH_PAREN, "text", &t, b);
}

/* "Adults 1,200 households (120 icons)" or "Adults fewer than 10" */
static void cell_phrase(const ug_chart *c, const ug_allocation *a, size_t g,
                        size_t i, const char *sep, ug_buf *b)
{
    const alloc_share *s = alloc_at(a, g, i);
    ug_buf_printf(b, "%s%s", c->cats[i].label.text ? c->cats[i].label.text
                                                  : c->cats[i].id, sep);
    if (alloc_hidden(s)) {
        pack_placeholder(a, s->status, b);
        return;
    }
    pack_count_phrase(c, s->count, b);
    ug_buf_puts(b, phrase_text(pack_lang(c), PH_SPACE));
    icons_phrase(c, s, b);
}

static void group_cells(const ug_chart *c, const ug_allocation *a, size_t g,
                        ug_buf *b)
{
    const char *lang = pack_lang(c);
    for (size_t i = 0; i < c->ncats; i++) {
        cell_phrase(c, a, g, i, " ", b);
        ug_buf_puts(b, phrase_text(lang, i + 1 < c->ncats ? PH_LIST_SEP : PH_STOP));
    }
}

static void group_sentence(const ug_chart *c, const ug_allocation *a, size_t g,
                           ug_buf *b)
{
    const char *lang = pack_lang(c);
    ug_buf total, change;
    if (chart_is_percent(c)) {
        ug_buf_puts(b, phrase_text(lang, PH_SPACE));
        phrase_say(b, lang, PH_GROUP_LEAD_SHARES, (phrase_slot[]){
            {"group", c->groups.items[g].text}, {NULL, NULL}});
        group_cells(c, a, g, b);
        return;
    }
    ug_buf_init(&total);
    ug_buf_init(&change);
    /* "1,057 households in all (+34, +3 %):", the change after "in all" */
    group_total_phrase(a, g, &total);
    group_change_note(a, g, &change);
    ug_buf_add(&total, "", 1);
    ug_buf_add(&change, "", 1);
    if (!total.failed && !change.failed) {
        ug_buf_puts(b, phrase_text(lang, PH_SPACE));
        phrase_say(b, lang, PH_GROUP_LEAD, (phrase_slot[]){
            {"group", c->groups.items[g].text}, {"total", total.data},
            {"change", change.data}, {NULL, NULL}});
    }
    b->failed = b->failed || total.failed || change.failed;
    ug_buf_free(&total);
    ug_buf_free(&change);
    group_cells(c, a, g, b);
}

static void list_sentences(ug_buf *b, const char *lang, const ug_text_list *l,
                           const char *lead)
{
    if (!l->n)
        return;
    ug_buf line;
    ug_buf_init(&line);
    ug_buf_puts(&line, lead);
    for (size_t i = 0; i < l->n; i++)
        ug_buf_printf(&line, "%s%s", i ? "; " : "", l->items[i].text);
    ug_buf_add(&line, "", 1);
    if (!line.failed)
        sentence(b, lang, line.data);
    else
        b->failed = true;
    ug_buf_free(&line);
}

/* "From Q2 2026 to Q3 2026: Adults 412 -> 446 households (+34, +8 %); ..." */
static void change_sentence(const ug_chart *c, const ug_allocation *a, ug_buf *b)
{
    size_t last = a->ngroups - 1, ref = pack_change_ref(a, last);
    if (ref == SIZE_MAX)
        return;
    ug_buf_puts(b, phrase_text(pack_lang(c), PH_SPACE));
    phrase_say(b, pack_lang(c), PH_CHANGE_FROM, (phrase_slot[]){
        {"from", c->groups.items[ref].text}, {"to", c->groups.items[last].text},
        {NULL, NULL}});
    for (size_t i = 0; i < c->ncats; i++) {
        ug_buf_printf(b, "%s%s ", i ? "; " : "",
                      c->cats[i].label.text ? c->cats[i].label.text : c->cats[i].id);
        category_change_phrase(a, i, b);
    }
    ug_buf_puts(b, ".");
}

/* "Waffle chart: Title." in the chart's language. */
static void opening(const ug_chart *c, ug_buf *b)
{
    const char *lang = pack_lang(c);
    const char *kind = phrase_text(lang, c->form == UG_FORM_WAFFLE ? PH_KIND_WAFFLE
                                                                   : PH_KIND_ROWS);
    if (c->title.text)
        phrase_say(b, lang, PH_KIND_TITLE,
                   (phrase_slot[]){{"kind", kind}, {"title", c->title.text}, {NULL, NULL}});
    else
        ug_buf_puts(b, kind);
    if (!b->len || !ends_sentence(b->data, b->len))
        ug_buf_puts(b, phrase_text(lang, PH_STOP));
}

static void notes_sentence(const ug_allocation *a, ug_buf *b)
{
    ug_buf notes;
    ug_buf_init(&notes);
    pack_disclosure_notes(a, &notes);
    ug_buf_add(&notes, "", 1);
    if (notes.failed)
        b->failed = true;
    else if (notes.data[0])
        sentence(b, pack_lang(a->chart), notes.data);
    ug_buf_free(&notes);
}

void describe_chart(const ug_chart *c, const ug_allocation *a, ug_buf *b)
{
    const char *lang = pack_lang(c);
    opening(c, b);
    if (c->subtitle.text)
        sentence(b, lang, c->subtitle.text);
    ug_buf_puts(b, phrase_text(lang, PH_SPACE));
    pack_value_statement(c, a, false, b);
    ug_buf_puts(b, phrase_text(lang, PH_STOP));
    if (chart_is_percent(c))
        sentence(b, lang, phrase_text(lang, PH_NOTE_PERCENT));
    if (a->cat_icons) {
        ug_buf_puts(b, phrase_text(lang, PH_SPACE));
        pack_totals_note(a, b);
        ug_buf_puts(b, phrase_text(lang, PH_STOP));
    }
    for (size_t g = 0; c->groups.n && g < c->groups.n; g++)
        group_sentence(c, a, g, b);
    for (size_t i = 0; !c->groups.n && i < c->ncats; i++) {
        ug_buf_puts(b, phrase_text(lang, PH_SPACE));
        cell_phrase(c, a, 0, i, phrase_text(lang, PH_LABEL_SEP), b);
        ug_buf_puts(b, phrase_text(lang, PH_STOP));
    }
    change_sentence(c, a, b);
    notes_sentence(a, b);
    for (size_t i = 0; i < c->notes.n; i++)
        sentence(b, lang, c->notes.items[i].text);
    list_sentences(b, lang, &c->source, phrase_text(lang, PH_SOURCE));
}

ug_status ug_chart_describe(const ug_chart *c, const ug_allocation *a, char **out,
                            size_t *len, ug_error *err)
{
    ug_error_clear(err);
    ug_buf b;
    ug_buf_init(&b);
    if (c->description.text)
        ug_buf_puts(&b, c->description.text);
    else
        describe_chart(c, a, &b);
    return ug_buf_take(&b, out, len, err);
}
