/*
** The layout stage: a chart file (YAML, FORMAT.md §1) -> the typed model of
** model.h, every value keeping the 1-based line and column it came from. The
** input is read by layout_input.c, folded into a node tree by layout_tree.c
** and walked against the chart's key table here (layout_keys.c holds the
** walker); the resolve step (resolve.c) then fills the defaults. Page files
** are layout_page.c; counts from CSV files are read by data.c.
*/
#include <ctype.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "context.h"
#include "resolve.h"
#include "layout_int.h"
#include "phrase.h"

/* ---- chart keys ---------------------------------------------------------- */

#define FORM_INFO_(id, name, kind, cell, cells, columns, shares) \
    {name, kind, cell, cells, columns, shares},
static const ug_form_info form_info[] = {UG_CHART_FORMS(FORM_INFO_)};
#undef FORM_INFO_
#define FORM_NAME_(id, name, kind, cell, cells, columns, shares) name,
const char *const ug_form_names[] = {UG_CHART_FORMS(FORM_NAME_) NULL};
#undef FORM_NAME_

const ug_form_info *ug_form_about(ug_form f)
{
    return &form_info[f < UG_FORM_COUNT ? f : UG_FORM_ROWS];
}

static const char *const changes[] = {"none", "previous", "first", NULL};
static const char *const counts_are[] = {"counts", "percent", NULL};
const char *const layout_number_formats[] = {"plain", "compact", "compact-short", NULL};
static const char *const roundings[] = {"whole", "partial", NULL};
static const char *const methods[] = {"largest-remainder", "sainte-lague", "dhondt",
                                      "biproportional", NULL};
static const char *const arrangements[] = {"inline", "split", NULL};
static const char *const key_places[] = {"auto", "below", "beside", NULL};
static const char *const fills[] = {"by-row", "by-column", "snake", NULL};
static const char *const starts[] = {"top-left", "bottom-left", NULL};
static const char *const palettes[] = {"okabe-ito", "tol-bright", "tol-muted", NULL};

_Static_assert(sizeof(ug_form) == sizeof(int) && sizeof(ug_palette) == sizeof(int),
               "enums are read through int");

static ug_status key_icon_value(loader *l, void *base, const layout_node *v)
{
    ug_chart *c = base;
    if (v->kind == LAYOUT_SCALAR && !strcmp(v->text, "auto")) {
        c->icon_value_auto = true;
        return UG_OK;
    }
    ug_status st = layout_read_dec(l, v, &c->icon_value);
    if (!st && c->icon_value.v == 0)
        return ug_fail(l->err, UG_EDATA, v->mark,
                       "'icon-value' must be more than zero (each icon stands "
                       "for this many)");
    return st;
}

static ug_status key_lang(loader *l, void *base, const layout_node *v)
{
    return layout_read_lang(l, v, &((ug_chart *)base)->lang);
}

static ug_status key_currency(loader *l, void *base, const layout_node *v)
{
    char why[200];
    ug_text *out = &((ug_chart *)base)->currency;
    ug_status st = layout_read_text(l, v, false, out);
    if (!st && phrase_check_currency(out->text, why, sizeof why))
        return ug_fail(l->err, UG_ESCHEMA, v->mark, "%s", why);
    return st;
}

#define UG_PLURAL_NAME_(id, name) name,
static const char *const plural_names[] = {UG_PLURAL_CATEGORIES(UG_PLURAL_NAME_) NULL};
#undef UG_PLURAL_NAME_

/* One `unit-label` form: the category it is for, once each. */
static ug_status read_unit_form(loader *l, ug_chart *c, const layout_node *k,
                                const layout_node *v)
{
    size_t f = 0;
    while (plural_names[f] && strcmp(plural_names[f], k->text))
        f++;
    if (!plural_names[f])
        return ug_fail(l->err, UG_ESCHEMA, k->mark,
                       "'unit-label' forms are CLDR plural categories: zero, one, "
                       "two, few, many, other (found '%s')", k->text);
    if (c->unit_forms[f].text)
        return ug_fail(l->err, UG_ESCHEMA, k->mark, "duplicate key '%s' (first at "
                       "line %u)", k->text, c->unit_forms[f].mark.line);
    return layout_read_text(l, v, false, &c->unit_forms[f]);
}

/* `unit-label`: one text, or its forms by plural category (FORMAT.md §6),
** which must include `other`, the form every language has. */
static ug_status key_unit_label(loader *l, void *base, const layout_node *v)
{
    ug_chart *c = base;
    if (v->kind != LAYOUT_MAP)
        return layout_read_text(l, v, false, &c->unit_label);
    for (const layout_node *k = v->first; k && k->next; k = k->next->next) {
        ug_status st = read_unit_form(l, c, k, k->next);
        if (st)
            return st;
    }
    if (!c->unit_forms[UG_PLURAL_OTHER].text)
        return ug_fail(l->err, UG_ESCHEMA, v->mark,
                       "'unit-label' forms need 'other', the form for any number");
    c->unit_label = c->unit_forms[UG_PLURAL_OTHER];
    c->has_unit_forms = true;
    return UG_OK;
}

static ug_status key_tolerance(loader *l, void *base, const layout_node *v)
{
    ug_chart *c = base;
    ug_status st = layout_want_scalar(l, v, "a percentage");
    if (st)
        return st;
    if (!v->len || v->text[v->len - 1] != '%' ||
        ug_dec_parse(v->text, v->len - 1, &c->audit.tolerance_percent) != UG_DEC_OK)
        return ug_fail(l->err, UG_ESCHEMA, v->mark,
                       "'rounding-tolerance' expects a percentage such as 10%% "
                       "(found '%s')", v->text);
    return UG_OK;
}

/* A non-empty list of at most `max` items; `what` completes "expects a list of". */
ug_status layout_want_list(loader *l, const layout_node *v, size_t max,
                           const char *what)
{
    if (v->kind != LAYOUT_SEQ || !v->n)
        return ug_fail(l->err, UG_ESCHEMA, v->mark, "'%s' expects a list of %s",
                       l->key, what);
    if (v->n > max)
        return ug_fail(l->err, UG_ELIMIT, v->mark, "more than %zu %s (the limit)",
                       max, l->key);
    return UG_OK;
}

static ug_status key_groups(loader *l, void *base, const layout_node *v)
{
    ug_chart *c = base;
    ug_status st = layout_want_list(l, v, UG_MAX_GROUPS, "group names");
    if (!st)
        st = layout_read_text_list(l, v, &c->groups);
    for (size_t i = 0; !st && i < c->groups.n; i++)
        for (size_t j = 0; j < i; j++)
            if (!strcmp(c->groups.items[i].text, c->groups.items[j].text))
                return ug_fail(l->err, UG_ESCHEMA, c->groups.items[i].mark,
                               "duplicate group '%s' (first at line %u)",
                               c->groups.items[i].text, c->groups.items[j].mark.line);
    return st;
}

static ug_status key_cat_id(loader *l, void *base, const layout_node *v)
{
    ug_text t;
    ug_status st = layout_read_text(l, v, false, &t);
    if (!st) {
        ((ug_category *)base)->id = t.text;
        l->id[l->cur] = v;
    }
    return st;
}

static ug_status key_cat_count(loader *l, void *base, const layout_node *v)
{
    (void)base;
    l->count[l->cur] = v;
    return UG_OK;
}

static ug_status key_cat_counts(loader *l, void *base, const layout_node *v)
{
    (void)base;
    if (v->kind != LAYOUT_SEQ)
        return ug_fail(l->err, UG_ESCHEMA, v->mark,
                       "'counts' expects a list of numbers, one per group, not %s",
                       layout_kind_name(v));
    l->counts[l->cur] = v;
    return UG_OK;
}

#define CAT(f) offsetof(ug_category, f)
static const key_rule category_keys[] = {
    {.name = "id", .kind = K_FN, .fn = key_cat_id},
    {.name = "label", .kind = K_TEXT, .off = CAT(label)},
    {.name = "glyph", .kind = K_TEXT, .off = CAT(glyph)},
    {.name = "color", .kind = K_COLOR, .off = CAT(color), .flag = CAT(color_given)},
    {.name = "count", .kind = K_FN, .fn = key_cat_count},
    {.name = "counts", .kind = K_FN, .fn = key_cat_counts},
    {.name = "note", .kind = K_TEXT, .off = CAT(note)},
    {.name = "column", .kind = K_TEXT, .off = CAT(column)},
    {.name = NULL},
};

void *layout_arena_array(ug_arena *a, size_t n, size_t size)
{
    return n > SIZE_MAX / size ? NULL : ug_arena_alloc(a, n * size);
}

static ug_status key_categories(loader *l, void *base, const layout_node *v)
{
    ug_chart *c = base;
    ug_status st = layout_want_list(l, v, UG_MAX_CATEGORIES, "category mappings");
    if (st)
        return st;
    c->cats = layout_arena_array(l->arena, v->n, sizeof *c->cats);
    l->count = layout_arena_array(l->arena, v->n, sizeof *l->count);
    l->counts = layout_arena_array(l->arena, v->n, sizeof *l->counts);
    l->id = layout_arena_array(l->arena, v->n, sizeof *l->id);
    if (!c->cats || !l->count || !l->counts || !l->id)
        return layout_nomem(l, v);
    for (const layout_node *it = v->first; it; it = it->next) {
        l->cur = c->ncats;
        c->cats[l->cur].mark = it->mark;
        if (it->kind != LAYOUT_MAP)
            return ug_fail(l->err, UG_ESCHEMA, it->mark,
                           "each category must be a mapping (label, glyph, count, "
                           "...), not %s", layout_kind_name(it));
        st = layout_walk_map(l, &c->cats[l->cur], it, category_keys);
        if (st)
            return st;
        c->ncats++;
    }
    return UG_OK;
}

#define CH(f) offsetof(ug_chart, f)
static const key_rule icon_keys[] = {
    {.name = "size", .kind = K_LENGTH, .off = CH(icon_size), .lo = 1},
    {.name = "gap", .kind = K_LENGTH, .off = CH(icon_gap)},
    {.name = NULL},
};

static const char *const complements[] = {"auto", "none", NULL};
static const char *const margin_kinds[] = {"published", "hidden", NULL};
static const char *const zero_kinds[] = {"show", "hide", NULL};
static const char *const protect_methods[] = {"controlled", "conventional", "random",
                                              NULL};

_Static_assert(sizeof(ug_complement) == sizeof(int) && sizeof(ug_zeros) == sizeof(int)
                   && sizeof(ug_margins) == sizeof(int)
                   && sizeof(ug_protect_method) == sizeof(int),
               "enums are read through int");

static const key_rule cell_ref_keys[] = {
    {.name = "group", .kind = K_TEXT, .off = offsetof(ug_cell_ref, group)},
    {.name = "category", .kind = K_TEXT, .off = offsetof(ug_cell_ref, category)},
    {.name = NULL},
};

/* `suppress: cells:` — a list of {group, category}; names are checked against
** the groups and categories once the counts are loaded (disclose.c). */
static ug_status key_suppress_cells(loader *l, void *base, const layout_node *v)
{
    ug_chart *c = base;
    ug_status st = layout_want_list(l, v, (size_t)UG_MAX_GROUPS * 16, "{group, category} cells");
    if (st)
        return st;
    c->suppress_cells = layout_arena_array(l->arena, v->n, sizeof *c->suppress_cells);
    if (!c->suppress_cells)
        return layout_nomem(l, v);
    for (const layout_node *it = v->first; it; it = it->next) {
        ug_cell_ref *ref = &c->suppress_cells[c->nsuppress_cells];
        ref->mark = it->mark;
        if ((st = layout_walk_map(l, ref, it, cell_ref_keys)))
            return st;
        if (!ref->category.text)
            return ug_fail(l->err, UG_ESCHEMA, it->mark,
                           "each hidden cell names its 'category' (and its 'group' "
                           "when the chart has groups)");
        c->nsuppress_cells++;
    }
    return UG_OK;
}

static const key_rule suppress_keys[] = {
    {.name = "below", .kind = K_DEC, .off = CH(suppress_below)},
    {.name = "label", .kind = K_TEXT, .off = CH(suppress_label)},
    {.name = "complement", .kind = K_ENUM, .off = CH(suppress_complement),
     .choices = complements},
    {.name = "margins", .kind = K_ENUM, .off = CH(suppress_margins),
     .choices = margin_kinds},
    {.name = "zeros", .kind = K_ENUM, .off = CH(suppress_zeros),
     .mark = CH(suppress_zeros_mark), .choices = zero_kinds},
    {.name = "cells", .kind = K_FN, .fn = key_suppress_cells},
    {.name = NULL},
};

static const key_rule protect_keys[] = {
    {.name = "round-to", .kind = K_DEC, .off = CH(protect.round_to)},
    {.name = "method", .kind = K_ENUM, .off = CH(protect.method),
     .choices = protect_methods},
    {.name = "seed", .kind = K_LONG, .off = CH(protect.seed), .lo = 0,
     .hi = 2147483647, .flag = CH(protect.has_seed)},
    {.name = NULL},
};

/* `small-count`: a number, or the name of a published agency rule (resolve.h). */
static ug_status key_small_count(loader *l, void *base, const layout_node *v)
{
    ug_chart *c = base;
    if (v->kind == LAYOUT_SCALAR && resolve_small_count_preset(v->text))
        return layout_read_text(l, v, false, &c->audit.small_count_preset);
    if (v->kind == LAYOUT_SCALAR && ug_dec_parse(v->text, v->len, &c->audit.small_count))
        return ug_fail(l->err, UG_ESCHEMA, v->mark,
                       "'small-count' expects a number or one of cms, cdc-wonder, "
                       "nhs-hes (found '%s')", v->text);
    return layout_read_dec(l, v, &c->audit.small_count);
}

static const key_rule audit_keys[] = {
    {.name = "rounding-tolerance", .kind = K_FN, .fn = key_tolerance,
     .flag = CH(audit.has_tolerance)},
    {.name = "small-count", .kind = K_FN, .fn = key_small_count,
     .flag = CH(audit.has_small_count)},
    {.name = "ignore", .kind = K_LIST, .off = CH(audit.ignore)},
    {.name = NULL},
};

/* A family name goes into a font-family attribute and a CSS font stack, so
** it keeps to the characters family names use: ';', quotes or "url(" there
** would be CSS, not a name. Non-ASCII letters (already checked UTF-8) pass. */
static ug_status key_font(loader *l, void *base, const layout_node *v)
{
    ug_text t;
    ug_status st = layout_read_text(l, v, false, &t);
    if (st)
        return st;
    for (const unsigned char *p = (const unsigned char *)t.text; *p; p++)
        if (*p < 0x80 && !isalnum(*p) && !strchr(" -_.,", *p))
            return ug_fail(l->err, UG_ESCHEMA, v->mark,
                           "'font' expects a font family name such as DejaVu Sans "
                           "(letters, digits, spaces, '-', '_', '.', ','); found '%c'",
                           *p);
    ((ug_chart *)base)->style.font = t.text;
    ((ug_chart *)base)->style.font_mark = v->mark;
    return UG_OK;
}

#define ROLE(role, i) {.name = role, .kind = K_LENGTH, .off = (i) * sizeof(double), .lo = 1}
static const key_rule chart_type_keys[] = {
    ROLE("title", UG_TYPE_TITLE), ROLE("subtitle", UG_TYPE_SUBTITLE),
    ROLE("label", UG_TYPE_LABEL), ROLE("note", UG_TYPE_NOTE), {.name = NULL},
};
#undef ROLE

static ug_status key_type(loader *l, void *base, const layout_node *v)
{
    ug_chart *c = base;
    return layout_read_type_scale(l, v, chart_type_keys, c->style.type,
                                  &c->style.type_mark);
}

static const key_rule style_keys[] = {
    {.name = "width", .kind = K_LENGTH, .off = CH(style.width), .lo = 1},
    {.name = "font", .kind = K_FN, .fn = key_font},
    {.name = "background", .kind = K_COLOR, .off = CH(style.background)},
    {.name = "ink", .kind = K_COLOR, .off = CH(style.ink)},
    {.name = "palette", .kind = K_ENUM, .off = CH(style.palette), .choices = palettes},
    {.name = "type", .kind = K_FN, .fn = key_type},
    {.name = NULL},
};

/* `rows: last N` or `rows: [name, ...]`: which rows of the CSV are the
** chart's groups (FORMAT.md §5). */
static ug_status key_data_rows(loader *l, void *base, const layout_node *v)
{
    ug_data_spec *d = &((ug_chart *)base)->data;
    d->rows_mark = v->mark;
    if (v->kind == LAYOUT_SEQ) {
        ug_status st = layout_read_text_list(l, v, &d->rows_names);
        if (!st && !d->rows_names.n)
            st = ug_fail(l->err, UG_ESCHEMA, v->mark, "'rows' lists no row");
        return st;
    }
    ug_text t;
    ug_status st = layout_read_text(l, v, false, &t);
    if (st)
        return st;
    char *end = NULL;
    long n = strncmp(t.text, "last ", 5) ? 0 : strtol(t.text + 5, &end, 10);
    if (n < 1 || n > UG_MAX_GROUPS || !end || *end || !isdigit((unsigned char)t.text[5]))
        return ug_fail(l->err, UG_ESCHEMA, v->mark,
                       "'rows' expects 'last N' (N from 1 to %d, such as 'last 2') or a "
                       "list of row names", UG_MAX_GROUPS);
    d->rows_last = n;
    return UG_OK;
}

static const key_rule data_keys[] = {
    {.name = "rows", .kind = K_FN, .fn = key_data_rows},
    {.name = "file", .kind = K_TEXT, .off = CH(data.file_text)},
    {.name = "group-column", .kind = K_TEXT, .off = CH(data.group_column)},
    {.name = "category-column", .kind = K_TEXT, .off = CH(data.category_column)},
    {.name = "count-column", .kind = K_TEXT, .off = CH(data.count_column)},
    {.name = "hidden-marks", .kind = K_LIST, .off = CH(data.hidden_marks)},
    {.name = NULL},
};

static const key_rule chart_keys[] = {
    {.name = "title", .kind = K_TEXT, .off = CH(title)},
    {.name = "subtitle", .kind = K_TEXT, .off = CH(subtitle)},
    {.name = "source", .kind = K_LIST, .off = CH(source)},
    {.name = "notes", .kind = K_LIST, .off = CH(notes)},
    {.name = "description", .kind = K_MULTILINE, .off = CH(description)},
    {.name = "change", .kind = K_ENUM, .off = CH(change), .mark = CH(change_mark),
     .choices = changes},
    {.name = "form", .kind = K_ENUM, .off = CH(form), .mark = CH(form_mark),
     .choices = ug_form_names},
    {.name = "counts-are", .kind = K_ENUM, .off = CH(counts_are),
     .mark = CH(counts_are_mark), .choices = counts_are},
    {.name = "icon-value", .kind = K_FN, .fn = key_icon_value,
     .mark = CH(icon_value_mark), .flag = CH(has_icon_value)},
    {.name = "unit-label", .kind = K_FN, .fn = key_unit_label},
    {.name = "lang", .kind = K_FN, .fn = key_lang},
    {.name = "number-format", .kind = K_ENUM, .off = CH(number_format),
     .mark = CH(number_format_mark), .choices = layout_number_formats},
    {.name = "currency", .kind = K_FN, .fn = key_currency},
    {.name = "group-label", .kind = K_TEXT, .off = CH(group_label)},
    {.name = "rounding", .kind = K_ENUM, .off = CH(rounding),
     .mark = CH(rounding_mark), .choices = roundings},
    {.name = "method", .kind = K_ENUM, .off = CH(method), .mark = CH(method_mark),
     .choices = methods},
    {.name = "icon", .kind = K_MAP, .sub = icon_keys, .mark = CH(icon_mark)},
    {.name = "columns", .kind = K_LONG, .off = CH(columns), .lo = 1, .hi = 1000,
     .mark = CH(columns_mark)},
    {.name = "cluster", .kind = K_LONG, .off = CH(cluster), .lo = 0, .hi = 1000},
    {.name = "key-place", .kind = K_ENUM, .off = CH(key_place), .choices = key_places},
    {.name = "direct-labels", .kind = K_BOOL, .off = CH(direct_labels),
     .mark = CH(direct_labels_mark)},
    {.name = "arrangement", .kind = K_ENUM, .off = CH(arrangement),
     .choices = arrangements},
    {.name = "groups", .kind = K_FN, .fn = key_groups},
    {.name = "categories", .kind = K_FN, .fn = key_categories,
     .mark = CH(categories_mark)},
    {.name = "total", .kind = K_DEC, .off = CH(total), .mark = CH(total_mark),
     .flag = CH(has_total)},
    {.name = "suppress", .kind = K_MAP, .sub = suppress_keys,
     .mark = CH(suppress_mark), .flag = CH(has_suppress)},
    {.name = "protect", .kind = K_MAP, .sub = protect_keys, .mark = CH(protect.mark),
     .flag = CH(protect.present)},
    {.name = "audit", .kind = K_MAP, .sub = audit_keys, .mark = CH(audit.mark)},
    {.name = "style", .kind = K_MAP, .sub = style_keys, .mark = CH(style.mark)},
    {.name = "cells", .kind = K_LONG, .off = CH(cells), .lo = 1, .hi = 10000,
     .mark = CH(cells_mark), .flag = CH(has_cells)},
    {.name = "fill", .kind = K_ENUM, .off = CH(fill), .choices = fills},
    {.name = "start", .kind = K_ENUM, .off = CH(start), .choices = starts},
    {.name = "data", .kind = K_MAP, .sub = data_keys, .flag = CH(data.present)},
    {.name = NULL},
};

/* ---- chart checks after the walk ---------------------------------------- */

/* The label's slug (ug_slug), or "category-N" when none of it is usable
** (a label in a script without Latin letters, say). */
static char *slug(ug_arena *a, const char *label, size_t i)
{
    size_t size = strlen(label) + 24;
    char *out = ug_arena_alloc(a, size);
    if (out && !ug_slug(label, out, size))
        snprintf(out, size, "category-%zu", i + 1);
    return out;
}

static ug_status check_category(loader *l, ug_chart *c, size_t i)
{
    ug_category *cat = &c->cats[i];
    if (!cat->label.text)
        return ug_fail(l->err, UG_ESCHEMA, cat->mark,
                       "a category needs a 'label' (the name shown in the key)");
    ug_mark at = l->id[i] ? l->id[i]->mark : cat->label.mark;
    if (!cat->id && !(cat->id = slug(l->arena, cat->label.text, i)))
        return ug_fail(l->err, UG_ENOMEM, cat->mark, "out of memory");
    for (size_t j = 0; j < i; j++)
        if (!strcmp(c->cats[j].id, cat->id))
            return ug_fail(l->err, UG_ESCHEMA, at,
                           "duplicate category id '%s' (first at line %u)%s", cat->id,
                           c->cats[j].mark.line,
                           l->id[i] ? "" : "; ids default to the label, give an 'id'");
    if (!cat->column.text) {
        cat->column.text = cat->id;
        cat->column.mark = at;
    }
    return UG_OK;
}

static ug_status check_form(loader *l, ug_chart *c, const layout_node *root)
{
    ug_mark form_at = c->form_mark.line ? c->form_mark : root->mark;
    if (c->form == UG_FORM_ROWS) {
        if (c->has_cells)
            return ug_fail(l->err, UG_ESCHEMA, c->cells_mark,
                           "'cells' is for waffle charts (form: waffle); a rows "
                           "chart states 'icon-value'");
        if (!c->has_icon_value)
            return ug_fail(l->err, UG_ESCHEMA, form_at,
                           "a rows chart needs 'icon-value' (a number, or auto)");
        if (c->cluster < 0)
            c->cluster = 5;
        if (c->direct_labels && c->arrangement != UG_ARRANGE_SPLIT)
            return ug_fail(l->err, UG_ESCHEMA, c->direct_labels_mark,
                           "'direct-labels' names each category on its own line: "
                           "it needs 'arrangement: split'");
        if (c->method == UG_METHOD_BIPROPORTIONAL && c->rounding == UG_ROUND_PARTIAL)
            return ug_fail(l->err, UG_ESCHEMA, c->method_mark,
                           "'method: biproportional' rounds to whole icons; it "
                           "cannot be used with 'rounding: partial'");
        return UG_OK;
    }
    if (c->method == UG_METHOD_BIPROPORTIONAL)
        return ug_fail(l->err, UG_ESCHEMA, c->method_mark,
                       "'method: biproportional' is for rows charts (form: rows); "
                       "a waffle's groups each fill their own grid");
    if (c->has_cells && c->has_icon_value)
        return ug_fail(l->err, UG_ESCHEMA, c->cells_mark,
                       "a waffle states either 'cells' or 'icon-value', not both");
    if (c->icon_value_auto)
        return ug_fail(l->err, UG_ESCHEMA, c->icon_value_mark,
                       "'icon-value: auto' is for rows charts; a waffle states "
                       "'cells' or a number");
    if (c->rounding == UG_ROUND_PARTIAL)
        return ug_fail(l->err, UG_ESCHEMA, c->rounding_mark,
                       "'rounding: partial' is for rows charts; waffle cells are "
                       "always whole");
    if (c->direct_labels)
        return ug_fail(l->err, UG_ESCHEMA, c->direct_labels_mark,
                       "'direct-labels' is for rows charts with 'arrangement: split'; "
                       "a waffle's key names its colours");
    if (c->cluster < 0)
        c->cluster = 0;
    return UG_OK;
}

static ug_status inline_count(loader *l, ug_chart *c, size_t i)
{
    ug_category *cat = &c->cats[i];
    cat->counts = layout_arena_array(l->arena, 1, sizeof *cat->counts);
    cat->count_marks = layout_arena_array(l->arena, 1, sizeof *cat->count_marks);
    if (!cat->counts || !cat->count_marks)
        return layout_nomem(l, l->count[i]);
    l->key = "count";
    cat->count_marks[0] = l->count[i]->mark;
    return layout_read_dec(l, l->count[i], &cat->counts[0]);
}

static ug_status inline_counts(loader *l, ug_chart *c, size_t i)
{
    ug_category *cat = &c->cats[i];
    const layout_node *list = l->counts[i];
    if (list->n != c->groups.n)
        return ug_fail(l->err, UG_EDATA, list->mark,
                       "'counts' has %zu value%s but there %s %zu group%s", list->n,
                       list->n == 1 ? "" : "s", c->groups.n == 1 ? "is" : "are",
                       c->groups.n, c->groups.n == 1 ? "" : "s");
    cat->counts = layout_arena_array(l->arena, list->n, sizeof *cat->counts);
    cat->count_marks = layout_arena_array(l->arena, list->n, sizeof *cat->count_marks);
    if (!cat->counts || !cat->count_marks)
        return layout_nomem(l, list);
    l->key = "counts";
    size_t g = 0;
    for (const layout_node *it = list->first; it; it = it->next, g++) {
        cat->count_marks[g] = it->mark;
        ug_status st = layout_read_dec(l, it, &cat->counts[g]);
        if (st)
            return st;
    }
    return UG_OK;
}

static ug_status check_counts(loader *l, ug_chart *c, size_t i)
{
    const ug_category *cat = &c->cats[i];
    if (c->is_template && !l->count[i] && !l->counts[i])
        return UG_OK; /* the rows bring them */
    if (c->data.present) {
        const layout_node *given = l->count[i] ? l->count[i] : l->counts[i];
        if (given)
            return ug_fail(l->err, UG_ESCHEMA, given->mark,
                           "counts come from the data file; remove '%s' here",
                           l->count[i] ? "count" : "counts");
        return UG_OK;
    }
    if (c->groups.n && l->count[i])
        return ug_fail(l->err, UG_ESCHEMA, l->count[i]->mark,
                       "this chart has groups: write 'counts: [...]', one per group");
    if (!c->groups.n && l->counts[i])
        return ug_fail(l->err, UG_ESCHEMA, l->counts[i]->mark,
                       "'counts' is for charts with groups; write 'count: N'");
    if (l->count[i])
        return inline_count(l, c, i);
    if (l->counts[i])
        return inline_counts(l, c, i);
    return ug_fail(l->err, UG_EDATA, cat->mark,
                   "category '%s' has no %s (a template drawn with --each-row "
                   "CSV gets its counts from the CSV)",
                   cat->id, c->groups.n ? "'counts'" : "'count'");
}

static ug_status check_data_spec(loader *l, ug_chart *c)
{
    ug_data_spec *d = &c->data;
    if (!d->file_text.text)
        return ug_fail(l->err, UG_ESCHEMA, c->categories_mark.line ? c->categories_mark
                                                                   : c->title.mark,
                       "'data' needs 'file' (the CSV with the counts; a template "
                       "drawn with --each-row CSV takes that CSV)");
    if (!d->category_column.text != !d->count_column.text) {
        const ug_text *t = d->category_column.text ? &d->category_column
                                                   : &d->count_column;
        return ug_fail(l->err, UG_ESCHEMA, t->mark,
                       "a long table needs both 'category-column' and "
                       "'count-column'");
    }
    if (c->groups.n && !d->group_column.text)
        return ug_fail(l->err, UG_ESCHEMA, d->file_text.mark,
                       "the layout lists groups: name the CSV column that holds "
                       "them with 'group-column'");
    if ((d->rows_last || d->rows_names.n) && !d->group_column.text)
        return ug_fail(l->err, UG_ESCHEMA, d->rows_mark,
                       "'rows' picks rows by name: give 'group-column' too");
    d->file = layout_join(l->arena, c->dir, d->file_text.text);
    return d->file ? UG_OK : ug_fail(l->err, UG_ENOMEM, d->file_text.mark, "out of memory");
}

/* suppress needs something to hide; protect a base and, for random rounding,
** a seed, so that the same file always publishes the same table. */
static ug_status check_protection(loader *l, const ug_chart *c)
{
    if (c->has_suppress && c->suppress_below.v == 0 && !c->nsuppress_cells
        && c->suppress_zeros != UG_ZEROS_HIDE)
        return ug_fail(l->err, UG_ESCHEMA, c->suppress_mark,
                       "'suppress' needs 'below' (a count above zero), 'cells' or "
                       "'zeros: hide'");
    if (!c->protect.present)
        return UG_OK;
    if (c->protect.round_to.v <= 0)
        return ug_fail(l->err, UG_ESCHEMA, c->protect.mark,
                       "'protect' needs 'round-to', a base above zero such as 5");
    if (c->protect.method == UG_PROTECT_RANDOM && !c->protect.has_seed)
        return ug_fail(l->err, UG_ESCHEMA, c->protect.mark,
                       "random rounding needs a 'seed' (a whole number) so that the "
                       "same counts always publish the same table");
    return UG_OK;
}

/* `counts-are: percent` (README, "Shares in percent"): the numbers are shares
** of a total nobody stated, so whatever needs that total is refused at its
** key, with the reason. */
static ug_status check_percent_keys(loader *l, const ug_chart *c)
{
    if (c->form != UG_FORM_WAFFLE)
        return ug_fail(l->err, UG_ESCHEMA, c->counts_are_mark,
                       "'counts-are: percent' is for waffle charts (form: waffle): "
                       "a rows chart's icons each stand for a count, and a share "
                       "of an unknown total is no count");
    if (c->has_total)
        return ug_fail(l->err, UG_ESCHEMA, c->total_mark,
                       "'total' is a count, and the shares of a percent chart are "
                       "of a total that is not known: leave 'total' out");
    if (c->has_suppress || c->protect.present)
        return ug_fail(l->err, UG_ESCHEMA, c->has_suppress ? c->suppress_mark
                                                           : c->protect.mark,
                       "a share of an unknown total cannot be checked for "
                       "disclosure (how many people 5 %% is depends on the total): "
                       "protect the counts before they become shares, and leave "
                       "'%s' out of a percent chart",
                       c->has_suppress ? "suppress" : "protect");
    if (c->has_icon_value)
        return ug_fail(l->err, UG_ESCHEMA, c->icon_value_mark,
                       "'icon-value' is a count per icon; a percent waffle "
                       "states 'cells' (default 100, one per percent)");
    if (c->currency.text)
        return ug_fail(l->err, UG_ESCHEMA, c->currency.mark,
                       "'currency' makes the counts sums of money; a percent "
                       "chart's figures are shares: leave 'currency' out");
    if (c->number_format != UG_NUMBERS_PLAIN)
        return ug_fail(l->err, UG_ESCHEMA, c->number_format_mark,
                       "'number-format' writes large counts in words; a percent "
                       "chart's figures are shares of at most 100: leave it out");
    if (c->change != UG_CHANGE_NONE)
        return ug_fail(l->err, UG_ESCHEMA, c->change_mark,
                       "'change' states differences of counts; a change of shares "
                       "is in percentage points, which a percent chart does not "
                       "state");
    return UG_OK;
}

/* Half a unit in the last decimal place of d as written without trailing
** zeros, doubled so it stays whole: 33.3 -> 0.1 (of 2 x 0.05). */
static ug_i128 doubled_half_unit(ug_dec d)
{
    ug_i128 unit = UG_DEC_SCALE;
    while (unit > 1 && d.v % unit)
        unit /= 10;
    return unit;
}

/* Each group's shares add to 100 within what the rounding of the shares as
** written allows: n shares each rounded to their last place are off by at
** most half a unit there, so 33 + 33 + 33 = 99 passes, 60 + 50 does not. */
static ug_status check_group_shares(loader *l, const ug_chart *c, size_t g)
{
    ug_i128 sum = 0, slack = 0;
    for (size_t i = 0; i < c->ncats; i++) {
        sum += c->cats[i].counts[g].v;
        slack += doubled_half_unit(c->cats[i].counts[g]);
    }
    ug_i128 off = sum - 100 * UG_DEC_SCALE;
    if (2 * (off < 0 ? -off : off) <= slack)
        return UG_OK;
    char got[64], allow[64], grp[UG_MAX_STRING + 16] = "";
    ug_dec_format((ug_dec){sum}, got);
    ug_ratio_format(slack, 2 * UG_DEC_SCALE, 6, allow);
    ug_dec allowed;
    if (ug_dec_parse(allow, strlen(allow), &allowed) == UG_DEC_OK)
        ug_dec_format(allowed, allow); /* without trailing zeros */
    if (c->groups.n)
        snprintf(grp, sizeof grp, "group '%s': ", c->groups.items[g].text);
    ug_mark at = c->cats[0].count_marks ? c->cats[0].count_marks[g] : c->categories_mark;
    return ug_fail(l->err, UG_EDATA, at,
                   "%sthe shares add to %s %%, not 100 %% (the rounding of the "
                   "shares as written allows 100 \u00b1 %s): add the missing share "
                   "as a category (such as 'not stated') or correct the shares",
                   grp, got, allow);
}

static ug_status check_shares(loader *l, const ug_chart *c)
{
    ug_status st = UG_OK;
    for (size_t g = 0; !st && g < chart_ngroups(c); g++)
        st = check_group_shares(l, c, g);
    return st;
}

/* A batch template's data is the --each-row CSV, a wide table with one group
** per row; counts written in the template are not used. */
static ug_status template_data(loader *l, ug_chart *t)
{
    if (t->data.category_column.text)
        return ug_fail(l->err, UG_ESCHEMA, t->data.category_column.mark,
                       "a batch reads a wide table (one row per chart, one column "
                       "per category); remove 'category-column' and 'count-column'");
    t->data.present = true;
    t->data.file = ug_arena_strdup(&t->arena, t->template_csv);
    if (!t->data.file)
        return ug_fail(l->err, UG_ENOMEM, ug_mark_file(t->template_csv), "out of memory");
    t->data.file_text = (ug_text){t->data.file, ug_mark_file(t->path)};
    memset(&t->groups, 0, sizeof t->groups);
    for (size_t i = 0; i < t->ncats; i++) {
        t->cats[i].counts = NULL;
        t->cats[i].count_marks = NULL;
        t->cats[i].withheld = NULL;
    }
    ug_status st = t->data.group_column.text ? UG_OK : data_first_header(t, l->err);
    return st ? st : data_load(t, l->err);
}

static ug_status finish_chart(loader *l, ug_chart *c, const layout_node *root)
{
    ug_status st = check_form(l, c, root);
    if (!st && chart_is_percent(c))
        st = check_percent_keys(l, c);
    if (st)
        return st;
    if (!c->ncats)
        return ug_fail(l->err, UG_ESCHEMA, root->mark,
                       "missing 'categories': a chart needs at least one category");
    for (size_t i = 0; i < c->ncats; i++)
        if ((st = check_category(l, c, i)) || (st = check_counts(l, c, i)))
            return st;
    if ((st = check_protection(l, c)))
        return st;
    if ((st = resolve_chart(c, l->err)))
        return st;
    if (c->is_template)
        st = template_data(l, c);
    else if (c->data.present && !(st = check_data_spec(l, c)))
        st = data_load(c, l->err);
    if (st)
        return st;
    if (c->change != UG_CHANGE_NONE && !c->is_template && c->groups.n < 2)
        return ug_fail(l->err, UG_ESCHEMA, c->change_mark,
                       "'change' compares periods: the chart needs at least two groups "
                       "(the periods, in order), it has %zu", c->groups.n);
    /* a batch template has its --each-row rows as groups by now */
    return chart_is_percent(c) ? check_shares(l, c) : UG_OK;
}

/* ---- loading a chart ----------------------------------------------------- */

/* A limit the caller leaves 0 comes from the thread's context. */
void layout_resolve_limits(ug_limits *out, const ug_limits *in)
{
    const ug_limits *d = &ug_ctx()->limits;
    out->max_file_bytes = in && in->max_file_bytes ? in->max_file_bytes : d->max_file_bytes;
    out->max_icons = in && in->max_icons ? in->max_icons : d->max_icons;
    out->max_panels = in && in->max_panels ? in->max_panels : d->max_panels;
    out->size = 0;
}

static ug_status check_ceilings(const ug_limits *lim, const char *path, ug_error *err)
{
    if (lim->max_icons > UG_CEILING_ICONS)
        return ug_fail(err, UG_ELIMIT, ug_mark_file(path), "an icon limit of %zu is "
                       "above the ceiling of %d", lim->max_icons, UG_CEILING_ICONS);
    if (lim->max_panels > UG_CEILING_PANELS)
        return ug_fail(err, UG_ELIMIT, ug_mark_file(path), "a panel limit of %zu is "
                       "above the ceiling of %d", lim->max_panels, UG_CEILING_PANELS);
    return UG_OK;
}

static const layout_node *find_key(const layout_node *map, const char *key)
{
    for (const layout_node *k = map->first; k; k = k->next->next)
        if (!strcmp(k->text, key))
            return k;
    return NULL;
}

/* The top of the file: a mapping, and of the kind the caller asked for. */
static ug_status check_root(const layout_node *root, const char *file, bool page,
                            ug_error *err)
{
    if (!root || layout_is_null(root))
        return ug_fail(err, UG_ESCHEMA, ug_mark_file(file),
                       "the file is empty: expected a %s", page
                       ? "page (page, panels, ...)" : "chart (title, categories, ...)");
    if (root->kind != LAYOUT_MAP)
        return ug_fail(err, UG_ESCHEMA, root->mark,
                       "expected a mapping of keys at the top of the file, not %s",
                       layout_kind_name(root));
    const layout_node *k = find_key(root, "page");
    if (k && !page)
        return ug_fail(err, UG_ESCHEMA, k->mark,
                       "this is a page file (it has a 'page' key), not a chart: "
                       "load it as a page");
    if (!k && page)
        return ug_fail(err, UG_ESCHEMA, root->mark,
                       "this is a chart file, not a page file: a page file has a "
                       "'page' key");
    return UG_OK;
}

ug_chart *layout_chart_new(const char *path, const char *dir, const ug_limits *limits)
{
    ug_chart *c = ug_calloc(1, sizeof *c);
    if (!c)
        return NULL;
    c->path = ug_arena_strdup(&c->arena, path);
    c->dir = dir ? ug_arena_strdup(&c->arena, dir) : layout_dir_of(&c->arena, path);
    if (!c->path || !c->dir) {
        ug_chart_free(c);
        return NULL;
    }
    layout_resolve_limits(&c->limits, limits);
    resolve_defaults(c);
    return c;
}

/* Build a chart from a mapping node (a chart file's root or an inline panel). */
ug_status layout_chart_from_node(ug_chart *c, const layout_node *root, ug_error *err)
{
    loader l;
    memset(&l, 0, sizeof l);
    l.arena = &c->arena;
    l.err = err;
    l.chart = c;
    ug_status st = layout_refuse_foreign(root, chart_keys, "chart layout", err);
    if (!st)
        st = layout_walk_map(&l, c, root, chart_keys);
    return st ? st : finish_chart(&l, c, root);
}


static ug_status fill_chart(void *model, const layout_node *root, ug_error *err)
{
    return layout_chart_from_node(model, root, err);
}

/* The node tree of the text of `path`, within the limits; it lives in
** `tree`, which the caller frees. */
static ug_status parse_within(const char *path, const ug_limits *lim,
                              const char *text, size_t len, ug_arena *tree,
                              layout_node **root, ug_error *err)
{
    ug_status st = check_ceilings(lim, path, err);
    if (st)
        return st;
    if (len > lim->max_file_bytes)
        return ug_fail(err, UG_ELIMIT, ug_mark_file(path),
                       "larger than the limit of %zu bytes (raise it with "
                       "--max-input-bytes)", lim->max_file_bytes);
    return layout_parse(text, len, path, tree, root, err);
}

/* Parse the text of `path` and hand its top mapping to `fill`; the node tree
** lives only as long as this call. */
ug_status layout_from_text(void *model, fill_fn fill, bool page, const char *path,
                           const ug_limits *lim, const char *text, size_t len,
                           ug_error *err)
{
    ug_arena tree = {0};
    layout_node *root = NULL;
    ug_status st = parse_within(path, lim, text, len, &tree, &root, err);
    if (!st)
        st = check_root(root, path, page, err);
    if (!st)
        st = fill(model, root, err);
    ug_arena_free(&tree);
    return st;
}

ug_status ug_chart_load_string(const char *text, size_t len, const char *name,
                               const ug_limits *limits, ug_chart **out,
                               ug_error *err)
{
    ug_error_clear(err);
    *out = NULL;
    ug_chart *c = layout_chart_new(name ? name : "<string>", NULL, limits);
    if (!c)
        return ug_fail(err, UG_ENOMEM, ug_mark_file(name), "out of memory");
    ug_status st = layout_from_text(c, fill_chart, false, c->path, &c->limits, text, len, err);
    if (st) {
        ug_chart_free(c);
        return st;
    }
    *out = c;
    return UG_OK;
}

static ug_status load_file(const char *path, const ug_limits *limits, ug_mark at,
                           char **text, size_t *len, ug_error *err);

ug_status layout_load_template(const char *path, const char *csv, const ug_limits *limits,
                               ug_chart **out, ug_error *err)
{
    char *text;
    size_t len;
    *out = NULL;
    ug_status st = load_file(path, limits, ug_mark_file(path), &text, &len, err);
    if (st)
        return st;
    ug_chart *c = layout_chart_new(path, NULL, limits);
    if (!c)
        st = ug_fail(err, UG_ENOMEM, ug_mark_file(path), "out of memory");
    else {
        c->is_template = true;
        c->template_csv = csv;
        st = layout_from_text(c, fill_chart, false, c->path, &c->limits, text, len, err);
        c->template_csv = NULL; /* the caller's; data.file holds a copy */
    }
    ug_free(text);
    if (st) {
        ug_chart_free(c);
        return st;
    }
    *out = c;
    return UG_OK;
}

/* Read a file and hand it to `load`; `at` is blamed when it cannot be read. */
static ug_status load_file(const char *path, const ug_limits *limits, ug_mark at,
                           char **text, size_t *len, ug_error *err)
{
    ug_limits lim;
    layout_resolve_limits(&lim, limits);
    ug_status st = layout_read_file(path, lim.max_file_bytes, at, text, len, err);
    if (!st && *len == 0) {
        ug_free(*text);
        *text = NULL;
        return ug_fail(err, UG_ESCHEMA, ug_mark_file(path),
                       "the file is empty: expected a chart or page layout");
    }
    return st;
}

/* Read a chart or page file and load it from its text. */
ug_status layout_load_path(const char *path, const ug_limits *limits, ug_mark at,
                           bool page, void **out, ug_error *err)
{
    char *text;
    size_t len;
    ug_chart *c = NULL;
    ug_page *p = NULL;
    ug_status st = load_file(path, limits, at, &text, &len, err);
    if (st)
        return st;
    if (page)
        st = ug_page_load_string(text, len, path, limits, &p, err);
    else
        st = ug_chart_load_string(text, len, path, limits, &c, err);
    *out = page ? (void *)p : (void *)c;
    ug_free(text);
    return st;
}

/* check_root's test, made on the parsed tree: a look at the bytes instead
** takes a `page:` in a comment or a quoted title for the key, and misses the
** key written in flow style, quoted, or after a byte-order mark. */
ug_status ug_layout_detect_string(const char *text, size_t len, const char *name,
                                  const ug_limits *limits, ug_layout_kind *out,
                                  ug_error *err)
{
    ug_error_clear(err);
    ug_limits lim;
    layout_resolve_limits(&lim, limits);
    *out = UG_LAYOUT_CHART;
    ug_arena tree = {0};
    layout_node *root = NULL;
    const char *path = name ? name : "<string>";
    ug_status st = parse_within(path, &lim, text, len, &tree, &root, err);
    if (!st && root && root->kind == LAYOUT_MAP && find_key(root, "page"))
        *out = UG_LAYOUT_PAGE;
    ug_arena_free(&tree);
    return st;
}

ug_status ug_layout_detect(const char *path, const ug_limits *limits,
                           ug_layout_kind *out, ug_error *err)
{
    ug_error_clear(err);
    char *text;
    size_t len;
    *out = UG_LAYOUT_CHART;
    ug_status st = load_file(path, limits, ug_mark_file(path), &text, &len, err);
    if (st)
        return st;
    st = ug_layout_detect_string(text, len, path, limits, out, err);
    ug_free(text);
    return st;
}

ug_status layout_chart_load_at(const char *path, const ug_limits *limits,
                               ug_mark at, ug_chart **out, ug_error *err)
{
    void *c = NULL;
    ug_status st = layout_load_path(path, limits, at, false, &c, err);
    *out = c;
    return st;
}

ug_status ug_chart_load(const char *path, const ug_limits *limits, ug_chart **out,
                        ug_error *err)
{
    ug_error_clear(err);
    return layout_chart_load_at(path, limits, ug_mark_file(path), out, err);
}

void ug_chart_free(ug_chart *chart)
{
    if (!chart)
        return;
    ug_arena_free(&chart->arena);
    ug_free(chart);
}

