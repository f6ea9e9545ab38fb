/*
** `unitgram audit LAYOUT [--strict] [--format text|json]`: load a chart,
** audit it and print the findings on standard output (the report is the
** command's product; `draw` prints the same findings on stderr as warnings).
** Exit 3 under --strict when any finding is a warning or an error.
*/
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "cli.h"

static const char audit_help[] =
    "usage: unitgram audit LAYOUT [--strict] [--format text|json]\n"
    "\n"
    "Check a chart for honesty (vanished categories, rounding, totals), privacy\n"
    "(small counts) and accessibility (contrast, colours colour-blind readers\n"
    "cannot tell apart, missing title, source or unit). Each finding names its\n"
    "rule, its place in the layout and a computed fix; `audit: ignore: [RULE]`\n"
    "in the layout leaves a rule out. A page file audits every chart on it, and\n"
    "charts that count the same thing must share one scale. LAYOUT '-' reads\n"
    "standard input.\n"
    "\n"
    "options:\n"
    "  --strict              exit 3 when there is any warning or error\n"
    "  --format FORMAT       text (default) or json\n"
    CLI_LIMITS_HELP
    "  -h, --help            show this help\n"
    "\n" CLI_EXIT_CODES;

typedef struct {
    const char *layout, *format;
    bool strict;
} audit_args;

/* Returns -1 when the arguments are good, else the exit code. */
static int parse(int argc, char **argv, audit_args *a)
{
    for (int i = 1; i < argc; i++) {
        int m;
        if (cli_is_help(argv[i])) {
            fputs(audit_help, stdout);
            return EXIT_OK;
        } else if ((m = cli_limit_option("audit", argc, argv, &i))) {
            if (m < 0)
                return EXIT_USAGE;
        } else if (cli_option("audit", argc, argv, &i, "--strict", NULL, NULL)) {
            a->strict = true;
        } else if ((m = cli_option("audit", argc, argv, &i, "--format", NULL, &a->format))) {
            if (m < 0)
                return EXIT_USAGE;
            if (strcmp(a->format, "text") && strcmp(a->format, "json"))
                return cli_usage("audit", "--format is text or json, not '%s'", a->format);
        } else if (argv[i][0] == '-' && argv[i][1]) {
            return cli_usage("audit", "unknown option '%s'", argv[i]);
        } else if (a->layout) {
            return cli_usage("audit", "one layout at a time (found '%s' too)", argv[i]);
        } else {
            a->layout = argv[i];
        }
    }
    if (!a->layout)
        return cli_usage("audit", "missing the LAYOUT file");
    return -1;
}

int cli_audit(int argc, char **argv)
{
    audit_args a = {NULL, "text", false};
    int rc = parse(argc, argv, &a);
    if (rc >= 0)
        return rc;
    ug_error err = {0};
    ug_chart *chart = NULL;
    ug_findings *f = NULL;
    char *text = NULL;
    size_t len = 0;
    ug_page *page = NULL;
    ug_report_format fmt = strcmp(a.format, "json") ? UG_REPORT_TEXT : UG_REPORT_JSON;
    if (cli_is_page_file(a.layout)) {
        if (ug_page_load(a.layout, cli_limits(), &page, &err) ||
            ug_page_audit(page, NULL, &f, &err))
            goto failed;
    } else if ((rc = cli_load_chart(a.layout, &chart))) {
        return rc;
    } else if (ug_chart_audit(chart, &f, &err)) {
        goto failed;
    }
    if (ug_findings_format(f, fmt, &text, &len, &err)) {
failed:
        cli_report_error(&err);
        rc = cli_exit_for(&err);
        goto out;
    }
    fwrite(text, 1, len, stdout);
    rc = a.strict && ug_findings_count_severity(f, UG_SEVERITY_WARNING) ? EXIT_AUDIT
                                                                       : EXIT_OK;
out:
    free(text);
    ug_findings_free(f);
    ug_chart_free(chart);
    ug_page_free(page);
    return rc;
}
