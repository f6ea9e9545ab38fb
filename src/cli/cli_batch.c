/*
** `unitgram draw TEMPLATE --each-row COUNTS.csv -o 'out/{group}.svg'`: one
** chart per CSV row through ug_batch_*. Every file name is worked out (and
** checked for collisions by the library) before the first file is written;
** glyphs are loaded once for the whole batch through one glyph cache. Rows
** are drawn by a thread per processor (--jobs), each row's chart its own
** (ug_batch_row), and every message is printed in row order once all are
** done, so the output and the messages do not depend on the threads. With
** no {group} in a .pdf name the rows become the pages of one PDF.
*/
/* sync(2) is not in POSIX.1-2008 base; glibc declares it with _DEFAULT_SOURCE. */
#define _DEFAULT_SOURCE
#include <errno.h>
#include <limits.h>
#include <pthread.h>
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

/* What drawing one row came to, kept until every row is done so the
** messages come out in row order whichever thread drew which row. */
typedef struct {
    int rc;
    bool in_chart;   /* the error is the row's chart's (say which row) */
    ug_error err;
    char *svg;       /* one PDF for the batch: the row's page, until bound */
    size_t svg_len;
} row_result;

/* The rows to draw, shared by the workers. */
typedef struct {
    ug_batch *b;
    char **paths;          /* NULL: one PDF with a page per row */
    const out_folder *dir;
    const cli_draw_opts *o;
    const ug_pack_options *popt;
    row_result *res;
    size_t n, next, done;
    pthread_mutex_t lock;  /* next, done and the progress bar */
    double start;
    bool shown;
} batch_run;

/* Row i's chart as the bytes of its file (or, for one PDF, its SVG): the
** chart and the scene are the caller's, handed back for warnings. */
static ug_status row_bytes(const batch_run *r, size_t i, ug_chart **chart,
                           ug_scene **scene, char **svg, size_t *svg_len,
                           char **bytes, size_t *len, ug_error *err)
{
    ug_allocation *alloc = NULL;
    ug_status st = ug_batch_row(r->b, i, chart, err);
    if (!st)
        st = ug_chart_allocate(*chart, &alloc, err);
    if (!st)
        st = ug_batch_pack(r->b, *chart, alloc, r->popt, scene, err);
    if (!st)
        st = ug_scene_svg(*scene, svg, svg_len, err);
    if (!st && r->paths)
        st = cli_chart_bytes(*chart, alloc, r->o, *svg, *svg_len, bytes, len, err);
    ug_allocation_free(alloc);
    return st;
}

/* Draw row i into r->res[i]; the first row also says its glyph warnings
** (every row shares the template's glyphs). */
static void draw_row(batch_run *r, size_t i)
{
    row_result *out = &r->res[i];
    ug_chart *chart = NULL;
    ug_scene *scene = NULL;
    char *svg = NULL, *bytes = NULL;
    size_t svg_len = 0, len = 0;
    if (row_bytes(r, i, &chart, &scene, &svg, &svg_len, &bytes, &len, &out->err)) {
        out->rc = EXIT_INPUT;
        out->in_chart = true;
    } else {
        if (i == 0)
            cli_glyph_warnings(scene, chart);
        if (!r->paths) {
            out->svg = svg, out->svg_len = svg_len;
            svg = NULL;
        } else if (ug_write_file_beneath(r->dir->root, r->paths[i] + r->dir->skip,
                                         bytes, len, 0, &out->err)) {
            out->rc = EXIT_OUTPUT;
        }
    }
    if (bytes != svg)
        free(bytes);
    free(svg);
    ug_scene_free(scene);
    ug_chart_free(chart);
}

/* Each thread draws under a context of its own (one per thread, as
** unitgram.h asks); one that cannot make one leaves its rows to the others. */
static void *worker(void *arg)
{
    batch_run *r = arg;
    ug_context *ctx = cli_new_context();
    if (!ctx)
        return NULL;
    ug_context *before = ug_context_use(ctx);
    for (;;) {
        pthread_mutex_lock(&r->lock);
        size_t i = r->next++;
        pthread_mutex_unlock(&r->lock);
        if (i >= r->n)
            break;
        draw_row(r, i);
        pthread_mutex_lock(&r->lock);
        r->done++;
        if (!r->o->quiet)
            progress(r->done, r->n, r->start, &r->shown);
        pthread_mutex_unlock(&r->lock);
    }
    ug_context_use(before);
    ug_context_free(ctx);
    return NULL;
}

/* Threads for rows 1.. (row 0 is drawn first, alone, so its warnings come
** first and every glyph is in the cache before the threads start); the
** calling thread works too. A thread that cannot start leaves its share to
** the others. */
static void draw_all(batch_run *r, long jobs)
{
    pthread_t t[CLI_MAX_JOBS];
    size_t started = 0;
    draw_row(r, 0);
    r->next = r->done = 1;
    if (!r->o->quiet)
        progress(1, r->n, r->start, &r->shown);
    for (long k = 1; k < jobs && (size_t)k < r->n; k++)
        if (pthread_create(&t[started], NULL, worker, r) == 0)
            started++;
    worker(r);
    for (size_t k = 0; k < started; k++)
        pthread_join(t[k], NULL);
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

/* Every row's message, in row order; returns the first row's exit code
** that is not EXIT_OK, and how many rows were drawn. */
static int report_rows(const batch_run *r, size_t *drawn)
{
    int rc = EXIT_OK;
    *drawn = 0;
    for (size_t i = 0; i < r->n; i++) {
        const row_result *x = &r->res[i];
        if (x->rc) {
            cli_report_error(&x->err);
            if (x->in_chart)
                row_note(r->b, i);
        }
        if (x->rc && !rc)
            rc = x->rc; /* kept going: one bad row should not hide the others */
        *drawn += x->rc == EXIT_OK;
    }
    return rc;
}

/* One PDF, a page per row, bookmarked with the rows' names; written only
** when every row drew, so a page is never silently missing. */
static int bind_pdf(const batch_run *r)
{
    const char **svgs = calloc(r->n, sizeof *svgs), **names = calloc(r->n, sizeof *names);
    size_t *lens = calloc(r->n, sizeof *lens);
    ug_error err = {0};
    char *pdf = NULL;
    size_t len = 0;
    int rc = EXIT_OK;
    if (!svgs || !names || !lens) {
        snprintf(err.msg, sizeof err.msg, "out of memory");
        rc = EXIT_INPUT;
    }
    for (size_t i = 0; !rc && i < r->n; i++)
        svgs[i] = r->res[i].svg, lens[i] = r->res[i].svg_len,
        names[i] = ug_batch_name(r->b, i);
    if (!rc && ug_render_pdf_pages(svgs, lens, names, r->n,
                                   r->o->scale > 0 ? r->o->scale : 1, &pdf, &len, &err))
        rc = cli_exit_for(&err);
    if (!rc && ug_write_file_atomic(r->o->out, pdf, len, &err))
        rc = EXIT_OUTPUT;
    if (rc)
        cli_report_error(&err);
    free(pdf);
    free(lens);
    free(names);
    free(svgs);
    return rc;
}

static void summary(const cli_draw_opts *o, size_t drawn, bool one_pdf, double start)
{
    const char *slash = strrchr(o->out, '/');
    char folder[PATH_MAX];
    snprintf(folder, sizeof folder, "%.*s", slash ? (int)(slash - o->out + 1) : 2,
             slash ? o->out : "./");
    if (one_pdf)
        fprintf(stderr, "drew %zu page%s to ", drawn, drawn == 1 ? "" : "s");
    else
        fprintf(stderr, "drew %zu chart%s to ", drawn, drawn == 1 ? "" : "s");
    cli_put_visible(one_pdf ? o->out : folder, stderr);
    fprintf(stderr, " in %.1f s\n", cli_now() - start);
}

/* How many threads draw: --jobs, else one per online processor. */
static long jobs_for(const cli_draw_opts *o, size_t rows)
{
    long jobs = o->jobs > 0 ? o->jobs : sysconf(_SC_NPROCESSORS_ONLN);
    if (jobs < 1)
        jobs = 1;
    if (jobs > CLI_MAX_JOBS)
        jobs = CLI_MAX_JOBS;
    return (size_t)jobs > rows ? (long)rows : jobs;
}

static int draw_rows(batch_run *r)
{
    const cli_draw_opts *o = r->o;
    if (!r->n) { /* ug_batch_open refuses a CSV without rows; never draw row 0 of none */
        fputs("unitgram: error: the batch has no rows to draw\n", stderr);
        return EXIT_INPUT;
    }
    r->res = calloc(r->n, sizeof *r->res);
    if (!r->res || pthread_mutex_init(&r->lock, NULL) != 0) {
        free(r->res);
        fputs("unitgram: error: out of memory\n", stderr);
        return EXIT_INPUT;
    }
    r->start = cli_now();
    draw_all(r, jobs_for(o, r->n));
    pthread_mutex_destroy(&r->lock);
    size_t drawn;
    int rc = report_rows(r, &drawn);
    if (!r->paths && !rc)
        rc = bind_pdf(r);
    else if (!r->paths)
        fprintf(stderr, "unitgram: error: %s was not written: %zu of %zu rows failed\n",
                o->out, r->n - drawn, r->n);
    else
        sync(); /* once for the whole batch (see ug_write_file_atomic_sync) */
    if (!o->quiet && (r->paths || !rc))
        summary(o, drawn, !r->paths, r->start);
    for (size_t i = 0; i < r->n; i++)
        free(r->res[i].svg);
    free(r->res);
    return rc;
}

/* Charts that do not say which row they show can be told apart only by
** their file names, and the pages of one PDF not at all. */
static void unnamed_rows_warning(const ug_batch *b, bool one_pdf)
{
    ug_error e = {0};
    if (ug_batch_count(b) < 2 || ug_batch_names_rows(b, &e.where))
        return;
    if (e.where.file)
        snprintf(e.file, sizeof e.file, "%s", e.where.file), e.where.file = e.file;
    snprintf(e.msg, sizeof e.msg,
             "neither the title nor the subtitle holds {group}: the %zu charts will "
             "not say which row each one shows%s",
             ug_batch_count(b), one_pdf ? " (the PDF's bookmarks name them)" : "");
    cli_diag("warning", &e);
}

static int run(ug_batch *b, char **paths, const cli_draw_opts *o,
               ug_glyph_cache *cache)
{
    ug_pack_options popt = {.glyph_dirs = o->glyph_dirs, .nglyph_dirs = o->nglyph_dirs,
                            .glyph_cache = cache};
    int audited = audit_rows(b, &popt, o->strict);
    if (audited)
        return audited;
    out_folder dir = {NULL, 0};
    if (paths && open_out_folder(o->out, &dir)) {
        free(dir.root);
        return EXIT_OUTPUT;
    }
    unnamed_rows_warning(b, paths == NULL);
    batch_run r = {.b = b, .paths = paths, .dir = &dir, .o = o, .popt = &popt,
                   .n = ug_batch_count(b)};
    int rc = draw_rows(&r);
    free(dir.root);
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
    /* No {group} in the name: one PDF with a page per row (check_draw
    ** allows nothing else). */
    bool one_pdf = !strstr(o->out, "{group}");
    char **paths = one_pdf ? NULL : all_paths(b, o->out);
    int rc = paths || one_pdf ? run(b, paths, o, cache) : EXIT_INPUT;
    for (size_t i = 0; paths && paths[i]; i++)
        free(paths[i]);
    free(paths);
    ug_glyph_cache_free(cache);
    ug_batch_free(b);
    return rc;
}
