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

#include "pipeline_run.h"
#include "check_run.h"

/* Each case is a layout named as if it lay in `dir` (relative to tests/, where
** Check binaries run), so its CSV file and glyph paths resolve there. */
typedef struct {
    const char *what, *dir, *text;
} nomem_case;

static const nomem_case cases[] = {
    {"groups, rows, inline counts", "data/good",
     "title: Pantry households (demo data)\n"
     "source: test\n"
     "unit-label: households\n"
     "form: rows\n"
     "icon-value: 10\n"
     "groups: [North, South]\n"
     "categories:\n"
     "  - {label: Adults, glyph: square, counts: [120, 85]}\n"
     "  - {label: Children, glyph: circle, counts: [64, 51.5]}\n"},
    {"wide CSV with groups", "data/good",
     "title: Library visits by ward (demo data)\n"
     "source: test\n"
     "unit-label: visits\n"
     "form: rows\n"
     "icon-value: 10\n"
     "groups: [North, \"River, east\", Hill]\n"
     "data: {file: wide.csv, group-column: ward name}\n"
     "categories:\n"
     "  - label: Adults\n"
     "  - label: Children\n"
     "  - {label: Older people, id: older}\n"},
    {"long CSV, groups from the file", "data/good",
     "title: Library visits by ward (demo data)\n"
     "source: test\n"
     "unit-label: visits\n"
     "form: rows\n"
     "icon-value: 10\n"
     "data: {file: long.csv, group-column: ward, category-column: type, "
     "count-column: n}\n"
     "categories:\n"
     "  - label: Adults\n"
     "  - {label: Children, column: kids}\n"
     "  - {label: Older people, id: older}\n"},
    {"waffle, suppression, written description", "data/good",
     "title: School meals (demo data)\n"
     "source: test\n"
     "unit-label: pupils\n"
     "form: waffle\n"
     "cells: 100\n"
     "description: Pupils by meal, a written description.\n"
     "suppress: {below: 10, label: few}\n"
     "categories:\n"
     "  - {label: Hot meal, count: 412}\n"
     "  - {label: Packed lunch, count: 287}\n"
     "  - {label: Home, count: 7}\n"},
    {"custom glyph files, partial icons", "data/glyphs",
     "title: Custom icons (demo data)\n"
     "source: test\n"
     "unit-label: boxes\n"
     "form: rows\n"
     "icon-value: 5\n"
     "rounding: partial\n"
     "categories:\n"
     "  - {label: Discs, glyph: ./shapes/disc-offset.svg, count: 23}\n"
     "  - {label: Rings, glyph: ./shapes/ring-evenodd.svg, count: 12.5}\n"
     "  - {label: Bars, glyph: ./lib-a/test-bar.svg, count: 9}\n"},
};

/* One run of the pipeline, report and description included. */
static ug_status pipeline(const nomem_case *c)
{
    ug_error err;
    char name[256];
    snprintf(name, sizeof name, "%s/nomem.yaml", c->dir);
    ug_status st = pipeline_run(c->text, strlen(c->text), name, NULL, true, &err);
    if (st)
        ck_assert_msg(err.msg[0] != '\0', "%s: a failure without a message", c->what);
    return st;
}

START_TEST(test_every_allocation_failure_is_clean)
{
    const nomem_case *c = &cases[_i];
    ug_mem_fail_after(-1);
    ug_status first = pipeline(c);
    long total = ug_mem_fail_after(-1);
    ck_assert_msg(first == UG_OK, "%s: the case itself fails (status %d)", c->what, first);
    ck_assert_int_gt(total, 10);
    fprintf(stderr, "%s: %ld allocations, each failed in turn\n", c->what, total);
    for (long n = 0; n < total; n++) {
        ug_mem_fail_after(n);
        ug_status st = pipeline(c);
        ug_mem_fail_after(-1);
        ck_assert_msg(st == UG_ENOMEM || st == UG_OK,
                      "%s: failing allocation %ld gave status %d", c->what, n, st);
    }
}
END_TEST

int main(void)
{
    Suite *s = suite_create("nomem");
    TCase *tc = tcase_create("core");
    tcase_set_timeout(tc, 300);
    tcase_add_loop_test(tc, test_every_allocation_failure_is_clean, 0,
                        (int)(sizeof cases / sizeof cases[0]));
    suite_add_tcase(s, tc);
    return check_run(s);
}
