/*
** Test driver for the outside cross-check (tests/ref/alloc_crosscheck.mjs):
** reads one case a line on stdin,
**     METHOD SEATS COUNT1 COUNT2 ...
** with METHOD largest-remainder | sainte-lague | dhondt and SEATS the number
** of cells (Hare quota, as the reference packages take it), and prints our
** icons for each count on one line, or "error: MESSAGE".
*/
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "alloc.h"

#define MAX_COUNTS UG_MAX_CATEGORIES

static bool method_named(const char *s, ug_method *m)
{
    static const char *const names[] = {"largest-remainder", "sainte-lague",
                                        "dhondt"};
    for (int i = 0; i < 3; i++)
        if (strcmp(s, names[i]) == 0) {
            *m = (ug_method)i;
            return true;
        }
    return false;
}

/* Parse one line into rule and counts; a message on failure. */
static const char *parse_case(char *line, alloc_rule *rule, ug_dec *counts,
                              size_t *n)
{
    char *save = NULL, *tok = strtok_r(line, " \t\r\n", &save);
    memset(rule, 0, sizeof *rule);
    rule->by_cells = true;
    rule->max_icons = UG_DEFAULT_MAX_ICONS;
    if (!tok || !method_named(tok, &rule->method))
        return "expected a method name";
    tok = strtok_r(NULL, " \t\r\n", &save);
    char *end;
    rule->cells = tok ? strtol(tok, &end, 10) : -1;
    if (!tok || *end || rule->cells < 0)
        return "expected a number of seats";
    for (*n = 0; (tok = strtok_r(NULL, " \t\r\n", &save)); (*n)++) {
        if (*n == MAX_COUNTS)
            return "too many counts";
        if (ug_dec_parse(tok, strlen(tok), &counts[*n]) != UG_DEC_OK)
            return "expected a plain decimal count";
    }
    return *n ? NULL : "expected at least one count";
}

static void run_case(char *line, ug_dec *counts, alloc_share *shares)
{
    alloc_rule rule;
    size_t n = 0;
    const char *bad = parse_case(line, &rule, counts, &n);
    if (bad) {
        printf("error: %s\n", bad);
        return;
    }
    ug_error err = {0};
    long total;
    if (alloc_apportion(counts, n, &rule, shares, &total, ug_mark_file("stdin"),
                        &err)) {
        printf("error: %s\n", err.msg);
        return;
    }
    for (size_t i = 0; i < n; i++)
        printf("%s%ld", i ? " " : "", shares[i].icons);
    putchar('\n');
}

int main(void)
{
    static ug_dec counts[MAX_COUNTS];
    static alloc_share shares[MAX_COUNTS];
    char *line = NULL;
    size_t cap = 0;
    while (getline(&line, &cap, stdin) > 0)
        run_case(line, counts, shares);
    free(line); /* getline's buffer comes from the C library's malloc */
    return fflush(stdout) ? EXIT_FAILURE : EXIT_SUCCESS;
}
