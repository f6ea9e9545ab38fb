/*
** Helpers every command shares: error printing and exit codes.
*/
#include <stdio.h>

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
