/*
** Page stage: a handout page (FORMAT.md §2) -> one scene the size of the
** sheet, with several chart panels and text blocks on a column grid.
** The grid geometry is pure arithmetic and tested on its own; the paper
** sizes are the layout loader's (the model holds the sheet in px).
*/
#ifndef UG_PAGE_H
#define UG_PAGE_H

#include "model.h"

/* CSS: 96 px per inch, 25.4 mm per inch (W3C CSS Values and Units). */
#define PAGE_PX_PER_MM (96.0 / 25.4)

/* The grid: the sheet in px, its margin, and `columns` equal columns with
** `gutter` px between them (and between rows of panels). */
typedef struct {
    double width, height, margin, gutter;
    long columns;
    double top, bottom;   /* the content area's first and last y (px) */
} page_grid;

typedef struct {
    double x, y, w, h;
} page_box;

/* Width of a panel spanning `span` columns. */
double page_span_width(const page_grid *g, long span);

/* Place n panels in reading order: a panel takes the next `span` columns of
** the current row, or starts a new row when they are not free; a row is as
** tall as its tallest panel. Panels start on whole pixels. Returns the index
** of the panel reaching lowest past g->bottom, or n when all fit; *over gets
** how far it passes (px), the height the content lacks. */
size_t page_place(const page_grid *g, const long *spans, const double *heights,
                  size_t n, page_box *out, double *over);

/* A composed handout: the page as one SVG (width and height in mm, user
** units in px) and, for the web page's tables, one allocation per chart
** panel. The allocations borrow `charts`, shallow copies of the page's
** charts adjusted for the page (panel width, shared scale, sources moved to
** the foot), which borrow the page: free the result before the page. The
** scenes are what the sheet shows of each chart, for the audit. */
typedef struct {
    char *svg;
    size_t len;
    char *desc;           /* the page's description: each chart's, in order */
    ug_allocation **allocs;
    size_t nallocs;
    size_t *alloc_of;     /* panel i's allocation: allocs[alloc_of[i]] (charts) */
    ug_chart *charts;
    ug_scene **scenes;    /* panel i's scene as drawn (NULL for text) */
    size_t npanels;
    double fit;           /* the factor sizes were drawn at: 1 = as stated */
} page_result;

ug_status page_compose(const ug_page *page, const ug_pack_options *opt,
                       page_result *out, ug_error *err);
void page_result_free(page_result *r);

/* What ug_page_compose hands out: the result and what it was made from, for
** the audit (src/audit.c reads it). */
struct ug_composed_page {
    page_result r;
    const ug_page *page;
    ug_pack_options opt; /* a copy; its folders and cache are borrowed */
    bool has_opt;
};

#endif
