/*
** `unitgram audit LAYOUT [--strict] [--format text|json]`: load a chart,
** audit it and print the findings on standard output. Exit 3 under --strict
** when any finding is a warning or an error; otherwise 0 once the audit ran.
*/
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "cli.h"

static void usage(FILE *to)
{
    fprintf(to,
            "usage: unitgram audit LAYOUT [--strict] [--format text|json]\n"
            "  Check a chart for honesty, privacy and accessibility. Each finding\n"
            "  names its rule, its place in the layout and a suggested fix;\n"
            "  `audit: ignore: [RULE]` in the layout leaves a rule out.\n"
            "  --strict        exit 3 when there is any warning or error\n"
            "  --format FMT    text (default) or json\n");
}

typedef struct {
    const char *layout;
    bool strict;
    ug_report_format fmt;
} audit_args;

/* Returns -1 when the arguments are good, else the exit code. */
static int parse(int argc, char **argv, audit_args *a)
{
    for (int i = 1; i < argc; i++) {
        if (!strcmp(argv[i], "--help") || !strcmp(argv[i], "-h")) {
            usage(stdout);
            return EXIT_OK;
        } else if (!strcmp(argv[i], "--strict")) {
            a->strict = true;
        } else if (!strcmp(argv[i], "--format") && i + 1 < argc) {
            const char *f = argv[++i];
            if (strcmp(f, "text") && strcmp(f, "json")) {
                fprintf(stderr, "unitgram audit: --format is text or json, not '%s'\n", f);
                return EXIT_USAGE;
            }
            a->fmt = !strcmp(f, "json") ? UG_REPORT_JSON : UG_REPORT_TEXT;
        } else if (argv[i][0] == '-' && argv[i][1]) {
            fprintf(stderr, "unitgram audit: unknown option '%s'\n", argv[i]);
            usage(stderr);
            return EXIT_USAGE;
        } else if (a->layout) {
            fprintf(stderr, "unitgram audit: one layout at a time\n");
            return EXIT_USAGE;
        } else {
            a->layout = argv[i];
        }
    }
    if (!a->layout) {
        usage(stderr);
        return EXIT_USAGE;
    }
    return -1;
}

int cli_audit(int argc, char **argv)
{
    audit_args a = {NULL, false, UG_REPORT_TEXT};
    int rc = parse(argc, argv, &a);
    if (rc >= 0)
        return rc;
    ug_error err = {0};
    ug_chart *chart = NULL;
    ug_findings *f = NULL;
    char *text = NULL;
    size_t len = 0;
    if (ug_chart_load(a.layout, NULL, &chart, &err) ||
        ug_chart_audit(chart, &f, &err) ||
        ug_findings_format(f, a.fmt, &text, &len, &err)) {
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
    return rc;
}
