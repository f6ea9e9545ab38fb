/*
** Pack stage: model + allocation + measured text -> a scene (src/scene.h).
** Also the phrases the picture and its plain-language description share, so
** the key and the description can never say different things.
*/
#ifndef UG_PACK_H
#define UG_PACK_H

/* The empty border the packer keeps around a chart's content, px; a page
** crops it away. */
#define PACK_MARGIN 40.0

#include "alloc.h"
#include "phrase.h"
#include "scene.h"

/* The chart's language: its `lang`, else the page's it was given, else "en". */
const char *pack_lang(const ug_chart *c);
/* The placeholder text of a hidden cell ("fewer than 10", "not shown"), in
** the chart's language unless the layout wrote its own. */
void pack_placeholder(const ug_allocation *a, pub_status s, ug_buf *b);
/* "not shown" in the chart's language. */
const char *pack_other_label(const ug_allocation *a);
/* d as the chart writes amounts (`number-format`, `currency`), its last
** digit rounded as r says. */
char *pack_amount(const ug_chart *c, ug_dec d, phrase_rounding r, char *buf);
/* "835 households", or without a unit "835". */
void pack_count_phrase(const ug_chart *c, ug_dec count, ug_buf *b);
/* The total of group g (of the whole chart when g == SIZE_MAX) as published:
** the number when every cell in it is published, else a bound from the
** published cells ("more than 2,471 households") that reaches no hidden count. */
void pack_group_phrase(const ug_allocation *a, size_t g, ug_buf *b);
/* Under `change:`, the period group g is compared with; SIZE_MAX for none. */
size_t pack_change_ref(const ug_allocation *a, size_t g);
/* One cell's published count as a number ("1,200"), or its placeholder. */
void pack_category_cell(const ug_allocation *a, size_t g, size_t i, ug_buf *b);
/* The published total of category i over every group. */
void pack_category_phrase(const ug_allocation *a, size_t i, ug_buf *b);
/* Sentences saying what was hidden or rounded to protect people, shared by
** the key and the description; nothing when every count is as counted. */
void pack_disclosure_notes(const ug_allocation *a, ug_buf *b);
/* "Each icon = 10 households" / "Each square = 1% of the 835 households";
** the key's wording when key, else the description's ("Each icon is ..."). */
void pack_value_statement(const ug_chart *c, const ug_allocation *a, bool key,
                          ug_buf *b);
/* Under `method: biproportional` with groups (FORMAT.md §7), the sentence
** saying that both totals agree; nothing otherwise. */
void pack_totals_note(const ug_allocation *a, ug_buf *b);
/* "12 icons" / "1 square" in the chart's language, the form picked by the
** CLDR plural category of d written with places fraction digits. */
void pack_icon_count(const ug_chart *c, ug_dec d, int places, ug_buf *b);
/* pack_icon_count of a share's icons: "49 icons", "4.25 icons" when clipped. */
void pack_share_icons(const ug_chart *c, const alloc_share *s, ug_buf *b);
/* Icons shown for a share: "49", or "4.25" for a clipped last icon. */
char *pack_icons_text(const alloc_share *s, char *buf);
/* Whether the chart's cells are called squares (a waffle of plain squares). */
bool pack_icon_is_square(const ug_chart *c);
/* "icon"/"icons" or "square"/"squares" by chart form. */
const char *pack_icon_word(const ug_chart *c, bool plural);

/* A batch's shared layout: what every row's chart reserves so that the
** charts of a batch have one canvas and one place for each category's line,
** label and key entry, sized for the largest row. Filled by packing every row
** with measuring set; then every row is packed reading it (never writing),
** so rows can be packed in several threads at once. */
typedef struct pack_frame pack_frame;
pack_frame *pack_frame_new(size_t ncats);
void pack_frame_free(pack_frame *f);
/* ug_scene_pack_with in a batch's frame (NULL: on its own). Measuring packs
** no glyphs and writes no description: only the sizes count. */
ug_status pack_scene(const ug_chart *c, const ug_allocation *a,
                     const ug_pack_options *opt, pack_frame *frame, bool measuring,
                     ug_scene **out, ug_error *err);

/* The generated description (describe.c); the layout's `description:`
** replaces it when given. */
void describe_chart(const ug_chart *c, const ug_allocation *a, ug_buf *b);

#endif
