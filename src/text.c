/*
** Text stage: measuring and wrapping with pango (pangocairo font map).
**
** librsvg lays SVG text out with pango too, so measuring here with the same
** font and the same settings gives the widths the renderer will draw: an
** absolute size in px (SVG font-size 16 == "DejaVu Sans 12" at 96 dpi), no
** metrics hinting, no rounding of glyph positions. The font map and context
** are made on first use and kept, in the context the host bound or else for
** the life of the thread: font set-up is the expensive part, and a batch of
** charts must pay it once.
*/
#include <pango/pangocairo.h>
#include <limits.h>
#include <pthread.h>
#include <stdio.h>
#include <math.h>
#include <string.h>

#include "context.h"
#include "text.h"

/* A font map and its contexts must not be shared between threads: since
** pango 1.32.6 even the default font map is one per thread, which is how
** "PangoCairo can be used safely from multiple threads" (pango's
** documentation of pango_cairo_font_map_get_default, also in the installed
** 1.50's /usr/share/gir-1.0/PangoCairo-1.0.gir). So every thread gets its
** own, and the key's destructor releases it when the thread exits
** (POSIX.1-2008, pthread_key_create). The pointer itself is _Thread_local:
** finding it takes no call, and the main thread's context, whose destructor
** never runs, stays reachable to the end for LeakSanitizer. */
static _Thread_local PangoContext *thread_context;
static pthread_key_t context_key;
static bool have_context_key;

/* Also forgets it: a later destructor of the exiting thread may still
** measure text, and must get a new context, not the freed one. */
static void release_context(void *ctx)
{
    thread_context = NULL;
    g_object_unref(ctx);
}

static void make_context_key(void)
{
    have_context_key = pthread_key_create(&context_key, release_context) == 0;
}

static PangoContext *new_context(void)
{
    PangoFontMap *map = pango_cairo_font_map_new();
    PangoContext *ctx = pango_font_map_create_context(map);
    g_object_unref(map); /* the context keeps it */
    cairo_font_options_t *o = cairo_font_options_create();
    cairo_font_options_set_hint_metrics(o, CAIRO_HINT_METRICS_OFF);
    cairo_font_options_set_hint_style(o, CAIRO_HINT_STYLE_NONE);
    pango_cairo_context_set_font_options(ctx, o);
    cairo_font_options_destroy(o);
    pango_cairo_context_set_resolution(ctx, 96.0);
    pango_context_set_round_glyph_positions(ctx, FALSE);
    return ctx;
}

static void free_fonts(void *fonts) { g_object_unref(fonts); }

/* A context the host bound owns its fonts, made on its first text and
** released by ug_context_free; it is used on one thread at a time
** (unitgram.h), as a pango context must be. */
static PangoContext *bound_context(ug_context *c)
{
    if (!c->fonts) {
        ug_init_libraries();
        c->fonts = new_context();
        c->free_fonts = free_fonts;
    }
    return c->fonts;
}

static PangoContext *this_thread_context(void)
{
    static pthread_once_t key_once = PTHREAD_ONCE_INIT;
    ug_context *bound = ug_ctx_bound();
    if (bound)
        return bound_context(bound);
    if (thread_context)
        return thread_context;
    ug_init_libraries();
    pthread_once(&key_once, make_context_key);
    thread_context = new_context();
    /* without a key the context is kept to the end of the process instead */
    if (have_context_key)
        pthread_setspecific(context_key, thread_context);
    return thread_context;
}

static const char *family_of(const text_font *f)
{
    return f->family && *f->family ? f->family : "DejaVu Sans";
}

static PangoLayout *layout_for(const text_font *f, const char *s)
{
    PangoLayout *l = pango_layout_new(this_thread_context());
    PangoFontDescription *d = pango_font_description_from_string(family_of(f));
    pango_font_description_set_absolute_size(d, f->size * PANGO_SCALE);
    pango_font_description_set_weight(d, f->bold ? PANGO_WEIGHT_BOLD
                                                 : PANGO_WEIGHT_NORMAL);
    pango_layout_set_font_description(l, d);
    pango_font_description_free(d);
    pango_layout_set_text(l, s, -1);
    return l;
}

double text_width(const text_font *f, const char *s)
{
    PangoLayout *l = layout_for(f, s);
    PangoRectangle ink, logical;
    pango_layout_get_extents(l, &ink, &logical);
    g_object_unref(l);
    return (double)logical.width / PANGO_SCALE;
}

static int unknown_glyphs(const text_font *f, const char *s)
{
    PangoLayout *l = layout_for(f, s);
    int n = pango_layout_get_unknown_glyphs_count(l);
    g_object_unref(l);
    return n;
}

/* Each distinct character beyond ASCII is laid out alone, once: a label of
** thousands of letters costs a byte scan, and only the first 512 distinct
** characters are looked at, so a hostile one stays quick. ASCII is taken as
** drawable: the fonts make deps installs (DejaVu) cover it. */
#define UNDRAWABLE_SCAN 512

size_t text_undrawable(const text_font *f, const char *s, unsigned long *cps, size_t max,
                       size_t *listed)
{
    unsigned long seen[UNDRAWABLE_SCAN];
    size_t nseen = 0, found = 0, k;
    *listed = 0;
    unsigned long cp;
    for (size_t len = s ? strlen(s) : 0; len && nseen < UNDRAWABLE_SCAN; s += k, len -= k) {
        if ((unsigned char)*s < 0x80) {
            k = 1;
            continue;
        }
        if (!(k = ug_utf8_decode(s, len, &cp)))
            k = 1; /* text_clean has already refused invalid UTF-8 */
        bool again = false;
        for (size_t i = 0; i < nseen && !again; i++)
            again = seen[i] == cp;
        if (again)
            continue;
        seen[nseen++] = cp;
        char one[8];
        snprintf(one, sizeof one, "%.*s", (int)k, s);
        if (!unknown_glyphs(f, one))
            continue;
        if (*listed < max)
            cps[(*listed)++] = cp;
        found++;
    }
    return found;
}

void text_block_free(text_block *b)
{
    if (!b)
        return;
    for (size_t i = 0; i < b->n; i++)
        ug_free(b->lines[i]);
    ug_free(b->lines);
    ug_free(b->widths);
    memset(b, 0, sizeof *b);
}

static void set_metrics(PangoLayout *l, text_block *b, const text_font *f)
{
    PangoFontMetrics *m = pango_context_get_metrics(
        pango_layout_get_context(l), pango_layout_get_font_description(l), NULL);
    b->ascent = (double)pango_font_metrics_get_ascent(m) / PANGO_SCALE;
    b->descent = (double)pango_font_metrics_get_descent(m) / PANGO_SCALE;
    pango_font_metrics_unref(m);
    /* 1.3 em between baselines reads comfortably and never lets lines touch. */
    b->pitch = f->size * 1.3;
    if (b->pitch < b->ascent + b->descent)
        b->pitch = b->ascent + b->descent;
}

static ug_status take_lines(PangoLayout *l, const char *s, text_block *b)
{
    int n = pango_layout_get_line_count(l);
    b->lines = ug_calloc((size_t)n, sizeof *b->lines);
    b->widths = ug_calloc((size_t)n, sizeof *b->widths);
    if (!b->lines || !b->widths)
        return UG_ENOMEM;
    for (int i = 0; i < n; i++) {
        PangoLayoutLine *line = pango_layout_get_line_readonly(l, i);
        size_t len = (size_t)line->length;
        while (len && (s[line->start_index + len - 1] == ' ' ||
                       s[line->start_index + len - 1] == '\n'))
            len--;
        if (!(b->lines[b->n] = ug_strndup(s + line->start_index, len)))
            return UG_ENOMEM;
        PangoRectangle logical;
        pango_layout_line_get_extents(line, NULL, &logical);
        double w = (double)logical.width / PANGO_SCALE;
        b->widths[b->n++] = w;
        if (w > b->width)
            b->width = w;
    }
    return UG_OK;
}

/* CSS Fonts Level 4 §2.1.1's generic families and fontconfig's own short
** names for two of them: any installed font may stand for these. */
static bool generic_family(const char *name, size_t len)
{
    static const char *const generic[] = {"serif", "sans-serif", "cursive", "fantasy",
                                          "monospace", "system-ui", "sans", "mono"};
    for (size_t i = 0; i < sizeof generic / sizeof *generic; i++)
        if (strlen(generic[i]) == len && g_ascii_strncasecmp(name, generic[i], len) == 0)
            return true;
    return false;
}

/* Is `got` one of the comma-separated families in `want`, or may any font
** stand for one of them? */
static bool family_listed(const char *want, const char *got)
{
    for (const char *p = want; *p;) {
        const char *end = strchr(p, ',');
        size_t len = end ? (size_t)(end - p) : strlen(p);
        while (len && *p == ' ')
            p++, len--;
        while (len && p[len - 1] == ' ')
            len--;
        if (generic_family(p, len) ||
            (strlen(got) == len && g_ascii_strncasecmp(p, got, len) == 0))
            return true;
        if (!end)
            break;
        p = end + 1;
    }
    return false;
}

/* The family fontconfig actually gives for `want`; NULL when it gives none. */
static char *resolved_family(const char *want)
{
    PangoFontDescription *d = pango_font_description_from_string(want);
    pango_font_description_set_absolute_size(d, 16 * PANGO_SCALE);
    PangoFont *font = pango_context_load_font(this_thread_context(), d);
    pango_font_description_free(d);
    if (!font)
        return NULL;
    PangoFontDescription *got = pango_font_describe(font);
    const char *name = pango_font_description_get_family(got);
    char *copy = name && *name ? ug_strdup(name) : NULL;
    pango_font_description_free(got);
    g_object_unref(font);
    return copy;
}

/* Measuring with another font than the one asked for gives a different
** chart with no word said: pango quietly substitutes a font that is not
** installed, and when fontconfig cannot set itself up (no configuration, or
** no memory for its caches) it measures every string as empty boxes. Either
** is an error here. Checked once per family and thread: a chart asks for the
** same family hundreds of times. */
static _Thread_local char checked_family[256];

/* The first family of the list `want` fontconfig does not have, into
** missing (NULL when each is installed, or stands for any font), and what
** it would give in its place into *got. Each is asked for alone: asked for
** the whole list, fontconfig gives the first installed one and hides a
** misspelt fallback until the text that needs it prints as boxes. */
static ug_status unlisted_family(const char *want, char *missing, size_t size, char **got)
{
    *got = NULL;
    *missing = '\0';
    for (const char *p = want; *p;) {
        size_t len = strcspn(p, ",");
        const char *next = p[len] ? p + len + 1 : p + len;
        while (len && *p == ' ')
            p++, len--;
        while (len && p[len - 1] == ' ')
            len--;
        snprintf(missing, size, "%.*s", (int)len, p);
        if (len && !generic_family(p, len)) {
            char *one = resolved_family(missing);
            if (!one)
                return UG_ERENDER;
            if (!family_listed(missing, one)) {
                *got = one;
                return UG_OK;
            }
            ug_free(one);
        }
        p = next;
    }
    *missing = '\0';
    return UG_OK;
}

static ug_status check_family(const text_font *f, ug_error *err)
{
    const char *want = family_of(f);
    if (strcmp(checked_family, want) == 0)
        return UG_OK;
    char missing[256], *got;
    ug_status st = unlisted_family(want, missing, sizeof missing, &got);
    if (st)
        st = ug_fail(err, UG_ERENDER, f->named,
                     "no font can be loaded for '%s': fontconfig found no fonts "
                     "(is fonts-dejavu-core installed and fontconfig's "
                     "configuration readable, and was there memory for it?)", want);
    else if (got)
        st = ug_fail(err, UG_ERENDER, f->named,
                     "font '%s' is not installed here: fontconfig would measure and "
                     "draw '%s' in its place, so the chart would not be the one the "
                     "layout asks for; install it%s, or name an installed family under "
                     "style: font", missing, got,
                     strncmp(missing, "Noto Sans CJK", 13) ? ""
                     : " (Debian's fonts-noto-cjk, which make deps installs)");
    else if (strlen(want) < sizeof checked_family)
        strcpy(checked_family, want);
    ug_free(got);
    return st;
}

/* Letters and digits always take width in a font that loaded; other marks
** (spaces, joiners) may rightly take none. */
static bool has_letter_or_digit(const char *s)
{
    for (; *s; s++)
        if (g_ascii_isalnum(*s))
            return true;
    return false;
}

/* One try at wrapping s at f's size: pango's word wrapping, or breaking
** between characters as well when `anywhere`. */
static ug_status wrap_once(const text_font *f, const char *s, double max_width,
                           bool anywhere, text_block *out)
{
    memset(out, 0, sizeof *out);
    PangoLayout *l = layout_for(f, s);
    if (max_width > 0) {
        /* pango widths are ints in 1/1024 px: keep far from INT_MAX */
        double cap = (double)(INT_MAX / PANGO_SCALE / 2);
        pango_layout_set_width(l, (int)((max_width < cap ? max_width : cap) * PANGO_SCALE));
        pango_layout_set_wrap(l, anywhere ? PANGO_WRAP_WORD_CHAR : PANGO_WRAP_WORD);
    }
    set_metrics(l, out, f);
    out->px = f->size;
    ug_status st = take_lines(l, s, out);
    g_object_unref(l);
    if (st)
        text_block_free(out);
    return st;
}

#define WRAP_SHRINK_STEP 0.05
#define WRAP_SHRINK_LEAST 0.7 /* a title shrunk further reads as another role */
#define WRAP_LEAST_PX 8.0     /* 6 pt, the smallest legible print (common
                                 practice, no source) */

/* Words are never broken while a smaller size lets the widest one fit: a
** word cut in two ("North / gate") reads as two words. */
static ug_status wrap_whole_words(const text_font *f, const char *s, double max_width,
                                  text_block *out)
{
    text_font at = *f;
    double least = fmax(WRAP_LEAST_PX, f->size * WRAP_SHRINK_LEAST);
    for (int step = 0;; step++) {
        at.size = f->size * (1 - WRAP_SHRINK_STEP * step);
        if (at.size < least - 1e-9)
            break;
        ug_status st = wrap_once(&at, s, max_width, false, out);
        if (st || max_width <= 0 || out->width <= max_width + 0.5)
            return st;
        text_block_free(out);
    }
    return wrap_once(f, s, max_width, true, out);
}

ug_status text_wrap(const text_font *f, const char *s, double max_width,
                    text_block *out, ug_error *err)
{
    memset(out, 0, sizeof *out);
    ug_status checked = check_family(f, err);
    if (checked)
        return checked;
    ug_status st = wrap_whole_words(f, s, max_width, out);
    if (st)
        return ug_fail(err, st, ug_mark_file(NULL), "out of memory");
    if (out->width <= 0 && has_letter_or_digit(s)) {
        text_block_free(out);
        return ug_fail(err, UG_ERENDER, f->named,
                       "the font '%s' was found but measured '%.40s' as empty: its "
                       "file could not be loaded (out of memory?)", family_of(f), s);
    }
    return UG_OK;
}

/* Unicode's noncharacters (Unicode Standard §23.7): U+FDD0..U+FDEF and the
** last two code points of each of the 17 planes. XML 1.0 (§2.2, production
** [2] Char) forbids U+FFFE and U+FFFF and discourages the rest; the HTML
** Living Standard (§13.2.3.5) makes every one a parse error. */
static bool noncharacter(unsigned long c)
{
    return (c >= 0xFDD0 && c <= 0xFDEF) || (c & 0xFFFE) == 0xFFFE;
}

#define REPLACEMENT "\xEF\xBF\xBD" /* U+FFFD in UTF-8 */

/* Text for every document we write (SVG, the web page) and for pango: valid
** UTF-8, no control character but the newline (XML 1.0 §2.2 allows no C0
** control but tab, LF and CR, and discourages DEL and C1), no noncharacter. */
char *text_clean(const char *s)
{
    size_t n = strlen(s);
    char *out = ug_malloc(3 * n + 1), *o = out;
    if (!out)
        return NULL;
    const char *p = s, *end = s + n;
    while (p < end) {
        unsigned long c;
        size_t k = ug_utf8_decode(p, (size_t)(end - p), &c);
        if (!k || noncharacter(c)) {
            memcpy(o, REPLACEMENT, 3);
            o += 3;
        } else if ((c < 0x20 && c != '\n') || (c >= 0x7F && c <= 0x9F)) {
            *o++ = ' ';
        } else {
            memcpy(o, p, k);
            o += k;
        }
        p += k ? k : 1;
    }
    *o = '\0';
    return out;
}
