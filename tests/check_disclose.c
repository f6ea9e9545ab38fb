/*
** The disclosure stage (src/disclose.c) and its contract, FORMAT.md §4:
** changing a hidden count to any other value its placeholder allows leaves
** every published output byte-identical — SVG, PNG, PDF, web page, published
** table, description. Checked on every chart in layouts/ and on a generated
** corpus (rows and waffles, with and without groups, icon-value fixed, auto
** and cells, complements on and off, zeros hidden, cells named, rounding).
** The property finds leaks nobody thought of: it does not know where a
** hidden count might show up, only that it must show up nowhere.
*/
#include <check.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "alloc.h"
#include "check_run.h"
#include "disclose.h"
#include "unitgram.h"

/* ---- everything a chart publishes ------------------------------------------ */

enum { OUT_SVG, OUT_HTML, OUT_CSV, OUT_DESC, OUT_PNG, OUT_PDF, NOUT };
static const char *const out_names[NOUT] = {"SVG", "web page", "table", "description",
                                            "PNG", "PDF"};

typedef struct {
    ug_status st;       /* a failure is published too: its message must not vary */
    char msg[512];
    char *bytes[NOUT];
    size_t len[NOUT];
} published;

static void published_free(published *p)
{
    for (int k = 0; k < NOUT; k++)
        free(p->bytes[k]);
    memset(p, 0, sizeof *p);
}

static ug_status raster(published *p, ug_error *err)
{
    ug_status st = ug_render_svg(p->bytes[OUT_SVG], p->len[OUT_SVG], UG_OUT_PNG, 96, 1,
                                 &p->bytes[OUT_PNG], &p->len[OUT_PNG], err);
    if (!st)
        st = ug_render_svg(p->bytes[OUT_SVG], p->len[OUT_SVG], UG_OUT_PDF, 96, 1,
                           &p->bytes[OUT_PDF], &p->len[OUT_PDF], err);
    return st;
}

static void publish(const ug_chart *c, bool rasters, published *p)
{
    ug_error err = {0};
    ug_allocation *a = NULL;
    ug_scene *s = NULL;
    memset(p, 0, sizeof *p);
    ug_status st = ug_chart_allocate(c, &a, &err);
    if (!st)
        st = ug_scene_pack(c, a, &s, &err);
    if (!st)
        st = ug_scene_svg(s, &p->bytes[OUT_SVG], &p->len[OUT_SVG], &err);
    if (!st)
        st = ug_chart_describe(c, a, &p->bytes[OUT_DESC], &p->len[OUT_DESC], &err);
    const ug_allocation *one[1] = {a};
    if (!st)
        st = ug_html_page(NULL, p->bytes[OUT_SVG], p->len[OUT_SVG], p->bytes[OUT_DESC],
                          one, 1, &p->bytes[OUT_HTML], &p->len[OUT_HTML], &err);
    if (!st)
        st = ug_table_csv(one, 1, &p->bytes[OUT_CSV], &p->len[OUT_CSV], &err);
    if (!st && rasters)
        st = raster(p, &err);
    p->st = st;
    if (st)
        ug_error_format(&err, p->msg, sizeof p->msg);
    ug_scene_free(s);
    ug_allocation_free(a);
}

/* NULL when the two publish the same bytes, else what differs. */
static const char *difference(const published *a, const published *b)
{
    if (a->st != b->st || strcmp(a->msg, b->msg))
        return "the outcome (status or message)";
    for (int k = 0; k < NOUT; k++)
        if (k >= OUT_PNG && (!a->bytes[k] || !b->bytes[k]))
            continue; /* rasters are made for some variants only */
        else if (a->len[k] != b->len[k]
            || (a->len[k] && memcmp(a->bytes[k], b->bytes[k], a->len[k])))
            return out_names[k];
    return NULL;
}

/* On failure, the two outputs beside each other in build/, to read the leak. */
static void dump_pair(const published *a, const published *b, const char *what)
{
    for (int k = 0; k < OUT_PNG; k++)
        if (!strcmp(out_names[k], what)) {
            FILE *f = fopen("../build/disclose-leak-a.txt", "w");
            FILE *g = fopen("../build/disclose-leak-b.txt", "w");
            if (f && a->bytes[k])
                fwrite(a->bytes[k], 1, a->len[k], f);
            if (g && b->bytes[k])
                fwrite(b->bytes[k], 1, b->len[k], g);
            if (f)
                fclose(f);
            if (g)
                fclose(g);
        }
}

/* ---- varying what is hidden ----------------------------------------------------- */

typedef struct {
    size_t n, tried;
    size_t *cells;      /* g * ncats + i of each small or requested cell */
    pub_status *status;
} hidden_set;

static hidden_set hidden_cells(const ug_chart *c)
{
    hidden_set h = {0};
    pub_table *t = NULL;
    ug_error err = {0};
    if (disclose_chart(c, &t, &err))
        return h;
    size_t n = t->ngroups * t->ncats;
    h.cells = calloc(n, sizeof *h.cells);
    h.status = calloc(n, sizeof *h.status);
    for (size_t k = 0; k < n; k++)
        if (t->cells[k].status == PUB_SMALL || t->cells[k].status == PUB_REQUESTED) {
            h.status[h.n] = t->cells[k].status;
            h.cells[h.n++] = k;
        }
    pub_table_free(t);
    return h;
}

static ug_dec *count_at(ug_chart *c, size_t k)
{
    return &c->cats[k % c->ncats].counts[k / c->ncats];
}

/* The values the placeholder allows: "fewer than N" is 1..N-1 (0..N-1 with
** zeros hidden); a cell hidden by name may be anything, so a spread of values. */
static size_t allowed_values(const ug_chart *c, pub_status st, long *out)
{
    size_t n = 0;
    if (st == PUB_REQUESTED) {
        static const long any[] = {0, 1, 9, 10, 57, 1234};
        for (size_t i = 0; i < sizeof any / sizeof *any; i++)
            out[n++] = any[i];
        return n;
    }
    long below = (long)(c->suppress_below.v / UG_DEC_SCALE);
    for (long v = c->suppress_zeros == UG_ZEROS_HIDE ? 0 : 1; v < below && n < 64; v++)
        out[n++] = v;
    return n;
}

/* Every hidden cell through every value it may take, one at a time, then all
** of them at once; rasters only at the ends (they are made from the SVG). */
static void check_invariant(ug_chart *c, const char *name)
{
    hidden_set h = hidden_cells(c);
    published base;
    publish(c, true, &base);
    for (size_t j = 0; j < h.n; j++) {
        ug_dec *cell = count_at(c, h.cells[j]), keep = *cell;
        long values[64];
        size_t nv = allowed_values(c, h.status[j], values);
        for (size_t v = 0; v < nv; v++) {
            *cell = (ug_dec){values[v] * UG_DEC_SCALE};
            published p;
            publish(c, v == 0 || v + 1 == nv, &p);
            const char *d = difference(&base, &p);
            if (d)
            dump_pair(&base, &p, d);
        ck_assert_msg(!d, "%s: hidden cell %zu set to %ld changes the %s", name,
                          h.cells[j], values[v], d);
            published_free(&p);
        }
        *cell = keep;
    }
    if (h.n > 1) {
        for (size_t j = 0; j < h.n; j++) {
            long values[64];
            size_t nv = allowed_values(c, h.status[j], values);
            *count_at(c, h.cells[j]) = (ug_dec){values[(j * 7 + 3) % nv] * UG_DEC_SCALE};
        }
        published p;
        publish(c, true, &p);
        const char *d = difference(&base, &p);
        ck_assert_msg(!d, "%s: all hidden cells changed together change the %s", name, d);
        published_free(&p);
    }
    published_free(&base);
    free(h.cells);
    free(h.status);
}

/* ---- the shipped examples ---------------------------------------------------- */

START_TEST(test_layouts_publish_no_hidden_count)
{
    static const char *const files[] = {"../layouts/wards.yaml", "../layouts/pantry.yaml",
                                        "../layouts/schools.yaml"};
    size_t tested = 0;
    for (size_t f = 0; f < sizeof files / sizeof *files; f++) {
        ug_chart *c = NULL;
        ug_error err = {0};
        ck_assert_int_eq(ug_chart_load(files[f], NULL, &c, &err), UG_OK);
        hidden_set h = hidden_cells(c);
        tested += h.n;
        free(h.cells);
        free(h.status);
        check_invariant(c, files[f]);
        ug_chart_free(c);
    }
    ck_assert_msg(tested > 0, "no example hides a count: the property tested nothing");
}
END_TEST

/* FORMAT.md §7 under §4: the biproportional method rounds the published
** table as a whole, so a hidden count must not reach any other cell's
** icons, the margins or the divisors either. */
START_TEST(test_biproportional_publishes_no_hidden_count)
{
    ug_chart *c = NULL;
    ug_error err = {0};
    ck_assert_int_eq(ug_chart_load("../layouts/wards.yaml", NULL, &c, &err), UG_OK);
    c->method = UG_METHOD_BIPROPORTIONAL;
    hidden_set h = hidden_cells(c);
    ck_assert_uint_gt(h.n, 0);
    free(h.cells);
    free(h.status);
    check_invariant(c, "wards.yaml, biproportional");
    ug_chart_free(c);
}
END_TEST

/* ---- a generated corpus ---------------------------------------------------------- */

static unsigned long long rng_state;

static unsigned rnd(unsigned n)
{
    rng_state = rng_state * 6364136223846793005ULL + 1442695040888963407ULL;
    return (unsigned)((rng_state >> 33) % n);
}

static long random_count(void)
{
    switch (rnd(6)) {
    case 0: return 1 + rnd(9);      /* small */
    case 1: return rnd(3) ? 20 + rnd(40) : 0;
    default: return 10 + rnd(400);
    }
}

static void add_counts(char *y, size_t cap, size_t ngroups)
{
    size_t n = strlen(y);
    if (!ngroups) {
        snprintf(y + n, cap - n, "    count: %ld\n", random_count());
        return;
    }
    n += (size_t)snprintf(y + n, cap - n, "    counts: [");
    for (size_t g = 0; g < ngroups; g++)
        n += (size_t)snprintf(y + n, cap - n, "%s%ld", g ? ", " : "", random_count());
    snprintf(y + n, cap - n, "]\n");
}

static const char *value_line(bool waffle)
{
    if (waffle)
        return rnd(2) ? "cells: 100\n" : rnd(2) ? "cells: 1000\n" : "icon-value: 5\n";
    return rnd(2) ? "icon-value: 10\n" : "icon-value: auto\n";
}

static const char *suppress_block(size_t ngroups)
{
    static char buf[256];
    snprintf(buf, sizeof buf, "suppress: {below: 10%s%s%s%s}\n",
             rnd(4) == 0 ? ", complement: none" : "",
             rnd(4) == 0 ? ", margins: hidden" : "",
             rnd(5) == 0 ? ", zeros: hide" : "",
             rnd(4) == 0 ? (ngroups ? ", cells: [{group: g1, category: c0}]"
                                    : ", cells: [{category: c0}]")
                         : "");
    return buf;
}

static void random_chart(char *y, size_t cap)
{
    bool waffle = rnd(3) == 0;
    size_t ngroups = rnd(2) ? 0 : 2 + rnd(3), ncats = 2 + rnd(4);
    size_t n = (size_t)snprintf(y, cap, "title: Generated test chart\nunit-label: people\n"
                                        "form: %s\n%s%s",
                                waffle ? "waffle" : "rows", value_line(waffle),
                                suppress_block(ngroups));
    if (rnd(5) == 0)
        n += (size_t)snprintf(y + n, cap - n,
                              "protect: {round-to: 5, method: conventional}\n");
    /* the change between periods is stated from published cells only */
    if (ngroups && rnd(2))
        n += (size_t)snprintf(y + n, cap - n, "change: %s\n", rnd(2) ? "previous" : "first");
    if (ngroups) {
        n += (size_t)snprintf(y + n, cap - n, "groups: [");
        for (size_t g = 0; g < ngroups; g++)
            n += (size_t)snprintf(y + n, cap - n, "%sg%zu", g ? ", " : "", g);
        n += (size_t)snprintf(y + n, cap - n, "]\n");
    }
    n += (size_t)snprintf(y + n, cap - n, "categories:\n");
    for (size_t i = 0; i < ncats; i++) {
        n += (size_t)snprintf(y + n, cap - n, "  - id: c%zu\n    label: Kind %zu\n", i, i);
        add_counts(y, cap, ngroups);
        n = strlen(y);
    }
}

START_TEST(test_generated_charts_publish_no_hidden_count)
{
    rng_state = 20261202;
    size_t tried = 0, hidden = 0;
    for (int k = 0; k < 70; k++) {
        char yaml[4096];
        random_chart(yaml, sizeof yaml);
        ug_chart *c = NULL;
        ug_error err = {0};
        ck_assert_msg(ug_chart_load_string(yaml, strlen(yaml), "gen.yaml", NULL, &c, &err)
                          == UG_OK, "%s\n%s", err.msg, yaml);
        hidden_set h = hidden_cells(c);
        hidden += h.n;
        free(h.cells);
        free(h.status);
        char name[32];
        snprintf(name, sizeof name, "generated chart %d", k);
        check_invariant(c, name);
        tried++;
        ug_chart_free(c);
    }
    ck_assert_uint_eq(tried, 70);
    ck_assert_msg(hidden >= 70, "only %zu hidden cells in the corpus", hidden);
}
END_TEST

/* ---- the published table ---------------------------------------------------------- */

static ug_chart *load_ok(const char *yaml)
{
    ug_chart *c = NULL;
    ug_error err = {0};
    ck_assert_msg(ug_chart_load_string(yaml, strlen(yaml), "t.yaml", NULL, &c, &err)
                      == UG_OK, "%s", err.msg);
    return c;
}

static pub_table *disclose_text(const char *yaml, ug_chart **chart)
{
    ug_error err = {0};
    *chart = load_ok(yaml);
    pub_table *t = NULL;
    ck_assert_msg(disclose_chart(*chart, &t, &err) == UG_OK, "%s", err.msg);
    return t;
}

/* The words the languages work added (compact amounts, money, direct labels
** on split rows, change notes through CLDR, right-to-left) write counts in
** new places: each must still say nothing of a hidden count. */
START_TEST(test_amounts_and_direct_labels_publish_no_hidden_count)
{
    static const char *const charts[] = {
        "title: Fund\ncurrency: EUR\nnumber-format: compact\nlang: de\nform: rows\n"
        "icon-value: 1000000\nrounding: partial\narrangement: split\n"
        "suppress: {below: 10}\ngroups: [north, south]\nchange: previous\n"
        "categories:\n  - {label: Repairs, counts: [4125000, 3990000]}\n"
        "  - {label: Grants, counts: [7, 1860000]}\n"
        "  - {label: Rent help, counts: [972500, 4]}\n",
        "title: Visits\nunit-label: {one: person, other: people}\n"
        "number-format: compact-short\nform: rows\nicon-value: 100000\n"
        "arrangement: split\nsuppress: {below: 10}\ngroups: [2025, 2026]\n"
        "change: first\ncategories:\n  - {label: Adults, counts: [1234567, 1301000]}\n"
        "  - {label: Children, counts: [3, 250000]}\n",
        "title: Visits\nlang: ar\nunit-label: people\nform: rows\nicon-value: 10\n"
        "arrangement: split\nsuppress: {below: 10}\ngroups: [g1, g2]\n"
        "categories:\n  - {label: A, counts: [120, 5]}\n  - {label: B, counts: [60, 75]}\n",
        "title: Homes\nlang: pl\nnumber-format: compact\nunit-label: homes\n"
        "form: waffle\ncells: 100\nsuppress: {below: 10}\n"
        "categories:\n  - {label: A, count: 250000}\n  - {label: B, count: 6}\n"
        "  - {label: C, count: 1200000}\n",
    };
    size_t hidden = 0;
    for (size_t k = 0; k < sizeof charts / sizeof *charts; k++) {
        ug_chart *c = load_ok(charts[k]);
        hidden_set h = hidden_cells(c);
        ck_assert_msg(h.n > 0, "chart %zu hides nothing", k);
        hidden += h.n;
        free(h.cells);
        free(h.status);
        char name[32];
        snprintf(name, sizeof name, "amounts chart %zu", k);
        check_invariant(c, name);
        ug_chart_free(c);
    }
    ck_assert_uint_ge(hidden, 4);
}
END_TEST


START_TEST(test_statuses_and_margins)
{
    ug_chart *c = NULL;
    pub_table *t = disclose_text(
        "title: t\nicon-value: 10\ngroups: [a, b]\nsuppress: {below: 10, margins: hidden, zeros: hide,"
        " cells: [{group: b, category: y}]}\n"
        "categories:\n  - {id: x, label: X, counts: [5, 40]}\n  - {id: y, label: Y, counts: [30, 50]}\n"
        "  - {id: z, label: Z, counts: [0, 12]}\n", &c);
    ck_assert_int_eq(pub_at(t, 0, 0)->status, PUB_SMALL);
    ck_assert_int_eq(pub_at(t, 0, 2)->status, PUB_SMALL); /* a hidden zero */
    ck_assert_int_eq(pub_at(t, 1, 1)->status, PUB_REQUESTED);
    ck_assert_int_eq(pub_at(t, 0, 1)->status, PUB_EXACT);
    for (size_t k = 0; k < 6; k++)
        if (pub_hidden(t->cells[k].status))
            ck_assert(t->cells[k].value.v == 0);
    /* a total is published only when nothing in it is hidden */
    ck_assert_int_eq(t->group_totals[0].status, PUB_PARTIAL);
    ck_assert_int_eq(t->cat_totals[2].status, PUB_PARTIAL);
    ck_assert_int_eq(t->grand.status, PUB_PARTIAL);
    ck_assert_uint_eq(t->nhidden, 3);
    pub_table_free(t);
    ug_chart_free(c);
    t = disclose_text("title: t\nicon-value: 10\ngroups: [a, b]\ncategories:\n"
                      "  - {id: x, label: X, counts: [5, 40]}\n  - {id: y, label: Y, counts: [30, 50]}\n", &c);
    ck_assert_int_eq(t->grand.status, PUB_EXACT);
    ck_assert(t->grand.value.v == 125 * UG_DEC_SCALE);
    ck_assert(t->cat_totals[1].value.v == 80 * UG_DEC_SCALE);
    pub_table_free(t);
    ug_chart_free(c);
}
END_TEST

START_TEST(test_bad_cell_names_are_errors_at_their_line)
{
    ug_error err = {0};
    ug_chart *c = load_ok("title: t\nicon-value: 10\ngroups: [a, b]\nsuppress:\n  cells:\n"
                          "    - {group: a, category: nope}\n"
                          "categories:\n  - {id: x, label: X, counts: [5, 40]}\n");
    pub_table *t = NULL;
    ck_assert_int_eq(disclose_chart(c, &t, &err), UG_ESCHEMA);
    ck_assert_uint_eq(err.where.line, 6);
    ck_assert_ptr_nonnull(strstr(err.msg, "no category 'nope'"));
    ug_chart_free(c);
}
END_TEST

START_TEST(test_internal_view_is_marked)
{
    ug_error err = {0};
    ug_chart *c = load_ok("title: t\nicon-value: 10\nsuppress: {below: 10, margins: hidden}\n"
                          "categories:\n  - {id: x, label: X, count: 5}\n"
                          "  - {id: y, label: Y, count: 40}\n");
    ug_allocation *a = NULL;
    char *text = NULL;
    ck_assert_int_eq(ug_chart_allocate_internal(c, &a, &err), UG_OK);
    ck_assert_int_eq(ug_allocation_report(a, UG_REPORT_CSV, &text, NULL, &err), UG_OK);
    ck_assert_ptr_nonnull(strstr(text, "NOT FOR PUBLICATION"));
    ck_assert_int_eq(strncmp(text, "INTERNAL VIEW", 13), 0); /* the first line */
    free(text);
    ug_allocation_free(a);
    ck_assert_int_eq(ug_chart_allocate(c, &a, &err), UG_OK);
    ck_assert_int_eq(ug_allocation_report(a, UG_REPORT_CSV, &text, NULL, &err), UG_OK);
    ck_assert_ptr_null(strstr(text, "NOT FOR PUBLICATION"));
    ck_assert_ptr_nonnull(strstr(text, "fewer than 10"));
    free(text);
    ug_allocation_free(a);
    ug_chart_free(c);
}
END_TEST

static Suite *suite(void)
{
    Suite *s = suite_create("disclose");
    TCase *t = tcase_create("published table");
    tcase_set_timeout(t, 300);
    tcase_add_test(t, test_statuses_and_margins);
    tcase_add_test(t, test_bad_cell_names_are_errors_at_their_line);
    tcase_add_test(t, test_internal_view_is_marked);
    tcase_add_test(t, test_layouts_publish_no_hidden_count);
    tcase_add_test(t, test_biproportional_publishes_no_hidden_count);
    tcase_add_test(t, test_generated_charts_publish_no_hidden_count);
    tcase_add_test(t, test_amounts_and_direct_labels_publish_no_hidden_count);
    suite_add_tcase(s, t);
    return s;
}

int main(void)
{
    return check_run(suite());
}
