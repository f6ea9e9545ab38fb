/*
** Rounding to a base (FORMAT.md §4, protect:): a two-way table of counts ->
** the same table with every cell and margin a multiple of the base.
**
** A table here is a list of values: the cells row-major, then the row totals,
** the column totals and the grand total (a table without groups, rows == 1,
** has only the grand total). Every value v is written v = q * base + r with
** 0 <= r < base, exactly, in the 10^-6 units of ug_dec. All three methods then
** make one decision per value: down to q * base or up to (q + 1) * base, and a
** value with r == 0 is never moved (zero-restricted rounding, Hundepool et al.,
** Statistical Disclosure Control, ch. 5). Only the way up or down is chosen
** differs:
**
**   conventional  up when 2r >= base: nearest multiple, halves up.
**   random        up with probability r / base (unbiased: the expected
**                 rounded value is the raw one). The generator is SplitMix64,
**                 seeded by the rule; the values draw in list order.
**   controlled    an integer program (Cox, "A constructive procedure for
**                 unbiased controlled rounding", JASA 82, 1987, and the
**                 handbook above): a binary "up" per value that is not a
**                 multiple, every total equal to the sum of its parts after
**                 rounding, minimising the sum of |rounded - raw|.
**
** The controlled program is written in units of the base. A total's rounded
** value (q_t + u_t) base must equal the sum of its parts' (q_p + u_p) base, so
**     sum u_p - u_t = q_t - sum q_p,
** integer coefficients and a small integer right-hand side; and |rounded -
** raw| is r when down, base - r when up, so the objective is the constant sum
** of r plus u (base - 2r) / base for each value. Every variable appears in at
** most two constraints, once with +1 and (after negating the column rows) once
** with -1: the matrix is a network matrix, totally unimodular, so the LP
** relaxation's optimum is already integral and GLPK's branch and bound ends at
** its root (Cox shows a solution always exists for two-way tables). GLPK's
** answer is then checked in exact arithmetic before use.
*/
#include <assert.h>
#include <glpk.h>

#include "protect.h"

__extension__ typedef unsigned __int128 ug_u128;

/* One sum of the table: values[total] = the sum of values[first + m * step]
** for m < n. */
typedef struct {
    size_t total, first, step, n;
} sum_rule;

typedef struct {
    size_t rows, cols, ncell, nval, nsum;
    ug_i128 base;
    ug_i128 *raw;      /* nval values: cells, row totals, column totals, grand */
    unsigned char *up; /* nval decisions: 1 = up to the next multiple */
} table;

static bool has_margins(const table *t) { return t->rows > 1; }

/* Rows first, then columns, then the grand total: in that order each sum's
** parts are known before the sum itself (the grand total adds row totals). */
static sum_rule rule_at(const table *t, size_t c)
{
    size_t rows = t->rows, cols = t->cols, grand = t->nval - 1;
    if (!has_margins(t))
        return (sum_rule){grand, 0, 1, t->ncell};
    if (c < rows)
        return (sum_rule){t->ncell + c, c * cols, 1, cols};
    if (c < rows + cols)
        return (sum_rule){t->ncell + rows + (c - rows), c - rows, cols, rows};
    return (sum_rule){grand, t->ncell, 1, rows};
}

static ug_i128 rem_of(const table *t, size_t k) { return t->raw[k] % t->base; }

static ug_i128 rounded(const table *t, size_t k)
{
    return t->raw[k] - rem_of(t, k) + (t->up[k] ? t->base : 0);
}

static ug_status out_of_memory(ug_mark where, ug_error *err)
{
    return ug_fail(err, UG_ENOMEM, where, "out of memory");
}

/* Raw cells (skipped ones as 0) and every margin as the sum of its parts. */
static void fill_raw(table *t, const ug_dec *cells, const bool *skip)
{
    for (size_t k = 0; k < t->ncell; k++) {
        assert(skip[k] || cells[k].v >= 0); /* counts are never negative */
        t->raw[k] = skip[k] ? 0 : cells[k].v;
    }
    for (size_t c = 0; c < t->nsum; c++) {
        sum_rule s = rule_at(t, c);
        ug_i128 sum = 0;
        for (size_t m = 0; m < s.n; m++)
            sum += t->raw[s.first + m * s.step];
        t->raw[s.total] = sum;
    }
}

static ug_status table_init(table *t, size_t rows, size_t cols, ug_i128 base,
                            ug_mark where, ug_error *err)
{
    *t = (table){.rows = rows, .cols = cols, .base = base};
    /* The model's limits bound a chart's table; they also keep every count
    ** below in range of size_t and of GLPK's int indices. */
    if (rows > UG_MAX_GROUPS || cols > UG_MAX_CATEGORIES)
        return ug_fail(err, UG_ELIMIT, where,
                       "a table of %zu x %zu is larger than %d x %d, the largest rounded",
                       rows, cols, UG_MAX_GROUPS, UG_MAX_CATEGORIES);
    t->ncell = rows * cols;
    t->nval = t->ncell + (rows > 1 ? rows + cols : 0) + 1;
    t->nsum = rows > 1 ? rows + cols + 1 : 1;
    t->raw = ug_malloc(t->nval * sizeof *t->raw);
    t->up = ug_calloc(t->nval, 1);
    if (!t->raw || !t->up)
        return out_of_memory(where, err);
    return UG_OK;
}

static void table_free(table *t)
{
    ug_free(t->raw);
    ug_free(t->up);
}

/* ---- conventional ------------------------------------------------------- */

static void round_conventional(table *t)
{
    for (size_t k = 0; k < t->nval; k++) {
        ug_i128 r = rem_of(t, k);
        t->up[k] = r != 0 && 2 * r >= t->base;
    }
}

/* ---- random ------------------------------------------------------------- */

/* SplitMix64: Steele, Lea & Flood, "Fast splittable pseudorandom number
** generators", OOPSLA 2014; constants as in Vigna's public-domain
** splitmix64.c (prng.di.unimi.it). Small, fast, and every 64-bit seed gives
** a full-period stream. */
static uint64_t splitmix64(uint64_t *state)
{
    uint64_t z = (*state += 0x9E3779B97F4A7C15u);
    z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9u;
    z = (z ^ (z >> 27)) * 0x94D049BB133111EBu;
    return z ^ (z >> 31);
}

/* Uniform in [0, n), n > 0, without modulo bias: draw as many bits as n - 1
** has (two words when n exceeds 2^64: bases above about 1.8 * 10^13) and
** reject draws >= n, which happens less than half the time. */
static ug_i128 uniform_below(uint64_t *state, ug_i128 n)
{
    ug_u128 limit = (ug_u128)(n - 1), mask = 0;
    while (mask < limit)
        mask = (mask << 1) | 1;
    for (;;) {
        ug_u128 u = splitmix64(state);
        if (mask > UINT64_MAX)
            u = (u << 64) | splitmix64(state);
        u &= mask;
        if (u < (ug_u128)n)
            return (ug_i128)u;
    }
}

/* A value whose remainder is r goes up when a uniform draw in [0, base) falls
** below r: probability exactly r / base. Multiples stay and draw nothing. */
static void round_random(table *t, unsigned long long seed)
{
    uint64_t state = seed;
    for (size_t k = 0; k < t->nval; k++) {
        ug_i128 r = rem_of(t, k);
        t->up[k] = r != 0 && uniform_below(&state, t->base) < r;
    }
}

/* ---- controlled --------------------------------------------------------- */

typedef struct {
    int *col;           /* GLPK column of value k; 0: a multiple, no variable */
    int *ia, *ja;       /* the constraint matrix, GLPK's 1-based triplets */
    double *ar;
    int nvar, nnz;
} ilp;

static void ilp_free(ilp *p)
{
    ug_free(p->col);
    ug_free(p->ia);
    ug_free(p->ja);
    ug_free(p->ar);
}

/* A variable per value that is not a multiple; at most two matrix entries
** each (its own sum, and the sum it is a part of). */
static ug_status ilp_alloc(const table *t, ilp *p, ug_mark where, ug_error *err)
{
    *p = (ilp){0};
    p->col = ug_calloc(t->nval, sizeof *p->col);
    size_t cap = 2 * t->nval + 1;
    p->ia = ug_malloc(cap * sizeof *p->ia);
    p->ja = ug_malloc(cap * sizeof *p->ja);
    p->ar = ug_malloc(cap * sizeof *p->ar);
    if (!p->col || !p->ia || !p->ja || !p->ar)
        return out_of_memory(where, err);
    for (size_t k = 0; k < t->nval; k++)
        if (rem_of(t, k))
            p->col[k] = ++p->nvar;
    return UG_OK;
}

static void add_entry(ilp *p, int row, size_t k, double a)
{
    if (!p->col[k])
        return;
    p->nnz++;
    p->ia[p->nnz] = row;
    p->ja[p->nnz] = p->col[k];
    p->ar[p->nnz] = a;
}

/* Constraint c + 1: sum of the parts' ups - the total's up = q_t - sum q_p. */
static void add_sum(glp_prob *lp, ilp *p, const table *t, size_t c)
{
    sum_rule s = rule_at(t, c);
    ug_i128 rhs = t->raw[s.total] / t->base;
    for (size_t m = 0; m < s.n; m++) {
        size_t k = s.first + m * s.step;
        rhs -= t->raw[k] / t->base;
        add_entry(p, (int)c + 1, k, 1.0);
    }
    add_entry(p, (int)c + 1, s.total, -1.0);
    glp_set_row_bnds(lp, (int)c + 1, GLP_FX, (double)rhs, (double)rhs);
}

static void build(glp_prob *lp, ilp *p, const table *t)
{
    glp_set_obj_dir(lp, GLP_MIN);
    glp_add_rows(lp, (int)t->nsum);
    glp_add_cols(lp, p->nvar);
    for (size_t k = 0; k < t->nval; k++) {
        if (!p->col[k])
            continue;
        ug_i128 r = rem_of(t, k);
        glp_set_col_kind(lp, p->col[k], GLP_BV);
        glp_set_obj_coef(lp, p->col[k], (double)(t->base - 2 * r) / (double)t->base);
    }
    for (size_t c = 0; c < t->nsum; c++)
        add_sum(lp, p, t, c);
    glp_load_matrix(lp, p->nnz, p->ia, p->ja, p->ar);
}

/* GLPK works in doubles: accept its answer only if every sum holds exactly. */
static bool adds_up(const table *t)
{
    for (size_t c = 0; c < t->nsum; c++) {
        sum_rule s = rule_at(t, c);
        ug_i128 sum = 0;
        for (size_t m = 0; m < s.n; m++)
            sum += rounded(t, s.first + m * s.step);
        if (sum != rounded(t, s.total))
            return false;
    }
    return true;
}

static ug_status no_solution(const table *t, const char *why, ug_mark where,
                             ug_error *err)
{
    char b[48];
    ug_dec_format((ug_dec){t->base}, b);
    return ug_fail(err, UG_EDATA, where,
                   "controlled rounding to base %s of a %zu x %zu table failed: %s",
                   b, t->rows, t->cols, why);
}

/* The LP relaxation first, by the dual simplex, then branch and bound from
** its basis, which ends at the root: the matrix is totally unimodular, so the
** relaxation's optimum is integral. This is five times faster on a 1000 x 12
** table than glp_intopt's own presolver, whose primal simplex stalls on the
** many degenerate vertices of rounding problems (1.5 s against 0.3 s).
** Messages off; GLPK's terminal switch is process-wide, so it is put back. */
static ug_status solve(glp_prob *lp, const table *t, ug_mark where, ug_error *err)
{
    glp_smcp sm;
    glp_init_smcp(&sm);
    sm.meth = GLP_DUALP;
    sm.msg_lev = GLP_MSG_OFF;
    glp_iocp parm;
    glp_init_iocp(&parm);
    parm.msg_lev = GLP_MSG_OFF;
    int was = glp_term_out(GLP_OFF);
    int rc = glp_simplex(lp, &sm);
    if (rc == 0 && glp_get_status(lp) == GLP_OPT)
        rc = glp_intopt(lp, &parm);
    glp_term_out(was);
    if (rc != 0 || glp_mip_status(lp) != GLP_OPT)
        return no_solution(t, "GLPK found no additive rounding", where, err);
    return UG_OK;
}

static ug_status round_controlled(table *t, ug_mark where, ug_error *err)
{
    ilp p;
    ug_status st = ilp_alloc(t, &p, where, err);
    if (st || p.nvar == 0) /* all multiples: every sum already holds */
        goto out;
    glp_prob *lp = glp_create_prob();
    build(lp, &p, t);
    st = solve(lp, t, where, err);
    for (size_t k = 0; !st && k < t->nval; k++)
        t->up[k] = p.col[k] && glp_mip_col_val(lp, p.col[k]) > 0.5;
    glp_delete_prob(lp);
    if (!st && !adds_up(t))
        st = no_solution(t, "GLPK's rounding does not add up", where, err);
out:
    ilp_free(&p);
    return st;
}

/* ---- the interface ------------------------------------------------------ */

static void write_out(const table *t, ug_dec *cells_out, ug_dec *row_out,
                      ug_dec *col_out, ug_dec *grand_out)
{
    for (size_t k = 0; k < t->ncell; k++)
        cells_out[k].v = rounded(t, k);
    grand_out->v = rounded(t, t->nval - 1);
    if (!has_margins(t)) {
        if (row_out && t->rows == 1) /* the only row's total is the grand total */
            row_out[0] = *grand_out;
        return;
    }
    for (size_t i = 0; i < t->rows; i++)
        row_out[i].v = rounded(t, t->ncell + i);
    for (size_t j = 0; j < t->cols; j++)
        col_out[j].v = rounded(t, t->ncell + t->rows + j);
}

ug_status protect_round(const ug_dec *cells, const bool *skip, size_t rows,
                        size_t cols, const protect_rule *rule, ug_dec *cells_out,
                        ug_dec *row_out, ug_dec *col_out, ug_dec *grand_out,
                        ug_mark where, ug_error *err)
{
    assert(rule->base.v > 0);
    table t;
    ug_status st = table_init(&t, rows, cols, rule->base.v, where, err);
    if (st)
        goto out;
    fill_raw(&t, cells, skip);
    switch (rule->method) {
    case PROTECT_CONVENTIONAL: round_conventional(&t); break;
    case PROTECT_RANDOM: round_random(&t, rule->seed); break;
    case PROTECT_CONTROLLED: st = round_controlled(&t, where, err); break;
    }
    if (!st)
        write_out(&t, cells_out, row_out, col_out, grand_out);
out:
    table_free(&t);
    return st;
}

ug_dec protect_slack(const protect_rule *rule)
{
    /* Remainders are whole units (10^-6): rounding down moves at most r =
    ** base - unit; conventional moves at most base / 2, to the unit below when
    ** base is an odd number of units (down only when 2r < base, up only when
    ** base - r <= base / 2). */
    if (rule->method == PROTECT_CONVENTIONAL)
        return (ug_dec){rule->base.v / 2};
    return (ug_dec){rule->base.v - 1};
}
