/*
** Hand-made charts for the draw tests (check_pack, check_svg, check_describe):
** the model of src/model.h filled directly, strings in its arena, so the pure
** stages are tested without the layout loader. Every count here is invented.
*/
#ifndef UG_TEST_FIXTURE_H
#define UG_TEST_FIXTURE_H

#include <string.h>

#include "alloc.h"
#include "model.h"
#include "resolve.h"

typedef struct {
    const char *label, *glyph;
    unsigned rgb;
    const char *counts[8]; /* one per group; [0] without groups */
    const char *note;
} fx_cat;

static ug_dec fx_dec(const char *s)
{
    ug_dec d = {0};
    ug_dec_parse(s, strlen(s), &d);
    return d;
}

static ug_chart *fx_chart(ug_form form, const char *title, const char *const *groups,
                          size_t ngroups, const fx_cat *cats, size_t ncats)
{
    ug_chart *c = ug_calloc(1, sizeof *c);
    ug_arena *a = &c->arena;
    c->path = "test.yaml";
    c->dir = ".";
    c->title.text = title ? ug_arena_strdup(a, title) : NULL;
    c->unit_label.text = "households";
    c->form = form;
    resolve_defaults(c); /* as the loader does */
    c->has_icon_value = form == UG_FORM_ROWS;
    c->icon_value = fx_dec("10");
    c->cluster = form == UG_FORM_ROWS ? 5 : 0;
    c->limits.max_icons = 2000000;
    c->limits.max_file_bytes = 1 << 20;
    c->groups.n = ngroups;
    c->groups.items = ug_arena_alloc(a, (ngroups + 1) * sizeof *c->groups.items);
    for (size_t g = 0; g < ngroups; g++)
        c->groups.items[g].text = ug_arena_strdup(a, groups[g]);
    c->ncats = ncats;
    c->cats = ug_arena_alloc(a, (ncats + 1) * sizeof *c->cats);
    size_t ng = ngroups ? ngroups : 1;
    for (size_t i = 0; i < ncats; i++) {
        ug_category *k = &c->cats[i];
        char id[32];
        snprintf(id, sizeof id, "c%zu", i);
        k->id = ug_arena_strdup(a, id);
        k->label.text = ug_arena_strdup(a, cats[i].label);
        k->glyph.text = cats[i].glyph ? ug_arena_strdup(a, cats[i].glyph) : NULL;
        k->note.text = cats[i].note ? ug_arena_strdup(a, cats[i].note) : NULL;
        k->color = (ug_color){(unsigned char)(cats[i].rgb >> 16),
                              (unsigned char)(cats[i].rgb >> 8),
                              (unsigned char)cats[i].rgb, true, {0}};
        k->counts = ug_arena_alloc(a, ng * sizeof *k->counts);
        k->count_marks = ug_arena_alloc(a, ng * sizeof *k->count_marks);
        for (size_t g = 0; g < ng; g++)
            k->counts[g] = fx_dec(cats[i].counts[g] ? cats[i].counts[g] : "0");
    }
    return c;
}

static void fx_free(ug_chart *c)
{
    if (!c)
        return;
    ug_arena_free(&c->arena);
    ug_free(c);
}

static void fx_suppress(ug_chart *c, const char *below)
{
    c->has_suppress = true;
    c->suppress_below = fx_dec(below);
}

#endif
