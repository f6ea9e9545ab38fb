/*
** Biproportional apportionment (FORMAT.md §7; Balinski and Demange 1989,
** REFERENCES.md §12): whole icons a_ij for a table of counts w_ij such that
** every row and every column adds up to its own given total and
**     a_ij = round(w_ij / (d_i e_j))    (standard rounding, ties at .5 free)
** for some row divisors d_i and column divisors e_j. The icons are unique
** up to ties.
**
** Tie-and-transfer. Start with d_i = 1 and each column apportioned on its
** own by Sainte-Laguë, so the columns are right and e_j exists; rows may be
** off. A cell can go up when w/(d e) sits exactly at a + 1/2 and down when
** it sits at a - 1/2: such cells keep the rounding valid either way. From a
** row with too few icons, label every row and column reachable by going up
** in a row and down in a column. Reaching a row with too many icons, move
** one icon along that path: both rows get closer to their totals and every
** column keeps its own. Reaching none, scale the labelled part (labelled
** rows' q up by the least factor lambda, labelled columns' q down by it) so
** that a new cell reaches a tie: cells inside the labelled part keep their
** q, the others move towards their bound but not past it.
**
** Why it ends. Each scaling labels at least one more row or column, so a
** search ends after at most rows + columns scalings, with a transfer or
** with no cell left that could ever tie. In that case the labelled rows have
** their counts only in labelled columns and the labelled columns their icons
** only in labelled rows; the labelled rows want more icons than those
** columns hold, so no apportionment exists. Each transfer lowers the sum of
** the rows' distances from their totals by 2, so there are fewer than N.
**
** Exactness. q is compared with (2a +- 1)/2 by cross-multiplying, and the
** divisors are fractions of whole numbers kept in lowest terms: with a
** float, a tie would be a near miss and the search would never see it. A
** scaling's factor is the ratio of two products, so the numbers grow; they
** are held in BIPROP_BITS bits and a table that needs more is refused
** (UG_ELIMIT), never rounded. Ending is not the same as ending soon: the
** searches cost up to rows x columns comparisons each, so a whole table
** may make at most BIPROP_STEPS of them (UG_ELIMIT beyond).
**
** Ties. When two apportionments are both valid (a cycle of tied cells), the
** one chosen gives the icon to the larger count, then to the row listed
** first, then to the column listed first — alloc.c's rule for one list,
** applied cell by cell in that order (lexicographically largest).
*/
#include <assert.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

#include "biprop.h"

#define LIMBS (BIPROP_BITS / 32)
#define NONE SIZE_MAX
#define ROOT (SIZE_MAX - 1)

__extension__ typedef unsigned __int128 u128;

/* ---- exact whole numbers and fractions ----------------------------------- */

typedef struct {
    uint32_t l[LIMBS]; /* little-endian limbs; l[n - 1] != 0 */
    size_t n;
} big;

typedef struct {
    big num, den;
} frac;

static void big_norm(big *a)
{
    while (a->n && !a->l[a->n - 1])
        a->n--;
}

static void big_set(big *a, u128 v)
{
    a->n = 0;
    for (; v; v >>= 32)
        a->l[a->n++] = (uint32_t)v;
}

static int big_cmp(const big *a, const big *b)
{
    if (a->n != b->n)
        return a->n < b->n ? -1 : 1;
    for (size_t k = a->n; k-- > 0;)
        if (a->l[k] != b->l[k])
            return a->l[k] < b->l[k] ? -1 : 1;
    return 0;
}

/* out may be a or b. An overflow sets *ovf and gives 0; one limb stays
** free so that doubling a remainder in big_divmod cannot overflow. */
static void big_mul(const big *a, const big *b, big *out, bool *ovf)
{
    big r;
    if (!a->n || !b->n || a->n + b->n > LIMBS - 1) {
        *ovf = *ovf || (a->n && b->n);
        out->n = 0;
        return;
    }
    r.n = a->n + b->n;
    memset(r.l, 0, r.n * sizeof r.l[0]);
    for (size_t i = 0; i < a->n; i++) {
        uint64_t carry = 0;
        for (size_t j = 0; j < b->n; j++) {
            uint64_t t = (uint64_t)a->l[i] * b->l[j] + r.l[i + j] + carry;
            r.l[i + j] = (uint32_t)t;
            carry = t >> 32;
        }
        r.l[i + b->n] = (uint32_t)carry;
    }
    big_norm(&r);
    *out = r;
}

/* a -= b, with a >= b */
static void big_sub(big *a, const big *b)
{
    int64_t borrow = 0;
    for (size_t k = 0; k < a->n; k++) {
        int64_t t = (int64_t)a->l[k] - (k < b->n ? b->l[k] : 0) - borrow;
        borrow = t < 0;
        a->l[k] = (uint32_t)(t + (borrow ? ((int64_t)1 << 32) : 0));
    }
    big_norm(a);
}

static bool big_bit(const big *a, size_t i)
{
    return i / 32 < a->n && (a->l[i / 32] >> (i % 32)) & 1;
}

static size_t big_bits(const big *a)
{
    if (!a->n)
        return 0;
    size_t b = 32 * a->n;
    for (uint32_t top = a->l[a->n - 1]; !(top & 0x80000000u); top <<= 1)
        b--;
    return b;
}

/* a = a * 2 + bit; the caller keeps a below 2^(BIPROP_BITS - 1) */
static void big_twice_plus(big *a, unsigned bit)
{
    uint32_t carry = bit;
    for (size_t k = 0; k < a->n; k++) {
        uint32_t next = a->l[k] >> 31;
        a->l[k] = (a->l[k] << 1) | carry;
        carry = next;
    }
    if (carry)
        a->l[a->n++] = carry;
}

/* q = a / b (b > 0), bit by bit: slow, but only ever run on short numbers
** and it needs no estimate to be right. rem may be NULL. */
static void big_divmod(const big *a, const big *b, big *q, big *rem)
{
    big r = {.n = 0}, quo = {.n = a->n};
    memset(quo.l, 0, a->n * sizeof quo.l[0]);
    for (size_t i = big_bits(a); i-- > 0;) {
        big_twice_plus(&r, big_bit(a, i));
        if (big_cmp(&r, b) >= 0) {
            big_sub(&r, b);
            quo.l[i / 32] |= (uint32_t)1 << (i % 32);
        }
    }
    big_norm(&quo);
    *q = quo;
    if (rem)
        *rem = r;
}

static void big_gcd(const big *x, const big *y, big *g)
{
    big a = *x, b = *y, r;
    while (b.n) {
        big_divmod(&a, &b, &r, &r);
        a = b;
        b = r;
    }
    *g = a;
}

static bool big_is_one(const big *a)
{
    return a->n == 1 && a->l[0] == 1;
}

static void frac_reduce(frac *f)
{
    big g;
    big_gcd(&f->num, &f->den, &g);
    if (big_is_one(&g))
        return;
    big_divmod(&f->num, &g, &f->num, NULL);
    big_divmod(&f->den, &g, &f->den, NULL);
}

/* x < y */
static bool frac_less(const frac *x, const frac *y, bool *ovf)
{
    big l, r;
    big_mul(&x->num, &y->den, &l, ovf);
    big_mul(&y->num, &x->den, &r, ovf);
    return big_cmp(&l, &r) < 0;
}

/* f = f * (num / den), in lowest terms */
static void frac_scale(frac *f, const big *num, const big *den, bool *ovf)
{
    big_mul(&f->num, num, &f->num, ovf);
    big_mul(&f->den, den, &f->den, ovf);
    frac_reduce(f);
}

/* a += b; a stays below LIMBS limbs as every operand here does */
static void big_add(big *a, const big *b, bool *ovf)
{
    uint64_t carry = 0;
    size_t n = a->n > b->n ? a->n : b->n;
    for (size_t k = 0; k < n; k++) {
        carry += (uint64_t)(k < a->n ? a->l[k] : 0) + (k < b->n ? b->l[k] : 0);
        a->l[k] = (uint32_t)carry;
        carry >>= 32;
    }
    a->n = n;
    if (carry && n + 1 < LIMBS)
        a->l[a->n++] = (uint32_t)carry;
    else if (carry)
        *ovf = true;
}

/* num * scale / den rounded half-up, (2 num scale + den) / (2 den), for
** showing; saturated into 126 bits. */
static ug_i128 frac_round(const frac *f, ug_i128 scale, bool *ovf)
{
    big t, s, q;
    big_set(&s, (u128)scale * 2);
    big_mul(&f->num, &s, &t, ovf);
    big_add(&t, &f->den, ovf);
    big_set(&s, 2);
    big_mul(&f->den, &s, &s, ovf);
    big_divmod(&t, &s, &q, NULL);
    if (big_bits(&q) > 126)
        return (ug_i128)1 << 126;
    ug_i128 v = 0;
    for (size_t k = q.n; k-- > 0;)
        v = (v << 32) | q.l[k];
    return v;
}

/* ---- the table ------------------------------------------------------------ */

typedef struct {
    const biprop_problem *p;
    long *a;          /* [i * ncols + j] */
    long *rs;         /* each row's icons now */
    frac *d, *e;      /* row and column divisors */
    size_t *row_par;  /* labelling tree: the column a row was reached from */
    size_t *col_par;  /* the row a column was reached from */
    size_t *queue;    /* rows as i, columns as nrows + j */
    unsigned long long steps; /* exact comparisons made, against BIPROP_STEPS */
    bool ovf;         /* numbers too long, or too many steps: give up */
} state;

/* Every exact comparison counts one step, and a whole table gives up after
** BIPROP_STEPS of them (UG_ELIMIT): at most about 5 s here, and far more
** than charts need (a 300 x 300 table of small counts took 5 x 10^5, the
** wards example 59). Steps, not seconds, so that the same table always
** gives the same answer. */
static void step(state *s, unsigned long long n)
{
    s->steps += n;
    if (s->steps > BIPROP_STEPS)
        s->ovf = true;
}

static ug_i128 weight(const state *s, size_t i, size_t j)
{
    return s->p->w[i * s->p->ncols + j];
}

static long *icon(state *s, size_t i, size_t j)
{
    return &s->a[i * s->p->ncols + j];
}

/* x = 2 w d.den e.den and y = s2 d.num e.num, so q / (s2 / 2) = x / y. */
static void products(state *s, size_t i, size_t j, long s2, big *x, big *y)
{
    big t;
    step(s, 1);
    big_set(&t, (u128)weight(s, i, j) * 2);
    big_mul(&t, &s->d[i].den, x, &s->ovf);
    big_mul(x, &s->e[j].den, x, &s->ovf);
    big_set(&t, (u128)s2);
    big_mul(&t, &s->d[i].num, y, &s->ovf);
    big_mul(y, &s->e[j].num, y, &s->ovf);
}

/* sign of q_ij - s2 / 2 */
static int q_versus(state *s, size_t i, size_t j, long s2)
{
    big x, y;
    products(s, i, j, s2, &x, &y);
    return big_cmp(&x, &y);
}

static bool can_go_up(state *s, size_t i, size_t j)
{
    return weight(s, i, j) > 0 && q_versus(s, i, j, 2 * *icon(s, i, j) + 1) == 0;
}

static bool can_go_down(state *s, size_t i, size_t j)
{
    long a = *icon(s, i, j);
    return weight(s, i, j) > 0 && a > 0 && q_versus(s, i, j, 2 * a - 1) == 0;
}

/* Row i outranks row k for the next icon of column j (w / (2a + 1) larger,
** then the larger count, then the row listed first). Products stay below
** 2^96: counts below 2^70 scaled, icons below 2^24. */
static bool outranks(state *s, size_t i, size_t k, size_t j)
{
    ug_i128 wi = weight(s, i, j), wk = weight(s, k, j);
    ug_i128 l = wi * (2 * *icon(s, k, j) + 1), r = wk * (2 * *icon(s, i, j) + 1);
    return l != r ? l > r : wi != wk ? wi > wk : i < k;
}

/* Sainte-Laguë down one column with every d_i = 1, and the smallest e_j
** that rounds it so: max w / (a + 1/2). */
static void init_column(state *s, size_t j)
{
    size_t m = s->p->nrows;
    for (long seat = 0; seat < s->p->col_sum[j] && !s->ovf; seat++) {
        step(s, 1 + m / 64); /* 128-bit products, cheaper than exact ones */
        size_t best = NONE;
        for (size_t i = 0; i < m; i++)
            if (weight(s, i, j) > 0 && (best == NONE || outranks(s, i, best, j)))
                best = i;
        assert(best != NONE);
        (*icon(s, best, j))++;
    }
    size_t top = NONE;
    for (size_t i = 0; i < m; i++)
        if (weight(s, i, j) > 0 && (top == NONE || outranks(s, i, top, j)))
            top = i;
    assert(top != NONE);
    big_set(&s->e[j].num, (u128)weight(s, top, j) * 2);
    big_set(&s->e[j].den, (u128)(2 * *icon(s, top, j) + 1));
    frac_reduce(&s->e[j]);
}

/* ---- tie and transfer ----------------------------------------------------- */

static void label_row(state *s, size_t k, size_t from, size_t *tail)
{
    s->row_par[k] = from;
    s->queue[(*tail)++] = k;
}

static void label_col(state *s, size_t j, size_t from, size_t *tail)
{
    s->col_par[j] = from;
    s->queue[(*tail)++] = s->p->nrows + j;
}

/* Label everything reachable through tied cells; the first row reached
** that has too many icons, or NONE. */
static size_t grow(state *s)
{
    size_t m = s->p->nrows, n = s->p->ncols, head = 0, tail = 0;
    for (size_t i = 0; i < m; i++)
        if (s->row_par[i] != NONE)
            s->queue[tail++] = i;
    for (size_t j = 0; j < n; j++)
        if (s->col_par[j] != NONE)
            s->queue[tail++] = m + j;
    while (head < tail && !s->ovf) {
        size_t v = s->queue[head++];
        if (v < m) {
            for (size_t j = 0; j < n; j++)
                if (s->col_par[j] == NONE && can_go_up(s, v, j))
                    label_col(s, j, v, &tail);
            continue;
        }
        for (size_t k = 0; k < m; k++) {
            if (s->row_par[k] != NONE || !can_go_down(s, k, v - m))
                continue;
            label_row(s, k, v - m, &tail);
            if (s->rs[k] > s->p->row_sum[k])
                return k;
        }
    }
    return NONE;
}

/* One icon from row k back along the labelling tree to the root row. */
static void transfer(state *s, size_t k)
{
    size_t row = k;
    s->rs[k]--;
    while (s->row_par[row] != ROOT) {
        size_t col = s->row_par[row];
        (*icon(s, row, col))--;
        row = s->col_par[col];
        (*icon(s, row, col))++;
    }
    s->rs[row]++;
}

static void consider(frac *best, bool *found, const big *num, const big *den, bool *ovf)
{
    frac c = {*num, *den};
    if (!*found || frac_less(&c, best, ovf)) {
        *best = c;
        *found = true;
    }
}

/* The least factor lambda > 1 that brings a cell across the labelled
** part's edge to a tie; false when no cell ever can. */
static bool smallest_step(state *s, frac *lambda)
{
    size_t m = s->p->nrows, n = s->p->ncols;
    bool found = false;
    big x, y;
    for (size_t i = 0; i < m; i++)
        for (size_t j = 0; j < n; j++) {
            bool ri = s->row_par[i] != NONE, cj = s->col_par[j] != NONE;
            long a = *icon(s, i, j);
            if (weight(s, i, j) == 0 || ri == cj)
                continue;
            if (ri) { /* q rises to a + 1/2 */
                products(s, i, j, 2 * a + 1, &x, &y);
                consider(lambda, &found, &y, &x, &s->ovf);
            } else if (a > 0) { /* q falls to a - 1/2 */
                products(s, i, j, 2 * a - 1, &x, &y);
                consider(lambda, &found, &x, &y, &s->ovf);
            }
        }
    if (found)
        frac_reduce(lambda);
    return found;
}

/* Labelled rows' q times lambda (d / lambda), labelled columns' q over
** lambda (e * lambda): cells inside the labelled part keep their q. */
static void scale(state *s, const frac *lambda)
{
    for (size_t i = 0; i < s->p->nrows; i++)
        if (s->row_par[i] != NONE)
            frac_scale(&s->d[i], &lambda->den, &lambda->num, &s->ovf);
    for (size_t j = 0; j < s->p->ncols; j++)
        if (s->col_par[j] != NONE)
            frac_scale(&s->e[j], &lambda->num, &lambda->den, &s->ovf);
}

static ug_status search(state *s, size_t root)
{
    for (size_t i = 0; i < s->p->nrows; i++)
        s->row_par[i] = NONE;
    for (size_t j = 0; j < s->p->ncols; j++)
        s->col_par[j] = NONE;
    s->row_par[root] = ROOT;
    for (;;) {
        size_t k = grow(s);
        if (s->ovf)
            return UG_ELIMIT;
        if (k != NONE) {
            transfer(s, k);
            return UG_OK;
        }
        frac lambda;
        if (!smallest_step(s, &lambda))
            return s->ovf ? UG_ELIMIT : UG_EDATA;
        scale(s, &lambda);
        if (s->ovf)
            return UG_ELIMIT;
    }
}

/* ---- ties ------------------------------------------------------------------ */

typedef struct {
    const state *s;
    size_t cell;
} ranked;

/* larger count first, then the row listed first, then the column */
static int by_priority(const void *pa, const void *pb)
{
    const ranked *a = pa, *b = pb;
    ug_i128 wa = a->s->p->w[a->cell], wb = b->s->p->w[b->cell];
    if (wa != wb)
        return wa > wb ? -1 : 1;
    return a->cell < b->cell ? -1 : 1;
}

typedef struct {
    state *s;
    unsigned char *up, *down, *frozen; /* per cell: tied upward, downward */
    size_t *par;                        /* BFS parent per vertex */
} tie_graph;

/* A path from vertex `from` to vertex `to` through tied cells not frozen:
** a row goes to a column through a cell that can go up, a column to a row
** through one that can go down. */
static bool find_path(tie_graph *g, size_t from, size_t to)
{
    size_t m = g->s->p->nrows, n = g->s->p->ncols, head = 0, tail = 0;
    for (size_t v = 0; v < m + n; v++)
        g->par[v] = NONE;
    g->par[from] = ROOT;
    g->s->queue[tail++] = from;
    while (head < tail && g->par[to] == NONE && !g->s->ovf) {
        size_t v = g->s->queue[head++];
        step(g->s, 1 + (v < m ? n : m) / 64); /* flags, not exact products */
        for (size_t u = v < m ? m : 0; u < (v < m ? m + n : m); u++) {
            size_t cell = v < m ? v * n + (u - m) : u * n + (v - m);
            unsigned char *tied = v < m ? g->up : g->down;
            if (g->par[u] == NONE && tied[cell] && !g->frozen[cell]) {
                g->par[u] = v;
                g->s->queue[tail++] = u;
            }
        }
    }
    return g->par[to] != NONE;
}

/* Move one icon around the cycle: the path found, closed by `cell`. */
static void flip(tie_graph *g, size_t cell, size_t row_of_path_end)
{
    size_t m = g->s->p->nrows, n = g->s->p->ncols;
    g->s->a[cell]++;
    g->up[cell] = 0;
    g->down[cell] = 1;
    for (size_t v = row_of_path_end; g->par[v] != ROOT; v = g->par[v]) {
        size_t u = g->par[v];
        bool rising = u < m; /* row -> column: that cell goes up */
        size_t c = rising ? u * n + (v - m) : v * n + (u - m);
        g->s->a[c] += rising ? 1 : -1;
        g->up[c] = !rising;
        g->down[c] = rising;
    }
}

static void settle_cell(tie_graph *g, size_t cell, size_t *ties)
{
    size_t m = g->s->p->nrows, n = g->s->p->ncols;
    size_t i = cell / n, col = m + cell % n;
    g->frozen[cell] = 1;
    if (g->up[cell] && find_path(g, col, i)) {
        flip(g, cell, i);
        (*ties)++;
    } else if (g->down[cell] && find_path(g, i, col)) {
        (*ties)++; /* it could give an icon away; the rule keeps it */
    }
}

static ug_status settle_ties(state *s, size_t *ties)
{
    size_t m = s->p->nrows, n = s->p->ncols, k = 0;
    tie_graph g = {s, ug_calloc(m * n, 1), ug_calloc(m * n, 1), ug_calloc(m * n, 1),
                   ug_calloc(m + n, sizeof(size_t))};
    ranked *order = ug_calloc(m * n, sizeof *order);
    ug_status st = UG_ENOMEM;
    if (!g.up || !g.down || !g.frozen || !g.par || !order)
        goto out;
    for (size_t i = 0; i < m; i++)
        for (size_t j = 0; j < n; j++) {
            g.up[i * n + j] = can_go_up(s, i, j);
            g.down[i * n + j] = can_go_down(s, i, j);
            if (g.up[i * n + j] || g.down[i * n + j])
                order[k++] = (ranked){s, i * n + j};
        }
    qsort(order, k, sizeof *order, by_priority);
    for (size_t t = 0; t < k && !s->ovf; t++)
        settle_cell(&g, order[t].cell, ties);
    st = s->ovf ? UG_ELIMIT : UG_OK;
out:
    ug_free(g.up);
    ug_free(g.down);
    ug_free(g.frozen);
    ug_free(g.par);
    ug_free(order);
    return st;
}

/* ---- the whole ------------------------------------------------------------ */

/* Every cell rounds right and both totals hold: the definition, checked
** once more so that a mistake above is a failed assertion, not a chart. */
static bool valid(state *s)
{
    size_t m = s->p->nrows, n = s->p->ncols;
    for (size_t j = 0; j < n; j++) {
        long sum = 0;
        for (size_t i = 0; i < m; i++) {
            long a = *icon(s, i, j);
            sum += a;
            if (weight(s, i, j) == 0 ? a != 0
                : q_versus(s, i, j, 2 * a + 1) > 0
                  || (a > 0 && q_versus(s, i, j, 2 * a - 1) < 0))
                return false;
        }
        if (sum != s->p->col_sum[j])
            return false;
    }
    for (size_t i = 0; i < m; i++)
        if (s->rs[i] != s->p->row_sum[i])
            return false;
    return true;
}

static void write_divisors(state *s, biprop_result *out)
{
    const frac *d0 = &s->d[0];
    for (size_t i = 0; i < s->p->nrows; i++) {
        frac r = s->d[i];
        frac_scale(&r, &d0->den, &d0->num, &s->ovf);
        out->row_div[i].v = frac_round(&r, UG_DEC_SCALE, &s->ovf);
    }
    for (size_t j = 0; j < s->p->ncols; j++) {
        frac c = s->e[j];
        frac_scale(&c, &d0->num, &d0->den, &s->ovf);
        out->col_div[j].v = frac_round(&c, 1, &s->ovf);
    }
}

static ug_status balance_rows(state *s, biprop_result *out)
{
    for (size_t i = 0; i < s->p->nrows; i++)
        while (s->rs[i] < s->p->row_sum[i]) {
            ug_status st = search(s, i);
            if (st) {
                out->stuck_row = i;
                return st;
            }
        }
    return UG_OK;
}

static void start(state *s)
{
    size_t m = s->p->nrows, n = s->p->ncols;
    for (size_t i = 0; i < m; i++) {
        big_set(&s->d[i].num, 1);
        big_set(&s->d[i].den, 1);
    }
    for (size_t j = 0; j < n; j++)
        init_column(s, j);
    for (size_t i = 0; i < m; i++)
        for (size_t j = 0; j < n; j++)
            s->rs[i] += *icon(s, i, j);
}

ug_status biprop_apportion(const biprop_problem *p, biprop_result *out)
{
    size_t m = p->nrows, n = p->ncols;
    memset(out, 0, sizeof *out);
    state s = {.p = p};
    out->icons = s.a = ug_calloc(m * n, sizeof *s.a);
    out->row_div = ug_calloc(m, sizeof *out->row_div);
    out->col_div = ug_calloc(n, sizeof *out->col_div);
    s.rs = ug_calloc(m, sizeof *s.rs);
    s.d = ug_calloc(m, sizeof *s.d);
    s.e = ug_calloc(n, sizeof *s.e);
    s.row_par = ug_calloc(m, sizeof *s.row_par);
    s.col_par = ug_calloc(n, sizeof *s.col_par);
    s.queue = ug_calloc(m + n, sizeof *s.queue);
    ug_status st = UG_ENOMEM;
    if (!s.a || !out->row_div || !out->col_div || !s.rs || !s.d || !s.e || !s.row_par
        || !s.col_par || !s.queue)
        goto out;
    start(&s);
    if ((st = s.ovf ? UG_ELIMIT : UG_OK) || (st = balance_rows(&s, out))
        || (st = settle_ties(&s, &out->ties)))
        goto out;
#ifndef NDEBUG
    state check = s; /* the final check costs no steps */
    check.steps = 0;
    assert(valid(&check));
#endif
    write_divisors(&s, out);
    st = s.ovf ? UG_ELIMIT : UG_OK;
out:
    out->steps = s.steps;
    ug_free(s.rs);
    ug_free(s.d);
    ug_free(s.e);
    ug_free(s.row_par);
    ug_free(s.col_par);
    ug_free(s.queue);
    return st;
}

void biprop_result_free(biprop_result *r)
{
    if (!r)
        return;
    ug_free(r->icons);
    ug_free(r->row_div);
    ug_free(r->col_div);
    memset(r, 0, sizeof *r);
}
