/*
** `unitgram draw LAYOUT -o OUT`: its options, then the way to one of the
** three ways of drawing: once (cli_render.c, the one drawing path, which the
** others use too), again on every change (cli_watch.c) or once per CSV row
** (cli_batch.c).
*/
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>

#include "cli.h"

/* Every number option's range is checked before the value is converted
** (a double far out of range cast to long is undefined) and stated in
** --help. --dpi and --scale run from about a tenth of the default to 25
** times it: below, a chart comes out a few pixels wide (800 px at 10 dpi is
** 84 pixels); above, raster.c's own limits (32767 pixels a side, 100
** megapixels, a 14400 pt page) refuse almost any chart anyway. */
#define DPI_MIN 10
#define DPI_MAX 2400
#define SCALE_MIN 0.1
#define SCALE_MAX 25
/* A count that fits a long everywhere; a year of seconds; poll(2) counts
** whole milliseconds, so nothing shorter is meant. */
#define WATCH_LIMIT_MAX 1000000000
#define WATCH_TIMEOUT_MIN 0.001
#define WATCH_TIMEOUT_MAX 31536000

/* The ranges above, as --help prints them. */
#define STR_(x) #x
#define STR(x) STR_(x)

static const char draw_help[] =
    "usage: unitgram draw LAYOUT -o OUT [OPTIONS]\n"
    "       unitgram draw TEMPLATE --each-row COUNTS.csv -o 'DIR/{group}.svg'\n"
    "\n"
    "Draw the chart (or the one-page handout) a layout file describes. LAYOUT\n"
    "'-' reads the layout from standard input (relative paths in it start from\n"
    "the current folder).\n"
    "\n"
    "options:\n"
    "  -o, --output FILE     where to write; '-' writes to standard output\n"
    "  --format FORMAT       svg, png, pdf or html; svg is the default for '-',\n"
    "                        otherwise the extension of FILE decides\n"
    "  --dpi N               PNG resolution in pixels per inch, " STR(DPI_MIN) " to " STR(DPI_MAX) "\n"
    "                        (default 96, one pixel per CSS px); PDF and SVG\n"
    "                        are vector\n"
    "  --scale N             enlarge PNG and PDF by N, " STR(SCALE_MIN) " to " STR(SCALE_MAX) " (default 1)\n"
    "  --glyph-dir DIR       also look for glyphs in DIR (repeatable)\n"
    "  --each-row CSV        draw one chart per row of CSV: the row's group-column\n"
    "                        value (or first column) names it and replaces {group}\n"
    "                        in -o and in the template's title and subtitle; all\n"
    "                        charts share one icon value and one layout; an -o\n"
    "                        ending in .pdf without {group} gives one PDF with a\n"
    "                        page per row\n"
    "  --jobs N              with --each-row: draw with N threads, 1 to 32\n"
    "                        (default: one per processor)\n"
    "  --strict              audit findings (printed as warnings on every draw)\n"
    "                        stop the drawing: nothing is written, exit 3\n"
    "  --quiet               no progress bar or summary line (--each-row)\n"
    "  --watch               redraw whenever the layout, its CSV or a glyph file\n"
    "                        changes (a page: its charts' files too); a broken\n"
    "                        edit keeps the last good picture\n"
    "  --watch-limit N       with --watch: exit after N redraws (1 to " STR(WATCH_LIMIT_MAX) ")\n"
    "  --watch-timeout SECS  with --watch: exit after SECS seconds (" STR(WATCH_TIMEOUT_MIN) " to\n"
    "                        " STR(WATCH_TIMEOUT_MAX) ", a year)\n"
    CLI_LIMITS_HELP
    "  -h, --help            show this help\n"
    "\n" CLI_EXIT_CODES;

/* ---- options (the new ones are read here; their work is elsewhere) ---- */

static int number_option(int argc, char **argv, int *i, cli_draw_opts *o)
{
    double v = 0;
    int m;
    if ((m = cli_number_option("draw", argc, argv, i, "--dpi", DPI_MIN, DPI_MAX,
                               false, &o->dpi)) ||
        (m = cli_number_option("draw", argc, argv, i, "--scale", SCALE_MIN,
                               SCALE_MAX, false, &o->scale)))
        return m;
    if ((m = cli_number_option("draw", argc, argv, i, "--jobs", 1, CLI_MAX_JOBS, true,
                               &v)) > 0)
        o->jobs = (long)v;
    if (m)
        return m;
    if ((m = cli_number_option("draw", argc, argv, i, "--watch-limit", 1,
                               WATCH_LIMIT_MAX, true, &v)) > 0)
        o->watch_limit = (long)v;
    if (m)
        return o->watch_option = "--watch-limit", m;
    if ((m = cli_number_option("draw", argc, argv, i, "--watch-timeout",
                               WATCH_TIMEOUT_MIN, WATCH_TIMEOUT_MAX, false,
                               &o->watch_timeout)))
        o->watch_option = "--watch-timeout";
    return m;
}

static int draw_option(int argc, char **argv, int *i, cli_draw_opts *o)
{
    const char *v = NULL;
    int m;
    if ((m = cli_limit_option("draw", argc, argv, i)) ||
        (m = number_option(argc, argv, i, o)))
        return m < 0 ? EXIT_USAGE : 0;
    if ((m = cli_option("draw", argc, argv, i, "--output", "-o", &o->out)))
        return m < 0 ? EXIT_USAGE : 0;
    if ((m = cli_option("draw", argc, argv, i, "--format", NULL, &o->format)))
        return m < 0 ? EXIT_USAGE : 0;
    if ((m = cli_option("draw", argc, argv, i, "--each-row", NULL, &o->each_row)))
        return m < 0 ? EXIT_USAGE : 0;
    if ((m = cli_option("draw", argc, argv, i, "--glyph-dir", NULL, &v))) {
        if (m > 0 && o->nglyph_dirs == CLI_MAX_DIRS)
            return cli_usage("draw", "at most %d --glyph-dir folders", CLI_MAX_DIRS);
        if (m > 0)
            o->glyph_dirs[o->nglyph_dirs++] = v;
        return m < 0 ? EXIT_USAGE : 0;
    }
    if (cli_option("draw", argc, argv, i, "--watch", NULL, NULL))
        return o->watch = true, 0;
    if (cli_option("draw", argc, argv, i, "--strict", NULL, NULL))
        return o->strict = true, 0;
    if (cli_option("draw", argc, argv, i, "--quiet", "-q", NULL))
        return o->quiet = true, 0;
    return -1;
}

static int check_draw(const cli_draw_opts *o)
{
    if (!o->layout)
        return cli_usage("draw", "missing the LAYOUT file");
    if (!o->out)
        return cli_usage("draw", "missing -o OUT (a file, or '-' for standard output)");
    if (o->watch && o->each_row)
        return cli_usage("draw", "--watch and --each-row do not go together");
    if (o->watch && (!strcmp(o->layout, "-") || !strcmp(o->out, "-")))
        return cli_usage("draw", "--watch needs a layout file and an output file, "
                                 "not '-'");
    if (o->watch_option && !o->watch)
        return cli_usage("draw", "%s only works with --watch", o->watch_option);
    const char *fmt = cli_output_format(o->out, o->format);
    if (!fmt)
        return EXIT_USAGE;
    if (o->each_row && !strstr(o->out, "{group}") && strcmp(fmt, "pdf"))
        return cli_usage("draw", "with --each-row, -o must contain {group} "
                                 "(for instance 'out/{group}.svg'), or name one PDF "
                                 "to get a page per row ('out/all.pdf')");
    if (o->jobs && !o->each_row)
        return cli_usage("draw", "--jobs only works with --each-row");
    if (o->each_row && cli_is_page_file(o->layout))
        return cli_usage("draw", "--each-row draws a chart per row; a page file is drawn "
                                 "once (--watch redraws it)");
    return EXIT_OK;
}

static int parse_draw(int argc, char **argv, cli_draw_opts *o)
{
    for (int i = 1; i < argc; i++) {
        const char *a = argv[i];
        int rc;
        if (cli_is_help(a)) {
            fputs(draw_help, stdout);
            return -1;
        } else if ((rc = draw_option(argc, argv, &i, o)) >= 0) {
            if (rc)
                return rc;
        } else if (a[0] == '-' && a[1]) {
            return cli_usage("draw", "unknown option '%s'", a);
        } else if (!o->layout) {
            o->layout = a;
        } else {
            return cli_usage("draw", "one layout at a time (found '%s' too)", a);
        }
    }
    return check_draw(o);
}

int cli_draw(int argc, char **argv)
{
    cli_draw_opts o;
    memset(&o, 0, sizeof o);
    int rc = parse_draw(argc, argv, &o);
    if (rc)
        return rc < 0 ? EXIT_OK : rc;
    if (o.each_row)
        return cli_batch(&o);
    if (o.watch)
        return cli_watch(&o);
    return cli_draw_layout(&o, NULL);
}

