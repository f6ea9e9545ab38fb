/*
** The command-line client: one file per command (cli_<name>.c), each a thin
** layer over include/unitgram.h. Exit codes are the contract in --help and
** the man page.
*/
#ifndef UG_CLI_H
#define UG_CLI_H

#include <stdbool.h>

#include "unitgram.h"

enum {
    EXIT_OK = 0,
    EXIT_INPUT = 1,  /* bad input: layout, CSV or glyph */
    EXIT_USAGE = 2,  /* wrong command-line use */
    EXIT_AUDIT = 3,  /* audit findings under --strict */
    EXIT_OUTPUT = 4  /* the output could not be written */
};

int cli_tally(int argc, char **argv);
int cli_draw(int argc, char **argv);
int cli_describe(int argc, char **argv);
int cli_audit(int argc, char **argv);
int cli_glyphs(int argc, char **argv);
int cli_init(int argc, char **argv);

/* Print an error as "file:line:col: error: message" on stderr. */
void cli_report_error(const ug_error *err);
/* --max-icons N and --max-input-bytes N (also --opt=N) into *lim. Returns 1
** when argv[*i] was one of them (and steps *i past a separate value), 0 when
** it was not, -1 after printing a usage error for a bad value. */
int cli_limit_option(const char *cmd, int argc, char **argv, int *i,
                     ug_limits *lim);
/* Exit code for a failed library call. */
int cli_exit_for(const ug_error *err);

#endif
