/*
** The resolve step: every default a chart has, in one place, and what is
** decided from the whole layout once it is read (the palette's colours for
** categories that name none). The loader calls both; a chart built by hand
** (a test fixture) calls them too, so no later stage needs a fallback.
*/
#ifndef UG_RESOLVE_H
#define UG_RESOLVE_H

#include "model.h"

#define RESOLVE_FONT "DejaVu Sans"
/* Han characters take the forms of the chart's script: DejaVu has none, and
** fontconfig, asked for a Han character without a language, gives Noto Sans
** CJK JP (fc-match "DejaVu Sans:charset=4e2d" with fonts-noto-cjk
** 1:20220127 on Debian 12), whose forms differ from the simplified ones. */
#define RESOLVE_FONT_HANS "DejaVu Sans, Noto Sans CJK SC"
#define RESOLVE_FONT_HANT "DejaVu Sans, Noto Sans CJK TC"
#define RESOLVE_INK 0x222222        /* text */
#define RESOLVE_INK_ON_DARK 0xf2f2f2 /* text on a background the default fails on */
#define RESOLVE_BACKGROUND 0xffffff
#define RESOLVE_ICON_PX 24
#define RESOLVE_GAP_PX 4
/* The type scale of a chart on its own, px by UG_TYPE_* (common practice, no
** source: steps of about 1.2 to 1.5 between roles, labels near 11 pt). */
#define RESOLVE_TYPE_PX {26.0, 17.0, 15.0, 13.0}
/* A handout's type scale, by UG_PAGE_TYPE_*: the page title clearly above
** the panels' titles, and panels a step smaller than a chart alone, since a
** page is read at arm's length like a chart on a screen (common practice,
** no source). */
#define RESOLVE_PAGE_TYPE_PX {26.0, 18.0, 14.0, 14.0, 13.0, 11.0, 11.0}
/* How far a page may shrink its panels to fit: icons of 8 px (2.1 mm
** printed) and text of 7 pt (common practice for print, no source). */
#define RESOLVE_PAGE_MIN_ICON_PX 8.0
#define RESOLVE_PAGE_MIN_TEXT_PX (7.0 * 96.0 / 72.0)
#define RESOLVE_CELLS 100           /* a waffle of shares */
#define RESOLVE_TOLERANCE_PERCENT 10 /* audit.tolerance: common practice, no source */
#define RESOLVE_SMALL_COUNT 10       /* small-count threshold (REFERENCES.md §7) */

/* The published small-count rules a layout may name (`small-count: cms`). */
typedef struct {
    const char *name;   /* the layout keyword */
    long below;         /* counts under this are disclosive */
    bool zero_too;      /* the rule covers 0 as well */
    const char *rule;   /* the published rule, for messages */
} resolve_small_preset;

/* NULL when name is not a preset. */
const resolve_small_preset *resolve_small_count_preset(const char *name);

/* The values a chart has before its layout says otherwise (path, dir and
** limits are the caller's). */
void resolve_defaults(ug_chart *c);
/* The family list the chart's text is measured and drawn with: the
** layout's style.font when it names one, else the default for its
** language (RESOLVE_FONT_HANS for Chinese in simplified characters,
** RESOLVE_FONT_HANT for traditional, RESOLVE_FONT otherwise). Call it once
** the chart's language is final (a page's panel takes the page's). */
const char *resolve_font(const ug_chart *c);
/* Does each line of split rows name its category beside its count
** ("Children: 64")? On by default where the lines would otherwise carry
** none (split rows with groups, whose left column names the group): a
** placeholder "not shown" must say what is not shown without colour (WCAG
** 2.1 SC 1.4.1). `direct-labels: false` turns it off. */
bool resolve_direct_labels(const ug_chart *c);
/* After the layout is read: text without a colour follows the background
** (light ink on a dark one); categories without a colour take the palette
** as it is safe on that background: colours reaching 3:1 against it first,
** then the others shaded to 3:1, none confusable with one taken before.
** Fails when more categories need a palette colour than it has colours
** apart on this background, unless each has a glyph of its own (an error at
** `categories:`), and when out of memory; err may be NULL. */
ug_status resolve_chart(ug_chart *c, ug_error *err);

#endif
