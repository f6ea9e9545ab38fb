/*
** `unitgram glyphs`: list the glyph library, draw its contact sheet, or check
** a glyph file of one's own. A thin layer over ug_glyph_library_* and
** ug_glyph_check.
*/
#include <ctype.h>
#include <stddef.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "cli.h"

#define MAX_DIRS 32

typedef struct {
    const char *dirs[MAX_DIRS];
    size_t ndirs;
    const char *sheet;
    const char *search[MAX_DIRS];
    size_t nsearch;
    const char *subject;
    const char *check[MAX_DIRS];
    size_t ncheck;
    int printed_heading; /* a blank line goes between headings, not before the first */
} options;

#define TEXTS(field, count) CLI_TEXTS, offsetof(options, field), offsetof(options, count), 0, \
                            MAX_DIRS

static const cli_opt glyphs_opts[] = {
    {"--glyph-dir", NULL, "DIR", TEXTS(dirs, ndirs),
     "also look for NAME.svg in DIR (after the library,\n"
     "the installed glyphs and UNITGRAM_GLYPH_PATH)"},
    {"--subject", NULL, "ID", CLI_TEXT, offsetof(options, subject), 0, 0, 0,
     "list (or, with --sheet, draw) one subject set:\n"
     "people, health-care, ..., other"},
    {"--search", NULL, "WORD", TEXTS(search, nsearch),
     "list the glyphs whose name, keywords, description\n"
     "or subject contain WORD (any case); given several\n"
     "times, a glyph must match every word"},
    {"--sheet", NULL, "FILE", CLI_TEXT, offsetof(options, sheet), 0, 0, 0,
     "write a contact sheet: every glyph with its name\n"
     "(.svg, .png or .pdf, by the extension)"},
    {"--check", NULL, "GLYPH", TEXTS(check, ncheck),
     "load a glyph as a layout in the current folder\n"
     "would (a name or a path such as ./icons/boat.svg);\n"
     "print what sanitizing removed and its inked area"},
    {NULL, NULL, NULL, CLI_FLAG, 0, 0, 0, 0, NULL},
};

static const cli_command glyphs_command = {
    "glyphs",
    "usage: unitgram glyphs [--glyph-dir DIR]... [--subject ID] [--search WORD]...\n"
    "       unitgram glyphs [--glyph-dir DIR]... [--sheet FILE]\n"
    "       unitgram glyphs [--glyph-dir DIR]... --check GLYPH...\n"
    "\n"
    "List the glyph library by subject: each glyph's name and keywords (a\n"
    "chart names a glyph with `glyph: NAME`), the built-in shapes last.\n",
    glyphs_opts, 0};

static int parse(int argc, char **argv, options *o)
{
    size_t n = 0;
    int rc = cli_parse(&glyphs_command, o, argc, argv, NULL, &n);
    return rc < 0 ? -1 : rc;
}

/* Case-insensitive substring test; glyph text is ASCII or UTF-8, and only
** ASCII letters fold, so a search never depends on the locale. */
static bool contains(const char *hay, const char *needle)
{
    if (!hay)
        return false;
    size_t n = strlen(needle);
    for (; *hay; hay++) {
        size_t k = 0;
        while (k < n && hay[k] &&
               tolower((unsigned char)hay[k]) == tolower((unsigned char)needle[k]))
            k++;
        if (k == n)
            return true;
    }
    return n == 0;
}

static bool matches(const options *o, const char *name, const char *kw, const char *desc,
                    const char *subject)
{
    for (size_t w = 0; w < o->nsearch; w++)
        if (!contains(name, o->search[w]) && !contains(kw, o->search[w]) &&
            !contains(desc, o->search[w]) && !contains(subject, o->search[w]))
            return false;
    return true;
}

static bool same_subject(const char *a, const char *b)
{
    return a && b ? strcmp(a, b) == 0 : a == b;
}

/* One set: a heading (when anything in it matches), then name and keywords. */
static size_t list_set(const ug_glyph_library *lib, options *o, const char *id,
                       const char *title)
{
    size_t shown = 0;
    for (size_t i = 0; i < ug_glyph_library_count(lib); i++) {
        const char *subj = ug_glyph_library_subject(lib, i);
        const char *kw = ug_glyph_library_keywords(lib, i);
        const char *name = ug_glyph_library_name(lib, i);
        if (!same_subject(subj, id) ||
            !matches(o, name, kw, ug_glyph_library_description(lib, i), subj))
            continue;
        if (!shown++)
            printf("%s%s\n", o->printed_heading++ ? "\n" : "", title);
        printf("  %-16s ", name);
        cli_put_visible(kw, stdout);
        putchar('\n');
    }
    return shown;
}

static size_t list_shapes(options *o)
{
    size_t shown = 0;
    for (size_t i = 0; i < ug_glyph_primitive_count(); i++) {
        const char *name = ug_glyph_primitive_name(i);
        if (!matches(o, name, "shape, built-in", NULL, "shapes"))
            continue;
        if (!shown++)
            printf("%sShapes\n", o->printed_heading++ ? "\n" : "");
        printf("  %-16s built-in\n", name);
    }
    return shown;
}

static bool wanted(const options *o, const char *id)
{
    return !o->subject || (id && strcmp(o->subject, id) == 0);
}

static int list(const ug_glyph_library *lib, options *o)
{
    size_t shown = 0, n = ug_glyph_subject_count();
    bool known = !o->subject || !strcmp(o->subject, "shapes") || !strcmp(o->subject, "other");
    for (size_t s = 0; s < n; s++)
        known = known || wanted(o, ug_glyph_subject_id(s));
    if (!known)
        return cli_usage("glyphs", "unknown subject '%s' (see `unitgram glyphs`)", o->subject);
    for (size_t s = 0; s < n; s++)
        if (wanted(o, ug_glyph_subject_id(s)))
            shown += list_set(lib, o, ug_glyph_subject_id(s), ug_glyph_subject_title(s));
    if (wanted(o, "other"))
        shown += list_set(lib, o, NULL, "Other");
    if (wanted(o, "shapes"))
        shown += list_shapes(o);
    if (!shown && o->nsearch) {
        fprintf(stderr, "unitgram glyphs: no glyph matches");
        for (size_t w = 0; w < o->nsearch; w++)
            fprintf(stderr, " '%s'", o->search[w]);
        fprintf(stderr, "\n");
        return EXIT_INPUT;
    }
    return EXIT_OK;
}

static int sheet(const ug_glyph_library *lib, const char *path, const char *subject)
{
    ug_error err = {0};
    char *svg = NULL;
    size_t len = 0;
    if (ug_glyph_library_subject_sheet_svg(lib, subject, &svg, &len, &err)) {
        cli_report_error(&err);
        return cli_exit_for(&err);
    }
    int rc = EXIT_OK;
    ug_output_format fmt = ug_output_format_from_path(path);
    if (fmt == UG_OUT_HTML) {
        rc = cli_usage("glyphs", "a contact sheet is written as .svg, .png or .pdf");
    } else if (ug_render_svg_file(svg, len, fmt, 96, 1, path, &err)) {
        cli_report_error(&err);
        rc = err.status == UG_EIO ? EXIT_OUTPUT : EXIT_INPUT;
    }
    free(svg);
    return rc;
}

static int check(const options *o)
{
    int rc = EXIT_OK;
    for (size_t i = 0; i < o->ncheck; i++) {
        ug_error err = {0};
        char *warnings = NULL;
        double ink = 0;
        if (ug_glyph_check(o->check[i], ".", o->dirs, o->ndirs, &warnings, &ink, &err)) {
            cli_report_error(&err);
            rc = cli_exit_for(&err);
            continue;
        }
        for (char *line = warnings; *line;) {
            size_t n = strcspn(line, "\n");
            ug_error w = {.where = {o->check[i], 0, 0}};
            snprintf(w.msg, sizeof w.msg, "%.*s", (int)n, line);
            cli_diag("warning", &w);
            line += n + (line[n] == '\n');
        }
        cli_put_visible(o->check[i], stdout);
        printf(": ok, inked area %.3f of the unit box\n", ink);
        free(warnings);
    }
    return rc;
}

int cli_glyphs(int argc, char **argv)
{
    options o = {0};
    int rc = parse(argc, argv, &o);
    if (rc)
        return rc < 0 ? EXIT_OK : rc;
    if (o.ncheck)
        return check(&o);
    ug_glyph_library *lib = NULL;
    ug_error err = {0};
    if (ug_glyph_library_open(o.dirs, o.ndirs, &lib, &err)) {
        cli_report_error(&err);
        return cli_exit_for(&err);
    }
    rc = o.sheet ? sheet(lib, o.sheet, o.subject) : list(lib, &o);
    ug_glyph_library_free(lib);
    return rc;
}
