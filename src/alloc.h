/*
** Apportionment: exact counts -> whole icons (FORMAT.md §3). Pure C, no I/O.
*/
#ifndef UG_ALLOC_H
#define UG_ALLOC_H

#include "disclose.h"

/* No rule may ask for more icons than this: the public ceiling on
** --max-icons (see alloc_icon_ceiling in alloc.c for why). */
#define ALLOC_MAX_ICONS ((long)UG_CEILING_ICONS)

typedef struct {
    ug_method method;
    bool by_cells;   /* true: a fixed number of cells; false: each icon = value */
    ug_dec value;    /* icon value V (> 0) when !by_cells */
    long cells;      /* N when by_cells */
    bool partial;    /* rounding: partial (only with a value) */
    long max_icons;  /* refuse an N above this (0 or above ALLOC_MAX_ICONS:
                        ALLOC_MAX_ICONS) */
} alloc_rule;

/* One category's share. Exact rationals keep the report honest: the quota is
** quota_num / quota_den, and so is the remainder rem / quota_den. */
typedef struct {
    ug_dec count;
    long icons;            /* whole icons drawn */
    ug_i128 quota_num, quota_den;
    ug_i128 rem;           /* quota_num mod quota_den */
    bool partial;          /* one more icon clipped to rem / quota_den */
    ug_i128 shown_num, shown_den; /* shown value, scaled by 10^6, as a ratio */
    pub_status status;     /* from the published table: hidden cells have a
                              count of 0 and no icons */
} alloc_share;

/* Apportion n counts under rule into out[0..n). *total_icons gets N. The mark
** names the place blamed when the limit is exceeded. */
ug_status alloc_apportion(const ug_dec *counts, size_t n, const alloc_rule *rule,
                          alloc_share *out, long *total_icons, ug_mark where,
                          ug_error *err);

/* The biproportional apportionment of a whole table (FORMAT.md §7). The
** caller sizes every array of out; shares get count, quota (count / V),
** icons and shown value as alloc_apportion gives them. */
typedef struct {
    alloc_share *shares;   /* [g * ncats + c] */
    ug_dec *group_totals;  /* [ngroups] */
    long *group_icons;     /* [ngroups]: the groups' Sainte-Laguë shares of N */
    long *cat_icons;       /* [ncats]: the categories' shares of N */
    ug_dec *group_div;     /* [ngroups]: divisors, rounded to six places, */
    ug_dec *cat_div;       /* [ncats]   for showing (biprop.h) */
    long total_icons;      /* N */
    size_t ties;           /* cells the tie rule decided */
    bool group_tie, cat_tie; /* the rule decided the last icon of a margin */
} alloc_biprop_out;

typedef struct {
    const ug_dec *counts;  /* [g * ncats + c]: the published table, hidden 0 */
    size_t ngroups, ncats;
    const alloc_rule *rule;
    const char *const *group_names; /* for messages; NULL: "number 2" */
    const char *const *cat_names;
    alloc_biprop_out *out;
} alloc_biprop_in;

/* A group or category with nothing to count, and a table no apportionment
** fits, are UG_EDATA errors at `where`. */
ug_status alloc_biproportional(const alloc_biprop_in *in, ug_mark where, ug_error *err);

/* Sum of counts (exact). */
ug_dec alloc_sum(const ug_dec *counts, size_t n);

/* N for a stated value: round-half-up(total / value). */
ug_i128 alloc_icons_for_value(ug_dec total, ug_dec value);

/* The smallest "nice" value (1, 2, 2.5 or 5 x 10^k) that keeps the icons for
** `largest` within `fit` (at least 1). Returns false when none exists. */
bool alloc_nice_value(ug_dec largest, long fit, ug_dec *out);

/* The next nice value above v (for searching upward). */
ug_dec alloc_next_nice(ug_dec v);

/* The allocation of a whole chart: one apportionment per group, of the
** published table only (a hidden cell is a count of 0). */
struct ug_allocation {
    const ug_chart *chart;  /* borrowed: the chart outlives the allocation */
    pub_table *pub;         /* owned: what the allocation was made from */
    bool internal;          /* raw counts (alloc_internal): never published */
    alloc_rule rule;        /* the rule actually used (auto value resolved) */
    size_t ngroups, ncats;
    alloc_share *shares;    /* [group * ncats + category] */
    long *group_icons;      /* N per group */
    ug_dec *group_totals;
    /* biproportional only (NULL otherwise): */
    long *cat_icons;        /* each category's icons over all groups */
    ug_dec *group_div, *cat_div;
    size_t ties;
    bool group_tie, cat_tie;
};

static inline const alloc_share *alloc_at(const ug_allocation *a, size_t g, size_t c)
{
    return &a->shares[g * a->ncats + c];
}

/* Icons per line: `columns`, or 20 for rows and 10 for waffles. */
long alloc_default_columns(const ug_chart *chart);
/* The most icons `rule` allows: its max_icons, never above ALLOC_MAX_ICONS. */
long alloc_icon_ceiling(const alloc_rule *rule);

/* Build the allocation rule a chart states; an auto icon value is worked out
** from the published table t. */
ug_status alloc_rule_for_table(const ug_chart *chart, const pub_table *t,
                               alloc_rule *rule, ug_error *err);
/* The same for a chart's own published table (disclosed here). */
ug_status alloc_rule_for_chart(const ug_chart *chart, alloc_rule *rule,
                               ug_error *err);

/* The allocation of a published table, which it takes over (freed with it,
** also on failure). */
ug_status alloc_published(const ug_chart *c, pub_table *t, ug_allocation **out,
                          ug_error *err);

static inline bool alloc_hidden(const alloc_share *s)
{
    return pub_hidden(s->status);
}

#endif
