/*
** What a packed scene can tell its caller beyond the picture: the warnings
** glyph sanitizing left (placed at the layout's `glyph:` keys) and the list
** of files the drawing read (for `draw --watch`), a chart's or a page's.
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
    ug_error_clear(err);
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

/* The files one drawing read, each as a prefix and a name (the prefix is the
** layout's folder for a glyph named by path). */
typedef struct {
    const char *prefix, *name;
    size_t prefix_len;
} input;

static size_t folder_len(const char *path)
{
    const char *slash = strrchr(path, '/');
    return slash ? (size_t)(slash - path) + 1 : 0;
}

/* When packing failed there is no scene to say which glyph files were read;
** the chart's own glyph paths are watched instead, so fixing a broken glyph
** file redraws. */
static size_t list_inputs(const ug_chart *c, const ug_scene *s, input *in)
{
    size_t n = 0;
    in[n++] = (input){"", c->path, 0};
    if (c->data.present && c->data.file)
        in[n++] = (input){"", c->data.file, 0};
    for (size_t k = 0; s && k < s->nglyphs; k++)
        if (s->glyphs[k]->path)
            in[n++] = (input){"", s->glyphs[k]->path, 0};
    for (size_t i = 0; !s && i < c->ncats; i++) {
        const char *ref = c->cats[i].glyph.text;
        if (ref && !glyph_is_library_name(ref))
            in[n++] = (input){c->path, ref, ref[0] == '/' ? 0 : folder_len(c->path)};
    }
    return n;
}

/* The inputs as one NULL-terminated block: pointers, then the names. */
static char **input_block(const input *in, size_t n)
{
    size_t bytes = 0;
    for (size_t i = 0; i < n; i++)
        bytes += in[i].prefix_len + strlen(in[i].name) + 1;
    char **list = ug_malloc((n + 1) * sizeof *list + bytes);
    char *area = list ? (char *)(list + n + 1) : NULL;
    for (size_t i = 0; list && i < n; i++) {
        list[i] = area;
        memcpy(area, in[i].prefix, in[i].prefix_len);
        strcpy(area + in[i].prefix_len, in[i].name);
        area += in[i].prefix_len + strlen(in[i].name) + 1;
    }
    if (list)
        list[n] = NULL;
    return list;
}

char **ug_chart_inputs(const ug_chart *c, const ug_scene *s)
{
    size_t most = 2 + (s ? s->nglyphs : c->ncats);
    input *in = ug_malloc(most * sizeof *in);
    char **list = in ? input_block(in, list_inputs(c, s, in)) : NULL;
    ug_free(in);
    return list;
}

/* The page file, then each chart's inputs in panel order (as with no scene:
** the glyph files its layout names by path). */
char **ug_page_inputs(const ug_page *page)
{
    size_t most = 1;
    for (size_t p = 0; p < page->npanels; p++)
        if (page->panels[p].chart)
            most += 2 + page->panels[p].chart->ncats;
    input *in = ug_malloc(most * sizeof *in);
    if (!in)
        return NULL;
    size_t n = 0;
    in[n++] = (input){"", page->path, 0};
    for (size_t p = 0; p < page->npanels; p++)
        if (page->panels[p].chart)
            n += list_inputs(page->panels[p].chart, NULL, in + n);
    char **list = input_block(in, n);
    ug_free(in);
    return list;
}
