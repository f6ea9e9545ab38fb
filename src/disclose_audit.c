/*
** Disclosure audit: a published table -> for each small cell, the least and
** greatest value an attacker can prove it has (disclose.h).
**
** The attack is the classic one of the cell-suppression literature: every
** published figure is a linear constraint on the hidden ones, so the range a
** hidden cell can take is found by minimising and then maximising it over all
** tables consistent with what is public (the "feasibility interval", Hundepool
** et al., Handbook on Statistical Disclosure Control, 2nd ed. 2024, §4.2;
** Fischetti and Salazar 2000 for the general statement). The variables are the
** cells that are not published exactly, each with what the attacker knows of
** it: a rounded cell lies within slack of its published value, a small cell in
** its placeholder's [lo, hi], a complement at or above the complement floor,
** anything else at or above 0. With the margins published, every row and (in a
** table with more than one row) every column sums to its raw total; the grand
** total is then implied. Exact cells enter those sums as constants.
**
** Speed comes from two facts. First, the equations only ever link cells in the
** same row or column, so the unknown cells fall into connected blocks whose
** linear programs share nothing; a block without a small cell needs no solving
** at all, and without margins every small cell is alone and its interval is
** just [lo, hi]. Second, within a block only the objective changes from one
** solve to the next, so the optimal basis of the last solve is still feasible
** for the next one: the primal simplex starts there (presolve off, which would
** throw the basis away) and usually needs a handful of pivots. And every
** vertex it stops at is a table the attacker cannot rule out: a small cell
** that vertex leaves at the end of its range has reached that end, so about
** half the solves are never needed (647 instead of 1,290 on the 1,000 x 12
** table of the tests).
**
** GLPK calls abort() when it runs out of memory itself; only our own
** allocations fail cleanly. No GLPK process-wide setting is changed: terminal
** output is turned off per solve (msg_lev), not with glp_term_out.
*/
#include <assert.h>
#include <glpk.h>
#include <limits.h>
#include <math.h>
#include <pthread.h>
#include <stdlib.h>

#include "disclose.h"

/* Everything one audit allocates, freed in one place. */
typedef struct {
    const disclose_grid *g;
    size_t ncells;
    size_t *parent;   /* union-find over cells: a block is a tree */
    size_t *start;    /* [root .. root + 1): the block's slice of order */
    size_t *order;    /* unknown cells, grouped by block, row-major inside */
    int *eq_row;      /* GLPK row number of row r's equation; 0: not in block */
    int *eq_col;
    double *rhs_row;  /* raw total minus the exact cells, per row */
    double *rhs_col;
    int *ia, *ja;     /* the constraint matrix, GLPK's 1-based triplets */
    double *ar;
} audit;

static bool unknown(pub_status s)
{
    return s != PUB_EXACT;
}

/* What the attacker knows of one unknown cell alone; *hi = HUGE_VAL when
** nothing bounds it above. */
static void cell_bounds(const disclose_grid *g, size_t k, double *lo, double *hi)
{
    double pub = ug_dec_to_double(g->published[k]);
    double slack = ug_dec_to_double(g->slack);
    switch (g->status[k]) {
    case PUB_ROUNDED:
        *lo = fmax(0.0, pub - slack);
        *hi = pub + slack;
        return;
    case PUB_SMALL:
        *lo = ug_dec_to_double(g->lo);
        *hi = ug_dec_to_double(g->hi);
        return;
    case PUB_COMPLEMENT:
        *lo = ug_dec_to_double(g->complement_floor);
        *hi = HUGE_VAL;
        return;
    default:
        /* PUB_PARTIAL names margins only; a cell with it is a caller's bug. */
        assert(g->status[k] == PUB_REQUESTED || g->status[k] == PUB_WITHHELD);
        *lo = 0.0;
        *hi = HUGE_VAL;
        return;
    }
}

/* ---- blocks -------------------------------------------------------------- */

static size_t find(size_t *parent, size_t k)
{
    while (parent[k] != k) {
        parent[k] = parent[parent[k]]; /* path halving keeps the trees flat */
        k = parent[k];
    }
    return k;
}

static void join(size_t *parent, size_t a, size_t b)
{
    a = find(parent, a);
    b = find(parent, b);
    /* The smaller index becomes the root, so roots are each block's first cell. */
    if (a < b)
        parent[b] = a;
    else
        parent[a] = b;
}

/* Link the unknown cells of one line (a row: step 1; a column: step cols). */
static void link_line(audit *a, size_t first, size_t step, size_t len)
{
    size_t head = a->ncells;
    for (size_t i = 0; i < len; i++) {
        size_t k = first + i * step;
        if (!unknown(a->g->status[k]))
            continue;
        if (head == a->ncells)
            head = k;
        else
            join(a->parent, head, k);
    }
}

/* Equations are the only links, so without margins no cell is linked. */
static void link_blocks(audit *a)
{
    const disclose_grid *g = a->g;
    for (size_t k = 0; k < a->ncells; k++)
        a->parent[k] = k;
    if (!g->margins_published)
        return;
    for (size_t r = 0; r < g->rows; r++)
        link_line(a, r * g->cols, 1, g->cols);
    if (g->rows > 1)
        for (size_t c = 0; c < g->cols; c++)
            link_line(a, c, g->cols, g->rows);
}

/* Counting sort of the unknown cells by root: each block a slice of order,
** its cells in row-major order because the scan is. */
static void group_blocks(audit *a)
{
    for (size_t k = 0; k <= a->ncells; k++)
        a->start[k] = 0;
    for (size_t k = 0; k < a->ncells; k++)
        if (unknown(a->g->status[k]))
            a->start[find(a->parent, k) + 1]++;
    for (size_t k = 0; k < a->ncells; k++)
        a->start[k + 1] += a->start[k];
    for (size_t k = 0; k < a->ncells; k++)
        if (unknown(a->g->status[k]))
            a->order[a->start[find(a->parent, k)]++] = k;
    /* Each start[k] has moved on to start[k + 1]; shift back to the beginnings. */
    for (size_t k = a->ncells; k > 0; k--)
        a->start[k] = a->start[k - 1];
    a->start[0] = 0;
}

/* ---- right-hand sides ---------------------------------------------------- */

/* Raw total of a line (withheld cells count 0) less its exact cells: what the
** line's unknown cells add up to. Summed exactly, converted once. */
static double line_rhs(const disclose_grid *g, size_t first, size_t step, size_t len)
{
    ug_i128 sum = 0;
    for (size_t i = 0; i < len; i++) {
        size_t k = first + i * step;
        if (g->status[k] != PUB_WITHHELD)
            sum += g->raw[k].v;
        if (g->status[k] == PUB_EXACT)
            sum -= g->published[k].v;
    }
    return ug_dec_to_double((ug_dec){sum});
}

static void compute_rhs(audit *a)
{
    const disclose_grid *g = a->g;
    for (size_t r = 0; r < g->rows; r++)
        a->rhs_row[r] = line_rhs(g, r * g->cols, 1, g->cols);
    for (size_t c = 0; c < g->cols; c++)
        a->rhs_col[c] = line_rhs(g, c, g->cols, g->rows);
}

/* ---- one block's linear program ------------------------------------------ */

static ug_status inconsistent(ug_error *err)
{
    return ug_fail(err, UG_EDATA, (ug_mark){0}, "the published table is inconsistent");
}

/* Give row r (or column c) of the table a GLPK row, once per block. */
static int equation(glp_prob *lp, int *slot, double rhs)
{
    if (*slot == 0) {
        *slot = glp_add_rows(lp, 1);
        glp_set_row_bnds(lp, *slot, GLP_FX, rhs, rhs);
    }
    return *slot;
}

static void set_bounds(glp_prob *lp, int j, double lo, double hi)
{
    if (hi == HUGE_VAL)
        glp_set_col_bnds(lp, j, GLP_LO, lo, 0.0);
    else if (lo == hi)
        glp_set_col_bnds(lp, j, GLP_FX, lo, lo);
    else
        glp_set_col_bnds(lp, j, GLP_DB, lo, hi);
}

/* Columns = the block's cells (GLPK column j is order[b + j - 1]); rows = the
** equations of the lines they lie on. Fails only on crossed bounds. */
static ug_status build_block(audit *a, glp_prob *lp, const size_t *cells, int n,
                             ug_error *err)
{
    const disclose_grid *g = a->g;
    bool cols_too = g->rows > 1;
    int ne = 0;
    glp_add_cols(lp, n);
    for (int j = 1; j <= n; j++) {
        size_t k = cells[j - 1], r = k / g->cols, c = k % g->cols;
        double lo, hi;
        cell_bounds(g, k, &lo, &hi);
        if (lo > hi)
            return inconsistent(err);
        set_bounds(lp, j, lo, hi);
        ne++;
        a->ia[ne] = equation(lp, &a->eq_row[r], a->rhs_row[r]);
        a->ja[ne] = j, a->ar[ne] = 1.0;
        if (cols_too) {
            ne++;
            a->ia[ne] = equation(lp, &a->eq_col[c], a->rhs_col[c]);
            a->ja[ne] = j, a->ar[ne] = 1.0;
        }
    }
    glp_load_matrix(lp, ne, a->ia, a->ja, a->ar);
    return UG_OK;
}

/* Forget the block's equations, so the next block numbers its own. */
static void clear_equations(audit *a, const size_t *cells, int n)
{
    for (int j = 0; j < n; j++) {
        a->eq_row[cells[j] / a->g->cols] = 0;
        a->eq_col[cells[j] % a->g->cols] = 0;
    }
}

/* One optimisation of column j in direction dir; the basis of the previous
** solve is the start. A solver failure gets one more try from a fresh basis. */
static ug_status optimise(glp_prob *lp, int j, int dir, double *out, ug_error *err)
{
    glp_smcp parm;
    glp_init_smcp(&parm);
    parm.msg_lev = GLP_MSG_OFF;
    parm.presolve = GLP_OFF;
    parm.meth = GLP_PRIMAL;
    glp_set_obj_dir(lp, dir);
    int rc = glp_simplex(lp, &parm);
    if (rc != 0) {
        glp_adv_basis(lp, 0);
        rc = glp_simplex(lp, &parm);
    }
    if (rc != 0)
        return ug_fail(err, UG_EDATA, (ug_mark){0},
                       "the disclosure audit could not be solved (GLPK code %d)", rc);
    switch (glp_get_status(lp)) {
    case GLP_OPT:
        *out = glp_get_col_prim(lp, j);
        return UG_OK;
    case GLP_UNBND:
        *out = dir == GLP_MAX ? HUGE_VAL : -HUGE_VAL;
        return UG_OK;
    case GLP_NOFEAS:
        return inconsistent(err);
    default:
        return ug_fail(err, UG_EDATA, (ug_mark){0},
                       "the disclosure audit could not be solved (GLPK status %d)",
                       glp_get_status(lp));
    }
}

/* The slot of cell k in out, which is sorted by cell. */
static disclose_interval *slot_of(disclose_interval *out, size_t n, size_t k)
{
    size_t lo = 0, hi = n;
    while (lo < hi) {
        size_t mid = lo + (hi - lo) / 2;
        if (out[mid].cell < k)
            lo = mid + 1;
        else
            hi = mid;
    }
    assert(lo < n && out[lo].cell == k);
    return &out[lo];
}

/* A vertex the simplex stops at is a table the attacker cannot rule out, so a
** small cell it leaves nonbasic at a bound has reached that end of its range:
** its min (or max) needs no solve of its own. The basis status says so
** exactly, with no tolerance to choose. */
static void harvest(const audit *a, glp_prob *lp, const size_t *cells, int n,
                    disclose_interval *out, size_t nout)
{
    if (glp_get_prim_stat(lp) != GLP_FEAS)
        return;
    for (int j = 1; j <= n; j++) {
        if (a->g->status[cells[j - 1]] != PUB_SMALL)
            continue;
        int stat = glp_get_col_stat(lp, j);
        disclose_interval *iv = slot_of(out, nout, cells[j - 1]);
        if (stat == GLP_NL || stat == GLP_NS)
            iv->min = glp_get_col_lb(lp, j);
        if (stat == GLP_NU || stat == GLP_NS)
            iv->max = glp_get_col_ub(lp, j);
    }
}

/* Minimise and maximise each small cell of the block in turn, skipping the
** ends an earlier vertex has already reached (NAN: not known yet). */
static ug_status solve_smalls(audit *a, glp_prob *lp, const size_t *cells, int n,
                              disclose_interval *out, size_t nout, ug_error *err)
{
    for (int j = 1; j <= n; j++) {
        if (a->g->status[cells[j - 1]] != PUB_SMALL)
            continue;
        disclose_interval *iv = slot_of(out, nout, cells[j - 1]);
        iv->min = iv->max = NAN;
    }
    ug_status st = UG_OK;
    for (int j = 1; j <= n && !st; j++) {
        if (a->g->status[cells[j - 1]] != PUB_SMALL)
            continue;
        disclose_interval *iv = slot_of(out, nout, cells[j - 1]);
        glp_set_obj_coef(lp, j, 1.0);
        if (isnan(iv->min) && !(st = optimise(lp, j, GLP_MIN, &iv->min, err)))
            harvest(a, lp, cells, n, out, nout);
        if (!st && isnan(iv->max) && !(st = optimise(lp, j, GLP_MAX, &iv->max, err)))
            harvest(a, lp, cells, n, out, nout);
        glp_set_obj_coef(lp, j, 0.0);
    }
    return st;
}

static bool has_small(const disclose_grid *g, const size_t *cells, int n)
{
    for (int j = 0; j < n; j++)
        if (g->status[cells[j]] == PUB_SMALL)
            return true;
    return false;
}

/* GLPK keeps its environment (its memory pool and settings) in thread-local
** storage: "TLS (thread local storage class specifier) option was added"
** (GLPK 4.61's ChangeLog; Debian's libglpk40 5.0 is built with it, each
** thread that solves makes one). A thread that exits without glp_free_env
** leaks its environment, so the first solve in a thread registers a key
** whose destructor frees it as the thread exits (POSIX.1-2008,
** pthread_key_create); the main thread keeps its one to the end. */
static pthread_key_t glpk_key;
static bool have_glpk_key;
static _Thread_local bool glpk_key_set;

static void free_glpk_env(void *unused)
{
    (void)unused;
    glp_free_env();
}

static void make_glpk_key(void)
{
    have_glpk_key = pthread_key_create(&glpk_key, free_glpk_env) == 0;
}

static void free_glpk_env_at_thread_exit(void)
{
    static pthread_once_t once = PTHREAD_ONCE_INIT;
    if (glpk_key_set)
        return;
    pthread_once(&once, make_glpk_key);
    /* a destructor runs only for a value that is not NULL */
    if (have_glpk_key)
        pthread_setspecific(glpk_key, &glpk_key_set);
    glpk_key_set = true;
}

static ug_status solve_block(audit *a, const size_t *cells, int n,
                             disclose_interval *out, size_t nout, ug_error *err)
{
    if (!has_small(a->g, cells, n))
        return UG_OK;
    free_glpk_env_at_thread_exit();
    glp_prob *lp = glp_create_prob();
    ug_status st = build_block(a, lp, cells, n, err);
    clear_equations(a, cells, n);
    if (!st)
        st = solve_smalls(a, lp, cells, n, out, nout, err);
    glp_delete_prob(lp);
    return st;
}

/* ---- the audit ------------------------------------------------------------ */

static void audit_free(audit *a)
{
    ug_free(a->parent);
    ug_free(a->start);
    ug_free(a->order);
    ug_free(a->eq_row);
    ug_free(a->eq_col);
    ug_free(a->rhs_row);
    ug_free(a->rhs_col);
    ug_free(a->ia);
    ug_free(a->ja);
    ug_free(a->ar);
}

/* GLPK counts in int: 1 + two entries per cell must fit. */
static ug_status audit_init(audit *a, const disclose_grid *g, ug_error *err)
{
    *a = (audit){.g = g, .ncells = g->rows * g->cols};
    size_t n = a->ncells, nz = 1 + 2 * n;
    if (n > (size_t)INT_MAX / 2 - 1)
        return ug_fail(err, UG_ELIMIT, (ug_mark){0},
                       "a table of %zu cells is too large to audit", n);
    a->parent = ug_calloc(n, sizeof *a->parent);
    a->start = ug_calloc(n + 1, sizeof *a->start);
    a->order = ug_calloc(n, sizeof *a->order);
    a->eq_row = ug_calloc(g->rows, sizeof *a->eq_row);
    a->eq_col = ug_calloc(g->cols, sizeof *a->eq_col);
    a->rhs_row = ug_calloc(g->rows, sizeof *a->rhs_row);
    a->rhs_col = ug_calloc(g->cols, sizeof *a->rhs_col);
    a->ia = ug_calloc(nz, sizeof *a->ia);
    a->ja = ug_calloc(nz, sizeof *a->ja);
    a->ar = ug_calloc(nz, sizeof *a->ar);
    if (!a->parent || !a->start || !a->order || !a->eq_row || !a->eq_col ||
        !a->rhs_row || !a->rhs_col || !a->ia || !a->ja || !a->ar)
        return ug_fail(err, UG_ENOMEM, (ug_mark){0}, "out of memory");
    return UG_OK;
}

/* One entry per small cell, row-major, each first set to its own bounds:
** the answer when nothing links it to anything. */
static ug_status list_smalls(const disclose_grid *g, disclose_interval *out, size_t *n,
                             ug_error *err)
{
    double lo = ug_dec_to_double(g->lo), hi = ug_dec_to_double(g->hi);
    if (lo > hi)
        return inconsistent(err);
    for (size_t k = 0; k < g->rows * g->cols; k++)
        if (g->status[k] == PUB_SMALL)
            out[(*n)++] = (disclose_interval){k, lo, hi};
    return UG_OK;
}

static ug_status solve_all(audit *a, disclose_interval *out, size_t nout, ug_error *err)
{
    link_blocks(a);
    group_blocks(a);
    compute_rhs(a);
    ug_status st = UG_OK;
    for (size_t k = 0; k < a->ncells && !st; k++) {
        size_t b = a->start[k], e = a->start[k + 1];
        if (e > b)
            st = solve_block(a, a->order + b, (int)(e - b), out, nout, err);
    }
    return st;
}

static ug_status audit_table(const disclose_grid *g, disclose_interval *out, size_t n,
                             ug_error *err)
{
    audit a;
    ug_status st = audit_init(&a, g, err);
    if (!st)
        st = solve_all(&a, out, n, err);
    audit_free(&a);
    return st;
}

/* Without margins nothing links a small cell to anything: its bounds stand. */
ug_status disclose_audit(const disclose_grid *g, disclose_interval *out, size_t *n,
                         ug_error *err)
{
    *n = 0;
    ug_status st = list_smalls(g, out, n, err);
    if (!st && *n > 0 && g->margins_published)
        st = audit_table(g, out, *n, err);
    if (st)
        *n = 0;
    return st;
}

bool disclose_interval_covers(const disclose_grid *g, const disclose_interval *iv)
{
    return iv->min <= ug_dec_to_double(g->lo) + 1e-6 &&
           iv->max >= ug_dec_to_double(g->hi) - 1e-6;
}
