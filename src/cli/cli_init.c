/*
** `unitgram init`: write a commented starter layout (or page file).
**
** A starter is written to a path the user has just named, often one they have
** forgotten holds their work, so nothing already there is replaced unless
** --replace says so. "Already there" is decided by the kernel when the file is
** created (ug_write_file_new), not by a look beforehand: a check-then-write
** leaves a gap another process can fill, and fopen(..., "r") cannot see a
** dangling symlink or a file it may not read, and blocks on a FIFO.
*/
#include <stddef.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>

#include "cli.h"

typedef struct {
    bool page, replace;
    const char *out;
} init_args;

static const cli_opt init_opts[] = {
    {"--page", NULL, NULL, CLI_FLAG, offsetof(init_args, page), 0, 0, 0,
     "a one-page handout file instead of a chart"},
    {"--output", "-o", "FILE", CLI_TEXT, offsetof(init_args, out), 0, 0, 0,
     "where to write (default: standard output); when\n"
     "anything is at FILE already (a file, a folder, a\n"
     "symlink, even a dangling one, a FIFO) it is left\n"
     "as it was and nothing is written (exit 4)"},
    {"--replace", NULL, NULL, CLI_FLAG, offsetof(init_args, replace), 0, 0, 0,
     "replace FILE when it is a regular file (written\n"
     "to a temporary file and renamed over it)"},
    {NULL, NULL, NULL, CLI_FLAG, 0, 0, 0, 0, NULL},
};

static const cli_command init_command = {
    "init",
    "usage: unitgram init [--page] [-o FILE [--replace]]\n"
    "\n"
    "Write a commented starter layout that draws as it is.\n",
    init_opts, 0};

/* What stands at path, for the message that leaves it alone. */
static const char *what_is(const char *path)
{
    struct stat sb;
    if (lstat(path, &sb) != 0)
        return "something";
    if (S_ISLNK(sb.st_mode))
        return stat(path, &sb) == 0 ? "a symbolic link" : "a dangling symbolic link";
    if (S_ISFIFO(sb.st_mode))
        return "a FIFO";
    if (S_ISDIR(sb.st_mode))
        return "a folder";
    return S_ISREG(sb.st_mode) ? "a file" : "a special file";
}

static int write_starter(const char *out, const char *text)
{
    ug_error err = {0};
    int existed = 0;
    if (!ug_write_file_new(out, text, strlen(text), &existed, &err))
        return EXIT_OK;
    if (existed) {
        ug_error e = {.where = {out, 0, 0}};
        snprintf(e.msg, sizeof e.msg, "%s is there already; left as it was "
                 "(give --replace to replace a file)", what_is(out));
        cli_diag("error", &e);
    } else
        cli_report_error(&err);
    return EXIT_OUTPUT;
}

/* Standard output, or a file replaced by rename. */
static int write_atomic(const char *out, const char *text)
{
    ug_error err = {0};
    if (ug_write_file_atomic(out, text, strlen(text), &err)) {
        cli_report_error(&err);
        return EXIT_OUTPUT;
    }
    return EXIT_OK;
}

/* --replace: only a regular file (or nothing) at out. The atomic writer
** writes into a FIFO or device in place, which can block, and would rename
** over a symlink rather than replace what it names. */
static int replace_starter(const char *out, const char *text)
{
    struct stat sb;
    if (lstat(out, &sb) == 0 && !S_ISREG(sb.st_mode)) {
        ug_error e = {.where = {out, 0, 0}};
        snprintf(e.msg, sizeof e.msg, "%s is there; --replace replaces only a "
                 "regular file", what_is(out));
        cli_diag("error", &e);
        return EXIT_OUTPUT;
    }
    return write_atomic(out, text);
}

int cli_init(int argc, char **argv)
{
    init_args a = {false, false, "-"};
    size_t n = 0;
    int rc = cli_parse(&init_command, &a, argc, argv, NULL, &n);
    if (rc)
        return rc < 0 ? EXIT_OK : rc;
    const char *out = a.out;
    int page = a.page;
    bool replace = a.replace;
    if (replace && !strcmp(out, "-"))
        return cli_usage("init", "--replace needs -o FILE");
    char *text = ug_starter_layout_for(page, out);
    if (!text) {
        fputs("unitgram: error: out of memory\n", stderr);
        return EXIT_INPUT;
    }
    rc = !strcmp(out, "-") ? write_atomic(out, text)
             : replace       ? replace_starter(out, text)
                             : write_starter(out, text);
    free(text);
    return rc;
}
