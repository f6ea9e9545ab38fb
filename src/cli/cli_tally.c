/*
** `unitgram tally LAYOUT [--format text|csv|json] [--internal]`: load a chart,
** allocate its icons and print the allocation report (count, quota, icons,
** shown value and difference per category). By default it reports the
** published table, hidden counts as their placeholders; --internal reports
** every count as counted, under a first line saying it is not for
** publication. Nothing is drawn and no file is written.
*/
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "cli.h"

static void help(FILE *to)
{
    fprintf(to,
            "usage: unitgram tally LAYOUT [--format text|csv|json] [--internal]\n"
            "\n"
            "Print how the chart's counts become whole icons: per category the\n"
            "count, the exact quota, the icons drawn, the value they show and the\n"
            "difference from the count. Counts the chart hides (suppress, protect)\n"
            "are shown as the chart shows them. LAYOUT '-' reads standard input.\n"
            "\n"
            "options:\n"
            "  --format FORMAT       text (default), csv or json\n"
            "  --internal            every count as counted, hidden ones included:\n"
            "                        for the analyst only, never for publication\n"
            "  --max-icons N, --max-input-bytes N   the limits, as for draw\n"
            "  -h, --help            show this help\n"
            "\n" CLI_EXIT_CODES);
}

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

static int usage_error(const char *msg, const char *arg)
{
    return cli_usage("tally", "%s%s%s", msg, arg ? " " : "", arg ? arg : "");
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
    const char *layout = NULL;
    ug_report_format fmt = UG_REPORT_TEXT;
    bool internal = false;
    for (int i = 1; i < argc; i++) {
        const char *a = argv[i];
        if (!strcmp(a, "-h") || !strcmp(a, "--help")) {
            help(stdout);
            return EXIT_OK;
        }
        int m = cli_limit_option("tally", argc, argv, &i);
        if (m < 0)
            return EXIT_USAGE;
        if (m)
            continue;
        if (!strcmp(a, "--internal")) {
            internal = true;
        } else if (!strcmp(a, "--format") || !strncmp(a, "--format=", 9)) {
            const char *v = a[8] == '=' ? a + 9 : i + 1 < argc ? argv[++i] : NULL;
            if (!v)
                return usage_error("--format needs a value", NULL);
            if (parse_format(v, &fmt))
                return usage_error("unknown format (text, csv or json):", v);
        } else if (a[0] == '-' && a[1]) {
            return usage_error("unknown option", a);
        } else if (layout) {
            return usage_error("only one layout file, found another:", a);
        } else {
            layout = a;
        }
    }
    if (!layout)
        return usage_error("missing the LAYOUT file", NULL);
    return run(layout, fmt, internal);
}
