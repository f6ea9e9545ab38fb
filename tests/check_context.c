/* Tests for src/context.c: a host's allocator sees every block the library
** makes and gets each one back; glyph roots, default limits and the file
** hook come from the bound context and from nowhere else; option structs
** grow by their size; fault counters belong to their context. */
#define _POSIX_C_SOURCE 200809L
#include <check.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "context.h"
#include "glyph.h"
#include "ug.h"
#include "check_run.h"

/* ---- a counting allocator -------------------------------------------------- */

typedef struct {
    long live, calls, fail_from; /* fail_from: the call that starts failing; 0 never */
} tally;

static void *counting_alloc(void *ud, void *ptr, size_t n)
{
    tally *t = ud;
    t->calls++;
    if (n == 0) {
        if (ptr)
            t->live--;
        free(ptr);
        return NULL;
    }
    if (t->fail_from && t->calls >= t->fail_from)
        return NULL;
    void *p = realloc(ptr, n);
    if (p && !ptr)
        t->live++;
    return p;
}

static ug_context *context_with(const ug_context_options *o)
{
    ug_context *ctx = NULL;
    ug_error err;
    ck_assert_msg(ug_context_new(o, &ctx, &err) == UG_OK, "%s", err.msg);
    return ctx;
}

/* Draws a layout to SVG under the bound context; the status, and *svg (from
** the context's allocator) on success. */
static ug_status draw(const char *layout, char **svg, size_t *len, ug_error *err)
{
    ug_chart *chart = NULL;
    ug_allocation *alloc = NULL;
    ug_scene *scene = NULL;
    *svg = NULL;
    ug_status st = ug_chart_load(layout, NULL, &chart, err);
    if (!st)
        st = ug_chart_allocate(chart, &alloc, err);
    if (!st)
        st = ug_scene_pack(chart, alloc, &scene, err);
    if (!st)
        st = ug_scene_svg(scene, svg, len, err);
    ug_scene_free(scene);
    ug_allocation_free(alloc);
    ug_chart_free(chart);
    return st;
}

static const char *const glyph_roots[] = {"../glyphs"};

START_TEST(test_allocator_sees_every_block)
{
    tally t = {0};
    ug_context_options o = {.size = sizeof o, .alloc = counting_alloc, .alloc_ud = &t,
                            .glyph_roots = glyph_roots, .nglyph_roots = 1};
    ug_context *ctx = context_with(&o);
    ug_context *before = ug_context_use(ctx);
    char *svg = NULL;
    size_t len = 0;
    ug_error err;
    ck_assert_msg(draw("../layouts/pantry.yaml", &svg, &len, &err) == UG_OK, "%s", err.msg);
    ck_assert_int_gt(t.calls, 100);
    ck_assert_int_eq(t.live, 3); /* the SVG, and the context and its roots */
    ug_free(svg);
    ck_assert_int_eq(t.live, 2);
    ug_context_use(before);
    ug_context_free(ctx);
    ck_assert_int_eq(t.live, 0);
}
END_TEST

/* The same bytes as the default allocator draws: the hook changes where
** memory comes from, nothing else. */
START_TEST(test_allocator_changes_no_byte)
{
    char *plain = NULL, *hooked = NULL;
    size_t plain_len = 0, hooked_len = 0;
    ug_error err;
    ck_assert(draw("../layouts/wards.yaml", &plain, &plain_len, &err) == UG_OK);
    tally t = {0};
    ug_context_options o = {.size = sizeof o, .alloc = counting_alloc, .alloc_ud = &t,
                            .glyph_roots = glyph_roots, .nglyph_roots = 1};
    ug_context *ctx = context_with(&o);
    ug_context *before = ug_context_use(ctx);
    ck_assert(draw("../layouts/wards.yaml", &hooked, &hooked_len, &err) == UG_OK);
    ck_assert_uint_eq(hooked_len, plain_len);
    ck_assert(memcmp(hooked, plain, plain_len) == 0);
    ug_free(hooked);
    ug_context_use(before);
    ug_context_free(ctx);
    free(plain);
}
END_TEST

/* A host allocator that runs dry: every point it can fail at is a clean
** UG_ENOMEM, with nothing left allocated. */
START_TEST(test_allocator_running_dry)
{
    long ok_runs = 0;
    for (long from = 1; from < 4000; from += 37) {
        tally t = {.fail_from = from};
        ug_context_options o = {.size = sizeof o, .alloc = counting_alloc, .alloc_ud = &t,
                                .glyph_roots = glyph_roots, .nglyph_roots = 1};
        ug_context *ctx = NULL;
        ug_error err;
        if (ug_context_new(&o, &ctx, &err) != UG_OK) {
            ck_assert_int_eq(err.status, UG_ENOMEM);
            ck_assert_int_eq(t.live, 0);
            continue;
        }
        ug_context *before = ug_context_use(ctx);
        char *svg = NULL;
        size_t len = 0;
        ug_status st = draw("../layouts/pantry.yaml", &svg, &len, &err);
        ck_assert_msg(st == UG_OK || st == UG_ENOMEM || st == UG_ERENDER,
                      "failing from call %ld: %s", from, err.msg);
        ok_runs += st == UG_OK;
        ug_free(svg);
        ug_context_use(before);
        ug_context_free(ctx);
        ck_assert_msg(t.live == 0, "failing from call %ld leaves %ld blocks", from, t.live);
    }
    ck_assert_int_gt(ok_runs, 0); /* late failures come after the drawing is done */
}
END_TEST

/* ---- glyph roots ---------------------------------------------------------- */

static size_t library_has(const char *name)
{
    ug_glyph_library *lib = NULL;
    ug_error err;
    ck_assert_msg(ug_glyph_library_open(NULL, 0, &lib, &err) == UG_OK, "%s", err.msg);
    size_t found = 0;
    for (size_t i = 0; i < ug_glyph_library_count(lib); i++)
        found += strcmp(ug_glyph_library_name(lib, i), name) == 0;
    ug_glyph_library_free(lib);
    return found;
}

START_TEST(test_glyph_roots_replace_the_default)
{
    unsetenv("UNITGRAM_GLYPH_PATH");
    const char *roots[] = {"data/glyphs/lib-a", "data/glyphs/lib-b"};
    ug_context_options o = {.size = sizeof o, .glyph_roots = roots, .nglyph_roots = 2};
    ug_context *ctx = context_with(&o);
    ug_context *before = ug_context_use(ctx);
    ck_assert_uint_eq(library_has("test-bar"), 1);
    ck_assert_uint_eq(library_has("test-cross"), 1);
    ck_assert_uint_eq(library_has("person"), 0);
    const char *const *dirs = glyph_default_dirs();
    ck_assert_str_eq(dirs[0], "data/glyphs/lib-a");
    ck_assert_str_eq(dirs[1], "data/glyphs/lib-b");
    ck_assert_ptr_null(dirs[2]);
    ug_context_use(before);
    ug_context_free(ctx);
    ck_assert_uint_eq(library_has("person"), 1); /* the runner's context again */
}
END_TEST

/* A thread with no context bound (a host that never names one) searches
** the installed data folder only, never a folder guessed from the program. */
START_TEST(test_default_roots_are_the_installed_folder)
{
    ug_context *before = ug_context_use(NULL);
    const char *const *dirs = glyph_default_dirs();
    ck_assert_str_eq(dirs[0], UG_DATADIR);
    ck_assert_ptr_null(dirs[1]);
    ck_assert_ptr_eq(ug_context_use(before), NULL);
}
END_TEST

START_TEST(test_empty_root_refused)
{
    const char *roots[] = {"../glyphs", ""};
    ug_context_options o = {.size = sizeof o, .glyph_roots = roots, .nglyph_roots = 2};
    ug_context *ctx = NULL;
    ug_error err;
    ck_assert_int_eq(ug_context_new(&o, &ctx, &err), UG_ESCHEMA);
    ck_assert_ptr_null(ctx);
    ck_assert_str_eq(err.msg, "glyph root 2 is empty");
}
END_TEST

/* ---- the file hook --------------------------------------------------------- */

typedef struct {
    const char *path, *text;
    int answer_others; /* what the hook says for any other path */
    int asked;
} memory_files;

static int serve(void *ud, const char *path, const char **data, size_t *len)
{
    memory_files *m = ud;
    m->asked++;
    if (strcmp(path, m->path) != 0)
        return m->answer_others;
    *data = m->text;
    *len = strlen(m->text);
    return 1;
}

static ug_status load_with_hook(memory_files *m, const char *path, ug_chart **chart,
                                ug_error *err)
{
    ug_context_options o = {.size = sizeof o, .read_file = serve, .read_ud = m,
                            .glyph_roots = glyph_roots, .nglyph_roots = 1};
    ug_context *ctx = context_with(&o);
    ug_context *before = ug_context_use(ctx);
    ug_status st = ug_chart_load(path, NULL, chart, err);
    ug_context_use(before);
    ug_context_free(ctx);
    return st;
}

START_TEST(test_hook_serves_a_layout_from_memory)
{
    memory_files m = {"in-memory/chart.yaml",
                      "title: From memory (test data)\nform: waffle\n"
                      "categories:\n  - {label: A, count: 3}\n  - {label: B, count: 1}\n",
                      0, 0};
    ug_chart *chart = NULL;
    ug_error err;
    ck_assert_msg(load_with_hook(&m, "in-memory/chart.yaml", &chart, &err) == UG_OK, "%s",
                  err.msg);
    ck_assert_int_ge(m.asked, 1);
    ug_chart_free(chart);
}
END_TEST

/* 0 lets the disk answer: the CSV beside a layout is still read. */
START_TEST(test_hook_passes_to_the_disk)
{
    memory_files m = {"nothing-here", "", 0, 0};
    ug_chart *chart = NULL;
    ug_error err;
    ck_assert_msg(load_with_hook(&m, "data/good/fromcsv.yaml", &chart, &err) == UG_OK, "%s",
                  err.msg);
    ck_assert_int_eq(m.asked, 2); /* the layout and its CSV */
    ug_chart_free(chart);
}
END_TEST

START_TEST(test_hook_refuses_a_file)
{
    memory_files m = {"nothing-here", "", -1, 0};
    ug_chart *chart = NULL;
    ug_error err;
    ck_assert_int_eq(load_with_hook(&m, "data/good/minimal.yaml", &chart, &err), UG_EIO);
    ck_assert_ptr_null(chart);
    ck_assert_str_eq(err.msg, "cannot read 'data/good/minimal.yaml': refused by the host's "
                              "reader");
}
END_TEST

/* The input limit holds for served bytes as for files. */
START_TEST(test_hook_bytes_within_the_limit)
{
    memory_files m = {"big.yaml", "title: x\ncategories: [{label: a, count: 1}]\n", 0, 0};
    ug_context_options o = {.size = sizeof o, .read_file = serve, .read_ud = &m,
                            .max_file_bytes = 10};
    ug_context *ctx = context_with(&o);
    ug_context *before = ug_context_use(ctx);
    ug_chart *chart = NULL;
    ug_error err;
    ck_assert_int_eq(ug_chart_load("big.yaml", NULL, &chart, &err), UG_ELIMIT);
    ck_assert_ptr_nonnull(strstr(err.msg, "larger than the limit of 10 bytes"));
    ug_context_use(before);
    ug_context_free(ctx);
}
END_TEST

/* ---- limits ---------------------------------------------------------------- */

/* A load that leaves a limit 0 takes the context's; one that names it wins. */
START_TEST(test_context_limits_are_defaults)
{
    ug_context_options o = {.size = sizeof o, .max_icons = 3};
    ug_context *ctx = context_with(&o);
    ug_context *before = ug_context_use(ctx);
    ug_chart *chart = NULL;
    ug_allocation *alloc = NULL;
    ug_error err;
    ck_assert(ug_chart_load("data/good/minimal.yaml", NULL, &chart, &err) == UG_OK);
    ck_assert_int_eq(ug_chart_allocate(chart, &alloc, &err), UG_ELIMIT);
    ug_chart_free(chart);
    ug_limits wide = {.max_icons = 1000};
    ck_assert(ug_chart_load("data/good/minimal.yaml", &wide, &chart, &err) == UG_OK);
    ck_assert_int_eq(ug_chart_allocate(chart, &alloc, &err), UG_OK);
    ug_allocation_free(alloc);
    ug_chart_free(chart);
    ug_context_use(before);
    ug_context_free(ctx);
}
END_TEST

START_TEST(test_limits_above_ceiling_refused)
{
    ug_context_options o = {.size = sizeof o, .max_icons = UG_CEILING_ICONS + 1};
    ug_context *ctx = NULL;
    ug_error err;
    ck_assert_int_eq(ug_context_new(&o, &ctx, &err), UG_ELIMIT);
    ck_assert_ptr_null(ctx);
    o = (ug_context_options){.size = sizeof o, .max_panels = UG_CEILING_PANELS + 1};
    ck_assert_int_eq(ug_context_new(&o, &ctx, &err), UG_ELIMIT);
}
END_TEST

/* ---- option structs grow by their size --------------------------------------- */

/* A caller whose header stopped before read_file: the bytes after its
** struct are not read, whatever lies there. */
START_TEST(test_older_struct_fields_unread)
{
    memory_files m = {"x", "", -1, 0};
    ug_context_options o = {.read_file = serve, .read_ud = &m,
                            .glyph_roots = glyph_roots, .nglyph_roots = 1};
    o.size = offsetof(ug_context_options, read_file);
    ug_context *ctx = context_with(&o);
    ug_context *before = ug_context_use(ctx);
    ug_chart *chart = NULL;
    ug_error err;
    ck_assert_int_eq(ug_chart_load("data/good/minimal.yaml", NULL, &chart, &err), UG_OK);
    ck_assert_int_eq(m.asked, 0);
    ug_chart_free(chart);
    ug_context_use(before);
    ug_context_free(ctx);
}
END_TEST

typedef struct {
    int a, b;
    size_t size;
    int later;
} grown;

START_TEST(test_opt_has)
{
    grown zero = {0}, old = {.size = offsetof(grown, later)}, now = {.size = sizeof now};
    const size_t first = offsetof(grown, size); /* first release: a and b */
    ck_assert(UG_OPT_HAS(grown, &zero, b, first));
    ck_assert(!UG_OPT_HAS(grown, &zero, later, first));
    ck_assert(!UG_OPT_HAS(grown, &old, later, first));
    ck_assert(UG_OPT_HAS(grown, &now, later, first));
}
END_TEST

/* ---- fonts ------------------------------------------------------------------------ */

/* A bound context makes its own fonts on its first text and releases them
** with itself (LeakSanitizer, in the sanitized pass, sees a miss). */
START_TEST(test_context_owns_its_fonts)
{
    ug_context_options o = {.size = sizeof o, .glyph_roots = glyph_roots, .nglyph_roots = 1};
    ug_context *a = context_with(&o), *b = context_with(&o);
    ug_context *before = ug_context_use(a);
    char *svg = NULL;
    size_t len = 0;
    ug_error err;
    ck_assert_ptr_null(a->fonts);
    ck_assert(draw("../layouts/pantry.yaml", &svg, &len, &err) == UG_OK);
    ug_free(svg);
    ck_assert_ptr_nonnull(a->fonts);
    ug_context_use(b);
    ck_assert(draw("../layouts/pantry.yaml", &svg, &len, &err) == UG_OK);
    ug_free(svg);
    ck_assert_ptr_nonnull(b->fonts);
    ck_assert_ptr_ne(a->fonts, b->fonts);
    ug_context_use(before);
    ug_context_free(a);
    ug_context_free(b);
}
END_TEST

/* ---- binding ------------------------------------------------------------------ */

START_TEST(test_use_returns_the_one_before)
{
    ug_context *runner = ug_context_current();
    ug_context *a = context_with(NULL), *b = context_with(NULL);
    ck_assert_ptr_eq(ug_context_use(a), runner);
    ck_assert_ptr_eq(ug_context_current(), a);
    ck_assert_ptr_eq(ug_context_use(b), a);
    ug_context_free(b); /* bound: freeing unbinds it */
    ck_assert_ptr_ne(ug_context_current(), b);
    ck_assert_ptr_nonnull(ug_context_current());
    ug_context_use(runner);
    ug_context_free(a);
}
END_TEST

/* A failure armed in one context does not fail allocations in another. */
START_TEST(test_fault_counters_per_context)
{
    ug_context *runner = ug_context_current();
    ug_context *other = context_with(NULL);
    ug_mem_fail_after(0);
    ck_assert_ptr_null(ug_malloc(8));
    ug_context_use(other);
    void *p = ug_malloc(8);
    ck_assert_ptr_nonnull(p);
    ug_free(p);
    ug_context_use(runner);
    ck_assert_ptr_null(ug_malloc(8));
    ug_mem_fail_after(-1);
    ug_context_free(other);
}
END_TEST

static Suite *context_suite(void)
{
    Suite *s = suite_create("context");
    TCase *t = tcase_create("context");
    tcase_set_timeout(t, 120);
    tcase_add_test(t, test_allocator_sees_every_block);
    tcase_add_test(t, test_allocator_changes_no_byte);
    tcase_add_test(t, test_allocator_running_dry);
    tcase_add_test(t, test_glyph_roots_replace_the_default);
    tcase_add_test(t, test_default_roots_are_the_installed_folder);
    tcase_add_test(t, test_empty_root_refused);
    tcase_add_test(t, test_hook_serves_a_layout_from_memory);
    tcase_add_test(t, test_hook_passes_to_the_disk);
    tcase_add_test(t, test_hook_refuses_a_file);
    tcase_add_test(t, test_hook_bytes_within_the_limit);
    tcase_add_test(t, test_context_limits_are_defaults);
    tcase_add_test(t, test_limits_above_ceiling_refused);
    tcase_add_test(t, test_older_struct_fields_unread);
    tcase_add_test(t, test_opt_has);
    tcase_add_test(t, test_context_owns_its_fonts);
    tcase_add_test(t, test_use_returns_the_one_before);
    tcase_add_test(t, test_fault_counters_per_context);
    suite_add_tcase(s, t);
    return s;
}

int main(void) { return check_run(context_suite()); }
