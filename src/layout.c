/*
** The layout stage: a chart or page file (YAML, FORMAT.md §1-2) -> the typed
** model of model.h, every value keeping the 1-based line and column it came
** from. libyaml's events are folded into a small node tree first (aliases
** refused, depth and sizes limited), then each mapping is walked against a
** table of the keys it may hold. Counts from CSV files are read by data.c.
*/
#include <assert.h>
#include <ctype.h>
#include <errno.h>
#include <fcntl.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>
#include <sys/stat.h>
#include <unistd.h>
#include <yaml.h>

#include "colorparse.h"
#include "audit.h"
#include "color.h"
#include "layout.h"

/* A list or mapping longer than this is refused while parsing, before any
** table is built from it; the specific limits (categories, groups) are
** checked later with their own messages. */
#define MAX_ITEMS (4 * UG_MAX_CATEGORIES)

/* ---- files and text ------------------------------------------------------ */

ug_status layout_read_file(const char *path, size_t max, ug_mark at,
                           char **text, size_t *len, ug_error *err)
{
    *text = NULL;
    /* Non-blocking, so a FIFO is refused below instead of waiting for a writer. */
    int fd = open(path, O_RDONLY | O_NONBLOCK | O_CLOEXEC);
    FILE *f = fd < 0 ? NULL : fdopen(fd, "rb");
    if (!f) {
        int e = errno;
        if (fd >= 0)
            close(fd);
        return ug_fail(err, UG_EIO, at, "cannot read '%s': %s", path, strerror(e));
    }
    struct stat st;
    ug_status rc = UG_OK;
    char *buf = NULL;
    if (fstat(fileno(f), &st) != 0 || !S_ISREG(st.st_mode)) {
        rc = ug_fail(err, UG_EIO, at, "cannot read '%s': not a regular file", path);
        goto out;
    }
    if ((unsigned long long)st.st_size > max) {
        rc = ug_fail(err, UG_ELIMIT, at,
                     "'%s' is larger than the limit of %zu bytes "
                     "(raise it with --max-input-bytes)", path, max);
        goto out;
    }
    size_t size = (size_t)st.st_size;
    if (!(buf = ug_malloc(size + 1))) {
        rc = ug_fail(err, UG_ENOMEM, at, "out of memory");
        goto out;
    }
    if (fread(buf, 1, size, f) != size) {
        rc = ug_fail(err, UG_EIO, at, "cannot read '%s': short read", path);
        goto out;
    }
    buf[size] = '\0';
    *text = buf;
    *len = size;
    buf = NULL;
out:
    ug_free(buf);
    fclose(f);
    return rc;
}

static bool is_control(unsigned long cp)
{
    return cp < 0x20 || cp == 0x7F || (cp >= 0x80 && cp <= 0x9F);
}

ug_status layout_check_text(const char *s, size_t n, bool multiline, ug_mark at,
                            ug_error *err)
{
    const unsigned char *u = (const unsigned char *)s;
    for (size_t i = 0; i < n;) {
        unsigned long cp;
        size_t k = ug_utf8_decode(s + i, n - i, &cp);
        if (!k)
            return ug_fail(err, UG_EDATA, at, "not UTF-8: invalid byte 0x%02X",
                           u[i]);
        if (cp == '\n' && !multiline)
            return ug_fail(err, UG_ESCHEMA, at,
                           "a line break is not allowed here (only in "
                           "'description' and text panels)");
        if (is_control(cp) && cp != '\n')
            return ug_fail(err, UG_ESCHEMA, at,
                           "control character U+%04lX is not allowed in text", cp);
        i += k;
    }
    return UG_OK;
}

/* The whole file before libyaml sees it: UTF-8, and no control characters
** besides tab and line ends. The mark counts code points, as libyaml does. */
static ug_status scan_file(const char *text, size_t len, const char *file,
                           ug_error *err)
{
    const unsigned char *u = (const unsigned char *)text;
    ug_mark m = {file, 1, 1};
    size_t i = len >= 3 && !memcmp(text, "\xEF\xBB\xBF", 3) ? 3 : 0;
    while (i < len) {
        unsigned long cp;
        size_t k = ug_utf8_decode(text + i, len - i, &cp);
        if (!k)
            return ug_fail(err, UG_EDATA, m, "not UTF-8: invalid byte 0x%02X",
                           u[i]);
        if (is_control(cp) && cp != '\t' && cp != '\n' && cp != '\r')
            return ug_fail(err, UG_ESYNTAX, m,
                           "control character U+%04lX is not allowed", cp);
        bool crlf = cp == '\r' && i + 1 < len && u[i + 1] == '\n';
        if ((cp == '\n' || cp == '\r') && !crlf) {
            m.line++;
            m.column = 1;
        } else if (!crlf) {
            m.column++;
        }
        i += k;
    }
    return UG_OK;
}

char *layout_join(ug_arena *a, const char *dir, const char *rel)
{
    if (!dir || !*dir || rel[0] == '/')
        return ug_arena_strdup(a, rel);
    size_t n = strlen(dir) + strlen(rel) + 2;
    char *p = ug_arena_alloc(a, n);
    if (p)
        snprintf(p, n, "%s/%s", dir, rel);
    return p;
}

static char *dir_of(ug_arena *a, const char *path)
{
    const char *slash = strrchr(path, '/');
    if (!slash)
        return ug_arena_strdup(a, "");
    return ug_arena_strndup(a, path, slash == path ? 1 : (size_t)(slash - path));
}

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
    ug_status st = scan_file(text, len, file, err);
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

/* ---- typed values -------------------------------------------------------- */

/* The loader's state while one chart or page is walked. */
typedef struct {
    ug_arena *arena;        /* the model's arena: every kept string goes here */
    ug_error *err;
    const char *key;        /* the key being read, for messages */
    /* per category, what the walk found and the checks after it need */
    const layout_node **count, **counts, **id;
    size_t cur;             /* the category being read */
    ug_chart *chart;
    ug_page *page;          /* while a page file is read */
} loader;

static const char *kind_name(const layout_node *n)
{
    if (n->kind == LAYOUT_SEQ)
        return "a list";
    if (n->kind == LAYOUT_MAP)
        return "a mapping";
    return "a single value";
}

static ug_status nomem(loader *l, const layout_node *n)
{
    return ug_fail(l->err, UG_ENOMEM, n->mark, "out of memory");
}

static bool is_null(const layout_node *n)
{
    return n->kind == LAYOUT_SCALAR && n->plain &&
           (!n->len || !strcmp(n->text, "~") || !strcmp(n->text, "null") ||
            !strcmp(n->text, "Null") || !strcmp(n->text, "NULL"));
}

static ug_status want_scalar(loader *l, const layout_node *n, const char *what)
{
    if (n->kind != LAYOUT_SCALAR)
        return ug_fail(l->err, UG_ESCHEMA, n->mark, "'%s' expects %s, not %s",
                       l->key, what, kind_name(n));
    if (is_null(n))
        return ug_fail(l->err, UG_ESCHEMA, n->mark, "'%s' is empty: expected %s",
                       l->key, what);
    return UG_OK;
}

static ug_status read_text(loader *l, const layout_node *n, bool multiline,
                           ug_text *out)
{
    ug_status st = want_scalar(l, n, "a text");
    if (!st)
        st = layout_check_text(n->text, n->len, multiline, n->mark, l->err);
    if (st)
        return st;
    out->text = ug_arena_strndup(l->arena, n->text, n->len);
    out->mark = n->mark;
    return out->text ? UG_OK : nomem(l, n);
}

/* A single text or a list of texts (source, notes, groups, audit.ignore). */
static ug_status read_text_list(loader *l, const layout_node *n, ug_text_list *out)
{
    out->mark = n->mark;
    if (n->kind == LAYOUT_MAP)
        return ug_fail(l->err, UG_ESCHEMA, n->mark,
                       "'%s' expects a text or a list of texts, not a mapping",
                       l->key);
    size_t count = n->kind == LAYOUT_SEQ ? n->n : 1;
    out->items = ug_arena_alloc(l->arena, (count ? count : 1) * sizeof *out->items);
    if (!out->items)
        return nomem(l, n);
    if (n->kind == LAYOUT_SCALAR) {
        out->n = 1;
        return read_text(l, n, false, &out->items[0]);
    }
    for (const layout_node *it = n->first; it; it = it->next) {
        ug_status st = read_text(l, it, false, &out->items[out->n]);
        if (st)
            return st;
        out->n++;
    }
    return UG_OK;
}

static ug_status read_dec(loader *l, const layout_node *n, ug_dec *out)
{
    ug_status st = want_scalar(l, n, "a number");
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
    ug_status st = want_scalar(l, n, "a whole number");
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

/* No length on a chart or page needs more than this (about 26 m); larger ones
** would overflow the text layout's integer units (found by fuzz_draw). */
#define LAYOUT_MAX_LENGTH_PX 100000.0

static ug_status read_length(loader *l, const layout_node *n, bool positive,
                             double *out)
{
    ug_status st = want_scalar(l, n, "a length");
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
    ug_status st = want_scalar(l, n, "a colour");
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
    ug_status st = want_scalar(l, n, "a choice");
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
    ug_status st = want_scalar(l, n, "true or false");
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

typedef enum {
    K_TEXT, K_MULTILINE, K_LIST, K_DEC, K_LONG, K_LENGTH, K_COLOR, K_ENUM,
    K_BOOL, K_MAP, K_FN
} key_kind;

typedef struct key_rule key_rule;
typedef ug_status (*key_fn)(loader *l, void *base, const layout_node *v);

/* One key a mapping may hold. Offsets are into the struct being filled;
** `mark` and `flag` are offsets of its ug_mark and `has_` bool (0: none —
** no model struct keeps a mark or flag first). */
struct key_rule {
    const char *name;
    key_kind kind;
    size_t off, mark, flag;
    long lo, hi;                     /* K_LONG range; K_LENGTH: lo 1 = > 0 */
    const char *const *choices;      /* K_ENUM */
    const key_rule *sub;             /* K_MAP: the nested table (NULL-ended) */
    key_fn fn;                       /* K_FN */
};

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

static ug_status walk_map(loader *l, void *base, const layout_node *map,
                          const key_rule *t);

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

static ug_status refuse_foreign(const layout_node *root, const key_rule *t,
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
    case K_TEXT: return read_text(l, v, false, (ug_text *)p);
    case K_MULTILINE: return read_text(l, v, true, (ug_text *)p);
    case K_LIST: return read_text_list(l, v, (ug_text_list *)p);
    case K_DEC: return read_dec(l, v, (ug_dec *)p);
    case K_LONG: return read_long(l, v, r->lo, r->hi, (long *)p);
    case K_LENGTH: return read_length(l, v, r->lo == 1, (double *)p);
    case K_COLOR: return read_color(l, v, (ug_color *)p);
    case K_ENUM: return read_enum(l, v, r->choices, (int *)p);
    case K_BOOL: return read_bool(l, v, (bool *)p);
    case K_MAP: return walk_map(l, base, v, r->sub);
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

static ug_status walk_map(loader *l, void *base, const layout_node *map,
                          const key_rule *t)
{
    if (map->kind != LAYOUT_MAP)
        return ug_fail(l->err, UG_ESCHEMA, map->mark, "'%s' expects a mapping, not %s",
                       l->key ? l->key : "the file", kind_name(map));
    ug_mark seen[32] = {{0}};
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
        assert(i < 32);
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

/* ---- chart keys ---------------------------------------------------------- */

static const char *const forms[] = {"rows", "waffle", NULL};
static const char *const changes[] = {"none", "previous", "first", NULL};
static const char *const roundings[] = {"whole", "partial", NULL};
static const char *const methods[] = {"largest-remainder", "sainte-lague", "dhondt",
                                      "biproportional", NULL};
static const char *const arrangements[] = {"inline", "split", NULL};
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
    ug_status st = read_dec(l, v, &c->icon_value);
    if (!st && c->icon_value.v == 0)
        return ug_fail(l->err, UG_EDATA, v->mark,
                       "'icon-value' must be more than zero (each icon stands "
                       "for this many)");
    return st;
}

static ug_status key_tolerance(loader *l, void *base, const layout_node *v)
{
    ug_chart *c = base;
    ug_status st = want_scalar(l, v, "a percentage");
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
static ug_status want_list(loader *l, const layout_node *v, size_t max,
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
    ug_status st = want_list(l, v, UG_MAX_GROUPS, "group names");
    if (!st)
        st = read_text_list(l, v, &c->groups);
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
    ug_status st = read_text(l, v, false, &t);
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
                       kind_name(v));
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

static void *arena_array(ug_arena *a, size_t n, size_t size)
{
    return n > SIZE_MAX / size ? NULL : ug_arena_alloc(a, n * size);
}

static ug_status key_categories(loader *l, void *base, const layout_node *v)
{
    ug_chart *c = base;
    ug_status st = want_list(l, v, UG_MAX_CATEGORIES, "category mappings");
    if (st)
        return st;
    c->cats = arena_array(l->arena, v->n, sizeof *c->cats);
    l->count = arena_array(l->arena, v->n, sizeof *l->count);
    l->counts = arena_array(l->arena, v->n, sizeof *l->counts);
    l->id = arena_array(l->arena, v->n, sizeof *l->id);
    if (!c->cats || !l->count || !l->counts || !l->id)
        return nomem(l, v);
    for (const layout_node *it = v->first; it; it = it->next) {
        l->cur = c->ncats;
        c->cats[l->cur].mark = it->mark;
        if (it->kind != LAYOUT_MAP)
            return ug_fail(l->err, UG_ESCHEMA, it->mark,
                           "each category must be a mapping (label, glyph, count, "
                           "...), not %s", kind_name(it));
        st = walk_map(l, &c->cats[l->cur], it, category_keys);
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
    ug_status st = want_list(l, v, (size_t)UG_MAX_GROUPS * 16, "{group, category} cells");
    if (st)
        return st;
    c->suppress_cells = arena_array(l->arena, v->n, sizeof *c->suppress_cells);
    if (!c->suppress_cells)
        return nomem(l, v);
    for (const layout_node *it = v->first; it; it = it->next) {
        ug_cell_ref *ref = &c->suppress_cells[c->nsuppress_cells];
        ref->mark = it->mark;
        if ((st = walk_map(l, ref, it, cell_ref_keys)))
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

/* `small-count`: a number, or the name of a published agency rule (audit.h). */
static ug_status key_small_count(loader *l, void *base, const layout_node *v)
{
    ug_chart *c = base;
    if (v->kind == LAYOUT_SCALAR && audit_small_count_preset(v->text))
        return read_text(l, v, false, &c->audit.small_count_preset);
    if (v->kind == LAYOUT_SCALAR && ug_dec_parse(v->text, v->len, &c->audit.small_count))
        return ug_fail(l->err, UG_ESCHEMA, v->mark,
                       "'small-count' expects a number or one of cms, cdc-wonder, "
                       "nhs-hes (found '%s')", v->text);
    return read_dec(l, v, &c->audit.small_count);
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
    ug_status st = read_text(l, v, false, &t);
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

static const key_rule style_keys[] = {
    {.name = "width", .kind = K_LENGTH, .off = CH(style.width), .lo = 1},
    {.name = "font", .kind = K_FN, .fn = key_font},
    {.name = "background", .kind = K_COLOR, .off = CH(style.background)},
    {.name = "ink", .kind = K_COLOR, .off = CH(style.ink)},
    {.name = "palette", .kind = K_ENUM, .off = CH(style.palette), .choices = palettes},
    {.name = NULL},
};

/* `rows: last N` or `rows: [name, ...]`: which rows of the CSV are the
** chart's groups (FORMAT.md §5). */
static ug_status key_data_rows(loader *l, void *base, const layout_node *v)
{
    ug_data_spec *d = &((ug_chart *)base)->data;
    d->rows_mark = v->mark;
    if (v->kind == LAYOUT_SEQ) {
        ug_status st = read_text_list(l, v, &d->rows_names);
        if (!st && !d->rows_names.n)
            st = ug_fail(l->err, UG_ESCHEMA, v->mark, "'rows' lists no row");
        return st;
    }
    ug_text t;
    ug_status st = read_text(l, v, false, &t);
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
     .choices = forms},
    {.name = "icon-value", .kind = K_FN, .fn = key_icon_value,
     .mark = CH(icon_value_mark), .flag = CH(has_icon_value)},
    {.name = "unit-label", .kind = K_TEXT, .off = CH(unit_label)},
    {.name = "group-label", .kind = K_TEXT, .off = CH(group_label)},
    {.name = "rounding", .kind = K_ENUM, .off = CH(rounding),
     .mark = CH(rounding_mark), .choices = roundings},
    {.name = "method", .kind = K_ENUM, .off = CH(method), .mark = CH(method_mark),
     .choices = methods},
    {.name = "icon", .kind = K_MAP, .sub = icon_keys, .mark = CH(icon_mark)},
    {.name = "columns", .kind = K_LONG, .off = CH(columns), .lo = 1, .hi = 1000,
     .mark = CH(columns_mark)},
    {.name = "cluster", .kind = K_LONG, .off = CH(cluster), .lo = 0, .hi = 1000},
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

/* Categories without a colour take the palette (src/color.c) in order,
** wrapping around — but the colours that reach the 3:1 non-text contrast of
** WCAG 2.1 SC 1.4.11 against this chart's background come first, so a chart
** that names no colours passes the audit's contrast rule as far as its palette
** allows (Okabe-Ito on white: green, blue, vermillion, purple, then the rest). */
static void assign_colors(ug_chart *c)
{
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

/* Lower-case ASCII letters and digits; every other run of ASCII becomes one
** '-'; other (UTF-8) bytes are kept, so "Niños" stays readable. */
static char *slug(ug_arena *a, const char *s)
{
    size_t n = strlen(s), k = 0;
    char *out = ug_arena_alloc(a, n + 1);
    if (!out)
        return NULL;
    for (; *s; s++) {
        unsigned char ch = (unsigned char)*s;
        if (ch >= 'A' && ch <= 'Z')
            out[k++] = (char)(ch - 'A' + 'a');
        else if ((ch >= 'a' && ch <= 'z') || (ch >= '0' && ch <= '9') || ch >= 0x80)
            out[k++] = (char)ch;
        else if (k && out[k - 1] != '-')
            out[k++] = '-';
    }
    while (k && out[k - 1] == '-')
        k--;
    out[k] = '\0';
    return out;
}

static ug_status check_category(loader *l, ug_chart *c, size_t i)
{
    ug_category *cat = &c->cats[i];
    if (!cat->label.text)
        return ug_fail(l->err, UG_ESCHEMA, cat->mark,
                       "a category needs a 'label' (the name shown in the key)");
    ug_mark at = l->id[i] ? l->id[i]->mark : cat->label.mark;
    if (!cat->id && !(cat->id = slug(l->arena, cat->label.text)))
        return ug_fail(l->err, UG_ENOMEM, cat->mark, "out of memory");
    if (!*cat->id)
        return ug_fail(l->err, UG_ESCHEMA, at,
                       "cannot make an id from label '%s': give the category an 'id'",
                       cat->label.text);
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
    if (c->cluster < 0)
        c->cluster = 0;
    return UG_OK;
}

static ug_status inline_count(loader *l, ug_chart *c, size_t i)
{
    ug_category *cat = &c->cats[i];
    cat->counts = arena_array(l->arena, 1, sizeof *cat->counts);
    cat->count_marks = arena_array(l->arena, 1, sizeof *cat->count_marks);
    if (!cat->counts || !cat->count_marks)
        return nomem(l, l->count[i]);
    l->key = "count";
    cat->count_marks[0] = l->count[i]->mark;
    return read_dec(l, l->count[i], &cat->counts[0]);
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
    cat->counts = arena_array(l->arena, list->n, sizeof *cat->counts);
    cat->count_marks = arena_array(l->arena, list->n, sizeof *cat->count_marks);
    if (!cat->counts || !cat->count_marks)
        return nomem(l, list);
    l->key = "counts";
    size_t g = 0;
    for (const layout_node *it = list->first; it; it = it->next, g++) {
        cat->count_marks[g] = it->mark;
        ug_status st = read_dec(l, it, &cat->counts[g]);
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

static ug_status finish_chart(loader *l, ug_chart *c, const layout_node *root)
{
    ug_status st = check_form(l, c, root);
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
    assign_colors(c);
    if (c->data.present && !c->is_template &&
        ((st = check_data_spec(l, c)) || (st = data_load(c, l->err))))
        return st;
    if (c->change != UG_CHANGE_NONE && !c->is_template && c->groups.n < 2)
        return ug_fail(l->err, UG_ESCHEMA, c->change_mark,
                       "'change' compares periods: the chart needs at least two groups "
                       "(the periods, in order), it has %zu", c->groups.n);
    return UG_OK;
}

/* ---- loading a chart ----------------------------------------------------- */

static void resolve_limits(ug_limits *out, const ug_limits *in)
{
    out->max_file_bytes = in && in->max_file_bytes ? in->max_file_bytes
                                                   : UG_DEFAULT_MAX_FILE;
    out->max_icons = in && in->max_icons ? in->max_icons : UG_DEFAULT_MAX_ICONS;
    out->max_panels = in && in->max_panels ? in->max_panels : UG_DEFAULT_MAX_PANELS;
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
    if (!root || is_null(root))
        return ug_fail(err, UG_ESCHEMA, ug_mark_file(file),
                       "the file is empty: expected a %s", page
                       ? "page (page, panels, ...)" : "chart (title, categories, ...)");
    if (root->kind != LAYOUT_MAP)
        return ug_fail(err, UG_ESCHEMA, root->mark,
                       "expected a mapping of keys at the top of the file, not %s",
                       kind_name(root));
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

static ug_chart *chart_new(const char *path, const char *dir, const ug_limits *limits)
{
    ug_chart *c = ug_calloc(1, sizeof *c);
    if (!c)
        return NULL;
    c->path = ug_arena_strdup(&c->arena, path);
    c->dir = dir ? ug_arena_strdup(&c->arena, dir) : dir_of(&c->arena, path);
    if (!c->path || !c->dir) {
        ug_chart_free(c);
        return NULL;
    }
    resolve_limits(&c->limits, limits);
    c->cells = 100;
    c->cluster = -1; /* not given: the form decides */
    c->icon_size = 24;
    c->icon_gap = 4;
    c->style.width = 0; /* not given: the packer's 800 px, which a `columns:` may widen */
    c->style.font = "DejaVu Sans";
    c->style.font_mark = ug_mark_file(c->path);
    c->style.background = (ug_color){0xFF, 0xFF, 0xFF, true, {NULL, 0, 0}};
    c->style.ink = (ug_color){0x22, 0x22, 0x22, true, {NULL, 0, 0}};
    c->audit.tolerance_percent.v = 10 * UG_DEC_SCALE;
    c->audit.small_count.v = 10 * UG_DEC_SCALE;
    return c;
}

/* Build a chart from a mapping node (a chart file's root or an inline panel). */
static ug_status chart_from_node(ug_chart *c, const layout_node *root, ug_error *err)
{
    loader l;
    memset(&l, 0, sizeof l);
    l.arena = &c->arena;
    l.err = err;
    l.chart = c;
    ug_status st = refuse_foreign(root, chart_keys, "chart layout", err);
    if (!st)
        st = walk_map(&l, c, root, chart_keys);
    return st ? st : finish_chart(&l, c, root);
}

/* Fill a model (chart or page) from a node tree: one per kind of file. */
typedef ug_status (*fill_fn)(void *model, const layout_node *root, ug_error *err);

static ug_status fill_chart(void *model, const layout_node *root, ug_error *err)
{
    return chart_from_node(model, root, err);
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
static ug_status from_text(void *model, fill_fn fill, bool page, const char *path,
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
    ug_chart *c = chart_new(name ? name : "<string>", NULL, limits);
    if (!c)
        return ug_fail(err, UG_ENOMEM, ug_mark_file(name), "out of memory");
    ug_status st = from_text(c, fill_chart, false, c->path, &c->limits, text, len, err);
    if (st) {
        ug_chart_free(c);
        return st;
    }
    *out = c;
    return UG_OK;
}

static ug_status load_file(const char *path, const ug_limits *limits, ug_mark at,
                           char **text, size_t *len, ug_error *err);

ug_status layout_load_template(const char *path, const ug_limits *limits,
                               ug_chart **out, ug_error *err)
{
    char *text;
    size_t len;
    *out = NULL;
    ug_status st = load_file(path, limits, ug_mark_file(path), &text, &len, err);
    if (st)
        return st;
    ug_chart *c = chart_new(path, NULL, limits);
    if (!c)
        st = ug_fail(err, UG_ENOMEM, ug_mark_file(path), "out of memory");
    else {
        c->is_template = true;
        st = from_text(c, fill_chart, false, c->path, &c->limits, text, len, err);
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
    resolve_limits(&lim, limits);
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
static ug_status load_path(const char *path, const ug_limits *limits, ug_mark at,
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
    resolve_limits(&lim, limits);
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

static ug_status chart_load_at(const char *path, const ug_limits *limits,
                               ug_mark at, ug_chart **out, ug_error *err)
{
    void *c = NULL;
    ug_status st = load_path(path, limits, at, false, &c, err);
    *out = c;
    return st;
}

ug_status ug_chart_load(const char *path, const ug_limits *limits, ug_chart **out,
                        ug_error *err)
{
    ug_error_clear(err);
    return chart_load_at(path, limits, ug_mark_file(path), out, err);
}

void ug_chart_free(ug_chart *chart)
{
    if (!chart)
        return;
    ug_arena_free(&chart->arena);
    ug_free(chart);
}

/* ---- page files (FORMAT.md §2) ------------------------------------------- */

static const char *const orientations[] = {"portrait", "landscape", NULL};

/* ISO 216 (A3, A4, A5) in mm; US Letter and Legal in inches. */
static const struct {
    const char *name;
    double w, h, unit_px;
} paper[] = {
    {"A3", 297, 420, 96.0 / 25.4}, {"A4", 210, 297, 96.0 / 25.4},
    {"A5", 148, 210, 96.0 / 25.4}, {"letter", 8.5, 11, 96.0},
    {"legal", 8.5, 14, 96.0},
};

/* "200mm x 250mm": two lengths around an 'x'. */
static bool custom_size(const char *s, double *w, double *h)
{
    const char *x = strchr(s, 'x');
    if (!x)
        return false;
    size_t n = (size_t)(x - s);
    while (n && s[n - 1] == ' ')
        n--;
    const char *rest = x + 1;
    while (*rest == ' ')
        rest++;
    return layout_parse_length(s, n, w) && layout_parse_length(rest, strlen(rest), h) && *w > 0 &&
           *w <= LAYOUT_MAX_LENGTH_PX && *h <= LAYOUT_MAX_LENGTH_PX &&
           *h > 0;
}

static ug_status key_page_size(loader *l, void *base, const layout_node *v)
{
    ug_page *p = base;
    ug_status st = read_text(l, v, false, &p->size);
    if (st)
        return st;
    for (size_t i = 0; i < sizeof paper / sizeof paper[0]; i++)
        if (!strcasecmp(v->text, paper[i].name)) {
            p->width = paper[i].w * paper[i].unit_px;
            p->height = paper[i].h * paper[i].unit_px;
            return UG_OK;
        }
    if (custom_size(v->text, &p->width, &p->height))
        return UG_OK;
    return ug_fail(l->err, UG_ESCHEMA, v->mark,
                   "'size' expects A3, A4, A5, letter, legal or \"WIDTH x HEIGHT\" "
                   "such as \"200mm x 250mm\" (found '%s')", v->text);
}

static ug_status key_panel_chart(loader *l, void *base, const layout_node *v)
{
    ug_panel *panel = base;
    ug_page *p = l->page;
    panel->kind = UG_PANEL_CHART;
    if (v->kind == LAYOUT_MAP) {
        if (!(panel->chart = chart_new(p->path, p->dir, &p->limits)))
            return nomem(l, v);
        return chart_from_node(panel->chart, v, l->err);
    }
    ug_status st = read_text(l, v, false, &panel->chart_file);
    if (st)
        return st;
    const char *path = layout_join(l->arena, p->dir, panel->chart_file.text);
    if (!path)
        return nomem(l, v);
    return chart_load_at(path, &p->limits, v->mark, &panel->chart, l->err);
}

#define PG(f) offsetof(ug_page, f)
#define PN(f) offsetof(ug_panel, f)
static const key_rule panel_keys[] = {
    {.name = "chart", .kind = K_FN, .fn = key_panel_chart},
    {.name = "text", .kind = K_MULTILINE, .off = PN(text)},
    {.name = "span", .kind = K_LONG, .off = PN(span), .lo = 1, .hi = 12},
    {.name = NULL},
};

static ug_status read_panel(loader *l, ug_panel *panel, const layout_node *v)
{
    panel->mark = v->mark;
    panel->span = 1;
    panel->kind = UG_PANEL_TEXT;
    ug_status st = walk_map(l, panel, v, panel_keys);
    if (st)
        return st;
    if (!panel->chart == !panel->text.text)
        return ug_fail(l->err, UG_ESCHEMA, v->mark,
                       "a panel holds either 'chart' or 'text' (one of them)");
    return UG_OK;
}

/* A printed page holds a handful of panels; each may load a chart file of up
** to the input limit, so the count bounds the memory one page file can ask for. */
static ug_status key_panels(loader *l, void *base, const layout_node *v)
{
    ug_page *p = base;
    ug_status st = want_list(l, v, SIZE_MAX, "panels (chart: or text:)");
    if (st)
        return st;
    if (v->n > p->limits.max_panels)
        return ug_fail(l->err, UG_ELIMIT, v->mark, "%zu panels, more than the limit of %zu "
                       "(raise it with --max-panels)", v->n, p->limits.max_panels);
    if (!(p->panels = arena_array(l->arena, v->n, sizeof *p->panels)))
        return nomem(l, v);
    for (const layout_node *it = v->first; it; it = it->next) {
        /* counted before reading, so a half-read chart is freed with the page */
        st = read_panel(l, &p->panels[p->npanels++], it);
        if (st)
            return st;
    }
    return UG_OK;
}

static const key_rule page_box_keys[] = {
    {.name = "size", .kind = K_FN, .fn = key_page_size},
    {.name = "orientation", .kind = K_ENUM, .off = PG(orientation),
     .choices = orientations},
    {.name = "margin", .kind = K_LENGTH, .off = PG(margin)},
    {.name = "columns", .kind = K_LONG, .off = PG(columns), .lo = 1, .hi = 12},
    {.name = NULL},
};

static const key_rule page_keys[] = {
    {.name = "page", .kind = K_MAP, .sub = page_box_keys, .mark = PG(page_mark)},
    {.name = "title", .kind = K_TEXT, .off = PG(title)},
    {.name = "source", .kind = K_LIST, .off = PG(source)},
    {.name = "panels", .kind = K_FN, .fn = key_panels, .mark = PG(panels_mark)},
    {.name = "shared-scale", .kind = K_BOOL, .off = PG(shared_scale),
     .mark = PG(shared_scale_mark)},
    {.name = NULL},
};

/* shared-scale: every chart that states an icon value or icon size states
** the same one as the first chart that does. */
static ug_status check_shared_scale(const ug_page *p, ug_error *err)
{
    const ug_chart *value = NULL, *size = NULL;
    for (size_t i = 0; i < p->npanels; i++) {
        const ug_chart *c = p->panels[i].chart;
        char a[48], b[48];
        if (!c)
            continue;
        if (c->has_icon_value && !c->icon_value_auto) {
            if (value && value->icon_value.v != c->icon_value.v)
                return ug_fail(err, UG_ESCHEMA, c->icon_value_mark,
                               "shared-scale: icon-value %s differs from %s stated "
                               "in %s:%u", ug_dec_format(c->icon_value, a),
                               ug_dec_format(value->icon_value, b), value->path,
                               value->icon_value_mark.line);
            value = value ? value : c;
        }
        if (c->icon_mark.line) {
            if (size && size->icon_size != c->icon_size)
                return ug_fail(err, UG_ESCHEMA, c->icon_mark,
                               "shared-scale: icon size %g differs from %g stated "
                               "in %s:%u", c->icon_size, size->icon_size, size->path,
                               size->icon_mark.line);
            size = size ? size : c;
        }
    }
    return UG_OK;
}

static ug_status finish_page(ug_page *p, const layout_node *root, ug_error *err)
{
    if (!p->npanels)
        return ug_fail(err, UG_ESCHEMA, root->mark,
                       "missing 'panels': a page needs at least one panel");
    bool landscape = p->orientation == UG_ORIENT_LANDSCAPE;
    if ((landscape && p->width < p->height) || (!landscape && p->width > p->height)) {
        double t = p->width;
        p->width = p->height;
        p->height = t;
    }
    if (2 * p->margin >= p->width || 2 * p->margin >= p->height)
        return ug_fail(err, UG_ESCHEMA, p->page_mark,
                       "the margins leave no room on the page");
    for (size_t i = 0; i < p->npanels; i++)
        if (p->panels[i].span > p->columns)
            return ug_fail(err, UG_ESCHEMA, p->panels[i].mark,
                           "the panel spans %ld columns but the page has %ld",
                           p->panels[i].span, p->columns);
    return p->shared_scale ? check_shared_scale(p, err) : UG_OK;
}

static ug_page *page_new(const char *path, const ug_limits *limits)
{
    ug_page *p = ug_calloc(1, sizeof *p);
    if (!p)
        return NULL;
    p->path = ug_arena_strdup(&p->arena, path);
    p->dir = dir_of(&p->arena, path);
    if (!p->path || !p->dir) {
        ug_page_free(p);
        return NULL;
    }
    resolve_limits(&p->limits, limits);
    p->width = paper[1].w * paper[1].unit_px; /* A4 */
    p->height = paper[1].h * paper[1].unit_px;
    p->margin = 15 * 96.0 / 25.4;
    p->columns = 1;
    return p;
}

static ug_status fill_page(void *model, const layout_node *root, ug_error *err)
{
    ug_page *p = model;
    loader l;
    memset(&l, 0, sizeof l);
    l.arena = &p->arena;
    l.err = err;
    l.page = p;
    ug_status st = refuse_foreign(root, page_keys, "page layout", err);
    if (!st)
        st = walk_map(&l, p, root, page_keys);
    return st ? st : finish_page(p, root, err);
}

ug_status ug_page_load_string(const char *text, size_t len, const char *name,
                              const ug_limits *limits, ug_page **out, ug_error *err)
{
    ug_error_clear(err);
    *out = NULL;
    ug_page *p = page_new(name ? name : "<string>", limits);
    if (!p)
        return ug_fail(err, UG_ENOMEM, ug_mark_file(name), "out of memory");
    ug_status st = from_text(p, fill_page, true, p->path, &p->limits, text, len, err);
    if (st) {
        ug_page_free(p);
        return st;
    }
    *out = p;
    return UG_OK;
}

ug_status ug_page_load(const char *path, const ug_limits *limits, ug_page **out,
                       ug_error *err)
{
    ug_error_clear(err);
    void *p = NULL;
    ug_status st = load_path(path, limits, ug_mark_file(path), true, &p, err);
    *out = p;
    return st;
}

void ug_page_free(ug_page *page)
{
    if (!page)
        return;
    for (size_t i = 0; i < page->npanels; i++)
        ug_chart_free(page->panels[i].chart);
    ug_arena_free(&page->arena);
    ug_free(page);
}
