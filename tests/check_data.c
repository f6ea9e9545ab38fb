/* Tests for src/data.c: counts from CSV files. Each case writes a layout and
** a CSV into a fresh temporary folder, loads the layout and checks the counts,
** or the error's place (CSV errors: the physical line where the record
** starts, and the field number as the column). */
#define _POSIX_C_SOURCE 200809L
#include <check.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "model.h"
#include "check_run.h"

static char dir[64];
static char layout_path[128], csv_path[128];

static void write_file(const char *path, const char *text)
{
    FILE *f = fopen(path, "wb");
    ck_assert_ptr_nonnull(f);
    ck_assert_uint_eq(fwrite(text, 1, strlen(text), f), strlen(text));
    fclose(f);
}

static void setup(void)
{
    strcpy(dir, "/tmp/ug_check_data_XXXXXX");
    ck_assert_ptr_nonnull(mkdtemp(dir));
    snprintf(layout_path, sizeof layout_path, "%s/layout.yaml", dir);
    snprintf(csv_path, sizeof csv_path, "%s/data.csv", dir);
}

static void teardown(void)
{
    unlink(layout_path);
    unlink(csv_path);
    rmdir(dir);
}

static ug_status load(const char *yaml, const char *csv, const ug_limits *lim,
                      ug_chart **c, ug_error *err)
{
    write_file(layout_path, yaml);
    write_file(csv_path, csv);
    ug_error_clear(err);
    return ug_chart_load(layout_path, lim, c, err);
}

#define HEAD "form: rows\nicon-value: 1\n"
#define WIDE HEAD "data: {file: data.csv, group-column: ward}\n" \
    "categories: [{label: Adults}, {label: Children, column: kids}]\n"
#define WIDE1 HEAD "data: {file: data.csv}\n" \
    "categories: [{label: Adults}, {label: Children, column: kids}]\n"
#define LONG HEAD "data: {file: data.csv, group-column: ward, " \
    "category-column: type, count-column: n}\n" \
    "categories: [{label: Adults}, {label: Children, column: kids}]\n"

typedef struct {
    const char *yaml, *csv;
    ug_status status;
    unsigned line, column; /* in the CSV unless in_layout */
    bool in_layout;
    const char *msg;       /* part of the message */
} csv_case;

static const csv_case cases[] = {
    /* a quoted field over two lines: the next record starts on line 4 */
    {WIDE, "ward,adults,kids,remarks\nNorth,4,5,\"two\nlines\"\nRiver,x,1,none\n",
     UG_EDATA, 4, 2, false, "plain decimal"},
    /* CRLF line ends and a blank line still count as physical lines */
    {WIDE, "ward,adults,kids\r\n\r\nNorth,4,5\r\nRiver,1,-2\r\n", UG_EDATA, 4, 3,
     false, "cannot be negative"},
    /* semicolons win when the header has more of them than commas, even with
    ** a comma inside a quoted header field */
    {WIDE, "\"ward, name\";ward;adults;kids\nx;North;1,5;2\n", UG_EDATA, 2, 3, false,
     "plain decimal"},
    {WIDE, "ward,adults,kids\n\"North\nward\",1,2\n", UG_ESCHEMA, 2, 1, false,
     "line break"},
    {WIDE, "ward,adults,kids,adults\nNorth,1,2,3\n", UG_EDATA, 1, 4, false,
     "column 'adults' appears twice"},
    {WIDE, "ward,adults,kids\nNorth,1,2\"\n", UG_ESYNTAX, 2, 3, false, "CSV syntax"},
    {WIDE, "ward,adults\nNorth,1\n", UG_EDATA, 4, 57, true, "has no column 'kids'"},
    {WIDE1, "adults,kids\n1,2,3\n", UG_EDATA, 2, 3, false, "header has 2"},
    {LONG, "ward,type,n\nNorth,Adults,1\nNorth,kids,2\nNorth,adults,3\n", UG_EDATA, 4,
     3, false, "a second count for category 'adults' in group 'North'"},
    {LONG, "ward,type,n\nNorth,Adults,1\n", UG_EDATA, 0, 0, false,
     "no count for category 'children' in group 'North'"},
    {WIDE, "ward,adults,kids\nNorth,1.1234567,2\n", UG_EDATA, 2, 2, false,
     "more than 6 decimal places"},
    {WIDE, "ward,adults,kids\nNorth,,2\n", UG_EDATA, 2, 2, false, "empty"},
    {WIDE, "\xEF\xBB\xBFward,adults,kids\nNorth,3,\xC3\xA9\n", UG_EDATA, 2, 3, false,
     "found 2 bytes of other text, not shown"},
    /* a try at a number is quoted back; other text (a password?) is not */
    {WIDE, "ward,adults,kids\nNorth,3,12a\n", UG_EDATA, 2, 3, false, "found '12a'"},
    {WIDE, "ward,adults,kids\nNorth,3,hunter2-pw\n", UG_EDATA, 2, 3, false,
     "found 10 bytes of other text, not shown"},
    {WIDE, "ward,adults,kids\nNorth,1,\"2\x01\"\n", UG_ESCHEMA, 2, 3, false, "U+0001"},
};

START_TEST(test_csv_errors)
{
    const csv_case *t = &cases[_i];
    ug_error err;
    ug_chart *c = NULL;
    ug_status st = load(t->yaml, t->csv, NULL, &c, &err);
    ck_assert_msg(st == t->status, "case %d: status %d: %s", _i, st, err.msg);
    ck_assert_ptr_null(c);
    ck_assert_str_eq(err.where.file, t->in_layout ? layout_path : csv_path);
    ck_assert_uint_eq(err.where.line, t->line);
    ck_assert_uint_eq(err.where.column, t->column);
    ck_assert_msg(strstr(err.msg, t->msg), "case %d: '%s'", _i, err.msg);
}
END_TEST

/* Groups come from the CSV, in file order, when the layout lists none; every
** count keeps the CSV place it came from. */
START_TEST(test_groups_from_csv)
{
    ug_error err;
    ug_chart *c = NULL;
    ug_status st = load(WIDE, "ward,kids,adults\nHill,1,2\n\"River, east\",3,4.25\n"
                              "North,5,6\n", NULL, &c, &err);
    ck_assert_msg(st == UG_OK, "%s", err.msg);
    ck_assert_uint_eq(c->groups.n, 3);
    ck_assert_str_eq(c->groups.items[0].text, "Hill");
    ck_assert_str_eq(c->groups.items[1].text, "River, east");
    ck_assert_str_eq(c->groups.items[2].text, "North");
    ck_assert_uint_eq(c->groups.items[1].mark.line, 3);
    char buf[48];
    ck_assert_str_eq(ug_dec_format(c->cats[0].counts[1], buf), "4.25");
    ck_assert_str_eq(ug_dec_format(c->cats[1].counts[2], buf), "5");
    ck_assert_str_eq(c->cats[0].count_marks[1].file, csv_path);
    ck_assert_uint_eq(c->cats[0].count_marks[1].line, 3);
    ck_assert_uint_eq(c->cats[0].count_marks[1].column, 3);
    ug_chart_free(c);
}
END_TEST

/* A category whose column defaults to its id finds a header written as the
** label or lower-cased ("Niños", "niños": both slug to its id "ninos"); a
** column named in the layout must match as written. */
START_TEST(test_default_column_by_slug)
{
    ug_error err;
    ug_chart *c = NULL;
    const char *yaml = HEAD "data: {file: data.csv, group-column: ward}\n"
                            "categories: [{label: \"Niños\"}, {label: Adults, column: Adults}]\n";
    ug_status st = load(yaml, "ward,niños,Adults\nHill,1,2\n", NULL, &c, &err);
    ck_assert_msg(st == UG_OK, "%s", err.msg);
    ck_assert_str_eq(c->cats[0].id, "ninos");
    char buf[48];
    ck_assert_str_eq(ug_dec_format(c->cats[0].counts[0], buf), "1");
    ug_chart_free(c);
    st = load(yaml, "ward,Niños,Adults\nHill,1,2\n", NULL, &c, &err);
    ck_assert_msg(st == UG_OK, "%s", err.msg);
    ug_chart_free(c);
    st = load(yaml, "ward,niños,adults\nHill,1,2\n", NULL, &c, &err);
    ck_assert_int_eq(st, UG_EDATA);
    ck_assert_ptr_nonnull(strstr(err.msg, "no column 'Adults'"));
}
END_TEST

/* The layout's groups give the order; the CSV rows may come in any order. */
START_TEST(test_layout_group_order)
{
    ug_error err;
    ug_chart *c = NULL;
    const char *yaml = HEAD "groups: [North, Hill]\n"
                            "data: {file: data.csv, group-column: ward}\n"
                            "categories: [{label: Adults}]\n";
    ck_assert_int_eq(load(yaml, "ward,adults\nHill,7\nNorth,9\n", NULL, &c, &err),
                     UG_OK);
    char buf[48];
    ck_assert_str_eq(ug_dec_format(c->cats[0].counts[0], buf), "9");
    ck_assert_str_eq(ug_dec_format(c->cats[0].counts[1], buf), "7");
    ck_assert_uint_eq(c->cats[0].count_marks[0].line, 3);
    ug_chart_free(c);
}
END_TEST

/* `rows:` picks rows of a history file (FORMAT.md §5): the last N, or the
** named ones, become the groups in file order; other rows are no error, and
** a bad row in a row not picked is not even read. */
START_TEST(test_rows_selected)
{
    static const char history[] = "ward,adults,kids\nQ1,1,2\nQ2,bad,x\nQ3,5,6\nQ4,7,8\n";
    static const struct {
        const char *rows;
        size_t n;
        const char *first, *adults_first;
    } picks[] = {
        {"last 2", 2, "Q3", "5"},
        {"last 1", 1, "Q4", "7"},
        {"[Q4, Q1]", 2, "Q1", "1"}, /* file order, not the list's */
    };
    for (size_t k = 0; k < sizeof picks / sizeof *picks; k++) {
        char yaml[300];
        snprintf(yaml, sizeof yaml, HEAD "data: {file: data.csv, group-column: ward, "
                 "rows: %s}\ncategories: [{label: Adults}, {label: Children, column: kids}]\n",
                 picks[k].rows);
        ug_error err;
        ug_chart *c = NULL;
        ck_assert_msg(load(yaml, history, NULL, &c, &err) == UG_OK, "%s: %s", picks[k].rows,
                      err.msg);
        ck_assert_uint_eq(c->groups.n, picks[k].n);
        ck_assert_str_eq(c->groups.items[0].text, picks[k].first);
        char buf[48];
        ck_assert_str_eq(ug_dec_format(c->cats[0].counts[0], buf), picks[k].adults_first);
        ug_chart_free(c);
    }
    static const struct {
        const char *rows, *msg;
    } bad[] = {
        {"last 5", "asks for more rows than"},
        {"[Q9]", "row 'Q9' is not in"},
        {"first 2", "expects 'last N'"},
        {"last 0", "expects 'last N'"},
        {"[]", "lists no row"},
        {"[Q2]", "plain decimal"}, /* picked, so read and refused */
    };
    for (size_t k = 0; k < sizeof bad / sizeof *bad; k++) {
        char yaml[300];
        snprintf(yaml, sizeof yaml, HEAD "data: {file: data.csv, group-column: ward, "
                 "rows: %s}\ncategories: [{label: Adults}, {label: Children, column: kids}]\n",
                 bad[k].rows);
        ug_error err;
        ug_chart *c = NULL;
        ck_assert_int_ne(load(yaml, history, NULL, &c, &err), UG_OK);
        ck_assert_msg(strstr(err.msg, bad[k].msg), "%s: %s", bad[k].rows, err.msg);
    }
}
END_TEST

/* One field longer than UG_MAX_STRING is refused where it stands. */
START_TEST(test_csv_long_field)
{
    static char csv[UG_MAX_STRING + 64];
    ug_error err;
    ug_chart *c = NULL;
    strcpy(csv, "adults,kids\n1,\"");
    memset(csv + strlen(csv), 'x', UG_MAX_STRING + 1);
    strcat(csv, "\"\n");
    ck_assert_int_eq(load(WIDE1, csv, NULL, &c, &err), UG_ELIMIT);
    ck_assert_uint_eq(err.where.line, 2);
    ck_assert_uint_eq(err.where.column, 2);
}
END_TEST

/* The CSV is held to the same file-size limit as the layout. */
START_TEST(test_csv_size_limit)
{
    ug_limits lim = {.max_file_bytes = 200};
    ug_error err;
    ug_chart *c = NULL;
    char csv[512] = "adults,kids\n1,2\n";
    for (int i = 0; i < 20; i++)
        strcat(csv, "                   \n");
    ck_assert_int_eq(load(WIDE1, csv, &lim, &c, &err), UG_ELIMIT);
    ck_assert_str_eq(err.where.file, layout_path);
    ck_assert_uint_eq(err.where.line, 3);
    ck_assert_ptr_nonnull(strstr(err.msg, "limit of 200 bytes"));
}
END_TEST

static Suite *suite(void)
{
    Suite *s = suite_create("data");
    TCase *t = tcase_create("csv");
    tcase_add_checked_fixture(t, setup, teardown);
    tcase_add_loop_test(t, test_csv_errors, 0, sizeof cases / sizeof cases[0]);
    tcase_add_test(t, test_groups_from_csv);
    tcase_add_test(t, test_default_column_by_slug);
    tcase_add_test(t, test_rows_selected);
    tcase_add_test(t, test_layout_group_order);
    tcase_add_test(t, test_csv_size_limit);
    tcase_add_test(t, test_csv_long_field);
    suite_add_tcase(s, t);
    return s;
}

int main(void)
{
    return check_run(suite());
}
