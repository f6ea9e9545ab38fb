/*
** `unitgram draw LAYOUT -o OUT`: its options, then the way to one of the
** three ways of drawing: once (cli_render.c, the one drawing path, which the
** others use too), again on every change (cli_watch.c) or once per CSV row
** (cli_batch.c).
*/
#include <stddef.h>
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

#define AT(field) offsetof(cli_draw_opts, field)

static const cli_opt draw_opts[] = {
    {"--output", "-o", "FILE", CLI_TEXT, AT(out), 0, 0, 0,
     "where to write; '-' writes to standard output"},
    {"--format", NULL, "FORMAT", CLI_TEXT, AT(format), 0, 0, 0,
     "svg, png, pdf or html; svg is the default for '-',\n"
     "otherwise the extension of FILE decides"},
    {"--dpi", NULL, "N", CLI_NUMBER, AT(dpi), 0, DPI_MIN, DPI_MAX,
     "PNG resolution in pixels per inch, " STR(DPI_MIN) " to " STR(DPI_MAX) "\n"
     "(default 96, one pixel per CSS px); PDF and SVG\n"
     "are vector"},
    {"--scale", NULL, "N", CLI_NUMBER, AT(scale), 0, SCALE_MIN, SCALE_MAX,
     "enlarge PNG and PDF by N, " STR(SCALE_MIN) " to " STR(SCALE_MAX) " (default 1)"},
    {"--glyph-dir", NULL, "DIR", CLI_TEXTS, AT(glyph_dirs), AT(nglyph_dirs), 0, CLI_MAX_DIRS,
     "also look for glyphs in DIR (repeatable)"},
    {"--each-row", NULL, "CSV", CLI_TEXT, AT(each_row), 0, 0, 0,
     "draw one chart per row of CSV: the row's group-column\n"
     "value (or first column) names it and replaces {group}\n"
     "in -o and in the template's title and subtitle; all\n"
     "charts share one icon value and one layout; an -o\n"
     "ending in .pdf without {group} gives one PDF with a\n"
     "page per row"},
    {"--jobs", NULL, "N", CLI_WHOLE, AT(jobs), 0, 1, CLI_MAX_JOBS,
     "with --each-row: draw with N threads, 1 to 32\n"
     "(default: one per processor)"},
    {"--strict", NULL, NULL, CLI_FLAG, AT(strict), 0, 0, 0,
     "audit findings (printed as warnings on every draw)\n"
     "stop the drawing: nothing is written, exit 3"},
    {"--quiet", "-q", NULL, CLI_FLAG, AT(quiet), 0, 0, 0,
     "no progress bar or summary line (--each-row)"},
    {"--watch", NULL, NULL, CLI_FLAG, AT(watch), 0, 0, 0,
     "redraw whenever the layout, its CSV or a glyph file\n"
     "changes (a page: its charts' files too); a broken\n"
     "edit keeps the last good picture"},
    {"--watch-limit", NULL, "N", CLI_WHOLE, AT(watch_limit), 0, 1, WATCH_LIMIT_MAX,
     "with --watch: exit after N redraws (1 to " STR(WATCH_LIMIT_MAX) ")"},
    {"--watch-timeout", NULL, "SECS", CLI_NUMBER, AT(watch_timeout), 0, WATCH_TIMEOUT_MIN,
     WATCH_TIMEOUT_MAX,
     "with --watch: exit after SECS seconds (" STR(WATCH_TIMEOUT_MIN) " to\n"
     STR(WATCH_TIMEOUT_MAX) ", a year)"},
    {"--max-icons", NULL, NULL, CLI_LIMITS, 0, 0, 0, 0, NULL},
    {NULL, NULL, NULL, CLI_FLAG, 0, 0, 0, 0, NULL},
};

static const cli_command draw_command = {
    "draw",
    "usage: unitgram draw LAYOUT -o OUT [OPTIONS]\n"
    "       unitgram draw TEMPLATE --each-row COUNTS.csv -o 'DIR/{group}.svg'\n"
    "\n"
    "Draw the chart (or the one-page handout) a layout file describes. LAYOUT\n"
    "'-' reads the layout from standard input (relative paths in it start from\n"
    "the current folder).\n",
    draw_opts, 1};

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
    if (o->watch_limit && !o->watch)
        return cli_usage("draw", "--watch-limit only works with --watch");
    if (o->watch_timeout > 0 && !o->watch)
        return cli_usage("draw", "--watch-timeout only works with --watch");
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
    size_t n = 0;
    int rc = cli_parse(&draw_command, o, argc, argv, &o->layout, &n);
    return rc ? rc : check_draw(o);
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

