/* Placeholder until the 'tally' command lands; it refuses rather than pretends. */
#include <stdio.h>

#include "cli.h"

int cli_tally(int argc, char **argv)
{
    (void)argc;
    (void)argv;
    fprintf(stderr, "unitgram: 'tally' is not available in this build yet\n");
    return EXIT_USAGE;
}
