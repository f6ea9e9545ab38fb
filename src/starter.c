/*
** Starter files for `unitgram init`: a commented layout that draws as it is,
** so a new user edits a working chart instead of a blank page.
*/
#include <pthread.h>
#include <string.h>

#include "ug.h"

static const char chart_head[] = "# A unitgram layout. Edit the counts and labels, then run:\n";
static const char chart_body[] =
    "# Every key is described in the README (\"The layout format\").\n"
    "\n"
    "title: Visitors to the Elm Street library branch, October\n"
    "subtitle: Visits by purpose\n"
    "source: Elm Street branch door counter and desk log (demo data)\n"
    "notes:\n"
    "  - Counts rounded to whole icons by the largest-remainder method.\n"
    "\n"
    "form: rows            # rows (isotype) or waffle\n"
    "icon-value: 10        # each icon stands for 10 visits; the key says so\n"
    "unit-label: visits    # what is counted\n"
    "columns: 20           # icons per line before wrapping\n"
    "cluster: 5            # a small extra gap after every 5 icons\n"
    "\n"
    "categories:\n"
    "  - label: Borrowing books\n"
    "    glyph: book\n"
    "    count: 412\n"
    "  - label: Using computers\n"
    "    glyph: laptop\n"
    "    count: 187\n"
    "  - label: Children's story time\n"
    "    glyph: child\n"
    "    count: 96\n"
    "\n"
    "# Counts below 10 can identify people: draw them as a placeholder.\n"
    "suppress:\n"
    "  below: 10\n"
    "\n"
    "style:\n"
    "  width: 800\n"
    "  palette: okabe-ito   # colour-blind-safe colours for categories\n";

static const char page_head[] =
    "# A one-page handout. Each panel holds a chart file, an inline chart or\n"
    "# a text block. Draw it with:\n";
static const char page_body[] =
    "\n"
    "page: {size: A4, orientation: portrait, margin: 15mm, columns: 2}\n"
    "title: Elm Street library branch, autumn update\n"
    "source: Elm Street branch records (demo data)\n"
    "shared-scale: true    # every chart uses one icon size and one icon value\n"
    "panels:\n"
    "  - chart:\n"
    "      title: Visits in October\n"
    "      form: rows\n"
    "      icon-value: 10\n"
    "      unit-label: visits\n"
    "      categories:\n"
    "        - {label: Borrowing books, glyph: book, count: 412}\n"
    "        - {label: Using computers, glyph: laptop, count: 187}\n"
    "    span: 2\n"
    "  - text: |\n"
    "      Replace this paragraph with a few sentences for the reader.\n";

/* A file name as the shell reads it back: bare when it holds only
** [A-Za-z0-9._/-], else in single quotes ("'" as '\''). */
static void shell_word(ug_buf *b, const char *s)
{
    if (s[strspn(s, "ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789._/-")] == '\0'
        && s[0] != '-') {
        ug_buf_puts(b, s);
        return;
    }
    ug_buf_puts(b, "'");
    for (; *s; s++)
        ug_buf_puts(b, *s == '\'' ? "'\\''" : (char[2]){*s, '\0'});
    ug_buf_puts(b, "'");
}

/* Only a name that cannot end the comment line (no control character, valid
** UTF-8) goes into it; anything else gets the usual name. */
static bool printable_name(const char *s)
{
    size_t n = strlen(s);
    for (size_t i = 0; i < n;) {
        unsigned long cp;
        size_t k = ug_utf8_decode(s + i, n - i, &cp);
        if (!k || cp < 0x20 || (cp >= 0x7F && cp <= 0x9F) || cp == 0x2028 || cp == 0x2029)
            return false;
        i += k;
    }
    return n > 0 && n < 512;
}

/* "out/foo.yaml" -> "out/foo" + ext; a name without .yaml/.yml gets ext added. */
static void output_name(ug_buf *b, const char *path, const char *ext)
{
    size_t n = strlen(path);
    const char *slash = strrchr(path, '/');
    const char *dot = strrchr(path, '.');
    if (dot && (!slash || dot > slash + 1) &&
        (!strcmp(dot, ".yaml") || !strcmp(dot, ".yml")))
        n = (size_t)(dot - path);
    char *stem = ug_strndup(path, n);
    if (!stem) {
        b->failed = true;
        return;
    }
    ug_buf_puts(b, stem);
    ug_buf_puts(b, ext);
    ug_free(stem);
}

char *ug_starter_layout_for(int page, const char *path)
{
    const char *def = page ? "handout.yaml" : "chart.yaml";
    if (!path || !strcmp(path, "-") || !printable_name(path))
        path = def;
    ug_buf name, b;
    ug_buf_init(&name);
    ug_buf_init(&b);
    output_name(&name, path, page ? ".pdf" : ".svg");
    ug_buf_add(&name, "", 1);
    ug_buf_puts(&b, page ? page_head : chart_head);
    ug_buf_puts(&b, "#   unitgram draw ");
    shell_word(&b, path);
    ug_buf_puts(&b, " -o ");
    if (!name.failed)
        shell_word(&b, name.data);
    ug_buf_puts(&b, "\n");
    ug_buf_puts(&b, page ? page_body : chart_body);
    ug_buf_add(&b, "", 1);
    ug_buf_free(&name);
    if (b.failed || name.failed) {
        ug_buf_free(&b);
        return NULL;
    }
    return b.data;
}

/* The texts with the usual names, made once and kept (a pointer the caller
** does not free, as before the names could change). */
static char *default_texts[2];

static void make_default_texts(void)
{
    default_texts[0] = ug_starter_layout_for(0, NULL);
    default_texts[1] = ug_starter_layout_for(1, NULL);
}

const char *ug_starter_layout(int page)
{
    static pthread_once_t once = PTHREAD_ONCE_INIT; /* POSIX.1-2008 */
    pthread_once(&once, make_default_texts);
    return default_texts[page ? 1 : 0];
}
