/*
** `unitgram draw LAYOUT -o OUT.svg` and `unitgram describe LAYOUT`: load,
** allocate, pack, write. The output is written atomically, so a failure
** leaves any earlier picture as it was.
*/
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "cli.h"

static const char draw_help[] =
    "usage: unitgram draw LAYOUT -o OUT.svg\n"
    "\n"
    "Draw the chart a layout file describes as SVG.\n"
    "  -o, --output FILE   where to write; '-' writes to standard output\n"
    "  -h, --help          show this help\n"
    "\n"
    "exit codes: 0 drawn, 1 bad input, 2 usage, 4 output could not be written\n";

static const char describe_help[] =
    "usage: unitgram describe LAYOUT\n"
    "\n"
    "Print the chart's plain-language description (its alt text, the same text\n"
    "the SVG carries in <desc>).\n"
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

/* Only SVG is written here for now; other formats come with the rasterizer. */
static bool is_svg(const char *out)
{
    size_t n = strlen(out);
    return strcmp(out, "-") == 0 || (n > 4 && strcmp(out + n - 4, ".svg") == 0);
}

static int parse_draw(int argc, char **argv, const char **layout, const char **out)
{
    for (int i = 1; i < argc; i++) {
        const char *a = argv[i];
        if (!strcmp(a, "-h") || !strcmp(a, "--help")) {
            fputs(draw_help, stdout);
            return -1;
        } else if ((!strcmp(a, "-o") || !strcmp(a, "--output")) && i + 1 < argc) {
            *out = argv[++i];
        } else if (a[0] == '-' && a[1]) {
            fprintf(stderr, "unitgram draw: unknown option '%s'\n%s", a, draw_help);
            return EXIT_USAGE;
        } else if (!*layout) {
            *layout = a;
        } else {
            fprintf(stderr, "unitgram draw: one layout at a time ('%s')\n", a);
            return EXIT_USAGE;
        }
    }
    if (!*layout || !*out) {
        fprintf(stderr, "unitgram draw: %s\n%s", *layout ? "missing -o OUT.svg"
                                                         : "missing LAYOUT", draw_help);
        return EXIT_USAGE;
    }
    if (!is_svg(*out)) {
        fprintf(stderr, "unitgram draw: '%s': only SVG output (.svg or -) is "
                        "available in this build; PNG, PDF and HTML are not yet\n", *out);
        return EXIT_USAGE;
    }
    return EXIT_OK;
}

int cli_draw(int argc, char **argv)
{
    const char *layout = NULL, *out = NULL;
    int rc = parse_draw(argc, argv, &layout, &out);
    if (rc)
        return rc < 0 ? EXIT_OK : rc;
    ug_error err;
    memset(&err, 0, sizeof err);
    loaded l;
    if ((rc = load(layout, &l, &err)))
        return rc;
    ug_scene *scene = NULL;
    char *svg = NULL;
    size_t len = 0;
    if (ug_scene_pack(l.chart, l.alloc, &scene, &err) ||
        ug_scene_svg(scene, &svg, &len, &err)) {
        cli_report_error(&err);
        rc = err.status == UG_ENOMEM ? EXIT_OUTPUT : EXIT_INPUT;
    } else if (ug_write_file_atomic(out, svg, len, &err)) {
        cli_report_error(&err);
        rc = EXIT_OUTPUT;
    }
    free(svg);
    ug_scene_free(scene);
    unload(&l);
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
    loaded l;
    int rc = load(layout, &l, &err);
    if (rc)
        return rc;
    char *text = NULL;
    size_t len = 0;
    if (ug_chart_describe(l.chart, l.alloc, &text, &len, &err)) {
        cli_report_error(&err);
        rc = EXIT_OUTPUT;
    } else if (fwrite(text, 1, len, stdout) != len || fputc('\n', stdout) == EOF ||
               fflush(stdout)) {
        fprintf(stderr, "unitgram describe: could not write the description\n");
        rc = EXIT_OUTPUT;
    }
    free(text);
    unload(&l);
    return rc;
}
