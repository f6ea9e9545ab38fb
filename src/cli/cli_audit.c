/*
** `unitgram audit LAYOUT [--strict] [--format text|json]`: load a chart,
** audit it and print the findings on standard output (the report is the
** command's product; `draw` prints the same findings on stderr as warnings).
** Exit 3 under --strict when any finding is a warning or an error.
*/
#include <stddef.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "cli.h"

typedef struct {
    const char *format;
    bool strict;
} audit_args;

static const cli_opt audit_opts[] = {
    {"--strict", NULL, NULL, CLI_FLAG, offsetof(audit_args, strict), 0, 0, 0,
     "exit 3 when there is any warning or error"},
    {"--format", NULL, "FORMAT", CLI_TEXT, offsetof(audit_args, format), 0, 0, 0,
     "text (default) or json"},
    {"--max-icons", NULL, NULL, CLI_LIMITS, 0, 0, 0, 0, NULL},
    {NULL, NULL, NULL, CLI_FLAG, 0, 0, 0, 0, NULL},
};

static const cli_command audit_command = {
    "audit",
    "usage: unitgram audit LAYOUT [--strict] [--format text|json]\n"
    "\n"
    "Check a chart for honesty (vanished categories, rounding, totals), privacy\n"
    "(small counts) and accessibility (contrast, colours colour-blind readers\n"
    "cannot tell apart, missing title, source or unit). Each finding names its\n"
    "rule, its place in the layout and a computed fix; `audit: ignore: [RULE]`\n"
    "in the layout leaves a rule out. A page file audits every chart on it, and\n"
    "charts that count the same thing must share one scale. LAYOUT '-' reads\n"
    "standard input.\n",
    audit_opts, 1};

/* Returns -1 when the arguments are good, else the exit code. */
static int parse(int argc, char **argv, audit_args *a, const char **layout)
{
    size_t n = 0;
    int rc = cli_parse(&audit_command, a, argc, argv, layout, &n);
    if (rc)
        return rc < 0 ? EXIT_OK : rc;
    if (strcmp(a->format, "text") && strcmp(a->format, "json"))
        return cli_usage("audit", "--format is text or json, not '%s'", a->format);
    if (!n)
        return cli_usage("audit", "missing the LAYOUT file");
    return -1;
}

int cli_audit(int argc, char **argv)
{
    audit_args a = {"text", false};
    const char *layout = NULL;
    int rc = parse(argc, argv, &a, &layout);
    if (rc >= 0)
        return rc;
    ug_error err = {0};
    ug_chart *chart = NULL;
    ug_findings *f = NULL;
    char *text = NULL;
    size_t len = 0;
    ug_page *page = NULL;
    ug_report_format fmt = strcmp(a.format, "json") ? UG_REPORT_TEXT : UG_REPORT_JSON;
    if (cli_is_page_file(layout)) {
        if (ug_page_load(layout, cli_limits(), &page, &err) ||
            ug_page_audit(page, NULL, &f, &err))
            goto failed;
    } else if ((rc = cli_load_chart(layout, &chart))) {
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
