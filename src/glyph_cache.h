/*
** Glyph cache (glyph_cache.c): glyphs loaded once per batch, handed out as
** copies the caller owns.
*/
#ifndef UG_GLYPH_CACHE_H
#define UG_GLYPH_CACHE_H

#include "glyph.h"

/* glyph_load through the cache (cache may be NULL: a plain glyph_load). The
** cache key is the reference and the layout folder; the folders in search
** must be the same on every call with one cache. */
ug_status glyph_cache_load(ug_glyph_cache *cache, const char *ref,
                           const glyph_search *search, ug_mark where,
                           ug_glyph **out, ug_error *err);
/* A deep copy; NULL when out of memory. */
ug_glyph *glyph_copy(const ug_glyph *g);

#endif
