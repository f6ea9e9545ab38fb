/*
** Allocation of a whole chart (one apportionment per group) and the report
** that states, per category, what was counted and what the picture shows.
** The report is how a reader checks the picture: it never hides a difference.
*/
#include <string.h>

#include "alloc.h"

static ug_dec largest_line(const ug_chart *c, const pub_table *t)
{
    ug_dec best = {0};
    for (size_t g = 0; g < t->ngroups; g++) {
        ug_dec group = {0};
        for (size_t i = 0; i < t->ncats; i++) {
            ug_dec v = pub_at(t, g, i)->value;
            group.v += v.v;
            if (c->arrangement == UG_ARRANGE_SPLIT && v.v > best.v)
                best = v;
        }
        if (c->arrangement == UG_ARRANGE_INLINE && group.v > best.v)
            best = group;
    }
    return best;
}

long alloc_default_columns(const ug_chart *c)
{
    if (c->columns > 0)
        return c->columns;
    return ug_form_about(c->form)->columns;
}

ug_status alloc_rule_for_table(const ug_chart *c, const pub_table *t,
                               alloc_rule *rule, ug_error *err)
{
    memset(rule, 0, sizeof *rule);
    rule->method = c->method;
    rule->max_icons = (long)c->limits.max_icons;
    rule->partial = c->rounding == UG_ROUND_PARTIAL;
    if (ug_form_about(c->form)->shares && !c->has_icon_value) {
        rule->by_cells = true;
        rule->cells = c->cells > 0 ? c->cells : 100;
        return UG_OK;
    }
    if (!c->icon_value_auto) {
        rule->value = c->icon_value;
        return UG_OK;
    }
    if (!alloc_nice_value(largest_line(c, t), alloc_default_columns(c), &rule->value))
        return ug_fail(err, UG_EDATA, c->icon_value_mark,
                       "no icon value fits these counts on one line");
    return UG_OK;
}

ug_status alloc_rule_for_chart(const ug_chart *c, alloc_rule *rule, ug_error *err)
{
    pub_table *t = NULL;
    ug_status st = disclose_chart(c, &t, err);
    if (!st)
        st = alloc_rule_for_table(c, t, rule, err);
    pub_table_free(t);
    return st;
}

/* The icon limit holds for the whole chart, not each group: a thousand groups
** each just under it would otherwise ask the packer for 10^8 icons. */
static ug_status check_chart_icons(const ug_allocation *a, size_t upto, ug_mark where,
                                   ug_error *err)
{
    long limit = alloc_icon_ceiling(&a->rule);
    long sum = 0;
    for (size_t g = 0; g <= upto; g++)
        sum += a->group_icons[g];
    if (sum <= limit)
        return UG_OK;
    return ug_fail(err, UG_ELIMIT, where,
                   "the groups up to here need %ld icons, more than %ld, the limit "
                   "for a chart; state a larger icon value or raise the limit "
                   "(--max-icons)", sum, limit);
}

static ug_status fill_groups(ug_allocation *a, const ug_chart *c, ug_dec *column,
                             ug_error *err)
{
    for (size_t g = 0; g < a->ngroups; g++) {
        for (size_t i = 0; i < c->ncats; i++)
            column[i] = pub_at(a->pub, g, i)->value;
        a->group_totals[g] = alloc_sum(column, c->ncats);
        ug_mark where = c->groups.n ? c->groups.items[g].mark : c->categories_mark;
        alloc_share *row = &a->shares[g * c->ncats];
        ug_status st = alloc_apportion(column, c->ncats, &a->rule, row,
                                       &a->group_icons[g], where, err);
        if (st)
            return st;
        for (size_t i = 0; i < c->ncats; i++)
            row[i].status = pub_at(a->pub, g, i)->status;
        st = check_chart_icons(a, g, where, err);
        if (st)
            return st;
    }
    return UG_OK;
}

static const char **group_names(const ug_chart *c)
{
    const char **names = ug_calloc(c->groups.n, sizeof *names);
    for (size_t g = 0; names && g < c->groups.n; g++)
        names[g] = c->groups.items[g].text;
    return names;
}

static const char **cat_names(const ug_chart *c)
{
    const char **names = ug_calloc(c->ncats, sizeof *names);
    for (size_t i = 0; names && i < c->ncats; i++)
        names[i] = c->cats[i].label.text ? c->cats[i].label.text : c->cats[i].id;
    return names;
}

/* The whole table at once (FORMAT.md §7); errors at the `method:` key. */
static ug_status fill_biprop(ug_allocation *a, const ug_chart *c, ug_error *err)
{
    size_t ng = a->ngroups, nc = a->ncats;
    ug_dec *counts = ug_calloc(ng * nc, sizeof *counts);
    const char **gn = group_names(c), **cn = cat_names(c);
    a->cat_icons = ug_calloc(nc, sizeof *a->cat_icons);
    a->group_div = ug_calloc(ng, sizeof *a->group_div);
    a->cat_div = ug_calloc(nc, sizeof *a->cat_div);
    ug_status st = UG_ENOMEM;
    if (!counts || !gn || !cn || !a->cat_icons || !a->group_div || !a->cat_div) {
        ug_fail(err, st, c->method_mark, "out of memory");
        goto out;
    }
    for (size_t k = 0; k < ng * nc; k++)
        counts[k] = a->pub->cells[k].value;
    alloc_biprop_out o = {a->shares, a->group_totals, a->group_icons, a->cat_icons,
                          a->group_div, a->cat_div, 0, 0, false, false};
    alloc_biprop_in in = {counts, ng, nc, &a->rule, gn, cn, &o};
    if ((st = alloc_biproportional(&in, c->method_mark, err)))
        goto out;
    a->ties = o.ties;
    a->group_tie = o.group_tie;
    a->cat_tie = o.cat_tie;
    for (size_t k = 0; k < ng * nc; k++)
        a->shares[k].status = a->pub->cells[k].status;
    st = check_chart_icons(a, ng - 1, c->method_mark, err);
out:
    ug_free(counts);
    ug_free(gn);
    ug_free(cn);
    return st;
}

ug_status alloc_published(const ug_chart *c, pub_table *t, ug_allocation **out,
                          ug_error *err)
{
    *out = NULL;
    ug_allocation *a = ug_calloc(1, sizeof *a);
    ug_dec *column = ug_calloc(c->ncats, sizeof *column);
    ug_status st = UG_ENOMEM;
    if (!a || !column) {
        pub_table_free(t);
        goto fail;
    }
    a->chart = c;
    a->pub = t;
    a->ngroups = chart_ngroups(c);
    a->ncats = c->ncats;
    a->shares = ug_calloc(a->ngroups * c->ncats, sizeof *a->shares);
    a->group_icons = ug_calloc(a->ngroups, sizeof *a->group_icons);
    a->group_totals = ug_calloc(a->ngroups, sizeof *a->group_totals);
    if (!a->shares || !a->group_icons || !a->group_totals)
        goto fail;
    if ((st = alloc_rule_for_table(c, t, &a->rule, err)))
        goto fail;
    if (c->method == UG_METHOD_BIPROPORTIONAL && c->groups.n)
        st = fill_biprop(a, c, err);
    else
        st = fill_groups(a, c, column, err);
    if (st)
        goto fail;
    ug_free(column);
    *out = a;
    return UG_OK;
fail:
    if (st == UG_ENOMEM)
        ug_fail(err, st, ug_mark_file(c->path), "out of memory");
    ug_free(column);
    ug_allocation_free(a);
    return st;
}

ug_status ug_chart_allocate(const ug_chart *c, ug_allocation **out, ug_error *err)
{
    ug_error_clear(err);
    pub_table *t = NULL;
    *out = NULL;
    ug_status st = disclose_chart(c, &t, err);
    return st ? st : alloc_published(c, t, out, err);
}

ug_status ug_chart_allocate_internal(const ug_chart *c, ug_allocation **out, ug_error *err)
{
    ug_error_clear(err);
    pub_table *t = NULL;
    *out = NULL;
    ug_status st = disclose_internal(c, &t, err);
    if (!st && !(st = alloc_published(c, t, out, err)))
        (*out)->internal = true;
    return st;
}

void ug_allocation_free(ug_allocation *a)
{
    if (!a)
        return;
    ug_free(a->shares);
    ug_free(a->group_icons);
    ug_free(a->group_totals);
    ug_free(a->cat_icons);
    ug_free(a->group_div);
    ug_free(a->cat_div);
    pub_table_free(a->pub);
    ug_free(a);
}

/* ---- the report ---------------------------------------------------------- */

typedef struct {
    char count[48], quota[64], icons[64], shown[64], diff[64], rel[64];
    const char *count_text; /* count, or a hidden cell's placeholder */
    const char *status;
} row_text;

/* Rationals are printed rounded half-up to six places with trailing zeros
** dropped, so an exact value reads exactly and a repeating one reads sensibly. */
static char *trimmed_ratio(ug_i128 num, ug_i128 den, char *buf)
{
    ug_ratio_format(num, den, UG_DEC_PLACES, buf);
    char *dot = strchr(buf, '.');
    if (dot) {
        char *end = buf + strlen(buf) - 1;
        while (end > dot && *end == '0')
            *end-- = '\0';
        if (end == dot)
            *end = '\0';
    }
    if (strcmp(buf, "-0") == 0)
        strcpy(buf, "0");
    return buf;
}

/* A hidden cell reports its placeholder and nothing computed from it. */
static void describe_share(const ug_allocation *a, const alloc_share *s, row_text *t)
{
    memset(t, 0, sizeof *t);
    t->status = pub_status_name(s->status);
    if (alloc_hidden(s)) {
        t->count_text = pub_placeholder(a->pub, s->status);
        return;
    }
    t->count_text = ug_dec_format(s->count, t->count);
    trimmed_ratio(s->quota_num, s->quota_den, t->quota);
    if (s->partial)
        trimmed_ratio(s->quota_num, s->quota_den, t->icons);
    else
        snprintf(t->icons, sizeof t->icons, "%ld", s->icons);
    trimmed_ratio(s->shown_num, s->shown_den * UG_DEC_SCALE, t->shown);
    ug_i128 diff = s->shown_num - s->count.v * s->shown_den;
    trimmed_ratio(diff, s->shown_den * UG_DEC_SCALE, t->diff);
    if (s->count.v)
        ug_ratio_format(diff * 100, s->shown_den * s->count.v, 1, t->rel);
    else
        strcpy(t->rel, "0.0");
}

static const char *or_empty(const char *s) { return s ? s : ""; }

static const char *group_name(const ug_chart *c, size_t g)
{
    return c->groups.n ? or_empty(c->groups.items[g].text) : "";
}

static const char *value_text(const ug_allocation *a, char *buf)
{
    if (a->rule.by_cells)
        snprintf(buf, 48, "1/%ld of the total", a->rule.cells);
    else
        ug_dec_format(a->rule.value, buf);
    return buf;
}

/* The icons column's total. A partial chart draws every quota exactly, so
** its icons add up to total / V, not to the rounded N. */
static const char *total_icons(const ug_allocation *a, size_t g, char *buf)
{
    if (a->rule.partial)
        return trimmed_ratio(a->group_totals[g].v, a->rule.value.v, buf);
    snprintf(buf, 64, "%ld", a->group_icons[g]);
    return buf;
}

/* Text from the layout, as the terminal will show it (ug_text_visible):
** a label holding U+202E must not reverse the rest of its row. Padded to
** width bytes, as printf's %-24s pads. */
static void cell(ug_buf *b, const char *s, size_t width)
{
    size_t start = b->len;
    ug_buf_visible(b, s);
    for (size_t n = b->len - start; n < width && !b->failed; n++)
        ug_buf_puts(b, " ");
}

/* A count, or a placeholder the layout may word: right-aligned in 12. */
static void text_count(ug_buf *b, const char *s)
{
    for (size_t n = ug_text_visible(s, NULL, 0); n < 12 && !b->failed; n++)
        ug_buf_puts(b, " ");
    ug_buf_visible(b, s);
}

static const char *method_name(const ug_allocation *a)
{
    switch (a->rule.method) {
    case UG_METHOD_LARGEST_REMAINDER: return "largest remainder";
    case UG_METHOD_SAINTE_LAGUE: return "Sainte-Lague";
    case UG_METHOD_DHONDT: return "D'Hondt";
    case UG_METHOD_BIPROPORTIONAL:
        return a->cat_icons ? "biproportional (group and category totals each by "
                              "Sainte-Lague from one N)"
                            : "biproportional (one group: Sainte-Lague)";
    }
    return "?";
}

/* The second margin and the divisors: what lets a reader check that the
** icons are round(count / (group divisor x category divisor)). */
static void report_biprop(const ug_allocation *a, ug_buf *b)
{
    const ug_chart *c = a->chart;
    char cnt[48], q[64], dv[48];
    long n = 0;
    ug_buf_printf(b, "\nAll groups\n  %-24s %12s %12s %8s %12s\n", "category", "count",
                  "quota", "icons", "divisor");
    for (size_t i = 0; i < a->ncats; i++) {
        ug_dec tot = {0};
        for (size_t g = 0; g < a->ngroups; g++)
            tot.v += alloc_at(a, g, i)->count.v;
        n += a->cat_icons[i];
        ug_buf_puts(b, "  ");
        cell(b, or_empty(c->cats[i].label.text), 24);
        ug_buf_printf(b, " %12s %12s %8ld %12s\n", ug_dec_format(tot, cnt),
                      trimmed_ratio(tot.v, a->rule.value.v, q), a->cat_icons[i],
                      ug_dec_format(a->cat_div[i], dv));
    }
    ug_buf_printf(b, "  %-24s %12s %12s %8ld\n", "total", "", "", n);
    ug_buf_puts(b, "Group divisors (icons = round(count / (group divisor x category "
                   "divisor))):\n");
    for (size_t g = 0; g < a->ngroups; g++) {
        ug_buf_puts(b, "  ");
        cell(b, group_name(c, g), 24);
        ug_buf_printf(b, " %12s %8ld icons\n", ug_dec_format(a->group_div[g], dv),
                      a->group_icons[g]);
    }
    ug_buf_printf(b, "Divisors are rounded to six places. Ties decided by the rule "
                     "(the larger count, then the one listed first): groups' shares "
                     "%s, categories' shares %s, cells %zu.\n",
                  a->group_tie ? "yes" : "no", a->cat_tie ? "yes" : "no", a->ties);
}

static void report_text(const ug_allocation *a, ug_buf *b)
{
    const ug_chart *c = a->chart;
    char v[64], tot[48], n[64];
    ug_buf_printf(b, "Each icon = %s%s", value_text(a, v), c->unit_label.text ? " " : "");
    cell(b, or_empty(c->unit_label.text), 0);
    ug_buf_printf(b, "; method: %s%s\n", method_name(a),
                  a->rule.partial ? " (partial icons)" : "");
    for (size_t g = 0; g < a->ngroups; g++) {
        if (c->groups.n) {
            ug_buf_puts(b, "\n");
            cell(b, group_name(c, g), 0);
            ug_buf_puts(b, "\n");
        }
        ug_buf_printf(b, "  %-24s %12s %12s %8s %12s %12s %8s\n", "category",
                      chart_is_percent(c) ? "share %" : "count", "quota", "icons",
                      "shown", "difference", "rel %");
        for (size_t i = 0; i < a->ncats; i++) {
            row_text t;
            describe_share(a, alloc_at(a, g, i), &t);
            ug_buf_puts(b, "  ");
            cell(b, or_empty(c->cats[i].label.text), 24);
            ug_buf_puts(b, " ");
            text_count(b, t.count_text);
            ug_buf_printf(b, " %12s %8s %12s %12s %8s\n", t.quota, t.icons, t.shown,
                          t.diff, t.rel);
        }
        const pub_cell *m = &a->pub->group_totals[g];
        ug_buf_printf(b, "  %-24s ", "total");
        text_count(b, pub_hidden(m->status) ? a->pub->other_label
                                            : ug_dec_format(m->value, tot));
        ug_buf_printf(b, " %12s %8s\n", "", total_icons(a, g, n));
    }
    if (a->cat_icons)
        report_biprop(a, b);
}

static void report_csv(const ug_allocation *a, ug_buf *b)
{
    const ug_chart *c = a->chart;
    ug_buf_puts(b, "group,category,count,quota,icons,shown,difference,status\n");
    for (size_t g = 0; g < a->ngroups; g++)
        for (size_t i = 0; i < a->ncats; i++) {
            row_text t;
            describe_share(a, alloc_at(a, g, i), &t);
            ug_buf_csv_field(b, group_name(c, g));
            ug_buf_puts(b, ",");
            ug_buf_csv_field(b, or_empty(c->cats[i].label.text));
            ug_buf_puts(b, ",");
            ug_buf_csv_field(b, t.count_text);
            ug_buf_printf(b, ",%s,%s,%s,%s,%s\n", t.quota, t.icons, t.shown, t.diff,
                          t.status);
        }
}

static void report_json(const ug_allocation *a, ug_buf *b)
{
    const ug_chart *c = a->chart;
    ug_buf_puts(b, "[\n");
    for (size_t g = 0; g < a->ngroups; g++)
        for (size_t i = 0; i < a->ncats; i++) {
            row_text t;
            describe_share(a, alloc_at(a, g, i), &t);
            ug_buf_puts(b, "  {\"group\": ");
            ug_buf_json_string(b, group_name(c, g));
            ug_buf_puts(b, ", \"category\": ");
            ug_buf_json_string(b, or_empty(c->cats[i].label.text));
            ug_buf_printf(b, ", \"status\": \"%s\"%s, \"count\": ", t.status,
                          a->internal ? ", \"not-for-publication\": true" : "");
            if (alloc_hidden(alloc_at(a, g, i))) {
                ug_buf_json_string(b, t.count_text);
                ug_buf_puts(b, ", \"quota\": null, \"icons\": 0, \"shown\": null, "
                               "\"difference\": null}");
            } else {
                ug_buf_printf(b, "%s, \"quota\": %s, \"icons\": %s, \"shown\": %s, "
                              "\"difference\": %s}", t.count, t.quota, t.icons, t.shown,
                              t.diff);
            }
            ug_buf_puts(b, g + 1 == a->ngroups && i + 1 == a->ncats ? "\n" : ",\n");
        }
    ug_buf_puts(b, "]\n");
}

/* The analyst's view says first what it is, so that a pasted copy says so too. */
static const char internal_banner[] =
    "INTERNAL VIEW - NOT FOR PUBLICATION: every count as counted, hidden ones "
    "included\n";

ug_status ug_allocation_report(const ug_allocation *a, ug_report_format fmt,
                               char **out, size_t *len, ug_error *err)
{
    ug_error_clear(err);
    ug_buf b;
    ug_buf_init(&b);
    if (a->internal && fmt != UG_REPORT_JSON)
        ug_buf_puts(&b, internal_banner);
    if (fmt == UG_REPORT_CSV)
        report_csv(a, &b);
    else if (fmt == UG_REPORT_JSON)
        report_json(a, &b);
    else
        report_text(a, &b);
    return ug_buf_take(&b, out, len, err);
}
