/*
** `unitgram tally LAYOUT [--format text|csv|json] [--internal]`: load a chart,
** allocate its icons and print the allocation report (count, quota, icons,
** shown value and difference per category). By default it reports the
** published table, hidden counts as their placeholders; --internal reports
** every count as counted, under a first line saying it is not for
** publication. Nothing is drawn and no file is written.
*/
#include <stddef.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "cli.h"

typedef struct {
    const char *format;
    bool internal;
} tally_args;

static const cli_opt tally_opts[] = {
    {"--format", NULL, "FORMAT", CLI_TEXT, offsetof(tally_args, format), 0, 0, 0,
     "text (default), csv or json"},
    {"--internal", NULL, NULL, CLI_FLAG, offsetof(tally_args, internal), 0, 0, 0,
     "every count as counted, hidden ones included:\n"
     "for the analyst only, never for publication"},
    {"--max-icons", NULL, NULL, CLI_LIMITS, 0, 0, 0, 0, NULL},
    {NULL, NULL, NULL, CLI_FLAG, 0, 0, 0, 0, NULL},
};

static const cli_command tally_command = {
    "tally",
    "usage: unitgram tally LAYOUT [--format text|csv|json] [--internal]\n"
    "\n"
    "Print how the chart's counts become whole icons: per category the\n"
    "count, the exact quota, the icons drawn, the value they show and the\n"
    "difference from the count. Counts the chart hides (suppress, protect)\n"
    "are shown as the chart shows them. LAYOUT '-' reads standard input.\n",
    tally_opts, 1};

static int parse_format(const char *s, ug_report_format *fmt)
{
    if (!strcmp(s, "text"))
        *fmt = UG_REPORT_TEXT;
    else if (!strcmp(s, "csv"))
        *fmt = UG_REPORT_CSV;
    else if (!strcmp(s, "json"))
        *fmt = UG_REPORT_JSON;
    else
        return -1;
    return 0;
}

/* The CSV report keeps every label byte for byte, which is right for a
** file or a pipe; a terminal gets each line escaped as diagnostics are, so
** that a U+202E in a label cannot reverse what follows it. */
static int put_report(char *report, size_t len, ug_report_format fmt)
{
    if (fmt != UG_REPORT_CSV || !isatty(STDOUT_FILENO))
        return fwrite(report, 1, len, stdout) == len ? 0 : -1;
    for (char *line = report; *line;) {
        size_t n = strcspn(line, "\n");
        char end = line[n];
        line[n] = '\0';
        cli_put_visible(line, stdout);
        if (end)
            putchar('\n');
        line += n + (end != '\0');
    }
    return ferror(stdout) ? -1 : 0;
}

static int run(const char *layout, ug_report_format fmt, bool internal)
{
    ug_error err = {0};
    ug_chart *chart = NULL;
    ug_allocation *alloc = NULL;
    char *report = NULL;
    size_t len = 0;
    int rc = EXIT_OK;
    if ((rc = cli_load_chart(layout, &chart)))
        return rc;
    ug_status st = internal ? ug_chart_allocate_internal(chart, &alloc, &err)
                            : ug_chart_allocate(chart, &alloc, &err);
    if (st ||
        ug_allocation_report(alloc, fmt, &report, &len, &err)) {
        cli_report_error(&err);
        rc = cli_exit_for(&err);
    } else if (put_report(report, len, fmt) || fflush(stdout) != 0) {
        fprintf(stderr, "unitgram tally: cannot write the report\n");
        rc = EXIT_OUTPUT;
    }
    free(report);
    ug_allocation_free(alloc);
    ug_chart_free(chart);
    return rc;
}

int cli_tally(int argc, char **argv)
{
    tally_args a = {"text", false};
    const char *layout = NULL;
    size_t n = 0;
    ug_report_format fmt = UG_REPORT_TEXT;
    int rc = cli_parse(&tally_command, &a, argc, argv, &layout, &n);
    if (rc)
        return rc < 0 ? EXIT_OK : rc;
    if (parse_format(a.format, &fmt))
        return cli_usage("tally", "--format is text, csv or json, not '%s'", a.format);
    if (!n)
        return cli_usage("tally", "missing the LAYOUT file");
    return run(layout, fmt, a.internal);
}
