/*
** libFuzzer harness: the whole draw pipeline, layout bytes in, SVG out
** (load, allocate, pack, write, then audit); a page file goes through the
** handout composer instead. Invariants: a failure carries a message; a
** success is an SVG that libxml2 parses without fetching anything and that
** holds no active content — no <script>, no <foreignObject>, no on*
** attribute, no href leaving the document, no javascript: anywhere.
**
** The layout is named as if it lay in tests/data/good/ (UG_FUZZ_BASE
** overrides), so the seeds' CSV files and relative glyph paths resolve when
** the fuzzer runs from the repository root, as `make fuzz` runs it.
*/
#include <ctype.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

#include <libxml/parser.h>
#include <libxml/tree.h>

#include "unitgram.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);
int LLVMFuzzerInitialize(int *argc, char ***argv);

/* Library glyph names resolve in the project's glyphs/ (the fuzzer runs from
** the repository root): the context every run on this thread uses. */
int LLVMFuzzerInitialize(int *argc, char ***argv)
{
    (void)argc;
    (void)argv;
    const char *roots[] = {"glyphs"};
    ug_context_options o = {.size = sizeof o, .glyph_roots = roots, .nglyph_roots = 1};
    ug_context *ctx = NULL;
    ug_error err = {0};
    if (ug_context_new(&o, &ctx, &err) != UG_OK)
        abort();
    ug_context_use(ctx);
    return 0;
}

/* Hand-written compares, not the C library's: libFuzzer hooks those, which
** slows every run and steers mutation towards the checker's own strings. */
static char lower(char c)
{
    return c >= 'A' && c <= 'Z' ? (char)(c - 'A' + 'a') : c;
}

static bool starts_nocase(const char *s, const char *lower_prefix)
{
    size_t i = 0;
    while (lower_prefix[i] && lower(s[i]) == lower_prefix[i])
        i++;
    return !lower_prefix[i];
}

static bool same_nocase(const char *s, const char *lower_word)
{
    return starts_nocase(s, lower_word) && !s[strlen(lower_word)];
}

static const char *find(const char *s, const char *needle)
{
    for (; *s; s++)
        if (starts_nocase(s, needle))
            return s;
    return NULL;
}

/* A value that, with spaces and control characters removed as browsers do,
** starts a javascript: (or vbscript:/data:) URL, or holds one anywhere. */
static bool bad_value(const xmlChar *v)
{
    char flat[4096];
    size_t n = 0;
    for (const xmlChar *p = v; *p && n + 1 < sizeof flat; p++)
        if (*p > ' ')
            flat[n++] = lower((char)*p);
    flat[n] = '\0';
    return find(flat, "javascript:") || find(flat, "vbscript:");
}

static bool bad_href(const xmlChar *v)
{
    while (*v && isspace(*v))
        v++;
    return *v != '#'; /* only references inside the document */
}

/* url(...) is allowed only as url(#id): a paint or clip inside the document. */
static bool bad_url(const xmlChar *v)
{
    for (const char *p = (const char *)v; (p = find(p, "url(")) != NULL; p++) {
        const char *q = p + 4;
        while (*q == ' ' || *q == '"' || *q == '\'')
            q++;
        if (*q != '#')
            return true;
    }
    return false;
}

static bool bad_attr(const xmlAttr *a)
{
    const char *name = (const char *)a->name;
    xmlChar *v = xmlNodeGetContent((const xmlNode *)a);
    bool bad = !v || bad_value(v) || starts_nocase(name, "on") ||
               (same_nocase(name, "href") && bad_href(v)) ||
               bad_url(v);
    xmlFree(v);
    return bad;
}

static bool bad_node(const xmlNode *n)
{
    for (; n; n = n->next) {
        if (n->type == XML_ELEMENT_NODE) {
            const char *name = (const char *)n->name;
            if (same_nocase(name, "script") || same_nocase(name, "foreignobject") ||
                same_nocase(name, "iframe") || same_nocase(name, "image") ||
                same_nocase(name, "a") || same_nocase(name, "style"))
                return true;
            for (const xmlAttr *a = n->properties; a; a = a->next)
                if (bad_attr(a))
                    return true;
        } else if (n->type == XML_ENTITY_REF_NODE || n->type == XML_PI_NODE ||
                   n->type == XML_DTD_NODE) {
            return true;
        } else if (n->type == XML_TEXT_NODE && n->content && bad_value(n->content) &&
                   n->parent && !same_nocase((const char *)n->parent->name, "title") &&
                   !same_nocase((const char *)n->parent->name, "desc") &&
                   !same_nocase((const char *)n->parent->name, "text")) {
            return true; /* visible text may say anything; nothing else may */
        }
        if (bad_node(n->children))
            return true;
    }
    return false;
}

static void check_svg(const char *svg, size_t len)
{
    xmlDocPtr doc = xmlReadMemory(svg, (int)len, "fuzz.svg", NULL,
                                  XML_PARSE_NONET | XML_PARSE_NOERROR |
                                      XML_PARSE_NOWARNING);
    if (!doc)
        abort(); /* not well-formed */
    xmlNodePtr root = xmlDocGetRootElement(doc);
    if (!root || strcmp((const char *)root->name, "svg") || doc->intSubset ||
        bad_node(root))
        abort();
    xmlFreeDoc(doc);
}

/* The audit on a drawn chart or page: findings or an error that says why. */
static void check_audit(ug_status st, ug_findings *f, const ug_error *err)
{
    if (st && !err->msg[0])
        abort();
    ug_findings_free(f);
}

/* A page file (a handout): every chart on it drawn into one SVG, and audited. */
static void draw_page(const uint8_t *data, size_t size, const char *name,
                      const ug_limits *limits)
{
    ug_error err = {0};
    ug_page *page = NULL;
    ug_findings *f = NULL;
    char *svg = NULL;
    size_t len = 0;
    ug_status st = ug_page_load_string((const char *)data, size, name, limits, &page, &err);
    if (!st)
        st = ug_page_draw(page, UG_OUT_SVG, 96, 1, &svg, &len, &err);
    if (st && !err.msg[0])
        abort();
    if (!st) {
        check_svg(svg, len);
        check_audit(ug_page_audit(page, NULL, &f, &err), f, &err);
    }
    free(svg);
    ug_page_free(page);
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    const char *base = getenv("UG_FUZZ_BASE");
    const char *name = base ? base : "tests/data/good/fuzz.yaml";
    ug_error err = {0};
    ug_chart *chart = NULL;
    ug_allocation *alloc = NULL;
    ug_scene *scene = NULL;
    ug_findings *f = NULL;
    char *svg = NULL;
    size_t len = 0;
    ug_limits limits = {.max_icons = 5000}; /* keep each run short */
    ug_status st = ug_chart_load_string((const char *)data, size, name, &limits, &chart,
                                        &err);
    if (st == UG_ESCHEMA && find(err.msg, "this is a page file")) {
        draw_page(data, size, name, &limits);
        return 0;
    }
    if (!st)
        st = ug_chart_allocate(chart, &alloc, &err);
    if (!st)
        st = ug_scene_pack(chart, alloc, &scene, &err);
    if (!st)
        st = ug_scene_svg(scene, &svg, &len, &err);
    if (st && !err.msg[0])
        abort(); /* a failure must say why */
    if (!st) {
        check_svg(svg, len);
        check_audit(ug_chart_audit(chart, &f, &err), f, &err);
    }
    free(svg);
    ug_scene_free(scene);
    ug_allocation_free(alloc);
    ug_chart_free(chart);
    return 0;
}
