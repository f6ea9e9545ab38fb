/*
** Internal helpers shared by every stage: error raising, the one allocation
** wrapper, an arena for model strings, a growable byte buffer and exact
** decimals. The only I/O is writing files (outfile.c).
*/
#ifndef UG_UG_H
#define UG_UG_H

#include <stdarg.h>
#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>

#include "unitgram.h"

#if defined(__GNUC__)
#define UG_PRINTF(f, a) __attribute__((format(printf, f, a)))
#else
#define UG_PRINTF(f, a)
#endif

/* ---- errors ------------------------------------------------------------- */

/* Fill err (first error wins: an err already failed is left alone) and return st. */
ug_status ug_fail(ug_error *err, ug_status st, ug_mark where, const char *fmt, ...)
    UG_PRINTF(4, 5);
ug_status ug_vfail(ug_error *err, ug_status st, ug_mark where, const char *fmt,
                   va_list ap) UG_PRINTF(4, 0);
void ug_error_clear(ug_error *err);
ug_mark ug_mark_file(const char *file); /* the whole file: line 0 */

/* Sets up, once per process, the libraries whose set-up must not race
** (libxml2's parser, fontconfig's configuration). Called before the first use
** of libxml2, librsvg, pango or fontconfig on every path. */
void ug_init_libraries(void);

/* ---- memory ------------------------------------------------------------- */

/* Every allocation in the library goes through these, so a test can make the
** Nth one fail (ug_mem_fail_after) and check that each failure is clean. */
void *ug_malloc(size_t n);
void *ug_calloc(size_t count, size_t size);
void *ug_realloc(void *p, size_t n);
void ug_free(void *p);
char *ug_strdup(const char *s);
/* One UTF-8 sequence at s (n bytes there): its length, and its code point in
** *cp; 0 when the bytes start no valid sequence (RFC 3629). */
size_t ug_utf8_decode(const char *s, size_t n, unsigned long *cp);
char *ug_strndup(const char *s, size_t n);
/* Fail every allocation after the next n successful ones; -1 turns it off.
** Returns how many allocations have been made since the last call. Both
** count the calling thread's allocations only. */
long ug_mem_fail_after(long n);
/* Fail only the allocation after the next n, then allow all again: a
** failure the code swallows then shows as a run that succeeds with
** different output. Returns as ug_mem_fail_after does. */
long ug_mem_fail_once(long n);

/* The one slug rule, for batch file names and category ids: [a-z0-9_-]
** from name, letters lower-cased, Latin-1 accents and combining marks
** dropped ("Niños" -> "ninos"), every other run a single '-', none leading
** or trailing. Into buf (size >= 1), at most size - 1 bytes; returns the
** length, 0 when nothing of the name is usable (the caller then numbers it:
** "row-3", "category-2"). */
size_t ug_slug(const char *name, char *buf, size_t size);

/* An arena owns the many small strings and arrays of one model: one free. */
typedef struct ug_arena_block ug_arena_block;
typedef struct {
    ug_arena_block *head;
} ug_arena;

void *ug_arena_alloc(ug_arena *a, size_t n); /* zeroed, 16-byte aligned */
char *ug_arena_strdup(ug_arena *a, const char *s);
char *ug_arena_strndup(ug_arena *a, const char *s, size_t n);
void ug_arena_free(ug_arena *a);

/* ---- growable byte buffer ---------------------------------------------- */

typedef struct {
    char *data;
    size_t len, cap;
    bool failed; /* an append ran out of memory; later appends are no-ops */
} ug_buf;

void ug_buf_init(ug_buf *b);
void ug_buf_free(ug_buf *b);
/* Room for extra more bytes (and a NUL) after len; false once the buffer failed. */
bool ug_buf_reserve(ug_buf *b, size_t extra);
void ug_buf_add(ug_buf *b, const char *s, size_t n);
void ug_buf_puts(ug_buf *b, const char *s);
void ug_buf_printf(ug_buf *b, const char *fmt, ...) UG_PRINTF(2, 3);
/* s as it may be shown on a terminal: see ug_text_visible. */
void ug_buf_visible(ug_buf *b, const char *s);
/* s as a quoted JSON string: quotes, backslashes and what ug_text_visible
** escapes are written \uXXXX escapes. */
void ug_buf_json_string(ug_buf *b, const char *s);
/* One CSV field, quoted when needed and defused when it starts like a formula. */
void ug_buf_csv_field(ug_buf *b, const char *s);
/* Hand the bytes (NUL-ended) to the caller; the buffer is left empty. */
ug_status ug_buf_take(ug_buf *b, char **out, size_t *len, ug_error *err);

/* ---- exact decimals ----------------------------------------------------- */

/* Counts and icon values are decimals with at most UG_DEC_PLACES places, held
** as integers scaled by 10^UG_DEC_PLACES, so sums, quotas and remainders are
** compared exactly. 128 bits hold 10^15 with 6 places times any number of
** categories the limits allow, with room for the products the allocator forms. */
__extension__ typedef __int128 ug_i128;
typedef struct {
    ug_i128 v; /* value * 10^6 */
} ug_dec;

#define UG_DEC_PLACES 6
#define UG_DEC_SCALE ((ug_i128)1000000)
#define UG_DEC_MAX_INTEGER ((ug_i128)1000000000000000) /* 10^15 */

typedef enum {
    UG_DEC_OK,
    UG_DEC_EMPTY,      /* nothing to read */
    UG_DEC_SYNTAX,     /* not a plain decimal (exponents, letters, ...) */
    UG_DEC_NEGATIVE,   /* a minus sign */
    UG_DEC_PLACES_MAX, /* more than 6 decimal places */
    UG_DEC_TOO_LARGE   /* more than 10^15 */
} ug_dec_result;

/* Parse a plain non-negative decimal ("412", "41.25", "0.5"); surrounding
** spaces are allowed, nothing else is. */
ug_dec_result ug_dec_parse(const char *s, size_t n, ug_dec *out);
const char *ug_dec_result_text(ug_dec_result r);
/* Shortest exact text: 41.25, 412, 0.000001. buf needs 48 bytes. */
char *ug_dec_format(ug_dec d, char *buf);
/* 1234567.5 -> "1,234,567.5", -1234 -> "-1,234": how every number a reader
** sees is written; buf needs 64 bytes. */
char *ug_dec_format_grouped(ug_dec d, char *buf);
/* Signed variant for differences. */
char *ug_i128_format_scaled(ug_i128 v, char *buf);
double ug_dec_to_double(ug_dec d);
/* num/den rounded half-up to `places` decimals, as text (den > 0). */
char *ug_ratio_format(ug_i128 num, ug_i128 den, int places, char *buf);

/* rel (relative, no "..") opened below dirfd, every folder on the way
** opened with O_NOFOLLOW (made first when make_dirs) and the last part with
** flags | O_NOFOLLOW; a symlink anywhere gives ELOOP. -1 with errno set. */
int ug_open_beneath(int dirfd, const char *rel, int flags, bool make_dirs);

#endif
