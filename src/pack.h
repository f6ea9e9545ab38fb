/*
** Pack stage: model + allocation + measured text -> a scene (src/scene.h).
** Also the phrases the picture and its plain-language description share, so
** the key and the description can never say different things.
*/
#ifndef UG_PACK_H
#define UG_PACK_H

#include "alloc.h"
#include "scene.h"

/* A count the layout asks to hide (`suppress: below: N`): positive and < N. */
bool pack_suppressed(const ug_chart *c, ug_dec count);
/* Its placeholder text: the layout's label or "fewer than N". */
const char *pack_suppress_label(const ug_chart *c, char *buf, size_t size);
/* 1234567.5 -> "1,234,567.5"; buf needs 64 bytes. */
char *pack_number(ug_dec d, char *buf);
/* "835 households", or without a unit "835". */
void pack_count_phrase(const ug_chart *c, ug_dec count, ug_buf *b);
/* A sum over some cells, none of which may leak a hidden count: the plain
** total when nothing is hidden, otherwise "more than <visible sum>" (or
** "fewer than <hidden cells x N>" when everything is hidden). */
void pack_sum_phrase(const ug_chart *c, ug_dec visible, size_t nhidden, ug_buf *b);
/* The sum phrase of group g (or of the whole chart when g == SIZE_MAX). */
void pack_group_phrase(const ug_chart *c, size_t g, ug_buf *b);
/* One cell's count as a number ("1,200"), or the label when hidden. */
void pack_category_cell(const ug_chart *c, size_t g, size_t i, ug_buf *b);
/* The sum phrase of category i over every group. */
void pack_category_phrase(const ug_chart *c, size_t i, ug_buf *b);
/* "Each icon = 10 households" / "Each square = 1% of the 835 households";
** verb is "=" for the key and "is" for sentences. */
void pack_value_statement(const ug_chart *c, const ug_allocation *a,
                          const char *verb, ug_buf *b);
/* Icons shown for a share: "49", or "4.25" for a clipped last icon. */
char *pack_icons_text(const alloc_share *s, char *buf);
/* "icon"/"icons" or "square"/"squares" by chart form. */
const char *pack_icon_word(const ug_chart *c, bool plural);

/* The generated description (describe.c); the layout's `description:`
** replaces it when given. */
void describe_chart(const ug_chart *c, const ug_allocation *a, ug_buf *b);

#endif
