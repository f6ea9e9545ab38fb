/*
** What the files of the layout stage share (layout_input.c, layout_tree.c,
** layout_keys.c, layout.c, layout_page.c) and nothing outside them uses.
*/
#ifndef UG_LAYOUT_INT_H
#define UG_LAYOUT_INT_H

#include "layout.h"

/* A list or mapping longer than this is refused while parsing, before any
** table is built from it; the specific limits (categories, groups) are
** checked later with their own messages. */
#define MAX_ITEMS (4 * UG_MAX_CATEGORIES)

/* No length on a chart or page needs more than this (about 26 m); larger ones
** would overflow the text layout's integer units (found by fuzz_draw). */
#define LAYOUT_MAX_LENGTH_PX 100000.0
/* The smallest text a type scale may name: 6 pt, 8 px (common practice for
** print, no source). */
#define LAYOUT_MIN_TYPE_PX 8.0

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

typedef enum {
    K_TEXT, K_MULTILINE, K_LIST, K_DEC, K_LONG, K_LENGTH, K_COLOR, K_ENUM,
    K_BOOL, K_MAP, K_FN
} key_kind;

typedef struct key_rule key_rule;
/* The most keys one table may hold (the chart's has 33); the walker marks
** which it has seen in an array this long. */
#define LAYOUT_MAX_KEYS 64

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

/* Fill a model (chart or page) from a node tree: one per kind of file. */
typedef ug_status (*fill_fn)(void *model, const layout_node *root, ug_error *err);


/* layout_input.c */
ug_status layout_scan_file(const char *text, size_t len, const char *file, ug_error *err);
char *layout_dir_of(ug_arena *a, const char *path);

/* layout_keys.c */
const char *layout_kind_name(const layout_node *n);
ug_status layout_nomem(loader *l, const layout_node *n);
bool layout_is_null(const layout_node *n);
ug_status layout_want_scalar(loader *l, const layout_node *n, const char *what);
ug_status layout_read_text(loader *l, const layout_node *n, bool multiline, ug_text *out);
ug_status layout_read_lang(loader *l, const layout_node *n, ug_text *out);
/* `number-format`'s names, by ug_number_format, for a chart and a page. */
extern const char *const layout_number_formats[];
ug_status layout_read_text_list(loader *l, const layout_node *n, ug_text_list *out);
ug_status layout_read_dec(loader *l, const layout_node *n, ug_dec *out);
ug_status layout_read_type_scale(loader *l, const layout_node *v, const key_rule *roles,
                                 double *px, ug_mark *mark);
ug_status layout_walk_map(loader *l, void *base, const layout_node *map, const key_rule *t);
ug_status layout_refuse_foreign(const layout_node *root, const key_rule *t, const char *kind, ug_error *err);

/* layout.c */
ug_status layout_want_list(loader *l, const layout_node *v, size_t max, const char *what);
void *layout_arena_array(ug_arena *a, size_t n, size_t size);
void layout_resolve_limits(ug_limits *out, const ug_limits *in);
ug_chart *layout_chart_new(const char *path, const char *dir, const ug_limits *limits);
ug_status layout_chart_from_node(ug_chart *c, const layout_node *root, ug_error *err);
ug_status layout_from_text(void *model, fill_fn fill, bool page, const char *path, const ug_limits *lim, const char *text, size_t len, ug_error *err);
ug_status layout_load_path(const char *path, const ug_limits *limits, ug_mark at, bool page, void **out, ug_error *err);
ug_status layout_chart_load_at(const char *path, const ug_limits *limits, ug_mark at, ug_chart **out, ug_error *err);

#endif
