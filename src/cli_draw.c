/*
** `unitgram draw LAYOUT -o OUT` and `unitgram describe LAYOUT`: load,
** allocate, pack, write SVG, PNG, PDF or a web page; a page file (one with a
** `page:` key) becomes a one-page handout. The output is rendered in memory
** and written atomically, so a failure leaves any earlier picture as it was.
*/
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "cli.h"

static const char draw_help[] =
    "usage: unitgram draw LAYOUT -o OUT [--format F] [--dpi N] [--scale N]\n"
    "\n"
    "Draw the chart (or the one-page handout) a layout file describes.\n"
    "  -o, --output FILE   where to write; '-' writes to standard output\n"
    "  -f, --format F      svg, png, pdf or html; default: from the extension\n"
    "                      of FILE (.svg .png .pdf .html), SVG for '-'\n"
    "      --dpi N         PNG resolution, pixels per inch (default 96: one\n"
    "                      pixel per CSS px); PDF and SVG are vector\n"
    "      --scale N       enlarge PNG and PDF by N (default 1)\n"
    "  -h, --help          show this help\n"
    "\n"
    "exit codes: 0 drawn, 1 bad input, 2 usage, 4 output could not be written\n";

static const char describe_help[] =
    "usage: unitgram describe LAYOUT\n"
    "\n"
    "Print the chart's plain-language description (its alt text, the same text\n"
    "the SVG carries in <desc>); for a handout page, every chart's in turn.\n"
    "exit codes: 0 printed, 1 bad input, 2 usage, 4 output could not be written\n";

typedef struct {
    ug_chart *chart;
    ug_allocation *alloc;
} loaded;

static void unload(loaded *l)
{
    ug_allocation_free(l->alloc);
    ug_chart_free(l->chart);
}

static int load(const char *path, loaded *l, ug_error *err)
{
    memset(l, 0, sizeof *l);
    if (ug_chart_load(path, NULL, &l->chart, err) ||
        ug_chart_allocate(l->chart, &l->alloc, err)) {
        cli_report_error(err);
        unload(l);
        return cli_exit_for(err);
    }
    return EXIT_OK;
}

typedef struct {
    const char *layout, *out;
    ug_output_format fmt;
    double dpi, scale;
} draw_opts;

static int number(const char *opt, const char *v, double *out)
{
    char *end;
    *out = strtod(v, &end);
    if (end == v || *end || !(*out > 0) || *out > 1e6) {
        fprintf(stderr, "unitgram draw: %s wants a positive number, not '%s'\n", opt, v);
        return EXIT_USAGE;
    }
    return EXIT_OK;
}

/* The format: --format, else the extension; an extension we do not write
** is refused rather than guessed. */
static int pick_format(draw_opts *o, const char *format)
{
    if (format) {
        if (ug_output_format_parse(format, &o->fmt) == 0)
            return EXIT_OK;
        fprintf(stderr, "unitgram draw: unknown format '%s' (svg, png, pdf, html)\n",
                format);
        return EXIT_USAGE;
    }
    o->fmt = ug_output_format_from_path(o->out);
    const char *dot = strrchr(o->out, '.'), *slash = strrchr(o->out, '/');
    if (o->fmt == UG_OUT_SVG && dot && (!slash || dot > slash) &&
        strcmp(dot, ".svg") && strcmp(dot, ".SVG")) {
        fprintf(stderr, "unitgram draw: '%s': cannot tell the format from '%s'; "
                        "use .svg, .png, .pdf or .html, or --format\n", o->out, dot);
        return EXIT_USAGE;
    }
    return EXIT_OK;
}

static int option_value(int argc, char **argv, int *i, const char **v)
{
    if (*i + 1 >= argc) {
        fprintf(stderr, "unitgram draw: %s needs a value\n%s", argv[*i], draw_help);
        return EXIT_USAGE;
    }
    *v = argv[++*i];
    return EXIT_OK;
}

static int parse_draw(int argc, char **argv, draw_opts *o)
{
    const char *format = NULL, *v;
    int rc = EXIT_OK;
    for (int i = 1; i < argc && !rc; i++) {
        const char *a = argv[i];
        if (!strcmp(a, "-h") || !strcmp(a, "--help")) {
            fputs(draw_help, stdout);
            return -1;
        } else if (!strcmp(a, "-o") || !strcmp(a, "--output")) {
            rc = option_value(argc, argv, &i, &o->out);
        } else if (!strcmp(a, "-f") || !strcmp(a, "--format")) {
            rc = option_value(argc, argv, &i, &format);
        } else if (!strcmp(a, "--dpi") || !strcmp(a, "--scale")) {
            if (!(rc = option_value(argc, argv, &i, &v)))
                rc = number(a, v, a[2] == 'd' ? &o->dpi : &o->scale);
        } else if (a[0] == '-' && a[1]) {
            fprintf(stderr, "unitgram draw: unknown option '%s'\n%s", a, draw_help);
            return EXIT_USAGE;
        } else if (!o->layout) {
            o->layout = a;
        } else {
            fprintf(stderr, "unitgram draw: one layout at a time ('%s')\n", a);
            return EXIT_USAGE;
        }
    }
    if (rc)
        return rc;
    if (!o->layout || !o->out) {
        fprintf(stderr, "unitgram draw: %s\n%s", o->layout ? "missing -o OUT"
                                                           : "missing LAYOUT", draw_help);
        return EXIT_USAGE;
    }
    return pick_format(o, format);
}

/* A page file has a top-level `page:` key, which in block style starts a
** line; the loader refuses the wrong kind with a message saying so. */
static bool is_page_file(const char *path)
{
    FILE *f = fopen(path, "r");
    char line[256];
    bool page = false;
    while (f && !page && fgets(line, sizeof line, f))
        page = strncmp(line, "page:", 5) == 0 || strncmp(line, "page :", 6) == 0;
    if (f)
        fclose(f);
    return page;
}

/* The chart as the wanted format, in memory. */
static ug_status chart_bytes(const loaded *l, const draw_opts *o, char **out,
                             size_t *len, ug_error *err)
{
    ug_scene *scene = NULL;
    char *svg = NULL, *desc = NULL;
    size_t n = 0;
    ug_status st = ug_scene_pack(l->chart, l->alloc, &scene, err);
    if (!st)
        st = ug_scene_svg(scene, &svg, &n, err);
    if (st || o->fmt == UG_OUT_SVG) {
        *out = svg, *len = n;
    } else if (o->fmt == UG_OUT_HTML) {
        const ug_allocation *allocs[1] = {l->alloc};
        if (!(st = ug_chart_describe(l->chart, l->alloc, &desc, NULL, err)))
            st = ug_html_page(NULL, svg, n, desc, allocs, 1, out, len, err);
        free(svg);
    } else {
        st = ug_render_svg(svg, n, o->fmt, o->dpi, o->scale, out, len, err);
        free(svg);
    }
    free(desc);
    ug_scene_free(scene);
    return st;
}

static int failed(const ug_error *err)
{
    cli_report_error(err);
    return err->status == UG_ENOMEM ? EXIT_OUTPUT : EXIT_INPUT;
}

static int draw_chart(const draw_opts *o, char **out, size_t *len, ug_error *err)
{
    loaded l;
    int rc = load(o->layout, &l, err);
    if (rc)
        return rc;
    if (chart_bytes(&l, o, out, len, err))
        rc = failed(err);
    unload(&l);
    return rc;
}

static int draw_page(const draw_opts *o, char **out, size_t *len, ug_error *err)
{
    ug_page *page = NULL;
    int rc = EXIT_OK;
    if (ug_page_load(o->layout, NULL, &page, err) ||
        ug_page_draw(page, o->fmt, o->dpi, o->scale, out, len, err))
        rc = failed(err);
    ug_page_free(page);
    return rc;
}

int cli_draw(int argc, char **argv)
{
    draw_opts o = {NULL, NULL, UG_OUT_SVG, 96, 1};
    int rc = parse_draw(argc, argv, &o);
    if (rc)
        return rc < 0 ? EXIT_OK : rc;
    ug_error err;
    memset(&err, 0, sizeof err);
    char *bytes = NULL;
    size_t len = 0;
    rc = is_page_file(o.layout) ? draw_page(&o, &bytes, &len, &err)
                                : draw_chart(&o, &bytes, &len, &err);
    if (!rc && ug_write_file_atomic(o.out, bytes, len, &err)) {
        cli_report_error(&err);
        rc = EXIT_OUTPUT;
    }
    free(bytes);
    return rc;
}

static int describe_chart(const char *layout, char **text, size_t *len,
                          ug_error *err)
{
    loaded l;
    int rc = load(layout, &l, err);
    if (rc)
        return rc;
    if (ug_chart_describe(l.chart, l.alloc, text, len, err)) {
        cli_report_error(err);
        rc = EXIT_OUTPUT;
    }
    unload(&l);
    return rc;
}

static int describe_page(const char *layout, char **text, size_t *len,
                         ug_error *err)
{
    ug_page *page = NULL;
    int rc = EXIT_OK;
    if (ug_page_load(layout, NULL, &page, err) ||
        ug_page_describe(page, text, len, err))
        rc = failed(err);
    ug_page_free(page);
    return rc;
}

int cli_describe(int argc, char **argv)
{
    const char *layout = NULL;
    for (int i = 1; i < argc; i++) {
        if (!strcmp(argv[i], "-h") || !strcmp(argv[i], "--help")) {
            fputs(describe_help, stdout);
            return EXIT_OK;
        }
        if (argv[i][0] == '-' || layout) {
            fprintf(stderr, "unitgram describe: unexpected '%s'\n%s", argv[i],
                    describe_help);
            return EXIT_USAGE;
        }
        layout = argv[i];
    }
    if (!layout) {
        fprintf(stderr, "unitgram describe: missing LAYOUT\n%s", describe_help);
        return EXIT_USAGE;
    }
    ug_error err;
    memset(&err, 0, sizeof err);
    char *text = NULL;
    size_t len = 0;
    int rc = is_page_file(layout) ? describe_page(layout, &text, &len, &err)
                                  : describe_chart(layout, &text, &len, &err);
    if (!rc && (fwrite(text, 1, len, stdout) != len || fputc('\n', stdout) == EOF ||
                fflush(stdout))) {
        fprintf(stderr, "unitgram describe: could not write the description\n");
        rc = EXIT_OUTPUT;
    }
    free(text);
    return rc;
}
