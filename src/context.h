/*
** The context (unitgram.h, "the context") as the stages see it: the calling
** thread's allocator, glyph roots, default limits and file hook.
*/
#ifndef UG_CONTEXT_H
#define UG_CONTEXT_H

#include <stdbool.h>
#include <stddef.h>

#include "unitgram.h"

struct ug_context {
    ug_alloc_fn alloc;          /* NULL: libc */
    void *alloc_ud;
    char **glyph_roots;         /* NULL-terminated; NULL: the installed folder */
    ug_limits limits;           /* every field resolved (never 0) */
    ug_read_hook read_file;
    void *read_ud;
    /* the text stage's fonts (a pango font map and context, text.c), made on
    ** first use and released with the context; a thread's default context
    ** keeps them per thread instead (text.c) */
    void *fonts;
    void (*free_fonts)(void *fonts);
    /* fault injection (ug_mem_fail_after): -1 never fails */
    long allocs_left, allocs_made;
    bool fail_just_one;
};

/* The calling thread's context: the one bound, or the thread's default. */
ug_context *ug_ctx(void);
/* The context bound to the calling thread; NULL when it uses its default. */
ug_context *ug_ctx_bound(void);

/* Whether a caller's option struct holds field: a size of 0 stands for the
** struct as first released, first_size bytes long; a field counts only
** when the size reaches past its end. */
#define UG_OPT_HAS(type, opt, field, first_size)                                \
    (offsetof(type, field) + sizeof ((type *)0)->field <=                       \
     ((opt)->size ? (opt)->size : (first_size)))

#endif
