/*
** The command-line client: one file per command (cli_<name>.c), each a thin
** layer over include/unitgram.h. Exit codes are the contract in --help and
** the man page.
*/
#ifndef UG_CLI_H
#define UG_CLI_H

#include <stdbool.h>
#include <stdio.h>

#include "unitgram.h"

enum {
    EXIT_OK = 0,
    EXIT_INPUT = 1,  /* bad input: layout, CSV or glyph */
    EXIT_USAGE = 2,  /* wrong command-line use */
    EXIT_AUDIT = 3,  /* audit findings under --strict */
    EXIT_OUTPUT = 4  /* the output could not be written */
};

/* The exit-code paragraph every --help ends with. */
#define CLI_EXIT_CODES \
    "exit codes: 0 success, 1 bad input (layout, CSV or glyph), 2 usage,\n" \
    "            3 audit failure under --strict, 4 output could not be written\n"

int cli_tally(int argc, char **argv);
int cli_draw(int argc, char **argv);
int cli_describe(int argc, char **argv);
int cli_audit(int argc, char **argv);
int cli_glyphs(int argc, char **argv);
int cli_init(int argc, char **argv);

/* ---- diagnostics (cli_common.c) ---- */

/* True when stderr is a terminal and NO_COLOR is unset or empty. */
bool cli_color(void);
/* s on `to` with what could drive the terminal or reorder the line shown
** escaped (ug_text_visible): for any text that came from an input. */
void cli_put_visible(const char *s, FILE *to);
/* "file:line:col: SEVERITY: message" on stderr; severity is "error",
** "warning" or "note"; coloured only when cli_color(). */
void cli_diag(const char *severity, const ug_error *err);
/* cli_diag("error", err). */
void cli_report_error(const ug_error *err);
/* Exit code for a failed library call that read input. */
int cli_exit_for(const ug_error *err);
/* "unitgram CMD: message" and a pointer to --help on stderr; EXIT_USAGE. */
int cli_usage(const char *cmd, const char *fmt, ...)
    __attribute__((format(printf, 2, 3)));

/* Seconds on a monotonic clock (for progress, summaries and timeouts). */
double cli_now(void);
/* Remove in-flight temporary files when stopped by INT, TERM or HUP. */
void cli_clean_up_on_signals(void);

/* ---- arguments ---- */

/* Does argv[*i] name the option (long "--name", short "-x" or NULL)? When it
** takes a value (val != NULL), "--name VALUE", "--name=VALUE" and "-x VALUE"
** are accepted and *i moves past the value. Returns 1 on a match, 0 when
** argv[*i] is another argument, -1 (after printing a usage error) when the
** value is missing. */
int cli_option(const char *cmd, int argc, char **argv, int *i, const char *lng,
               const char *shrt, const char **val);
/* A number option ("--name VALUE" as cli_option) whose value must be a
** finite decimal number from lo to hi, and a whole one when whole; the range
** check comes before any conversion, so no value can overflow the type it
** ends up in. Returns 1 with *out set, 0 when argv[*i] is another argument,
** -1 after a usage error naming the option and its range. */
int cli_number_option(const char *cmd, int argc, char **argv, int *i,
                      const char *lng, double lo, double hi, bool whole,
                      double *out);
/* "-h" or "--help". */
bool cli_is_help(const char *arg);

/* ---- the option tables (cli_common.c) ---- */

/* What an option takes: nothing, a text, a repeatable text (a list), a number
** or a whole number in [lo, hi]; CLI_LIMITS stands for --max-icons,
** --max-input-bytes and --max-panels together (cli_limit_option). */
typedef enum { CLI_FLAG, CLI_TEXT, CLI_TEXTS, CLI_NUMBER, CLI_WHOLE, CLI_LIMITS } cli_kind;

/* One option of a command: parsing and its lines of --help both come from
** here. `off` is where the value goes in the command's option struct (a
** bool, a const char *, a const char *[] with its size_t count at count_off
** and room for hi entries, a double, a long); `help` is its text, lines
** joined by '\n', printed from column 25. */
typedef struct {
    const char *name, *shrt, *arg;
    cli_kind kind;
    size_t off, count_off;
    double lo, hi;
    const char *help;
} cli_opt;

/* A command: its name, the text of --help before "options:", its options
** (ended by one with a NULL name) and how many plain arguments it takes. */
typedef struct {
    const char *name, *about;
    const cli_opt *opts;
    size_t max_args;
} cli_command;

/* Parse argv[1..] into opts and args (at most c->max_args). 0: go on; a
** negative value: --help was printed; otherwise the exit code of a usage
** error, already reported. */
int cli_parse(const cli_command *c, void *opts, int argc, char **argv, const char **args,
              size_t *nargs);
/* The command's whole --help text. */
void cli_help(const cli_command *c, FILE *to);
/* The option named `name` in c's table, or NULL (for messages and tests). */
const cli_opt *cli_find_option(const cli_command *c, const char *name);

/* The library's context for this program: its glyph roots are the source
** tree's glyphs/ when the binary runs from its build folder, then the
** installed data folder. cli_bind_context finds the tree and binds a context
** to the calling thread (NULL, with a message, when out of memory); a thread
** the program starts binds its own from cli_new_context (NULL when out of
** memory) and frees it when done. */
ug_context *cli_bind_context(void);
ug_context *cli_new_context(void);

/* --max-icons N and --max-input-bytes N (also --opt=N): the limits every
** later cli_load_chart uses. Returns 1 when argv[*i] was one of them (and
** steps *i past its value), 0 when it was not, -1 after a usage error. */
int cli_limit_option(const char *cmd, int argc, char **argv, int *i);
/* Those limits, for loaders other than cli_load_chart (page files). */
const ug_limits *cli_limits(void);
/* Load a chart; "-" reads standard input (named "<stdin>", relative paths
** from the current folder). Errors are printed; returns an exit code. */
int cli_load_chart(const char *path, ug_chart **out);
/* cli_load_chart, then ug_chart_allocate; on failure (printed) both are NULL. */
int cli_load_allocated(const char *path, ug_chart **chart, ug_allocation **alloc);
/* Audit the chart and print each finding on stderr as a diagnostic with its
** fix as a note. Returns EXIT_AUDIT when strict and any finding is a warning
** or an error, EXIT_INPUT when the audit could not run, else EXIT_OK. */
int cli_print_audit(const ug_chart *chart, const ug_pack_options *opt, bool strict);
/* The same for a chart already allocated and packed (ug_chart_audit_drawn):
** nothing is allocated or loaded again. */
int cli_print_audit_drawn(const ug_chart *chart, const ug_allocation *alloc,
                          const ug_scene *scene, bool strict);
/* Is the layout file a page file (ug_layout_detect)? */
bool cli_is_page_file(const char *path);
/* Print findings as cli_print_audit does, then free them (f is taken over);
** returns the same exit codes. */
int cli_print_findings(ug_findings *f, bool strict);
/* Print each glyph sanitizer warning of a packed scene. */
void cli_glyph_warnings(const ug_scene *scene, const ug_chart *chart);

/* The limit options cli_limit_option reads, as each command's help lists
** them: the figures come from unitgram.h, so help and library agree. */
#define CLI_STR_(x) #x
#define CLI_STR(x) CLI_STR_(x)
#define CLI_LIMITS_HELP                                                                  \
    "  --max-icons N         refuse charts of more than N icons (default "                \
    CLI_STR(UG_DEFAULT_MAX_ICONS) ",\n"                                                   \
    "                        at most " CLI_STR(UG_CEILING_ICONS) ")\n"                     \
    "  --max-input-bytes N   refuse layout or CSV files larger than N bytes\n"            \
    "                        (default " CLI_STR(UG_DEFAULT_MAX_FILE) ")\n"                 \
    "  --max-panels N        refuse a page of more than N panels (default "               \
    CLI_STR(UG_DEFAULT_MAX_PANELS) ",\n"                                                  \
    "                        at most " CLI_STR(UG_CEILING_PANELS) ")\n"

/* ---- draw, batch and watch (cli_draw.c, cli_render.c, cli_batch.c, cli_watch.c) ---- */

#define CLI_MAX_DIRS 32
#define CLI_MAX_JOBS 32 /* threads drawing a batch (--jobs) */

typedef struct {
    const char *layout, *out, *format;
    const char *glyph_dirs[CLI_MAX_DIRS];
    size_t nglyph_dirs;
    const char *each_row;    /* --each-row CSV */
    bool watch;
    long watch_limit;        /* redraws before exiting; 0: no limit */
    double watch_timeout;    /* seconds before exiting; 0: no limit */
    bool quiet;              /* no progress bar or summary */
    double dpi, scale;       /* PNG and PDF (raster.c); 0: 96 dpi, scale 1 */
    bool strict;             /* audit findings stop the drawing (exit 3) */
    long jobs;               /* --jobs: batch threads; 0: one per processor */
} cli_draw_opts;

/* Output format from --format or the file's extension: "svg", "png", "pdf",
** "html"; NULL when neither says (an error message is printed). */
const char *cli_output_format(const char *out, const char *given);

/* One draw of o->layout, a chart or a page file, to o->out (cli_render.c).
** When inputs is not NULL it receives the files the drawing read
** (ug_chart_inputs or ug_page_inputs; NULL when the layout did not load).
** Returns an exit code. */
int cli_draw_layout(const cli_draw_opts *o, char ***inputs);
/* A chart's SVG as the bytes of the format o asks for: *out is svg itself
** for SVG, else new bytes (svg stays the caller's). Draw, watch and batch
** all write through it. */
ug_status cli_chart_bytes(const ug_chart *chart, const ug_allocation *alloc,
                          const cli_draw_opts *o, char *svg, size_t len, char **out,
                          size_t *out_len, ug_error *err);
int cli_batch(const cli_draw_opts *o);
int cli_watch(const cli_draw_opts *o);

#endif
