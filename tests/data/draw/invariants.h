/*
** Geometry invariants of a packed scene, shared by the draw tests: returns
** NULL when every rule holds, else a description of the first broken one.
**  - every box (icon, swatch, placeholder, empty cell, text line) lies inside
**    the canvas;
**  - no two boxes overlap (text lines included);
**  - every icon has the one chart-wide size (Neurath's rule, REFERENCES.md §6);
**  - each (group, category) has exactly the icons the allocation gave it,
**    plus one clipped icon for a partial share; a hidden count has none.
*/
#ifndef UG_TEST_INVARIANTS_H
#define UG_TEST_INVARIANTS_H

#include <stdio.h>

#include "pack.h"

typedef struct {
    double x0, y0, x1, y1;
    const char *kind;
} inv_box;

static bool inv_overlap(const inv_box *a, const inv_box *b)
{
    const double e = 0.01;
    return a->x0 < b->x1 - e && b->x0 < a->x1 - e && a->y0 < b->y1 - e &&
           b->y0 < a->y1 - e;
}

static size_t inv_collect(const ug_scene *s, inv_box *out)
{
    size_t n = 0;
    double z = s->icon_size;
    for (size_t i = 0; i < s->nicons; i++)
        out[n++] = (inv_box){s->icons[i].x, s->icons[i].y, s->icons[i].x + z,
                             s->icons[i].y + z, "icon"};
    for (size_t i = 0; i < s->nswatches; i++)
        out[n++] = (inv_box){s->swatches[i].x, s->swatches[i].y, s->swatches[i].x + z,
                             s->swatches[i].y + z, "swatch"};
    for (size_t i = 0; i < s->nholders; i++)
        out[n++] = (inv_box){s->holders[i].x, s->holders[i].y,
                             s->holders[i].x + s->holders[i].w,
                             s->holders[i].y + s->holders[i].h, "placeholder"};
    for (size_t i = 0; i < s->nrects; i++)
        out[n++] = (inv_box){s->rects[i].x, s->rects[i].y, s->rects[i].x + s->rects[i].w,
                             s->rects[i].y + s->rects[i].h, "empty cell"};
    return n;
}

/* Placeholder labels sit inside their box by design: only they may. */
static bool inv_label_in_holder(const inv_box *t, const inv_box *h)
{
    return h->kind[0] == 'p' && t->x0 >= h->x0 && t->x1 <= h->x1 && t->y0 >= h->y0 - 0.01 &&
           t->y1 <= h->y1 + 0.01;
}

static const char *inv_counts(const ug_chart *c, const ug_allocation *a,
                              const ug_scene *s, char *msg)
{
    for (size_t g = 0; g < a->ngroups; g++)
        for (size_t k = 0; k < a->ncats; k++) {
            const alloc_share *sh = alloc_at(a, g, k);
            (void)c;
            long want = alloc_hidden(sh) ? 0 : sh->icons + (sh->partial ? 1 : 0);
            long got = 0;
            for (size_t i = 0; i < s->nicons; i++)
                got += s->icons[i].cat == k && s->icons[i].group == g;
            if (got != want) {
                snprintf(msg, 256, "group %zu cat %zu: %ld icons, allocation %ld", g, k,
                         got, want);
                return msg;
            }
        }
    for (size_t i = 1; i < s->nicons; i++)
        if (s->icons[i].cat < s->icons[i - 1].cat)
            return "icons not grouped by category";
    return NULL;
}

static const char *inv_check(const ug_chart *c, const ug_allocation *a,
                             const ug_scene *s)
{
    static char msg[256];
    size_t nb = s->nicons + s->nswatches + s->nholders + s->nrects + s->ntexts;
    inv_box *b = ug_malloc((nb + 1) * sizeof *b);
    size_t n = inv_collect(s, b), nshapes = n;
    for (size_t i = 0; i < s->ntexts; i++) {
        double x0, y0, x1, y1;
        scene_text_box(&s->texts[i], &x0, &y0, &x1, &y1);
        b[n++] = (inv_box){x0, y0, x1, y1, "text"};
    }
    const char *bad = NULL;
    for (size_t i = 0; i < n && !bad; i++) {
        if (b[i].x0 < -0.01 || b[i].y0 < -0.01 || b[i].x1 > s->width + 0.01 ||
            b[i].y1 > s->height + 0.01) {
            snprintf(msg, sizeof msg, "%s %zu outside the canvas", b[i].kind, i);
            bad = msg;
        }
        for (size_t j = i + 1; j < n && !bad; j++)
            if (inv_overlap(&b[i], &b[j]) &&
                !(j >= nshapes && i < nshapes && inv_label_in_holder(&b[j], &b[i]))) {
                snprintf(msg, sizeof msg, "%s %zu (%.1f,%.1f) overlaps %s %zu (%.1f,%.1f)",
                         b[i].kind, i, b[i].x0, b[i].y0, b[j].kind, j, b[j].x0, b[j].y0);
                bad = msg;
            }
    }
    ug_free(b);
    if (!bad && s->icon_size != (c->icon_size > 0 ? c->icon_size : 24))
        bad = "icon size differs from the chart's";
    return bad ? bad : inv_counts(c, a, s, msg);
}

#endif
