/*
** `unitgram init`: write a commented starter layout (or page file).
*/
#include <stdio.h>
#include <string.h>

#include "cli.h"

static void help(FILE *to)
{
    fprintf(to,
            "usage: unitgram init [--page] [-o FILE]\n"
            "\n"
            "Write a commented starter layout that draws as it is.\n"
            "\n"
            "options:\n"
            "  --page                a one-page handout file instead of a chart\n"
            "  -o, --output FILE     where to write (default: standard output); an\n"
            "                        existing file is never overwritten (exit 4)\n"
            "  -h, --help            show this help\n"
            "\n" CLI_EXIT_CODES);
}

int cli_init(int argc, char **argv)
{
    int page = 0, m;
    const char *out = "-";
    for (int i = 1; i < argc; i++) {
        if (cli_is_help(argv[i])) {
            help(stdout);
            return EXIT_OK;
        } else if (!strcmp(argv[i], "--page")) {
            page = 1;
        } else if ((m = cli_option("init", argc, argv, &i, "--output", "-o", &out))) {
            if (m < 0)
                return EXIT_USAGE;
        } else {
            return cli_usage("init", "unexpected argument '%s'", argv[i]);
        }
    }
    FILE *existing = strcmp(out, "-") ? fopen(out, "r") : NULL;
    if (existing) {
        fclose(existing);
        ug_error e = {.where = {out, 0, 0}, .msg = "already exists; not overwritten"};
        cli_diag("error", &e);
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
