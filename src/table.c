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

/* `measure` is the column a table with a percent chart carries (NULL: none). */
static void put_row(ug_buf *b, const char *chart, const char *group, const char *cat,
                    const pub_table *t, const pub_cell *cell, long icons,
                    const char *level, const char *measure)
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
    ug_buf_printf(b, ",%s,%s%s%s\n", pub_status_name(cell->status), level,
                  measure ? "," : "", measure ? measure : "");
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

/* A percent chart's rows are its shares as given; it has no total rows, as
** shares of unknown totals add up to nothing that could be published. */
static void chart_rows(ug_buf *b, const ug_allocation *a, const char *chart,
                       bool with_measure)
{
    const ug_chart *c = a->chart;
    const pub_table *t = a->pub;
    const char *m = !with_measure ? NULL : chart_is_percent(c) ? "percent" : "count";
    for (size_t g = 0; g < a->ngroups; g++)
        for (size_t i = 0; i < a->ncats; i++)
            put_row(b, chart, c->groups.n ? c->groups.items[g].text : "", label_of(c, i),
                    t, pub_at(t, g, i), alloc_at(a, g, i)->icons, "cell", m);
    if (chart_is_percent(c))
        return;
    for (size_t g = 0; c->groups.n && g < a->ngroups; g++)
        put_row(b, chart, c->groups.items[g].text, "", t, &t->group_totals[g],
                line_icons(a, g, SIZE_MAX), "group total", m);
    for (size_t i = 0; c->groups.n && i < a->ncats; i++)
        put_row(b, chart, "", label_of(c, i), t, &t->cat_totals[i],
                line_icons(a, SIZE_MAX, i), "category total", m);
    put_row(b, chart, "", "", t, &t->grand, line_icons(a, SIZE_MAX, SIZE_MAX), "total", m);
}

ug_status ug_table_csv(const ug_allocation *const *allocs, size_t n, char **out,
                       size_t *len, ug_error *err)
{
    ug_error_clear(err);
    ug_buf b;
    ug_buf_init(&b);
    /* the measure column only when a chart's numbers are shares, so tables
    ** of counts stay as they were */
    bool measure = false;
    for (size_t k = 0; k < n; k++)
        measure = measure || chart_is_percent(allocs[k]->chart);
    ug_buf_puts(&b, n > 1 ? "chart,group,category,count,icons,status,level"
                          : "group,category,count,icons,status,level");
    ug_buf_puts(&b, measure ? ",measure\n" : "\n");
    for (size_t k = 0; k < n; k++)
        chart_rows(&b, allocs[k], n > 1 ? chart_name(allocs[k]->chart) : NULL, measure);
    return ug_buf_take(&b, out, len, err);
}
