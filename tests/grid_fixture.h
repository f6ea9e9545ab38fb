/* Two-way tables as the disclosure solvers see them, for the Check tests of
** src/disclose_audit.c and src/disclose_pattern.c: building them from cell
** codes, a seeded generator, and the attacker's problems solved by GLPK's
** glpsol on a MathProg model of our own (an independent path to the optimum). */
#ifndef UG_TESTS_GRID_FIXTURE_H
#define UG_TESTS_GRID_FIXTURE_H

#include <check.h>
#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "disclose.h"

/* ---- building grids ------------------------------------------------------ */

/* A grid and the arrays it points into. */
typedef struct {
    disclose_grid g;
    ug_dec *raw, *pub;
    pub_status *st;
} tgrid;

static inline ug_dec dec(const char *s)
{
    ug_dec d;
    ck_assert_int_eq(ug_dec_parse(s, strlen(s), &d), UG_DEC_OK);
    return d;
}

static inline ug_dec dec_of(double v)
{
    return (ug_dec){(ug_i128)llround(v * 1e6)};
}

/* Placeholder "1 to 9", complements known to be >= 10, nothing rounded:
** the settings most hand cases share. */
static inline tgrid *tg_new(size_t rows, size_t cols, bool margins)
{
    tgrid *t = calloc(1, sizeof *t);
    ck_assert_ptr_nonnull(t);
    t->raw = calloc(rows * cols, sizeof *t->raw);
    t->pub = calloc(rows * cols, sizeof *t->pub);
    t->st = calloc(rows * cols, sizeof *t->st);
    ck_assert(t->raw && t->pub && t->st);
    t->g = (disclose_grid){.rows = rows, .cols = cols, .raw = t->raw,
                           .published = t->pub, .status = t->st,
                           .lo = dec("1"), .hi = dec("9"),
                           .complement_floor = dec("10"), .slack = dec("0"),
                           .margins_published = margins};
    return t;
}

static inline void tg_free(tgrid *t)
{
    free(t->raw);
    free(t->pub);
    free(t->st);
    free(t);
}

/* One cell from a code: E40 exact 40, S3 small, C20 complement, Q7 requested,
** W withheld (raw 0), R20/18 rounded: published 20, counted 18. */
static inline void tg_cell(tgrid *t, size_t k, const char *code)
{
    const char *v = code + 1, *slash = strchr(v, '/');
    ug_dec first = code[0] == 'W' ? dec("0") : dec(slash ? "0" : v);
    switch (code[0]) {
    case 'E': t->st[k] = PUB_EXACT, t->raw[k] = t->pub[k] = first; return;
    case 'S': t->st[k] = PUB_SMALL, t->raw[k] = first; return;
    case 'C': t->st[k] = PUB_COMPLEMENT, t->raw[k] = t->pub[k] = first; return;
    case 'Q': t->st[k] = PUB_REQUESTED, t->raw[k] = first; return;
    case 'W': t->st[k] = PUB_WITHHELD; return;
    case 'R':
        ck_assert_ptr_nonnull(slash);
        t->st[k] = PUB_ROUNDED;
        char pub[32];
        snprintf(pub, sizeof pub, "%.*s", (int)(slash - v), v);
        t->pub[k] = dec(pub), t->raw[k] = dec(slash + 1);
        return;
    default:
        ck_abort_msg("bad cell code %s", code);
    }
}

static inline tgrid *tg_parse(size_t rows, size_t cols, bool margins, const char *const *cells)
{
    tgrid *t = tg_new(rows, cols, margins);
    for (size_t k = 0; k < rows * cols; k++)
        tg_cell(t, k, cells[k]);
    return t;
}

static inline uint64_t next(uint64_t *s)
{
    *s ^= *s << 13, *s ^= *s >> 7, *s ^= *s << 17; /* xorshift64 */
    return *s;
}

static inline unsigned roll(uint64_t *s, unsigned n)
{
    return (unsigned)(next(s) % n);
}

/* ---- the glpsol cross-check -------------------------------------------------
** Our own formulation, deliberately unlike the library's: every cell is a
** variable (exact cells fixed by their bounds), every row and column equation
** is written out, no blocks, no warm start. The 2n problems (min and max for
** each small cell) are n independent copies of the table in one model whose
** objective is the sum of +x (a minimisation) and -x (a maximisation) over the
** copies: the copies share no constraint, so a joint optimum is an optimum of
** each, and one glpsol run answers them all. */

static inline void write_bound(FILE *f, const disclose_grid *g, size_t k, bool upper)
{
    double pub = ug_dec_to_double(g->published[k]), sl = ug_dec_to_double(g->slack);
    double lo = 0, hi = -1; /* hi < 0: no upper bound */
    switch (g->status[k]) {
    case PUB_EXACT: lo = hi = pub; break;
    case PUB_ROUNDED: lo = pub - sl < 0 ? 0 : pub - sl, hi = pub + sl; break;
    case PUB_SMALL: lo = ug_dec_to_double(g->lo), hi = ug_dec_to_double(g->hi); break;
    case PUB_COMPLEMENT: lo = ug_dec_to_double(g->complement_floor); break;
    default: break;
    }
    if (!upper)
        fprintf(f, " %zu %zu %.6f", k / g->cols, k % g->cols, lo);
    else if (hi >= 0)
        fprintf(f, " %zu %zu %.6f", k / g->cols, k % g->cols, hi);
}

static const char model_text[] =
    "set R; set C; set K; set UB within {R, C};\n"
    "param marg; param lb{R, C}; param ub{UB}; param rt{R}; param ct{C};\n"
    "param tr{K}; param tc{K}; param sg{K};\n"
    "var x{K, R, C};\n"
    "s.t. low{k in K, r in R, c in C}: x[k, r, c] >= lb[r, c];\n"
    "s.t. up{k in K, (r, c) in UB}: x[k, r, c] <= ub[r, c];\n"
    "s.t. rowsum{k in K, r in R: marg}: sum{c in C} x[k, r, c] = rt[r];\n"
    "s.t. colsum{k in K, c in C: marg and card(R) > 1}: sum{r in R} x[k, r, c] = ct[c];\n"
    "minimize attack: sum{k in K} sg[k] * x[k, tr[k], tc[k]];\n"
    "solve;\n";

static inline double raw_counted(const disclose_grid *g, size_t k)
{
    return g->status[k] == PUB_WITHHELD ? 0 : ug_dec_to_double(g->raw[k]);
}

static inline void write_data(FILE *f, const disclose_grid *g, const disclose_interval *out,
                       size_t n)
{
    size_t nc = g->rows * g->cols;
    fprintf(f, "data;\nset R :=");
    for (size_t r = 0; r < g->rows; r++)
        fprintf(f, " %zu", r);
    fprintf(f, ";\nset C :=");
    for (size_t c = 0; c < g->cols; c++)
        fprintf(f, " %zu", c);
    fprintf(f, ";\nset K :=");
    for (size_t k = 1; k <= 2 * n; k++)
        fprintf(f, " %zu", k);
    fprintf(f, ";\nset UB :=");
    for (size_t k = 0; k < nc; k++)
        if (g->status[k] <= PUB_SMALL)
            fprintf(f, " (%zu, %zu)", k / g->cols, k % g->cols);
    fprintf(f, ";\nparam marg := %d;\nparam lb :=", g->margins_published);
    for (size_t k = 0; k < nc; k++)
        write_bound(f, g, k, false);
    fprintf(f, ";\nparam ub :=");
    for (size_t k = 0; k < nc; k++)
        write_bound(f, g, k, true);
    fprintf(f, ";\nparam rt :=");
    for (size_t r = 0; r < g->rows; r++) {
        double s = 0;
        for (size_t c = 0; c < g->cols; c++)
            s += raw_counted(g, r * g->cols + c);
        fprintf(f, " %zu %.6f", r, s);
    }
    fprintf(f, ";\nparam ct :=");
    for (size_t c = 0; c < g->cols; c++) {
        double s = 0;
        for (size_t r = 0; r < g->rows; r++)
            s += raw_counted(g, r * g->cols + c);
        fprintf(f, " %zu %.6f", c, s);
    }
    fprintf(f, ";\nparam :  tr tc sg :=\n");
    for (size_t i = 0; i < 2 * n; i++)
        fprintf(f, " %zu %zu %zu %d\n", i + 1, out[i / 2].cell / g->cols,
                out[i / 2].cell % g->cols, i % 2 ? -1 : 1);
    fprintf(f, ";\nend;\n");
}

static inline bool log_says(const char *path, const char *what)
{
    char line[512];
    bool found = false;
    FILE *f = fopen(path, "r");
    ck_assert_ptr_nonnull(f);
    while (!found && fgets(line, sizeof line, f))
        found = strstr(line, what) != NULL;
    fclose(f);
    return found;
}

/* Run glpsol on the model of t; vals[2i] and vals[2i + 1] get the min and max
** of small cell i. */
static inline void glpsol_intervals(const tgrid *t, const disclose_interval *out, size_t n,
                             double *vals)
{
    char dir[] = "/tmp/ug-audit-XXXXXX", mod[64], res[64], logp[64], cmd[256];
    ck_assert_ptr_nonnull(mkdtemp(dir));
    snprintf(mod, sizeof mod, "%s/attack.mod", dir);
    snprintf(res, sizeof res, "%s/result.txt", dir);
    snprintf(logp, sizeof logp, "%s/glpsol.log", dir);
    FILE *f = fopen(mod, "w");
    ck_assert_ptr_nonnull(f);
    fputs(model_text, f);
    fprintf(f, "printf{k in K} \"%%d %%.10f\\n\", k, x[k, tr[k], tc[k]] > \"%s\";\n", res);
    write_data(f, &t->g, out, n);
    fclose(f);
    snprintf(cmd, sizeof cmd, "glpsol --math %s > %s 2>&1", mod, logp);
    ck_assert_int_eq(system(cmd), 0);
    ck_assert_msg(log_says(logp, "OPTIMAL"), "glpsol: see %s", logp);
    f = fopen(res, "r");
    ck_assert_msg(f != NULL, "glpsol wrote no result (see %s)", logp);
    for (size_t i = 0; i < 2 * n; i++) {
        size_t k;
        ck_assert_int_eq(fscanf(f, "%zu %lf", &k, &vals[i]), 2);
        ck_assert_uint_eq(k, i + 1);
    }
    fclose(f);
    remove(mod), remove(res), remove(logp), rmdir(dir);
}

#endif
