/* Placeholder until the 'draw' command lands; it refuses rather than pretends. */
#include <stdio.h>

#include "cli.h"

int cli_draw(int argc, char **argv)
{
    (void)argc;
    (void)argv;
    fprintf(stderr, "unitgram: 'draw' is not available in this build yet\n");
    return EXIT_USAGE;
}

int cli_describe(int argc, char **argv)
{
    (void)argc;
    (void)argv;
    fprintf(stderr, "unitgram: 'describe' is not available in this build yet\n");
    return EXIT_USAGE;
}
