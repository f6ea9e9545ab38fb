/*
** Complementary suppression (disclose.h): further cells hidden so that, with
** the totals published elsewhere, no small cell can be narrowed.
**
** In a two-way table with published margins a hidden cell is safe only on a
** cycle of hidden cells alternating between its row and its column (Gusfield,
** SIAM J. Comput. 17(3), 1988; REFERENCES.md §11). This first version looks
** for the cheapest four-cell cycle through each small cell p = (r, c): cells
** (r, c'), (r', c) and (r', c') — already hidden, or candidates — each able to
** give up (hi - lo) without falling under what the reader knows of it. Then p
** can move over its whole range in either direction while every other small
** cell stays put, a condition that reads statuses and published values only.
** Cost: fewest new cells, then the smallest published total (Cox, JASA 90,
** 1995, uses the same order of costs). A chart without groups has only its
** grand total, so one further cell suffices.
**
** This module never reads g->raw: a pattern computed from hidden values would
** itself reveal them. The audit (disclose_audit.c) proves what is chosen.
*/
#include "disclose.h"

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

static bool protect_cycle(const disclose_grid *g, pub_status *status, size_t p,
                          ug_i128 need)
{
    size_t r = p / g->cols, c = p % g->cols, nc = g->cols;
    cost best = {0};
    size_t br = 0, bc = 0;
    for (size_t r2 = 0; r2 < g->rows; r2++)
        for (size_t c2 = 0; c2 < nc; c2++) {
            if (r2 == r || c2 == c)
                continue;
            cost k = {0, 0, true};
            if (usable(g, status, r * nc + c2, need, &k)
                && usable(g, status, r2 * nc + c, need, &k)
                && usable(g, status, r2 * nc + c2, need, &k) && cheaper(&k, &best))
                best = k, br = r2, bc = c2;
        }
    if (best.ok) {
        hide(status, r * nc + bc);
        hide(status, br * nc + c);
        hide(status, br * nc + bc);
    }
    return best.ok;
}

ug_status disclose_complement(const disclose_grid *g, pub_status *status,
                              size_t *stuck, ug_error *err)
{
    if (!g->margins_published)
        return UG_OK;
    ug_i128 need = g->hi.v - g->lo.v;
    for (size_t p = 0; p < g->rows * g->cols; p++) {
        if (status[p] != PUB_SMALL)
            continue;
        bool ok = g->rows == 1 ? protect_one_row(g, status, p, need)
                               : protect_cycle(g, status, p, need);
        if (!ok) {
            *stuck = p;
            return ug_fail(err, UG_EDATA, (ug_mark){0},
                           "not enough other cells in its row and column to hide it "
                           "among");
        }
    }
    return UG_OK;
}
