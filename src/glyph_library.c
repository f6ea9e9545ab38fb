/*
** Glyph stage, the library side: which glyphs the search path offers, their
** keywords (glyphs/index.yaml, read with the layout's guarded YAML reader) and a contact sheet that
** draws every one of them through the same loader a chart uses.
**
** A name found in several folders is the first one on the search path, as in
** glyph_load. index.yaml is a sequence of {name, keywords, weight, ...}; a
** folder without one still lists its files. Output is sorted by name.
*/
#include <dirent.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>

#include "glyph.h"
#include "layout.h"
#include "svg.h"

typedef struct {
    char *name, *dir, *keywords; /* keywords joined with ", " */
    char *description;           /* the accessible name; NULL if the index gives none */
    int subject;                 /* index into glyph_subjects, -1 if none */
    double weight;               /* the index's stated inked area, -1 if none */
} entry;

/* The subject sets in display order. A glyph whose index entry names no
** subject (a user's own folder) is listed after them, under "Other". */
static const struct {
    const char *id, *title;
} subjects[] = {
    {"people", "People"},
    {"health-care", "Health and care"},
    {"housing", "Housing and homelessness"},
    {"food", "Food"},
    {"education", "Education"},
    {"work-money", "Work and money"},
    {"transport", "Transport"},
    {"environment-energy", "Environment and energy"},
    {"community", "Community services"},
    {"communication", "Communication and digital access"},
    {"safety-justice", "Safety and justice"},
};
#define NSUBJECTS (sizeof subjects / sizeof subjects[0])

/* Long enough for "A hospital bed with a raised head end" and its kind, short
** enough to read aloud as a screen reader's name for one icon. */
#define DESCRIPTION_MAX 80

size_t ug_glyph_subject_count(void) { return NSUBJECTS; }

const char *ug_glyph_subject_id(size_t i) { return i < NSUBJECTS ? subjects[i].id : NULL; }

const char *ug_glyph_subject_title(size_t i)
{
    return i < NSUBJECTS ? subjects[i].title : NULL;
}

static int subject_index(const char *id)
{
    for (size_t i = 0; i < NSUBJECTS; i++)
        if (strcmp(subjects[i].id, id) == 0)
            return (int)i;
    return -1;
}

struct ug_glyph_library {
    entry *e;
    size_t n;
    char **extra; /* --glyph-dir folders, for loading the glyphs again */
    size_t nextra;
};

void ug_glyph_library_free(ug_glyph_library *lib)
{
    if (!lib)
        return;
    for (size_t i = 0; i < lib->n; i++) {
        ug_free(lib->e[i].name);
        ug_free(lib->e[i].dir);
        ug_free(lib->e[i].keywords);
        ug_free(lib->e[i].description);
    }
    for (size_t i = 0; i < lib->nextra; i++)
        ug_free(lib->extra[i]);
    ug_free(lib->extra);
    ug_free(lib->e);
    ug_free(lib);
}

static entry *find_entry(ug_glyph_library *lib, const char *name)
{
    for (size_t i = 0; i < lib->n; i++)
        if (strcmp(lib->e[i].name, name) == 0)
            return &lib->e[i];
    return NULL;
}

static bool add_entry(ug_glyph_library *lib, const char *name, size_t len, const char *dir)
{
    entry *grown = ug_realloc(lib->e, (lib->n + 1) * sizeof *grown);
    if (!grown)
        return false;
    lib->e = grown;
    entry *e = &lib->e[lib->n];
    *e = (entry){ug_strndup(name, len), ug_strdup(dir), ug_strdup(""), NULL, -1, -1};
    if (e->name && e->dir && e->keywords) {
        lib->n++;
        return true;
    }
    ug_free(e->name);
    ug_free(e->dir);
    ug_free(e->keywords);
    return false;
}

/* NAME.svg files of one folder that no earlier folder already gave. */
static ug_status scan_dir(ug_glyph_library *lib, const char *dir, ug_error *err)
{
    DIR *d = opendir(dir);
    if (!d)
        return UG_OK; /* a folder on the path that does not exist offers nothing */
    ug_status st = UG_OK;
    char name[80];
    for (struct dirent *de; !st && (de = readdir(d));) {
        size_t len = strlen(de->d_name);
        if (len < 5 || len - 4 >= sizeof name || strcmp(de->d_name + len - 4, ".svg"))
            continue;
        snprintf(name, sizeof name, "%.*s", (int)(len - 4), de->d_name);
        if (glyph_is_library_name(name) && !find_entry(lib, name) &&
            !add_entry(lib, name, len - 4, dir))
            st = ug_fail(err, UG_ENOMEM, ug_mark_file(NULL), "out of memory");
    }
    closedir(d);
    return st;
}

/* ---- index.yaml ------------------------------------------------------------- */
/* Read with the layout's guarded reader: a size cap before parsing, no
** aliases, bounded depth and list lengths, so a hostile index in a
** --glyph-dir folder costs no more than a hostile layout. */

static const char *scalar(const layout_node *n)
{
    return n && n->kind == LAYOUT_SCALAR ? n->text : NULL;
}

static const layout_node *get_key(const layout_node *map, const char *key)
{
    for (const layout_node *k = map->first; k && k->next; k = k->next->next)
        if (scalar(k) && strcmp(k->text, key) == 0)
            return k->next;
    return NULL;
}

static char *join_keywords(const layout_node *kw)
{
    if (!kw)
        return ug_strdup("");
    if (kw->kind == LAYOUT_SCALAR)
        return ug_strdup(kw->text);
    ug_buf b;
    ug_buf_init(&b);
    ug_buf_puts(&b, "");
    if (kw->kind == LAYOUT_SEQ)
        for (const layout_node *i = kw->first; i; i = i->next)
            if (scalar(i))
                ug_buf_printf(&b, "%s%s", b.len ? ", " : "", i->text);
    char *out = NULL;
    if (ug_buf_take(&b, &out, NULL, NULL))
        out = NULL;
    return out;
}

static ug_mark mark_of(const layout_node *key_value, ug_mark fallback)
{
    return key_value ? key_value->mark : fallback;
}

/* A description is read aloud as the icon's name, so it is one short line. */
static ug_status index_description(entry *e, const layout_node *item, ug_error *err)
{
    const layout_node *v = get_key(item, "description");
    const char *d = scalar(v);
    if (!v)
        return ug_fail(err, UG_ESCHEMA, item->mark,
                       "glyph '%s' has a subject but no 'description'", e->name);
    if (!d || !*d)
        return ug_fail(err, UG_ESCHEMA, v->mark, "'description' of '%s' must be text", e->name);
    size_t n = strlen(d);
    if (n > DESCRIPTION_MAX)
        return ug_fail(err, UG_ESCHEMA, v->mark,
                       "'description' of '%s' is %zu bytes long (at most %d)", e->name, n,
                       DESCRIPTION_MAX);
    for (const unsigned char *c = (const unsigned char *)d; *c; c++)
        if (*c < 0x20 || *c == 0x7f)
            return ug_fail(err, UG_ESCHEMA, v->mark,
                           "'description' of '%s' must be one line of text", e->name);
    ug_free(e->description);
    if (!(e->description = ug_strdup(d)))
        return ug_fail(err, UG_ENOMEM, v->mark, "out of memory");
    return UG_OK;
}

static ug_status unknown_subject(const layout_node *v, const char *id, ug_error *err)
{
    ug_buf b;
    ug_buf_init(&b);
    for (size_t i = 0; i < NSUBJECTS; i++)
        ug_buf_printf(&b, "%s%s", i ? ", " : "", subjects[i].id);
    ug_status st = ug_fail(err, UG_ESCHEMA, v->mark, "unknown subject '%s' (one of: %s)",
                           id, b.failed ? "" : b.data);
    ug_buf_free(&b);
    return st;
}

/* Subject and description come together: a glyph in a subject set is one
** the library lists for readers, so it must say what it shows. */
static ug_status index_subject(entry *e, const layout_node *item, ug_error *err)
{
    const layout_node *v = get_key(item, "subject");
    e->subject = -1;
    if (!v) {
        if (get_key(item, "description"))
            return index_description(e, item, err);
        return UG_OK;
    }
    const char *id = scalar(v);
    if (!id)
        return ug_fail(err, UG_ESCHEMA, mark_of(v, item->mark),
                       "'subject' of '%s' must be one word", e->name);
    if ((e->subject = subject_index(id)) < 0)
        return unknown_subject(v, id, err);
    return index_description(e, item, err);
}

static ug_status index_item(ug_glyph_library *lib, const char *dir,
                            const layout_node *item, ug_error *err)
{
    ug_mark m = item->mark;
    if (item->kind != LAYOUT_MAP)
        return ug_fail(err, UG_ESCHEMA, m, "expected a mapping with 'name' and 'keywords'");
    const char *name = scalar(get_key(item, "name"));
    if (!name)
        return ug_fail(err, UG_ESCHEMA, m, "expected a 'name' key");
    entry *e = find_entry(lib, name);
    if (!e || strcmp(e->dir, dir) != 0)
        return UG_OK; /* described here, but no file (or shadowed by an earlier folder) */
    char *kw = join_keywords(get_key(item, "keywords"));
    if (!kw)
        return ug_fail(err, UG_ENOMEM, m, "out of memory");
    ug_free(e->keywords);
    e->keywords = kw;
    ug_status st = index_subject(e, item, err);
    if (st)
        return st;
    const char *w = scalar(get_key(item, "weight"));
    e->weight = -1;
    if (!w)
        return UG_OK;
    /* A plain decimal, as counts are read: strtod(3) would also take "nan",
    ** "inf" and hex floats. */
    ug_dec d;
    if (ug_dec_parse(w, strlen(w), &d) != UG_DEC_OK || d.v > UG_DEC_SCALE)
        return ug_fail(err, UG_ESCHEMA, m, "'weight' of '%s' must be a number from 0 to 1",
                       name);
    e->weight = (double)d.v / (double)UG_DEC_SCALE;
    return UG_OK;
}

static ug_status index_document(ug_glyph_library *lib, const char *dir,
                                const layout_node *root, ug_error *err)
{
    if (!root)
        return UG_OK; /* an empty index describes nothing */
    if (root->kind != LAYOUT_SEQ)
        return ug_fail(err, UG_ESCHEMA, root->mark,
                       "expected a list of glyphs (- name: ..., keywords: [...])");
    ug_status st = UG_OK;
    for (const layout_node *i = root->first; !st && i; i = i->next)
        st = index_item(lib, dir, i, err);
    return st;
}

static ug_status read_index(ug_glyph_library *lib, const char *dir, ug_error *err)
{
    size_t n = strlen(dir) + sizeof "/index.yaml";
    char *file = ug_malloc(n);
    if (!file)
        return ug_fail(err, UG_ENOMEM, ug_mark_file(dir), "out of memory");
    snprintf(file, n, "%s/index.yaml", dir);
    struct stat sb;
    if (lstat(file, &sb) != 0) {
        ug_free(file);
        return UG_OK; /* no index: names only */
    }
    ug_arena arena = {0};
    char *text = NULL;
    size_t len = 0;
    layout_node *root = NULL;
    ug_status st = layout_read_file(file, GLYPH_MAX_BYTES, ug_mark_file(file), &text,
                                    &len, err);
    if (!st)
        st = layout_parse(text, len, file, &arena, &root, err);
    if (!st)
        st = index_document(lib, dir, root, err);
    ug_free(text);
    ug_arena_free(&arena);
    ug_free(file);
    return st;
}

/* ---- opening ---------------------------------------------------------------- */

static int by_name(const void *a, const void *b)
{
    return strcmp(((const entry *)a)->name, ((const entry *)b)->name);
}

static ug_status copy_extra(ug_glyph_library *lib, const char *const *dirs, size_t ndirs,
                            ug_error *err)
{
    if (ndirs && !(lib->extra = ug_calloc(ndirs, sizeof *lib->extra)))
        return ug_fail(err, UG_ENOMEM, ug_mark_file(NULL), "out of memory");
    for (; lib->nextra < ndirs; lib->nextra++)
        if (!(lib->extra[lib->nextra] = ug_strdup(dirs[lib->nextra])))
            return ug_fail(err, UG_ENOMEM, ug_mark_file(NULL), "out of memory");
    return UG_OK;
}

/* Every folder's files first, then every index: an index describes only
** the glyphs its own folder gives. */
static ug_status fill(ug_glyph_library *lib, const char *const *path, ug_error *err)
{
    ug_status st = UG_OK;
    for (size_t i = 0; !st && path[i]; i++)
        st = scan_dir(lib, path[i], err);
    for (size_t i = 0; !st && path[i]; i++)
        st = read_index(lib, path[i], err);
    if (!st && lib->n)
        qsort(lib->e, lib->n, sizeof *lib->e, by_name);
    return st;
}

static ug_status finish(ug_glyph_library *lib, ug_status st, ug_glyph_library **out)
{
    if (st)
        ug_glyph_library_free(lib);
    else
        *out = lib;
    return st;
}

ug_status glyph_library_open_path(const char *const *path, ug_glyph_library **out,
                                  ug_error *err)
{
    *out = NULL;
    ug_glyph_library *lib = ug_calloc(1, sizeof *lib);
    if (!lib)
        return ug_fail(err, UG_ENOMEM, ug_mark_file(NULL), "out of memory");
    return finish(lib, fill(lib, path, err), out);
}

ug_status ug_glyph_library_open(const char *const *dirs, size_t ndirs,
                                ug_glyph_library **out, ug_error *err)
{
    ug_error_clear(err);
    *out = NULL;
    ug_glyph_library *lib = ug_calloc(1, sizeof *lib);
    if (!lib)
        return ug_fail(err, UG_ENOMEM, ug_mark_file(NULL), "out of memory");
    char **path = NULL;
    glyph_search s = {dirs, ndirs, NULL};
    ug_status st = copy_extra(lib, dirs, ndirs, err);
    if (!st)
        st = glyph_search_dirs(&s, &path, err);
    if (!st)
        st = fill(lib, (const char *const *)path, err);
    glyph_free_dirs(path);
    return finish(lib, st, out);
}

size_t ug_glyph_library_count(const ug_glyph_library *lib) { return lib->n; }

const char *ug_glyph_library_name(const ug_glyph_library *lib, size_t i)
{
    return i < lib->n ? lib->e[i].name : NULL;
}

const char *ug_glyph_library_keywords(const ug_glyph_library *lib, size_t i)
{
    return i < lib->n ? lib->e[i].keywords : NULL;
}

const char *ug_glyph_library_folder(const ug_glyph_library *lib, size_t i)
{
    return i < lib->n ? lib->e[i].dir : NULL;
}

const char *ug_glyph_library_description(const ug_glyph_library *lib, size_t i)
{
    return i < lib->n ? lib->e[i].description : NULL;
}

const char *ug_glyph_library_subject(const ug_glyph_library *lib, size_t i)
{
    return i < lib->n && lib->e[i].subject >= 0 ? subjects[lib->e[i].subject].id : NULL;
}

double glyph_library_weight(const ug_glyph_library *lib, size_t i)
{
    return i < lib->n ? lib->e[i].weight : -1;
}

/* ---- the contact sheet ------------------------------------------------------ */

#define SHEET_COLUMNS 8
#define SHEET_CELL_W 120
#define SHEET_CELL_H 136
#define SHEET_GLYPH 88
#define SHEET_PAD 16
#define SHEET_TOP 56

#define SHEET_HEADING 40

static const char *entry_subject(const entry *e)
{
    return e->subject >= 0 ? subjects[e->subject].id : NULL;
}

static bool in_group(const entry *e, const char *id)
{
    const char *s = entry_subject(e);
    return s && id ? strcmp(s, id) == 0 : s == id;
}

/* The groups drawn, in display order: every set (or only the one asked for),
** then "Other" for glyphs whose index names no subject. */
typedef struct {
    const char *id, *title;
} group;

static size_t sheet_groups(const char *only, group *g)
{
    size_t n = 0;
    for (size_t i = 0; i < NSUBJECTS; i++)
        if (!only || strcmp(only, subjects[i].id) == 0)
            g[n++] = (group){subjects[i].id, subjects[i].title};
    if (!only || strcmp(only, "other") == 0)
        g[n++] = (group){NULL, "Other"};
    return n;
}

static size_t group_size(const ug_glyph_library *lib, const char *id)
{
    size_t k = 0;
    for (size_t i = 0; i < lib->n; i++)
        k += in_group(&lib->e[i], id);
    return k;
}

/* Each cell is an image of its own, named by the glyph's description (the
** index's accessible name for it), so a screen reader can walk the sheet
** glyph by glyph (WAI-ARIA Graphics Module: graphics-document holding img). */
static void sheet_cell(ug_buf *b, size_t i, int top, const entry *e)
{
    const char *name = e->name;
    int x = SHEET_PAD + (int)(i % SHEET_COLUMNS) * SHEET_CELL_W;
    int y = top + (int)(i / SHEET_COLUMNS) * SHEET_CELL_H;
    int gx = x + (SHEET_CELL_W - SHEET_GLYPH) / 2;
    ug_buf_printf(b, "<g role=\"img\"><title>%s", name);
    if (e->description) {
        ug_buf_puts(b, ": ");
        svg_escape_text(b, e->description);
    }
    ug_buf_puts(b, "</title>\n");
    ug_buf_printf(b, "<rect x=\"%d\" y=\"%d\" width=\"%d\" height=\"%d\" fill=\"none\" "
                     "stroke=\"#d0d0d0\"/>\n", gx, y, SHEET_GLYPH, SHEET_GLYPH);
    ug_buf_printf(b, "<use href=\"#glyph-%s\" x=\"%d\" y=\"%d\" width=\"%d\" height=\"%d\"/>\n",
                  name, gx, y, SHEET_GLYPH, SHEET_GLYPH);
    ug_buf_printf(b, "<text x=\"%d\" y=\"%d\" aria-hidden=\"true\">%s</text></g>\n",
                  x + SHEET_CELL_W / 2, y + SHEET_GLYPH + 22, name);
}

/* One group: its title as a heading, then its cells; returns the next top. */
static int sheet_group(ug_buf *b, const ug_glyph_library *lib, const group *g, int top)
{
    size_t k = group_size(lib, g->id);
    if (!k)
        return top;
    ug_buf_printf(b, "<text x=\"%d\" y=\"%d\" text-anchor=\"start\" font-size=\"17\" "
                     "font-weight=\"bold\">%s</text>\n", SHEET_PAD, top + 26, g->title);
    top += SHEET_HEADING;
    for (size_t i = 0, j = 0; i < lib->n; i++)
        if (in_group(&lib->e[i], g->id))
            sheet_cell(b, j++, top, &lib->e[i]);
    return top + (int)((k + SHEET_COLUMNS - 1) / SHEET_COLUMNS) * SHEET_CELL_H;
}

static int sheet_height(const ug_glyph_library *lib, const group *g, size_t ng)
{
    int h = SHEET_TOP;
    for (size_t i = 0; i < ng; i++) {
        size_t k = group_size(lib, g[i].id);
        if (k)
            h += SHEET_HEADING + (int)((k + SHEET_COLUMNS - 1) / SHEET_COLUMNS) * SHEET_CELL_H;
    }
    return h + SHEET_PAD;
}

static void sheet_head(ug_buf *b, size_t n, int h)
{
    int w = 2 * SHEET_PAD + SHEET_COLUMNS * SHEET_CELL_W;
    ug_buf_printf(b, "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n"
                     "<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"%d\" height=\"%d\" "
                     "viewBox=\"0 0 %d %d\" role=\"graphics-document\" "
                     "aria-labelledby=\"sheet-title\">\n"
                     "<title id=\"sheet-title\">unitgram glyph library: %zu glyphs</title>\n"
                     "<rect width=\"%d\" height=\"%d\" fill=\"#ffffff\"/>\n",
                  w, h, w, h, n, w, h);
    ug_buf_printf(b, "<text x=\"%d\" y=\"34\" font-family=\"DejaVu Sans, sans-serif\" "
                     "font-size=\"20\" fill=\"#222222\">Glyph library (%zu glyphs; grey "
                     "frame = the 0 0 100 100 unit box)</text>\n", SHEET_PAD, n);
}

static ug_status sheet_defs(ug_buf *b, const ug_glyph_library *lib, const group *g,
                            size_t ng, ug_error *err)
{
    glyph_search s = {(const char *const *)lib->extra, lib->nextra, NULL};
    ug_status st = UG_OK;
    for (size_t k = 0; k < ng; k++)
        for (size_t i = 0; !st && i < lib->n; i++) {
            if (!in_group(&lib->e[i], g[k].id))
                continue;
            ug_glyph *gl = NULL;
            st = glyph_load(lib->e[i].name, &s, ug_mark_file(NULL), &gl, err);
            if (!st)
                ug_buf_printf(b, "<symbol id=\"glyph-%s\" viewBox=\"0 0 100 100\">%s</symbol>\n",
                              gl->name, gl->body);
            glyph_free(gl);
        }
    return st;
}

/* Names are library names ([a-z0-9-]) and titles come from the table above,
** so both are safe as ids and as text. */
ug_status ug_glyph_library_subject_sheet_svg(const ug_glyph_library *lib, const char *subject,
                                             char **out, size_t *len, ug_error *err)
{
    ug_error_clear(err);
    *out = NULL;
    group g[NSUBJECTS + 1];
    size_t ng = sheet_groups(subject, g), n = 0;
    if (!ng)
        return ug_fail(err, UG_ESCHEMA, ug_mark_file(NULL), "unknown subject '%s'", subject);
    for (size_t k = 0; k < ng; k++)
        n += group_size(lib, g[k].id);
    ug_buf b;
    ug_buf_init(&b);
    sheet_head(&b, n, sheet_height(lib, g, ng));
    ug_buf_puts(&b, "<defs>\n");
    ug_status st = sheet_defs(&b, lib, g, ng, err);
    ug_buf_puts(&b, "</defs>\n<g fill=\"#222222\" font-family=\"DejaVu Sans, sans-serif\" "
                    "font-size=\"13\" text-anchor=\"middle\">\n");
    for (size_t k = 0, top = SHEET_TOP; k < ng; k++)
        top = (size_t)sheet_group(&b, lib, &g[k], (int)top);
    ug_buf_puts(&b, "</g>\n</svg>\n");
    if (!st)
        st = ug_buf_take(&b, out, len, err);
    ug_buf_free(&b);
    return st;
}

ug_status ug_glyph_library_sheet_svg(const ug_glyph_library *lib, char **out, size_t *len,
                                     ug_error *err)
{
    return ug_glyph_library_subject_sheet_svg(lib, NULL, out, len, err);
}

/* ---- one glyph, as a layout would load it ------------------------------------ */

ug_status ug_glyph_check(const char *ref, const char *base_dir, const char *const *dirs,
                         size_t ndirs, char **warnings, double *ink, ug_error *err)
{
    ug_error_clear(err);
    *warnings = NULL;
    glyph_search s = {dirs, ndirs, base_dir};
    ug_glyph *g = NULL;
    ug_status st = glyph_load(ref, &s, ug_mark_file(ref), &g, err);
    if (st)
        return st;
    ug_buf b;
    ug_buf_init(&b);
    for (size_t i = 0; i < g->nremoved; i++)
        ug_buf_printf(&b, "removed %s\n", g->removed[i]);
    *ink = g->ink;
    glyph_free(g);
    st = ug_buf_take(&b, warnings, NULL, err);
    ug_buf_free(&b);
    return st;
}
