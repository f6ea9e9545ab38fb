/*
** Glyph stage, the library side: which glyphs the search path offers, their
** keywords (glyphs/index.yaml, read with libyaml) and a contact sheet that
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
#include <yaml.h>

#include "glyph.h"

typedef struct {
    char *name, *dir, *keywords; /* keywords joined with ", " */
    double weight;               /* the index's stated inked area, -1 if none */
} entry;

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
    *e = (entry){ug_strndup(name, len), ug_strdup(dir), ug_strdup(""), -1};
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

static const char *scalar(yaml_document_t *doc, yaml_node_t *n)
{
    (void)doc;
    return n && n->type == YAML_SCALAR_NODE ? (const char *)n->data.scalar.value : NULL;
}

static yaml_node_t *get_key(yaml_document_t *doc, yaml_node_t *map, const char *key)
{
    for (yaml_node_pair_t *p = map->data.mapping.pairs.start;
         p < map->data.mapping.pairs.top; p++) {
        const char *k = scalar(doc, yaml_document_get_node(doc, p->key));
        if (k && strcmp(k, key) == 0)
            return yaml_document_get_node(doc, p->value);
    }
    return NULL;
}

static char *join_keywords(yaml_document_t *doc, yaml_node_t *kw)
{
    if (!kw)
        return ug_strdup("");
    if (kw->type == YAML_SCALAR_NODE)
        return ug_strdup(scalar(doc, kw));
    ug_buf b;
    ug_buf_init(&b);
    if (kw->type == YAML_SEQUENCE_NODE)
        for (yaml_node_item_t *i = kw->data.sequence.items.start;
             i < kw->data.sequence.items.top; i++) {
            const char *s = scalar(doc, yaml_document_get_node(doc, *i));
            if (s)
                ug_buf_printf(&b, "%s%s", b.len ? ", " : "", s);
        }
    char *out = NULL;
    if (ug_buf_take(&b, &out, NULL, NULL))
        out = NULL;
    return out;
}

static ug_status index_item(ug_glyph_library *lib, const char *dir, yaml_document_t *doc,
                            yaml_node_t *item, const char *file, ug_error *err)
{
    ug_mark m = {file, (unsigned)item->start_mark.line + 1,
                 (unsigned)item->start_mark.column + 1};
    if (item->type != YAML_MAPPING_NODE)
        return ug_fail(err, UG_ESCHEMA, m, "expected a mapping with 'name' and 'keywords'");
    const char *name = scalar(doc, get_key(doc, item, "name"));
    if (!name)
        return ug_fail(err, UG_ESCHEMA, m, "expected a 'name' key");
    entry *e = find_entry(lib, name);
    if (!e || strcmp(e->dir, dir) != 0)
        return UG_OK; /* described here, but no file (or shadowed by an earlier folder) */
    char *kw = join_keywords(doc, get_key(doc, item, "keywords"));
    if (!kw)
        return ug_fail(err, UG_ENOMEM, m, "out of memory");
    ug_free(e->keywords);
    e->keywords = kw;
    const char *w = scalar(doc, get_key(doc, item, "weight"));
    char *end = NULL;
    e->weight = w ? strtod(w, &end) : -1;
    if (w && (*end || e->weight < 0 || e->weight > 1))
        return ug_fail(err, UG_ESCHEMA, m, "'weight' of '%s' must be a number from 0 to 1",
                       name);
    return UG_OK;
}

static ug_status index_document(ug_glyph_library *lib, const char *dir,
                                yaml_document_t *doc, const char *file, ug_error *err)
{
    yaml_node_t *root = yaml_document_get_root_node(doc);
    if (!root)
        return UG_OK; /* an empty index describes nothing */
    if (root->type != YAML_SEQUENCE_NODE)
        return ug_fail(err, UG_ESCHEMA,
                       (ug_mark){file, (unsigned)root->start_mark.line + 1,
                                 (unsigned)root->start_mark.column + 1},
                       "expected a list of glyphs (- name: ..., keywords: [...])");
    ug_status st = UG_OK;
    for (yaml_node_item_t *i = root->data.sequence.items.start;
         !st && i < root->data.sequence.items.top; i++)
        st = index_item(lib, dir, doc, yaml_document_get_node(doc, *i), file, err);
    return st;
}

static ug_status read_index(ug_glyph_library *lib, const char *dir, ug_error *err)
{
    char file[4200];
    snprintf(file, sizeof file, "%s/index.yaml", dir);
    struct stat sb;
    if (stat(file, &sb) != 0)
        return UG_OK; /* no index: names only */
    if (sb.st_size > (off_t)GLYPH_MAX_BYTES)
        return ug_fail(err, UG_ELIMIT, ug_mark_file(file), "glyph index is larger than 1 MiB");
    FILE *f = fopen(file, "rb");
    if (!f)
        return ug_fail(err, UG_EIO, ug_mark_file(file), "cannot open the glyph index");
    yaml_parser_t parser;
    yaml_document_t doc;
    ug_status st = UG_OK;
    yaml_parser_initialize(&parser);
    yaml_parser_set_input_file(&parser, f);
    if (!yaml_parser_load(&parser, &doc)) {
        ug_mark m = {file, (unsigned)parser.problem_mark.line + 1,
                     (unsigned)parser.problem_mark.column + 1};
        st = ug_fail(err, UG_ESYNTAX, m, "YAML syntax: %s",
                     parser.problem ? parser.problem : "unknown problem");
    } else {
        st = index_document(lib, dir, &doc, file, err);
        yaml_document_delete(&doc);
    }
    yaml_parser_delete(&parser);
    fclose(f);
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

ug_status ug_glyph_library_open(const char *const *dirs, size_t ndirs,
                                ug_glyph_library **out, ug_error *err)
{
    *out = NULL;
    ug_glyph_library *lib = ug_calloc(1, sizeof *lib);
    if (!lib)
        return ug_fail(err, UG_ENOMEM, ug_mark_file(NULL), "out of memory");
    char **path = NULL;
    glyph_search s = {dirs, ndirs, NULL};
    ug_status st = copy_extra(lib, dirs, ndirs, err);
    if (!st)
        st = glyph_search_dirs(&s, &path, err);
    for (size_t i = 0; !st && path[i]; i++)
        st = scan_dir(lib, path[i], err);
    for (size_t i = 0; !st && path[i]; i++)
        st = read_index(lib, path[i], err);
    glyph_free_dirs(path);
    if (st) {
        ug_glyph_library_free(lib);
        return st;
    }
    if (lib->n)
        qsort(lib->e, lib->n, sizeof *lib->e, by_name);
    *out = lib;
    return UG_OK;
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

static void sheet_cell(ug_buf *b, size_t i, const char *name)
{
    int x = SHEET_PAD + (int)(i % SHEET_COLUMNS) * SHEET_CELL_W;
    int y = SHEET_TOP + (int)(i / SHEET_COLUMNS) * SHEET_CELL_H;
    int gx = x + (SHEET_CELL_W - SHEET_GLYPH) / 2;
    ug_buf_printf(b, "<rect x=\"%d\" y=\"%d\" width=\"%d\" height=\"%d\" fill=\"none\" "
                     "stroke=\"#d0d0d0\"/>\n", gx, y, SHEET_GLYPH, SHEET_GLYPH);
    ug_buf_printf(b, "<use href=\"#glyph-%s\" x=\"%d\" y=\"%d\" width=\"%d\" height=\"%d\"/>\n",
                  name, gx, y, SHEET_GLYPH, SHEET_GLYPH);
    ug_buf_printf(b, "<text x=\"%d\" y=\"%d\">%s</text>\n", x + SHEET_CELL_W / 2,
                  y + SHEET_GLYPH + 22, name);
}

static void sheet_head(ug_buf *b, size_t n)
{
    size_t rows = (n + SHEET_COLUMNS - 1) / SHEET_COLUMNS;
    int w = 2 * SHEET_PAD + SHEET_COLUMNS * SHEET_CELL_W;
    int h = SHEET_TOP + (int)rows * SHEET_CELL_H + SHEET_PAD;
    ug_buf_printf(b, "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n"
                     "<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"%d\" height=\"%d\" "
                     "viewBox=\"0 0 %d %d\" role=\"img\" aria-labelledby=\"sheet-title\">\n"
                     "<title id=\"sheet-title\">unitgram glyph library: %zu glyphs</title>\n"
                     "<rect width=\"%d\" height=\"%d\" fill=\"#ffffff\"/>\n",
                  w, h, w, h, n, w, h);
    ug_buf_printf(b, "<text x=\"%d\" y=\"34\" font-family=\"DejaVu Sans, sans-serif\" "
                     "font-size=\"20\" fill=\"#222222\">Glyph library (%zu glyphs; grey "
                     "frame = the 0 0 100 100 unit box)</text>\n", SHEET_PAD, n);
}

/* Names are library names ([a-z0-9-]), so they are safe as ids and as text. */
ug_status ug_glyph_library_sheet_svg(const ug_glyph_library *lib, char **out,
                                     size_t *len, ug_error *err)
{
    *out = NULL;
    glyph_search s = {(const char *const *)lib->extra, lib->nextra, NULL};
    ug_buf b;
    ug_buf_init(&b);
    sheet_head(&b, lib->n);
    ug_buf_puts(&b, "<defs>\n");
    ug_status st = UG_OK;
    for (size_t i = 0; !st && i < lib->n; i++) {
        ug_glyph *g = NULL;
        st = glyph_load(lib->e[i].name, &s, ug_mark_file(NULL), &g, err);
        if (!st)
            ug_buf_printf(&b, "<symbol id=\"glyph-%s\" viewBox=\"0 0 100 100\">%s</symbol>\n",
                          g->name, g->body);
        glyph_free(g);
    }
    ug_buf_puts(&b, "</defs>\n<g fill=\"#222222\" font-family=\"DejaVu Sans, sans-serif\" "
                    "font-size=\"13\" text-anchor=\"middle\">\n");
    for (size_t i = 0; i < lib->n; i++)
        sheet_cell(&b, i, lib->e[i].name);
    ug_buf_puts(&b, "</g>\n</svg>\n");
    if (!st)
        st = ug_buf_take(&b, out, len, err);
    ug_buf_free(&b);
    return st;
}

/* ---- one glyph, as a layout would load it ------------------------------------ */

ug_status ug_glyph_check(const char *ref, const char *base_dir, const char *const *dirs,
                         size_t ndirs, char **warnings, double *ink, ug_error *err)
{
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
