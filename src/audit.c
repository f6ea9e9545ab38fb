/*
** Audit stage: a chart and its allocation -> findings a reader of the
** picture would want fixed before it is published.
**
** Each rule has a stable name of our own, a severity, the place in the layout
** it is about, a plain message and, where one can be computed, a fix:
**   honesty        vanished-category (a positive count drawn as no icon),
**                  rounding-difference (shown value off by more than
**                  audit.rounding-tolerance, default 10 %), total-mismatch;
**   privacy        small-count (positive counts under audit.small-count,
**                  default 10, or an agency preset), derivable-suppression
**                  (a hidden small count that the published cells and the
**                  totals narrow, by the attacker's linear programs);
**   accessibility  low-contrast-icon (WCAG 2.1 SC 1.4.11, 3:1),
**                  low-contrast-text (SC 1.4.3, 4.5:1), confusable-colors,
**                  too-many-categories, missing-title / -source / -unit-label.
** Errors are what makes the picture wrong (an icon missing, a total that
** does not add up, a suppressed cell that can be worked out); the rest are
** warnings.
**
** Confusable colours: two categories are confusable when their CIEDE2000
** difference is under AUDIT_MIN_DELTA_E (8) for normal vision or any of the
** three simulated dichromacies. No published threshold exists for telling
** categorical colours apart after simulation; 8 is unitgram's own choice,
** set so that the three published CVD-safe palettes (Okabe-Ito, Tol bright,
** Tol muted) pass in full, their closest pair being about 8.7.
*/
#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <string.h>
#include <strings.h>

#include "alloc.h"
#include "audit.h"
#include "glyph.h"
#include "glyph_cache.h"
#include "page.h"
#include "phrase.h"
#include "resolve.h"
#include "scene.h"
#include "text.h"
#include "color.h"

struct ug_findings {
    ug_finding *items;
    size_t n, cap;
};

typedef struct {
    const ug_chart *c;
    const ug_allocation *a;
    ug_findings *f;
    ug_error *err;
    const ug_pack_options *opt; /* where glyphs are found; may be NULL */
    bool keep_scale; /* a page panel compared with others: its icon value stays */
    const struct audit_rule *rule; /* the rule being checked; add() files under it */
    const ug_scene *scene; /* what was drawn, when the caller has it: its glyphs */
} audit_ctx;

/* One audit rule: its stable name, the severity of its findings, the check
** that finds them (NULL for a rule checked across a page's charts) and where
** the rule comes from. The table of rules (`rules`, below the checks) is the
** only list of them: audit.ignore, the order checks run in and each
** finding's name and severity all come from it. */
typedef struct audit_rule {
    const char *name;
    ug_severity severity;
    ug_status (*check)(audit_ctx *x);
    const char *source;
} audit_rule;



#define COUNT(a) (sizeof(a) / sizeof((a)[0]))


const char *ug_severity_name(ug_severity s)
{
    return s == UG_SEVERITY_ERROR ? "error" : s == UG_SEVERITY_WARNING ? "warning" : "note";
}

/* ---- the findings list --------------------------------------------------- */

static bool ignored(const ug_chart *c, const char *rule)
{
    for (size_t i = 0; i < c->audit.ignore.n; i++)
        if (c->audit.ignore.items[i].text &&
            !strcmp(c->audit.ignore.items[i].text, rule))
            return true;
    return false;
}

static ug_status oom(audit_ctx *x)
{
    return ug_fail(x->err, UG_ENOMEM, ug_mark_file(x->c->path), "out of memory");
}

/* Add a finding of the current rule (x->rule) unless the layout ignores it.
** fix may be NULL. */
static ug_status add(audit_ctx *x, ug_mark where, const char *fix, const char *fmt, ...)
    UG_PRINTF(4, 5);

static ug_status add(audit_ctx *x, ug_mark where, const char *fix, const char *fmt, ...)
{
    if (ignored(x->c, x->rule->name))
        return UG_OK;
    ug_findings *f = x->f;
    if (f->n == f->cap) {
        size_t cap = f->cap ? 2 * f->cap : 8;
        ug_finding *items = ug_realloc(f->items, cap * sizeof *items);
        if (!items)
            return oom(x);
        f->items = items;
        f->cap = cap;
    }
    char msg[1024];
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(msg, sizeof msg, fmt, ap);
    va_end(ap);
    const char *file = where.file ? where.file : x->c->path;
    ug_finding *it = &f->items[f->n];
    *it = (ug_finding){x->rule->name, x->rule->severity, where, ug_strdup(msg),
                       fix ? ug_strdup(fix) : NULL, x->rule->source};
    it->where.file = file ? ug_strdup(file) : NULL;
    f->n++; /* counted before checking, so ug_findings_free releases partial copies */
    if (!it->message || (fix && !it->fix) || (file && !it->where.file))
        return oom(x);
    return UG_OK;
}

void ug_findings_free(ug_findings *f)
{
    if (!f)
        return;
    for (size_t i = 0; i < f->n; i++) {
        ug_free((char *)f->items[i].message);
        ug_free((char *)f->items[i].fix);
        ug_free((char *)f->items[i].where.file);
    }
    ug_free(f->items);
    ug_free(f);
}

size_t ug_findings_count(const ug_findings *f)
{
    return f ? f->n : 0;
}

size_t ug_findings_count_severity(const ug_findings *f, ug_severity at_least)
{
    size_t n = 0;
    for (size_t i = 0; f && i < f->n; i++)
        n += f->items[i].severity >= at_least;
    return n;
}

const ug_finding *ug_findings_at(const ug_findings *f, size_t i)
{
    return f && i < f->n ? &f->items[i] : NULL;
}

/* ---- naming things in messages ------------------------------------------ */

static const char *cat_name(const ug_chart *c, size_t i)
{
    return c->cats[i].label.text ? c->cats[i].label.text : c->cats[i].id;
}

static const char *unit(const ug_chart *c)
{
    if (chart_is_percent(c))
        return "%";
    return c->unit_label.text ? c->unit_label.text : "counted";
}

/* " in North ward" for grouped charts, "" otherwise. */
static const char *in_group(const ug_chart *c, size_t g, char *buf, size_t n)
{
    if (!c->groups.n)
        return "";
    snprintf(buf, n, " in %s", c->groups.items[g].text ? c->groups.items[g].text : "?");
    return buf;
}

static ug_mark count_mark(const ug_chart *c, size_t i, size_t g)
{
    return c->cats[i].count_marks ? c->cats[i].count_marks[g] : c->cats[i].mark;
}

static ug_mark file_start(const ug_chart *c)
{
    return (ug_mark){c->path, 1, 1};
}

/* ---- missing title, source, unit label ---------------------------------- */

static ug_status check_title(audit_ctx *x)
{
    if (x->c->title.text)
        return UG_OK;
    return add(x, file_start(x->c), "title: <what the chart shows, where and when>",
               "the chart has no title; a reader cannot tell what is counted");
}

static ug_status check_source(audit_ctx *x)
{
    if (x->c->source.n)
        return UG_OK;
    return add(x, file_start(x->c), "source: <who counted, and when>",
               "the chart names no source for its counts");
}

/* The CLDR plural category the key's icon value takes in the chart's
** language ("one" for 1 in English); "other" for a waffle of shares. */
static const char *value_category(const audit_ctx *x)
{
    if (!x->a || x->a->rule.by_cells)
        return "other";
    return phrase_plural(x->c->lang.text ? x->c->lang.text : "en", x->a->rule.value, 0);
}

static ug_status check_unit_label(audit_ctx *x)
{
    if (x->c->unit_label.text || x->c->currency.text) /* money names its unit */
        return UG_OK;
    char fix[160];
    const char *cat = value_category(x);
    if (strcmp(cat, "other")) /* one form would make "Each icon = 1 households" */
        snprintf(fix, sizeof fix, "unit-label: {%s: <what one icon counts in the "
                 "singular>, other: <the same in the plural>}", cat);
    else
        snprintf(fix, sizeof fix, "unit-label: <what one icon counts, e.g. households>");
    return add(x, file_start(x->c), fix,
               "the chart does not say what is counted, so its key cannot say "
               "what one icon stands for");
}

/* One unit-label for every number: "Each icon = 1 people" where the chart's
** language puts the icon value in a plural category of its own (CLDR plural
** rules, through ICU). */
static ug_status check_unit_forms(audit_ctx *x)
{
    const ug_chart *c = x->c;
    const char *lang = c->lang.text ? c->lang.text : "en", *cat = value_category(x);
    if (!c->unit_label.text || c->has_unit_forms || c->currency.text || !strcmp(cat, "other"))
        return UG_OK;
    char num[PHRASE_NUMBER_MAX], fix[512];
    phrase_number(lang, x->a->rule.value, 0, num);
    snprintf(fix, sizeof fix, "unit-label: {%s: <the unit's form for %s>, other: %s}",
             cat, num, c->unit_label.text);
    return add(x, c->unit_label.mark, fix,
               "the key says each icon is %s %s, but in '%s' that number takes the "
               "unit's '%s' form, which unit-label does not give", num,
               c->unit_label.text, lang, cat);
}

/* ---- stated total --------------------------------------------------------- */

static ug_dec chart_sum(const ug_chart *c)
{
    ug_dec sum = {0};
    for (size_t i = 0; i < c->ncats; i++)
        sum.v += alloc_sum(c->cats[i].counts, chart_ngroups(c)).v;
    return sum;
}

static ug_status check_total(audit_ctx *x)
{
    const ug_chart *c = x->c;
    if (!c->has_total)
        return UG_OK;
    ug_dec sum = chart_sum(c);
    if (sum.v == c->total.v)
        return UG_OK;
    char t[48], s[48], fix[128];
    ug_dec_format(c->total, t);
    ug_dec_format(sum, s);
    snprintf(fix, sizeof fix, "total: %s (or correct the counts)", s);
    return add(x, c->total_mark, fix,
               "the stated total is %s but the counts add up to %s", t, s);
}

/* ---- vanished categories and rounding differences ------------------------ */

static ug_dec tolerance(const ug_chart *c) { return c->audit.tolerance_percent; }

typedef enum { SHARE_OK, SHARE_VANISHED, SHARE_ROUNDED } share_verdict;

/* |shown - count| > tolerance% of count, in exact integers: the difference
** is diff / (shown_den * 10^6) and the tolerance tol.v / 10^6 percent. */
static share_verdict judge(const ug_chart *c, const alloc_share *s)
{
    if (s->count.v == 0 || alloc_hidden(s))
        return SHARE_OK;
    if (s->icons == 0 && !s->partial)
        return SHARE_VANISHED;
    ug_i128 diff = s->shown_num - s->count.v * s->shown_den;
    if (diff < 0)
        diff = -diff;
    if (diff * 100 * UG_DEC_SCALE > tolerance(c).v * s->count.v * s->shown_den)
        return SHARE_ROUNDED;
    return SHARE_OK;
}

/* Scratch space for trying other rules: a share per category and a column
** of counts, taken from the published table so that a suggested value can
** never depend on a hidden count. */
typedef struct {
    alloc_share *shares;
    ug_dec *column;
    const pub_table *pub;
} trial;

/* Whether every group passes under r (every category visible and within
** the tolerance), in *passes. Only running out of memory is an error: a rule
** the allocator refuses (more icons than the chart's limit, say) simply does
** not pass. */
/* The biproportional method rounds the whole table at once (FORMAT.md §7),
** so a trial value is judged on the whole table's icons. */
static ug_status biprop_passes(const ug_chart *c, const alloc_rule *r, trial *t,
                               bool *passes)
{
    size_t ng = chart_ngroups(c), nc = c->ncats;
    alloc_share *sh = ug_calloc(ng * nc, sizeof *sh);
    ug_dec *counts = ug_calloc(ng * nc, sizeof *counts);
    ug_dec *gt = ug_calloc(ng, sizeof *gt), *gd = ug_calloc(ng, sizeof *gd);
    ug_dec *cd = ug_calloc(nc, sizeof *cd);
    long *gi = ug_calloc(ng, sizeof *gi), *ci = ug_calloc(nc, sizeof *ci);
    ug_status st = UG_ENOMEM;
    *passes = false;
    if (sh && counts && gt && gd && cd && gi && ci) {
        for (size_t k = 0; k < ng * nc; k++)
            counts[k] = t->pub->cells[k].value;
        alloc_biprop_out o = {sh, gt, gi, ci, gd, cd, 0, 0, false, false};
        alloc_biprop_in in = {counts, ng, nc, r, NULL, NULL, &o};
        ug_error scratch = {0};
        st = alloc_biproportional(&in, ug_mark_file(NULL), &scratch);
        *passes = st == UG_OK;
        for (size_t k = 0; *passes && k < ng * nc; k++) {
            sh[k].status = t->pub->cells[k].status;
            *passes = judge(c, &sh[k]) == SHARE_OK;
        }
        st = st == UG_ENOMEM ? st : UG_OK;
    }
    ug_free(sh);
    ug_free(counts);
    ug_free(gt);
    ug_free(gd);
    ug_free(cd);
    ug_free(gi);
    ug_free(ci);
    return st;
}

static ug_status rule_passes(const ug_chart *c, const alloc_rule *r, trial *t,
                             bool *passes)
{
    if (r->method == UG_METHOD_BIPROPORTIONAL && c->groups.n)
        return biprop_passes(c, r, t, passes);
    *passes = true;
    for (size_t g = 0; *passes && g < chart_ngroups(c); g++) {
        for (size_t i = 0; i < c->ncats; i++)
            t->column[i] = pub_at(t->pub, g, i)->value;
        long n;
        ug_error scratch = {0};
        ug_status st = alloc_apportion(t->column, c->ncats, r, t->shares, &n,
                                       ug_mark_file(NULL), &scratch);
        if (st == UG_ENOMEM)
            return st;
        for (size_t i = 0; i < c->ncats; i++)
            t->shares[i].status = pub_at(t->pub, g, i)->status;
        *passes = st == UG_OK;
        for (size_t i = 0; *passes && i < c->ncats; i++)
            *passes = judge(c, &t->shares[i]) == SHARE_OK;
    }
    return UG_OK;
}

static ug_dec largest_count(const pub_table *t)
{
    ug_dec m = {0};
    for (size_t k = 0; k < t->ngroups * t->ncats; k++)
        if (t->cells[k].value.v > m.v)
            m = t->cells[k].value;
    return m;
}

static long icon_limit(const ug_chart *c)
{
    return c->limits.max_icons ? (long)c->limits.max_icons : UG_DEFAULT_MAX_ICONS;
}

/* Whether some group would need more icons than the limit at value v. */
static bool too_many_icons(const ug_chart *c, const pub_table *t, ug_dec v)
{
    for (size_t g = 0; g < t->ngroups; g++) {
        ug_dec total = {0};
        for (size_t i = 0; i < t->ncats; i++)
            total.v += pub_at(t, g, i)->value.v;
        if (alloc_icons_for_value(total, v) > icon_limit(c))
            return true;
    }
    return false;
}

/* The largest nice icon value (1, 2, 2.5, 5 x 10^k) under which every
** category stays visible and within the tolerance; *found false if none. */
static ug_status best_value(const ug_chart *c, const alloc_rule *base, trial *t,
                            ug_dec *out, bool *found)
{
    alloc_rule r = *base;
    r.partial = false;
    r.max_icons = icon_limit(c);
    ug_dec top = largest_count(t->pub), v = {0};
    *found = false;
    for (;;) {
        ug_dec next = alloc_next_nice(v);
        if (next.v == v.v || next.v > top.v)
            return UG_OK;
        v = r.value = next;
        bool passes = false;
        if (!too_many_icons(c, t->pub, v)) {
            ug_status st = rule_passes(c, &r, t, &passes);
            if (st)
                return st;
        }
        if (passes) {
            *out = v;
            *found = true;
        }
    }
}

/* Waffles by cells: the fewest nice cell counts above the present one. */
static ug_status best_cells(const ug_chart *c, const alloc_rule *base, trial *t,
                            long *out, bool *found)
{
    alloc_rule r = *base;
    ug_dec v = {(ug_i128)base->cells * UG_DEC_SCALE};
    *found = false;
    for (;;) {
        v = alloc_next_nice(v);
        if (v.v / UG_DEC_SCALE > icon_limit(c))
            return UG_OK;
        r.cells = (long)(v.v / UG_DEC_SCALE);
        ug_status st = rule_passes(c, &r, t, found);
        if (st || *found) {
            *out = r.cells;
            return st;
        }
    }
}

static ug_status rounding_fix(audit_ctx *x, char *fix, size_t n)
{
    const ug_chart *c = x->c;
    size_t k = c->ncats ? c->ncats : 1;
    trial t = {ug_calloc(k, sizeof *t.shares), ug_calloc(k, sizeof *t.column),
               x->a->pub};
    char tol[48], v[48];
    ug_dec_format(tolerance(c), tol);
    ug_dec value = {0};
    long cells = 0;
    bool found = false;
    ug_status st = t.shares && t.column ? UG_OK : UG_ENOMEM;
    if (!st && x->a->rule.by_cells)
        st = best_cells(c, &x->a->rule, &t, &cells, &found);
    else if (!st && !x->keep_scale)
        st = best_value(c, &x->a->rule, &t, &value, &found);
    ug_free(t.shares);
    ug_free(t.column);
    if (st)
        return oom(x);
    if (found && x->a->rule.by_cells)
        snprintf(fix, n, "cells: %ld keeps every category visible and within %s %%",
                 cells, tol);
    else if (found)
        snprintf(fix, n, "icon-value: %s keeps every category visible and within %s %%",
                 ug_dec_format(value, v), tol);
    else if (c->form == UG_FORM_ROWS && c->method == UG_METHOD_BIPROPORTIONAL)
        snprintf(fix, n, "method: sainte-lague with rounding: partial (biproportional "
                         "rounds to whole icons)");
    else if (c->form == UG_FORM_ROWS)
        snprintf(fix, n, "rounding: partial");
    else
        snprintf(fix, n, "form: rows with rounding: partial");
    return UG_OK;
}

static ug_status report_share(audit_ctx *x, size_t i, size_t g, share_verdict v,
                              const char *fix)
{
    const ug_chart *c = x->c;
    const alloc_share *s = alloc_at(x->a, g, i);
    char cnt[48], shown[64], buf[256];
    ug_dec_format(s->count, cnt);
    ug_ratio_format(s->shown_num, s->shown_den * UG_DEC_SCALE, 2, shown);
    const char *grp = in_group(c, g, buf, sizeof buf);
    if (v == SHARE_VANISHED)
        return add(x, count_mark(c, i, g), fix,
                   "'%s'%s has %s %s but gets no icon, so it disappears from the "
                   "picture", cat_name(c, i), grp, cnt, unit(c));
    char tol[48];
    return add(x, count_mark(c, i, g), fix,
               "'%s'%s has %s %s but its icons show %s, more than %s %% off",
               cat_name(c, i), grp, cnt, unit(c), shown,
               ug_dec_format(tolerance(c), tol));
}

/* Every share judged `want`, with one computed fix for them all. */
static ug_status check_shares(audit_ctx *x, share_verdict want)
{
    char fix[256] = "";
    ug_status st = UG_OK;
    for (size_t g = 0; !st && g < x->a->ngroups; g++)
        for (size_t i = 0; !st && i < x->a->ncats; i++) {
            share_verdict v = judge(x->c, alloc_at(x->a, g, i));
            if (v != want)
                continue;
            if (!fix[0] && (st = rounding_fix(x, fix, sizeof fix)))
                break;
            st = report_share(x, i, g, v, fix);
        }
    return st;
}

static ug_status check_vanished(audit_ctx *x) { return check_shares(x, SHARE_VANISHED); }

static ug_status check_rounded(audit_ctx *x) { return check_shares(x, SHARE_ROUNDED); }

/* ---- small counts and derivable suppression ------------------------------ */

/* A YAML double-quoted scalar, so a fix can be pasted whatever the names hold. */
static void yaml_quoted(ug_buf *b, const char *s)
{
    ug_buf_puts(b, "\"");
    for (; *s; s++) {
        if (*s == '"' || *s == '\\')
            ug_buf_puts(b, "\\");
        ug_buf_add(b, s, 1);
    }
    ug_buf_puts(b, "\"");
}

/* The chart's whole `suppress:` mapping with the changes a fix asks for, so
** that pasting it over the old one keeps everything else the chart hides.
** A label is kept only while the threshold it describes stays. */
static char *suppress_fix(const ug_chart *c, ug_dec below, bool zeros_hide,
                          bool complement_auto)
{
    ug_buf b;
    ug_buf_init(&b);
    char n[48];
    bool same = c->has_suppress && c->suppress_below.v == below.v;
    ug_buf_printf(&b, "suppress: {below: %s", ug_dec_format(below, n));
    if (same && c->suppress_label.text) {
        ug_buf_puts(&b, ", label: ");
        yaml_quoted(&b, c->suppress_label.text);
    }
    if (zeros_hide)
        ug_buf_puts(&b, ", zeros: hide");
    if (!complement_auto)
        ug_buf_puts(&b, ", complement: none");
    if (c->has_suppress && c->suppress_margins == UG_MARGINS_HIDDEN)
        ug_buf_puts(&b, ", margins: hidden");
    for (size_t k = 0; c->has_suppress && k < c->nsuppress_cells; k++) {
        const ug_cell_ref *r = &c->suppress_cells[k];
        ug_buf_puts(&b, k ? ", {" : ", cells: [{");
        if (r->group.text) {
            ug_buf_puts(&b, "group: ");
            yaml_quoted(&b, r->group.text);
            ug_buf_puts(&b, ", ");
        }
        ug_buf_puts(&b, "category: ");
        yaml_quoted(&b, r->category.text);
        ug_buf_puts(&b, k + 1 == c->nsuppress_cells ? "}]" : "}");
    }
    ug_buf_puts(&b, "}");
    char *out = NULL;
    ug_error scratch = {0};
    return ug_buf_take(&b, &out, NULL, &scratch) ? NULL : out;
}

static ug_dec small_threshold(const ug_chart *c, const resolve_small_preset **p)
{
    *p = resolve_small_count_preset(c->audit.small_count_preset.text);
    return *p ? (ug_dec){(*p)->below * UG_DEC_SCALE} : c->audit.small_count;
}

/* Published counts under the threshold. Hidden cells are protected already
** and rounded ones by their rounding; a zero is flagged only by a preset that
** counts zeros as small, and then `zeros: hide` is the fix. */
static ug_status check_small(audit_ctx *x)
{
    const ug_chart *c = x->c;
    if (chart_is_percent(c))
        return UG_OK; /* 5 % of an unknown total may be anyone: no count to judge */
    const resolve_small_preset *p;
    ug_dec below = small_threshold(c, &p);
    bool zero_too = p && p->zero_too;
    ug_dec keep = c->has_suppress && c->suppress_below.v > below.v ? c->suppress_below
                                                                    : below;
    bool zeros = zero_too || (c->has_suppress && c->suppress_zeros == UG_ZEROS_HIDE);
    bool comp = !c->has_suppress || c->suppress_complement == UG_COMPLEMENT_AUTO;
    char *fix = suppress_fix(c, keep, zeros, comp);
    if (!fix)
        return oom(x);
    char b[64], cnt[64], grp[256];
    ug_dec_format_grouped(below, b);
    ug_status st = UG_OK;
    for (size_t i = 0; !st && i < c->ncats; i++)
        for (size_t g = 0; !st && g < chart_ngroups(c); g++) {
            const alloc_share *s = alloc_at(x->a, g, i);
            ug_dec v = s->count;
            if (s->status != PUB_EXACT || (v.v == 0 && !zero_too) || v.v >= below.v)
                continue;
            st = add(x, count_mark(c, i, g), fix,
                     "'%s'%s is %s %s, under %s%s%s: so few can identify people",
                     cat_name(c, i), in_group(c, g, grp, sizeof grp),
                     ug_dec_format_grouped(v, cnt), unit(c), b, p ? "; " : "", p ? p->rule : "");
        }
    ug_free(fix);
    return st;
}

static void interval_text(double v, char *buf, size_t n)
{
    if (isinf(v))
        snprintf(buf, n, "any");
    else
        snprintf(buf, n, "%.6g", v);
}

static ug_status report_narrowed(audit_ctx *x, const disclose_interval *iv)
{
    const ug_chart *c = x->c;
    size_t g = iv->cell / c->ncats, i = iv->cell % c->ncats;
    bool comp = c->suppress_complement == UG_COMPLEMENT_AUTO;
    char *fix = comp ? NULL : suppress_fix(c, c->suppress_below,
                                           c->suppress_zeros == UG_ZEROS_HIDE, true);
    if (!comp && !fix)
        return oom(x);
    char lo[32], hi[32], grp[256];
    interval_text(iv->min, lo, sizeof lo);
    interval_text(iv->max, hi, sizeof hi);
    ug_status st = add(x, count_mark(c, i, g),
                       fix ? fix : "suppress: {margins: hidden} only if no totals of "
                                   "this table are published anywhere",
                       "'%s'%s is hidden, but the published counts and the totals "
                       "(assumed published elsewhere: margins: published) narrow it to "
                       "%s to %s", cat_name(c, i), in_group(c, g, grp, sizeof grp), lo, hi);
    ug_free(fix);
    return st;
}

/* The attacker's linear programs (Hundepool et al. 2012, ch. 4, the audit of
** a suppression pattern; src/disclose_audit.c): for each small hidden cell,
** the least and greatest value any table consistent with what is public
** allows. Protection holds when that covers the whole placeholder range. */
static ug_status check_derivable(audit_ctx *x)
{
    const pub_table *t = x->a->pub;
    if (!t->nsmall || !t->margins_published)
        return UG_OK;
    disclose_grid g;
    void *owned = NULL;
    ug_status st = disclose_grid_of(x->c, t, &g, &owned, x->err);
    if (st)
        return st;
    size_t n = 0;
    disclose_interval *iv = ug_calloc(g.rows * g.cols, sizeof *iv);
    if (!iv)
        st = oom(x);
    if (!st)
        st = disclose_audit(&g, iv, &n, x->err);
    for (size_t k = 0; !st && k < n; k++)
        if (!disclose_interval_covers(&g, &iv[k]))
            st = report_narrowed(x, &iv[k]);
    ug_free(iv);
    disclose_grid_release(owned);
    return st;
}

/* ---- colours ------------------------------------------------------------- */


/* The colour a category is drawn in: its own, or the palette's. */
static ug_color cat_color(const ug_chart *c, size_t i)
{
    if (c->cats[i].color.set)
        return c->cats[i].color;
    return color_palette_at(c->style.palette, i);
}

static ug_mark color_mark(const ug_chart *c, size_t i)
{
    return c->cats[i].color_given ? c->cats[i].color.mark : c->cats[i].mark;
}

/* The fix is written as the user writes it at `where`: key + "\"#rrggbb\"" + close,
** e.g. color: "#c68900", or style: {ink: "#767676"} where no ink is given. */
typedef struct {
    const char *key, *close;
} fix_form;

static ug_status contrast_finding(audit_ctx *x, ug_mark where,
                                  fix_form form, const char *what, ug_color fg,
                                  ug_color bg, double threshold, const char *criterion)
{
    double r = color_contrast(fg, bg);
    if (color_contrast_passes(r, threshold))
        return UG_OK;
    char h[8], hb[8], hs[8], fix[128];
    ug_color shade;
    bool fixable = color_shade_for_contrast(fg, bg, threshold, &shade);
    if (fixable)
        snprintf(fix, sizeof fix, "%s\"%s\"%s (%.2f:1)", form.key,
                 color_format_hex(shade, hs), form.close, color_contrast(shade, bg));
    return add(x, where, fixable ? fix : NULL,
               "%s %s has contrast %.2f:1 against the background %s; %s asks for "
               "at least %g:1", what, color_format_hex(fg, h), r,
               color_format_hex(bg, hb), criterion, threshold);
}

static ug_color chart_background(const ug_chart *c)
{
    return c->style.background;
}

static ug_status check_text_contrast(audit_ctx *x)
{
    const ug_chart *c = x->c;
    ug_color ink = c->style.ink;
    return contrast_finding(x, c->style.ink.set ? c->style.ink.mark : file_start(c),
                            c->style.ink.set ? (fix_form){"ink: ", ""}
                                             : (fix_form){"style: {ink: ", "}"},
                            "the text colour", ink, chart_background(c), COLOR_WCAG_TEXT,
                            "WCAG 2.1 SC 1.4.3 (AA, normal text)");
}

static ug_status check_icon_contrast(audit_ctx *x)
{
    const ug_chart *c = x->c;
    ug_status st = UG_OK;
    for (size_t i = 0; !st && i < c->ncats; i++) {
        char what[300];
        snprintf(what, sizeof what, "the icon colour of '%s'", cat_name(c, i));
        st = contrast_finding(x, color_mark(c, i), (fix_form){"color: ", ""}, what,
                              cat_color(c, i), chart_background(c), COLOR_WCAG_NON_TEXT,
                              "WCAG 2.1 SC 1.4.11 (non-text contrast)");
    }
    return st;
}

/* Lab of every category colour under every vision: lab[v * n + i]. */
static ug_status category_labs(audit_ctx *x, color_lab **out)
{
    size_t n = x->c->ncats;
    ug_color *sim = ug_malloc((n ? n : 1) * COLOR_VISION_COUNT * sizeof *sim);
    *out = ug_malloc((n ? n : 1) * COLOR_VISION_COUNT * sizeof **out);
    ug_status st = (!sim || !*out) ? oom(x) : UG_OK;
    for (size_t v = 0; !st && v < COLOR_VISION_COUNT; v++)
        for (size_t i = 0; i < n; i++)
            sim[v * n + i] = color_simulate(cat_color(x->c, i), (color_vision)v);
    if (!st)
        st = color_to_lab(sim, n * COLOR_VISION_COUNT, *out, x->err);
    ug_free(sim);
    if (st) {
        ug_free(*out);
        *out = NULL;
    }
    return st;
}

/* Suggest a palette colour for category j that stands apart from the rest. */
static ug_status replacement(audit_ctx *x, size_t j, char *fix, size_t n)
{
    const ug_chart *c = x->c;
    ug_color *others = ug_malloc((c->ncats ? c->ncats : 1) * sizeof *others);
    if (!others)
        return oom(x);
    size_t k = 0;
    for (size_t i = 0; i < c->ncats; i++)
        if (i != j)
            others[k++] = cat_color(c, i);
    ug_color bg = c->style.background;
    color_pick pick;
    ug_status st = color_best_replacement(c->style.palette, others, k, &bg, &pick, x->err);
    char h[8];
    fix[0] = '\0';
    if (!st && pick.found)
        snprintf(fix, n, "color: \"%s\" (%s; smallest difference then %.1f)",
                 color_format_hex(pick.color, h), color_palette_name(c->style.palette),
                 pick.min_de);
    ug_free(others);
    return st;
}

/* Category j against every earlier one: one finding for its closest pair,
** so a long chart gives at most one finding (and one palette search) per
** category. */
/* A replacement colour is searched for the first pairs only: each search
** converts every category colour again, and a chart with this many
** confusable pairs needs grouping (too-many-categories) more than colours. */
#define AUDIT_MAX_COLOR_FIXES 32

static ug_status confusable_with_earlier(audit_ctx *x, const color_lab *lab, size_t j,
                                         size_t *fixes)
{
    size_t n = x->c->ncats, worst = 0, other = 0;
    double d = INFINITY;
    for (size_t i = 0; i < j; i++)
        for (size_t v = 0; v < COLOR_VISION_COUNT; v++) {
            double e = color_delta_e00(lab[v * n + i], lab[v * n + j]);
            if (e < d)
                d = e, worst = v, other = i;
        }
    if (d >= AUDIT_MIN_DELTA_E)
        return UG_OK;
    char fix[160] = "", hi[8], hj[8];
    ug_status st = (*fixes)++ < AUDIT_MAX_COLOR_FIXES ? replacement(x, j, fix, sizeof fix)
                                                      : UG_OK;
    if (st)
        return st;
    return add(x, color_mark(x->c, j),
               fix[0] ? fix : NULL,
               "'%s' (%s) and '%s' (%s) differ by CIEDE2000 %.1f under %s; unitgram "
               "asks for at least %g (its own threshold)",
               cat_name(x->c, other), color_format_hex(cat_color(x->c, other), hi),
               cat_name(x->c, j), color_format_hex(cat_color(x->c, j), hj), d,
               color_vision_name((color_vision)worst), AUDIT_MIN_DELTA_E);
}

static ug_status check_confusable(audit_ctx *x)
{
    color_lab *lab;
    ug_status st = category_labs(x, &lab);
    size_t fixes = 0;
    for (size_t j = 1; !st && j < x->c->ncats; j++)
        st = confusable_with_earlier(x, lab, j, &fixes);
    ug_free(lab);
    return st;
}

static ug_status check_category_count(audit_ctx *x)
{
    const ug_chart *c = x->c;
    if (c->ncats <= AUDIT_MAX_CATEGORIES)
        return UG_OK;
    return add(x, c->categories_mark,
               "combine the smallest categories into one, e.g. 'Other'",
               "%zu categories are more than a reader can hold while reading the "
               "picture (unitgram's limit is %d, common practice)", c->ncats,
               AUDIT_MAX_CATEGORIES);
}

/* ---- glyph weight ------------------------------------------------------- */

/* Glyphs that differ a lot in inked area pull the eye to the heavier category
** and make equal counts look unequal. A factor of 2 is unitgram's own limit
** (common practice, no source); the library's glyphs all lie within 0.25-0.50
** of their box, well inside it. */
#define AUDIT_MAX_INK_RATIO 2.0

static ug_status category_ink(audit_ctx *x, size_t i, double *ink)
{
    if (x->scene) { /* the glyphs as drawn: not loaded a second time */
        *ink = x->scene->glyphs[x->scene->cats[i].glyph]->ink;
        return UG_OK;
    }
    const ug_category *cat = &x->c->cats[i];
    glyph_search search = {x->opt ? x->opt->glyph_dirs : NULL,
                           x->opt ? x->opt->nglyph_dirs : 0, x->c->dir};
    ug_mark where = cat->glyph.text ? cat->glyph.mark : cat->mark;
    ug_glyph *g = NULL;
    ug_status st = glyph_cache_load(x->opt ? x->opt->glyph_cache : NULL,
                                    cat->glyph.text ? cat->glyph.text : "square",
                                    &search, where, &g, x->err);
    if (!st)
        *ink = g->ink;
    glyph_free(g);
    return st;
}

static ug_status check_glyph_weight(audit_ctx *x)
{
    const ug_chart *c = x->c;
    size_t light = 0, heavy = 0;
    double lo = 2, hi = -1, ink;
    for (size_t i = 0; i < c->ncats; i++) {
        ug_status st = category_ink(x, i, &ink);
        if (st)
            return st;
        if (ink < lo)
            lo = ink, light = i;
        if (ink > hi)
            hi = ink, heavy = i;
    }
    if (c->ncats < 2 || hi <= AUDIT_MAX_INK_RATIO * lo)
        return UG_OK;
    const ug_category *cat = &c->cats[light];
    char fix[256];
    snprintf(fix, sizeof fix, "a glyph for '%s' that covers at least %.0f%% of its box "
             "(half of '%s')", cat_name(c, light), 50 * hi + 0.5, cat_name(c, heavy));
    return add(x, cat->glyph.text ? cat->glyph.mark : cat->mark, fix,
               "the glyph of '%s' inks %.0f%% of its box and that of '%s' %.0f%%: more "
               "than %.0fx apart, so equal counts will not look equal",
               cat_name(c, light), 100 * lo, cat_name(c, heavy), 100 * hi,
               AUDIT_MAX_INK_RATIO);
}

/* ---- text no font can draw ------------------------------------------------ */

/* One finding per text holding characters no installed font can draw: they
** would print as empty boxes, and a reader could not tell. */
static ug_status undrawable_in(audit_ctx *x, const ug_text *t, const char *what)
{
    if (!t->text)
        return UG_OK;
    text_font f = {.family = resolve_font(x->c), .size = 16};
    unsigned long cps[6];
    size_t listed = 0, found = text_undrawable(&f, t->text, cps, 6, &listed);
    if (!found)
        return UG_OK;
    char list[96] = "";
    for (size_t i = 0; i < listed; i++)
        snprintf(list + strlen(list), sizeof list - strlen(list), "%sU+%04lX",
                 i ? ", " : "", cps[i]);
    return add(x, t->mark.line ? t->mark : file_start(x->c),
               "install a font that has them (Debian's fonts-noto-core, or "
               "fonts-noto-cjk for Chinese, Japanese and Korean) or name one in "
               "style.font",
               "%s holds characters no installed font can draw (%s%s): they would "
               "print as empty boxes", what, list, found > listed ? ", ..." : "");
}

static ug_status check_undrawable(audit_ctx *x)
{
    const ug_chart *c = x->c;
    ug_status st = UG_OK;
    const ug_text *heads[] = {&c->title, &c->subtitle, &c->unit_label};
    const char *names[] = {"the title", "the subtitle", "the unit label"};
    for (size_t i = 0; !st && i < 3; i++)
        st = undrawable_in(x, heads[i], names[i]);
    for (size_t i = 0; !st && i < c->ncats; i++) {
        char what[300];
        snprintf(what, sizeof what, "the note of '%s'", cat_name(c, i));
        if (!(st = undrawable_in(x, &c->cats[i].label, "a category label")))
            st = undrawable_in(x, &c->cats[i].note, what);
    }
    const ug_text_list *lists[] = {&c->groups, &c->notes, &c->source};
    const char *list_names[] = {"a group name", "a note", "a source line"};
    for (size_t k = 0; !st && k < 3; k++)
        for (size_t i = 0; !st && i < lists[k]->n; i++)
            st = undrawable_in(x, &lists[k]->items[i], list_names[k]);
    return st;
}

/* ---- the audit ------------------------------------------------------------ */

/* In the order findings are reported. */
static const audit_rule rules[] = {
    {"missing-title", UG_SEVERITY_WARNING, check_title,
     "SVG accessibility: an image needs an accessible name (REFERENCES.md §9)"},
    {"missing-source", UG_SEVERITY_WARNING, check_source, "common practice, no source"},
    {"missing-unit-label", UG_SEVERITY_WARNING, check_unit_label,
     "isotype: the key says what one icon stands for (REFERENCES.md §6)"},
    {"unit-plural", UG_SEVERITY_WARNING, check_unit_forms,
     "CLDR plural rules (Unicode TR35, Part 3 Numbers, Language Plural Rules), through ICU"},
    {"total-mismatch", UG_SEVERITY_ERROR, check_total, "FORMAT.md §1 (total)"},
    {"vanished-category", UG_SEVERITY_ERROR, check_vanished,
     "unitgram's own rule: a counted category never disappears (FORMAT.md §3)"},
    {"rounding-difference", UG_SEVERITY_WARNING, check_rounded,
     "FORMAT.md §3 (audit.tolerance); the default tolerance is common practice, "
     "no source"},
    {"small-count", UG_SEVERITY_WARNING, check_small,
     "small-count suppression rules of statistical agencies (REFERENCES.md §7)"},
    {"derivable-suppression", UG_SEVERITY_ERROR, check_derivable,
     "cell suppression audited by linear programming (REFERENCES.md §11)"},
    {"too-many-categories", UG_SEVERITY_WARNING, check_category_count,
     "common practice, no source"},
    {"low-contrast-text", UG_SEVERITY_WARNING, check_text_contrast,
     "WCAG 2.1 SC 1.4.3 (REFERENCES.md §3)"},
    {"low-contrast-icon", UG_SEVERITY_WARNING, check_icon_contrast,
     "WCAG 2.1 SC 1.4.11 (REFERENCES.md §3)"},
    {"confusable-colors", UG_SEVERITY_WARNING, check_confusable,
     "CIEDE2000 under simulated colour-vision deficiency (REFERENCES.md §4, §5)"},
    {"glyph-weight", UG_SEVERITY_WARNING, check_glyph_weight, "common practice, no source"},
    {"undrawable-text", UG_SEVERITY_WARNING, check_undrawable,
     "common practice, no source: text must print as itself, not as empty boxes"},
    {"page-scale-mismatch", UG_SEVERITY_WARNING, NULL,
     "isotype: one scale for charts compared (REFERENCES.md §6)"},
    {"page-fitted", UG_SEVERITY_NOTE, NULL,
     "common practice, no source: say when print is smaller than asked"},
};

static const audit_rule *rule_named(const char *name)
{
    for (size_t i = 0; name && i < COUNT(rules); i++)
        if (!strcmp(rules[i].name, name))
            return &rules[i];
    return NULL;
}

bool audit_rule_known(const char *name) { return rule_named(name) != NULL; }

size_t audit_rule_count(void) { return COUNT(rules); }

const char *audit_rule_name(size_t i) { return i < COUNT(rules) ? rules[i].name : NULL; }

const char *audit_rule_source(size_t i) { return i < COUNT(rules) ? rules[i].source : NULL; }

static ug_status check_ignore_list(audit_ctx *x)
{
    const ug_text_list *l = &x->c->audit.ignore;
    for (size_t i = 0; i < l->n; i++)
        if (!audit_rule_known(l->items[i].text))
            return ug_fail(x->err, UG_ESCHEMA, l->items[i].mark,
                           "audit.ignore names '%s', which is not an audit rule",
                           l->items[i].text ? l->items[i].text : "");
    return UG_OK;
}

ug_status ug_chart_audit(const ug_chart *chart, ug_findings **out, ug_error *err)
{
    ug_error_clear(err);
    return ug_chart_audit_with(chart, NULL, out, err);
}

/* Every chart rule on one chart, adding to x->f. */
static ug_status audit_one(audit_ctx *x)
{
    ug_allocation *a = NULL;
    ug_status st = check_ignore_list(x);
    if (!st && !x->a) /* nothing drawn yet: allocate as a drawing would */
        st = ug_chart_allocate(x->c, &a, x->err);
    if (a)
        x->a = a;
    /* an ignored rule is not checked at all: the colour search is costly */
    for (size_t i = 0; !st && i < COUNT(rules); i++)
        if (rules[i].check && !ignored(x->c, rules[i].name)) {
            x->rule = &rules[i];
            st = rules[i].check(x);
        }
    ug_allocation_free(a);
    x->a = NULL;
    return st;
}

static ug_status finish(audit_ctx *x, ug_status st, ug_findings **out)
{
    if (st) {
        ug_findings_free(x->f);
        x->f = NULL;
    }
    *out = x->f;
    return st;
}

/* One chart: what was drawn when alloc (and scene) are given, else as a
** drawing would allocate it and load its glyphs (through opt). */
static ug_status audit_chart(const ug_chart *chart, const ug_allocation *alloc,
                             const ug_scene *scene, const ug_pack_options *opt,
                             ug_findings **out, ug_error *err)
{
    ug_error_clear(err);
    audit_ctx x = {chart, alloc, ug_calloc(1, sizeof(ug_findings)), err, opt, false, NULL,
                   scene};
    return finish(&x, x.f ? audit_one(&x) : oom(&x), out);
}

ug_status ug_chart_audit_with(const ug_chart *chart, const ug_pack_options *opt,
                              ug_findings **out, ug_error *err)
{
    return audit_chart(chart, NULL, NULL, opt, out, err);
}

ug_status ug_chart_audit_drawn(const ug_chart *chart, const ug_allocation *alloc,
                               const ug_scene *scene, ug_findings **out, ug_error *err)
{
    return audit_chart(chart, alloc, scene, NULL, out, err);
}

/* ---- page files ----------------------------------------------------------- */

/* What one icon of a chart means and how big it is drawn, for comparing
** charts on one page. */
typedef struct {
    const ug_chart *c;
    alloc_rule rule;
} scale_of;

static bool same_unit(const ug_chart *a, const ug_chart *b)
{
    return a->unit_label.text && b->unit_label.text &&
           strcasecmp(a->unit_label.text, b->unit_label.text) == 0;
}

static bool same_scale(const scale_of *a, const scale_of *b)
{
    if (a->c->icon_size != b->c->icon_size)
        return false;
    if (a->rule.by_cells || b->rule.by_cells)
        return a->rule.by_cells == b->rule.by_cells; /* shares: size is all */
    return a->rule.value.v == b->rule.value.v;
}

/* What makes chart b draw as chart a does, written in b. A rows chart also
** gets partial rounding: at a value chosen for another chart its icons may
** otherwise stray from its counts. */
static void scale_fix(const scale_of *a, const scale_of *b, char *fix, size_t n)
{
    char v[48], size[48] = "", value[64] = "";
    const char *title = a->c->title.text ? a->c->title.text : "the first chart";
    if (a->rule.by_cells || b->rule.by_cells) {
        snprintf(fix, n, "shared-scale: true (one icon value and one icon size for "
                         "the page)");
        return;
    }
    bool other_value = a->rule.value.v != b->rule.value.v;
    if (other_value)
        snprintf(value, sizeof value, "icon-value: %s", ug_dec_format(a->rule.value, v));
    if (a->c->icon_size != b->c->icon_size)
        snprintf(size, sizeof size, "%sicon: {size: %g}", other_value ? " with " : "",
                 a->c->icon_size);
    bool partial = other_value && b->c->form == UG_FORM_ROWS
                   && b->c->rounding != UG_ROUND_PARTIAL;
    snprintf(fix, n, "%s%s%s (as in '%s')", value, size,
             partial ? " with rounding: partial" : "", title);
}

/* Whether chart i counts what another chart of the page counts. */
static bool shares_unit(const ug_page *page, size_t i)
{
    for (size_t j = 0; j < page->npanels; j++)
        if (j != i && page->panels[j].kind == UG_PANEL_CHART
            && same_unit(page->panels[i].chart, page->panels[j].chart))
            return true;
    return false;
}

/* Charts of the same thing side by side invite comparing their icons, which
** is honest only when an icon means the same and is drawn the same size
** (Neurath's rule, REFERENCES.md §6, carried across a page). Charts counting
** different things are not meant to be compared icon for icon. */
static ug_status check_page_scale(audit_ctx *x, const scale_of *s, size_t n)
{
    ug_status st = UG_OK;
    x->rule = rule_named("page-scale-mismatch");
    for (size_t j = 1; j < n && !st; j++) {
        size_t i = 0;
        while (i < j && (!same_unit(s[i].c, s[j].c) || same_scale(&s[i], &s[j])))
            i++;
        if (i == j)
            continue;
        char vi[48], vj[48];
        char fix[160];
        scale_fix(&s[i], &s[j], fix, sizeof fix);
        x->c = s[j].c; /* one finding per chart, against the first it differs from */
        st = add(x, s[j].c->categories_mark, fix,
                 "'%s' and '%s' both count %s but draw them at different scales "
                 "(%s at %g px against %s at %g px)",
                 s[i].c->title.text ? s[i].c->title.text : "(untitled)",
                 s[j].c->title.text ? s[j].c->title.text : "(untitled)",
                 s[j].c->unit_label.text,
                 s[i].rule.by_cells ? "shares" : ug_dec_format(s[i].rule.value, vi),
                 s[i].c->icon_size,
                 s[j].rule.by_cells ? "shares" : ug_dec_format(s[j].rule.value, vj),
                 s[j].c->icon_size);
    }
    return st;
}

/* Fitting shrank the panels: the reader of the audit should know the
** sheet does not show the sizes the files state. */
static ug_status note_fit(audit_ctx *x, const ug_page *page, const page_result *r)
{
    if (r->fit >= 1)
        return UG_OK;
    x->rule = rule_named("page-fitted");
    return add(x, page->page_mark.line ? page->page_mark : ug_mark_file(page->path),
               "a larger page, more columns, a panel's own icon: {size: ...} or "
               "fit: {shrink: false} to be told instead",
               "to fit the sheet, every panel's icons and text are drawn at %.0f%% "
               "of their stated sizes (not below fit: min-icon %gpx, min-text %.3gpt)",
               100 * r->fit, page->min_icon, page->min_text * 72 / 96);
}

/* The page as composed (fitted, shared scale applied): each chart panel is
** audited as the sheet shows it, from its allocation and scene. A panel's
** sources are printed at the page's foot, not under it: its audit sees them
** on a copy of the chart, so the composed page stays untouched (and may be
** audited on two threads at once). */
ug_status ug_composed_page_audit(const ug_composed_page *cp, ug_findings **out,
                                 ug_error *err)
{
    ug_error_clear(err);
    *out = NULL;
    const ug_page *page = cp->page;
    const page_result *r = &cp->r;
    size_t np = page->npanels ? page->npanels : 1;
    audit_ctx x = {NULL, NULL, ug_calloc(1, sizeof(ug_findings)), err,
                   cp->has_opt ? &cp->opt : NULL, false, NULL, NULL};
    scale_of *scales = ug_calloc(np, sizeof *scales);
    ug_chart *shown = ug_calloc(np, sizeof *shown);
    size_t n = 0;
    ug_status st = x.f && scales && shown ? UG_OK : UG_ENOMEM;
    if (st)
        ug_fail(err, st, ug_mark_file(page->path), "out of memory");
    for (size_t i = 0; !st && i < page->npanels; i++) {
        if (page->panels[i].kind != UG_PANEL_CHART)
            continue;
        shown[i] = r->charts[i];
        shown[i].source = page->panels[i].chart->source;
        x.c = &shown[i];
        x.a = r->allocs[r->alloc_of[i]];
        x.scene = r->scenes[i];
        /* a new icon value for one chart would break the page's comparison */
        x.keep_scale = shares_unit(page, i);
        st = audit_one(&x);
        if (!st && !(st = alloc_rule_for_chart(x.c, &scales[n].rule, err)))
            scales[n++].c = x.c;
    }
    if (!st && !page->shared_scale)
        st = check_page_scale(&x, scales, n);
    if (!st && n)
        st = note_fit(&x, page, r);
    st = finish(&x, st, out);
    ug_free(scales);
    ug_free(shown); /* shallow copies; the findings own copies of what they show */
    return st;
}

ug_status ug_page_audit(const ug_page *page, const ug_pack_options *opt,
                        ug_findings **out, ug_error *err)
{
    ug_composed_page *cp;
    *out = NULL;
    ug_status st = ug_page_compose(page, opt, &cp, err);
    if (!st)
        st = ug_composed_page_audit(cp, out, err);
    ug_composed_page_free(cp);
    return st;
}

/* ---- output ----------------------------------------------------------------- */

/* For a terminal: what the layout put in the file name, message or fix is
** shown escaped (ug_text_visible), as the command's diagnostics are. */
static void text_finding(ug_buf *b, const ug_finding *it)
{
    ug_buf_visible(b, it->where.file ? it->where.file : "-");
    if (it->where.line)
        ug_buf_printf(b, ":%u:%u", it->where.line, it->where.column);
    ug_buf_printf(b, ": %s: ", ug_severity_name(it->severity));
    ug_buf_visible(b, it->message);
    ug_buf_printf(b, " [%s]\n", it->rule);
    if (it->fix) {
        ug_buf_puts(b, "    fix: ");
        ug_buf_visible(b, it->fix);
        ug_buf_puts(b, "\n");
    }
}

static void json_finding(ug_buf *b, const ug_finding *it, bool last)
{
    ug_buf_puts(b, "    {\"rule\": ");
    ug_buf_json_string(b, it->rule);
    ug_buf_printf(b, ", \"severity\": \"%s\", \"file\": ", ug_severity_name(it->severity));
    ug_buf_json_string(b, it->where.file ? it->where.file : "");
    ug_buf_printf(b, ", \"line\": %u, \"column\": %u, \"message\": ", it->where.line,
                  it->where.column);
    ug_buf_json_string(b, it->message);
    ug_buf_puts(b, ", \"fix\": ");
    if (it->fix)
        ug_buf_json_string(b, it->fix);
    else
        ug_buf_puts(b, "null");
    ug_buf_puts(b, ", \"source\": ");
    ug_buf_json_string(b, it->source);
    ug_buf_puts(b, last ? "}\n" : "},\n");
}

ug_status ug_findings_format(const ug_findings *f, ug_report_format fmt, char **out,
                             size_t *len, ug_error *err)
{
    ug_error_clear(err);
    *out = NULL;
    if (fmt != UG_REPORT_TEXT && fmt != UG_REPORT_JSON)
        return ug_fail(err, UG_ESCHEMA, ug_mark_file(NULL),
                       "audit findings are written as text or JSON");
    size_t ne = ug_findings_count_severity(f, UG_SEVERITY_ERROR);
    size_t nw = ug_findings_count_severity(f, UG_SEVERITY_WARNING) - ne;
    size_t nn = ug_findings_count(f) - ne - nw;
    ug_buf b;
    ug_buf_init(&b);
    if (fmt == UG_REPORT_JSON)
        ug_buf_puts(&b, "{\n  \"findings\": [\n");
    for (size_t i = 0; i < ug_findings_count(f); i++) {
        if (fmt == UG_REPORT_JSON)
            json_finding(&b, &f->items[i], i + 1 == f->n);
        else
            text_finding(&b, &f->items[i]);
    }
    if (fmt == UG_REPORT_JSON)
        ug_buf_printf(&b, "  ],\n  \"errors\": %zu, \"warnings\": %zu, \"notes\": %zu\n}\n",
                      ne, nw, nn);
    else
        ug_buf_printf(&b, "%zu error%s, %zu warning%s, %zu note%s\n", ne,
                      ne == 1 ? "" : "s", nw, nw == 1 ? "" : "s", nn, nn == 1 ? "" : "s");
    return ug_buf_take(&b, out, len, err);
}
