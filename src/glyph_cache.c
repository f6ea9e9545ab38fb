/*
** Glyph cache: a glyph reference -> the loaded, sanitized glyph, kept for the
** life of a batch. Loading a glyph parses its file, sanitizes it and renders
** it once to measure its ink; a batch of a thousand charts naming the same
** three glyphs should do that three times, not three thousand. The cache
** hands out deep copies, so every scene still owns (and frees) its glyphs.
** Threads drawing the rows of one batch share the cache: a lock guards the
** table, and a glyph once kept is never changed, so copies of it are made
** outside the lock.
*/
#include <pthread.h>
#include <string.h>

#include "glyph_cache.h"

typedef struct {
    char *ref, *dir; /* the key: reference as written, layout folder */
    ug_glyph *glyph;
} entry;

struct ug_glyph_cache {
    pthread_mutex_t lock;
    entry *items;
    size_t n, cap;
};

ug_status ug_glyph_cache_new(ug_glyph_cache **out, ug_error *err)
{
    ug_error_clear(err);
    *out = ug_calloc(1, sizeof **out);
    if (*out && pthread_mutex_init(&(*out)->lock, NULL) != 0) {
        ug_free(*out);
        *out = NULL;
    }
    return *out ? UG_OK : ug_fail(err, UG_ENOMEM, ug_mark_file(NULL), "out of memory");
}

void ug_glyph_cache_free(ug_glyph_cache *cache)
{
    if (!cache)
        return;
    for (size_t i = 0; i < cache->n; i++) {
        ug_free(cache->items[i].ref);
        ug_free(cache->items[i].dir);
        glyph_free(cache->items[i].glyph);
    }
    ug_free(cache->items);
    pthread_mutex_destroy(&cache->lock);
    ug_free(cache);
}

/* NULL-safe strdup that reports failure through *ok. */
static char *dup_or(const char *s, bool *ok)
{
    if (!s)
        return NULL;
    char *d = ug_strdup(s);
    *ok = *ok && d;
    return d;
}

ug_glyph *glyph_copy(const ug_glyph *g)
{
    ug_glyph *c = ug_calloc(1, sizeof *c);
    if (!c)
        return NULL;
    bool ok = true;
    c->name = dup_or(g->name, &ok);
    c->body = dup_or(g->body, &ok);
    c->path = dup_or(g->path, &ok);
    c->ink = g->ink;
    c->segments = g->segments;
    if (g->shape && !(c->shape = glyph_shape_copy(g->shape)))
        ok = false;
    if (g->nremoved && (c->removed = ug_calloc(g->nremoved, sizeof *c->removed)))
        for (; c->nremoved < g->nremoved; c->nremoved++)
            c->removed[c->nremoved] = dup_or(g->removed[c->nremoved], &ok);
    if (!ok || (g->nremoved && !c->removed)) {
        glyph_free(c);
        return NULL;
    }
    return c;
}

static const ug_glyph *find(const ug_glyph_cache *cache, const char *ref,
                            const char *dir)
{
    for (size_t i = 0; i < cache->n; i++)
        if (!strcmp(cache->items[i].ref, ref) && !strcmp(cache->items[i].dir, dir))
            return cache->items[i].glyph;
    return NULL;
}

static ug_status keep(ug_glyph_cache *cache, const char *ref, const char *dir,
                      ug_glyph *g, ug_mark where, ug_error *err)
{
    if (cache->n == cache->cap) {
        size_t cap = cache->cap ? 2 * cache->cap : 8;
        entry *items = ug_realloc(cache->items, cap * sizeof *items);
        if (!items)
            return ug_fail(err, UG_ENOMEM, where, "out of memory");
        cache->items = items;
        cache->cap = cap;
    }
    entry *e = &cache->items[cache->n];
    e->ref = ug_strdup(ref);
    e->dir = ug_strdup(dir);
    if (!e->ref || !e->dir) {
        ug_free(e->ref);
        ug_free(e->dir);
        return ug_fail(err, UG_ENOMEM, where, "out of memory");
    }
    e->glyph = g;
    cache->n++;
    return UG_OK;
}

ug_status glyph_cache_load(ug_glyph_cache *cache, const char *ref,
                           const glyph_search *search, ug_mark where,
                           ug_glyph **out, ug_error *err)
{
    if (!cache)
        return glyph_load(ref, search, where, out, err);
    *out = NULL;
    const char *dir = search->layout_dir ? search->layout_dir : "";
    /* Loading under the lock too: two threads asking for one new glyph load
    ** it once, and a batch's glyphs are few. */
    pthread_mutex_lock(&cache->lock);
    const ug_glyph *hit = find(cache, ref, dir);
    ug_status st = UG_OK;
    if (!hit) {
        ug_glyph *g = NULL;
        st = glyph_load(ref, search, where, &g, err);
        if (!st && (st = keep(cache, ref, dir, g, where, err)))
            glyph_free(g);
        hit = st ? NULL : g;
    }
    pthread_mutex_unlock(&cache->lock);
    if (st)
        return st;
    *out = glyph_copy(hit);
    return *out ? UG_OK : ug_fail(err, UG_ENOMEM, where, "out of memory");
}
