/*
** Resource caps (README "Guarantees and limits"): each holds exactly at its
** boundary — the last allowed size loads, one more is refused with UG_ELIMIT
** and a message naming the place and the way to raise it — and the caller's
** ug_limits move the boundary. Also the fuzz regressions in fuzz/regress/:
** every file there must load (or fail with a message) and, when it draws,
** draw without a crash. The boundaries are the project's own choices
** (common practice, no source).
*/
#include <check.h>
#include <dirent.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#include "pipeline_run.h"
#include "check_run.h"

#define HEAD "title: t\nsource: s\nunit-label: u\nform: rows\n"

static ug_status load(const char *text, const ug_limits *lim, ug_error *err,
                      ug_chart **out)
{
    memset(err, 0, sizeof *err);
    return ug_chart_load_string(text, strlen(text), "data/good/limits.yaml", lim, out,
                                err);
}

/* A page of n text panels. */
static char *page_of(int n)
{
    ug_buf b;
    ug_buf_init(&b);
    ug_buf_puts(&b, "page: {size: A4}\ntitle: t\npanels:\n");
    for (int i = 0; i < n; i++)
        ug_buf_printf(&b, "  - text: panel %d\n", i);
    char *s = NULL;
    ck_assert_int_eq(ug_buf_take(&b, &s, NULL, NULL), UG_OK);
    return s;
}

START_TEST(test_page_panels)
{
    static const struct {
        int n;
        size_t limit; /* 0: the default of 48 */
        ug_status want;
        const char *says;
    } rows[] = {
        {1, 0, UG_OK, NULL},           {48, 0, UG_OK, NULL},
        {49, 0, UG_ELIMIT, "49 panels, more than the limit of 48"},
        {1000, 0, UG_ELIMIT, "limit of 48"},
        {49, 60, UG_OK, NULL},         {60, 60, UG_OK, NULL},
        {61, 60, UG_ELIMIT, "limit of 60"}, {2, 1, UG_ELIMIT, "limit of 1 "},
    };
    for (size_t i = 0; i < sizeof rows / sizeof rows[0]; i++) {
        char *text = page_of(rows[i].n);
        ug_limits limits = {.max_panels = rows[i].limit};
        ug_error err = {0};
        ug_page *p = NULL;
        ug_status st = ug_page_load_string(text, strlen(text), "page.yaml", &limits, &p,
                                           &err);
        ck_assert_msg(st == rows[i].want, "%d panels: status %d", rows[i].n, st);
        if (st) {
            ck_assert_ptr_null(p);
            ck_assert_ptr_nonnull(strstr(err.msg, rows[i].says));
            ck_assert_ptr_nonnull(strstr(err.msg, "--max-panels"));
            ck_assert_uint_eq(err.where.line, 4); /* the list's first item */
        }
        ug_page_free(p);
        ug_free(text);
    }
}
END_TEST

/* A limit above its ceiling is refused, not quietly lowered to it. */
START_TEST(test_limits_above_ceiling)
{
    const char *chart = HEAD "icon-value: 1\ncategories: [{label: A, count: 3}]\n";
    static const struct {
        ug_limits limits;
        ug_status want;
    } rows[] = {
        {{.max_icons = UG_CEILING_ICONS}, UG_OK},
        {{.max_icons = UG_CEILING_ICONS + 1}, UG_ELIMIT},
        {{.max_panels = UG_CEILING_PANELS}, UG_OK},
        {{.max_panels = UG_CEILING_PANELS + 1}, UG_ELIMIT},
    };
    for (size_t i = 0; i < sizeof rows / sizeof rows[0]; i++) {
        ug_error err = {0};
        ug_chart *c = NULL;
        ug_status st = ug_chart_load_string(chart, strlen(chart), "c.yaml", &rows[i].limits,
                                            &c, &err);
        ck_assert_msg(st == rows[i].want, "row %zu: status %d", i, st);
        if (st)
            ck_assert_ptr_nonnull(strstr(err.msg, "above the ceiling"));
        ug_chart_free(c);
        char *page = page_of(2);
        ug_page *p = NULL;
        st = ug_page_load_string(page, strlen(page), "p.yaml", &rows[i].limits, &p, &err);
        ck_assert_msg(st == rows[i].want, "page row %zu: status %d", i, st);
        ug_page_free(p);
        ug_free(page);
    }
}
END_TEST

/* g groups of one category, each counting `each` at icon-value 1. */
static char *groups_of(int g, long each)
{
    ug_buf b;
    ug_buf_init(&b);
    ug_buf_puts(&b, HEAD "icon-value: 1\ngroups: [");
    for (int i = 0; i < g; i++)
        ug_buf_printf(&b, "%sG%d", i ? ", " : "", i);
    ug_buf_puts(&b, "]\ncategories:\n  - {label: A, counts: [");
    for (int i = 0; i < g; i++)
        ug_buf_printf(&b, "%s%ld", i ? ", " : "", each);
    ug_buf_puts(&b, "]}\n");
    char *s = NULL;
    ck_assert_int_eq(ug_buf_take(&b, &s, NULL, NULL), UG_OK);
    return s;
}

/* The icon cap counts the whole chart: groups each under it add up. */
START_TEST(test_icons_across_groups)
{
    static const struct {
        int groups;
        long each;
        size_t cap; /* 0 = the default, 100 000 */
        ug_status want;
        unsigned col; /* where a refusal points: the group that crosses */
    } rows[] = {
        /* "groups: [G0, G1, ...": group i starts at column 10 + 4i */
        {4, 25000, 0, UG_OK, 0},         {5, 25000, 0, UG_ELIMIT, 26},
        {2, 60000, 0, UG_ELIMIT, 14},    {5, 25000, 125000, UG_OK, 0},
        {3, 10, 29, UG_ELIMIT, 18},      {3, 10, 30, UG_OK, 0},
    };
    for (size_t i = 0; i < sizeof rows / sizeof rows[0]; i++) {
        char *text = groups_of(rows[i].groups, rows[i].each);
        ug_limits lim = {.max_icons = rows[i].cap};
        ug_error err;
        ug_chart *c = NULL;
        ug_allocation *a = NULL;
        ck_assert_int_eq(load(text, &lim, &err, &c), UG_OK);
        ug_status st = ug_chart_allocate(c, &a, &err);
        ck_assert_msg(st == rows[i].want, "row %zu: status %d (%s)", i, st, err.msg);
        if (st) {
            ck_assert_ptr_nonnull(strstr(err.msg, "--max-icons"));
            ck_assert_uint_eq(err.where.line, 6);
            ck_assert_uint_eq(err.where.column, rows[i].col);
        }
        ug_allocation_free(a);
        ug_chart_free(c);
        ug_free(text);
    }
}
END_TEST

/* --max-input-bytes reaches the CSV file as well as the layout: a CSV of 40
** groups (about 500 bytes) against a layout of about 200. */
START_TEST(test_input_bytes_reach_csv)
{
    char dir[] = "/tmp/uglimitsXXXXXX", csv[64], name[64];
    ck_assert_ptr_nonnull(mkdtemp(dir));
    snprintf(csv, sizeof csv, "%s/counts.csv", dir);
    snprintf(name, sizeof name, "%s/chart.yaml", dir);
    FILE *f = fopen(csv, "w");
    ck_assert_ptr_nonnull(f);
    fputs("g,a\n", f);
    for (int i = 0; i < 40; i++)
        fprintf(f, "group %d,%d\n", i, i + 1);
    long size = ftell(f);
    fclose(f);
    const char *text = HEAD "icon-value: 1\ndata: {file: counts.csv, group-column: g}\n"
                            "categories:\n  - {label: A, column: a}\n";
    ck_assert_int_gt(size, (long)strlen(text));
    static const struct {
        long delta; /* the limit is the CSV's size plus this */
        ug_status want;
    } rows[] = {{0, UG_OK}, {-1, UG_ELIMIT}, {1000, UG_OK}};
    for (size_t i = 0; i < sizeof rows / sizeof rows[0]; i++) {
        ug_limits lim = {.max_file_bytes = (size_t)(size + rows[i].delta)};
        ug_error err = {0};
        ug_chart *c = NULL;
        ug_status st = ug_chart_load_string(text, strlen(text), name, &lim, &c, &err);
        ck_assert_msg(st == rows[i].want, "limit %ld: status %d (%s)",
                      size + rows[i].delta, st, err.msg);
        if (st) {
            ck_assert_ptr_nonnull(strstr(err.msg, "--max-input-bytes"));
            ck_assert_uint_eq(err.where.line, 6); /* the data: file: value */
        }
        ug_chart_free(c);
    }
    unlink(csv);
    rmdir(dir);
}
END_TEST

/* A FIFO as the CSV file is refused at once, not waited on. */
START_TEST(test_fifo_refused)
{
    char dir[] = "/tmp/uglimitsXXXXXX";
    ck_assert_ptr_nonnull(mkdtemp(dir));
    char fifo[64], name[64];
    snprintf(fifo, sizeof fifo, "%s/counts.csv", dir);
    snprintf(name, sizeof name, "%s/chart.yaml", dir);
    ck_assert_int_eq(mkfifo(fifo, 0600), 0);
    const char *text = HEAD "icon-value: 1\ndata: {file: counts.csv, group-column: g}\n"
                            "categories:\n  - {label: A, column: a}\n";
    ug_error err = {0};
    ug_chart *c = NULL;
    alarm(5); /* a hang fails the test instead of the suite's time */
    ug_status st = ug_chart_load_string(text, strlen(text), name, NULL, &c, &err);
    alarm(0);
    unlink(fifo);
    rmdir(dir);
    ck_assert_int_eq(st, UG_EIO);
    ck_assert_ptr_nonnull(strstr(err.msg, "not a regular file"));
}
END_TEST

/* Every input a fuzzer once crashed on, replayed through the whole pipeline. */
START_TEST(test_fuzz_regressions)
{
    DIR *d = opendir("fuzz/regress");
    ck_assert_ptr_nonnull(d);
    int n = 0;
    for (struct dirent *e; (e = readdir(d)) != NULL;) {
        if (e->d_name[0] == '.')
            continue;
        char path[512];
        snprintf(path, sizeof path, "fuzz/regress/%s", e->d_name);
        FILE *f = fopen(path, "rb");
        ck_assert_ptr_nonnull(f);
        char buf[65536];
        size_t len = fread(buf, 1, sizeof buf, f);
        fclose(f);
        ug_error err;
        ug_limits lim = {.max_icons = 5000};
        ug_status st = pipeline_run(buf, len, "data/good/fuzz.yaml", &lim, NULL, &err);
        ck_assert_msg(!st || err.msg[0], "%s: a failure without a message", path);
        n++;
    }
    closedir(d);
    fprintf(stderr, "fuzz regressions: %d inputs replayed\n", n);
}
END_TEST

int main(void)
{
    Suite *s = suite_create("limits");
    TCase *tc = tcase_create("core");
    tcase_set_timeout(tc, 60);
    tcase_add_test(tc, test_page_panels);
    tcase_add_test(tc, test_limits_above_ceiling);
    tcase_add_test(tc, test_icons_across_groups);
    tcase_add_test(tc, test_input_bytes_reach_csv);
    tcase_add_test(tc, test_fifo_refused);
    tcase_add_test(tc, test_fuzz_regressions);
    suite_add_tcase(s, tc);
    return check_run(s);
}
