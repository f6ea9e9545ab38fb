/*
** The layout stage's YAML tree: libyaml's events folded into a small node
** tree, every node keeping its 1-based line and column; aliases refused,
** depth and sizes limited.
*/
#include <string.h>
#include <yaml.h>

#include "layout_int.h"

/* ---- YAML -> node tree --------------------------------------------------- */

typedef struct {
    yaml_parser_t parser;
    ug_arena *arena;
    const char *file;
    layout_node *stack[UG_MAX_DEPTH + 1];
    int depth;
    layout_node *root;
    int documents;
    ug_error *err;
} tree_builder;

static ug_mark mark_of(const tree_builder *b, yaml_mark_t m)
{
    ug_mark u = {b->file, (unsigned)m.line + 1, (unsigned)m.column + 1};
    return u;
}

static ug_status syntax_error(tree_builder *b)
{
    yaml_parser_t *p = &b->parser;
    const char *problem = p->problem ? p->problem : "unreadable YAML";
    if (p->error == YAML_MEMORY_ERROR)
        return ug_fail(b->err, UG_ENOMEM, ug_mark_file(b->file), "out of memory");
    if (p->error == YAML_READER_ERROR)
        return ug_fail(b->err, UG_ESYNTAX, ug_mark_file(b->file),
                       "YAML syntax error: %s at byte %zu", problem,
                       p->problem_offset);
    if (p->context)
        return ug_fail(b->err, UG_ESYNTAX, mark_of(b, p->problem_mark),
                       "YAML syntax error: %s (%s at line %zu, column %zu)",
                       problem, p->context, p->context_mark.line + 1,
                       p->context_mark.column + 1);
    return ug_fail(b->err, UG_ESYNTAX, mark_of(b, p->problem_mark),
                   "YAML syntax error: %s", problem);
}

static ug_status attach(tree_builder *b, layout_node *n)
{
    if (b->depth == 0) {
        b->root = n;
        return UG_OK;
    }
    layout_node *parent = b->stack[b->depth - 1];
    if (parent->kind == LAYOUT_MAP && parent->n % 2 == 0 && n->kind != LAYOUT_SCALAR)
        return ug_fail(b->err, UG_ESCHEMA, n->mark,
                       "a key must be a plain name, not a list or mapping");
    if (parent->n >= 2 * MAX_ITEMS)
        return ug_fail(b->err, UG_ELIMIT, n->mark,
                       "more than %d items in one list or mapping", MAX_ITEMS);
    if (parent->last)
        parent->last->next = n;
    else
        parent->first = n;
    parent->last = n;
    parent->n++;
    return UG_OK;
}

static layout_node *new_node(tree_builder *b, layout_kind kind, yaml_mark_t m)
{
    layout_node *n = ug_arena_alloc(b->arena, sizeof *n);
    if (n) {
        n->kind = kind;
        n->mark = mark_of(b, m);
    }
    return n;
}

static ug_status on_scalar(tree_builder *b, const yaml_event_t *e)
{
    layout_node *n = new_node(b, LAYOUT_SCALAR, e->start_mark);
    size_t len = e->data.scalar.length;
    if (!n)
        return ug_fail(b->err, UG_ENOMEM, ug_mark_file(b->file), "out of memory");
    if (len > UG_MAX_STRING)
        return ug_fail(b->err, UG_ELIMIT, n->mark,
                       "text longer than the limit of %d bytes", UG_MAX_STRING);
    n->text = ug_arena_strndup(b->arena, (const char *)e->data.scalar.value, len);
    if (!n->text)
        return ug_fail(b->err, UG_ENOMEM, ug_mark_file(b->file), "out of memory");
    n->len = len;
    n->plain = e->data.scalar.style == YAML_PLAIN_SCALAR_STYLE;
    return attach(b, n);
}

static ug_status on_open(tree_builder *b, layout_kind kind, const yaml_event_t *e)
{
    layout_node *n = new_node(b, kind, e->start_mark);
    if (!n)
        return ug_fail(b->err, UG_ENOMEM, ug_mark_file(b->file), "out of memory");
    if (b->depth >= UG_MAX_DEPTH)
        return ug_fail(b->err, UG_ELIMIT, n->mark,
                       "nested deeper than the limit of %d levels", UG_MAX_DEPTH);
    ug_status st = attach(b, n);
    if (!st)
        b->stack[b->depth++] = n;
    return st;
}

static ug_status on_event(tree_builder *b, const yaml_event_t *e)
{
    switch (e->type) {
    case YAML_DOCUMENT_START_EVENT:
        if (++b->documents > 1)
            return ug_fail(b->err, UG_ESYNTAX, mark_of(b, e->start_mark),
                           "only one YAML document is allowed in a file");
        return UG_OK;
    case YAML_ALIAS_EVENT:
        return ug_fail(b->err, UG_ESCHEMA, mark_of(b, e->start_mark),
                       "aliases are not supported (write the value out)");
    case YAML_SCALAR_EVENT: return on_scalar(b, e);
    case YAML_SEQUENCE_START_EVENT: return on_open(b, LAYOUT_SEQ, e);
    case YAML_MAPPING_START_EVENT: return on_open(b, LAYOUT_MAP, e);
    case YAML_SEQUENCE_END_EVENT:
    case YAML_MAPPING_END_EVENT:
        b->depth--;
        return UG_OK;
    default: return UG_OK;
    }
}

ug_status layout_parse(const char *text, size_t len, const char *file,
                       ug_arena *arena, layout_node **root, ug_error *err)
{
    tree_builder b;
    memset(&b, 0, sizeof b);
    b.arena = arena;
    b.file = file;
    b.err = err;
    *root = NULL;
    ug_status st = layout_scan_file(text, len, file, err);
    if (st)
        return st;
    if (!yaml_parser_initialize(&b.parser))
        return ug_fail(err, UG_ENOMEM, ug_mark_file(file), "out of memory");
    yaml_parser_set_input_string(&b.parser, (const unsigned char *)text, len);
    for (bool done = false; !done && !st;) {
        yaml_event_t e;
        if (!yaml_parser_parse(&b.parser, &e)) {
            st = syntax_error(&b);
            break;
        }
        done = e.type == YAML_STREAM_END_EVENT;
        st = on_event(&b, &e);
        yaml_event_delete(&e);
    }
    yaml_parser_delete(&b.parser);
    if (!st)
        *root = b.root;
    return st;
}

