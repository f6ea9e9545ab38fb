/*
** The resolve step (src/resolve.h): every default of a chart, and the
** palette's colours for categories that name none.
*/
#include <string.h>

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
    c->cluster = -1; /* not given: the form decides */
    c->icon_size = RESOLVE_ICON_PX;
    c->icon_gap = RESOLVE_GAP_PX;
    c->style.width = 0; /* not given: the packer's width, which a `columns:` may widen */
    c->style.font = RESOLVE_FONT;
    c->style.font_mark = ug_mark_file(c->path);
    c->style.background = hex_color(RESOLVE_BACKGROUND);
    c->style.ink = hex_color(RESOLVE_INK);
    c->audit.tolerance_percent.v = RESOLVE_TOLERANCE_PERCENT * UG_DEC_SCALE;
    c->audit.small_count.v = RESOLVE_SMALL_COUNT * UG_DEC_SCALE;
}

/* Categories without a colour take the palette (src/color.c) in order,
** wrapping around — but the colours that reach the 3:1 non-text contrast of
** WCAG 2.1 SC 1.4.11 against this chart's background come first, so a chart
** that names no colours passes the audit's contrast rule as far as its palette
** allows (Okabe-Ito on white: green, blue, vermillion, purple, then the rest). */
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

void resolve_chart(ug_chart *c)
{
    ink_follows_background(c);
    size_t n = color_palette_size(c->style.palette), next = 0;
    ug_color order[16];
    for (int pass = 0; pass < 2; pass++)
        for (size_t k = 0; k < n && k < 16; k++) {
            ug_color col = color_palette_at(c->style.palette, k);
            bool passes = color_contrast_passes(
                color_contrast(col, c->style.background), COLOR_WCAG_NON_TEXT);
            if (passes == (pass == 0))
                order[next++] = col;
        }
    for (size_t i = 0, used = 0; i < c->ncats; i++) {
        if (c->cats[i].color_given)
            continue;
        ug_color col = order[used++ % next];
        col.set = true;
        col.mark = c->cats[i].mark;
        c->cats[i].color = col;
    }
}

