/*
** Text stage: strings -> measured, wrapped lines (pango through pangocairo).
**
** Sizes are CSS px (SVG font-size). Measurement matches what librsvg draws:
** metrics hinting off and glyph positions not rounded. One font map and
** context serve the whole process, so drawing a thousand charts sets fonts
** up once.
*/
#ifndef UG_TEXT_H
#define UG_TEXT_H

#include "ug.h"

typedef struct {
    const char *family; /* "DejaVu Sans" */
    double size;        /* px */
    bool bold;
    ug_mark named;      /* where the family was asked for, for messages */
} text_font;

typedef struct {
    char **lines;       /* owned, trailing spaces trimmed */
    double *widths;     /* px, one per line */
    size_t n;
    double width;       /* widest line */
    double ascent, descent, pitch; /* per line; pitch = baseline to baseline */
    double px;          /* the size the lines were set at (see text_wrap) */
} text_block;

/* Width of s on one line. */
double text_width(const text_font *f, const char *s);
/* Wrap s (which may hold newlines) to max_width px, between words only. A
** word wider than that sets the whole block smaller, in 5 % steps down to
** 70 % (never under 8 px), until it fits; only a word too wide even then is
** broken between characters. out->px says the size used. max_width <= 0:
** no wrapping. */
ug_status text_wrap(const text_font *f, const char *s, double max_width,
                    text_block *out, ug_error *err);
void text_block_free(text_block *b);
/* How many distinct characters of s no installed font can draw (pango would
** show each as an empty box), among the first 512 distinct ones beyond ASCII;
** the first max of them into cps, in order, and their number into *listed. */
size_t text_undrawable(const text_font *f, const char *s, unsigned long *cps, size_t max,
                       size_t *listed);
/* A copy of s that is valid UTF-8 (a bad byte becomes U+FFFD), with every
** C0 and C1 control character and DEL but the newline turned into a space
** and every noncharacter (U+FDD0..U+FDEF, U+nFFFE, U+nFFFF) into U+FFFD:
** what the SVG and the web page may hold. NULL when out of memory. */
char *text_clean(const char *s);

#endif
