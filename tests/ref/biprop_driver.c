/*
** Test driver for the outside check of the biproportional method
** (tests/biprop_lp.py): reads one table a line on stdin,
**     GROUPS CATEGORIES ICON-VALUE COUNT_11 COUNT_12 ... (row by row)
** and prints, through the same function the charts use,
**     ok N | GROUP-ICONS | CATEGORY-ICONS | CELL-ICONS (row by row) | TIES
** or "error: MESSAGE".
*/
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "alloc.h"

#define MAX_SIDE 64

typedef struct {
    size_t ng, nc;
    alloc_rule rule;
    ug_dec counts[MAX_SIDE * MAX_SIDE];
} table;

static const char *parse_table(char *line, table *t)
{
    char *save = NULL, *end, *tok = strtok_r(line, " \t\r\n", &save);
    memset(t, 0, sizeof *t);
    t->ng = tok ? strtoul(tok, &end, 10) : 0;
    tok = strtok_r(NULL, " \t\r\n", &save);
    t->nc = tok ? strtoul(tok, &end, 10) : 0;
    if (!t->ng || !t->nc || t->ng > MAX_SIDE || t->nc > MAX_SIDE)
        return "expected GROUPS and CATEGORIES from 1 to 64";
    t->rule.method = UG_METHOD_BIPROPORTIONAL;
    t->rule.max_icons = UG_DEFAULT_MAX_ICONS;
    tok = strtok_r(NULL, " \t\r\n", &save);
    if (!tok || ug_dec_parse(tok, strlen(tok), &t->rule.value) || !t->rule.value.v)
        return "expected an icon value above 0";
    for (size_t k = 0; k < t->ng * t->nc; k++) {
        tok = strtok_r(NULL, " \t\r\n", &save);
        if (!tok || ug_dec_parse(tok, strlen(tok), &t->counts[k]))
            return "expected GROUPS x CATEGORIES plain decimal counts";
    }
    return strtok_r(NULL, " \t\r\n", &save) ? "too many counts" : NULL;
}

static void print_longs(const long *v, size_t n)
{
    fputs(" |", stdout);
    for (size_t i = 0; i < n; i++)
        printf(" %ld", v[i]);
}

static void run_case(char *line, table *t)
{
    static alloc_share shares[MAX_SIDE * MAX_SIDE];
    static long gi[MAX_SIDE], ci[MAX_SIDE], cells[MAX_SIDE * MAX_SIDE];
    static ug_dec gt[MAX_SIDE], gd[MAX_SIDE], cd[MAX_SIDE];
    const char *bad = parse_table(line, t);
    if (bad) {
        printf("error: %s\n", bad);
        return;
    }
    alloc_biprop_out o = {shares, gt, gi, ci, gd, cd, 0, 0, false, false};
    alloc_biprop_in in = {t->counts, t->ng, t->nc, &t->rule, NULL, NULL, &o};
    ug_error err = {0};
    if (alloc_biproportional(&in, ug_mark_file("stdin"), &err)) {
        printf("error: %s\n", err.msg);
        return;
    }
    printf("ok %ld", o.total_icons);
    print_longs(gi, t->ng);
    print_longs(ci, t->nc);
    for (size_t k = 0; k < t->ng * t->nc; k++)
        cells[k] = shares[k].icons;
    print_longs(cells, t->ng * t->nc);
    printf(" | %zu\n", o.ties);
}

int main(void)
{
    static table t;
    char *line = NULL;
    size_t cap = 0;
    while (getline(&line, &cap, stdin) > 0)
        run_case(line, &t);
    free(line); /* getline's buffer comes from the C library's malloc */
    return fflush(stdout) ? EXIT_FAILURE : EXIT_SUCCESS;
}
