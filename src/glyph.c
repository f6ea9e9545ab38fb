/*
** Glyph stage: a glyph reference -> inert markup in the 0 0 100 100 unit box.
**
** Glyph files are read with libxml2 with the network off and entities left
** unexpanded; a document with a DTD is refused outright, which closes both the
** external-entity and the entity-expansion doors. What survives is rebuilt from
** a short list of drawing elements and geometry attributes, so nothing the
** file says can become script, a link or a fetch in our output.
*/
#include <libxml/parser.h>
#include <libxml/tree.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#include "glyph.h"

#define GLYPH_MAX_BYTES (1u << 20)
#define GLYPH_MAX_DEPTH 16
#define GLYPH_MAX_ELEMENTS 2000

static const char *const primitives[][2] = {
    {"square", "<rect width=\"100\" height=\"100\"/>"},
    {"rounded-square", "<rect width=\"100\" height=\"100\" rx=\"18\"/>"},
    {"circle", "<circle cx=\"50\" cy=\"50\" r=\"50\"/>"},
};

static const char *const kept_elements[] = {
    "g", "path", "circle", "ellipse", "rect", "line", "polyline", "polygon"};

static const char *const kept_attributes[] = {
    "d", "cx", "cy", "r", "rx", "ry", "x", "y", "width", "height",
    "x1", "y1", "x2", "y2", "points", "fill-rule", "clip-rule", "transform"};

static bool in_list(const char *s, const char *const *list, size_t n)
{
    for (size_t i = 0; i < n; i++)
        if (strcmp(s, list[i]) == 0)
            return true;
    return false;
}

#define IN(s, list) in_list((s), (list), sizeof(list) / sizeof((list)[0]))

/* ---- the glyph object ----------------------------------------------------- */

void glyph_free(ug_glyph *g)
{
    if (!g)
        return;
    for (size_t i = 0; i < g->nremoved; i++)
        ug_free(g->removed[i]);
    ug_free(g->removed);
    ug_free(g->name);
    ug_free(g->body);
    ug_free(g);
}

static ug_glyph *glyph_new(const char *ref)
{
    ug_glyph *g = ug_calloc(1, sizeof *g);
    if (g && !(g->name = ug_strdup(ref))) {
        ug_free(g);
        g = NULL;
    }
    return g;
}

static void note_removed(ug_glyph *g, const char *what, const char *name)
{
    char line[160];
    snprintf(line, sizeof line, "%s '%.100s'", what, name);
    for (size_t i = 0; i < g->nremoved; i++)
        if (strcmp(g->removed[i], line) == 0)
            return;
    char **grown = ug_realloc(g->removed, (g->nremoved + 1) * sizeof *grown);
    if (!grown)
        return;
    g->removed = grown;
    if ((g->removed[g->nremoved] = ug_strdup(line)))
        g->nremoved++;
}

/* ---- rebuilding the drawing ----------------------------------------------- */

/* Geometry values are numbers, commands and separators; anything else (a url(),
** a quote, a semicolon) has no business in a path and is dropped. */
static bool plain_geometry(const char *v)
{
    for (; *v; v++)
        if (!strchr("0123456789.,-+eE MmLlHhVvCcSsQqTtAaZz\t\n\r()", *v) &&
            !strchr("abcdefghijklmnopqrstuvwxyz", *v))
            return false;
    return true;
}

static void escape_attr(ug_buf *b, const char *v)
{
    for (; *v; v++) {
        if (*v == '&')
            ug_buf_puts(b, "&amp;");
        else if (*v == '<')
            ug_buf_puts(b, "&lt;");
        else if (*v == '"')
            ug_buf_puts(b, "&quot;");
        else
            ug_buf_add(b, v, 1);
    }
}

static void copy_attributes(ug_glyph *g, xmlNode *n, ug_buf *b)
{
    for (xmlAttr *a = n->properties; a; a = a->next) {
        const char *name = (const char *)a->name;
        xmlChar *value = xmlNodeListGetString(n->doc, a->children, 1);
        const char *v = value ? (const char *)value : "";
        if (IN(name, kept_attributes) && !a->ns && plain_geometry(v)) {
            ug_buf_printf(b, " %s=\"", name);
            escape_attr(b, v);
            ug_buf_puts(b, "\"");
        } else if (strcmp(name, "id") != 0 && strcmp(name, "class") != 0) {
            note_removed(g, "attribute", name);
        }
        xmlFree(value);
    }
}

static ug_status copy_children(ug_glyph *g, xmlNode *parent, ug_buf *b, int depth,
                               int *elements)
{
    if (depth > GLYPH_MAX_DEPTH)
        return UG_ELIMIT;
    for (xmlNode *n = parent->children; n; n = n->next) {
        if (n->type != XML_ELEMENT_NODE)
            continue;
        const char *name = (const char *)n->name;
        if (++*elements > GLYPH_MAX_ELEMENTS)
            return UG_ELIMIT;
        if (!IN(name, kept_elements)) {
            if (strcmp(name, "title") && strcmp(name, "desc") && strcmp(name, "metadata"))
                note_removed(g, "element", name);
            continue;
        }
        ug_buf_printf(b, "<%s", name);
        copy_attributes(g, n, b);
        ug_buf_puts(b, ">");
        ug_status st = copy_children(g, n, b, depth + 1, elements);
        if (st)
            return st;
        ug_buf_printf(b, "</%s>", name);
    }
    return UG_OK;
}

/* ---- reading a file --------------------------------------------------------- */

static ug_status read_file(const char *path, ug_mark where, char **out,
                           size_t *len, ug_error *err)
{
    FILE *f = fopen(path, "rb");
    if (!f)
        return ug_fail(err, UG_EIO, where, "cannot open glyph file '%s'", path);
    ug_buf b;
    ug_buf_init(&b);
    char chunk[8192];
    size_t n;
    while ((n = fread(chunk, 1, sizeof chunk, f)) > 0 && b.len <= GLYPH_MAX_BYTES)
        ug_buf_add(&b, chunk, n);
    fclose(f);
    if (b.len > GLYPH_MAX_BYTES) {
        ug_buf_free(&b);
        return ug_fail(err, UG_ELIMIT, where,
                       "glyph file '%s' is larger than %u bytes", path,
                       GLYPH_MAX_BYTES);
    }
    return ug_buf_take(&b, out, len, err);
}

static ug_status parse_svg(ug_glyph *g, const char *path, const char *text,
                           size_t len, ug_mark where, ug_error *err)
{
    xmlDoc *doc = xmlReadMemory(text, (int)len, path, NULL,
                                XML_PARSE_NONET | XML_PARSE_NOERROR |
                                    XML_PARSE_NOWARNING);
    if (!doc)
        return ug_fail(err, UG_ESYNTAX, where, "glyph file '%s' is not well-formed XML",
                       path);
    ug_status st = UG_OK;
    xmlNode *root = xmlDocGetRootElement(doc);
    if (doc->intSubset || doc->extSubset)
        st = ug_fail(err, UG_ESCHEMA, where,
                     "glyph file '%s' has a DTD; DTDs and entities are not allowed", path);
    else if (!root || strcmp((const char *)root->name, "svg") != 0)
        st = ug_fail(err, UG_ESCHEMA, where, "glyph file '%s' has no <svg> root", path);
    if (!st) {
        ug_buf b;
        ug_buf_init(&b);
        int elements = 0;
        st = copy_children(g, root, &b, 0, &elements);
        if (st == UG_ELIMIT)
            ug_fail(err, st, where, "glyph file '%s' nests too deep or has too many elements",
                    path);
        if (!st)
            st = ug_buf_take(&b, &g->body, NULL, err);
        ug_buf_free(&b);
    }
    xmlFreeDoc(doc);
    return st;
}

/* ---- the search path -------------------------------------------------------- */

#ifndef UG_DATADIR
#define UG_DATADIR "/usr/local/share/unitgram/glyphs"
#endif

/* The project's own glyphs/ folder, found from the running binary
** (build/unitgram -> ../glyphs), then the installed data folder. */
const char *const *glyph_default_dirs(void)
{
    static char project[4096];
    static const char *dirs[3];
    if (!dirs[0]) {
        char exe[4000];
        ssize_t n = readlink("/proc/self/exe", exe, sizeof exe - 1);
        size_t k = 0;
        if (n > 0) {
            exe[n] = '\0';
            char *slash = strrchr(exe, '/');
            if (slash)
                *slash = '\0';
            snprintf(project, sizeof project, "%s/../glyphs", exe);
            dirs[k++] = project;
        }
        dirs[k++] = UG_DATADIR;
        dirs[k] = NULL;
    }
    return dirs;
}

static bool is_library_name(const char *ref)
{
    if (!*ref || strlen(ref) > 64)
        return false;
    for (const char *p = ref; *p; p++)
        if (!((*p >= 'a' && *p <= 'z') || (*p >= '0' && *p <= '9') || *p == '-'))
            return false;
    return true;
}

static bool try_dir(const char *dir, const char *name, char *path, size_t size)
{
    struct stat st;
    snprintf(path, size, "%s/%s.svg", dir, name);
    return stat(path, &st) == 0 && S_ISREG(st.st_mode);
}

static bool find_in_list(const char *list, const char *name, char *path, size_t size)
{
    char dir[4096];
    while (list && *list) {
        size_t n = strcspn(list, ":");
        snprintf(dir, sizeof dir, "%.*s", (int)n, list);
        if (n && try_dir(dir, name, path, size))
            return true;
        list += n + (list[n] == ':');
    }
    return false;
}

static bool find_library(const char *name, const glyph_search *s, char *path,
                         size_t size)
{
    for (const char *const *d = glyph_default_dirs(); *d; d++)
        if (try_dir(*d, name, path, size))
            return true;
    if (find_in_list(getenv("UNITGRAM_GLYPH_PATH"), name, path, size))
        return true;
    for (size_t i = 0; s && i < s->ndirs; i++)
        if (try_dir(s->dirs[i], name, path, size))
            return true;
    return false;
}

/* ---- loading ---------------------------------------------------------------- */

static ug_status load_file(ug_glyph *g, const char *path, ug_mark where,
                           ug_error *err)
{
    char *text = NULL;
    size_t len = 0;
    ug_status st = read_file(path, where, &text, &len, err);
    if (!st)
        st = parse_svg(g, path, text, len, where, err);
    ug_free(text);
    return st;
}

ug_status glyph_load(const char *ref, const glyph_search *search, ug_mark where,
                     ug_glyph **out, ug_error *err)
{
    *out = NULL;
    ug_glyph *g = glyph_new(ref);
    if (!g)
        return ug_fail(err, UG_ENOMEM, where, "out of memory");
    ug_status st = UG_OK;
    char path[4200];
    for (size_t i = 0; i < sizeof primitives / sizeof primitives[0]; i++)
        if (strcmp(ref, primitives[i][0]) == 0) {
            g->body = ug_strdup(primitives[i][1]);
            st = g->body ? UG_OK : ug_fail(err, UG_ENOMEM, where, "out of memory");
            goto done;
        }
    if (is_library_name(ref)) {
        if (!find_library(ref, search, path, sizeof path))
            st = ug_fail(err, UG_ESCHEMA, where,
                         "no glyph named '%s' in the glyph library", ref);
        else
            st = load_file(g, path, where, err);
    } else {
        const char *dir = search && search->layout_dir ? search->layout_dir : ".";
        snprintf(path, sizeof path, "%s/%s", ref[0] == '/' ? "" : dir, ref);
        st = load_file(g, ref[0] == '/' ? ref : path, where, err);
    }
done:
    if (st) {
        glyph_free(g);
        return st;
    }
    *out = g;
    return UG_OK;
}
