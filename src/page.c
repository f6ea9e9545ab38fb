/*
** Page stage: a handout page (FORMAT.md §2) -> one scene the size of the
** sheet. Panels are laid on a column grid in reading order; the page title
** sits at the top and the sources of every panel are collected at the foot.
** Nothing is shrunk to fit: content that does not fit is an error saying
** which panel and by how much, because a silently smaller icon would break
** the shared scale readers compare across panels.
*/
#include <assert.h>
#include <string.h>
#include <strings.h>

#include "page.h"

/* ISO 216 A-series; US Letter 8.5 x 11 in and Legal 8.5 x 14 in at
** 25.4 mm per inch (612 x 792 pt and 612 x 1008 pt). */
static const struct {
    const char *name;
    double w, h;
} papers[] = {
    {"A3", 297, 420}, {"A4", 210, 297}, {"A5", 148, 210},
    {"letter", 215.9, 279.4}, {"legal", 215.9, 355.6},
};

bool page_paper(const char *name, double *w_mm, double *h_mm)
{
    for (size_t i = 0; i < sizeof papers / sizeof papers[0]; i++)
        if (strcasecmp(name, papers[i].name) == 0) {
            *w_mm = papers[i].w;
            *h_mm = papers[i].h;
            return true;
        }
    return false;
}

double page_span_width(const page_grid *g, long span)
{
    double inner = g->width - 2 * g->margin;
    double col = (inner - (double)(g->columns - 1) * g->gutter) / (double)g->columns;
    return col * (double)span + g->gutter * (double)(span - 1);
}

/* Finish a row: every panel in it starts at y; returns the next row's y. */
static double close_row(const page_grid *g, page_box *out, size_t from,
                        size_t to, double y)
{
    double tallest = 0;
    for (size_t i = from; i < to; i++)
        if (out[i].h > tallest)
            tallest = out[i].h;
    return y + tallest + g->gutter;
}

size_t page_place(const page_grid *g, const long *spans, const double *heights,
                  size_t n, page_box *out, double *over)
{
    double y = g->top;
    long used = 0;
    size_t row = 0;
    *over = 0;
    for (size_t i = 0; i < n; i++) {
        assert(spans[i] >= 1 && spans[i] <= g->columns);
        if (used + spans[i] > g->columns) {
            y = close_row(g, out, row, i, y);
            row = i;
            used = 0;
        }
        out[i].x = g->margin + (double)used * (page_span_width(g, 1) + g->gutter);
        out[i].y = y;
        out[i].w = page_span_width(g, spans[i]);
        out[i].h = heights[i];
        used += spans[i];
    }
    size_t first = n;
    for (size_t i = 0; i < n; i++) {
        double past = out[i].y + out[i].h - g->bottom;
        if (past > 1e-9 && first == n)
            first = i;
        if (past > *over)
            *over = past;
    }
    return first;
}
