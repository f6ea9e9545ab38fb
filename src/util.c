/*
** Shared plumbing: errors, the allocation wrapper, arenas and byte buffers.
** Every stage uses these; none of them knows about charts. Files are written
** by outfile.c.
*/
#define _POSIX_C_SOURCE 200809L
#include <errno.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "ug.h"

/* ---- errors ------------------------------------------------------------- */

ug_status ug_vfail(ug_error *err, ug_status st, ug_mark where, const char *fmt,
                   va_list ap)
{
    if (!err || err->status != UG_OK)
        return st;
    err->status = st;
    snprintf(err->file, sizeof err->file, "%s", where.file ? where.file : "");
    err->where.file = err->file[0] ? err->file : NULL;
    err->where.line = where.line;
    err->where.column = where.column;
    vsnprintf(err->msg, sizeof err->msg, fmt, ap);
    return st;
}

ug_status ug_fail(ug_error *err, ug_status st, ug_mark where, const char *fmt, ...)
{
    va_list ap;
    va_start(ap, fmt);
    ug_vfail(err, st, where, fmt, ap);
    va_end(ap);
    return st;
}

void ug_error_clear(ug_error *err)
{
    if (err)
        memset(err, 0, sizeof *err);
}

ug_mark ug_mark_file(const char *file)
{
    ug_mark m = {file, 0, 0};
    return m;
}

const char *ug_error_format(const ug_error *err, char *buf, size_t size)
{
    const char *file = err->where.file ? err->where.file : "unitgram";
    if (err->where.line)
        snprintf(buf, size, "%s:%u:%u: %s", file, err->where.line,
                 err->where.column, err->msg);
    else
        snprintf(buf, size, "%s: %s", file, err->msg);
    return buf;
}

const char *ug_status_name(ug_status st)
{
    static const char *const names[] = {
        "ok", "out of memory", "input/output error", "syntax error",
        "invalid layout", "invalid data", "limit exceeded", "rendering failed"};
    return (unsigned)st < sizeof names / sizeof names[0] ? names[st] : "unknown";
}

/* ---- memory ------------------------------------------------------------- */

static long allocs_left = -1; /* -1: never fail */
static long allocs_made;
static bool fail_just_one;

static bool may_allocate(void)
{
    allocs_made++;
    if (allocs_left < 0)
        return true;
    if (allocs_left == 0) {
        if (fail_just_one)
            allocs_left = -1;
        return false;
    }
    allocs_left--;
    return true;
}

long ug_mem_fail_after(long n)
{
    long made = allocs_made;
    allocs_left = n;
    allocs_made = 0;
    fail_just_one = false;
    return made;
}

long ug_mem_fail_once(long n)
{
    long made = ug_mem_fail_after(n);
    fail_just_one = true;
    return made;
}

void *ug_malloc(size_t n) { return may_allocate() ? malloc(n ? n : 1) : NULL; }

void *ug_calloc(size_t count, size_t size)
{
    return may_allocate() ? calloc(count ? count : 1, size ? size : 1) : NULL;
}

void *ug_realloc(void *p, size_t n)
{
    return may_allocate() ? realloc(p, n ? n : 1) : NULL;
}

void ug_free(void *p) { free(p); }

char *ug_strndup(const char *s, size_t n)
{
    char *d = ug_malloc(n + 1);
    if (d) {
        memcpy(d, s, n);
        d[n] = '\0';
    }
    return d;
}

char *ug_strdup(const char *s) { return ug_strndup(s, strlen(s)); }

/* ---- arena -------------------------------------------------------------- */

struct ug_arena_block {
    ug_arena_block *next;
    size_t used, size;
    _Alignas(16) unsigned char data[];
};

#define ARENA_BLOCK 16384

void *ug_arena_alloc(ug_arena *a, size_t n)
{
    size_t need = (n + 15) & ~(size_t)15;
    ug_arena_block *b = a->head;
    if (need < n)
        return NULL;
    if (!b || b->size - b->used < need) {
        size_t size = need > ARENA_BLOCK ? need : ARENA_BLOCK;
        b = ug_malloc(sizeof *b + size);
        if (!b)
            return NULL;
        b->size = size;
        b->used = 0;
        b->next = a->head;
        a->head = b;
    }
    void *p = b->data + b->used;
    b->used += need;
    memset(p, 0, n);
    return p;
}

char *ug_arena_strndup(ug_arena *a, const char *s, size_t n)
{
    char *d = ug_arena_alloc(a, n + 1);
    if (d)
        memcpy(d, s, n);
    return d;
}

char *ug_arena_strdup(ug_arena *a, const char *s)
{
    return ug_arena_strndup(a, s, strlen(s));
}

void ug_arena_free(ug_arena *a)
{
    ug_arena_block *b = a->head;
    while (b) {
        ug_arena_block *next = b->next;
        ug_free(b);
        b = next;
    }
    a->head = NULL;
}

/* ---- buffers ------------------------------------------------------------ */

void ug_buf_init(ug_buf *b) { memset(b, 0, sizeof *b); }

void ug_buf_free(ug_buf *b)
{
    ug_free(b->data);
    ug_buf_init(b);
}

static bool buf_reserve(ug_buf *b, size_t extra)
{
    if (b->failed)
        return false;
    if (b->len + extra + 1 <= b->cap)
        return true;
    size_t cap = b->cap ? b->cap : 256;
    while (cap < b->len + extra + 1)
        cap *= 2;
    char *d = ug_realloc(b->data, cap);
    if (!d) {
        b->failed = true;
        return false;
    }
    b->data = d;
    b->cap = cap;
    return true;
}

void ug_buf_add(ug_buf *b, const char *s, size_t n)
{
    if (!buf_reserve(b, n))
        return;
    memcpy(b->data + b->len, s, n);
    b->len += n;
    b->data[b->len] = '\0';
}

void ug_buf_puts(ug_buf *b, const char *s) { ug_buf_add(b, s, strlen(s)); }

void ug_buf_printf(ug_buf *b, const char *fmt, ...)
{
    char small[256];
    va_list ap;
    va_start(ap, fmt);
    int n = vsnprintf(small, sizeof small, fmt, ap);
    va_end(ap);
    if (n < 0)
        return;
    if ((size_t)n < sizeof small) {
        ug_buf_add(b, small, (size_t)n);
        return;
    }
    if (!buf_reserve(b, (size_t)n))
        return;
    va_start(ap, fmt);
    vsnprintf(b->data + b->len, (size_t)n + 1, fmt, ap);
    va_end(ap);
    b->len += (size_t)n;
}

/* A label that starts like a formula (=, +, -, @, tab, CR) would run as one
** when a CSV file is opened in a spreadsheet: such a cell gets a leading
** apostrophe, as OWASP's "CSV Injection" page advises. */
void ug_buf_csv_field(ug_buf *b, const char *s)
{
    bool formula = *s && strchr("=+-@\t\r", *s);
    if (!formula && !strpbrk(s, ",\"\r\n")) {
        ug_buf_puts(b, s);
        return;
    }
    ug_buf_puts(b, formula ? "\"'" : "\"");
    for (; *s; s++)
        ug_buf_add(b, *s == '"' ? "\"\"" : s, *s == '"' ? 2 : 1);
    ug_buf_puts(b, "\"");
}

void ug_buf_json_string(ug_buf *b, const char *s)
{
    ug_buf_puts(b, "\"");
    for (; *s; s++) {
        unsigned char ch = (unsigned char)*s;
        if (ch == '"' || ch == '\\')
            ug_buf_printf(b, "\\%c", ch);
        else if (ch < 0x20)
            ug_buf_printf(b, "\\u%04x", ch);
        else
            ug_buf_add(b, s, 1);
    }
    ug_buf_puts(b, "\"");
}

ug_status ug_buf_take(ug_buf *b, char **out, size_t *len, ug_error *err)
{
    *out = NULL;
    if (b->failed || !buf_reserve(b, 0)) {
        ug_buf_free(b);
        return ug_fail(err, UG_ENOMEM, ug_mark_file(NULL), "out of memory");
    }
    b->data[b->len] = '\0';
    *out = b->data;
    if (len)
        *len = b->len;
    ug_buf_init(b);
    return UG_OK;
}
