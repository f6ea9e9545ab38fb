/*
** The context: each thread's allocator, glyph roots, default limits, file
** hook and fault-injection counters, so the library keeps no process-wide
** state a host program could trip over. A thread that binds no context uses
** its own default one, which is why the defaults are thread-local too.
*/
#define _POSIX_C_SOURCE 200809L
#include <stdlib.h>
#include <string.h>

#include "context.h"
#include "ug.h"

static _Thread_local ug_context thread_default = {
    .limits = {.max_file_bytes = UG_DEFAULT_MAX_FILE,
               .max_icons = UG_DEFAULT_MAX_ICONS,
               .max_panels = UG_DEFAULT_MAX_PANELS},
    .allocs_left = -1,
};
static _Thread_local ug_context *bound;

ug_context *ug_ctx(void) { return bound ? bound : &thread_default; }

ug_context *ug_context_current(void) { return ug_ctx(); }

ug_context *ug_ctx_bound(void) { return bound; }

ug_context *ug_context_use(ug_context *ctx)
{
    ug_context *before = bound;
    bound = ctx;
    return before;
}

/* ---- memory ----------------------------------------------------------------- */

/* Counted per context, so a test arming a failure on its thread fails that
** thread's allocations only, never those of threads drawing beside it. */
static bool may_allocate(ug_context *c)
{
    c->allocs_made++;
    if (c->allocs_left < 0)
        return true;
    if (c->allocs_left == 0) {
        if (c->fail_just_one)
            c->allocs_left = -1;
        return false;
    }
    c->allocs_left--;
    return true;
}

long ug_mem_fail_after(long n)
{
    ug_context *c = ug_ctx();
    long made = c->allocs_made;
    c->allocs_left = n;
    c->allocs_made = 0;
    c->fail_just_one = false;
    return made;
}

long ug_mem_fail_once(long n)
{
    long made = ug_mem_fail_after(n);
    ug_ctx()->fail_just_one = true;
    return made;
}

/* Zero-byte requests get one byte, so NULL always means out of memory. */
static void *raw_realloc(const ug_context *c, void *p, size_t n)
{
    return c->alloc ? c->alloc(c->alloc_ud, p, n ? n : 1) : realloc(p, n ? n : 1);
}

void *ug_malloc(size_t n)
{
    ug_context *c = ug_ctx();
    return may_allocate(c) ? raw_realloc(c, NULL, n) : NULL;
}

void *ug_calloc(size_t count, size_t size)
{
    if (size && count > (size_t)-1 / size)
        return NULL;
    size_t bytes = count * size;
    void *p = ug_malloc(bytes);
    if (p)
        memset(p, 0, bytes > 0 ? bytes : 1);
    return p;
}

void *ug_realloc(void *p, size_t n)
{
    ug_context *c = ug_ctx();
    return may_allocate(c) ? raw_realloc(c, p, n) : NULL;
}

void ug_free(void *p)
{
    const ug_context *c = ug_ctx();
    if (p && c->alloc)
        c->alloc(c->alloc_ud, p, 0);
    else
        free(p);
}

/* ---- making and freeing contexts ------------------------------------------- */

/* The first release of ug_context_options holds every field it has now. */
#define OPT_HAS(opt, field) \
    UG_OPT_HAS(ug_context_options, opt, field, sizeof(ug_context_options))

static ug_status take_limits(ug_context *c, const ug_context_options *o, ug_error *err)
{
    if (OPT_HAS(o, max_file_bytes) && o->max_file_bytes)
        c->limits.max_file_bytes = o->max_file_bytes;
    if (OPT_HAS(o, max_icons) && o->max_icons)
        c->limits.max_icons = o->max_icons;
    if (OPT_HAS(o, max_panels) && o->max_panels)
        c->limits.max_panels = o->max_panels;
    if (c->limits.max_icons > UG_CEILING_ICONS)
        return ug_fail(err, UG_ELIMIT, ug_mark_file(NULL),
                       "max_icons %zu is above the ceiling of %d", c->limits.max_icons,
                       UG_CEILING_ICONS);
    if (c->limits.max_panels > UG_CEILING_PANELS)
        return ug_fail(err, UG_ELIMIT, ug_mark_file(NULL),
                       "max_panels %zu is above the ceiling of %d", c->limits.max_panels,
                       UG_CEILING_PANELS);
    return UG_OK;
}

/* The roots as one block: the pointer array, then the strings. */
static ug_status take_roots(ug_context *c, const ug_context_options *o, ug_error *err)
{
    size_t n = OPT_HAS(o, nglyph_roots) && o->glyph_roots ? o->nglyph_roots : 0;
    if (!n)
        return UG_OK;
    size_t bytes = (n + 1) * sizeof(char *);
    for (size_t i = 0; i < n; i++) {
        if (!o->glyph_roots[i] || !o->glyph_roots[i][0])
            return ug_fail(err, UG_ESCHEMA, ug_mark_file(NULL),
                           "glyph root %zu is empty", i + 1);
        bytes += strlen(o->glyph_roots[i]) + 1;
    }
    if (!(c->glyph_roots = raw_realloc(c, NULL, bytes)))
        return ug_fail(err, UG_ENOMEM, ug_mark_file(NULL), "out of memory");
    char *text = (char *)(c->glyph_roots + n + 1);
    for (size_t i = 0; i < n; i++) {
        size_t len = strlen(o->glyph_roots[i]) + 1;
        c->glyph_roots[i] = memcpy(text, o->glyph_roots[i], len);
        text += len;
    }
    c->glyph_roots[n] = NULL;
    return UG_OK;
}

ug_status ug_context_new(const ug_context_options *opt, ug_context **out, ug_error *err)
{
    ug_error_clear(err);
    *out = NULL;
    static const ug_context_options none = {0};
    const ug_context_options *o = opt ? opt : &none;
    ug_context proto = {
        .alloc = OPT_HAS(o, alloc) ? o->alloc : NULL,
        .alloc_ud = OPT_HAS(o, alloc_ud) ? o->alloc_ud : NULL,
        .limits = {UG_DEFAULT_MAX_FILE, UG_DEFAULT_MAX_ICONS, UG_DEFAULT_MAX_PANELS, 0},
        .read_file = OPT_HAS(o, read_file) ? o->read_file : NULL,
        .read_ud = OPT_HAS(o, read_ud) ? o->read_ud : NULL,
        .allocs_left = -1,
    };
    ug_context *c = raw_realloc(&proto, NULL, sizeof *c);
    if (!c)
        return ug_fail(err, UG_ENOMEM, ug_mark_file(NULL), "out of memory");
    *c = proto;
    ug_status st = take_limits(c, o, err);
    if (!st)
        st = take_roots(c, o, err);
    if (st) {
        ug_context_free(c);
        return st;
    }
    *out = c;
    return UG_OK;
}

void ug_context_free(ug_context *ctx)
{
    if (!ctx)
        return;
    if (bound == ctx)
        bound = NULL;
    if (ctx->fonts && ctx->free_fonts)
        ctx->free_fonts(ctx->fonts);
    ug_alloc_fn alloc = ctx->alloc;
    void *ud = ctx->alloc_ud;
    if (alloc) {
        alloc(ud, ctx->glyph_roots, 0);
        alloc(ud, ctx, 0);
    } else {
        free(ctx->glyph_roots);
        free(ctx);
    }
}
