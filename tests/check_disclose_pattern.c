/* Tests for src/disclose_pattern.c: complementary suppression. Hand cases
** whose choice follows from the costs (worked out beside each), then random
** tables: the pattern must protect every small cell (proved by our LP audit on
** all of them and by GLPK's glpsol, an independent solver on a model of our
** own, on the first 200), must not depend on any hidden value, and is compared
** with the fewest cells that protect the table, found by trying every smaller
** set of cells on small tables. */
#define _POSIX_C_SOURCE 200809L
#include <check.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "check_run.h"
#include "disclose.h"
#include "grid_fixture.h"

static ug_status pattern(tgrid *t, size_t *stuck)
{
    ug_error err;
    memset(&err, 0, sizeof err);
    *stuck = 999;
    return disclose_complement(&t->g, t->st, stuck, &err);
}

static void ck_pattern_ok(tgrid *t)
{
    size_t stuck;
    ck_assert_int_eq(pattern(t, &stuck), UG_OK);
}

/* "SCCE..." : one letter per cell, S small, C complement, E exact, ... */
static void ck_statuses(const tgrid *t, const char *want)
{
    static const char letter[] = {[PUB_EXACT] = 'E', [PUB_ROUNDED] = 'R',
                                  [PUB_SMALL] = 'S', [PUB_REQUESTED] = 'Q',
                                  [PUB_COMPLEMENT] = 'C', [PUB_WITHHELD] = 'W'};
    char got[128];
    size_t n = t->g.rows * t->g.cols;
    ck_assert_uint_lt(n, sizeof got);
    for (size_t k = 0; k < n; k++)
        got[k] = letter[t->st[k]];
    got[n] = '\0';
    ck_assert_str_eq(got, want);
}

/* Every small cell can reach both ends of its placeholder: the audit's proof. */
static void ck_protected(const tgrid *t)
{
    disclose_interval out[64];
    size_t n = 0;
    ug_error err;
    memset(&err, 0, sizeof err);
    ck_assert_uint_le(t->g.rows * t->g.cols, 64);
    ck_assert_int_eq(disclose_audit(&t->g, out, &n, &err), UG_OK);
    for (size_t i = 0; i < n; i++)
        ck_assert_msg(disclose_interval_covers(&t->g, &out[i]),
                      "small cell %zu narrowed to [%g, %g]", out[i].cell, out[i].min,
                      out[i].max);
}

/* ---- hand cases ------------------------------------------------------------ */

/* A 2 x 2 table has one cycle through the small cell: all four cells.
** Each partner can give up 8 (20 - 10 >= 9 - 1). */
START_TEST(test_two_by_two_hides_all)
{
    static const char *const cells[] = {"S3", "E20", "E30", "E40"};
    tgrid *t = tg_parse(2, 2, true, cells);
    ck_pattern_ok(t);
    ck_statuses(t, "SCCC");
    ck_protected(t);
    tg_free(t);
}
END_TEST

/* Of the four cycles through (0,0) in a 3 x 3 table, the one through rows
** {0, 2} and columns {0, 1} costs the least published total (18 + 19 + 20);
** every cycle needs three new cells, so the total decides. */
START_TEST(test_cheapest_total)
{
    static const char *const cells[] = {"S3",  "E18", "E50",  /* */
                                        "E40", "E60", "E70",  /* */
                                        "E19", "E20", "E80"};
    tgrid *t = tg_parse(3, 3, true, cells);
    ck_pattern_ok(t);
    ck_statuses(t, "SCEEEECCE");
    ck_protected(t);
    tg_free(t);
}
END_TEST

/* Cells already hidden cost nothing: with (1,1) and (1,2) complements, the
** cycle rows {0, 1} x columns {0, 1} needs only (0,1) and (1,0), two new cells
** (total 113; through column 2 it would be 185), though (0,1) + (2,0) + (2,1)
** would hide a smaller total (54) in three. */
START_TEST(test_fewest_new_cells_first)
{
    static const char *const cells[] = {"S3",  "E18", "E90",  /* */
                                        "E95", "C50", "C60",  /* */
                                        "E18", "E18", "E80"};
    tgrid *t = tg_parse(3, 3, true, cells);
    ck_pattern_ok(t);
    ck_statuses(t, "SCE" "CCC" "EEE");
    ck_protected(t);
    tg_free(t);
}
END_TEST

/* A partner that cannot give up 8 without falling under what the reader knows
** of it (15 - 10 = 5 < 8) is passed over even when it is the cheapest. */
START_TEST(test_room_needed)
{
    static const char *const cells[] = {"S3", "E15", "E40",  /* */
                                        "E30", "E15", "E50"};
    tgrid *t = tg_parse(2, 3, true, cells);
    ck_pattern_ok(t);
    ck_statuses(t, "SEC" "CEC");
    ck_protected(t);
    tg_free(t);
}
END_TEST

/* A rounded partner may lie up to 2.5 under its published 20, so it can give
** up only 20 - 2.5 - 10 = 7.5 < 8; the exact 25 (room 15) is taken instead. */
START_TEST(test_rounded_partner_room)
{
    static const char *const cells[] = {"S3", "R20/18", "E25"};
    tgrid *t = tg_parse(1, 3, true, cells);
    t->g.slack = dec("2.5");
    ck_pattern_ok(t);
    ck_statuses(t, "SRC");
    ck_protected(t);
    tg_free(t);
}
END_TEST

/* Without groups only the grand total is public: one further cell, the
** smallest that has room (18 - 10 = 8 is just enough). */
START_TEST(test_one_row_smallest)
{
    static const char *const cells[] = {"E40", "S3", "E18", "E22"};
    tgrid *t = tg_parse(1, 4, true, cells);
    ck_pattern_ok(t);
    ck_statuses(t, "ESCE");
    ck_protected(t);
    tg_free(t);
}
END_TEST

/* Nothing can hide a small cell whose only partner has no room: an error
** that names the cell, and the audit agrees the cell is exposed. */
START_TEST(test_stuck)
{
    static const char *const cells[] = {"E12", "S3"};
    tgrid *t = tg_parse(1, 2, true, cells);
    size_t stuck;
    ck_assert_int_eq(pattern(t, &stuck), UG_EDATA);
    ck_assert_uint_eq(stuck, 1);
    tg_free(t);
}
END_TEST

/* margins: hidden — nothing else is public, so no complement is needed. */
START_TEST(test_margins_hidden_adds_nothing)
{
    static const char *const cells[] = {"S3", "E20", "E30", "E40"};
    tgrid *t = tg_parse(2, 2, false, cells);
    ck_pattern_ok(t);
    ck_statuses(t, "SEEE");
    tg_free(t);
}
END_TEST

/* Two small cells of one row each get a cycle; the second reuses what the
** first hid where that is cheapest, and both are protected. */
START_TEST(test_two_small_in_a_row)
{
    static const char *const cells[] = {"S3",  "S5",  "E40", "E50",  /* */
                                        "E30", "E35", "E45", "E55",  /* */
                                        "E60", "E65", "E70", "E75"};
    tgrid *t = tg_parse(3, 4, true, cells);
    ck_pattern_ok(t);
    ck_protected(t);
    size_t hidden = 0;
    for (size_t k = 0; k < 12; k++)
        hidden += t->st[k] == PUB_COMPLEMENT;
    ck_assert_uint_le(hidden, 6);
    tg_free(t);
}
END_TEST

/* ---- random tables ---------------------------------------------------------- */

/* A table as the disclosure stage hands it over: exact cells at or above the
** floor, small cells in [1, 9], now and then a rounded or requested cell. */
static tgrid *random_table(uint64_t *s, size_t max_rows, size_t max_cols)
{
    tgrid *t = tg_new(1 + roll(s, (unsigned)max_rows), 2 + roll(s, (unsigned)max_cols - 1),
                      true);
    bool rounding = roll(s, 4) == 0;
    t->g.slack = dec(rounding ? "2.5" : "0");
    for (size_t k = 0; k < t->g.rows * t->g.cols; k++) {
        unsigned r = roll(s, 100);
        double v = 10 + roll(s, 60);
        if (r < 18) {
            t->st[k] = PUB_SMALL, t->raw[k] = dec_of(1 + roll(s, 9)), t->pub[k] = dec("0");
        } else if (r < 21) {
            t->st[k] = PUB_REQUESTED, t->raw[k] = dec_of(v), t->pub[k] = dec("0");
        } else if (rounding && r < 40) {
            t->st[k] = PUB_ROUNDED, t->raw[k] = dec_of(v);
            t->pub[k] = dec_of(5 * floor(v / 5 + 0.5));
        } else {
            t->st[k] = PUB_EXACT, t->raw[k] = t->pub[k] = dec_of(v);
        }
    }
    return t;
}

static size_t count_status(const tgrid *t, pub_status st)
{
    size_t n = 0;
    for (size_t k = 0; k < t->g.rows * t->g.cols; k++)
        n += t->st[k] == st;
    return n;
}

/* The same statuses and published values with every hidden count changed
** (inside its placeholder) must give the same pattern: the pattern reads no
** hidden value, or it would itself reveal one. */
static void ck_same_without_hidden_values(const tgrid *t, const pub_status *before,
                                          uint64_t *s)
{
    size_t n = t->g.rows * t->g.cols;
    ug_dec *other = calloc(n, sizeof *other);
    pub_status *st = malloc(n * sizeof *st);
    ck_assert(other && st);
    memcpy(st, before, n * sizeof *st);
    for (size_t k = 0; k < n; k++)
        other[k] = before[k] == PUB_SMALL ? dec_of(1 + roll(s, 9))
                 : before[k] == PUB_REQUESTED ? dec_of(roll(s, 500)) : t->raw[k];
    disclose_grid g = t->g;
    g.raw = other, g.status = st;
    size_t stuck = 0;
    ug_error err;
    memset(&err, 0, sizeof err);
    ck_assert_int_eq(disclose_complement(&g, st, &stuck, &err), UG_OK);
    ck_assert_mem_eq(st, t->st, n * sizeof *st);
    free(other);
    free(st);
}

/* Whether hiding every published cell would protect the small ones: how
** often a stuck table had a way out the four-cell cycles do not see. */
static bool hiding_all_protects(tgrid *t, const pub_status *before)
{
    size_t n = t->g.rows * t->g.cols;
    for (size_t k = 0; k < n; k++)
        t->st[k] = before[k] == PUB_EXACT || before[k] == PUB_ROUNDED ? PUB_COMPLEMENT
                                                                    : before[k];
    disclose_interval out[36];
    size_t m = 0;
    ug_error err;
    memset(&err, 0, sizeof err);
    ck_assert_int_eq(disclose_audit(&t->g, out, &m, &err), UG_OK);
    for (size_t i = 0; i < m; i++)
        if (!disclose_interval_covers(&t->g, &out[i]))
            return false;
    return true;
}

/* 3,000 random tables up to 6 x 6 (fixed seed). Where a pattern is found,
** every small cell is protected (our audit on all, glpsol on the first 200)
** and the pattern is the same whatever the hidden counts are. Where none is
** found, the stuck cell is a small one. */
START_TEST(test_random_patterns)
{
    uint64_t seed = 0xD1B54A32D192ED03u;
    int found = 0, stuck_n = 0, crossed = 0, hide_all_could = 0;
    for (int i = 0; i < 3000; i++) {
        tgrid *t = random_table(&seed, 6, 6);
        size_t n = t->g.rows * t->g.cols, stuck;
        pub_status before[36];
        memcpy(before, t->st, n * sizeof *before);
        if (pattern(t, &stuck) != UG_OK) {
            ck_assert_int_eq(before[stuck], PUB_SMALL);
            stuck_n++;
            hide_all_could += hiding_all_protects(t, before);
            tg_free(t);
            continue;
        }
        found++;
        ck_protected(t);
        ck_same_without_hidden_values(t, before, &seed);
        size_t nsmall = count_status(t, PUB_SMALL);
        if (nsmall > 0 && crossed < 200) {
            disclose_interval out[36];
            double vals[72];
            size_t m = 0;
            ug_error err;
            memset(&err, 0, sizeof err);
            ck_assert_int_eq(disclose_audit(&t->g, out, &m, &err), UG_OK);
            glpsol_intervals(t, out, m, vals);
            double lo = ug_dec_to_double(t->g.lo), hi = ug_dec_to_double(t->g.hi);
            for (size_t j = 0; j < m; j++) {
                ck_assert_double_le_tol(vals[2 * j], lo, 1e-6);
                ck_assert_double_ge_tol(vals[2 * j + 1], hi, 1e-6);
            }
            crossed++;
        }
        tg_free(t);
    }
    printf("patterns: %d found, %d stuck (of which hiding every cell would protect %d),"
           " %d checked by glpsol\n", found, stuck_n, hide_all_could, crossed);
    ck_assert_int_eq(crossed, 200);
    ck_assert_int_gt(found, 2000);
}
END_TEST

/* ---- against the fewest cells ----------------------------------------------
** On small tables, the fewest complements that protect every small cell, by
** trying every set of candidate cells in order of size (each judged by the
** audit). The search reads the counted margins, so it may find patterns the
** pattern module must not use (those that are safe only because of the hidden
** values); it is a lower bound, which the pattern can never beat. */

static bool protects(tgrid *t, const pub_status *base, const size_t *cand, size_t nc,
                     unsigned mask)
{
    size_t n = t->g.rows * t->g.cols;
    memcpy(t->st, base, n * sizeof *base);
    for (size_t j = 0; j < nc; j++)
        if (mask & (1u << j))
            t->st[cand[j]] = PUB_COMPLEMENT;
    disclose_interval out[16];
    size_t m = 0;
    ug_error err;
    memset(&err, 0, sizeof err);
    ck_assert_int_eq(disclose_audit(&t->g, out, &m, &err), UG_OK);
    for (size_t i = 0; i < m; i++)
        if (!disclose_interval_covers(&t->g, &out[i]))
            return false;
    return true;
}

static int fewest_complements(tgrid *t, const pub_status *base)
{
    size_t n = t->g.rows * t->g.cols, cand[16], nc = 0;
    for (size_t k = 0; k < n; k++)
        if (base[k] == PUB_EXACT)
            cand[nc++] = k;
    int best = -1;
    for (unsigned mask = 0; mask < (1u << nc); mask++) {
        int size = __builtin_popcount(mask);
        if ((best < 0 || size < best) && protects(t, base, cand, nc, mask))
            best = size;
    }
    return best;
}

/* 300 tables of 3 x 3 and 3 x 4 (fixed seed): the pattern never hides fewer
** cells than the fewest possible, and how many more it hides is printed, the
** figure the closing notes quote. */
START_TEST(test_against_fewest)
{
    uint64_t seed = 0x2545F4914F6CDD1Du;
    int tables = 0, optimal = 0, extra = 0, worst = 0;
    while (tables < 300) {
        tgrid *t = tg_new(3, 3 + roll(&seed, 2), true);
        size_t n = t->g.rows * t->g.cols;
        for (size_t k = 0; k < n; k++)
            t->st[k] = PUB_EXACT, t->raw[k] = t->pub[k] = dec_of(10 + roll(&seed, 60));
        for (int j = 0, m = 1 + (int)roll(&seed, 2); j < m; j++) {
            size_t k = roll(&seed, (unsigned)n);
            t->st[k] = PUB_SMALL, t->raw[k] = dec_of(1 + roll(&seed, 9)), t->pub[k] = dec("0");
        }
        pub_status base[12];
        memcpy(base, t->st, n * sizeof *base);
        size_t stuck;
        if (pattern(t, &stuck) != UG_OK) {
            tg_free(t);
            continue;
        }
        int ours = (int)count_status(t, PUB_COMPLEMENT);
        int best = fewest_complements(t, base);
        ck_assert_int_ge(best, 0);
        ck_assert_int_ge(ours, best);
        optimal += ours == best, extra += ours - best;
        worst = ours - best > worst ? ours - best : worst;
        tables++;
        tg_free(t);
    }
    printf("against the fewest cells: %d of %d tables optimal, %d extra cells in all,"
           " at most %d in one table\n", optimal, tables, extra, worst);
}
END_TEST

static Suite *pattern_suite(void)
{
    Suite *s = suite_create("disclose_pattern");
    TCase *hand = tcase_create("hand");
    tcase_add_test(hand, test_two_by_two_hides_all);
    tcase_add_test(hand, test_cheapest_total);
    tcase_add_test(hand, test_fewest_new_cells_first);
    tcase_add_test(hand, test_room_needed);
    tcase_add_test(hand, test_rounded_partner_room);
    tcase_add_test(hand, test_one_row_smallest);
    tcase_add_test(hand, test_stuck);
    tcase_add_test(hand, test_margins_hidden_adds_nothing);
    tcase_add_test(hand, test_two_small_in_a_row);
    suite_add_tcase(s, hand);
    TCase *rnd = tcase_create("random");
    tcase_set_timeout(rnd, 300);
    tcase_add_test(rnd, test_random_patterns);
    tcase_add_test(rnd, test_against_fewest);
    suite_add_tcase(s, rnd);
    return s;
}

int main(void)
{
    return check_run(pattern_suite());
}
