/*
** Colour strings -> sRGB bytes, for the layout stage (category colours, style
** ink and background). Accepted: #rgb, #rrggbb, rgb(r, g, b) with integers
** 0..255, and the 148 named colours of CSS Color Module Level 4 §6.1 (ASCII
** case-insensitive). `transparent` and `currentcolor` name no colour of their
** own and are refused. Pure C, no I/O.
*/
#ifndef UG_COLORPARSE_H
#define UG_COLORPARSE_H

#include <stdbool.h>
#include <stddef.h>

typedef struct {
    unsigned char r, g, b;
} colorparse_rgb;

/* Parse s[0..n). On failure returns false and sets *why to a message that
** says what was expected (a static string). */
bool colorparse(const char *s, size_t n, colorparse_rgb *out, const char **why);

/* The named-colour table, for tests: count and entry i (name, 0xRRGGBB). */
size_t colorparse_named_count(void);
const char *colorparse_named_at(size_t i, unsigned long *rgb);

#endif
