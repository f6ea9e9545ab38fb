/*
** Threads: eight threads drawing at once must neither crash nor race, and
** must draw byte for byte what one thread draws (every output format, and
** the audit report). Only the public API is used
** for drawing (as tests/example/draw.c does); the fault-injection test alone
** reaches into src/ug.h for ug_mem_fail_after.
**
** Each thread draws under a context of its own, as unitgram.h asks (one
** context per thread); the contexts name the same glyph roots.
** The library sets itself up on its first drawing (fonts, the text context),
** so that set-up is what races: every test runs in a
** process forked for it, where the concurrent drawing is the first one and
** the single-threaded reference is drawn after it (or, in the warm test,
** first). A forked child also lets LeakSanitizer and ThreadSanitizer judge
** it: their reports at exit give it a non-zero status, which fails the test.
** The threads start together on a pthread barrier (POSIX.1-2008,
** pthread_barrier_wait).
*/
#define _POSIX_C_SOURCE 200809L
#include <check.h>
#include <glob.h>
#include <pthread.h>
#include <stdbool.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/wait.h>
#include <unistd.h>

#include <unitgram.h>

#include "ug.h" /* ug_mem_fail_after: the fault-injection counters */
#include "check_run.h"

enum { NTHREADS = 8, ROUNDS = 3, MAX_LAYOUTS = 16, WHY = 1024 };

static const ug_output_format formats[] = {UG_OUT_SVG, UG_OUT_PNG, UG_OUT_PDF,
                                           UG_OUT_HTML, UG_OUT_CSV};
#define NFORMATS (sizeof formats / sizeof *formats)
/* Every output format, then the audit report: the audit is the one user of
** LittleCMS (CIELAB and CIEDE2000 of the chart's colours). */
#define NOUTPUTS (NFORMATS + 1)

typedef struct {
    char *data;
    size_t len;
} blob;

/* Every example layout in every output. */
typedef struct {
    blob out[MAX_LAYOUTS][NOUTPUTS];
} drawing;

static char *layouts[MAX_LAYOUTS];
static size_t nlayouts;

/* Listing file names is not drawing: done before any thread starts. */
static void find_layouts(void)
{
    glob_t g;
    for (size_t i = 0; i < nlayouts; i++)
        free(layouts[i]);
    ck_assert_int_eq(glob("../layouts/*.yaml", 0, NULL, &g), 0);
    ck_assert_uint_ge(g.gl_pathc, 2);
    ck_assert_uint_le(g.gl_pathc, MAX_LAYOUTS);
    for (nlayouts = 0; nlayouts < g.gl_pathc; nlayouts++)
        layouts[nlayouts] = strdup(g.gl_pathv[nlayouts]);
    globfree(&g);
}

static const char *output_name(size_t k)
{
    return k < NFORMATS ? ug_output_format_name(formats[k]) : "audit report";
}

static ug_status audit_report(ug_findings *f, ug_status st, blob *b, ug_error *err)
{
    if (!st)
        st = ug_findings_format(f, UG_REPORT_JSON, &b->data, &b->len, err);
    ug_findings_free(f);
    return st;
}

static ug_status chart_as(ug_chart *chart, ug_output_format fmt, blob *b,
                          ug_error *err)
{
    ug_allocation *alloc = NULL;
    ug_scene *scene = NULL;
    char *svg = NULL;
    size_t len = 0;
    ug_status st = ug_chart_allocate(chart, &alloc, err);
    if (!st && fmt == UG_OUT_CSV)
        st = ug_table_csv((const ug_allocation *const *)&alloc, 1, &b->data,
                          &b->len, err);
    else if (!st && !(st = ug_scene_pack(chart, alloc, &scene, err)) &&
             !(st = ug_scene_svg(scene, &svg, &len, err))) {
        if (fmt == UG_OUT_HTML)
            st = ug_html_page(NULL, svg, len, NULL,
                              (const ug_allocation *const *)&alloc, 1, &b->data,
                              &b->len, err);
        else
            st = ug_render_svg(svg, len, fmt, 96, 1, &b->data, &b->len, err);
    }
    free(svg);
    ug_scene_free(scene);
    ug_allocation_free(alloc);
    return st;
}

static ug_status page_as(ug_page *page, size_t k, blob *b, ug_error *err)
{
    ug_findings *f = NULL;
    if (k < NFORMATS)
        return ug_page_draw(page, formats[k], 96, 1, &b->data, &b->len, err);
    return audit_report(f, ug_page_audit(page, NULL, &f, err), b, err);
}

static ug_status one_chart_as(ug_chart *chart, size_t k, blob *b, ug_error *err)
{
    ug_findings *f = NULL;
    if (k < NFORMATS)
        return chart_as(chart, formats[k], b, err);
    return audit_report(f, ug_chart_audit(chart, &f, err), b, err);
}

/* One layout as output k, loaded afresh as a program drawing it would. */
static bool draw_one(const char *path, size_t k, blob *b, char *why)
{
    ug_error err = {0};
    ug_layout_kind kind;
    ug_status st = ug_layout_detect(path, NULL, &kind, &err);
    if (!st && kind == UG_LAYOUT_PAGE) {
        ug_page *page = NULL;
        if (!(st = ug_page_load(path, NULL, &page, &err)))
            st = page_as(page, k, b, &err);
        ug_page_free(page);
    } else if (!st) {
        ug_chart *chart = NULL;
        if (!(st = ug_chart_load(path, NULL, &chart, &err)))
            st = one_chart_as(chart, k, b, &err);
        ug_chart_free(chart);
    }
    if (st) {
        char msg[2048];
        snprintf(why, WHY, "%s as %s: %s", path, output_name(k),
                 ug_error_format(&err, msg, sizeof msg));
    }
    return st == UG_OK;
}

static void drawing_free(drawing *d)
{
    for (size_t i = 0; i < MAX_LAYOUTS; i++)
        for (size_t k = 0; k < NOUTPUTS; k++)
            free(d->out[i][k].data);
    memset(d, 0, sizeof *d);
}

static bool draw_all(drawing *d, char *why)
{
    for (size_t i = 0; i < nlayouts; i++)
        for (size_t k = 0; k < NOUTPUTS; k++)
            if (!draw_one(layouts[i], k, &d->out[i][k], why))
                return false;
    return true;
}

static bool same(const drawing *a, const drawing *b, const char *who, char *why)
{
    for (size_t i = 0; i < nlayouts; i++)
        for (size_t k = 0; k < NOUTPUTS; k++) {
            const blob *x = &a->out[i][k], *y = &b->out[i][k];
            if (x->len != y->len || memcmp(x->data, y->data, x->len) != 0) {
                snprintf(why, WHY, "%s: %s as %s differs from the single-threaded "
                         "drawing (%zu bytes, reference %zu)", who, layouts[i],
                         output_name(k), x->len, y->len);
                return false;
            }
        }
    return true;
}

/* ---- eight threads drawing everything, several rounds ---------------------- */

typedef struct {
    pthread_barrier_t *start;
    drawing first; /* round 0; later rounds are checked against it */
    bool ok;
    char why[WHY];
} worker;

static void *work(void *arg)
{
    worker *w = arg;
    ug_context *ctx = check_context();
    ug_context_use(ctx);
    pthread_barrier_wait(w->start);
    w->ok = draw_all(&w->first, w->why);
    for (int r = 1; w->ok && r < ROUNDS; r++) {
        drawing again = {0};
        w->ok = draw_all(&again, w->why) && same(&again, &w->first, "a later round", w->why);
        drawing_free(&again);
    }
    ug_context_free(ctx);
    return NULL;
}

/* Runs the workers; on failure the first message is in why. */
static bool draw_in_threads(worker *w, char *why)
{
    pthread_barrier_t start;
    pthread_t t[NTHREADS];
    bool ok = true;
    pthread_barrier_init(&start, NULL, NTHREADS);
    for (int i = 0; i < NTHREADS; i++) {
        w[i].start = &start;
        if (pthread_create(&t[i], NULL, work, &w[i]) != 0) {
            /* the barrier would wait for it forever */
            fprintf(stderr, "check_threads: cannot start thread %d\n", i);
            abort();
        }
    }
    for (int i = 0; i < NTHREADS; i++)
        pthread_join(t[i], NULL);
    pthread_barrier_destroy(&start);
    for (int i = 0; i < NTHREADS && ok; i++)
        if (!(ok = w[i].ok))
            snprintf(why, WHY, "thread %d: %.900s", i, w[i].why);
    return ok;
}

static bool compare_workers(worker *w, const drawing *ref, char *why)
{
    char who[32];
    for (int i = 0; i < NTHREADS; i++) {
        snprintf(who, sizeof who, "thread %d", i);
        if (!same(&w[i].first, ref, who, why))
            return false;
    }
    return true;
}

static bool threads_then_reference(char *why)
{
    static worker w[NTHREADS];
    drawing ref = {0};
    bool ok = draw_in_threads(w, why) && draw_all(&ref, why) &&
              compare_workers(w, &ref, why);
    for (int i = 0; i < NTHREADS; i++)
        drawing_free(&w[i].first);
    drawing_free(&ref);
    return ok;
}

static bool reference_then_threads(char *why)
{
    static worker w[NTHREADS];
    drawing ref = {0};
    bool ok = draw_all(&ref, why) && draw_in_threads(w, why) &&
              compare_workers(w, &ref, why);
    for (int i = 0; i < NTHREADS; i++)
        drawing_free(&w[i].first);
    drawing_free(&ref);
    return ok;
}

/* ---- the fault-injection counters belong to the thread that sets them ------ */

typedef struct {
    pthread_barrier_t step;
    bool other_ok;
    long made_here;
    ug_status here;
    char why[WHY];
} fault_run;

/* Draws while the main thread has armed a failure for itself: a shared
** counter would fail this thread's first allocation instead. */
static void *other_thread(void *arg)
{
    fault_run *f = arg;
    blob b = {0};
    ug_context *ctx = check_context();
    ug_context_use(ctx);
    pthread_barrier_wait(&f->step);
    f->other_ok = draw_one(layouts[0], 0 /* SVG */, &b, f->why);
    free(b.data);
    ug_context_free(ctx);
    pthread_barrier_wait(&f->step);
    return NULL;
}

static bool counters_per_thread(char *why)
{
    fault_run f = {.other_ok = false};
    pthread_t t;
    pthread_barrier_init(&f.step, NULL, 2);
    if (pthread_create(&t, NULL, other_thread, &f) != 0)
        abort();
    ug_mem_fail_after(0);
    pthread_barrier_wait(&f.step); /* the other thread draws now */
    pthread_barrier_wait(&f.step);
    f.made_here = ug_mem_fail_after(0);
    ug_error err = {0};
    ug_chart *chart = NULL;
    f.here = ug_chart_load(layouts[0], NULL, &chart, &err);
    ug_mem_fail_after(-1);
    ug_chart_free(chart);
    pthread_join(t, NULL);
    pthread_barrier_destroy(&f.step);
    if (!f.other_ok)
        snprintf(why, WHY, "the other thread failed: %.900s", f.why);
    else if (f.made_here != 0)
        snprintf(why, WHY, "this thread's allocation count is %ld; it made none",
                 f.made_here);
    else if (f.here != UG_ENOMEM)
        snprintf(why, WHY, "the armed failure did not fail this thread's load "
                 "(status %s)", ug_status_name(f.here));
    return f.other_ok && f.made_here == 0 && f.here == UG_ENOMEM;
}

/* ---- a fresh process per test ---------------------------------------------- */

static void in_fresh_process(bool (*body)(char *why))
{
    int fd[2];
    ck_assert_int_eq(pipe(fd), 0);
    fflush(NULL); /* or the child would write the parent's buffers again */
    pid_t pid = fork();
    ck_assert_int_ge(pid, 0);
    if (pid == 0) {
        close(fd[0]);
        char why[WHY] = "";
        bool ok = body(why);
        if (write(fd[1], why, strlen(why)) < 0)
            ok = false;
        /* exit, not _exit: the sanitizers report at exit */
        exit(ok ? EXIT_SUCCESS : EXIT_FAILURE);
    }
    close(fd[1]);
    char msg[WHY + 1];
    size_t n = 0;
    ssize_t k;
    while (n < WHY && (k = read(fd[0], msg + n, WHY - n)) > 0)
        n += (size_t)k;
    msg[n] = '\0';
    close(fd[0]);
    int status = 0;
    ck_assert_int_eq(waitpid(pid, &status, 0), pid);
    ck_assert_msg(!WIFSIGNALED(status), "the drawing process died of signal %d",
                  WIFSIGNALED(status) ? WTERMSIG(status) : 0);
    ck_assert_msg(WIFEXITED(status) && WEXITSTATUS(status) == 0,
                  "the drawing process exited with status %d: %s",
                  WIFEXITED(status) ? WEXITSTATUS(status) : -1,
                  n ? msg : "(a sanitizer report, above?)");
}

/* ---- the rows of one batch drawn by threads sharing one glyph cache ------ */

enum { BATCH_ROWS = 40 };

typedef struct {
    ug_batch *b;
    ug_glyph_cache *cache;
    pthread_barrier_t *start;
    int first;              /* this thread draws rows first, first + NTHREADS, ... */
    blob png[BATCH_ROWS];
    bool ok;
    char why[WHY];
} row_worker;

/* Row i through the calls a threaded batch makes (src/cli/cli_batch.c): a row chart
** of its own, packed in the batch's shared frame with the shared cache. */
static ug_status row_png(ug_batch *b, ug_glyph_cache *cache, size_t i, blob *out,
                         ug_error *err)
{
    ug_pack_options opt = {.glyph_cache = cache};
    ug_chart *row = NULL;
    ug_allocation *alloc = NULL;
    ug_scene *scene = NULL;
    char *svg = NULL;
    size_t len = 0;
    ug_status st = ug_batch_row(b, i, &row, err);
    if (!st)
        st = ug_chart_allocate(row, &alloc, err);
    if (!st)
        st = ug_batch_pack(b, row, alloc, &opt, &scene, err);
    if (!st)
        st = ug_scene_svg(scene, &svg, &len, err);
    if (!st)
        st = ug_render_svg(svg, len, UG_OUT_PNG, 96, 1, &out->data, &out->len, err);
    free(svg);
    ug_scene_free(scene);
    ug_allocation_free(alloc);
    ug_chart_free(row);
    return st;
}

static void *draw_rows(void *arg)
{
    row_worker *w = arg;
    ug_error err = {0};
    ug_context *ctx = check_context();
    ug_context_use(ctx);
    pthread_barrier_wait(w->start);
    w->ok = true;
    for (size_t i = (size_t)w->first; w->ok && i < BATCH_ROWS; i += NTHREADS)
        if (row_png(w->b, w->cache, i, &w->png[i], &err)) {
            w->ok = false;
            snprintf(w->why, WHY, "row %zu: %.900s", i, err.msg);
        }
    ug_context_free(ctx);
    return NULL;
}

/* A template and a CSV of BATCH_ROWS rows (test data) in a fresh folder. */
static bool write_batch_files(char *dir, char *tmpl, char *csv)
{
    if (!mkdtemp(dir))
        return false;
    sprintf(tmpl, "%s/t.yaml", dir);
    sprintf(csv, "%s/rows.csv", dir);
    FILE *t = fopen(tmpl, "w"), *c = fopen(csv, "w");
    bool ok = t && c;
    if (ok) {
        fputs("title: \"Visits in {group}\"\nsource: s (test data)\n"
              "unit-label: visits\nicon-value: 5\ndata: {group-column: site}\n"
              "categories:\n  - {label: Adults, glyph: person, column: a}\n"
              "  - {label: Children, glyph: child, column: c}\n"
              "  - {label: Meals, glyph: house, column: m}\n", t);
        fputs("site,a,c,m\n", c);
        for (int i = 0; i < BATCH_ROWS; i++)
            fprintf(c, "Site %d,%d,%d,%d\n", i, 20 + i * 7 % 90, 5 + i * 3 % 40, i * 11 % 60);
    }
    ok = (!t || fclose(t) == 0) && (!c || fclose(c) == 0) && ok;
    return ok;
}

static bool batch_rows_in_threads(char *why)
{
    static row_worker w[NTHREADS];
    char dir[] = "/tmp/check-threads-XXXXXX", tmpl[64], csv[64];
    ug_error err = {0};
    ug_batch *b = NULL;
    ug_glyph_cache *shared = NULL, *own = NULL;
    if (!write_batch_files(dir, tmpl, csv) ||
        ug_batch_open(tmpl, csv, NULL, &b, &err) || ug_glyph_cache_new(&shared, &err) ||
        ug_glyph_cache_new(&own, &err)) {
        snprintf(why, WHY, "setting up: %.900s", err.msg);
        return false;
    }
    pthread_barrier_t start;
    pthread_t t[NTHREADS];
    pthread_barrier_init(&start, NULL, NTHREADS);
    for (int i = 0; i < NTHREADS; i++) {
        w[i] = (row_worker){.b = b, .cache = shared, .start = &start, .first = i};
        if (pthread_create(&t[i], NULL, draw_rows, &w[i]) != 0)
            abort(); /* the barrier would wait for it forever */
    }
    for (int i = 0; i < NTHREADS; i++)
        pthread_join(t[i], NULL);
    pthread_barrier_destroy(&start);
    bool ok = true;
    for (int i = 0; i < NTHREADS && ok; i++)
        if (!(ok = w[i].ok))
            snprintf(why, WHY, "thread %d: %.900s", i, w[i].why);
    /* then each row again in this thread alone, with a cache of its own */
    for (size_t i = 0; ok && i < BATCH_ROWS; i++) {
        blob ref = {0};
        const blob *got = &w[i % NTHREADS].png[i];
        if (row_png(b, own, i, &ref, &err)) {
            snprintf(why, WHY, "row %zu alone: %.900s", i, err.msg);
            ok = false;
        } else if (ref.len != got->len || memcmp(ref.data, got->data, ref.len)) {
            snprintf(why, WHY, "row %zu: the PNG drawn in a thread differs", i);
            ok = false;
        }
        free(ref.data);
    }
    for (int i = 0; i < NTHREADS; i++)
        for (size_t r = 0; r < BATCH_ROWS; r++)
            free(w[i].png[r].data);
    ug_glyph_cache_free(own);
    ug_glyph_cache_free(shared);
    ug_batch_free(b);
    unlink(tmpl);
    unlink(csv);
    rmdir(dir);
    return ok;
}

/* ---- a context handed to every call (the _in functions) ------------------ */

/* Each thread's allocator counts into its own counter: the calls must use
** the context they are handed, not the thread's (unbound: the default). */
static void *counted_alloc(void *ud, void *ptr, size_t n)
{
    if (n == 0) {
        free(ptr);
        return NULL;
    }
    ++*(size_t *)ud;
    return realloc(ptr, n);
}

typedef struct {
    pthread_barrier_t *start;
    size_t blocks;
    blob svg;
    bool ok;
    char why[WHY];
} handed_run;

static bool svg_in(ug_context *ctx, blob *b, char *why)
{
    ug_error err = {0};
    ug_chart *c = NULL;
    ug_allocation *a = NULL;
    ug_scene *s = NULL;
    ug_status st = ug_chart_load_in(ctx, "../layouts/pantry.yaml", NULL, &c, &err);
    if (!st)
        st = ug_chart_allocate_in(ctx, c, &a, &err);
    if (!st)
        st = ug_scene_pack_in(ctx, c, a, &s, &err);
    if (!st)
        st = ug_scene_svg_in(ctx, s, &b->data, &b->len, &err);
    ug_scene_free_in(ctx, s);
    ug_allocation_free_in(ctx, a);
    ug_chart_free_in(ctx, c);
    if (st)
        snprintf(why, WHY, "%s", err.msg);
    return !st;
}

static void *handed(void *arg)
{
    handed_run *h = arg;
    const char *roots[] = {"../glyphs"};
    ug_context_options o = {.size = sizeof o, .alloc = counted_alloc, .alloc_ud = &h->blocks,
                            .glyph_roots = roots, .nglyph_roots = 1};
    ug_context *ctx = NULL;
    ug_error err = {0};
    pthread_barrier_wait(h->start);
    if (ug_context_new(&o, &ctx, &err) != UG_OK) {
        snprintf(h->why, WHY, "context: %s", err.msg);
        return NULL;
    }
    ug_context *before = ug_context_current();
    h->ok = svg_in(ctx, &h->svg, h->why);
    if (h->ok && ug_context_current() != before) {
        h->ok = false;
        snprintf(h->why, WHY, "the thread's own context was not restored");
    }
    ug_context_free(ctx);
    return NULL;
}

static bool contexts_handed_to_calls(char *why)
{
    static handed_run h[NTHREADS];
    pthread_barrier_t start;
    pthread_t t[NTHREADS];
    blob ref = {0};
    bool ok = svg_in(ug_context_current(), &ref, why); /* the reference: this thread's */
    pthread_barrier_init(&start, NULL, NTHREADS);
    for (int i = 0; i < NTHREADS; i++) {
        h[i].start = &start;
        if (pthread_create(&t[i], NULL, handed, &h[i]) != 0)
            abort();
    }
    for (int i = 0; i < NTHREADS; i++)
        pthread_join(t[i], NULL);
    pthread_barrier_destroy(&start);
    for (int i = 0; i < NTHREADS && ok; i++) {
        if (!h[i].ok)
            ok = false, snprintf(why, WHY, "thread %d: %.900s", i, h[i].why);
        else if (h[i].blocks == 0)
            ok = false, snprintf(why, WHY, "thread %d: its context's allocator was unused", i);
        else if (h[i].svg.len != ref.len || memcmp(h[i].svg.data, ref.data, ref.len))
            ok = false, snprintf(why, WHY, "thread %d drew other bytes", i);
    }
    for (int i = 0; i < NTHREADS; i++)
        free(h[i].svg.data);
    free(ref.data);
    return ok;
}

START_TEST(contexts_handed_to_every_call)
{
    in_fresh_process(contexts_handed_to_calls);
}
END_TEST

START_TEST(batch_rows_share_a_cache)
{
    in_fresh_process(batch_rows_in_threads);
}
END_TEST

START_TEST(first_drawing_is_concurrent)
{
    find_layouts();
    in_fresh_process(threads_then_reference);
}
END_TEST

START_TEST(threads_after_a_drawing)
{
    find_layouts();
    in_fresh_process(reference_then_threads);
}
END_TEST

START_TEST(fault_counters_per_thread)
{
    find_layouts();
    in_fresh_process(counters_per_thread);
}
END_TEST

int main(void)
{
    Suite *s = suite_create("threads");
    TCase *t = tcase_create("concurrent drawing");
    tcase_add_test(t, first_drawing_is_concurrent);
    tcase_add_test(t, threads_after_a_drawing);
    tcase_add_test(t, fault_counters_per_thread);
    tcase_add_test(t, batch_rows_share_a_cache);
    tcase_add_test(t, contexts_handed_to_every_call);
    /* ThreadSanitizer slows drawing five to fifteen times (from memory) */
    tcase_set_timeout(t, 600);
    suite_add_tcase(s, t);
    return check_run(s);
}
