/* Placeholder until the 'init' command lands; it refuses rather than pretends. */
#include <stdio.h>

#include "cli.h"

int cli_init(int argc, char **argv)
{
    (void)argc;
    (void)argv;
    fprintf(stderr, "unitgram: 'init' is not available in this build yet\n");
    return EXIT_USAGE;
}
