/*
** The resolve step (src/resolve.h): every default of a chart, and the
** palette's colours for categories that name none.
*/
#include <string.h>
#include <strings.h>

#include "color.h"
#include "resolve.h"

/* REFERENCES.md §7. */
static const resolve_small_preset presets[] = {
    {"cms", 11, false, "CMS cell size suppression policy: cells of 1 to 10"},
    {"cdc-wonder", 10, true, "CDC WONDER: sub-national counts of 0 to 9"},
    {"nhs-hes", 8, false, "NHS Digital HES disclosure control: counts of 1 to 7"},
};

const resolve_small_preset *resolve_small_count_preset(const char *name)
{
    for (size_t i = 0; name && i < sizeof presets / sizeof presets[0]; i++)
        if (!strcmp(presets[i].name, name))
            return &presets[i];
    return NULL;
}

static ug_color hex_color(unsigned hex)
{
    return (ug_color){(unsigned char)(hex >> 16), (unsigned char)(hex >> 8),
                      (unsigned char)hex, true, {NULL, 0, 0}};
}

void resolve_defaults(ug_chart *c)
{
    c->cells = RESOLVE_CELLS;
    c->counts_are = UG_COUNTS_ARE_COUNTS;
    c->cluster = -1; /* not given: the form decides */
    c->icon_size = RESOLVE_ICON_PX;
    c->icon_gap = RESOLVE_GAP_PX;
    c->style.width = 0; /* not given: the packer's width, which a `columns:` may widen */
    c->style.font = RESOLVE_FONT;
    c->style.font_mark = ug_mark_file(c->path);
    c->style.background = hex_color(RESOLVE_BACKGROUND);
    c->style.ink = hex_color(RESOLVE_INK);
    const double type[UG_TYPE_COUNT] = RESOLVE_TYPE_PX;
    memcpy(c->style.type, type, sizeof type);
    c->audit.tolerance_percent.v = RESOLVE_TOLERANCE_PERCENT * UG_DEC_SCALE;
    c->audit.small_count.v = RESOLVE_SMALL_COUNT * UG_DEC_SCALE;
}

/* BCP 47 (RFC 5646 §2.2.3, §2.2.4): "zh-Hant" names the script, and a tag
** of only a region implies it by common use (CLDR's likelySubtags: zh-TW,
** zh-HK and zh-MO are Hant, every other zh Hans). Subtags are compared
** without case (RFC 5646 §2.1.1). */
static bool traditional_han(const char *tag)
{
    static const char *const hant[] = {"hant", "tw", "hk", "mo"};
    for (const char *p = strchr(tag, '-'); p; p = strchr(p + 1, '-')) {
        size_t len = strcspn(p + 1, "-");
        for (size_t i = 0; i < sizeof hant / sizeof *hant; i++)
            if (strlen(hant[i]) == len && !strncasecmp(p + 1, hant[i], len))
                return true;
    }
    return false;
}

const char *resolve_font(const ug_chart *c)
{
    const char *tag = c->lang.text;
    if (c->style.font_mark.line || !tag)
        return c->style.font; /* the layout's own, or no language to suit */
    if (strncasecmp(tag, "zh", 2) || (tag[2] && tag[2] != '-'))
        return c->style.font;
    return traditional_han(tag) ? RESOLVE_FONT_HANT : RESOLVE_FONT_HANS;
}

bool resolve_direct_labels(const ug_chart *c)
{
    if (c->form != UG_FORM_ROWS || c->arrangement != UG_ARRANGE_SPLIT || !c->groups.n)
        return false; /* no line of its own, or its label already on the left */
    return c->direct_labels_mark.line ? c->direct_labels : true;
}

/* Text the layout gives no colour follows the background: the default dark
** ink, or a light one where that contrasts more (a dark theme), so text
** meets WCAG 2.1 SC 1.4.3 without a second setting. */
static void ink_follows_background(ug_chart *c)
{
    if (c->style.ink.mark.line)
        return; /* the layout's own */
    ug_color light = hex_color(RESOLVE_INK_ON_DARK);
    if (color_contrast(light, c->style.background) >
        color_contrast(c->style.ink, c->style.background))
        c->style.ink = light;
}

/* The palette as it is handed out on this background (at most 16): first
** the colours that reach WCAG 2.1 SC 1.4.11's 3:1 against it, then the rest
** shaded until they do (color_shade_for_contrast keeps their hue); a colour
** that would be confusable with one already taken (CIEDE2000 under normal
** vision and three simulated deficiencies, COLOR_MIN_DELTA_E) goes to the
** end. Returns how many; 0 only when LittleCMS cannot run (out of memory). */
static size_t safe_palette(const ug_chart *c, ug_color *order)
{
    size_t n = color_palette_size(c->style.palette), next = 0;
    ug_color cand[16];
    ug_color bg = c->style.background;
    for (int pass = 0; pass < 2; pass++)
        for (size_t k = 0; k < n && k < 16; k++) {
            ug_color col = color_palette_at(c->style.palette, k), shade;
            bool passes = color_contrast_passes(color_contrast(col, bg), COLOR_WCAG_NON_TEXT);
            if (pass == 0 && passes)
                cand[next++] = col;
            else if (pass == 1 && !passes && color_shade_for_contrast(col, bg,
                                                                     COLOR_WCAG_NON_TEXT,
                                                                     &shade))
                cand[next++] = shade;
        }
    ug_color sim[16 * COLOR_VISION_COUNT];
    color_lab lab[16 * COLOR_VISION_COUNT];
    for (size_t v = 0; v < COLOR_VISION_COUNT; v++)
        for (size_t k = 0; k < next; k++)
            sim[v * next + k] = color_simulate(cand[k], (color_vision)v);
    if (color_to_lab(sim, next * COLOR_VISION_COUNT, lab, NULL))
        return 0;
    size_t kept = 0, keep[16];
    bool taken[16] = {false};
    for (size_t k = 0; k < next; k++) {
        bool apart = true;
        for (size_t t = 0; t < kept && apart; t++)
            for (size_t v = 0; v < COLOR_VISION_COUNT && apart; v++)
                apart = color_delta_e00(lab[v * next + k], lab[v * next + keep[t]]) >=
                        COLOR_MIN_DELTA_E;
        if (apart)
            order[kept] = cand[k], keep[kept++] = k, taken[k] = true;
    }
    /* more categories than safe colours: the confusable ones still differ for
    ** most readers, which beats repeating a colour (the audit names the pair) */
    for (size_t k = 0, n_all = kept; k < next; k++)
        if (!taken[k])
            order[n_all++] = cand[k];
    return next;
}

/* Whether no two categories share a glyph: shape is then a second cue
** besides colour (WCAG 2.1 SC 1.4.1). No glyph is the square. */
static bool glyphs_distinct(const ug_chart *c)
{
    for (size_t i = 0; i < c->ncats; i++)
        for (size_t j = 0; j < i; j++) {
            const char *a = c->cats[i].glyph.text, *b = c->cats[j].glyph.text;
            if (!strcmp(a ? a : "square", b ? b : "square"))
                return false;
        }
    return true;
}

/* More categories to colour than safe colours would repeat a colour, so two
** categories would differ in nothing a reader sees: refused unless every
** category has a glyph of its own. Safe colours that are merely close under
** a colour-vision deficiency stay the audit's warning (confusable-colors). */
static ug_status enough_colors(const ug_chart *c, size_t want, size_t safe,
                               ug_error *err)
{
    if (want <= safe || glyphs_distinct(c))
        return UG_OK;
    return ug_fail(err, UG_ESCHEMA, c->categories_mark,
                   "%zu categories take their colour from the palette, but it has "
                   "only %zu safe colours on this background, so colours would "
                   "repeat (WCAG 2.1 SC 1.4.1: colour must not be the only cue): "
                   "group the smallest categories into one 'Other', or give each "
                   "category a glyph of its own as a second cue", want, safe);
}

/* Categories without a colour take the safe palette in order, wrapping
** around only when there are more of them than safe colours and every
** category has its own glyph (the audit then says which two are
** confusable). */
static ug_status assign_colors(ug_chart *c, ug_error *err)
{
    size_t want = 0;
    for (size_t i = 0; i < c->ncats; i++)
        want += !c->cats[i].color_given;
    if (!want)
        return UG_OK; /* every colour given: no palette to work out */
    ug_color order[16];
    size_t n = safe_palette(c, order);
    if (!n)
        return ug_fail(err, UG_ENOMEM, ug_mark_file(c->path), "out of memory");
    ug_status st = enough_colors(c, want, n, err);
    if (st)
        return st;
    for (size_t i = 0, used = 0; i < c->ncats; i++) {
        if (c->cats[i].color_given)
            continue;
        ug_color col = order[used++ % n];
        col.set = true;
        col.mark = c->cats[i].mark;
        c->cats[i].color = col;
    }
    return UG_OK;
}

ug_status resolve_chart(ug_chart *c, ug_error *err)
{
    ink_follows_background(c);
    return assign_colors(c, err);
}
