/*
** `unitgram draw TEMPLATE --each-row COUNTS.csv -o 'out/{group}.svg'`: one
** chart per CSV row through ug_batch_*. Every file name is worked out (and
** checked for collisions by the library) before the first file is written;
** glyphs are loaded once for the whole batch through one glyph cache.
*/
/* sync(2) is not in POSIX.1-2008 base; glibc declares it with _DEFAULT_SOURCE. */
#define _DEFAULT_SOURCE
#include <errno.h>
#include <limits.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#include "cli.h"

#define PROGRESS_AFTER 0.5 /* seconds before a progress bar is worth showing */

/* The batch's output folder: the pattern's folders before the first one
** that {group} names. Only it may be reached through symlinks (the user named
** it); everything below is walked without following any. */
typedef struct {
    char *root;  /* "." when the pattern starts with {group} */
    size_t skip; /* bytes of each path before its part below root */
} out_folder;

static int open_out_folder(const char *pattern, out_folder *f)
{
    const char *group = strstr(pattern, "{group}");
    const char *slash = group;
    while (slash > pattern && slash[-1] != '/')
        slash--;
    size_t n = slash > pattern ? (size_t)(slash - pattern - 1) : 0;
    f->root = n ? strndup(pattern, n) : strdup(slash > pattern ? "/" : ".");
    f->skip = slash > pattern ? (size_t)(slash - pattern) : 0;
    if (!f->root)
        return -1;
    for (char *s = strchr(f->root + 1, '/'); s; s = strchr(s + 1, '/')) {
        *s = '\0';
        int made = mkdir(f->root, 0777) == 0 || errno == EEXIST;
        *s = '/';
        if (!made)
            break;
    }
    if (mkdir(f->root, 0777) != 0 && errno != EEXIST) {
        ug_error e = {.where = {f->root, 0, 0}};
        snprintf(e.msg, sizeof e.msg, "cannot create the output folder: %s",
                 strerror(errno));
        cli_diag("error", &e);
        return -1;
    }
    return 0;
}

static void progress(size_t done, size_t total, double start, bool *shown)
{
    if (!*shown && (cli_now() - start < PROGRESS_AFTER || !isatty(STDERR_FILENO)))
        return;
    *shown = true;
    int width = 30, fill = (int)(width * done / (total ? total : 1));
    fprintf(stderr, "\r[%.*s%*s] %zu/%zu", fill, "##############################",
            width - fill, "", done, total);
    if (done == total)
        fputc('\n', stderr);
    fflush(stderr);
}

/* An error in a row's chart may be placed in the template (the icon limit
** blames its categories), which every row shares: say which row it was. */
static void row_note(const ug_batch *b, size_t i)
{
    ug_error e = {0};
    snprintf(e.msg, sizeof e.msg, "in the chart of row %zu, '%s'", i + 1,
             ug_batch_name(b, i));
    cli_diag("note", &e);
}

/* Draw row i of the batch to path; returns an exit code. */
static int draw_row(ug_batch *b, size_t i, const char *path, const out_folder *dir,
                    const cli_draw_opts *o, const ug_pack_options *popt, bool warn)
{
    ug_error err = {0};
    const ug_chart *chart = NULL;
    ug_allocation *alloc = NULL;
    ug_scene *scene = NULL;
    char *svg = NULL, *bytes = NULL;
    size_t len = 0;
    int rc = EXIT_OK;
    if (ug_batch_chart(b, i, &chart, &err) || ug_chart_allocate(chart, &alloc, &err) ||
        ug_batch_pack(b, chart, alloc, popt, &scene, &err) ||
        ug_scene_svg(scene, &svg, &len, &err) ||
        cli_chart_bytes(chart, alloc, o, svg, len, &bytes, &len, &err)) {
        cli_report_error(&err);
        row_note(b, i);
        rc = EXIT_INPUT;
    } else {
        if (warn)
            cli_glyph_warnings(scene, chart);
        if (ug_write_file_beneath(dir->root, path + dir->skip, bytes, len, 0, &err)) {
            cli_report_error(&err);
            rc = EXIT_OUTPUT;
        }
    }
    if (bytes != svg)
        free(bytes);
    free(svg);
    ug_scene_free(scene);
    ug_allocation_free(alloc);
    return rc;
}

/* Every row's output path, worked out before anything is written. */
static char **all_paths(const ug_batch *b, const char *pattern)
{
    size_t n = ug_batch_count(b);
    char **paths = calloc(n + 1, sizeof *paths);
    ug_error err = {0};
    for (size_t i = 0; paths && i < n; i++)
        if (ug_batch_path(b, i, pattern, &paths[i], &err)) {
            cli_report_error(&err);
            for (size_t k = 0; k < i; k++)
                free(paths[k]);
            free(paths);
            return NULL;
        }
    return paths;
}

/* The audit of every row, before anything is written: each finding's place
** names the row's line in the CSV. Under --strict any finding stops the whole
** batch, so a redraw from updated counts never half-publishes. */
static int audit_rows(ug_batch *b, const ug_pack_options *popt, bool strict)
{
    int rc = EXIT_OK;
    for (size_t i = 0; i < ug_batch_count(b); i++) {
        ug_error err = {0};
        const ug_chart *chart = NULL;
        int r;
        if (ug_batch_chart(b, i, &chart, &err)) {
            cli_report_error(&err);
            return cli_exit_for(&err);
        }
        if ((r = cli_print_audit(chart, popt, strict)) == EXIT_INPUT) {
            row_note(b, i);
            return r;
        }
        if (r && !rc)
            rc = r;
    }
    return rc;
}

static int run(ug_batch *b, char **paths, const cli_draw_opts *o,
               ug_glyph_cache *cache)
{
    ug_pack_options popt = {o->glyph_dirs, o->nglyph_dirs, cache};
    int audited = audit_rows(b, &popt, o->strict);
    if (audited)
        return audited;
    out_folder dir;
    if (open_out_folder(o->out, &dir)) {
        free(dir.root);
        return EXIT_OUTPUT;
    }
    size_t n = ug_batch_count(b), drawn = 0;
    double start = cli_now();
    bool shown = false;
    int rc = EXIT_OK;
    for (size_t i = 0; i < n; i++) {
        int r = draw_row(b, i, paths[i], &dir, o, &popt, i == 0);
        if (r && !rc)
            rc = r; /* keep going: one bad row should not hide the others */
        drawn += r == EXIT_OK;
        if (!o->quiet)
            progress(i + 1, n, start, &shown);
    }
    sync(); /* once for the whole batch (see ug_write_file_atomic_sync) */
    free(dir.root);
    if (!o->quiet) {
        const char *slash = strrchr(o->out, '/');
        char folder[PATH_MAX];
        snprintf(folder, sizeof folder, "%.*s", slash ? (int)(slash - o->out + 1) : 2,
                 slash ? o->out : "./");
        fprintf(stderr, "drew %zu chart%s to ", drawn, drawn == 1 ? "" : "s");
        cli_put_visible(folder, stderr);
        fprintf(stderr, " in %.1f s\n", cli_now() - start);
    }
    return rc;
}

int cli_batch(const cli_draw_opts *o)
{
    ug_error err = {0};
    ug_batch *b = NULL;
    ug_glyph_cache *cache = NULL;
    /* The template carries the limits and every row's chart is a copy of
    ** it, so --max-icons and the rest bound each chart of the batch. */
    if (ug_batch_open(o->layout, o->each_row, cli_limits(), &b, &err) ||
        ug_glyph_cache_new(&cache, &err)) {
        cli_report_error(&err);
        ug_batch_free(b);
        return cli_exit_for(&err);
    }
    char **paths = all_paths(b, o->out);
    int rc = paths ? run(b, paths, o, cache) : EXIT_INPUT;
    for (size_t i = 0; paths && paths[i]; i++)
        free(paths[i]);
    free(paths);
    ug_glyph_cache_free(cache);
    ug_batch_free(b);
    return rc;
}
