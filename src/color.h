/*
** Colour science for the audit and the SVG writer: WCAG 2.x contrast, CIELAB
** and CIEDE2000 (through LittleCMS), colour-vision-deficiency simulation,
** and the CVD-safe palettes. Pure computation, no I/O.
**
** Colours are 8-bit sRGB (ug_color from model.h; `set` and `mark` are ignored
** here and copied through untouched where a colour is derived from another).
*/
#ifndef UG_COLOR_H
#define UG_COLOR_H

#include "model.h"

/* ---- WCAG 2.x (W3C Recommendation; see REFERENCES.md §3) ---------------- */

/* Contrast thresholds. A ratio passes when ratio >= threshold, never after
** rounding: 2.999 fails 3 (Understanding SC 1.4.11). */
#define COLOR_WCAG_TEXT 4.5        /* SC 1.4.3 AA, normal text */
#define COLOR_WCAG_LARGE_TEXT 3.0  /* SC 1.4.3 AA, >= 18 pt or 14 pt bold */
#define COLOR_WCAG_NON_TEXT 3.0    /* SC 1.4.11, graphical objects */

/* One 8-bit sRGB channel decoded to linear light in [0, 1]. */
double color_channel_linear(unsigned char c);
/* Linear light back to 8-bit sRGB: clipped to [0, 1], rounded to nearest. */
unsigned char color_channel_encode(double v);
/* WCAG relative luminance, 0 (black) to 1 (white). */
double color_luminance(ug_color c);
/* (L1 + 0.05) / (L2 + 0.05) with L1 the lighter: 1 to 21, order-free. */
double color_contrast(ug_color a, ug_color b);
bool color_contrast_passes(double ratio, double threshold);

/* The nearest shade of fg that reaches `threshold` against bg. Our choice of
** "shade": fg's linear-light RGB scaled by one factor k (k < 1 darkens), which
** keeps its chromaticity -- hue and saturation -- and moves only luminance;
** when bg is darker than fg the shade is instead mixed with white in linear
** light. The factor is the largest change still needed, so the result is the
** closest passing shade along that line. Returns false (out untouched) when no
** shade passes, e.g. a mid grey background at 21:1. */
bool color_shade_for_contrast(ug_color fg, ug_color bg, double threshold,
                              ug_color *out);

/* "#rrggbb" into buf (8 bytes). */
char *color_format_hex(ug_color c, char *buf);
ug_color color_rgb(unsigned char r, unsigned char g, unsigned char b);
bool color_equal(ug_color a, ug_color b);

/* ---- CIELAB and CIEDE2000 ------------------------------------------------ */

/* CIELAB relative to the D65 white (2 degree observer), the Lab the sRGB
** standard's own white gives and the one published sRGB check values use
** (#FF0000 -> 53.24, 80.09, 67.20). LittleCMS works in a D50 connection space:
** its sRGB profile adapts D65 to D50 with the Bradford matrix, so we take its
** XYZ (D50), adapt back to D65 with LittleCMS's own Bradford adaptation
** (cmsAdaptToIlluminant) and form Lab against D65 (cmsXYZ2Lab). The round trip
** restores the D65 tristimulus values to about 1e-6. */
typedef struct {
    double L, a, b;
} color_lab;

/* n colours to Lab in one LittleCMS transform. Fails only when LittleCMS
** cannot build the transform (out of memory). */
ug_status color_to_lab(const ug_color *in, size_t n, color_lab *out,
                       ug_error *err);
/* CIEDE2000 with kL = kC = kH = 1 (cmsCIE2000DeltaE). */
double color_delta_e00(color_lab x, color_lab y);
/* Two category colours closer than this (CIEDE2000, under normal vision or
** any simulated deficiency below) are confusable: unitgram's own threshold,
** used by the palette (resolve.c) and the audit alike. */
#define COLOR_MIN_DELTA_E 8.0

/* ---- colour-vision deficiency ------------------------------------------- */

/* Machado, Oliveira & Fernandes (2009), severity 1.0: decode sRGB, multiply
** in linear light, re-encode, clip. */
typedef enum {
    COLOR_VISION_NORMAL,
    COLOR_VISION_PROTANOPIA,
    COLOR_VISION_DEUTERANOPIA,
    COLOR_VISION_TRITANOPIA
} color_vision;
#define COLOR_VISION_COUNT 4

ug_color color_simulate(ug_color c, color_vision v);
const char *color_vision_name(color_vision v); /* "normal vision", "protanopia", ... */

/* ---- palettes (REFERENCES.md §10) --------------------------------------- */

size_t color_palette_size(ug_palette p);
/* The i-th colour for categories without their own, cycling after the last. */
ug_color color_palette_at(ug_palette p, size_t i);
const char *color_palette_name(ug_palette p); /* the layout keyword */

/* The smallest CIEDE2000 difference between c and any colour in others[],
** over normal vision and the three simulated deficiencies (c itself compared
** under the same simulation as the others). Infinity when n == 0. */
ug_status color_min_difference(ug_color c, const ug_color *others, size_t n,
                               double *out, ug_error *err);

/* The palette colour not already in others[] that maximises that smallest
** difference. When bg is given, colours reaching COLOR_WCAG_NON_TEXT against
** it are preferred to any that do not. *found is false when every palette
** colour is already used. */
typedef struct {
    bool found;
    ug_color color;
    double min_de;      /* its smallest difference to the others */
    bool contrast_ok;   /* reaches 3:1 against bg (true without bg) */
} color_pick;

ug_status color_best_replacement(ug_palette p, const ug_color *others, size_t n,
                                 const ug_color *bg, color_pick *out,
                                 ug_error *err);

#endif
