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

const char *pack_placeholder(const ug_allocation *a, pub_status s)
{
    return pub_placeholder(a->pub, s);
}

void pack_count_phrase(const ug_chart *c, ug_dec count, ug_buf *b)
{
    char n[64];
    ug_buf_puts(b, ug_dec_format_grouped(count, n));
    if (c->unit_label.text)
        ug_buf_printf(b, " %s", c->unit_label.text);
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
void pack_disclosure_notes(const ug_allocation *a, ug_buf *b)
{
    const pub_table *t = a->pub;
    const char *unit = a->chart->unit_label.text;
    char n[64];
    if (t->rounded)
        ug_buf_printf(b, "Counts are rounded to multiples of %s to protect privacy. ",
                      ug_dec_format_grouped(t->round_to, n));
    if (any_status(t, PUB_SMALL) && t->below.v > 0)
        ug_buf_printf(b, "Counts of %s%s%s%s are not shown (\u201c%s\u201d). ",
                      t->zeros_hidden ? "0 to " : "1 to ",
                      ug_dec_format_grouped((ug_dec){t->below.v - UG_DEC_SCALE}, n),
                      unit ? " " : "", unit ? unit : "", t->small_label);
    if (any_status(t, PUB_COMPLEMENT))
        ug_buf_printf(b, "Some larger counts are not shown either (\u201c%s\u201d), so "
                         "that the small ones cannot be worked out from totals. ",
                      t->other_label);
    if (any_status(t, PUB_REQUESTED))
        ug_buf_printf(b, "Counts marked \u201c%s\u201d are withheld. ", t->other_label);
    if (any_status(t, PUB_WITHHELD))
        ug_buf_printf(b, "Counts marked \u201c%s\u201d were withheld by the source. ",
                      t->other_label);
    if (t->nhidden && a->rule.by_cells)
        ug_buf_puts(b, "Shares are of the counts shown. ");
    bool zero = false;
    for (size_t k = 0; k < t->ngroups * t->ncats; k++)
        zero = zero || (!pub_hidden(t->cells[k].status) && t->cells[k].value.v == 0);
    if (zero && t->nsmall)
        ug_buf_puts(b, "Zero counts are shown as 0. ");
    if (b->len && b->data[b->len - 1] == ' ')
        b->len--;
}

static void partial_phrase(const ug_allocation *a, const line_sum *s, ug_buf *b)
{
    const ug_chart *c = a->chart;
    if (s->visible.v == 0 && s->nsmall == s->nhidden && a->pub->below.v > 0) {
        ug_buf_puts(b, "fewer than ");
        pack_count_phrase(c, (ug_dec){a->pub->below.v * (ug_i128)s->nhidden}, b);
    } else if (s->visible.v == 0) {
        ug_buf_puts(b, a->pub->other_label);
    } else {
        ug_buf_puts(b, a->pub->rounded ? "about " : s->maybe_zero ? "at least "
                                                                 : "more than ");
        pack_count_phrase(c, s->visible, b);
        if (a->pub->rounded)
            ug_buf_puts(b, " and more not shown");
    }
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

/* "+34, +8 %": from the published values only; the percentage rounded half
** away from zero, left out when the earlier value is 0. */
static void change_amount(ug_dec from, ug_dec to, ug_buf *b)
{
    char n[64];
    ug_dec d = {to.v - from.v};
    ug_dec mag = {d.v < 0 ? -d.v : d.v};
    ug_buf_printf(b, "%s%s", d.v < 0 ? "-" : d.v > 0 ? "+" : "\u00b1", ug_dec_format_grouped(mag, n));
    if (from.v <= 0)
        return;
    ug_i128 num = mag.v * 100, q = num / from.v;
    if ((num % from.v) * 2 >= from.v)
        q++;
    ug_buf_printf(b, ", %s%lld %%", d.v < 0 ? "-" : d.v > 0 ? "+" : "\u00b1",
                  (long long)q);
}

/* " (+34, +8 %)" when both cells are published; " (change not shown)" when
** either is hidden, so a hidden count's change is hidden too. */
static void change_note(const pub_cell *from, const pub_cell *to, ug_buf *b)
{
    if (pub_hidden(from->status) || pub_hidden(to->status)) {
        ug_buf_puts(b, " (change not shown)");
        return;
    }
    ug_buf_puts(b, " (");
    change_amount(from->value, to->value, b);
    ug_buf_puts(b, ")");
}

/* The key's entry for category i under `change:`: the latest period against
** its reference, "412 \u2192 446 households (+34, +8 %)", never a sum of periods. */
static void category_change_phrase(const ug_allocation *a, size_t i, ug_buf *b)
{
    size_t last = a->ngroups - 1, ref = pack_change_ref(a, last);
    const pub_cell *from = pub_at(a->pub, ref, i), *to = pub_at(a->pub, last, i);
    char n[64];
    if (pub_hidden(from->status))
        ug_buf_puts(b, pack_placeholder(a, from->status));
    else
        ug_buf_puts(b, ug_dec_format_grouped(from->value, n));
    ug_buf_puts(b, " \u2192 ");
    if (pub_hidden(to->status))
        ug_buf_puts(b, pack_placeholder(a, to->status));
    else
        pack_count_phrase(a->chart, to->value, b);
    change_note(from, to, b);
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
        change_note(&a->pub->group_totals[ref], &a->pub->group_totals[g], b);
}

void pack_group_phrase(const ug_allocation *a, size_t g, ug_buf *b)
{
    group_total_phrase(a, g, b);
    group_change_note(a, g, b);
}

void pack_category_phrase(const ug_allocation *a, size_t i, ug_buf *b)
{
    if (pack_change_ref(a, a->ngroups - 1) != SIZE_MAX) {
        category_change_phrase(a, i, b);
        return;
    }
    line_sum s = {0};
    for (size_t g = 0; g < a->ngroups; g++)
        add_cell(a, g, i, &s);
    const pub_cell *only = pub_at(a->pub, 0, i);
    if (a->ngroups == 1 && pub_hidden(only->status)) {
        ug_buf_puts(b, pack_placeholder(a, only->status));
        return;
    }
    margin_phrase(a, &a->pub->cat_totals[i], &s, b);
}

void pack_category_cell(const ug_allocation *a, size_t g, size_t i, ug_buf *b)
{
    const pub_cell *cell = pub_at(a->pub, g, i);
    if (pub_hidden(cell->status)) {
        ug_buf_puts(b, pack_placeholder(a, cell->status));
    } else {
        char n[64];
        ug_buf_puts(b, ug_dec_format_grouped(cell->value, n));
    }
    size_t ref = pack_change_ref(a, g);
    if (ref != SIZE_MAX)
        change_note(pub_at(a->pub, ref, i), cell, b);
}

/* 100 / cells as a percentage, at most two decimals: 1/200 -> 0.5 */
static void percent_text(long cells, char *buf)
{
    ug_ratio_format(100, cells > 0 ? cells : 1, 2, buf);
    char *end = buf + strlen(buf) - 1;
    while (strchr(buf, '.') && (*end == '0' || *end == '.'))
        if (*end-- == '.')
            break;
    end[1] = '\0';
}

static void share_of_whole(const ug_allocation *a, ug_buf *b)
{
    const ug_chart *c = a->chart;
    const char *unit = c->unit_label.text;
    const char *shown = a->pub->nhidden ? " shown" : "";
    if (c->groups.n) {
        /* "1% of each school's pupils": the layout names what a group is
        ** ("each", not "a", which would need "an" before some names) */
        const char *group = c->group_label.text ? c->group_label.text : "group";
        ug_buf_printf(b, " of each %s's %s%s", group, unit ? unit : "total", shown);
    } else if (unit) {
        ug_buf_puts(b, " of the ");
        pack_count_phrase(c, (ug_dec){a->group_totals[0].v}, b);
        ug_buf_puts(b, shown);
    } else {
        char n[64];
        ug_buf_printf(b, " of the total%s, %s", shown, ug_dec_format_grouped(a->group_totals[0], n));
    }
}

void pack_value_statement(const ug_chart *c, const ug_allocation *a,
                          const char *verb, ug_buf *b)
{
    ug_buf_printf(b, "Each %s %s ", pack_icon_word(c, false), verb);
    if (a->rule.by_cells) {
        char pct[64];
        percent_text(a->rule.cells, pct);
        ug_buf_printf(b, "%s%%", pct);
        share_of_whole(a, b);
        return;
    }
    pack_count_phrase(c, a->rule.value, b);
    if (a->rule.partial)
        ug_buf_printf(b, "; a clipped %s shows part of that", pack_icon_word(c, false));
}

void pack_totals_note(const ug_allocation *a, ug_buf *b)
{
    const ug_chart *c = a->chart;
    if (!a->cat_icons)
        return;
    long n = 0;
    for (size_t g = 0; g < a->ngroups; g++)
        n += a->group_icons[g];
    const char *group = c->group_label.text ? c->group_label.text : "group";
    ug_buf_printf(b, "Both totals agree: each %s's %s and each category's %s add up "
                     "to its own share of all %ld %s", group, pack_icon_word(c, true),
                  pack_icon_word(c, true), n, pack_icon_word(c, n != 1));
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

const char *pack_icon_word(const ug_chart *c, bool plural)
{
    const ug_form_info *f = ug_form_about(c->form);
    if (f->cell && all_squares(c))
        return plural ? f->cells : f->cell;
    return plural ? "icons" : "icon";
}

/* ---- the sentences -------------------------------------------------------- */

static void sentence(ug_buf *b, const char *text)
{
    size_t n = strlen(text);
    if (b->len)
        ug_buf_puts(b, " ");
    ug_buf_puts(b, text);
    if (n && !strchr(".!?", text[n - 1]))
        ug_buf_puts(b, ".");
}

/* "Adults 1,200 households (120 icons)" or "Adults fewer than 10" */
static void cell_phrase(const ug_chart *c, const ug_allocation *a, size_t g,
                        size_t i, const char *sep, ug_buf *b)
{
    const alloc_share *s = alloc_at(a, g, i);
    ug_buf_printf(b, "%s%s", c->cats[i].label.text ? c->cats[i].label.text
                                                  : c->cats[i].id, sep);
    if (alloc_hidden(s)) {
        ug_buf_puts(b, pack_placeholder(a, s->status));
        return;
    }
    char n[64];
    pack_count_phrase(c, s->count, b);
    bool one = !s->partial && s->icons == 1;
    ug_buf_printf(b, " (%s %s)", pack_icons_text(s, n), pack_icon_word(c, !one));
}

static void group_sentence(const ug_chart *c, const ug_allocation *a, size_t g,
                           ug_buf *b)
{
    ug_buf_printf(b, " %s, ", c->groups.items[g].text);
    /* "1,057 households in all (+34, +3 %):", the change after "in all" */
    group_total_phrase(a, g, b);
    ug_buf_puts(b, " in all");
    group_change_note(a, g, b);
    ug_buf_puts(b, ": ");
    for (size_t i = 0; i < c->ncats; i++)
        cell_phrase(c, a, g, i, " ", b), ug_buf_puts(b, i + 1 < c->ncats ? ", " : ".");
}

static void list_sentences(ug_buf *b, const ug_text_list *l, const char *lead)
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
        sentence(b, line.data);
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
    ug_buf_printf(b, " From %s to %s: ", c->groups.items[ref].text,
                  c->groups.items[last].text);
    for (size_t i = 0; i < c->ncats; i++) {
        ug_buf_printf(b, "%s%s ", i ? "; " : "",
                      c->cats[i].label.text ? c->cats[i].label.text : c->cats[i].id);
        category_change_phrase(a, i, b);
    }
    ug_buf_puts(b, ".");
}

void describe_chart(const ug_chart *c, const ug_allocation *a, ug_buf *b)
{
    ug_buf_puts(b, ug_form_about(c->form)->kind);
    if (c->title.text)
        ug_buf_printf(b, ": %s", c->title.text);
    ug_buf_puts(b, strchr(".!?", b->len ? b->data[b->len - 1] : 0) ? "" : ".");
    if (c->subtitle.text)
        sentence(b, c->subtitle.text);
    ug_buf_puts(b, " ");
    pack_value_statement(c, a, "is", b);
    ug_buf_puts(b, ".");
    if (a->cat_icons) {
        ug_buf_puts(b, " ");
        pack_totals_note(a, b);
        ug_buf_puts(b, ".");
    }
    for (size_t g = 0; c->groups.n && g < c->groups.n; g++)
        group_sentence(c, a, g, b);
    for (size_t i = 0; !c->groups.n && i < c->ncats; i++) {
        ug_buf_puts(b, " ");
        cell_phrase(c, a, 0, i, ": ", b);
        ug_buf_puts(b, ".");
    }
    change_sentence(c, a, b);
    ug_buf notes;
    ug_buf_init(&notes);
    pack_disclosure_notes(a, &notes);
    ug_buf_add(&notes, "", 1);
    if (notes.failed)
        b->failed = true;
    else if (notes.data[0])
        sentence(b, notes.data);
    ug_buf_free(&notes);
    for (size_t i = 0; i < c->notes.n; i++)
        sentence(b, c->notes.items[i].text);
    list_sentences(b, &c->source, "Source: ");
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
