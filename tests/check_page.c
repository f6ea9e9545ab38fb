/* Tests for src/page.c: paper sizes and the panel grid of a handout.
** Paper sizes are checked against ISO 216 (A-series, in mm) and the US sizes
** as stated in points (Letter 612 x 792 pt, Legal 612 x 1008 pt; 1 pt =
** 1/72 in, ISO 32000-1 §8.3.2.1; 1 in = 25.4 mm = 96 px, W3C CSS Values). */
#define _POSIX_C_SOURCE 200809L
#include <check.h>
#include <stdlib.h>

#include "page.h"

typedef struct {
    const char *name;
    double w, h;       /* as published */
    double per_inch;   /* the unit: 25.4 for mm, 72 for pt */
} paper_case;

static const paper_case paper_cases[] = {
    {"A5", 148, 210, 25.4},  /* ISO 216 */
    {"A4", 210, 297, 25.4},  /* ISO 216 */
    {"A3", 297, 420, 25.4},  /* ISO 216 */
    {"a4", 210, 297, 25.4},
    {"letter", 612, 792, 72},  /* US Letter 8.5 x 11 in */
    {"Legal", 612, 1008, 72},  /* US Legal 8.5 x 14 in */
};

START_TEST(test_paper_sizes)
{
    const paper_case *c = &paper_cases[_i];
    double w, h;
    ck_assert(page_paper(c->name, &w, &h));
    ck_assert_double_eq_tol(w / 25.4 * c->per_inch, c->w, 1e-9);
    ck_assert_double_eq_tol(h / 25.4 * c->per_inch, c->h, 1e-9);
}
END_TEST

START_TEST(test_unknown_paper)
{
    double w = -1, h = -1;
    ck_assert(!page_paper("B5", &w, &h));
    ck_assert(!page_paper("", &w, &h));
    ck_assert(!page_paper("A44", &w, &h));
    ck_assert_double_eq(w, -1);
}
END_TEST

/* A4 at 96 px per inch: 210 mm = 793.7 px (CSS: 1 in = 25.4 mm = 96 px). */
START_TEST(test_mm_to_px)
{
    ck_assert_double_eq_tol(210 * PAGE_PX_PER_MM, 793.700787, 1e-6);
    ck_assert_double_eq_tol(25.4 * PAGE_PX_PER_MM, 96, 1e-12);
}
END_TEST

static page_grid grid(long columns, double bottom)
{
    page_grid g = {1000, 1400, 50, 20, columns, 100, bottom};
    return g;
}

START_TEST(test_span_widths_fill_the_content_width)
{
    for (long cols = 1; cols <= 6; cols++) {
        page_grid g = grid(cols, 1350);
        ck_assert_double_eq_tol(page_span_width(&g, cols), 900, 1e-9);
        double sum = 0;
        for (long k = 0; k < cols; k++)
            sum += page_span_width(&g, 1);
        ck_assert_double_eq_tol(sum + (double)(cols - 1) * 20, 900, 1e-9);
    }
}
END_TEST

START_TEST(test_place_rows_and_spans)
{
    page_grid g = grid(2, 1350);
    long spans[] = {1, 1, 2, 1, 2};
    double heights[] = {100, 150, 80, 60, 10};
    page_box b[5];
    double over;
    ck_assert_uint_eq(page_place(&g, spans, heights, 5, b, &over), 5);
    ck_assert_double_eq(over, 0);
    /* columns are 440 px: (1000 - 2 * 50 - 20) / 2 */
    double want[5][4] = {{50, 100, 440, 100},
                         {510, 100, 440, 150},
                         {50, 270, 900, 80},  /* 100 + 150 (tallest) + 20 */
                         {50, 370, 440, 60},
                         {50, 450, 900, 10}}; /* a span 2 cannot share a row */
    for (int i = 0; i < 5; i++) {
        ck_assert_double_eq_tol(b[i].x, want[i][0], 1e-9);
        ck_assert_double_eq_tol(b[i].y, want[i][1], 1e-9);
        ck_assert_double_eq_tol(b[i].w, want[i][2], 1e-9);
        ck_assert_double_eq_tol(b[i].h, want[i][3], 1e-9);
    }
}
END_TEST

START_TEST(test_place_reports_overflow)
{
    page_grid g = grid(2, 400);
    long spans[] = {1, 1, 2, 1, 1};
    double heights[] = {100, 150, 80, 60, 90};
    page_box b[5];
    double over;
    /* panel 3 (0-based) starts at 370 and ends at 430; panel 4 at 460 */
    ck_assert_uint_eq(page_place(&g, spans, heights, 5, b, &over), 3);
    ck_assert_double_eq_tol(over, 60, 1e-9);
    /* exactly touching the bottom fits */
    double exact[] = {100, 150, 80, 30, 30};
    ck_assert_uint_eq(page_place(&g, spans, exact, 5, b, &over), 5);
}
END_TEST

static Suite *page_suite(void)
{
    Suite *s = suite_create("page");
    TCase *tc = tcase_create("geometry");
    tcase_add_loop_test(tc, test_paper_sizes, 0,
                        (int)(sizeof paper_cases / sizeof paper_cases[0]));
    tcase_add_test(tc, test_unknown_paper);
    tcase_add_test(tc, test_mm_to_px);
    tcase_add_test(tc, test_span_widths_fill_the_content_width);
    tcase_add_test(tc, test_place_rows_and_spans);
    tcase_add_test(tc, test_place_reports_overflow);
    suite_add_tcase(s, tc);
    return s;
}

int main(void)
{
    SRunner *sr = srunner_create(page_suite());
    srunner_run_all(sr, CK_NORMAL);
    int failed = srunner_ntests_failed(sr);
    srunner_free(sr);
    return failed ? EXIT_FAILURE : EXIT_SUCCESS;
}
