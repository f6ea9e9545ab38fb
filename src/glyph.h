/*
** Glyphs: a name or a file -> a sanitized symbol in the 0 0 100 100 unit box.
**
** A glyph reference in a layout is one of
**   - a primitive: "square", "rounded-square", "circle" (drawn in code);
**   - a library name: "person" -> NAME.svg found on the search path
**     (the context's glyph roots or the installed data folder, UNITGRAM_GLYPH_PATH,
**     then --glyph-dir folders);
**   - a path to the user's own SVG file ("./icons/boat.svg"), relative to the
**     layout's folder, which is sanitized and normalised into the unit box.
** The body is inert SVG markup (paths and basic shapes, no ids, no fill/stroke)
** ready to be placed inside <symbol viewBox="0 0 100 100">; it is filled by
** `fill` on the referencing <use>.
*/
#ifndef UG_GLYPH_H
#define UG_GLYPH_H

#include "glyph_shape.h"
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
    bool notes_lost; /* memory ran out while noting a removal */
    char *path;      /* the file it was read from; NULL for a primitive */
    glyph_shape *shape; /* the body's outlines in the unit box, for drawing with cairo */
    size_t segments;    /* lines + curves of shape */
} ug_glyph;

/* Library glyphs are drawn inside this margin of the unit box (measured on
** the library: its drawings span 4..96 on their longer side), and user
** glyphs are fitted to the same box so both sit alike. */
#define GLYPH_MARGIN 4.0
/* The inked-area band the library is drawn to (the artist's, stated in
** tests/suite_glyph_art.sh), so glyphs side by side look about as heavy;
** a user glyph outside it is not an error. */
#define GLYPH_BAND_LOW 0.25
#define GLYPH_BAND_HIGH 0.50
#define GLYPH_INK_SIZE 64 /* pixels per side of the inked-area rendering */
#define GLYPH_MAX_BYTES (1u << 20)
#define GLYPH_MAX_DEPTH 32
#define GLYPH_MAX_ELEMENTS 5000
/* Lines + curves a glyph may have after parsing (arcs and basic shapes count
** as the cubics they become, a closepath as a line). Chosen by measurement
** (tests/bench/run.sh, "glyph loading"): filling costs most for long random
** cubics across the box, and 10,000 of them load in about 0.45 s of CPU on
** the development machine (10,000 random lines in under 0.1 s); the
** library's largest glyph (apartment) has 143. */
#define GLYPH_MAX_SEGMENTS 10000

/* Resolve and load a glyph; `where` is blamed in errors. */
ug_status glyph_load(const char *ref, const glyph_search *search, ug_mark where,
                     ug_glyph **out, ug_error *err);
void glyph_free(ug_glyph *g);
/* Tests only: called between resolving a glyph file's path and opening it,
** so a test can swap a folder for a symlink in that moment. NULL otherwise. */
extern void (*glyph_resolved_hook)(const char *path);

/* The default folders of the search path, in order, NULL-terminated. */
const char *const *glyph_default_dirs(void);
/* Every folder of the search path in order: defaults, UNITGRAM_GLYPH_PATH,
** then search->dirs. *out is a NULL-terminated array the caller frees with
** ug_free (one block). */
ug_status glyph_search_dirs(const glyph_search *search, char ***out, ug_error *err);
void glyph_free_dirs(char **dirs);
/* A name the library can hold: [a-z0-9-], 1..64 characters, no leading '-'. */
bool glyph_is_library_name(const char *ref);

/* The library over exactly the given folders (NULL-terminated), without the
** default ones: for the index fuzzer, which would otherwise spend its time
** re-reading the project's own glyphs/. */
ug_status glyph_library_open_path(const char *const *path, ug_glyph_library **out,
                                  ug_error *err);
/* The inked area index.yaml states for library entry i (-1 when none). */
double glyph_library_weight(const ug_glyph_library *lib, size_t i);

/* ---- measuring (glyph_render.c, on glyph_shape.c's outlines) ---- */

/* Extent {x, y, width, height} of sanitized markup in its own user units:
** the exact bounds of its outlines (glyph_shape_bounds). */
ug_status glyph_measure(const char *markup, ug_mark where, double box[4],
                        ug_error *err);
/* A unit-box shape filled with cairo at size x size px; alpha gets size*size
** coverages, row by row. */
ug_status glyph_rasterize(const glyph_shape *shape, int size, unsigned char *alpha,
                          ug_mark where, ug_error *err);
/* The coverages of a size x size A8 image surface, row by row, into alpha. */
void glyph_surface_alpha(cairo_surface_t *s, int size, unsigned char *alpha);
/* Covered fraction of the unit box: sum of alpha/255 at 64 x 64 over 4096. */
ug_status glyph_ink(const glyph_shape *shape, ug_mark where, double *ink, ug_error *err);

#endif
