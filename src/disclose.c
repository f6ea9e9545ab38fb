/*
** Disclosure stage: the model's counts -> the published table (FORMAT.md §4).
**
** Order matters, and each step reads only what it may:
**   1. statuses from the layout alone: withheld at the source, named in
**      `suppress: cells`, small (positive and under `below`), zero (with
**      `zeros: hide`). Everything else is a candidate for publication.
**   2. rounding (protect:) of the candidates only, so that a hidden count
**      never takes part in the additive adjustment of its neighbours.
**   3. complementary cells (disclose_pattern.c), chosen from statuses and
**      published values, never from a hidden value.
**   4. margins: a group total, category total or grand total is published
**      only when every cell it sums is published; otherwise it is "partial"
**      and shown nowhere, so no output is a sum that contains a hidden count.
**      With `margins: published` the protection assumes the exact totals are
**      published elsewhere (the handbook's usual assumption, Hundepool et al.
**      2012 §4.2), which is why step 3 exists.
*/
#include <stdio.h>
#include <string.h>

#include "disclose.h"
#include "protect.h"

#define OTHER_LABEL "not shown"

static const char *const status_names[] = {
    [PUB_EXACT] = "exact",         [PUB_ROUNDED] = "rounded",
    [PUB_SMALL] = "small",         [PUB_REQUESTED] = "requested",
    [PUB_COMPLEMENT] = "complement", [PUB_WITHHELD] = "withheld",
    [PUB_PARTIAL] = "partial",
};

const char *pub_status_name(pub_status s)
{
    return status_names[s];
}

const char *pub_placeholder(const pub_table *t, pub_status s)
{
    return s == PUB_SMALL ? t->small_label : t->other_label;
}

void pub_table_free(pub_table *t)
{
    if (!t)
        return;
    ug_free(t->cells);
    ug_free(t->group_totals);
    ug_free(t->cat_totals);
    ug_free(t);
}

/* The one place the placeholder's default wording lives. */
static const char *default_small_label(const ug_chart *c, char *buf, size_t size)
{
    if (c->suppress_label.text)
        return c->suppress_label.text;
    if (!c->has_suppress || c->suppress_below.v <= 0)
        return OTHER_LABEL;
    char n[64];
    snprintf(buf, size, "fewer than %s", ug_dec_format_grouped(c->suppress_below, n));
    return buf;
}

static pub_table *new_table(const ug_chart *c)
{
    pub_table *t = ug_calloc(1, sizeof *t);
    if (!t)
        return NULL;
    t->ngroups = chart_ngroups(c);
    t->ncats = c->ncats;
    t->cells = ug_calloc(t->ngroups * t->ncats, sizeof *t->cells);
    t->group_totals = ug_calloc(t->ngroups, sizeof *t->group_totals);
    t->cat_totals = ug_calloc(t->ncats ? t->ncats : 1, sizeof *t->cat_totals);
    t->other_label = OTHER_LABEL;
    t->small_label = default_small_label(c, t->small_default, sizeof t->small_default);
    if (!t->cells || !t->group_totals || !t->cat_totals) {
        pub_table_free(t);
        return NULL;
    }
    return t;
}

/* ---- step 1: what the layout hides ---------------------------------------- */

static bool withheld(const ug_chart *c, size_t g, size_t i)
{
    return c->cats[i].withheld && c->cats[i].withheld[g];
}

static long find_group(const ug_chart *c, const char *name)
{
    for (size_t g = 0; g < c->groups.n; g++)
        if (!strcmp(c->groups.items[g].text, name))
            return (long)g;
    return -1;
}

static long find_category(const ug_chart *c, const char *name)
{
    for (size_t i = 0; i < c->ncats; i++)
        if ((c->cats[i].id && !strcmp(c->cats[i].id, name))
            || (c->cats[i].label.text && !strcmp(c->cats[i].label.text, name)))
            return (long)i;
    return -1;
}

/* `suppress: cells` names groups and categories; CSV groups are only known
** now, so this is where a misspelt name is caught. */
static ug_status mark_requested(const ug_chart *c, pub_table *t, ug_error *err)
{
    for (size_t k = 0; k < c->nsuppress_cells; k++) {
        const ug_cell_ref *ref = &c->suppress_cells[k];
        long i = find_category(c, ref->category.text);
        if (i < 0)
            return ug_fail(err, UG_ESCHEMA, ref->category.mark,
                           "no category '%s' to hide (name its id or label)",
                           ref->category.text);
        long g = 0;
        if (c->groups.n && !ref->group.text)
            return ug_fail(err, UG_ESCHEMA, ref->mark,
                           "this chart has groups: name the cell's 'group' too");
        if (!c->groups.n && ref->group.text)
            return ug_fail(err, UG_ESCHEMA, ref->group.mark,
                           "this chart has no groups: leave out 'group'");
        if (c->groups.n && (g = find_group(c, ref->group.text)) < 0)
            return ug_fail(err, UG_ESCHEMA, ref->group.mark,
                           "no group '%s' to hide a cell in", ref->group.text);
        pub_cell *cell = &t->cells[(size_t)g * t->ncats + (size_t)i];
        *cell = (pub_cell){{0}, PUB_REQUESTED};
    }
    return UG_OK;
}

static bool small(const ug_chart *c, ug_dec v)
{
    if (!c->has_suppress)
        return false;
    if (v.v == 0)
        return c->suppress_zeros == UG_ZEROS_HIDE;
    return v.v > 0 && v.v < c->suppress_below.v;
}

/* A cell the layout names is hidden whatever its count, so its status must
** not say whether that count is small: naming wins over the threshold. */
static ug_status first_statuses(const ug_chart *c, pub_table *t, ug_error *err)
{
    ug_status st = mark_requested(c, t, err);
    for (size_t g = 0; !st && g < t->ngroups; g++)
        for (size_t i = 0; i < t->ncats; i++) {
            pub_cell *cell = &t->cells[g * t->ncats + i];
            if (withheld(c, g, i))
                *cell = (pub_cell){{0}, PUB_WITHHELD};
            else if (cell->status == PUB_REQUESTED)
                continue;
            else if (small(c, c->cats[i].counts[g]))
                cell->status = PUB_SMALL;
            else
                cell->value = c->cats[i].counts[g];
        }
    return st;
}

/* ---- step 2: rounding ------------------------------------------------------ */

static protect_rule rule_of(const ug_chart *c)
{
    protect_rule r = {PROTECT_CONTROLLED, c->protect.round_to,
                      (unsigned long long)c->protect.seed};
    if (c->protect.method == UG_PROTECT_CONVENTIONAL)
        r.method = PROTECT_CONVENTIONAL;
    else if (c->protect.method == UG_PROTECT_RANDOM)
        r.method = PROTECT_RANDOM;
    return r;
}

typedef struct {
    ug_dec *raw, *out, *rows, *cols, grand;
    bool *skip;
} rounding;

static void rounding_free(rounding *r)
{
    ug_free(r->raw);
    ug_free(r->out);
    ug_free(r->rows);
    ug_free(r->cols);
    ug_free(r->skip);
}

/* Rounded margins are kept in the table even for lines that step 4 will
** mark partial; only complete lines are ever published. */
static ug_status round_cells(const ug_chart *c, pub_table *t, ug_error *err)
{
    size_t n = t->ngroups * t->ncats;
    rounding r = {0};
    r.raw = ug_calloc(n, sizeof *r.raw);
    r.out = ug_calloc(n, sizeof *r.out);
    r.rows = ug_calloc(t->ngroups, sizeof *r.rows);
    r.cols = ug_calloc(t->ncats, sizeof *r.cols);
    r.skip = ug_calloc(n, sizeof *r.skip);
    ug_status st = UG_ENOMEM;
    if (!r.raw || !r.out || !r.rows || !r.cols || !r.skip) {
        ug_fail(err, st, c->protect.mark, "out of memory");
        goto done;
    }
    for (size_t k = 0; k < n; k++) {
        r.skip[k] = pub_hidden(t->cells[k].status);
        r.raw[k] = r.skip[k] ? (ug_dec){0} : t->cells[k].value;
    }
    protect_rule rule = rule_of(c);
    st = protect_round(r.raw, r.skip, t->ngroups, t->ncats, &rule, r.out, r.rows,
                       r.cols, &r.grand, c->protect.mark, err);
    if (st)
        goto done;
    for (size_t k = 0; k < n; k++)
        if (!r.skip[k])
            t->cells[k] = (pub_cell){r.out[k], PUB_ROUNDED};
    for (size_t g = 0; g < t->ngroups; g++)
        t->group_totals[g] = (pub_cell){r.rows[g], PUB_ROUNDED};
    for (size_t i = 0; i < t->ncats; i++)
        t->cat_totals[i] = (pub_cell){t->ngroups > 1 ? r.cols[i] : r.out[i], PUB_ROUNDED};
    t->grand = (pub_cell){r.grand, PUB_ROUNDED};
    t->rounded = true;
    t->round_to = c->protect.round_to;
done:
    rounding_free(&r);
    return st;
}

/* ---- step 3: complementary cells ------------------------------------------ */

/* The placeholder's range on the grid the counts are written on: whole
** counts give [1, below - 1] (or from 0 with zeros hidden); counts with
** decimals the finest step a count can take. Judged from the published cells
** only: a hidden count's decimals must not change the range, and with it the
** pattern. */
static void small_range(const ug_chart *c, const pub_table *t, ug_dec *lo, ug_dec *hi)
{
    bool whole = true;
    for (size_t k = 0; k < t->ngroups * t->ncats; k++)
        whole = whole && t->cells[k].value.v % UG_DEC_SCALE == 0;
    ug_i128 step = whole ? UG_DEC_SCALE : 1, below = c->suppress_below.v;
    ug_i128 top = below > 0 ? (below + step - 1) / step * step - step : 0;
    lo->v = c->suppress_zeros == UG_ZEROS_HIDE ? 0 : step;
    hi->v = top > lo->v ? top : lo->v;
}

typedef struct {
    ug_dec *raw, *published;
    pub_status *status;
} grid_arrays;

static void grid_free(grid_arrays *a)
{
    ug_free(a->raw);
    ug_free(a->published);
    ug_free(a->status);
}

ug_status disclose_grid_of(const ug_chart *c, const pub_table *t, disclose_grid *g,
                           void **owned, ug_error *err)
{
    size_t n = t->ngroups * t->ncats;
    grid_arrays *a = ug_calloc(1, sizeof *a);
    if (a) {
        a->raw = ug_calloc(n, sizeof *a->raw);
        a->published = ug_calloc(n, sizeof *a->published);
        a->status = ug_calloc(n, sizeof *a->status);
    }
    if (!a || !a->raw || !a->published || !a->status) {
        if (a)
            grid_free(a);
        ug_free(a);
        return ug_fail(err, UG_ENOMEM, c->suppress_mark, "out of memory");
    }
    for (size_t k = 0; k < n; k++) {
        size_t gi = k / t->ncats, i = k % t->ncats;
        a->raw[k] = withheld(c, gi, i) ? (ug_dec){0} : c->cats[i].counts[gi];
        a->status[k] = t->cells[k].status;
        a->published[k] = t->cells[k].value;
    }
    memset(g, 0, sizeof *g);
    g->rows = t->ngroups;
    g->cols = t->ncats;
    g->raw = a->raw;
    g->published = a->published;
    g->status = a->status;
    small_range(c, t, &g->lo, &g->hi);
    g->complement_floor = c->suppress_below;
    if (t->rounded) {
        protect_rule rule = rule_of(c);
        g->slack = protect_slack(&rule);
    }
    g->margins_published = c->suppress_margins == UG_MARGINS_PUBLISHED;
    *owned = a;
    return UG_OK;
}

void disclose_grid_release(void *owned)
{
    if (owned)
        grid_free(owned);
    ug_free(owned);
}

static ug_mark cell_mark(const ug_chart *c, size_t k)
{
    size_t g = k / c->ncats, i = k % c->ncats;
    ug_mark m = c->cats[i].count_marks ? c->cats[i].count_marks[g] : c->cats[i].mark;
    return m.line ? m : c->cats[i].mark;
}

static ug_status stuck_error(const ug_chart *c, size_t k, ug_error *err)
{
    size_t g = k / c->ncats, i = k % c->ncats;
    const char *cat = c->cats[i].label.text ? c->cats[i].label.text : c->cats[i].id;
    char where[UG_MAX_STRING + 64];
    if (c->groups.n)
        snprintf(where, sizeof where, "'%s' in '%s'", cat, c->groups.items[g].text);
    else
        snprintf(where, sizeof where, "'%s'", cat);
    return ug_fail(err, UG_EDATA, cell_mark(c, k),
                   "the hidden count %s could be worked out from the totals and no "
                   "other cells can hide it: if no totals of this table are "
                   "published anywhere, say 'suppress: {margins: hidden}'; "
                   "otherwise hide more with 'suppress: {cells: [...]}' or publish "
                   "fewer groups", where);
}

static bool any_small(const pub_table *t)
{
    for (size_t k = 0; k < t->ngroups * t->ncats; k++)
        if (t->cells[k].status == PUB_SMALL)
            return true;
    return false;
}

static ug_status add_complements(const ug_chart *c, pub_table *t, ug_error *err)
{
    if (!c->has_suppress || c->suppress_complement == UG_COMPLEMENT_NONE
        || c->suppress_margins != UG_MARGINS_PUBLISHED || !any_small(t))
        return UG_OK;
    disclose_grid g;
    void *owned = NULL;
    ug_status st = disclose_grid_of(c, t, &g, &owned, err);
    if (st)
        return st;
    pub_status *status = ((grid_arrays *)owned)->status;
    size_t stuck = 0;
    st = disclose_complement(&g, status, &stuck, err);
    if (st == UG_EDATA)
        st = stuck_error(c, stuck, err);
    for (size_t k = 0; !st && k < t->ngroups * t->ncats; k++)
        if (status[k] == PUB_COMPLEMENT && t->cells[k].status != PUB_COMPLEMENT)
            t->cells[k] = (pub_cell){{0}, PUB_COMPLEMENT};
    disclose_grid_release(owned);
    t->complement = true;
    return st;
}

/* ---- step 4: margins ------------------------------------------------------- */

static pub_cell margin(pub_cell sum, bool complete, bool rounded, pub_cell rounded_value)
{
    if (!complete)
        return (pub_cell){{0}, PUB_PARTIAL};
    return rounded ? rounded_value : sum;
}

static void set_margins(pub_table *t)
{
    size_t ng = t->ngroups, nc = t->ncats;
    bool all = true;
    ug_dec grand = {0};
    for (size_t g = 0; g < ng; g++) {
        pub_cell sum = {{0}, PUB_EXACT};
        bool complete = true;
        for (size_t i = 0; i < nc; i++) {
            complete = complete && !pub_hidden(t->cells[g * nc + i].status);
            sum.value.v += t->cells[g * nc + i].value.v;
        }
        t->group_totals[g] = margin(sum, complete, t->rounded, t->group_totals[g]);
        all = all && complete;
        grand.v += sum.value.v;
    }
    for (size_t i = 0; i < nc; i++) {
        pub_cell sum = {{0}, PUB_EXACT};
        bool complete = true;
        for (size_t g = 0; g < ng; g++) {
            complete = complete && !pub_hidden(t->cells[g * nc + i].status);
            sum.value.v += t->cells[g * nc + i].value.v;
        }
        t->cat_totals[i] = margin(sum, complete, t->rounded, t->cat_totals[i]);
    }
    t->grand = margin((pub_cell){grand, PUB_EXACT}, all, t->rounded, t->grand);
}

static void count_hidden(pub_table *t)
{
    for (size_t k = 0; k < t->ngroups * t->ncats; k++) {
        pub_status s = t->cells[k].status;
        t->nhidden += pub_hidden(s);
        t->nsmall += s == PUB_SMALL;
        t->ncomplement += s == PUB_COMPLEMENT;
    }
}

static void record_settings(const ug_chart *c, pub_table *t)
{
    t->below = c->has_suppress ? c->suppress_below : (ug_dec){0};
    t->zeros_hidden = c->has_suppress && c->suppress_zeros == UG_ZEROS_HIDE;
    t->margins_published = !c->has_suppress
                           || c->suppress_margins == UG_MARGINS_PUBLISHED;
}

ug_status disclose_chart(const ug_chart *c, pub_table **out, ug_error *err)
{
    *out = NULL;
    pub_table *t = new_table(c);
    if (!t)
        return ug_fail(err, UG_ENOMEM, ug_mark_file(c->path), "out of memory");
    record_settings(c, t);
    ug_status st = first_statuses(c, t, err);
    if (!st && c->protect.present)
        st = round_cells(c, t, err);
    if (!st)
        st = add_complements(c, t, err);
    if (st) {
        pub_table_free(t);
        return st;
    }
    set_margins(t);
    count_hidden(t);
    *out = t;
    return UG_OK;
}

ug_status disclose_internal(const ug_chart *c, pub_table **out, ug_error *err)
{
    *out = NULL;
    pub_table *t = new_table(c);
    if (!t)
        return ug_fail(err, UG_ENOMEM, ug_mark_file(c->path), "out of memory");
    for (size_t g = 0; g < t->ngroups; g++)
        for (size_t i = 0; i < t->ncats; i++)
            t->cells[g * t->ncats + i] = withheld(c, g, i)
                ? (pub_cell){{0}, PUB_WITHHELD}
                : (pub_cell){c->cats[i].counts[g], PUB_EXACT};
    set_margins(t);
    count_hidden(t);
    *out = t;
    return UG_OK;
}
