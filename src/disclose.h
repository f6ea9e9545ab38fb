/*
** Disclosure stage: the model's counts -> the published table (FORMAT.md §4).
**
** Every cell and margin of the table a chart publishes is exact, rounded or
** hidden. Hidden cells take part in no later arithmetic: allocation, packing
** and every writer read the published table, so whatever a hidden count is
** (within what its placeholder says) no published byte changes. The stage is
** a pure function of the model: no I/O, no state.
**
** Two helpers sit beside it, each a module of its own:
**   disclose_pattern.c  complementary cells, so that a small cell cannot be
**                       narrowed from the published cells and the margins
**   disclose_audit.c    the attacker's linear programs that prove it
**   protect.c           rounding to a base (controlled, conventional, random)
*/
#ifndef UG_DISCLOSE_H
#define UG_DISCLOSE_H

#include "model.h"

typedef enum {
    PUB_EXACT,       /* published as counted */
    PUB_ROUNDED,     /* published rounded to a base (protect.round-to) */
    PUB_SMALL,       /* hidden: a small count (suppress.below, zeros: hide) */
    PUB_REQUESTED,   /* hidden: the layout names the cell (suppress.cells) */
    PUB_COMPLEMENT,  /* hidden so that a small cell cannot be worked out */
    PUB_WITHHELD,    /* hidden at the source (data.hidden-marks): no value */
    PUB_PARTIAL      /* margins only: sums a hidden cell, so not published */
} pub_status;

static inline bool pub_hidden(pub_status s)
{
    return s >= PUB_SMALL;
}

typedef struct {
    ug_dec value;      /* the published value; 0 whenever hidden */
    pub_status status;
} pub_cell;

typedef struct pub_table {
    size_t ngroups, ncats;
    pub_cell *cells;        /* [g * ncats + i] */
    pub_cell *group_totals; /* [g] */
    pub_cell *cat_totals;   /* [i] */
    pub_cell grand;
    size_t nhidden, nsmall, ncomplement;
    /* what was done, for the key, the notes and the table's status column */
    ug_dec below;           /* 0: no threshold */
    bool zeros_hidden, margins_published, complement;
    bool rounded;
    ug_dec round_to;
    const char *small_label; /* the layout's label, or "fewer than 10" */
    const char *other_label; /* "not shown" */
    char small_default[64];  /* small_label when the layout gives none */
} pub_table;

/* The published table of a chart. Fails with UG_EDATA at the cell's count when
** a small cell cannot be protected with the margins published. */
ug_status disclose_chart(const ug_chart *c, pub_table **out, ug_error *err);
/* Every cell exact: the analyst's internal view (tally --internal). */
ug_status disclose_internal(const ug_chart *c, pub_table **out, ug_error *err);
void pub_table_free(pub_table *t);

static inline const pub_cell *pub_at(const pub_table *t, size_t g, size_t i)
{
    return &t->cells[g * t->ncats + i];
}

/* "exact", "rounded", "small", "requested", "complement", "withheld",
** "partial": the status column of the published table. */
const char *pub_status_name(pub_status s);
/* The placeholder text of a hidden status: small cells say their range. */
const char *pub_placeholder(const pub_table *t, pub_status s);

/* ---- the table as the solvers see it ------------------------------------ */

/* A two-way table, rows = groups, columns = categories. rows == 1 means a
** chart without groups: its only margin is the grand total (a column's total
** would be the cell itself). */
typedef struct {
    size_t rows, cols;
    const ug_dec *raw;          /* what was counted [r * cols + c]; withheld: 0 */
    const ug_dec *published;    /* each cell's published value; hidden: its value
                                   before hiding is NOT here — 0 for small,
                                   requested and withheld cells, the published
                                   (exact or rounded) value for candidates and
                                   complements */
    const pub_status *status;   /* per cell */
    ug_dec lo, hi;              /* a small cell lies in [lo, hi] (its placeholder) */
    ug_dec complement_floor;    /* a complementary cell is known to be >= this */
    ug_dec slack;               /* a rounded cell's raw value lies within slack
                                   of its published value; 0: nothing rounded */
    bool margins_published;     /* raw row, column and grand totals are public */
} disclose_grid;

/* The solvers' view of a chart's table t (raw counts from the model,
** statuses and published values from t). The arrays belong to *owned, which
** disclose_grid_release frees. */
ug_status disclose_grid_of(const ug_chart *c, const pub_table *t, disclose_grid *g,
                           void **owned, ug_error *err);
void disclose_grid_release(void *owned);

/* ---- disclose_audit.c: the attacker's linear programs ----------------------
** For each PUB_SMALL cell, the least and greatest value it can take in any
** table consistent with what is public: exact cells fixed, rounded cells within
** slack of their published value (and >= 0), small cells in [lo, hi],
** complementary cells >= complement_floor, requested and withheld cells >= 0,
** and, with margins published, every row, column and the grand total equal to
** its raw sum (withheld cells counted as 0). Solved with GLPK's simplex, one
** problem per connected block of unknown cells, warm-started between cells. */
typedef struct {
    size_t cell;        /* r * cols + c */
    double min, max;
} disclose_interval;

/* out has room for rows * cols entries; *n gets the number written (one per
** small cell, in row-major order). */
ug_status disclose_audit(const disclose_grid *g, disclose_interval *out, size_t *n,
                         ug_error *err);
/* true when [min, max] reaches both ends of [lo, hi] (to 1e-6). */
bool disclose_interval_covers(const disclose_grid *g, const disclose_interval *iv);

/* ---- disclose_pattern.c: complementary suppression -------------------------
** Marks further cells PUB_COMPLEMENT so that, with the margins published,
** every small cell can move across its whole range [lo, hi] while every other
** small cell stays put: a sufficient condition that reads only statuses and
** published values, never a hidden value, so the pattern cannot leak one.
** Chooses few cells, then a small hidden total, deterministically: for each
** small cell the cheapest cycle of hidden cells through it (a shortest path
** between its row and its column). On UG_EDATA *stuck is the small cell that
** could not be protected. */
ug_status disclose_complement(const disclose_grid *g, pub_status *status,
                              size_t *stuck, ug_error *err);

#endif
