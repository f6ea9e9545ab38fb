/* Tests for src/alloc.c: apportionment of exact counts into whole icons.
**
** Worked examples come from published sources (REFERENCES.md §1-§2), named in
** each row. The tie rule is unitgram's own (FORMAT.md §3: published practice
** draws lots), so its rows cite FORMAT.md. Property tests run thousands of
** random inputs from a fixed seed and check each result with exact integer
** arithmetic written here, apart from the allocator's own. */
#include <check.h>
#include <stdlib.h>
#include <string.h>

#include "alloc.h"
#include "check_run.h"

#define MAXN 1000

/* ---- helpers -------------------------------------------------------------- */

static size_t parse_counts(const char *list, ug_dec *out)
{
    size_t n = 0;
    const char *p = list;
    while (*p) {
        while (*p == ' ')
            p++;
        size_t len = strcspn(p, " ");
        if (!len)
            break;
        ck_assert_uint_lt(n, MAXN);
        ck_assert_int_eq(ug_dec_parse(p, len, &out[n]), UG_DEC_OK);
        n++;
        p += len;
    }
    return n;
}

static size_t parse_longs(const char *list, long *out)
{
    size_t n = 0;
    char *end;
    for (const char *p = list; *p; p = end) {
        long v = strtol(p, &end, 10);
        if (end == p)
            break;
        ck_assert_uint_lt(n, MAXN);
        out[n++] = v;
    }
    return n;
}

static ug_dec dec(const char *text)
{
    ug_dec d;
    ck_assert_int_eq(ug_dec_parse(text, strlen(text), &d), UG_DEC_OK);
    return d;
}

static alloc_rule cells_rule(ug_method m, long cells)
{
    alloc_rule r = {.method = m, .by_cells = true, .cells = cells,
                    .max_icons = UG_DEFAULT_MAX_ICONS};
    return r;
}

static alloc_rule value_rule(ug_method m, ug_dec v)
{
    alloc_rule r = {.method = m, .value = v, .max_icons = UG_DEFAULT_MAX_ICONS};
    return r;
}

static const ug_mark here = {"test.yaml", 4, 3};

/* Apportion and insist it succeeds; returns N. */
static long run(const alloc_rule *r, const ug_dec *counts, size_t n,
                alloc_share *out)
{
    ug_error err = {0};
    long total = -1;
    ug_status st = alloc_apportion(counts, n, r, out, &total, here, &err);
    ck_assert_msg(st == UG_OK, "apportion failed: %s", err.msg);
    return total;
}

/* ---- published worked examples (REFERENCES.md §1-§2) ----------------------- */

typedef struct {
    const char *source;
    ug_method method;
    const char *value; /* NULL: `seats` cells (Hare quota); else icon value V */
    long seats;
    const char *counts;
    const char *expected;
} alloc_case;

#define LR UG_METHOD_LARGEST_REMAINDER
#define SL UG_METHOD_SAINTE_LAGUE
#define DH UG_METHOD_DHONDT

static const alloc_case cases[] = {
    /* Largest remainder (Hamilton, Hare-Niemeyer), Hare quota. */
    {"Wikipedia, Largest remainder method (Hare quota example)", LR, NULL, 10,
     "47000 16000 15800 12000 6100 3100", "5 2 1 1 1 0"},
    {"German Wikipedia, Hare-Niemeyer-Verfahren", LR, NULL, 60,
     "216 310 22 32", "23 32 2 3"},
    {"staatsrecht.honikel.de, worked calculation examples", LR, NULL, 10,
     "6100 5000 900", "5 4 1"},
    {"electowiki, Hamilton method: US census 1790, 60 seats", LR, NULL, 60,
     "630560 475327 432879 353523 331589 278514 236841 206236 179570 141822 "
     "85533 70835 68705 68446 55540",
     "11 8 7 6 6 5 4 3 3 2 1 1 1 1 1"},
    {"Tannenbaum-style course notes, clubs example", LR, NULL, 10,
     "33 33 34", "3 3 4"},
    /* Alabama paradox, small form: one more seat costs the third state one.
    ** Reproducing it documents that the allocator is pure Hamilton. */
    {"Wikipedia, Alabama paradox (10 seats)", LR, NULL, 10, "6 6 2", "4 4 2"},
    {"Wikipedia, Alabama paradox (11 seats)", LR, NULL, 11, "6 6 2", "5 5 1"},
    /* The same inputs with a stated icon value V = total / seats (exact). */
    {"Wikipedia, Largest remainder method, as V = 10000", LR, "10000", 0,
     "47000 16000 15800 12000 6100 3100", "5 2 1 1 1 0"},
    {"staatsrecht.honikel.de, as V = 1200", LR, "1200", 0,
     "6100 5000 900", "5 4 1"},
    {"Tannenbaum-style course notes, clubs example, as V = 10", LR, "10", 0,
     "33 33 34", "3 3 4"},
    {"Wikipedia, Alabama paradox (10 seats), as V = 1.4", LR, "1.4", 0,
     "6 6 2", "4 4 2"},
    /* Highest averages. */
    {"Wikipedia, D'Hondt method example", DH, NULL, 8,
     "100000 80000 30000 20000", "4 3 1 0"},
    {"Wikipedia, D'Hondt method example (Sainte-Lague recomputed)", SL, NULL, 8,
     "100000 80000 30000 20000", "3 3 1 1"},
    {"staatsrecht.honikel.de, D'Hondt", DH, NULL, 10, "6100 5000 900", "6 4 0"},
    {"staatsrecht.honikel.de, Sainte-Lague", SL, NULL, 10, "6100 5000 900",
     "5 4 1"},
    {"wahlrecht.de, Verfahren: D'Hondt", DH, NULL, 10, "4160 3380 2460",
     "4 4 2"},
    {"wahlrecht.de, Verfahren: Sainte-Lague", SL, NULL, 10, "4160 3380 2460",
     "4 3 3"},
    {"Wikipedia, D'Hondt method example, as V = 28750", DH, "28750", 0,
     "100000 80000 30000 20000", "4 3 1 0"},
    {"wahlrecht.de, Verfahren: Sainte-Lague, as V = 1000", SL, "1000", 0,
     "4160 3380 2460", "4 3 3"},
    {"wahlrecht.de, Verfahren: D'Hondt, as V = 1000", DH, "1000", 0,
     "4160 3380 2460", "4 4 2"},

    /* The tie rule: larger count, then listed first (FORMAT.md §3). */
    {"FORMAT.md §3 tie rule: equal remainders, listed first", LR, NULL, 2,
     "1 1 1", "1 1 0"},
    {"FORMAT.md §3 tie rule: equal remainders, larger count", LR, "1", 0,
     "0.5 1.5 0.5 1.5", "0 2 0 2"},
    {"FORMAT.md §3 tie rule: larger count, then listed first", LR, "1", 0,
     "0.5 1.5 0.5 1.5 0.5", "1 2 0 2 0"},
    {"FORMAT.md §3 tie rule: larger count beats listed first", LR, "10", 0,
     "5 15 25", "0 2 3"},
    /* 0.15/0.1 is 1.4999999999999998 in binary floating point; read exactly,
    ** all three remainders are 1/2 and the tie rule decides. */
    {"FORMAT.md §3 exact decimals: remainders of exactly 1/2", LR, "0.1", 0,
     "0.15 0.25 0.35", "1 3 4"},
    {"FORMAT.md §3 tie rule, D'Hondt: 2/2 = 1/1, larger count", DH, NULL, 2,
     "1 2", "0 2"},
    {"FORMAT.md §3 tie rule, Sainte-Lague: 3/3 = 1/1, larger count", SL, NULL, 2,
     "1 3", "0 2"},
    {"FORMAT.md §3 tie rule, D'Hondt: equal counts, listed first", DH, NULL, 3,
     "5 5", "2 1"},
    {"FORMAT.md §3 tie rule, Sainte-Lague: equal counts, listed first", SL, NULL,
     1, "5 5", "1 0"},

    /* Edges (FORMAT.md §3; expected values follow from the definitions). */
    {"zero counts get nothing", LR, NULL, 10, "0 7 0 3", "0 7 0 3"},
    {"zero counts get nothing, D'Hondt", DH, NULL, 10, "0 7 0 3", "0 7 0 3"},
    {"zero counts get nothing, Sainte-Lague", SL, "1", 0, "0 7 0 3", "0 7 0 3"},
    {"all-zero total with cells: N = 0", LR, NULL, 100, "0 0 0", "0 0 0"},
    {"all-zero total with cells: N = 0, D'Hondt", DH, NULL, 100, "0 0", "0 0"},
    {"all-zero total with a value: N = 0", LR, "10", 0, "0 0 0", "0 0 0"},
    {"N = round-half-up(0.2) = 0", LR, "10", 0, "1 1", "0 0"},
    {"N = round-half-up(0.2) = 0, Sainte-Lague", SL, "10", 0, "1 1", "0 0"},
    {"N = round-half-up(0.5) = 1 goes to the larger remainder", LR, "10", 0,
     "2 3", "0 1"},
    {"N = round-half-up(1.49) = 1", LR, "1", 0, "0.49 1", "0 1"},
    {"no cells at all: N = 0", LR, NULL, 0, "3 4", "0 0"},
    {"single category, value: round-half-up(7.3) = 7", LR, "1", 0, "7.3", "7"},
    {"single category, value: round-half-up(7.5) = 8", DH, "1", 0, "7.5", "8"},
    {"single category, cells: all of them", LR, NULL, 100, "0.000001", "100"},
    {"single category, cells, Sainte-Lague", SL, NULL, 37, "12", "37"},

    /* Largest counts the format allows, where doubles cannot tell them apart:
    ** the quotas are 1 - 10^-21, 1 - 2 * 10^-21 and 3 * 10^-21. */
    {"exact: counts of 10^15 with 6 places", LR, NULL, 2,
     "999999999999999.999998 999999999999999.999999 0.000003", "1 1 0"},
    {"exact: counts of 10^15 with 6 places, value", LR, "999999999999999.999999",
     0, "999999999999999.999998 999999999999999.999999 0.000003", "1 1 0"},
    {"exact: counts of 10^15, Sainte-Lague at the limit", SL, NULL, 3,
     "1000000000000000 999999999999999.999999 999999999999999.999998", "1 1 1"},
    {"exact: counts of 10^15, D'Hondt, 1 - 10^-21 apart", DH, NULL, 1,
     "999999999999999.999999 1000000000000000", "0 1"},
};

START_TEST(test_worked_examples)
{
    const alloc_case *c = &cases[_i];
    static ug_dec counts[MAXN];
    static alloc_share out[MAXN];
    long want[MAXN];
    size_t n = parse_counts(c->counts, counts);
    ck_assert_uint_eq(parse_longs(c->expected, want), n);
    alloc_rule r = c->value ? value_rule(c->method, dec(c->value))
                            : cells_rule(c->method, c->seats);
    long total = run(&r, counts, n, out);
    long sum = 0;
    for (size_t i = 0; i < n; i++) {
        ck_assert_msg(out[i].icons == want[i], "%s: category %zu got %ld, want %ld",
                      c->source, i + 1, out[i].icons, want[i]);
        sum += want[i];
    }
    ck_assert_msg(total == sum, "%s: N = %ld, want %ld", c->source, total, sum);
}
END_TEST

/* 1000 categories of nearly 10^15 each (10^15 - i * 10^-6), 999 cells: every
** quota is just under 1, so the 999 largest counts win; the total is 10^24 in
** scaled units, far beyond what a double can separate. */
START_TEST(test_thousand_largest_counts)
{
    static ug_dec counts[1000];
    static alloc_share out[1000];
    for (int i = 0; i < 1000; i++)
        counts[i].v = UG_DEC_MAX_INTEGER * UG_DEC_SCALE - i;
    alloc_rule r = cells_rule(LR, 999);
    ck_assert_int_eq(run(&r, counts, 1000, out), 999);
    for (int i = 0; i < 1000; i++)
        ck_assert_int_eq(out[i].icons, i < 999 ? 1 : 0);
    /* Quota of the first: (10^21) * 999 / (10^24 - 499500), exactly. */
    ck_assert(out[0].quota_num == UG_DEC_MAX_INTEGER * UG_DEC_SCALE * 999);
    ck_assert(out[0].quota_den == (ug_i128)1000 * UG_DEC_MAX_INTEGER * UG_DEC_SCALE
                                      - 499500);
    /* Reversed order: the tie-free answer follows the counts, not the order. */
    for (int i = 0; i < 1000; i++)
        counts[i].v = UG_DEC_MAX_INTEGER * UG_DEC_SCALE - (999 - i);
    for (ug_method m = LR; m <= DH; m++) {
        r.method = m;
        ck_assert_int_eq(run(&r, counts, 1000, out), 999);
        ck_assert_int_eq(out[0].icons, 0);
        for (int i = 1; i < 1000; i++)
            ck_assert_int_eq(out[i].icons, 1);
    }
}
END_TEST

/* Equal largest counts: all 1000 quotas are 0.1, so the tie rule alone picks
** the first 100 listed (FORMAT.md §3). */
START_TEST(test_thousand_equal_counts_tie)
{
    static ug_dec counts[1000];
    static alloc_share out[1000];
    for (int i = 0; i < 1000; i++)
        counts[i].v = UG_DEC_MAX_INTEGER * UG_DEC_SCALE + 999999;
    alloc_rule r = cells_rule(LR, 100);
    ck_assert_int_eq(run(&r, counts, 1000, out), 100);
    for (int i = 0; i < 1000; i++)
        ck_assert_int_eq(out[i].icons, i < 100);
}
END_TEST

/* ---- quotas, shown values and partial rounding ----------------------------- */

START_TEST(test_quota_and_shown_cells)
{
    /* Tannenbaum-style clubs example: quotas 3.3, 3.3, 3.4 of 10 cells. */
    ug_dec counts[3];
    alloc_share out[3];
    parse_counts("33 33 34", counts);
    alloc_rule r = cells_rule(LR, 10);
    run(&r, counts, 3, out);
    ck_assert(out[2].quota_num == 340 * UG_DEC_SCALE);
    ck_assert(out[2].quota_den == 100 * UG_DEC_SCALE);
    ck_assert(out[2].rem == 40 * UG_DEC_SCALE);
    /* shown = icons * total / cells: 4 * 100 / 10 = 40 (scaled by 10^6) */
    ck_assert(out[2].shown_num * 1 == 4 * 100 * UG_DEC_SCALE);
    ck_assert(out[2].shown_den == 10);
    ck_assert(!out[2].partial);
}
END_TEST

START_TEST(test_partial_rounding)
{
    ug_dec counts[3];
    alloc_share out[3];
    parse_counts("41.25 8 20", counts);
    alloc_rule r = value_rule(LR, dec("10"));
    r.partial = true;
    long total = run(&r, counts, 3, out);
    ck_assert_int_eq(total, 7); /* round-half-up(69.25 / 10) */
    /* whole icons, then one clipped to the remainder: 4 + 0.125, 0 + 0.8, 2 */
    ck_assert_int_eq(out[0].icons, 4);
    ck_assert(out[0].partial);
    ck_assert(out[0].rem == 1250000 && out[0].quota_den == 10 * UG_DEC_SCALE);
    ck_assert_int_eq(out[1].icons, 0);
    ck_assert(out[1].partial);
    ck_assert(out[1].rem == 8 * UG_DEC_SCALE);
    ck_assert_int_eq(out[2].icons, 2);
    ck_assert(!out[2].partial);
    /* a partial chart shows each count exactly */
    for (int i = 0; i < 3; i++)
        ck_assert(out[i].shown_num == counts[i].v * out[i].shown_den);
}
END_TEST

/* ---- limits and failures --------------------------------------------------- */

START_TEST(test_icon_limit_message)
{
    ug_dec counts[2];
    alloc_share out[2];
    parse_counts("600 400.5", counts);
    alloc_rule r = value_rule(LR, dec("1"));
    r.max_icons = 100;
    ug_error err = {0};
    long total = -1;
    ck_assert_int_eq(alloc_apportion(counts, 2, &r, out, &total, here, &err),
                     UG_ELIMIT);
    char buf[700];
    ck_assert_str_eq(ug_error_format(&err, buf, sizeof buf),
                     "test.yaml:4:3: 1000.5 at 1 each would need more than 100 "
                     "icons, the limit; state a larger icon value or raise the "
                     "limit (--max-icons)");
    ck_assert_int_eq(total, -1);
}
END_TEST

START_TEST(test_cells_limit_message)
{
    ug_dec counts[1] = {dec("5")};
    alloc_share out[1];
    alloc_rule r = cells_rule(LR, 101);
    r.max_icons = 100;
    ug_error err = {0};
    long total;
    ck_assert_int_eq(alloc_apportion(counts, 1, &r, out, &total, here, &err),
                     UG_ELIMIT);
    ck_assert_str_eq(err.msg, "101 cells are more than 100, the limit on icons; "
                              "state fewer cells or raise the limit (--max-icons)");
}
END_TEST

/* 10^15 at 10^-6 each is 10^21 icons: refused (not wrapped into a long), and
** no stated limit lifts the ceiling that keeps the arithmetic in 128 bits. */
START_TEST(test_icon_ceiling)
{
    ug_dec counts[1] = {dec("1000000000000000")};
    alloc_share out[1];
    alloc_rule r = value_rule(DH, dec("0.000001"));
    r.max_icons = 0;
    ug_error err = {0};
    long total;
    ck_assert_int_eq(alloc_apportion(counts, 1, &r, out, &total, here, &err),
                     UG_ELIMIT);
    ck_assert(strstr(err.msg, "1000000000000000 at 0.000001 each would need "
                              "more than 10000000 icons") != NULL);
    ug_error_clear(&err);
    r.max_icons = 1L << 60;
    ck_assert_int_eq(alloc_apportion(counts, 1, &r, out, &total, here, &err),
                     UG_ELIMIT);
    ck_assert(strstr(err.msg, "more than 10000000 icons") != NULL);
    /* exactly at the ceiling is allowed */
    r.value = dec("100000000");
    ck_assert_int_eq(run(&r, counts, 1, out), ALLOC_MAX_ICONS);
    ck_assert_int_eq(out[0].icons, ALLOC_MAX_ICONS);
}
END_TEST

START_TEST(test_out_of_memory)
{
    ug_dec counts[3];
    alloc_share out[3];
    parse_counts("1 2 3.5", counts);
    alloc_rule r = cells_rule(_i == 0 ? LR : _i == 1 ? SL : DH, 10);
    ug_error err = {0};
    long total;
    ug_mem_fail_after(0);
    ug_status st = alloc_apportion(counts, 3, &r, out, &total, here, &err);
    ug_mem_fail_after(-1);
    ck_assert_int_eq(st, UG_ENOMEM);
    ck_assert_str_eq(err.msg, "out of memory");
}
END_TEST

/* ---- nice icon values ------------------------------------------------------ */

typedef struct {
    const char *largest;
    long fit;
    const char *value;
} nice_case;

/* Nice values are 1, 2, 2.5 and 5 x 10^k: a unitgram design choice (common
** practice, no source); the expectations follow from that definition. */
static const nice_case nice_cases[] = {
    {"412", 20, "25"},     /* 412/20 = 20.6 -> 16.48 at 25 rounds to 16 */
    {"2909", 20, "200"},   /* 14.5 -> 15 at 200; 29.09 at 100 is too many */
    {"20", 20, "1"},
    {"20.5", 20, "2"},     /* round-half-up(20.5) = 21 > 20 */
    {"20.49", 20, "1"},
    {"0.000003", 1, "0.000005"},
    {"1000000000000000", 10, "100000000000000"},
    {"0", 20, "1"},        /* nothing to show: a plain 1 */
};

START_TEST(test_nice_values)
{
    const nice_case *c = &nice_cases[_i];
    ug_dec v;
    char buf[48];
    ck_assert(alloc_nice_value(dec(c->largest), c->fit, &v));
    ck_assert_str_eq(ug_dec_format(v, buf), c->value);
    ck_assert(!alloc_nice_value(dec(c->largest), 0, &v));
}
END_TEST

/* ---- properties on random inputs ------------------------------------------- */

static uint64_t rng_state;

/* splitmix64 (Steele, Lea & Flood, "Fast splittable pseudorandom number
** generators", OOPSLA 2014): small, fixed-seed, the same on every machine. */
static uint64_t next_random(void)
{
    uint64_t z = (rng_state += 0x9e3779b97f4a7c15ULL);
    z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9ULL;
    z = (z ^ (z >> 27)) * 0x94d049bb133111ebULL;
    return z ^ (z >> 31);
}

static uint64_t below(uint64_t n) { return n ? next_random() % n : 0; }

/* A count in one of several shapes: small integers (many ties), tenths, big
** integers, and the full range with six places. Zero now and then. */
static ug_dec random_count(int shape)
{
    ug_dec d;
    switch (shape) {
    case 0: d.v = (ug_i128)below(21) * UG_DEC_SCALE; break;
    case 1: d.v = (ug_i128)below(1000) * 100000; break;
    case 2: d.v = (ug_i128)below(1000000000) * UG_DEC_SCALE; break;
    default:
        d.v = (ug_i128)below(1000000000000000ULL) * UG_DEC_SCALE
              + (ug_i128)below(1000000);
        break;
    }
    if (below(10) == 0)
        d.v = 0;
    return d;
}

typedef struct {
    size_t n;
    ug_dec counts[64];
    alloc_rule rule;
} random_case;

static void random_input(random_case *rc, ug_method m)
{
    int shape = (int)below(4);
    rc->n = 1 + below(below(4) == 0 ? 64 : 8);
    for (size_t i = 0; i < rc->n; i++)
        rc->counts[i] = random_count(shape);
    ug_dec total = alloc_sum(rc->counts, rc->n);
    long target = (long)below(300);
    if (below(2) || total.v == 0 || target == 0) {
        rc->rule = cells_rule(m, target);
        return;
    }
    /* a value near total / target, sometimes with six places */
    ug_i128 v = total.v / target;
    if (below(2))
        v -= v % UG_DEC_SCALE;
    rc->rule = value_rule(m, (ug_dec){v > 0 ? v : 1});
    if (alloc_icons_for_value(total, rc->rule.value) > 100000)
        rc->rule = cells_rule(m, target);
}

/* N computed apart from the allocator: the whole part of T / V, plus one when
** the fraction is at least 1/2. */
static long expected_house(const random_case *rc)
{
    ug_dec t = alloc_sum(rc->counts, rc->n);
    if (rc->rule.by_cells)
        return t.v ? rc->rule.cells : 0;
    ug_i128 v = rc->rule.value.v;
    return (long)(t.v / v + (2 * (t.v % v) >= v ? 1 : 0));
}

/* Exact quota of category i as num / den: count * N / T or count / V. */
static void quota(const random_case *rc, size_t i, long house, ug_i128 *num,
                  ug_i128 *den)
{
    if (rc->rule.by_cells) {
        ug_i128 t = alloc_sum(rc->counts, rc->n).v;
        *num = rc->counts[i].v * house; /* 0 when t is 0 */
        *den = t ? t : 1;
    } else {
        *num = rc->counts[i].v;
        *den = rc->rule.value.v;
    }
}

/* Compare a/b with c/d for positive b, d. */
static int cmp_ratio(ug_i128 a, ug_i128 b, ug_i128 c, ug_i128 d)
{
    ug_i128 l = a * d, r = c * b;
    return l < r ? -1 : l > r;
}

static ug_i128 divisor_of(ug_method m, long s) { return m == DH ? s + 1 : 2 * s + 1; }

/* The defining property of each method, checked from the outside. Returns 1
** when the result depended on the tie rule (equal values at the cut), 0 when
** it did not; fails the test when the result is not a valid apportionment. */
static int check_method(const random_case *rc, const alloc_share *out, long house)
{
    ug_method m = rc->rule.method;
    /* best loser against worst winner, as ratios */
    ug_i128 win_n = 1, win_d = 0, lose_n = -1, lose_d = 1;
    for (size_t i = 0; i < rc->n; i++) {
        ug_i128 num, den, wn, wd, ln, ld;
        quota(rc, i, house, &num, &den);
        if (m == LR) {
            ug_i128 fl = num / den;
            ck_assert_msg(out[i].icons == fl || (out[i].icons == fl + 1 && num % den),
                          "quota rule broken");
            /* every remainder shares the denominator: compare numerators
            ** (cross products of count * N * T would pass 128 bits) */
            if (out[i].icons > fl) {
                if (!win_d || num % den < win_n)
                    win_n = num % den, win_d = 1;
            } else if (num % den > lose_n) {
                lose_n = num % den;
            }
            continue;
        }
        if (out[i].icons > 0) {
            wn = rc->counts[i].v; wd = divisor_of(m, out[i].icons - 1);
            if (!win_d || cmp_ratio(wn, wd, win_n, win_d) < 0)
                win_n = wn, win_d = wd;
        }
        ln = rc->counts[i].v; ld = divisor_of(m, out[i].icons);
        if (cmp_ratio(ln, ld, lose_n, lose_d) > 0)
            lose_n = ln, lose_d = ld;
    }
    if (!win_d || lose_n <= 0)
        return 0;
    int c = cmp_ratio(win_n, win_d, lose_n, lose_d);
    ck_assert_msg(c >= 0, "an unawarded value beats an awarded one");
    return c == 0;
}

static long sum_icons(const alloc_share *out, size_t n)
{
    long s = 0;
    for (size_t i = 0; i < n; i++)
        s += out[i].icons;
    return s;
}

#define ROUNDS 3000

/* Sum equals N; each method's defining property (the quota rule for largest
** remainder, awarded averages never below unawarded ones for the divisor
** methods); D'Hondt never gives less than the floor of the quota (lower
** quota, Balinski & Young, "Fair Representation", 1982). */
START_TEST(test_random_properties)
{
    ug_method m = (ug_method)_i;
    rng_state = 20260101 + (uint64_t)_i;
    static alloc_share out[64];
    for (int k = 0; k < ROUNDS; k++) {
        random_case rc;
        random_input(&rc, m);
        long house = run(&rc.rule, rc.counts, rc.n, out);
        ck_assert_int_eq(house, expected_house(&rc));
        ck_assert_int_eq(sum_icons(out, rc.n), house);
        check_method(&rc, out, house);
        for (size_t i = 0; m == DH && house && i < rc.n; i++) {
            ug_i128 q = rc.counts[i].v * house / alloc_sum(rc.counts, rc.n).v;
            ck_assert(out[i].icons >= q);
        }
    }
}
END_TEST

/* Multiplying every count (and V) by one constant changes nothing. */
START_TEST(test_random_scaling)
{
    ug_method m = (ug_method)_i;
    rng_state = 777 + (uint64_t)_i;
    static alloc_share a[64], b[64];
    for (int k = 0; k < ROUNDS; k++) {
        random_case rc;
        random_input(&rc, m);
        long factor = 2 + (long)below(999);
        bool fits = rc.rule.value.v * factor <= UG_DEC_MAX_INTEGER * UG_DEC_SCALE;
        for (size_t i = 0; i < rc.n; i++)
            fits = fits && rc.counts[i].v * factor <= UG_DEC_MAX_INTEGER * UG_DEC_SCALE;
        if (!fits)
            continue;
        run(&rc.rule, rc.counts, rc.n, a);
        for (size_t i = 0; i < rc.n; i++)
            rc.counts[i].v *= factor;
        rc.rule.value.v *= factor;
        run(&rc.rule, rc.counts, rc.n, b);
        for (size_t i = 0; i < rc.n; i++)
            ck_assert_int_eq(a[i].icons, b[i].icons);
    }
}
END_TEST

/* Reordering the categories reorders the results, whenever no tie at the cut
** let the order decide. */
START_TEST(test_random_permutation)
{
    ug_method m = (ug_method)_i;
    rng_state = 4242 + (uint64_t)_i;
    static alloc_share a[64], b[64];
    int compared = 0;
    for (int k = 0; k < ROUNDS; k++) {
        random_case rc, shuffled;
        random_input(&rc, m);
        long house = run(&rc.rule, rc.counts, rc.n, a);
        if (check_method(&rc, a, house))
            continue;
        size_t perm[64];
        for (size_t i = 0; i < rc.n; i++)
            perm[i] = i;
        for (size_t i = rc.n; i > 1; i--) {
            size_t j = below(i), t = perm[i - 1];
            perm[i - 1] = perm[j];
            perm[j] = t;
        }
        shuffled = rc;
        for (size_t i = 0; i < rc.n; i++)
            shuffled.counts[i] = rc.counts[perm[i]];
        run(&shuffled.rule, shuffled.counts, rc.n, b);
        for (size_t i = 0; i < rc.n; i++)
            ck_assert_int_eq(b[i].icons, a[perm[i]].icons);
        compared++;
    }
    ck_assert_int_gt(compared, ROUNDS / 2);
}
END_TEST

/* Divisor methods never take an icon away when the house grows (no Alabama
** paradox; Balinski & Young 1982). Largest remainder can: see the Alabama
** rows in the worked examples. */
START_TEST(test_random_house_monotone)
{
    ug_method m = _i == 0 ? SL : DH;
    rng_state = 99 + (uint64_t)_i;
    static alloc_share a[64], b[64];
    for (int k = 0; k < ROUNDS; k++) {
        random_case rc;
        random_input(&rc, m);
        rc.rule = cells_rule(m, (long)below(200));
        run(&rc.rule, rc.counts, rc.n, a);
        rc.rule.cells++;
        run(&rc.rule, rc.counts, rc.n, b);
        for (size_t i = 0; i < rc.n; i++)
            ck_assert_int_ge(b[i].icons, a[i].icons);
    }
}
END_TEST

/* ---- counts-are: percent against counts --------------------------------------- */

/* A waffle's quotas are count * cells / total, so k times the shares given as
** counts must fill the same cells as the shares given as percent: the two
** input paths checked against each other, not against a figure of ours. */
static ug_allocation *waffle_of(const char *mode, const char *const *vals, size_t n,
                                const char *k, long cells, ug_chart **c)
{
    char text[2048], v[64];
    ug_dec f, d;
    ck_assert_int_eq(ug_dec_parse(k, strlen(k), &f), UG_DEC_OK);
    int len = snprintf(text, sizeof text, "form: waffle\ncounts-are: %s\ncells: %ld\n"
                       "categories:\n", mode, cells);
    for (size_t i = 0; i < n; i++) {
        ck_assert_int_eq(ug_dec_parse(vals[i], strlen(vals[i]), &d), UG_DEC_OK);
        d.v = d.v * f.v / UG_DEC_SCALE; /* exact: k has few places */
        len += snprintf(text + len, sizeof text - (size_t)len,
                        "  - {label: c%zu, count: %s}\n", i, ug_dec_format(d, v));
    }
    ug_error err = {0};
    ug_allocation *a = NULL;
    ck_assert_msg(ug_chart_load_string(text, strlen(text), "k.yaml", NULL, c, &err)
                  == UG_OK, "%s\n%s", err.msg, text);
    ck_assert_int_eq(ug_chart_allocate(*c, &a, &err), UG_OK);
    return a;
}

START_TEST(test_percent_equals_scaled_counts)
{
    static const char *const sets[][6] = {
        {"41.6", "23.2", "17.9", "11.1", "6.2", NULL},
        {"33.3", "33.3", "33.3", NULL},       /* adds to 99.9 */
        {"50", "25", "12.5", "12.5", NULL},
        {"0.4", "0.4", "99.2", NULL},
    };
    static const char *const ks[] = {"1", "0.25", "3", "7.125", "1000"};
    static const long cells[] = {100, 10, 37, 250};
    for (size_t s = 0; s < sizeof sets / sizeof sets[0]; s++) {
        size_t n = 0;
        while (sets[s][n])
            n++;
        for (size_t ci = 0; ci < sizeof cells / sizeof cells[0]; ci++) {
            ug_chart *pc;
            ug_allocation *p = waffle_of("percent", sets[s], n, "1", cells[ci], &pc);
            for (size_t ki = 0; ki < sizeof ks / sizeof ks[0]; ki++) {
                ug_chart *cc;
                ug_allocation *q = waffle_of("counts", sets[s], n, ks[ki], cells[ci], &cc);
                for (size_t i = 0; i < n; i++)
                    ck_assert_msg(p->shares[i].icons == q->shares[i].icons,
                                  "set %zu cells %ld k %s category %zu: %ld vs %ld", s,
                                  cells[ci], ks[ki], i, p->shares[i].icons,
                                  q->shares[i].icons);
                ug_allocation_free(q);
                ug_chart_free(cc);
            }
            ug_allocation_free(p);
            ug_chart_free(pc);
        }
    }
}
END_TEST

static Suite *alloc_suite(void)
{
    Suite *s = suite_create("alloc");
    TCase *tc = tcase_create("examples");
    tcase_add_loop_test(tc, test_worked_examples, 0,
                        (int)(sizeof cases / sizeof cases[0]));
    tcase_add_test(tc, test_thousand_largest_counts);
    tcase_add_test(tc, test_percent_equals_scaled_counts);
    tcase_add_test(tc, test_thousand_equal_counts_tie);
    tcase_add_test(tc, test_quota_and_shown_cells);
    tcase_add_test(tc, test_partial_rounding);
    tcase_add_test(tc, test_icon_limit_message);
    tcase_add_test(tc, test_cells_limit_message);
    tcase_add_test(tc, test_icon_ceiling);
    tcase_add_loop_test(tc, test_out_of_memory, 0, 3);
    tcase_add_loop_test(tc, test_nice_values, 0,
                        (int)(sizeof nice_cases / sizeof nice_cases[0]));
    suite_add_tcase(s, tc);
    TCase *tp = tcase_create("properties");
    tcase_set_timeout(tp, 60);
    tcase_add_loop_test(tp, test_random_properties, 0, 3);
    tcase_add_loop_test(tp, test_random_scaling, 0, 3);
    tcase_add_loop_test(tp, test_random_permutation, 0, 3);
    tcase_add_loop_test(tp, test_random_house_monotone, 0, 2);
    suite_add_tcase(s, tp);
    return s;
}

int main(void)
{
    return check_run(alloc_suite());
}
