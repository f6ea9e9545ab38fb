/*
** Layout stage internals shared by layout.c (YAML -> model) and data.c
** (CSV counts -> model). The glyph index reader (glyph_library.c) uses its
** guarded file reader and parser too; no other stage includes this.
*/
#ifndef UG_LAYOUT_H
#define UG_LAYOUT_H

#include "model.h"

/* A YAML node as the loader sees it: libyaml's events folded into a tree that
** keeps every node's 1-based mark. Children form a list; a mapping's children
** alternate key, value. All memory belongs to the arena passed to the parser. */
typedef enum { LAYOUT_SCALAR, LAYOUT_SEQ, LAYOUT_MAP } layout_kind;

typedef struct layout_node layout_node;
struct layout_node {
    layout_kind kind;
    ug_mark mark;
    const char *text;  /* scalar: NUL-ended copy */
    size_t len;        /* scalar: bytes */
    bool plain;        /* scalar: written without quotes or block style */
    layout_node *first, *last, *next;
    size_t n;          /* children (a mapping has 2 per entry) */
};

/* Read a whole file, refusing one larger than max bytes. Errors blame `at`
** (the file itself, or the place in a layout that named it). *text is
** ug_malloc'd and NUL-ended. */
/* A length as layouts write it (a bare number is px; px, in, pt, mm), in
** CSS px; false when it is not one. */
bool layout_parse_length(const char *s, size_t n, double *px);
/* A batch template (FORMAT.md §5): a chart layout whose categories need no
** counts and whose `data` needs no `file`, built with csv (the one given
** with --each-row, borrowed for the call) as its data, one group per row. */
ug_status layout_load_template(const char *path, const char *csv, const ug_limits *limits,
                               ug_chart **out, ug_error *err);
ug_status layout_read_file(const char *path, size_t max, ug_mark at,
                           char **text, size_t *len, ug_error *err);

/* Check that s[0..n) is UTF-8 without control characters; a newline is
** allowed only when `multiline`. Errors blame `at` and name the character. */
ug_status layout_check_text(const char *s, size_t n, bool multiline, ug_mark at,
                            ug_error *err);

/* Parse YAML text into a node tree. *root is NULL for an empty document. */
ug_status layout_parse(const char *text, size_t len, const char *file,
                       ug_arena *arena, layout_node **root, ug_error *err);

/* `rel` resolved against `dir` ("" or NULL: unchanged; absolute: unchanged). */
char *layout_join(ug_arena *a, const char *dir, const char *rel);

/* Counts from the CSV named in chart->data: fills groups (when the layout
** lists none) and every category's counts and count_marks. */
ug_status data_load(ug_chart *chart, ug_error *err);
/* The first field of the header of chart->data.file, read with the same
** parser and delimiter rule as the counts, as the chart's group column. */
ug_status data_first_header(ug_chart *chart, ug_error *err);

#endif
