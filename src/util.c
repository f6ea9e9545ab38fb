/*
** Shared plumbing: errors, the allocation wrapper, arenas, byte buffers and
** text made safe to print on a terminal. Every stage uses these; none of them
** knows about charts. Files are written by outfile.c.
*/
#define _POSIX_C_SOURCE 200809L
#include <errno.h>
#include <fontconfig/fontconfig.h>
#include <libxml/parser.h>
#include <pthread.h>
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

/* ---- the libraries' own set-up ------------------------------------------ */

/* libxml2's xmlInitParser "is not reentrant. Call once before processing in
** case of use in multithreaded programs" (libxml2 2.9 API documentation,
** parser.c); librsvg parses with libxml2 too. FcInit loads fontconfig's
** configuration, and once it is loaded later calls do nothing (FcInit(3)):
** done here, before any thread makes a font map, it is loaded once and every
** font map finds it ready. Its result is not needed here: the text stage
** checks each family it measures with, and stops when fontconfig found no
** font (text.c, check_family). */
static void init_libraries(void)
{
    xmlInitParser();
    (void)FcInit();
}

void ug_init_libraries(void)
{
    static pthread_once_t once = PTHREAD_ONCE_INIT; /* POSIX.1-2008, pthread_once */
    pthread_once(&once, init_libraries);
}

/* ---- strings (ug_malloc and its kin live in context.c) ---------------- */

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

/* ---- slugs: names made safe for file names and XML ids ---------------- */

/* Latin-1 letters with accents (U+00C0..U+00FF) -> their base letter, so
** "Ünïcode" becomes "unicode"; '\0' for the few with none (×, ÷). */
static char latin1_base(unsigned long cp)
{
    static const char map[] = "aaaaaaaceeeeiiiidnooooo\0ouuuuyts"  /* C0..DF */
                              "aaaaaaaceeeeiiiidnooooo\0ouuuuyty"; /* E0..FF */
    return cp >= 0xC0 && cp <= 0xFF ? map[cp - 0xC0] : 0;
}

/* One character of the NUL-terminated s: its code point and length; a byte
** that starts no valid sequence is U+FFFD, one byte long. */
static size_t utf8_next(const char *s, unsigned long *cp)
{
    size_t k = ug_utf8_decode(s, strnlen(s, 4), cp);
    if (!k)
        *cp = 0xFFFD;
    return k ? k : 1;
}

/* Combining Diacritical Marks (Unicode block U+0300..U+036F): "e" followed
** by U+0301 is the decomposed "é", so the mark is dropped like an accent on a
** precomposed letter rather than splitting the word ("e-cole"). */
static bool is_combining(unsigned long cp)
{
    return cp >= 0x300 && cp <= 0x36F;
}

size_t ug_slug(const char *name, char *buf, size_t size)
{
    size_t n = 0;
    bool dash = false; /* a '-' is owed before the next kept character */
    for (const char *s = name; *s && n + 2 < size;) {
        unsigned long cp;
        s += utf8_next(s, &cp);
        if (is_combining(cp))
            continue;
        char ch = cp < 0x80 ? (char)cp : latin1_base(cp);
        if (ch >= 'A' && ch <= 'Z')
            ch = (char)(ch - 'A' + 'a');
        bool keep = (ch >= 'a' && ch <= 'z') || (ch >= '0' && ch <= '9') || ch == '_';
        if (!keep) {
            dash = n > 0;
            continue;
        }
        if (dash)
            buf[n++] = '-';
        dash = false;
        buf[n++] = ch;
    }
    buf[n] = '\0';
    return n;
}

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

bool ug_buf_reserve(ug_buf *b, size_t extra)
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
    if (!ug_buf_reserve(b, n))
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
    if (!ug_buf_reserve(b, (size_t)n))
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

/* ---- text for terminals ------------------------------------------------- */

/* Code points that would move, hide or reorder what a terminal shows, or
** drive the terminal itself, when printed raw: the C0 and C1 controls and
** DEL (ECMA-48), the line and paragraph separators, and the explicit
** directional formatting characters of Unicode UAX #9 (ALM U+061C, LRM, RLM,
** LRE..RLO, LRI..PDI), the "Trojan Source" set of CVE-2021-42574. */
static bool hidden_in_terminal(unsigned long c)
{
    return c < 0x20 || (c >= 0x7F && c <= 0x9F) || c == 0x061C || c == 0x200E ||
           c == 0x200F || c == 0x2028 || c == 0x2029 || (c >= 0x202A && c <= 0x202E) ||
           (c >= 0x2066 && c <= 0x2069);
}

/* The one UTF-8 decoder of our own code (RFC 3629 §3-4): overlong forms,
** surrogates, code points past U+10FFFF and cut sequences are invalid. */
size_t ug_utf8_decode(const char *s, size_t n, unsigned long *cp)
{
    static const unsigned long min[] = {0, 0, 0x80, 0x800, 0x10000};
    const unsigned char *u = (const unsigned char *)s;
    if (!n)
        return 0;
    size_t k = u[0] < 0x80 ? 1 : (u[0] & 0xE0) == 0xC0 ? 2
             : (u[0] & 0xF0) == 0xE0 ? 3 : (u[0] & 0xF8) == 0xF0 ? 4 : 0;
    if (!k || k > n)
        return 0;
    unsigned long c = k == 1 ? u[0] : u[0] & (0x7F >> k);
    for (size_t i = 1; i < k; i++) {
        if ((u[i] & 0xC0) != 0x80)
            return 0;
        c = c << 6 | (u[i] & 0x3F);
    }
    if (c < min[k] || c > 0x10FFFF || (c >= 0xD800 && c <= 0xDFFF))
        return 0;
    *cp = c;
    return k;
}

/* The next character of s (before end): its length in bytes and, when it
** must be shown escaped, the escape in esc ("" otherwise). A byte that
** starts no valid UTF-8 sequence is one character of its own. */
static size_t visible_piece(const char *s, const char *end, char esc[16])
{
    unsigned long c;
    size_t k = ug_utf8_decode(s, (size_t)(end - s), &c);
    esc[0] = '\0';
    if (!k) {
        snprintf(esc, 16, "<0x%02X>", (unsigned)(unsigned char)*s);
        return 1;
    }
    if (hidden_in_terminal(c))
        snprintf(esc, 16, "<U+%04lX>", c);
    return k;
}

void ug_buf_visible(ug_buf *b, const char *s)
{
    const char *end = s + strlen(s);
    char esc[16];
    while (s < end) {
        size_t n = visible_piece(s, end, esc);
        if (esc[0])
            ug_buf_puts(b, esc);
        else
            ug_buf_add(b, s, n);
        s += n;
    }
}

size_t ug_text_visible(const char *s, char *out, size_t size)
{
    const char *end = s + strlen(s);
    size_t need = 0, kept = 0;
    char esc[16];
    while (s < end) {
        size_t n = visible_piece(s, end, esc), k = esc[0] ? strlen(esc) : n;
        if (kept == need && need + k < size) {
            memcpy(out + need, esc[0] ? esc : s, k);
            kept += k;
        }
        need += k;
        s += n;
    }
    if (size)
        out[kept] = '\0';
    return need;
}

/* RFC 8259 §7: any character may be written \uXXXX, so what a terminal
** would act on is escaped too and the string still reads back the same;
** a byte that is not UTF-8 becomes U+FFFD (§8.1: JSON text is UTF-8). */
void ug_buf_json_string(ug_buf *b, const char *s)
{
    const char *end = s + strlen(s);
    char esc[16];
    ug_buf_puts(b, "\"");
    while (s < end) {
        size_t n = visible_piece(s, end, esc);
        if (*s == '"' || *s == '\\')
            ug_buf_printf(b, "\\%c", *s);
        else if (esc[0] == '<' && esc[1] == '0')
            ug_buf_puts(b, "\\ufffd");
        else if (esc[0])
            ug_buf_printf(b, "\\u%.4s", esc + 3);
        else
            ug_buf_add(b, s, n);
        s += n;
    }
    ug_buf_puts(b, "\"");
}

ug_status ug_buf_take(ug_buf *b, char **out, size_t *len, ug_error *err)
{
    *out = NULL;
    if (b->failed || !ug_buf_reserve(b, 0)) {
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
