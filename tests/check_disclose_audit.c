/* Tests for src/disclose_audit.c: the attacker's linear programs. Hand cases
** whose intervals follow from a line of reasoning (each worked out beside it),
** a worked example from the disclosure-control handbook, and random tables
** checked against GLPK's glpsol (an independent solver, run on a MathProg
** model this file writes itself) and against the properties every interval
** must have. */
#define _POSIX_C_SOURCE 200809L
#include <check.h>
#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "check_run.h"
#include "disclose.h"
#include "grid_fixture.h"

/* The audit of a table with exactly one small cell, which must succeed. */
static disclose_interval audit_one(const tgrid *t)
{
    disclose_interval out[64];
    size_t n = 99;
    ug_error err;
    memset(&err, 0, sizeof err);
    ug_status st = disclose_audit(&t->g, out, &n, &err);
    ck_assert_msg(st == UG_OK, "audit: %s", err.msg);
    ck_assert_uint_eq(n, 1);
    return out[0];
}

#define ck_interval(iv, lo, hi)                                                      \
    do {                                                                             \
        ck_assert_double_eq_tol((iv).min, (lo), 1e-6);                               \
        ck_assert_double_eq_tol((iv).max, (hi), 1e-6);                               \
    } while (0)

/* ---- hand cases ------------------------------------------------------------ */

/* A small cell hidden alone: its row total minus the row's exact cell gives it
** away, 23 - 20 = 3, whatever its placeholder says. */
START_TEST(test_lone_small_collapses)
{
    static const char *const cells[] = {"S3", "E20", "E40", "E50"};
    tgrid *t = tg_parse(2, 2, true, cells);
    disclose_interval iv = audit_one(t);
    ck_assert_uint_eq(iv.cell, 0);
    ck_interval(iv, 3, 3);
    tg_free(t);
}
END_TEST

/* The four-cell cycle p a / b d in the corner of a 3 x 3 table, the rest
** exact. With p = t the margins force a = 23 - t, b = 33 - t, d = 37 + t, and
** complements must stay >= 10: t <= 13, t <= 23, t >= -27. None of these cuts
** into [1, 9], so the interval is the whole placeholder. */
static const char *const cycle[] = {"S3",  "C20", "E50",
                                    "C30", "C40", "E60",
                                    "E70", "E80", "E90"};

START_TEST(test_cycle_covers)
{
    tgrid *t = tg_parse(3, 3, true, cycle);
    disclose_interval iv = audit_one(t);
    ck_interval(iv, 1, 9);
    ck_assert(disclose_interval_covers(&t->g, &iv));
    tg_free(t);
}
END_TEST

/* The same cycle with a = 12, just above the floor: row 0 gives p + a = 15, so
** a = 15 - t >= 10 caps p at 5. The other cells still allow [1, 9]: [1, 5]. */
START_TEST(test_cycle_narrowed_above)
{
    tgrid *t = tg_parse(3, 3, true, cycle);
    tg_cell(t, 1, "C12");
    disclose_interval iv = audit_one(t);
    ck_interval(iv, 1, 5);
    ck_assert(!disclose_interval_covers(&t->g, &iv));
    tg_free(t);
}
END_TEST

/* The cycle with d = 11 instead: column 1 gives a + d = 31 and a = 23 - t, so
** d = 8 + t >= 10 forces p >= 2: [2, 9]. */
START_TEST(test_cycle_narrowed_below)
{
    tgrid *t = tg_parse(3, 3, true, cycle);
    tg_cell(t, 4, "C11");
    disclose_interval iv = audit_one(t);
    ck_interval(iv, 2, 9);
    ck_assert(!disclose_interval_covers(&t->g, &iv));
    tg_free(t);
}
END_TEST

/* Without margins there are no equations: the lone small cell that margins
** give away (test_lone_small_collapses) keeps its whole placeholder. */
START_TEST(test_no_margins_bounds)
{
    static const char *const cells[] = {"S3", "E20", "E40", "E50"};
    tgrid *t = tg_parse(2, 2, false, cells);
    ck_interval(audit_one(t), 1, 9);
    tg_free(t);
}
END_TEST

/* One row: the only margin is the grand total, so p + q = 28 and q >= 10
** leaves p <= 18, all of [1, 9]. Column equations would pin every cell to
** itself (a column of one cell is its own total) and give [3, 3]. */
START_TEST(test_one_row_grand_total_only)
{
    static const char *const cells[] = {"S3", "C25", "E40", "E7"};
    tgrid *t = tg_parse(1, 4, true, cells);
    ck_interval(audit_one(t), 1, 9);
    tg_cell(t, 1, "C12"); /* p + q = 15, q >= 10: p <= 5 */
    ck_interval(audit_one(t), 1, 5);
    tg_free(t);
}
END_TEST

/* A rounded neighbour: total 71, so p + r = 21 with r published 20 within
** 2.5, r in [17.5, 22.5]; p = 21 - r in [-1.5, 3.5], cut to [1, 3.5]. */
START_TEST(test_rounded_slack)
{
    static const char *const cells[] = {"S3", "R20/18", "E50"};
    tgrid *t = tg_parse(1, 3, true, cells);
    t->g.slack = dec("2.5");
    ck_interval(audit_one(t), 1, 3.5);
    tg_free(t);
}
END_TEST

/* A rounded zero cannot go below 0: r in [0, 2.5], not [-2.5, 2.5]. With
** p + r = 5 that gives p in [2.5, 5]; an unclamped r would allow 7.5. */
START_TEST(test_rounded_floor_zero)
{
    static const char *const cells[] = {"S3", "R0/2", "E50"};
    tgrid *t = tg_parse(1, 3, true, cells);
    t->g.slack = dec("2.5");
    ck_interval(audit_one(t), 2.5, 5);
    tg_free(t);
}
END_TEST

/* Requested and withheld cells are only known to be >= 0. Requested q = 4:
** p + q = 7, so p <= 7. Withheld w counts 0 in the total: p + w = 3, p <= 3. */
START_TEST(test_requested_and_withheld)
{
    static const char *const req[] = {"S3", "Q4", "E10"};
    static const char *const wh[] = {"S3", "W", "E10"};
    tgrid *t = tg_parse(1, 3, true, req);
    ck_interval(audit_one(t), 1, 7);
    tg_free(t);
    t = tg_parse(1, 3, true, wh);
    ck_interval(audit_one(t), 1, 3);
    tg_free(t);
}
END_TEST

/* Worked example from the literature: Hundepool et al., Handbook on
** Statistical Disclosure Control, 2nd ed. (2024), §4.2, "Secondary tabular data
** protection methods", Example 3 (after Geurts 1992, Table 10, p. 20),
** github.com/sdcTools/HandbookSDC, chapters/04/_04-magnitude-tabular-data-02-
** Disclosure-Control-Concepts-for-Magnitude-Tabular-Data.qmd. Its table:
**
**              1     2   Total
**      1     X11   X12     7
**      2     X21   X22     3
**      3       3     3     6
**      Total   9     7    16
**
** with all X >= 0, and the handbook's answer X11 in [3, 6]. The handbook
** prints only the margins; the hidden values here (4, 3, 2, 1) are ours, any
** values with those margins do. X11 is a small cell whose placeholder [0, 9]
** does not bind; the other three are requested cells (>= 0, as in the book). */
START_TEST(test_handbook_example_3)
{
    static const char *const cells[] = {"S4", "Q3", "Q2", "Q1", "E3", "E3"};
    tgrid *t = tg_parse(3, 2, true, cells);
    t->g.lo = dec("0");
    ck_interval(audit_one(t), 3, 6);
    tg_free(t);
}
END_TEST

/* Two blocks, three small cells: one entry per small cell, in row-major
** order. The first block is cell 0 alone in its row and column, so 2 exactly.
** The second is the cycle s1 s2 / c1 c2 in the lower right: row 1 gives
** s1 + s2 = 7, and s2 = 7 - s1 must stay in [1, 9], so s1 (and s2 likewise)
** is in [1, 6]; the complements (c1 = 24 - s1, c2 = 26 + s1) do not bind. */
START_TEST(test_order_and_blocks)
{
    static const char *const cells[] = {"S2",  "E30", "E5",  "E6",
                                        "E40", "E50", "S4",  "S3",
                                        "E10", "E11", "C20", "C30"};
    tgrid *t = tg_parse(3, 4, true, cells);
    disclose_interval out[12];
    size_t n = 0;
    ug_error err;
    memset(&err, 0, sizeof err);
    ck_assert_int_eq(disclose_audit(&t->g, out, &n, &err), UG_OK);
    ck_assert_uint_eq(n, 3);
    ck_assert_uint_eq(out[0].cell, 0);
    ck_assert_uint_eq(out[1].cell, 6);
    ck_assert_uint_eq(out[2].cell, 7);
    ck_interval(out[0], 2, 2);
    ck_interval(out[1], 1, 6);
    ck_interval(out[2], 1, 6);
    tg_free(t);
}
END_TEST

/* No small cell, nothing to write. */
START_TEST(test_no_small_cells)
{
    static const char *const cells[] = {"E3", "C20", "C40", "E50"};
    tgrid *t = tg_parse(2, 2, true, cells);
    disclose_interval out[4];
    size_t n = 99;
    ug_error err;
    memset(&err, 0, sizeof err);
    ck_assert_int_eq(disclose_audit(&t->g, out, &n, &err), UG_OK);
    ck_assert_uint_eq(n, 0);
    tg_free(t);
}
END_TEST

/* A small cell counted 15 under a "1 to 9" placeholder, alone in its row:
** the margins say 15, the placeholder says at most 9, no table fits. */
START_TEST(test_inconsistent_is_edata)
{
    static const char *const cells[] = {"S15", "E20", "E40", "E50"};
    tgrid *t = tg_parse(2, 2, true, cells);
    disclose_interval out[4];
    size_t n = 99;
    ug_error err;
    memset(&err, 0, sizeof err);
    ck_assert_int_eq(disclose_audit(&t->g, out, &n, &err), UG_EDATA);
    ck_assert_str_eq(err.msg, "the published table is inconsistent");
    ck_assert_uint_eq(n, 0);
    tg_free(t);
}
END_TEST

/* Covering is to 1e-6 at both ends, no more. */
START_TEST(test_covers_tolerance)
{
    tgrid *t = tg_new(1, 1, true);
    disclose_interval iv = {0, 1, 9};
    ck_assert(disclose_interval_covers(&t->g, &iv));
    iv = (disclose_interval){0, 1 + 5e-7, 9 - 5e-7};
    ck_assert(disclose_interval_covers(&t->g, &iv));
    iv = (disclose_interval){0, 1 + 2e-6, 9};
    ck_assert(!disclose_interval_covers(&t->g, &iv));
    iv = (disclose_interval){0, 1, 9 - 2e-6};
    ck_assert(!disclose_interval_covers(&t->g, &iv));
    tg_free(t);
}
END_TEST

/* Every allocation of the audit fails in turn: each failure is reported as
** out of memory with nothing written (the sanitized pass checks leaks). */
START_TEST(test_each_allocation_fails_cleanly)
{
    tgrid *t = tg_parse(3, 3, true, cycle);
    disclose_interval out[9];
    size_t n;
    ug_error err;
    memset(&err, 0, sizeof err);
    ug_mem_fail_after(-1);
    ck_assert_int_eq(disclose_audit(&t->g, out, &n, &err), UG_OK);
    long total = ug_mem_fail_after(-1);
    ck_assert_int_gt(total, 0);
    for (long i = 0; i < total; i++) {
        memset(&err, 0, sizeof err);
        ug_mem_fail_after(i);
        ug_status st = disclose_audit(&t->g, out, &n, &err);
        ug_mem_fail_after(-1);
        ck_assert_int_eq(st, UG_ENOMEM);
        ck_assert_str_eq(err.msg, "out of memory");
        ck_assert_uint_eq(n, 0);
    }
    tg_free(t);
}
END_TEST

/* ---- random tables ---------------------------------------------------------- */

/* A cell drawn by the rules the disclosure stage follows: small counts inside
** the placeholder, complements at or above the floor, rounded cells within
** slack (base 5 when slack is 2.5), withheld cells counted 0. */
static void random_cell(tgrid *t, size_t k, uint64_t *s)
{
    double lo = ug_dec_to_double(t->g.lo), fl = ug_dec_to_double(t->g.complement_floor);
    double v = roll(s, 60) + 0.25 * roll(s, 4);
    unsigned r = roll(s, 100);
    pub_status st = r < 45 ? PUB_EXACT : r < 65 ? PUB_SMALL : r < 80 ? PUB_COMPLEMENT
                  : r < 88 ? PUB_ROUNDED : r < 94 ? PUB_REQUESTED : PUB_WITHHELD;
    if (st == PUB_ROUNDED && t->g.slack.v == 0)
        st = PUB_EXACT;
    t->st[k] = st;
    t->pub[k] = dec("0");
    switch (st) {
    case PUB_SMALL: /* a half now and then, never below lo */
        v = fmax(lo, lo + roll(s, (unsigned)(9 - lo) + 1) - 0.5 * (roll(s, 3) == 0));
        break;
    case PUB_COMPLEMENT: v = fl + roll(s, 30); t->pub[k] = dec_of(v); break;
    case PUB_ROUNDED: t->pub[k] = dec_of(5 * floor(v / 5 + 0.5)); break;
    case PUB_WITHHELD: v = 0; break;
    case PUB_EXACT: t->pub[k] = dec_of(v); break;
    default: break;
    }
    t->raw[k] = dec_of(v);
}

static tgrid *random_table(uint64_t *s)
{
    tgrid *t = tg_new(1 + roll(s, 6), 1 + roll(s, 6), roll(s, 5) != 0);
    t->g.lo = dec(roll(s, 2) ? "1" : "0");
    t->g.complement_floor = dec(roll(s, 4) ? "10" : "0");
    t->g.slack = dec(roll(s, 3) ? "0" : "2.5");
    for (size_t k = 0; k < t->g.rows * t->g.cols; k++)
        random_cell(t, k, s);
    return t;
}

/* What must hold whatever the solver: the truth is feasible, so it lies in the
** interval, and the interval lies in the placeholder. */
static void check_properties(const tgrid *t, const disclose_interval *out, size_t n)
{
    const disclose_grid *g = &t->g;
    double lo = ug_dec_to_double(g->lo), hi = ug_dec_to_double(g->hi);
    size_t want = 0, prev = 0;
    for (size_t k = 0; k < g->rows * g->cols; k++)
        want += g->status[k] == PUB_SMALL;
    ck_assert_uint_eq(n, want);
    for (size_t i = 0; i < n; i++) {
        double truth = ug_dec_to_double(g->raw[out[i].cell]);
        ck_assert_int_eq(g->status[out[i].cell], PUB_SMALL);
        ck_assert(i == 0 || out[i].cell > prev);
        prev = out[i].cell;
        ck_assert_double_le_tol(out[i].min, truth, 1e-6);
        ck_assert_double_ge_tol(out[i].max, truth, 1e-6);
        ck_assert_double_ge_tol(out[i].min, lo, 1e-6);
        ck_assert_double_le_tol(out[i].max, hi, 1e-6);
    }
}

/* 5,000 random tables up to 6 x 6 (fixed seed) must have the properties; the
** first 300 with a small cell and margins are also solved by GLPK's glpsol,
** an independent solver on an independent model, and must agree to 1e-6. */
START_TEST(test_random_tables)
{
    uint64_t seed = 0x9E3779B97F4A7C15u;
    int crossed = 0;
    for (int i = 0; i < 5000; i++) {
        tgrid *t = random_table(&seed);
        disclose_interval out[36];
        size_t n = 0;
        ug_error err;
        memset(&err, 0, sizeof err);
        ug_status st = disclose_audit(&t->g, out, &n, &err);
        ck_assert_msg(st == UG_OK, "table %d: %s", i, err.msg);
        check_properties(t, out, n);
        if (n > 0 && t->g.margins_published && crossed < 300) {
            double vals[72];
            glpsol_intervals(t, out, n, vals);
            for (size_t j = 0; j < n; j++) {
                ck_assert_double_eq_tol(out[j].min, vals[2 * j], 1e-6);
                ck_assert_double_eq_tol(out[j].max, vals[2 * j + 1], 1e-6);
            }
            crossed++;
        }
        tg_free(t);
    }
    ck_assert_int_eq(crossed, 300);
}
END_TEST

/* ---- a large table ---------------------------------------------------------
** 1,000 groups x 12 categories, about 5 % small cells, each with the three
** complements of a four-cell cycle around it (another column of its row,
** its column in another row, and the corner): one large block, solved with
** warm starts. Its time is measured by `make bench`, not here. */
static tgrid *large_table(uint64_t *s)
{
    tgrid *t = tg_new(1000, 12, true);
    size_t nc = 1000 * 12;
    for (size_t k = 0; k < nc; k++) {
        double v = 10 + roll(s, 190);
        t->st[k] = PUB_EXACT, t->raw[k] = t->pub[k] = dec_of(v);
    }
    for (size_t k = 0; k < nc; k++) {
        if (roll(s, 100) >= 5)
            continue;
        size_t r = k / 12, c = k % 12;
        size_t r2 = (r + 1 + roll(s, 999)) % 1000, c2 = (c + 1 + roll(s, 11)) % 12;
        t->st[k] = PUB_SMALL, t->raw[k] = dec_of(1 + roll(s, 9)), t->pub[k] = dec("0");
        size_t partners[] = {r * 12 + c2, r2 * 12 + c, r2 * 12 + c2};
        for (int j = 0; j < 3; j++)
            if (t->st[partners[j]] == PUB_EXACT)
                t->st[partners[j]] = PUB_COMPLEMENT;
    }
    return t;
}

START_TEST(test_large_table)
{
    uint64_t seed = 42;
    tgrid *t = large_table(&seed);
    disclose_interval *out = calloc(1000 * 12, sizeof *out);
    ck_assert_ptr_nonnull(out);
    size_t n = 0;
    ug_error err;
    memset(&err, 0, sizeof err);
    ck_assert_int_eq(disclose_audit(&t->g, out, &n, &err), UG_OK);
    check_properties(t, out, n);
    ck_assert_uint_gt(n, 400);
    free(out);
    tg_free(t);
}
END_TEST

static Suite *audit_suite(void)
{
    Suite *s = suite_create("disclose_audit");
    TCase *hand = tcase_create("hand");
    tcase_add_test(hand, test_lone_small_collapses);
    tcase_add_test(hand, test_cycle_covers);
    tcase_add_test(hand, test_cycle_narrowed_above);
    tcase_add_test(hand, test_cycle_narrowed_below);
    tcase_add_test(hand, test_no_margins_bounds);
    tcase_add_test(hand, test_one_row_grand_total_only);
    tcase_add_test(hand, test_rounded_slack);
    tcase_add_test(hand, test_rounded_floor_zero);
    tcase_add_test(hand, test_requested_and_withheld);
    tcase_add_test(hand, test_handbook_example_3);
    tcase_add_test(hand, test_order_and_blocks);
    tcase_add_test(hand, test_no_small_cells);
    tcase_add_test(hand, test_inconsistent_is_edata);
    tcase_add_test(hand, test_covers_tolerance);
    tcase_add_test(hand, test_each_allocation_fails_cleanly);
    suite_add_tcase(s, hand);
    TCase *rnd = tcase_create("random");
    tcase_set_timeout(rnd, 120);
    tcase_add_test(rnd, test_random_tables);
    tcase_add_test(rnd, test_large_table);
    suite_add_tcase(s, rnd);
    return s;
}

int main(void)
{
    return check_run(audit_suite());
}
