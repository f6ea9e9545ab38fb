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
** Biproportional (FORMAT.md §7, at the end of this file): one N for the
** whole table; the group totals and the category totals are each
** apportioned from it by Sainte-Laguë, and the cells by biprop.c so that
** both add up.
**
** Ties. Published practice draws lots; a tool whose output must be the same
** on every run cannot, so ties go to the larger count, then to the category
** listed first. Everything is compared as exact integers (counts are scaled
** by 10^6) so equal remainders are truly equal and the tie rule decides.
*/
#include <assert.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "alloc.h"
#include "biprop.h"

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
        /* one list apportioned biproportionally is Sainte-Laguë */
        st = highest_averages(out, n, seats, rule->method == UG_METHOD_DHONDT
                                                 ? UG_METHOD_DHONDT
                                                 : UG_METHOD_SAINTE_LAGUE);
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

/* ---- biproportional (FORMAT.md §7) --------------------------------------- */

static const char *name_or(const char *const *names, size_t i, char *buf, size_t n)
{
    if (names && names[i])
        return names[i];
    snprintf(buf, n, "number %zu", i + 1);
    return buf;
}

/* A line whose counts are all 0 (or not shown) has no share to keep. */
static ug_status no_empty_line(const ug_dec *totals, size_t n, const char *what,
                               const char *const *names, ug_mark where,
                               ug_error *err)
{
    char buf[32];
    for (size_t i = 0; i < n; i++)
        if (totals[i].v == 0)
            return ug_fail(err, UG_EDATA, where,
                           "'method: biproportional' needs counts in every %s, but "
                           "every count of %s '%s' is 0 or not shown; leave it out "
                           "or use another method", what, what,
                           name_or(names, i, buf, sizeof buf));
    return UG_OK;
}

/* One line of totals apportioned from N by Sainte-Laguë, alloc.c's tie rule. */
static ug_status margin(const ug_dec *totals, size_t n, long seats, long *out)
{
    alloc_share *s = ug_calloc(n, sizeof *s);
    if (!s)
        return UG_ENOMEM;
    for (size_t i = 0; i < n; i++)
        s[i].count = totals[i];
    ug_status st = highest_averages(s, n, seats, UG_METHOD_SAINTE_LAGUE);
    for (size_t i = 0; i < n; i++)
        out[i] = s[i].icons;
    ug_free(s);
    return st;
}

/* Whether the last icon given and the next in line were worth the same
** (t / (2s - 1) of one equals t / (2s + 1) of another): then the tie rule
** chose. Products stay below 2^106: totals below 2^80, icons below 2^24. */
static bool margin_tied(const ug_dec *t, const long *s, size_t n)
{
    size_t last = SIZE_MAX, next = SIZE_MAX;
    for (size_t i = 0; i < n; i++) {
        if (s[i] > 0 && (last == SIZE_MAX || t[i].v * (2 * s[last] - 1)
                                                 < t[last].v * (2 * s[i] - 1)))
            last = i;
        if (next == SIZE_MAX || t[i].v * (2 * s[next] + 1) > t[next].v * (2 * s[i] + 1))
            next = i;
    }
    return last != SIZE_MAX && next != last
           && t[last].v * (2 * s[next] + 1) == t[next].v * (2 * s[last] - 1);
}

static void line_totals(const ug_dec *counts, size_t ng, size_t nc, ug_dec *gt,
                        ug_dec *ct)
{
    for (size_t g = 0; g < ng; g++)
        for (size_t c = 0; c < nc; c++) {
            gt[g].v += counts[g * nc + c].v;
            ct[c].v += counts[g * nc + c].v;
        }
}

static ug_status biprop_failed(ug_status st, const alloc_biprop_in *in,
                               const biprop_result *r, ug_mark where, ug_error *err)
{
    char buf[32];
    if (st == UG_EDATA) {
        long n = in->out->group_icons[r->stuck_row];
        return ug_fail(err, st, where,
                       "no apportionment gives every group and every category its "
                       "own share: group '%s' should get %ld icon%s, but the "
                       "categories it has counts in have too few; use another method",
                       name_or(in->group_names, r->stuck_row, buf, sizeof buf), n,
                       n == 1 ? "" : "s");
    }
    if (st == UG_ELIMIT && r->steps > BIPROP_STEPS)
        return ug_fail(err, st, where,
                       "this table takes more than %llu steps to round both ways; "
                       "use another method, or fewer groups or categories",
                       BIPROP_STEPS);
    if (st == UG_ELIMIT)
        return ug_fail(err, st, where,
                       "the exact divisors of this table need more than %d bits; "
                       "use another method", BIPROP_BITS);
    return ug_fail(err, st, where, "out of memory");
}

static void biprop_shares(const alloc_biprop_in *in, const biprop_result *r)
{
    alloc_biprop_out *o = in->out;
    size_t nc = in->ncats;
    for (size_t g = 0; g < in->ngroups; g++) {
        alloc_share *row = &o->shares[g * nc];
        set_quotas(row, &in->counts[g * nc], nc, in->rule, o->group_totals[g]);
        whole_parts(row, nc); /* remainders still describe the quota */
        for (size_t c = 0; c < nc; c++)
            row[c].icons = r->icons[g * nc + c];
        set_shown(row, nc, in->rule, o->group_totals[g]);
    }
    o->group_tie = margin_tied(o->group_totals, o->group_icons, in->ngroups);
    memcpy(o->group_div, r->row_div, in->ngroups * sizeof *o->group_div);
    memcpy(o->cat_div, r->col_div, nc * sizeof *o->cat_div);
    o->ties = r->ties;
}

ug_status alloc_biproportional(const alloc_biprop_in *in, ug_mark where, ug_error *err)
{
    alloc_biprop_out *o = in->out;
    size_t ng = in->ngroups, nc = in->ncats;
    ug_dec *cat_totals = ug_calloc(nc, sizeof *cat_totals);
    biprop_result r = {0};
    ug_status st = UG_ENOMEM;
    if (!cat_totals)
        return ug_fail(err, st, where, "out of memory");
    memset(o->group_totals, 0, ng * sizeof *o->group_totals);
    line_totals(in->counts, ng, nc, o->group_totals, cat_totals);
    if ((st = no_empty_line(o->group_totals, ng, "group", in->group_names, where, err))
        || (st = no_empty_line(cat_totals, nc, "category", in->cat_names, where, err))
        || (st = house_size(in->rule, alloc_sum(cat_totals, nc), &o->total_icons,
                            where, err)))
        goto out;
    if ((st = margin(o->group_totals, ng, o->total_icons, o->group_icons))
        || (st = margin(cat_totals, nc, o->total_icons, o->cat_icons))) {
        ug_fail(err, st, where, "out of memory");
        goto out;
    }
    ug_i128 *w = ug_calloc(ng * nc, sizeof *w);
    if (!w) {
        st = ug_fail(err, UG_ENOMEM, where, "out of memory");
        goto out;
    }
    for (size_t k = 0; k < ng * nc; k++)
        w[k] = in->counts[k].v;
    biprop_problem p = {ng, nc, w, o->group_icons, o->cat_icons};
    st = biprop_apportion(&p, &r);
    ug_free(w);
    if (st)
        st = biprop_failed(st, in, &r, where, err);
    else
        biprop_shares(in, &r);
    o->cat_tie = !st && margin_tied(cat_totals, o->cat_icons, nc);
out:
    biprop_result_free(&r);
    ug_free(cat_totals);
    return st;
}
