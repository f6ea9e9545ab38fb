/* Tests for src/biprop.c and the biproportional method in src/alloc.c
** (FORMAT.md §7).
**
** Two worked examples from the published literature, each cited beside it;
** the rest are properties that follow from the definition (every result is
** checked with arithmetic written here, apart from biprop.c): the margins
** hold, a table with one group is plain Sainte-Laguë, counts scaled by a
** common factor give the same icons, and listing the groups in another order
** moves their icons with them. tests/suite_biprop_lp.sh checks the divisors
** of thousands of tables from outside, with GLPK. */
#include <check.h>
#include <stdlib.h>
#include <string.h>

#include "alloc.h"
#include "biprop.h"
#include "check_run.h"

#define MAXS 8

static const ug_mark here = {"check_biprop", 1, 1};

static ug_i128 whole(long n)
{
    return (ug_i128)n * UG_DEC_SCALE;
}

/* biprop_apportion on a table given as whole counts, margins given. */
static ug_status core(size_t m, size_t n, const long *w, const long *rows,
                      const long *cols, biprop_result *r)
{
    ug_i128 cells[MAXS * MAXS];
    for (size_t k = 0; k < m * n; k++)
        cells[k] = whole(w[k]);
    biprop_problem p = {m, n, cells, rows, cols};
    return biprop_apportion(&p, r);
}

static void expect_icons(const biprop_result *r, const long *want, size_t k)
{
    for (size_t i = 0; i < k; i++)
        ck_assert_msg(r->icons[i] == want[i], "cell %zu: %ld icons, expected %ld", i,
                      r->icons[i], want[i]);
}

/* ---- published worked examples ------------------------------------------ */

/* English Wikipedia, "Biproportional apportionment", example section: parties
** A, B, C (rows) in regions I, II, III (columns), 20 seats, Sainte-Laguë;
** region seats 7, 5, 8 and party seats 5, 11, 4 are given by the example.
** Transcribed from the test suite of the R package proporz (F. Poletti,
** github.com/polettif/proporz, tests/testthat/test-biproportional.R, "M1"),
** which cites that page; the matrix there is column-major. */
START_TEST(test_wikipedia_en_example)
{
    const long w[] = {123, 45, 815, 912, 714, 414, 312, 255, 215};
    const long rows[] = {5, 11, 4}, cols[] = {7, 5, 8};
    const long want[] = {1, 0, 4, 4, 4, 3, 2, 1, 1};
    biprop_result r;
    ck_assert_int_eq(core(3, 3, w, rows, cols, &r), UG_OK);
    expect_icons(&r, want, 9);
    ck_assert_uint_eq(r.ties, 0);
    biprop_result_free(&r);
}
END_TEST

/* German Wikipedia, "Doppeltproportionales Zuteilungsverfahren": three lists
** (rows) in districts A, B, C (columns), district seats 4, 5, 6 and list
** seats 4, 5, 6. Transcribed from the same proporz test file ("M2"; its
** "pukelsheim wrapper" test spells the same votes out by list and district). */
START_TEST(test_wikipedia_de_example)
{
    const long w[] = {51, 98, 45, 60, 100, 120, 63, 102, 144};
    const long rows[] = {4, 5, 6}, cols[] = {4, 5, 6};
    const long want[] = {1, 2, 1, 1, 2, 2, 2, 1, 3};
    biprop_result r;
    ck_assert_int_eq(core(3, 3, w, rows, cols, &r), UG_OK);
    expect_icons(&r, want, 9);
    biprop_result_free(&r);
}
END_TEST

/* ---- the method through alloc.c -------------------------------------- */

typedef struct {
    alloc_share shares[MAXS * MAXS];
    ug_dec group_totals[MAXS], group_div[MAXS], cat_div[MAXS];
    long group_icons[MAXS], cat_icons[MAXS];
    alloc_biprop_out out;
} biprop_run;

static ug_status run_method(const ug_dec *counts, size_t ng, size_t nc, ug_dec value,
                            biprop_run *b, ug_error *err)
{
    alloc_rule rule = {.method = UG_METHOD_BIPROPORTIONAL, .value = value,
                       .max_icons = UG_DEFAULT_MAX_ICONS};
    memset(b, 0, sizeof *b);
    b->out = (alloc_biprop_out){b->shares, b->group_totals, b->group_icons,
                                b->cat_icons, b->group_div, b->cat_div, 0, 0, false, false};
    alloc_biprop_in in = {counts, ng, nc, &rule, NULL, NULL, &b->out};
    return alloc_biproportional(&in, here, err);
}

static ug_dec dec_of(long n)
{
    return (ug_dec){whole(n)};
}

/* FORMAT.md §3 states the tie rule; §7 applies it cell by cell. Four equal
** counts of 1.5 at one per icon: N = 6, each group and category 3, and
** either diagonal may get the 2s; the first group's first category wins. */
START_TEST(test_tie_goes_to_first)
{
    ug_dec c[4];
    for (int k = 0; k < 4; k++)
        c[k] = (ug_dec){15 * UG_DEC_SCALE / 10};
    biprop_run b;
    ug_error err = {0};
    ck_assert_int_eq(run_method(c, 2, 2, dec_of(1), &b, &err), UG_OK);
    long want[] = {2, 1, 1, 2};
    for (int k = 0; k < 4; k++)
        ck_assert_int_eq(b.shares[k].icons, want[k]);
    ck_assert_uint_eq(b.out.ties, 1);
}
END_TEST

/* The larger count takes a tied icon before the cell listed first. */
START_TEST(test_tie_goes_to_larger)
{
    /* rows 3+1 and 1+1, columns 3+1 and 1+1 at V = 2: N = 3, groups and
    ** categories get 2 and 1. With every d_i e_j = 2 both 2 0 / 0 1 and
    ** 1 1 / 1 0 round right (q = 1.5 and 0.5 sit on ties): the cell of 3
    ** takes the icon. */
    ug_dec c[4] = {dec_of(3), dec_of(1), dec_of(1), dec_of(1)};
    biprop_run b;
    ug_error err = {0};
    ck_assert_int_eq(run_method(c, 2, 2, dec_of(2), &b, &err), UG_OK);
    ck_assert_int_eq(b.out.total_icons, 3);
    ck_assert_int_eq(b.group_icons[0], 2);
    ck_assert_int_eq(b.cat_icons[0], 2);
    ck_assert_int_eq(b.shares[0].icons, 2);
    ck_assert_int_eq(b.shares[3].icons, 1);
}
END_TEST

/* layouts/wards.csv (demo data) at 10 each, worked by hand in
** tests/data/expected/CHECKED.md: N = 46; the age groups' totals 252 and
** 84 reach 25.5 and 8.5 at the same divisor (252 / 25.5 = 84 / 8.5), so the
** last icon is a tie, and it goes to the larger count: 26, 12, 8. */
START_TEST(test_margin_tie_is_reported)
{
    ug_dec c[9] = {dec_of(124), dec_of(64), dec_of(38), dec_of(85), dec_of(51),
                   dec_of(27), dec_of(43), dec_of(8), dec_of(19)};
    biprop_run b;
    ug_error err = {0};
    ck_assert_int_eq(run_method(c, 3, 3, dec_of(10), &b, &err), UG_OK);
    const long cats[] = {26, 12, 8}, groups[] = {23, 16, 7};
    const long want[] = {13, 6, 4, 9, 5, 2, 4, 1, 2};
    for (int k = 0; k < 3; k++) {
        ck_assert_int_eq(b.cat_icons[k], cats[k]);
        ck_assert_int_eq(b.group_icons[k], groups[k]);
    }
    for (int k = 0; k < 9; k++)
        ck_assert_int_eq(b.shares[k].icons, want[k]);
    ck_assert(b.out.cat_tie);
    ck_assert(!b.out.group_tie);
    ck_assert_uint_eq(b.out.ties, 0);
}
END_TEST

START_TEST(test_empty_group_is_an_error)
{
    ug_dec c[4] = {dec_of(5), dec_of(3), dec_of(0), dec_of(0)};
    biprop_run b;
    ug_error err = {0};
    ck_assert_int_eq(run_method(c, 2, 2, dec_of(1), &b, &err), UG_EDATA);
    ck_assert_str_eq(err.msg, "'method: biproportional' needs counts in every group, "
                              "but every count of group 'number 2' is 0 or not shown; "
                              "leave it out or use another method");
}
END_TEST

/* 3 and 3 counts in opposite corners at 10 a icon: N = 1, the tie rule gives
** it to the first group and the first category, but the first group counts
** only in the second category, whose share is 0: no apportionment exists. */
START_TEST(test_infeasible_is_an_error)
{
    ug_dec c[4] = {dec_of(0), dec_of(3), dec_of(3), dec_of(0)};
    biprop_run b;
    ug_error err = {0};
    ck_assert_int_eq(run_method(c, 2, 2, dec_of(10), &b, &err), UG_EDATA);
    ck_assert_str_eq(err.msg, "no apportionment gives every group and every category "
                              "its own share: group 'number 1' should get 1 icon, but "
                              "the categories it has counts in have too few; use "
                              "another method");
}
END_TEST

/* A table too big to settle within BIPROP_STEPS is refused, not left to run:
** 1000 x 1000 equal counts, one icon per row and per column, is a tie
** everywhere (every cell's quotient can sit at 1/2). */
START_TEST(test_step_limit)
{
    size_t n = 1000;
    ug_i128 *w = calloc(n * n, sizeof *w);
    long *ones = calloc(n, sizeof *ones);
    ck_assert(w && ones);
    for (size_t k = 0; k < n * n; k++)
        w[k] = whole(1);
    for (size_t k = 0; k < n; k++)
        ones[k] = 1;
    biprop_problem p = {n, n, w, ones, ones};
    biprop_result r;
    ck_assert_int_eq(biprop_apportion(&p, &r), UG_ELIMIT);
    ck_assert_uint_gt(r.steps, BIPROP_STEPS);
    biprop_result_free(&r);
    free(w);
    free(ones);
}
END_TEST

START_TEST(test_out_of_memory)
{
    ug_dec c[6] = {dec_of(5), dec_of(3), dec_of(7), dec_of(2), dec_of(9), dec_of(4)};
    biprop_run b;
    for (long k = 0;; k++) {
        ug_error err = {0};
        ug_mem_fail_after(k);
        ug_status st = run_method(c, 2, 3, dec_of(1), &b, &err);
        ug_mem_fail_after(-1);
        if (st == UG_OK)
            break;
        ck_assert_int_eq(st, UG_ENOMEM);
        ck_assert_str_eq(err.msg, "out of memory");
    }
}
END_TEST

/* ---- properties on random tables -------------------------------------- */

static void random_table(unsigned *seed, size_t *ng, size_t *nc, ug_dec *c)
{
    *ng = 1 + (size_t)(rand_r(seed) % 5);
    *nc = 1 + (size_t)(rand_r(seed) % 5);
    for (size_t k = 0; k < *ng * *nc; k++)
        c[k] = dec_of(rand_r(seed) % 7 == 0 ? 0 : 1 + rand_r(seed) % 300);
    for (size_t g = 0; g < *ng; g++)
        c[g * *nc].v += UG_DEC_SCALE; /* no empty group */
    for (size_t i = 0; i < *nc; i++)
        c[i].v += UG_DEC_SCALE;      /* no empty category */
}

static void check_margins(const biprop_run *b, size_t ng, size_t nc)
{
    long n = 0;
    for (size_t g = 0; g < ng; g++) {
        long sum = 0;
        for (size_t i = 0; i < nc; i++)
            sum += b->shares[g * nc + i].icons;
        ck_assert_int_eq(sum, b->group_icons[g]);
        n += sum;
    }
    for (size_t i = 0; i < nc; i++) {
        long sum = 0;
        for (size_t g = 0; g < ng; g++)
            sum += b->shares[g * nc + i].icons;
        ck_assert_int_eq(sum, b->cat_icons[i]);
    }
    ck_assert_int_eq(n, b->out.total_icons);
}

/* One group: the cells are the category shares, and those are exactly what
** alloc_apportion's Sainte-Laguë gives the same counts. */
START_TEST(test_one_group_is_sainte_lague)
{
    unsigned seed = 20;
    for (int t = 0; t < 2000; t++) {
        size_t ng, nc;
        ug_dec c[MAXS * MAXS];
        random_table(&seed, &ng, &nc, c);
        ug_dec value = dec_of(1 + rand_r(&seed) % 40);
        biprop_run b;
        ug_error err = {0};
        ck_assert_int_eq(run_method(c, 1, nc, value, &b, &err), UG_OK);
        alloc_share plain[MAXS];
        alloc_rule sl = {.method = UG_METHOD_SAINTE_LAGUE, .value = value,
                         .max_icons = UG_DEFAULT_MAX_ICONS};
        long n;
        ck_assert_int_eq(alloc_apportion(c, nc, &sl, plain, &n, here, &err), UG_OK);
        ck_assert_int_eq(n, b.out.total_icons);
        for (size_t i = 0; i < nc; i++)
            ck_assert_int_eq(b.shares[i].icons, plain[i].icons);
    }
}
END_TEST

/* Margins hold; the icons depend on proportions only (counts and value times
** 7 change nothing); reversing the groups reverses their rows of icons
** when no tie was decided (a tie rule that prefers the first group may
** rightly choose otherwise). */
START_TEST(test_random_properties)
{
    unsigned seed = 7 + (unsigned)_i;
    for (int t = 0; t < 1500; t++) {
        size_t ng, nc;
        ug_dec c[MAXS * MAXS], scaled[MAXS * MAXS], rev[MAXS * MAXS];
        random_table(&seed, &ng, &nc, c);
        ug_dec value = dec_of(1 + rand_r(&seed) % 30);
        biprop_run b, s, r;
        ug_error err = {0};
        ug_status st = run_method(c, ng, nc, value, &b, &err);
        if (st == UG_EDATA) /* sparse tables may have no apportionment */
            continue;
        ck_assert_int_eq(st, UG_OK);
        check_margins(&b, ng, nc);
        for (size_t k = 0; k < ng * nc; k++) {
            scaled[k].v = c[k].v * 7;
            rev[k] = c[(ng - 1 - k / nc) * nc + k % nc];
        }
        ck_assert_int_eq(run_method(scaled, ng, nc, (ug_dec){value.v * 7}, &s, &err),
                         UG_OK);
        for (size_t k = 0; k < ng * nc; k++)
            ck_assert_int_eq(s.shares[k].icons, b.shares[k].icons);
        ck_assert_int_eq(run_method(rev, ng, nc, value, &r, &err), UG_OK);
        bool same_margins = true; /* a tie in the groups' shares may not be */
        for (size_t g = 0; g < ng; g++)
            same_margins = same_margins && r.group_icons[g] == b.group_icons[ng - 1 - g];
        if (b.out.ties || r.out.ties || !same_margins)
            continue;
        for (size_t k = 0; k < ng * nc; k++)
            ck_assert_int_eq(r.shares[k].icons,
                             b.shares[(ng - 1 - k / nc) * nc + k % nc].icons);
    }
}
END_TEST

static Suite *biprop_suite(void)
{
    Suite *s = suite_create("biprop");
    TCase *tc = tcase_create("examples");
    tcase_add_test(tc, test_wikipedia_en_example);
    tcase_add_test(tc, test_wikipedia_de_example);
    tcase_add_test(tc, test_tie_goes_to_first);
    tcase_add_test(tc, test_tie_goes_to_larger);
    tcase_add_test(tc, test_margin_tie_is_reported);
    tcase_add_test(tc, test_empty_group_is_an_error);
    tcase_add_test(tc, test_infeasible_is_an_error);
    tcase_add_test(tc, test_out_of_memory);
    suite_add_tcase(s, tc);
    TCase *tp = tcase_create("properties");
    tcase_set_timeout(tp, 60);
    tcase_add_test(tp, test_one_group_is_sainte_lague);
    tcase_add_test(tp, test_step_limit);
    tcase_add_loop_test(tp, test_random_properties, 0, 2);
    suite_add_tcase(s, tp);
    return s;
}

int main(void)
{
    return check_run(biprop_suite());
}
