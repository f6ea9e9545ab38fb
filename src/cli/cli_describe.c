/*
** `unitgram describe LAYOUT`: the plain-language description of a chart, or
** of every chart of a page file in turn.
*/
#include <stdio.h>
#include <stdlib.h>

#include "cli.h"

static const char describe_help[] =
    "usage: unitgram describe LAYOUT\n"
    "\n"
    "Print the chart's plain-language description (its alt text, the same text\n"
    "the SVG carries in <desc>; for a handout page, every chart's in turn).\n"
    "LAYOUT '-' reads standard input.\n"
    "\n"
    "options:\n"
    "  --max-icons N, --max-input-bytes N, --max-panels N\n"
    "                        the limits, as for draw\n"
    "  -h, --help            show this help\n"
    "\n" CLI_EXIT_CODES;

static int describe_chart(const char *layout, char **text, size_t *len,
                          ug_error *err)
{
    ug_chart *chart = NULL;
    ug_allocation *alloc = NULL;
    int rc = cli_load_allocated(layout, &chart, &alloc);
    if (rc)
        return rc;
    if (ug_chart_describe(chart, alloc, text, len, err)) {
        cli_report_error(err);
        rc = cli_exit_for(err);
    }
    ug_allocation_free(alloc);
    ug_chart_free(chart);
    return rc;
}

static int describe_page(const char *layout, char **text, size_t *len,
                         ug_error *err)
{
    ug_page *page = NULL;
    int rc = EXIT_OK;
    if (ug_page_load(layout, cli_limits(), &page, err) ||
        ug_page_describe(page, text, len, err)) {
        cli_report_error(err);
        rc = cli_exit_for(err);
    }
    ug_page_free(page);
    return rc;
}

int cli_describe(int argc, char **argv)
{
    const char *layout = NULL;
    for (int i = 1; i < argc; i++) {
        if (cli_is_help(argv[i])) {
            fputs(describe_help, stdout);
            return EXIT_OK;
        }
        int m = cli_limit_option("describe", argc, argv, &i);
        if (m < 0)
            return EXIT_USAGE;
        if (m)
            continue;
        if ((argv[i][0] == '-' && argv[i][1]) || layout)
            return cli_usage("describe", "unexpected argument '%s'", argv[i]);
        layout = argv[i];
    }
    if (!layout)
        return cli_usage("describe", "missing the LAYOUT file");
    ug_error err = {0};
    char *text = NULL;
    size_t len = 0;
    int rc = cli_is_page_file(layout) ? describe_page(layout, &text, &len, &err)
                                  : describe_chart(layout, &text, &len, &err);
    if (!rc && (fwrite(text, 1, len, stdout) != len || fputc('\n', stdout) == EOF ||
                fflush(stdout))) {
        fprintf(stderr, "unitgram describe: could not write the description\n");
        rc = EXIT_OUTPUT;
    }
    free(text);
    return rc;
}
