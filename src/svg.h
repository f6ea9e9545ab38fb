/*
** SVG stage: scene -> SVG bytes, the one SVG writer: a handout sheet is a
** scene too, holding its charts' scenes as children (scene_child). Also the
** number formatter and the XML escaping, which the web page shares.
*/
#ifndef UG_SVG_H
#define UG_SVG_H

#include "scene.h"

/* v with at most two decimals, trailing zeros dropped ("12.5", "-3", "0.07").
** Writes at most 32 bytes including the NUL; returns the length. */
size_t svg_number(double v, char *out);
/* s escaped for XML text and attribute values (& < > " '). */
void svg_escape(ug_buf *b, const char *s);
/* Text straight from the input (not through the scene) for an SVG or the
** web page: cleaned by text_clean, then escaped as svg_escape does. */
void svg_escape_text(ug_buf *b, const char *s);

#endif
