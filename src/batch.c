/*
** Batch stage: one template layout + a wide CSV table -> one single-group
** chart per row, all sharing one icon value and one icon size.
**
** The template is loaded as an ordinary chart and then given the CSV as its
** data with every row a group, so the CSV is read, checked and blamed
** (file:line:col) by the same code as a layout's own `data:`. The icon value
** is resolved once on that many-group chart — `auto` looks at the largest
** row of all — and pinned on every row's chart, so the charts of a batch can
** be compared icon for icon. A row's chart is a shallow view of the
** template: its counts point into the template's columns.
**
** The batch is also laid out once for all its rows (FORMAT.md §5): every
** row is measured when the batch opens, and each row's chart is then packed
** in that shared frame (ug_batch_pack): one canvas, one line length, one
** place for each category's icons, label and key entry, so charts of a
** batch laid side by side differ only where their counts differ.
*/
#include <stdlib.h>
#include <string.h>

#include "alloc.h"
#include "batch.h"
#include "layout.h"
#include "pack.h"

#define SLUG_MAX 64

struct ug_batch {
    ug_chart *tmpl;          /* one group per CSV row */
    bool pin;                /* the rows share rule.value */
    ug_dec value;
    char (*slugs)[SLUG_MAX + 8];
    pack_frame *frame;       /* the layout every row shares */
    ug_chart *row;           /* the chart ug_batch_chart handed out last */
};

/* ---- names ---------------------------------------------------------------- */

/* ---- opening ---------------------------------------------------------------- */

static ug_status make_slugs(ug_batch *b, ug_error *err)
{
    const ug_text_list *g = &b->tmpl->groups;
    b->slugs = ug_calloc(g->n ? g->n : 1, sizeof *b->slugs);
    if (!b->slugs)
        return ug_fail(err, UG_ENOMEM, ug_mark_file(b->tmpl->path), "out of memory");
    for (size_t i = 0; i < g->n; i++) {
        if (!ug_slug(g->items[i].text, b->slugs[i], SLUG_MAX + 1))
            snprintf(b->slugs[i], sizeof b->slugs[i], "row-%zu", i + 1);
        for (size_t k = 0; k < i; k++)
            if (!strcmp(b->slugs[k], b->slugs[i]))
                return ug_fail(err, UG_EDATA, g->items[i].mark,
                               "rows '%s' and '%s' (line %u) would both be drawn to "
                               "the file name '%s'; rename one of them",
                               g->items[i].text, g->items[k].text,
                               g->items[k].mark.line, b->slugs[i]);
    }
    return UG_OK;
}

static ug_status plan_layout(ug_batch *b, ug_error *err);

static ug_status share_value(ug_batch *b, ug_error *err)
{
    alloc_rule rule;
    ug_status st = alloc_rule_for_chart(b->tmpl, &rule, err);
    if (st || rule.by_cells)
        return st;
    b->pin = true;
    b->value = rule.value;
    return UG_OK;
}

ug_status ug_batch_open(const char *template_path, const char *csv_path,
                        const ug_limits *limits, ug_batch **out, ug_error *err)
{
    ug_error_clear(err);
    *out = NULL;
    ug_batch *b = ug_calloc(1, sizeof *b);
    if (!b)
        return ug_fail(err, UG_ENOMEM, ug_mark_file(template_path), "out of memory");
    ug_status st = layout_load_template(template_path, csv_path, limits, &b->tmpl, err);
    if (!st)
        st = make_slugs(b, err);
    if (!st)
        st = share_value(b, err);
    if (!st)
        st = plan_layout(b, err);
    if (st) {
        ug_batch_free(b);
        return st;
    }
    *out = b;
    return UG_OK;
}

void ug_batch_free(ug_batch *b)
{
    if (!b)
        return;
    ug_chart_free(b->row);
    pack_frame_free(b->frame);
    ug_chart_free(b->tmpl);
    ug_free(b->slugs);
    ug_free(b);
}

size_t ug_batch_count(const ug_batch *b) { return b->tmpl->groups.n; }

const char *ug_batch_name(const ug_batch *b, size_t i)
{
    return i < ug_batch_count(b) ? b->tmpl->groups.items[i].text : NULL;
}

const char *ug_batch_slug(const ug_batch *b, size_t i)
{
    return i < ug_batch_count(b) ? b->slugs[i] : NULL;
}

/* ---- a row's chart and file name -------------------------------------------- */

/* s with every "{group}" replaced by with; NULL when out of memory. */
static char *replace_group(const char *s, const char *with)
{
    ug_buf b;
    ug_buf_init(&b);
    for (const char *hit; (hit = strstr(s, "{group}")); s = hit + 7) {
        ug_buf_add(&b, s, (size_t)(hit - s));
        ug_buf_puts(&b, with);
    }
    ug_buf_add(&b, s, strlen(s) + 1);
    if (b.failed) {
        ug_buf_free(&b);
        return NULL;
    }
    return b.data;
}

ug_status ug_batch_path(const ug_batch *b, size_t i, const char *pattern,
                        char **out, ug_error *err)
{
    ug_error_clear(err);
    if (i >= ug_batch_count(b))
        return ug_fail(err, UG_ELIMIT, ug_mark_file(b->tmpl->path),
                       "row %zu of %zu does not exist", i + 1, ug_batch_count(b));
    *out = replace_group(pattern, b->slugs[i]);
    return *out ? UG_OK : ug_fail(err, UG_ENOMEM, ug_mark_file(pattern), "out of memory");
}

int ug_batch_names_rows(const ug_batch *b, ug_mark *where)
{
    const ug_chart *t = b->tmpl;
    if ((t->title.text && strstr(t->title.text, "{group}")) ||
        (t->subtitle.text && strstr(t->subtitle.text, "{group}")))
        return 1;
    if (where)
        *where = t->title.text ? t->title.mark : ug_mark_file(t->path);
    return 0;
}

/* Replace {group} in one of the row's texts; the copy lives in the row's
** own arena. */
static ug_status row_text(ug_chart *r, ug_text *t, const char *name, ug_error *err)
{
    if (!t->text || !strstr(t->text, "{group}"))
        return UG_OK;
    char *s = replace_group(t->text, name);
    t->text = s ? ug_arena_strdup(&r->arena, s) : NULL;
    ug_free(s);
    return t->text ? UG_OK : ug_fail(err, UG_ENOMEM, t->mark, "out of memory");
}

/* Row i as a view of the template: only its category array and its texts
** are its own, in its own arena; the rest is the template's. */
static ug_status make_row(const ug_batch *b, size_t i, ug_chart **out, ug_error *err)
{
    const ug_chart *t = b->tmpl;
    ug_chart *r = ug_malloc(sizeof *r);
    if (!r)
        return ug_fail(err, UG_ENOMEM, ug_mark_file(t->path), "out of memory");
    *r = *t;
    memset(&r->arena, 0, sizeof r->arena);
    memset(&r->groups, 0, sizeof r->groups);
    r->cats = ug_arena_alloc(&r->arena, (t->ncats ? t->ncats : 1) * sizeof *r->cats);
    ug_status st = r->cats ? UG_OK
                           : ug_fail(err, UG_ENOMEM, ug_mark_file(t->path), "out of memory");
    for (size_t c = 0; !st && c < t->ncats; c++) {
        r->cats[c] = t->cats[c];
        r->cats[c].counts = t->cats[c].counts + i;
        r->cats[c].count_marks = t->cats[c].count_marks + i;
        r->cats[c].withheld = t->cats[c].withheld ? t->cats[c].withheld + i : NULL;
    }
    if (b->pin) {
        r->has_icon_value = true;
        r->icon_value_auto = false;
        r->icon_value = b->value;
    }
    const char *name = t->groups.items[i].text;
    if (!st)
        st = row_text(r, &r->title, name, err);
    if (!st)
        st = row_text(r, &r->subtitle, name, err);
    if (st) {
        ug_chart_free(r);
        return st;
    }
    *out = r;
    return UG_OK;
}

ug_status ug_batch_row(const ug_batch *b, size_t i, ug_chart **out, ug_error *err)
{
    ug_error_clear(err);
    *out = NULL;
    if (i >= ug_batch_count(b))
        return ug_fail(err, UG_ELIMIT, ug_mark_file(b->tmpl->path),
                       "row %zu of %zu does not exist", i + 1, ug_batch_count(b));
    return make_row(b, i, out, err);
}

ug_status ug_batch_chart(ug_batch *b, size_t i, const ug_chart **out, ug_error *err)
{
    ug_error_clear(err);
    *out = NULL;
    ug_chart *r = NULL;
    ug_status st = ug_batch_row(b, i, &r, err);
    if (st)
        return st;
    ug_chart_free(b->row);
    b->row = r;
    *out = r;
    return UG_OK;
}

/* ---- one layout for every row ------------------------------------------------ */

/* Measure row i into the frame. A row that cannot be allocated or packed is
** left out: drawing it fails with its own message, naming the row. */
static ug_status measure_row(ug_batch *b, size_t i, ug_error *err)
{
    ug_error e = {0};
    ug_chart *row = NULL;
    ug_allocation *a = NULL;
    ug_scene *s = NULL;
    ug_status st = make_row(b, i, &row, &e);
    if (!st)
        st = ug_chart_allocate(row, &a, &e);
    if (!st)
        st = pack_scene(row, a, NULL, b->frame, true, &s, &e);
    ug_scene_free(s);
    ug_allocation_free(a);
    ug_chart_free(row);
    if (st == UG_ENOMEM)
        *err = e;
    return st == UG_ENOMEM ? st : UG_OK;
}

static ug_status plan_layout(ug_batch *b, ug_error *err)
{
    if (!(b->frame = pack_frame_new(b->tmpl->ncats)))
        return ug_fail(err, UG_ENOMEM, ug_mark_file(b->tmpl->path), "out of memory");
    ug_status st = UG_OK;
    for (size_t i = 0; !st && i < ug_batch_count(b); i++)
        st = measure_row(b, i, err);
    return st;
}

ug_status ug_batch_pack(const ug_batch *b, const ug_chart *row, const ug_allocation *alloc,
                        const ug_pack_options *opt, ug_scene **out, ug_error *err)
{
    ug_error_clear(err);
    return pack_scene(row, alloc, opt, b->frame, false, out, err);
}
