/* Placeholder until the 'glyphs' command lands; it refuses rather than pretends. */
#include <stdio.h>

#include "cli.h"

int cli_glyphs(int argc, char **argv)
{
    (void)argc;
    (void)argv;
    fprintf(stderr, "unitgram: 'glyphs' is not available in this build yet\n");
    return EXIT_USAGE;
}
