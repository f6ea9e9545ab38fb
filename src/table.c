/*
** The published table as CSV (FORMAT.md §4): the machine-readable companion
** of a picture, as statistical offices publish the data behind a chart. One
** row per group × category, then the totals; each with its status, so a
** reader can tell a count as counted from a rounded or a hidden one. It is
** written from the published table only: a hidden cell is its placeholder.
*/
#include <string.h>

#include "alloc.h"

static const char *chart_name(const ug_chart *c)
{
    return c->title.text ? c->title.text : c->path ? c->path : "";
}

static void put_row(ug_buf *b, const char *chart, const char *group, const char *cat,
                    const pub_table *t, const pub_cell *cell, long icons,
                    const char *level)
{
    char n[48];
    if (chart) {
        ug_buf_csv_field(b, chart);
        ug_buf_puts(b, ",");
    }
    ug_buf_csv_field(b, group);
    ug_buf_puts(b, ",");
    ug_buf_csv_field(b, cat);
    ug_buf_puts(b, ",");
    if (pub_hidden(cell->status)) {
        ug_buf_csv_field(b, pub_placeholder(t, cell->status));
        ug_buf_puts(b, ",");
    } else {
        ug_buf_printf(b, "%s,%ld", ug_dec_format(cell->value, n), icons);
    }
    ug_buf_printf(b, ",%s,%s\n", pub_status_name(cell->status), level);
}

static const char *label_of(const ug_chart *c, size_t i)
{
    return c->cats[i].label.text ? c->cats[i].label.text : c->cats[i].id;
}

/* Icons of a line: the sum of its cells' whole icons (a partial chart's
** clipped icons count as whole here; the picture states the exact value). */
static long line_icons(const ug_allocation *a, size_t g, size_t i)
{
    long n = 0;
    for (size_t gi = 0; gi < a->ngroups; gi++)
        for (size_t k = 0; k < a->ncats; k++)
            if ((g == SIZE_MAX || gi == g) && (i == SIZE_MAX || k == i))
                n += alloc_at(a, gi, k)->icons;
    return n;
}

static void chart_rows(ug_buf *b, const ug_allocation *a, const char *chart)
{
    const ug_chart *c = a->chart;
    const pub_table *t = a->pub;
    for (size_t g = 0; g < a->ngroups; g++)
        for (size_t i = 0; i < a->ncats; i++)
            put_row(b, chart, c->groups.n ? c->groups.items[g].text : "", label_of(c, i),
                    t, pub_at(t, g, i), alloc_at(a, g, i)->icons, "cell");
    for (size_t g = 0; c->groups.n && g < a->ngroups; g++)
        put_row(b, chart, c->groups.items[g].text, "", t, &t->group_totals[g],
                line_icons(a, g, SIZE_MAX), "group total");
    for (size_t i = 0; c->groups.n && i < a->ncats; i++)
        put_row(b, chart, "", label_of(c, i), t, &t->cat_totals[i],
                line_icons(a, SIZE_MAX, i), "category total");
    put_row(b, chart, "", "", t, &t->grand, line_icons(a, SIZE_MAX, SIZE_MAX), "total");
}

ug_status ug_table_csv(const ug_allocation *const *allocs, size_t n, char **out,
                       size_t *len, ug_error *err)
{
    ug_error_clear(err);
    ug_buf b;
    ug_buf_init(&b);
    ug_buf_puts(&b, n > 1 ? "chart,group,category,count,icons,status,level\n"
                          : "group,category,count,icons,status,level\n");
    for (size_t k = 0; k < n; k++)
        chart_rows(&b, allocs[k], n > 1 ? chart_name(allocs[k]->chart) : NULL);
    return ug_buf_take(&b, out, len, err);
}
