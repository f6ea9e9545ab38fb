/* Tests for src/batch.c: the file-name part made from a row's name, and the
** layout a batch shares (FORMAT.md §5) as properties over generated CSVs. */
#define _POSIX_C_SOURCE 200809L
#include <check.h>
#include <stdbool.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "batch.h"
#include "check_run.h"
#include "scene.h"

typedef struct {
    const char *name, *slug;
} slug_case;

/* U+0301 is COMBINING ACUTE ACCENT, U+0308 COMBINING DIAERESIS (Unicode
** block Combining Diacritical Marks): the decomposed spellings must give the
** slug of the precomposed ones, not a '-' where the mark was. */
static const slug_case slugs[] = {
    {"North East", "north-east"},
    {"\u00e9cole", "ecole"},
    {"e\u0301cole", "ecole"},
    {"U\u0308nicode", "unicode"},
    {"\u00dcnicode", "unicode"},
    {"Cafe\u0301 cre\u0300me", "cafe-creme"},
    {"\u0301lead", "lead"},
    {"../etc", "etc"},
    {"\u2603", ""},
};

START_TEST(test_slug)
{
    char buf[80];
    size_t n = batch_slug(slugs[_i].name, buf, sizeof buf);
    ck_assert_str_eq(buf, slugs[_i].slug);
    ck_assert_uint_eq(n, strlen(slugs[_i].slug));
}
END_TEST

/* ---- one layout for all rows ------------------------------------------------ */

#define NCATS 4
#define NROWS 9 /* a base row, then two variants per category */

static unsigned long lcg(unsigned long *state)
{
    *state = *state * 6364136223846793005UL + 1442695040888963407UL;
    return *state >> 33;
}

/* Row 0 is the base; rows 1 + 2c and 2 + 2c change category c only. The
** counts are random (seeded by the test number); split or inline lines,
** and a suppression threshold that may hide a changed count. */
static void write_batch(const char *dir, int seed, char *tmpl, char *csv, size_t size)
{
    unsigned long st = (unsigned long)seed * 2654435761UL + 1;
    snprintf(tmpl, size, "%s/t.yaml", dir);
    snprintf(csv, size, "%s/r.csv", dir);
    FILE *f = fopen(tmpl, "w");
    ck_assert_ptr_nonnull(f);
    fprintf(f, "title: \"Row {group}\"\nunit-label: people\nicon-value: 5\n"
               "arrangement: %s\ncolumns: %lu\n%scategories:\n",
            seed % 2 ? "split" : "inline", 10 + lcg(&st) % 15,
            seed % 3 == 0 ? "suppress: {below: 10}\n" : "");
    for (int c = 0; c < NCATS; c++)
        fprintf(f, "  - {id: c%d, label: \"Category %d\"}\n", c, c);
    fclose(f);
    unsigned long base[NCATS];
    for (int c = 0; c < NCATS; c++)
        base[c] = 10 + lcg(&st) % 150;
    f = fopen(csv, "w");
    ck_assert_ptr_nonnull(f);
    fprintf(f, "name,c0,c1,c2,c3\n");
    for (int r = 0; r < NROWS; r++) {
        fprintf(f, "row%d", r);
        for (int c = 0; c < NCATS; c++) {
            unsigned long v = base[c];
            if (r > 0 && (r - 1) / 2 == c)
                v = lcg(&st) % 200; /* may fall below the threshold */
            fprintf(f, ",%lu", v);
        }
        fputc('\n', f);
    }
    fclose(f);
}

static ug_scene *pack_row(ug_batch *b, size_t i)
{
    ug_error err = {0};
    ug_chart *row = NULL;
    ug_allocation *a = NULL;
    ug_scene *s = NULL;
    ck_assert_msg(!ug_batch_row(b, i, &row, &err), "%s", err.msg);
    ck_assert_msg(!ug_chart_allocate(row, &a, &err), "%s", err.msg);
    ck_assert_msg(!ug_batch_pack(b, row, a, NULL, &s, &err), "%s", err.msg);
    ug_allocation_free(a);
    ug_chart_free(row);
    return s;
}

/* Everything category c owns in the scene: its icons and placeholders.
** Apportioning a new total may give an untouched category one icon more or
** less (largest remainder moves with N), so the icons both rows draw must
** stand in the same places. */
static bool hides(const ug_scene *s, unsigned c)
{
    for (size_t i = 0; i < s->nholders; i++)
        if (s->holders[i].cat == c)
            return true;
    return false;
}

static void assert_same_places(const ug_scene *x, const ug_scene *y, unsigned c)
{
    /* a change that hides a count may hide a second one with it
    ** (complementary suppression): that one is no longer untouched */
    if (hides(x, c) != hides(y, c))
        return;
    size_t nx = 0, ny = 0;
    for (size_t i = 0; i < x->nicons; i++)
        nx += x->icons[i].cat == c;
    for (size_t i = 0; i < y->nicons; i++)
        ny += y->icons[i].cat == c;
    ck_assert_uint_le(nx > ny ? nx - ny : ny - nx, 1);
    size_t common = nx < ny ? nx : ny;
    for (size_t i = 0, j = 0, k = 0; i < x->nicons && k < common; i++) {
        if (x->icons[i].cat != c)
            continue;
        k++;
        while (y->icons[j].cat != c)
            j++;
        ck_assert_double_eq(x->icons[i].x, y->icons[j].x);
        ck_assert_double_eq(x->icons[i].y, y->icons[j].y);
        j++;
    }
    for (size_t i = 0; i < x->nholders; i++)
        for (size_t j = 0; j < y->nholders; j++)
            if (x->holders[i].cat == c && y->holders[j].cat == c) {
                ck_assert_double_eq(x->holders[i].x, y->holders[j].x);
                ck_assert_double_eq(x->holders[i].y, y->holders[j].y);
            }
    for (size_t i = 0; i < x->nswatches && i < y->nswatches; i++)
        ck_assert_double_eq(x->swatches[i].y, y->swatches[i].y);
}

/* Property: every chart of a batch has one canvas size, and a change in one
** category's count moves nothing of any other category. */
START_TEST(test_shared_layout)
{
    char dir[] = "/tmp/ug-batch-XXXXXX", tmpl[64], csv[64];
    ck_assert_ptr_nonnull(mkdtemp(dir));
    write_batch(dir, _i, tmpl, csv, sizeof tmpl);
    ug_error err = {0};
    ug_batch *b = NULL;
    ck_assert_msg(!ug_batch_open(tmpl, csv, NULL, &b, &err), "%s", err.msg);
    ck_assert_uint_eq(ug_batch_count(b), NROWS);
    ug_scene *base = pack_row(b, 0);
    for (size_t r = 1; r < NROWS; r++) {
        ug_scene *s = pack_row(b, r);
        ck_assert_double_eq(s->width, base->width);
        ck_assert_double_eq(s->height, base->height);
        unsigned changed = (unsigned)(r - 1) / 2;
        for (unsigned c = 0; c < NCATS; c++)
            if (c != changed)
                assert_same_places(base, s, c);
        ug_scene_free(s);
    }
    ug_scene_free(base);
    ug_batch_free(b);
    unlink(tmpl);
    unlink(csv);
    rmdir(dir);
}
END_TEST

/* The property can fail: two rows packed on their own (no shared frame)
** differ in canvas height when one row's count needs more lines. */
START_TEST(test_unshared_rows_differ)
{
    char dir[] = "/tmp/ug-batch-XXXXXX", tmpl[64], csv[64];
    ck_assert_ptr_nonnull(mkdtemp(dir));
    snprintf(tmpl, sizeof tmpl, "%s/t.yaml", dir);
    snprintf(csv, sizeof csv, "%s/r.csv", dir);
    FILE *f = fopen(tmpl, "w");
    fprintf(f, "title: Row {group}\nicon-value: 1\ncolumns: 10\ncategories:\n"
               "  - {id: a, label: A}\n  - {id: b, label: B}\n");
    fclose(f);
    f = fopen(csv, "w");
    fprintf(f, "name,a,b\nsmall,3,4\nlarge,95,4\n");
    fclose(f);
    ug_error err = {0};
    ug_batch *b = NULL;
    ck_assert_msg(!ug_batch_open(tmpl, csv, NULL, &b, &err), "%s", err.msg);
    ug_scene *own[2], *shared[2];
    for (size_t r = 0; r < 2; r++) {
        ug_chart *row = NULL;
        ug_allocation *a = NULL;
        ck_assert(!ug_batch_row(b, r, &row, &err));
        ck_assert(!ug_chart_allocate(row, &a, &err));
        ck_assert(!ug_scene_pack(row, a, &own[r], &err));
        ck_assert(!ug_batch_pack(b, row, a, NULL, &shared[r], &err));
        ug_allocation_free(a);
        ug_chart_free(row);
    }
    ck_assert(own[0]->height < own[1]->height);
    ck_assert_double_eq(shared[0]->height, shared[1]->height);
    ck_assert_double_eq(shared[1]->height, own[1]->height);
    for (size_t r = 0; r < 2; r++) {
        ug_scene_free(own[r]);
        ug_scene_free(shared[r]);
    }
    ug_batch_free(b);
    unlink(tmpl);
    unlink(csv);
    rmdir(dir);
}
END_TEST

static Suite *batch_suite(void)
{
    Suite *s = suite_create("batch");
    TCase *t = tcase_create("slug");
    tcase_add_loop_test(t, test_slug, 0, sizeof slugs / sizeof slugs[0]);
    suite_add_tcase(s, t);
    t = tcase_create("shared layout");
    tcase_set_timeout(t, 60);
    tcase_add_loop_test(t, test_shared_layout, 0, 60);
    tcase_add_test(t, test_unshared_rows_differ);
    suite_add_tcase(s, t);
    return s;
}

int main(void)
{
    return check_run(batch_suite());
}
