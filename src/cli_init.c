/*
** `unitgram init`: write a commented starter layout (or page file).
*/
#include <stdio.h>
#include <string.h>

#include "cli.h"

static void help(FILE *to)
{
    fprintf(to,
            "usage: unitgram init [--page] [-o FILE]\n\n"
            "Write a commented starter layout that draws as it is.\n"
            "  --page       a one-page handout file instead of a chart\n"
            "  -o FILE      where to write (default: standard output); an existing\n"
            "               file is never overwritten\n");
}

int cli_init(int argc, char **argv)
{
    int page = 0;
    const char *out = "-";
    for (int i = 1; i < argc; i++) {
        if (!strcmp(argv[i], "--help") || !strcmp(argv[i], "-h")) {
            help(stdout);
            return EXIT_OK;
        } else if (!strcmp(argv[i], "--page")) {
            page = 1;
        } else if ((!strcmp(argv[i], "-o") || !strcmp(argv[i], "--output")) &&
                   i + 1 < argc) {
            out = argv[++i];
        } else {
            fprintf(stderr, "unitgram init: unexpected argument '%s'\n", argv[i]);
            help(stderr);
            return EXIT_USAGE;
        }
    }
    FILE *existing = strcmp(out, "-") ? fopen(out, "r") : NULL;
    if (existing) {
        fclose(existing);
        fprintf(stderr, "%s: error: already exists; not overwritten\n", out);
        return EXIT_OUTPUT;
    }
    const char *text = ug_starter_layout(page);
    ug_error err = {0};
    if (ug_write_file_atomic(out, text, strlen(text), &err)) {
        cli_report_error(&err);
        return EXIT_OUTPUT;
    }
    return EXIT_OK;
}
