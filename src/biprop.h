/*
** Biproportional apportionment of a table (FORMAT.md §7): given whole row
** and column totals, whole cells round(w_ij / (d_i e_j)) that add up to both.
** Pure arithmetic, exact, no I/O; knows nothing of layouts or charts.
*/
#ifndef UG_BIPROP_H
#define UG_BIPROP_H

#include "ug.h"

typedef struct {
    size_t nrows, ncols;
    const ug_i128 *w;    /* [i * ncols + j] >= 0 (scaled counts) */
    const long *row_sum; /* the icons each row must get */
    const long *col_sum; /* the icons each column must get; same total */
} biprop_problem;

typedef struct {
    long *icons;          /* [i * ncols + j] */
    ug_dec *row_div;      /* d_i / d_0, rounded to six places (so row 0 is 1) */
    ug_dec *col_div;      /* e_j * d_0, rounded to six places: counts per icon */
    size_t ties;          /* cells where an equally valid apportionment gave
                             another value: the tie rule chose */
    size_t stuck_row;     /* UG_EDATA: a row that cannot get its icons */
    unsigned long long steps; /* exact comparisons made */
} biprop_result;

/* Fills *out (freed with biprop_result_free, also on failure). UG_EDATA:
** no apportionment with these totals exists (out->stuck_row says where it
** was found); UG_ELIMIT: the exact divisors grew past BIPROP_BITS, or the
** table needed more than BIPROP_STEPS comparisons (out->steps says). Every
** row and column must have a positive weight somewhere. */
ug_status biprop_apportion(const biprop_problem *p, biprop_result *out);
void biprop_result_free(biprop_result *r);

/* Width of the exact numbers the divisors are kept in, and the most exact
** comparisons one table may take. */
#define BIPROP_BITS 4096
#define BIPROP_STEPS 10000000ULL

#endif
