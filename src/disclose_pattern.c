/*
** Complementary suppression (disclose.h): further cells hidden so that, with
** the totals published elsewhere, no small cell can be narrowed.
**
** In a two-way table with published margins a hidden cell is safe only on a
** cycle of hidden cells alternating between rows and columns (Gusfield,
** SIAM J. Comput. 17(3), 1988; REFERENCES.md §11). For each small cell p in
** turn this module hides the cheapest such cycle through p whose other cells
** can each give up (hi - lo) without falling under what the reader knows of
** them: then p can move over its whole range in either direction while every
** other small cell stays put, a condition that reads statuses and published
** values only. Cost: fewest new cells, then the smallest published total
** (the order of costs of Cox, JASA 90, 1995); cells an earlier cycle hid cost
** nothing, so cycles share cells where they can. A chart without groups has
** only its grand total, so one further cell suffices.
**
** The cycle condition is sufficient, not necessary: a table it cannot protect
** is refused (the caller names the cell), even where a pattern chosen with
** knowledge of the hidden values would exist; such a pattern would leak them.
**
** This module never reads g->raw: a pattern computed from hidden values would
** itself reveal them. The audit (disclose_audit.c) proves what is chosen.
*/
#include "disclose.h"

#include <stdlib.h>

typedef struct {
    long new_cells;
    ug_i128 total;
    bool ok;
} cost;

/* How much a cell may fall in any move: an unknown value may be 0. */
static ug_i128 room(const disclose_grid *g, size_t k, pub_status st)
{
    if (st == PUB_EXACT || st == PUB_ROUNDED || st == PUB_COMPLEMENT)
        return g->published[k].v - g->slack.v - g->complement_floor.v;
    return 0;
}

static bool usable(const disclose_grid *g, const pub_status *status, size_t k,
                   ug_i128 need, cost *c)
{
    pub_status st = status[k];
    if (room(g, k, st) < need)
        return false;
    if (st != PUB_COMPLEMENT) {
        c->new_cells++;
        c->total += g->published[k].v;
    }
    return true;
}

static bool cheaper(const cost *a, const cost *b)
{
    if (!b->ok)
        return true;
    return a->new_cells != b->new_cells ? a->new_cells < b->new_cells : a->total < b->total;
}

static void hide(pub_status *status, size_t k)
{
    if (status[k] == PUB_EXACT || status[k] == PUB_ROUNDED)
        status[k] = PUB_COMPLEMENT;
}

static bool protect_one_row(const disclose_grid *g, pub_status *status, size_t p,
                            ug_i128 need)
{
    cost best = {0};
    size_t pick = 0;
    for (size_t k = 0; k < g->cols; k++) {
        cost c = {0, 0, true};
        if (k != p && usable(g, status, k, need, &c) && cheaper(&c, &best))
            best = c, pick = k;
    }
    if (best.ok)
        hide(status, pick);
    return best.ok;
}

/* ---- the cheapest cycle ------------------------------------------------------
** Rows and columns are the nodes of a bipartite graph whose edges are the
** cells. A cycle of cells through p = (r, c) is p plus a path from row r to
** column c that avoids p; moving a value delta around it changes every cell
** by +-delta and no row or column total. So the cheapest such path over
** cells with room is the cheapest cycle: Dijkstra on (new cells, published
** total), compared in that order, ties to the lower node. */

typedef struct {
    cost *dist;        /* [node]: rows 0..rows-1, then columns */
    size_t *via;       /* [node]: the cell the best path arrived by */
    bool *done;
    size_t *heap;      /* node indices, a binary heap on dist */
    size_t nheap, nodes;
} search;

static bool node_before(const search *s, size_t a, size_t b)
{
    const cost *x = &s->dist[a], *y = &s->dist[b];
    if (x->new_cells != y->new_cells)
        return x->new_cells < y->new_cells;
    if (x->total != y->total)
        return x->total < y->total;
    return a < b;
}

static void heap_swap(search *s, size_t i, size_t j)
{
    size_t t = s->heap[i];
    s->heap[i] = s->heap[j], s->heap[j] = t;
}

static void heap_push(search *s, size_t node)
{
    size_t i = s->nheap++;
    s->heap[i] = node;
    while (i > 0 && node_before(s, s->heap[i], s->heap[(i - 1) / 2]))
        heap_swap(s, i, (i - 1) / 2), i = (i - 1) / 2;
}

static size_t heap_pop(search *s)
{
    size_t top = s->heap[0], i = 0;
    s->heap[0] = s->heap[--s->nheap];
    for (;;) {
        size_t l = 2 * i + 1, r = l + 1, m = i;
        if (l < s->nheap && node_before(s, s->heap[l], s->heap[m]))
            m = l;
        if (r < s->nheap && node_before(s, s->heap[r], s->heap[m]))
            m = r;
        if (m == i)
            return top;
        heap_swap(s, i, m), i = m;
    }
}

static ug_status search_open(search *s, const disclose_grid *g, ug_error *err)
{
    s->nodes = g->rows + g->cols;
    s->dist = ug_calloc(s->nodes, sizeof *s->dist);
    s->via = ug_calloc(s->nodes, sizeof *s->via);
    s->done = ug_calloc(s->nodes, sizeof *s->done);
    /* lazy deletion: a node enters once per improvement, at most once per cell */
    s->heap = ug_calloc(g->rows * g->cols + 1, sizeof *s->heap);
    if (s->dist && s->via && s->done && s->heap)
        return UG_OK;
    return ug_fail(err, UG_ENOMEM, (ug_mark){0}, "out of memory");
}

static void search_close(search *s)
{
    free(s->dist), free(s->via), free(s->done), free(s->heap);
}

/* The cell joining node a to node b, one a row and the other a column. */
static size_t cell_between(const disclose_grid *g, size_t a, size_t b)
{
    size_t row = a < g->rows ? a : b, col = (a < g->rows ? b : a) - g->rows;
    return row * g->cols + col;
}

static void relax(search *s, const disclose_grid *g, const pub_status *status,
                  size_t from, size_t to, size_t p, ug_i128 need)
{
    size_t k = cell_between(g, from, to);
    cost c = s->dist[from];
    if (k == p || s->done[to] || !usable(g, status, k, need, &c) || !cheaper(&c, &s->dist[to]))
        return;
    s->dist[to] = c;
    s->via[to] = k;
    heap_push(s, to);
}

static bool cheapest_path(search *s, const disclose_grid *g, const pub_status *status,
                          size_t p, ug_i128 need)
{
    size_t from = p / g->cols, goal = g->rows + p % g->cols;
    for (size_t v = 0; v < s->nodes; v++)
        s->dist[v] = (cost){0}, s->done[v] = false;
    s->nheap = 0;
    s->dist[from] = (cost){0, 0, true};
    heap_push(s, from);
    while (s->nheap > 0) {
        size_t v = heap_pop(s);
        if (s->done[v])
            continue;
        s->done[v] = true;
        if (v == goal)
            return true;
        size_t first = v < g->rows ? g->rows : 0, last = v < g->rows ? s->nodes : g->rows;
        for (size_t w = first; w < last; w++)
            relax(s, g, status, v, w, p, need);
    }
    return false;
}

static bool protect_cycle(search *s, const disclose_grid *g, pub_status *status,
                          size_t p, ug_i128 need)
{
    if (!cheapest_path(s, g, status, p, need))
        return false;
    size_t v = g->rows + p % g->cols, start = p / g->cols;
    while (v != start) {
        size_t k = s->via[v];
        hide(status, k);
        v = v < g->rows ? g->rows + k % g->cols : k / g->cols;
    }
    return true;
}

ug_status disclose_complement(const disclose_grid *g, pub_status *status,
                              size_t *stuck, ug_error *err)
{
    if (!g->margins_published)
        return UG_OK;
    ug_i128 need = g->hi.v - g->lo.v;
    search s = {0};
    ug_status st = g->rows > 1 ? search_open(&s, g, err) : UG_OK;
    for (size_t p = 0; !st && p < g->rows * g->cols; p++) {
        if (status[p] != PUB_SMALL)
            continue;
        bool ok = g->rows == 1 ? protect_one_row(g, status, p, need)
                               : protect_cycle(&s, g, status, p, need);
        if (!ok) {
            *stuck = p;
            st = ug_fail(err, UG_EDATA, (ug_mark){0},
                         "not enough other cells in its row and column to hide it "
                         "among");
        }
    }
    search_close(&s);
    return st;
}
