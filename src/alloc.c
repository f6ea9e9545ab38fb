/*
** Allocation stage: counts -> whole icons per category (FORMAT.md §3).
**
** A unit chart can only draw whole icons, so every count must be rounded, and
** rounding each count on its own breaks the total (33 + 33 + 34 at ten icons
** gives 3 + 3 + 3 = 9). Apportionment rounds them together:
**
** Largest remainder (Hamilton, Hare-Niemeyer). Each category's quota is
** count / V when every icon stands for V, or count * N / total when a waffle
** has N cells (the Hare quota). Each category first gets the whole part of its
** quota; the icons still missing from N go one each to the largest fractional
** remainders. Every result is the floor or the ceiling of its quota, and the
** results add up to N. With a value V, N is round-half-up(total / V).
**
** Highest averages (D'Hondt / Jefferson, Sainte-Laguë / Webster). The N icons
** are handed out one at a time to the category with the highest count / d(s),
** where s is what it already has and d(s) = s + 1 or 2s + 1.
**
** Ties. Published practice draws lots; a tool whose output must be the same
** on every run cannot, so ties go to the larger count, then to the category
** listed first. Everything is compared as exact integers (counts are scaled
** by 10^6) so equal remainders are truly equal and the tie rule decides.
*/
#include <assert.h>
#include <stdlib.h>
#include <string.h>

#include "alloc.h"

ug_dec alloc_sum(const ug_dec *counts, size_t n)
{
    ug_dec t = {0};
    for (size_t i = 0; i < n; i++)
        t.v += counts[i].v;
    return t;
}

ug_i128 alloc_icons_for_value(ug_dec total, ug_dec value)
{
    assert(value.v > 0);
    return (2 * total.v + value.v) / (2 * value.v);
}

/* ---- largest remainder --------------------------------------------------- */

typedef struct {
    const alloc_share *shares;
    size_t i;
} ranked;

/* Order for leftover icons: larger remainder, then larger count, then the
** category listed first. */
static int by_remainder(const void *pa, const void *pb)
{
    const ranked *a = pa, *b = pb;
    const alloc_share *x = &a->shares[a->i], *y = &b->shares[b->i];
    if (x->rem != y->rem)
        return x->rem > y->rem ? -1 : 1;
    if (x->count.v != y->count.v)
        return x->count.v > y->count.v ? -1 : 1;
    return a->i < b->i ? -1 : 1;
}

/* 0 <= leftover <= n always: the floors fall short of the quotas' sum by
** less than n, and N is within 1/2 of that sum (exactly it, with cells). */
static ug_status give_leftovers(alloc_share *s, size_t n, long leftover)
{
    assert(leftover >= 0 && (size_t)leftover <= n);
    ranked *order = ug_malloc(n * sizeof *order);
    if (!order)
        return UG_ENOMEM;
    for (size_t i = 0; i < n; i++)
        order[i] = (ranked){s, i};
    qsort(order, n, sizeof *order, by_remainder);
    for (size_t k = 0; k < n && leftover > 0; k++, leftover--)
        s[order[k].i].icons++;
    ug_free(order);
    return UG_OK;
}

static long whole_parts(alloc_share *s, size_t n)
{
    long sum = 0;
    for (size_t i = 0; i < n; i++) {
        s[i].icons = (long)(s[i].quota_num / s[i].quota_den);
        s[i].rem = s[i].quota_num % s[i].quota_den;
        sum += s[i].icons;
    }
    return sum;
}

/* ---- highest averages ---------------------------------------------------- */

typedef struct {
    const alloc_share *s;
    ug_method method;
} averages;

static ug_i128 divisor(ug_method m, long seats)
{
    return m == UG_METHOD_DHONDT ? (ug_i128)seats + 1 : 2 * (ug_i128)seats + 1;
}

/* true when category a should get the next icon before b */
static bool outranks(const averages *av, size_t a, size_t b)
{
    const alloc_share *x = &av->s[a], *y = &av->s[b];
    ug_i128 lhs = x->count.v * divisor(av->method, y->icons);
    ug_i128 rhs = y->count.v * divisor(av->method, x->icons);
    if (lhs != rhs)
        return lhs > rhs;
    if (x->count.v != y->count.v)
        return x->count.v > y->count.v;
    return a < b;
}

static void sift_down(const averages *av, size_t *heap, size_t n, size_t at)
{
    for (;;) {
        size_t best = at, l = 2 * at + 1, r = l + 1;
        if (l < n && outranks(av, heap[l], heap[best]))
            best = l;
        if (r < n && outranks(av, heap[r], heap[best]))
            best = r;
        if (best == at)
            return;
        size_t t = heap[at];
        heap[at] = heap[best];
        heap[best] = t;
        at = best;
    }
}

/* A heap keeps the next recipient on top, so N icons cost O(N log n). */
static ug_status highest_averages(alloc_share *s, size_t n, long seats,
                                  ug_method method)
{
    size_t *heap = ug_malloc(n * sizeof *heap);
    if (!heap)
        return UG_ENOMEM;
    averages av = {s, method};
    size_t m = 0;
    for (size_t i = 0; i < n; i++) {
        s[i].icons = 0;
        if (s[i].count.v > 0)
            heap[m++] = i;
    }
    for (size_t k = m; k-- > 0;)
        sift_down(&av, heap, m, k);
    for (long k = 0; k < seats && m > 0; k++) {
        s[heap[0]].icons++;
        sift_down(&av, heap, m, 0);
    }
    ug_free(heap);
    return UG_OK;
}

/* ---- the common frame ---------------------------------------------------- */

static void set_quotas(alloc_share *s, const ug_dec *counts, size_t n,
                       const alloc_rule *rule, ug_dec total)
{
    for (size_t i = 0; i < n; i++) {
        memset(&s[i], 0, sizeof s[i]);
        s[i].count = counts[i];
        if (rule->by_cells) {
            s[i].quota_num = counts[i].v * rule->cells;
            s[i].quota_den = total.v ? total.v : 1;
        } else {
            s[i].quota_num = counts[i].v;
            s[i].quota_den = rule->value.v;
        }
    }
}

static void set_shown(alloc_share *s, size_t n, const alloc_rule *rule,
                      ug_dec total)
{
    for (size_t i = 0; i < n; i++) {
        if (rule->partial) {
            s[i].shown_num = s[i].count.v;
            s[i].shown_den = 1;
        } else if (rule->by_cells) {
            s[i].shown_num = (ug_i128)s[i].icons * total.v;
            s[i].shown_den = rule->cells ? rule->cells : 1;
        } else {
            s[i].shown_num = (ug_i128)s[i].icons * rule->value.v;
            s[i].shown_den = 1;
        }
    }
}

/* The largest N any rule may ask for, whatever limit the caller states (a
** size_t limit can exceed what a long or 128 bits can carry). The report
** rounds count * N / total and icons * total / N to six places, forming
** products up to count * N * 2 * 10^6; with counts of 10^15 scaled by 10^6
** that overflows 128 bits near N = 8 * 10^10. 10^7 keeps a wide margin,
** bounds the time highest averages take, and is far beyond a readable chart. */
long alloc_icon_ceiling(const alloc_rule *rule)
{
    if (rule->max_icons > 0 && rule->max_icons < ALLOC_MAX_ICONS)
        return rule->max_icons;
    return ALLOC_MAX_ICONS;
}

static ug_status house_size(const alloc_rule *rule, ug_dec total, long *out,
                            ug_mark where, ug_error *err)
{
    ug_i128 n = rule->by_cells ? rule->cells : alloc_icons_for_value(total, rule->value);
    if (rule->by_cells && total.v == 0)
        n = 0;
    long limit = alloc_icon_ceiling(rule);
    if (n > limit && rule->by_cells)
        return ug_fail(err, UG_ELIMIT, where,
                       "%ld cells are more than %ld, the limit on icons; "
                       "state fewer cells or raise the limit (--max-icons)",
                       rule->cells, limit);
    if (n > limit) {
        char t[48], v[48];
        return ug_fail(err, UG_ELIMIT, where,
                       "%s at %s each would need more than %ld icons, the limit; "
                       "state a larger icon value or raise the limit (--max-icons)",
                       ug_dec_format(total, t), ug_dec_format(rule->value, v), limit);
    }
    *out = (long)n;
    return UG_OK;
}

ug_status alloc_apportion(const ug_dec *counts, size_t n, const alloc_rule *rule,
                          alloc_share *out, long *total_icons, ug_mark where,
                          ug_error *err)
{
    ug_dec total = alloc_sum(counts, n);
    long seats = 0;
    ug_status st = house_size(rule, total, &seats, where, err);
    if (st)
        return st;
    *total_icons = seats;
    set_quotas(out, counts, n, rule, total);
    if (rule->partial) {
        whole_parts(out, n);
        for (size_t i = 0; i < n; i++)
            out[i].partial = out[i].rem != 0;
    } else if (rule->method == UG_METHOD_LARGEST_REMAINDER) {
        long given = whole_parts(out, n);
        st = give_leftovers(out, n, seats - given);
    } else {
        whole_parts(out, n); /* remainders still describe the quota */
        st = highest_averages(out, n, seats, rule->method);
    }
    if (st)
        return ug_fail(err, st, where, "out of memory");
    set_shown(out, n, rule, total);
    return UG_OK;
}

/* ---- nice values --------------------------------------------------------- */

/* Nice values in scaled units: m x 10^k for m in {1, 2, 2.5, 5}; 2.5 x 10^-6
** has seven places and is skipped since it cannot be written as a count. */
static const int nice_tenths[] = {10, 20, 25, 50};

ug_dec alloc_next_nice(ug_dec v)
{
    ug_i128 p = 1; /* 10^k in scaled units, starting at 10^-6 */
    for (int k = 0; k < 40; k++, p *= 10) {
        for (int m = 0; m < 4; m++) {
            if (nice_tenths[m] == 25 && p < 10)
                continue;
            ug_i128 cand = nice_tenths[m] * p / 10;
            if (cand > v.v)
                return (ug_dec){cand};
        }
    }
    return v;
}

bool alloc_nice_value(ug_dec largest, long fit, ug_dec *out)
{
    ug_dec v = {0};
    if (fit < 1)
        return false;
    if (largest.v == 0) { /* nothing to draw: any value fits; say a plain 1 */
        *out = (ug_dec){UG_DEC_SCALE};
        return true;
    }
    for (int i = 0; i < 200; i++) {
        ug_dec next = alloc_next_nice(v);
        if (next.v == v.v)
            return false;
        v = next;
        if (alloc_icons_for_value(largest, v) <= fit) {
            *out = v;
            return true;
        }
    }
    return false;
}
