/*
** Helpers every command shares: error printing and exit codes.
*/
#include <errno.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "cli.h"

void cli_report_error(const ug_error *err)
{
    const char *file = err->where.file ? err->where.file : "unitgram";
    if (err->where.line)
        fprintf(stderr, "%s:%u:%u: error: %s\n", file, err->where.line,
                err->where.column, err->msg);
    else
        fprintf(stderr, "%s: error: %s\n", file, err->msg);
}

int cli_exit_for(const ug_error *err)
{
    (void)err; /* reading failed: the input is at fault; writers use EXIT_OUTPUT */
    return EXIT_INPUT;
}

/* A whole number of at least 1 with nothing after it. */
static bool parse_count(const char *s, size_t *out)
{
    if (!s || *s < '0' || *s > '9')
        return false;
    char *end;
    errno = 0;
    unsigned long long v = strtoull(s, &end, 10);
    if (errno || *end || v == 0 || v > (size_t)-1)
        return false;
    *out = (size_t)v;
    return true;
}

int cli_limit_option(const char *cmd, int argc, char **argv, int *i, ug_limits *lim)
{
    static const char *const names[] = {"--max-icons", "--max-input-bytes"};
    const char *a = argv[*i];
    for (int k = 0; k < 2; k++) {
        size_t n = strlen(names[k]);
        if (strncmp(a, names[k], n) || (a[n] && a[n] != '='))
            continue;
        const char *v = a[n] == '=' ? a + n + 1 : *i + 1 < argc ? argv[++*i] : NULL;
        size_t *field = k ? &lim->max_file_bytes : &lim->max_icons;
        if (parse_count(v, field))
            return 1;
        fprintf(stderr, "unitgram %s: %s expects a whole number of at least 1%s%s%s\n",
                cmd, names[k], v ? " (found '" : "", v ? v : "", v ? "')" : "");
        return -1;
    }
    return 0;
}
