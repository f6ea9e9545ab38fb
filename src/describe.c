/*
** Description: model + allocation -> plain sentences (the SVG's <desc>, the
** output of `unitgram describe`, the alt text of a report). Also the phrases
** the key shares with it, so picture and description say the same thing.
**
** Hidden counts (`suppress`) appear only as their label; any sum that would
** let a reader subtract their way to a hidden count is written as "more than
** <the visible part>" instead.
*/
#include <stdio.h>
#include <string.h>

#include "pack.h"

bool pack_suppressed(const ug_chart *c, ug_dec count)
{
    return c->has_suppress && count.v > 0 && count.v < c->suppress_below.v;
}

const char *pack_suppress_label(const ug_chart *c, char *buf, size_t size)
{
    if (c->suppress_label.text)
        return c->suppress_label.text;
    char n[64];
    snprintf(buf, size, "fewer than %s", pack_number(c->suppress_below, n));
    return buf;
}

char *pack_number(ug_dec d, char *buf)
{
    char raw[48];
    ug_dec_format(d, raw);
    size_t whole = strcspn(raw, "."), o = 0;
    for (size_t i = 0; raw[i]; i++) {
        if (i > 0 && i < whole && (whole - i) % 3 == 0 && whole >= 4)
            buf[o++] = ',';
        buf[o++] = raw[i];
    }
    buf[o] = '\0';
    return buf;
}

void pack_count_phrase(const ug_chart *c, ug_dec count, ug_buf *b)
{
    char n[64];
    ug_buf_puts(b, pack_number(count, n));
    if (c->unit_label.text)
        ug_buf_printf(b, " %s", c->unit_label.text);
}

void pack_sum_phrase(const ug_chart *c, ug_dec visible, size_t nhidden, ug_buf *b)
{
    if (nhidden == 0) {
        pack_count_phrase(c, visible, b);
    } else if (visible.v > 0) {
        ug_buf_puts(b, "more than ");
        pack_count_phrase(c, visible, b);
    } else {
        ug_buf_puts(b, "fewer than ");
        pack_count_phrase(c, (ug_dec){c->suppress_below.v * (ug_i128)nhidden}, b);
    }
}

static void add_cell(const ug_chart *c, ug_dec v, ug_dec *visible, size_t *nhidden)
{
    if (pack_suppressed(c, v))
        ++*nhidden;
    else
        visible->v += v.v;
}

void pack_group_phrase(const ug_chart *c, size_t g, ug_buf *b)
{
    ug_dec visible = {0};
    size_t nhidden = 0;
    for (size_t gi = 0; gi < chart_ngroups(c); gi++)
        if (g == SIZE_MAX || gi == g)
            for (size_t i = 0; i < c->ncats; i++)
                add_cell(c, c->cats[i].counts[gi], &visible, &nhidden);
    pack_sum_phrase(c, visible, nhidden, b);
}

void pack_category_phrase(const ug_chart *c, size_t i, ug_buf *b)
{
    ug_dec visible = {0};
    size_t nhidden = 0;
    for (size_t g = 0; g < chart_ngroups(c); g++)
        add_cell(c, c->cats[i].counts[g], &visible, &nhidden);
    if (nhidden == 1 && visible.v == 0) {
        char buf[64];
        ug_buf_puts(b, pack_suppress_label(c, buf, sizeof buf));
        return;
    }
    pack_sum_phrase(c, visible, nhidden, b);
}

static ug_dec chart_total(const ug_chart *c)
{
    ug_dec t = {0};
    for (size_t i = 0; i < c->ncats; i++)
        for (size_t g = 0; g < chart_ngroups(c); g++)
            t.v += c->cats[i].counts[g].v;
    return t;
}

void pack_category_cell(const ug_chart *c, size_t g, size_t i, ug_buf *b)
{
    ug_dec v = c->cats[i].counts[g];
    if (pack_suppressed(c, v)) {
        char buf[64];
        ug_buf_puts(b, pack_suppress_label(c, buf, sizeof buf));
    } else {
        char n[64];
        ug_buf_puts(b, pack_number(v, n));
    }
}

static bool any_hidden(const ug_chart *c)
{
    for (size_t i = 0; i < c->ncats; i++)
        for (size_t g = 0; g < chart_ngroups(c); g++)
            if (pack_suppressed(c, c->cats[i].counts[g]))
                return true;
    return false;
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

static void share_of_whole(const ug_chart *c, ug_buf *b)
{
    const char *unit = c->unit_label.text;
    if (c->groups.n)
        ug_buf_printf(b, " of a group's %s", unit ? unit : "total");
    else if (any_hidden(c))
        ug_buf_printf(b, " of all %s counted", unit ? unit : "that was");
    else if (unit) {
        ug_buf_puts(b, " of the ");
        pack_count_phrase(c, chart_total(c), b);
    } else {
        char n[64];
        ug_buf_printf(b, " of the total, %s", pack_number(chart_total(c), n));
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
        share_of_whole(c, b);
        return;
    }
    pack_count_phrase(c, a->rule.value, b);
    if (a->rule.partial)
        ug_buf_printf(b, "; a clipped %s shows part of that", pack_icon_word(c, false));
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

const char *pack_icon_word(const ug_chart *c, bool plural)
{
    if (c->form == UG_FORM_WAFFLE)
        return plural ? "squares" : "square";
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
    if (pack_suppressed(c, s->count)) {
        char buf[64];
        ug_buf_puts(b, pack_suppress_label(c, buf, sizeof buf));
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
    pack_group_phrase(c, g, b);
    ug_buf_puts(b, " in all: ");
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

void describe_chart(const ug_chart *c, const ug_allocation *a, ug_buf *b)
{
    ug_buf_puts(b, c->form == UG_FORM_WAFFLE ? "Waffle chart" : "Pictogram chart");
    if (c->title.text)
        ug_buf_printf(b, ": %s", c->title.text);
    ug_buf_puts(b, strchr(".!?", b->len ? b->data[b->len - 1] : 0) ? "" : ".");
    if (c->subtitle.text)
        sentence(b, c->subtitle.text);
    ug_buf_puts(b, " ");
    pack_value_statement(c, a, "is", b);
    ug_buf_puts(b, ".");
    for (size_t g = 0; c->groups.n && g < c->groups.n; g++)
        group_sentence(c, a, g, b);
    for (size_t i = 0; !c->groups.n && i < c->ncats; i++) {
        ug_buf_puts(b, " ");
        cell_phrase(c, a, 0, i, ": ", b);
        ug_buf_puts(b, ".");
    }
    for (size_t i = 0; i < c->notes.n; i++)
        sentence(b, c->notes.items[i].text);
    list_sentences(b, &c->source, "Source: ");
}

ug_status ug_chart_describe(const ug_chart *c, const ug_allocation *a, char **out,
                            size_t *len, ug_error *err)
{
    ug_buf b;
    ug_buf_init(&b);
    if (c->description.text)
        ug_buf_puts(&b, c->description.text);
    else
        describe_chart(c, a, &b);
    return ug_buf_take(&b, out, len, err);
}
