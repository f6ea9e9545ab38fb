/*
** unitgram command-line client: picks the command and hands over to its
** cli_<name>.c. Everything real happens in the library.
*/
#include <errno.h>
#include <stdio.h>
#include <string.h>

#include "cli.h"

typedef struct {
    const char *name;
    int (*run)(int argc, char **argv);
    const char *summary;
} command;

static const command commands[] = {
    {"draw", cli_draw, "draw a chart or handout (SVG, PNG, PDF, HTML)"},
    {"tally", cli_tally, "print the allocation report: counts to icons"},
    {"audit", cli_audit, "check a chart for honesty, privacy and accessibility"},
    {"describe", cli_describe, "print the plain-language description (alt text)"},
    {"glyphs", cli_glyphs, "list the glyph library or draw a contact sheet"},
    {"init", cli_init, "write a commented starter layout"},
};

static void usage(FILE *to)
{
    fprintf(to, "usage: unitgram COMMAND [OPTIONS] ...\n\ncommands:\n");
    for (size_t i = 0; i < sizeof commands / sizeof commands[0]; i++)
        fprintf(to, "  %-10s %s\n", commands[i].name, commands[i].summary);
    fprintf(to, "  %-10s %s\n", "help", "show help for a command");
    fprintf(to, "\n'unitgram help COMMAND' (or 'unitgram COMMAND --help') shows a "
                "command's options;\n'unitgram --version' the version.\n\n" CLI_EXIT_CODES);
}

static const command *find(const char *name)
{
    for (size_t i = 0; i < sizeof commands / sizeof commands[0]; i++)
        if (strcmp(commands[i].name, name) == 0)
            return &commands[i];
    return NULL;
}

static int run(int argc, char **argv)
{
    if (argc < 2) {
        usage(stderr);
        return EXIT_USAGE;
    }
    const char *name = argv[1];
    if (!strcmp(name, "--version") || !strcmp(name, "-V")) {
        printf("unitgram %s\n", UG_VERSION);
        return EXIT_OK;
    }
    if (!strcmp(name, "--help") || !strcmp(name, "-h")) {
        usage(stdout);
        return EXIT_OK;
    }
    if (!strcmp(name, "help")) {
        const command *c = argc > 2 ? find(argv[2]) : NULL;
        if (!c) {
            usage(argc > 2 ? stderr : stdout);
            return argc > 2 ? EXIT_USAGE : EXIT_OK;
        }
        char *help_argv[] = {argv[2], "--help", NULL};
        return c->run(2, help_argv);
    }
    const command *c = find(name);
    if (!c) {
        fputs("unitgram: unknown command '", stderr);
        cli_put_visible(name, stderr);
        fputs("'\n", stderr);
        usage(stderr);
        return EXIT_USAGE;
    }
    cli_clean_up_on_signals();
    return c->run(argc - 1, argv + 1);
}

/* Every command's output ends here, so a full disk or a closed pipe behind
** standard output is an error for all of them at once (`glyphs > /dev/full`
** once exited 0). stdio reports a failed write only at the flush, which for
** a short listing is this fclose. A command that already said it could not
** write keeps its message and code. */
static int close_stdout(int rc)
{
    errno = 0;
    bool failed = ferror(stdout) != 0;
    if (fclose(stdout) != 0)
        failed = true;
    if (!failed)
        return rc;
    int e = errno;
    if (rc != EXIT_OUTPUT)
        fprintf(stderr, "unitgram: could not write to standard output%s%s\n",
                e ? ": " : "", e ? strerror(e) : "");
    return rc == EXIT_OK ? EXIT_OUTPUT : rc;
}

int main(int argc, char **argv)
{
    ug_context *ctx = cli_bind_context();
    int rc = close_stdout(ctx ? run(argc, argv) : EXIT_INPUT);
    ug_context_free(ctx);
    return rc;
}
