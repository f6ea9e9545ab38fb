/*
** Web-page output: one self-contained HTML page holding the SVG inline, the
** plain-language description, and a data table per chart as the picture's
** text alternative (a screen reader can walk a table cell by cell; it cannot
** count icons). No scripts, no external files: the page is one document that
** can be mailed, archived or opened from a USB stick.
**
** The page is also well-formed XML (uppercase DOCTYPE, self-closed void
** elements), which HTML parsers accept and which lets tests parse it strictly.
** Every text from the input goes through svg_escape_text, the SVG's own rule
** (text_clean): a CSV field holding U+FFFE cannot break the page.
*/
#include <math.h>
#include <string.h>
#include <strings.h>

#include "alloc.h"
#include "layout.h"
#include "raster.h"
#include "pack.h"
#include "phrase.h"
#include "svg.h"

/* ---- the SVG ------------------------------------------------------------- */

static bool has_script(const char *s, size_t n)
{
    for (size_t i = 0; i + 7 <= n; i++)
        if (s[i] == '<' && strncasecmp(s + i + 1, "script", 6) == 0)
            return true;
    return false;
}

/* ---- the table ----------------------------------------------------------- */

/* num/den rounded half-up to two places, trailing zeros dropped: a table
** cell for readers, where the report gives the full six places. */
static const char *short_number(ug_i128 num, ug_i128 den, char *buf)
{
    ug_ratio_format(num, den, 2, buf);
    size_t n = strlen(buf);
    if (n >= 3 && strcmp(buf + n - 3, ".00") == 0)
        buf[n - 3] = '\0';
    else if (buf[n - 1] == '0' && strchr(buf, '.'))
        buf[n - 1] = '\0';
    return buf;
}

/* A phrase with one slot, escaped for HTML text. */
static void phrase_say_escaped(ug_buf *b, const char *lang, phrase_id id, const char *slot,
                               const char *value)
{
    ug_buf t;
    ug_buf_init(&t);
    phrase_say(&t, lang, id, (phrase_slot[]){{slot, value}, {NULL, NULL}});
    ug_buf_add(&t, "", 1);
    if (!t.failed)
        svg_escape_text(b, t.data);
    b->failed = b->failed || t.failed;
    ug_buf_free(&t);
}

static void placeholder_cell(ug_buf *b, const ug_allocation *a, pub_status st)
{
    ug_buf t;
    ug_buf_init(&t);
    pack_placeholder(a, st, &t);
    ug_buf_add(&t, "", 1);
    if (!t.failed)
        svg_escape_text(b, t.data);
    b->failed = b->failed || t.failed;
    ug_buf_free(&t);
}

static void caption(ug_buf *b, const ug_allocation *a)
{
    const ug_chart *c = a->chart;
    const char *lang = pack_lang(c);
    char v[64];
    ug_buf_puts(b, "<caption>");
    svg_escape_text(b, c->title.text ? c->title.text : "Chart");
    ug_buf_puts(b, " (");
    /* the exact value, as the table's figures are */
    if (a->rule.by_cells) {
        if (a->rule.cells == 100)
            snprintf(v, sizeof v, "1%%");
        else
            snprintf(v, sizeof v, "1/%ld", a->rule.cells);
        phrase_say_escaped(b, lang, PH_CAP_SQUARE, "share", v);
    } else {
        phrase_say_escaped(b, lang, PH_CAP_ICON, "value", ug_dec_format(a->rule.value, v));
    }
    /* exact figures of money still say which money: the ISO 4217 code */
    if (c->currency.text) {
        ug_buf_puts(b, " ");
        svg_escape_text(b, c->currency.text);
    }
    if (c->unit_label.text) {
        ug_buf_puts(b, " ");
        svg_escape_text(b, c->unit_label.text);
    }
    ug_buf_puts(b, ")</caption>\n");
}

static void head_cell(ug_buf *b, const char *lang, phrase_id id)
{
    ug_buf_puts(b, "<th scope=\"col\">");
    svg_escape_text(b, phrase_text(lang, id));
    ug_buf_puts(b, "</th>");
}

static void head_row(ug_buf *b, const ug_chart *c)
{
    const char *lang = pack_lang(c);
    ug_buf_puts(b, "<thead><tr>");
    if (c->groups.n > 0)
        head_cell(b, lang, PH_TH_GROUP);
    head_cell(b, lang, PH_TH_CATEGORY);
    head_cell(b, lang, chart_is_percent(c) ? PH_TH_SHARE : PH_TH_COUNT);
    head_cell(b, lang, PH_TH_ICONS);
    head_cell(b, lang, PH_TH_SHOWN);
    ug_buf_puts(b, "</tr></thead>\n");
}

static void body_row(ug_buf *b, const ug_allocation *a, size_t g, size_t i)
{
    const ug_chart *c = a->chart;
    const alloc_share *s = alloc_at(a, g, i);
    char count[48], icons[64], shown[64];
    ug_buf_puts(b, "<tr>");
    if (c->groups.n) {
        ug_buf_puts(b, "<td>");
        svg_escape_text(b, c->groups.items[g].text);
        ug_buf_puts(b, "</td>");
    }
    ug_buf_puts(b, "<th scope=\"row\">");
    svg_escape_text(b, c->cats[i].label.text);
    if (alloc_hidden(s)) {
        ug_buf_puts(b, "</th><td>");
        placeholder_cell(b, a, s->status);
        ug_buf_puts(b, "</td><td></td><td></td></tr>\n");
        return;
    }
    if (s->partial)
        short_number(s->quota_num, s->quota_den, icons);
    else
        snprintf(icons, sizeof icons, "%ld", s->icons);
    ug_buf_printf(b, "</th><td>%s</td><td>%s</td><td>%s</td></tr>\n",
                  ug_dec_format(s->count, count), icons,
                  short_number(s->shown_num, s->shown_den * UG_DEC_SCALE, shown));
}

/* A handout may hold charts in two languages: a table in another language
** than the page says which. */
static void table(ug_buf *b, const ug_allocation *a, const ug_chart *first)
{
    const char *lang = a->chart->lang.text, *page = first ? first->lang.text : NULL;
    char tag[64];
    ug_buf_puts(b, "<table");
    if (lang && (!page || strcmp(lang, page))) {
        ug_buf_puts(b, " lang=\"");
        svg_escape_text(b, phrase_tag(lang, tag, sizeof tag));
        ug_buf_printf(b, "\" dir=\"%s\"", phrase_dir(lang));
    }
    ug_buf_puts(b, ">\n");
    caption(b, a);
    head_row(b, a->chart);
    ug_buf_puts(b, "<tbody>\n");
    for (size_t g = 0; g < a->ngroups; g++)
        for (size_t i = 0; i < a->ncats; i++)
            body_row(b, a, g, i);
    ug_buf_puts(b, "</tbody>\n</table>\n");
}

/* ---- the page ------------------------------------------------------------ */

static const char page_css[] =
    "body{font-family:'DejaVu Sans',sans-serif;color:#222;background:#fff;"
    "margin:2em auto;max-width:60em;padding:0 1em}"
    "figure{margin:1em 0}svg{max-width:100%;height:auto}"
    "table{border-collapse:collapse;margin:1.5em 0}"
    "caption{text-align:left;font-weight:bold;padding-bottom:.4em}"
    "th,td{border:1px solid #767676;padding:.25em .6em}"
    "td{text-align:right}thead th{background:#eee}"
    "tbody th{text-align:left;font-weight:normal}"
    /* the picture shows the title: the heading stays for screen readers and
    ** page navigation, out of sight (clipped to nothing, not display:none,
    ** which would hide it from them too) */
    ".in-picture{position:absolute;width:1px;height:1px;overflow:hidden;"
    "clip:rect(0 0 0 0);clip-path:inset(50%);white-space:nowrap}";

/* The root <svg>'s width in CSS px from its width attribute, read as a
** layout's length is (our writers give px or mm); 0 when it states none. */
static double svg_width_px(const char *svg, size_t len)
{
    const char *end = memchr(svg, '>', len);
    size_t n = end ? (size_t)(end - svg) : len;
    for (size_t i = 0; i + 8 < n; i++) {
        if (memcmp(svg + i, " width=\"", 8) != 0)
            continue;
        const char *v = svg + i + 8, *q = memchr(v, '"', n - i - 8);
        double px;
        return q && layout_parse_length(v, (size_t)(q - v), &px) && px > 0 && px < 1e6
                   ? px : 0;
    }
    return 0;
}

/* The page is as wide as its picture (or 60em, whichever is more), so a
** wide chart is shown at its own size, icons unscaled; a narrow screen
** still shrinks it (svg max-width 100%). */
/* lang and dir from the first chart's `lang` (FORMAT.md §6); a chart that
** states none keeps the page as it always was, lang="en" alone. */
static void page_head(ug_buf *b, const ug_chart *first, const char *title,
                      double picture_px)
{
    char tag[64];
    ug_buf_puts(b, "<!DOCTYPE html>\n<html lang=\"");
    if (first && first->lang.text) {
        svg_escape_text(b, phrase_tag(first->lang.text, tag, sizeof tag));
        ug_buf_printf(b, "\" dir=\"%s", phrase_dir(first->lang.text));
    } else {
        ug_buf_puts(b, PHRASE_DEFAULT_LANG);
    }
    ug_buf_puts(b, "\">\n<head>\n"
                   "<meta charset=\"utf-8\"/>\n"
                   "<meta name=\"viewport\" content=\"width=device-width\"/>\n"
                   "<title>");
    svg_escape_text(b, title);
    ug_buf_printf(b, "</title>\n<style>%s", page_css);
    if (picture_px > 0)
        ug_buf_printf(b, "body{max-width:max(60em,%.0fpx)}", ceil(picture_px));
    ug_buf_puts(b, "</style>\n</head>\n<body>\n<main>\n<h1 class=\"in-picture\">");
    svg_escape_text(b, title);
    ug_buf_puts(b, "</h1>\n");
}

ug_status ug_html_page(const char *title, const char *svg, size_t svg_len,
                       const char *description,
                       const ug_allocation *const *allocs, size_t nallocs,
                       char **out, size_t *len, ug_error *err)
{
    ug_error_clear(err);
    *out = NULL;
    const ug_chart *first = nallocs ? allocs[0]->chart : NULL;
    size_t at = raster_svg_body(svg, svg_len);
    if (svg_len - at < 4 || memcmp(svg + at, "<svg", 4) != 0)
        return ug_fail(err, UG_ERENDER, ug_mark_file(NULL),
                       "the picture for the web page is not an <svg> element");
    if (has_script(svg + at, svg_len - at))
        return ug_fail(err, UG_ERENDER, ug_mark_file(NULL),
                       "the picture for the web page contains a script");
    if (!title)
        title = first && first->title.text ? first->title.text : "Chart";
    if (!description && first)
        description = first->description.text;
    ug_buf b;
    ug_buf_init(&b);
    page_head(&b, first, title, svg_width_px(svg + at, svg_len - at));
    ug_buf_puts(&b, "<figure>\n");
    ug_buf_add(&b, svg + at, svg_len - at);
    ug_buf_puts(&b, "\n</figure>\n");
    if (description && *description) {
        ug_buf_puts(&b, "<p>");
        svg_escape_text(&b, description);
        ug_buf_puts(&b, "</p>\n");
    }
    for (size_t k = 0; k < nallocs; k++)
        table(&b, allocs[k], first);
    ug_buf_puts(&b, "</main>\n</body>\n</html>\n");
    return ug_buf_take(&b, out, len, err);
}
