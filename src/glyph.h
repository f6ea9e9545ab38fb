/*
** Glyphs: a name or a file -> a sanitized symbol in the 0 0 100 100 unit box.
**
** A glyph reference in a layout is one of
**   - a primitive: "square", "rounded-square", "circle" (drawn in code);
**   - a library name: "person" -> NAME.svg found on the search path
**     (the project's glyphs/, the installed data folder, UNITGRAM_GLYPH_PATH,
**     then --glyph-dir folders);
**   - a path to the user's own SVG file ("./icons/boat.svg"), relative to the
**     layout's folder, which is sanitized and normalised into the unit box.
** The body is inert SVG markup (paths and basic shapes, no ids, no fill/stroke)
** ready to be placed inside <symbol viewBox="0 0 100 100">; it is filled by
** `fill` on the referencing <use>.
*/
#ifndef UG_GLYPH_H
#define UG_GLYPH_H

#include "ug.h"

typedef struct {
    const char *const *dirs; /* extra search folders (--glyph-dir), may be NULL */
    size_t ndirs;
    const char *layout_dir;  /* folder of the layout, for relative file paths */
} glyph_search;

typedef struct {
    char *name;      /* the reference as written */
    char *body;      /* sanitized markup in the 0 0 100 100 box */
    double ink;      /* covered fraction of the unit box (rendered at 64 x 64) */
    char **removed;  /* what sanitizing removed, one line each, for warnings */
    size_t nremoved;
} ug_glyph;

/* Resolve and load a glyph; `where` is blamed in errors. */
ug_status glyph_load(const char *ref, const glyph_search *search, ug_mark where,
                     ug_glyph **out, ug_error *err);
void glyph_free(ug_glyph *g);

/* The default folders of the search path, in order, NULL-terminated. */
const char *const *glyph_default_dirs(void);

#endif
