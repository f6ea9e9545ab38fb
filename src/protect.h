/*
** Rounding to a base instead of (or beside) hiding (FORMAT.md §4, protect:).
** Pure C plus GLPK for controlled rounding; no I/O.
*/
#ifndef UG_PROTECT_H
#define UG_PROTECT_H

#include "model.h"

typedef enum {
    PROTECT_CONTROLLED,   /* additive: rounded cells add up to rounded margins */
    PROTECT_CONVENTIONAL, /* nearest multiple, halves up; margins on their own */
    PROTECT_RANDOM        /* up with probability remainder / base (seeded) */
} protect_method;

typedef struct {
    protect_method method;
    ug_dec base;          /* > 0 */
    unsigned long long seed;
} protect_rule;

/* Round a rows x cols table (row-major; rows == 1: no groups, whose only
** margin is the grand total) to multiples of rule->base. Cells with skip[k]
** take no part: their out value is 0 and margins leave them out.
**
** Every rounded value, cells and margins, is the raw value when it is already a
** multiple of the base (zero-restricted), else one of the two multiples next to
** it. controlled: rounded cells add up to the rounded row totals, column totals
** and grand total, minimising the sum of |rounded - raw| over cells and margins
** (an integer program solved by GLPK; one always exists for two-way tables).
** conventional: each value (margins from their raw sums) to the nearest
** multiple, halves up. random: each value up with probability remainder / base,
** drawn from a generator seeded by rule->seed in row-major order, then row
** totals, column totals, grand total; the same seed gives the same table.
**
** row_out has rows entries, col_out cols entries (ignored when rows == 1). */
ug_status protect_round(const ug_dec *cells, const bool *skip, size_t rows,
                        size_t cols, const protect_rule *rule, ug_dec *cells_out,
                        ug_dec *row_out, ug_dec *col_out, ug_dec *grand_out,
                        ug_mark where, ug_error *err);

/* The largest |rounded - raw| the method allows: base - unit for controlled
** and random (adjacent multiples), base / 2 for conventional. */
ug_dec protect_slack(const protect_rule *rule);

#endif
