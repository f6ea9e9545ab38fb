/*
** Colour stage: 8-bit sRGB -> WCAG luminance and contrast, CIELAB and
** CIEDE2000 (through LittleCMS), simulated colour-vision deficiency, and the
** palettes categories draw from. Pure computation; the audit and the SVG
** writer call it.
**
** WCAG 2.x contrast (W3C, "Web Content Accessibility Guidelines 2.1",
** definitions of relative luminance and contrast ratio): channels are
** linearised with the sRGB curve (threshold 0.04045; WCAG 2.0 printed 0.03928,
** and no 8-bit value lies between the two), L = 0.2126 R + 0.7152 G +
** 0.0722 B, and the ratio is (L1 + 0.05) / (L2 + 0.05).
**
** CVD simulation: Machado, Oliveira & Fernandes, "A Physiologically-based
** Model for Simulation of Color Vision Deficiency", IEEE TVCG 15(6), 2009,
** the matrices for severity 1.0 applied in linear RGB. Every row sums to 1,
** so greys are left alone.
**
** CIEDE2000 is LittleCMS's (cmsCIE2000DeltaE); we do not write our own.
*/
#include <assert.h>
#include <lcms2.h>
#include <math.h>
#include <stdio.h>

#include "color.h"

/* ---- sRGB and WCAG ------------------------------------------------------- */

double color_channel_linear(unsigned char c)
{
    double v = c / 255.0;
    return v <= 0.04045 ? v / 12.92 : pow((v + 0.055) / 1.055, 2.4);
}

unsigned char color_channel_encode(double v)
{
    if (!(v > 0)) /* also NaN */
        return 0;
    if (v >= 1)
        return 255;
    double s = v <= 0.0031308 ? 12.92 * v : 1.055 * pow(v, 1 / 2.4) - 0.055;
    return (unsigned char)lround(s * 255);
}

ug_color color_rgb(unsigned char r, unsigned char g, unsigned char b)
{
    return (ug_color){.r = r, .g = g, .b = b, .set = true};
}

bool color_equal(ug_color a, ug_color b)
{
    return a.r == b.r && a.g == b.g && a.b == b.b;
}

char *color_format_hex(ug_color c, char *buf)
{
    snprintf(buf, 8, "#%02x%02x%02x", c.r, c.g, c.b);
    return buf;
}

static double luminance_linear(double r, double g, double b)
{
    return 0.2126 * r + 0.7152 * g + 0.0722 * b;
}

double color_luminance(ug_color c)
{
    return luminance_linear(color_channel_linear(c.r), color_channel_linear(c.g),
                            color_channel_linear(c.b));
}

double color_contrast(ug_color a, ug_color b)
{
    double la = color_luminance(a), lb = color_luminance(b);
    return la > lb ? (la + 0.05) / (lb + 0.05) : (lb + 0.05) / (la + 0.05);
}

bool color_contrast_passes(double ratio, double threshold)
{
    return ratio >= threshold;
}

/* ---- shades that pass a contrast threshold ------------------------------ */

/* fg's linear channels moved by t in [0, 1]: toward black (darken, scale by
** 1 - t) or toward white (lighten, mix t of white). */
static ug_color shade(ug_color fg, bool darken, double t)
{
    double ch[3] = {color_channel_linear(fg.r), color_channel_linear(fg.g),
                    color_channel_linear(fg.b)};
    for (int i = 0; i < 3; i++)
        ch[i] = darken ? ch[i] * (1 - t) : ch[i] + t * (1 - ch[i]);
    ug_color out = fg;
    out.r = color_channel_encode(ch[0]);
    out.g = color_channel_encode(ch[1]);
    out.b = color_channel_encode(ch[2]);
    return out;
}

/* Luminance is linear in t along either line, so the t that just reaches the
** threshold has a closed form; 8-bit rounding can land a hair short, so step
** on until the rounded colour really passes. */
static bool shade_along(ug_color fg, ug_color bg, double threshold, bool darken,
                        ug_color *out)
{
    double y = color_luminance(fg), yb = color_luminance(bg), t;
    if (darken) {
        double target = (yb + 0.05) / threshold - 0.05;
        if (target < 0)
            return false;
        t = y > target ? 1 - target / y : 0;
    } else {
        double target = threshold * (yb + 0.05) - 0.05;
        if (target > 1)
            return false;
        t = y < target ? (target - y) / (1 - y) : 0;
    }
    for (; t <= 1; t += 0.001) {
        ug_color c = shade(fg, darken, t);
        if (color_contrast_passes(color_contrast(c, bg), threshold)) {
            *out = c;
            return true;
        }
    }
    return false;
}

bool color_shade_for_contrast(ug_color fg, ug_color bg, double threshold,
                              ug_color *out)
{
    bool darken = color_luminance(fg) <= color_luminance(bg);
    return shade_along(fg, bg, threshold, darken, out) ||
           shade_along(fg, bg, threshold, !darken, out);
}

/* ---- CIELAB (D65) and CIEDE2000 ----------------------------------------- */

static cmsCIEXYZ d65_white(void)
{
    cmsCIExyY xyy;
    cmsCIEXYZ xyz;
    cmsWhitePointFromTemp(&xyy, 6504); /* the white LittleCMS's sRGB is built on */
    cmsxyY2XYZ(&xyz, &xyy);
    return xyz;
}

ug_status color_to_lab(const ug_color *in, size_t n, color_lab *out, ug_error *err)
{
    cmsHPROFILE srgb = cmsCreate_sRGBProfile(), xyz = cmsCreateXYZProfile();
    cmsHTRANSFORM t = NULL;
    ug_status st = UG_OK;
    if (srgb && xyz)
        t = cmsCreateTransform(srgb, TYPE_RGB_8, xyz, TYPE_XYZ_DBL,
                               INTENT_RELATIVE_COLORIMETRIC,
                               cmsFLAGS_NOCACHE | cmsFLAGS_NOOPTIMIZE);
    if (!t) {
        st = ug_fail(err, UG_ENOMEM, ug_mark_file(NULL),
                     "LittleCMS could not build the sRGB to XYZ transform");
        goto out;
    }
    cmsCIEXYZ white = d65_white();
    for (size_t i = 0; i < n; i++) {
        unsigned char rgb[3] = {in[i].r, in[i].g, in[i].b};
        cmsCIEXYZ d50, d65;
        cmsCIELab lab;
        cmsDoTransform(t, rgb, &d50, 1);
        cmsAdaptToIlluminant(&d65, cmsD50_XYZ(), &white, &d50);
        cmsXYZ2Lab(&white, &lab, &d65);
        out[i] = (color_lab){lab.L, lab.a, lab.b};
    }
out:
    if (t)
        cmsDeleteTransform(t);
    if (xyz)
        cmsCloseProfile(xyz);
    if (srgb)
        cmsCloseProfile(srgb);
    return st;
}

double color_delta_e00(color_lab x, color_lab y)
{
    cmsCIELab a = {x.L, x.a, x.b}, b = {y.L, y.a, y.b};
    return cmsCIE2000DeltaE(&a, &b, 1, 1, 1);
}

/* ---- colour-vision deficiency ------------------------------------------- */

/* Machado, Oliveira & Fernandes (2009), Table 1 rows for severity 1.0. */
static const double machado[COLOR_VISION_COUNT][3][3] = {
    {{1, 0, 0}, {0, 1, 0}, {0, 0, 1}},
    {{0.152286, 1.052583, -0.204868},
     {0.114503, 0.786281, 0.099216},
     {-0.003882, -0.048116, 1.051998}},
    {{0.367322, 0.860646, -0.227968},
     {0.280085, 0.672501, 0.047413},
     {-0.011820, 0.042940, 0.968881}},
    {{1.255528, -0.076749, -0.178779},
     {-0.078411, 0.930809, 0.147602},
     {0.004733, 0.691367, 0.303900}},
};

ug_color color_simulate(ug_color c, color_vision v)
{
    assert(v >= 0 && v < COLOR_VISION_COUNT);
    if (v == COLOR_VISION_NORMAL)
        return c;
    double in[3] = {color_channel_linear(c.r), color_channel_linear(c.g),
                    color_channel_linear(c.b)};
    unsigned char o[3];
    for (int i = 0; i < 3; i++) {
        const double *m = machado[v][i];
        o[i] = color_channel_encode(m[0] * in[0] + m[1] * in[1] + m[2] * in[2]);
    }
    ug_color out = c;
    out.r = o[0];
    out.g = o[1];
    out.b = o[2];
    return out;
}

const char *color_vision_name(color_vision v)
{
    static const char *const names[COLOR_VISION_COUNT] = {
        "normal vision", "protanopia", "deuteranopia", "tritanopia"};
    assert(v >= 0 && v < COLOR_VISION_COUNT);
    return names[v];
}

/* ---- palettes ------------------------------------------------------------ */

/* Okabe & Ito, "Color Universal Design (CUD): how to make figures and
** presentations that are friendly to colorblind people" (2002/2008), in their
** order without their first colour, black: black is the text colour, and a
** category should not read as text (our choice; the layout loader's palette
** leaves it out too). */
static const ug_color okabe_ito[] = {
    {0xE6, 0x9F, 0x00, true, {0}}, {0x56, 0xB4, 0xE9, true, {0}},
    {0x00, 0x9E, 0x73, true, {0}}, {0xF0, 0xE4, 0x42, true, {0}},
    {0x00, 0x72, 0xB2, true, {0}}, {0xD5, 0x5E, 0x00, true, {0}},
    {0xCC, 0x79, 0xA7, true, {0}},
};

/* Paul Tol, "Colour Schemes", SRON/EPS/TN/09-002 (2021), qualitative
** scheme "bright", in his order. */
static const ug_color tol_bright[] = {
    {0x44, 0x77, 0xAA, true, {0}}, {0xEE, 0x66, 0x77, true, {0}},
    {0x22, 0x88, 0x33, true, {0}}, {0xCC, 0xBB, 0x44, true, {0}},
    {0x66, 0xCC, 0xEE, true, {0}}, {0xAA, 0x33, 0x77, true, {0}},
    {0xBB, 0xBB, 0xBB, true, {0}},
};

/* The same report, scheme "muted", in his order; its pale grey #DDDDDD is
** meant for missing data, not for a category, and is left out. */
static const ug_color tol_muted[] = {
    {0xCC, 0x66, 0x77, true, {0}}, {0x33, 0x22, 0x88, true, {0}},
    {0xDD, 0xCC, 0x77, true, {0}}, {0x11, 0x77, 0x33, true, {0}},
    {0x88, 0xCC, 0xEE, true, {0}}, {0x88, 0x22, 0x55, true, {0}},
    {0x44, 0xAA, 0x99, true, {0}}, {0x99, 0x99, 0x33, true, {0}},
    {0xAA, 0x44, 0x99, true, {0}},
};

#define COUNT(a) (sizeof(a) / sizeof((a)[0]))

static const ug_color *palette_colors(ug_palette p, size_t *n)
{
    switch (p) {
    case UG_PALETTE_OKABE_ITO: *n = COUNT(okabe_ito); return okabe_ito;
    case UG_PALETTE_TOL_BRIGHT: *n = COUNT(tol_bright); return tol_bright;
    case UG_PALETTE_TOL_MUTED: *n = COUNT(tol_muted); return tol_muted;
    }
    assert(!"unknown palette");
    *n = 0;
    return NULL;
}

size_t color_palette_size(ug_palette p)
{
    size_t n;
    palette_colors(p, &n);
    return n;
}

ug_color color_palette_at(ug_palette p, size_t i)
{
    size_t n;
    const ug_color *c = palette_colors(p, &n);
    return c[i % n];
}

const char *color_palette_name(ug_palette p)
{
    switch (p) {
    case UG_PALETTE_OKABE_ITO: return "okabe-ito";
    case UG_PALETTE_TOL_BRIGHT: return "tol-bright";
    case UG_PALETTE_TOL_MUTED: return "tol-muted";
    }
    return "?";
}

/* ---- differences under every kind of vision ---------------------------- */

/* Lab of each colour as seen under each vision: out[v * n + i]. */
static ug_status lab_views(const ug_color *in, size_t n, color_lab **out,
                           ug_error *err)
{
    ug_status st = UG_OK;
    ug_color *sim = ug_malloc((n ? n : 1) * COLOR_VISION_COUNT * sizeof *sim);
    *out = ug_malloc((n ? n : 1) * COLOR_VISION_COUNT * sizeof **out);
    if (!sim || !*out) {
        st = ug_fail(err, UG_ENOMEM, ug_mark_file(NULL), "out of memory");
        goto out;
    }
    for (int v = 0; v < COLOR_VISION_COUNT; v++)
        for (size_t i = 0; i < n; i++)
            sim[v * n + i] = color_simulate(in[i], (color_vision)v);
    st = color_to_lab(sim, n * COLOR_VISION_COUNT, *out, err);
out:
    ug_free(sim);
    if (st) {
        ug_free(*out);
        *out = NULL;
    }
    return st;
}

/* Smallest difference between item i of `a` (na items) and every item of `b`
** (nb items), over all visions; both are lab_views layouts. */
static double min_between(const color_lab *a, size_t na, size_t i,
                          const color_lab *b, size_t nb)
{
    double best = INFINITY;
    for (int v = 0; v < COLOR_VISION_COUNT; v++)
        for (size_t j = 0; j < nb; j++) {
            double d = color_delta_e00(a[v * na + i], b[v * nb + j]);
            if (d < best)
                best = d;
        }
    return best;
}

ug_status color_min_difference(ug_color c, const ug_color *others, size_t n,
                               double *out, ug_error *err)
{
    color_lab *mine = NULL, *theirs = NULL;
    ug_status st = lab_views(&c, 1, &mine, err);
    if (!st)
        st = lab_views(others, n, &theirs, err);
    if (!st)
        *out = min_between(mine, 1, 0, theirs, n);
    ug_free(mine);
    ug_free(theirs);
    return st;
}

static bool in_list(ug_color c, const ug_color *list, size_t n)
{
    for (size_t i = 0; i < n; i++)
        if (color_equal(c, list[i]))
            return true;
    return false;
}

/* Candidate scores compare contrast first, then the smallest difference. */
static bool better(const color_pick *x, const color_pick *best)
{
    if (!best->found)
        return true;
    if (x->contrast_ok != best->contrast_ok)
        return x->contrast_ok;
    return x->min_de > best->min_de;
}

ug_status color_best_replacement(ug_palette p, const ug_color *others, size_t n,
                                 const ug_color *bg, color_pick *out,
                                 ug_error *err)
{
    size_t np;
    const ug_color *pal = palette_colors(p, &np);
    color_lab *cand = NULL, *theirs = NULL;
    ug_status st = lab_views(pal, np, &cand, err);
    if (!st)
        st = lab_views(others, n, &theirs, err);
    *out = (color_pick){0};
    for (size_t i = 0; !st && i < np; i++) {
        if (in_list(pal[i], others, n))
            continue;
        color_pick x = {true, pal[i], min_between(cand, np, i, theirs, n), true};
        if (bg)
            x.contrast_ok = color_contrast_passes(color_contrast(pal[i], *bg),
                                                  COLOR_WCAG_NON_TEXT);
        if (better(&x, out))
            *out = x;
    }
    ug_free(cand);
    ug_free(theirs);
    return st;
}
