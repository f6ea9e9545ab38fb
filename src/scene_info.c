/*
** What a packed scene can tell its caller beyond the picture: the warnings
** glyph sanitizing left (placed at the layout's `glyph:` keys) and the list
** of files the drawing read (for `draw --watch`).
*/
#include <stdlib.h>
#include <string.h>

#include "scene.h"

/* The first category drawn with glyph k, or ncats when none is. */
static size_t first_user(const ug_scene *s, size_t k)
{
    size_t i = 0;
    while (i < s->ncats && s->cats[i].glyph != k)
        i++;
    return i;
}

static size_t count_removed(const ug_scene *s)
{
    size_t n = 0;
    for (size_t k = 0; k < s->nglyphs; k++)
        n += s->glyphs[k]->nremoved;
    return n;
}

ug_status ug_scene_glyph_warnings(const ug_scene *s, const ug_chart *c,
                                  ug_error **out, size_t *n, ug_error *err)
{
    *out = NULL;
    *n = 0;
    size_t total = count_removed(s);
    if (!total)
        return UG_OK;
    ug_error *w = ug_calloc(total, sizeof *w);
    if (!w)
        return ug_fail(err, UG_ENOMEM, ug_mark_file(c->path), "out of memory");
    for (size_t k = 0; k < s->nglyphs; k++) {
        size_t i = first_user(s, k);
        const ug_glyph *g = s->glyphs[k];
        ug_mark at = ug_mark_file(c->path);
        if (i < c->ncats && i < s->ncats)
            at = c->cats[i].glyph.text ? c->cats[i].glyph.mark : c->cats[i].mark;
        for (size_t r = 0; r < g->nremoved; r++, (*n)++)
            ug_fail(&w[*n], UG_OK, at, "glyph '%s': sanitizing removed %s", g->name,
                    g->removed[r]);
    }
    *out = w;
    return UG_OK;
}

/* Append s (and its NUL) to the string area; the area was sized beforehand. */
static char *put(char **area, const char *s)
{
    char *at = *area;
    size_t n = strlen(s) + 1;
    memcpy(at, s, n);
    *area += n;
    return at;
}

char **ug_chart_inputs(const ug_chart *c, const ug_scene *s)
{
    size_t n = 1 + (c->data.present && c->data.file), bytes = strlen(c->path) + 1;
    if (c->data.present && c->data.file)
        bytes += strlen(c->data.file) + 1;
    for (size_t k = 0; s && k < s->nglyphs; k++)
        if (s->glyphs[k]->path) {
            n++;
            bytes += strlen(s->glyphs[k]->path) + 1;
        }
    char **list = ug_malloc((n + 1) * sizeof *list + bytes);
    if (!list)
        return NULL;
    char *area = (char *)(list + n + 1);
    size_t i = 0;
    list[i++] = put(&area, c->path);
    if (c->data.present && c->data.file)
        list[i++] = put(&area, c->data.file);
    for (size_t k = 0; s && k < s->nglyphs; k++)
        if (s->glyphs[k]->path)
            list[i++] = put(&area, s->glyphs[k]->path);
    list[i] = NULL;
    return list;
}
