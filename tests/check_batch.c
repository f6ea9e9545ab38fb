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
    size_t n = ug_slug(slugs[_i].name, buf, sizeof buf);
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

/* A fresh folder for a test's template t.yaml and CSV r.csv. */
static void temp_files(char *dir, char *tmpl, char *csv, size_t size)
{
    ck_assert_ptr_nonnull(mkdtemp(dir));
    snprintf(tmpl, size, "%s/t.yaml", dir);
    snprintf(csv, size, "%s/r.csv", dir);
}

static void remove_files(const char *dir, const char *tmpl, const char *csv)
{
    unlink(tmpl);
    unlink(csv);
    rmdir(dir);
}

/* Row 0 is the base; rows 1 + 2c and 2 + 2c change category c only. The
** counts are random (seeded by the test number); split or inline lines,
** and a suppression threshold that may hide a changed count. */
static void write_batch(int seed, const char *tmpl, const char *csv)
{
    unsigned long st = (unsigned long)seed * 2654435761UL + 1;
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
    temp_files(dir, tmpl, csv, sizeof tmpl);
    write_batch(_i, tmpl, csv);
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
    remove_files(dir, tmpl, csv);
}
END_TEST

static void write_text(const char *path, const char *text)
{
    FILE *f = fopen(path, "w");
    ck_assert_ptr_nonnull(f);
    ck_assert_int_ge(fputs(text, f), 0);
    ck_assert_int_eq(fclose(f), 0);
}

/* Every byte a batch publishes for row i: its SVG and its CSV table. */
static char *published(ug_batch *b, size_t i, size_t *len)
{
    ug_error err = {0};
    ug_chart *row = NULL;
    ug_allocation *a = NULL;
    ug_scene *s = NULL;
    char *svg = NULL, *table = NULL;
    size_t svg_len = 0, table_len = 0;
    ck_assert_msg(!ug_batch_row(b, i, &row, &err), "%s", err.msg);
    ck_assert_msg(!ug_chart_allocate(row, &a, &err), "%s", err.msg);
    ck_assert_msg(!ug_batch_pack(b, row, a, NULL, &s, &err), "%s", err.msg);
    ck_assert_msg(!ug_scene_svg(s, &svg, &svg_len, &err), "%s", err.msg);
    const ug_allocation *one[1] = {a};
    ck_assert_msg(!ug_table_csv(one, 1, &table, &table_len, &err), "%s", err.msg);
    char *both = malloc(svg_len + table_len);
    ck_assert_ptr_nonnull(both);
    memcpy(both, svg, svg_len);
    memcpy(both + svg_len, table, table_len);
    *len = svg_len + table_len;
    free(svg);
    free(table);
    ug_scene_free(s);
    ug_allocation_free(a);
    ug_chart_free(row);
    return both;
}

/* Changing a hidden count changes no published byte of any row of the
** batch: not the shared icon value (`auto` looks at every row), not the
** shared frame (sized for the largest row), not a neighbour's icons or the
** complement chosen. Random batches of 6 rows, most with one count below
** 10; each hidden count in turn is moved to another value below 10. */
START_TEST(test_hidden_count_changes_no_byte)
{
    enum { ROWS = 6 };
    char dir[] = "/tmp/ug-batch-XXXXXX", tmpl[64], csv[64];
    temp_files(dir, tmpl, csv, sizeof tmpl);
    unsigned long st = (unsigned long)_i * 2654435761UL + 7;
    char text[512];
    snprintf(text, sizeof text,
             "title: \"Row {group}\"\nunit-label: people\nicon-value: %s\n"
             "arrangement: %s\nsuppress: {below: 10}\ncategories:\n"
             "  - {id: c0, label: A}\n  - {id: c1, label: B}\n"
             "  - {id: c2, label: C}\n  - {id: c3, label: D}\n",
             _i % 2 ? "auto" : "5", _i % 3 ? "inline" : "split");
    write_text(tmpl, text);
    unsigned long v[ROWS][NCATS];
    for (int r = 0; r < ROWS; r++) {
        /* at most one small count a row: a row is a chart of its own, and
        ** two small counts among four leave too few cells to hide them */
        int small = lcg(&st) % 3 ? (int)(lcg(&st) % NCATS) : -1;
        for (int c = 0; c < NCATS; c++)
            v[r][c] = c == small ? 1 + lcg(&st) % 9 : 10 + lcg(&st) % 300;
    }
    size_t before_len[ROWS];
    char *before[ROWS];
    for (int pass = -1; pass < ROWS * NCATS; pass++) {
        int r0 = pass / NCATS, c0 = pass % NCATS;
        unsigned long keep = 0;
        if (pass >= 0) {
            if (v[r0][c0] >= 10)
                continue;
            keep = v[r0][c0];
            v[r0][c0] = 1 + (keep + lcg(&st) % 8) % 9; /* another value below 10 */
        }
        FILE *f = fopen(csv, "w");
        ck_assert_ptr_nonnull(f);
        fprintf(f, "name,c0,c1,c2,c3\n");
        for (int r = 0; r < ROWS; r++)
            fprintf(f, "r%d,%lu,%lu,%lu,%lu\n", r, v[r][0], v[r][1], v[r][2], v[r][3]);
        ck_assert_int_eq(fclose(f), 0);
        ug_error err = {0};
        ug_batch *b = NULL;
        ck_assert_msg(!ug_batch_open(tmpl, csv, NULL, &b, &err), "%s", err.msg);
        for (size_t r = 0; r < ROWS; r++) {
            size_t len;
            char *now = published(b, r, &len);
            if (pass < 0) {
                before[r] = now, before_len[r] = len;
                continue;
            }
            ck_assert_msg(len == before_len[r] && !memcmp(now, before[r], len),
                          "seed %d: row %zu's bytes change when the hidden count of "
                          "row %d, category %d goes from %lu to %lu",
                          _i, r, r0, c0, keep, v[r0][c0]);
            free(now);
        }
        ug_batch_free(b);
        if (pass >= 0)
            v[r0][c0] = keep;
    }
    for (int r = 0; r < ROWS; r++)
        free(before[r]);
    remove_files(dir, tmpl, csv);
}
END_TEST

/* The row names' column defaults to the header's first field as the counts'
** own reader reads it: here ',' is the delimiter (more commas than
** semicolons), so the first field is "site;code", not "site". */
START_TEST(test_first_column_read_like_the_counts)
{
    char dir[] = "/tmp/ug-batch-XXXXXX", tmpl[64], csv[64];
    temp_files(dir, tmpl, csv, sizeof tmpl);
    write_text(tmpl, "title: Row {group}\nicon-value: 1\ncategories:\n"
                     "  - {id: a, label: A}\n  - {id: b, label: B}\n");
    write_text(csv, "\"site;code\",a,b\nNorth;1,12,14\nSouth;2,30,11\n");
    ug_error err = {0};
    ug_batch *b = NULL;
    ck_assert_msg(!ug_batch_open(tmpl, csv, NULL, &b, &err), "%s", err.msg);
    ck_assert_uint_eq(ug_batch_count(b), 2);
    ck_assert_str_eq(ug_batch_name(b, 1), "South;2");
    ug_batch_free(b);
    write_text(csv, "site;code,a,b\nNorth;1,12,14\n");
    ck_assert_msg(!ug_batch_open(tmpl, csv, NULL, &b, &err), "%s", err.msg);
    ck_assert_str_eq(ug_batch_name(b, 0), "North;1");
    ug_batch_free(b);
    remove_files(dir, tmpl, csv);
}
END_TEST

/* The property can fail: two rows packed on their own (no shared frame)
** differ in canvas height when one row's count needs more lines. */
START_TEST(test_unshared_rows_differ)
{
    char dir[] = "/tmp/ug-batch-XXXXXX", tmpl[64], csv[64];
    temp_files(dir, tmpl, csv, sizeof tmpl);
    write_text(tmpl, "title: Row {group}\nicon-value: 1\ncolumns: 10\n"
                     /* a batch keeps its key below; so must the row alone */
                     "key-place: below\ncategories:\n"
                     "  - {id: a, label: A}\n  - {id: b, label: B}\n");
    write_text(csv, "name,a,b\nsmall,3,4\nlarge,95,4\n");
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
    remove_files(dir, tmpl, csv);
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
    tcase_add_test(t, test_first_column_read_like_the_counts);
    tcase_add_loop_test(t, test_hidden_count_changes_no_byte, 0, 30);
    suite_add_tcase(s, t);
    return s;
}

int main(void)
{
    return check_run(batch_suite());
}
