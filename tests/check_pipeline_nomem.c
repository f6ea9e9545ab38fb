/*
** Allocation failure: run the whole pipeline failing the Nth allocation, for
** every N until a run succeeds. Each failure must be a clean UG_ENOMEM (or a
** fully successful run) — never a crash — and under the sanitized pass of
** `make check` LeakSanitizer proves that nothing leaks on any of the paths.
** (The approach — fail each allocation in turn — follows Lua's memerr tests
** and curl's torture mode; common practice, no source for the exact scheme.)
*/
#include <check.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "ug.h"

static const char layout[] =
    "title: Pantry households (demo data)\n"
    "source: test\n"
    "unit-label: households\n"
    "form: rows\n"
    "icon-value: 10\n"
    "groups: [North, South]\n"
    "categories:\n"
    "  - {label: Adults, glyph: square, counts: [120, 85]}\n"
    "  - {label: Children, glyph: circle, counts: [64, 51.5]}\n";

/* One run of the pipeline; returns the first failing status. */
static ug_status pipeline(void)
{
    ug_error err = {0};
    ug_chart *chart = NULL;
    ug_allocation *a = NULL;
    ug_scene *scene = NULL;
    char *svg = NULL, *report = NULL;
    ug_status st = ug_chart_load_string(layout, strlen(layout), "nomem.yaml",
                                        NULL, &chart, &err);
    if (!st)
        st = ug_chart_allocate(chart, &a, &err);
    if (!st)
        st = ug_allocation_report(a, UG_REPORT_JSON, &report, NULL, &err);
    if (!st)
        st = ug_scene_pack(chart, a, &scene, &err);
    if (!st)
        st = ug_scene_svg(scene, &svg, NULL, &err);
    if (st)
        ck_assert_msg(err.msg[0] != '\0', "a failure without a message");
    ug_free(svg);
    ug_free(report);
    ug_scene_free(scene);
    ug_allocation_free(a);
    ug_chart_free(chart);
    return st;
}

START_TEST(test_every_allocation_failure_is_clean)
{
    long total = 0;
    ug_mem_fail_after(-1);
    ck_assert_int_eq(pipeline(), UG_OK);
    total = ug_mem_fail_after(-1);
    ck_assert_int_gt(total, 10);
    fprintf(stderr, "pipeline: %ld allocations, each failed in turn\n", total);
    for (long n = 0; n < total; n++) {
        ug_mem_fail_after(n);
        ug_status st = pipeline();
        ug_mem_fail_after(-1);
        ck_assert_msg(st == UG_ENOMEM || st == UG_OK,
                      "failing allocation %ld gave status %d", n, st);
    }
}
END_TEST

int main(void)
{
    Suite *s = suite_create("nomem");
    TCase *tc = tcase_create("core");
    tcase_set_timeout(tc, 120);
    tcase_add_test(tc, test_every_allocation_failure_is_clean);
    suite_add_tcase(s, tc);
    SRunner *sr = srunner_create(s);
    srunner_run_all(sr, CK_NORMAL);
    int failed = srunner_ntests_failed(sr);
    srunner_free(sr);
    return failed ? EXIT_FAILURE : EXIT_SUCCESS;
}
