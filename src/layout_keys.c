/*
** The layout stage's key tables: typed values (text, lists, exact decimals,
** lengths, colours, enums) read from nodes, and a mapping walked against the
** table of the keys it may hold, with "did you mean" for a misspelt key.
*/
#include <assert.h>
#include <stdio.h>
#include <string.h>

#include "colorparse.h"
#include "layout_int.h"
#include "phrase.h"

/* ---- typed values -------------------------------------------------------- */


const char *layout_kind_name(const layout_node *n)
{
    if (n->kind == LAYOUT_SEQ)
        return "a list";
    if (n->kind == LAYOUT_MAP)
        return "a mapping";
    return "a single value";
}

ug_status layout_nomem(loader *l, const layout_node *n)
{
    return ug_fail(l->err, UG_ENOMEM, n->mark, "out of memory");
}

bool layout_is_null(const layout_node *n)
{
    return n->kind == LAYOUT_SCALAR && n->plain &&
           (!n->len || !strcmp(n->text, "~") || !strcmp(n->text, "null") ||
            !strcmp(n->text, "Null") || !strcmp(n->text, "NULL"));
}

ug_status layout_want_scalar(loader *l, const layout_node *n, const char *what)
{
    if (n->kind != LAYOUT_SCALAR)
        return ug_fail(l->err, UG_ESCHEMA, n->mark, "'%s' expects %s, not %s",
                       l->key, what, layout_kind_name(n));
    if (layout_is_null(n))
        return ug_fail(l->err, UG_ESCHEMA, n->mark, "'%s' is empty: expected %s",
                       l->key, what);
    return UG_OK;
}

ug_status layout_read_text(loader *l, const layout_node *n, bool multiline,
                           ug_text *out)
{
    ug_status st = layout_want_scalar(l, n, "a text");
    if (!st)
        st = layout_check_text(n->text, n->len, multiline, n->mark, l->err);
    if (st)
        return st;
    out->text = ug_arena_strndup(l->arena, n->text, n->len);
    out->mark = n->mark;
    return out->text ? UG_OK : layout_nomem(l, n);
}

/* `lang:` on a chart or a page: a BCP 47 tag with a catalog (FORMAT.md §6),
** checked by ICU through the phrase module. */
ug_status layout_read_lang(loader *l, const layout_node *n, ug_text *out)
{
    char why[300];
    ug_status st = layout_read_text(l, n, false, out);
    if (!st && phrase_check_lang(out->text, why, sizeof why))
        return ug_fail(l->err, UG_ESCHEMA, n->mark, "%s", why);
    return st;
}

/* A type scale (style.type, page.type): a mapping of roles, each a length,
** over the sizes already there (the defaults). `roles` names them largest
** first, NULL-ended; its offsets are into `px`. The scale must keep that
** order and stay legible, or titles and notes trade places. */
ug_status layout_read_type_scale(loader *l, const layout_node *v, const key_rule *roles,
                                 double *px, ug_mark *mark)
{
    ug_status st = layout_walk_map(l, px, v, roles);
    if (st)
        return st;
    *mark = v->mark;
    for (size_t i = 0; roles[i].name; i++) {
        if (px[i] < LAYOUT_MIN_TYPE_PX)
            return ug_fail(l->err, UG_ESCHEMA, v->mark,
                           "'%s' is %gpx, below the legible minimum of 6pt (%gpx)",
                           roles[i].name, px[i], LAYOUT_MIN_TYPE_PX);
        if (i && px[i] > px[i - 1])
            return ug_fail(l->err, UG_ESCHEMA, v->mark,
                           "a type scale runs from largest to smallest, but '%s' "
                           "(%gpx) is larger than '%s' (%gpx)", roles[i].name, px[i],
                           roles[i - 1].name, px[i - 1]);
    }
    return UG_OK;
}

/* A single text or a list of texts (source, notes, groups, audit.ignore). */
ug_status layout_read_text_list(loader *l, const layout_node *n, ug_text_list *out)
{
    out->mark = n->mark;
    if (n->kind == LAYOUT_MAP)
        return ug_fail(l->err, UG_ESCHEMA, n->mark,
                       "'%s' expects a text or a list of texts, not a mapping",
                       l->key);
    size_t count = n->kind == LAYOUT_SEQ ? n->n : 1;
    out->items = ug_arena_alloc(l->arena, (count ? count : 1) * sizeof *out->items);
    if (!out->items)
        return layout_nomem(l, n);
    if (n->kind == LAYOUT_SCALAR) {
        out->n = 1;
        return layout_read_text(l, n, false, &out->items[0]);
    }
    for (const layout_node *it = n->first; it; it = it->next) {
        ug_status st = layout_read_text(l, it, false, &out->items[out->n]);
        if (st)
            return st;
        out->n++;
    }
    return UG_OK;
}

ug_status layout_read_dec(loader *l, const layout_node *n, ug_dec *out)
{
    ug_status st = layout_want_scalar(l, n, "a number");
    if (st)
        return st;
    ug_dec_result r = ug_dec_parse(n->text, n->len, out);
    if (r != UG_DEC_OK)
        return ug_fail(l->err, UG_EDATA, n->mark, "'%s': %s (found '%s')", l->key,
                       ug_dec_result_text(r), n->text);
    return UG_OK;
}

static ug_status read_long(loader *l, const layout_node *n, long lo, long hi,
                           long *out)
{
    ug_dec d;
    ug_status st = layout_want_scalar(l, n, "a whole number");
    if (st)
        return st;
    if (ug_dec_parse(n->text, n->len, &d) != UG_DEC_OK || d.v % UG_DEC_SCALE ||
        d.v / UG_DEC_SCALE < lo || d.v / UG_DEC_SCALE > hi)
        return ug_fail(l->err, UG_ESCHEMA, n->mark,
                       "'%s' expects a whole number from %ld to %ld (found '%s')",
                       l->key, lo, hi, n->text);
    *out = (long)(d.v / UG_DEC_SCALE);
    return UG_OK;
}

/* Absolute lengths of W3C CSS Values and Units (§ absolute lengths): 1in =
** 96px = 72pt = 25.4mm. A bare number is in px. */
bool layout_parse_length(const char *s, size_t n, double *px)
{
    static const struct { const char *unit; double per_px; } units[] = {
        {"px", 1.0}, {"in", 96.0}, {"pt", 96.0 / 72.0}, {"mm", 96.0 / 25.4}};
    double factor = 1.0;
    while (n && s[n - 1] == ' ')
        n--;
    for (size_t i = 0; i < sizeof units / sizeof units[0]; i++)
        if (n >= 2 && !memcmp(s + n - 2, units[i].unit, 2)) {
            factor = units[i].per_px;
            n -= 2;
            break;
        }
    ug_dec d;
    if (ug_dec_parse(s, n, &d) != UG_DEC_OK)
        return false;
    *px = ug_dec_to_double(d) * factor;
    return true;
}


static ug_status read_length(loader *l, const layout_node *n, bool positive,
                             double *out)
{
    ug_status st = layout_want_scalar(l, n, "a length");
    if (st)
        return st;
    if (!layout_parse_length(n->text, n->len, out) || (positive && *out <= 0))
        return ug_fail(l->err, UG_ESCHEMA, n->mark,
                       "'%s' expects a %slength such as 24, 24px, 12mm, 0.5in "
                       "or 10pt (found '%s')",
                       l->key, positive ? "positive " : "", n->text);
    if (*out > LAYOUT_MAX_LENGTH_PX)
        return ug_fail(l->err, UG_ELIMIT, n->mark,
                       "'%s' is longer than %.0fpx, the largest length allowed "
                       "(found '%s')", l->key, LAYOUT_MAX_LENGTH_PX, n->text);
    return UG_OK;
}

static ug_status read_color(loader *l, const layout_node *n, ug_color *out)
{
    ug_status st = layout_want_scalar(l, n, "a colour");
    if (st)
        return st;
    colorparse_rgb rgb;
    const char *why;
    if (!colorparse(n->text, n->len, &rgb, &why))
        return ug_fail(l->err, UG_ESCHEMA, n->mark, "'%s': '%s' %s", l->key,
                       n->text, why);
    out->r = rgb.r;
    out->g = rgb.g;
    out->b = rgb.b;
    out->set = true;
    out->mark = n->mark;
    return UG_OK;
}

static ug_status read_enum(loader *l, const layout_node *n,
                           const char *const *choices, int *out)
{
    ug_status st = layout_want_scalar(l, n, "a choice");
    if (st)
        return st;
    char list[256] = "";
    for (int i = 0; choices[i]; i++) {
        if (!strcmp(n->text, choices[i])) {
            *out = i;
            return UG_OK;
        }
        size_t used = strlen(list);
        snprintf(list + used, sizeof list - used, "%s%s", i ? " | " : "",
                 choices[i]);
    }
    return ug_fail(l->err, UG_ESCHEMA, n->mark, "'%s' expects one of %s (found '%s')",
                   l->key, list, n->text);
}

static ug_status read_bool(loader *l, const layout_node *n, bool *out)
{
    static const char *const yes[] = {"true", "True", "TRUE", "yes", "Yes", "on"};
    static const char *const no[] = {"false", "False", "FALSE", "no", "No", "off"};
    ug_status st = layout_want_scalar(l, n, "true or false");
    if (st)
        return st;
    for (size_t i = 0; i < sizeof yes / sizeof yes[0]; i++)
        if (!strcmp(n->text, yes[i]) || !strcmp(n->text, no[i])) {
            *out = !strcmp(n->text, yes[i]);
            return UG_OK;
        }
    return ug_fail(l->err, UG_ESCHEMA, n->mark, "'%s' expects true or false (found '%s')",
                   l->key, n->text);
}

/* ---- key tables ---------------------------------------------------------- */




/* Levenshtein distance, for "did you mean". Keys are short (< 32). */
static size_t edit_distance(const char *a, const char *b)
{
    size_t la = strlen(a), lb = strlen(b), row[33];
    if (la > 32 || lb > 32)
        return 99;
    for (size_t j = 0; j <= lb; j++)
        row[j] = j;
    for (size_t i = 1; i <= la; i++) {
        size_t diag = row[0];
        row[0] = i;
        for (size_t j = 1; j <= lb; j++) {
            size_t up = row[j];
            size_t best = diag + (a[i - 1] != b[j - 1]);
            if (up + 1 < best)
                best = up + 1;
            if (row[j - 1] + 1 < best)
                best = row[j - 1] + 1;
            row[j] = best;
            diag = up;
        }
    }
    return row[lb];
}

/* The key of t at most 2 edits from key (and less than half of it), if any. */
static const char *near_key(const char *key, const key_rule *t)
{
    const char *guess = NULL;
    size_t best = 3;
    for (; t->name; t++) {
        size_t d = edit_distance(key, t->name);
        if (d < best && d * 2 < strlen(t->name)) {
            best = d;
            guess = t->name;
        }
    }
    return guess;
}

/* "{label: Adults, over 65}": in a flow mapping the comma ends the label and
** "over 65" becomes a key with no value. Said as such, with the fix. */
static bool split_by_comma(const layout_node *k, const layout_node *prev_v)
{
    const layout_node *v = k->next;
    return prev_v && prev_v->kind == LAYOUT_SCALAR && prev_v->plain && k->plain &&
           v->kind == LAYOUT_SCALAR && v->plain && v->len == 0 &&
           prev_v->mark.line == k->mark.line;
}

static ug_status unknown_key(loader *l, const layout_node *k, const key_rule *t,
                             const layout_node *prev_k)
{
    if (prev_k && split_by_comma(k, prev_k->next))
        return ug_fail(l->err, UG_ESCHEMA, k->mark,
                       "unknown key '%s': a comma inside { } ends the value before it, "
                       "so '%s, %s' was read as two entries; put the value in quotes: "
                       "%s: \"%s, %s\"", k->text, prev_k->next->text, k->text,
                       prev_k->text, prev_k->next->text, k->text);
    const char *guess = near_key(k->text, t);
    if (guess)
        return ug_fail(l->err, UG_ESCHEMA, k->mark,
                       "unknown key '%s' (did you mean '%s'?)", k->text, guess);
    return ug_fail(l->err, UG_ESCHEMA, k->mark, "unknown key '%s'", k->text);
}



/* A file none of whose top-level keys is one this kind of file has, or a
** misspelling of one, is some other file (a password list, a config) named by
** mistake or on purpose: it is refused by name, quoting none of it. */
static bool is_key_of(const char *key, const key_rule *t)
{
    for (; t->name; t++)
        if (!strcmp(t->name, key))
            return true;
    return false;
}

ug_status layout_refuse_foreign(const layout_node *root, const key_rule *t,
                                const char *kind, ug_error *err)
{
    if (!root || root->kind != LAYOUT_MAP)
        return UG_OK;
    for (const layout_node *k = root->first; k; k = k->next->next)
        if (near_key(k->text, t) || is_key_of(k->text, t))
            return UG_OK;
    return ug_fail(err, UG_ESCHEMA, ug_mark_file(root->mark.file),
                   "not a %s: none of its top-level keys is one a %s has "
                   "(nothing of the file is shown here)", kind, kind);
}

static ug_status read_value(loader *l, void *base, const key_rule *r,
                            const layout_node *v)
{
    char *p = (char *)base + r->off;
    switch (r->kind) {
    case K_TEXT: return layout_read_text(l, v, false, (ug_text *)p);
    case K_MULTILINE: return layout_read_text(l, v, true, (ug_text *)p);
    case K_LIST: return layout_read_text_list(l, v, (ug_text_list *)p);
    case K_DEC: return layout_read_dec(l, v, (ug_dec *)p);
    case K_LONG: return read_long(l, v, r->lo, r->hi, (long *)p);
    case K_LENGTH: return read_length(l, v, r->lo == 1, (double *)p);
    case K_COLOR: return read_color(l, v, (ug_color *)p);
    case K_ENUM: return read_enum(l, v, r->choices, (int *)p);
    case K_BOOL: return read_bool(l, v, (bool *)p);
    case K_MAP: return layout_walk_map(l, base, v, r->sub);
    case K_FN: return r->fn(l, base, v);
    }
    return UG_OK;
}

static ug_status read_entry(loader *l, void *base, const key_rule *r,
                            const layout_node *v)
{
    const char *outer = l->key;
    l->key = r->name;
    ug_status st = read_value(l, base, r, v);
    l->key = outer;
    if (!st && r->mark)
        *(ug_mark *)((char *)base + r->mark) = v->mark;
    if (!st && r->flag)
        *(bool *)((char *)base + r->flag) = true;
    return st;
}

ug_status layout_walk_map(loader *l, void *base, const layout_node *map,
                          const key_rule *t)
{
    if (map->kind != LAYOUT_MAP)
        return ug_fail(l->err, UG_ESCHEMA, map->mark, "'%s' expects a mapping, not %s",
                       l->key ? l->key : "the file", layout_kind_name(map));
    ug_mark seen[LAYOUT_MAX_KEYS] = {{0}};
    const layout_node *prev_k = NULL;
    for (const layout_node *k = map->first; k; prev_k = k, k = k->next->next) {
        const layout_node *v = k->next;
        ug_status st = layout_check_text(k->text, k->len, false, k->mark, l->err);
        if (st)
            return st;
        size_t i = 0;
        while (t[i].name && strcmp(t[i].name, k->text))
            i++;
        if (!t[i].name)
            return unknown_key(l, k, t, prev_k);
        assert(i < LAYOUT_MAX_KEYS);
        if (seen[i].line)
            return ug_fail(l->err, UG_ESCHEMA, k->mark,
                           "duplicate key '%s' (first at line %u)", k->text,
                           seen[i].line);
        seen[i] = k->mark;
        st = read_entry(l, base, &t[i], v);
        if (st)
            return st;
    }
    return UG_OK;
}

