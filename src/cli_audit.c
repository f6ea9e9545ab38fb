/* Placeholder until the 'audit' command lands; it refuses rather than pretends. */
#include <stdio.h>

#include "cli.h"

int cli_audit(int argc, char **argv)
{
    (void)argc;
    (void)argv;
    fprintf(stderr, "unitgram: 'audit' is not available in this build yet\n");
    return EXIT_USAGE;
}
