/*
** `unitgram describe LAYOUT`: the plain-language description of a chart, or
** of every chart of a page file in turn.
*/
#include <stdio.h>
#include <stdlib.h>

#include "cli.h"

static const cli_opt describe_opts[] = {
    {"--max-icons", NULL, NULL, CLI_LIMITS, 0, 0, 0, 0, NULL},
    {NULL, NULL, NULL, CLI_FLAG, 0, 0, 0, 0, NULL},
};

static const cli_command describe_command = {
    "describe",
    "usage: unitgram describe LAYOUT\n"
    "\n"
    "Print the chart's plain-language description (its alt text, the same text\n"
    "the SVG carries in <desc>; for a handout page, every chart's in turn).\n"
    "LAYOUT '-' reads standard input.\n",
    describe_opts, 1};

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
    size_t n = 0;
    int none = 0;
    int rc = cli_parse(&describe_command, &none, argc, argv, &layout, &n);
    if (rc)
        return rc < 0 ? EXIT_OK : rc;
    if (!layout)
        return cli_usage("describe", "missing the LAYOUT file");
    ug_error err = {0};
    char *text = NULL;
    size_t len = 0;
    rc = cli_is_page_file(layout) ? describe_page(layout, &text, &len, &err)
                                  : describe_chart(layout, &text, &len, &err);
    if (!rc && (fwrite(text, 1, len, stdout) != len || fputc('\n', stdout) == EOF ||
                fflush(stdout))) {
        fprintf(stderr, "unitgram describe: could not write the description\n");
        rc = EXIT_OUTPUT;
    }
    free(text);
    return rc;
}
